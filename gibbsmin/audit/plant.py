"""The unit description of a plant (TOML): which streams enter and leave each unit, what each unit is, thresholds.

::

    [plant]
    title = "Invented ammonia plant front end, vendor balance rev. B"
    stream_table = "streams.csv"          # optional: the table the command line uses by default
    data = "atct-anchored"                 # optional: the thermochemical data set of every check

    [thresholds]                           # optional; defaults in THRESHOLDS
    element_closure = { warn = "0.1 %", fail = "0.5 %" }

    [unit.R-101]
    name = "primary reformer"
    type = "reactor"                       # reactor, mixer, splitter, heat exchanger, separator
    inlets = ["4"]
    outlets = ["5"]
    duty = "95 MW"                         # heat added to the unit as stated (negative: removed)
    reactions = ["steam methane reforming", "water-gas shift"]
    approach = { "steam methane reforming" = "10 K" }   # approaches the vendor states
    frozen = ["N2", "Ar"]                  # species that do not react in this unit

Every key is checked like a case file's: unknown keys, wrong units and
streams the table lacks are errors naming the file, the line and the key.
"""

from __future__ import annotations

import os
from collections.abc import Mapping
from dataclasses import dataclass, field
from pathlib import Path

from ..case.toml import CaseError, Section, TomlSource
from ..case.values import (
    choice,
    read_bool,
    read_names,
    read_normal_conditions,
    read_power,
    read_temperature_difference,
    read_text,
)
from ..errors import InputError, UnknownSpeciesError
from ..reactions import reaction
from ..thermo import DATA_SETS, SpeciesDatabase, choose_database
from ..units import NORMAL_DIN_1343
from .table import ROW_LABELS, StreamTable, read_stream_table

__all__ = ["AUDIT_KEYS", "THRESHOLDS", "UNIT_TYPES", "Limit", "Plant", "UnitSpec", "read_plant"]

#: Unit types and the words accepted for each.
UNIT_TYPES: dict[str, tuple[str, ...]] = {
    "reactor": ("reactor", "equilibrium reactor", "converter", "reformer"),
    "mixer": ("mixer", "mixing point", "junction"),
    "splitter": ("splitter", "divider", "tee"),
    "heat exchanger": ("heat exchanger", "exchanger", "heater", "cooler", "boiler", "waste heat boiler"),
    "separator": ("separator", "flash", "knock-out drum", "drum", "absorber"),
}


@dataclass(frozen=True)
class Limit:
    """A check's thresholds: beyond ``warn`` it warns, beyond ``fail`` it fails (None: never), in ``unit``."""

    warn: float
    fail: float | None
    unit: str

    def verdict(self, value: float) -> str:
        """pass, warn or fail for a magnitude (the caller passes |deviation| or the overshoot)."""
        if value != value:  # NaN: the check could not be made
            return "warn"
        if self.fail is not None and value > self.fail:
            return "fail"
        if value > self.warn:
            return "warn"
        return "pass"


#: Default thresholds, with their units and meaning.
THRESHOLDS: dict[str, tuple[Limit, str]] = {
    "element_closure": (Limit(0.1, 0.5, "%"), "|out - in| / in of each element"),
    "mass_closure": (Limit(0.1, 0.5, "%"), "|out - in| / in of mass"),
    "component_closure": (Limit(0.1, 0.5, "%"), "|out - in| / in of each species, units without reaction"),
    "energy_balance": (Limit(3.0, 10.0, "K"), "energy imbalance over the outlet's heat capacity: the outlet "
                       "temperature error it amounts to"),
    "equilibrium_difference": (Limit(1.0, 5.0, "mol%"), "largest |stated - equilibrium| of a species, dry basis"),
    "beyond_equilibrium": (Limit(1.0, 3.0, "K"), "how far a reaction is beyond its equilibrium in the direction "
                           "it went (negative approach)"),
    "approach_difference": (Limit(3.0, 10.0, "K"), "|approach found - approach stated| of a named reaction"),
    "carbon_activity": (Limit(1.0, None, "-"), "carbon activity against graphite at a reactor outlet"),
    "stated_total": (Limit(0.1, 0.5, "%"), "|stated total - sum of components| / stated total"),
    "composition_sum": (Limit(0.05, 0.5, "mol%"), "|sum of a stated composition - 100|"),
    "splitter_composition": (Limit(0.01, 0.1, "mol%"), "largest composition difference between a splitter's "
                             "inlet and outlets"),
}


@dataclass(frozen=True)
class UnitSpec:
    """One unit of the plant as described.

    Attributes
    ----------
    id, name, type : str
    inlets, outlets : tuple of str
        Stream ids in the stream table.
    duty : float or None
        Heat added to the unit as stated, [W]; None when not stated.
    reactions : tuple of str
        Reactions whose approach is checked (reactors); empty: an independent set of the outlet's species.
    approach : dict
        Reaction to the approach the description states, [K].
    frozen : tuple of str
        Species that do not react in the unit (held at their inlet flow in the equilibrium reference).
    species : tuple of str or None
        Species set of the equilibrium reference; None: the gas species of the unit's own streams.
    carbon : bool
        Check the carbon activity at the outlet (reactors).
    gas : str
        Gas model of the reactor's approach, equilibrium reference and energy balance: "ideal" (default),
        "peng-robinson" or "srk" (fugacities at the stream's own T, P and composition).
    line : int or None
    """

    id: str
    name: str
    type: str
    inlets: tuple[str, ...]
    outlets: tuple[str, ...]
    duty: float | None = None
    reactions: tuple[str, ...] = ()
    approach: Mapping[str, float] = field(default_factory=dict)
    frozen: tuple[str, ...] = ()
    species: tuple[str, ...] | None = None
    carbon: bool = True
    gas: str = "ideal"
    line: int | None = None

    @property
    def label(self) -> str:
        return f"{self.id} {self.name}".strip()


@dataclass(frozen=True)
class Plant:
    """A unit description with its stream table; ``data`` names the thermochemical data set (None: the default)."""

    title: str
    units: tuple[UnitSpec, ...]
    table: StreamTable
    limits: Mapping[str, Limit]
    source: str
    data: str | None = None


#: Keys of a unit description, for `gibbsmin audit --keys`.
AUDIT_KEYS: dict[str, dict[str, str]] = {
    "plant": {"title": "a title for the report", "stream_table": "the stream table (CSV or XLSX), relative to "
              "this file; the command line's table argument overrides it",
              "normal_conditions": "what Nm3 means in the table: 'DIN 1343' (default), 'ISO 13443', 'US gas'",
              "data": "thermochemical data set of every check: 'atct-anchored' (default; its stated "
                      "uncertainties give each approach temperature's data uncertainty) or 'nasa-1993'"},
    "thresholds": {name: f"{{ warn = ..., fail = ... }} in {limit.unit}: {meaning} (default warn {limit.warn:g}, "
                   f"fail {'never' if limit.fail is None else f'{limit.fail:g}'})"
                   for name, (limit, meaning) in THRESHOLDS.items()},
    "unit.<id>": {
        "name": "what the unit is called, e.g. 'primary reformer'",
        "type": "reactor, mixer, splitter, heat exchanger or separator",
        "inlets": "stream ids entering, e.g. ['4']",
        "outlets": "stream ids leaving, e.g. ['5']",
        "duty": "heat added to the unit as stated, e.g. '95 MW' (negative: removed); mixers and splitters "
                "default to 0",
        "adiabatic": "true: no heat crosses the boundary (the same as duty = '0 MW')",
        "reactions": "reactors: reactions whose approach is checked, e.g. ['steam methane reforming', 'shift']",
        "approach": "reactors: approaches the description states, e.g. { \"water-gas shift\" = '10 K' }",
        "frozen": "reactors: species that do not react here, e.g. ['CH4', 'N2']",
        "species": "reactors: species set of the equilibrium reference (default: the gas species of the unit's streams)",
        "carbon": "reactors: false to skip the carbon-activity check (default true)",
        "gas": "reactors: gas model of the approach, equilibrium and energy checks: 'ideal' (default), 'peng-robinson' "
               "or 'srk' (for loops at high pressure; shipped kij)",
    },
    "stream table rows": dict(ROW_LABELS),
}


def _unit_type(value: object) -> str:
    text = read_text(value).strip().lower()
    for name, words in UNIT_TYPES.items():
        if text in words:
            return name
    raise InputError(f"{text!r} is not a unit type; use one of {', '.join(UNIT_TYPES)}")


def _limit(default: Limit):
    def read(value: object) -> Limit:
        if not isinstance(value, dict):
            raise InputError(f"must be a table such as {{ warn = \"{default.warn:g} {default.unit}\", "
                             f"fail = \"{default.fail or default.warn:g} {default.unit}\" }}")
        unknown = set(value) - {"warn", "fail"}
        if unknown:
            raise InputError(f"unknown key {sorted(unknown)[0]!r}; a threshold has warn and fail")
        warn = _threshold_value(value.get("warn", default.warn), default.unit)
        fail = value.get("fail", default.fail)
        fail = None if fail in (None, "never", "none") else _threshold_value(fail, default.unit)
        if fail is not None and fail < warn:
            raise InputError(f"fail ({fail:g} {default.unit}) is below warn ({warn:g} {default.unit})")
        return Limit(warn, fail, default.unit)
    return read


def _threshold_value(value: object, unit: str) -> float:
    if isinstance(value, bool):
        raise InputError(f"a threshold is a number in {unit}, not {value!r}")
    if isinstance(value, (int, float)):
        number = float(value)
    elif isinstance(value, str):
        text = value.strip()
        if unit == "K":
            number = read_temperature_difference(text)
        else:
            magnitude, _, given = text.partition(" ")
            given = given.strip() or unit
            if given.replace(" ", "") not in (unit, unit.replace("mol", "")) and not (unit == "-" and given == "-"):
                raise InputError(f"{text!r}: this threshold is in {unit}")
            try:
                number = float(magnitude.rstrip("%"))
            except ValueError:
                raise InputError(f"{text!r} is not a number in {unit}") from None
    else:
        raise InputError(f"a threshold is a number in {unit}, not {value!r}")
    if not number >= 0 or number == float("inf"):
        raise InputError(f"a threshold must be a finite number, zero or positive, not {value!r}")
    return abs(number)


def read_plant(path: str | os.PathLike[str], table: str | os.PathLike[str] | None = None,
               db: SpeciesDatabase | None = None) -> Plant:
    """Read a unit description and its stream table (``table``, or the description's ``stream_table``)."""
    given = db
    source = TomlSource.from_file(path)
    root = source.root()
    head = root.section("plant")
    title, normal, table_key, data = Path(source.name).stem, NORMAL_DIN_1343, None, None
    if head is not None:
        title = head.get("title", read_text, title)
        normal = head.get("normal_conditions", read_normal_conditions, normal)
        table_key = head.get("stream_table", read_text, None)
        data = head.get("data", choice(*DATA_SETS), None)
        head.finish(tuple(AUDIT_KEYS["plant"]))
    try:
        db = choose_database(data, given)
    except InputError as exc:
        raise root.error("plant", str(exc)) from None
    if table is None:
        if table_key is None:
            raise root.error("plant", "names no stream_table; give the table on the command line or as "
                             "[plant] stream_table = 'streams.csv'")
        table = Path(path).parent / table_key
    stream_table = read_stream_table(table, normal=normal, db=db)
    limits = {name: limit for name, (limit, _) in THRESHOLDS.items()}
    thresholds = root.section("thresholds")
    if thresholds is not None:
        for name in THRESHOLDS:
            limits[name] = thresholds.get(name, _limit(limits[name]), limits[name])
        thresholds.finish(tuple(THRESHOLDS))
    units_table = root.section("unit", required=True)
    assert units_table is not None
    units = []
    for unit_id in units_table.keys():
        section = units_table.section(unit_id)
        assert section is not None
        units.append(_read_unit(section, unit_id, stream_table, db))
    if not units:
        raise units_table.error(None, "describes no units; add [unit.<id>] tables")
    root.finish(("plant", "thresholds", "unit"))
    return Plant(title, tuple(units), stream_table, limits, source.name, data)


def _read_unit(section: Section, unit_id: str, table: StreamTable, db: SpeciesDatabase) -> UnitSpec:
    kind = section.get("type", _unit_type, hint="e.g. type = 'reactor'")

    def streams(value: object) -> tuple[str, ...]:
        ids = tuple(str(v) for v in value) if isinstance(value, list) and all(isinstance(v, (str, int)) for v in value) \
            else read_names(value)
        for stream_id in ids:
            table[stream_id]
        return ids

    def names(value: object) -> tuple[str, ...]:
        return tuple(db[n].name for n in read_names(value))

    inlets = section.get("inlets", streams, hint="e.g. inlets = ['4']")
    outlets = section.get("outlets", streams, hint="e.g. outlets = ['5']")
    if not inlets or not outlets:
        raise section.error("inlets" if not inlets else "outlets", "lists no streams")
    both = set(inlets) & set(outlets)
    if both:
        raise section.error("outlets", f"stream {sorted(both)[0]} is both an inlet and an outlet")
    if kind == "reactor" and len(outlets) != 1:
        raise section.error("outlets", "a reactor has one outlet stream (describe a separator after it for more)")
    if "duty" in section and "adiabatic" in section:
        raise section.error("adiabatic", "give duty or adiabatic, not both")
    adiabatic = section.get("adiabatic", read_bool, kind in ("mixer", "splitter"))
    duty = section.get("duty", read_power, 0.0 if adiabatic else None)
    reactor_keys = ("reactions", "approach", "frozen", "species", "carbon", "gas")
    if kind != "reactor":
        for key in reactor_keys:
            if key in section:
                raise section.error(key, f"only goes with type = 'reactor' (this unit is a {kind})")
    reactions = section.get("reactions", read_names, ())
    approach: dict[str, float] = {}
    stated = section.section("approach")
    if stated is not None:
        for reaction in stated.keys():
            approach[reaction] = stated.get(reaction, read_temperature_difference)
    for key, texts in (("reactions", reactions), ("approach", tuple(approach))):
        _check_reactions(section, key, texts)
    spec = UnitSpec(
        id=unit_id, name=section.get("name", read_text, ""), type=kind, inlets=inlets, outlets=outlets, duty=duty,
        reactions=reactions, approach=approach, frozen=section.get("frozen", names, ()),
        species=section.get("species", names, None), carbon=section.get("carbon", read_bool, True),
        gas=section.get("gas", choice("ideal", "peng-robinson", "srk"), "ideal"),
        line=section.source.line(section.path),
    )
    section.finish(tuple(AUDIT_KEYS["unit.<id>"]))
    return spec


def _check_reactions(section: Section, key: str, texts: tuple[str, ...]) -> None:
    for text in texts:
        try:
            reaction(text)
        except (InputError, UnknownSpeciesError) as exc:
            raise section.error(key, f"{text!r}: {exc}") from None


def unit_error(plant: Plant, unit: UnitSpec, problem: str) -> CaseError:
    return CaseError(plant.source, unit.line, f"unit.{unit.id}", problem)
