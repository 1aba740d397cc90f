"""An optimality check of an Equilibrium that shares nothing with the solver.

Standard Gibbs energies come from Cantera's evaluation of the same NASA data
(tests/cantera_reference.py); the element potentials are fitted afresh by
least squares over the species present.  Conditions checked (the KKT
conditions of min G s.t. A n = b, n >= 0):
element balance, mu_j/RT = sum_k a_kj lambda_k for every present species,
and g0_j/RT - sum_k a_kj lambda_k >= 0 for every absent condensed species.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from cantera_reference import cantera_species

P_REF = 1.0e5


@dataclass
class KKT:
    element_balance: float
    stationarity: float
    complementarity: float  # min margin of absent condensed species (+inf when none)


def _g0_RT(name: str, T: float) -> float:
    species = cantera_species(name)
    return float(species.thermo.h(T) - T * species.thermo.s(T)) / (8314.46261815324 * T)


def check_kkt(eq, feed: dict[str, float], trace: float = 1e-12) -> KKT:
    """Residuals of the optimality conditions of ``eq`` for ``feed`` (amounts in mol)."""
    from gibbsmin import default_database

    db = default_database()
    names = list(eq.amounts)
    elements = sorted({el for n in names for el in db[n].elements} | {el for n in feed for el in db[n].elements})
    A = np.array([[db[n].elements.get(el, 0.0) for n in names] for el in elements])
    n = np.array([eq.amounts[s] for s in names])
    b = np.array([sum(db[s].elements.get(el, 0.0) * v for s, v in feed.items()) for el in elements])
    balance = float(np.max(np.abs(A @ n - b)) / np.max(b))
    gas = [i for i, s in enumerate(names) if eq.phase_of[s] == "gas"]
    N = n[gas].sum()
    mu = {}
    for i in gas:
        if n[i] > trace * N:
            mu[i] = _g0_RT(names[i], eq.T) + np.log(eq.P / P_REF) + np.log(n[i] / N)
    condensed = [i for i, s in enumerate(names) if eq.phase_of[s] != "gas"]
    g0_condensed = {i: _g0_RT(names[i], eq.T) for i in condensed
                    if db[names[i]].T_min <= eq.T <= db[names[i]].T_max}
    for i, g0 in g0_condensed.items():
        if n[i] > 0:
            mu[i] = g0
    rows = sorted(mu)
    lam, *_ = np.linalg.lstsq(A[:, rows].T, np.array([mu[i] for i in rows]), rcond=None)
    stationarity = float(np.max(np.abs(A[:, rows].T @ lam - np.array([mu[i] for i in rows]))))
    margins = [g0 - A[:, i] @ lam for i, g0 in g0_condensed.items() if n[i] <= 0]
    return KKT(balance, stationarity, float(min(margins)) if margins else np.inf)
