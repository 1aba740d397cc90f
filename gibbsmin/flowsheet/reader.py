"""Reading a flowsheet case file: named feeds, ``[[unit]]`` tables joined by stream names, ``[[specification]]``
tables and ``[flowsheet]`` settings, every key checked with its line (the case reader's tables and errors)."""

from __future__ import annotations

import os
from collections.abc import Callable, Mapping
from dataclasses import dataclass
from pathlib import Path

from ..case.reader import _read_feeds, _read_gas_model, _read_report, _read_species, _read_stage
from ..case.spec import Case, ReportSpec
from ..case.toml import CaseError, Section, TomlSource
from ..case.values import (
    choice,
    read_fraction,
    read_names,
    read_positive_int,
    read_positive_number,
    read_power,
    read_pressure,
    read_temperature,
    read_text,
)
from ..errors import InputError
from ..thermo import SpeciesDatabase, default_database
from ..units import NORMAL_DIN_1343, to_mol_s
from .material import Material
from .model import DesignSpecification, Flowsheet
from .units import (
    ComponentSplitter,
    Compressor,
    Context,
    Cooler,
    Heater,
    FluidModel,
    Mixer,
    Reactor,
    Separator,
    Splitter,
    Unit,
    Valve,
)

_TABLES = ("case", "feed", "species", "report", "flowsheet", "unit", "specification")

#: Every key of a flowsheet's own tables, with its meaning (beside the case file's [feed], [species], [report]).
FLOWSHEET_KEYS: dict[str, dict[str, str]] = {
    "flowsheet": {
        "tear": "streams whose values are guessed and converged, e.g. ['recycle'] (default: chosen from the "
                "connections, preferring a stream that enters a mixer)",
        "tolerance": "largest relative change of a tear stream over a pass that counts as converged (default 1e-10)",
        "max_passes": "most flowsheet passes before giving up (default 200)",
        "product": "the product species of the loop summary, e.g. 'NH3' (default: the species the reactors make most)",
    },
    "unit": {
        "name": "the unit's name (unique)",
        "type": "'mixer', 'heater', 'cooler', 'valve', 'separator', 'splitter', 'component splitter', "
                "'compressor' or 'reactor'",
        "in": "the stream(s) the unit takes, by name: a feed's name or another unit's outlet",
        "out": "the stream(s) it makes: one name, or two for a separator (vapour, liquid), a splitter and a "
               "component splitter (first, second)",
        "T": "heater, cooler, separator: outlet temperature, e.g. '-20 degC'; reactor: as in [[stage]]",
        "P": "outlet pressure, e.g. '188 bar' (default: the inlet's; a valve and a compressor need it)",
        "duty": "heater or cooler: heat added instead of T, e.g. '-25 MW'",
        "gas": "gas model: 'ideal' (default; water may condense as pure liquid), 'peng-robinson', 'srk' (the "
               "cubic describes the liquid solution too)",
        "kij": "with a cubic: 'shipped' (default) or 'none'",
        "fraction": "splitter: fraction of the inlet flow to the first outlet, e.g. 0.03",
        "flow": "splitter: flow to the first outlet instead, e.g. '450 kmol/h'",
        "recovery": "component splitter: species to the fraction of it sent to the first outlet, e.g. "
                    "{CO2 = 0.995}",
        "efficiency": "compressor: isentropic efficiency, e.g. 0.75",
        "(reactor)": "every key of a case file's [[stage]] reactor: T or adiabatic, heat_input, approach, service, "
                     "reactions, frozen, method, data",
    },
    "specification": {
        "name": "a name for the report",
        "stream": "the stream the target is read on",
        "species": "the species (one, or a list taken together), e.g. ['CH4', 'Ar']",
        "mol_percent": "target: their mol% in the stream, e.g. 12.0",
        "flow": "or target: their flow, e.g. '1500 t/d' (mass units need one species)",
        "vary": "the setting varied: '<unit name>.<setting>' (fraction, flow, T, duty, P) or '<feed name>.flow'",
        "between": "the range the setting may take, e.g. [0.001, 0.2] or ['-30 degC', '0 degC']",
    },
}

_UNIT_COMMON = ("name", "type", "in", "out")
_UNIT_KEYS = {
    "mixer": ("P", "gas", "kij"),
    "heater": ("T", "duty", "P", "gas", "kij"),
    "cooler": ("T", "duty", "P", "gas", "kij"),
    "valve": ("P", "gas", "kij"),
    "separator": ("T", "P", "gas", "kij"),
    "splitter": ("fraction", "flow"),
    "component splitter": ("recovery",),
    "compressor": ("P", "efficiency", "gas", "kij"),
}
UNIT_TYPES = (*_UNIT_KEYS, "reactor")


@dataclass(frozen=True)
class FlowsheetCase:
    """A flowsheet read from a file, with what its units share (the species set and the report's settings)."""

    flowsheet: Flowsheet
    case: Case
    product: str | None = None

    @property
    def report(self) -> ReportSpec:
        return self.case.report

    def context(self, db: SpeciesDatabase | None = None) -> Context:
        return Context(self.case, db or default_database())


def is_flowsheet(source: TomlSource) -> bool:
    """Whether a case file is a flowsheet (it has [[unit]] tables)."""
    return "unit" in source.root().data


def read_flowsheet(path: str | os.PathLike[str], db: SpeciesDatabase | None = None) -> FlowsheetCase:
    """Read and check a flowsheet case file; raises CaseError naming the line of the first problem."""
    return flowsheet_of(TomlSource.from_file(path), db)


def flowsheet_of(source: TomlSource, db: SpeciesDatabase | None = None) -> FlowsheetCase:
    db = db or default_database()
    root = source.root()
    head = root.section("case")
    title = Path(source.name).stem
    if head is not None:
        title = head.get("title", read_text, title)
        head.finish(("title",))
    feed_table = root.section("feed", required=True)
    feeds = _read_feeds(root, NORMAL_DIN_1343, db)
    for f in feeds:
        if not f.T_given:
            raise feed_table.error(f.name, "a flowsheet's feed needs its T and P (every unit's energy balance "
                                   "starts from them), e.g. T = '40 degC'")
    species = _read_species(root.section("species"), db)
    report = _read_report(root.section("report"), db)
    settings = root.section("flowsheet")
    tears, tolerance, max_passes, product = None, 1e-10, 200, None
    if settings is not None:
        tears = settings.get("tear", read_names, None)
        tolerance = settings.get("tolerance", read_positive_number, tolerance)
        max_passes = settings.get("max_passes", read_positive_int, max_passes)
        product = settings.get("product", lambda v: db[read_text(v)].name, None)
        settings.finish(tuple(FLOWSHEET_KEYS["flowsheet"]))
    units = tuple(_read_unit(s, db) for s in root.sections("unit"))
    if not units:
        raise root.error("unit", "lists no units; add [[unit]] tables")
    materials = {f.name: Material(f.stream.T, f.stream.P, dict(f.stream.feed_mol())) for f in feeds}
    specifications = tuple(_read_specification(s, k, materials, units, db)
                           for k, s in enumerate(root.sections("specification")))
    root.finish(_TABLES)
    case = Case(title, feeds, species, (), report, None, source.name)
    try:
        sheet = Flowsheet(title, materials, units, specifications, tears, tolerance, max_passes)
    except InputError as exc:
        raise CaseError(source.name, None, "flowsheet", str(exc)) from None
    return FlowsheetCase(sheet, case, product)


def _streams(value: object) -> tuple[str, ...]:
    return (read_text(value),) if isinstance(value, str) else read_names(value)


def _read_unit(section: Section, db: SpeciesDatabase) -> Unit:
    name = section.get("name", read_text, hint="e.g. name = 'converter'")
    kind = section.get("type", choice(*UNIT_TYPES), hint=f"one of {', '.join(map(repr, UNIT_TYPES))}")
    inlets = section.get("in", _streams, hint="the stream(s) it takes, e.g. in = 'converter feed'")
    outlets = section.get("out", _streams, hint="the stream(s) it makes, e.g. out = 'converter out'")
    line = section.source.line(section.path)
    common = {"name": name, "inlets": inlets, "outlets": outlets, "line": line}
    if kind == "reactor":
        if "T_in" in section:
            raise section.error("T_in", "a flowsheet heats or cools a stream in a unit of its own (type = 'heater' "
                                "or 'cooler') before the reactor")
        stage = _read_stage(section, 0, 1, db)
        return Reactor(**common, stage=stage)
    allowed = _UNIT_KEYS[kind]
    for key in section.keys():
        if key not in (*_UNIT_COMMON, *allowed):
            raise section.error(key, f"a {kind} takes: {', '.join((*_UNIT_COMMON, *allowed))}")
    model = {}
    if "gas" in allowed:
        gas_model = _read_gas_model(section)
        if gas_model["kij_pairs"]:
            raise section.error("kij_pairs", "is read in reactors only; give the pairs there")
        model = {"model": FluidModel(gas_model["gas"], gas_model["kij"])}
    P = section.get("P", read_pressure, None) if "P" in allowed else None
    try:
        return _BUILDERS[kind](section, common, model, P)
    finally:
        section.finish((*_UNIT_COMMON, *allowed))


def _mixer(section, common, model, P):
    return Mixer(**common, P=P, **model)


def _exchanger(section, common, model, P):
    if ("T" in section) == ("duty" in section):
        raise section.error(None, "a heater or cooler needs its outlet T (e.g. T = '40 degC') or its duty "
                            "(e.g. duty = '-12 MW'), not both")
    kind = Heater if section.data["type"] == "heater" else Cooler
    return kind(**common, T=section.get("T", read_temperature, None), duty=section.get("duty", read_power, None),
                     P=P, **model)


def _valve(section, common, model, P):
    if P is None:
        raise section.error(None, "a valve needs its outlet pressure, e.g. P = '20 bar'")
    return Valve(**common, P=P, **model)


def _separator(section, common, model, P):
    return Separator(**common, T=section.get("T", read_temperature, None), P=P, **model)


def _splitter(section, common, model, P):
    if ("fraction" in section) == ("flow" in section):
        raise section.error(None, "a splitter needs fraction (of its inlet to the first outlet, e.g. 0.03) or flow "
                            "(to the first outlet, e.g. '450 kmol/h'), one of them")
    fraction = section.get("fraction", read_fraction, None)
    if fraction is not None and not 0.0 <= fraction <= 1.0:
        raise section.error("fraction", f"{fraction!r} is not between 0 and 1")
    return Splitter(**common, fraction=fraction, flow=section.get("flow", to_mol_s, None))


def _component_splitter(section, common, model, P):
    table = section.section("recovery", required=True)
    recovery = {}
    for key in table.keys():
        value = table.get(key, read_fraction)
        if not 0.0 <= value <= 1.0:
            raise table.error(key, f"a recovery is a fraction between 0 and 1, got {value!r}")
        recovery[key] = value
    return ComponentSplitter(**common, recovery=recovery)


def _compressor(section, common, model, P):
    if P is None:
        raise section.error(None, "a compressor needs its outlet pressure, e.g. P = '195 bar'")
    efficiency = section.get("efficiency", read_positive_number, hint="its isentropic efficiency, e.g. 0.75")
    if not 0.0 < efficiency <= 1.0:
        raise section.error("efficiency", f"an isentropic efficiency lies between 0 and 1, got {efficiency!r}")
    return Compressor(**common, P=P, efficiency=efficiency, **model)


_BUILDERS: dict[str, Callable] = {"mixer": _mixer, "heater": _exchanger, "cooler": _exchanger, "valve": _valve,
                                  "separator": _separator, "splitter": _splitter,
                                  "component splitter": _component_splitter, "compressor": _compressor}


def _read_specification(section: Section, index: int, feeds: Mapping[str, Material], units: tuple[Unit, ...],
                        db: SpeciesDatabase) -> DesignSpecification:
    name = section.get("name", read_text, f"specification {index + 1}")
    stream = section.get("stream", read_text, hint="the stream the target is read on")
    species = section.get("species", lambda v: tuple(db[s].name for s in _streams(v)), hint="e.g. species = 'NH3'")
    if ("mol_percent" in section) == ("flow" in section):
        raise section.error(None, "give the target as mol_percent (e.g. 12.0) or as flow (e.g. '1500 t/d'), one "
                            "of them")
    if "mol_percent" in section:
        quantity, target = "fraction", section.get("mol_percent", read_positive_number) / 100.0
    else:
        mass = db[species[0]].molar_mass if len(species) == 1 else None
        quantity, target = "flow", section.get("flow", lambda v: to_mol_s(v, molar_mass=mass))
    vary = section.get("vary", read_text, hint="e.g. vary = 'purge split.fraction'")
    owner, _, setting = vary.rpartition(".")
    names = {u.name: u for u in units}
    if owner not in names and owner not in feeds:
        raise section.error("vary", f"{vary!r} names no unit or feed before its '.<setting>'; units: "
                            f"{', '.join(names)}; feeds: {', '.join(feeds)}")
    reader = _SETTING_READERS.get(setting, read_positive_number)
    bounds = section.get("between", _pair_of(reader), hint="the range of the setting, e.g. between = [0.001, 0.2]")
    if len(bounds) != 2 or not bounds[0] < bounds[1]:
        raise section.error("between", "give two values, the lower first, e.g. [0.001, 0.2]")
    section.finish(tuple(FLOWSHEET_KEYS["specification"]))
    return DesignSpecification(name, stream, quantity, species, target, owner, setting, bounds[0], bounds[1],
                               section.source.line(section.path))


def _pair_of(reader: Callable[[object], float]) -> Callable[[object], tuple[float, ...]]:
    def pair(value: object) -> tuple[float, ...]:
        if not isinstance(value, list):
            raise InputError("write the range as a list of two values, e.g. [0.001, 0.2]")
        return tuple(reader(x) for x in value)
    return pair


_SETTING_READERS: dict[str, Callable[[object], float]] = {
    "fraction": read_fraction, "T": read_temperature, "P": read_pressure, "duty": read_power, "flow": to_mol_s,
}
