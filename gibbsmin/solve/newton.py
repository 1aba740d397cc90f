"""Element-potential Newton method with condensed-phase management, for batches of problems.

The unknowns are the logarithms of the gas amounts, the log of the total gas
amount N, the amounts of the present condensed species and the element
potentials pi.  Each iteration linearises

    ln n_j - ln N + mu0_j = sum_k a_kj pi_k        (every gas species)
    mu0_c                  = sum_k a_kc pi_k        (every present condensed species)
    sum_j a_kj n_j         = b_k                    (every element)
    sum_gas n_j            = N

and eliminates the gas unknowns, leaving an (M + C + 1) linear system per
point (the classical reduction of Gordon and McBride, NASA RP-1311, 1994,
section 2).  Working in ln n keeps species at 1e-30 and below exact, and the
step limits of that report (at most a factor e^2 per iteration on the major
species, and trace species not lifted past y = 1e-4 in one step) keep the
iteration inside the region where it converges.

Once a point has converged for its current phase set, absent condensed species
whose potential mu0_c - a_c . pi is negative are added (most negative first)
and present ones with a non-positive amount are dropped, then it iterates again.
All of this runs on whole batches at once: each point carries its own phase set.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from ..system import Problem
from .result import SolverResult

_LN_TRACE = np.log(1e-8)  # below this mole fraction a gas species is "trace" for the step limits
_LN_LIFT = np.log(1e-4)   # a trace species may rise at most to this mole fraction in one step


@dataclass(frozen=True)
class NewtonOptions:
    """Tuning of the Newton iteration.

    Attributes
    ----------
    tol : float
        Converged when every |d ln n_j|, |d ln N| and |d n_c|/N is below this.
    max_iterations : int
        Iterations per point, counting those after phase changes.
    phase_tol : float
        An absent condensed species is added when mu0_c - a_c.pi < -phase_tol.
    max_phase_changes : int
        Guard against cycling between phase sets.
    """

    tol: float = 1e-11
    max_iterations: int = 300
    phase_tol: float = 1e-10
    max_phase_changes: int = 30


@dataclass
class _State:
    ln_n: NDArray[np.float64]    # (B, G), scaled amounts
    ln_N: NDArray[np.float64]    # (B,)
    n_c: NDArray[np.float64]     # (B, C)
    active: NDArray[np.bool_]    # (B, C)


def cold_start(problem: Problem) -> SolverResult:
    """The customary starting point: equal small amounts of every gas species, no condensed phase."""
    B, G, C = problem.batch_size, problem.n_gas, problem.n_species - problem.n_gas
    scale = problem.b.sum(axis=1, keepdims=True)
    return SolverResult(
        ln_n_gas=np.full((B, G), np.log(0.1 / G)) + np.log(scale),
        n_condensed=np.zeros((B, C)),
        present=np.zeros((B, C), dtype=bool),
        pi=np.zeros((B, problem.A.shape[0])),
        converged=np.zeros(B, dtype=bool),
        iterations=np.zeros(B, dtype=int),
        method=("start",) * B,
    )


def solve_newton(problem: Problem, start: SolverResult | None = None,
                 options: NewtonOptions = NewtonOptions()) -> SolverResult:
    """Solve a batch of problems by the element-potential Newton method.

    Parameters
    ----------
    problem : Problem
        B problems on one species set.
    start : SolverResult, optional
        Starting amounts and phase sets (a neighbouring solution, or the convex
        solver's answer to polish); a cold start when omitted.
    options : NewtonOptions

    Returns
    -------
    SolverResult
        ``converged`` is False where the iteration did not settle; the caller
        decides what to do with those points (see ``solve``).
    """
    start = start if start is not None else cold_start(problem)
    A, G = problem.A, problem.n_gas
    M, S = A.shape
    C = S - G
    A_g, A_c = A[:, :G], A[:, G:]
    scale = problem.b.sum(axis=1)
    b = problem.b / scale[:, None]
    mu0_g, mu0_c = problem.mu0[:, :G], problem.mu0[:, G:]
    allowed_c = problem.allowed[:, G:]

    ln_n = start.ln_n_gas - np.log(scale)[:, None]
    state = _State(
        ln_n=ln_n.copy(),
        ln_N=np.log(np.exp(ln_n).sum(axis=1)),
        n_c=np.where(start.present, start.n_condensed, 0.0) / scale[:, None],
        active=start.present & allowed_c,
    )
    B = problem.batch_size
    pi = np.zeros((B, M))
    iterations = np.zeros(B, dtype=int)
    phase_changes = np.zeros(B, dtype=int)
    done = np.zeros(B, dtype=bool)
    converged = np.zeros(B, dtype=bool)
    same_composition = _same_composition(A_c)

    while True:
        todo = np.flatnonzero(~done)
        if todo.size == 0:
            break
        step = _newton_step(A_g, A_c, b[todo], mu0_g[todo], mu0_c[todo], state, todo)
        pi[todo] = step.pi
        iterations[todo] += 1
        lam = _step_length(state.ln_n[todo] - state.ln_N[todo, None], step.d_ln_n, step.d_ln_N)
        state.ln_n[todo] += lam[:, None] * step.d_ln_n
        state.ln_N[todo] += lam * step.d_ln_N
        state.n_c[todo] += lam[:, None] * step.d_n_c
        small = (
            (lam == 1.0)
            & (np.max(np.abs(step.d_ln_n), axis=1, initial=0.0) <= options.tol)
            & (np.abs(step.d_ln_N) <= options.tol)
            & (np.max(np.abs(step.d_n_c), axis=1, initial=0.0) <= options.tol)
        )
        for local, i in enumerate(todo):
            if not np.all(np.isfinite(step.d_ln_n[local])) or iterations[i] >= options.max_iterations:
                done[i] = True
                continue
            if not small[local]:
                continue
            changed = _manage_phases(i, state, pi[i], mu0_c[i], A_c, allowed_c[i], same_composition, options)
            if changed:
                phase_changes[i] += 1
                if phase_changes[i] > options.max_phase_changes:
                    done[i] = True
            else:
                done[i] = True
                converged[i] = True

    n_c = np.where(state.active, state.n_c, 0.0) * scale[:, None]
    return SolverResult(
        ln_n_gas=state.ln_n + np.log(scale)[:, None],
        n_condensed=n_c,
        present=state.active.copy(),
        pi=pi,
        converged=converged,
        iterations=iterations,
        method=("newton",) * B,
    )


@dataclass(frozen=True)
class _Step:
    pi: NDArray[np.float64]
    d_ln_n: NDArray[np.float64]
    d_ln_N: NDArray[np.float64]
    d_n_c: NDArray[np.float64]


def _newton_step(A_g, A_c, b, mu0_g, mu0_c, state: _State, todo) -> _Step:
    ln_n, ln_N = state.ln_n[todo], state.ln_N[todo]
    n_c, active = state.n_c[todo], state.active[todo]
    M, G = A_g.shape
    C = A_c.shape[1]
    K = M + C + 1
    n_g = np.exp(ln_n)
    N = np.exp(ln_N)
    mu_g = mu0_g + ln_n - ln_N[:, None]
    a_n = n_g @ A_g.T                                        # (P, M)
    J = np.zeros((len(todo), K, K))
    J[:, :M, :M] = np.einsum("kj,pj,ij->pki", A_g, n_g, A_g)
    J[:, :M, M:M + C] = A_c[None, :, :] * active[:, None, :]
    J[:, :M, -1] = a_n
    J[:, M:M + C, :M] = A_c.T[None, :, :] * active[:, :, None]
    J[:, M:M + C, M:M + C] = np.eye(C)[None] * (~active)[:, :, None]
    J[:, -1, :M] = a_n
    J[:, -1, -1] = n_g.sum(axis=1) - N
    nmu = n_g * mu_g
    rhs = np.empty((len(todo), K))
    rhs[:, :M] = b - a_n - n_c @ A_c.T + nmu @ A_g.T
    rhs[:, M:M + C] = np.where(active, mu0_c, 0.0)
    rhs[:, -1] = N - n_g.sum(axis=1) + nmu.sum(axis=1)
    x = _solve_batch(J, rhs)
    pi = x[:, :M]
    d_ln_N = x[:, -1]
    d_n_c = np.where(active, x[:, M:M + C], 0.0)
    d_ln_n = -mu_g + pi @ A_g + d_ln_N[:, None]
    return _Step(pi, d_ln_n, d_ln_N, d_n_c)


def _solve_batch(J: NDArray[np.float64], rhs: NDArray[np.float64]) -> NDArray[np.float64]:
    try:
        return np.linalg.solve(J, rhs[..., None])[..., 0]
    except np.linalg.LinAlgError:
        # A singular point (an element carried only by trace species, say) must
        # not stop the rest of the batch: least squares gives it a usable step.
        return np.stack([np.linalg.lstsq(j, r, rcond=None)[0] for j, r in zip(J, rhs)])


def _step_length(ln_y, d_ln_n, d_ln_N) -> NDArray[np.float64]:
    """Damping factor per point (Gordon and McBride 1994, eqs. 3.1 to 3.3)."""
    major = ln_y > _LN_TRACE
    biggest = np.maximum(5.0 * np.abs(d_ln_N), np.max(np.where(major, np.abs(d_ln_n), 0.0), axis=1, initial=0.0))
    lam1 = np.where(biggest > 2.0, 2.0 / np.maximum(biggest, 1e-300), 1.0)
    rising = ~major & (d_ln_n - d_ln_N[:, None] > 0)
    with np.errstate(divide="ignore", invalid="ignore"):
        lift = np.abs((_LN_LIFT - ln_y) / (d_ln_n - d_ln_N[:, None]))
    lam2 = np.min(np.where(rising, lift, np.inf), axis=1, initial=np.inf)
    lam = np.minimum(1.0, np.minimum(lam1, lam2))
    return np.where(np.isfinite(lam) & (lam > 0), lam, 1.0)


def _same_composition(A_c: NDArray[np.float64]) -> NDArray[np.bool_]:
    """Pairs of condensed species with identical element vectors (liquid and solid water, say)."""
    C = A_c.shape[1]
    same = np.zeros((C, C), dtype=bool)
    for i in range(C):
        for j in range(C):
            same[i, j] = i != j and np.allclose(A_c[:, i], A_c[:, j])
    return same


def _manage_phases(i, state: _State, pi, mu0_c, A_c, allowed_c, same_composition, options) -> bool:
    """Drop a present condensed species with no amount, or add the most stable absent one."""
    active = state.active[i]
    negative = active & (state.n_c[i] <= 0.0)
    if np.any(negative):
        drop = np.flatnonzero(negative)[np.argmin(state.n_c[i][negative])]
        active[drop] = False
        state.n_c[i, drop] = 0.0
        return True
    margin = mu0_c - pi @ A_c
    candidates = allowed_c & ~active & (margin < -options.phase_tol)
    if not np.any(candidates):
        return False
    add = np.flatnonzero(candidates)[np.argmin(margin[candidates])]
    rivals = active & same_composition[add]
    # Two phases of one composition cannot coexist at a generic T: the one
    # with the lower potential (the one being added) takes over the amount.
    state.n_c[i, add] = state.n_c[i, rivals].sum()
    state.n_c[i, rivals] = 0.0
    active[rivals] = False
    active[add] = True
    return True
