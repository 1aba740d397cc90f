"""The species database: loading the TOML files of species/, checking them, looking names up."""

from __future__ import annotations

import difflib
import functools
import os
import tomllib
from collections.abc import Iterable, Iterator, Mapping, Sequence
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from ..errors import DataError, FormulaError, UnknownSpeciesError
from ..formula import molar_mass, parse_formula
from .nasa7 import R, Nasa7Table

STATES = ("gas", "liquid", "solid")
_REQUIRED = ("name", "formula", "state", "hf298", "source", "T_ranges", "low")
_OPTIONAL = ("aliases", "high", "critical", "nasa_name", "nasa_note",
             "hf298_uncertainty", "hf298_source", "hf298_shift", "atct_entry", "hf298_tied_to")
_CRITICAL_KEYS = ("Tc", "Pc", "omega", "source", "CAS")


@dataclass(frozen=True)
class CriticalConstants:
    """Critical temperature [K], critical pressure [Pa], acentric factor [-], their source key and the CAS number."""

    Tc: float
    Pc: float
    omega: float
    source: str
    CAS: str = ""


@dataclass(frozen=True)
class SpeciesRecord:
    """One species as the data files describe it."""

    name: str
    formula: str
    elements: Mapping[str, float]
    state: str
    hf298: float  # J/mol
    source: str
    T_ranges: tuple[float, ...]  # K; two values (one fit) or three (two fits)
    low: tuple[float, ...]
    high: tuple[float, ...]
    aliases: tuple[str, ...] = ()
    critical: CriticalConstants | None = None
    note: str = ""
    hf298_uncertainty: float | None = None  # J/mol, standard uncertainty; None where the data set states none
    hf298_source: str = ""  # source key of hf298 where it differs from the polynomial's (a re-anchored set)
    hf298_tied_to: str = ""  # the species (another phase) whose anchor shift, and its uncertainty, this one shares
    molar_mass: float = field(init=False)  # g/mol

    def __post_init__(self) -> None:
        object.__setattr__(self, "molar_mass", molar_mass(self.elements))

    @property
    def is_gas(self) -> bool:
        return self.state == "gas"

    @property
    def T_min(self) -> float:
        return self.T_ranges[0]

    @property
    def T_max(self) -> float:
        return self.T_ranges[-1]


class SpeciesDatabase:
    """An ordered, immutable collection of species records with name and alias look-up."""

    def __init__(self, records: Iterable[SpeciesRecord], data_set: str = ""):
        self._records = tuple(records)
        #: The name of the data set the records come from (``thermo.data_sets``), for reports.
        self.data_set = data_set
        self._by_name: dict[str, int] = {}
        self._by_alias: dict[str, int] = {}
        for i, record in enumerate(self._records):
            if record.name in self._by_name:
                raise DataError(f"species {record.name!r} is defined twice")
            self._by_name[record.name] = i
        for i, record in enumerate(self._records):
            for alias in record.aliases:
                key = alias.casefold()
                if alias in self._by_name or self._by_alias.get(key, i) != i:
                    raise DataError(f"alias {alias!r} of {record.name} is already taken")
                self._by_alias[key] = i
        self._table = nasa7_table(self._records)
        #: Objects derived from these records alone (species sets and their Systems), kept for reuse
        #: by ``fixed_step.feed_species_set``; the records never change, so nothing in it goes stale.
        self.memo: dict[object, object] = {}

    def __len__(self) -> int:
        return len(self._records)

    def __iter__(self) -> Iterator[SpeciesRecord]:
        return iter(self._records)

    def __contains__(self, name: object) -> bool:
        return isinstance(name, str) and self._lookup(name) is not None

    @property
    def names(self) -> tuple[str, ...]:
        return tuple(r.name for r in self._records)

    def _lookup(self, name: str) -> int | None:
        index = self._by_name.get(name)
        if index is None:
            index = self._by_alias.get(name.strip().casefold())
        return index

    def index(self, name: str) -> int:
        """Position of a species (by name or alias) in the database."""
        index = self._lookup(name)
        if index is None:
            raise UnknownSpeciesError(name, [*self._by_name, *(a for r in self for a in r.aliases)])
        return index

    def __getitem__(self, name: str) -> SpeciesRecord:
        return self._records[self.index(name)]

    def resolve(self, names: Iterable[str]) -> list[SpeciesRecord]:
        """Records for names or aliases, in the order given."""
        return [self[name] for name in names]

    def nasa7(self, names: Iterable[str] | None = None) -> Nasa7Table:
        """Polynomial table for the named species (all species when None)."""
        if names is None:
            return self._table
        return self._table.take([self.index(n) for n in names])

    def search(self, text: str = "", element: str | None = None) -> list[SpeciesRecord]:
        """Species whose name, alias or formula contains ``text`` and, if given, the element."""
        needle = text.casefold()
        found = []
        for record in self:
            haystack = [record.name, record.formula, *record.aliases]
            if needle and not any(needle in h.casefold() for h in haystack):
                continue
            if element is not None and element not in record.elements:
                continue
            found.append(record)
        return found

    def close_matches(self, text: str, n: int = 4) -> list[str]:
        """Species whose name or an alias is spelled close to ``text`` (any case), as "NH3 (ammonia)" or "NH3"."""
        spellings: dict[str, str] = {}
        for record in self:
            spellings.setdefault(record.name.casefold(), record.name)
            for alias in record.aliases:
                spellings.setdefault(alias.casefold(), f"{record.name} ({alias})")
        close = difflib.get_close_matches(text.casefold(), list(spellings), n=n, cutoff=0.6)
        return list(dict.fromkeys(spellings[c] for c in close))


def nasa7_table(records: Sequence[SpeciesRecord]) -> Nasa7Table:
    """The polynomial table of records, in their order."""
    if not records:
        empty = np.zeros((0, 7))
        return Nasa7Table(empty, empty, np.zeros(0), np.zeros(0), np.zeros(0))
    return Nasa7Table(
        low=np.array([r.low for r in records], dtype=float),
        high=np.array([r.high for r in records], dtype=float),
        T_mid=np.array([r.T_ranges[1] if len(r.T_ranges) == 3 else r.T_max for r in records]),
        T_min=np.array([r.T_min for r in records]),
        T_max=np.array([r.T_max for r in records]),
    )


def _record_from_entry(entry: Mapping[str, object], where: str) -> SpeciesRecord:
    name = entry.get("name", "?")
    context = f"{where}, species {name!r}"
    missing = [key for key in _REQUIRED if key not in entry]
    if missing:
        raise DataError(f"{context}: missing {', '.join(missing)}")
    unknown = sorted(set(entry) - set(_REQUIRED) - set(_OPTIONAL))
    if unknown:
        raise DataError(f"{context}: unknown key(s) {', '.join(unknown)}")
    if entry["state"] not in STATES:
        raise DataError(f"{context}: state must be one of {', '.join(STATES)}, not {entry['state']!r}")
    try:
        elements = parse_formula(str(entry["formula"]))
    except FormulaError as exc:
        raise DataError(f"{context}: {exc}") from None
    aliases = entry.get("aliases", [])
    if not isinstance(aliases, list) or not all(isinstance(a, str) for a in aliases):
        raise DataError(f"{context}: aliases must be a list of strings, e.g. aliases = [\"methane\"]")
    try:
        T_ranges = tuple(float(t) for t in entry["T_ranges"])
        low = tuple(float(a) for a in entry["low"])
        high = tuple(float(a) for a in entry.get("high", low))
        hf298 = float(entry["hf298"])
    except (TypeError, ValueError):
        raise DataError(f"{context}: T_ranges, low, high and hf298 must be numbers") from None
    if len(T_ranges) not in (2, 3) or any(b <= a for a, b in zip(T_ranges, T_ranges[1:])):
        raise DataError(f"{context}: T_ranges must be 2 or 3 increasing temperatures, got {T_ranges}")
    if len(low) != 7 or len(high) != 7:
        raise DataError(f"{context}: NASA 7-coefficient sets must have 7 values each")
    if (len(T_ranges) == 3) != ("high" in entry):
        raise DataError(f"{context}: three T_ranges need a 'high' set, two need none")
    uncertainty = entry.get("hf298_uncertainty")
    if uncertainty is not None:
        if isinstance(uncertainty, bool) or not isinstance(uncertainty, (int, float)) or not uncertainty >= 0.0:
            raise DataError(f"{context}: hf298_uncertainty must be a number >= 0 in J/mol, got {uncertainty!r}")
        uncertainty = float(uncertainty)
    critical = None
    if "critical" in entry:
        crit = entry["critical"]
        missing = [k for k in _CRITICAL_KEYS if k not in crit and k != "CAS"]
        if missing:
            raise DataError(f"{context}: critical constants lack {', '.join(missing)}")
        unknown = sorted(set(crit) - set(_CRITICAL_KEYS))
        if unknown:
            raise DataError(f"{context}: unknown key(s) in critical constants: {', '.join(unknown)}")
        try:
            critical = CriticalConstants(float(crit["Tc"]), float(crit["Pc"]), float(crit["omega"]),
                                         str(crit["source"]), str(crit.get("CAS", "")))
        except (TypeError, ValueError):
            raise DataError(f"{context}: Tc, Pc and omega must be numbers") from None
    record = SpeciesRecord(
        name=str(name),
        formula=str(entry["formula"]),
        elements=elements,
        state=str(entry["state"]),
        hf298=hf298,
        source=str(entry["source"]),
        T_ranges=T_ranges,
        low=low,
        high=high,
        aliases=tuple(aliases),
        critical=critical,
        note=str(entry.get("nasa_note", "")),
        hf298_uncertainty=uncertainty,
        hf298_source=str(entry.get("hf298_source", "")),
        hf298_tied_to=str(entry.get("hf298_tied_to", "")),
    )
    h298 = float(nasa7_table((record,)).h_RT(298.15)[0]) * R * 298.15
    if abs(h298 - record.hf298) > 1.0:
        raise DataError(f"{context}: hf298 = {record.hf298} J/mol disagrees with its polynomial ({h298:.3f} J/mol)")
    return record


def species_directory() -> Path:
    """Where the species files are: $GIBBSMIN_SPECIES, the installed copy, or the source tree."""
    override = os.environ.get("GIBBSMIN_SPECIES")
    if override:
        return Path(override)
    return _shipped_directory()


@functools.lru_cache(maxsize=1)
def _shipped_directory() -> Path:
    # Resolved once: every solve asks (through the data-set choice), and the install does not move.
    package = Path(__file__).resolve().parent.parent
    installed = package / "_species_data"
    if installed.is_dir():
        return installed
    return package.parent / "species"


def load_database(directory: str | os.PathLike[str] | None = None, data_set: str | None = None) -> SpeciesDatabase:
    """Read every ``*.toml`` file of a species directory into a database.

    ``data_set`` names it in reports; by default "nasa-1993" for the shipped
    folder and the folder's name otherwise.
    """
    if data_set is None:
        data_set = "nasa-1993" if directory is None and not os.environ.get("GIBBSMIN_SPECIES") else \
            f"files in {Path(directory) if directory is not None else species_directory()}"
    directory = Path(directory) if directory is not None else species_directory()
    files = sorted(directory.glob("*.toml"))
    if not files:
        raise DataError(f"no species files (*.toml) in {directory}; set GIBBSMIN_SPECIES to the species folder")
    records = []
    for path in files:
        try:
            document = tomllib.loads(path.read_text(encoding="utf-8"))
        except tomllib.TOMLDecodeError as exc:
            raise DataError(f"{path.name}: {exc}") from None
        for entry in document.get("species", []):
            records.append(_record_from_entry(entry, path.name))
    return SpeciesDatabase(records, data_set=data_set)


@functools.lru_cache(maxsize=1)
def shipped_database() -> SpeciesDatabase:
    """The species files at the top of the species folder, the data set "nasa-1993" (loaded once per process)."""
    return load_database()
