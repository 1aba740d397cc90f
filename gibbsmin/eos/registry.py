"""Gas models by name: the one switch a caller needs."""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from typing import Protocol

from numpy.typing import ArrayLike, NDArray

from ..errors import InputError
from ..thermo.database import SpeciesDatabase
from ..thermo.datasets import default_database
from .cubic import CubicModel
from .families import PENG_ROBINSON, SOAVE_REDLICH_KWONG, CubicFamily
from .ideal import IdealGasModel
from .interactions import shipped_kij_matrix
from .names import GAS_MODELS as GAS_MODELS
from .names import canonical_model_name as canonical_model_name
from .quantum import QuantumGas
from .result import GasProperties


class GasModel(Protocol):
    """What the equilibrium code needs from a gas model."""

    name: str
    n_species: int | None

    def properties(self, T: ArrayLike, P: ArrayLike, y: ArrayLike, *, dT: bool = False) -> GasProperties: ...

    def ln_phi(self, T: ArrayLike, P: ArrayLike, y: ArrayLike) -> NDArray: ...


_FAMILIES: dict[str, CubicFamily] = {
    PENG_ROBINSON.name: PENG_ROBINSON,
    SOAVE_REDLICH_KWONG.name: SOAVE_REDLICH_KWONG,
}


def gas_model(
    name: str,
    Tc: ArrayLike | None = None,
    Pc: ArrayLike | None = None,
    omega: ArrayLike | None = None,
    *,
    kij: ArrayLike | None = None,
    quantum: Sequence[str | QuantumGas | None] | None = None,
    quantum_correction: bool = True,
    names: Sequence[str] | None = None,
) -> GasModel:
    """The gas model called ``name`` ("ideal", "peng-robinson" or "srk") for a species set.

    Parameters
    ----------
    name : str
        Model name; "pr" and "soave-redlich-kwong" are accepted too.
    Tc, Pc, omega : array_like, shape (S,)
        Critical temperatures [K], pressures [Pa] and acentric factors [-];
        required by the cubic models, optional for the ideal gas (Tc then only
        fixes S).
    kij, quantum, quantum_correction, names
        As for :class:`CubicModel`; ignored by the ideal gas.

    Raises
    ------
    InputError
        An unknown name, or critical constants missing for a cubic model.
    """
    key = canonical_model_name(name)
    if key == "ideal":
        n_species = None
        for array in (Tc, names):
            if array is not None:
                n_species = len(array)
                break
        return IdealGasModel(n_species)
    if Tc is None or Pc is None or omega is None:
        missing = [label for label, value in (("Tc", Tc), ("Pc", Pc), ("omega", omega)) if value is None]
        raise InputError(
            f"the {key} model needs critical constants: give {', '.join(missing)} (one per species), "
            "or use gas_model_for_species to take them from the species database"
        )
    return CubicModel(
        _FAMILIES[key], Tc, Pc, omega, kij=kij, quantum=quantum,
        quantum_correction=quantum_correction, names=names,
    )


def _quantum_gas_of(elements: Mapping[str, float]) -> str | None:
    # By composition rather than name, so that aliases and renamed entries still match.
    if dict(elements) == {"H": 2}:
        return "H2"
    if dict(elements) == {"He": 1}:
        return "He"
    return None


def gas_model_for_species(
    name: str,
    species: Sequence[str],
    *,
    database: SpeciesDatabase | None = None,
    kij: str | ArrayLike | None = "shipped",
    quantum_correction: bool = True,
) -> GasModel:
    """The gas model ``name`` for named species, with critical constants from the species database.

    Hydrogen and helium are marked as quantum gases (see :mod:`gibbsmin.eos.quantum`)
    unless ``quantum_correction`` is False.  ``kij`` is "shipped" (the published
    pairs of ``species/interactions.toml`` for this model, zero for the rest),
    "none" or None (all zero), or a square matrix in the order of ``species``.

    Raises
    ------
    InputError
        A species without critical constants in the database (for the cubic models).
    UnknownSpeciesError
        A name the database does not hold.
    """
    key = canonical_model_name(name)
    database = default_database() if database is None else database
    records = database.resolve(species)
    names = [r.name for r in records]
    if key == "ideal":
        return IdealGasModel(len(records))
    lacking = [r.name for r in records if r.critical is None]
    if lacking:
        raise InputError(
            f"no critical constants for {', '.join(lacking)} in the species database, which the "
            f"{key} model needs: add a [species.critical] table (Tc, Pc, omega, source) to its entry "
            "in species/*.toml, leave the species out, or use gas='ideal'"
        )
    quantum = [_quantum_gas_of(r.elements) for r in records]
    if isinstance(kij, str):
        if kij not in ("shipped", "none"):
            raise InputError(f"kij={kij!r} is not understood: give 'shipped', 'none' or a square matrix")
        kij = shipped_kij_matrix(key, names) if kij == "shipped" else None
    return gas_model(
        key,
        [r.critical.Tc for r in records],
        [r.critical.Pc for r in records],
        [r.critical.omega for r in records],
        kij=kij, quantum=quantum, quantum_correction=quantum_correction, names=names,
    )

