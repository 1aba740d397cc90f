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

from ..compiled import compiled
from .certificate import residuals_of, verdicts_into

LN_TRACE = math.log(1e-8)  # below this mole fraction a gas species is "trace" for the step limits
LN_LIFT = math.log(1e-4)   # a trace species may rise at most to this mole fraction in one step
# A gas still shrinking below this amount (amounts scaled to sum(b) = 1) is tested for absence
# (``_without_gas``) even before the iteration settles.
GAS_VANISHED = 1e-15
# Amounts a balance forces to zero are taken as zero below this (amounts scaled to sum(b) = 1).
ZERO_BY_BALANCE = 1e-15
# A pinned condensed species (zero by the balance) driven below zero by no more than this is at zero.
PINNED_ROUND_OFF = 1e-12

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
def _manage_phases(pi, mu0_c, A_c, allowed, same, n_c, active, pinned, phase_tol):
    """Drop a present condensed species with no amount, else add the most stable absent one.

    A pinned species (one the element potentials need, see ``_choose_components``)
    stays at zero amount.  Returns True when the phase set changed.
    """
    M, C = A_c.shape
    drop = -1
    for c in range(C):
        if active[c] and pinned[c]:
            continue
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
def _choose_components(A_g, A_c, ln_n, n_c, active, allowed, pinned, basis, Q, v):
    """The M most abundant species with independent element vectors (gas and present condensed).

    They become the components in which the element balance is written (see
    ``_to_components``).  Where the gas and the present condensed species do
    not span the elements (H2S, N2 and O2 leave sulfur's potential free beside
    liquid sulfur), an allowed absent condensed species completes the set: it
    is made present at zero amount and ``pinned`` (its potential fixes the
    element's, its amount is held at zero or above).  Returns False when even
    those do not span the elements.
    """
    M, G = A_g.shape
    C = A_c.shape[1]
    taken = 0
    for j in range(G + C):
        v[j] = 0.0  # 1.0 once considered
    while taken < M:
        best = -1
        best_value = 0.0
        for j in range(G + C):
            if v[j] != 0.0 or (j >= G and not (active[j - G] or allowed[j - G])):
                continue
            if j < G:
                value = ln_n[j]
            elif active[j - G]:
                value = math.log(n_c[j - G]) if n_c[j - G] > 0.0 else -1e300
            else:
                value = -2e300
            if best < 0 or value > best_value:
                best = j
                best_value = value
        if best < 0:
            return False
        v[best] = 1.0
        norm = 0.0
        for k in range(M):
            Q[taken, k] = A_g[k, best] if best < G else A_c[k, best - G]
            norm += Q[taken, k] ** 2
        norm = math.sqrt(norm)
        for sweep in range(2):  # Gram-Schmidt twice: independence is judged on what is left
            for t in range(taken):
                dot = 0.0
                for k in range(M):
                    dot += Q[t, k] * Q[taken, k]
                for k in range(M):
                    Q[taken, k] -= dot * Q[t, k]
        left = 0.0
        for k in range(M):
            left += Q[taken, k] ** 2
        left = math.sqrt(left)
        if left > 1e-9 * norm:
            for k in range(M):
                Q[taken, k] /= left
            basis[taken] = best
            taken += 1
            if best >= G and not active[best - G]:
                active[best - G] = True
                pinned[best - G] = True
                n_c[best - G] = 0.0
    for j in range(G + C):
        v[j] = 0.0
    for t in range(M):
        v[basis[t]] = 1.0  # on return: 1.0 marks the components
    return True


@compiled()
def _times_inverse(B, M, A, out):
    """out = B^-1 A, with B^-1 held in columns M to 2M of B."""
    for j in range(A.shape[1]):
        for k in range(M):
            value = 0.0
            for i in range(M):
                value += B[k, M + i] * A[i, j]
            out[k, j] = value


@compiled()
def _element_rows(A_g, A_c, b, B, nu_g, nu_c, b_comp):
    """The balance on the element rows (B^-1 = I): enough when every component is a major species.

    The components' own rows then hold no trace a cancelling balance could
    set, and skipping the change of rows keeps a warm-started sweep point cheap.
    """
    M = b.size
    for k in range(M):
        b_comp[k] = b[k]
        for i in range(M):
            B[k, M + i] = 1.0 if k == i else 0.0
        for j in range(A_g.shape[1]):
            nu_g[k, j] = A_g[k, j]
        for c in range(A_c.shape[1]):
            nu_c[k, c] = A_c[k, c]


@compiled()
def _to_components(A_g, A_c, b, basis, B, nu_g, nu_c, b_comp, work):
    """Element vectors and totals in the components: nu = B^-1 A, b' = B^-1 b (B: the components' columns).

    A component's own column is set to exactly a unit vector, so that its row
    of the balance, written as sum_j nu_kj n_j = b'_k, carries no round-off
    of the other components: a row whose component is a trace species holds
    only trace amounts, and the traces it sets are exact to their own precision.
    ``B`` is (M, 3M): the components' columns, then B^-1, then scratch.
    Returns False when B is singular.
    """
    M, G = A_g.shape
    C = A_c.shape[1]
    for t in range(M):
        j = basis[t]
        for k in range(M):
            B[k, t] = A_g[k, j] if j < G else A_c[k, j - G]
    for col in range(M + 1):  # the columns of B^-1, then b' (solved, not multiplied: exact for integer B and b)
        for k in range(M):
            for i in range(M):
                B[k, 2 * M + i] = B[k, i]
            work[k] = b[k] if col == M else (1.0 if k == col else 0.0)
        if not _lu_solve(B[:, 2 * M:], work, work[M:]):
            return False
        for k in range(M):
            if col < M:
                B[k, M + col] = work[M + k]
            else:
                b_comp[k] = work[M + k]
    # An excess within the round-off of forming b' is no excess: it would ask a species the balance
    # forces to zero for an amount of either sign at 1e-17 (a one-signed row could never meet it).
    for k in range(M):
        bound = 0.0
        for i in range(M):
            bound += abs(B[k, M + i] * b[i])
        if abs(b_comp[k]) <= 8.0 * 2.220446049250313e-16 * bound:
            b_comp[k] = 0.0
    _times_inverse(B, M, A_g, nu_g)
    _times_inverse(B, M, A_c, nu_c)
    for t in range(M):
        j = basis[t]
        for k in range(M):
            unit = 1.0 if k == t else 0.0
            if j < G:
                nu_g[k, j] = unit
            else:
                nu_c[k, j - G] = unit
    return True


@compiled()
def _without_gas(A_g, A_c, b, mu0_g, mu0_c, active, n_c, pi):
    """Whether the present condensed species hold every atom and no gas can form; if so, that answer.

    The condensed amounts then follow from the element balance alone and the
    element potentials from the condensed species' potentials, but for the
    directions those leave free (pure liquid water fixes 2 pi_H + pi_O, not
    pi_O).  Along them the potentials are chosen where the gas is least able
    to form: the minimum of ln sum_j exp(a_j . pi - mu0_j), the log of the
    mole fractions a gas would have summed (convex; at the minimum the would-be
    gas carries no excess of the free directions, so its traces keep the
    stoichiometry of the condensed phases).  The gas is absent when that
    minimum is below zero.  Sets n_c and pi and returns True in that case only.
    """
    M, G = A_g.shape
    C = A_c.shape[1]
    m = 0
    for c in range(C):
        if active[c]:
            m += 1
    if m == 0:
        return False
    A_a = np.empty((M, m))
    mu_a = np.empty(m)
    where = np.empty(m, dtype=np.int64)
    i = 0
    for c in range(C):
        if active[c]:
            A_a[:, i] = A_c[:, c]
            mu_a[i] = mu0_c[c]
            where[i] = c
            i += 1
    amounts = np.linalg.lstsq(A_a, b)[0]
    scale = 0.0
    for k in range(M):
        scale = max(scale, abs(b[k]))
    for k in range(M):
        held = 0.0
        for i in range(m):
            held += A_a[k, i] * amounts[i]
        if abs(held - b[k]) > 1e-12 * scale:
            return False
    for i in range(m):
        if amounts[i] < 0.0:
            return False
    U, sv, Vt = np.linalg.svd(A_a.T)
    rank = 0
    for i in range(sv.size):
        if sv[i] > 1e-10 * sv[0]:
            rank += 1
    pi0 = np.zeros(M)
    for i in range(rank):
        coefficient = 0.0
        for r in range(m):
            coefficient += U[r, i] * mu_a[r]
        for k in range(M):
            pi0[k] += Vt[i, k] * coefficient / sv[i]
    for i in range(m):  # the condensed species must share one set of potentials
        potential = 0.0
        for k in range(M):
            potential += A_a[k, i] * pi0[k]
        if abs(potential - mu_a[i]) > 1e-9 * max(1.0, abs(mu_a[i])):
            return False
    free = M - rank
    V = np.ascontiguousarray(Vt[rank:].T)
    av = np.ascontiguousarray(A_g.T) @ V          # (G, free): each gas species along the free directions
    base = np.ascontiguousarray(A_g.T) @ pi0 - mu0_g
    t = np.zeros(free)
    f = _log_sum_exp(base + av @ t) if free else _log_sum_exp(base)
    for iteration in range(200):
        if free == 0:
            break
        z = base + av @ t
        top = z.max()
        w = np.exp(z - top)
        w /= w.sum()
        g = av.T @ w
        H = (av.T * w) @ av - np.outer(g, g)
        for k in range(free):
            H[k, k] += 1e-300
        step = np.linalg.solve(H, -g) if np.all(np.isfinite(H)) and np.abs(H).max() > 0.0 else -g
        size = np.abs(step).max()
        if size > 10.0:
            step *= 10.0 / size
        lam = 1.0
        while lam > 1e-12:
            trial = _log_sum_exp(base + av @ (t + lam * step))
            if trial <= f:
                break
            lam *= 0.5
        if lam <= 1e-12:
            break
        t += lam * step
        improvement = f - trial
        f = trial
        if size * lam < 1e-10 or improvement < 1e-15 * max(1.0, abs(f)):
            break
    if not f < -1e-9:
        return False
    for c in range(C):
        n_c[c] = 0.0
    for i in range(m):
        n_c[where[i]] = amounts[i]
    for k in range(M):
        pi[k] = pi0[k]
        for i in range(free):
            pi[k] += V[k, i] * t[i]
    return True


@compiled()
def _log_sum_exp(z):
    top = z.max()
    return top + math.log(np.sum(np.exp(z - top)))


@compiled()
def _one_signed(nu_g_row, nu_c_row, active, b_k):
    """Whether every term of a component's balance sum_j nu_j n_j - b'_k has the same sign."""
    positive = b_k < 0.0
    negative = b_k > 0.0
    for j in range(nu_g_row.size):
        positive = positive or nu_g_row[j] > 0.0
        negative = negative or nu_g_row[j] < 0.0
    for c in range(nu_c_row.size):
        if active[c]:
            positive = positive or nu_c_row[c] > 0.0
            negative = negative or nu_c_row[c] < 0.0
    return not (positive and negative)


@compiled()
def _components_still_major(ln_n, n_c, active, basis, in_basis):
    """Whether no species outside the components is more than e^3 (20) times as abundant as the least of them.

    A chosen set is kept while this holds: near-ties do not flip it, and one
    pass over the species costs much less than choosing again.
    """
    G = ln_n.size
    least = math.inf
    for t in range(basis.size):
        j = basis[t]
        if j >= G and not active[j - G]:
            return False
        value = ln_n[j] if j < G else (math.log(n_c[j - G]) if n_c[j - G] > 0.0 else -1e300)
        least = min(least, value)
    for j in range(G):
        if in_basis[j] == 0.0 and ln_n[j] > least + 3.0:
            return False
    for c in range(n_c.size):
        if active[c] and in_basis[G + c] == 0.0 and n_c[c] > 0.0 and math.log(n_c[c]) > least + 3.0:
            return False
    return True


@compiled()
def workspace(M, G, C):
    """The work arrays of ``iterate_point_in`` for M elements, G gas and C condensed species, made once per chain
    of points (each point of a sweep would otherwise make twenty small arrays)."""
    K = M + C + 1
    return (np.empty((K, K)), np.empty(K), np.empty(K), np.empty(G), np.empty(G), np.empty(G), np.empty(M),
            np.empty(M, dtype=np.int64), np.empty((M, M)), np.empty(G + C), np.empty((M, 3 * M)),
            np.empty(max(2 * M, 1)), np.empty(M, dtype=np.int64), np.empty(M), np.empty((M, G)), np.empty((M, C)),
            np.empty(M), np.empty(C, dtype=np.bool_))


@compiled()
def step_limits(ln_n, ln_N, d_ln_n, d_ln_N, biggest):
    """What limits a Newton step on the gas (Gordon and McBride 1994, eqs. 3.1 to 3.3): (biggest, lam2, worst).

    ``biggest`` starts from the caller's own major unknowns (5 |d ln N|, say) and takes the largest
    |d ln n_j| of the major species; lam2 keeps a trace species below y = 1e-4 after the step; worst is
    the largest change weighted by the species' share of the gas before or after the step (the
    convergence measure; the traces are held to the balance of their components).
    """
    lam2 = 1.0
    worst = 0.0
    for j in range(ln_n.size):
        d = d_ln_n[j]
        ln_y = ln_n[j] - ln_N
        worst = max(worst, abs(d) * math.exp(min(0.0, max(ln_y, ln_y + d - d_ln_N))))
        if ln_y > LN_TRACE:
            biggest = max(biggest, abs(d))
        elif d - d_ln_N > 0.0:
            lam2 = min(lam2, abs((LN_LIFT - ln_y) / (d - d_ln_N)))
    return biggest, lam2, worst


@compiled()
def take_step(ln_n, d_ln_n, n_c, x, M, active, biggest, lam2):
    """The step length from ``step_limits`` (at most e^2 on a major unknown, the traces' lift) and the step on
    the gas and the present condensed amounts (their changes at x[M:]); returns (lam, largest condensed change)."""
    lam = 1.0
    if biggest > 2.0:
        lam = 2.0 / biggest
    lam = min(lam, lam2)
    if lam <= 0.0:
        lam = 1.0
    for j in range(ln_n.size):
        ln_n[j] += lam * d_ln_n[j]
    worst_c = 0.0
    for c in range(n_c.size):
        if active[c]:
            n_c[c] += lam * x[M + c]
            worst_c = max(worst_c, abs(x[M + c]))
    return lam, worst_c


@compiled()
def iterate_point(A_g, A_c, b, mu0_g, mu0_c, allowed, same, ln_n, n_c, active, pi,
                  tol, max_iterations, phase_tol, max_phase_changes):
    """Iterate one point to convergence; ln_n, n_c, active, pi are updated in place (``iterate_point_in`` with
    work arrays of its own)."""
    return iterate_point_in(A_g, A_c, b, mu0_g, mu0_c, allowed, same, ln_n, n_c, active, pi, tol, max_iterations,
                            phase_tol, max_phase_changes, workspace(A_g.shape[0], A_g.shape[1], A_c.shape[1]))


@compiled()
def iterate_point_in(A_g, A_c, b, mu0_g, mu0_c, allowed, same, ln_n, n_c, active, pi,
                     tol, max_iterations, phase_tol, max_phase_changes, work_arrays):
    """Iterate one point to convergence; ln_n, n_c, active, pi are updated in place.

    Amounts are scaled so that sum(b) = 1.  ``work_arrays`` is a ``workspace`` of the point's sizes.
    Returns (iterations, status).

    Each iteration writes the element balance in components (the M most
    abundant independent species, ``_choose_components``): the unknowns are
    then the potentials of the components, pi' = B^T pi, and a species' row
    holds only what that component's balance needs.  This is the same Newton
    step as on the element rows in exact arithmetic; in floating point it
    keeps a trace set by a nearly cancelling balance (O2 in steam, atomic C
    beside CO) exact instead of set by the round-off of the major species.
    """
    M, G = A_g.shape
    C = A_c.shape[1]
    K = M + C + 1
    # From ``workspace``: every array is written before it is read, but for these two, set here.
    J, rhs, x, n_g, mu_g, d_ln_n, a_n, basis, Q, seen, B, work, previous, d_scale, nu_g, nu_c, b_comp, pinned = \
        work_arrays
    previous[:] = -1
    pinned[:] = False
    total = 0.0
    for j in range(G):
        total += math.exp(ln_n[j])
    if not (total > 0.0 and math.isfinite(total)):
        # A start with no gas (an answer where the gas vanished): the gas starts afresh.
        for j in range(G):
            ln_n[j] = math.log(0.1 / G)
        total = 0.1
    ln_N = math.log(total)
    changes = 0
    rechoose = True
    full_step = True
    element_rows = False
    for iteration in range(1, max_iterations + 1):
        N = math.exp(ln_N)
        # The components are chosen again when another species has overtaken one of them (or the phases
        # changed), checked after full steps and every 8th iteration: choosing costs as much as the rest
        # of an iteration, and the damped steps of a cold start reshuffle the ranks at every step.
        if (rechoose or ((full_step or iteration % 8 == 0)
                         and not _components_still_major(ln_n, n_c, active, basis, seen))) and \
                not _choose_components(A_g, A_c, ln_n, n_c, active, allowed, pinned, basis, Q, seen):
            return iteration, SINGULAR
        same_basis = True
        all_major = True  # every component above the trace level: the element rows themselves will do
        for k in range(M):
            same_basis = same_basis and basis[k] == previous[k]
            j = basis[k]
            if j < G:
                all_major = all_major and ln_n[j] - ln_N > LN_TRACE
            else:
                all_major = all_major and n_c[j - G] > 0.0 and math.log(n_c[j - G]) > LN_TRACE
        if not same_basis or all_major != element_rows:
            if all_major:
                _element_rows(A_g, A_c, b, B, nu_g, nu_c, b_comp)
            elif not _to_components(A_g, A_c, b, basis, B, nu_g, nu_c, b_comp, work):
                return iteration, SINGULAR
            element_rows = all_major
            for k in range(M):
                previous[k] = basis[k]
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
        balanced = True
        for k in range(M):
            s_an = 0.0
            s_abs = abs(b_comp[k])
            s_rhs = 0.0
            for j in range(G):
                s_an += nu_g[k, j] * n_g[j]
                s_abs += abs(nu_g[k, j]) * n_g[j]
                s_rhs += nu_g[k, j] * n_g[j] * mu_g[j]
            a_n[k] = s_an
            for i in range(k, M):
                s = 0.0
                for j in range(G):
                    s += nu_g[k, j] * nu_g[i, j] * n_g[j]
                J[k, i] = s
                J[i, k] = s
            cond = 0.0
            for c in range(C):
                cond += nu_c[k, c] * n_c[c]
                s_abs += abs(nu_c[k, c] * n_c[c])
            # Each component's balance is met to its own scale, a trace component's as well; a row whose
            # terms all have one sign can only be met by amounts that vanish (H2 beside CH4 alone), and is
            # met once they are below the round-off of the whole balance.
            residual = abs(b_comp[k] - s_an - cond)
            if residual > 1e-11 * s_abs and not (residual <= ZERO_BY_BALANCE
                                                 and _one_signed(nu_g[k], nu_c[k], active, b_comp[k])):
                balanced = False
            rhs[k] = b_comp[k] - s_an - cond + s_rhs
            J[k, K - 1] = s_an
            J[K - 1, k] = s_an
        for c in range(C):
            if active[c]:
                for k in range(M):
                    J[k, M + c] = nu_c[k, c]
                    J[M + c, k] = nu_c[k, c]
                rhs[M + c] = mu0_c[c]
            else:
                J[M + c, M + c] = 1.0
                rhs[M + c] = 0.0
        J[K - 1, K - 1] = sum_n - N
        rhs[K - 1] = N - sum_n + sum_nmu
        # Symmetric scaling of the components' rows and columns to unit diagonal: a trace component's
        # row is as small as its amounts, and pivoting alone would judge it against the major ones.
        for k in range(M):
            d_scale[k] = 1.0 / math.sqrt(J[k, k]) if J[k, k] > 0.0 else 1.0
        for k in range(M):
            for i in range(K):
                J[k, i] *= d_scale[k]
                J[i, k] *= d_scale[k]
            rhs[k] *= d_scale[k]
        if not _lu_solve(J, rhs, x):
            return iteration, SINGULAR
        for k in range(M):
            x[k] *= d_scale[k]
        # Element potentials from the components' potentials: B^T pi = pi'.
        for k in range(M):
            pi[k] = 0.0
            for i in range(M):
                pi[k] += B[i, M + k] * x[i]  # pi = (B^-1)^T pi
        d_ln_N = x[K - 1]
        # Step length (Gordon and McBride 1994, eqs. 3.1 to 3.3).
        for j in range(G):
            d = -mu_g[j] + d_ln_N
            for k in range(M):
                d += nu_g[k, j] * x[k]
            d_ln_n[j] = d
        biggest, lam2, worst = step_limits(ln_n, ln_N, d_ln_n, d_ln_N, 5.0 * abs(d_ln_N))
        if not math.isfinite(worst):
            return iteration, NOT_CONVERGED
        lam, worst_c = take_step(ln_n, d_ln_n, n_c, x, M, active, biggest, lam2)
        ln_N += lam * d_ln_N
        rechoose = False
        full_step = lam == 1.0
        # A phase set with no solution shows itself as a condensed amount
        # driven below zero: drop that phase now rather than iterate in vain.
        dropped = -1
        for c in range(C):
            if active[c] and pinned[c] and n_c[c] < 0.0 and n_c[c] > -PINNED_ROUND_OFF:
                n_c[c] = 0.0
            if active[c] and n_c[c] < 0.0 and (dropped < 0 or n_c[c] < n_c[dropped]):
                dropped = c
        if dropped >= 0:
            active[dropped] = False
            pinned[dropped] = False
            n_c[dropped] = 0.0
            changes += 1
            rechoose = True
            if changes > max_phase_changes:
                return iteration, CYCLING
            continue
        shrinking = N <= GAS_VANISHED and d_ln_N < 0.0
        if shrinking or (lam == 1.0 and worst <= tol and abs(d_ln_N) <= tol and worst_c <= tol and balanced):
            if not shrinking and not _manage_phases(pi, mu0_c, A_c, allowed, same, n_c, active, pinned, phase_tol):
                return iteration, CONVERGED
            # The condensed phases may now hold every atom, with no gas able to form (pure water
            # below its boiling point): the gas is then absent, every amount zero, not a phase at
            # the round-off of the balance with a meaningless composition.
            while _without_gas(A_g, A_c, b, mu0_g, mu0_c, active, n_c, pi):
                if not _manage_phases(pi, mu0_c, A_c, allowed, same, n_c, active, pinned, phase_tol):
                    for j in range(G):
                        ln_n[j] = -math.inf
                    return iteration, CONVERGED
                changes += 1
                if changes > max_phase_changes:
                    return iteration, CYCLING
            changes += 1
            rechoose = True
            if changes > max_phase_changes:
                return iteration, CYCLING
    return max_iterations, NOT_CONVERGED


@compiled()
def _iterate_chain(first, last, A_g, A_c, b, mu0_g, mu0_c, allowed, same, ln_n, n_c, active, pi,
                   iterations, status, tol, max_iterations, phase_tol, max_phase_changes):
    """Points first..last-1 in order, each started from its predecessor's answer when that converged.

    A point that fails from the warm start is tried again from its own start.
    """
    work_arrays = workspace(A_g.shape[0], A_g.shape[1], A_c.shape[1])
    own_ln_n = np.empty(ln_n.shape[1])
    own_n_c = np.empty(n_c.shape[1])
    own_active = np.empty(active.shape[1], dtype=np.bool_)
    for p in range(first, last):
        own_ln_n[:] = ln_n[p]
        own_n_c[:] = n_c[p]
        own_active[:] = active[p]
        warm = p > first and status[p - 1] == CONVERGED
        if warm:
            ln_n[p] = ln_n[p - 1]
            for c in range(n_c.shape[1]):
                active[p, c] = active[p - 1, c] and allowed[p, c]
                n_c[p, c] = n_c[p - 1, c] if active[p, c] else 0.0
        iterations[p], status[p] = iterate_point_in(
            A_g, A_c, b[p], mu0_g[p], mu0_c[p], allowed[p], same, ln_n[p], n_c[p], active[p], pi[p],
            tol, max_iterations, phase_tol, max_phase_changes, work_arrays)
        if warm and status[p] != CONVERGED:
            ln_n[p] = own_ln_n
            n_c[p] = own_n_c
            active[p] = own_active
            extra, status[p] = iterate_point_in(
                A_g, A_c, b[p], mu0_g[p], mu0_c[p], allowed[p], same, ln_n[p], n_c[p], active[p], pi[p],
                tol, max_iterations, phase_tol, max_phase_changes, work_arrays)
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
    ln_n = np.empty((B, n_gas))
    n_c = np.empty((B, S - n_gas))
    active = np.empty((B, S - n_gas), dtype=np.bool_)
    pi = np.empty((B, M))
    iterations = np.empty(B, dtype=np.int64)
    status = np.empty(B, dtype=np.int64)
    run_into(A, n_gas, b, mu0, allowed, same, ln_n_start, n_c_start, present_start, cold, tol, max_iterations,
             phase_tol, max_phase_changes, chains, parallel, ln_n, n_c, active, pi, iterations, status)
    return ln_n, n_c, active, pi, iterations, status


@compiled()
def run_into(A, n_gas, b, mu0, allowed, same, ln_n_start, n_c_start, present_start, cold,
             tol, max_iterations, phase_tol, max_phase_changes, chains, parallel,
             ln_n, n_c, active, pi, iterations, status):
    """``run`` with its six results written into arrays the caller made (any contents): shapes (B, n_gas),
    (B, C), (B, C) bool, (B, M), (B,) and (B,) int64.  Arrays made in Python cost less than arrays handed
    back from compiled code, which matters on one small point."""
    B, M, S = b.shape[0], A.shape[0], A.shape[1]
    C = S - n_gas
    A_g = np.ascontiguousarray(A[:, :n_gas])
    A_c = np.ascontiguousarray(A[:, n_gas:])
    mu0_g = np.ascontiguousarray(mu0[:, :n_gas])
    mu0_c = np.ascontiguousarray(mu0[:, n_gas:])
    allowed_c = np.ascontiguousarray(allowed[:, n_gas:])
    scale = np.empty(B)
    b_scaled = np.empty((B, M))
    for p in range(B):
        scale[p] = b[p].sum()
        for k in range(M):
            b_scaled[p, k] = b[p, k] / scale[p]
        ln_scale = math.log(scale[p])
        for j in range(n_gas):
            ln_n[p, j] = math.log(0.1 / n_gas) if cold else ln_n_start[p, j] - ln_scale
        for c in range(C):
            active[p, c] = False if cold else present_start[p, c] and allowed_c[p, c]
            n_c[p, c] = n_c_start[p, c] / scale[p] if active[p, c] else 0.0
        for k in range(M):
            pi[p, k] = 0.0
        iterations[p] = 0
        status[p] = 0
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


@compiled()
def run_certified(A, n_gas, b, mu0, allowed, same, ln_n_start, n_c_start, present_start, cold,
                  tol, max_iterations, phase_tol, max_phase_changes, chains, parallel,
                  ln_n, n_c, active, pi, iterations, status, converged,
                  element_balance_tol, stationarity_tol, complementarity_tol, residuals, certified):
    """``run_into``, then its answer's certificate in the same compiled call: ``converged`` (B,) bool, the
    residuals (B, 4) and the verdicts (B,) bool under the three tolerances.

    They are ``certificate.residuals_of`` and ``certificate.verdicts_into`` on
    the answer, as ``certify`` would compute them afresh; only the second call
    from Python is saved.
    """
    run_into(A, n_gas, b, mu0, allowed, same, ln_n_start, n_c_start, present_start, cold, tol, max_iterations,
             phase_tol, max_phase_changes, chains, parallel, ln_n, n_c, active, pi, iterations, status)
    for p in range(status.size):
        converged[p] = status[p] == CONVERGED
    residuals_of(A, n_gas, b, mu0, allowed, ln_n, n_c, active, pi, residuals)
    verdicts_into(residuals, converged, element_balance_tol, stationarity_tol, complementarity_tol, certified)
