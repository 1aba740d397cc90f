"""Gas mixtures with a cubic equation of state and van der Waals one-fluid mixing.

Mixing rules (van der Waals one-fluid):

    a = sum_i sum_j y_i y_j (1 - k_ij) sqrt(a_i a_j),    b = sum_i y_i b_i

In the dimensionless A = a P / (R T)^2, B = b P / (R T), with
L = ln((Z + delta1 B) / (Z + delta2 B)) and Delta = delta1 - delta2:

    ln phi_i = (b_i/b)(Z - 1) - ln(Z - B) - A / (B Delta) (abar_i - b_i/b) L,
    abar_i   = 2 sum_j y_j a_ij / a

and the residual Gibbs energy g = G_res/RT = sum_i y_i ln phi_i
= Z - 1 - ln(Z - B) - A L / (B Delta).  The residual enthalpy follows from
Gibbs-Helmholtz, H_res/RT = -T (dg/dT) at constant P and y, where g is
stationary in Z at the root, so dg/dT = g_A dA/dT + g_B dB/dT.  Written that way
it stays right when b depends on T (the quantum gases), where the usual
closed form (T da/dT - a) / (b R T Delta) L + Z - 1 would not.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ..errors import InputError
from ..thermo.nasa7 import R
from .families import CubicFamily
from .inputs import check_conditions
from .quantum import QUANTUM_GASES, QuantumGas, QuantumTable
from .result import GasProperties
from .roots import vapour_root

FloatArray = NDArray[np.float64]


def _species_label(names: Sequence[str] | None, i: int) -> str:
    return repr(names[i]) if names is not None else f"number {i}"


def _as_vector(value: ArrayLike, name: str, n_species: int | None) -> FloatArray:
    try:
        array = np.array(value, dtype=float)
    except (TypeError, ValueError):
        raise InputError(f"{name} must be an array of numbers, one per species, got {value!r}") from None
    if array.ndim != 1 or array.size == 0 or (n_species is not None and array.size != n_species):
        size = "at least one" if n_species is None else str(n_species)
        raise InputError(f"{name} must be a 1-D array with {size} entries (one per species), got shape {array.shape}")
    return array


def _interaction_matrix(kij: ArrayLike | None, n_species: int) -> FloatArray | None:
    """1 - k_ij, or None when every k_ij is zero (the mixing sum then factorises)."""
    if kij is None:
        return None
    k = np.array(kij, dtype=float)
    if k.shape != (n_species, n_species) or not np.isfinite(k).all():
        raise InputError(f"kij must be a finite {n_species} x {n_species} matrix, got shape {k.shape}")
    if not np.allclose(k, k.T, rtol=0.0, atol=1e-12) or np.any(np.diag(k) != 0.0):
        raise InputError("kij must be symmetric with a zero diagonal; give k_ij = k_ji and k_ii = 0")
    return None if not k.any() else 1.0 - k


def _quantum_gases(quantum: Sequence[str | QuantumGas | None] | None, n_species: int) -> dict[int, QuantumGas]:
    if quantum is None:
        return {}
    if len(quantum) != n_species:
        raise InputError(
            f"quantum must have one entry per species ({n_species}), got {len(quantum)}; "
            "use None for ordinary species"
        )
    gases = {}
    for i, entry in enumerate(quantum):
        if entry is None or entry is False:
            continue
        if isinstance(entry, QuantumGas):
            gases[i] = entry
        elif entry in QUANTUM_GASES:
            gases[i] = QUANTUM_GASES[entry]
        else:
            raise InputError(
                f"quantum entry {entry!r} of species {i} is not a known quantum gas; "
                f"use one of {sorted(QUANTUM_GASES)}, a QuantumGas, or None"
            )
    return gases


@dataclass(frozen=True, eq=False)
class _Species:
    """Per-species constants of the model that do not depend on T."""

    sqrt_ac: FloatArray  # sqrt(Omega_a) R Tc / sqrt(Pc), [sqrt(Pa m^6/mol^2)]
    b: FloatArray  # [m^3/mol]
    Tc: FloatArray  # [K]
    kappa: FloatArray  # [-]


class CubicModel:
    """A gas mixture described by a cubic equation of state.

    Parameters
    ----------
    family : CubicFamily
        The equation of state (PENG_ROBINSON or SOAVE_REDLICH_KWONG).
    Tc : array_like, shape (S,)
        Critical temperatures, [K].
    Pc : array_like, shape (S,)
        Critical pressures, [Pa].
    omega : array_like, shape (S,)
        Acentric factors, [-].
    kij : array_like, shape (S, S), optional
        Binary interaction parameters, symmetric with zero diagonal, [-]; zero by default.
    quantum : sequence, optional
        One entry per species: None for an ordinary species, or a quantum gas
        ("H2", "He" or a :class:`QuantumGas`) whose critical constants become
        the temperature-dependent Gunn-Chueh-Prausnitz values with omega = 0.
        Tc, Pc and omega given for such a species are then not used.
    quantum_correction : bool
        False ignores ``quantum`` and uses Tc, Pc and omega for every species.
    names : sequence of str, optional
        Species names, used in error messages only.

    Raises
    ------
    InputError
        Missing (NaN) or non-positive critical constants, arrays of unequal
        length, a bad kij matrix or an unknown quantum gas.
    """

    def __init__(
        self,
        family: CubicFamily,
        Tc: ArrayLike,
        Pc: ArrayLike,
        omega: ArrayLike,
        *,
        kij: ArrayLike | None = None,
        quantum: Sequence[str | QuantumGas | None] | None = None,
        quantum_correction: bool = True,
        names: Sequence[str] | None = None,
    ):
        Tc = _as_vector(Tc, "Tc", None)
        n_species = Tc.size
        Pc = _as_vector(Pc, "Pc", n_species)
        omega = _as_vector(omega, "omega", n_species)
        if names is not None and len(names) != n_species:
            raise InputError(f"names must have one entry per species ({n_species}), got {len(names)}")
        gases = _quantum_gases(quantum, n_species) if quantum_correction else {}
        for i in range(n_species):
            if i in gases:
                continue
            if not (np.isfinite(Tc[i]) and Tc[i] > 0 and np.isfinite(Pc[i]) and Pc[i] > 0 and np.isfinite(omega[i])):
                raise InputError(
                    f"critical constants of species {_species_label(names, i)} are missing or invalid "
                    f"(Tc = {Tc[i]:g} K, Pc = {Pc[i]:g} Pa, omega = {omega[i]:g}): give Tc > 0 [K], "
                    "Pc > 0 [Pa] and a finite acentric factor, or use the ideal gas model"
                )
        self.family = family
        self.names = tuple(names) if names is not None else None
        self.n_species = n_species
        self.quantum_gases = {i: gases[i] for i in sorted(gases)}
        self._one_minus_k = _interaction_matrix(kij, n_species)
        omega = omega.copy()
        Tc = Tc.copy()
        Pc = Pc.copy()
        quantum_index = list(gases)
        omega[quantum_index] = 0.0
        # Placeholders only: the T-dependent values replace them at each call.
        Tc[quantum_index] = 1.0
        Pc[quantum_index] = 1.0
        self._species = _Species(
            sqrt_ac=np.sqrt(family.omega_a) * R * Tc / np.sqrt(Pc),
            b=family.omega_b * R * Tc / Pc,
            Tc=Tc,
            kappa=np.asarray(family.kappa(omega), dtype=float),
        )
        self._quantum = QuantumTable.of(gases) if gases else None

    @property
    def name(self) -> str:
        """Name of the equation of state, as :func:`gas_model` knows it."""
        return self.family.name

    def __repr__(self) -> str:
        species = f", names={list(self.names)}" if self.names else ""
        return f"CubicModel({self.family.name!r}, S={self.n_species}{species})"

    # -- per-species parameters at T ---------------------------------------------------

    def _pure(self, T: FloatArray) -> tuple[FloatArray, FloatArray, FloatArray, FloatArray]:
        """sqrt(a_i) and b_i at T, with their T-derivatives; shapes broadcast to (B, S)."""
        sp = self._species
        sqrt_ac, b, Tc = sp.sqrt_ac, sp.b, sp.Tc
        dlnTc = dlnPc = 0.0
        if self._quantum is not None:
            q = self._quantum
            n_batch = T.shape[0]
            Tc_q, Pc_q, dlnTc_q, dlnPc_q = q.critical(T)
            sqrt_ac = np.repeat(sqrt_ac[None, :], n_batch, axis=0)
            b = np.repeat(b[None, :], n_batch, axis=0)
            Tc = np.repeat(Tc[None, :], n_batch, axis=0)
            dlnTc = np.zeros_like(Tc)
            dlnPc = np.zeros_like(Tc)
            sqrt_ac[:, q.index] = np.sqrt(self.family.omega_a) * R * Tc_q / np.sqrt(Pc_q)
            b[:, q.index] = self.family.omega_b * R * Tc_q / Pc_q
            Tc[:, q.index] = Tc_q
            dlnTc[:, q.index] = dlnTc_q
            dlnPc[:, q.index] = dlnPc_q
        sqrt_Tr = np.sqrt(T / Tc)
        m = 1.0 + sp.kappa * (1.0 - sqrt_Tr)
        # sqrt(a_i) = sqrt(ac_i) |m|: the published alpha = m^2 is kept as it
        # is past m = 0 (Tr above about 13 for omega = 0, so hydrogen above
        # about 560 K with the quantum correction), where it rises again.
        sqrt_a = sqrt_ac * np.abs(m)
        dTr_dT = (1.0 - T * dlnTc) / Tc
        dm_dT = -0.5 * sp.kappa * dTr_dT / sqrt_Tr
        dsqrt_a_dT = sqrt_a * (dlnTc - 0.5 * dlnPc) + sqrt_ac * np.sign(m) * dm_dT
        db_dT = b * (dlnTc - dlnPc)
        return sqrt_a, dsqrt_a_dT, np.broadcast_to(b, sqrt_a.shape), db_dT

    def _mix(self, y: FloatArray, sqrt_a: FloatArray) -> FloatArray:
        """sum_j (1 - k_ij) y_j sqrt(a_j), shape (B, S)."""
        ys = y * sqrt_a
        if self._one_minus_k is None:
            return np.broadcast_to(ys.sum(axis=1, keepdims=True), ys.shape)
        return ys @ self._one_minus_k

    # -- evaluation --------------------------------------------------------------------

    def properties(self, T: ArrayLike, P: ArrayLike, y: ArrayLike, *, dT: bool = False) -> GasProperties:
        """Z, ln phi, residual enthalpy and entropy of the gas at T, P and y.

        Parameters
        ----------
        T : float or array_like, shape (B,)
            Temperature, [K].
        P : float or array_like, shape (B,)
            Pressure, [Pa].
        y : array_like, shape (S,) or (B, S)
            Mole fractions, in the model's species order [-]; must sum to one.
        dT : bool
            Also return d ln phi / dT at constant P and y, [1/K].

        Returns
        -------
        GasProperties
            Scalars and (S,) arrays for one condition, with a leading batch axis otherwise.
        """
        T2, P2, y2, single = check_conditions(T, P, y, self.n_species)
        fam = self.family
        delta1, delta2 = fam.delta1, fam.delta2
        Delta = delta1 - delta2
        u, w = delta1 + delta2, delta1 * delta2

        sqrt_a, dsqrt_a, b_i, db_i = self._pure(T2)
        q = self._mix(y2, sqrt_a)
        a = np.sum(y2 * sqrt_a * q, axis=1, keepdims=True)
        b = np.sum(y2 * b_i, axis=1, keepdims=True)
        RT = R * T2
        A = a * P2 / (RT * RT)
        B = b * P2 / RT
        Z = vapour_root(-(1.0 + B - u * B), A + w * B * B - u * B * (1.0 + B), -B * (A + w * B * (1.0 + B)), B)

        Zpd1, Zpd2 = Z + delta1 * B, Z + delta2 * B
        L = np.log(Zpd1 / Zpd2)
        ln_Z_B = np.log(Z - B)
        beta = b_i / b
        abar = 2.0 * sqrt_a * q / a
        A_BD = A / (B * Delta)
        ln_phi = beta * (Z - 1.0) - ln_Z_B - A_BD * (abar - beta) * L
        g = Z - 1.0 - ln_Z_B - A_BD * L

        da = 2.0 * np.sum(y2 * dsqrt_a * q, axis=1, keepdims=True)
        db = np.sum(y2 * db_i, axis=1, keepdims=True)
        dA = A * (da / a - 2.0 / T2)
        dB = B * (db / b - 1.0 / T2)
        g_A = -L / (B * Delta)
        L_B = delta1 / Zpd1 - delta2 / Zpd2
        g_B = 1.0 / (Z - B) + A_BD * L / B - A_BD * L_B
        H_res = -T2 * (g_A * dA + g_B * dB)

        dln_phi = None
        if dT:
            dln_phi = self._dln_phi_dT(
                T2, y2, Z, A, B, dA, dB, L, L_B, beta, abar, sqrt_a, dsqrt_a, q, a, da, b, db_i, db
            )
        return self._result(Z, ln_phi, H_res, H_res - g, dln_phi, single)

    def ln_phi(self, T: ArrayLike, P: ArrayLike, y: ArrayLike) -> FloatArray:
        """ln phi of each species [-], shape (S,) or (B, S); see :meth:`properties`."""
        return self.properties(T, P, y).ln_phi

    def _dln_phi_dT(self, T, y, Z, A, B, dA, dB, L, L_B, beta, abar, sqrt_a, dsqrt_a, q, a, da, b, db_i, db):
        """d ln phi_i / dT at constant P and y: the chain rule through Z, A, B, b_i/b and abar_i."""
        fam = self.family
        delta1, delta2 = fam.delta1, fam.delta2
        Delta = delta1 - delta2
        u, w = delta1 + delta2, delta1 * delta2
        c2 = -(1.0 + B - u * B)
        c1 = A + w * B * B - u * B * (1.0 + B)
        # Implicit differentiation of the cubic F(Z; A, B) = 0.
        F_Z = (3.0 * Z + 2.0 * c2) * Z + c1
        F_A = Z - B
        F_B = (u - 1.0) * Z * Z + (2.0 * w * B - u - 2.0 * u * B) * Z - (A + 2.0 * w * B + 3.0 * w * B * B)
        dZ = -(F_A * dA + F_B * dB) / F_Z

        Zpd1, Zpd2 = Z + delta1 * B, Z + delta2 * B
        L_Z = 1.0 / Zpd1 - 1.0 / Zpd2
        A_BD = A / (B * Delta)
        excess = abar - beta
        dbeta = (db_i - beta * db) / b
        dq = self._mix(y, dsqrt_a)
        dabar = 2.0 * (dsqrt_a * q + sqrt_a * dq) / a - abar * da / a
        return (
            (beta - 1.0 / (Z - B) - A_BD * excess * L_Z) * dZ
            - excess * L / (B * Delta) * dA
            + (1.0 / (Z - B) + A_BD * excess * L / B - A_BD * excess * L_B) * dB
            + (Z - 1.0 + A_BD * L) * dbeta
            - A_BD * L * dabar
        )

    def _result(self, Z, ln_phi, H_res, S_res, dln_phi, single: bool) -> GasProperties:
        if single:
            return GasProperties(
                self.name, float(Z[0, 0]), ln_phi[0], float(H_res[0, 0]), float(S_res[0, 0]),
                None if dln_phi is None else dln_phi[0],
            )
        return GasProperties(self.name, Z[:, 0], ln_phi, H_res[:, 0], S_res[:, 0], dln_phi)
