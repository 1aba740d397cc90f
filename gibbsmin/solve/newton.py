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

Once a point has converged for its current phase set, a present condensed
species with a non-positive amount is dropped, or else the absent one with the
most negative potential mu0_c - a_c . pi is added, and it iterates again.
The loop itself is compiled (_newton_kernel.py); every point of a batch
carries its own phase set.
"""

from __future__ import annotations

import functools
from dataclasses import dataclass

import numpy as np

from ..frozen import built
from ..system import Problem
from . import _newton_kernel as kernel
from .certificate import CertificateBatch, Tolerances, certify
from .result import SolverResult


@dataclass(frozen=True)
class NewtonOptions:
    """Tuning of the Newton iteration.

    Attributes
    ----------
    tol : float
        Converged when every y_j |d ln n_j| (y_j the larger of the mole
        fractions before and after the step), |d ln N| and |d n_c| (amounts
        scaled to sum(b) = 1) is below this; the last step is a full one, so
        every trace species then sits exactly where the element potentials put it.
    max_iterations : int
        Iterations per point, counting those after phase changes.
    phase_tol : float
        An absent condensed species is added when mu0_c - a_c.pi < -phase_tol.
    max_phase_changes : int
        Guard against cycling between phase sets.
    """

    tol: float = 1e-12
    max_iterations: int = 300
    phase_tol: float = 1e-10
    max_phase_changes: int = 30


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


_NO_START = np.zeros((1, 1))
_NO_PRESENT = np.zeros((1, 1), dtype=bool)


@functools.lru_cache(maxsize=64)
def _same_composition_of(A_c_bytes: bytes, shape: tuple[int, int]) -> np.ndarray:
    A_c = np.frombuffer(A_c_bytes).reshape(shape)
    same = np.all(np.isclose(A_c[:, :, None], A_c[:, None, :]), axis=0)
    np.fill_diagonal(same, False)
    return same


def _same_composition(A_c: np.ndarray) -> np.ndarray:
    """Pairs of condensed species with identical element vectors (liquid and solid water, say)."""
    return _same_composition_of(A_c.tobytes(), A_c.shape)


def solve_newton(problem: Problem, start: SolverResult | None = None,
                 options: NewtonOptions = NewtonOptions(), chains: int | None = None) -> SolverResult:
    """Solve a batch of problems by the element-potential Newton method.

    Parameters
    ----------
    problem : Problem
        B problems on one species set.
    start : SolverResult, optional
        Starting amounts and phase sets (a neighbouring solution, or the convex
        solver's answer to polish); a cold start when omitted.
    options : NewtonOptions
    chains : int, optional
        Cut the batch into this many runs of consecutive points; within a run
        each point starts from its predecessor's answer (order the batch along
        a sweep axis to profit).  Default: every point starts on its own.

    Returns
    -------
    SolverResult
        ``converged`` is False where the iteration did not settle; the caller
        decides what to do with those points (see ``solve``).
    """
    return _result(problem, kernel.run(*_kernel_arguments(problem, start, options, chains)))


def solve_newton_certified(problem: Problem, start: SolverResult | None = None,
                           options: NewtonOptions = NewtonOptions(), chains: int | None = None,
                           tolerances: Tolerances = Tolerances()) -> tuple[SolverResult, CertificateBatch]:
    """``solve_newton`` and ``certify`` of its answer, the residuals taken in the same compiled call."""
    B, M, S = problem.batch_size, problem.A.shape[0], problem.n_species
    C = S - problem.n_gas
    ln_n, n_c, present = np.empty((B, problem.n_gas)), np.empty((B, C)), np.empty((B, C), dtype=bool)
    pi = np.empty((B, M))
    iterations, status, converged = np.empty(B, dtype=np.int64), np.empty(B, dtype=np.int64), np.empty(B, dtype=bool)
    residuals, certified = np.empty((B, 4)), np.empty(B, dtype=bool)
    kernel.run_certified(*_kernel_arguments(problem, start, options, chains), ln_n, n_c, present, pi, iterations,
                         status, converged, tolerances.element_balance, tolerances.stationarity,
                         tolerances.complementarity, residuals, certified)
    result = built(SolverResult, ln_n_gas=ln_n, n_condensed=n_c, present=present, pi=pi, converged=converged,
                   iterations=iterations, method=("newton",) * B)
    return result, certify(problem, result, tolerances, worked_out=(residuals, certified))


def _kernel_arguments(problem: Problem, start: SolverResult | None, options: NewtonOptions,
                      chains: int | None) -> tuple:
    """The arguments of ``kernel.run`` for a problem, a start and the options."""
    cold = start is None
    # With a cold start the start arrays are not read; any arrays of the right kind will do.
    start_arrays = (_NO_START, _NO_START, _NO_PRESENT) if cold else (
        np.ascontiguousarray(start.ln_n_gas, dtype=float), np.ascontiguousarray(start.n_condensed, dtype=float),
        np.ascontiguousarray(start.present))
    A = np.ascontiguousarray(problem.A, dtype=float)
    B = problem.batch_size
    return (A, problem.n_gas, np.ascontiguousarray(problem.b, dtype=float),
            np.ascontiguousarray(problem.mu0, dtype=float), np.ascontiguousarray(problem.allowed),
            _same_composition(A[:, problem.n_gas:]), *start_arrays, cold,
            options.tol, options.max_iterations, options.phase_tol, options.max_phase_changes,
            B if chains is None else int(chains), B > 1)


def _result(problem: Problem, raw: tuple) -> SolverResult:
    ln_n, n_c, present, pi, iterations, status = raw
    return built(SolverResult, ln_n_gas=ln_n, n_condensed=n_c, present=present, pi=pi,
                 converged=status == kernel.CONVERGED, iterations=iterations, method=("newton",) * problem.batch_size)
