"""Settling a case: every stage in order, each taking the previous stage's outlet; and its equilibrium curve."""

from __future__ import annotations

import dataclasses
import math
import warnings
from collections.abc import Callable, Mapping
from dataclasses import dataclass

import numpy as np
import scipy.optimize

from ..carbon import CarbonActivity, CarbonLimit, carbon_activity, carbon_limit
from ..energy import mixture_enthalpy
from ..eos.phase import residual_enthalpy_of_gas
from ..equilibrium import Equilibrium
from ..errors import ConvergenceError, GibbsminError, InputError, UnknownSpeciesError
from ..api import equilibrate, prepared_for
from ..prepared import Specification
from ..thermo import SpeciesDatabase, choose_database, default_database
from ..streams import Stream
from ..units import from_mol_s
from .scope import LIQUID_WATER, StageScope, possible_condensates, stage_scope
from .spec import Case, CurveSpec, Stage
from .toml import CaseError

#: Points along each adiabatic operating line.
_LINE_POINTS = 21
#: Relative amount below which a species is left out of an enthalpy sum (its data range may not reach T).
_NEGLIGIBLE = 1e-14


@dataclass(frozen=True)
class StageInlet:
    """What enters a stage: streams by name (species to mol/s) with their temperatures [K] (None: not given), and
    whether it holds a liquid solution (a separator's liquid, or a two-phase outlet passed on whole)."""

    streams: Mapping[str, Mapping[str, float]]
    temperatures: Mapping[str, float | None]
    holds_liquid: bool = False
    pressures: Mapping[str, float] | None = None   # each stream's own pressure [Pa] where known

    @property
    def mixed(self) -> dict[str, float]:
        total: dict[str, float] = {}
        for amounts in self.streams.values():
            for name, n in amounts.items():
                total[name] = total.get(name, 0.0) + n
        return total

    @property
    def temperatures_known(self) -> bool:
        return all(T is not None for T in self.temperatures.values())


@dataclass(frozen=True)
class StageResult:
    """One stage: its specification, its inlet, its equilibrium (with its energy figures and restriction) and what
    it let change (``scope``: the species set, the species held, the reactions allowed)."""

    stage: Stage
    inlet: StageInlet
    equilibrium: Equilibrium
    scope: StageScope | None = None
    carbon: StageCarbon | None = None

    @property
    def outlet(self) -> dict[str, float]:
        """What leaves for the next stage, species to mol/s: a knock-out's vapour, a separator's vapour or liquid
        (``next``), any other stage's whole outlet."""
        eq = self.equilibrium
        if self.stage.type == "separator":
            return separator_outlets(eq)[self.stage.passes_on]
        return {s: n for s, n in eq.amounts.items()
                if n > 0.0 and (self.stage.type != "knock-out" or eq.phase_of[s] == "gas")}

    @property
    def passes_on_liquid(self) -> bool:
        """Whether what leaves for the next stage holds a liquid solution."""
        eq = self.equilibrium
        if self.stage.type == "separator":
            return self.stage.passes_on == "liquid"
        return self.stage.type != "knock-out" and any(p.name != "gas" for p in eq.fluid_phases or ())

    @property
    def duty_W(self) -> float | None:
        """Heat added to the stage, [W], when the energy balance was computed."""
        energy = self.equilibrium.energy
        return None if energy is None or energy.duty_W is None else float(energy.duty_W)


def separator_outlets(eq: Equilibrium) -> dict[str, dict[str, float]]:
    """A flash's two outlets, species to mol/s: "vapour" (the gas phase) and "liquid" (every liquid-solution phase
    and pure condensed species); either may be empty."""
    if eq.fluid_phases is None:
        vapour = {s: n for s, n in eq.amounts.items() if n > 0.0 and eq.phase_of[s] == "gas"}
        return {"vapour": vapour if eq.gas_present else {}, "liquid": dict(eq.condensed)}
    vapour: dict[str, float] = {}
    liquid: dict[str, float] = dict(eq.condensed)
    for phase in eq.fluid_phases:
        into = vapour if phase.name == "gas" else liquid
        for s, n in phase.amounts.items():
            if n > 0.0:
                into[s] = into.get(s, 0.0) + n
    return {"vapour": vapour, "liquid": liquid}


@dataclass(frozen=True)
class StageCarbon:
    """The carbon check of a stage (``[report] carbon``): its outlet against graphite, and the S/C limit of its
    inlet at the outlet's T and P.

    Attributes
    ----------
    activity : CarbonActivity
        The outlet's carbon activity by reaction and its verdict.
    steam_to_carbon : float or None
        S/C of the inlet; None where the inlet has no carbon the ratio counts.
    limit : CarbonLimit or None
        The lowest S/C without graphite; None where there is no ratio or the search failed.
    failure : str or None
        Why a limit that should have been found was not.
    """

    activity: CarbonActivity
    steam_to_carbon: float | None
    limit: CarbonLimit | None
    failure: str | None


def stage_carbon(case: Case, stage: Stage, inlet: StageInlet, eq: Equilibrium, db: SpeciesDatabase) -> StageCarbon:
    """The carbon check of one stage (the limit is searched from the inlet's gas without its water, so that it
    may lie below the S/C fed)."""
    basis = case.feeds[0].stream.carbon_basis
    mixed = inlet.mixed
    stream = Stream(tuple(mixed), tuple(mixed.values()), eq.T, eq.P, carbon_basis=basis,
                    database=case.feeds[0].stream.database)
    activity = carbon_activity(eq)
    if stream.carbon_flow() == 0.0:
        return StageCarbon(activity, None, None, None)
    ratio = stream.steam_to_carbon()
    dry = {name: n for name, n in mixed.items() if name != "H2O"}
    try:
        limit = carbon_limit(dry, eq.T, eq.P, carbon_basis=basis, species=case.species.only,
                             exclude=case.species.exclude, gas=eq.gas_model, kij=stage.interactions, db=db,
                             uncertainty=stage.uncertainty)
    except (GibbsminError, ValueError) as exc:  # shown in the report's notes, not dropped
        return StageCarbon(activity, ratio, None, " ".join(str(exc).split()))
    return StageCarbon(activity, ratio, limit, None)


@dataclass(frozen=True)
class Curve:
    """An equilibrium curve and operating lines, in K and either mole fraction or conversion [-]."""

    spec: CurveSpec
    P: float
    T: tuple[float, ...]
    value: tuple[float, ...]
    lines: tuple[tuple[str, tuple[float, ...], tuple[float, ...]], ...]


@dataclass(frozen=True)
class CaseResult:
    case: Case
    stages: tuple[StageResult, ...]
    curve: Curve | None = None

    @property
    def outlet(self) -> Equilibrium:
        return self.stages[-1].equilibrium


def settle_case(case: Case, db: SpeciesDatabase | None = None,
                progress: Callable[[str], None] | None = None) -> CaseResult:
    """Settle every stage of a case in order, each stage taking the previous stage's outlet.

    Parameters
    ----------
    case : Case
    db : SpeciesDatabase, optional
    progress : callable, optional
        Called with each step's name as it starts (for a progress display).

    Returns
    -------
    CaseResult
    """
    given = db
    db = db or default_database()
    for stage in case.stages:
        if stage.uncertainty:
            check_uncertainty(case, stage, choose_database(stage.data, given))
    inlet = StageInlet({f.name: f.stream.feed_mol() for f in case.feeds},
                       {f.name: (f.stream.T if f.T_given else None) for f in case.feeds},
                       pressures={f.name: f.stream.P for f in case.feeds})
    results = []
    for stage in case.stages:
        if progress is not None:
            progress(stage.name)
        if stage.T_in is not None:
            inlet = StageInlet(inlet.streams, {name: stage.T_in for name in inlet.streams}, inlet.holds_liquid,
                               inlet.pressures)
        try:
            stage_db = choose_database(stage.data, given)
            scope = stage_scope(case, stage, inlet.mixed, stage_db)
            eq = settle_stage(case, stage, scope, inlet, stage_db)
        except ConvergenceError:
            raise
        except (GibbsminError, UnknownSpeciesError) as exc:
            raise CaseError(case.source, stage.line, stage.name, str(exc)) from None
        carbon = stage_carbon(case, stage, inlet, eq, stage_db) if case.report.carbon else None
        result = StageResult(stage, inlet, eq, scope, carbon)
        results.append(result)
        inlet = StageInlet({"outlet of " + stage.name: result.outlet}, {"outlet of " + stage.name: eq.T},
                           result.passes_on_liquid, {"outlet of " + stage.name: eq.P})
    curve = None
    if case.curve is not None:
        if progress is not None:
            progress("equilibrium curve")
        curve = equilibrium_curve(case, results, choose_database(case.stages[0].data, given))
    return CaseResult(case, tuple(results), curve)


def check_uncertainty(case: Case, stage: Stage, db: SpeciesDatabase) -> None:
    """Refuse, before anything is solved, a stage that asks for uncertainty its data or model cannot give."""
    lacking = [r.name for r in db if r.hf298_uncertainty is None]
    if lacking:
        raise CaseError(case.source, stage.line, "uncertainty",
                        f"data set {db.data_set!r} states no uncertainty of the enthalpies of formation; add data = "
                        f"\"atct-anchored\" to the stage's table (or [conditions]), or remove uncertainty")
    if stage.approach and (stage.adiabatic or stage.duty is not None):
        raise CaseError(case.source, stage.line, "uncertainty",
                        "is not propagated through held approaches with the energy balance yet; give the stage an "
                        "outlet T, or remove uncertainty")
    if (stage.adiabatic or stage.duty is not None) and stage.gas != "ideal":
        raise CaseError(case.source, stage.line, "uncertainty",
                        f"with the energy balance, uncertainty is propagated for the ideal gas only, not "
                        f"{stage.gas!r}; give the stage an outlet T, or remove uncertainty")


def stage_specification(case: Case, stage: Stage, scope: StageScope) -> Specification:
    """What a stage computes, as the one specification every front door builds (``gibbsmin.prepare``)."""
    # With a cubic, a reactor's gas that would condense splits into liquid-solution phases and a separator is that
    # flash; heaters and coolers keep one gas (flagged where it would condense) and a knock-out condenses water
    # alone, as pure H2O(l).
    liquid = {"reactor": None, "separator": True}.get(stage.type, False)
    cubic = {} if stage.gas == "ideal" else {"gas": stage.gas, "kij": stage.interactions, "liquid": liquid}
    if stage.approach:
        return Specification.of(species=scope.species, exclude=scope.exclude, approach=dict(stage.approach),
                                frozen=list(scope.held) or None, method=stage.method,
                                allow_extrapolation=case.species.allow_extrapolation, restricted=True, **cubic)
    return Specification.of(species=scope.species, exclude=scope.exclude, inert=scope.held, method=stage.method,
                            allow_extrapolation=case.species.allow_extrapolation, **cubic)


def _takes_liquids(stage: Stage) -> bool:
    """Whether a stage's answer (and so its inlet's enthalpy) has liquid-solution phases: a reactor or separator
    with a cubic gas model."""
    return stage.gas != "ideal" and stage.type in ("reactor", "separator")


def settle_stage(case: Case, stage: Stage, scope: StageScope, inlet: StageInlet, db: SpeciesDatabase) -> Equilibrium:
    if stage.type in _HEAT_CHECKED:
        _check_heat_direction(stage, inlet)
    balance = {}
    # A liquid inlet's enthalpy needs the liquid-solution phases, which heaters, coolers and knock-outs keep off.
    liquid_inlet_unknown = inlet.holds_liquid and not _takes_liquids(stage)
    if liquid_inlet_unknown and (stage.adiabatic or stage.duty is not None):
        raise InputError(f"this stage's inlet holds a liquid (the outlet the stage before passes on), and a "
                         f"{stage.type} keeps one gas, so its energy balance cannot set the temperature; give the "
                         "stage its outlet T (e.g. T = '40 degC')")
    if inlet.temperatures_known and not liquid_inlet_unknown:
        balance = {"T_feed": dict(inlet.temperatures), "adiabatic": stage.adiabatic or stage.duty is not None,
                   "heat_input": stage.heat_input if stage.duty is None else stage.duty,
                   "P_feed": dict(inlet.pressures or {}) or None}
    feed = dict(inlet.streams) if balance else inlet.mixed
    prepared = prepared_for(stage_specification(case, stage, scope), db)
    eq = prepared.equilibrate(feed, stage.T, stage.P, uncertainty=stage.uncertainty, **balance)
    if stage.type in ("heater", "cooler"):
        _check_no_condensate(case, stage, scope, eq, db)
    extras = {**eq.extras, "stage": scope.to_dict()}
    if stage.type == "separator":
        _check_outlet_taken(stage, eq)
        extras["next_stage_takes"] = stage.passes_on
    if stage.type == "knock-out":
        others = possible_condensates(eq.amounts, eq.T, db)
        if others:
            note = (f"{', '.join(others)} may condense in a real drum at {eq.T - 273.15:.1f} degC; this knock-out "
                    "condenses water alone (no liquid solution is modelled), so the vapour shown holds all of it; a "
                    "type = 'separator' with gas = 'peng-robinson' computes that liquid")
            warnings.warn(f"{stage.name}: {note}", stacklevel=3)
            extras["condensables_not_modelled"] = note
    return dataclasses.replace(eq, extras=extras)


#: Stage types whose outlet T is checked against the direction of heat their type says (a separator may be either).
_HEAT_CHECKED = ("heater", "cooler", "knock-out")


def _check_outlet_taken(stage: Stage, eq: Equilibrium) -> None:
    """The outlet a separator passes on must exist: refuse a liquid taken where nothing condenses (and a vapour
    where everything does)."""
    if separator_outlets(eq)[stage.passes_on]:
        return
    where = f"{eq.T - 273.15:.2f} degC and {eq.P / 1e5:.6g} bar"
    if stage.passes_on == "liquid":
        raise InputError(f"next = 'liquid', but nothing condenses: the separator's outlet is all vapour at {where} "
                         "(the tangent-plane test finds its gas stable, so its dew point lies below that T); take "
                         "the vapour (remove next), or give the separator a lower T or a higher P")
    raise InputError(f"the next stage takes the vapour, but the separator's outlet is all liquid at {where} (no vapour "
                     "forms); add next = 'liquid', or give the separator a higher T or a lower P")


def _check_heat_direction(stage: Stage, inlet: StageInlet) -> None:
    """A cooler (or knock-out) whose outlet is hotter than its inlet, or a heater that cools, is a typing slip."""
    if stage.T is None or not inlet.temperatures_known:
        return
    temperatures = [T for T in inlet.temperatures.values() if T is not None]
    heats = stage.type == "heater"
    if (heats and stage.T < min(temperatures)) or (not heats and stage.T > max(temperatures)):
        inlet_T = min(temperatures) if heats else max(temperatures)
        raise InputError(f"a {stage.type}'s outlet ({stage.T - 273.15:.2f} degC) is {'colder' if heats else 'hotter'} "
                         f"than its inlet ({inlet_T - 273.15:.2f} degC); check T, or make it type = "
                         f"'{'cooler' if heats else 'heater'}'")


def _check_no_condensate(case: Case, stage: Stage, scope: StageScope, eq: Equilibrium, db: SpeciesDatabase) -> None:
    """A heater or cooler keeps its gas as it is: refuse an outlet below the water dew point (the enthalpy of the
    supersaturated gas would leave out the condensation heat)."""
    if "H2O" not in eq.amounts:
        return
    model = {} if stage.gas == "ideal" else {"gas": stage.gas, "kij": stage.interactions, "liquid": False}
    probe = equilibrate(eq.amounts, eq.T, eq.P, species=[*scope.species, LIQUID_WATER],
                        inert=[s for s in scope.held if s != "H2O"], db=db,
                        allow_extrapolation=case.species.allow_extrapolation, **model)
    liquid = probe.condensed.get(LIQUID_WATER, 0.0)
    if liquid > _NEGLIGIBLE * sum(eq.amounts.values()):
        unit = case.report.flow_unit
        shown = from_mol_s(liquid, unit, molar_mass=db["H2O"].molar_mass)
        raise InputError(f"water condenses at this {stage.type}'s outlet ({shown:.4g} {unit} of liquid at "
                         f"{eq.T - 273.15:.2f} degC), and a {stage.type} keeps the gas as it is; make it "
                         "type = 'knock-out' to take the condensate out, or keep the outlet above the dew point")


def _enthalpy(amounts: Mapping[str, float], T: float, P: float, db: SpeciesDatabase, gas: str = "ideal",
              kij="shipped") -> float:
    """Enthalpy [J, or W for mol/s] of a mixture, leaving out species too scarce to matter; with a cubic gas
    model its gas's residual enthalpy is included."""
    total = sum(amounts.values())
    kept = {s: n for s, n in amounts.items() if n > _NEGLIGIBLE * total}
    H = mixture_enthalpy(kept, T, P, db=db)
    if gas != "ideal":
        H += residual_enthalpy_of_gas({s: n for s, n in kept.items() if db[s].is_gas}, T, P, gas, kij=kij, db=db)
    return H


# --- the equilibrium curve and the operating lines --------------------------------------------------


def _curve_value(spec: CurveSpec, amounts: Mapping[str, float], feed: Mapping[str, float], db: SpeciesDatabase) -> float:
    if spec.conversion:
        fed = feed.get(spec.species, 0.0)
        return 1.0 - amounts.get(spec.species, 0.0) / fed
    gas = sum(n for s, n in amounts.items() if db[s].is_gas)
    return amounts.get(spec.species, 0.0) / gas


def equilibrium_curve(case: Case, results: list[StageResult], db: SpeciesDatabase) -> Curve:
    """The equilibrium curve of the case's feed over T at the first stage's pressure, with each stage's line.

    Equilibrium at a given T and P depends only on the element totals, which
    every stage shares, so one curve serves all stages at that pressure.  An
    adiabatic stage's operating line runs from its inlet to its outlet along
    n(a) = n_in + a (n_out - n_in), each point at the temperature where its
    enthalpy equals the inlet's plus the share a of the heat input.
    """
    spec = case.curve
    assert spec is not None
    feed = case.mixed_feed()
    if spec.conversion and feed.get(spec.species, 0.0) <= 0.0:
        raise CaseError(case.source, None, "curve.conversion", f"{spec.species} is not in the feed; conversion "
                        "is measured from the feed")
    first = case.stages[0]
    P = first.P
    # The curve takes the first stage's gas model, as its operating lines' enthalpies do.
    model = {} if first.gas == "ideal" else {"gas": first.gas, "kij": first.interactions}
    temperatures = np.linspace(spec.T_from, spec.T_to, spec.points)
    species = case.species
    # One specification for the whole curve, each point warm-started from the one before.
    prepared = prepared_for(Specification.of(species=species.only, exclude=species.exclude, inert=species.frozen,
                                             allow_extrapolation=species.allow_extrapolation, **model), db)
    values = [_curve_value(spec, eq.amounts, feed, db) for eq in prepared.equilibrate_many(feed, temperatures, P)]
    lines = []
    for k, result in enumerate(results):
        if not result.stage.reacts:
            continue  # composition fixed: the next stage's cooling line spans it
        T_line, v_line = _operating_line(result, spec, feed, db)
        if k > 0 and lines:
            # The cooler between stages: composition fixed, temperature from one outlet to the next inlet.
            lines.append((f"cooling before {result.stage.name}", (lines[-1][1][-1], T_line[0]),
                          (lines[-1][2][-1], v_line[0])))
        lines.append((result.stage.name, T_line, v_line))
    return Curve(spec, P, tuple(map(float, temperatures)), tuple(values), tuple(lines))


def _operating_line(result: StageResult, spec: CurveSpec, feed: Mapping[str, float],
                    db: SpeciesDatabase) -> tuple[tuple[float, ...], tuple[float, ...]]:
    eq, inlet = result.equilibrium, result.inlet
    n_in = inlet.mixed
    names = sorted(set(n_in) | {s for s, n in eq.amounts.items() if n > 0})
    start = np.array([n_in.get(s, 0.0) for s in names])
    end = np.array([eq.amounts.get(s, 0.0) for s in names])
    if not result.stage.adiabatic or not inlet.temperatures_known:
        # A fixed-temperature stage has no line from inlet to outlet that the energy balance fixes: show its outlet.
        return (eq.T,), (_curve_value(spec, eq.amounts, feed, db),)
    stage = result.stage
    # The inlet's enthalpy as the stage's own energy balance took it (each stream at its own T and P).
    H_in = eq.energy.feed_enthalpy_J
    T_start = next(iter(inlet.temperatures.values())) if len(inlet.streams) == 1 else eq.T
    T_points, v_points = [], []
    for a in np.linspace(0.0, 1.0, _LINE_POINTS):
        n = dict(zip(names, start + a * (end - start)))
        target = H_in + a * stage.heat_input
        T = _temperature_of(n, target, eq.P, (min(T_start, eq.T), max(T_start, eq.T)), db, stage.gas,
                            stage.interactions)
        T_points.append(T)
        v_points.append(_curve_value(spec, n, feed, db))
    return tuple(T_points), tuple(v_points)


def _temperature_of(amounts: Mapping[str, float], H: float, P: float, around: tuple[float, float],
                    db: SpeciesDatabase, gas: str = "ideal", kij="shipped") -> float:
    """The temperature [K] at which a mixture has enthalpy H, searched near the stage's own temperatures."""
    low, high = max(around[0] - 300.0, 200.0), min(around[1] + 300.0, 6000.0)

    def gap(T: float) -> float:
        return _enthalpy(amounts, T, P, db, gas, kij) - H

    if gap(low) * gap(high) > 0:
        return math.nan
    return float(scipy.optimize.brentq(gap, low, high, xtol=1e-6))
