"""The exact convex formulation, solved on the exponential cone, then polished by Newton.

    min  sum_gas n_j mu0_j + sum_gas n_j ln(n_j / N) + sum_cond n_c mu0_c
    s.t. A n = b,  n >= 0,  N = sum_gas n_j

The mixing term is a sum of relative entropies rel_entr(n_j, N), jointly
convex in (n_j, N), which cvxpy states exactly on the exponential cone; the
problem is then global for ideal phases, whatever the phase set.  It is
parametrised (DPP) in mu0 and b, so the compiled problem is cached per species
set and reused; the interior-point solver itself starts afresh on every
point, so an answer does not depend on what was solved before.  Interior-point answers are accurate to about 1e-8 relative,
too loose for ppb species, so every answer is handed to the Newton solver as
its starting point ("polish").
"""

from __future__ import annotations

import functools
import warnings

import numpy as np
from numpy.typing import NDArray

from ..system import Problem
from .newton import NewtonOptions, solve_newton
from .result import SolverResult, merge


@functools.lru_cache(maxsize=64)
def _compiled(A_bytes: bytes, shape: tuple[int, int], n_gas: int, condensed: tuple[int, ...]):
    import cvxpy as cp  # imported on first use: it costs seconds, and most answers never need it

    A = np.frombuffer(A_bytes).reshape(shape)
    A_g, A_c = A[:, :n_gas], A[:, list(condensed)]
    n_g = cp.Variable(n_gas, nonneg=True)
    mu_g = cp.Parameter(n_gas)
    b = cp.Parameter(shape[0])
    objective = mu_g @ n_g + cp.sum(cp.rel_entr(n_g, cp.sum(n_g) * np.ones(n_gas)))
    balance = A_g @ n_g
    n_c = mu_c = None
    if condensed:
        n_c = cp.Variable(len(condensed), nonneg=True)
        mu_c = cp.Parameter(len(condensed))
        objective = objective + mu_c @ n_c
        balance = balance + A_c @ n_c
    problem = cp.Problem(cp.Minimize(objective), [balance == b])
    return problem, n_g, n_c, mu_g, mu_c, b


def _solve_point(problem: Problem, i: int) -> tuple[NDArray, NDArray, bool]:
    import cvxpy as cp

    G = problem.n_gas
    allowed = tuple(int(G + c) for c in np.flatnonzero(problem.allowed[i, G:]))
    A = np.ascontiguousarray(problem.A, dtype=float)
    cvx, n_g, n_c, mu_g, mu_c, b = _compiled(A.tobytes(), A.shape, G, allowed)
    scale = problem.b[i].sum()
    mu_g.value = problem.mu0[i, :G]
    if mu_c is not None:
        mu_c.value = problem.mu0[i, list(allowed)]
    b.value = problem.b[i] / scale
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            # A fresh Clarabel solver every time: with cvxpy's default warm start the cached solver object
            # is updated in place and keeps state from the problem it solved before, so the same point gave
            # a different answer (ln n apart by 6e-4) as the first or the second solve on a species set.
            cvx.solve(solver=cp.CLARABEL, warm_start=False)
    except cp.error.SolverError:
        return np.zeros(G), np.zeros(problem.n_species - G), False
    ok = cvx.status in (cp.OPTIMAL, cp.OPTIMAL_INACCURATE) and n_g.value is not None
    gas = np.maximum(np.asarray(n_g.value if ok else np.zeros(G), dtype=float), 0.0) * scale
    condensed = np.zeros(problem.n_species - G)
    if ok and n_c is not None:
        condensed[np.array(allowed) - G] = np.maximum(np.asarray(n_c.value, dtype=float), 0.0) * scale
    return gas, condensed, ok


def solve_convex(problem: Problem, polish: bool = True,
                 options: NewtonOptions = NewtonOptions()) -> SolverResult:
    """Solve each point of a batch on the exponential cone (Clarabel), then polish by Newton.

    Points whose polish does not converge keep the cone solver's answer
    (``method == "convex"``), whose certificate then shows its lower precision.
    """
    B, G = problem.batch_size, problem.n_gas
    C = problem.n_species - G
    gas = np.zeros((B, G))
    condensed = np.zeros((B, C))
    ok = np.zeros(B, dtype=bool)
    for i in range(B):
        gas[i], condensed[i], ok[i] = _solve_point(problem, i)
    N = gas.sum(axis=1, keepdims=True)
    # Species the cone solver leaves at its floor (about 1e-9 of N) start the
    # polish there; Newton resets them from the element potentials in one step.
    floor = np.maximum(N, 1e-300) * 1e-14
    ln_n = np.log(np.maximum(gas, floor))
    present = condensed > 1e-9 * np.maximum(N, 1e-300)
    pi = _fit_potentials(problem, ln_n, present)
    raw = SolverResult(ln_n, np.where(present, condensed, 0.0), present, pi, ok,
                       np.ones(B, dtype=int), ("convex",) * B)
    if not polish:
        return raw
    polished = _polish(problem, raw, options)
    failed = np.flatnonzero(~polished.converged)
    if failed.size:
        # A condensed species the cone leaves just above the presence threshold but which cannot exist
        # there (liquid water at the end of its data, 600 K and 1 bar) can make the constrained Newton
        # system unsolvable.  Polish those points again from the cone's gas alone: Newton's own phase
        # test then adds the condensed species that belong.
        gas_only = SolverResult(ln_n[failed], np.zeros((failed.size, C)), np.zeros((failed.size, C), dtype=bool),
                                pi[failed], ok[failed], np.ones(failed.size, dtype=int), ("convex",) * failed.size)
        again = _polish(problem.take(failed), gas_only, options)
        polished = merge(polished, again, failed)
        failed = np.flatnonzero(~polished.converged)
    return merge(polished, raw.take(failed), failed) if failed.size else polished


def _polish(problem: Problem, start: SolverResult, options: NewtonOptions) -> SolverResult:
    polished = solve_newton(problem, start=start, options=options)
    return SolverResult(polished.ln_n_gas, polished.n_condensed, polished.present, polished.pi,
                        polished.converged, polished.iterations + 1, ("convex+newton",) * problem.batch_size)


def _fit_potentials(problem: Problem, ln_n: NDArray, present: NDArray) -> NDArray:
    """Element potentials that best satisfy stationarity for the major species (least squares)."""
    G = problem.n_gas
    B, M = problem.batch_size, problem.A.shape[0]
    pi = np.zeros((B, M))
    ln_y = ln_n - np.log(np.exp(ln_n).sum(axis=1, keepdims=True))
    for i in range(B):
        major = ln_y[i] > np.log(1e-6)
        rows = [problem.A[:, :G][:, major].T]
        rhs = [problem.mu0[i, :G][major] + ln_y[i][major]]
        if np.any(present[i]):
            rows.append(problem.A[:, G:][:, present[i]].T)
            rhs.append(problem.mu0[i, G:][present[i]])
        pi[i] = np.linalg.lstsq(np.vstack(rows), np.concatenate(rhs), rcond=None)[0]
    return pi
