"""Effective critical constants of the quantum gases hydrogen and helium.

Light molecules do not follow corresponding states with their true critical
constants: the de Broglie wavelength of H2 and He is not small against their
size, which makes them behave like a classical fluid of temperature-dependent
size and well depth.  Gunn, Chueh and Prausnitz (1966, AIChE J. 12, 937) fitted
that as temperature-dependent "classical" critical constants,

    Tc(T) = Tc0 / (1 + c1 / (M T)),    Pc(T) = Pc0 / (1 + c2 / (M T)),

with M the molar mass [g/mol], c1 = 21.8 K g/mol and c2 = 44.2 K g/mol for every
quantum gas, and the acentric factor set to zero.  The cubic equation of state
then uses Tc(T), Pc(T) and omega = 0 for these species in place of the measured
critical point.

Sources of the numbers:
- H2: Tc0 = 43.6 K, Pc0 = 20.5 bar, c1 = 21.8, c2 = 44.2 are the values
  recommended in Smith, Van Ness and Abbott, Introduction to Chemical Engineering
  Thermodynamics, 7th ed. (2005), eqs. 3.58 and 3.59, after Prausnitz,
  Lichtenthaler and de Azevedo (Molecular Thermodynamics of Fluid-Phase
  Equilibria, 3rd ed., 1999), who take them from Gunn, Chueh and Prausnitz (1966).
- He-4: Tc0 = 10.47 K and Pc0 = 6.67 atm (6.76 bar) from memory of the same
  table of classical critical constants; not verified against the paper.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

_BAR = 1.0e5  # Pa


@dataclass(frozen=True)
class QuantumGas:
    """Constants of the Gunn-Chueh-Prausnitz effective critical point of one gas.

    Attributes
    ----------
    name : str
        Species the constants belong to.
    Tc0 : float
        Classical-limit critical temperature, [K].
    Pc0 : float
        Classical-limit critical pressure, [Pa].
    c1, c2 : float
        Quantum corrections of Tc and Pc, [K g/mol].
    molar_mass : float
        Molar mass, [g/mol].
    """

    name: str
    Tc0: float
    Pc0: float
    c1: float
    c2: float
    molar_mass: float

    def critical(self, T: ArrayLike) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
        """Effective critical temperature [K] and pressure [Pa] at temperature T [K]."""
        T = np.asarray(T, dtype=float)
        return (
            self.Tc0 / (1.0 + self.c1 / (self.molar_mass * T)),
            self.Pc0 / (1.0 + self.c2 / (self.molar_mass * T)),
        )


#: Hydrogen (normal H2); see the module docstring for the source.
HYDROGEN = QuantumGas("H2", Tc0=43.6, Pc0=20.5 * _BAR, c1=21.8, c2=44.2, molar_mass=2.016)

#: Helium-4; Tc0 and Pc0 from memory (module docstring).
HELIUM = QuantumGas("He", Tc0=10.47, Pc0=6.76 * _BAR, c1=21.8, c2=44.2, molar_mass=4.003)

#: Quantum gases by species name, for callers that mark species by name.
QUANTUM_GASES: dict[str, QuantumGas] = {gas.name: gas for gas in (HYDROGEN, HELIUM)}


@dataclass(frozen=True)
class QuantumTable:
    """The quantum gases of a species set, arranged for vectorised evaluation.

    Attributes
    ----------
    index : ndarray of int, shape (Q,)
        Positions of the quantum gases in the species set.
    Tc0, Pc0 : ndarray, shape (Q,)
        Classical-limit critical constants, [K] and [Pa].
    c1_M, c2_M : ndarray, shape (Q,)
        c1 / M and c2 / M, [K].
    """

    index: NDArray[np.intp]
    Tc0: NDArray[np.float64]
    Pc0: NDArray[np.float64]
    c1_M: NDArray[np.float64]
    c2_M: NDArray[np.float64]

    @classmethod
    def of(cls, gases: dict[int, QuantumGas]) -> QuantumTable:
        order = sorted(gases)
        chosen = [gases[i] for i in order]
        return cls(
            index=np.array(order, dtype=np.intp),
            Tc0=np.array([g.Tc0 for g in chosen]),
            Pc0=np.array([g.Pc0 for g in chosen]),
            c1_M=np.array([g.c1 / g.molar_mass for g in chosen]),
            c2_M=np.array([g.c2 / g.molar_mass for g in chosen]),
        )

    def __len__(self) -> int:
        return len(self.index)

    def critical(self, T: NDArray[np.float64]) -> tuple[NDArray[np.float64], ...]:
        """Tc [K], Pc [Pa] and their logarithmic T-derivatives [1/K], shape T.shape + (Q,).

        ``T`` must carry a trailing axis of length one so that it broadcasts.
        """
        x1 = self.c1_M / T
        x2 = self.c2_M / T
        Tc = self.Tc0 / (1.0 + x1)
        Pc = self.Pc0 / (1.0 + x2)
        # d ln(1 / (1 + c/T)) / dT = (c / T^2) / (1 + c / T)
        dlnTc_dT = x1 / (T * (1.0 + x1))
        dlnPc_dT = x2 / (T * (1.0 + x2))
        return Tc, Pc, dlnTc_dT, dlnPc_dT
