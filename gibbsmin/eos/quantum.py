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

from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ..errors import InputError

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


def quantum_gases_of(
    entries: Sequence[str | QuantumGas | bool | None] | None, names: Sequence[str] | None, n_species: int
) -> dict[int, QuantumGas]:
    """The quantum gases marked in ``entries`` (one per species), by species position.

    An entry is None or False for an ordinary species; "H2", "He" or a
    QuantumGas for a quantum gas; or True, which takes the gas from ``names``.

    Raises
    ------
    InputError
        Entries of the wrong length, an unknown gas, or True without a known name.
    """
    if entries is None:
        return {}
    if len(entries) != n_species:
        raise InputError(
            f"quantum must have one entry per species ({n_species}), got {len(entries)}; "
            "use None for ordinary species"
        )
    known = f"use one of {sorted(QUANTUM_GASES)}, a QuantumGas, or None"
    gases = {}
    for i, entry in enumerate(entries):
        if isinstance(entry, bool | np.bool_):
            if not entry:
                continue
            name = names[i] if names is not None else None
            if name not in QUANTUM_GASES:
                raise InputError(
                    f"quantum entry True of species {i} ({name!r}) does not say which gas it is; "
                    f"name the species {' or '.join(sorted(QUANTUM_GASES))} in names, or {known}"
                )
            entry = name
        if entry is None:
            continue
        if isinstance(entry, QuantumGas):
            gases[i] = entry
        elif isinstance(entry, str) and entry in QUANTUM_GASES:
            gases[i] = QUANTUM_GASES[entry]
        else:
            raise InputError(f"quantum entry {entry!r} of species {i} is not a known quantum gas; {known}")
    return gases


@dataclass(frozen=True)
class QuantumTable:
    """Critical constants of a species set in the Gunn-Chueh-Prausnitz form, for vectorised evaluation.

    Every species gets Tc(T) = Tc0 / (1 + (c1/M) / T) and Pc(T) = Pc0 / (1 + (c2/M) / T);
    ordinary species have c1/M = c2/M = 0 and so keep Tc0 and Pc0.

    Attributes
    ----------
    Tc0, Pc0 : ndarray, shape (S,)
        Classical-limit critical constants of the quantum gases and the true
        ones of the other species, [K] and [Pa].
    c1_M, c2_M : ndarray, shape (S,)
        c1 / M and c2 / M, [K]; zero for ordinary species.
    """

    Tc0: NDArray[np.float64]
    Pc0: NDArray[np.float64]
    c1_M: NDArray[np.float64]
    c2_M: NDArray[np.float64]

    @classmethod
    def of(cls, gases: Mapping[int, QuantumGas], Tc: ArrayLike, Pc: ArrayLike) -> QuantumTable:
        """The table for ordinary species with critical constants Tc [K], Pc [Pa] and the quantum ``gases``."""
        Tc0 = np.array(Tc, dtype=float)
        Pc0 = np.array(Pc, dtype=float)
        c1_M = np.zeros_like(Tc0)
        c2_M = np.zeros_like(Tc0)
        for i, gas in gases.items():
            Tc0[i], Pc0[i] = gas.Tc0, gas.Pc0
            c1_M[i], c2_M[i] = gas.c1 / gas.molar_mass, gas.c2 / gas.molar_mass
        return cls(Tc0, Pc0, c1_M, c2_M)
