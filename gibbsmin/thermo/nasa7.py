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

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ..compiled import compiled

#: Molar gas constant, [J/(mol K)]: exact since the 2019 SI (N_A k, CODATA 2018).
R = 8.31446261815324


#: Which quantity ``polynomials`` evaluates.
HEAT_CAPACITY, ENTHALPY, ENTROPY, GIBBS = 0, 1, 2, 3


@compiled()
def polynomials(low, high, T_mid, T, quantity, out):
    """cp/R, h/RT, s/R or g/RT of every species at every temperature, into out (T.size, S).

    Compiled: a set of ten species at one temperature is the common call (every
    fixed-T solve), where array arithmetic would cost ten times the sums.  The
    low set applies up to and including T_mid, as the NASA tables' own readers do.
    """
    for p in range(T.shape[0]):
        t = T[p]
        ln_t = math.log(t)
        for j in range(low.shape[0]):
            a = low[j] if t <= T_mid[j] else high[j]
            if quantity == HEAT_CAPACITY:
                out[p, j] = a[0] + t * (a[1] + t * (a[2] + t * (a[3] + t * a[4])))
                continue
            h = a[0] + t * (a[1] / 2 + t * (a[2] / 3 + t * (a[3] / 4 + t * a[4] / 5))) + a[5] / t
            s = a[0] * ln_t + t * (a[1] + t * (a[2] / 2 + t * (a[3] / 3 + t * a[4] / 4))) + a[6]
            out[p, j] = h if quantity == ENTHALPY else (s if quantity == ENTROPY else h - s)


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

    def cp_R(self, T: ArrayLike) -> NDArray[np.float64]:
        """Heat capacity cp/R, shape ``np.shape(T) + (S,)``."""
        return self._evaluate(T, HEAT_CAPACITY)

    def h_RT(self, T: ArrayLike) -> NDArray[np.float64]:
        """Enthalpy h/RT on the formation basis, shape ``np.shape(T) + (S,)``."""
        return self._evaluate(T, ENTHALPY)

    def s_R(self, T: ArrayLike) -> NDArray[np.float64]:
        """Absolute entropy s/R at 1 bar, shape ``np.shape(T) + (S,)``."""
        return self._evaluate(T, ENTROPY)

    def g_RT(self, T: ArrayLike) -> NDArray[np.float64]:
        """Standard Gibbs energy g/RT = h/RT - s/R, shape ``np.shape(T) + (S,)``."""
        return self._evaluate(T, GIBBS)

    def _evaluate(self, T: ArrayLike, quantity: int) -> NDArray[np.float64]:
        T = np.asarray(T, dtype=float)
        flat = np.ascontiguousarray(T.reshape(-1))
        out = np.empty((flat.size, self.low.shape[0]))
        polynomials(self.low, self.high, self.T_mid, flat, quantity, out)
        return out.reshape(T.shape + (self.low.shape[0],))

    def outside_range(self, T: ArrayLike) -> NDArray[np.bool_]:
        """True where a temperature lies outside a species' fitted range."""
        T = np.asarray(T, dtype=float)[..., None]
        return (T < self.T_min) | (T > self.T_max)
