"""The shipped table of binary interaction parameters kij (``species/interactions.toml``).

A cubic's cross attraction is a_ij = sqrt(a_i a_j) (1 - k_ij).  The table holds
the pairs for which a published value exists, each with its source key (listed
in ``species/SOURCES.md``); every other pair is zero.  Values belong to one
model: the Peng-Robinson table is not used for SRK.
"""

from __future__ import annotations

import functools
import math
import os
import tomllib
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass
from pathlib import Path

import numpy as np
from numpy.typing import NDArray

from ..errors import DataError, InputError
from ..thermo.database import species_directory
from ..thermo.datasets import default_database
from .names import GAS_MODELS, canonical_model_name

FILE_NAME = "interactions.toml"


@dataclass(frozen=True)
class InteractionParameter:
    """One published k_ij: the pair, the model it belongs to, the value [-] and where it comes from."""

    species: tuple[str, str]
    model: str
    kij: float
    source: str
    page: str = ""


class InteractionTable:
    """Published k_ij by model and unordered species pair."""

    def __init__(self, entries: Iterable[InteractionParameter]):
        self._entries = tuple(entries)
        self._by_key: dict[tuple[str, frozenset[str]], InteractionParameter] = {}
        for entry in self._entries:
            key = (entry.model, frozenset(entry.species))
            if key in self._by_key:
                a, b = entry.species
                raise DataError(f"interaction table: the pair {a}-{b} is given twice for {entry.model}")
            self._by_key[key] = entry

    def __len__(self) -> int:
        return len(self._entries)

    def __iter__(self):
        return iter(self._entries)

    def for_model(self, model: str, species: Iterable[str] | None = None) -> dict[tuple[str, str], float]:
        """The k_ij of ``model`` as ``{(a, b): kij}``, optionally only pairs of the named species."""
        model = canonical_model_name(model)
        wanted = None if species is None else set(species)
        return {entry.species: entry.kij for entry in self._entries
                if entry.model == model and (wanted is None or set(entry.species) <= wanted)}

    def entry(self, model: str, a: str, b: str) -> InteractionParameter | None:
        return self._by_key.get((canonical_model_name(model), frozenset((a, b))))

    def updated(self, pairs: Mapping[tuple[str, str], float], model: str = "peng-robinson",
                source: str = "given") -> InteractionTable:
        """This table with the given pairs of ``model`` replaced or added (the engineer's own values).

        Examples
        --------
        >>> table = default_interactions().updated({("H2", "NH3"): 0.05})
        >>> table.entry("pr", "NH3", "H2").kij, table.entry("pr", "N2", "NH3").kij
        (0.05, 0.2193)
        """
        model = canonical_model_name(model)
        try:
            given = [_entry_from({"species": list(pair), "model": model, "kij": value, "source": source},
                                 f"kij pair {pair[0]}-{pair[1]}", None) for pair, value in _checked_pairs(pairs)]
        except DataError as exc:  # the loader's checks, on the caller's values
            raise InputError(str(exc)) from None
        replaced = {(e.model, frozenset(e.species)) for e in given}
        kept = [e for e in self._entries if (e.model, frozenset(e.species)) not in replaced]
        return InteractionTable([*kept, *given])

    def matrix(self, model: str, names: Sequence[str]) -> NDArray[np.float64] | None:
        """The k_ij of ``model`` among ``names`` as a matrix in their order; None when every one is zero."""
        pairs = self.for_model(model, names)
        if not pairs:
            return None
        names = list(names)
        k = np.zeros((len(names), len(names)))
        for (a, b), value in pairs.items():
            i, j = names.index(a), names.index(b)
            k[i, j] = k[j, i] = value
        return k


def _entry_from(raw: Mapping[str, object], where: str, known: set[str] | None) -> InteractionParameter:
    for key in ("species", "model", "kij", "source"):
        if key not in raw:
            raise DataError(f"{where}: missing key {key!r} (each [[pair]] needs species, model, kij, source)")
    pair = raw["species"]
    if not (isinstance(pair, list) and len(pair) == 2 and all(isinstance(s, str) for s in pair)):
        raise DataError(f"{where}: species must be a list of two names, e.g. [\"H2\", \"N2\"]; got {pair!r}")
    if pair[0] == pair[1]:
        raise DataError(f"{where}: the pair names {pair[0]!r} twice; k_ii is zero by definition")
    if known is not None:
        for name in pair:
            if name not in known:
                raise DataError(f"{where}: {name!r} is not a gas species of the species files")
    model = str(raw["model"])
    if model not in GAS_MODELS or model == "ideal":
        cubic = ", ".join(m for m in GAS_MODELS if m != "ideal")
        raise DataError(f"{where}: model {model!r} is not a cubic equation of state ({cubic})")
    kij = raw["kij"]
    if isinstance(kij, bool) or not isinstance(kij, (int, float)) or not math.isfinite(kij) or abs(kij) >= 1.0:
        raise DataError(f"{where}: kij must be a finite number between -1 and 1, got {kij!r}")
    return InteractionParameter((pair[0], pair[1]), model, float(kij), str(raw["source"]), str(raw.get("page", "")))


def load_interactions(path: str | os.PathLike[str] | None = None,
                      gas_species: Iterable[str] | None = None) -> InteractionTable:
    """Read and check an interaction table; ``gas_species`` (if given) are the names its pairs may use.

    Raises
    ------
    DataError
        A malformed entry, an unknown species or model, a value out of range,
        or a pair given twice; the message names the entry.
    """
    path = Path(path) if path is not None else species_directory() / FILE_NAME
    try:
        document = tomllib.loads(path.read_text(encoding="utf-8"))
    except FileNotFoundError:
        raise DataError(f"interaction table {path} not found") from None
    except tomllib.TOMLDecodeError as exc:
        raise DataError(f"{path.name}: not valid TOML ({exc})") from None
    known = None if gas_species is None else set(gas_species)
    return InteractionTable(_entry_from(raw, f"{path.name}, pair {i + 1}", known)
                            for i, raw in enumerate(document.get("pair", [])))


@functools.cache
def default_interactions() -> InteractionTable:
    """The shipped table, read once."""
    return load_interactions(gas_species=[r.name for r in default_database() if r.is_gas])


def shipped_kij_matrix(model: str, names: list[str]) -> NDArray[np.float64] | None:
    """The shipped k_ij of ``model`` as a matrix in the order of ``names``; None when every one is zero."""
    return default_interactions().matrix(model, names)


def _checked_pairs(pairs: Mapping[tuple[str, str], float]):
    if not isinstance(pairs, Mapping):
        raise InputError(f"kij pairs must be a mapping of (species, species) to a value, got {pairs!r}")
    for pair, value in pairs.items():
        if not (isinstance(pair, tuple) and len(pair) == 2 and all(isinstance(n, str) for n in pair)):
            raise InputError(f"kij keys must be pairs of species names, e.g. ('H2', 'NH3'), got {pair!r}")
        yield pair, value
