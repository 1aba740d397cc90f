"""Case files: an equilibrium problem written in the trade's words (TOML), read and settled.

A case file names its feeds (component flows, or a composition with a total
flow, wet or dry, optionally with steam by S/C ratio), the conditions of each
stage, the species set and what to report.  Every key is checked: an unknown
key, a value of the wrong kind or a quantity in the wrong unit is a
:class:`CaseError` naming the file, the line and the key, with the fix.
Keys whose computation has not landed in this version give a
:class:`NotAvailableError` instead of being ignored.

A minimal case::

    [feed]
    unit = "kmol/h"
    CH4 = 1000.0
    H2O = 3000.0

    [conditions]
    T = "850 degC"
    P = "30 bar(g)"

Every key, with its meaning, is listed in :data:`CASE_KEYS` (``gibbsmin settle
--keys`` prints it) and used in ``examples/reformer.toml``.

Amounts: the feeds' flows are converted to mol/s and handed to the engine as
amounts in mol; equilibrium composition is intensive, so the answer's amounts
read as mol/s and are shown in the report's flow unit.
"""

from __future__ import annotations

import difflib
import inspect
import math
import numbers
import os
import tomllib
from collections.abc import Callable, Iterator, Mapping, Sequence
from dataclasses import dataclass, field
from pathlib import Path

import pint

from .equilibrium import Equilibrium
from .errors import InputError, UnknownSpeciesError
from .settle import equilibrate
from .streams import CARBON_BASES, Stream
from .thermo import SpeciesDatabase, default_database
from .units import (
    NORMAL_DIN_1343,
    STANDARD_ISO_13443,
    STANDARD_US_GAS,
    Quantity,
    ReferenceConditions,
    from_mol_s,
    to_fraction,
    to_kelvin,
    to_pascal,
    ureg,
)

__all__ = [
    "CASE_KEYS",
    "Case",
    "CaseError",
    "CaseResult",
    "Feed",
    "NotAvailableError",
    "ReportSpec",
    "Section",
    "SpeciesSpec",
    "Stage",
    "StageResult",
    "TomlSource",
    "read_case",
    "parse_case",
    "settle_case",
]


# --- errors -----------------------------------------------------------------------------------------


class CaseError(InputError):
    """A case or unit-description file that cannot be used as written.

    Attributes
    ----------
    file : str
    line : int or None
    key : str
        The key in dotted form, e.g. ``conditions.T``.
    problem : str
    """

    def __init__(self, file: str, line: int | None, key: str, problem: str):
        self.file, self.line, self.key, self.problem = file, line, key, problem
        where = f"{file}, line {line}" if line else file
        super().__init__(f"{where}: {key}: {problem}" if key else f"{where}: {problem}")


class NotAvailableError(CaseError):
    """A key whose computation this version of gibbsmin does not have yet."""


# --- TOML with line numbers -------------------------------------------------------------------------

_KeyPath = tuple[str | int, ...]


def _scan_lines(text: str) -> Iterator[tuple[int, str, int]]:
    """Each physical line with its number and the bracket depth at its start, outside strings and comments.

    Yields (line number, the line with strings blanked and comments cut, depth at the start of the line).
    Blanking strings keeps quoted keys recognisable by their quotes while brackets and '#' inside
    strings no longer count.
    """
    depth = 0
    in_multiline: str | None = None
    for number, line in enumerate(text.splitlines(), start=1):
        start_depth = depth if in_multiline is None else -1
        out: list[str] = []
        i = 0
        while i < len(line):
            if in_multiline is not None:
                end = line.find(in_multiline, i)
                if end < 0:
                    i = len(line)
                    continue
                i = end + 3
                in_multiline = None
                continue
            ch = line[i]
            if ch == "#":
                break
            if line.startswith('"""', i) or line.startswith("'''", i):
                in_multiline = line[i : i + 3]
                out.append('""')
                i += 3
                continue
            if ch in "\"'":
                end = i + 1
                while end < len(line) and line[end] != ch:
                    end += 2 if ch == '"' and line[end] == "\\" else 1
                out.append(line[i : end + 1])
                i = end + 1
                continue
            if ch in "[{":
                depth += 1
            elif ch in "]}":
                depth = max(depth - 1, 0)
            out.append(ch)
            i += 1
        yield number, "".join(out), start_depth


def _split_key(text: str) -> tuple[str, ...] | None:
    """The parts of a (possibly dotted, possibly quoted) TOML key, read by tomllib itself; None if not a key."""
    try:
        parsed = tomllib.loads(f"{text} = 0")
    except tomllib.TOMLDecodeError:
        return None
    parts: list[str] = []
    node: object = parsed
    while isinstance(node, dict) and len(node) == 1:
        (key, node), = node.items()
        parts.append(key)
    return tuple(parts) if node == 0 else None


class TomlSource:
    """A TOML document with the line of every key, so that errors can point at the line.

    Parameters
    ----------
    text : str
    name : str
        How to call the document in messages (its file name).
    """

    def __init__(self, text: str, name: str = "<case>"):
        self.name = name
        try:
            self.data = tomllib.loads(text)
        except tomllib.TOMLDecodeError as exc:
            raise CaseError(name, None, "", f"is not valid TOML: {exc}") from None
        self._lines: dict[_KeyPath, int] = {}
        self._index_lines(text)

    @classmethod
    def from_file(cls, path: str | os.PathLike[str]) -> TomlSource:
        path = Path(path)
        try:
            text = path.read_text(encoding="utf-8")
        except FileNotFoundError:
            raise CaseError(str(path), None, "", "no such file; check the path") from None
        except IsADirectoryError:
            raise CaseError(str(path), None, "", "is a directory, not a file") from None
        except UnicodeDecodeError:
            raise CaseError(str(path), None, "", "is not UTF-8 text; save it as UTF-8") from None
        except OSError as exc:
            raise CaseError(str(path), None, "", f"cannot be read ({exc.strerror})") from None
        return cls(text, path.name)

    def _index_lines(self, text: str) -> None:
        table: _KeyPath = ()
        counters: dict[_KeyPath, int] = {}
        for number, line, depth in _scan_lines(text):
            stripped = line.strip()
            if depth != 0 or not stripped:
                continue
            if stripped.startswith("[["):
                parts = _split_key(stripped[2:].split("]]")[0])
                if parts is not None:
                    index = counters.get(parts, -1) + 1
                    counters[parts] = index
                    table = (*parts, index)
                    self._lines.setdefault(table, number)
                continue
            if stripped.startswith("["):
                parts = _split_key(stripped[1:].split("]")[0])
                if parts is not None:
                    table = self._with_array_indices(parts, counters)
                    self._lines.setdefault(table, number)
                continue
            if "=" in stripped:
                parts = _split_key(stripped.split("=", 1)[0])
                if parts is not None:
                    self._lines.setdefault((*table, *parts), number)

    @staticmethod
    def _with_array_indices(parts: tuple[str, ...], counters: Mapping[_KeyPath, int]) -> _KeyPath:
        """[stage.approach] under [[stage]] means the latest stage's table: insert the array index."""
        path: list[str | int] = []
        for part in parts:
            path.append(part)
            key = tuple(p for p in path if isinstance(p, str))
            if key in counters:
                path.append(counters[key])
        return tuple(path)

    def line(self, path: _KeyPath) -> int | None:
        """Line of a key, or of the nearest enclosing key or table that has one (inline tables)."""
        for end in range(len(path), 0, -1):
            found = self._lines.get(tuple(path[:end]))
            if found is not None:
                return found
        return None

    def root(self) -> Section:
        return Section(self, (), self.data)


def _describe_path(path: _KeyPath) -> str:
    text = ""
    for part in path:
        if isinstance(part, int):
            text += f"[{part + 1}]"
        else:
            bare = part.replace("_", "").replace("-", "").isalnum()
            text += ("." if text else "") + (part if bare else f'"{part}"')
    return text


#: Sentinel: the key is required.
_REQUIRED = object()


class Section:
    """One table of a TOML document, read key by key; keys never read are errors (:meth:`finish`).

    Each reader converts a value and, when it fails, raises a :class:`CaseError`
    naming the file, the line and the key.
    """

    def __init__(self, source: TomlSource, path: _KeyPath, data: Mapping[str, object]):
        self.source, self.path, self.data = source, path, data
        self._used: set[str] = set()

    @property
    def name(self) -> str:
        return _describe_path(self.path) or "the top level"

    def error(self, key: str | int | None, problem: str, cls: type[CaseError] = CaseError) -> CaseError:
        path = self.path if key is None else (*self.path, key)
        return cls(self.source.name, self.source.line(path), _describe_path(path), problem)

    def __contains__(self, key: str) -> bool:
        return key in self.data

    def keys(self) -> list[str]:
        return list(self.data)

    def get(self, key: str, reader: Callable[[object], object] | None = None, default: object = _REQUIRED,
            hint: str = "") -> object:
        """The value of ``key`` passed through ``reader``; ``default`` when absent (required when not given)."""
        self._used.add(key)
        if key not in self.data:
            if default is _REQUIRED:
                raise self.error(None, f"needs the key {key!r}{'; ' + hint if hint else ''}")
            return default
        value = self.data[key]
        if reader is None:
            return value
        try:
            return reader(value)
        except CaseError:
            raise
        except (InputError, UnknownSpeciesError) as exc:
            raise self.error(key, str(exc)) from None

    def section(self, key: str, required: bool = False) -> Section | None:
        self._used.add(key)
        value = self.data.get(key)
        if value is None:
            if required:
                raise self.error(None, f"needs a table [{_describe_path((*self.path, key))}]")
            return None
        if not isinstance(value, dict):
            raise self.error(key, f"must be a table (a [{key}] header or {{...}}), not {_kind(value)}")
        return Section(self.source, (*self.path, key), value)

    def sections(self, key: str) -> list[Section]:
        """An array of tables ([[key]]), or an empty list when absent."""
        self._used.add(key)
        value = self.data.get(key)
        if value is None:
            return []
        if not isinstance(value, list) or not all(isinstance(v, dict) for v in value):
            raise self.error(key, f"must be an array of tables, written [[{key}]], not {_kind(value)}")
        return [Section(self.source, (*self.path, key, i), v) for i, v in enumerate(value)]

    def mark_used(self, key: str) -> None:
        self._used.add(key)

    def unused(self) -> list[str]:
        return [k for k in self.data if k not in self._used]

    def finish(self, allowed: Sequence[str]) -> None:
        """Refuse any key that was not read, suggesting the nearest allowed one."""
        for key in self.unused():
            close = difflib.get_close_matches(key, list(allowed), n=1, cutoff=0.6)
            folded = [a for a in allowed if a.casefold() == key.casefold()]
            suggestion = folded or close
            hint = f"did you mean {suggestion[0]!r}?" if suggestion else f"allowed keys: {', '.join(allowed)}"
            raise self.error(key, f"unknown key in [{self.name}]; {hint}")


def _kind(value: object) -> str:
    kinds = {bool: "true/false", int: "a number", float: "a number", str: "a text", list: "a list", dict: "a table"}
    return kinds.get(type(value), type(value).__name__)


# --- value readers ----------------------------------------------------------------------------------


def read_text(value: object) -> str:
    if not isinstance(value, str):
        raise InputError(f"must be a text in quotes, not {_kind(value)} ({value!r})")
    return value


def read_bool(value: object) -> bool:
    if not isinstance(value, bool):
        raise InputError(f"must be true or false (without quotes), not {value!r}")
    return value


def read_names(value: object) -> tuple[str, ...]:
    if isinstance(value, str):
        raise InputError(f"must be a list of names in brackets, e.g. [{value!r}]")
    if not isinstance(value, list) or not all(isinstance(v, str) for v in value):
        raise InputError(f"must be a list of names in quotes, e.g. [\"C(s)\", \"H2O(l)\"], not {value!r}")
    return tuple(value)


def read_positive_number(value: object) -> float:
    if isinstance(value, bool) or not isinstance(value, numbers.Real) or not math.isfinite(value) or value <= 0:
        raise InputError(f"must be a positive number, not {value!r}")
    return float(value)


def read_positive_int(value: object) -> int:
    if isinstance(value, bool) or not isinstance(value, int) or value <= 0:
        raise InputError(f"must be a positive whole number, not {value!r}")
    return value


def choice(*options: str) -> Callable[[object], str]:
    def read(value: object) -> str:
        text = read_text(value)
        if text not in options:
            close = difflib.get_close_matches(text, options, n=1)
            hint = f"did you mean {close[0]!r}? " if close else ""
            raise InputError(f"{text!r} is not one of {', '.join(map(repr, options))}; {hint}".rstrip("; "))
        return text

    return read


def _quantity(value: object, what: str, example: str) -> pint.Quantity:
    if isinstance(value, bool) or not isinstance(value, (str, numbers.Real)):
        raise InputError(f"must be {what} such as {example}, not {_kind(value)}")
    if not isinstance(value, str):
        raise InputError(f"{value!r} has no unit; write {what} with one, e.g. {example}")
    try:
        quantity = Quantity(value.replace("°", "deg"))
    except (pint.PintError, ValueError, TypeError, AttributeError, SyntaxError):
        raise InputError(f"cannot read {what} {value!r}; write e.g. {example}") from None
    if not isinstance(quantity, pint.Quantity) or not math.isfinite(float(quantity.magnitude)):
        raise InputError(f"cannot read {what} {value!r}; write a number and a unit, e.g. {example}")
    return quantity


def read_temperature(value: object) -> float:
    """An absolute temperature, [K]: '850 degC', '1123 K', or a number of K."""
    return to_kelvin(value)


def read_pressure(value: object) -> float:
    """An absolute pressure, [Pa]: '30 bar(g)', '31 bara', '3.1 MPa'; bare numbers are refused (bar or bar(g)?)."""
    if isinstance(value, numbers.Real) and not isinstance(value, bool):
        raise InputError(f"{value!r} has no unit; write the pressure with one, e.g. '30 bar(g)' or '31 bar'")
    return to_pascal(value)


_DIFFERENCE_UNITS = {"K": "kelvin", "kelvin": "kelvin", "degC": "kelvin", "C": "kelvin", "°C": "kelvin",
                     "delta_degC": "kelvin", "degF": "delta_degF", "F": "delta_degF", "°F": "delta_degF",
                     "delta_degF": "delta_degF", "R": "delta_degF", "degR": "delta_degF"}


def read_temperature_difference(value: object) -> float:
    """A temperature difference, [K]: '10 K', '10 degC' (a difference, so the same as 10 K), '18 degF', or K."""
    if isinstance(value, bool) or not isinstance(value, (str, numbers.Real)):
        raise InputError(f"must be a temperature difference such as '10 K', not {_kind(value)}")
    if isinstance(value, numbers.Real):
        magnitude, unit = float(value), "K"
    else:
        number, _, unit = value.strip().partition(" ")
        try:
            magnitude = float(number)
        except ValueError:
            raise InputError(f"cannot read the temperature difference {value!r}; write e.g. '10 K' or '-5 K'") from None
        unit = unit.strip() or "K"
    if unit not in _DIFFERENCE_UNITS or not math.isfinite(magnitude):
        raise InputError(f"cannot read the temperature difference {value!r}; write e.g. '10 K', '10 degC' or '18 degF'")
    return float(Quantity(magnitude, _DIFFERENCE_UNITS[unit]).to("kelvin").magnitude)


def read_power(value: object) -> float:
    """A heat flow, [W]: '85 MW', '1500 kW', '73 Gcal/h' (international-table calorie), '290 MMBtu/h'."""
    if isinstance(value, str):
        value = value.replace("MMBtu", "(1e6 * Btu)").replace("Gcal", "(1e9 * international_calorie)")
    quantity = _quantity(value, "a heat flow", "'85 MW', '1500 kW' or '290 MMBtu/h'")
    try:
        return float(quantity.to("W").magnitude)
    except pint.DimensionalityError:
        raise InputError(f"{value!r} is not a heat flow (power); write e.g. '85 MW' or '290 MMBtu/h'") from None


def read_fraction(value: object) -> float:
    """A mole fraction, [-]: '1 ppmv', '0.5 mol%', or a plain fraction."""
    return to_fraction(value)


_NORMAL_CONDITIONS = {
    "DIN 1343": NORMAL_DIN_1343,
    "ISO 13443": STANDARD_ISO_13443,
    "US gas": STANDARD_US_GAS,
}


def read_normal_conditions(value: object) -> ReferenceConditions:
    text = read_text(value)
    if text not in _NORMAL_CONDITIONS:
        raise InputError(f"{text!r} is not one of {', '.join(map(repr, _NORMAL_CONDITIONS))}")
    return _NORMAL_CONDITIONS[text]


def _flow_unit(value: object) -> str:
    text = read_text(value)
    from_mol_s(1.0, text, molar_mass=1.0)  # refuses what is not a molar, normal-volume or mass flow
    return text


# --- the case ---------------------------------------------------------------------------------------


@dataclass(frozen=True)
class Feed:
    """One named feed stream (flows [mol/s], T [K], P [Pa] inside the Stream)."""

    name: str
    stream: Stream
    line: int | None = None


@dataclass(frozen=True)
class SpeciesSpec:
    """The species set: an explicit list (``only``) or the default set, less ``exclude``; ``frozen`` keep their feed amount."""

    only: tuple[str, ...] | None = None
    exclude: tuple[str, ...] = ()
    frozen: tuple[str, ...] = ()
    allow_extrapolation: bool = False


@dataclass(frozen=True)
class Stage:
    """What is held fixed in one equilibrium stage.

    Attributes
    ----------
    name : str
    T : float or None
        Outlet temperature, [K]; None when adiabatic.
    P : float
        Pressure, [Pa].
    T_in : float or None
        Inlet temperature after heating or cooling the previous stage's outlet, [K].
    adiabatic : bool
    heat_input : float
        Heat added to the stage, [W] (negative for a heat loss).
    approach : dict
        Reaction text to temperature approach, [K].
    gas : str
        Gas model name.
    method : str
        Solver.
    """

    name: str
    T: float | None
    P: float
    line: int | None = None
    T_in: float | None = None
    adiabatic: bool = False
    heat_input: float = 0.0
    approach: Mapping[str, float] = field(default_factory=dict)
    gas: str = "ideal"
    method: str = "auto"


@dataclass(frozen=True)
class ReportSpec:
    """What the report shows.

    Attributes
    ----------
    flow_unit, temperature_unit, pressure_unit : str
    cutoff : float
        Smallest mole fraction shown, [-].
    show : tuple of str or None
        Only these species (None: all above the cutoff).
    partial_pressures : bool
    kp : tuple of str
        Reactions whose partial-pressure equilibrium constant Kp (with its units) is reported.
    approach : tuple of str
        Reactions whose approach temperature at the outlet is reported.
    carbon : bool
        Report the carbon activity and the carbon-formation verdict.
    """

    flow_unit: str = "kmol/h"
    temperature_unit: str = "degC"
    pressure_unit: str = "bar"
    cutoff: float = 1e-6
    show: tuple[str, ...] | None = None
    partial_pressures: bool = False
    kp: tuple[str, ...] = ()
    approach: tuple[str, ...] = ()
    carbon: bool = False


@dataclass(frozen=True)
class Case:
    """A whole case: feeds, species set, stages (run in order, each taking the previous outlet), report."""

    title: str
    feeds: tuple[Feed, ...]
    species: SpeciesSpec
    stages: tuple[Stage, ...]
    report: ReportSpec
    source: str = "<case>"

    def mixed_feed(self) -> dict[str, float]:
        """All feeds together, species to flow [mol/s]."""
        total: dict[str, float] = {}
        for feed in self.feeds:
            for name, flow in feed.stream.feed_mol().items():
                total[name] = total.get(name, 0.0) + flow
        return total


#: Every key of a case file, by table, with its meaning (the reference printed by `gibbsmin settle --keys`).
CASE_KEYS: dict[str, dict[str, str]] = {
    "case": {
        "title": "a title for the report",
        "normal_conditions": "what Nm3 means: 'DIN 1343' (0 degC, 1.01325 bar; default), 'ISO 13443' (15 degC), 'US gas' (60 degF)",
    },
    "feed": {
        "unit": "unit of the numbers below: a flow (kmol/h, kg/h, Nm3/h, t/h, lbmol/h) or a composition (mol%, fraction, ppmv)",
        "<species>": "flow or composition of a species, e.g. CH4 = 950.0, or with its own unit, \"C(s)\" = \"12 kg/h\"",
        "total": "total flow when the species are given as a composition, e.g. '25000 Nm3/h'",
        "basis": "'wet' (default) or 'dry': a dry analysis leaves water out",
        "water_content": "with basis = 'dry': water in the wet stream, e.g. '2 mol%'",
        "normalize": "true to scale a composition that does not sum to 100 %",
        "steam_to_carbon": "add steam up to this S/C ratio [mol H2O per mol C]",
        "steam_rate": "add this much steam, e.g. '52 t/h'",
        "carbon_basis": "which carbon S/C counts: 'hydrocarbon' (default; CO, CO2 left out) or 'all'",
        "T": "feed temperature, e.g. '520 degC' (needed for adiabatic stages)",
        "P": "feed pressure, e.g. '32 bar(g)'",
        "<name>": "a sub-table [feed.<name>] with the keys above, for several feeds that are mixed",
    },
    "conditions": {
        "T": "outlet temperature, e.g. '850 degC' (not with adiabatic)",
        "P": "pressure, e.g. '30 bar(g)', '31 bar', '450 psia'",
        "adiabatic": "true: the outlet temperature follows from the energy balance",
        "heat_loss": "heat lost by an adiabatic stage, e.g. '0.5 MW'",
        "heat_input": "heat added to an adiabatic stage, e.g. '85 MW'",
        "T_in": "(stages after the first) temperature the previous outlet is cooled or heated to",
        "approach": "table: reaction = temperature approach, e.g. \"CH4 + H2O = CO + 3 H2\" = '10 K'",
        "gas": "gas model: 'ideal' (default), 'peng-robinson', 'srk'",
        "method": "solver: 'auto' (default), 'newton', 'convex'",
        "name": "(stages) a name for the stage",
    },
    "stage": {"...": "[[stage]] tables hold the keys of [conditions], one per stage in order"},
    "species": {
        "only": "the species set, e.g. ['CH4', 'H2O', 'CO', 'CO2', 'H2'] (default: every species of the feed's elements)",
        "exclude": "species left out, e.g. ['C(s)']",
        "frozen": "species that keep their feed amount (inerts such as N2, Ar), e.g. ['N2']",
        "allow_extrapolation": "true to use species data outside their fitted temperature range",
    },
    "report": {
        "flow_unit": "unit of flows in the report (default kmol/h)",
        "temperature_unit": "degC (default), K or degF",
        "pressure_unit": "bar (default), bar(g), MPa, psia, psig ...",
        "cutoff": "smallest mole fraction shown, e.g. '1 ppmv' (default) or '1 ppbv'",
        "show": "only these species, e.g. ['H2', 'CO', 'CO2', 'CH4']",
        "partial_pressures": "true to add partial pressures",
        "kp": "reactions whose Kp (with its units) is reported, e.g. ['N2O4 = 2 NO2']",
        "approach": "reactions whose approach temperature at the outlet is reported",
        "carbon": "true to report the carbon activity against graphite",
    },
}

_STAGE_KEYS = tuple(CASE_KEYS["conditions"])
_FEED_SETTINGS = ("unit", "total", "basis", "water_content", "normalize", "steam_to_carbon", "steam_rate",
                  "carbon_basis", "T", "P")

#: Keyword of equilibrate that each not-yet-landed stage key needs, with the module that brings it.
_NEEDS = {
    "adiabatic": ("adiabatic", "the energy balance (gibbsmin.energy)"),
    "heat_loss": ("heat_input", "the energy balance (gibbsmin.energy)"),
    "heat_input": ("heat_input", "the energy balance (gibbsmin.energy)"),
    "T_in": ("T_feed", "the energy balance (gibbsmin.energy)"),
    "approach": ("approach", "restricted equilibrium (gibbsmin.restricted)"),
    "gas": ("gas", "gas models in the equilibrium solve (gibbsmin.eos with equilibrate(gas=...))"),
}


def engine_accepts(keyword: str) -> bool:
    """Whether this version's :func:`equilibrate` takes ``keyword`` (features land module by module)."""
    return keyword in inspect.signature(equilibrate).parameters


def read_case(path: str | os.PathLike[str], db: SpeciesDatabase | None = None) -> Case:
    """Read and check a case file; raises :class:`CaseError` naming the line of the first problem."""
    return _read(TomlSource.from_file(path), db)


def parse_case(text: str, name: str = "<case>", db: SpeciesDatabase | None = None) -> Case:
    """As :func:`read_case`, from the text of a case file."""
    return _read(TomlSource(text, name), db)


def _read(source: TomlSource, db: SpeciesDatabase | None) -> Case:
    db = db or default_database()
    root = source.root()
    head = root.section("case")
    title, normal = Path(source.name).stem, NORMAL_DIN_1343
    if head is not None:
        title = head.get("title", read_text, title)
        normal = head.get("normal_conditions", read_normal_conditions, normal)
        head.finish(tuple(CASE_KEYS["case"]))
    feeds = _read_feeds(root, normal, db)
    species = _read_species(root.section("species"), db)
    stages = _read_stages(root)
    report = _read_report(root.section("report"), db)
    root.finish(("case", "feed", "conditions", "stage", "species", "report"))
    return Case(title, feeds, species, stages, report, source.name)


def _read_feeds(root: Section, normal: ReferenceConditions, db: SpeciesDatabase) -> tuple[Feed, ...]:
    table = root.section("feed", required=True)
    named = [k for k in table.keys() if isinstance(table.data[k], dict)]
    if named and len(named) != len(table.keys()):
        loose = next(k for k in table.keys() if k not in named)
        raise table.error(loose, f"[feed] holds named feeds ([feed.{named[0]}]); put {loose!r} inside one of them")
    sections = [table.section(k) for k in named] if named else [table]
    feeds = tuple(_read_feed(s, normal, db) for s in sections if s is not None)
    if not feeds:
        raise table.error(None, "is empty; give species flows, e.g. unit = \"kmol/h\" and CH4 = 1000.0")
    return feeds


def _read_feed(section: Section, normal: ReferenceConditions, db: SpeciesDatabase) -> Feed:
    unit = section.get("unit", read_text, None)
    T = section.get("T", read_temperature, 298.15)
    P = section.get("P", read_pressure, 101325.0)
    basis = section.get("basis", choice("wet", "dry"), "wet")
    carbon_basis = section.get("carbon_basis", choice(*CARBON_BASES), "hydrocarbon")
    components: dict[str, object] = {}
    for key in section.unused():
        if key in _FEED_SETTINGS:
            continue
        if key not in db:
            try:
                db[key]
            except UnknownSpeciesError as exc:
                setting = difflib.get_close_matches(key, _FEED_SETTINGS, n=1, cutoff=0.7)
                hint = f"did you mean the setting {setting[0]!r}?" if setting else exc.message.split("; ", 1)[1]
                raise section.error(key, f"is neither a feed setting nor a known species; {hint}") from None
        value = section.data[key]
        if isinstance(value, bool) or not isinstance(value, (numbers.Real, str)):
            raise section.error(key, f"must be a number or a text with a unit, not {_kind(value)}")
        section.mark_used(key)
        components[key] = value
    if not components:
        raise section.error(None, "lists no species; add e.g. CH4 = 1000.0 with unit = \"kmol/h\"")
    composition = unit is not None and _is_composition_unit(unit)
    try:
        if composition or basis == "dry":
            total = section.get("total", None, hint="a composition needs the stream's total flow, e.g. "
                                "total = '25000 Nm3/h'")
            water = section.get("water_content", None, None)
            if water is not None and basis != "dry":
                raise section.error("water_content", "only goes with basis = 'dry' (a wet analysis lists H2O itself)")
            stream = Stream.from_composition(
                components, total, T=T, P=P, unit=unit or "mol%", dry_basis=basis == "dry", water=water,
                normalize=section.get("normalize", read_bool, False), normal=normal, carbon_basis=carbon_basis,
                database=db)
        else:
            for key in ("total", "water_content", "normalize"):
                if key in section:
                    raise section.error(key, "only goes with a composition (unit = 'mol%' and a total flow)")
            stream = Stream.from_flows(components, unit, T=T, P=P, normal=normal, carbon_basis=carbon_basis,
                                       database=db)
    except CaseError:
        raise
    except (InputError, UnknownSpeciesError) as exc:
        raise section.error(_key_named_in(str(exc), components) or "unit", str(exc)) from None
    steam_rate = section.get("steam_rate", None, None)
    ratio = section.get("steam_to_carbon", read_positive_number, None)
    if steam_rate is not None and ratio is not None:
        raise section.error("steam_rate", "give either steam_rate or steam_to_carbon, not both")
    if steam_rate is not None:
        stream = _wrapped(section, "steam_rate", stream.with_steam, steam_rate)
    if ratio is not None:
        stream = _wrapped(section, "steam_to_carbon", stream.with_steam_to_carbon, ratio)
    section.finish(_FEED_SETTINGS)
    name = next((p for p in reversed(section.path) if isinstance(p, str)), "feed")
    return Feed(name, stream, section.source.line(section.path))


def _wrapped(section: Section, key: str, call: Callable, *args):
    try:
        return call(*args)
    except InputError as exc:
        raise section.error(key, str(exc)) from None


def _key_named_in(message: str, components: Mapping[str, object]) -> str | None:
    """The component a Stream error message starts with ("CH4: ..."), to point at its line."""
    head = message.split(":", 1)[0].strip()
    for key in components:
        if key == head:
            return key
    return None


def _is_composition_unit(unit: str) -> bool:
    """Whether ``unit`` is not a flow unit (composition units, and nonsense that the composition reader refuses)."""
    try:
        from_mol_s(1.0, unit, molar_mass=1.0)
    except InputError:
        return True
    return False


def _read_species(section: Section | None, db: SpeciesDatabase) -> SpeciesSpec:
    if section is None:
        return SpeciesSpec()

    def names(value: object) -> tuple[str, ...]:
        listed = read_names(value)
        return tuple(db[name].name for name in listed)

    spec = SpeciesSpec(
        only=section.get("only", names, None),
        exclude=section.get("exclude", names, ()),
        frozen=section.get("frozen", names, ()),
        allow_extrapolation=section.get("allow_extrapolation", read_bool, False),
    )
    section.finish(tuple(CASE_KEYS["species"]))
    return spec


def _read_stages(root: Section) -> tuple[Stage, ...]:
    single = root.section("conditions")
    many = root.sections("stage")
    if single is not None and many:
        raise root.error("stage", "give either one [conditions] table or a list of [[stage]] tables, not both")
    if single is None and not many:
        raise root.error(None, "needs a [conditions] table with T and P (or [[stage]] tables)")
    sections = [single] if single is not None else many
    return tuple(_read_stage(s, i, len(sections)) for i, s in enumerate(sections))


def _read_stage(section: Section, index: int, count: int) -> Stage:
    for key, (keyword, module) in _NEEDS.items():
        if key in section and not engine_accepts(keyword):
            raise section.error(key, f"needs {module}, which this version of gibbsmin does not have yet",
                                NotAvailableError)
    adiabatic = section.get("adiabatic", read_bool, False)
    if adiabatic and "T" in section:
        raise section.error("T", "an adiabatic stage finds its own outlet temperature; remove T or adiabatic")
    T = None if adiabatic else section.get("T", read_temperature, hint="e.g. T = '850 degC'")
    P = section.get("P", read_pressure, hint="e.g. P = '30 bar(g)'")
    if "heat_loss" in section and "heat_input" in section:
        raise section.error("heat_loss", "give heat_loss or heat_input, not both")
    heat = section.get("heat_input", read_power, 0.0) - section.get("heat_loss", read_power, 0.0)
    if heat and not adiabatic:
        key = "heat_input" if "heat_input" in section else "heat_loss"
        raise section.error(key, "only goes with adiabatic = true (at a fixed T the duty is a result)")
    if "T_in" in section and index == 0:
        raise section.error("T_in", "the first stage takes the feed as it is; T_in cools or heats a later stage's inlet")
    T_in = section.get("T_in", read_temperature, None)
    approach_table = section.section("approach")
    approach: dict[str, float] = {}
    if approach_table is not None:
        for reaction in approach_table.keys():
            approach[reaction] = approach_table.get(reaction, read_temperature_difference)
    default_name = "outlet" if count == 1 else f"stage {index + 1}"
    stage = Stage(
        name=section.get("name", read_text, default_name),
        T=T, P=P, line=section.source.line(section.path), T_in=T_in, adiabatic=adiabatic, heat_input=heat, approach=approach,
        gas=section.get("gas", choice("ideal", "peng-robinson", "srk"), "ideal"),
        method=section.get("method", choice("auto", "newton", "convex"), "auto"),
    )
    section.finish(_STAGE_KEYS)
    return stage


def _read_report(section: Section | None, db: SpeciesDatabase) -> ReportSpec:
    if section is None:
        return ReportSpec()
    for key, module in (("kp", "reaction stoichiometry (gibbsmin.reactions)"),
                        ("approach", "approach temperatures (gibbsmin.reactions)"),
                        ("carbon", "carbon activity (gibbsmin.carbon)")):
        if key in section and not _module_available(key):
            raise section.error(key, f"needs {module}, which this version of gibbsmin does not have yet",
                                NotAvailableError)

    def unit_checked(convert: Callable[[float, str], float]) -> Callable[[object], str]:
        def read(value: object) -> str:
            text = read_text(value)
            convert(300.0, text)
            return text
        return read

    from .units import from_kelvin, from_pascal

    spec = ReportSpec(
        flow_unit=section.get("flow_unit", _flow_unit, "kmol/h"),
        temperature_unit=section.get("temperature_unit", unit_checked(from_kelvin), "degC"),
        pressure_unit=section.get("pressure_unit", unit_checked(from_pascal), "bar"),
        cutoff=section.get("cutoff", read_fraction, 1e-6),
        show=section.get("show", lambda v: tuple(db[n].name for n in read_names(v)), None),
        partial_pressures=section.get("partial_pressures", read_bool, False),
        kp=section.get("kp", read_names, ()),
        approach=section.get("approach", read_names, ()),
        carbon=section.get("carbon", read_bool, False),
    )
    section.finish(tuple(CASE_KEYS["report"]))
    return spec


def _module_available(report_key: str) -> bool:
    import importlib.util

    module = {"kp": "gibbsmin.reactions", "approach": "gibbsmin.reactions", "carbon": "gibbsmin.carbon"}[report_key]
    return importlib.util.find_spec(module) is not None


# --- settling a case --------------------------------------------------------------------------------


@dataclass(frozen=True)
class StageResult:
    """One stage: its specification, its inlet (species to mol/s, T [K]) and its equilibrium."""

    stage: Stage
    inlet: Mapping[str, float]
    equilibrium: Equilibrium


@dataclass(frozen=True)
class CaseResult:
    case: Case
    stages: tuple[StageResult, ...]

    @property
    def outlet(self) -> Equilibrium:
        return self.stages[-1].equilibrium


def settle_case(case: Case, db: SpeciesDatabase | None = None,
                progress: Callable[[str], None] | None = None) -> CaseResult:
    """Settle every stage of a case in order, each stage taking the previous stage's outlet.

    Parameters
    ----------
    progress : callable, optional
        Called with the stage name before each stage (for a progress display).
    """
    db = db or default_database()
    inlet = case.mixed_feed()
    results = []
    for stage in case.stages:
        if progress is not None:
            progress(stage.name)
        try:
            eq = equilibrate(inlet, stage.T, stage.P, species=case.species.only, exclude=case.species.exclude,
                             inert=case.species.frozen, method=stage.method, db=db,
                             allow_extrapolation=case.species.allow_extrapolation)
        except (InputError, UnknownSpeciesError) as exc:
            raise CaseError(case.source, stage.line, stage.name, str(exc)) from None
        results.append(StageResult(stage, dict(inlet), eq))
        inlet = {s: n for s, n in eq.amounts.items() if n > 0.0}
    return CaseResult(case, tuple(results))
