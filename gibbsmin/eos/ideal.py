"""The ideal gas, with the same interface as the cubic models."""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray

from .inputs import check_conditions
from .result import GasProperties


class IdealGasModel:
    """The ideal-gas mixture: Z = 1, ln phi = 0 and no residual properties.

    Parameters
    ----------
    n_species : int, optional
        Number of species, to check the length of y; any length is accepted when None.
    """

    name = "ideal"

    def __init__(self, n_species: int | None = None):
        self.n_species = n_species

    def __repr__(self) -> str:
        return f"IdealGasModel(n_species={self.n_species})"

    def properties(self, T: ArrayLike, P: ArrayLike, y: ArrayLike, *, dT: bool = False) -> GasProperties:
        """Ideal-gas values at T [K], P [Pa] and y [-]; the inputs are checked as for a cubic model."""
        T2, _, y2, single = check_conditions(T, P, y, self.n_species)
        zeros = np.zeros(y2.shape)
        if single:
            return GasProperties(self.name, 1.0, zeros[0], 0.0, 0.0, zeros[0] if dT else None)
        n_batch = y2.shape[0]
        return GasProperties(
            self.name, np.ones(n_batch), zeros, np.zeros(n_batch), np.zeros(n_batch), zeros.copy() if dT else None
        )

    def ln_phi(self, T: ArrayLike, P: ArrayLike, y: ArrayLike) -> NDArray[np.float64]:
        """Zeros, shape (S,) or (B, S)."""
        return self.properties(T, P, y).ln_phi
