"""Sensitivities of a cubic answer: central differences of whole non-ideal solves, phi moving with them."""

from __future__ import annotations

from dataclasses import replace

import numpy as np
from numpy.typing import NDArray

from ..energy.properties import enthalpy, state_amounts
from ..eos.phase import GasPhase
from ..sensitivity import Sensitivities, difference_sensitivities
from ..fixed_step import Setup
from ..solve import SolverResult
from ..thermo.database import SpeciesDatabase
from ..thermo.datasets import default_database
from .loop import solve_nonideal


def nonideal_sensitivities(setup: Setup, phase: GasPhase, result: SolverResult, T: float, P: float, *,
                           method: str = "auto", allow_extrapolation: bool = False,
                           db: SpeciesDatabase | None = None) -> Sensitivities:
    """d(amounts)/dT, d/dP, d/d(feed) and heat capacities of a non-ideal answer, phi moving with them.

    Central differences of whole non-ideal solves, each warm-started from
    ``result`` (``sensitivity.difference_sensitivities``); the heat
    capacities include the residual enthalpy.
    """
    system = setup.system
    feed_species = list(setup.feed)
    columns = system.element_matrix((db or default_database()).resolve(feed_species))

    def amounts_at(T_now: float, P_now: float, b: NDArray[np.float64]) -> NDArray[np.float64]:
        moved = replace(setup, b=b)
        eq, _, _ = solve_nonideal(moved, T_now, P_now, phase, method=method, start=result,
                                  allow_extrapolation=allow_extrapolation)
        return state_amounts(moved, eq)

    def enthalpy_at(T_now: float, n: NDArray[np.float64]) -> float:
        return enthalpy(system.table, system.n_gas, n, T_now, P, phase.residual_enthalpy)

    return difference_sensitivities(
        system.names, T, P, setup.b, {name: columns[:, k] for k, name in enumerate(feed_species)},
        amounts_at, enthalpy_at)
