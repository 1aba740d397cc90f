"""What every solver returns: amounts and element potentials for a batch, in the Problem's species order."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray


@dataclass(frozen=True)
class SolverResult:
    """Raw answer of a solver for a batch of B problems.

    Attributes
    ----------
    ln_n_gas : ndarray, shape (B, G)
        Natural logarithms of the gas amounts [ln mol]: kept in log form so that
        species far below the smallest float are still described.
    n_condensed : ndarray, shape (B, C)
        Amounts of the pure condensed species, [mol]; zero when absent.
    present : ndarray of bool, shape (B, C)
        Which condensed species are present.
    pi : ndarray, shape (B, M)
        Element potentials lambda_k = mu/RT per atom, [-].
    converged : ndarray of bool, shape (B,)
    iterations : ndarray of int, shape (B,)
    method : tuple of str, length B
        The solver that produced each point ("newton", "convex", "convex+newton").
    """

    ln_n_gas: NDArray[np.float64]
    n_condensed: NDArray[np.float64]
    present: NDArray[np.bool_]
    pi: NDArray[np.float64]
    converged: NDArray[np.bool_]
    iterations: NDArray[np.int_]
    method: tuple[str, ...]

    @property
    def amounts(self) -> NDArray[np.float64]:
        """All amounts, gas then condensed, shape (B, S), [mol]."""
        return np.concatenate([np.exp(self.ln_n_gas), self.n_condensed], axis=1)

    def take(self, where: NDArray[np.int_]) -> SolverResult:
        """The points at positions ``where``, as a batch of their own."""
        where = np.asarray(where, dtype=int)
        return SolverResult(self.ln_n_gas[where], self.n_condensed[where], self.present[where],
                            self.pi[where], self.converged[where], self.iterations[where],
                            tuple(self.method[i] for i in where))


def merge(base: SolverResult, other: SolverResult, where: NDArray[np.int_]) -> SolverResult:
    """``base`` with the points at ``where`` replaced by the points of ``other`` (in order)."""
    def put(a, b):
        a = a.copy()
        a[where] = b
        return a
    method = list(base.method)
    for i, m in zip(where, other.method):
        method[i] = m
    return SolverResult(put(base.ln_n_gas, other.ln_n_gas), put(base.n_condensed, other.n_condensed),
                        put(base.present, other.present), put(base.pi, other.pi),
                        put(base.converged, other.converged), put(base.iterations, other.iterations),
                        tuple(method))
