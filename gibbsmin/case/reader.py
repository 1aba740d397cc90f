"""Reading a case file into a :class:`~gibbsmin.case.spec.Case`, key by key, with the line of every error."""

from __future__ import annotations

import difflib
import numbers
import os
from collections.abc import Callable, Mapping
from pathlib import Path

from ..errors import InputError, UnknownSpeciesError
from ..reactions import reaction
from ..streams import CARBON_BASES, Stream
from ..thermo import DATA_SETS, SpeciesDatabase, default_database
from ..units import NORMAL_DIN_1343, ReferenceConditions, from_kelvin, from_mol_s, from_pascal, to_fraction
from .services import SERVICES
from .spec import CASE_KEYS, Case, CurveSpec, Feed, ReportSpec, SpeciesSpec, Stage
from .toml import CaseError, Section, TomlSource, kind
from .values import (
    choice,
    flow_unit,
    read_bool,
    read_fraction,
    read_names,
    read_normal_conditions,
    read_positive_int,
    read_positive_number,
    read_power,
    read_pressure,
    read_temperature,
    read_temperature_difference,
    read_text,
)

_TABLES = ("case", "feed", "conditions", "stage", "species", "curve", "report")
_FEED_SETTINGS = tuple(k for k in CASE_KEYS["feed"] if not k.startswith("<"))
_STAGE_KEYS = tuple(CASE_KEYS["conditions"])
_GAS_MODELS = ("ideal", "peng-robinson", "srk")
STAGE_TYPES = ("reactor", "heater", "cooler", "knock-out", "separator")
#: The outlets of a separator the next stage may take.
SEPARATOR_OUTLETS = ("vapour", "liquid")


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
    stages = _read_stages(root, db)
    curve = _read_curve(root, db)
    report = _read_report(root.section("report"), db)
    root.finish(_TABLES)
    case = Case(title, feeds, species, stages, report, curve, source.name)
    _check_energy_inputs(root, case)
    _check_frozen(root, case)
    return case


def _check_frozen(root: Section, case: Case) -> None:
    fed = case.mixed_feed()
    for name in case.species.frozen:
        if fed.get(name, 0.0) <= 0.0:
            section = root.section("species")
            assert section is not None
            raise section.error("frozen", f"{name} is not in the feed; a frozen species keeps its feed amount, "
                                "so it must be fed (or leave it out of the species set with exclude)")


# --- feeds ------------------------------------------------------------------------------------------


def _read_feeds(root: Section, normal: ReferenceConditions, db: SpeciesDatabase) -> tuple[Feed, ...]:
    table = root.section("feed", required=True)
    assert table is not None
    named = [k for k in table.keys() if isinstance(table.data[k], dict)]
    if named and len(named) != len(table.keys()):
        loose = next(k for k in table.keys() if k not in named)
        raise table.error(loose, f"[feed] holds named feeds ([feed.{named[0]}]); put {loose!r} inside one of them")
    sections = [table.section(k) for k in named] if named else [table]
    feeds = tuple(_read_feed(s, normal, db) for s in sections if s is not None)
    if not feeds:
        raise table.error(None, "is empty; give species flows, e.g. unit = \"kmol/h\" and CH4 = 1000.0")
    return feeds


def _components(section: Section, db: SpeciesDatabase) -> dict[str, object]:
    """The keys of a feed table that are species, each checked against the database."""
    components: dict[str, object] = {}
    for key in section.keys():
        if key in _FEED_SETTINGS:
            continue
        try:
            db[key]
        except UnknownSpeciesError as exc:
            setting = difflib.get_close_matches(key, _FEED_SETTINGS, n=1, cutoff=0.7)
            hint = f"did you mean the setting {setting[0]!r}?" if setting else exc.message.split("; ", 1)[1]
            raise section.error(key, f"is neither a feed setting nor a known species; {hint}") from None
        value = section.data[key]
        if isinstance(value, bool) or not isinstance(value, (numbers.Real, str)):
            raise section.error(key, f"must be a number or a text with a unit, not {kind(value)}")
        section.mark_used(key)
        components[key] = value
    if not components:
        raise section.error(None, "lists no species; add e.g. CH4 = 1000.0 with unit = \"kmol/h\"")
    return components


def _read_feed(section: Section, normal: ReferenceConditions, db: SpeciesDatabase) -> Feed:
    unit = section.get("unit", read_text, None)
    T_given = "T" in section
    T = section.get("T", read_temperature, 298.15)
    P = section.get("P", read_pressure, 101325.0)
    basis = section.get("basis", choice("wet", "dry"), "wet")
    carbon_basis = section.get("carbon_basis", choice(*CARBON_BASES), "hydrocarbon")
    normalize = section.get("normalize", read_bool, False)
    components = _components(section, db)
    if unit is not None:
        _check_unit(section, unit)
    is_composition = basis == "dry" or (unit is not None and not _is_flow_unit(unit))
    try:
        if is_composition:
            total = section.get("total", None, hint="a composition needs the stream's total flow, e.g. "
                                "total = '25000 Nm3/h'")
            water = section.get("water_content", None, None)
            if water is not None and basis != "dry":
                raise section.error("water_content", "only goes with basis = 'dry' (a wet analysis lists H2O itself)")
            stream = Stream.from_composition(
                components, total, T=T, P=P, unit=unit or "mol%", dry_basis=basis == "dry", water=water,
                normalize=normalize, normal=normal, carbon_basis=carbon_basis, database=db)
        else:
            for key in ("total", "water_content", "normalize"):
                if key in section:
                    raise section.error(key, "only goes with a composition (unit = 'mol%' and a total flow)")
            if unit is None and any(not isinstance(v, str) for v in components.values()):
                raise section.error(None, "gives numbers without a unit; add unit = \"kmol/h\" (or kg/h, Nm3/h, "
                                    "mol% with a total)")
            stream = Stream.from_flows(components, unit, T=T, P=P, normal=normal, carbon_basis=carbon_basis,
                                       database=db)
    except CaseError:
        raise
    except (InputError, UnknownSpeciesError) as exc:
        key = _key_of_stream_error(str(exc), components)
        message = str(exc).replace("pass normalize=True", "add normalize = true")
        if key is not None and message.startswith(f"{key}: "):
            message = message[len(key) + 2:]  # the key is named in front already
        raise section.error(key, message) from None
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
    return Feed(name, stream, T_given, section.source.line(section.path))


def _wrapped(section: Section, key: str, call: Callable, *args):
    try:
        return call(*args)
    except InputError as exc:
        raise section.error(key, str(exc)) from None


def _key_of_stream_error(message: str, components: Mapping[str, object]) -> str | None:
    """The key a Stream error is about: the species it starts with, the total, or the table itself."""
    head = message.split(":", 1)[0].strip()
    if head in components:
        return head
    if head.startswith("total flow"):
        return "total"
    if head.startswith("H2O") or "water content" in message:
        return "water_content"
    return None


def _check_unit(section: Section, unit: str) -> None:
    """A feed unit must be a flow or a composition unit; say which kind of flow it is not, if neither."""
    if _is_flow_unit(unit):
        return
    try:
        to_fraction(f"1 {unit}")
    except InputError as exc:
        if "unknown composition unit" not in str(exc):
            raise section.error("unit", str(exc)) from None
        try:
            from_mol_s(1.0, unit, molar_mass=1.0)
        except InputError as flow_exc:
            raise section.error("unit", f"{flow_exc}; or a composition such as mol% with a total") from None


def _is_flow_unit(unit: str) -> bool:
    try:
        from_mol_s(1.0, unit, molar_mass=1.0)
    except InputError:
        return False
    return True


# --- species set, stages, curve ---------------------------------------------------------------------


def _read_species(section: Section | None, db: SpeciesDatabase) -> SpeciesSpec:
    if section is None:
        return SpeciesSpec()

    names = _names_in(db)
    spec = SpeciesSpec(
        only=section.get("only", names, None),
        exclude=section.get("exclude", names, ()),
        frozen=section.get("frozen", names, ()),
        allow_extrapolation=section.get("allow_extrapolation", read_bool, False),
    )
    section.finish(tuple(CASE_KEYS["species"]))
    return spec


def _read_stages(root: Section, db: SpeciesDatabase) -> tuple[Stage, ...]:
    single = root.section("conditions")
    many = root.sections("stage")
    if single is not None and many:
        raise root.error("stage", "give either one [conditions] table or a list of [[stage]] tables, not both")
    if single is None and not many:
        raise root.error(None, "needs a [conditions] table with T and P (or [[stage]] tables)")
    sections = [single] if single is not None else many
    return tuple(_read_stage(s, i, len(sections), db) for i, s in enumerate(sections))


def _read_stage(section: Section, index: int, count: int, db: SpeciesDatabase) -> Stage:
    kind = section.get("type", choice(*STAGE_TYPES), "reactor")
    if "next" in section and kind != "separator":
        raise section.error("next", f"only goes with type = 'separator' (the outlet the next stage takes); a {kind} "
                            "has one outlet")
    if kind != "reactor":
        return _read_exchanger(section, index, count, kind)
    if "duty" in section:
        raise section.error("duty", "goes with type = 'heater', 'cooler' or 'knock-out'; a reactor takes "
                            "adiabatic = true with heat_input or heat_loss")
    gas_model = _read_gas_model(section)
    adiabatic = section.get("adiabatic", read_bool, False)
    if adiabatic and "T" in section:
        raise section.error("T", "an adiabatic stage finds its own outlet temperature; remove T or adiabatic")
    T = None if adiabatic else section.get("T", read_temperature, hint="e.g. T = '850 degC' (or adiabatic = true)")
    P = section.get("P", read_pressure, hint="e.g. P = '30 bar(g)'")
    if "heat_loss" in section and "heat_input" in section:
        raise section.error("heat_loss", "give heat_loss or heat_input, not both")
    heat = section.get("heat_input", read_power, 0.0) - section.get("heat_loss", read_heat_loss, 0.0)
    if not adiabatic:
        for key in ("heat_input", "heat_loss"):
            if key in section:
                raise section.error(key, "only goes with adiabatic = true (at a fixed T the duty is a result)")
    if "T_in" in section and index == 0:
        raise section.error("T_in", "the first stage takes the feeds as they are; T_in sets a later stage's inlet")
    T_in = section.get("T_in", read_temperature, None)
    approach: dict[str, float] = {}
    table = section.section("approach")
    if table is not None:
        for reaction in table.keys():
            approach[reaction] = table.get(reaction, read_temperature_difference)
            _check_reaction(table, reaction, reaction)
    if "service" in section and "reactions" in section:
        raise section.error("reactions", "give service (its reactions) or reactions (your own), not both")
    service = section.get("service", choice(*SERVICES), None)
    reactions = section.get("reactions", read_names, None)
    for reaction in reactions or ():
        _check_reaction(section, "reactions", reaction)
    if reactions == ():
        raise section.error("reactions", "is empty; a stage where nothing reacts is type = 'cooler' (or 'heater')")
    stage = Stage(
        name=_stage_name(section, index, count),
        T=T, P=P, line=section.source.line(section.path), T_in=T_in, adiabatic=adiabatic, heat_input=heat,
        approach=approach, **gas_model, method=_read_method(section), service=service, reactions=reactions,
        frozen=section.get("frozen", _names_in(db), ()), data=section.get("data", choice(*DATA_SETS), None),
        uncertainty=section.get("uncertainty", read_bool, False),
    )
    section.finish(_STAGE_KEYS)
    return stage


def _stage_name(section: Section, index: int, count: int) -> str:
    return section.get("name", read_text, "outlet" if count == 1 else f"stage {index + 1}")


def _read_method(section: Section) -> str:
    return section.get("method", choice("auto", "newton", "convex"), "auto")


def _names_in(db: SpeciesDatabase) -> Callable[[object], tuple[str, ...]]:
    def names(value: object) -> tuple[str, ...]:
        return tuple(db[name].name for name in read_names(value))
    return names


#: The one direction of heat each non-reacting stage type with a duty takes (+1 heats, -1 cools).
_HEAT_DIRECTION = {"heater": 1.0, "cooler": -1.0, "knock-out": -1.0}


def _read_exchanger(section: Section, index: int, count: int, kind: str) -> Stage:
    """A heater, cooler, knock-out or separator: outlet T (or duty), pressure; nothing reacts, so no reaction keys."""
    for key in ("adiabatic", "heat_loss", "heat_input", "approach", "service", "reactions", "frozen"):
        if key in section:
            raise section.error(key, f"only goes with type = 'reactor'; nothing reacts in a {kind} (every species "
                                "keeps its flow" + _WHAT_CHANGES.get(kind, ")"))
    if kind == "separator":
        _check_separator(section)
    elif ("T" in section) == ("duty" in section):
        raise section.error(None, f"a {kind} needs either its outlet T (e.g. T = '40 degC') or its duty "
                            "(e.g. duty = '-12 MW'), not both")
    gas_model = _read_gas_model(section)
    duty = section.get("duty", read_power, None)
    direction = _HEAT_DIRECTION.get(kind, 0.0)
    if duty is not None and duty * direction < 0.0:
        size = str(section.data["duty"]).strip().removeprefix("-").strip()
        fix = f"duty = '-{size}'" if direction < 0 else f"duty = '{size}'"
        raise section.error("duty", f"a {kind} {'removes' if direction < 0 else 'adds'} heat, so its duty is "
                            f"{'negative' if direction < 0 else 'positive'} (heat added); write {fix}"
                            + (", or type = 'heater'" if direction < 0 else ", or type = 'cooler'"))
    if "T_in" in section:
        raise section.error("T_in", f"a {kind} takes the previous outlet as it is; give its own outlet T instead")
    stage = Stage(
        name=_stage_name(section, index, count),
        T=section.get("T", read_temperature, None), P=section.get("P", read_pressure, hint="e.g. P = '30 bar(g)'"),
        line=section.source.line(section.path), **gas_model, method=_read_method(section), type=kind, duty=duty,
        data=section.get("data", choice(*DATA_SETS), None),
        uncertainty=section.get("uncertainty", read_bool, False),
        passes_on=section.get("next", choice(*SEPARATOR_OUTLETS), "vapour"),
    )
    section.finish(_STAGE_KEYS)
    return stage


#: What a non-reacting stage does besides keeping every flow, closing the sentence of a refused reaction key.
_WHAT_CHANGES = {"knock-out": ", water may condense)", "separator": ", shared between vapour and liquid)"}


def _check_separator(section: Section) -> None:
    """A separator is a flash at a given T and P with a cubic: refuse a duty, a missing T and the ideal gas."""
    if "duty" in section:
        raise section.error("duty", "a separator is flashed at its outlet T; give T (e.g. T = '40 degC') instead "
                            "of duty (its duty is a result)")
    if "T" not in section:
        raise section.error(None, "a separator needs its outlet T, e.g. T = '40 degC' (its duty is a result)")
    if section.data.get("gas", "ideal") == "ideal":
        key = "gas" if "gas" in section else None
        raise section.error(key, "a separator needs a cubic gas model, which describes the liquid solution as well "
                            "as the vapour: add gas = 'peng-robinson' (or 'srk'); with the ideal gas, a type = "
                            "'knock-out' condenses water alone")
    if "uncertainty" in section and section.data["uncertainty"] is True:
        raise section.error("uncertainty", "is not yet propagated through a split into vapour and liquid; remove "
                            "uncertainty from the separator")


def _read_gas_model(section: Section) -> dict[str, object]:
    """The stage's gas model, kij choice and own kij pairs, as Stage's keyword arguments."""
    gas = section.get("gas", choice(*_GAS_MODELS), "ideal")
    kij = section.get("kij", choice("shipped", "none"), "shipped")
    for key in ("kij", "kij_pairs"):
        if key in section and gas == "ideal":
            raise section.error(key, f"{key} only goes with a cubic gas model: add gas = 'peng-robinson' (or "
                                f"'srk'), or remove {key}")
    return {"gas": gas, "kij": kij, "kij_pairs": _read_kij_pairs(section)}


def _read_kij_pairs(section: Section) -> dict[tuple[str, str], float]:
    """[conditions.kij_pairs]: "A B" = value, checked as the engine will check them."""
    table = section.section("kij_pairs")
    if table is None:
        return {}
    pairs = {}
    for key in table.keys():
        names = key.replace("/", " ").split()
        if len(names) != 2:
            raise table.error(key, f"{key!r} is not a pair: write two species names, e.g. \"H2 NH3\" = 0.05")
        value = table.get(key, read_kij_value)
        db = default_database()
        try:
            records = [db[name] for name in names]
        except UnknownSpeciesError as exc:
            raise table.error(key, str(exc)) from None
        lacking = [r.name for r in records if not r.is_gas or r.critical is None]
        if lacking:
            raise table.error(key, f"{', '.join(lacking)} has no critical constants (or is not a gas), so the "
                              "cubic has no kij for it")
        if records[0].name == records[1].name:
            raise table.error(key, "names one species twice; k_ii is zero by definition")
        pairs[(records[0].name, records[1].name)] = value
    return pairs


def read_heat_loss(value: object) -> float:
    """A heat loss, [W]: heat leaving the stage, so zero or positive; a negative one would silently be a gain."""
    loss = read_power(value)
    if loss < 0.0:
        size = str(value).strip().removeprefix("-").strip()
        raise InputError(f"{value!r} is negative, but a loss is heat leaving the stage; write heat_loss = "
                         f"'{size}' for a loss, or heat_input = '{size}' if the stage gains heat")
    return loss


def read_kij_value(value: object) -> float:
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not -1.0 < float(value) < 1.0:
        raise InputError(f"a kij is a number between -1 and 1, got {value!r}")
    return float(value)


def _check_reaction(section: Section, key: str, text: str) -> None:
    """A reaction named or written in the case must be one the reactions module can read."""
    try:
        reaction(text)
    except (InputError, UnknownSpeciesError) as exc:
        raise section.error(key, f"{text!r}: {exc}" if key != text else str(exc)) from None


def _read_curve(root: Section, db: SpeciesDatabase) -> CurveSpec | None:
    section = root.section("curve")
    if section is None:
        return None
    if ("y" in section) == ("conversion" in section):
        raise section.error(None, "needs either y = 'NH3' (mol% drawn) or conversion = 'SO2' (conversion drawn)")
    key = "y" if "y" in section else "conversion"
    species = section.get(key, lambda v: db[read_text(v)].name)
    T_from = section.get("T_from", read_temperature, hint="e.g. T_from = '350 degC'")
    T_to = section.get("T_to", read_temperature, hint="e.g. T_to = '650 degC'")
    if not T_to > T_from:
        raise section.error("T_to", "must be above T_from")
    points = section.get("points", read_positive_int, 41)
    if points < 3:
        raise section.error("points", "must be at least 3")
    section.finish(tuple(CASE_KEYS["curve"]))
    return CurveSpec(species, key == "conversion", T_from, T_to, points)


# --- report -----------------------------------------------------------------------------------------


def _unit_checked(convert: Callable[[float, str], float]) -> Callable[[object], str]:
    def read(value: object) -> str:
        text = read_text(value)
        convert(300.0, text)
        return text
    return read


def _read_report(section: Section | None, db: SpeciesDatabase) -> ReportSpec:
    if section is None:
        return ReportSpec()
    kp = section.get("kp", read_names, ())
    approach = section.get("approach", read_names, ())
    for key, reactions in (("kp", kp), ("approach", approach)):
        _check_listed(section, key, reactions)
    spec = ReportSpec(
        flow_unit=section.get("flow_unit", flow_unit, "kmol/h"),
        temperature_unit=section.get("temperature_unit", _unit_checked(from_kelvin), "degC"),
        pressure_unit=section.get("pressure_unit", _unit_checked(from_pascal), "bar"),
        cutoff=section.get("cutoff", read_fraction, 1e-6),
        show=section.get("show", lambda v: tuple(db[n].name for n in read_names(v)), None),
        partial_pressures=section.get("partial_pressures", read_bool, False),
        kp=kp, approach=approach,
        carbon=section.get("carbon", read_bool, False),
    )
    section.finish(tuple(CASE_KEYS["report"]))
    return spec


def _check_listed(section: Section, key: str, reactions: tuple[str, ...]) -> None:
    for text in reactions:
        _check_reaction(section, key, text)


def _check_energy_inputs(root: Section, case: Case) -> None:
    """An energy balance needs every feed's temperature: say which feed lacks one, at read time."""
    first = case.stages[0]
    needs_energy = first.adiabatic or first.duty is not None or case.curve is not None
    if needs_energy and not case.feed_temperatures_known:
        feed = next(f for f in case.feeds if not f.T_given)
        raise CaseError(case.source, feed.line, f"feed.{feed.name}" if len(case.feeds) > 1 else "feed",
                        "the energy balance needs the feed temperature; add e.g. T = '450 degC'")
