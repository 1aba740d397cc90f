"""Gas mixtures shared by the equation-of-state tests (invented loop compositions).

The compositions are our own round numbers for the kind of gas an ammonia or
methanol synthesis loop carries; they are not taken from any plant.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

import gibbsmin


@dataclass(frozen=True)
class Mixture:
    label: str
    species: tuple[str, ...]
    y: tuple[float, ...]
    T: float  # K
    P: float  # Pa

    @property
    def mole_fractions(self) -> np.ndarray:
        return np.array(self.y)

    def critical(self) -> tuple[list[float], list[float], list[float]]:
        """Tc [K], Pc [Pa] and omega of the species, from the shipped species data."""
        records = [gibbsmin.default_database()[name].critical for name in self.species]
        return [c.Tc for c in records], [c.Pc for c in records], [c.omega for c in records]


AMMONIA_LOOP = Mixture("ammonia loop", ("H2", "N2", "NH3", "CH4", "Ar"), (0.60, 0.20, 0.12, 0.05, 0.03), 700.0, 200e5)
METHANOL_LOOP = Mixture(
    "methanol loop", ("H2", "CO", "CO2", "CH4", "H2O", "CH3OH"), (0.66, 0.09, 0.06, 0.16, 0.005, 0.025), 520.0, 80e5
)
METHANE_CO2 = Mixture("CH4/CO2", ("CH4", "CO2"), (0.7, 0.3), 300.0, 50e5)
# Pure CO2 below its vapour pressure (about 42 bar at 280 K): both cubics have
# three real roots here, so the vapour-root choice matters.
CO2_VAPOUR = Mixture("CO2 vapour, three roots", ("CO2",), (1.0,), 280.0, 30e5)

MIXTURES = (AMMONIA_LOOP, METHANOL_LOOP, METHANE_CO2, CO2_VAPOUR)
