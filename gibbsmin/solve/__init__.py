"""Solvers behind one interface: ``solve(problem, method)``."""

from __future__ import annotations

from collections.abc import Callable

import numpy as np

from ..errors import InputError
from ..system import Problem
from .certificate import Certificate, CertificateBatch, Tolerances, certify
from .convex import solve_convex
from .newton import NewtonOptions, solve_newton, solve_newton_certified
from .result import SolverResult, merge

__all__ = ["solve", "SOLVERS", "Certificate", "CertificateBatch", "Tolerances", "SolverResult", "NewtonOptions", "certify"]


def _certified(problem: Problem, result: SolverResult) -> tuple[SolverResult, CertificateBatch]:
    return result, certify(problem, result)


def _auto(problem: Problem, start: SolverResult | None, chains: int | None
          ) -> tuple[SolverResult, CertificateBatch]:
    """Newton first; every point it cannot certify is solved again on the cone."""
    result, certificates = solve_newton_certified(problem, start=start, chains=chains)
    if certificates.certified.all():
        return result, certificates
    bad = np.flatnonzero(~certificates.certified)
    return _certified(problem, merge(result, solve_convex(problem.take(bad)), bad))


Solver = Callable[[Problem, "SolverResult | None", "int | None"], tuple[SolverResult, CertificateBatch]]

SOLVERS: dict[str, Solver] = {
    "newton": lambda problem, start, chains: solve_newton_certified(problem, start=start, chains=chains),
    "convex": lambda problem, start, chains: _certified(problem, solve_convex(problem)),
    "auto": _auto,
}


def solve(problem: Problem, method: str = "auto", start: SolverResult | None = None,
          chains: int | None = None) -> tuple[SolverResult, CertificateBatch]:
    """Solve a batch of problems and certify every point.

    Parameters
    ----------
    problem : Problem
    method : {"auto", "newton", "convex"}
        "auto" runs Newton and falls back to the convex solver, point by point,
        wherever Newton's answer cannot be certified.
    start : SolverResult, optional
        Warm start for Newton (ignored by "convex").
    chains : int, optional
        Newton solves the batch in this many runs of neighbours, each point
        warm-started from the one before (see ``solve_newton``).
    """
    if method not in SOLVERS:
        raise InputError(f"unknown method {method!r}; choose one of {', '.join(SOLVERS)}")
    return SOLVERS[method](problem, start, chains)
