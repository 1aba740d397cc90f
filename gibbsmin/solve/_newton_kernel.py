"""Compiled inner loop of the Newton solver (see newton.py for the method).

Written as plain loops for numba: the systems are small (a few elements, tens
of species) and solved many times, where interpreter overhead, not arithmetic,
would dominate.  One point is solved by ``iterate_point``; batches loop over
points in parallel threads.
"""

from __future__ import annotations

import math

import numpy as np
from numba import prange

from ._compile import compiled

LN_TRACE = math.log(1e-8)  # below this mole fraction a gas species is "trace" for the step limits
LN_LIFT = math.log(1e-4)   # a trace species may rise at most to this mole fraction in one step

# Status codes of a point.
CONVERGED = 0
NOT_CONVERGED = 1
SINGULAR = 2
CYCLING = 3


@compiled()
def _lu_solve(J, rhs, x):
    """Solve J x = rhs in place by Gaussian elimination with partial pivoting; False if singular."""
    K = J.shape[0]
    scale = 0.0
    for i in range(K):
        for j in range(K):
            scale = max(scale, abs(J[i, j]))
    if scale == 0.0:
        return False
    for col in range(K):
        pivot = col
        for row in range(col + 1, K):
            if abs(J[row, col]) > abs(J[pivot, col]):
                pivot = row
        if abs(J[pivot, col]) <= 1e-300 * scale:
            return False
        if pivot != col:
            for j in range(K):
                J[col, j], J[pivot, j] = J[pivot, j], J[col, j]
            rhs[col], rhs[pivot] = rhs[pivot], rhs[col]
        for row in range(col + 1, K):
            f = J[row, col] / J[col, col]
            if f != 0.0:
                for j in range(col, K):
                    J[row, j] -= f * J[col, j]
                rhs[row] -= f * rhs[col]
    for row in range(K - 1, -1, -1):
        s = rhs[row]
        for j in range(row + 1, K):
            s -= J[row, j] * x[j]
        x[row] = s / J[row, row]
    return True


@compiled()
def _manage_phases(pi, mu0_c, A_c, allowed, same, n_c, active, phase_tol):
    """Drop a present condensed species with no amount, else add the most stable absent one.

    Returns True when the phase set changed.
    """
    M, C = A_c.shape
    drop = -1
    for c in range(C):
        if active[c] and n_c[c] <= 0.0 and (drop < 0 or n_c[c] < n_c[drop]):
            drop = c
    if drop >= 0:
        active[drop] = False
        n_c[drop] = 0.0
        return True
    add = -1
    best = -phase_tol
    for c in range(C):
        if allowed[c] and not active[c]:
            margin = mu0_c[c]
            for k in range(M):
                margin -= A_c[k, c] * pi[k]
            if margin < best:
                best = margin
                add = c
    if add < 0:
        return False
    # Two phases of one composition cannot coexist at a generic T: the one
    # being added has the lower potential and takes over the other's amount.
    for c in range(C):
        if active[c] and same[add, c]:
            n_c[add] += n_c[c]
            n_c[c] = 0.0
            active[c] = False
    active[add] = True
    return True


@compiled()
def iterate_point(A_g, A_c, b, mu0_g, mu0_c, allowed, same, ln_n, n_c, active, pi,
                  tol, max_iterations, phase_tol, max_phase_changes):
    """Iterate one point to convergence; ln_n, n_c, active, pi are updated in place.

    Amounts are scaled so that sum(b) = 1.  Returns (iterations, status).
    """
    M, G = A_g.shape
    C = A_c.shape[1]
    K = M + C + 1
    J = np.empty((K, K))
    rhs = np.empty(K)
    x = np.empty(K)
    n_g = np.empty(G)
    mu_g = np.empty(G)
    d_ln_n = np.empty(G)
    a_n = np.empty(M)
    total = 0.0
    for j in range(G):
        total += math.exp(ln_n[j])
    ln_N = math.log(total)
    changes = 0
    for iteration in range(1, max_iterations + 1):
        N = math.exp(ln_N)
        sum_n = 0.0
        sum_nmu = 0.0
        for j in range(G):
            n_g[j] = math.exp(ln_n[j])
            mu_g[j] = mu0_g[j] + ln_n[j] - ln_N
            sum_n += n_g[j]
            sum_nmu += n_g[j] * mu_g[j]
        for i in range(K):
            for k in range(K):
                J[i, k] = 0.0
        for k in range(M):
            s_an = 0.0
            s_rhs = 0.0
            for j in range(G):
                s_an += A_g[k, j] * n_g[j]
                s_rhs += A_g[k, j] * n_g[j] * mu_g[j]
            a_n[k] = s_an
            for i in range(k, M):
                s = 0.0
                for j in range(G):
                    s += A_g[k, j] * A_g[i, j] * n_g[j]
                J[k, i] = s
                J[i, k] = s
            cond = 0.0
            for c in range(C):
                cond += A_c[k, c] * n_c[c]
            rhs[k] = b[k] - s_an - cond + s_rhs
            J[k, K - 1] = s_an
            J[K - 1, k] = s_an
        for c in range(C):
            if active[c]:
                for k in range(M):
                    J[k, M + c] = A_c[k, c]
                    J[M + c, k] = A_c[k, c]
                rhs[M + c] = mu0_c[c]
            else:
                J[M + c, M + c] = 1.0
                rhs[M + c] = 0.0
        J[K - 1, K - 1] = sum_n - N
        rhs[K - 1] = N - sum_n + sum_nmu
        if not _lu_solve(J, rhs, x):
            return iteration, SINGULAR
        for k in range(M):
            pi[k] = x[k]
        d_ln_N = x[K - 1]
        # Step length (Gordon and McBride 1994, eqs. 3.1 to 3.3).
        biggest = 5.0 * abs(d_ln_N)
        lam2 = 1.0
        worst = 0.0
        for j in range(G):
            d = -mu_g[j] + d_ln_N
            for k in range(M):
                d += A_g[k, j] * pi[k]
            d_ln_n[j] = d
            ln_y = ln_n[j] - ln_N
            # Changes count in proportion to the species' share of the gas before
            # or after the step: a trace species whose amount is pinned by a
            # nearly cancelling balance (O2 in steam) carries round-off in its
            # logarithm that it cannot shed, yet is exact to its own precision.
            worst = max(worst, abs(d) * math.exp(min(0.0, max(ln_y, ln_y + d - d_ln_N))))
            if ln_y > LN_TRACE:
                biggest = max(biggest, abs(d))
            elif d - d_ln_N > 0.0:
                lam2 = min(lam2, abs((LN_LIFT - ln_y) / (d - d_ln_N)))
        if not math.isfinite(worst):
            return iteration, NOT_CONVERGED
        lam = 1.0
        if biggest > 2.0:
            lam = 2.0 / biggest
        lam = min(lam, lam2)
        if lam <= 0.0:
            lam = 1.0
        worst_c = 0.0
        for j in range(G):
            ln_n[j] += lam * d_ln_n[j]
        ln_N += lam * d_ln_N
        for c in range(C):
            if active[c]:
                n_c[c] += lam * x[M + c]
                worst_c = max(worst_c, abs(x[M + c]))
        # A phase set with no solution shows itself as a condensed amount
        # driven below zero: drop that phase now rather than iterate in vain.
        dropped = -1
        for c in range(C):
            if active[c] and n_c[c] < 0.0 and (dropped < 0 or n_c[c] < n_c[dropped]):
                dropped = c
        if dropped >= 0:
            active[dropped] = False
            n_c[dropped] = 0.0
            changes += 1
            if changes > max_phase_changes:
                return iteration, CYCLING
            continue
        if lam == 1.0 and worst <= tol and abs(d_ln_N) <= tol and worst_c <= tol:
            if not _manage_phases(pi, mu0_c, A_c, allowed, same, n_c, active, phase_tol):
                return iteration, CONVERGED
            changes += 1
            if changes > max_phase_changes:
                return iteration, CYCLING
    return max_iterations, NOT_CONVERGED


@compiled()
def _iterate_chain(first, last, A_g, A_c, b, mu0_g, mu0_c, allowed, same, ln_n, n_c, active, pi,
                   iterations, status, tol, max_iterations, phase_tol, max_phase_changes):
    """Points first..last-1 in order, each started from its predecessor's answer when that converged.

    A point that fails from the warm start is tried again from its own start.
    """
    for p in range(first, last):
        own_ln_n = ln_n[p].copy()
        own_n_c = n_c[p].copy()
        own_active = active[p].copy()
        warm = p > first and status[p - 1] == CONVERGED
        if warm:
            ln_n[p] = ln_n[p - 1]
            for c in range(n_c.shape[1]):
                active[p, c] = active[p - 1, c] and allowed[p, c]
                n_c[p, c] = n_c[p - 1, c] if active[p, c] else 0.0
        iterations[p], status[p] = iterate_point(
            A_g, A_c, b[p], mu0_g[p], mu0_c[p], allowed[p], same, ln_n[p], n_c[p], active[p], pi[p],
            tol, max_iterations, phase_tol, max_phase_changes)
        if warm and status[p] != CONVERGED:
            ln_n[p] = own_ln_n
            n_c[p] = own_n_c
            active[p] = own_active
            extra, status[p] = iterate_point(
                A_g, A_c, b[p], mu0_g[p], mu0_c[p], allowed[p], same, ln_n[p], n_c[p], active[p], pi[p],
                tol, max_iterations, phase_tol, max_phase_changes)
            iterations[p] += extra


@compiled(parallel=True)
def iterate_batch(A_g, A_c, b, mu0_g, mu0_c, allowed, same, ln_n, n_c, active, pi, iterations, status,
                  tol, max_iterations, phase_tol, max_phase_changes, chains):
    """Iterate every point of a batch, cut into ``chains`` runs of neighbours solved in parallel threads.

    Within a run each point starts from the previous answer (warm start), so
    ordering a batch along a sweep axis pays; chains = B gives independent cold starts.
    """
    B = b.shape[0]
    chains = max(1, min(chains, B))
    for c in prange(chains):
        _iterate_chain(c * B // chains, (c + 1) * B // chains, A_g, A_c, b, mu0_g, mu0_c, allowed, same,
                       ln_n, n_c, active, pi, iterations, status, tol, max_iterations, phase_tol,
                       max_phase_changes)


@compiled()
def run(A, n_gas, b, mu0, allowed, same, ln_n_start, n_c_start, present_start, cold,
        tol, max_iterations, phase_tol, max_phase_changes, chains, parallel):
    """The whole Newton solve of a batch in compiled code: scaling, start, iteration, unscaling.

    Amounts are scaled to sum(b) = 1 per point for the iteration.  ``cold``
    ignores the start arrays (the customary start: ln n = ln(0.1 / G), no
    condensed phase).  A single chain runs in this thread: the parallel
    launch costs more than a small solve.
    Returns (ln_n_gas, n_condensed, present, pi, iterations, status).
    """
    B, M, S = b.shape[0], A.shape[0], A.shape[1]
    C = S - n_gas
    A_g = np.ascontiguousarray(A[:, :n_gas])
    A_c = np.ascontiguousarray(A[:, n_gas:])
    mu0_g = np.ascontiguousarray(mu0[:, :n_gas])
    mu0_c = np.ascontiguousarray(mu0[:, n_gas:])
    allowed_c = np.ascontiguousarray(allowed[:, n_gas:])
    scale = np.empty(B)
    b_scaled = np.empty((B, M))
    ln_n = np.empty((B, n_gas))
    n_c = np.zeros((B, C))
    active = np.zeros((B, C), dtype=np.bool_)
    for p in range(B):
        scale[p] = b[p].sum()
        for k in range(M):
            b_scaled[p, k] = b[p, k] / scale[p]
        ln_scale = math.log(scale[p])
        for j in range(n_gas):
            ln_n[p, j] = math.log(0.1 / n_gas) if cold else ln_n_start[p, j] - ln_scale
        if not cold:
            for c in range(C):
                active[p, c] = present_start[p, c] and allowed_c[p, c]
                n_c[p, c] = n_c_start[p, c] / scale[p] if active[p, c] else 0.0
    pi = np.zeros((B, M))
    iterations = np.zeros(B, dtype=np.int64)
    status = np.zeros(B, dtype=np.int64)
    chains = max(1, min(chains, B))
    if parallel and chains > 1:
        iterate_batch(A_g, A_c, b_scaled, mu0_g, mu0_c, allowed_c, same, ln_n, n_c, active, pi, iterations,
                      status, tol, max_iterations, phase_tol, max_phase_changes, chains)
    else:
        for c in range(chains):
            _iterate_chain(c * B // chains, (c + 1) * B // chains, A_g, A_c, b_scaled, mu0_g, mu0_c, allowed_c,
                           same, ln_n, n_c, active, pi, iterations, status, tol, max_iterations, phase_tol,
                           max_phase_changes)
    for p in range(B):
        ln_scale = math.log(scale[p])
        for j in range(n_gas):
            ln_n[p, j] += ln_scale
        for c in range(C):
            n_c[p, c] = n_c[p, c] * scale[p] if active[p, c] else 0.0
    return ln_n, n_c, active, pi, iterations, status
