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

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any, NamedTuple

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ..errors import InputError
from ..thermo.nasa7 import R
from .families import CubicFamily
from .inputs import check_conditions
from .quantum import QuantumGas, QuantumTable, quantum_gases_of
from .result import GasProperties
from ..compiled import compiled
from .roots import liquid_root, vapour_root

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


@dataclass(frozen=True, eq=False)
class _Species:
    """Per-species constants of the model that do not depend on T."""

    sqrt_ac: FloatArray  # sqrt(Omega_a) R Tc / sqrt(Pc), [sqrt(Pa m^6/mol^2)]
    b: FloatArray  # [m^3/mol]
    Tc: FloatArray  # [K]
    kappa: FloatArray  # [-]
    Pc: FloatArray  # [Pa]
    omega: FloatArray  # [-]


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
        One entry per species: None or False for an ordinary species; for a
        quantum gas "H2", "He", a :class:`QuantumGas`, or True when ``names``
        gives the species as "H2" or "He".  Their critical constants become the
        temperature-dependent Gunn-Chueh-Prausnitz values with omega = 0, and
        the Tc, Pc and omega given for them are not used.
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
        quantum: Sequence[str | QuantumGas | bool | None] | None = None,
        quantum_correction: bool = True,
        names: Sequence[str] | None = None,
    ):
        Tc = _as_vector(Tc, "Tc", None)
        n_species = Tc.size
        Pc = _as_vector(Pc, "Pc", n_species)
        omega = _as_vector(omega, "omega", n_species)
        if names is not None and len(names) != n_species:
            raise InputError(f"names must have one entry per species ({n_species}), got {len(names)}")
        gases = quantum_gases_of(quantum, names, n_species) if quantum_correction else {}
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
        for i, gas in gases.items():
            # The classical limits; the T-dependent values replace them at each call.
            Tc[i], Pc[i], omega[i] = gas.Tc0, gas.Pc0, 0.0
        self._species = _Species(
            sqrt_ac=np.sqrt(family.omega_a) * R * Tc / np.sqrt(Pc),
            b=family.omega_b * R * Tc / Pc,
            Tc=Tc,
            kappa=np.asarray(family.kappa(omega), dtype=float),
            Pc=Pc,
            omega=omega,
        )
        self._quantum = QuantumTable.of(gases, Tc, Pc) if gases else None

    @property
    def name(self) -> str:
        """Name of the equation of state, as :func:`gas_model` knows it."""
        return self.family.name

    def __repr__(self) -> str:
        species = f", names={list(self.names)}" if self.names else ""
        return f"CubicModel({self.family.name!r}, S={self.n_species}{species})"

    # -- per-species parameters at T ---------------------------------------------------
    # T and P are floats with y of shape (S,) for one condition, or (B, 1) with
    # y of shape (B, S) for a batch; the same expressions serve both by broadcasting.

    def _pure(self, T):
        """sqrt(a_i) and b_i at T, with their T-derivatives, shape (S,) or (B, S).

        The last single temperature's values are kept: a flash or a stability test asks for them hundreds of
        times at one T.
        """
        if isinstance(T, float):
            last = self.__dict__.get("_last_pure")
            if last is not None and last[0] == T:
                return last[1]
            found = self._pure_at(T)
            self.__dict__["_last_pure"] = (T, found)
            return found
        return self._pure_at(T)

    def _pure_at(self, T):
        sp = self._species
        sqrt_ac, b, Tc = sp.sqrt_ac, sp.b, sp.Tc
        dlnTc = dlnPc = 0.0
        if self._quantum is not None:
            sqrt_ac, b, Tc, dlnTc, dlnPc = self._with_quantum_gases(T)
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
        return sqrt_a, dsqrt_a_dT, b, db_dT

    def _with_quantum_gases(self, T):
        """sqrt(ac_i), b_i, Tc_i and d ln Tc_i/dT, d ln Pc_i/dT with the quantum gases' values at T."""
        q = self._quantum
        # Full-length arrays with c1/M = c2/M = 0 for ordinary species, which
        # leaves their Tc and Pc unchanged: cheaper than scattering Q columns.
        x1 = q.c1_M / T
        x2 = q.c2_M / T
        one_x1 = 1.0 + x1
        one_x2 = 1.0 + x2
        Tc = q.Tc0 / one_x1
        Pc = q.Pc0 / one_x2
        sqrt_ac = (np.sqrt(self.family.omega_a) * R) * Tc / np.sqrt(Pc)
        b = (self.family.omega_b * R) * Tc / Pc
        return sqrt_ac, b, Tc, x1 / (T * one_x1), x2 / (T * one_x2)

    def _mix(self, y, sqrt_a):
        """sum_j (1 - k_ij) y_j sqrt(a_j): shape (S,) or (B, S), or broadcastable to it without kij."""
        if self._one_minus_k is None:
            return _weighted_sum(y, sqrt_a)
        return (y * sqrt_a) @ self._one_minus_k

    # -- evaluation --------------------------------------------------------------------

    def _mixture(self, T, P, y):
        """Pure and mixture parameters at T, P, y: sqrt(a_i), its T-derivative, b_i, its T-derivative,
        the mixing sums q_i, a, b, A, B, beta_i = b_i / b and abar_i = 2 sqrt(a_i) q_i / a."""
        sqrt_a, dsqrt_a, b_i, db_i = self._pure(T)
        q = self._mix(y, sqrt_a)
        a = _weighted_sum(y, sqrt_a * q)
        b = _weighted_sum(y, b_i)
        RT = R * T
        A = a * P / (RT * RT)
        B = b * P / RT
        return sqrt_a, dsqrt_a, b_i, db_i, q, a, b, A, B, b_i / b, (2.0 / a) * sqrt_a * q

    def _at_root(self, Z, A, B, beta, abar, log):
        """ln phi_i, G_res/RT, ln((Z + d1 B)/(Z + d2 B)) and ln(Z - B) at the root Z."""
        fam = self.family
        L = log((Z + fam.delta1 * B) / (Z + fam.delta2 * B))
        ln_Z_B = log(Z - B)
        A_BD = A / (B * (fam.delta1 - fam.delta2))
        return beta * (Z - 1.0) - ln_Z_B - A_BD * L * (abar - beta), Z - 1.0 - ln_Z_B - A_BD * L, L, ln_Z_B

    def ln_phi_least_gibbs_root(self, T: float, P: float, y: ArrayLike) -> tuple[NDArray[np.float64], float]:
        """ln phi [-] and G_res/RT [-] at the real root of least Gibbs energy, for one condition.

        A phase-stability test needs this for its trial phases, which may be
        liquid-like; the equilibrium's gas itself always takes the vapour root
        (see :func:`gibbsmin.eos.roots.vapour_root`).
        """
        T, P, y, single = check_conditions(T, P, y, self.n_species)
        if not single:
            raise InputError("ln_phi_least_gibbs_root takes one condition (T and P floats, y of shape (S,))")
        return self.least_gibbs_root(T, P, y)[:2]

    def least_gibbs_root(self, T: float, P: float, y: ArrayLike) -> tuple[NDArray[np.float64], float, float]:
        """ln phi [-], G_res/RT [-] and Z [-] at the real root of least Gibbs energy, for one condition
        (a liquid-solution phase takes this root: ``nonideal.fluid_phases``)."""
        T, P, y, single = check_conditions(T, P, y, self.n_species)
        if not single:
            raise InputError("least_gibbs_root takes one condition (T and P floats, y of shape (S,))")
        return self.single_condition(T, P, y, LEAST_GIBBS_ROOT)

    def mixing_parameters(self, T: float) -> tuple[NDArray[np.float64], NDArray[np.float64], NDArray[np.float64], bool]:
        """sqrt(a_i) and b_i at T, the (1 - k_ij) matrix and whether it is there: what the compiled
        single-condition evaluation (``single_ln_phi``) takes."""
        sqrt_a, _, b_i, _ = self._pure(float(T))
        k = self._one_minus_k
        return (np.ascontiguousarray(sqrt_a, dtype=float), np.ascontiguousarray(b_i, dtype=float),
                _NO_K if k is None else k, k is not None)

    def single_condition(self, T: float, P: float, y: NDArray[np.float64],
                         choice: int) -> tuple[NDArray[np.float64], float, float]:
        """ln phi [-], G_res/RT [-] and Z [-] of one checked condition (T, P floats; y of shape (S,), summing to
        one) at the root ``choice`` (0 vapour, 1 liquid, 2 least Gibbs energy), by the compiled evaluation."""
        sqrt_a, b_i, one_minus_k, has_k = self.mixing_parameters(T)
        fam = self.family
        ln_phi, g, Z = single_ln_phi(sqrt_a, b_i, one_minus_k, has_k, np.ascontiguousarray(y, dtype=float),
                                      float(T), float(P), fam.delta1, fam.delta2, choice)
        return ln_phi, float(g), float(Z)

    def wilson_ratios(self, T: float, P: float) -> NDArray[np.float64]:
        """Wilson's estimate of the vapour-liquid ratios K_i = (Pc_i/P) exp(5.373 (1 + omega_i)(1 - Tc_i/T)).

        Wilson (1969), the customary start of a stability test; quantum gases
        at their classical constants.
        """
        sp = self._species
        return sp.Pc / P * np.exp(5.373 * (1.0 + sp.omega) * (1.0 - sp.Tc / T))

    @property
    def alpha_minimum_temperatures(self) -> NDArray[np.float64]:
        """Temperature at which each species' alpha = m^2 passes its minimum (m = 0), [K]; inf where it never does.

        m = 1 + kappa (1 - sqrt(T / Tc)) vanishes at T = Tc (1 + 1/kappa)^2
        (Tr = 10.4 for CO: 1381.8 K); for a quantum gas, whose Tc(T) =
        Tc0 / (1 + (c1/M) / T), at Tc0 (1 + 1/kappa)^2 - c1/M (576.1 K for
        H2).  The mixing rule takes sqrt(a_i) = sqrt(ac_i) |m|, so the cross
        terms have a kink there: at constant composition G_res(T) bends and
        the residual enthalpy and entropy of a gas holding that species jump
        upward with T, as at a latent heat.
        """
        sp = self._species
        with np.errstate(divide="ignore"):
            ratio = np.where(sp.kappa > 0.0, (1.0 + 1.0 / sp.kappa) ** 2, np.inf)
        T = sp.Tc * ratio
        if self._quantum is not None:
            T = T - self._quantum.c1_M
        return T

    @property
    def critical_temperatures(self) -> NDArray[np.float64]:
        """Tc of each species, [K] (quantum gases: their classical limit)."""
        return self._species.Tc.copy()

    @property
    def critical_pressures(self) -> NDArray[np.float64]:
        """Pc of each species, [Pa] (quantum gases: their classical limit)."""
        return self._species.Pc.copy()

    def properties(
        self, T: ArrayLike, P: ArrayLike, y: ArrayLike, *, dT: bool = False, root: str | float = "vapour"
    ) -> GasProperties:
        """Z, ln phi, residual enthalpy and entropy of the gas (or, with root="liquid", the liquid) at T, P and y.

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
        root : str or float
            "vapour" (the default: the largest root, see :func:`gibbsmin.eos.roots.vapour_root`)
            or "liquid" (the smallest physical root; the same as the vapour root
            where the cubic has only one, see :func:`gibbsmin.eos.roots.liquid_root`); or, for one
            condition, the root Z itself (a liquid-solution phase's, from ``least_gibbs_root``).

        Returns
        -------
        GasProperties
            Floats and (S,) arrays for one condition, with a leading batch axis
            of length B otherwise.
        """
        T, P, y, single = check_conditions(T, P, y, self.n_species)
        log = math.log if single else np.log
        fam = self.family
        delta1, delta2 = fam.delta1, fam.delta2
        Delta = delta1 - delta2

        sqrt_a, dsqrt_a, b_i, db_i, q, a, b, A, B, beta, abar = self._mixture(T, P, y)
        if isinstance(root, str):
            Z = _ROOTS[_root_choice(root)](*fam.cubic_coefficients(A, B), B)
        else:
            Z = root

        Zpd1, Zpd2 = Z + delta1 * B, Z + delta2 * B
        A_BD = A / (B * Delta)
        ln_phi, g, L, ln_Z_B = self._at_root(Z, A, B, beta, abar, log)

        da = 2.0 * _weighted_sum(y, dsqrt_a * q)
        db = _weighted_sum(y, db_i) if self._quantum is not None else 0.0
        dA = A * (da / a - 2.0 / T)
        dB = B * (db / b - 1.0 / T)
        g_A = -L / (B * Delta)
        L_B = delta1 / Zpd1 - delta2 / Zpd2
        g_B = 1.0 / (Z - B) + A_BD * L / B - A_BD * L_B
        H_res = -T * (g_A * dA + g_B * dB)

        dln_phi = None
        if dT:
            local = _Local(T, y, Z, A, B, dA, dB, L, L_B, beta, abar, sqrt_a, dsqrt_a, q, a, da, b, db_i, db)
            dln_phi = self._dln_phi_dT(local)
        if single:
            return GasProperties(self.name, Z, ln_phi, H_res, H_res - g, dln_phi)
        return GasProperties(self.name, Z[:, 0], ln_phi, H_res[:, 0], (H_res - g)[:, 0], dln_phi)

    def ln_phi(self, T: ArrayLike, P: ArrayLike, y: ArrayLike, *, root: str = "vapour") -> FloatArray:
        """ln phi of each species [-], shape (S,) or (B, S); as :meth:`properties` gives it, without the rest."""
        T, P, y, single = check_conditions(T, P, y, self.n_species)
        if single:
            return self.single_condition(T, P, y, VAPOUR_ROOT if _root_choice(root) == "vapour" else LIQUID_ROOT)[0]
        *_, A, B, beta, abar = self._mixture(T, P, y)
        Z = _ROOTS[_root_choice(root)](*self.family.cubic_coefficients(A, B), B)
        return self._at_root(Z, A, B, beta, abar, math.log if single else np.log)[0]

    def _dln_phi_dT(self, s: _Local) -> FloatArray:
        """d ln phi_i / dT at constant P and y: the chain rule through Z, A, B, b_i/b and abar_i."""
        fam = self.family
        delta1, delta2 = fam.delta1, fam.delta2
        Delta = delta1 - delta2
        u, w = delta1 + delta2, delta1 * delta2
        Z, A, B = s.Z, s.A, s.B
        c2, c1, _ = fam.cubic_coefficients(A, B)
        # Implicit differentiation of the cubic F(Z; A, B) = 0.
        F_Z = (3.0 * Z + 2.0 * c2) * Z + c1
        F_A = Z - B
        F_B = (u - 1.0) * Z * Z + (2.0 * w * B - u - 2.0 * u * B) * Z - (A + 2.0 * w * B + 3.0 * w * B * B)
        dZ = -(F_A * s.dA + F_B * s.dB) / F_Z

        L_Z = 1.0 / (Z + delta1 * B) - 1.0 / (Z + delta2 * B)
        A_BD = A / (B * Delta)
        excess = s.abar - s.beta
        dbeta = (s.db_i - s.beta * s.db) / s.b
        dq = self._mix(s.y, s.dsqrt_a)
        dabar = 2.0 * (s.dsqrt_a * s.q + s.sqrt_a * dq) / s.a - s.abar * s.da / s.a
        return (
            (s.beta - 1.0 / (Z - B) - A_BD * excess * L_Z) * dZ
            - excess * s.L / (B * Delta) * s.dA
            + (1.0 / (Z - B) + A_BD * excess * s.L / B - A_BD * excess * s.L_B) * s.dB
            + (Z - 1.0 + A_BD * s.L) * dbeta
            - A_BD * s.L * dabar
        )


class _Local(NamedTuple):
    """Intermediate values of one evaluation that the T-derivative reuses."""

    T: Any
    y: Any
    Z: Any
    A: Any
    B: Any
    dA: Any
    dB: Any
    L: Any
    L_B: Any
    beta: Any
    abar: Any
    sqrt_a: Any
    dsqrt_a: Any
    q: Any
    a: Any
    da: Any
    b: Any
    db_i: Any
    db: Any


#: The root each phase takes: the gas the largest, a liquid the smallest physical one.
_ROOTS = {"vapour": vapour_root, "liquid": liquid_root}


def _root_choice(root: str) -> str:
    if root not in _ROOTS:
        raise InputError(f"root={root!r} is not understood: give 'vapour' or 'liquid'")
    return root


def _weighted_sum(y, x):
    """sum_i y_i x_i: a float for y of shape (S,), shape (B, 1) for y of shape (B, S)."""
    if y.ndim == 1:
        return float(np.dot(y, x))
    return np.sum(y * x, axis=1, keepdims=True)


_NO_K = np.ones((1, 1))
_R = R

#: Root choices of the compiled single-condition evaluation.
VAPOUR_ROOT, LIQUID_ROOT, LEAST_GIBBS_ROOT = 0, 1, 2


@compiled()
def single_ln_phi(sqrt_a, b_i, one_minus_k, has_k, y, T, P, delta1, delta2, choice):
    """ln phi_i, G_res/RT and Z of one condition at the chosen root (vapour: the largest; liquid: the
    smallest physical one; or the one of least Gibbs energy), the roots in closed form and polished.

    Compiled: a flash and its stability tests evaluate the cubic thousands of times at one T, where the
    array expressions of ``properties`` cost ten times the arithmetic.
    """
    S = y.shape[0]
    q = np.empty(S)
    a = 0.0
    b = 0.0
    for i in range(S):
        total = 0.0
        for j in range(S):
            total += (one_minus_k[i, j] if has_k else 1.0) * y[j] * sqrt_a[j]
        q[i] = total
    for i in range(S):
        a += y[i] * sqrt_a[i] * q[i]
        b += y[i] * b_i[i]
    RT = _R * T
    A = a * P / (RT * RT)
    B = b * P / RT
    u, w = delta1 + delta2, delta1 * delta2
    c2 = -(1.0 + B - u * B)
    c1 = A + w * B * B - u * B * (1.0 + B)
    c0 = -B * (A + w * B * (1.0 + B))
    shift = c2 / 3.0
    p = c1 - c2 * shift
    qq = (2.0 * shift * shift - c1) * shift + c0
    half_q = 0.5 * qq
    disc = half_q * half_q + (p / 3.0) ** 3
    roots = np.empty(3)
    count = 0
    if disc > 0.0:
        r = math.sqrt(disc)
        u1, u2 = -half_q + r, -half_q - r
        roots[0] = math.copysign(abs(u1) ** (1.0 / 3.0), u1) + math.copysign(abs(u2) ** (1.0 / 3.0), u2) - shift
        count = 1
    elif p == 0.0:
        roots[0] = -shift
        count = 1
    else:
        radius = 2.0 * math.sqrt(-p / 3.0)
        angle = math.acos(max(-1.0, min(1.0, 3.0 * qq / (p * radius)))) / 3.0
        for k in range(3):
            roots[k] = radius * math.cos(angle - 2.0 * math.pi * k / 3.0) - shift
        count = 3
    best_Z = -1.0
    best_g = np.inf
    for k in range(count):
        Z = roots[k]
        for _ in range(2):
            slope = (3.0 * Z + 2.0 * c2) * Z + c1
            if slope != 0.0:
                Z -= (((Z + c2) * Z + c1) * Z + c0) / slope
        if not Z > B:
            continue
        L = math.log((Z + delta1 * B) / (Z + delta2 * B))
        g = Z - 1.0 - math.log(Z - B) - A / (B * (delta1 - delta2)) * L
        if best_Z < 0.0 or (choice == VAPOUR_ROOT and Z > best_Z) or (choice == LIQUID_ROOT and Z < best_Z) or (
                choice == LEAST_GIBBS_ROOT and g < best_g):
            best_Z, best_g = Z, g
    Z = best_Z
    ln_phi = np.empty(S)
    if Z < 0.0:
        ln_phi[:] = np.nan
        return ln_phi, np.nan, np.nan
    L = math.log((Z + delta1 * B) / (Z + delta2 * B))
    ln_Z_B = math.log(Z - B)
    A_BD = A / (B * (delta1 - delta2))
    for i in range(S):
        beta = b_i[i] / b
        abar = 2.0 * sqrt_a[i] * q[i] / a
        ln_phi[i] = beta * (Z - 1.0) - ln_Z_B - A_BD * L * (abar - beta)
    return ln_phi, best_g, Z
