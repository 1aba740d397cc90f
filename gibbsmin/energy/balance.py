"""Fixed enthalpy and pressure: the outlet temperature the energy balance sets, phase plateaus included."""

from __future__ import annotations

import math
import warnings
from collections.abc import Mapping
from dataclasses import dataclass, replace

import numpy as np
from numpy.typing import NDArray

from .. import sensitivity
from . import phase_boundary
from ..equilibrium import Equilibrium
from ..errors import ConvergenceError, InputError
from ..fixed_step import Setup, checked, solve_fixed
from ..solve import SolverResult
from ..solve import _enthalpy_kernel as enthalpy_kernel
from ..system import Problem
from ..thermo.nasa7 import Nasa7Table, R
from .enthalpy_newton import ENTHALPY_NEWTON, PATH_KEY, SEARCH, equilibrium_heat_capacity, solve_at_fixed_enthalpy
from .properties import (FixedTStep, PhaseSetStep, ResidualEnthalpy, enthalpy, heat_capacity, state_amounts,
                         state_enthalpy)


#: The energy balance is solved to this fraction of the gross enthalpy (see ``enthalpy_scale``).
_TOLERANCE = 1e-11
#: An answer is still accepted at this closure when the bracket cannot shrink any further.
_ACCEPTABLE = 1e-9
_MAX_EVALUATIONS = 120
#: A kink of the gas model's enthalpy inside the bracket is probed once the bracket is this narrow, [-] of T.
_KINK_PROBE_WIDTH = 1e-2
#: The probes sit this far either side of the kink, [-] of T.
_KINK_PROBE_OFFSET = 1e-10
#: The equilibrium heat capacity beside a kink is the slope of H over this span on the nearer side, [-] of T.
_KINK_SLOPE_SPAN = 1e-4
#: Phase-set solves tried while the bracket is wide (one more is always tried once it is narrow).
_PHASE_SET_TRIES = 3


def frozen_temperature(table: Nasa7Table, n: NDArray[np.float64], H: float, bounds: tuple[float, float]) -> float:
    """Temperature at which an unreacted mixture has enthalpy H, [K] (a first guess of the outlet)."""
    low, high = bounds
    return float(enthalpy_kernel.frozen_temperature(table.low, table.high, table.T_mid,
                                                    np.ascontiguousarray(n, dtype=float), float(H), float(low),
                                                    float(high)))


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
    phase_set_solve: bool = True,
    phase_set_step: PhaseSetStep | None = None,
    enthalpy_kinks: Mapping[str, float] | None = None,
    plain_ideal_gas: bool | None = None,
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
        The fixed-T solve to iterate on; ``fixed_step.solve_fixed`` on the ideal
        gas by default.  A non-ideal gas model passes its own.
    phase_set_solve : bool
        Where the bracket's ends differ in phases, solve on their union with T
        unknown (``phase_boundary.solve_on_phase_boundary``).  That solve knows only
        the plain standard potentials: a step that shifts them (a reaction
        held at an approach) passes False and is bisected instead.
    phase_set_step : callable, optional
        That solve; ``phase_boundary.solve_on_phase_boundary`` on the ideal gas by
        default.  A non-ideal gas model passes its own, which holds the same
        ln phi and residual enthalpy as ``step``.
    enthalpy_kinks : mapping, optional
        Species to the temperature [K] where the gas model's enthalpy of a gas
        holding it jumps (``GasPhase.enthalpy_kinks``).  An outlet whose
        energy balance falls inside such a jump is pinned there, with a
        warning and ``extras["enthalpy_kink"]``.
    plain_ideal_gas : bool, optional
        Whether ``step`` is the ideal gas with the plain standard potentials
        (no ln phi, no offsets of held reactions); by default, whether
        ``step`` is omitted.  Then the T-unknown Newton
        (``enthalpy_newton.solve_at_fixed_enthalpy``) is tried first, and its
        answer taken where it certifies and closes the balance.

    Returns
    -------
    (Equilibrium, Problem, SolverResult)
        The answer (``specification`` "H and P", ``extras["T_evaluations"]``,
        ``extras["energy_balance_path"]`` (the T-unknown Newton, or the
        temperature search), and ``extras["phase_boundary"]`` when T sits on
        a two-phase plateau).

    Raises
    ------
    InputError
        No temperature inside ``T_bounds`` balances the energy.
    ConvergenceError
        The search did not close the balance.
    """
    if plain_ideal_gas is None:
        plain_ideal_gas = step is None
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
    T_start = min(max(T_guess, T_bounds[0]), T_bounds[1])
    if plain_ideal_gas and method in ("auto", "newton") and residual_enthalpy is None and phase_set_step is None \
            and not enthalpy_kinks:
        answer = _by_enthalpy_newton(setup, H_target, P, T_start, T_bounds, scale, allow_extrapolation)
        if answer is not None:
            return answer
    search = _Search(setup, H_target, P, T_bounds, scale, residual_enthalpy, step, allow_extrapolation,
                     phase_set_solve, phase_set_step, enthalpy_kinks)
    return search.run(T_start)


def _by_enthalpy_newton(setup: Setup, H_target: float, P: float, T_start: float, T_bounds: tuple[float, float],
                        scale: float, allow_extrapolation: bool) -> tuple[Equilibrium, Problem, SolverResult] | None:
    """The T-unknown Newton's answer where it certifies and closes the balance as the search would; else None."""
    solved = solve_at_fixed_enthalpy(setup, H_target, P, T_start, T_bounds, allow_extrapolation)
    if solved is None:
        return None
    eq, problem, result = solved
    system = setup.system
    n = state_amounts(setup, eq)
    miss = enthalpy(system.table, system.n_gas, n, eq.T, P) - H_target
    if not abs(miss) <= _TOLERANCE * enthalpy_scale(setup, n, eq.T, scale, 0.0):
        return None
    # Two fixed-T solves inside the kernel: at the start, and at the temperature found.
    return replace(eq, extras={**eq.extras, "T_evaluations": 2, PATH_KEY: ENTHALPY_NEWTON}), problem, result


def _phase_names(eq) -> tuple[str, ...]:
    """The phases present in an answer: its condensed species and fluid phases, by name."""
    fluid = tuple(p.name for p in eq.fluid_phases) if eq.fluid_phases is not None else ()
    return tuple(sorted(s for s, n in eq.condensed.items() if n > 0.0)) + fluid


class _Search:
    """The bracketed search for the outlet temperature (one instance per solve)."""

    def __init__(self, setup, H_target, P, T_bounds, scale, residual_enthalpy, step, allow_extrapolation,
                 phase_set_solve=True, phase_set_step=None, enthalpy_kinks=None):
        self.setup, self.H_target, self.P = setup, H_target, P
        self.enthalpy_kinks = dict(enthalpy_kinks or {})
        self.phase_set_solve = phase_set_solve
        self.phase_set_step = phase_set_step
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
        H = state_enthalpy(self.setup, eq, self.P, self.residual_enthalpy)
        cp = equilibrium_heat_capacity(self.setup, problem, result, T, self.P)
        point = _Point(T, eq, problem, result, H, H - self.H_target, self._slope(T, H, cp, eq))
        self.points.append(point)
        return point

    def _slope(self, T: float, H: float, cp: float, eq) -> float:
        """dH/dT the next step takes: the ideal-gas equilibrium heat capacity, or with a cubic (whose residual
        enthalpy that heat capacity leaves out) the secant to the nearest earlier point on the same phase set,
        where it is positive, so that the steps close in superlinearly instead of by the residual's share."""
        nonideal = self.residual_enthalpy is not None or eq.fluid_phases is not None
        same = [p for p in self.points if p.T != T and _phase_names(p.eq) == _phase_names(eq)]
        if not nonideal or not same:
            return cp
        near = min(same, key=lambda p: abs(p.T - T))
        secant = (H - near.H) / (T - near.T)
        return secant if math.isfinite(secant) and secant > 0.0 else cp

    def converged(self, point: _Point, tolerance: float = _TOLERANCE) -> bool:
        scale = enthalpy_scale(self.setup, state_amounts(self.setup, point.eq), point.T, self.scale, 0.0)
        return abs(point.f) <= tolerance * scale

    def finish(self, point: _Point, extras: Mapping[str, object] | None = None):
        eq = replace(point.eq, specification="H and P",
                     extras={**point.eq.extras, "T_evaluations": len(self.points), PATH_KEY: SEARCH,
                             **(extras or {})})
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
            kink = self._kink_inside(low, high)
            if kink is not None:
                probe = self._kink_probe(kink, low, high)
                if probe is None:
                    return self._on_kink(kink, low, high)
                T, previous = probe, None
                continue
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
        if low.phases == high.phases or not self.phase_set_solve:
            return None
        narrow = high.T - low.T < 1e-6 * high.T
        if self.phase_set_tries >= _PHASE_SET_TRIES and not narrow:
            return None
        self.phase_set_tries += 1
        solve = self.phase_set_step or phase_boundary.solve_on_phase_boundary
        settled = solve(
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
        if not self.converged(point) or not low.T - phase_boundary.PHASE_BOUNDARY_SLACK <= eq.T \
                <= high.T + phase_boundary.PHASE_BOUNDARY_SLACK:
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

    def _kink_inside(self, low: _Point, high: _Point) -> tuple[str, float] | None:
        """The species and temperature of a kink of the gas model's enthalpy in a narrow bracket, if any.

        Where a species' Soave alpha passes its minimum the model's enthalpy
        jumps upward with T (``CubicModel.alpha_minimum_temperatures``); an
        energy balance that falls inside the jump has no root but the kink.
        """
        if high.T - low.T > _KINK_PROBE_WIDTH * high.T:
            return None
        gas = low.eq.amounts
        inside = [(T_k, name) for name, T_k in self.enthalpy_kinks.items()
                  if low.T <= T_k <= high.T and gas.get(name, 0.0) > 0.0]
        return (min(inside)[1], min(inside)[0]) if inside else None

    def _kink_probe(self, kink: tuple[str, float], low: _Point, high: _Point) -> float | None:
        """The next temperature just beside the kink that the bracket has not reached, or None."""
        T_k = kink[1]
        offset = _KINK_PROBE_OFFSET * T_k
        if low.T < T_k - offset:
            return T_k - offset
        if high.T > T_k + offset:
            return T_k + offset
        return None

    def _on_kink(self, kink: tuple[str, float], low: _Point, high: _Point):
        """The outlet pinned at a kink of the gas model's enthalpy that the target falls inside.

        At constant composition the model's G(T) bends there (the mixing rule's
        |m| of that species), so H and S jump upward as at a latent heat, and
        every enthalpy inside the jump belongs to that one temperature; the
        composition is continuous.  The real gas has no such jump: it is the
        alpha function's, and how far a smooth one would move the outlet is
        about the target's distance from the nearer side over the equilibrium
        heat capacity there (``extras["energy_balance_miss_K"]``), which is
        the slope of the model's own H_eq(T) on that side: the residual heat
        capacity and the shift of the composition with T included.
        """
        species, T_k = kink
        point = self.evaluate(T_k)
        if not point.eq.certificate.certified:
            return self._give_up(low, high)
        side = low if abs(low.f) <= abs(high.f) else high
        span = _KINK_SLOPE_SPAN * T_k * (-1.0 if side is low else 1.0)
        beyond = self.evaluate(side.T + span)
        cp = (beyond.f - side.f) / span
        if not cp > 0.0:
            cp = heat_capacity(self.setup.system.table, state_amounts(self.setup, point.eq), T_k)
        nearer = abs(side.f)
        miss_K = nearer / cp
        jump = high.f - low.f
        warnings.warn(
            f"the enthalpy of the gas model jumps by {jump:.3g} J at {T_k:.9g} K, where the Soave alpha of "
            f"{species} passes its minimum (a kink of the cubic's alpha function, which the real gas does not "
            f"have): the outlet is pinned there, {nearer:.3g} J ({miss_K:.2g} K on the outlet) from the nearer "
            "side of the jump", RuntimeWarning, stacklevel=5)
        return self.finish(point, {"energy_balance_miss_K": miss_K, "enthalpy_kink": {
            "T_K": T_k, "species": species, "jump_J": jump, "below_J": low.f, "above_J": high.f,
            "note": f"the cubic's enthalpy jumps where the Soave alpha of {species} passes its minimum; every "
                    "enthalpy inside the jump belongs to this temperature (below_J and above_J: the enthalpy "
                    "just below and above it less the target)"}})

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
            f"{abs(best.f):.3g} J: the equilibrium enthalpy jumps by {abs(high.f - low.f):.3g} J there. With a "
            "cubic gas model that is its vapour root giving way to a liquid-like one (the gas would condense, "
            "which gibbsmin does not model): raise the feed temperature or lower the pressure; otherwise try "
            "method='convex'")
