"""Dew and bubble points of a mixture by its cubic: where a second phase is about to form.

At a dew point the vapour z first has a liquid-like stationary point of the
tangent-plane distance with zero distance, and at a bubble point the liquid z
a vapour-like one (Michelsen, 1982, "The isothermal flash problem. Part I.
Stability", Fluid Phase Equilibria 9, 1-19): with W the stationary point of
ln W_i = ln z_i + ln phi_i(z) - ln phi_i(w), the feed splits where sum W > 1.
The point is the temperature (at a pressure) or the pressure (at a
temperature) where that sign changes: found by stepping from the vapour side
(high T, low P) and bisecting the step that crosses, to 1e-9 of the variable.  The incipient phase's composition is that of the stationary point.
"""

from __future__ import annotations

import math
import numpy as np
from numpy.typing import NDArray

from ..errors import InputError
from .cubic import LEAST_GIBBS_ROOT, LIQUID_ROOT, VAPOUR_ROOT, CubicModel
from .stability import _stationary_point

_MAX_ITERATIONS = 500
_TOLERANCE = 1e-12
#: A stationary point within this of the feed (max |w - z|) is the feed itself (the trivial solution).
_TRIVIAL = 1e-6
#: The bracket is bisected to this fraction of the variable [-].
_BISECT_TO = 1e-9


def _splits(model: CubicModel, T: float, P: float, z: NDArray[np.float64], kind: str):
    """(whether the feed splits at T, P, the incipient composition): the feed on its own root (vapour for a dew
    point, liquid for a bubble point), the trial from Wilson's ratios on the other side."""
    feed_root = VAPOUR_ROOT if kind == "dew" else LIQUID_ROOT
    ln_phi_z, _, Z_feed = model.single_condition(T, P, z, feed_root)
    there = z > 0.0
    d = np.where(there, np.log(np.where(there, z, 1.0)) + ln_phi_z, -np.inf)
    K = model.wilson_ratios(T, P)
    start = np.where(there, z / K if kind == "dew" else z * K, 0.0)
    sqrt_a, b_i, one_minus_k, has_k = model.mixing_parameters(T)
    fam = model.family
    W = _stationary_point(sqrt_a, b_i, one_minus_k, has_k, start, d, there, float(T), float(P), fam.delta1,
                          fam.delta2, _MAX_ITERATIONS, _TOLERANCE)
    total = float(W.sum())
    if not math.isfinite(total):
        return False, None
    w = W / total
    # Back at z on the feed's own root is the trivial point; at z on the other root (a pure fluid) it is not.
    if float(np.max(np.abs(w - z))) < _TRIVIAL and abs(model.single_condition(T, P, w, LEAST_GIBBS_ROOT)[2] - Z_feed) \
            < _TRIVIAL * Z_feed:
        return False, None
    return total > 1.0, w


def incipient_point(model: CubicModel, z: NDArray[np.float64], kind: str, *, P: float | None = None,
                    T: float | None = None, low: float, high: float,
                    steps: int = 400) -> tuple[float, float, NDArray[np.float64]]:
    """The dew or bubble point of z: its temperature at P, or its pressure at T, searched between low and high.

    Returns (T [K], P [Pa], the incipient phase's mole fractions in the model's order).

    Parameters
    ----------
    model : CubicModel
    z : ndarray
        Mole fractions of the feed, the model's order.
    kind : {"dew", "bubble"}
    P, T : float
        Give one: the pressure [Pa] (the temperature is found) or the temperature [K] (the pressure is found).
    low, high : float
        The range searched, [K] or [Pa].
    steps : int
        Steps of the scan from the one-phase side.

    Raises
    ------
    InputError
        Bad arguments, or no such point in the range (the feed is one phase, or two, across all of it).
    """
    if kind not in ("dew", "bubble"):
        raise InputError(f"kind must be 'dew' or 'bubble', got {kind!r}")
    if (P is None) == (T is None):
        raise InputError("give the pressure P (to find the temperature) or the temperature T (to find the pressure)")
    if not 0.0 < low < high:
        raise InputError(f"the range searched must be 0 < low < high, got ({low!r}, {high!r})")
    z = np.asarray(z, dtype=float)
    z = z / z.sum()
    by_temperature = P is not None

    def splits(x: float):
        return _splits(model, x, P, z, kind) if by_temperature else _splits(model, T, x, z, kind)

    # Scanned from the vapour side (high T, or low P): the stream as a vapour first splits at its dew point; the
    # stream as a liquid splits there too (the vapour is the stabler phase) and stops splitting at its bubble
    # point.  A split further on (two liquids of a cubic at very low T) is not looked for.
    grid = np.linspace(high, low, steps + 1) if by_temperature else np.linspace(low, high, steps + 1)
    previous = grid[0]
    was_split, _ = splits(previous)
    if was_split and kind == "dew":
        side = "highest temperature" if by_temperature else "lowest pressure"
        raise InputError(f"the feed already splits at the {side} searched ({previous:g} "
                         f"{'K' if by_temperature else 'Pa'}); widen the range")
    for x in grid[1:]:
        split, _ = splits(x)
        crossed = split and not was_split if kind == "dew" else was_split and not split
        if crossed:
            outside, inside = previous if kind == "dew" else x, x if kind == "dew" else previous
            while abs(inside - outside) > _BISECT_TO * abs(inside):
                middle = 0.5 * (outside + inside)
                if splits(middle)[0]:
                    inside = middle
                else:
                    outside = middle
            _, w = splits(inside)
            found = 0.5 * (outside + inside)
            return (found, P, w) if by_temperature else (T, found, w)
        previous, was_split = x, split
    what = "temperature" if by_temperature else "pressure"
    raise InputError(f"no {kind} point between {low:g} and {high:g} {'K' if by_temperature else 'Pa'}: the feed stays "
                     f"one phase across the {what}s searched (above its cricondentherm or cricondenbar, or the range "
                     "is too narrow)")

