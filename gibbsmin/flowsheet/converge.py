"""Converging a flowsheet: the tear streams and design specifications solved together by Newton's method.

The unknowns are each tear stream's species flows, temperature and pressure, and each design specification's
setting; the residuals are the tear streams' change over one pass (what the units computed minus what was
guessed) and each specification's miss.  A few passes of successive substitution give the start; then Newton's
method with a forward-difference Jacobian (one pass per unknown) and Broyden's update between fresh Jacobians,
each step cut back to keep flows non-negative and settings inside their range, and halved while it does not
lower the largest residual.  A flowsheet that does not converge raises, naming the tear stream (or
specification) furthest out; it never returns a half-converged table.
"""

from __future__ import annotations

import functools
from collections.abc import Mapping
from dataclasses import dataclass

import numpy as np

from ..errors import ConvergenceError, InputError
from ..thermo import SpeciesDatabase
from .graph import Structure, check_way_out, reachable, structure
from .material import Material, added
from .model import DesignSpecification, Flowsheet
from .units import Context, Outcome, Unit

#: Successive-substitution passes before Newton's method takes over, at most.
_START_PASSES = 3
#: Relative step of the forward differences, in the unknowns' scaled units.
_DIFFERENCE_STEP = 1e-7
#: Halvings of a step that does not lower the residual before a fresh Jacobian is taken.
_HALVINGS = 4
#: Largest relative element imbalance over the boundary of a converged flowsheet: a tear residual within the
#: tolerance can still leave a trace species' balance open by the recycle ratio over its share, so convergence
#: asks for both.  Each unit balances its species to about 1e-11 of its own flows, which a recycle multiplies
#: by the inert's build-up (ten times and more), so this cannot be much tighter; the certificate asks for 1e-9.
ELEMENT_TOLERANCE = 5e-10
#: Largest element imbalance a certified flowsheet may show.
CERTIFIED_ELEMENT_BALANCE = 1e-9
#: Scales of the temperature [K] and pressure [Pa] unknowns.
_T_SCALE, _P_SCALE = 1000.0, 1e7


@dataclass(frozen=True)
class FlowsheetCertificate:
    """What makes a converged flowsheet trustworthy.

    Attributes
    ----------
    converged : bool
    tear_residual : float
        Largest relative change of a tear stream over the last pass (flows over the stream's total, T, P).
    specification_residual : float
        Largest miss of a design specification, relative to its target.
    element_balance_residual : float
        Largest |in - out| of an element over the boundary, relative to its flow in.
    energy_balance_residual : float
        Largest relative energy-balance residual of a unit that solved one.
    uncertified_units : tuple of str
        Units whose equilibrium or flash is not certified.
    passes : int
        Flowsheet passes taken (each runs every unit once), Jacobian columns included.
    jacobians : int
        Forward-difference Jacobians taken.
    unit_solves : int
        Equilibrium and flash solves over all passes.
    """

    converged: bool
    tear_residual: float
    specification_residual: float
    element_balance_residual: float
    energy_balance_residual: float
    uncertified_units: tuple[str, ...]
    passes: int
    jacobians: int
    unit_solves: int

    @property
    def certified(self) -> bool:
        return self.converged and self.element_balance_residual <= CERTIFIED_ELEMENT_BALANCE and not self.uncertified_units


@dataclass(frozen=True)
class FlowsheetResult:
    """A converged flowsheet: every stream's state, every unit's outcome, the settings the specifications found."""

    flowsheet: Flowsheet
    structure: Structure
    streams: Mapping[str, Material]
    outcomes: Mapping[str, Outcome]
    settings: Mapping[str, float]
    certificate: FlowsheetCertificate
    history: tuple[float, ...]
    context: Context | None = None

    @functools.cached_property
    def units(self) -> tuple[Unit, ...]:
        """The units as last run (with the specifications' settings), made once per result."""
        return tuple(_with_settings(self.flowsheet, self.settings)[0])


def _with_settings(sheet: Flowsheet, values: Mapping[str, float]) -> tuple[list[Unit], dict[str, Material]]:
    """The units and feeds with each specification's setting at ``values`` (keyed by specification name)."""
    units, feeds = list(sheet.units), dict(sheet.feeds)
    for spec in sheet.specifications:
        value = values[spec.name]
        if spec.vary in feeds:
            m = feeds[spec.vary]
            total = m.total
            feeds[spec.vary] = Material(m.T, m.P, {s: n * value / total for s, n in m.flows.items()})
            continue
        k = next(i for i, u in enumerate(units) if u.name == spec.vary)
        units[k] = units[k].with_value(spec.setting, value)
    return units, feeds


class _Pass:
    """One flowsheet pass as a function of the unknowns; counts its passes and solves."""

    def __init__(self, sheet: Flowsheet, s: Structure, context: Context):
        self.sheet, self.s, self.context = sheet, s, context
        self.species: list[str] = sorted(set(added(*(m.flows for m in sheet.feeds.values()))))
        self.flow_scale = sum(m.total for m in sheet.feeds.values())
        self.passes = 0
        # Units that nothing converged depends on (a product's let-down, say) run once, on the answer.
        self.iterated = iterated_units(sheet, s)
        self.order = tuple(k for k in s.order if k in self.iterated)
        # The boundary of those units, over which the element balance is watched while converging.
        self.inner_in = tuple(name for name in s.boundary_in if s.sinks[name] in self.iterated)
        self.inner_out = tuple(name for name, k in s.sources.items()
                               if k in self.iterated and s.sinks.get(name) not in self.iterated)
        self.solves = 0

    # -- the unknowns as one vector --------------------------------------------------------------------------
    def size_of_tear(self) -> int:
        return len(self.species) + 2

    def vector(self, tears: Mapping[str, Material], settings: Mapping[str, float]) -> np.ndarray:
        parts = []
        for name in self.s.tears:
            m = tears[name]
            parts.append([m.flows.get(sp, 0.0) / self.flow_scale for sp in self.species])
            parts.append([m.T / _T_SCALE, m.P / _P_SCALE])
        parts.append([_scaled_setting(spec, settings[spec.name]) for spec in self.sheet.specifications])
        return np.concatenate([np.asarray(p, dtype=float) for p in parts]) if parts else np.zeros(0)

    def unpack(self, x: np.ndarray) -> tuple[dict[str, Material], dict[str, float]]:
        tears, k, n = {}, 0, len(self.species)
        for name in self.s.tears:
            flows = {sp: float(v) * self.flow_scale for sp, v in zip(self.species, x[k:k + n]) if v > 0.0}
            tears[name] = Material(float(x[k + n]) * _T_SCALE, float(x[k + n + 1]) * _P_SCALE, flows)
            k += n + 2
        settings = {spec.name: _setting_of(spec, float(v)) for spec, v in zip(self.sheet.specifications, x[k:])}
        return tears, settings

    @property
    def is_setting(self) -> np.ndarray:
        """Which unknowns are design specifications' settings (the rest are tear streams')."""
        n = len(self.sheet.specifications)
        return np.arange(len(self.s.tears) * self.size_of_tear() + n) >= len(self.s.tears) * self.size_of_tear()

    def lower(self) -> np.ndarray:
        """Bounds of the unknowns: flows and pressures non-negative, settings inside their range."""
        return np.concatenate([*([np.zeros(len(self.species)), [1e-3, 1e-9]] * len(self.s.tears)),
                               np.zeros(len(self.sheet.specifications))])

    def upper(self) -> np.ndarray:
        return np.concatenate([*([np.full(len(self.species) + 2, np.inf)] * len(self.s.tears)),
                               np.ones(len(self.sheet.specifications))])

    # -- one pass ----------------------------------------------------------------------------------------------
    def run(self, tears: Mapping[str, Material], settings: Mapping[str, float], every_unit: bool = False):
        """One pass from the guessed tear streams: the streams and outcomes of the units the tear streams and
        specifications depend on (``every_unit``: of all units)."""
        units, feeds = _with_settings(self.sheet, settings)
        streams: dict[str, Material] = {**feeds, **tears}
        outcomes: dict[str, Outcome] = {}
        for k in self.s.order if every_unit else self.order:
            unit = units[k]
            outcome = unit.run(tuple(streams[name] for name in unit.inlets), self.context)
            self.solves += outcome.equilibrium is not None
            outcomes[unit.name] = outcome
            for name, m in zip(unit.outlets, outcome.outlets):
                if name in tears:
                    computed = m
                    streams["computed " + name] = computed
                else:
                    streams[name] = m
        self.passes += 1
        return streams, outcomes

    def residual(self, x: np.ndarray):
        """The residual vector at ``x`` with that pass's streams and outcomes; new species widen the unknowns."""
        tears, settings = self.unpack(x)
        streams, outcomes = self.run(tears, settings)
        computed = {name: streams["computed " + name] for name in self.s.tears}
        new = sorted({sp for m in computed.values() for sp in m.flows} - set(self.species))
        if new:
            return None, (tears, settings, streams, outcomes, new)
        g = self.vector(computed, settings)
        F = g - x
        spec_part = [(spec.value(streams) - spec.target) / spec.scale for spec in self.sheet.specifications]
        if spec_part:
            F[len(F) - len(spec_part):] = spec_part
        return F, (tears, settings, streams, outcomes, computed)


def _logarithmic(spec: DesignSpecification) -> bool:
    """A positive range over more than a decade (a purge fraction, a make-up flow) is searched in ln: what it
    sets (the inerts' build-up) goes nearly as a power of it."""
    return spec.low > 0.0 and spec.high > 10.0 * spec.low


def _scaled_setting(spec: DesignSpecification, value: float) -> float:
    """A setting as its unknown: 0 at the low end of its range, 1 at the high end."""
    if _logarithmic(spec):
        return float(np.log(value / spec.low) / np.log(spec.high / spec.low))
    return (value - spec.low) / (spec.high - spec.low)


def _setting_of(spec: DesignSpecification, v: float) -> float:
    if _logarithmic(spec):
        return float(spec.low * (spec.high / spec.low) ** v)
    return spec.low + v * (spec.high - spec.low)


def iterated_units(sheet: Flowsheet, s: Structure) -> set[int]:
    """Indexes of the units a tear stream or a specification's stream depends on (the units that make them and
    every unit upstream of those, through streams that are not torn)."""
    wanted = [s.sources[name] for name in s.tears]
    wanted += [s.sources[spec.stream] for spec in sheet.specifications if spec.stream in s.sources]
    feeding: dict[int, set[int]] = {k: set() for k in range(len(sheet.units))}
    for name, k in s.sinks.items():
        if name in s.sources and name not in s.tears:
            feeding[k].add(s.sources[name])
    return set(wanted) | set().union(*(reachable(feeding, k) for k in wanted))


def tear_residual(s: Structure, tears: Mapping[str, Material], computed: Mapping[str, Material]) -> tuple[float, str]:
    """Largest relative change over a pass and the tear stream where it is."""
    worst, where = 0.0, ""
    for name in s.tears:
        a, b = tears[name], computed[name]
        total = max(b.total, a.total, 1e-300)
        names = set(a.flows) | set(b.flows)
        change = max([abs(b.flows.get(sp, 0.0) - a.flows.get(sp, 0.0)) / total for sp in names] +
                     [abs(b.T - a.T) / b.T, abs(b.P - a.P) / b.P])
        if change >= worst:
            worst, where = change, name
    return worst, where


def settle_flowsheet(sheet: Flowsheet, context: Context | None = None, *,
                     start: FlowsheetResult | None = None) -> FlowsheetResult:
    """Converge ``sheet``: tear streams and design specifications together; raises ConvergenceError when it cannot.

    ``context`` holds the species set the reactors see and the database (default: every species of the feeds'
    elements, the default data set; ``Context.of(...)``).  ``start``: a converged neighbour (a sweep's last
    point) whose tear streams and settings are the first guess; otherwise the tear streams start empty."""
    context = context or Context.of()
    db = context.db
    s = structure(sheet.units, tuple(sheet.feeds), sheet.tears)
    check_way_out(sheet.units, s, {name: m.flows for name, m in sheet.feeds.items()}, context)
    for spec in sheet.specifications:
        _check_specification(sheet, s, spec)
    ev = _Pass(sheet, s, context)
    first = next(iter(sheet.feeds.values()))
    tears = {name: Material(first.T, first.P, {}) for name in s.tears}
    settings = {spec.name: _start_value(sheet, spec) for spec in sheet.specifications}
    if start is not None and start.structure.tears == s.tears:
        tears = {name: start.streams[name] for name in s.tears}
        settings = {name: min(max(start.settings.get(name, v), spec.low), spec.high)
                    for (name, v), spec in zip(settings.items(), sheet.specifications)}
    history: list[float] = []
    if not s.tears and not sheet.specifications:  # a train: every unit once, in order
        streams, outcomes = ev.run({}, {}, every_unit=True)
        certificate = _certificate(s, streams, outcomes, db, 0.0, 0.0, ev, 0)
        return FlowsheetResult(sheet, s, streams, outcomes, {}, certificate, (0.0,), context)
    previous = None
    # Successive substitution: the start (and the whole of a flowsheet without specifications' first passes).
    for _ in range(_START_PASSES if s.tears else 1):
        streams, outcomes = ev.run(tears, settings)
        computed = {name: streams["computed " + name] for name in s.tears}
        change = tear_residual(s, tears, computed)[0] if s.tears else 0.0
        history.append(change)
        widened = sorted(set(ev.species) | {sp for m in computed.values() for sp in m.flows})
        previous = tears if widened == ev.species else None
        ev.species = widened
        tears = computed
        if change <= sheet.tolerance:
            break
    x = ev.vector(tears, settings)
    # Unknowns the start passes left exactly where they were (a pressure a compressor sets, a temperature a
    # cooler sets) depend on nothing: their Jacobian columns are taken as -1 on the diagonal, without a pass.
    ev.steady = np.zeros(len(x), bool)
    if previous is not None:
        ev.steady = (x == ev.vector(previous, settings)) & ~ev.is_setting
    lower, upper = ev.lower(), ev.upper()
    jacobians, J, fresh = 0, None, False
    F, state = ev.residual(x)
    while True:
        if F is None:  # a species appeared in a tear stream: widen the unknowns and start the Jacobian afresh
            ev.species = sorted(set(ev.species) | set(state[4]))
            x = ev.vector(state[0], state[1])
            lower, upper, J = ev.lower(), ev.upper(), None
            ev.steady = np.zeros(len(x), bool)
            F, state = ev.residual(x)
            continue
        tears_now, settings_now, streams, outcomes, computed = state
        change, worst_tear = tear_residual(s, tears_now, computed) if s.tears else (0.0, "")
        miss = _specification_miss(sheet, streams)
        history.append(max(change, miss))
        imbalance = _element_residual(ev.inner_in, ev.inner_out, {**streams, **computed}, db) if s.tears else 0.0
        if change <= sheet.tolerance and miss <= sheet.tolerance and imbalance <= ELEMENT_TOLERANCE:
            break
        if ev.passes >= sheet.max_passes:
            _not_converged(sheet, ev, change, worst_tear, miss, settings_now, imbalance)
        if J is None:
            J, fresh = _jacobian(ev, x, F, upper), True
            jacobians += 1
        step = _step(J, x, F, lower, upper, ev)
        if step is None and not fresh:  # Broyden's Jacobian has drifted: take a fresh one
            J = None
            continue
        if step is None:  # even a fresh Jacobian's step does not lower the residual: substitute once, start again
            x_new = np.clip(x + np.where(ev.is_setting, 0.0, F), lower, upper)
            F, state = ev.residual(x_new)
            x, J = x_new, None
            continue
        x_new, F_new, state = step
        if F_new is not None:
            dx, dF = x_new - x, F_new - F
            J = J + np.outer(dF - J @ dx, dx) / max(dx @ dx, 1e-300)  # Broyden's update
        x, F, fresh = x_new, F_new, False
    tears_now, settings_now, streams, outcomes, computed = state
    if len(ev.order) < len(s.order):  # the units downstream of everything converged, once
        streams, outcomes = ev.run(tears_now, settings_now, every_unit=True)
    for name in s.tears:
        streams[name] = streams.pop("computed " + name)
    certificate = _certificate(s, streams, outcomes, db, change, miss, ev, jacobians)
    return FlowsheetResult(sheet, s, streams, outcomes, settings_now, certificate, tuple(history), context)


def _step(J, x, F, lower, upper, ev: _Pass):
    """Newton's step from ``x``, kept inside the bounds and halved until the largest residual falls; None if it
    does not."""
    try:
        dx = np.linalg.solve(J, -F)
    except np.linalg.LinAlgError:
        dx = np.linalg.lstsq(J, -F, rcond=None)[0]
    for _ in range(_HALVINGS + 1):
        x_new = np.clip(x + dx, lower, upper)
        F_new, state = ev.residual(x_new)
        if F_new is None or np.max(np.abs(F_new)) < np.max(np.abs(F)):
            return x_new, F_new, state
        dx = dx / 2.0
    return None


def _jacobian(ev: _Pass, x: np.ndarray, F: np.ndarray, upper: np.ndarray) -> np.ndarray:
    """Forward differences, one pass per unknown (stepping backwards at an upper bound)."""
    J = np.empty((len(F), len(x)))
    for j in range(len(x)):
        if ev.steady[j]:
            J[:, j] = 0.0
            J[j, j] = -1.0
            continue
        h = _DIFFERENCE_STEP * max(1.0, abs(x[j]))
        if x[j] + h > upper[j]:
            h = -h
        x_step = x.copy()
        x_step[j] += h
        F_step, _ = ev.residual(x_step)
        if F_step is None:
            F_step = F  # a species appearing under a tiny step: that column is taken as flat this time
        J[:, j] = (F_step - F) / h
    return J


def _specification_miss(sheet: Flowsheet, streams: Mapping[str, Material]) -> float:
    return max([abs(spec.value(streams) - spec.target) / spec.scale for spec in sheet.specifications], default=0.0)


def _start_value(sheet: Flowsheet, spec: DesignSpecification) -> float:
    """The setting the file gives, where it lies inside the range; else the middle of the range."""
    if spec.vary in sheet.feeds:
        given = sheet.feeds[spec.vary].total
    else:
        unit = sheet.unit(spec.vary)
        given = getattr(unit.stage, spec.setting, None) if hasattr(unit, "stage") else getattr(unit, spec.setting, None)
    if given is not None and spec.low <= given <= spec.high:
        return float(given)
    return 0.5 * (spec.low + spec.high)


def _check_specification(sheet: Flowsheet, s: Structure, spec: DesignSpecification) -> None:
    known = set(s.sources) | set(sheet.feeds)
    if spec.stream not in known:
        raise InputError(f"specification {spec.name!r}: no stream named {spec.stream!r}; streams: "
                         f"{', '.join(sorted(known))}")
    if spec.vary in sheet.feeds:
        if spec.setting != "flow":
            raise InputError(f"specification {spec.name!r}: a feed's setting a specification can vary is its "
                             f"'flow' (its total), not {spec.setting!r}")
        return
    unit = sheet.unit(spec.vary)
    unit.with_value(spec.setting, spec.low)  # refuses a setting the unit does not have


def _not_converged(sheet, ev, change, worst_tear, miss, settings, imbalance) -> None:
    parts = []
    if change > sheet.tolerance:
        parts.append(f"tear stream {worst_tear!r} still changes by {change:.3g} (relative) over a pass")
    for spec in sheet.specifications:
        value = settings[spec.name]
        at_bound = min(value - spec.low, spec.high - value) <= 1e-9 * (spec.high - spec.low)
        if at_bound:
            raise InputError(f"specification {spec.name!r}: no value of {spec.vary}.{spec.setting} between "
                             f"{spec.low:.6g} and {spec.high:.6g} meets it (the search ended at {value:.6g}, the "
                             "edge of that range); widen the range, or change the target")
    if miss > sheet.tolerance:
        parts.append(f"the design specifications miss by up to {miss:.3g} of their targets")
    if imbalance > ELEMENT_TOLERANCE:
        parts.append(f"an element's flow in and out of the boundary differs by {imbalance:.3g} of its flow in")
    raise ConvergenceError(f"the flowsheet did not converge in {ev.passes} passes: {'; '.join(parts)} (tolerance "
                           f"{sheet.tolerance:g}); check the loop has a way out for every species, or raise "
                           "[flowsheet] max_passes")


def element_flows(streams, names, db: SpeciesDatabase) -> dict[str, float]:
    """Element flows [mol/s of atoms] of the named streams together."""
    total: dict[str, float] = {}
    for name in names:
        for sp, n in streams[name].flows.items():
            for el, count in db[sp].elements.items():
                total[el] = total.get(el, 0.0) + count * n
    return total


def _element_residual(ins, outs, streams, db) -> float:
    """Largest relative |in - out| of an element over a boundary (streams ``ins`` and ``outs``), [-]."""
    into = element_flows(streams, ins, db)
    out = element_flows(streams, outs, db)
    return max((abs(into.get(el, 0.0) - out.get(el, 0.0)) / into[el] for el in into if into[el] > 0), default=0.0)


def _certificate(s, streams, outcomes, db, change, miss, ev, jacobians) -> FlowsheetCertificate:
    element = _element_residual(s.boundary_in, s.boundary_out, streams, db)
    energy = [o.equilibrium.energy.balance_residual for o in outcomes.values()
              if o.equilibrium is not None and o.equilibrium.energy is not None
              and o.equilibrium.energy.balance_residual is not None]
    uncertified = tuple(name for name, o in outcomes.items() if not o.certified)
    return FlowsheetCertificate(True, change, miss, element, max(energy, default=0.0), uncertified, ev.passes,
                                jacobians, ev.solves)
