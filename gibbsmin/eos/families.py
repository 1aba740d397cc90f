"""The two cubic equations of state, written in one generalised form.

Both are special cases of

    P = R T / (v - b) - a(T) / ((v + delta1 b) (v + delta2 b))

with a_i = Omega_a (R Tc_i)^2 / Pc_i * alpha_i(T),  b_i = Omega_b R Tc_i / Pc_i  and
alpha_i = (1 + kappa_i (1 - sqrt(T / Tc_i)))^2.  A family is the four numbers
(delta1, delta2, Omega_a, Omega_b) and the kappa(omega) correlation.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

FloatArray = NDArray[np.float64]


@dataclass(frozen=True)
class CubicFamily:
    """One cubic equation of state.

    Attributes
    ----------
    name : str
        Name used by :func:`gibbsmin.eos.gas_model`.
    delta1, delta2 : float
        Roots of the attractive-term denominator, in units of b [-].
    omega_a, omega_b : float
        Values of a Pc / (R Tc)^2 and b Pc / (R Tc) that put the critical point
        of a pure fluid at (Tc, Pc) [-].
    kappa : callable
        Slope kappa(omega) of the Soave-type alpha function [-].
    """

    name: str
    delta1: float
    delta2: float
    omega_a: float
    omega_b: float
    kappa: Callable[[FloatArray], FloatArray]

    def cubic_coefficients(self, A, B):
        """c2, c1, c0 of Z^3 + c2 Z^2 + c1 Z + c0 = 0 for A = a P/(R T)^2 and B = b P/(R T).

        With u = delta1 + delta2 and w = delta1 delta2 (PR: 2, -1; SRK: 1, 0).
        """
        u, w = self.delta1 + self.delta2, self.delta1 * self.delta2
        return -(1.0 + B - u * B), A + w * B * B - u * B * (1.0 + B), -B * (A + w * B * (1.0 + B))


def _kappa_peng_robinson(omega: FloatArray) -> FloatArray:
    omega = np.asarray(omega, dtype=float)
    # Peng and Robinson (1976), Ind. Eng. Chem. Fundam. 15, 59, eq. 18.
    kappa_1976 = 0.37464 + omega * (1.54226 - 0.26992 * omega)
    # Robinson and Peng (1978), GPA Research Report RR-28: the 1976 fit was made
    # for omega up to about 0.49 and over-predicts kappa for heavier, more polar
    # species (methanol, omega = 0.56), so they refitted that end with a cubic.
    kappa_1978 = 0.379642 + omega * (1.48503 + omega * (-0.164423 + 0.016666 * omega))
    return np.where(omega > 0.491, kappa_1978, kappa_1976)


def _kappa_soave(omega: FloatArray) -> FloatArray:
    omega = np.asarray(omega, dtype=float)
    # Soave (1972), Chem. Eng. Sci. 27, 1197, eq. 15 (m as a function of omega).
    return 0.480 + omega * (1.574 - 0.176 * omega)


_SQRT2 = math.sqrt(2.0)
_CUBE_ROOT_2 = 2.0 ** (1.0 / 3.0)

#: Peng and Robinson (1976).  Omega_a and Omega_b are the exact critical-point
#: values of this cubic (the paper rounds them to 0.45724 and 0.07780); a
#: triple-root test in tests/test_eos_cubic.py checks them.
PENG_ROBINSON = CubicFamily(
    name="peng-robinson",
    delta1=1.0 + _SQRT2,
    delta2=1.0 - _SQRT2,
    omega_a=0.45723552892138218,
    omega_b=0.077796073903888456,
    kappa=_kappa_peng_robinson,
)

#: Soave (1972), the Redlich-Kwong cubic with Soave's alpha function; Omega_a and
#: Omega_b in closed form (0.42748 and 0.08664 in the paper).
SOAVE_REDLICH_KWONG = CubicFamily(
    name="srk",
    delta1=1.0,
    delta2=0.0,
    omega_a=1.0 / (9.0 * (_CUBE_ROOT_2 - 1.0)),
    omega_b=(_CUBE_ROOT_2 - 1.0) / 3.0,
    kappa=_kappa_soave,
)
