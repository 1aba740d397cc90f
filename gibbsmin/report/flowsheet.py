"""The report, the JSON document and the audit's input files of a converged flowsheet (formatting only).

The stream table has one column per stream (the feeds, then each unit's outlets in the order the units run) and
the rows ``gibbsmin audit`` reads (description, phase, temperature, pressure, total flow, each species' flow), so
that :func:`audit_stream_table` is the same table as the audit's stream table; the vapour fraction and mol% rows
follow in the report.  :func:`write_audit_files` writes that table and the unit description (which streams enter
and leave each unit, its type and the heat it takes) for ``gibbsmin audit streams.csv units.toml``.
"""

from __future__ import annotations

import json
import os
from collections.abc import Mapping
from pathlib import Path

from ..flowsheet.beds import BedLines, bed_lines
from ..flowsheet.converge import FlowsheetResult
from ..flowsheet.material import Material
from ..flowsheet.summary import LoopSummary, inert_species, loop_summary
from ..flowsheet.units import ComponentSplitter, Context, Reactor, Splitter
from ..thermo import SpeciesDatabase, default_database
from ..units import from_kelvin, from_mol_s, from_pascal
from ..version import __version__
from .caution import CAUTION
from .document import Column, Plot, Report, Series, Table
from .files import write_all
from .settle import json_ready
from .spreadsheet import render_table_csv

#: The report's default flow unit, as the trade's stream tables give it.
FLOW_UNIT = "kmol/h"
_TEMPERATURE_UNIT, _PRESSURE_UNIT = "degC", "bar"
#: What the audit calls each kind of unit (a kind it has no word for is balanced as a heat exchanger).
_AUDIT_TYPES = {"mixer": "mixer", "splitter": "splitter", "reactor": "reactor", "separator": "separator",
                "component splitter": "separator", "exchanger": "heat exchanger", "valve": "heat exchanger"}


# --- the stream table ----------------------------------------------------------------------------------------


def stream_order(result: FlowsheetResult) -> list[str]:
    """The feeds, then each unit's outlets in the order the units run."""
    units = result.units
    names = list(result.structure.boundary_in)
    for k in result.structure.order:
        names += [name for name in units[k].outlets if name not in names]
    return names


def _description(name: str, result: FlowsheetResult) -> str:
    s, units = result.structure, result.units
    source = units[s.sources[name]].name if name in s.sources else "feed"
    sink = units[s.sinks[name]].name if name in s.sinks else "leaves"
    return f"{source} -> {sink}"


def _species(streams: list[Material]) -> list[str]:
    """Every species of the table, by its largest share in any stream."""
    largest: dict[str, float] = {}
    for m in streams:
        for sp, n in m.flows.items():
            largest[sp] = max(largest.get(sp, 0.0), n / m.total)
    return sorted(largest, key=lambda sp: -largest[sp])


def _phase(m: Material) -> str:
    return "liquid" if m.liquid_fraction >= 1.0 else "gas"


def _flow(species: str, mol_s: float, unit: str, db: SpeciesDatabase) -> float:
    return from_mol_s(mol_s, unit, molar_mass=db[species].molar_mass)


def _audit_rows(result: FlowsheetResult, names: list[str], db: SpeciesDatabase, flow_unit: str):
    streams = [result.streams[n] for n in names]
    species = _species(streams)
    rows = [("Description", "", *(_description(n, result) for n in names)),
            ("Phase", "", *(_phase(m) for m in streams)),
            ("Temperature", _TEMPERATURE_UNIT, *(from_kelvin(m.T, _TEMPERATURE_UNIT) for m in streams)),
            ("Pressure", _PRESSURE_UNIT, *(from_pascal(m.P, _PRESSURE_UNIT) for m in streams)),
            ("Total flow", flow_unit, *(sum(_flow(sp, n, flow_unit, db) for sp, n in m.flows.items())
                                        for m in streams))]
    rows += [(sp, flow_unit, *(_flow(sp, m.flows.get(sp, 0.0), flow_unit, db) for m in streams)) for sp in species]
    styles = ["text", "text", "fixed2", "number", "flow", *("flow" for _ in species)]
    return rows, styles, species


def _table(title: str, names: list[str], rows, styles, notes=(), key: str = "streams") -> Table:
    columns = (Column("Stream", "text"), Column("unit", "text"), *(Column(n, "number") for n in names))
    return Table(title, columns, tuple(tuple(r) for r in rows), tuple(notes), key=key, row_styles=tuple(styles))


def audit_stream_table(result: FlowsheetResult, db: SpeciesDatabase | None = None,
                       flow_unit: str = FLOW_UNIT) -> Table:
    """The stream table in the layout ``gibbsmin audit`` reads (see :mod:`gibbsmin.audit.table`)."""
    db = db or default_database()
    names = stream_order(result)
    rows, styles, _ = _audit_rows(result, names, db, flow_unit)
    return _table("Stream table", names, rows, styles)


def stream_table(result: FlowsheetResult, db: SpeciesDatabase | None = None, flow_unit: str = FLOW_UNIT) -> Table:
    """The report's stream table: the audit's rows, then each stream's vapour fraction and mol% of each species."""
    db = db or default_database()
    names = stream_order(result)
    rows, styles, species = _audit_rows(result, names, db, flow_unit)
    streams = [result.streams[n] for n in names]
    rows.append(("Vapour fraction", "mol/mol", *(1.0 - m.liquid_fraction for m in streams)))
    styles.append("fixed3")
    rows += [(sp, "mol%", *(100.0 * m.flows.get(sp, 0.0) / m.total for m in streams)) for sp in species]
    styles += ["percent" for _ in species]
    notes = [f"flows in {flow_unit}; mol% of the whole stream (vapour and liquid together); vapour fraction: the "
             "vapour's share of the stream's flow",
             "the rows down to the last flow are the stream table `gibbsmin audit` reads (write_audit_files)"]
    return _table("Stream table", names, rows, styles, notes)


# --- the summary and the units --------------------------------------------------------------------------------


def _power_scale(values) -> tuple[float, str]:
    """kW, or MW where any value reaches 1 MW."""
    return (1e6, "MW") if any(abs(v) >= 1e6 for v in values if v is not None) else (1e3, "kW")


def summary_table(summary: LoopSummary, flow_unit: str = FLOW_UNIT) -> Table:
    s = summary
    per_hour = from_mol_s(1.0, flow_unit) if "mol" in flow_unit else None
    unit = flow_unit if per_hour is not None else "mol/s"
    per_hour = per_hour or 1.0

    def flow(x):
        return None if x is None else x * per_hour

    def percent(x):
        return None if x is None else 100.0 * x

    scale, power_unit = _power_scale([s.compressor_power_W, *s.exchanger_duties_W.values()])
    rows = [
        ("product", s.product, "", s.production_basis or ""),
        (f"production of {s.product or '-'}", flow(s.production_mol_s), unit, ", ".join(s.product_streams)),
        (f"{s.product or '-'} in the other outlets", flow(s.product_elsewhere_mol_s), unit, ""),
        (f"conversion per pass of {s.key_reactant or '-'}", percent(s.conversion_per_pass), "%",
         f"over all reactors, of its flow in {', '.join(s.reactor_inlets) or '-'}"),
        ("recycle ratio", s.recycle_ratio, "mol/mol",
         f"{' + '.join(s.recycle_streams) or '-'} over {' + '.join(s.feed_streams)}"),
        ("inerts at the first reactor's inlet", percent(s.inert_fraction), "mol%",
         ", ".join(f"{sp} {100 * y:.4g} mol%" for sp, y in s.inerts.items()) + (f" ({s.inert_basis})" if s.inerts else "")),
        ("purge", flow(s.purge_mol_s), unit, ", ".join(s.purge_streams)),
        ("H2 lost with the purge", percent(s.hydrogen_loss), "% of H2 fed", ""),
        ("compressor power", None if s.compressor_power_W is None else s.compressor_power_W / scale, power_unit, ""),
        *((f"duty of {name}", duty / scale, power_unit, "heat added (negative: removed)")
          for name, duty in s.exchanger_duties_W.items()),
    ]
    return Table("Loop summary", (Column("figure", "text"), Column("value", "number"), Column("unit", "text"),
                                  Column("basis", "longtext")), tuple(rows),
                 ("blank: the figure does not apply to this flowsheet",), key="summary")


def unit_table(result: FlowsheetResult) -> Table:
    outcomes = result.outcomes
    scale, power_unit = _power_scale([v for o in outcomes.values() for v in (o.duty_W, o.power_W)])
    rows = []
    for unit in result.units:
        o = outcomes[unit.name]
        out = o.outlets[0] if o.outlets else None
        rows.append((unit.name, unit.kind, ", ".join(unit.inlets), ", ".join(unit.outlets),
                     None if out is None else from_kelvin(out.T, _TEMPERATURE_UNIT),
                     None if out is None else from_pascal(out.P, _PRESSURE_UNIT),
                     None if o.duty_W is None else o.duty_W / scale, None if o.power_W is None else o.power_W / scale,
                     "pass" if o.certified else "fail", "; ".join(o.notes)))
    return Table("Units", (Column("unit", "text"), Column("type", "text"), Column("inlets", "text"),
                           Column("outlets", "text"), Column(f"T out [{_TEMPERATURE_UNIT}]", "fixed2"),
                           Column(f"P out [{_PRESSURE_UNIT}]", "number"), Column(f"duty [{power_unit}]", "number"),
                           Column(f"power [{power_unit}]", "number"), Column("certified", "verdict"),
                           Column("notes", "longtext")), tuple(rows),
                 ("duty: heat added (negative: removed); blank where the unit has none (a splitter); T and P of "
                  "the first outlet",), key="units")


def _specification_text(result: FlowsheetResult) -> list[tuple[str, str]]:
    facts = []
    for spec in result.flowsheet.specifications:
        what = "mole fraction" if spec.quantity == "fraction" else "flow [mol/s]"
        facts.append((f"specification {spec.name}",
                      f"{spec.vary}.{spec.setting} = {result.settings[spec.name]:.6g} meets {what} of "
                      f"{'+'.join(spec.species)} in {spec.stream} = {spec.target:.6g}"))
    return facts


def flowsheet_report(result: FlowsheetResult, db: SpeciesDatabase | None = None, product: str | None = None,
                     context: Context | None = None, flow_unit: str = FLOW_UNIT) -> Report:
    """The report of a converged flowsheet: facts and certificate, loop summary, units, stream table, caution."""
    db = db or default_database()
    c = result.certificate
    facts = [("flowsheet", result.flowsheet.title), ("converged", "yes" if c.converged else "no"),
             ("certified", "yes" if c.certified else "no"),
             ("tear streams", ", ".join(result.structure.tears) or "none (no recycle)"),
             ("tear residual", f"{c.tear_residual:.3g} (largest relative change over the last pass)"),
             ("specification residual", f"{c.specification_residual:.3g} (largest miss over its target)"),
             ("element balance residual", f"{c.element_balance_residual:.3g} (largest |in - out| over in, "
                                          "over the boundary)"),
             ("energy balance residual", f"{c.energy_balance_residual:.3g} (largest of a unit)"),
             ("uncertified units", ", ".join(c.uncertified_units) or "none"),
             ("work", f"{c.passes} passes, {c.jacobians} Jacobians, {c.unit_solves} unit solves"),
             *_specification_text(result),
             ("boundary in", ", ".join(result.structure.boundary_in)),
             ("boundary out", ", ".join(result.structure.boundary_out))]
    summary = loop_summary(result, db, product, context)
    tables = (summary_table(summary, flow_unit), unit_table(result), stream_table(result, db, flow_unit))
    lines = bed_lines(result, summary.product) if summary.product else None
    plots = () if lines is None else (bed_plot(lines),)
    return Report(f"gibbsmin {__version__} - {result.flowsheet.title}", tuple(facts), tables, plots,
                  tables_before_plots=3)


def bed_plot(lines: BedLines) -> Plot:
    """The converter beds on the equilibrium curve: mol% of the product against T [degC], each bed a line from its
    inlet to its outlet, and the coolers between them dashed."""
    series = [Series("equilibrium", tuple(T - 273.15 for T in lines.T), tuple(100.0 * y for y in lines.fraction))]
    for k, (name, T_ends, y_ends) in enumerate(lines.beds):
        if k:
            _, T_before, y_before = lines.beds[k - 1]
            series.append(Series(f"cooling before {name}", (T_before[1] - 273.15, T_ends[0] - 273.15),
                                 (100.0 * y_before[1], 100.0 * y_ends[0]), "dashed"))
        series.append(Series(name, tuple(T - 273.15 for T in T_ends), tuple(100.0 * y for y in y_ends),
                             "line+points"))
    return Plot(f"Converter beds on the equilibrium curve at {lines.P / 1e5:.4g} bar", "line", "temperature [degC]",
                f"{lines.species} [mol%]", tuple(series))


# --- JSON -----------------------------------------------------------------------------------------------------


def _summary_document(s: LoopSummary) -> dict[str, object]:
    return {name: (dict(v) if isinstance(v, Mapping) else list(v) if isinstance(v, tuple) else v)
            for name, v in vars(s).items()}


def flowsheet_json(result: FlowsheetResult, db: SpeciesDatabase | None = None, product: str | None = None,
                   context: Context | None = None) -> dict:
    """The machine-readable document of a converged flowsheet (SI units; JSON-ready, no NaN)."""
    db = db or default_database()
    c = result.certificate
    document = {
        "gibbsmin_version": __version__,
        "title": result.flowsheet.title,
        "flowsheet": {"converged": bool(c.converged), "certified": bool(c.certified),
                      "tear_residual": c.tear_residual, "specification_residual": c.specification_residual,
                      "element_balance_residual": c.element_balance_residual,
                      "energy_balance_residual": c.energy_balance_residual,
                      "uncertified_units": list(c.uncertified_units), "passes": c.passes, "jacobians": c.jacobians,
                      "unit_solves": c.unit_solves, "tears": list(result.structure.tears),
                      "order": [result.units[k].name for k in result.structure.order]},
        "boundary": {"in": list(result.structure.boundary_in), "out": list(result.structure.boundary_out)},
        "settings": dict(result.settings),
        "streams": {name: {"T_K": m.T, "P_Pa": m.P, "flows_mol_s": dict(m.flows),
                           "liquid_fraction": m.liquid_fraction}
                    for name, m in ((n, result.streams[n]) for n in stream_order(result))},
        "units": {u.name: {"kind": u.kind, "inlets": list(u.inlets), "outlets": list(u.outlets),
                           "duty_W": result.outcomes[u.name].duty_W, "power_W": result.outcomes[u.name].power_W,
                           "certified": result.outcomes[u.name].certified, "notes": list(result.outcomes[u.name].notes)}
                  for u in result.units},
        "summary": _summary_document(loop_summary(result, db, product, context)),
        "caution": CAUTION,
    }
    return json_ready(document)


# --- the audit's input files ----------------------------------------------------------------------------------


def _holds_liquid_solution(m: Material, db: SpeciesDatabase) -> bool:
    """Whether gas species are in a liquid of the stream (a solution, beyond a pure condensed species)."""
    if m.liquid_fraction <= 0.0:
        return False
    if m.phases:
        return any(name != "gas" and any(db[sp].is_gas for sp in phase) for name, phase in m.phases.items())
    return any(db[sp].is_gas for sp in m.flows)


def _audit_energy(unit, result: FlowsheetResult, db: SpeciesDatabase) -> tuple[float | None, str, str]:
    """The heat and work the unit takes, as the audit's duty [W], its gas model, and why none is stated ("")."""
    o = result.outcomes[unit.name]
    eq = o.equilibrium
    gas = eq.gas_model if eq is not None else "ideal"
    ends = [result.streams[n] for n in (*unit.inlets, *unit.outlets)]
    if isinstance(unit, ComponentSplitter):
        return None, gas, "a removal step's energy is not modelled"
    if any(_holds_liquid_solution(m, db) for m in ends):
        return None, gas, ("a stream holds a liquid solution, whose enthalpy the audit takes as a gas's (ideal or on "
                           "a cubic's vapour root): its latent heat would show as an imbalance")
    if gas != "ideal" and not isinstance(unit, Reactor):
        return None, gas, f"the audit balances a unit other than a reactor with ideal-gas enthalpies, this one used {gas}"
    if o.duty_W is None and o.power_W is None:
        if isinstance(unit, Splitter):
            return 0.0, gas, ""
        return None, gas, "the unit reports no duty"
    return (o.duty_W or 0.0) + (o.power_W or 0.0), gas, ""


def _toml_text(value: str) -> str:
    return json.dumps(value, ensure_ascii=False)  # a JSON string is a TOML basic string


def _toml_list(values) -> str:
    return "[" + ", ".join(_toml_text(v) for v in values) + "]"


def audit_unit_description(result: FlowsheetResult, db: SpeciesDatabase | None = None,
                           context: Context | None = None, stream_table_file: str = "streams.csv") -> str:
    """The unit description (TOML) ``gibbsmin audit`` reads beside :func:`audit_stream_table`."""
    db = db or default_database()
    context = context or result.context
    title = " ".join(result.flowsheet.title.split())  # one line, inside a comment
    lines = [f"# The units of {title}, written by gibbsmin {__version__} from its converged "
             "flowsheet, for:", f"#   gibbsmin audit {stream_table_file} units.toml", "",
             "[plant]", f"title = {_toml_text(result.flowsheet.title + ' (gibbsmin flowsheet)')}",
             f"stream_table = {_toml_text(stream_table_file)}", ""]
    for unit in result.units:
        energy, gas, why = _audit_energy(unit, result, db)
        lines += [f"[unit.{_toml_text(unit.name)}]", f"type = {_toml_text(_AUDIT_TYPES.get(unit.kind, 'heat exchanger'))}",
                  f"inlets = {_toml_list(unit.inlets)}", f"outlets = {_toml_list(unit.outlets)}"]
        if energy is not None:
            o = result.outcomes[unit.name]
            work = "  # shaft power counted with the heat" if o.power_W else ""
            lines.append(f"duty = {_toml_text(f'{energy!r} W')}{work}")
        else:
            lines.append(f"adiabatic = false  # no duty stated, so no energy check: {why}")
        if isinstance(unit, Reactor):
            inlet = {sp: n for name in unit.inlets for sp, n in result.streams[name].flows.items()}
            held, _ = inert_species([unit], inlet, result.streams, db, context)
            lines.append(f"frozen = {_toml_list(held)}")
            if unit.stage.approach:
                pairs = ", ".join(f"{_toml_text(r)} = {_toml_text(f'{k!r} K')}" for r, k in unit.stage.approach.items())
                lines.append(f"approach = {{ {pairs} }}")
            if gas != "ideal":
                lines.append(f"gas = {_toml_text(gas)}")
        lines.append("")
    return "\n".join(lines)


def write_audit_files(result: FlowsheetResult, folder: str | os.PathLike[str], db: SpeciesDatabase | None = None,
                      context: Context | None = None, flow_unit: str = FLOW_UNIT) -> tuple[Path, Path]:
    """Write ``streams.csv`` and ``units.toml`` into ``folder`` (both or neither); returns their paths."""
    folder = Path(folder)
    streams, units = folder / "streams.csv", folder / "units.toml"
    write_all([(streams, lambda: render_table_csv(audit_stream_table(result, db, flow_unit))),
               (units, lambda: audit_unit_description(result, db, context, streams.name))])
    return streams, units

