"""The report and the JSON document of a settled case."""

from __future__ import annotations

import math
from collections.abc import Mapping

from .. import __version__
from ..case import CaseResult, ReportSpec, StageResult
from ..equilibrium import Equilibrium
from ..thermo import default_database
from ..units import from_fraction, from_kelvin, from_mol_s, from_pascal
from .caution import CAUTION
from .document import Column, Report, Table


def _temperature(T: float, spec: ReportSpec) -> str:
    return f"{from_kelvin(T, spec.temperature_unit):.2f} {spec.temperature_unit}"


def _is_gauge(unit: str) -> bool:
    return from_pascal(101325.0, unit) == 0.0


def _pressure(P: float, spec: ReportSpec) -> str:
    absolute = "" if _is_gauge(spec.pressure_unit) else " (abs)"
    return f"{from_pascal(P, spec.pressure_unit):.6g} {spec.pressure_unit}{absolute}"


def _flow(species: str, mol_s: float, unit: str) -> float:
    molar_mass = default_database()[species].molar_mass
    return from_mol_s(mol_s, unit, molar_mass=molar_mass)


def _cutoff_text(cutoff: float) -> str:
    if cutoff >= 1e-4:
        return f"{from_fraction(cutoff, 'mol%'):g} mol%"
    if cutoff >= 1e-7:
        return f"{from_fraction(cutoff, 'ppmv'):g} ppmv"
    return f"{from_fraction(cutoff, 'ppbv'):g} ppbv"


def stage_table(result: StageResult, spec: ReportSpec) -> Table:
    """The outlet of one stage: species, phase, flow, mol% wet and dry (and partial pressures if asked)."""
    eq = result.equilibrium
    wet, dry = eq.mole_fractions, eq.dry_mole_fractions
    columns = [Column("species", "text"), Column("phase", "text"), Column(f"flow [{spec.flow_unit}]", "flow"),
               Column("mol% wet", "percent"), Column("mol% dry", "percent")]
    partial_unit = "bar" if _is_gauge(spec.pressure_unit) else spec.pressure_unit
    if spec.partial_pressures:
        columns.append(Column(f"partial pressure [{partial_unit}]", "number"))
    shown = [s for s in sorted(wet, key=lambda s: -wet[s]) if _shown(s, wet[s], spec)]
    rows = []
    for s in shown:
        row: list[object] = [s, "gas", _flow(s, eq.amounts[s], spec.flow_unit), 100 * wet[s],
                             100 * dry[s] if s in dry else None]
        if spec.partial_pressures:
            row.append(from_pascal(wet[s] * eq.P, partial_unit))
        rows.append(tuple(row))
    for s, n in eq.condensed.items():
        row = [s, "condensed", _flow(s, n, spec.flow_unit), None, None]
        if spec.partial_pressures:
            row.append(None)
        rows.append(tuple(row))
    total = sum(_flow(s, n, spec.flow_unit) for s, n in eq.amounts.items()
                if eq.phase_of[s] == "gas") if spec.flow_unit else None
    total_row: list[object] = ["total gas", "gas", total, 100.0, 100.0 if dry else None]
    if spec.partial_pressures:
        total_row.append(None)
    rows.append(tuple(total_row))
    notes = []
    hidden = len(wet) - len(shown)
    if hidden:
        notes.append(f"({hidden} gas species below {_cutoff_text(spec.cutoff)} not shown"
                     + (" or not listed in [report] show" if spec.show else "") + ")")
    title = (f"{result.stage.name}: {_temperature(eq.T, spec)}, {_pressure(eq.P, spec)}; "
             f"phases: {', '.join(eq.phases_present)}")
    return Table(title, tuple(columns), tuple(rows), tuple(notes), key=result.stage.name)


def _shown(species: str, y: float, spec: ReportSpec) -> bool:
    if spec.show is not None:
        return species in spec.show
    return y >= spec.cutoff


def feed_table(result: CaseResult) -> Table:
    spec = result.case.report
    rows = []
    feed = result.case.mixed_feed()
    total = sum(feed.values())
    for s, n in feed.items():
        rows.append((s, _flow(s, n, spec.flow_unit), 100 * n / total))
    rows.append(("total", sum(_flow(s, n, spec.flow_unit) for s, n in feed.items()), 100.0))
    return Table("Feed (all feeds mixed)", (Column("species", "text"), Column(f"flow [{spec.flow_unit}]", "flow"),
                                            Column("mol% wet", "percent")), tuple(rows), key="feed")


def certificate_table(result: CaseResult) -> Table:
    rows = []
    for stage in result.stages:
        c = stage.equilibrium.certificate
        rows.append((stage.stage.name, "pass" if c.certified else "fail", c.solver, c.iterations,
                     c.element_balance, c.stationarity,
                     None if math.isinf(c.complementarity) else c.complementarity))
    return Table("Certificate of each answer (optimality conditions recomputed from the answer)",
                 (Column("stage", "text"), Column("certified", "verdict"), Column("solver", "text"),
                  Column("iterations", "number"), Column("element balance", "exp"), Column("stationarity", "exp"),
                  Column("condensed-phase margin", "exp")), tuple(rows),
                 ("element balance: max |A n - b| / max b; stationarity: max |mu/RT - a.lambda|; "
                  "margin: smallest (g0/RT - a.lambda) of an absent condensed species, >= 0 when right",),
                 key="certificate")


def settle_report(result: CaseResult) -> Report:
    """The report of a settled case: feed, each stage's outlet, certificates, omitted species, caution."""
    case, spec = result.case, result.case.report
    first = result.stages[0].equilibrium
    facts = [("case file", case.source), ("specification", first.specification),
             ("gas model", first.gas_model), ("amounts", "flows; the feed's flows taken as amounts per second")]
    normal = case.feeds[0].stream.normal
    if "Nm3" in spec.flow_unit:
        facts.append(("normal conditions", normal.describe()))
    for feed in case.feeds:
        stream = feed.stream
        text = (f"{stream.total_flow(spec.flow_unit):.6g} {spec.flow_unit} at {_temperature(stream.T, spec)}, "
                f"{_pressure(stream.P, spec)}")
        try:
            text += f", S/C {stream.steam_to_carbon():.3f} ({stream.carbon_basis} basis)"
        except ValueError:
            pass
        facts.append((f"feed {feed.name}", text))
    tables = [feed_table(result), *(stage_table(s, spec) for s in result.stages), certificate_table(result)]
    notes = []
    by_reason: dict[str, list[str]] = {}
    for species, why in result.outlet.omitted.items():
        by_reason.setdefault(why, []).append(species)
    for why, names in by_reason.items():
        notes.append(f"Left out of the species set ({why}): {', '.join(names)}.")
    return Report(f"gibbsmin {__version__} - {case.title}", tuple(facts), tuple(tables), (), tuple(notes))


def _finite(value: object) -> object:
    """JSON has no NaN or infinity: write null for them."""
    if isinstance(value, float) and not math.isfinite(value):
        return None
    if isinstance(value, Mapping):
        return {k: _finite(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_finite(v) for v in value]
    return value


def _stage_document(stage: StageResult, flow_unit: str) -> dict[str, object]:
    eq: Equilibrium = stage.equilibrium
    return {
        "name": stage.stage.name,
        **eq.to_dict(),
        "flows": {s: _flow(s, n, flow_unit) for s, n in eq.amounts.items()},
        "dry_mole_fractions": eq.dry_mole_fractions,
    }


def settle_document(result: CaseResult) -> dict[str, object]:
    """The machine-readable document of a settled case (SI units; JSON-ready, no NaN).

    The top level holds the final outlet (``T_K``, ``P_Pa``, ``species`` with
    ``amount_mol`` and ``mole_fraction_in_phase``, ``certificate`` ...); every
    stage is under ``stages``.  Amounts are the feed's flows taken per second,
    so ``amount_mol`` reads as mol/s; ``flows`` are in ``flow_unit``.
    """
    spec = result.case.report
    stages = [_stage_document(s, spec.flow_unit) for s in result.stages]
    return _finite({
        "gibbsmin_version": __version__,
        "case": {"title": result.case.title, "source": result.case.source},
        "amount_basis": "mol/s",
        "flow_unit": spec.flow_unit,
        "feed_mol_s": result.case.mixed_feed(),
        **stages[-1],
        "stages": stages,
        "caution": CAUTION,
    })
