"""NASA 7-coefficient polynomials, evaluated for many species and temperatures at once.

Each species has two sets of seven coefficients, one below and one above its
mid temperature (a species fitted over one range carries the same set twice).
With T in K:

    cp/R = a1 + a2 T + a3 T^2 + a4 T^3 + a5 T^4
    h/RT = a1 + a2 T/2 + a3 T^2/3 + a4 T^3/4 + a5 T^4/5 + a6/T
    s/R  = a1 ln T + a2 T + a3 T^2/2 + a4 T^3/3 + a5 T^4/4 + a7

(McBride, Gordon and Reno, NASA TM-4513, 1993).  Enthalpies are on the
formation basis: elements in their reference states have h = 0 at 298.15 K.
Entropies are absolute, at the reference pressure of 1 bar.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

#: Molar gas constant, [J/(mol K)]: exact since the 2019 SI (N_A k, CODATA 2018).
R = 8.31446261815324


@dataclass(frozen=True)
class Nasa7Table:
    """Coefficients of S species.

    Attributes
    ----------
    low, high : ndarray, shape (S, 7)
        Coefficients below and above ``T_mid``.
    T_mid, T_min, T_max : ndarray, shape (S,)
        Range boundaries, [K].
    """

    low: NDArray[np.float64]
    high: NDArray[np.float64]
    T_mid: NDArray[np.float64]
    T_min: NDArray[np.float64]
    T_max: NDArray[np.float64]

    def take(self, index: ArrayLike) -> Nasa7Table:
        """The table restricted to the species at ``index``."""
        index = np.asarray(index, dtype=int)
        return Nasa7Table(
            self.low[index], self.high[index], self.T_mid[index],
            self.T_min[index], self.T_max[index],
        )

    def _coefficients(self, T: NDArray[np.float64]) -> NDArray[np.float64]:
        # The low set applies up to and including T_mid (the same convention as
        # the NASA tables' own readers); result shape T.shape + (S, 7).
        use_low = T[..., None] <= self.T_mid
        return np.where(use_low[..., None], self.low, self.high)

    def cp_R(self, T: ArrayLike) -> NDArray[np.float64]:
        """Heat capacity cp/R, shape ``np.shape(T) + (S,)``."""
        T = np.asarray(T, dtype=float)
        a = self._coefficients(T)
        t = T[..., None]
        return a[..., 0] + t * (a[..., 1] + t * (a[..., 2] + t * (a[..., 3] + t * a[..., 4])))

    def h_RT(self, T: ArrayLike) -> NDArray[np.float64]:
        """Enthalpy h/RT on the formation basis, shape ``np.shape(T) + (S,)``."""
        T = np.asarray(T, dtype=float)
        a = self._coefficients(T)
        t = T[..., None]
        return (
            a[..., 0]
            + t * (a[..., 1] / 2 + t * (a[..., 2] / 3 + t * (a[..., 3] / 4 + t * a[..., 4] / 5)))
            + a[..., 5] / t
        )

    def s_R(self, T: ArrayLike) -> NDArray[np.float64]:
        """Absolute entropy s/R at 1 bar, shape ``np.shape(T) + (S,)``."""
        T = np.asarray(T, dtype=float)
        a = self._coefficients(T)
        t = T[..., None]
        return (
            a[..., 0] * np.log(t)
            + t * (a[..., 1] + t * (a[..., 2] / 2 + t * (a[..., 3] / 3 + t * a[..., 4] / 4)))
            + a[..., 6]
        )

    def g_RT(self, T: ArrayLike) -> NDArray[np.float64]:
        """Standard Gibbs energy g/RT = h/RT - s/R, shape ``np.shape(T) + (S,)``."""
        return self.h_RT(T) - self.s_R(T)

    def outside_range(self, T: ArrayLike) -> NDArray[np.bool_]:
        """True where a temperature lies outside a species' fitted range."""
        T = np.asarray(T, dtype=float)[..., None]
        return (T < self.T_min) | (T > self.T_max)
