"""The linearised optimality conditions: equilibrium sensitivities, and Newton with T closed by the energy balance.

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
that bordered system (``settle_on_phase_set``) finds the state on the plateau
where the heat sets only the split between the coexisting phases.

Quantities are scaled by s = sum(b): amounts nu = n/s, enthalpies h/RT,
temperature steps tau = dT/T.  The gas is ideal here; for a cubic gas, whose
ln phi moves with T, P and composition, :func:`difference_sensitivities`
differentiates whole solves instead, and ``settle_on_phase_set`` takes the
model's ln phi afresh at every iterate (its matrix stays the ideal one).
"""

from __future__ import annotations

from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from .equilibrium import Equilibrium
from .settle import Setup, build_problem, to_equilibrium
from .solve import SolverResult, certify
from .system import Problem, standard_mu0
from .thermo.database import SpeciesDatabase, default_database
from .thermo.nasa7 import R

#: A phase-boundary answer may lie this far outside a present species' fitted range, [K]: neighbouring
#: phases' fits meet within a few mK of each other (ice and liquid water: 273.144 K against 273.15 K).
PHASE_BOUNDARY_SLACK = 0.1

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
class _State:
    """One point of a solved batch on its present phase set, scaled."""

    A_g: NDArray[np.float64]      # (M, G)
    A_c: NDArray[np.float64]      # (M, C) present condensed only
    nu_g: NDArray[np.float64]     # gas amounts / s
    nu_c: NDArray[np.float64]     # present condensed amounts / s
    s: float                      # sum(b), [mol]
    present: NDArray[np.int_]     # positions of the present condensed species among the kept condensed


def _state(problem: Problem, ln_n_gas: NDArray[np.float64], n_condensed: NDArray[np.float64],
           present: NDArray[np.bool_]) -> _State:
    G = problem.n_gas
    s = float(problem.b[0].sum())
    where = np.flatnonzero(present)
    return _State(problem.A[:, :G], problem.A[:, G:][:, where], np.exp(ln_n_gas - np.log(s)),
                  n_condensed[where] / s, s, where)


def _matrix(state: _State) -> NDArray[np.float64]:
    """The symmetric fixed-T system in (d pi, d ln N, d nu_c)."""
    M, C = state.A_g.shape[0], state.A_c.shape[1]
    b_gas = state.A_g @ state.nu_g
    K = np.zeros((M + 1 + C, M + 1 + C))
    K[:M, :M] = (state.A_g * state.nu_g) @ state.A_g.T
    K[:M, M] = K[M, :M] = b_gas
    K[:M, M + 1:] = state.A_c
    K[M + 1:, :M] = state.A_c.T
    return K


def _rhs(state: _State, m_gas: NDArray[np.float64], m_condensed: NDArray[np.float64],
         d_beta: NDArray[np.float64]) -> NDArray[np.float64]:
    """Right-hand side for a change d mu0 (gas, present condensed) and d b / s."""
    return np.concatenate([d_beta + state.A_g @ (state.nu_g * m_gas), [state.nu_g @ m_gas], m_condensed])


def _responses(state: _State, K: NDArray[np.float64], rhs: NDArray[np.float64],
               m_gas: NDArray[np.float64]) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """Changes of the kept gas and present condensed amounts, [mol per unit parameter], for several rhs columns."""
    M = state.A_g.shape[0]
    try:
        x = np.linalg.solve(K, rhs)
    except np.linalg.LinAlgError:
        x = np.linalg.lstsq(K, rhs, rcond=None)[0]
    d_ln_gas = x[M] + state.A_g.T @ x[:M] - m_gas
    return state.s * state.nu_g[:, None] * d_ln_gas, state.s * x[M + 1:]


def _kept_properties(setup: Setup, problem: Problem, T: float):
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
    state = _state(problem, result.ln_n_gas[i], result.n_condensed[i], result.present[i])
    K = _matrix(state)
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
        A solved fixed-T,P point (``settle.solve_fixed``).
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
    frozen = float(R * n_kept @ _kept_properties(setup, problem, T)[1])
    if singular:
        undefined = np.full(S, np.nan)
        return Sensitivities(system.names, undefined, undefined, {f: undefined for f in feed_species},
                             frozen, float("inf"))
    M, C = state.A_g.shape[0], state.A_c.shape[1]
    columns: list[tuple[NDArray, NDArray, NDArray]] = []
    h = _kept_properties(setup, problem, T)[0]
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
    M, C = state.A_g.shape[0], state.A_c.shape[1]
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


def settle_on_phase_set(
    setup: Setup,
    problem: Problem,
    low: SolverResult,
    high: SolverResult,
    T_low: float,
    T_high: float,
    f_low: float,
    f_high: float,
    H_target: float,
    P: float,
    residual_enthalpy: Callable[[float, float, NDArray[np.float64]], float] | None = None,
    allow_extrapolation: bool = False,
    max_iterations: int = 50,
    ln_phi: Callable[[float, float, NDArray[np.float64]], NDArray[np.float64]] | None = None,
    gas_model: str = "ideal",
) -> tuple[Equilibrium, Problem, SolverResult] | None:
    """Equilibrium at fixed H and P with the union of two phase sets present and T unknown.

    Starts from the mixture of the two bracketing answers that balances the
    enthalpy linearly, and runs Newton on the optimality conditions bordered by
    the energy balance.  Returns None when the iteration does not settle, a
    condensed amount turns negative (that phase set is not the answer), or T
    leaves the bracket by more than ``PHASE_BOUNDARY_SLACK``.

    Parameters
    ----------
    problem : Problem
        The problem of the lower end (for its species and element rows).
    low, high : SolverResult
        Answers at the ends of the bracket, T_low and T_high [K], whose
        enthalpies miss the target by f_low < 0 < f_high [J].
    H_target : float
        [J].
    residual_enthalpy : callable, optional
        The gas model's residual enthalpy (T [K], P [Pa], gas amounts [mol]
        in the System's gas order) -> [J]; ideal gas when omitted.
    ln_phi : callable, optional
        The gas model's ln phi (same arguments) -> one value per System gas
        species; ideal gas when omitted.  It is evaluated afresh at every
        iterate's T and composition and held fixed within that Newton step
        (the frozen-phi outer loop of a fixed-T solve, one step per pass), so
        the converged state meets the non-ideal conditions, and the answer's
        certificate is taken with phi at its own composition.
    gas_model : str
        Name of the gas model, for the answer.
    """
    system = setup.system
    G = problem.n_gas
    theta = min(max(-f_low / (f_high - f_low), 0.0), 1.0)
    with np.errstate(divide="ignore"):
        ln_n = np.logaddexp(np.log1p(-theta) + low.ln_n_gas[0], np.log(theta) + high.ln_n_gas[0])
    if not np.any(np.isfinite(ln_n)):
        return None  # no gas at either end (ice and liquid water alone): this bordered Newton needs one
    n_c_all = (1 - theta) * low.n_condensed[0] + theta * high.n_condensed[0]
    present = low.present[0] | high.present[0]
    pi = (1 - theta) * low.pi[0] + theta * high.pi[0]
    T = T_low + theta * (T_high - T_low)
    A = problem.A
    M = A.shape[0]
    s = float(problem.b[0].sum())
    beta = problem.b[0] / s
    kept_gas = problem.keep[:G]

    def gas_amounts(ln_n_kept):
        """Gas amounts in the System's gas order, [mol]."""
        n_gas_system = np.zeros(system.n_gas)
        n_gas_system[kept_gas] = np.exp(ln_n_kept)
        return n_gas_system

    for iteration in range(1, max_iterations + 1):
        state = _state(problem, ln_n, n_c_all, present)
        C = state.A_c.shape[1]
        mu0 = standard_mu0(system, np.array([T]), np.array([P]))[0, problem.keep]
        if ln_phi is not None:
            mu0[:G] += ln_phi(T, P, gas_amounts(ln_n))[kept_gas]
        h, cp = _kept_properties(setup, problem, T)
        h_g, h_c = h[:G], h[G:][state.present]
        ln_nu = ln_n - np.log(s)
        r_gas = mu0[:G] + ln_nu - np.log(state.nu_g.sum()) - state.A_g.T @ pi
        r_cond = mu0[G:][state.present] - state.A_c.T @ pi
        r_elem = state.A_g @ state.nu_g + state.A_c @ state.nu_c - beta
        n_kept = np.concatenate([np.exp(ln_n), n_c_all])
        H = float(n_kept @ (h * (R * T)))
        if residual_enthalpy is not None:
            H += float(residual_enthalpy(T, P, gas_amounts(ln_n)))
        r_energy = (H - H_target) / (R * T * s)
        if max(np.abs(r_gas).max(initial=0), np.abs(r_cond).max(initial=0), np.abs(r_elem).max(initial=0),
               abs(r_energy)) < 1e-12:
            break
        K = np.zeros((M + C + 2, M + C + 2))
        K[: M + 1 + C, : M + 1 + C] = _matrix(state)
        nu_h = state.nu_g * h_g
        t = M + 1 + C  # the temperature column and the energy row
        K[:M, t] = state.A_g @ nu_h
        K[M, t] = nu_h.sum()
        K[M + 1: t, t] = h_c
        K[t, :M] = state.A_g @ nu_h
        K[t, M] = nu_h.sum()
        K[t, M + 1: t] = h_c
        K[t, t] = nu_h @ h_g + float(n_kept @ cp) / s
        rhs = np.concatenate([-r_elem + state.A_g @ (state.nu_g * r_gas), [state.nu_g @ r_gas], r_cond,
                              [-r_energy + nu_h @ r_gas]])
        try:
            x = np.linalg.solve(K, rhs)
        except np.linalg.LinAlgError:
            # Exactly singular in floating point: an element direction held only by traces far below the
            # round-off of the major species (O2 and H2 beside water).  The least-norm step leaves those
            # traces where the solver put them.
            x = np.linalg.lstsq(K, rhs, rcond=None)[0]
        d_pi, d_ln_N, d_nu_c, tau = x[:M], x[M], x[M + 1: t], x[t]
        d_ln_n = -r_gas + d_ln_N + state.A_g.T @ d_pi + h_g * tau
        y = state.nu_g / state.nu_g.sum()
        major = y > 1e-8
        biggest = max(np.abs(d_ln_n[major]).max(initial=0.0), abs(d_ln_N))
        step = min(1.0, 2.0 / biggest if biggest > 0 else 1.0, 0.05 / abs(tau) if tau else 1.0)
        ln_n = ln_n + step * d_ln_n
        pi = pi + step * d_pi
        n_c_all = n_c_all.copy()
        n_c_all[state.present] += step * s * d_nu_c
        T = T * (1.0 + step * tau)
        if not np.isfinite(T) or T <= 0:
            return None
    else:
        return None
    if np.any(n_c_all[present] < -1e-12 * s):
        return None
    if np.exp(ln_n).sum() <= 1e-12 * s:
        return None  # a gas at the round-off of the balance is no coexisting phase (liquid water alone)
    if not T_low - PHASE_BOUNDARY_SLACK <= T <= T_high + PHASE_BOUNDARY_SLACK:
        return None
    n_c_all = np.where(present, np.maximum(n_c_all, 0.0), 0.0)
    # The loop stopped at a state whose residuals were taken with ln phi at that very state.
    held = None if ln_phi is None else ln_phi(T, P, gas_amounts(ln_n))
    try:
        at_T = build_problem(setup, np.array([T]), np.array([P]), ln_phi=held,
                             allow_extrapolation=allow_extrapolation)
    except ValueError:
        return None
    # The present phases are allowed, even a few mK outside a fit that meets its neighbour there.
    allowed = at_T.allowed.copy()
    allowed[0, G:] |= present
    at_T = Problem(at_T.A, at_T.b, at_T.mu0, at_T.n_gas, allowed, at_T.keep, at_T.basis)
    result = SolverResult(ln_n_gas=ln_n[None, :], n_condensed=n_c_all[None, :], present=present[None, :],
                          pi=pi[None, :], converged=np.array([True]), iterations=np.array([iteration]),
                          method=("newton+energy balance",))
    certificates = certify(at_T, result)
    return to_equilibrium(setup, at_T, result, certificates, 0, float(T), P, gas_model=gas_model,
                          specification="H and P"), at_T, result
