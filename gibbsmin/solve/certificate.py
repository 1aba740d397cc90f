"""The optimality certificate of an answer, evaluated from the answer alone.

For the problem  min G/RT  s.t.  A n = b,  n >= 0  the answer is optimal when
(Karush-Kuhn-Tucker conditions):

- it is feasible: A n = b (element balance) and n >= 0;
- every gas species and every present condensed species satisfies
  mu_j/RT = sum_k a_kj pi_k (stationarity);
- every absent condensed species has mu0_j - sum_k a_kj pi_k >= 0 (it would
  raise G if it formed: complementarity).

Nothing here trusts the solver: the residuals are recomputed from amounts and
element potentials.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from ..system import Problem
from .result import SolverResult


@dataclass(frozen=True)
class Tolerances:
    """Limits a certified answer must meet (all dimensionless)."""

    element_balance: float = 1e-9     # max |A n - b| / max b
    stationarity: float = 1e-7        # max |mu_j/RT - a_j . pi|
    complementarity: float = 1e-7     # min over absent condensed of (mu0 - a . pi) >= -this


@dataclass(frozen=True)
class Certificate:
    """Residuals of the optimality conditions of one answer.

    Attributes
    ----------
    element_balance : float
        max_k |A n - b|_k / max_k b_k.
    stationarity : float
        max over gas and present condensed species of |mu_j/RT - a_j . pi|.
    complementarity : float
        min over absent condensed species of (mu0_j - a_j . pi); +inf when none.
        Negative means a phase that should be present is missing.
    min_amount : float
        Smallest condensed amount present, [mol] (must not be negative).
    solver : str
        Which solver produced the answer.
    iterations : int
    certified : bool
        All residuals within the tolerances.
    """

    element_balance: float
    stationarity: float
    complementarity: float
    min_amount: float
    solver: str
    iterations: int
    certified: bool

    def summary(self) -> str:
        verdict = "certified" if self.certified else "NOT certified"
        comp = "none absent" if np.isinf(self.complementarity) else f"{self.complementarity:.2e}"
        return (f"{verdict} by {self.solver} in {self.iterations} iterations: "
                f"element balance {self.element_balance:.1e}, stationarity {self.stationarity:.1e}, "
                f"condensed-phase margin {comp}")


def certify(problem: Problem, result: SolverResult, tolerances: Tolerances = Tolerances()) -> list[Certificate]:
    """Certificates of every point of a batch."""
    G = problem.n_gas
    A_g, A_c = problem.A[:, :G], problem.A[:, G:]
    n_g = np.exp(result.ln_n_gas)
    N = n_g.sum(axis=1)
    balance = n_g @ A_g.T + result.n_condensed @ A_c.T - problem.b
    element_balance = np.max(np.abs(balance), axis=1) / np.max(np.abs(problem.b), axis=1)
    potential = result.pi @ problem.A                                   # (B, S)
    mu_g = problem.mu0[:, :G] + result.ln_n_gas - np.log(N)[:, None]
    gas_residual = np.max(np.abs(mu_g - potential[:, :G]), axis=1)
    margin = problem.mu0[:, G:] - potential[:, G:]
    present = result.present
    cond_residual = np.max(np.where(present, np.abs(margin), 0.0), axis=1, initial=0.0)
    absent = problem.allowed[:, G:] & ~present
    complementarity = np.min(np.where(absent, margin, np.inf), axis=1, initial=np.inf)
    min_amount = np.min(np.where(present, result.n_condensed, np.inf), axis=1, initial=np.inf)
    stationarity = np.maximum(gas_residual, cond_residual)
    certificates = []
    for i in range(problem.batch_size):
        ok = bool(
            result.converged[i]
            and element_balance[i] <= tolerances.element_balance
            and stationarity[i] <= tolerances.stationarity
            and complementarity[i] >= -tolerances.complementarity
            and min_amount[i] >= 0.0
        )
        certificates.append(Certificate(
            element_balance=float(element_balance[i]),
            stationarity=float(stationarity[i]),
            complementarity=float(complementarity[i]),
            min_amount=float(min_amount[i]),
            solver=result.method[i],
            iterations=int(result.iterations[i]),
            certified=ok,
        ))
    return certificates
