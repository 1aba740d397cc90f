"""Enthalpy, entropy and heat capacity of any phase split, and of a mixture given by name."""

from __future__ import annotations

import math
from collections.abc import Callable, Mapping

import numpy as np
from numpy.typing import NDArray

from ..equilibrium import Equilibrium
from ..errors import TemperatureRangeError
from ..fixed_step import Setup, positive_number, check_feed
from ..solve import SolverResult
from ..system import P_REF, Problem
from ..thermo.database import SpeciesDatabase
from ..thermo.datasets import default_database
from ..compiled import compiled
from ..thermo.nasa7 import ENTHALPY, ENTROPY, Nasa7Table, R, polynomials


#: Gas-phase residual enthalpy h(T, P, n_gas) - h_ideal, [J], for the gas amounts [mol] in the
#: System's gas order.  None means an ideal gas; a cubic equation of state supplies its own.
ResidualEnthalpy = Callable[[float, float, NDArray[np.float64]], float]

#: A fixed-T step: (T [K], warm start) -> (Equilibrium, Problem, SolverResult), as ``fixed_step.solve_fixed``.
FixedTStep = Callable[[float, "SolverResult | None"], tuple[Equilibrium, Problem, SolverResult]]

#: The solve with T unknown on the union of two phase sets, with the arguments of
#: ``phase_boundary.solve_on_phase_boundary`` and its returns (None where that phase set is not the answer).
PhaseSetStep = Callable[..., "tuple[Equilibrium, Problem, SolverResult] | None"]



def enthalpy(table: Nasa7Table, n_gas: int, n: NDArray[np.float64], T: float, P: float,
             residual_enthalpy: ResidualEnthalpy | None = None) -> float:
    """Enthalpy of a state on the formation basis, [J].

    Parameters
    ----------
    table : Nasa7Table
        Coefficients of the species, gas species first.
    n_gas : int
        How many of the species form the gas phase.
    n : ndarray
        Amounts, [mol]; each condensed species is a pure phase of its own.
    T : float
        Temperature, [K].
    P : float
        Pressure, [Pa].
    residual_enthalpy : callable, optional
        The gas's departure from the ideal gas, [J]; zero when omitted.
    """
    n = np.ascontiguousarray(n, dtype=float)
    H = _state_function(table.low, table.high, table.T_mid, n_gas, n, float(T), float(P), ENTHALPY)
    if residual_enthalpy is not None and n_gas:
        H += float(residual_enthalpy(T, P, n[:n_gas]))
    return H


def entropy(table: Nasa7Table, n_gas: int, n: NDArray[np.float64], T: float, P: float) -> float:
    """Entropy of a state, [J/K]: ideal mixing in the gas, pure condensed phases at their standard entropy.

    The parameters are those of :func:`enthalpy`.
    """
    n = np.ascontiguousarray(n, dtype=float)
    return _state_function(table.low, table.high, table.T_mid, n_gas, n, float(T), float(P), ENTROPY)


@compiled()
def _state_function(low, high, T_mid, n_gas, n, T, P, quantity):
    """H [J] or S [J/K] of amounts n at T and P: ideal mixing in the gas, pure condensed phases.

    For S, n ln y vanishes for a species that is not there, so absent ones are
    skipped rather than logged; the logs are of the amounts, not of y P/P0,
    which underflows for species near the smallest float.
    """
    values = np.empty((1, low.shape[0]))
    polynomials(low, high, T_mid, np.array([T]), quantity, values)
    total = 0.0
    if quantity == ENTHALPY:
        for j in range(n.shape[0]):
            total += n[j] * values[0, j]
        return total * R * T
    N = 0.0
    for j in range(n_gas):
        N += n[j]
    ln_N_p = math.log(N) - math.log(P / P_REF) if N > 0.0 else 0.0
    for j in range(n.shape[0]):
        if j >= n_gas:
            total += n[j] * values[0, j]
        elif n[j] > 0.0:
            total += n[j] * (values[0, j] - math.log(n[j]) + ln_N_p)
    return R * total


def heat_capacity(table: Nasa7Table, n: NDArray[np.float64], T: float) -> float:
    """Frozen heat capacity (composition held fixed), [J/K]."""
    return float(R * (np.asarray(n, dtype=float) @ table.cp_R(T)))


def _temperature(value: object, name: str) -> float:
    return positive_number(value, name, "K")


def _mixture(amounts: Mapping[str, float], T: float, db: SpeciesDatabase | None, allow_extrapolation: bool):
    db = db or default_database()
    T = _temperature(T, "T")
    canonical = check_feed(amounts, db)
    records = db.resolve(list(canonical))
    records = [r for r in records if r.is_gas] + [r for r in records if not r.is_gas]
    if not allow_extrapolation:
        for record in records:
            if not record.T_min <= T <= record.T_max:
                raise TemperatureRangeError(record.name, T, record.T_min, record.T_max)
    n = np.array([canonical[r.name] for r in records])
    return db.nasa7([r.name for r in records]), sum(r.is_gas for r in records), n, T


def mixture_enthalpy(amounts: Mapping[str, float], T: float, P: float = P_REF, *,
                     db: SpeciesDatabase | None = None, allow_extrapolation: bool = False) -> float:
    """Enthalpy of a mixture on the formation basis, [J].

    Parameters
    ----------
    amounts : mapping
        Species name to amount, [mol].  The name carries the phase: ``"H2O"``
        is the gas, ``"H2O(l)"`` a liquid phase of pure water.
    T : float
        Temperature, [K].
    P : float
        Pressure, [Pa] (no effect on an ideal gas).

    Examples
    --------
    >>> round(mixture_enthalpy({"H2O": 1.0}, 298.15) / 1000, 1)   # delta-fH of steam, kJ
    -241.8
    """
    table, n_gas, n, T = _mixture(amounts, T, db, allow_extrapolation)
    return enthalpy(table, n_gas, n, T, positive_number(P, "P", "Pa"))


def species_enthalpies(amounts: Mapping[str, float], T: float, *, db: SpeciesDatabase | None = None,
                       allow_extrapolation: bool = False) -> NDArray[np.float64]:
    """n_j h_j of each species of a mixture on the formation basis, [J] (gas species first, as in ``_mixture``)."""
    table, _, n, T = _mixture(amounts, T, db, allow_extrapolation)
    return n * (table.h_RT(T) * (R * T))


def mixture_entropy(amounts: Mapping[str, float], T: float, P: float = P_REF, *,
                    db: SpeciesDatabase | None = None, allow_extrapolation: bool = False) -> float:
    """Entropy of a mixture, [J/K]: ideal gas mixture plus pure condensed phases (see ``mixture_enthalpy``)."""
    table, n_gas, n, T = _mixture(amounts, T, db, allow_extrapolation)
    return entropy(table, n_gas, n, T, positive_number(P, "P", "Pa"))


def state_enthalpy(setup: Setup, eq: Equilibrium, P: float,
                   residual_enthalpy: ResidualEnthalpy | None = None) -> float:
    """Enthalpy of an answer, [J]: with liquid-solution phases, the residual parts summed over its fluid phases
    (each on its own root: ``GasModelState.residual_enthalpy_J``); otherwise the gas's, by ``residual_enthalpy``."""
    system = setup.system
    n = state_amounts(setup, eq)
    if eq.fluid_phases is not None:
        return enthalpy(system.table, system.n_gas, n, eq.T, P) + eq.gas.residual_enthalpy_J
    return enthalpy(system.table, system.n_gas, n, eq.T, P, residual_enthalpy)


def state_amounts(setup: Setup, eq: Equilibrium) -> NDArray[np.float64]:
    """Amounts of an equilibrium in its System's species order, [mol]."""
    return np.array([eq.amounts[name] for name in setup.system.names])
