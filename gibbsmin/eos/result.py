"""The result of a gas-model evaluation, the same for every model."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray


@dataclass(frozen=True)
class GasProperties:
    """Departure properties of a gas mixture from the ideal gas at the same T, P and y.

    For one condition the scalars are floats and the per-species arrays have
    shape (S,); for a batch of B conditions they gain a leading axis of length B.

    Attributes
    ----------
    model : str
        Name of the gas model that produced the numbers.
    Z : float or ndarray
        Compressibility factor P v / (R T) of the vapour root, [-].
    ln_phi : ndarray
        Natural logarithm of the fugacity coefficient of each species, [-].
    H_res_RT : float or ndarray
        Residual enthalpy over R T, (h - h_ideal) / (R T), [-].
    S_res_R : float or ndarray
        Residual entropy over R, (s - s_ideal) / R, [-].
    dln_phi_dT : ndarray or None
        Temperature derivative of ln_phi at constant P and y, [1/K]; None unless
        it was asked for.
    """

    model: str
    Z: float | NDArray[np.float64]
    ln_phi: NDArray[np.float64]
    H_res_RT: float | NDArray[np.float64]
    S_res_R: float | NDArray[np.float64]
    dln_phi_dT: NDArray[np.float64] | None = None

    @property
    def G_res_RT(self) -> float | NDArray[np.float64]:
        """Residual Gibbs energy over R T, equal to sum_i y_i ln phi_i, [-]."""
        return self.H_res_RT - self.S_res_R

    @property
    def phi(self) -> NDArray[np.float64]:
        """Fugacity coefficients, [-]."""
        return np.exp(self.ln_phi)
