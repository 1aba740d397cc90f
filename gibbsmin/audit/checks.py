"""The checks of a heat-and-mass balance, unit by unit, and of each stream on its own.

Every unit: closure of each element and of mass; units without reaction also
each species; the energy balance against the stated duty (when the energy
module is there and a duty is stated or implied).  Reactors also: the
equilibrium outlet at the stated outlet T and P from the stated inlets (at the
stated approaches, if any) against the stated outlet; the approach temperature
of each named reaction and whether the reaction went beyond equilibrium in the
direction it moved; the carbon activity of the outlet.  Streams: the stated
total against the sum of the components, and compositions that do not add up.

Verdicts are ``pass``, ``warn`` and ``fail`` against the plant's thresholds,
or ``n/a`` for a check that could not be made (with the reason).
"""

from __future__ import annotations

import math
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass, field

import numpy as np

from ..api import prepared_for
from ..carbon import carbon_activity
from ..energy import mixture_enthalpy
from ..nonideal import residual_enthalpy_of_gas
from ..reactions import approach_temperatures, gas_state, independent_reactions, reaction
from ..uncertainty import approach_uncertainty
from ..equilibrium import Equilibrium
from ..prepared import Specification
from ..errors import GibbsminError, UnknownSpeciesError
from ..thermo import SpeciesDatabase, choose_database
from .plant import Limit, Plant, UnitSpec
from .table import TableStream

__all__ = ["AuditResult", "Check", "UnitAudit", "audit_plant"]

#: Verdicts in order of severity; n/a (not checked) counts below pass.
SEVERITY = {"n/a": 0, "pass": 1, "warn": 2, "fail": 3}
#: kmol/h in mol/s.
_KMOL_H = 1000.0 / 3600.0
#: Mole fraction below which a species is not used to choose reactions for the approach check, [-].
_TRACE = 1e-6


@dataclass(frozen=True)
class Check:
    """One check's outcome.

    Attributes
    ----------
    where : str
        The unit ("R-101 primary reformer") or stream ("stream 7").
    name : str
        What was checked, e.g. "element closure", "approach water-gas shift".
    value : float or None
        The figure judged, in ``unit``.
    unit : str
    verdict : str
        pass, warn, fail or n/a.
    detail : str
        The figures behind the verdict, in words.
    also : tuple of (float, str)
        The same finding in other units, e.g. an energy imbalance in MW beside its kelvin.
    """

    where: str
    name: str
    value: float | None
    unit: str
    verdict: str
    detail: str
    also: tuple[tuple[float, str], ...] = ()


@dataclass(frozen=True)
class ReactionFinding:
    """The approach of one reaction at a reactor outlet, with the direction the reaction moved."""

    name: str
    equation: str
    T_eq: float
    approach_K: float
    direction: int
    stated_K: float | None
    verdict: str
    uncertainty_K: float | None = None
    """Standard uncertainty of T_eq (so of the approach) from the data set's formation-enthalpy uncertainties,
    [K]; None where the data set states none."""


@dataclass(frozen=True)
class UnitAudit:
    """All checks of one unit, with the figures the report shows in detail."""

    spec: UnitSpec
    checks: tuple[Check, ...]
    elements: Mapping[str, tuple[float, float, float]] = field(default_factory=dict)
    reactions: tuple[ReactionFinding, ...] = ()
    equilibrium: Equilibrium | None = None
    stated_dry: Mapping[str, float] = field(default_factory=dict)


@dataclass(frozen=True)
class AuditResult:
    """Every check of a plant; ``data_set`` names the thermochemical data they were made with."""

    plant: Plant
    stream_checks: tuple[Check, ...]
    units: tuple[UnitAudit, ...]
    data_set: str = ""

    @property
    def checks(self) -> tuple[Check, ...]:
        return self.stream_checks + tuple(c for u in self.units for c in u.checks)

    @property
    def worst(self) -> str:
        return max((c.verdict for c in self.checks), key=SEVERITY.__getitem__, default="pass")

    def count(self, verdict: str) -> int:
        return sum(c.verdict == verdict for c in self.checks)


# --- arithmetic on stated streams -------------------------------------------------------------------


def element_flows(flows: Mapping[str, float], db: SpeciesDatabase) -> dict[str, float]:
    """Element to atom flow [mol/s] of species flows [mol/s]."""
    atoms: dict[str, float] = {}
    for species, n in flows.items():
        for element, count in db[species].elements.items():
            atoms[element] = atoms.get(element, 0.0) + count * n
    return atoms


def mass_flow(flows: Mapping[str, float], db: SpeciesDatabase) -> float:
    """Mass flow [g/s] of species flows [mol/s]."""
    return sum(n * db[s].molar_mass for s, n in flows.items())


def summed(streams: Sequence[TableStream]) -> dict[str, float]:
    total: dict[str, float] = {}
    for stream in streams:
        for species, n in stream.flows.items():
            total[species] = total.get(species, 0.0) + n
    return total


def relative_closure(inflow: float, outflow: float, scale: float) -> float:
    """(out - in) / max(in, scale) in %: a small flow is judged against ``scale``, not against itself."""
    return 100.0 * (outflow - inflow) / max(inflow, scale)


# --- the checks -------------------------------------------------------------------------------------


def stream_checks(plant: Plant) -> list[Check]:
    checks = []
    for stream in plant.table.streams.values():
        where = f"stream {stream.id}"
        if stream.composition_sum is not None:
            off = 100.0 * (stream.composition_sum - 1.0)
            limit = plant.limits["composition_sum"]
            checks.append(Check(where, "composition sum", off, "mol%", limit.verdict(abs(off)),
                                f"the stated composition sums to {100 + off:.4f} mol% (used scaled to 100 %)"))
        elif stream.stated_total is not None:
            components = sum(stream.flows.values())
            off = 100.0 * (components - stream.stated_total) / stream.stated_total
            limit = plant.limits["stated_total"]
            checks.append(Check(where, "stated total flow", off, "%", limit.verdict(abs(off)),
                                f"components sum to {components / _KMOL_H:.6g} kmol/h, the sheet states "
                                f"{stream.stated_total / _KMOL_H:.6g} kmol/h"))
    return checks


def _element_check(where: str, inlet: Mapping[str, float], outlet: Mapping[str, float], limit: Limit,
                   db: SpeciesDatabase) -> tuple[Check, dict[str, tuple[float, float, float]]]:
    atoms_in, atoms_out = element_flows(inlet, db), element_flows(outlet, db)
    scale = 1e-4 * sum(atoms_in.values())
    table = {}
    for element in sorted(set(atoms_in) | set(atoms_out)):
        a, b = atoms_in.get(element, 0.0), atoms_out.get(element, 0.0)
        table[element] = (a, b, relative_closure(a, b, scale))
    worst = max(table, key=lambda e: abs(table[e][2]))
    a, b, closure = table[worst]
    detail = (f"worst {worst}: in {a / _KMOL_H:.6g}, out {b / _KMOL_H:.6g} kmol/h of atoms ({closure:+.3f} %); "
              + ", ".join(f"{e} {v[2]:+.3f} %" for e, v in table.items()))
    return Check(where, "element closure", closure, "%", limit.verdict(abs(closure)), detail), table


def _mass_check(where: str, inlet, outlet, limit: Limit, db: SpeciesDatabase) -> Check:
    m_in, m_out = mass_flow(inlet, db), mass_flow(outlet, db)
    closure = relative_closure(m_in, m_out, 0.0)
    return Check(where, "mass closure", closure, "%", limit.verdict(abs(closure)),
                 f"in {m_in * 3.6:.6g} kg/h, out {m_out * 3.6:.6g} kg/h")


def _component_check(where: str, inlet, outlet, limit: Limit) -> Check:
    scale = 1e-4 * sum(inlet.values())
    closures = {s: relative_closure(inlet.get(s, 0.0), outlet.get(s, 0.0), scale) for s in set(inlet) | set(outlet)}
    worst = max(sorted(closures), key=lambda s: abs(closures[s]))
    detail = (f"worst {worst}: in {inlet.get(worst, 0.0) / _KMOL_H:.6g}, out {outlet.get(worst, 0.0) / _KMOL_H:.6g} "
              f"kmol/h; a unit without reaction keeps every species")
    return Check(where, "component closure", closures[worst], "%", limit.verdict(abs(closures[worst])), detail)


def _enthalpy(stream: TableStream, T: float | None = None, gas: str = "ideal") -> float:
    """Enthalpy flow of a stream [W]: ideal-gas enthalpies, plus the gas's residual enthalpy under a cubic."""
    T = stream.T if T is None else T
    db = stream.stream.database
    H = mixture_enthalpy(stream.flows, T, stream.P, db=db)
    if gas != "ideal":
        H += residual_enthalpy_of_gas(_gas(stream.flows, db), T, stream.P, gas, db=db)
    return H


def _energy_check(where: str, spec: UnitSpec, inlets: Sequence[TableStream], outlets: Sequence[TableStream],
                  limit: Limit) -> Check:
    if spec.duty is None:
        return Check(where, "energy balance", None, "K", "n/a", "no duty stated (give duty = '... MW' or "
                     "adiabatic = true)")
    H_in = sum(_enthalpy(s, gas=spec.gas) for s in inlets)
    H_out = sum(_enthalpy(s, gas=spec.gas) for s in outlets)
    imbalance = H_out - H_in - spec.duty
    heat_capacity = sum(_enthalpy(s, s.T + 0.5, spec.gas) - _enthalpy(s, s.T - 0.5, spec.gas) for s in outlets)
    as_kelvin = imbalance / heat_capacity
    share = f" ({100 * imbalance / abs(spec.duty):+.1f} % of the duty)" if spec.duty else ""
    basis = "" if spec.gas == "ideal" else f" (with the {spec.gas} residual enthalpy of each stream)"
    detail = (f"H_out - H_in = {(H_out - H_in) / 1e6:.4g} MW{basis}, stated duty {spec.duty / 1e6:.4g} MW: "
              f"imbalance {imbalance / 1e6:+.4g} MW{share}, {as_kelvin:+.3g} K on the outlet temperature")
    return Check(where, "energy balance", as_kelvin, "K", limit.verdict(abs(as_kelvin)), detail,
                 also=((imbalance / 1e6, "MW"),))


def _splitter_check(where: str, inlets, outlets, limit: Limit) -> Check:
    mixed = summed(inlets)
    total = sum(mixed.values())
    worst, worst_species = 0.0, ""
    for outlet in outlets:
        out_total = sum(outlet.flows.values())
        for s in set(mixed) | set(outlet.flows):
            diff = abs(100.0 * (outlet.flows.get(s, 0.0) / out_total - mixed.get(s, 0.0) / total))
            if diff > worst:
                worst, worst_species = diff, f"{s} in stream {outlet.id}"
    detail = f"largest difference {worst:.4g} mol% ({worst_species})" if worst_species else "outlets as the inlet"
    return Check(where, "splitter composition", worst, "mol%", limit.verdict(worst), detail)


def _gas(flows: Mapping[str, float], db: SpeciesDatabase) -> dict[str, float]:
    return {s: n for s, n in flows.items() if db[s].is_gas}


def _dry_percent(flows: Mapping[str, float]) -> dict[str, float]:
    dry = {s: n for s, n in flows.items() if s != "H2O"}
    total = sum(dry.values())
    return {s: 100.0 * n / total for s, n in dry.items()}


def _equilibrium_reference(spec: UnitSpec, inlet: Mapping[str, float], outlet: TableStream,
                           db: SpeciesDatabase) -> Equilibrium:
    # By default the species the unit's own streams hold: a shift converter's reference does not grow
    # hydrocarbons its streams never show.
    species = spec.species if spec.species is not None else tuple(
        s for s in dict.fromkeys([*inlet, *outlet.flows]) if db[s].is_gas)
    species = tuple(dict.fromkeys([*species, *inlet]))
    # A frozen species the inlet lacks stays absent: leave it out rather than hold it at zero.
    frozen = [s for s in spec.frozen if inlet.get(s, 0.0) > 0.0]
    species = tuple(s for s in species if s not in spec.frozen or s in frozen)
    return prepared_for(_reference_specification(spec, species, frozen), db).equilibrate(inlet, outlet.T, outlet.P)


def _reference_specification(spec: UnitSpec, species: Sequence[str], frozen: Sequence[str]) -> Specification:
    """What a unit's equilibrium reference computes, as the one specification every front door builds."""
    if spec.approach:
        return Specification.of(species=species, approach=dict(spec.approach), frozen=list(frozen) or None,
                                gas=spec.gas, restricted=True, liquid=False if spec.gas != "ideal" else None)
    return Specification.of(species=species, inert=frozen, gas=spec.gas, liquid=False if spec.gas != "ideal" else None)


def _reactions_to_check(spec: UnitSpec, outlet_gas: Mapping[str, float], db: SpeciesDatabase):
    if spec.reactions:
        return [reaction(r, db=db) for r in spec.reactions]
    total = sum(outlet_gas.values())
    present = [s for s, n in outlet_gas.items() if n / total >= _TRACE and s not in spec.frozen]
    chosen = independent_reactions(present, db=db)
    return [rx for rx in chosen if not set(rx.species) & set(spec.frozen)]


def _approach_checks(where: str, spec: UnitSpec, plant: Plant, inlets: Sequence[TableStream], outlet: TableStream,
                     db: SpeciesDatabase) -> tuple[list[Check], list[ReactionFinding]]:
    inlet_gas = _gas(summed(inlets), db)
    outlet_gas = _gas(outlet.flows, db)
    gas = None if spec.gas == "ideal" else spec.gas
    with np.errstate(divide="ignore"):
        inlet_state = gas_state(inlet_gas, outlet.T, min(s.P for s in inlets), gas=gas, db=db)
    checks, findings = [], []
    beyond_limit, stated_limit = plant.limits["beyond_equilibrium"], plant.limits["approach_difference"]
    for rx in _reactions_to_check(spec, outlet_gas, db):
        found = approach_temperatures(outlet_gas, outlet.T, outlet.P, reactions=[rx], gas=gas, db=db)[rx.name]
        name = f"approach {rx.name}"
        if math.isnan(found.approach_K):
            checks.append(Check(where, name, None, "K", "n/a", found.note or "no equilibrium temperature found"))
            continue
        # The direction the reaction went from inlet to outlet (an inlet without a product: forward).
        moved = found.ln_Q - rx.ln_quotient(inlet_state)
        direction = -1 if moved < 0 else 1
        progress = direction * found.approach_K
        beyond = max(0.0, -progress)
        verdict = beyond_limit.verdict(beyond)
        u = data_uncertainty(found)
        words = (f"T_eq {found.T_eq - 273.15:.1f} degC at outlet {outlet.T - 273.15:.1f} degC: approach "
                 f"{found.approach_K:+.1f} K as written ({rx.equation}); the reaction went "
                 f"{'forward' if direction > 0 else 'backward'} from the inlet")
        if beyond > 0:
            words += f", {beyond:.1f} K beyond equilibrium"
            if u is not None:
                words += f", data uncertainty {uncertainty_text(u)}"
                if beyond <= 2.0 * u:
                    words += " (within twice the data uncertainty)"
            if verdict == "fail":
                words += ": impossible as stated"
        elif u is not None:
            words += f"; data uncertainty {uncertainty_text(u)}"
        stated = spec.approach.get(rx.name, spec.approach.get(rx.equation))
        if stated is None:
            stated = next((v for k, v in spec.approach.items() if _same_reaction(k, rx, db)), None)
        if stated is not None:
            difference = abs(found.approach_K - stated)
            stated_verdict = stated_limit.verdict(difference)
            words += f"; stated approach {stated:+.1f} K, found {found.approach_K:+.1f} K"
            verdict = max(verdict, stated_verdict, key=SEVERITY.__getitem__)
        checks.append(Check(where, name, found.approach_K, "K", verdict, words))
        findings.append(ReactionFinding(rx.name, rx.equation, found.T_eq, found.approach_K, direction, stated, verdict,
                                        u))
    return checks, findings


def data_uncertainty(approach) -> float | None:
    """The approach's standard uncertainty from the formation data, [K]; None where the data state none."""
    if any(r.hf298_uncertainty is None for r in approach.reaction.records):
        return None
    return approach_uncertainty(approach)


def uncertainty_text(u: float) -> str:
    """A standard uncertainty in kelvin to two significant digits: "0.4 K", "0.17 K", "1.2 K"."""
    return f"{float(f'{u:.2g}'):g} K"


def _same_reaction(text: str, rx, db: SpeciesDatabase) -> bool:
    other = reaction(text, db=db)
    return other.stoichiometry == rx.stoichiometry


def _carbon_check(where: str, outlet: TableStream, limit: Limit, db: SpeciesDatabase) -> Check:
    gas = _gas(outlet.flows, db)
    if not any("C" in db[s].elements for s in gas):
        return Check(where, "carbon activity", None, "-", "n/a", "no carbon in the outlet")
    activity = carbon_activity(gas, outlet.T, outlet.P, db=db)
    a = activity.activity
    return Check(where, "carbon activity", a, "-", limit.verdict(a), activity.verdict)


def _equilibrium_check(where: str, spec: UnitSpec, plant: Plant, inlets, outlet: TableStream,
                       db: SpeciesDatabase) -> tuple[Check, Equilibrium | None, dict[str, float]]:
    name = "equilibrium at stated T, P" + (" and approaches" if spec.approach else "")
    stated = _dry_percent(_gas(outlet.flows, db))
    try:
        eq = _equilibrium_reference(spec, summed(inlets), outlet, db)
    except (GibbsminError, UnknownSpeciesError) as exc:
        return Check(where, name, None, "mol%", "warn", f"no equilibrium reference: {exc}"), None, stated
    reference = {s: 100.0 * y for s, y in eq.dry_mole_fractions.items()}
    differences = {s: stated.get(s, 0.0) - reference.get(s, 0.0) for s in set(stated) | set(reference)}
    worst = max(sorted(differences), key=lambda s: abs(differences[s]))
    limit = plant.limits["equilibrium_difference"]
    detail = (f"largest difference {worst}: stated {stated.get(worst, 0.0):.4f}, equilibrium "
              f"{reference.get(worst, 0.0):.4f} mol% dry at {outlet.T - 273.15:.1f} degC, {outlet.P / 1e5:.4g} bar")
    return Check(where, name, differences[worst], "mol% dry", limit.verdict(abs(differences[worst])), detail), eq, stated


def audit_unit(plant: Plant, spec: UnitSpec, db: SpeciesDatabase) -> UnitAudit:
    """Every check of one unit."""
    where = spec.label
    inlets = [plant.table[s] for s in spec.inlets]
    outlets = [plant.table[s] for s in spec.outlets]
    inflow, outflow = summed(inlets), summed(outlets)
    element_check, elements = _element_check(where, inflow, outflow, plant.limits["element_closure"], db)
    checks = [element_check, _mass_check(where, inflow, outflow, plant.limits["mass_closure"], db)]
    if spec.type != "reactor":
        checks.append(_component_check(where, _as_gas(inflow), _as_gas(outflow), plant.limits["component_closure"]))
    if spec.type == "splitter":
        checks.append(_splitter_check(where, inlets, outlets, plant.limits["splitter_composition"]))
    try:
        checks.append(_energy_check(where, spec, inlets, outlets, plant.limits["energy_balance"]))
    except (GibbsminError, UnknownSpeciesError) as exc:
        checks.append(Check(where, "energy balance", None, "K", "warn", f"cannot be computed: {exc}"))
    findings: list[ReactionFinding] = []
    eq, stated = None, {}
    if spec.type == "reactor":
        outlet = outlets[0]
        check, eq, stated = _equilibrium_check(where, spec, plant, inlets, outlet, db)
        checks.append(check)
        approach, findings = _approach_checks(where, spec, plant, inlets, outlet, db)
        checks += approach
        if spec.carbon:
            checks.append(_carbon_check(where, outlet, plant.limits["carbon_activity"], db))
    return UnitAudit(spec, tuple(checks), elements, tuple(findings), eq, stated)


def _as_gas(flows: Mapping[str, float]) -> dict[str, float]:
    """Liquid water counted as water: a unit without reaction may condense it (a separator, a cooler)."""
    merged: dict[str, float] = {}
    for s, n in flows.items():
        key = "H2O" if s == "H2O(l)" else s
        merged[key] = merged.get(key, 0.0) + n
    return merged


def audit_plant(plant: Plant, db: SpeciesDatabase | None = None,
                progress: Callable[[str], None] | None = None) -> AuditResult:
    """All checks of a plant: its streams, then each unit in the order described.

    Parameters
    ----------
    plant : Plant
    db : SpeciesDatabase, optional
    progress : callable, optional
        Called with each unit's label as its checks start.
    """
    db = choose_database(plant.data, db)
    units = []
    for spec in plant.units:
        if progress is not None:
            progress(spec.label)
        units.append(audit_unit(plant, spec, db))
    return AuditResult(plant, tuple(stream_checks(plant)), tuple(units), db.data_set)
