"""The optimality certificate of an answer, evaluated from the answer alone.

For the problem  min G/RT  s.t.  A n = b,  n >= 0  the answer is optimal when
(Karush-Kuhn-Tucker conditions):

- it is feasible: A n = b (element balance) and n >= 0;
- every gas species and every present condensed species satisfies
  mu_j/RT = sum_k a_kj pi_k (stationarity);
- every absent condensed species has mu0_j - sum_k a_kj pi_k >= 0 (it would
  raise G if it formed: complementarity); an absent gas (all its amounts
  zero: the condensed phases hold every atom) would have mole fractions
  exp(a_j . pi - mu0_j) summing to at most one, its margin being -ln of that sum.

Nothing here trusts the solver: the residuals are recomputed from amounts and
element potentials.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Literal

import math

import numpy as np
from numpy.typing import NDArray

from ..system import Problem
from ..compiled import compiled
from ..frozen import built
from .result import SolverResult


@dataclass(frozen=True)
class Tolerances:
    """Limits a certified answer must meet (all dimensionless)."""

    element_balance: float = 1e-9     # max |A n - b| / max b
    stationarity: float = 1e-7        # max |mu_j/RT - a_j . pi|
    complementarity: float = 1e-7     # min over absent condensed of (mu0 - a . pi) >= -this


#: What is known of whether the answer's gas is stable as one phase: "not tested" (an ideal gas, or a sweep),
#: "screened" (far above every critical temperature present), "stable" or "unstable" (tangent-plane test).
PhaseStability = Literal["not tested", "screened", "stable", "unstable"]


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
        min over absent condensed species of (mu0_j - a_j . pi), and over an absent
        gas of -ln sum_j exp(a_j . pi - mu0_j); +inf when none.
        Negative means a phase that should be present is missing.
    min_amount : float
        Smallest condensed amount present, [mol] (must not be negative).
    solver : str
        Which solver produced the answer.
    iterations : int
    certified : bool
        All residuals within the tolerances, and the gas not found unstable
        as one phase.
    phase_stability : str
        One of :data:`PhaseStability`; an "unstable" answer (a liquid-like
        phase would form that the species set cannot hold) is never certified.
    """

    element_balance: float
    stationarity: float
    complementarity: float
    min_amount: float
    solver: str
    iterations: int
    certified: bool
    phase_stability: PhaseStability = "not tested"

    def with_phase_stability(self, verdict: PhaseStability) -> Certificate:
        """This certificate with the one-phase stability verdict of its answer (uncertified when unstable)."""
        return replace(self, phase_stability=verdict, certified=self.certified and verdict != "unstable")

    def summary(self) -> str:
        verdict = "certified" if self.certified else "NOT certified"
        comp = "none absent" if np.isinf(self.complementarity) else f"{self.complementarity:.2e}"
        stability = {"stable": "; phases: stable (tangent-plane test)",
                     "screened": "; one gas: stable (far above every critical temperature)",
                     "unstable": "; one gas: NOT stable (a liquid-like phase would form; not the equilibrium)",
                     }.get(self.phase_stability, "")
        return (f"{verdict} by {self.solver} in {self.iterations} iterations: "
                f"element balance {self.element_balance:.1e}, stationarity {self.stationarity:.1e}, "
                f"condensed-phase margin {comp}{stability}")


@dataclass(frozen=True)
class CertificateBatch:
    """Certificates of a batch, as arrays (indexing gives one Certificate)."""

    element_balance: NDArray[np.float64]
    stationarity: NDArray[np.float64]
    complementarity: NDArray[np.float64]
    min_amount: NDArray[np.float64]
    certified: NDArray[np.bool_]
    solver: tuple[str, ...]
    iterations: NDArray[np.int_]

    def __len__(self) -> int:
        return len(self.certified)

    def __getitem__(self, i: int) -> Certificate:
        return built(
            Certificate, element_balance=float(self.element_balance[i]),
            stationarity=float(self.stationarity[i]),
            complementarity=float(self.complementarity[i]),
            min_amount=float(self.min_amount[i]),
            solver=self.solver[i],
            iterations=int(self.iterations[i]),
            certified=bool(self.certified[i]),
        )

    def __iter__(self):
        return (self[i] for i in range(len(self)))


@compiled()
def residuals_of(A, n_gas, b, mu0, allowed, ln_n_gas, n_condensed, present, pi, out):
    """Residuals of every point: out[p] = (element balance, stationarity, complementarity, min amount)."""
    M, S = A.shape
    for p in range(b.shape[0]):
        total = 0.0
        for j in range(n_gas):
            total += math.exp(ln_n_gas[p, j])
        gas_absent = total == 0.0
        ln_N = math.log(total) if not gas_absent else 0.0
        gas_sum = 0.0  # with the gas absent: sum of the mole fractions it would have, <= 1 when it cannot form
        worst_b = 0.0
        scale = 0.0
        for k in range(M):
            s = -b[p, k]
            for j in range(n_gas):
                s += A[k, j] * math.exp(ln_n_gas[p, j])
            for c in range(S - n_gas):
                s += A[k, n_gas + c] * n_condensed[p, c]
            worst_b = max(worst_b, abs(s))
            scale = max(scale, abs(b[p, k]))
        stationarity = 0.0
        complementarity = np.inf
        min_amount = np.inf
        for j in range(S):
            potential = 0.0
            for k in range(M):
                potential += A[k, j] * pi[p, k]
            if j < n_gas and gas_absent:
                gas_sum += math.exp(min(potential - mu0[p, j], 700.0))
            elif j < n_gas:
                stationarity = max(stationarity, abs(mu0[p, j] + ln_n_gas[p, j] - ln_N - potential))
            elif present[p, j - n_gas]:
                stationarity = max(stationarity, abs(mu0[p, j] - potential))
                min_amount = min(min_amount, n_condensed[p, j - n_gas])
            elif allowed[p, j]:
                complementarity = min(complementarity, mu0[p, j] - potential)
        if gas_absent:
            complementarity = min(complementarity, -math.log(gas_sum) if gas_sum > 0.0 else np.inf)
        out[p, 0] = worst_b / scale
        out[p, 1] = stationarity
        out[p, 2] = complementarity
        out[p, 3] = min_amount


@compiled()
def verdicts_into(out, converged, element_balance, stationarity, complementarity, certified):
    """Whether each point's residuals (rows of ``out``) are within the tolerances, into ``certified``."""
    for p in range(out.shape[0]):
        certified[p] = (converged[p] and out[p, 0] <= element_balance and out[p, 1] <= stationarity
                        and out[p, 2] >= -complementarity and out[p, 3] >= 0.0)


@compiled()
def _verdicts(out, converged, element_balance, stationarity, complementarity):
    """``verdicts_into`` into a new array."""
    certified = np.empty(out.shape[0], dtype=np.bool_)
    verdicts_into(out, converged, element_balance, stationarity, complementarity, certified)
    return certified


def certify(problem: Problem, result: SolverResult, tolerances: Tolerances = Tolerances(),
            worked_out: tuple[NDArray[np.float64], NDArray[np.bool_]] | None = None) -> CertificateBatch:
    """Certificates of every point of a batch.

    ``worked_out`` is (residuals, certified) as ``residuals_of`` and
    ``verdicts_into`` give them for this answer and these tolerances, where
    the solver's compiled call has just run them (Newton's
    ``run_certified``); both are computed here otherwise.
    """
    # Both steps are compiled: on a single small point, array arithmetic in Python would cost more
    # than the residuals themselves.
    if worked_out is None:
        residuals = np.empty((problem.batch_size, 4))
        residuals_of(np.ascontiguousarray(problem.A, dtype=float), problem.n_gas, problem.b, problem.mu0,
                     problem.allowed, result.ln_n_gas, result.n_condensed, result.present, result.pi, residuals)
        certified = _verdicts(residuals, np.ascontiguousarray(result.converged, dtype=np.bool_),
                              tolerances.element_balance, tolerances.stationarity, tolerances.complementarity)
    else:
        residuals, certified = worked_out
    columns = np.ascontiguousarray(residuals.T)
    return built(CertificateBatch, element_balance=columns[0], stationarity=columns[1],
                 complementarity=columns[2], min_amount=columns[3], certified=certified,
                 solver=tuple(result.method), iterations=np.asarray(result.iterations))
