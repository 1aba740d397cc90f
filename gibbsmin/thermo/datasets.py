"""The thermochemical data sets to choose from, by name: the one place that says which g0 is used.

Every entry point that takes ``data="..."`` (``equilibrate``, the restricted
solve, sweeps, case files) turns it into a ``SpeciesDatabase`` here; the
database then feeds the System, whose polynomials give g0.
"""

from __future__ import annotations

import functools
import os
from collections.abc import Iterable
from dataclasses import dataclass

from ..errors import DataError, InputError
from .database import SpeciesDatabase, load_database, shipped_database, species_directory


@dataclass(frozen=True)
class DataSet:
    """A named data set: its folder under the species directory ("" for the top) and what it is."""

    name: str
    folder: str
    description: str


DATA_SETS: dict[str, DataSet] = {
    d.name: d
    for d in (
        DataSet("nasa-1993", "",
                "NASA TM-4513 polynomials (McBride, Gordon and Reno 1993), as shipped; no uncertainties"),
        DataSet("atct-anchored", "atct-anchored",
                "NASA TM-4513 polynomials re-anchored to ATcT 1.112 delta-f H at 298.15 K, with uncertainties"),
    )
}

#: The data set used when none is named: the better-checked one (ATcT's enthalpies of formation, with
#: their uncertainties; see README "Which thermochemical data").  Name "nasa-1993" for the NASA values
#: as published (the comparisons with Cantera's NASA evaluation do).
DEFAULT_DATA = "atct-anchored"


#: The data set of anything recorded without a data-set name (a sweep's spec written before the data
#: sets, or with the NASA data): the default until "atct-anchored" became it.  Such records keep their
#: meaning; the new default is written out by name.
UNNAMED_DATA = "nasa-1993"


def check_data_name(data: object) -> str:
    """A known data-set name, or a clear error listing them."""
    if not isinstance(data, str) or data not in DATA_SETS:
        raise InputError(f"unknown data set {data!r}; choose one of {', '.join(DATA_SETS)}")
    return data


@functools.lru_cache(maxsize=None)
def _load(name: str, directory: str, override: str) -> SpeciesDatabase:
    if name == "nasa-1993" and not override:
        return shipped_database()
    folder = os.path.join(directory, DATA_SETS[name].folder)
    if override and not os.path.isdir(folder):
        raise DataError(f"GIBBSMIN_SPECIES={override} has no folder {DATA_SETS[name].folder!r} for the data set "
                        f"{name!r}; copy species/{DATA_SETS[name].folder} into it, or pass data='nasa-1993' to use "
                        "the files at its top")
    return load_database(folder, data_set=name if not override else f"{name} (files in {folder})")


def data_set(data: str | None = None) -> SpeciesDatabase:
    """The database of a named data set (loaded once per process)."""
    name = check_data_name(DEFAULT_DATA if data is None else data)
    return _load(name, str(species_directory()), os.environ.get("GIBBSMIN_SPECIES", ""))


def default_database() -> SpeciesDatabase:
    """The database of the default data set (``DEFAULT_DATA``), loaded once per process."""
    return data_set()


def choose_database(data: str | None, db: SpeciesDatabase | None) -> SpeciesDatabase:
    """The database of ``data=``, or ``db`` as given; naming both is an error unless they agree."""
    if db is None:
        return data_set(data)
    if data is not None and check_data_name(data) != db.data_set:
        raise InputError(f"data={data!r} and db= (data set {db.data_set!r}) disagree; pass one of them")
    return db


def database_holding(names: Iterable[str], preferred: SpeciesDatabase | None = None) -> SpeciesDatabase:
    """``preferred`` (the default set's when None) if it knows every name, else the first shipped set that does.

    For what does not depend on the data set (formula, phase, molar mass): a stream table whose feeds
    were read with one set can then show an outlet of another that holds a species the first lacks
    (liquid methanol is in "atct-anchored" only).  Raises the preferred set's error where none does.
    """
    names = list(names)
    preferred = preferred if preferred is not None else data_set()
    if all(name in preferred for name in names):
        return preferred
    for name in DATA_SETS:
        candidate = data_set(name)
        if all(n in candidate for n in names):
            return candidate
    preferred.resolve(names)  # raises UnknownSpeciesError naming the first unknown species
    return preferred
