"""The report and the JSON document of a settled case."""

from __future__ import annotations

import math
from collections.abc import Mapping

import numpy as np

from ..carbon import CARBON_REACTIONS
from ..case import CaseResult, ReportSpec, StageResult
from ..case.run import separator_outlets
from ..equilibrium import Equilibrium
from ..reactions import approach_temperatures, quotients, reaction
from ..thermo import DATA_SETS, data_set, database_holding, default_database
from ..uncertainty import approach_uncertainty
from ..units import from_kelvin, from_mol_s, from_pascal
from ..version import __version__
from .caution import CAUTION
from .document import Column, Plot, Report, Series, Table
from .feeds import flow_text, meets_steam, mixed_steam_to_carbon, steam_to_carbon_text
from .numbers import cutoff_text
from .stream_table import stream_table


def is_gauge(unit: str) -> bool:
    """Whether a pressure unit is a gauge unit (it reads zero at one standard atmosphere)."""
    return from_pascal(101325.0, unit) == 0.0


def temperature_text(T: float, unit: str) -> str:
    return f"{from_kelvin(T, unit):.2f} {unit}"


def pressure_text(P: float, unit: str) -> str:
    """A pressure in the report's unit; in bar as the trade writes it, gauge with absolute beside it."""
    if unit in ("bar", "bar(g)"):
        return f"{from_pascal(P, 'bar(g)') + 0.0:.6g} bar(g) ({from_pascal(P, 'bar'):.6g} bar abs)"
    return f"{from_pascal(P, unit):.6g} {unit}{'' if is_gauge(unit) else ' (abs)'}"


def flow_in(species: str, mol_s: float, unit: str) -> float:
    """A species flow [mol/s] in ``unit`` (molar, normal-volume or mass)."""
    return from_mol_s(mol_s, unit, molar_mass=database_holding([species], default_database())[species].molar_mass)


def _absolute(unit: str) -> str:
    """An absolute pressure unit for partial pressures and Kp: the report's own, or bar where it is gauge."""
    return "bar" if is_gauge(unit) else unit


def stage_table(result: StageResult, spec: ReportSpec) -> Table:
    """The outlet of one stage: species, phase, flow, mol% wet and dry (and partial pressures if asked); an outlet
    with liquid-solution phases lists each phase in turn (:func:`_fluid_phase_rows`)."""
    eq = result.equilibrium
    wet, dry = eq.mole_fractions, eq.dry_mole_fractions
    partial_unit = _absolute(spec.pressure_unit)
    u = _UncertaintyCells(eq, spec.flow_unit)
    fluid = eq.fluid_phases is not None
    columns = [Column("species", "text"), Column("phase", "text"), Column(f"flow [{spec.flow_unit}]", "flow"),
               *u.column("flow", spec.flow_unit), Column("mol% wet", "percent"), *u.column("mol% wet"),
               Column("mol% dry", "percent"), *u.column("mol% dry")]
    if spec.partial_pressures:
        columns.append(Column(f"partial pressure [{partial_unit}]", "number"))
    if fluid:
        columns.append(Column("mol% of outlet", "percent"))
    extra = [None] if spec.partial_pressures else []
    share_cell = [None] if fluid else []
    gas_species = wet if eq.gas_present else {}  # no gas phase: no composition to list or hide
    shown = [s for s in sorted(gas_species, key=lambda s: -wet[s]) if _shown(s, wet[s], spec)]
    in_gas = _gas_phase_amounts(eq)
    rows: list[tuple[object, ...]] = []
    for s in shown:
        pressure = [from_pascal(wet[s] * eq.P, partial_unit)] if spec.partial_pressures else []
        rows.append((s, "gas", flow_in(s, in_gas[s], spec.flow_unit), *u.flow(s), 100 * wet[s], *u.wet(s),
                     100 * dry[s] if s in dry else None, *u.dry(s), *pressure, *share_cell))
    notes = [UNCERTAINTY_NOTE] if u.asked else []
    if fluid:
        def row(name: str, phase: str, flow: float, percent: float | None, share: float | None) -> tuple[object, ...]:
            return (name, phase, flow, *u.blank, percent, *u.blank, None, *u.blank, *extra, share)

        rows += _fluid_phase_rows(eq, spec, row, notes)
    else:
        for s, n in eq.condensed.items():
            rows.append((s, "condensed", flow_in(s, n, spec.flow_unit), *u.flow(s), None, *u.blank, None, *u.blank,
                         *extra))
        gas_flow = sum(flow_in(s, n, spec.flow_unit) for s, n in eq.amounts.items() if eq.phase_of[s] == "gas")
        share = 100.0 if eq.gas_present else None
        rows.append(("total gas", "gas", gas_flow, *u.blank, share, *u.blank, share if dry else None, *u.blank,
                     *extra))
    if not eq.gas_present:
        notes.append("(no gas phase: the condensed phases hold every atom)" if not fluid else
                     "(no gas phase: the liquid holds every species)")
    hidden = len(gas_species) - len(shown)
    if hidden:
        why = "not listed in [report] show" if spec.show else f"below {cutoff_text(spec.cutoff)}"
        notes.append(f"({hidden} gas species {why} not shown)")
    title = (f"{result.stage.name}: {temperature_text(eq.T, spec.temperature_unit)}, "
             f"{pressure_text(eq.P, spec.pressure_unit)}; phases: {', '.join(eq.phases_present)}")
    return Table(title, tuple(columns), tuple(rows), tuple(notes), key=result.stage.name)


def _gas_phase_amounts(eq: Equilibrium) -> dict[str, float]:
    """Each gas species' amount in the gas phase, [mol] (the totals where the answer has one fluid phase)."""
    if eq.fluid_phases is None:
        return dict(eq.amounts)
    return {s: float(np.exp(v)) if v > -np.inf else 0.0 for s, v in eq.ln_gas_amounts.items()}


def _fluid_phase_rows(eq: Equilibrium, spec: ReportSpec, row, notes: list[str]) -> list[tuple[object, ...]]:
    """The rows after the gas species of an outlet with liquid-solution phases: the gas's total line, then each
    liquid's species (flow, mol% of that liquid) and total line, then the pure condensed species; every total
    line with its share of the outlet [mol%].  ``row(species, phase, flow, mol%, share)`` lays out one row."""
    outlet = sum(eq.amounts.values())
    outlet_flow = sum(flow_in(s, n, spec.flow_unit) for s, n in eq.amounts.items())
    rows: list[tuple[object, ...]] = []

    def total_line(name: str, amounts: Mapping[str, float], fraction_sum: float) -> tuple[object, ...]:
        flow = sum(flow_in(s, n, spec.flow_unit) for s, n in amounts.items())
        share = 100.0 * sum(amounts.values()) / outlet
        return row(f"total {name}", name, flow, fraction_sum, share)

    if eq.gas_present:
        rows.append(total_line("gas", _gas_phase_amounts(eq), 100.0))
    for liquid in (p for p in eq.fluid_phases or () if p.name != "gas"):
        x = liquid.mole_fractions
        listed = [s for s in sorted(x, key=lambda s: -x[s]) if _shown(s, x[s], spec)]
        for s in listed:
            rows.append(row(s, liquid.name, flow_in(s, liquid.amounts[s], spec.flow_unit), 100.0 * x[s], None))
        rows.append(total_line(liquid.name, liquid.amounts, 100.0))
        if len(listed) < len(x):
            why = "not listed in [report] show" if spec.show else f"below {cutoff_text(spec.cutoff)}"
            notes.append(f"({len(x) - len(listed)} species of the {liquid.name} {why} not shown)")
    for s, n in eq.condensed.items():
        rows.append(row(s, "condensed", flow_in(s, n, spec.flow_unit), None, 100.0 * n / outlet))
    notes.append(f"mol% wet of a liquid's rows: of that liquid; mol% dry and partial pressures: of the gas; "
                 f"mol% of outlet: each phase's share of the stage's outlet ({outlet_flow:.6g} {spec.flow_unit} in "
                 "all)")
    return rows


#: What a "u(...)" column holds, said once under every table that has one.
UNCERTAINTY_NOTE = ("u(...): standard uncertainty from the data set's stated uncertainties of the enthalpies of "
                    "formation, propagated linearly (model and measurement errors not included)")


class _UncertaintyCells:
    """The "u(...)" cells beside a stage's flows and mol%: none unless the stage asked for uncertainty."""

    def __init__(self, eq: Equilibrium, flow_unit: str):
        self.eq, self.flow_unit = eq, flow_unit
        self.asked = eq.uncertainty is not None
        self.blank = [None] if self.asked else []

    def column(self, quantity: str, unit: str = "") -> list[Column]:
        """The column of u(quantity) [unit], where asked."""
        return [Column(f"u({quantity})" + (f" [{unit}]" if unit else ""), "uncertainty")] if self.asked else []

    def _cell(self, values, species: str, scale: float = 1.0) -> list[object]:
        if not self.asked:
            return []
        value = None if values is None else values.get(species)
        return [None if value is None or not math.isfinite(value) else scale * value]

    def flow(self, species: str) -> list[object]:
        if not self.asked:
            return []
        value = self.eq.uncertainty.get(species)
        return [None if value is None or not math.isfinite(value) else flow_in(species, value, self.flow_unit)]

    def wet(self, species: str) -> list[object]:
        return self._cell(self.eq.mole_fraction_uncertainty, species, 100.0)

    def dry(self, species: str) -> list[object]:
        return self._cell(self.eq.dry_mole_fraction_uncertainty, species, 100.0)


def _shown(species: str, y: float, spec: ReportSpec) -> bool:
    return species in spec.show if spec.show is not None else y >= spec.cutoff


def stages_table(result: CaseResult) -> Table:
    """One row per stage: inlet and outlet temperature, pressure, what was fixed, duty, certificate."""
    spec = result.case.report
    balanced = any(stage.equilibrium.T_uncertainty is not None for stage in result.stages)
    rows = []
    for stage in result.stages:
        eq = stage.equilibrium
        T_in = set(stage.inlet.temperatures.values())
        inlet_T = from_kelvin(T_in.pop(), spec.temperature_unit) if len(T_in) == 1 and None not in T_in else None
        duty = stage.duty_W
        u_T = [eq.T_uncertainty] if balanced else []
        rows.append((stage.stage.name, inlet_T, from_kelvin(eq.T, spec.temperature_unit), *u_T,
                     from_pascal(eq.P, spec.pressure_unit), eq.specification,
                     None if duty is None else duty / 1e6, "pass" if eq.certificate.certified else "fail"))
    notes = ["duty: heat added to the stage (negative: removed), from the feeds at their stated temperatures "
             f"to the outlet; {_enthalpies_text(result)}"]
    if not result.case.feed_temperatures_known:
        notes.append("give every feed a temperature (T = ...) to have the first stage's duty")
    for stage in result.stages:
        if stage.inlet.holds_liquid and stage.duty_W is None:
            notes.append(f"{stage.stage.name}: no duty, as its inlet holds a liquid and a {stage.stage.type} keeps "
                         "one gas, whose enthalpy would count the liquid as a gas")
    if balanced:
        notes.append("u(T out): standard uncertainty of the outlet temperature the energy balance set, from the data "
                     "set's stated uncertainties of the enthalpies of formation (blank where T was given)")
    unit = spec.temperature_unit
    u_T_column = [Column("u(T out) [K]", "uncertainty")] if balanced else []
    return Table("Stages", (Column("stage", "text"), Column(f"T in [{unit}]", "fixed2"),
                            Column(f"T out [{unit}]", "fixed2"), *u_T_column, Column(f"P [{spec.pressure_unit}]", "number"),
                            Column("fixed", "text"), Column("duty [MW]", "number"), Column("certified", "verdict")),
                 tuple(rows), tuple(notes), key="stages")


def _enthalpies_text(result: CaseResult) -> str:
    """Which enthalpies the duties were taken with: ideal-gas ones, and each cubic's residual enthalpy."""
    text = "ideal-gas enthalpies on the formation basis (condensed species as pure phases)"
    cubic: dict[str, list[str]] = {}
    for stage in result.stages:
        if stage.equilibrium.gas_model != "ideal":
            cubic.setdefault(stage.equilibrium.gas_model, []).append(stage.stage.name)
    if not cubic:
        return text
    everywhere = len(result.stages) == sum(len(names) for names in cubic.values())
    liquid = any(stage.equilibrium.fluid_phases is not None for stage in result.stages)
    of_what = "of the gas (and of each liquid solution, on its own root)" if liquid else "of the gas"
    parts = [f"the {model} residual enthalpy {of_what}{'' if everywhere else ' in ' + ', '.join(names)}"
             for model, names in cubic.items()]
    return (f"{text}, plus {' and '.join(parts)} (each feed at its own temperature and pressure, "
            "the outlet at its own)")


# --- what each stage let change (case stage types and services) ---------------------------------------


def scope_table(result: CaseResult) -> Table | None:
    """Per stage: its type, the reactions it allowed, the species it held, and on what basis; None when every
    stage is a full equilibrium over the case's species set."""
    scopes = [(s.stage.name, s.scope) for s in result.stages if s.scope is not None]
    if not any(scope.restricted for _, scope in scopes):
        return None
    rows = tuple((name, scope.type, scope.changes, ", ".join(scope.held) or "-") for name, scope in scopes)
    notes = tuple(f"{name}: {scope.basis}" for name, scope in scopes)
    return Table("What each stage lets react", (Column("stage", "text"), Column("type", "text"),
                                                Column("reactions allowed", "text"),
                                                Column("held at inlet flow", "longtext")), rows, notes, key="scope")


def _optional(table: Table | None) -> list[Table]:
    return [] if table is None else [table]


def certificate_table(result: CaseResult) -> Table:
    rows = []
    for stage in result.stages:
        c = stage.equilibrium.certificate
        rows.append((stage.stage.name, "pass" if c.certified else "fail", c.solver, c.iterations,
                     c.element_balance, c.stationarity, None if math.isinf(c.complementarity) else c.complementarity,
                     c.phase_stability))
    return Table("Certificate of each answer (optimality conditions recomputed from the answer)",
                 (Column("stage", "text"), Column("certified", "verdict"), Column("solver", "text"),
                  Column("iterations", "number"), Column("element balance", "exp"), Column("stationarity", "exp"),
                  Column("condensed-phase margin", "exp"), Column("one gas", "text")), tuple(rows),
                 ("element balance: max |A n - b| / max b; stationarity: max |mu/RT - a.lambda|; margin: "
                  "smallest g0/RT - a.lambda of an absent condensed species, or of an absent gas phase (>= 0 when right)",
                  "one gas: the tangent-plane test of a cubic gas (unstable: a liquid-like phase would form, so the "
                  "answer is not the equilibrium and is not certified)"),
                 key="certificate")


def approach_table(result: CaseResult) -> Table | None:
    """Approach temperatures at each outlet: the reactions the report asks for and those a stage held."""
    spec = result.case.report
    asked = any(stage.stage.uncertainty for stage in result.stages)
    rows = []
    for stage in result.stages:
        wanted = list(dict.fromkeys([*stage.stage.approach, *spec.approach]))
        if not wanted:
            continue
        eq = stage.equilibrium
        for name, a in approach_temperatures(eq, reactions=wanted, db=_stage_database(stage, None)).items():
            T_eq = None if math.isnan(a.T_eq) else from_kelvin(a.T_eq, spec.temperature_unit)
            u = [_approach_uncertainty(a) if stage.stage.uncertainty else None] if asked else []
            rows.append((stage.stage.name, name, a.reaction.equation, T_eq, a.approach_K, *u, a.note or None))
    if not rows:
        return None
    unit = spec.temperature_unit
    notes = ["approach: positive = short of equilibrium in the direction written (T - T_eq for an endothermic "
             "reaction, T_eq - T for an exothermic one)"]
    if asked:
        notes.append("u(approach): standard uncertainty of T_eq (so of the approach) from the data set's stated "
                     "uncertainties of the enthalpies of formation, the outlet's gas held as it is")
    return Table("Approach to equilibrium at each outlet",
                 (Column("stage", "text"), Column("reaction", "text"), Column("equation", "text"),
                  Column(f"T equilibrium [{unit}]", "fixed2"), Column("approach [K]", "fixed2"),
                  *([Column("u(approach) [K]", "uncertainty")] if asked else []),
                  Column("note", "text")), tuple(rows), tuple(notes), key="approach")


def _approach_uncertainty(approach) -> float | None:
    value = approach_uncertainty(approach)
    return value if math.isfinite(value) else None


def kp_table(result: CaseResult) -> Table | None:
    """Kp of each reaction asked for at each outlet temperature, with its units, and the outlet's quotient."""
    spec = result.case.report
    if not spec.kp:
        return None
    unit = _absolute(spec.pressure_unit)
    per_bar = from_pascal(1e5, unit)  # one bar in the report's unit
    rows = []
    notes = [f"Kp = product of (partial pressure in {unit})^nu, standard state ideal gas at 1 bar; at "
             "equilibrium the quotient Qp equals Kp"]
    for stage in result.stages:
        eq = stage.equilibrium
        for text in spec.kp:
            rx = reaction(text)
            dn = rx.delta_n_gas
            Q_bar = quotients(eq, reactions=[rx])[rx.name]  # with fugacities for a non-ideal gas
            kp_unit = "-" if abs(dn) < 1e-12 else f"{unit}^{dn:g}"
            rows.append((stage.stage.name, rx.equation, float(rx.K(eq.T, unit)), Q_bar * per_bar**dn, kp_unit,
                         float(rx.enthalpy(eq.T)) / 1e3))
            if eq.gas_model != "ideal":
                partial = quotients(eq, reactions=[rx], ln_phi={})[rx.name] * per_bar**dn
                notes.append(f"{stage.stage.name} ({eq.gas_model} gas): Qp is taken with fugacities phi y P in "
                             f"place of partial pressures; {rx.equation} with partial pressures alone gives "
                             f"{partial:.5g} {kp_unit}")
    return Table("Equilibrium constants Kp (partial pressures) and the outlet's quotient",
                 (Column("stage", "text"), Column("reaction", "text"), Column("Kp", "number"),
                  Column("Qp of outlet", "number"), Column("unit", "text"), Column("dH_r [kJ/mol]", "number")),
                 tuple(rows), tuple(notes), key="kp")


def carbon_table(result: CaseResult) -> Table | None:
    if not result.case.report.carbon:
        return None
    asked = any(stage.stage.uncertainty for stage in result.stages)
    rows = []
    failures = []
    for stage in result.stages:
        activity, feed_ratio, limit, failure = (stage.carbon.activity, stage.carbon.steam_to_carbon,
                                                stage.carbon.limit, stage.carbon.failure)
        verdict = activity.status  # "fail" whenever the outlet holds graphite
        if failure:
            failures.append(f"{stage.stage.name}: min S/C not found ({failure})")
        found = limit is not None and limit.status == "found"
        u = [limit.uncertainty if found else None] if asked else []
        rows.append((stage.stage.name, *(activity.by_reaction[r] for r in CARBON_REACTIONS), feed_ratio,
                     limit.steam_to_carbon if found else None, *u, verdict, activity.verdict))
    basis = result.case.feeds[0].stream.carbon_basis
    notes = ["a_C > 1: graphite is thermodynamically possible (whether it forms depends on kinetics and catalyst)",
             f"min S/C: the lowest steam-to-carbon ratio ({basis} carbon) at which the stage's inlet, with its "
             "steam changed, has no graphite at equilibrium at the outlet's T and P; blank where the inlet "
             "has no such carbon or no limit lies between S/C 0.05 and 64"]
    if asked:
        notes.append("u(min S/C): its standard uncertainty from the data set's stated uncertainties of the "
                     "enthalpies of formation")
    return Table("Carbon activity against graphite at each outlet",
                 (Column("stage", "text"), *(Column(f"a_C by {r}", "number") for r in CARBON_REACTIONS),
                  Column("S/C of inlet", "number"), Column("min S/C", "number"),
                  *([Column("u(min S/C)", "uncertainty")] if asked else []),
                  Column("carbon-free", "verdict"), Column("verdict", "text")), tuple(rows),
                 (*notes, *failures), key="carbon")


def _stage_database(stage, fallback):
    """The database of the data set a stage's answer was computed with."""
    name = stage.equilibrium.data_set
    return data_set(name) if name else fallback


def curve_plot(result: CaseResult) -> Plot | None:
    curve = result.curve
    if curve is None:
        return None
    spec = result.case.report
    scale = 1.0 if curve.spec.conversion else 100.0
    what = f"conversion of {curve.spec.species} [-]" if curve.spec.conversion else f"{curve.spec.species} [mol%]"
    x = tuple(from_kelvin(T, spec.temperature_unit) for T in curve.T)
    series = [Series("equilibrium", x, tuple(scale * v for v in curve.value))]
    for label, T_line, v_line in curve.lines:
        finite = [(from_kelvin(T, spec.temperature_unit), scale * v) for T, v in zip(T_line, v_line)
                  if math.isfinite(T)]
        if finite:
            style = "dashed" if label.startswith("cooling") else ("line+points" if len(finite) > 1 else "points")
            series.append(Series(label, tuple(p[0] for p in finite), tuple(p[1] for p in finite), style))
    pressure = f"{from_pascal(curve.P, spec.pressure_unit):.4g} {spec.pressure_unit}"
    return Plot(f"Equilibrium curve at {pressure} and operating lines", "line",
                f"temperature [{spec.temperature_unit}]", what, tuple(series))


def composition_plot(result: CaseResult) -> Plot:
    """A bar chart of the final outlet's dry composition (species above the cutoff)."""
    eq = result.outlet
    dry = eq.dry_mole_fractions
    shown = [s for s in sorted(dry, key=lambda s: -dry[s]) if dry[s] >= max(result.case.report.cutoff, 1e-4)]
    return Plot(f"{result.stages[-1].stage.name}: dry composition", "bar", "", "mol% dry",
                categories=tuple(shown), values=tuple(100 * dry[s] for s in shown))


def _gas_model_text(eq) -> str:
    """The model's name and, for a cubic, where its kij come from and those of the main species."""
    if eq.gas_model == "ideal" or eq.gas is None:
        return eq.gas_model
    pairs = eq.gas.binary_interactions
    if not pairs:
        return f"{eq.gas_model}, van der Waals mixing, kij = 0"
    y = eq.mole_fractions
    main = {pair: v for pair, v in pairs.items()
            if all(y.get(s, 0.0) >= MAIN_SPECIES_FRACTION for s in _pair_species(pair, y))}
    note = eq.gas.note
    origin = "shipped kij" if "shipped" in note else "kij of the given table" if "given table" in note else "kij given"
    listed = ", ".join(f"{pair} {value:+.4g}" for pair, value in main.items()) or "none between main species"
    return (f"{eq.gas_model}, van der Waals mixing, {origin}: {listed} "
            f"({len(pairs)} pairs in all; others 0)")


#: Species at or above this mole fraction count as main ones in the gas-model line.
MAIN_SPECIES_FRACTION = 1e-3


def _data_set_text(result: CaseResult) -> str:
    """The data set(s) the stages used, each with what it is."""
    names = dict.fromkeys(s.equilibrium.data_set for s in result.stages)
    return "; ".join(f"{n}: {DATA_SETS[n].description}" if n in DATA_SETS else n for n in names)


def _pair_species(pair: str, y) -> tuple[str, str]:
    # Names may hold '-' themselves (C4H8-1): split where both halves are species of the answer.
    for i, char in enumerate(pair):
        if char == "-" and pair[:i] in y and pair[i + 1:] in y:
            return pair[:i], pair[i + 1:]
    return pair, pair


def _held_in_every_reactor(result: CaseResult) -> set[str]:
    """Species that no stage lets react (the case's frozen ones, and those every reactor holds): S/C
    means nothing for a hydrocarbon that stays as it is (a shift train's CH4)."""
    held = set(result.case.species.frozen)
    reactors = [s.scope for s in result.stages if s.stage.reacts]
    if not reactors:
        return held | {name for f in result.case.feeds for name in f.stream.species}
    if all(scope is not None for scope in reactors):
        held |= set.intersection(*(set(scope.held) for scope in reactors))
    return held


#: Mole fraction in a liquid above which the liquid fact names a species.
_MAIN_LIQUID_FRACTION = 0.01


def liquid_fact(stage: StageResult, spec: ReportSpec) -> str | None:
    """What a stage's outlet says of its liquid: how much of it and of what, and which outlet goes on; None for a
    stage with no liquid solution that is no separator."""
    eq = stage.equilibrium
    separator = stage.stage.type == "separator"
    liquids = [p for p in eq.fluid_phases or () if p.name != "gas"]
    if not liquids:
        return ("none forms: the outlet is all vapour at this T and P (the tangent-plane test finds the gas stable)"
                if separator else None)
    outlet = sum(eq.amounts.values())
    parts = []
    for liquid in liquids:
        x = liquid.mole_fractions
        main = ", ".join(f"{s} {100 * x[s]:.4g} mol%" for s in sorted(x, key=lambda s: -x[s])
                         if x[s] >= _MAIN_LIQUID_FRACTION)
        flow = sum(flow_in(s, n, spec.flow_unit) for s, n in liquid.amounts.items())
        parts.append(f"{'a liquid solution' if liquid.name == 'liquid' else liquid.name}: {flow:.6g} "
                     f"{spec.flow_unit} ({100 * liquid.amount / outlet:.4g} mol% of the outlet; {main}; "
                     f"{liquid.density:.4g} kg/m3)")
    goes_on = (f"the next stage takes the {stage.stage.passes_on}" if separator
               else "the outlet goes on as it is, vapour and liquid together (a separator splits them)")
    return "; ".join(parts) + f"; {goes_on}"


def settle_report(result: CaseResult) -> Report:
    """The report of a settled case: feed, stages, each outlet, approaches, Kp, carbon, certificates, caution."""
    case, spec = result.case, result.case.report
    first = result.stages[0].equilibrium
    facts = [("case file", case.source), ("gas model", _gas_model_text(first)),
             ("thermochemical data", _data_set_text(result)),
             ("amounts", "flows; the feed's flows are taken as amounts per second")]
    for stage in result.stages:
        gas = stage.equilibrium.gas
        stability = None if gas is None else gas.stability
        if stability and stability.get("tested"):
            label = "phases" if stage.equilibrium.fluid_phases is not None else "one gas?"
            facts.append((f"{stage.stage.name}: {label}", stability["note"]))
        liquid = liquid_fact(stage, spec)
        if liquid is not None:
            facts.append((f"{stage.stage.name}: liquid", liquid))
    facts.append(("normal conditions", "Nm3 at " + case.feeds[0].stream.normal.describe()))
    held = _held_in_every_reactor(result)
    for feed in case.feeds:
        stream = feed.stream
        text = flow_text(feed, spec, held)
        if feed.T_given:
            text += f" at {temperature_text(stream.T, spec.temperature_unit)}"
        text += f", {pressure_text(stream.P, spec.pressure_unit)}"
        if meets_steam(stream, held):
            text += steam_to_carbon_text(stream)
        facts.append((f"feed {feed.name}", text))
    mixed = mixed_steam_to_carbon(case, held)
    if mixed is not None:
        facts.append(("feeds mixed", mixed))
    tables = [stages_table(result), *_optional(scope_table(result)), stream_table(result),
              *(stage_table(s, spec) for s in result.stages)]
    optional = [
        approach_table(result),
        kp_table(result),
        carbon_table(result),
    ]
    tables += [t for t in optional if t is not None]
    tables.append(certificate_table(result))
    plots = [p for p in (curve_plot(result), composition_plot(result)) if p is not None]
    notes = []
    by_reason: dict[str, list[str]] = {}
    for species, why in result.outlet.omitted.items():
        by_reason.setdefault(why, []).append(species)
    for why, names in by_reason.items():
        notes.append(f"Left out of the species set ({why}): {', '.join(names)}.")
    return Report(f"gibbsmin {__version__} - {case.title}", tuple(facts), tuple(tables), tuple(plots), tuple(notes),
                  tables_before_plots=2)  # the stages and the stream table, then the plots


# --- JSON -------------------------------------------------------------------------------------------


def json_ready(value: object) -> object:
    """Plain JSON values: no NaN or infinity (null instead), numpy numbers as floats, other objects as text."""
    if isinstance(value, bool) or value is None or isinstance(value, (str, int)):
        return value
    if isinstance(value, (float, np.floating)):
        value = float(value)
        return value if math.isfinite(value) else None
    if isinstance(value, np.ndarray):
        return json_ready(value.tolist())
    if isinstance(value, Mapping):
        return {str(k): json_ready(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [json_ready(v) for v in value]
    return str(value)


def _stage_document(stage: StageResult, flow_unit: str) -> dict[str, object]:
    eq: Equilibrium = stage.equilibrium
    return {
        "name": stage.stage.name,
        **eq.to_dict(),
        "inlet_temperatures_K": dict(stage.inlet.temperatures),
        "flows": {s: flow_in(s, n, flow_unit) for s, n in eq.amounts.items()},
        **({} if eq.uncertainty is None else
           {"flow_uncertainty": {s: flow_in(s, u, flow_unit) for s, u in eq.uncertainty.items()}}),
        "dry_mole_fractions": eq.dry_mole_fractions,
        **_phase_documents(stage, flow_unit),
    }


def _phase_documents(stage: StageResult, flow_unit: str) -> dict[str, object]:
    """Each fluid phase of a stage's outlet (flows in ``flow_unit``, amounts in mol/s, mole fractions, share of the
    outlet) and a separator's two outlets with the one the next stage takes; nothing for a one-fluid reactor."""
    eq = stage.equilibrium
    separator = stage.stage.type == "separator"
    if eq.fluid_phases is None and not separator:
        return {}
    total = sum(eq.amounts.values())
    document: dict[str, object] = {}
    if eq.fluid_phases is not None:
        document["phases"] = {
            p.name: {"amount_mol": p.amount, "share_of_outlet": p.amount / total,
                     "flows": {s: flow_in(s, n, flow_unit) for s, n in p.amounts.items()},
                     "mole_fractions": p.mole_fractions, "density_kg_per_m3": p.density}
            for p in eq.fluid_phases}
    if separator:
        outlets = separator_outlets(eq)
        document["outlets"] = {name: {"amount_mol": dict(amounts),
                                      "flows": {s: flow_in(s, n, flow_unit) for s, n in amounts.items()}}
                               for name, amounts in outlets.items()}
        document["next_stage_takes"] = stage.stage.passes_on
    return document


def _table_documents(result: CaseResult) -> dict[str, list[dict[str, object]]]:
    """The approach, Kp and carbon tables as lists of rows keyed by column heading (NaN written as None)."""
    optional = [
        approach_table(result),
        kp_table(result),
        carbon_table(result),
    ]

    def plain(value):
        if isinstance(value, float) and not math.isfinite(value):
            return None
        return float(value) if isinstance(value, (int, float)) and not isinstance(value, bool) else value

    return {t.key: [{c.title: plain(v) for c, v in zip(t.columns, row)} for row in t.rows]
            for t in optional if t is not None}


def settle_document(result: CaseResult) -> dict[str, object]:
    """The machine-readable document of a settled case (SI units; JSON-ready, no NaN).

    The top level holds the final outlet (``T_K``, ``P_Pa``, ``species`` with
    ``amount_mol`` and ``mole_fraction_in_phase``, ``certificate`` ...); every
    stage is under ``stages``.  Amounts are the feed's flows taken per second,
    so ``amount_mol`` reads as mol/s and ``duty_W`` is in W; ``flows`` are in
    ``flow_unit``.
    """
    spec = result.case.report
    stages = [_stage_document(s, spec.flow_unit) for s in result.stages]
    document: dict[str, object] = {
        "gibbsmin_version": __version__,
        "case": {"title": result.case.title, "source": result.case.source},
        "amount_basis": "mol/s",
        "flow_unit": spec.flow_unit,
        "feed_mol_s": result.case.mixed_feed(),
        **stages[-1],
        "stages": stages,
    }
    if result.curve is not None:
        document["curve"] = {"T_K": result.curve.T, "value": result.curve.value, "P_Pa": result.curve.P,
                             "quantity": ("conversion of " if result.curve.spec.conversion else "mole fraction of ")
                             + result.curve.spec.species,
                             "lines": [{"name": n, "T_K": T, "value": v} for n, T, v in result.curve.lines]}
    document["tables"] = _table_documents(result)
    document["caution"] = CAUTION
    return json_ready(document)
