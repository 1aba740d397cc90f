"""The linearised optimality conditions: equilibrium sensitivities (and the matrix the phase-boundary Newton borders).

At an equilibrium with a given set of phases present the conditions are

    mu0_j(T, P) + ln n_j - ln N - a_j . pi = 0      every gas species
    mu0_c(T)                   - a_c . pi = 0      every present condensed species
    sum_j a_kj n_j + sum_c a_kc n_c      = b_k    every element

Differentiating them (implicit differentiation) with ln n_j eliminated,

    d ln n_j = d ln N + a_j . d pi - d mu0_j,

leaves one symmetric system in (d pi, d ln N, d n_c) of size elements + 1 +
condensed, the matrix of the Newton method itself (Gordon and McBride, NASA
RP-1311, 1994, section 2).  Its right-hand side says what moved:
d mu0/dT = -h/(R T^2), d mu0_gas/dP = 1/P, d b/d n_feed = the feed species'
element column.  The equilibrium heat capacity is then

    Cp_eq = dH/dT = sum_j n_j cp_j + sum_j h_j dn_j/dT.

When the present phases leave no freedom in T at fixed P (ice with liquid
water, a liquid boiling off a one-component feed) the matrix is singular:
Cp_eq is infinite and T is fixed by the phases.  Adding T as an unknown and the
energy balance as an equation borders the matrix into a regular one; Newton on
that bordered system (``energy.phase_boundary``) finds the state on the plateau
where the heat sets only the split between the coexisting phases.

Quantities are scaled by s = sum(b): amounts nu = n/s, enthalpies h/RT,
temperature steps tau = dT/T.  The gas is ideal here; for a cubic gas, whose
ln phi moves with T, P and composition, :func:`difference_sensitivities`
differentiates whole solves instead.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from .fixed_step import Setup
from .solve import SolverResult
from .system import Problem
from .thermo.database import SpeciesDatabase
from .thermo.datasets import default_database
from .thermo.nasa7 import R

#: Phases whose element columns are dependent to this relative precision fix T (see ``_fixed_T_system``).
_DEPENDENT = 1e-9


@dataclass(frozen=True)
class Sensitivities:
    """Derivatives of an equilibrium with respect to its conditions, by implicit differentiation.

    Attributes
    ----------
    species : tuple of str
        The System's species, the order of every array.
    dn_dT : ndarray
        d n_j / dT at fixed P and feed, [mol/K].
    dn_dP : ndarray
        d n_j / dP at fixed T and feed, [mol/Pa].
    dn_dfeed : dict
        Feed species to d n_j / d n_feed at fixed T and P, [mol/mol].
    heat_capacity_frozen : float
        sum_j n_j cp_j, composition held fixed, [J/K].
    heat_capacity_equilibrium : float
        dH/dT with the equilibrium shifting, [J/K]; inf where the phases fix T.
    """

    species: tuple[str, ...]
    dn_dT: NDArray[np.float64]
    dn_dP: NDArray[np.float64]
    dn_dfeed: Mapping[str, NDArray[np.float64]]
    heat_capacity_frozen: float
    heat_capacity_equilibrium: float

    def to_dict(self) -> dict[str, object]:
        """JSON-ready form (None where a derivative does not exist)."""
        def table(values):
            return {s: (float(v) if np.isfinite(v) else None) for s, v in zip(self.species, values)}
        cp_eq = self.heat_capacity_equilibrium
        return {
            "dn_dT_mol_per_K": table(self.dn_dT),
            "dn_dP_mol_per_Pa": table(self.dn_dP),
            "dn_dfeed_mol_per_mol": {k: table(v) for k, v in self.dn_dfeed.items()},
            "heat_capacity_frozen_J_per_K": self.heat_capacity_frozen,
            "heat_capacity_equilibrium_J_per_K": float(cp_eq) if np.isfinite(cp_eq) else None,
        }


@dataclass(frozen=True)
class LinearisedState:
    """One point of a solved batch on its present phase set, scaled."""

    A_g: NDArray[np.float64]      # (M, G)
    A_c: NDArray[np.float64]      # (M, C) present condensed only
    nu_g: NDArray[np.float64]     # gas amounts / s
    nu_c: NDArray[np.float64]     # present condensed amounts / s
    s: float                      # sum(b), [mol]
    present: NDArray[np.int_]     # positions of the present condensed species among the kept condensed


def linearised_state(problem: Problem, ln_n_gas: NDArray[np.float64], n_condensed: NDArray[np.float64],
                     present: NDArray[np.bool_]) -> LinearisedState:
    G = problem.n_gas
    s = float(problem.b[0].sum())
    where = np.flatnonzero(present)
    return LinearisedState(problem.A[:, :G], problem.A[:, G:][:, where], np.exp(ln_n_gas - np.log(s)),
                  n_condensed[where] / s, s, where)


def fixed_T_matrix(state: LinearisedState) -> NDArray[np.float64]:
    """The symmetric fixed-T system in (d pi, d ln N, d nu_c)."""
    M, C = state.A_g.shape[0], state.A_c.shape[1]
    b_gas = state.A_g @ state.nu_g
    K = np.zeros((M + 1 + C, M + 1 + C))
    K[:M, :M] = (state.A_g * state.nu_g) @ state.A_g.T
    K[:M, M] = K[M, :M] = b_gas
    K[:M, M + 1:] = state.A_c
    K[M + 1:, :M] = state.A_c.T
    return K


def _rhs(state: LinearisedState, m_gas: NDArray[np.float64], m_condensed: NDArray[np.float64],
         d_beta: NDArray[np.float64]) -> NDArray[np.float64]:
    """Right-hand side for a change d mu0 (gas, present condensed) and d b / s."""
    return np.concatenate([d_beta + state.A_g @ (state.nu_g * m_gas), [state.nu_g @ m_gas], m_condensed])


def _responses(state: LinearisedState, K: NDArray[np.float64], rhs: NDArray[np.float64],
               m_gas: NDArray[np.float64]) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """Changes of the kept gas and present condensed amounts, [mol per unit parameter], for several rhs columns."""
    M = state.A_g.shape[0]
    try:
        x = np.linalg.solve(K, rhs)
    except np.linalg.LinAlgError:
        x = np.linalg.lstsq(K, rhs, rcond=None)[0]
    d_ln_gas = x[M] + state.A_g.T @ x[:M] - m_gas
    return state.s * state.nu_g[:, None] * d_ln_gas, state.s * x[M + 1:]


def kept_properties(setup: Setup, problem: Problem, T: float):
    """h/RT and cp/R of the kept species at T."""
    table = setup.system.table
    return table.h_RT(T)[problem.keep], table.cp_R(T)[problem.keep]


def _fixed_T_system(setup: Setup, problem: Problem, result: SolverResult, i: int = 0):
    """The fixed-T matrix of point i, and whether the present phases make it singular.

    With every gas amount positive the gas block A diag(nu) A^T is definite,
    so the matrix is singular exactly when the columns [A n_gas, A_c] are
    dependent: the gas and the condensed phases cannot change their amounts
    independently, which is the phase rule leaving no freedom in T.  Trace
    species may make the matrix ill-conditioned without making it singular,
    so its condition number is not the test.
    """
    state = linearised_state(problem, result.ln_n_gas[i], result.n_condensed[i], result.present[i])
    K = fixed_T_matrix(state)
    columns = np.column_stack([state.A_g @ state.nu_g, state.A_c])
    norms = np.linalg.norm(columns, axis=0)
    columns = columns[:, norms > 0.0] / norms[norms > 0.0]  # an absent gas (all liquid water) has no column
    singular_values = np.linalg.svd(columns, compute_uv=False)
    singular = not np.all(np.isfinite(K)) or singular_values[-1] < _DEPENDENT * singular_values[0]
    return state, K, singular


def fixes_temperature(setup: Setup, problem: Problem, result: SolverResult) -> bool:
    """Whether the present phases leave no freedom in T at fixed P (the fixed-T system is singular)."""
    return _fixed_T_system(setup, problem, result)[2]


def equilibrium_heat_capacity(setup: Setup, problem: Problem, result: SolverResult, T: float,
                              P: float) -> float:
    """dH/dT of the equilibrium at T [K] and fixed P [Pa], [J/K]; NaN where the present phases fix T."""
    cp = equilibrium_sensitivities(setup, problem, result, T, P, feed_species=()).heat_capacity_equilibrium
    return cp if np.isfinite(cp) else float("nan")


def equilibrium_sensitivities(setup: Setup, problem: Problem, result: SolverResult, T: float, P: float,
                              feed_species: Sequence[str] | None = None,
                              db: SpeciesDatabase | None = None) -> Sensitivities:
    """d(amounts)/dT, d/dP, d/d(feed amounts) and the heat capacities of a solved point.

    Parameters
    ----------
    setup, problem, result
        A solved fixed-T,P point (``fixed_step.solve_fixed``).
    T : float
        Its temperature, [K].
    P : float
        Its pressure, [Pa] (only d/dP depends on it).
    feed_species : list of str, optional
        Species to differentiate with respect to (their feed amounts); the
        feed's species by default.  They need not be in the species set.
    db : SpeciesDatabase, optional
        Where ``feed_species`` are looked up.

    Returns
    -------
    Sensitivities
        Derivatives are NaN (heat capacity inf) where the present phases fix T.
    """
    system = setup.system
    S, G = len(system.names), problem.n_gas
    feed_species = list(setup.feed) if feed_species is None else list(feed_species)
    state, K, singular = _fixed_T_system(setup, problem, result)
    n_kept = np.concatenate([np.exp(result.ln_n_gas[0]), result.n_condensed[0]])
    frozen = float(R * n_kept @ kept_properties(setup, problem, T)[1])
    if singular:
        undefined = np.full(S, np.nan)
        return Sensitivities(system.names, undefined, undefined, {f: undefined for f in feed_species},
                             frozen, float("inf"))
    M, C = state.A_g.shape[0], state.A_c.shape[1]
    columns: list[tuple[NDArray, NDArray, NDArray]] = []
    h = kept_properties(setup, problem, T)[0]
    # Columns: temperature (per K), pressure (per Pa), then one per feed species (per mol).
    columns.append((-h[:G] / T, -h[G:][state.present] / T, np.zeros(M)))
    columns.append((np.full(G, 1.0 / P), np.zeros(C), np.zeros(M)))
    feed_columns = system.element_matrix((db or default_database()).resolve(feed_species))
    for k in range(len(feed_species)):
        columns.append((np.zeros(G), np.zeros(C), problem.basis @ feed_columns[:, k] / state.s))
    rhs = np.stack([_rhs(state, *c) for c in columns], axis=1)
    m_gas = np.stack([c[0] for c in columns], axis=1)
    dn_gas, dn_cond = _responses(state, K, rhs, m_gas)
    full = np.zeros((S, rhs.shape[1]))
    full[problem.keep[:G]] = dn_gas
    full[problem.keep[G:][state.present]] = dn_cond
    H_J = R * T * system.table.h_RT(T)
    return Sensitivities(
        species=system.names,
        dn_dT=full[:, 0],
        dn_dP=full[:, 1],
        dn_dfeed={name: full[:, 2 + k] for k, name in enumerate(feed_species)},
        heat_capacity_frozen=frozen,
        heat_capacity_equilibrium=frozen + float(H_J @ full[:, 0]),
    )


def formation_enthalpy_sensitivities(setup: Setup, problem: Problem, result: SolverResult,
                                     T: float) -> NDArray[np.float64]:
    """d n_i / d(delta-f H_j) of a solved fixed-T,P point, [mol per J/mol], shape (species, species).

    A shift dH of species j's enthalpy of formation moves its h and g by dH at
    every T, so mu0_j by dH/(R T): one right-hand-side column per kept gas
    species and per present condensed species (an absent condensed species
    moves nothing to first order).  NaN everywhere where the phases fix T.
    """
    S, G = len(setup.system.names), problem.n_gas
    state, K, singular = _fixed_T_system(setup, problem, result)
    if singular:
        return np.full((S, S), np.nan)
    C = state.A_c.shape[1]
    m_gas = np.zeros((G, G + C))
    m_gas[:, :G] = np.eye(G) / (R * T)
    m_condensed = np.zeros((C, G + C))
    m_condensed[:, G:] = np.eye(C) / (R * T)
    rhs = np.vstack([state.A_g @ (state.nu_g[:, None] * m_gas), (state.nu_g @ m_gas)[None, :], m_condensed])
    dn_gas, dn_cond = _responses(state, K, rhs, m_gas)
    gas_rows, condensed_rows = problem.keep[:G], problem.keep[G:][state.present]
    columns = np.concatenate([gas_rows, condensed_rows])
    full = np.zeros((S, S))
    full[np.ix_(gas_rows, columns)] = dn_gas
    full[np.ix_(condensed_rows, columns)] = dn_cond
    return full


#: Relative step of the central differences of :func:`difference_sensitivities`.
DIFFERENCE_STEP = 1e-4


def difference_sensitivities(
    names: Sequence[str],
    T: float,
    P: float,
    b: NDArray[np.float64],
    feed_columns: Mapping[str, NDArray[np.float64]],
    amounts_at: Callable[[float, float, NDArray[np.float64]], NDArray[np.float64]],
    enthalpy_at: Callable[[float, NDArray[np.float64]], float],
    *,
    step: float = DIFFERENCE_STEP,
) -> Sensitivities:
    """Sensitivities by central differences of whole solves, for models whose potentials depend on composition.

    With a cubic gas, ln phi moves with T, P and the composition, which the
    implicit differentiation above holds fixed.  Here every derivative is
    (x(c + h) - x(c - h)) / 2h of re-solved equilibria (``amounts_at(T, P, b)``
    gives the amounts in ``names`` order, warm-started by the caller), and the
    heat capacities differentiate ``enthalpy_at(T, amounts)`` (the residual
    enthalpy included): about 1e-8 relative, as the solves are converged to
    1e-12.  A phase appearing within the step makes the derivative one-sided.
    """
    n = amounts_at(T, P, b)
    dT, dP = step * T, step * P
    hotter, colder = amounts_at(T + dT, P, b), amounts_at(T - dT, P, b)
    dn_dT = (hotter - colder) / (2 * dT)
    dn_dP = (amounts_at(T, P + dP, b) - amounts_at(T, P - dP, b)) / (2 * dP)
    scale = float(np.abs(b).sum())
    dn_dfeed = {}
    for name, column in feed_columns.items():
        h = step * scale / max(float(np.abs(column).sum()), 1e-300)
        if np.any(b - h * column < 0.0):  # a species the feed lacks cannot be taken away: one-sided
            dn_dfeed[name] = (amounts_at(T, P, b + h * column) - n) / h
        else:
            dn_dfeed[name] = (amounts_at(T, P, b + h * column) - amounts_at(T, P, b - h * column)) / (2 * h)
    frozen = (enthalpy_at(T + dT, n) - enthalpy_at(T - dT, n)) / (2 * dT)
    equilibrium = (enthalpy_at(T + dT, hotter) - enthalpy_at(T - dT, colder)) / (2 * dT)
    return Sensitivities(tuple(names), dn_dT, dn_dP, dn_dfeed, float(frozen), float(equilibrium))
