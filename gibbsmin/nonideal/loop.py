"""The outer loop: frozen-phi solves repeated until ln phi settles, for one point or a whole batch."""

from __future__ import annotations

import warnings
from dataclasses import dataclass, replace

import numpy as np
from numpy.typing import NDArray

from ..compiled import compiled
from ..eos.phase import GasPhase
from ..equilibrium import Equilibrium, GasModelState
from ..errors import ConvergenceError
from ..fixed_step import Setup, build_problem, fixed_problem, solve_fixed, to_equilibrium
from ..solve import CertificateBatch, SolverResult, certify, solve
from ..solve._newton_kernel import _lu_solve
from ..system import Problem
from ..thermo.nasa7 import R


#: Above this total mole fraction of species treated as ideal for lack of critical constants, warn.
IDEAL_SPECIES_WARNING = 1e-3


@dataclass(frozen=True)
class OuterLoopOptions:
    """Tuning of the fixed-point iteration on ln phi.

    Attributes
    ----------
    tolerance : float
        Converged when max |ln phi(y) - ln phi held fixed| is below this [-].
    max_iterations : int
        Frozen-phi solves allowed before giving up.
    memory : int
        Past passes Anderson acceleration combines (0: plain iteration).
    """

    tolerance: float = 1e-10
    max_iterations: int = 60
    memory: int = 3


def _gas_amounts(problem: Problem, result: SolverResult, n_gas: int) -> NDArray[np.float64]:
    """Gas amounts of a solver answer in the System's gas order, [mol], relative to the largest (no underflow)."""
    ln_n = result.ln_n_gas[0]
    amounts = np.zeros(n_gas)
    amounts[problem.keep[: problem.n_gas]] = np.exp(ln_n - ln_n.max())
    return amounts


def _first_guess(setup: Setup, phase: GasPhase, T: float, P: float, start: SolverResult | None,
                 allow_extrapolation: bool) -> NDArray[np.float64]:
    """ln phi to hold in the first pass: at the warm start's composition, else zero (the ideal gas).

    (ln phi at the feed's composition saves no pass in loop gases: their composition moves too far.)
    """
    if start is not None and np.any(np.isfinite(start.ln_n_gas[0])):  # a start with no gas has no phi
        problem = build_problem(setup, np.array([T]), np.array([P]), allow_extrapolation=allow_extrapolation)
        return phase.ln_phi(T, P, _gas_amounts(problem, start, setup.system.n_gas))
    return np.zeros(setup.system.n_gas)


def _anderson_step(xs: list, gs: list) -> NDArray[np.float64]:
    """Next iterate from the last iterates x_i and their images g_i = F(x_i) (Anderson, 1965, type II).

    Minimises the linearised residual over the affine span of the stored
    residuals f_i = g_i - x_i, and maps the combination through the images.
    """
    return _anderson_kernel(np.array(xs), np.array(gs))


@compiled()
def _anderson_kernel(X, G):
    """:func:`_anderson_step` on the iterates (rows of X) and images (rows of G), compiled: the normal equations
    of at most three columns with a ridge of 1e-14 of their trace (as the batch's acceleration has), where numpy's
    calls cost twenty times the arithmetic and the loops make one every pass. A singular system (no change in
    the residuals at all) gives the plain step g."""
    k, n = X.shape
    m = k - 1
    dF = np.empty((m, n))
    for i in range(m):
        for j in range(n):
            dF[i, j] = (G[i + 1, j] - X[i + 1, j]) - (G[i, j] - X[i, j])
    gram = np.empty((m, m))
    rhs = np.empty(m)
    trace = 0.0
    for i in range(m):
        for l in range(m):
            total = 0.0
            for j in range(n):
                total += dF[i, j] * dF[l, j]
            gram[i, l] = total
        trace += gram[i, i]
        total = 0.0
        for j in range(n):
            total += dF[i, j] * (G[k - 1, j] - X[k - 1, j])
        rhs[i] = total
    ridge = 1e-14 * trace + 1e-300
    for i in range(m):
        gram[i, i] += ridge
    gamma = np.empty(m)
    step = G[k - 1].copy()
    if not _lu_solve(gram, rhs, gamma):
        return step
    for i in range(m):
        for j in range(n):
            step[j] -= (G[i + 1, j] - G[i, j]) * gamma[i]
    return step


def solve_nonideal(
    setup: Setup,
    T: float,
    P: float,
    phase: GasPhase,
    *,
    method: str = "auto",
    offsets: NDArray[np.float64] | None = None,
    start: SolverResult | None = None,
    allow_extrapolation: bool = False,
    specification: str = "T and P",
    options: OuterLoopOptions = OuterLoopOptions(),
) -> tuple[Equilibrium, Problem, SolverResult]:
    """Equilibrium of a prepared setup at T [K] and P [Pa] with the gas described by ``phase``.

    The counterpart of ``fixed_step.solve_fixed`` for a non-ideal gas, with the
    same arguments and returns; for the ideal gas it is ``solve_fixed`` itself.

    Parameters
    ----------
    setup : Setup
    T : float
        Temperature, [K].
    P : float
        Pressure, [Pa].
    phase : GasPhase
        From :func:`gas_phase` on ``setup.system``.
    method, offsets, allow_extrapolation, specification
        As for ``solve_fixed``.
    start : SolverResult, optional
        Warm start (a neighbouring answer on the same setup); ln phi then
        starts from its composition too.
    options : OuterLoopOptions

    Returns
    -------
    (Equilibrium, Problem, SolverResult)
        The answer, the last frozen-phi problem and its raw solver output.
        ``certificate`` is recomputed with phi at the answer's composition
        (its stationarity is the non-ideal residual); ``extras`` holds
        ``fugacity_coefficients`` (species to phi [-]), ``compressibility_factor``
        Z [-], ``residual_enthalpy_J`` [J], ``gas_model_iterations`` (frozen-phi
        solves), ``ln_phi_change`` (the last change [-]) and ``gas_model_note``.
        The answer is not checked here: see ``fixed_step.checked``.

    Raises
    ------
    ConvergenceError
        ln phi did not settle within ``options.max_iterations`` solves.
    """
    if phase.is_ideal:
        return solve_fixed(setup, T, P, method=method, offsets=offsets, start=start,
                           allow_extrapolation=allow_extrapolation, gas_model=phase.name,
                           specification=specification)
    n_gas = setup.system.n_gas
    x = _first_guess(setup, phase, T, P, start, allow_extrapolation)
    # The first pass builds the problem (data ranges, offsets); the later ones change only the gas
    # potentials, by the new ln phi, and re-solve the same problem from the previous answer.
    problem = fixed_problem(setup, T, P, offsets=offsets, ln_phi=x, allow_extrapolation=allow_extrapolation)
    result, certificates = solve(problem, method, start=start)
    kept_gas = problem.keep[: problem.n_gas]
    ideal_mu0 = problem.mu0.copy()
    ideal_mu0[:, : problem.n_gas] -= x[kept_gas]
    xs: list[NDArray[np.float64]] = []
    gs: list[NDArray[np.float64]] = []
    change = np.inf
    for iteration in range(1, options.max_iterations + 1):
        if iteration > 1:
            mu0 = ideal_mu0.copy()
            mu0[:, : problem.n_gas] += x[kept_gas]
            problem = replace(problem, mu0=mu0)
            result, certificates = solve(problem, method, start=result)
        if result.converged[0] and not np.any(np.isfinite(result.ln_n_gas[0])):
            # The condensed phases hold every atom and no gas forms (with phi of the guess): no gas for
            # phi to describe, so the answer stands.
            eq = to_equilibrium(setup, problem, result, certificates, 0, T, P, gas_model=phase.name,
                                specification=specification)
            return eq, problem, result
        n = _gas_amounts(problem, result, n_gas)
        if not np.all(np.isfinite(n)):
            raise ConvergenceError(
                f"the frozen-phi solve at T = {T:g} K, P = {P:g} Pa returned no usable composition "
                f"(solver {result.method[0]}, converged: {bool(result.converged[0])}); try method='convex'")
        g = phase.ln_phi(T, P, n)
        previous, change = change, float(np.max(np.abs(g - x)))
        if change <= options.tolerance:
            eq = to_equilibrium(setup, problem, result, certificates, 0, T, P, gas_model=phase.name,
                                specification=specification)
            return _finish(setup, phase, eq, problem, result, x, g, n, iteration, change), problem, result
        if change >= previous:
            # Not contracting (an extrapolation too far, or a vapour root that jumps): forget the
            # history and take a half step from here.
            xs, gs = [], []
            x = x + 0.5 * (g - x)
            continue
        xs.append(x)
        gs.append(g)
        del xs[: -(options.memory + 1)], gs[: -(options.memory + 1)]
        x = _anderson_step(xs, gs) if len(xs) > 1 else g
    raise ConvergenceError(
        f"the fugacity coefficients did not settle at T = {T:g} K, P = {P:g} Pa: after "
        f"{options.max_iterations} frozen-phi solves ln phi still changes by {change:.2e} "
        f"(tolerance {options.tolerance:g}); the gas may be close to condensing there (the cubic's vapour "
        "root then jumps with composition): try a higher temperature, a lower pressure, or gas='ideal'")


def solve_batch_nonideal(problem: Problem, phase: GasPhase, T: NDArray[np.float64], P: NDArray[np.float64], *,
                         method: str = "auto", chains: int | None = None,
                         options: OuterLoopOptions = OuterLoopOptions()) -> tuple[SolverResult, CertificateBatch]:
    """A batch of frozen-phi solves iterated until every point's ln phi settles (the sweep's non-ideal path).

    ``problem`` is the ideal-gas batch at T [K], P [Pa] (shape (B,)).  Plain
    fixed-point passes over the whole batch, each warm-started from the last;
    the returned certificates are recomputed with ln phi at each point's own
    final composition, and a point whose ln phi has not settled within
    ``options.max_iterations`` passes is not certified.
    """
    n_gas = len(phase.gas_names)
    kept_gas = problem.keep[: problem.n_gas]
    ideal_mu0 = problem.mu0.copy()

    def shifted(ln_phi: NDArray[np.float64]) -> Problem:
        mu0 = ideal_mu0.copy()
        mu0[:, : problem.n_gas] += ln_phi[:, kept_gas]
        return replace(problem, mu0=mu0)

    result, _ = solve(problem, method, chains=chains)
    B = problem.batch_size
    held = np.zeros((B, n_gas))
    settled = np.zeros(B, dtype=bool)
    history = _BatchHistory(options.memory, B)
    for _ in range(options.max_iterations):
        amounts = np.zeros((B, n_gas))
        ln_n = result.ln_n_gas
        with np.errstate(invalid="ignore"):
            amounts[:, kept_gas] = np.exp(ln_n - ln_n.max(axis=1, keepdims=True))
        usable = np.all(np.isfinite(amounts), axis=1)
        amounts[~usable] = 1.0  # a failed point: any composition, it stays uncertified
        found = phase.ln_phi_batch(T, P, amounts)
        settled = usable & (np.max(np.abs(found - held), axis=1) <= options.tolerance)
        if settled.all():
            break
        held = history.next(held, found)
        result, _ = solve(shifted(held), method, start=result, chains=chains)
    certificates = certify(shifted(found), result)
    return result, replace(certificates, certified=certificates.certified & settled)


class _BatchHistory:
    """Anderson acceleration of the batch's passes, every point with its own coefficients.

    As :func:`_anderson_step` for one point: the last ``memory`` + 1 iterates
    and images, and a point whose change stops shrinking forgets its history
    and takes a half step.
    """

    def __init__(self, memory: int, batch_size: int):
        self.memory = memory
        self.xs: list[NDArray[np.float64]] = []
        self.gs: list[NDArray[np.float64]] = []
        self.valid = np.zeros(batch_size, dtype=int)  # usable trailing entries per point
        self.change = np.full(batch_size, np.inf)

    def next(self, x: NDArray[np.float64], g: NDArray[np.float64]) -> NDArray[np.float64]:
        change = np.max(np.abs(g - x), axis=1)
        stalled = change >= self.change
        self.change = change
        self.xs.append(x)
        self.gs.append(g)
        del self.xs[: -(self.memory + 1)], self.gs[: -(self.memory + 1)]
        self.valid = np.where(stalled, 1, np.minimum(self.valid + 1, len(self.xs)))
        step = g.copy()
        k = len(self.xs)
        if k >= 2:
            f = np.stack([gi - xi for xi, gi in zip(self.xs, self.gs)])            # (k, B, n)
            dF, dG = f[1:] - f[:-1], np.diff(np.stack(self.gs), axis=0)             # (k-1, B, n)
            # Differences older than a point's valid history count for nothing there.
            usable = (np.arange(k - 1)[:, None] >= (k - self.valid)[None, :]).astype(float)
            dF, dG = dF * usable[..., None], dG * usable[..., None]
            gram = np.einsum("jbn,kbn->bjk", dF, dF)
            ridge = 1e-14 * np.einsum("bjj->b", gram)[:, None, None] + 1e-300
            gamma = np.linalg.solve(gram + ridge * np.eye(k - 1), np.einsum("jbn,bn->bj", dF, f[-1])[..., None])
            step = g - np.einsum("jbn,bj->bn", dG, gamma[..., 0])
        step[stalled] = x[stalled] + 0.5 * (g[stalled] - x[stalled])
        return step


def _finish(setup: Setup, phase: GasPhase, eq: Equilibrium, problem: Problem, result: SolverResult,
            held: NDArray[np.float64], final: NDArray[np.float64], n: NDArray[np.float64],
            iterations: int, change: float) -> Equilibrium:
    """The answer with its certificate recomputed at phi(final composition) and the gas-model extras."""
    kept_gas = problem.keep[: problem.n_gas]
    mu0 = problem.mu0.copy()
    mu0[0, : problem.n_gas] += (final - held)[kept_gas]
    certificate = certify(replace(problem, mu0=mu0), result)[0]
    properties = phase.properties(eq.T, eq.P, n)
    # Residual properties scale with the amount the cubic describes.
    total = float(sum(eq.amounts[phase.gas_names[j]] for j in phase.described))
    y = n / n.sum()
    ideal_fraction = float(sum(y[phase.gas_names.index(s)] for s in phase.ideal_species))
    if ideal_fraction > IDEAL_SPECIES_WARNING:
        warnings.warn(
            f"{', '.join(phase.ideal_species)} have no critical constants and were treated as ideal gases, but "
            f"make up {ideal_fraction:.2g} of the gas; the {phase.name} answer is approximate there",
            RuntimeWarning, stacklevel=4)
    state = GasModelState(
        fugacity_coefficients={s: float(np.exp(v)) for s, v in zip(phase.gas_names, final)},
        compressibility_factor=float(properties.Z),
        residual_enthalpy_J=float(total * R * eq.T * properties.H_res_RT),
        residual_entropy_J_per_K=float(total * R * properties.S_res_R),
        iterations=iterations,
        ln_phi_change=change,
        note=_note(phase, ideal_fraction),
        binary_interactions={f"{a}-{b}": v for (a, b), v in phase.kij.items()},
    )
    return replace(eq, certificate=certificate, gas=state, extras={**eq.extras, **gas_model_extras(state)})


def gas_model_extras(state: GasModelState) -> dict[str, object]:
    """The gas model's figures by the names ``Equilibrium.extras`` has always used."""
    extras: dict[str, object] = {
        "fugacity_coefficients": dict(state.fugacity_coefficients),
        "compressibility_factor": state.compressibility_factor,
        "residual_enthalpy_J": state.residual_enthalpy_J,
        "residual_entropy_J_per_K": state.residual_entropy_J_per_K,
        "gas_model_iterations": state.iterations,
        "ln_phi_change": state.ln_phi_change,
        "gas_model_note": state.note,
        "binary_interactions": dict(state.binary_interactions),
    }
    if state.stability is not None:
        extras["gas_phase_stability"] = state.stability
    return extras


def _kij_note(phase: GasPhase) -> str:
    if not phase.kij:
        return "kij = 0 for every pair"
    return (f"kij from the {phase.kij_origin} ({len(phase.kij)} pairs, listed in extras['binary_interactions']; "
            "zero for the other pairs)")


def _note(phase: GasPhase, ideal_fraction: float) -> str:
    text = f"{phase.name} with van der Waals mixing, {_kij_note(phase)}; certificate stationarity uses phi at " \
           "the final composition"
    if phase.ideal_species:
        text += (f"; {', '.join(phase.ideal_species)} have no critical constants: treated as ideal gases "
                 f"(phi = 1) and left out of the mixture's a and b (together {ideal_fraction:.2g} of the gas)")
    return text
