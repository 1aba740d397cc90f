"""The energy figures a result carries: outlet enthalpy and entropy, duty, balance residual."""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import replace


from ..equilibrium import Equilibrium
from ..settle import Setup
from .balance import enthalpy_scale
from .inlet import Inlet
from .properties import ResidualEnthalpy, enthalpy, entropy, state_amounts

#: Written into every result that carries a heat figure.
SIGN_CONVENTION = "positive = heat added to the reactor; J per the feed amounts given (W when they are mol/s)"



def energy_extras(setup: Setup, eq: Equilibrium, P: float, inlet: Inlet | None, H_in: float | None,
                  heat: float, residual_enthalpy: ResidualEnthalpy | None = None,
                  inlet_gross: float = 0.0) -> dict[str, object]:
    """The energy figures of a result: outlet enthalpy and entropy, and with an inlet the duty and balance."""
    system = setup.system
    n = state_amounts(setup, eq)
    H_out = enthalpy(system.table, system.n_gas, n, eq.T, P, residual_enthalpy)
    extras: dict[str, object] = {
        "enthalpy_J": H_out,
        "entropy_J_per_K": entropy(system.table, system.n_gas, n, eq.T, P),
    }
    if inlet is None or H_in is None:
        return extras
    # "T and P", or "T and P; <held reactions>" for a restricted equilibrium: the duty is what T needs.
    duty = H_out - H_in if eq.specification.startswith("T and P") else heat
    scale = enthalpy_scale(setup, n, eq.T, inlet_gross, duty)
    extras.update({
        "feed_temperatures_K": inlet.temperatures,
        "feed_enthalpy_J": H_in,
        "duty_W": duty,
        "duty_sign_convention": SIGN_CONVENTION,
        "energy_balance_residual": abs(H_out - H_in - duty) / scale,
    })
    return extras


def with_extras(eq: Equilibrium, extras: Mapping[str, object]) -> Equilibrium:
    return replace(eq, extras={**eq.extras, **extras})
