"""The energy figures a result carries: outlet enthalpy and entropy, duty, balance residual."""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import replace

import numpy as np


from ..equilibrium import EnergyFigures, Equilibrium
from ..fixed_step import Setup
from .balance import enthalpy_scale
from .inlet import Inlet
from .properties import ResidualEnthalpy, entropy, state_amounts, state_enthalpy

#: Written into every result that carries a heat figure.
SIGN_CONVENTION = "positive = heat added to the reactor; J per the feed amounts given (W when they are mol/s)"



def energy_figures(setup: Setup, eq: Equilibrium, P: float, inlet: Inlet | None, H_in: float | None,
                   heat: float, residual_enthalpy: ResidualEnthalpy | None = None,
                   inlet_gross: float = 0.0) -> EnergyFigures:
    """The energy figures of a result: outlet enthalpy and entropy, and with an inlet the duty and balance.

    What the energy balance's search reported (its fixed-T solves, a plateau, a kink of the cubic) is taken from
    the answer it returned.
    """
    system = setup.system
    n = state_amounts(setup, eq)
    H_out = state_enthalpy(setup, eq, P, residual_enthalpy)
    if eq.fluid_phases is None:
        S_out = entropy(system.table, system.n_gas, n, eq.T, P)
    else:
        # Each fluid phase mixes on its own (the residual entropy is the gas model's, summed over the phases).
        condensed = n.copy()
        condensed[: system.n_gas] = 0.0
        S_out = entropy(system.table, system.n_gas, condensed, eq.T, P) + sum(
            entropy(system.table, system.n_gas, np.concatenate(
                [[phase.amounts.get(name, 0.0) for name in system.gas_names], np.zeros(len(n) - system.n_gas)]),
                eq.T, P) for phase in eq.fluid_phases)
    search = {name: eq.extras.get(key) for name, key in _SEARCH_FIGURES.items()}
    figures = EnergyFigures(H_out, S_out, **search)
    if inlet is None or H_in is None:
        return figures
    # "T and P", or "T and P; <held reactions>" for a restricted equilibrium: the duty is what T needs.
    duty = H_out - H_in if eq.specification.startswith("T and P") else heat
    scale = enthalpy_scale(setup, n, eq.T, inlet_gross, duty)
    return replace(figures, feed_temperatures_K=inlet.temperatures, feed_enthalpy_J=H_in, duty_W=duty,
                   balance_residual=abs(H_out - H_in - duty) / scale)


#: EnergyFigures' fields the energy balance's search reports, and its names for them.
_SEARCH_FIGURES = {"T_evaluations": "T_evaluations", "balance_path": "energy_balance_path",
                   "phase_boundary": "phase_boundary",
                   "enthalpy_kink": "enthalpy_kink", "balance_miss_K": "energy_balance_miss_K"}


def energy_extras(figures: EnergyFigures) -> dict[str, object]:
    """The energy figures by the names ``Equilibrium.extras`` has always used."""
    extras: dict[str, object] = {"enthalpy_J": figures.enthalpy_J, "entropy_J_per_K": figures.entropy_J_per_K}
    if figures.duty_W is not None:
        extras.update({
            "feed_temperatures_K": figures.feed_temperatures_K,
            "feed_enthalpy_J": figures.feed_enthalpy_J,
            "duty_W": figures.duty_W,
            "duty_sign_convention": SIGN_CONVENTION,
            "energy_balance_residual": figures.balance_residual,
        })
    return extras


def with_extras(eq: Equilibrium, extras: Mapping[str, object]) -> Equilibrium:
    return replace(eq, extras={**eq.extras, **extras})
