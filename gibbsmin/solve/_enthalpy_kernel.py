"""Compiled Newton at fixed enthalpy and pressure: T as one more unknown of the element-potential Newton.

The classical reduction of Gordon and McBride (NASA RP-1311, 1994, section 2.5):
to the fixed-T,P system of newton.py (element rows, present condensed species,
the total gas amount) the energy balance sum_j n_j h_j/RT = H0/RT is added as
one more equation and d ln T as one more unknown.  With h_j/RT and cp_j/R of
every species at the iterate's T (NASA 7-coefficient polynomials), the gas
unknowns eliminate as before,

    d ln n_j = -mu_j + a_j . pi + d ln N + (h_j/RT) d ln T,

and each condensed row gains h_c/RT d ln T, leaving a symmetric
(M + C + 2) system per iteration.

The solve is certified only for what it holds fixed: the ideal gas, the
condensed phase set a fixed-T solve at the starting temperature found (a
phase that would appear or vanish on the way ends the solve, and the caller
falls back on its bracketed search), no offsets to the standard potentials.
``run`` does the whole of it in one call: the fixed-T solve at the start, the
T-unknown Newton, and a last fixed-T solve at the temperature found (with its
phase management, so an absent condensed species that would form there shows
as a changed phase set).
"""

from __future__ import annotations

import math

import numpy as np

from ..compiled import compiled
from ..system import P_REF
from ..thermo.nasa7 import ENTHALPY, GIBBS, HEAT_CAPACITY, R, polynomials
from ._newton_kernel import CONVERGED, _lu_solve, iterate_point, step_limits, take_step

# Outcomes of ``run`` beyond the Newton kernel's CONVERGED, NOT_CONVERGED, SINGULAR and CYCLING.
START_FAILED = 10       # the fixed-T solve at the starting temperature did not converge
NO_GAS = 11             # the condensed phases hold every atom: H fixes nothing the gas could take
PHASE_CHANGED = 12      # a present condensed amount went below zero, or the last fixed-T solve changed the phases
OUT_OF_RANGE = 13       # T left the bounds, or a present condensed species' data range
HP_NOT_CONVERGED = 14   # the T-unknown Newton did not settle
LAST_SOLVE_FAILED = 15  # the fixed-T solve at the temperature found did not converge

@compiled()
def _gas_block(A_g, n, J):
    """J[:M, :M] = A_g diag(n) A_g^T: the gas's block of every element-potential system here."""
    M, G = A_g.shape
    for k in range(M):
        for i in range(k, M):
            value = 0.0
            for j in range(G):
                value += A_g[k, j] * A_g[i, j] * n[j]
            J[k, i] = value
            J[i, k] = value


@compiled()
def _property_arrays(S):
    """The work arrays ``_at_temperature`` fills for S species: T as an array, the polynomials' output, and
    g0/RT (with ln P on the gas), h/RT and cp/R."""
    return np.empty(1), np.empty((1, S)), np.empty(S), np.empty(S), np.empty(S)


@compiled()
def _at_temperature(low, high, T_mid, n_gas, T, ln_p, t, out, mu0, h, cp):
    """g0/RT (with ln P/P0 on the gas), h/RT and cp/R of every species at T, as ``system.standard_mu0`` has them."""
    t[0] = T
    polynomials(low, high, T_mid, t, GIBBS, out)
    for j in range(mu0.size):
        mu0[j] = out[0, j] + (ln_p if j < n_gas else 0.0)
    polynomials(low, high, T_mid, t, ENTHALPY, out)
    for j in range(h.size):
        h[j] = out[0, j]
    polynomials(low, high, T_mid, t, HEAT_CAPACITY, out)
    for j in range(cp.size):
        cp[j] = out[0, j]


@compiled()
def frozen_temperature(low, high, T_mid, n, H, T_low, T_high):
    """Temperature [K] in [T_low, T_high] at which amounts n [mol] unreacted have enthalpy H [J] (Newton on T)."""
    t = np.empty(1)
    out = np.empty((1, n.size))
    T = 0.5 * (T_low + T_high)
    for _ in range(60):
        t[0] = T
        polynomials(low, high, T_mid, t, HEAT_CAPACITY, out)
        cp = 0.0
        for j in range(n.size):
            cp += n[j] * out[0, j]
        cp = max(R * cp, 1e-12)
        polynomials(low, high, T_mid, t, ENTHALPY, out)
        h = 0.0
        for j in range(n.size):
            h += n[j] * out[0, j]
        step = (H - h * R * T) / cp
        T = min(max(T + step, T_low), T_high)
        if abs(step) < 1e-6:
            break
    return T


#: Columns [A n_gas, A_c] dependent to this relative precision: the phases fix T (as ``sensitivity._DEPENDENT``).
_DEPENDENT = 1e-9
#: What ``equilibrium_heat_capacity`` returns where its linear system could not be solved.
UNSOLVED = -1.0


@compiled()
def equilibrium_heat_capacity(A, n_gas, b_total, ln_n_gas, n_condensed, present, low, high, T_mid, T):
    """dH/dT [J/K] of a solved fixed-T,P point on its phase set, the composition shifting; NaN where the phases
    fix T, ``UNSOLVED`` where the system could not be solved.

    The derivative of the fixed-T conditions with respect to T (d mu0_j/dT = -h_j/(R T^2)): the bordered
    system of ``sensitivity.equilibrium_sensitivities`` with its temperature column alone, amounts scaled
    to sum(b) = 1 (b_total, [mol]).  Singular exactly when [A n_gas, A_c] are dependent (the phase rule leaving no freedom
    in T), which is tested on those columns as there.
    """
    M, S = A.shape
    G = n_gas
    C = S - G
    m = 0
    for c in range(C):
        if present[c]:
            m += 1
    where = np.empty(m, dtype=np.int64)
    i = 0
    for c in range(C):
        if present[c]:
            where[i] = c
            i += 1
    t = np.empty(1)
    t[0] = T
    h = np.empty((1, S))
    cp = np.empty((1, S))
    polynomials(low, high, T_mid, t, ENTHALPY, h)
    polynomials(low, high, T_mid, t, HEAT_CAPACITY, cp)
    n_g = np.empty(G)
    frozen = 0.0
    for j in range(G):
        n_g[j] = math.exp(ln_n_gas[j])
        frozen += n_g[j] * cp[0, j]
    for c in range(C):
        frozen += n_condensed[c] * cp[0, G + c]
    frozen *= R
    scale = b_total
    if not scale > 0.0:
        return UNSOLVED
    nu = n_g / scale
    columns = np.zeros((M, m + 1))
    for k in range(M):
        for j in range(G):
            columns[k, 0] += A[k, j] * nu[j]
        for i in range(m):
            columns[k, i + 1] = A[k, G + where[i]]
    kept = 0
    for i in range(m + 1):
        norm = 0.0
        for k in range(M):
            norm += columns[k, i] ** 2
        norm = math.sqrt(norm)
        if norm > 0.0:
            for k in range(M):
                columns[k, kept] = columns[k, i] / norm
            kept += 1
    if kept == 0:
        return UNSOLVED
    singular_values = np.linalg.svd(np.ascontiguousarray(columns[:, :kept]))[1]
    if not singular_values[-1] >= _DEPENDENT * singular_values[0]:
        return math.nan
    K = M + 1 + m
    J = np.zeros((K, K))
    rhs = np.zeros(K)
    x = np.empty(K)
    m_gas = np.empty(G)
    for j in range(G):
        m_gas[j] = -h[0, j] / T
    _gas_block(np.ascontiguousarray(A[:, :G]), nu, J)
    for k in range(M):
        columns_sum = 0.0
        for j in range(G):
            columns_sum += A[k, j] * nu[j]
            rhs[k] += A[k, j] * nu[j] * m_gas[j]
        J[k, M] = columns_sum
        J[M, k] = columns_sum
        for i in range(m):
            J[k, M + 1 + i] = A[k, G + where[i]]
            J[M + 1 + i, k] = A[k, G + where[i]]
    for j in range(G):
        rhs[M] += nu[j] * m_gas[j]
    for i in range(m):
        rhs[M + 1 + i] = -h[0, G + where[i]] / T
    for i in range(K):
        for k in range(K):
            if not math.isfinite(J[i, k]):
                return math.nan
    if not _lu_solve(J, rhs, x):
        return UNSOLVED
    # dH/dT = frozen + sum_j H_j dn_j/dT, H_j = R T h_j.
    shift = 0.0
    for j in range(G):
        d_ln = x[M] - m_gas[j]
        for k in range(M):
            d_ln += A[k, j] * x[k]
        shift += h[0, j] * scale * nu[j] * d_ln
    for i in range(m):
        shift += h[0, G + where[i]] * scale * x[M + 1 + i]
    return frozen + R * T * shift


@compiled()
def _allowed_at(T_min_c, T_max_c, T, extrapolate, allowed_c):
    for c in range(allowed_c.size):
        allowed_c[c] = extrapolate or (T_min_c[c] <= T <= T_max_c[c])


@compiled()
def _hp_iterate(A_g, A_c, b, low, high, T_mid, T_min_c, T_max_c, extrapolate, ln_p, H0_R, ln_n, n_c, active, pi,
                T, T_low, T_high, tol, max_iterations):
    """Newton on (ln n_gas, n_condensed present, pi, ln N, ln T) with the phase set held; returns (T, its, status).

    Amounts are scaled to sum(b) = 1 and H0_R = H0 / (R * scale) [K]; ln_n, n_c and pi are updated in place.
    """
    M, G = A_g.shape
    C = A_c.shape[1]
    S = G + C
    K = M + C + 2
    iN, iT = M + C, M + C + 1
    J = np.empty((K, K))
    rhs = np.empty(K)
    x = np.empty(K)
    d_scale = np.empty(K)
    n_g = np.empty(G)
    mu_g = np.empty(G)
    d_ln_n = np.empty(G)
    t, out, mu0, h, cp = _property_arrays(S)
    total = 0.0
    for j in range(G):
        total += math.exp(ln_n[j])
    if not (total > 0.0 and math.isfinite(total)):
        return T, 0, NO_GAS
    ln_N = math.log(total)
    for iteration in range(1, max_iterations + 1):
        _at_temperature(low, high, T_mid, G, T, ln_p, t, out, mu0, h, cp)
        N = math.exp(ln_N)
        sum_n = 0.0
        sum_nmu = 0.0
        sum_nh = 0.0
        sum_nhmu = 0.0
        sum_ncp = 0.0
        sum_nhh = 0.0
        gross = 0.0
        for j in range(G):
            n_g[j] = math.exp(ln_n[j])
            mu_g[j] = mu0[j] + ln_n[j] - ln_N
            sum_n += n_g[j]
            sum_nmu += n_g[j] * mu_g[j]
            sum_nh += n_g[j] * h[j]
            sum_nhmu += n_g[j] * h[j] * mu_g[j]
            sum_ncp += n_g[j] * cp[j]
            sum_nhh += n_g[j] * h[j] * h[j]
            gross += abs(n_g[j] * h[j])
        H_RT = sum_nh
        for c in range(C):
            if active[c]:
                H_RT += n_c[c] * h[G + c]
                sum_ncp += n_c[c] * cp[G + c]
                gross += abs(n_c[c] * h[G + c])
        for i in range(K):
            for k in range(K):
                J[i, k] = 0.0
        _gas_block(A_g, n_g, J)
        balanced = True
        for k in range(M):
            s_an = 0.0
            s_anh = 0.0
            s_abs = abs(b[k])
            s_rhs = 0.0
            for j in range(G):
                s_an += A_g[k, j] * n_g[j]
                s_anh += A_g[k, j] * n_g[j] * h[j]
                s_abs += abs(A_g[k, j]) * n_g[j]
                s_rhs += A_g[k, j] * n_g[j] * mu_g[j]
            cond = 0.0
            for c in range(C):
                if active[c]:
                    cond += A_c[k, c] * n_c[c]
                    s_abs += abs(A_c[k, c] * n_c[c])
            if abs(b[k] - s_an - cond) > 1e-11 * s_abs:
                balanced = False
            rhs[k] = b[k] - s_an - cond + s_rhs
            J[k, iN] = s_an
            J[iN, k] = s_an
            J[k, iT] = s_anh
            J[iT, k] = s_anh
        for c in range(C):
            r = M + c
            if active[c]:
                for k in range(M):
                    J[k, r] = A_c[k, c]
                    J[r, k] = A_c[k, c]
                J[r, iT] = h[G + c]
                J[iT, r] = h[G + c]
                rhs[r] = mu0[G + c]
            else:
                J[r, r] = 1.0
                rhs[r] = 0.0
        J[iN, iN] = sum_n - N
        J[iN, iT] = sum_nh
        J[iT, iN] = sum_nh
        rhs[iN] = N - sum_n + sum_nmu
        J[iT, iT] = sum_ncp + sum_nhh
        energy_residual = H0_R / T - H_RT
        rhs[iT] = energy_residual + sum_nhmu
        # Symmetric scaling to unit diagonal of the element rows and the energy row: their sizes differ by
        # the squares of amounts and of h/RT, which pivoting alone would misjudge.
        for k in range(K):
            d_scale[k] = 1.0
        for k in range(M):
            if J[k, k] > 0.0:
                d_scale[k] = 1.0 / math.sqrt(J[k, k])
        if J[iT, iT] > 0.0:
            d_scale[iT] = 1.0 / math.sqrt(J[iT, iT])
        for k in range(K):
            if d_scale[k] != 1.0:
                for i in range(K):
                    J[k, i] *= d_scale[k]
                    J[i, k] *= d_scale[k]
                rhs[k] *= d_scale[k]
        if not _lu_solve(J, rhs, x):
            return T, iteration, PHASE_CHANGED
        for k in range(K):
            x[k] *= d_scale[k]
        for k in range(M):
            pi[k] = x[k]
        d_ln_N = x[iN]
        d_ln_T = x[iT]
        # Step length (Gordon and McBride 1994, eqs. 3.1 to 3.3, with ln T among the major unknowns: at most
        # a factor e^0.4 on T in one step).
        for j in range(G):
            d = -mu_g[j] + d_ln_N + h[j] * d_ln_T
            for k in range(M):
                d += A_g[k, j] * x[k]
            d_ln_n[j] = d
        biggest, lam2, worst = step_limits(ln_n, ln_N, d_ln_n, d_ln_N, 5.0 * max(abs(d_ln_N), abs(d_ln_T)))
        if not (math.isfinite(worst) and math.isfinite(d_ln_T)):
            return T, iteration, HP_NOT_CONVERGED
        lam, worst_c = take_step(ln_n, d_ln_n, n_c, x, M, active, biggest, lam2)
        ln_N += lam * d_ln_N
        for c in range(C):
            if active[c] and n_c[c] < 0.0:
                return T, iteration, PHASE_CHANGED
        T_new = T * math.exp(lam * d_ln_T)
        if not T_low <= T_new <= T_high:
            # The bracketed search names the bound and the species that set it; it takes over here.
            return T, iteration, OUT_OF_RANGE
        T = T_new
        if not extrapolate:
            for c in range(C):
                if active[c] and not T_min_c[c] <= T <= T_max_c[c]:
                    return T, iteration, OUT_OF_RANGE
        if (lam == 1.0 and worst <= tol and abs(d_ln_N) <= tol and abs(d_ln_T) <= tol and worst_c <= tol
                and balanced and abs(energy_residual) <= 1e-12 * max(gross, sum_n)):
            return T, iteration, CONVERGED
    return T, max_iterations, HP_NOT_CONVERGED


@compiled()
def run(A, n_gas, b, low, high, T_mid, T_min, T_max, extrapolate, P, H_target_R, T_start, T_low, T_high, same,
        tol, max_iterations, phase_tol, max_phase_changes):
    """The whole fixed-H,P solve of one point: fixed-T solve at T_start, T-unknown Newton, fixed-T solve at its T.

    ``A`` (M, S) and ``b`` (M,) are a reduced Problem's; the NASA arrays are of
    its kept species (gas first); H_target_R = H_target / R [mol K].
    Returns (T, ln_n_gas, n_condensed, present, pi, iterations, status), amounts unscaled.
    """
    M, S = A.shape
    G = n_gas
    C = S - G
    A_g = np.ascontiguousarray(A[:, :G])
    A_c = np.ascontiguousarray(A[:, G:])
    T_min_c = np.ascontiguousarray(T_min[G:])
    T_max_c = np.ascontiguousarray(T_max[G:])
    scale = b.sum()
    b_scaled = b / scale
    ln_p = math.log(P / P_REF)
    ln_n = np.full(G, math.log(0.1 / G))
    n_c = np.zeros(C)
    active = np.zeros(C, dtype=np.bool_)
    allowed_c = np.zeros(C, dtype=np.bool_)
    pi = np.zeros(M)
    t, out, mu0, h, cp = _property_arrays(S)
    T = T_start
    _at_temperature(low, high, T_mid, G, T, ln_p, t, out, mu0, h, cp)
    _allowed_at(T_min_c, T_max_c, T, extrapolate, allowed_c)
    iterations, status = iterate_point(A_g, A_c, b_scaled, mu0[:G].copy(), mu0[G:].copy(), allowed_c, same, ln_n,
                                       n_c, active, pi, tol, max_iterations, phase_tol, max_phase_changes)
    if status == CONVERGED:
        held = active.copy()
        T, more, status = _hp_iterate(A_g, A_c, b_scaled, low, high, T_mid, T_min_c, T_max_c, extrapolate, ln_p,
                                      H_target_R / scale, ln_n, n_c, active, pi, T, T_low, T_high, tol,
                                      max_iterations)
        iterations += more
        if status == CONVERGED:
            _at_temperature(low, high, T_mid, G, T, ln_p, t, out, mu0, h, cp)
            _allowed_at(T_min_c, T_max_c, T, extrapolate, allowed_c)
            more, status = iterate_point(A_g, A_c, b_scaled, mu0[:G].copy(), mu0[G:].copy(), allowed_c, same,
                                         ln_n, n_c, active, pi, tol, max_iterations, phase_tol, max_phase_changes)
            iterations += more
            if status != CONVERGED:
                status = LAST_SOLVE_FAILED
            else:
                for c in range(C):
                    if active[c] != held[c]:
                        status = PHASE_CHANGED
    else:
        status = START_FAILED
    ln_scale = math.log(scale)
    for j in range(G):
        ln_n[j] += ln_scale
    for c in range(C):
        n_c[c] = n_c[c] * scale if active[c] else 0.0
    return T, ln_n, n_c, active, pi, iterations, status
