"""Liquid-solution phases with the gas's own cubic: the reactive flash at fixed T and P.

With one cubic for every fluid phase, each fluid phase a (the gas, a liquid,
a second liquid) uses the ideal-gas standard state and its own root of the
equation of state,

    mu_j,a/RT = g0_j/RT + ln(P/P0) + ln x_j,a + ln phi_j(T, P, x_a; root of a),

so no liquid standard-state data are needed.  With phi held fixed per phase
the problem is convex again, and at its optimum every species present in a
phase has mu_j,a/RT = a_j . pi: with pi the element potentials,

    x_j,a = exp(a_j . pi - mu0_j - ln phi_j,a),   sum_j x_j,a = 1 for every present phase a,

and the element balance sum_a sum_j a_kj N_a x_j,a + (pure condensed) = b_k.
``_frozen_phi_split`` solves these M + F (+ condensed) equations in the
element potentials and the logarithms of the phase amounts N_a by a damped
Newton method in log space (amounts are exponentials: traces stay exact);
the outer loop re-evaluates each phase's phi at its own composition and root
(the gas: the vapour root; a liquid: the root of least Gibbs energy) until
ln phi settles, as the one-gas loop does.

Phase management: the one-gas answer is tested first (``eos.stability``);
where the tangent-plane test finds a negative distance, a liquid is started
from the composition the test found.  A phase whose amount vanishes is
dropped; two phases that settle on one composition are merged (no trivial
split is reported as two phases); the final phase set is tested again, and a
further phase is added where the test still finds one (at most as many fluid
phases as there are fluid species).

Species without critical constants (radicals, atoms) stay in the gas: the
cubic has nothing to say of them in a liquid.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from ..eos.cubic import LEAST_GIBBS_ROOT, VAPOUR_ROOT, single_ln_phi
from ..eos.phase import GasPhase
from ..eos.stability import tangent_plane_test
from .stability import stability_and_trial
from ..equilibrium import Equilibrium, FluidPhase
from ..errors import ConvergenceError
from ..compiled import compiled
from ..fixed_step import Setup, fixed_problem
from ..frozen import replaced
from ..solve._newton_kernel import _lu_solve
from ..solve import SolverResult
from ..solve.certificate import Certificate, Tolerances
from ..system import Problem
from ..thermo.nasa7 import R
from .loop import _anderson_step, gas_model_extras

#: Outer-loop tolerance on ln phi of every phase [-] and its pass limit.
PHI_TOLERANCE = 1e-10
MAX_PASSES = 200
#: Past passes the Anderson acceleration combines.
_MEMORY = 3
#: A phase holding less than this share of the fluid amount is dropped [-].
VANISHED = 1e-12
#: A phase the inner Newton has driven below this share of the fluid, without converging, is leaving [-].
_LEAVING = 1e-8
#: Two phases closer than this in every mole fraction are one phase [-].
SAME_COMPOSITION = 1e-6
#: Inner Newton: the residual tolerance (element rows relative to the totals) and its iteration limit.
_INNER_TOLERANCE = 1e-13
_INNER_ITERATIONS = 200
#: Largest change of a potential or of a log amount in one inner step [-].
_MAX_STEP = 2.0


@dataclass(frozen=True)
class FluidSplit:
    """The fluid phases of an answer, in the System's gas-species order.

    Attributes
    ----------
    names : tuple of str
        "gas", "liquid", "liquid 2", ... (the gas first when there is one).
    amounts : ndarray, shape (phases, gas species)
        Amount of each species in each phase, [mol].
    ln_phi : ndarray, shape (phases, gas species)
        ln phi of each species in each phase at its composition and root [-].
    compressibility : tuple of float
        Z of each phase [-].
    passes : int
        Frozen-phi solves of the outer loop.
    stability_distance : float
        The lowest tangent-plane distance the test of the final phases found (>= -1e-8: no further phase).
    """

    names: tuple[str, ...]
    amounts: NDArray[np.float64]
    ln_phi: NDArray[np.float64]
    compressibility: tuple[float, ...]
    passes: int
    stability_distance: float = 0.0

    def stability_record(self) -> dict[str, object]:
        """The one-phase stability record of the answer (as ``nonideal.gas_stability`` gives one), for its
        certificate and reports."""
        listed = " and ".join(self.names)
        return {"tested": True, "stable": True, "distance": self.stability_distance, "would_form": None,
                "note": f"{len(self.names)} fluid phases ({listed}); the tangent-plane test of the final phases "
                        "finds no further phase"}


@dataclass
class _Phase:
    """A fluid phase while the loop runs: which species it may hold, its ln phi, its amount."""

    liquid: bool
    allowed: NDArray[np.bool_]        # kept gas species it may hold
    ln_phi: NDArray[np.float64]       # over the kept gas species
    ln_N: float
    Z: float = math.nan               # the root at which ln_phi was last evaluated


def solve_fluid_phases(setup: Setup, T: float, P: float, phase: GasPhase, *, one_gas: Equilibrium,
                       one_gas_result: SolverResult, offsets: NDArray[np.float64] | None = None,
                       allow_extrapolation: bool = False, seed: Sequence[FluidPhase] | None = None
                       ) -> tuple[Equilibrium, FluidSplit] | None:
    """The equilibrium with as many fluid phases as the cubic finds, or None when the one gas is stable.

    Parameters
    ----------
    setup : Setup
    T, P : float
        [K], [Pa].
    phase : GasPhase
        The cubic of the set's gas species (``eos.phase.gas_phase``).
    one_gas, one_gas_result : Equilibrium, SolverResult
        The one-gas answer at the same T and P (``nonideal.solve_nonideal``): the start, and the gas the
        stability test is run on.
    offsets : ndarray, optional
        As for ``fixed_step.solve_fixed`` (held reactions).
    seed : sequence of FluidPhase, optional
        A neighbouring answer's fluid phases (a sweep's warm start): the split starts at their compositions,
        each phase's phi taken at this T and P, and skips the one gas's stability test; where that start settles
        on one phase (or does not settle), the split starts cold as without it.

    Returns
    -------
    (Equilibrium, FluidSplit) or None
        The answer (``amounts`` the totals per species, ``ln_gas_amounts`` the gas phase's, its certificate
        over every phase) and the split; None when the one gas is stable (nothing to add).
    """
    if seed is not None and len(seed) > 1:
        context = _Context.of(setup, T, P, phase, one_gas_result, offsets, allow_extrapolation)
        try:
            found = context.split(_seeded_phases(context, seed, one_gas_result), one_gas, seeded=True)
        except ConvergenceError:
            found = None   # the cold start below decides
        if found is not None:
            return found
    trial = _trial_liquid(phase, one_gas, T, P)
    if trial is None:
        return None
    context = _Context.of(setup, T, P, phase, one_gas_result, offsets, allow_extrapolation)
    gas = context.gas_of(one_gas_result)
    liquid = _new_liquid(context.cubic, trial[context.keep_gas], context.liquid_allowed, phases_ln_N=gas.ln_N)
    return context.split([gas, liquid], one_gas)


@dataclass
class _Context:
    """What every pass of one solve shares: the problem, its kept gas species, which of them a liquid may hold,
    the cubic at T and P, and the start of the potentials and condensed phases (the one-gas answer's)."""

    setup: Setup
    phase: GasPhase
    problem: Problem
    keep_gas: NDArray[np.int_]
    liquid_allowed: NDArray[np.bool_]
    cubic: "_PhaseCubic"
    pi: NDArray[np.float64]
    present_c: NDArray[np.bool_]

    @classmethod
    def of(cls, setup, T, P, phase, one_gas_result, offsets, allow_extrapolation) -> "_Context":
        problem = fixed_problem(setup, T, P, offsets=offsets, allow_extrapolation=allow_extrapolation)
        keep_gas = problem.keep[: problem.n_gas]
        described = np.zeros(setup.system.n_gas, dtype=bool)
        described[phase.described] = True
        return cls(setup, phase, problem, keep_gas, described[keep_gas], _PhaseCubic.of(phase, keep_gas, T, P),
                   one_gas_result.pi[0].copy(), one_gas_result.present[0].copy())

    def gas_of(self, one_gas_result: SolverResult) -> _Phase:
        """The one-gas answer's gas as the first fluid phase."""
        ln_n = one_gas_result.ln_n_gas[0]
        gas = _Phase(False, np.ones(self.problem.n_gas, dtype=bool), np.zeros(self.problem.n_gas),
                     float(np.log(np.exp(ln_n).sum())))
        gas.ln_phi = self.cubic.evaluate([gas], np.exp(ln_n - ln_n.max())[None, :])[0]
        return gas

    def split(self, phases: list[_Phase], one_gas: Equilibrium, seeded: bool = False
              ) -> tuple[Equilibrium, FluidSplit] | None:
        """The settled split from these phases, phases added while the final test finds one; None where a seeded
        start settles on one phase (the caller then starts cold, from the one gas's stability test)."""
        problem, cubic = self.problem, self.cubic
        pi, present_c = self.pi, self.present_c
        n_c = np.zeros(problem.n_species - problem.n_gas)
        passes = 0
        for _ in range(3):  # at most two phases added after the first split settles
            phases, pi, n_c, present_c, passes = _settle(problem, cubic, phases, pi, n_c, present_c, passes)
            if seeded and len(phases) < 2:
                return None
            added, distance = _added_phase(self.phase, cubic, problem, phases, pi, self.keep_gas,
                                           self.liquid_allowed, self.setup.system.n_gas)
            if added is None:
                break
            phases.append(added)
        return _answer(self.setup, problem, self.phase, phases, pi, n_c, present_c, self.keep_gas, cubic.T, cubic.P,
                       one_gas, passes, self.phase.model, distance)


def _seeded_phases(context: _Context, seed: Sequence[FluidPhase], one_gas_result: SolverResult) -> list[_Phase]:
    """Phases started at a neighbouring answer's compositions, each evaluated at this T and P, with the amounts
    scaled to this point's fluid total."""
    gas_names = [context.setup.system.gas_names[j] for j in context.keep_gas]
    ln_n = one_gas_result.ln_n_gas[0]
    scale = float(np.log(np.exp(ln_n).sum())) - float(np.log(sum(p.amount for p in seed)))
    phases = []
    for fluid in seed:
        liquid = fluid.name != "gas"
        x = np.array([fluid.amounts.get(name, 0.0) for name in gas_names])
        allowed = context.liquid_allowed.copy() if liquid else np.ones(len(gas_names), dtype=bool)
        found = _Phase(liquid, allowed, np.zeros(len(gas_names)), float(np.log(x.sum())) + scale)
        found.ln_phi = context.cubic.evaluate([found], x[None, :])[0]
        phases.append(found)
    return phases


class _PhaseCubic:
    """The cubic of one solve at its T and P, evaluated on the kept gas species of every phase at once.

    The mixing parameters at T are taken once, and each pass of the outer loop evaluates all phases in one
    compiled call (each phase on its own root), where a call per phase cost more than the cubic itself.
    """

    def __init__(self, parameters, family, place: NDArray[np.int_], T: float, P: float):
        self.parameters = parameters
        self.delta1, self.delta2 = family.delta1, family.delta2
        self.place = place
        self.T, self.P = T, P

    @classmethod
    def of(cls, phase: GasPhase, keep_gas: NDArray[np.int_], T: float, P: float) -> "_PhaseCubic":
        # place[j]: the model's index of kept gas species j, -1 where the cubic does not describe it.
        in_model = np.full(len(phase.gas_names), -1, dtype=np.int64)
        in_model[phase.described] = np.arange(len(phase.described))
        model = phase.model
        return cls(model.mixing_parameters(float(T)), model.family, np.ascontiguousarray(in_model[keep_gas]),
                   float(T), float(P))

    def evaluate(self, phases: list[_Phase], x: NDArray[np.float64]) -> NDArray[np.float64]:
        """ln phi (phases x kept gas species; 0 where undescribed) of phases whose compositions are the rows of
        x (any positive scale), each on its root (a liquid: least Gibbs energy; the gas: vapour); each phase's
        Z is set."""
        roots = np.array([LEAST_GIBBS_ROOT if p.liquid else VAPOUR_ROOT for p in phases], dtype=np.int64)
        ln_phi = np.empty(x.shape)
        Z = np.empty(len(phases))
        _phases_ln_phi(*self.parameters, np.ascontiguousarray(x, dtype=float), roots, self.place, self.T, self.P,
                       self.delta1, self.delta2, ln_phi, Z)
        for p, value in zip(phases, Z):
            p.Z = float(value)
        return ln_phi


@compiled()
def _phases_ln_phi(sqrt_a, b_i, one_minus_k, has_k, x, roots, place, T, P, delta1, delta2, ln_phi, Z):
    """ln phi and Z of each row of x (kept gas species; ``place`` their model indices, -1 for none) on its root
    (written into ln_phi and Z)."""
    F, G = x.shape
    y = np.empty(sqrt_a.shape[0])
    for a in range(F):
        y[:] = 0.0
        total = 0.0
        for j in range(G):
            if place[j] >= 0:
                y[place[j]] += x[a, j]
                total += x[a, j]
        for i in range(y.shape[0]):
            y[i] /= total
        found, _, root = single_ln_phi(sqrt_a, b_i, one_minus_k, has_k, y, T, P, delta1, delta2, roots[a])
        for j in range(G):
            ln_phi[a, j] = found[place[j]] if place[j] >= 0 else 0.0
        Z[a] = root


def _system_gas(values: NDArray[np.float64], keep_gas: NDArray[np.int_], n_gas: int) -> NDArray[np.float64]:
    """Values over the kept gas species placed on the System's gas species (zero elsewhere)."""
    full = np.zeros(n_gas)
    full[keep_gas] = values
    return full


def _trial_liquid(phase: GasPhase, eq: Equilibrium, T: float, P: float) -> NDArray[np.float64] | None:
    """The composition (System gas order) of the phase the one-gas answer would split off, or None (stable, far
    above every critical temperature present, or a pure condensate the answer already holds)."""
    return stability_and_trial(phase, eq)[1]


def _new_liquid(cubic: _PhaseCubic, x: NDArray[np.float64], allowed: NDArray[np.bool_], phases_ln_N: float
                ) -> _Phase:
    """A liquid of composition x (kept gas species), started at a thousandth of the gas (``phases_ln_N`` its log
    amount): the element balance then takes it where it belongs."""
    liquid = _Phase(True, allowed.copy(), np.zeros(x.size), phases_ln_N + np.log(1e-3))
    liquid.ln_phi = cubic.evaluate([liquid], x[None, :])[0]
    return liquid


def _compositions(problem: Problem, phases: list[_Phase], pi: NDArray[np.float64]) -> NDArray[np.float64]:
    """ln x of each kept gas species in each phase at the potentials pi (-inf where a phase may not hold it)."""
    G = problem.n_gas
    potential = pi @ problem.A[:, :G] - problem.mu0[0, :G]
    return np.where([p.allowed for p in phases], potential - np.array([p.ln_phi for p in phases]), -np.inf)


def _split_arrays(problem: Problem) -> tuple[NDArray[np.float64], ...]:
    """The problem's gas and condensed element columns, element totals and mu0/RT, as the split kernel takes
    them (made once per loop, not per pass)."""
    G = problem.n_gas
    A = np.asarray(problem.A, dtype=float)
    mu0 = problem.mu0[0]
    return (np.ascontiguousarray(A[:, :G]), np.ascontiguousarray(A[:, G:]), np.ascontiguousarray(problem.b[0]),
            np.ascontiguousarray(mu0[:G]), np.ascontiguousarray(mu0[G:]))


def _frozen_phi_split(arrays: tuple[NDArray[np.float64], ...], phases: list[_Phase], pi: NDArray[np.float64],
                      n_c: NDArray[np.float64], present_c: NDArray[np.bool_]
                      ) -> tuple[NDArray[np.float64], NDArray[np.float64], NDArray[np.float64], bool]:
    """Element potentials and phase amounts with every phase's ln phi held: a damped Newton in (pi, ln N, n_c).

    Returns the potentials, the condensed amounts, the phases' mole fractions at those potentials (phases x
    kept gas species) and whether the iteration converged; the phases' ``ln_N`` are updated in place.
    """
    ln_N = np.array([p.ln_N for p in phases])
    pi, n_c = pi.copy(), n_c.copy()
    x = np.zeros((len(phases), arrays[0].shape[1]))
    converged = _split_newton(*arrays, np.array([p.ln_phi for p in phases]), np.array([p.allowed for p in phases]),
                              np.ascontiguousarray(present_c), ln_N, pi, n_c, x, _INNER_TOLERANCE,
                              _INNER_ITERATIONS, _MAX_STEP)
    for p, value in zip(phases, ln_N):
        p.ln_N = float(value)
    return pi, n_c, x, bool(converged)


@compiled()
def _split_newton(A_g, A_c, b, mu0_g, mu0_c, ln_phi, allowed, present_c, ln_N, pi, n_c, x, tolerance,
                  max_iterations, max_step):
    """The frozen-phi split in compiled loops (ln_N, pi, n_c updated in place, x the mole fractions at the
    potentials returned); True when converged.

    Unknowns pi (M), ln N_a (F), the present condensed amounts; equations: the element balance, each phase's
    mole fractions summing to one, each present condensed species at mu0_c = a_c . pi.
    """
    M, G = A_g.shape
    F = ln_N.shape[0]
    cond = np.flatnonzero(present_c)
    K = M + F + cond.shape[0]
    scale = 0.0
    for k in range(M):
        scale = max(scale, abs(b[k]))
    J = np.empty((K, K))
    rhs = np.empty(K)
    step = np.empty(K)
    for _ in range(max_iterations):
        worst_e = 0.0
        worst_p = 0.0
        worst_c = 0.0
        for a in range(F):
            total = 0.0
            for j in range(G):
                if allowed[a, j]:
                    potential = 0.0
                    for k in range(M):
                        potential += A_g[k, j] * pi[k]
                    x[a, j] = math.exp(potential - mu0_g[j] - ln_phi[a, j])
                else:
                    x[a, j] = 0.0
                total += x[a, j]
            rhs[M + a] = -(total - 1.0)
            worst_p = max(worst_p, abs(total - 1.0))
        J[:, :] = 0.0
        for k in range(M):
            r = -b[k]
            for a in range(F):
                N = math.exp(ln_N[a])
                s_kn = 0.0
                for j in range(G):
                    n = N * x[a, j]
                    r += A_g[k, j] * n
                    s_kn += A_g[k, j] * n
                    for l in range(M):
                        J[k, l] += A_g[k, j] * A_g[l, j] * n
                J[k, M + a] = s_kn
            for i in range(cond.shape[0]):
                r += A_c[k, cond[i]] * n_c[cond[i]]
                J[k, M + F + i] = A_c[k, cond[i]]
                J[M + F + i, k] = -A_c[k, cond[i]]
            rhs[k] = -r
            worst_e = max(worst_e, abs(r))
        for a in range(F):
            for l in range(M):
                s_x = 0.0
                for j in range(G):
                    s_x += x[a, j] * A_g[l, j]
                J[M + a, l] = s_x
        for i in range(cond.shape[0]):
            c = cond[i]
            potential = 0.0
            for k in range(M):
                potential += A_c[k, c] * pi[k]
            rhs[M + F + i] = -(mu0_c[c] - potential)
            worst_c = max(worst_c, abs(mu0_c[c] - potential))
        if worst_e <= tolerance * scale and worst_p <= tolerance and worst_c <= tolerance:
            return True
        if not _lu_solve(J, rhs, step):
            return False
        biggest = 0.0
        for i in range(M + F):
            biggest = max(biggest, abs(step[i]))
        damping = min(1.0, max_step / biggest) if biggest > 0.0 else 1.0
        for k in range(M):
            pi[k] += damping * step[k]
        for a in range(F):
            ln_N[a] += damping * step[M + a]
        for i in range(cond.shape[0]):
            n_c[cond[i]] = max(n_c[cond[i]] + damping * step[M + F + i], 0.0)
    return False


def _settle(problem, cubic, phases, pi, n_c, present_c, passes):
    """The outer loop: frozen-phi splits until every phase's ln phi settles, vanished phases dropped and phases
    of one composition merged."""
    change = np.inf
    xs: list[NDArray[np.float64]] = []
    gs: list[NDArray[np.float64]] = []
    phase_count = len(phases)
    T, P = cubic.T, cubic.P
    arrays = _split_arrays(problem)
    for _ in range(MAX_PASSES):
        passes += 1
        pi, n_c, x, converged = _frozen_phi_split(arrays, phases, pi, n_c, present_c)
        if not converged and len(phases) > 1:
            # A phase on its way out leaves its closure sum_j x_j = 1 as an equation no potentials can meet:
            # drop it and solve again on the phases that hold the mixture.
            total = sum(np.exp(p.ln_N) for p in phases)
            remaining = [p for p in phases if np.exp(p.ln_N) > _LEAVING * total]
            if remaining and len(remaining) < len(phases):
                phases = remaining
                continue
        if not converged:
            raise ConvergenceError(
                f"the split into {len(phases)} fluid phases did not converge at T = {T:g} K, "
                f"P = {P:g} Pa; try a temperature a little further from the mixture's critical region, or "
                "liquid=False for the one-gas answer")
        phases, x = _merged(*_without_vanished(phases, x))
        held = np.concatenate([p.ln_phi for p in phases])
        found = cubic.evaluate(phases, x).ravel()
        allowed = np.concatenate([p.allowed for p in phases])
        previous, change = change, float(np.max(np.abs(np.where(allowed, found - held, 0.0))))
        if change <= PHI_TOLERANCE:
            _assign(phases, found)
            return phases, pi, n_c, present_c, passes
        # Anderson acceleration over the last passes, as the one-gas loop does; a change of the phase set, or a
        # pass that does not contract, starts the history afresh with a half step.
        if len(phases) != phase_count or change >= previous:
            xs, gs = [], []
            phase_count = len(phases)
            _assign(phases, held + 0.5 * (found - held))
            continue
        xs.append(held)
        gs.append(found)
        del xs[: -(_MEMORY + 1)], gs[: -(_MEMORY + 1)]
        _assign(phases, _anderson_step(xs, gs) if len(xs) > 1 else found)
    raise ConvergenceError(
        f"the fluid phases' fugacity coefficients did not settle in {MAX_PASSES} passes at T = {T:g} K, "
        f"P = {P:g} Pa (last change {change:.2e}); the mixture may be near its critical point there")


def _assign(phases: list[_Phase], ln_phi: NDArray[np.float64]) -> None:
    """Each phase's ln phi from one vector of them all, in the phases' order."""
    for k, p in enumerate(phases):
        p.ln_phi = ln_phi[k * p.ln_phi.size:(k + 1) * p.ln_phi.size].copy()


def _without_vanished(phases: list[_Phase], x: NDArray[np.float64]) -> tuple[list[_Phase], NDArray[np.float64]]:
    """The phases (and their rows of mole fractions x) that hold more than ``VANISHED`` of the fluid."""
    amounts = [math.exp(p.ln_N) for p in phases]
    floor = VANISHED * sum(amounts)
    kept = [k for k, amount in enumerate(amounts) if amount > floor] or [0]
    if len(kept) == len(phases):
        return phases, x
    return [phases[k] for k in kept], x[kept]


def _merged(phases: list[_Phase], x: NDArray[np.float64]) -> tuple[list[_Phase], NDArray[np.float64]]:
    """Phases that settled on one composition (the rows of x), as one phase (the amounts added)."""
    kept: list[int] = []
    for k in range(len(phases)):
        twin = next((i for i in kept if np.max(np.abs(x[k] - x[i])) < SAME_COMPOSITION), None)
        if twin is None:
            kept.append(k)
        else:
            phases[twin].ln_N = float(np.logaddexp(phases[twin].ln_N, phases[k].ln_N))
    return [phases[k] for k in kept], x[kept]


def _added_phase(phase: GasPhase, cubic: _PhaseCubic, problem: Problem, phases: list[_Phase],
                 pi: NDArray[np.float64], keep_gas: NDArray[np.int_], liquid_allowed: NDArray[np.bool_],
                 n_gas: int) -> tuple[_Phase | None, float]:
    """A further liquid where the tangent-plane test of the settled first phase still finds one.

    At a settled split every present phase has the same tangent plane, so one
    test suffices; a trial that lands on a present phase's composition is that
    phase, not a new one.
    """
    ln_x = _compositions(problem, phases, pi)
    first = _system_gas(np.exp(ln_x[0]), keep_gas, n_gas)
    part = first[phase.described]
    verdict = tangent_plane_test(phase.model, cubic.T, cubic.P, part / part.sum(), liquid=phases[0].liquid)
    if verdict.stable or len(phases) >= int(liquid_allowed.sum()):
        return None, verdict.distance
    trial = np.zeros(n_gas)
    trial[phase.described] = verdict.trial
    for k in range(len(phases)):
        if np.max(np.abs(trial[keep_gas] - np.exp(ln_x[k]))) < 1e3 * SAME_COMPOSITION:
            return None, 0.0
    return _new_liquid(cubic, trial[keep_gas], liquid_allowed, phases[0].ln_N), verdict.distance


def _answer(setup, problem, phase, phases, pi, n_c, present_c, keep_gas, T, P, one_gas, passes, model,
            distance):
    """The Equilibrium and FluidSplit of a settled set of fluid phases, with its certificate over every phase."""
    system = setup.system
    n_gas = system.n_gas
    ln_x = _compositions(problem, phases, pi)
    order = sorted(range(len(phases)), key=lambda k: phases[k].liquid)   # the gas first
    phases = [phases[k] for k in order]
    ln_x = ln_x[order]
    ln_n = np.array([p.ln_N for p in phases])[:, None] + ln_x          # (F, G kept)
    amounts = np.array([_system_gas(np.exp(row), keep_gas, n_gas) for row in ln_n])
    ln_phi = np.array([_system_gas(p.ln_phi, keep_gas, n_gas) for p in phases])
    names, liquids = [], 0
    for p in phases:
        if p.liquid:
            liquids += 1
            names.append("liquid" if liquids == 1 else f"liquid {liquids}")
        else:
            names.append("gas")
    Z = [p.Z for p in phases]
    split = FluidSplit(tuple(names), amounts, ln_phi, tuple(Z), passes, distance)
    totals = dict(one_gas.amounts)
    for j, name in enumerate(system.gas_names):
        totals[name] = float(amounts[:, j].sum())
    G = problem.n_gas
    kept_c = problem.keep[G:]
    for c, s in enumerate(kept_c):
        totals[system.names[s]] = float(n_c[c]) if present_c[c] else 0.0
    gas_row = names.index("gas") if "gas" in names else None
    ln_gas = {name: -np.inf for name in system.gas_names}
    if gas_row is not None:
        for j, name in enumerate(system.gas_names):
            ln_gas[name] = float(np.log(amounts[gas_row, j])) if amounts[gas_row, j] > 0.0 else -np.inf
    certificate = _certificate(problem, phases, ln_x, pi, n_c, present_c, passes)
    potentials = dict(one_gas.element_potentials)
    lam = pi @ problem.basis
    for k, element in enumerate(system.elements):
        if np.isfinite(potentials.get(element, np.nan)):
            potentials[element] = float(lam[k])
    G_RT = _total_gibbs(problem, ln_n, ln_x, phases, n_c, present_c)
    molar_mass = np.array([r.molar_mass for r in system.records[:n_gas]]) * 1e-3  # kg/mol
    fluid = tuple(
        FluidPhase(name, {s: float(v) for s, v in zip(system.gas_names, amounts[k]) if v > 0.0}, Z[k],
                   Z[k] * R * T / P, float(amounts[k] @ molar_mass / amounts[k].sum()) * P / (Z[k] * R * T),
                   {s: float(np.exp(ln_phi[k, j])) for j, s in enumerate(system.gas_names) if amounts[k, j] > 0.0})
        for k, name in enumerate(names))
    residual_H = residual_S = 0.0
    for k in range(len(names)):
        part = amounts[k][phase.described]
        properties = model.properties(T, P, part / part.sum(), root=Z[k])
        residual_H += float(part.sum() * R * T * properties.H_res_RT)
        residual_S += float(part.sum() * R * properties.S_res_R)
    first = fluid[0]
    state = replaced(one_gas.gas, fugacity_coefficients=dict(first.fugacity_coefficients),
                    compressibility_factor=first.compressibility_factor, residual_enthalpy_J=residual_H,
                    residual_entropy_J_per_K=residual_S, iterations=one_gas.gas.iterations + passes,
                    note=one_gas.gas.note + f"; {len(names)} fluid phases ({', '.join(names)}), each on its own "
                    "root of the cubic (fugacity coefficients and Z above: the first phase's)",
                    stability=split.stability_record())
    eq = replaced(one_gas, amounts=totals, ln_gas_amounts=ln_gas, element_potentials=potentials, G_RT=G_RT,
                 certificate=certificate.with_phase_stability("stable"), fluid_phases=fluid, gas=state,
                 extras={**one_gas.extras, **gas_model_extras(state)})
    return eq, split


def _total_gibbs(problem, ln_n, ln_x, phases, n_c, present_c) -> float:
    mu0 = problem.mu0[0]
    G = problem.n_gas
    total = 0.0
    for k, p in enumerate(phases):
        n = np.exp(ln_n[k])
        there = n > 0.0
        total += float(np.sum(n[there] * (mu0[:G][there] + p.ln_phi[there] + ln_x[k][there])))
    total += float(np.sum(n_c[present_c] * mu0[G:][present_c]))
    return total


def _certificate(problem, phases, ln_x, pi, n_c, present_c, passes) -> Certificate:
    """Residuals over every phase: element balance, equal potentials of each species in every phase it is in,
    the condensed species' margins, and the phase closures."""
    A = problem.A
    G = problem.n_gas
    A_g, A_c = A[:, :G], A[:, G:]
    b = problem.b[0]
    n = np.array([np.exp(p.ln_N + ln_x[k]) for k, p in enumerate(phases)])
    balance = float(np.max(np.abs(A_g @ n.sum(axis=0) + A_c[:, present_c] @ n_c[present_c] - b)) / np.abs(b).max())
    potential = pi @ A_g
    mu0 = problem.mu0[0]
    stationarity = 0.0
    for k, p in enumerate(phases):
        there = p.allowed & np.isfinite(ln_x[k])
        mu = mu0[:G] + p.ln_phi + ln_x[k]
        stationarity = max(stationarity, float(np.max(np.abs(mu - potential)[there], initial=0.0)))
        stationarity = max(stationarity, abs(float(np.exp(ln_x[k][there]).sum()) - 1.0))
    margins = mu0[G:] - pi @ A_c
    absent = problem.allowed[0, G:] & ~present_c
    complementarity = float(np.min(margins[absent], initial=np.inf))
    if present_c.any():
        stationarity = max(stationarity, float(np.max(np.abs(margins[present_c]))))
    tolerances = Tolerances()
    certified = (balance <= tolerances.element_balance and stationarity <= tolerances.stationarity
                 and complementarity >= -tolerances.complementarity)
    return Certificate(balance, stationarity, complementarity, float(np.min(n_c[present_c], initial=np.inf)),
                       "newton+fluid phases", passes, certified)
