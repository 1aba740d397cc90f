"""Is a gas of a cubic equation of state stable as one phase?  The tangent-plane test.

A mixture z at T, P is stable as one phase when no trial composition w has a
negative tangent-plane distance

    tpd(w) = sum_i w_i [ln w_i + ln phi_i(w) - ln z_i - ln phi_i(z)]

(Michelsen, 1982, "The isothermal flash problem. Part I. Stability", Fluid
Phase Equilibria 9, 1-19).  Its stationary points satisfy
ln W_i = ln z_i + ln phi_i(z) - ln phi_i(w) with w = W / sum W, where the
modified distance is 1 - sum W; successive substitution from Wilson's
K-values (a vapour-like trial z K and a liquid-like one z / K) finds them.
Each trial phase takes the root of least Gibbs energy, so a liquid-like trial
is a liquid.

gibbsmin has no liquid-solution phase: the equilibrium's gas always takes the
vapour root.  This test tells the caller when that one gas is not the answer
(a loop gas cooled below its dew point, say).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ..compiled import compiled
from .cubic import LEAST_GIBBS_ROOT, CubicModel, single_ln_phi

#: A stationary point below this distance means the gas splits [-].
UNSTABLE_BELOW = -1e-8
_MAX_ITERATIONS = 300
_TOLERANCE = 1e-10
#: A trial within this of z (max |w - z|) has converged to the gas itself.
_TRIVIAL = 1e-5


@dataclass(frozen=True)
class Stability:
    """The verdict of a tangent-plane test.

    Attributes
    ----------
    stable : bool
    distance : float
        The lowest modified tangent-plane distance 1 - sum W found at a
        non-trivial stationary point [-]; 0.0 when every trial ran back to z.
    trial : ndarray or None
        The composition of the phase that would form (mole fractions, the
        model's species order), when unstable.
    """

    stable: bool
    distance: float
    trial: NDArray[np.float64] | None = None


def tangent_plane_test(model: CubicModel, T: float, P: float, z: ArrayLike, *, liquid: bool = False) -> Stability:
    """Whether the gas z [mole fractions, the model's order] at T [K], P [Pa] is stable as one phase (with
    ``liquid``, the liquid z on its root of least Gibbs energy)."""
    z = np.asarray(z, dtype=float)
    z = z / z.sum()
    there = z > 0.0
    d = np.full(z.shape, -np.inf)
    ln_phi_z = model.single_condition(float(T), float(P), z, LEAST_GIBBS_ROOT)[0] if liquid else model.ln_phi(T, P, z)
    d[there] = np.log(z[there]) + ln_phi_z[there]  # the phase as the equilibrium has it
    K = model.wilson_ratios(T, P)
    sqrt_a, b_i, one_minus_k, has_k = model.mixing_parameters(float(T))
    family = model.family
    lowest, trial = 0.0, None
    for start in (z * K, z / K):
        W = _stationary_point(sqrt_a, b_i, one_minus_k, has_k, np.where(there, start, 0.0), d, there, float(T),
                              float(P), family.delta1, family.delta2, _MAX_ITERATIONS, _TOLERANCE)
        w = W / W.sum()
        distance = 1.0 - float(W.sum())
        # Back at z on the gas's own root is the trivial point; at z on another root (a pure fluid above
        # its vapour pressure, say) the distance tells.
        if float(np.max(np.abs(w - z))) < _TRIVIAL and abs(distance) < -UNSTABLE_BELOW:
            continue
        # Successive substitution may wander without settling in a strongly non-ideal liquid: the distance
        # counts only where the tangent-plane distance itself, at the point reached, is negative too.
        tpd = _tangent_plane_distance(sqrt_a, b_i, one_minus_k, has_k, w, d, there, float(T), float(P),
                                      family.delta1, family.delta2)
        if not tpd < UNSTABLE_BELOW:
            continue
        if math.isfinite(distance) and distance < lowest:
            lowest, trial = distance, w
    stable = lowest >= UNSTABLE_BELOW
    return Stability(stable, lowest, None if stable else trial)


@compiled()
def _stationary_point(sqrt_a, b_i, one_minus_k, has_k, W, d, there, T, P, delta1, delta2, max_iterations,
                      tolerance):
    """Successive substitution ln W_i = d_i - ln phi_i(w), w = W / sum W, each trial on its root of least
    Gibbs energy, from W; the stationary W (compiled: a test takes hundreds of evaluations of the cubic)."""
    S = W.shape[0]
    W = W.copy()
    w = np.empty(S)
    for _ in range(max_iterations):
        total = W.sum()
        for i in range(S):
            w[i] = W[i] / total
        ln_phi, _, _ = single_ln_phi(sqrt_a, b_i, one_minus_k, has_k, w, T, P, delta1, delta2, LEAST_GIBBS_ROOT)
        step = 0.0
        for i in range(S):
            if there[i]:
                new = math.exp(d[i] - ln_phi[i])
                step = max(step, abs(math.log(new) - math.log(W[i])))
                W[i] = new
            else:
                W[i] = 0.0
        if not step >= tolerance:  # converged, or NaN: the caller judges the distance
            break
    return W


@compiled()
def _tangent_plane_distance(sqrt_a, b_i, one_minus_k, has_k, w, d, there, T, P, delta1, delta2):
    """tpd(w) = sum_i w_i [ln w_i + ln phi_i(w) - d_i] over the species present, w on its root of least Gibbs
    energy (NaN where no root is physical)."""
    ln_phi, _, _ = single_ln_phi(sqrt_a, b_i, one_minus_k, has_k, w, T, P, delta1, delta2, LEAST_GIBBS_ROOT)
    total = 0.0
    for i in range(w.shape[0]):
        if there[i] and w[i] > 0.0:
            total += w[i] * (math.log(w[i]) + ln_phi[i] - d[i])
    return total
