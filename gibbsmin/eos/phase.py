"""The gas model of a System's gas phase: which species the cubic describes, and with which kij.

Also the same model applied to a measured gas given by name (``ln_phi_of_gas``,
``residual_enthalpy_of_gas``, ``residual_entropy_of_gas``), as the approach, carbon and audit code need it.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field

import numpy as np
from numpy.typing import NDArray

from ..errors import InputError
from ..system import System
from ..thermo.database import SpeciesDatabase
from ..thermo.datasets import default_database
from ..thermo.nasa7 import R
from .ideal import IdealGasModel
from .interactions import InteractionTable, default_interactions
from .names import canonical_model_name
from .registry import GasModel, gas_model_for_species
from .result import GasProperties


@dataclass(frozen=True, eq=False)
class GasPhase:
    """The gas model of a System's gas phase.

    Attributes
    ----------
    name : str
        Canonical model name: "ideal", "peng-robinson" or "srk".
    model : GasModel
        The equation of state over the described species, in their order.
    described : ndarray of int
        Positions, among the System's gas species, of the species the model
        describes (every species with critical constants).
    gas_names : tuple of str
        All gas species of the System, in its order.
    ideal_species : tuple of str
        Gas species treated as ideal for lack of critical constants.
    kij : mapping
        The non-zero binary interaction parameters in use, ``{(a, b): kij}``.
    kij_origin : str
        Where they come from: "shipped table", "none" (all zero) or "given".
    condensed_forms : mapping
        Gas species to the System's condensed species of the same elements
        (``{"H2O": ("H2O(l)", "H2O(s)")}``), so a would-be liquid can be told
        from a condensate the answer already holds.
    """

    name: str
    model: GasModel
    described: NDArray[np.int_]
    gas_names: tuple[str, ...]
    ideal_species: tuple[str, ...]
    kij: Mapping[tuple[str, str], float] = field(default_factory=dict)
    kij_origin: str = "none"
    condensed_forms: Mapping[str, tuple[str, ...]] = field(default_factory=dict)

    @property
    def is_ideal(self) -> bool:
        return self.name == "ideal"

    @property
    def enthalpy_kinks(self) -> dict[str, float]:
        """Species to the temperature [K] where the model's enthalpy of a gas holding it jumps
        (``CubicModel.alpha_minimum_temperatures``); empty for the ideal gas."""
        temperatures = getattr(self.model, "alpha_minimum_temperatures", None)
        if self.is_ideal or temperatures is None:
            return {}
        return {self.gas_names[j]: float(T) for j, T in zip(self.described, temperatures) if np.isfinite(T)}

    def _described_fractions(self, n_gas: NDArray[np.float64]) -> tuple[NDArray[np.float64], float]:
        """Mole fractions among the described species and their total amount [mol]."""
        part = np.asarray(n_gas, dtype=float)[self.described]
        total = float(part.sum())
        if not total > 0.0:
            raise InputError("the gas holds none of the species the equation of state describes; "
                             "use gas='ideal' for this species set")
        return part / total, total

    def properties(self, T: float, P: float, n_gas: NDArray[np.float64]) -> GasProperties:
        """Z, ln phi, H_res/RT and S_res/R of the described species for gas amounts n_gas [mol] (System order)."""
        y, _ = self._described_fractions(n_gas)
        return self.model.properties(float(T), float(P), y)

    def ln_phi(self, T: float, P: float, n_gas: NDArray[np.float64]) -> NDArray[np.float64]:
        """ln phi of every gas species of the System [-]; zero for the species treated as ideal.

        Parameters
        ----------
        T : float
            Temperature, [K].
        P : float
            Pressure, [Pa].
        n_gas : ndarray, shape (n_gas,)
            Gas amounts (or mole fractions) in the System's gas order, [mol].
        """
        ln_phi = np.zeros(len(self.gas_names))
        if not self.is_ideal:
            y, _ = self._described_fractions(n_gas)
            ln_phi[self.described] = self.model.ln_phi(float(T), float(P), y)
        return ln_phi

    def ln_phi_batch(self, T: NDArray[np.float64], P: NDArray[np.float64],
                     n_gas: NDArray[np.float64]) -> NDArray[np.float64]:
        """ln phi of every gas species for a batch: T [K], P [Pa] of shape (B,), amounts (B, n_gas) [mol]."""
        ln_phi = np.zeros(np.shape(n_gas))
        if not self.is_ideal:
            part = np.asarray(n_gas, dtype=float)[:, self.described]
            y = part / part.sum(axis=1, keepdims=True)
            ln_phi[:, self.described] = self.model.ln_phi(np.asarray(T, float), np.asarray(P, float), y)
        return ln_phi

    def residual_enthalpy(self, T: float, P: float, n_gas: NDArray[np.float64]) -> float:
        """Residual enthalpy h - h_ideal of the gas, [J], for amounts n_gas [mol] in the System's gas order.

        This is the ``energy.ResidualEnthalpy`` hook of the energy balance.
        """
        if self.is_ideal or not np.any(np.asarray(n_gas)[self.described] > 0.0):
            return 0.0
        y, total = self._described_fractions(n_gas)
        return float(total * R * T * self.model.properties(float(T), float(P), y).H_res_RT)

    def stream_residual_enthalpy(self, amounts: Mapping[str, float], T: float, P: float) -> float:
        """Residual enthalpy of a gas stream given by species name [mol] at T [K] and P [Pa], [J].

        Species outside the System's gas phase (condensed, or not in the set)
        contribute nothing.
        """
        n_gas = np.array([amounts.get(name, 0.0) for name in self.gas_names], dtype=float)
        return self.residual_enthalpy(T, P, n_gas)


def gas_phase(system: System, gas: str = "peng-robinson", *,
              kij: str | Mapping[tuple[str, str], float] | None = "shipped",
              quantum_correction: bool = True) -> GasPhase:
    """The gas model ``gas`` for the gas species of a System.

    Parameters
    ----------
    system : System
    gas : {"ideal", "peng-robinson", "srk"}
        Model name ("pr" and "soave-redlich-kwong" are accepted too).
    kij : "shipped", "none" or mapping
        Binary interaction parameters [-].  "shipped" (the default): the
        published values of ``species/interactions.toml`` for this model,
        zero for every other pair (the table has Peng-Robinson values only).
        "none" (or None): all zero.  A mapping such as ``{("H2", "NH3"): 0.05}``:
        exactly those pairs, zero for the rest.  An ``InteractionTable``: its
        pairs for this model, e.g. ``default_interactions().updated({("H2",
        "NH3"): 0.05})`` for the shipped table with one pair of your own.
    quantum_correction : bool
        Effective critical constants for H2 and He (Gunn, Chueh and Prausnitz;
        see ``gibbsmin.eos.quantum``).

    Raises
    ------
    InputError
        An unknown model name, or a kij pair naming a species that is not a
        gas of the set or has no critical constants.
    """
    gas_records = system.records[: system.n_gas]
    gas_names = tuple(r.name for r in gas_records)
    described = np.array([j for j, r in enumerate(gas_records) if r.critical is not None], dtype=int)
    records = [gas_records[j] for j in described]
    # The registry validates the name and refuses a cubic without constants; with no species to
    # describe, asking it for the first gas species gets the right message.
    asked = records or list(gas_records[:1])
    names = [r.name for r in records]
    pairs, origin = _interaction_pairs(kij, gas, names)
    model = gas_model_for_species(gas, [r.name for r in asked], database=SpeciesDatabase(asked),
                                  kij=_kij_matrix(pairs, names, gas_names) if pairs else "none",
                                  quantum_correction=quantum_correction)
    if isinstance(model, IdealGasModel):
        return GasPhase("ideal", IdealGasModel(len(gas_names)), np.arange(len(gas_names)), gas_names, ())
    ideal = tuple(name for name in gas_names if name not in names)
    used = {pair: float(value) for pair, value in pairs.items() if value != 0.0}
    return GasPhase(model.name, model, described, gas_names, ideal, used, origin if used else "none",
                    _condensed_forms(system, records))


def _condensed_forms(system: System, gas_records) -> dict[str, tuple[str, ...]]:
    """Each gas record's condensed species in the System with the same elements."""
    condensed = system.records[system.n_gas:]
    forms = {r.name: tuple(c.name for c in condensed if dict(c.elements) == dict(r.elements)) for r in gas_records}
    return {name: names for name, names in forms.items() if names}


KIJ_CHOICES = ("shipped", "none")


def _interaction_pairs(kij: str | Mapping[tuple[str, str], float] | None, gas: str,
                       names: list[str]) -> tuple[Mapping[tuple[str, str], float], str]:
    """The kij pairs asked for, and a word for where they come from."""
    if kij is None:
        return {}, "none"
    if isinstance(kij, str):
        if kij not in KIJ_CHOICES:
            raise InputError(f"kij={kij!r} is not understood: give 'shipped' (the published table, the default), "
                             "'none' (all zero) or a mapping of species pairs to values, e.g. {('H2', 'NH3'): 0.05}")
        if kij == "none" or canonical_model_name(gas) == "ideal":
            return {}, "none"
        return default_interactions().for_model(gas, names), "shipped table"
    if isinstance(kij, InteractionTable):
        if canonical_model_name(gas) == "ideal":
            return {}, "none"
        return kij.for_model(gas, names), "given table"
    if not isinstance(kij, Mapping):
        raise InputError(f"kij must be 'shipped', 'none', a mapping of species pairs to values or an "
                         f"InteractionTable, got {kij!r}")
    return kij, "given"


def _kij_matrix(kij: Mapping[tuple[str, str], float] | None, names: list[str],
                gas_names: tuple[str, ...]) -> NDArray[np.float64] | None:
    if not kij:
        return None
    k = np.zeros((len(names), len(names)))
    for pair, value in kij.items():
        if not (isinstance(pair, tuple) and len(pair) == 2):
            raise InputError(f"kij keys must be pairs of species names, e.g. ('H2', 'NH3'), got {pair!r}")
        for name in pair:
            if name not in names:
                reason = ("has no critical constants and is treated as an ideal gas" if name in gas_names
                          else "is not a gas species of the set")
                raise InputError(f"kij names {name!r}, which {reason}; give pairs of the described species "
                                 f"({', '.join(names)})")
        i, j = names.index(pair[0]), names.index(pair[1])
        if i == j:
            raise InputError(f"kij pair {pair!r} names one species twice; k_ii is zero by definition")
        if isinstance(value, bool) or not isinstance(value, (int, float, np.floating)) or not -1.0 < value < 1.0:
            raise InputError(f"kij for {pair[0]}-{pair[1]} must be a number between -1 and 1, got {value!r}")
        k[i, j] = k[j, i] = float(value)
    return k


def model_of_gas(fractions: Mapping[str, float], gas: str, kij, db: SpeciesDatabase | None):
    """The cubic over the species of a composition that have critical constants, their fractions, and all names."""
    db = db or default_database()
    names = [s for s, v in fractions.items() if v > 0.0]
    records = db.resolve(names)
    described = [r.name for r in records if r.critical is not None]
    if not described:
        raise InputError(f"none of {', '.join(names)} has critical constants, so the {gas} model describes nothing "
                         "here; use the ideal gas")
    pairs, _ = _interaction_pairs(kij, gas, described)
    model = gas_model_for_species(gas, described, database=db,
                                  kij=_kij_matrix(pairs, described, tuple(described)) if pairs else "none")
    amounts = np.array([float(fractions[next(k for k in fractions if db[k].name == s)]) for s in described])
    return model, described, amounts, [r.name for r in records]


def ln_phi_of_gas(fractions: Mapping[str, float], T: float, P: float, gas: str, *,
                  kij: str | Mapping[tuple[str, str], float] | None = "shipped",
                  db: SpeciesDatabase | None = None) -> dict[str, float]:
    """ln phi of each gas species of a composition at T [K] and P [Pa], as an equilibrium's gas model gives it.

    ``fractions`` maps gas species to mole fraction or amount (normalised
    here).  As in :func:`gas_phase`, species without critical constants are
    ideal (ln phi = 0) and left out of the mixture; ``kij`` as there.
    """
    if canonical_model_name(gas) == "ideal" or not any(v > 0.0 for v in fractions.values()):
        return {s: 0.0 for s, v in fractions.items() if v > 0.0}
    model, described, amounts, names = model_of_gas(fractions, gas, kij, db)
    ln_phi = dict(zip(described, model.ln_phi(float(T), float(P), amounts / amounts.sum())))
    return {name: float(ln_phi.get(name, 0.0)) for name in names}


def residual_enthalpy_of_gas(amounts: Mapping[str, float], T: float, P: float, gas: str, *,
                             kij: str | Mapping[tuple[str, str], float] | None = "shipped",
                             db: SpeciesDatabase | None = None) -> float:
    """Residual enthalpy h - h_ideal of a gas given as species amounts [mol] at T [K], P [Pa], [J].

    Species without critical constants are left out, as in :func:`gas_phase`;
    zero for the ideal gas.
    """
    H_res_RT, _, total = _residuals_of_gas(amounts, T, P, gas, kij, db)
    return float(total * R * T * H_res_RT)


def residual_entropy_of_gas(amounts: Mapping[str, float], T: float, P: float, gas: str, *,
                            kij: str | Mapping[tuple[str, str], float] | None = "shipped",
                            db: SpeciesDatabase | None = None) -> float:
    """Residual entropy s - s_ideal (the ideal gas at the same T, P and composition) of a gas given as species
    amounts [mol] at T [K], P [Pa], [J/K]; species and models as in :func:`residual_enthalpy_of_gas`."""
    _, S_res_R, total = _residuals_of_gas(amounts, T, P, gas, kij, db)
    return float(total * R * S_res_R)


def _residuals_of_gas(amounts, T, P, gas, kij, db) -> tuple[float, float, float]:
    """H_res/RT and S_res/R of the described species' mixture, and their total amount [mol]; zeros for the ideal
    gas."""
    if canonical_model_name(gas) == "ideal" or not any(v > 0.0 for v in amounts.values()):
        return 0.0, 0.0, 0.0
    model, _, described_amounts, _ = model_of_gas(amounts, gas, kij, db)
    total = float(described_amounts.sum())
    found = model.properties(float(T), float(P), described_amounts / total)
    return float(found.H_res_RT), float(found.S_res_R), total
