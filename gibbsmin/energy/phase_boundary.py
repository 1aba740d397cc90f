"""Equilibrium at fixed H and P on a phase boundary: Newton with T unknown, closed by the energy balance.

When the present phases leave no freedom in T at fixed P (ice with liquid
water, a liquid boiling off a one-component feed) the fixed-T matrix of
``sensitivity`` is singular, and H_eq(T) jumps at the boundary temperature.
Adding T as an unknown and the energy balance as an equation borders that
matrix into a regular one; Newton on the bordered system finds the state on
the plateau where the heat sets only the split between the coexisting phases
(Gordon and McBride, NASA RP-1311, 1994, section 2, for the unbordered
matrix).  A cubic gas model enters through its ln phi, evaluated afresh at
every iterate (the matrix stays the ideal one).
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np
from numpy.typing import NDArray

from ..equilibrium import Equilibrium
from ..sensitivity import fixed_T_matrix, kept_properties, linearised_state
from ..fixed_step import Setup, build_problem, to_equilibrium
from ..solve import SolverResult, certify
from ..system import Problem, standard_mu0
from ..thermo.nasa7 import R

#: A phase-boundary answer may lie this far outside a present species' fitted range, [K]: neighbouring
#: phases' fits meet within a few mK of each other (ice and liquid water: 273.144 K against 273.15 K).
PHASE_BOUNDARY_SLACK = 0.1


def solve_on_phase_boundary(
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
        state = linearised_state(problem, ln_n, n_c_all, present)
        C = state.A_c.shape[1]
        mu0 = standard_mu0(system, np.array([T]), np.array([P]))[0, problem.keep]
        if ln_phi is not None:
            mu0[:G] += ln_phi(T, P, gas_amounts(ln_n))[kept_gas]
        h, cp = kept_properties(setup, problem, T)
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
        K[: M + 1 + C, : M + 1 + C] = fixed_T_matrix(state)
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
