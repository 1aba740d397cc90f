"""Solvers behind one interface: ``solve(problem, method)``."""

from __future__ import annotations

from collections.abc import Callable

import numpy as np

from ..errors import InputError
from ..system import Problem
from .certificate import Certificate, CertificateBatch, Tolerances, certify
from .convex import solve_convex
from .newton import NewtonOptions, solve_newton
from .result import SolverResult, merge

__all__ = ["solve", "SOLVERS", "Certificate", "CertificateBatch", "Tolerances", "SolverResult", "NewtonOptions", "certify"]


def _auto(problem: Problem, start: SolverResult | None) -> SolverResult:
    """Newton first; every point it cannot certify is solved again on the cone."""
    result = solve_newton(problem, start=start)
    bad = np.flatnonzero(~certify(problem, result).certified)
    if bad.size == 0:
        return result
    return merge(result, solve_convex(problem.take(bad)), bad)


SOLVERS: dict[str, Callable[[Problem, SolverResult | None], SolverResult]] = {
    "newton": lambda problem, start: solve_newton(problem, start=start),
    "convex": lambda problem, start: solve_convex(problem),
    "auto": _auto,
}


def solve(problem: Problem, method: str = "auto",
          start: SolverResult | None = None) -> tuple[SolverResult, CertificateBatch]:
    """Solve a batch of problems and certify every point.

    Parameters
    ----------
    problem : Problem
    method : {"auto", "newton", "convex"}
        "auto" runs Newton and falls back to the convex solver, point by point,
        wherever Newton's answer cannot be certified.
    start : SolverResult, optional
        Warm start for Newton (ignored by "convex").
    """
    if method not in SOLVERS:
        raise InputError(f"unknown method {method!r}; choose one of {', '.join(SOLVERS)}")
    result = SOLVERS[method](problem, start)
    return result, certify(problem, result)
