"""The roots of the compressibility cubic: the vapour root, the liquid root, and all physical roots for stability tests."""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import NDArray

from ..errors import ConvergenceError

_MAX_ITERATIONS = 200
_STEP_TOLERANCE = 1e-13

Real = float | NDArray[np.float64]


def vapour_root(c2: Real, c1: Real, c0: Real, B: Real) -> Real:
    """Largest real root of Z^3 + c2 Z^2 + c1 Z + c0 = 0, elementwise.

    Why the largest root: of up to three real roots, the smallest is the
    liquid-like density, the middle one is mechanically unstable (dP/dv > 0) and
    the largest is the vapour-like one, the only one connected continuously to
    the ideal gas (Z -> 1 as P -> 0).  Where there is one real root it is that
    root.  A gas above its dew point has no stable liquid, so its state is the
    vapour root; below the dew point the vapour root is the metastable gas,
    which is still what the gas-phase chemical potential of the minimiser
    means (condensates are separate phases there).

    Why Newton from Z = 1 + B: for v > b the attraction lowers the pressure, so
    Z < v / (v - b), i.e. Z < 1 + B, for every physical root; 1 + B also lies
    right of the inflection point -c2/3 of both cubics, where the cubic is
    convex and positive.  Newton from there decreases monotonically onto the
    largest root, never overshooting into another branch, if that root lies
    right of the inflection point; if Newton passes the inflection point, the
    one real root lies left of it and is taken from the companion matrix.

    Parameters
    ----------
    c2, c1, c0 : float or ndarray
        Coefficients of the monic cubic in Z, [-].
    B : float or ndarray
        Dimensionless co-volume b P / (R T), [-].

    Returns
    -------
    float or ndarray
        Z of the vapour root, [-].
    """
    if isinstance(B, float):
        return _scalar_root(c2, c1, c0, B)
    c2, c1, c0, B = np.broadcast_arrays(*(np.asarray(c, dtype=float) for c in (c2, c1, c0, B)))
    Z = 1.0 + B
    left = np.zeros(Z.shape, dtype=bool)   # passed the inflection point: the one real root is liquid-like
    for _ in range(_MAX_ITERATIONS):
        f = ((Z + c2) * Z + c1) * Z + c0
        slope = (3.0 * Z + 2.0 * c2) * Z + c1
        with np.errstate(divide="ignore", invalid="ignore"):
            step = np.where(left, 0.0, f / slope)
        Z = Z - step
        left |= (slope <= 0.0) | (3.0 * Z < -c2)
        if np.max(np.abs(step)) <= _STEP_TOLERANCE:
            for i in zip(*np.nonzero(left)):
                Z[i] = _only_root(float(c2[i]), float(c1[i]), float(c0[i]), float(B[i]), 0.0)
            return Z
    raise ConvergenceError(_not_converged(float(np.max(np.abs(step)))))


def liquid_root(c2: Real, c1: Real, c0: Real, B: Real) -> Real:
    """Smallest physical root (Z > B) of Z^3 + c2 Z^2 + c1 Z + c0 = 0, elementwise.

    Where the cubic has three real roots it is the liquid-like density; where
    it has one, that root (then the same as :func:`vapour_root`).  A caller
    that needs to know which case it is compares the two.  From the companion
    matrix (:func:`real_roots`), as Newton from the left could start below B.
    """
    if isinstance(B, float):
        return _smallest_root(c2, c1, c0, B)
    c2, c1, c0, B = np.broadcast_arrays(*(np.asarray(c, dtype=float) for c in (c2, c1, c0, B)))
    Z = np.empty(B.shape)
    for i in np.ndindex(B.shape):
        Z[i] = _smallest_root(float(c2[i]), float(c1[i]), float(c0[i]), float(B[i]))
    return Z


def _smallest_root(c2: float, c1: float, c0: float, B: float) -> float:
    roots = real_roots(c2, c1, c0, B)
    if not roots:
        raise ConvergenceError(
            "the cubic equation of state has no physical root (Z > B) at this state; "
            "move T or P slightly or use gas='ideal'"
        )
    return roots[-1]


def _only_root(c2: float, c1: float, c0: float, B: float, step: float) -> float:
    """The largest real root where Newton from 1 + B passed the cubic's inflection point.

    Then no root lies right of it: the one real root is liquid-like (a gas
    far below its dew point, such as steam at 80 bar and 457 K), and it is
    the companion matrix's.
    """
    roots = real_roots(c2, c1, c0, B)
    if not roots:
        raise ConvergenceError(_not_converged(step))
    return roots[0]


def _scalar_root(c2: float, c1: float, c0: float, B: float) -> float:
    # The same iteration on Python floats, about ten times faster than on
    # one-element arrays: one condition is the common case in a solver loop.
    Z = 1.0 + B
    for _ in range(_MAX_ITERATIONS):
        f = ((Z + c2) * Z + c1) * Z + c0
        slope = (3.0 * Z + 2.0 * c2) * Z + c1
        step = f / slope
        Z -= step
        if abs(step) <= _STEP_TOLERANCE:
            return Z
        if slope <= 0.0 or 3.0 * Z < -c2:
            return _only_root(c2, c1, c0, B, abs(step))
    raise ConvergenceError(_not_converged(abs(step)))


def _not_converged(step: float) -> str:
    return (
        f"the vapour root of the cubic equation of state did not converge "
        f"(last Newton step {step:.3g}); the state is probably at a critical point of the "
        "mixture: move T or P slightly or use gas='ideal'"
    )


def real_roots(c2: float, c1: float, c0: float, B: float) -> list[float]:
    """The real roots Z > B of Z^3 + c2 Z^2 + c1 Z + c0 = 0 (one condition), largest first.

    Only Z > B is a physical volume (v > b).  For a stability test's trial
    phases, which may be liquid-like with one real root left of the cubic's
    inflection point (where Newton from 1 + B need not converge), the roots
    come in closed form (Cardano where one root is real, the trigonometric
    form where three are), each polished by two Newton steps: a stability test
    asks for them thousands of times, where a companion-matrix eigensolve
    costs ten times as much.
    """
    roots = []
    for Z in _cubic_real_roots(c2, c1, c0):
        for _ in range(2):
            slope = (3.0 * Z + 2.0 * c2) * Z + c1
            if slope != 0.0:
                Z -= (((Z + c2) * Z + c1) * Z + c0) / slope
        if Z > B:
            roots.append(Z)
    return sorted(set(roots), reverse=True)


def _cubic_real_roots(c2: float, c1: float, c0: float) -> list[float]:
    """Real roots of the monic cubic, from its depressed form t^3 + p t + q = 0 with Z = t - c2/3."""
    shift = c2 / 3.0
    p = c1 - c2 * shift
    q = (2.0 * shift * shift - c1) * shift + c0
    half_q = 0.5 * q
    discriminant = half_q * half_q + (p / 3.0) ** 3
    if discriminant > 0.0:
        root = math.sqrt(discriminant)
        return [math.copysign(abs(-half_q + root) ** (1.0 / 3.0), -half_q + root)
                + math.copysign(abs(-half_q - root) ** (1.0 / 3.0), -half_q - root) - shift]
    if p == 0.0:
        return [-shift]
    radius = 2.0 * math.sqrt(-p / 3.0)
    angle = math.acos(max(-1.0, min(1.0, 3.0 * q / (p * radius)))) / 3.0
    return [radius * math.cos(angle - 2.0 * math.pi * k / 3.0) - shift for k in range(3)]
