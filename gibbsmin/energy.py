"""The reactor energy balance: enthalpy and entropy of any phase split, inlets, duty, fixed-enthalpy equilibrium.

Enthalpies are on the formation basis of the NASA data (elements in their
reference states have h = 0 at 298.15 K), so one number per state carries both
the heat of reaction and the sensible heat, and every balance reads

    H_out = H_in + Q

Sign convention (written into every result): Q, the heat input or duty, is
positive when heat is added to the reactor.  Amounts may be on any basis: Q is
in J per the amounts given, which is W when the amounts are mol/s.

An inlet is one or several streams, each at its own temperature, mixed at the
reactor inlet; all streams are taken at the reactor pressure (for an ideal gas
the enthalpy does not depend on it).

Fixed enthalpy and pressure
---------------------------
The outlet temperature is the root of f(T) = H_eq(T) - H_target, where H_eq is
the enthalpy of the equilibrium at T.  f rises with T (its slope is the
equilibrium heat capacity), so the root is bracketed and found by Newton steps
on T using the slope from the equilibrium's sensitivities, falling back to
bisection whenever a step leaves the bracket or stalls; each fixed-T solve is
warm-started from the nearest temperature already solved.

Where the phases at the two ends of the bracket differ, the root may lie on a
phase boundary.  A dew point only bends H_eq(T), but coexisting phases that
leave no freedom in T at fixed P (ice and liquid water, a liquid boiling off a
one-component feed) make H_eq(T) jump: every H inside the jump belongs to the
boundary temperature, and only the split between the phases changes.  Both
cases are solved exactly by Newton on the optimality conditions with the union
of the two phase sets present and T as an unknown closed by the energy balance
(``sensitivity.settle_on_phase_set``); its answer is accepted when every
condensed amount is non-negative and it certifies.

A condensed species cannot form outside its fitted range, so H_eq(T) also
jumps at the ends of those ranges; the search steps onto each such temperature
rather than over it, and names the species when no temperature balances.

Non-ideal gas
-------------
Everything here takes the gas's residual enthalpy as a hook, zero by default:
``enthalpy(..., residual_enthalpy=)``, ``solve_energy_balance(...,
residual_enthalpy=, step=)`` (``step`` being the fixed-T solve with the
equation of state's fugacity coefficients), ``energy_extras(...,
residual_enthalpy=)`` and ``Inlet.enthalpy(..., stream_residual=)``.  The
sensitivities and the phase-boundary Newton hold the fugacity coefficients
fixed, which slows but does not misdirect them.
"""

from __future__ import annotations

import math
import numbers
import warnings
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass, replace

import numpy as np
from numpy.typing import NDArray

from .equilibrium import Equilibrium
from .errors import ConvergenceError, InputError, TemperatureRangeError
from .settle import Setup, _positive_number, check_feed, checked, solve_fixed
from .solve import SolverResult
from .system import P_REF, Problem
from .thermo.database import SpeciesDatabase, default_database
from .thermo.nasa7 import R, Nasa7Table
from . import sensitivity

#: Written into every result that carries a heat figure.
SIGN_CONVENTION = "positive = heat added to the reactor; J per the feed amounts given (W when they are mol/s)"

#: Gas-phase residual enthalpy h(T, P, n_gas) - h_ideal, [J], for the gas amounts [mol] in the
#: System's gas order.  None means an ideal gas; a cubic equation of state supplies its own.
ResidualEnthalpy = Callable[[float, float, NDArray[np.float64]], float]

#: A fixed-T step: (T [K], warm start) -> (Equilibrium, Problem, SolverResult), as ``settle.solve_fixed``.
FixedTStep = Callable[[float, "SolverResult | None"], tuple[Equilibrium, Problem, SolverResult]]

#: The energy balance is solved to this fraction of the gross enthalpy (see ``enthalpy_scale``).
_TOLERANCE = 1e-11
#: An answer is still accepted at this closure when the bracket cannot shrink any further.
_ACCEPTABLE = 1e-9
_MAX_EVALUATIONS = 120
#: Phase-set solves tried while the bracket is wide (one more is always tried once it is narrow).
_PHASE_SET_TRIES = 3


# ----------------------------------------------------------------------------- enthalpy and entropy

def enthalpy(table: Nasa7Table, n_gas: int, n: NDArray[np.float64], T: float, P: float,
             residual_enthalpy: ResidualEnthalpy | None = None) -> float:
    """Enthalpy of a state on the formation basis, [J].

    Parameters
    ----------
    table : Nasa7Table
        Coefficients of the species, gas species first.
    n_gas : int
        How many of the species form the gas phase.
    n : ndarray
        Amounts, [mol]; each condensed species is a pure phase of its own.
    T : float
        Temperature, [K].
    P : float
        Pressure, [Pa].
    residual_enthalpy : callable, optional
        The gas's departure from the ideal gas, [J]; zero when omitted.
    """
    n = np.asarray(n, dtype=float)
    H = float(n @ (table.h_RT(T) * (R * T)))
    if residual_enthalpy is not None and n_gas:
        H += float(residual_enthalpy(T, P, n[:n_gas]))
    return H


def entropy(table: Nasa7Table, n_gas: int, n: NDArray[np.float64], T: float, P: float) -> float:
    """Entropy of a state, [J/K]: ideal mixing in the gas, pure condensed phases at their standard entropy.

    The parameters are those of :func:`enthalpy`.
    """
    n = np.asarray(n, dtype=float)
    s = table.s_R(T)
    gas = n[:n_gas]
    S = float(n[n_gas:] @ s[n_gas:])
    N = gas.sum()
    if N > 0.0:
        present = gas > 0.0
        # n ln y vanishes for a species that is not there, so absent ones are skipped rather than logged.
        # Logs of the amounts, not of y P / P0, which underflows for species near the smallest float.
        S += float(gas[present] @ (s[:n_gas][present] - np.log(gas[present]) + np.log(N) - np.log(P / P_REF)))
    return R * S


def heat_capacity(table: Nasa7Table, n: NDArray[np.float64], T: float) -> float:
    """Frozen heat capacity (composition held fixed), [J/K]."""
    return float(R * (np.asarray(n, dtype=float) @ table.cp_R(T)))


def _mixture(amounts: Mapping[str, float], T: float, db: SpeciesDatabase | None, allow_extrapolation: bool):
    db = db or default_database()
    T = _temperature(T, "T")
    canonical = check_feed(amounts, db)
    records = db.resolve(list(canonical))
    records = [r for r in records if r.is_gas] + [r for r in records if not r.is_gas]
    if not allow_extrapolation:
        for record in records:
            if not record.T_min <= T <= record.T_max:
                raise TemperatureRangeError(record.name, T, record.T_min, record.T_max)
    n = np.array([canonical[r.name] for r in records])
    return db.nasa7([r.name for r in records]), sum(r.is_gas for r in records), n, T


def mixture_enthalpy(amounts: Mapping[str, float], T: float, P: float = P_REF, *,
                     db: SpeciesDatabase | None = None, allow_extrapolation: bool = False) -> float:
    """Enthalpy of a mixture on the formation basis, [J].

    Parameters
    ----------
    amounts : mapping
        Species name to amount, [mol].  The name carries the phase: ``"H2O"``
        is the gas, ``"H2O(l)"`` a liquid phase of pure water.
    T : float
        Temperature, [K].
    P : float
        Pressure, [Pa] (no effect on an ideal gas).

    Examples
    --------
    >>> round(mixture_enthalpy({"H2O": 1.0}, 298.15) / 1000, 1)   # delta-fH of steam, kJ
    -241.8
    """
    table, n_gas, n, T = _mixture(amounts, T, db, allow_extrapolation)
    return enthalpy(table, n_gas, n, T, _positive_number(P, "P", "Pa"))


def mixture_entropy(amounts: Mapping[str, float], T: float, P: float = P_REF, *,
                    db: SpeciesDatabase | None = None, allow_extrapolation: bool = False) -> float:
    """Entropy of a mixture, [J/K]: ideal gas mixture plus pure condensed phases (see ``mixture_enthalpy``)."""
    table, n_gas, n, T = _mixture(amounts, T, db, allow_extrapolation)
    return entropy(table, n_gas, n, T, _positive_number(P, "P", "Pa"))


def state_amounts(setup: Setup, eq: Equilibrium) -> NDArray[np.float64]:
    """Amounts of an equilibrium in its System's species order, [mol]."""
    return np.array([eq.amounts[name] for name in setup.system.names])


# ----------------------------------------------------------------------------- the inlet

@dataclass(frozen=True)
class InletStream:
    """One stream entering the reactor.

    Attributes
    ----------
    name : str
    amounts : dict
        Canonical species name to amount, [mol] (or mol/s).
    T : float or None
        Temperature, [K]; None when it was not given.
    """

    name: str
    amounts: Mapping[str, float]
    T: float | None


@dataclass(frozen=True)
class Inlet:
    """The streams mixed at the reactor inlet."""

    streams: tuple[InletStream, ...]

    @property
    def total(self) -> dict[str, float]:
        """The mixed feed: species to total amount, [mol]."""
        total: dict[str, float] = {}
        for stream in self.streams:
            for name, amount in stream.amounts.items():
                total[name] = total.get(name, 0.0) + amount
        return total

    @property
    def has_temperatures(self) -> bool:
        return all(stream.T is not None for stream in self.streams)

    @property
    def temperatures(self) -> dict[str, float | None]:
        return {stream.name: stream.T for stream in self.streams}

    def enthalpy(self, P: float, db: SpeciesDatabase, allow_extrapolation: bool = False,
                 stream_residual: Callable[[InletStream, float], float] | None = None) -> float:
        """Total enthalpy of the streams, each at its own temperature and at P [Pa], [J].

        ``stream_residual(stream, P)`` adds a stream's departure from the
        ideal gas, [J] (for a cubic equation of state); none by default.
        """
        if not self.has_temperatures:
            raise InputError("the energy balance needs the feed temperature: pass T_feed (K), one number "
                             "or one per feed species or stream")
        total = 0.0
        for stream in self.streams:
            total += mixture_enthalpy(stream.amounts, stream.T, P, db=db, allow_extrapolation=allow_extrapolation)
            if stream_residual is not None:
                total += float(stream_residual(stream, P))
        return total

    def gross_enthalpy(self, P: float, db: SpeciesDatabase) -> float:
        """Sum of |n_j h_j| over the inlet, [J]: the scale the energy-balance residual is measured on."""
        return sum(abs(mixture_enthalpy({name: amount}, s.T, P, db=db, allow_extrapolation=True))
                   for s in self.streams for name, amount in s.amounts.items())


def read_inlet(feed: Mapping[str, object], T_feed: object, db: SpeciesDatabase) -> Inlet:
    """The inlet described by a feed and its temperatures.

    Parameters
    ----------
    feed : mapping
        Either species name to amount [mol], or stream name to such a mapping
        (several streams mixed at the inlet).
    T_feed : float, mapping or None
        Temperature of the feed, [K]: one number for everything; for a feed of
        species, a mapping species to temperature (every species its own
        stream); for a feed of streams, a mapping stream name to temperature.
    """
    if isinstance(feed, Mapping) and feed and all(isinstance(v, Mapping) for v in feed.values()):
        streams = {str(name): check_feed(amounts, db) for name, amounts in feed.items()}
        temperatures = _temperatures_of(T_feed, list(streams), "stream", lambda key: str(key))
        return Inlet(tuple(InletStream(name, amounts, temperatures[name]) for name, amounts in streams.items()))
    if isinstance(feed, Mapping) and any(isinstance(v, Mapping) for v in feed.values()):
        raise InputError("feed mixes species amounts with streams; give either {species: mol} or "
                         "{stream name: {species: mol}}")
    amounts = check_feed(feed, db)
    if isinstance(T_feed, Mapping):
        temperatures = _temperatures_of(T_feed, list(amounts), "species", lambda key: db[str(key)].name)
        return Inlet(tuple(InletStream(name, {name: amount}, temperatures[name]) for name, amount in amounts.items()))
    T = None if T_feed is None else _temperature(T_feed, "T_feed")
    return Inlet((InletStream("feed", amounts, T),))


def _temperatures_of(T_feed: object, keys: list[str], kind: str, canonical) -> dict[str, float | None]:
    if T_feed is None:
        return {key: None for key in keys}
    if not isinstance(T_feed, Mapping):
        T = _temperature(T_feed, "T_feed")
        return {key: T for key in keys}
    plural = "streams" if kind == "stream" else kind
    given: dict[str, float] = {}
    for key, value in T_feed.items():
        name = canonical(key)
        if name not in keys:
            raise InputError(f"T_feed names {key!r}, which is not a feed {kind}; the feed {plural} are "
                             f"{', '.join(keys)}")
        if name in given:
            raise InputError(f"T_feed gives {name} two temperatures (under two of its names); give it one")
        given[name] = _temperature(value, f"T_feed[{key!r}]")
    missing = [key for key in keys if key not in given]
    if missing:
        raise InputError(f"T_feed gives no temperature for {', '.join(missing)}; give every feed {kind} "
                         "a temperature in K, or one number for all")
    return given


def _temperature(value: object, name: str) -> float:
    return _positive_number(value, name, "K")


def heat_input_of(value: object) -> float:
    """A validated heat input, [J per the amounts given]."""
    if isinstance(value, bool) or not isinstance(value, numbers.Real) or not math.isfinite(float(value)):
        raise InputError(f"heat_input must be a finite number (J per the feed amounts, W for mol/s; "
                         f"positive = heat added), got {value!r}")
    return float(value)


def outlet_bounds(db: SpeciesDatabase, inlet: Inlet, species: Sequence[str] | None,
                  T_bounds: object = None) -> tuple[float, float]:
    """Temperatures the outlet may take, [K].

    By default the range over which every gas species the caller named (in the
    feed or in ``species``) has data; species of the default set with a
    narrower range are then left out.
    """
    if T_bounds is not None:
        if isinstance(T_bounds, (str, bytes)) or not isinstance(T_bounds, Sequence) or len(T_bounds) != 2:
            raise InputError(f"T_bounds must be (lowest, highest) outlet temperature in K, got {T_bounds!r}")
        low, high = (_temperature(v, "T_bounds") for v in T_bounds)
        if not low < high:
            raise InputError(f"T_bounds must be (lowest, highest) with lowest < highest, got {T_bounds!r}")
        return low, high
    named = list(inlet.total) + list(species or [])
    gases = [r for r in db.resolve(named) if r.is_gas]
    if not gases:
        return 200.0, 6000.0
    low, high = max(r.T_min for r in gases), min(r.T_max for r in gases)
    if not low < high:
        raise InputError("the named gas species share no temperature range; leave one out of the set")
    return low, high


def frozen_temperature(table: Nasa7Table, n: NDArray[np.float64], H: float, bounds: tuple[float, float]) -> float:
    """Temperature at which an unreacted mixture has enthalpy H, [K] (a first guess of the outlet)."""
    low, high = bounds
    T = 0.5 * (low + high)
    for _ in range(60):
        cp = max(heat_capacity(table, n, T), 1e-12)
        step = (H - float(n @ table.h_RT(T)) * R * T) / cp
        T = min(max(T + step, low), high)
        if abs(step) < 1e-6:
            break
    return T


# ----------------------------------------------------------------------------- fixed enthalpy and pressure

@dataclass(frozen=True)
class _Point:
    """One fixed-T equilibrium visited by the temperature search."""

    T: float
    eq: Equilibrium
    problem: Problem
    result: SolverResult
    H: float            # [J]
    f: float            # H - H_target, [J]
    cp: float           # equilibrium heat capacity, [J/K]; NaN where the phase set fixes T

    @property
    def phases(self) -> frozenset[int]:
        return frozenset(np.flatnonzero(self.result.present[0]).tolist())


def enthalpy_scale(setup: Setup, n: NDArray[np.float64], T: float, inlet_gross: float, heat: float) -> float:
    """The gross enthalpy a residual is measured against, [J]: max of sum |n_j h_j| in and out, |Q| and N R T."""
    table = setup.system.table
    outlet_gross = float(np.abs(n) @ np.abs(table.h_RT(T) * R * T))
    return max(outlet_gross, inlet_gross, abs(heat), float(n.sum()) * R * T)


def solve_energy_balance(
    setup: Setup,
    H_target: float,
    P: float,
    *,
    T_bounds: tuple[float, float],
    gross_inlet: float = 0.0,
    coldest_feed: float = 0.0,
    T_guess: float | None = None,
    method: str = "auto",
    allow_extrapolation: bool = False,
    residual_enthalpy: ResidualEnthalpy | None = None,
    step: FixedTStep | None = None,
) -> tuple[Equilibrium, Problem, SolverResult]:
    """Equilibrium at fixed enthalpy H_target [J] and pressure P [Pa].

    Parameters
    ----------
    T_bounds : (float, float)
        Lowest and highest outlet temperature, [K].
    gross_inlet : float
        Sum of |n_j h_j| over the inlet plus |heat input|, [J]: with the
        outlet's own figure and N R T, the scale the tolerance is relative to.
    coldest_feed : float
        Lowest feed temperature, [K]; the default start is not below it.
    T_guess : float, optional
        Where the search starts, [K]; by default the temperature at which the
        unreacted feed would hold H_target.
    residual_enthalpy : callable, optional
        Gas-phase residual enthalpy (ideal gas when omitted).
    step : callable, optional
        The fixed-T solve to iterate on; ``settle.solve_fixed`` on the ideal
        gas by default.  A non-ideal gas model passes its own.

    Returns
    -------
    (Equilibrium, Problem, SolverResult)
        The answer (``specification`` "H and P", ``extras["T_evaluations"]``,
        and ``extras["phase_boundary"]`` when T sits on a two-phase plateau).

    Raises
    ------
    InputError
        No temperature inside ``T_bounds`` balances the energy.
    ConvergenceError
        The search did not close the balance.
    """
    if step is None:
        def step(T, start):
            if method == "auto" and start is not None:
                # A warm start that fails (a phase swapped since the neighbour) is retried cold before
                # "auto" falls back on the cone solver, which is far slower.
                warm = solve_fixed(setup, T, P, method="newton", start=start,
                                   allow_extrapolation=allow_extrapolation, specification="H and P")
                if warm[0].certificate.certified:
                    return warm
                start = None
            return solve_fixed(setup, T, P, method=method, start=start,
                               allow_extrapolation=allow_extrapolation, specification="H and P")
    system = setup.system
    n_feed = np.array([setup.feed.get(name, 0.0) for name in system.names])
    if T_guess is None:
        # No colder than the coldest feed: cooling usually condenses something, which the frozen
        # mixture knows nothing of, and the search then walks down from there.
        T_guess = max(frozen_temperature(system.table, n_feed, H_target, T_bounds), coldest_feed)
    scale = max(gross_inlet, float(n_feed.sum()) * R * T_guess)
    search = _Search(setup, H_target, P, T_bounds, scale, residual_enthalpy, step, allow_extrapolation)
    return search.run(min(max(T_guess, T_bounds[0]), T_bounds[1]))


class _Search:
    """The bracketed search for the outlet temperature (one instance per solve)."""

    def __init__(self, setup, H_target, P, T_bounds, scale, residual_enthalpy, step, allow_extrapolation):
        self.setup, self.H_target, self.P = setup, H_target, P
        self.allow_extrapolation = allow_extrapolation
        self.T_low, self.T_high = T_bounds
        self.scale, self.residual_enthalpy, self.step = scale, residual_enthalpy, step
        self.points: list[_Point] = []
        self.phase_set_tries = 0
        condensed = setup.system.records[setup.system.n_gas:]
        self.breakpoints = sorted({T for r in condensed for T in (r.T_min, r.T_max)
                                   if self.T_low < T < self.T_high})

    def evaluate(self, T: float) -> _Point:
        start = min(self.points, key=lambda p: abs(p.T - T)).result if self.points else None
        eq, problem, result = self.step(T, start)
        if not eq.certificate.certified and start is not None:
            eq, problem, result = self.step(T, None)
        with warnings.catch_warnings():
            # Only the final answer's precision matters; a usable intermediate one is fine.
            warnings.simplefilter("ignore", RuntimeWarning)
            checked(eq)
        system = self.setup.system
        n = state_amounts(self.setup, eq)
        H = enthalpy(system.table, system.n_gas, n, T, self.P, self.residual_enthalpy)
        cp = sensitivity.equilibrium_heat_capacity(self.setup, problem, result, T, self.P)
        point = _Point(T, eq, problem, result, H, H - self.H_target, cp)
        self.points.append(point)
        return point

    def converged(self, point: _Point, tolerance: float = _TOLERANCE) -> bool:
        scale = enthalpy_scale(self.setup, state_amounts(self.setup, point.eq), point.T, self.scale, 0.0)
        return abs(point.f) <= tolerance * scale

    def finish(self, point: _Point, extras: Mapping[str, object] | None = None):
        eq = replace(point.eq, specification="H and P",
                     extras={**point.eq.extras, "T_evaluations": len(self.points), **(extras or {})})
        return eq, point.problem, point.result

    def no_root(self, point: _Point) -> InputError:
        side = "below" if point.f < 0 else "above"
        where = "highest" if point.f < 0 else "lowest"
        fix = ("less heat removed, or more heat added" if point.f < 0 else "more heat removed, or less heat added")
        condensed = self.setup.system.records[self.setup.system.n_gas:]
        # A species cut off by its data matters unless another phase of the same substance covers that T.
        covered = [r.elements for r in condensed if r.T_min <= point.T <= r.T_max]
        cut = [r for r in condensed if (r.T_min > point.T if point.f > 0 else r.T_max < point.T)
               and r.elements not in covered]
        why = "".join(f"; {r.name} has data only from {r.T_min:g} K to {r.T_max:g} K and cannot form outside it"
                      for r in cut)
        return InputError(
            f"no outlet temperature between {self.T_low:g} K and {self.T_high:g} K balances the energy: even at "
            f"the {where} ({point.T:g} K) the equilibrium enthalpy is {abs(point.f):.6g} J {side} the inlet "
            f"enthalpy plus heat input ({self.H_target:.6g} J){why}; check the feed temperatures, try {fix}, "
            "or widen T_bounds if the species data allow it"
        )

    def run(self, T: float):
        low: _Point | None = None
        high: _Point | None = None
        previous: _Point | None = None   # the point a Newton step inside the bracket started from
        while len(self.points) < _MAX_EVALUATIONS:
            point = self.evaluate(T)
            if self.converged(point):
                return self.finish(point)
            if point.f < 0:
                low = point
            else:
                high = point
            if low is None or high is None:
                T = self._extend(point)
                continue
            if low.T > high.T:
                raise ConvergenceError(
                    f"the equilibrium enthalpy falls with temperature between {high.T:g} K and {low.T:g} K "
                    "(a condensed species' data range ends there); no unique outlet temperature: narrow T_bounds "
                    "or leave that species out")
            answer = self._try_phase_boundary(low, high)
            if answer is not None:
                return answer
            width = high.T - low.T
            if width <= 1e-13 * high.T:
                return self._give_up(low, high)
            T, newton = self._next_inside(point, previous, low, high)
            previous = point if newton else None
        raise ConvergenceError(
            f"the outlet temperature search did not close the energy balance in {_MAX_EVALUATIONS} fixed-T solves "
            f"(last bracket {low.T if low else self.T_low:g} K to {high.T if high else self.T_high:g} K); "
            "try method='convex' or narrower T_bounds"
        )

    def _extend(self, point: _Point) -> float:
        """Next temperature while the root is not yet bracketed: a Newton step that stops at the bounds
        and at the first end of a condensed species' data range on its way.

        A condensed species cannot form outside its data range, so H_eq(T) may
        jump there; stepping over such a temperature could miss the root.
        """
        if point.f < 0 and point.T >= self.T_high or point.f > 0 and point.T <= self.T_low:
            raise self.no_root(point)
        T = point.T - point.f / point.cp if np.isfinite(point.cp) and point.cp > 0 else math.nan
        if not math.isfinite(T):
            T = self.T_high if point.f < 0 else self.T_low
        T = min(max(T, self.T_low), self.T_high)
        crossed = [b for b in self.breakpoints if min(point.T, T) < b < max(point.T, T)]
        if crossed:
            T = min(crossed) if T > point.T else max(crossed)
        return T

    def _next_inside(self, point: _Point, previous: _Point | None, low: _Point,
                     high: _Point) -> tuple[float, bool]:
        """A Newton step from the latest point, or bisection when it leaves the bracket or the
        previous Newton step did not halve |f|; says which it took."""
        T = point.T - point.f / point.cp if np.isfinite(point.cp) and point.cp > 0 else math.nan
        stalled = previous is not None and abs(point.f) > 0.5 * abs(previous.f)
        if not low.T < T < high.T or stalled:
            return 0.5 * (low.T + high.T), False
        return T, True

    def _try_phase_boundary(self, low: _Point, high: _Point):
        """Solve on the union of the phase sets of the bracket's ends, if they differ."""
        if low.phases == high.phases:
            return None
        narrow = high.T - low.T < 1e-6 * high.T
        if self.phase_set_tries >= _PHASE_SET_TRIES and not narrow:
            return None
        self.phase_set_tries += 1
        settled = sensitivity.settle_on_phase_set(
            self.setup, low.problem, low.result, high.result, low.T, high.T, low.f, high.f,
            self.H_target, self.P, self.residual_enthalpy, self.allow_extrapolation)
        if settled is None:
            return None
        eq, problem, result = settled
        if not eq.certificate.certified:
            return None
        system = self.setup.system
        point = _Point(eq.T, eq, problem, result,
                       enthalpy(system.table, system.n_gas, state_amounts(self.setup, eq), eq.T, self.P,
                                self.residual_enthalpy), math.nan, math.nan)
        point = replace(point, f=point.H - self.H_target)
        if not self.converged(point) or not low.T - sensitivity.PHASE_BOUNDARY_SLACK <= eq.T \
                <= high.T + sensitivity.PHASE_BOUNDARY_SLACK:
            return None
        extras = {}
        if sensitivity.fixes_temperature(self.setup, problem, result):
            names = system.condensed_names
            kept = problem.keep[problem.n_gas:] - system.n_gas
            extras["phase_boundary"] = {
                "T_K": eq.T,
                "phases_below": sorted(names[kept[c]] for c in low.phases),
                "phases_above": sorted(names[kept[c]] for c in high.phases),
                "note": "the coexisting phases fix T at this pressure; the heat sets only their amounts",
            }
        return self.finish(point, extras)

    def _give_up(self, low: _Point, high: _Point):
        best = min((low, high), key=lambda p: abs(p.f))
        if self.converged(best, _ACCEPTABLE):
            return self.finish(best)
        if low.phases != high.phases:
            raise ConvergenceError(
                f"the equilibrium enthalpy jumps by {high.f - low.f:.6g} J at T = {high.T:.9g} K, where the phases "
                "change, and no coexistence of the two phase sets balances the energy; "
                "try method='convex', or leave one of the condensed species out")
        raise ConvergenceError(
            f"the outlet temperature is pinned to {high.T:.9g} K but the energy balance is still off by "
            f"{abs(best.f):.3g} J; try method='convex'")


# ----------------------------------------------------------------------------- results

def energy_extras(setup: Setup, eq: Equilibrium, P: float, inlet: Inlet | None, H_in: float | None,
                  heat: float, residual_enthalpy: ResidualEnthalpy | None = None,
                  inlet_gross: float = 0.0) -> dict[str, object]:
    """The energy figures of a result: outlet enthalpy and entropy, and with an inlet the duty and balance."""
    system = setup.system
    n = state_amounts(setup, eq)
    H_out = enthalpy(system.table, system.n_gas, n, eq.T, P, residual_enthalpy)
    extras: dict[str, object] = {
        "enthalpy_J": H_out,
        "entropy_J_per_K": entropy(system.table, system.n_gas, n, eq.T, P),
    }
    if inlet is None or H_in is None:
        return extras
    # "T and P", or "T and P; <held reactions>" for a restricted equilibrium: the duty is what T needs.
    duty = H_out - H_in if eq.specification.startswith("T and P") else heat
    scale = enthalpy_scale(setup, n, eq.T, inlet_gross, duty)
    extras.update({
        "feed_temperatures_K": inlet.temperatures,
        "feed_enthalpy_J": H_in,
        "duty_W": duty,
        "duty_sign_convention": SIGN_CONVENTION,
        "energy_balance_residual": abs(H_out - H_in - duty) / scale,
    })
    return extras


def with_extras(eq: Equilibrium, extras: Mapping[str, object]) -> Equilibrium:
    return replace(eq, extras={**eq.extras, **extras})
