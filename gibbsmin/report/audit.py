"""The report and the JSON document of a heat-and-mass-balance audit."""

from __future__ import annotations

from ..audit.checks import SEVERITY, AuditResult, UnitAudit
from ..thermo import data_set
from ..version import __version__
from .caution import CAUTION
from .document import Column, Plot, Report, Table
from .numbers import format_cell
from .settle import json_ready

_KMOL_H = 1000.0 / 3600.0


def _also_text(check) -> str | None:
    """The check's figure in its other units ("+10.97 MW"), or None."""
    return ", ".join(f"{value:+.4g} {unit}" for value, unit in check.also) or None


def _figure_text(check) -> str:
    """The figure judged, with its unit and its other units: "+118 K (+10.97 MW)"; empty when not computed."""
    if check.value is None:
        return ""
    figure = format_cell(check.value, "figure")
    text = f"{'+' if check.value > 0 and figure != '0' else ''}{figure} {check.unit}"
    also = _also_text(check)
    return f"{text} ({also})" if also else text


def verdict_table(result: AuditResult) -> Table:
    rows = [(c.where, c.name, c.value, c.unit, _also_text(c), c.verdict) for c in result.checks]
    counts = ", ".join(f"{result.count(v)} {v}" for v in ("pass", "warn", "fail", "n/a"))
    return Table(f"Verdicts ({counts})", (Column("where", "text"), Column("check", "text"), Column("value", "figure"),
                                          Column("unit", "text"), Column("also", "text"),
                                          Column("verdict", "verdict")),
                 tuple(rows), key="verdicts")


#: The order findings are listed in: failures first, then warnings, then what could not be checked.
_FINDING_ORDER = {"fail": 0, "warn": 1, "n/a": 2, "pass": 3}


def findings_table(result: AuditResult, everything: bool = False) -> Table:
    """The figures behind each verdict: of the checks that did not pass, failures first (or of all, for the files)."""
    checks = result.checks if everything else sorted((c for c in result.checks if c.verdict != "pass"),
                                                      key=lambda c: _FINDING_ORDER[c.verdict])
    rows = [(c.where, c.name, c.verdict, _figure_text(c), c.detail) for c in checks]
    title = "Details of every check" if everything else "Findings: the checks that did not pass, failures first"
    return Table(title, (Column("where", "text"), Column("check", "text"), Column("verdict", "verdict"),
                         Column("figure", "text"), Column("detail", "longtext")), tuple(rows),
                 key="details" if everything else "findings")


def element_table(result: AuditResult) -> Table:
    rows = []
    for unit in result.units:
        for element, (a, b, closure) in unit.elements.items():
            rows.append((unit.spec.label, element, a / _KMOL_H, b / _KMOL_H, closure))
    return Table("Element flows in and out of each unit (kmol/h of atoms)",
                 (Column("unit", "text"), Column("element", "text"), Column("in [kmol/h]", "flow"),
                  Column("out [kmol/h]", "flow"), Column("closure [%]", "figure")), tuple(rows), key="elements")


def reactor_table(result: AuditResult) -> Table | None:
    rows = []
    for unit in result.units:
        if unit.equilibrium is None:
            continue
        reference = {s: 100.0 * y for s, y in unit.equilibrium.dry_mole_fractions.items()}
        for species in sorted(set(unit.stated_dry) | {s for s, y in reference.items() if y >= 1e-4},
                              key=lambda s: -unit.stated_dry.get(s, reference.get(s, 0.0))):
            stated, eq = unit.stated_dry.get(species, 0.0), reference.get(species, 0.0)
            rows.append((unit.spec.label, species, stated, eq, stated - eq))
    if not rows:
        return None
    return Table("Reactor outlets: stated against equilibrium (dry basis)",
                 (Column("reactor", "text"), Column("species", "text"), Column("stated [mol% dry]", "percent"),
                  Column("equilibrium [mol% dry]", "percent"), Column("difference [mol%]", "figure")),
                 tuple(rows), ("equilibrium at the stated outlet T and P from the stated inlets, with the stated "
                               "approaches where the description gives them, frozen species held",), key="reactors")


def approach_table(result: AuditResult) -> Table | None:
    rows = []
    for unit in result.units:
        for f in unit.reactions:
            rows.append((unit.spec.label, f.name, f.equation, f.T_eq - 273.15, f.approach_K, f.uncertainty_K,
                         "forward" if f.direction > 0 else "backward", f.stated_K, f.verdict))
    if not rows:
        return None
    return Table("Approach temperatures at reactor outlets",
                 (Column("reactor", "text"), Column("reaction", "text"), Column("equation", "text"),
                  Column("T equilibrium [degC]", "fixed1"), Column("approach [K]", "fixed1"),
                  Column("data uncertainty [K]", "uncertainty"),
                  Column("went", "text"), Column("stated [K]", "fixed1"), Column("verdict", "verdict")),
                 tuple(rows), ("approach as written: positive = short of equilibrium; a reaction that went forward "
                               "with a negative approach (or backward with a positive one) is beyond equilibrium",
                               _uncertainty_note(result)),
                 key="approach")


def _uncertainty_note(result: AuditResult) -> str:
    """What the approach's data uncertainty is, or how to have it where the data set states none."""
    name = _data_set_name(result)
    if any(f.uncertainty_K is not None for u in result.units for f in u.reactions):
        return (f"data uncertainty: standard uncertainty of T_eq (and so of the approach) from the formation "
                f"enthalpies' stated uncertainties in data set {name!r}, propagated linearly; the stated gas is "
                "taken as measured exactly")
    return (f"data uncertainty: not given, data set {name!r} states no uncertainties; set [plant] data = "
            "'atct-anchored' in the unit description to have it")


def _data_set_name(result: AuditResult) -> str:
    return result.data_set or data_set(result.plant.data).data_set


def units_table(result: AuditResult) -> Table:
    rows = []
    for unit in result.units:
        spec = unit.spec
        worst = max((c.verdict for c in unit.checks), key=SEVERITY.__getitem__, default="pass")
        rows.append((spec.id, spec.name, spec.type, ", ".join(spec.inlets), ", ".join(spec.outlets),
                     None if spec.duty is None else spec.duty / 1e6, worst))
    return Table("Units", (Column("unit", "text"), Column("name", "text"), Column("type", "text"),
                           Column("inlets", "text"), Column("outlets", "text"), Column("stated duty [MW]", "number"),
                           Column("worst", "verdict")), tuple(rows), key="units")


def thresholds_table(result: AuditResult) -> Table:
    rows = [(name, limit.warn, limit.fail, limit.unit) for name, limit in result.plant.limits.items()]
    return Table("Thresholds used", (Column("check", "text"), Column("warn above", "number"),
                                     Column("fail above", "number"), Column("unit", "text")), tuple(rows),
                 key="thresholds")


def _unit_plots(unit: UnitAudit, result: AuditResult) -> list[Plot]:
    plots = []
    limits = result.plant.limits
    if unit.reactions:
        plots.append(Plot(f"{unit.spec.label}: approach temperatures", "bar", "", "approach [K] (positive = short "
                          "of equilibrium)", categories=tuple(f.name for f in unit.reactions),
                          values=tuple(f.approach_K for f in unit.reactions),
                          verdicts=tuple(f.verdict for f in unit.reactions)))
    closures = tuple(v[2] for v in unit.elements.values())
    verdicts = tuple(limits["element_closure"].verdict(abs(c)) for c in closures)
    if any(v != "pass" for v in verdicts):  # closures within their limits are in the element table, not charted
        warn, fail = limits["element_closure"].warn, limits["element_closure"].fail
        marks = [("warn", warn), ("-warn", -warn)]
        if fail is not None:
            marks += [("fail", fail), ("-fail", -fail)]
        plots.append(Plot(f"{unit.spec.label}: element closures", "bar", "", "(out - in) / in [%]",
                          categories=tuple(unit.elements), values=closures, verdicts=verdicts,
                          limits=tuple(marks)))
    return plots


def audit_report(result: AuditResult, details: bool = True) -> Report:
    """The audit as a report: findings and verdicts first, then units, element flows, reactor outlets, approaches.

    ``details`` adds the figures behind every check (the files want them; the terminal shows findings only).
    """
    plant = result.plant
    facts = (("unit description", plant.source), ("stream table", plant.table.source),
             ("streams", str(len(plant.table.streams))), ("units", str(len(plant.units))),
             ("thermochemical data", _data_set_name(result)),
             ("result", f"{result.count('fail')} fail, {result.count('warn')} warn, {result.count('pass')} pass, "
                        f"{result.count('n/a')} not checked"))
    tables = [findings_table(result), verdict_table(result), units_table(result)]
    if details:
        tables.append(findings_table(result, everything=True))
    tables.append(element_table(result))
    tables += [t for t in (reactor_table(result), approach_table(result)) if t is not None]
    tables.append(thresholds_table(result))
    reactors = [u for u in result.units if u.spec.type == "reactor"]
    plots = [p for unit in reactors for p in _unit_plots(unit, result)]
    notes = ("Enthalpies are ideal-gas (liquid water as the pure liquid) on the formation basis, with a unit's "
             "cubic residual enthalpy where its description names a gas model; duties are heat added to the unit. "
             "An energy imbalance is shown in MW and as the outlet-temperature error it amounts to.",
             "Element closures are charted only for reactors with a closure outside its limits; every closure is in "
             "the element table.")
    return Report(f"gibbsmin {__version__} audit - {plant.title}", facts, tuple(tables), tuple(plots), notes,
                  tables_before_plots=1)


def audit_document(result: AuditResult) -> dict[str, object]:
    """The audit as a JSON-ready document: every check, and per unit its element flows and approaches (SI units)."""
    def finding(f):
        return {"reaction": f.name, "equation": f.equation, "T_eq_K": f.T_eq, "approach_K": f.approach_K,
                "approach_uncertainty_K": f.uncertainty_K, "direction": f.direction, "stated_approach_K": f.stated_K,
                "verdict": f.verdict}

    units = []
    for unit in result.units:
        units.append({
            "id": unit.spec.id, "name": unit.spec.name, "type": unit.spec.type,
            "inlets": list(unit.spec.inlets), "outlets": list(unit.spec.outlets), "stated_duty_W": unit.spec.duty,
            "checks": [{"check": c.name, "value": c.value, "unit": c.unit, "verdict": c.verdict, "detail": c.detail,
                        "also": [{"value": v, "unit": u} for v, u in c.also]} for c in unit.checks],
            "elements_mol_s": {e: {"in": a, "out": b, "closure_percent": c} for e, (a, b, c) in unit.elements.items()},
            "reactions": [finding(f) for f in unit.reactions],
            "equilibrium": None if unit.equilibrium is None else unit.equilibrium.to_dict(),
        })
    return json_ready({
        "gibbsmin_version": __version__,
        "plant": result.plant.title,
        "data_set": _data_set_name(result),
        "worst": result.worst,
        "counts": {v: result.count(v) for v in ("pass", "warn", "fail", "n/a")},
        "stream_checks": [{"stream": c.where, "check": c.name, "value": c.value, "unit": c.unit,
                           "verdict": c.verdict, "detail": c.detail} for c in result.stream_checks],
        "units": units,
        "thresholds": {k: {"warn": v.warn, "fail": v.fail, "unit": v.unit} for k, v in result.plant.limits.items()},
        "caution": CAUTION,
    })
