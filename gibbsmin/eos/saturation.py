"""Vapour pressure and boiling point of a pure species by a cubic equation of state.

At saturation the vapour and liquid roots of the same pure-fluid cubic have
equal fugacity, ln phi_L(T, P) = ln phi_V(T, P).  With g(ln P) = ln phi_L -
ln phi_V, the exact slope is dg/d ln P = Z_L - Z_V < 0 (d ln phi / d ln P =
Z - 1 for a pure fluid), so g falls monotonically across the pressures where
the cubic has three roots and has one zero there: a Newton step on ln P, kept
inside a bracket that every evaluation narrows, finds it.  Where an iterate
leaves the three-root region, the one root left says on which side it is: a
volume above the cubic's critical volume is vapour-like (the pressure is too
low), below it liquid-like (too high), because at T < Tc the spinodal volumes
lie either side of it.

The saturation temperature at P is the root in T of ln P_sat(T) = ln P, found
by Brent's method between the lowest temperature served and Tc (ln P_sat is
monotonic in T: d ln P_sat / dT = (H_res,V - H_res,L) / (R T^2 (Z_V - Z_L)) > 0).

This is gibbsmin's own cubic (critical constants of the species database, the
Gunn-Chueh-Prausnitz quantum correction for H2 and He), so it is the pure-fluid
limit of the liquid-solution phases, not an accurate vapour-pressure
correlation: a few percent from the reference equations is usual
(``tests/test_saturation.py`` states the measured deviations).
"""

from __future__ import annotations

import math
from typing import NamedTuple

from scipy.optimize import brentq

from ..errors import ConvergenceError, InputError
from ..thermo.database import SpeciesDatabase
from ..thermo.nasa7 import R
from .cubic import CubicModel
from .registry import gas_model_for_species

#: Triple-point temperatures [K], the lower end of the liquid: each from the
#: reference equation of state of the fluid (as CoolProp 8.0 serves them):
#: H2O Wagner and Pruss (2002, IAPWS-95); NH3 Gao et al. (2020); CO2 Span and
#: Wagner (1996); CH3OH de Reuck and Craven (1993); CH4 Setzmann and Wagner
#: (1991); N2 Span et al. (2000); Ar Tegeler et al. (1999); CO Lemmon and Span
#: (2006); H2 (normal) Leachman et al. (2009); O2 Schmidt and Wagner (1985).
TRIPLE_POINT_TEMPERATURES: dict[str, float] = {
    "H2O": 273.16, "NH3": 195.495, "CO2": 216.592, "CH3OH": 175.61, "CH4": 90.6941,
    "N2": 63.151, "Ar": 83.806, "CO": 68.16, "H2": 13.957, "O2": 54.361,
}

#: Lowest reduced temperature T/Tc served for a species without a listed triple
#: point (common practice, no source: most triple points lie at 0.35 to 0.7 Tc,
#: so 0.7 keeps clear of the solid for the species we know of).
LOWEST_REDUCED_TEMPERATURE = 0.7

#: Closest approach to Tc served, as a fraction of Tc: at Tc the two roots merge.
_CRITICAL_MARGIN = 1e-4
_MAX_ITERATIONS = 100
_FUGACITY_TOLERANCE = 1e-12


class Saturation(NamedTuple):
    """A point of the saturation curve of a pure species by a cubic.

    T [K], P [Pa], Z_vapour and Z_liquid [-] at the two roots, and the enthalpy
    of vaporisation [J/mol] (the difference of the roots' residual enthalpies).
    """

    T: float
    P: float
    Z_vapour: float
    Z_liquid: float
    enthalpy_of_vaporisation: float

    @property
    def liquid_molar_volume(self) -> float:
        """Molar volume of the saturated liquid, [m^3/mol]."""
        return self.Z_liquid * R * self.T / self.P

    @property
    def vapour_molar_volume(self) -> float:
        """Molar volume of the saturated vapour, [m^3/mol]."""
        return self.Z_vapour * R * self.T / self.P


def pure_model(species: str, gas: str = "peng-robinson", database: SpeciesDatabase | None = None) -> CubicModel:
    """The cubic ``gas`` of one species, as :func:`gas_model_for_species` builds it.

    Raises
    ------
    InputError
        The ideal gas (which has no liquid root) or a species without critical constants.
    UnknownSpeciesError
        A name the database does not hold.
    """
    model = gas_model_for_species(gas, [species], database=database, kij="none")
    if not isinstance(model, CubicModel):
        raise InputError(
            f"gas={gas!r} has no liquid, so no saturation curve: give 'peng-robinson' or 'srk'"
        )
    return model


def saturation_range(model: CubicModel) -> tuple[float, float]:
    """Lowest and highest temperature [K] at which ``model`` (one species) is served a saturation point.

    From the triple point (:data:`TRIPLE_POINT_TEMPERATURES`, else
    :data:`LOWEST_REDUCED_TEMPERATURE` times Tc) to just below the cubic's
    critical temperature (for a quantum gas the T at which T = Tc(T)).
    """
    name = _species_name(model)
    Tc = _cubic_critical_temperature(model)
    T_low = TRIPLE_POINT_TEMPERATURES.get(name, LOWEST_REDUCED_TEMPERATURE * Tc)
    return min(T_low, Tc), Tc * (1.0 - _CRITICAL_MARGIN)


def saturation_state(model: CubicModel, T: float) -> Saturation:
    """The saturation point of a one-species cubic ``model`` at temperature T [K].

    Raises
    ------
    InputError
        A model of more than one species, or T outside :func:`saturation_range`.
    ConvergenceError
        No equal-fugacity pressure found (not expected inside the range).
    """
    name = _species_name(model)
    T_low, T_high = saturation_range(model)
    if not (math.isfinite(T) and T_low <= T <= T_high):
        raise InputError(
            f"T = {T:.6g} K is outside the liquid range of {name} by {model.name} "
            f"({T_low:.6g} K, the triple point, to {T_high:.6g} K, just below its critical temperature): "
            "below the triple point the condensed phase is a solid, above Tc there is no liquid"
        )
    Tc_T, Pc_T = _critical_point_at(model, T)
    critical_volume = _critical_compressibility(model) * R * Tc_T / Pc_T
    low, high = -math.inf, math.log(Pc_T)
    ln_P = min(math.log(_wilson_estimate(model, T)), high - 1e-3)
    for _ in range(_MAX_ITERATIONS):
        P = math.exp(ln_P)
        vapour = model.properties(T, P, [1.0], root="vapour")
        liquid = model.properties(T, P, [1.0], root="liquid")
        spread = vapour.Z - liquid.Z
        if spread > 1e-10:
            g = float(liquid.ln_phi[0] - vapour.ln_phi[0])
            if abs(g) <= _FUGACITY_TOLERANCE:
                H_vap = (vapour.H_res_RT - liquid.H_res_RT) * R * T
                return Saturation(T, P, vapour.Z, liquid.Z, H_vap)
            if g > 0.0:
                low = ln_P
            else:
                high = ln_P
            step = g / spread
        else:
            # One root: which side of the three-root region says which end of the bracket moves.
            if vapour.Z * R * T / P > critical_volume:
                low = ln_P
            else:
                high = ln_P
            step = math.nan
        proposal = ln_P + step
        if not (low < proposal < high):
            proposal = 0.5 * (low + high) if math.isfinite(low) else high - 3.0
        ln_P = proposal
    raise ConvergenceError(
        f"the saturation pressure of {name} by {model.name} at T = {T:.6g} K did not converge in "
        f"{_MAX_ITERATIONS} iterations (bracket {math.exp(low):.6g} to {math.exp(high):.6g} Pa)"
    )


def saturation_pressure(
    species: str, T: float, *, gas: str = "peng-robinson", database: SpeciesDatabase | None = None
) -> float:
    """Vapour pressure [Pa] of ``species`` at T [K] by the cubic ``gas`` ("peng-robinson" or "srk").

    Examples
    --------
    >>> round(saturation_pressure("H2O", 373.15) / 1e5, 3)   # Peng-Robinson; IAPWS-95 gives 1.014 bar
    0.963
    """
    return saturation_state(pure_model(species, gas, database), T).P


def saturation_temperature(
    species: str, P: float, *, gas: str = "peng-robinson", database: SpeciesDatabase | None = None
) -> float:
    """Boiling temperature [K] of ``species`` at P [Pa] by the cubic ``gas``.

    Raises
    ------
    InputError
        P outside the model's saturation pressures (triple point to critical), named in the message.
    """
    model = pure_model(species, gas, database)
    T_low, T_high = saturation_range(model)
    P_low, P_high = saturation_state(model, T_low).P, saturation_state(model, T_high).P
    if not (math.isfinite(P) and P_low <= P <= P_high):
        raise InputError(
            f"P = {P:.6g} Pa is outside the saturation pressures of {_species_name(model)} by {model.name} "
            f"({P_low:.6g} Pa at {T_low:.6g} K to {P_high:.6g} Pa at {T_high:.6g} K): below them the "
            "condensed phase is a solid, above them there is no liquid"
        )
    ln_P = math.log(P)

    def excess(T: float) -> float:
        return math.log(saturation_state(model, T).P) - ln_P

    if excess(T_low) >= 0.0:
        return T_low
    if excess(T_high) <= 0.0:
        return T_high
    return brentq(excess, T_low, T_high, xtol=1e-10, rtol=1e-15)


def _species_name(model: CubicModel) -> str:
    if model.n_species != 1:
        raise InputError(
            f"a saturation point needs a model of one species, got {model.n_species}: "
            "build it with pure_model(species, gas)"
        )
    return model.names[0] if model.names else "the species"


def _critical_point_at(model: CubicModel, T: float) -> tuple[float, float]:
    """Tc and Pc the cubic uses at T [K] and [Pa] (temperature-dependent for a quantum gas)."""
    gas = model.quantum_gases.get(0)
    if gas is not None:
        Tc, Pc = gas.critical(T)
        return float(Tc), float(Pc)
    return float(model.critical_temperatures[0]), float(model.critical_pressures[0])


def _cubic_critical_temperature(model: CubicModel) -> float:
    gas = model.quantum_gases.get(0)
    if gas is not None:
        # T = Tc0 / (1 + c1 / (M T))  <=>  T = Tc0 - c1 / M.
        return gas.Tc0 - gas.c1 / gas.molar_mass
    return float(model.critical_temperatures[0])


def _critical_compressibility(model: CubicModel) -> float:
    # The triple root of the cubic at the critical point: c2 = -3 Zc with B = Omega_b.
    family = model.family
    return (1.0 + family.omega_b * (1.0 - family.delta1 - family.delta2)) / 3.0


def _wilson_estimate(model: CubicModel, T: float) -> float:
    return float(model.wilson_ratios(T, 1.0)[0])
