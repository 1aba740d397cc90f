"""gibbsmin.restricted: equilibrium with reactions held at a temperature approach and species frozen.

Outside sources:
- the reference answer of the approach case is computed here without the
  minimiser: the two equilibrium-constant equations of reforming and shift
  solved for their extents (scipy), with K from Cantera 3.2's evaluation of
  the same NASA-7 data (Goodwin et al. 2025);
- the sign convention (positive approach = short of equilibrium; a reformer
  approach means equilibrium at T - approach) is common practice, no source.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
import scipy.optimize

import gibbsmin
from cantera_reference import cantera_species
from gibbsmin.errors import InputError, UnknownSpeciesError
from gibbsmin.reactions import approach_temperatures
from gibbsmin import equilibrate_with_approach

REFORMER_FEED = {"CH4": 1.0, "H2O": 3.0}
REFORMER_SET = ["CH4", "H2O", "CO", "CO2", "H2"]
T_OUT = 1123.15  # K (850 degC), invented reformer outlet
P_OUT = 30.0e5   # Pa


def _cantera_ln_K(stoichiometry, T):
    """ln K (bar^dn) from Cantera's evaluation of the NASA data."""
    def g_RT(s):
        thermo = cantera_species(s).thermo
        return (thermo.h(T) - T * thermo.s(T)) / (8314.46261815324 * T)
    return -sum(nu * g_RT(s) for s, nu in stoichiometry.items())


def _two_reaction_reference(T_reforming, T_shift):
    """Mole fractions of CH4/H2O at K_SMR(T_reforming) and K_WGS(T_shift), from the K equations alone."""
    ln_K_smr = _cantera_ln_K({"CH4": -1, "H2O": -1, "CO": 1, "H2": 3}, T_reforming)
    ln_K_wgs = _cantera_ln_K({"CO": -1, "H2O": -1, "CO2": 1, "H2": 1}, T_shift)

    def fractions(extents):
        x1, x2 = extents
        n = {"CH4": 1 - x1, "H2O": 3 - x1 - x2, "CO": x1 - x2, "CO2": x2, "H2": 3 * x1 + x2}
        total = sum(n.values())
        return {s: v / total for s, v in n.items()}

    def residual(extents):
        y = fractions(extents)
        ln_p = {s: math.log(v * P_OUT / 1e5) for s, v in y.items()}
        return [ln_p["CO"] + 3 * ln_p["H2"] - ln_p["CH4"] - ln_p["H2O"] - ln_K_smr,
                ln_p["CO2"] + ln_p["H2"] - ln_p["CO"] - ln_p["H2O"] - ln_K_wgs]

    solution = scipy.optimize.root(residual, [0.7, 0.3], tol=1e-14)
    assert np.max(np.abs(residual(solution.x))) < 1e-12
    return fractions(solution.x)


def test_15_K_reforming_approach_gives_the_equilibrium_of_reforming_at_T_minus_15(solver):
    # The check: same composition as a mixture whose reforming K is at T - 15 K
    # while the shift stays at K(T).
    eq = equilibrate_with_approach(REFORMER_FEED, T_OUT, P_OUT, approach={"steam methane reforming": 15.0},
                                   species=REFORMER_SET, method=solver)
    reference = _two_reaction_reference(T_OUT - 15.0, T_OUT)
    y = eq.mole_fractions
    worst = max(abs(y[s] - reference[s]) for s in REFORMER_SET)
    print(f"15 K approach: worst |dy| against the K-equation reference {worst:.1e}")
    assert worst < 1e-9
    # And by the quotients of the answer itself.
    result = approach_temperatures(eq, reactions=["SMR", "shift"])
    assert result["steam methane reforming"].approach_K == pytest.approx(15.0, abs=1e-6)
    assert result["steam methane reforming"].T_eq == pytest.approx(T_OUT - 15.0, abs=1e-6)
    assert result["water-gas shift"].ln_Q == pytest.approx(result["water-gas shift"].ln_K, abs=1e-9)
    assert eq.extras["settling temperature K"] == {"steam methane reforming": T_OUT - 15.0}
    assert eq.extras["reactions at equilibrium"] == ["CO + H2O = CO2 + H2"]


def test_approach_with_the_full_species_set_keeps_the_rest_at_equilibrium(solver):
    eq = equilibrate_with_approach(REFORMER_FEED, "850 degC", "30 bar", approach={"SMR": 15.0}, method=solver)
    result = approach_temperatures(eq, reactions=["SMR", "shift", "methanol synthesis", "steam reforming of C2H6"])
    assert result["steam methane reforming"].approach_K == pytest.approx(15.0, abs=1e-6)
    for name in ("water-gas shift", "methanol synthesis", "steam reforming of C2H6"):
        assert abs(result[name].approach_K) < 1e-6, name
    assert eq.certificate.certified


def test_exothermic_approach_settles_above_T(solver):
    # An invented methanator: 20 K short of methanation equilibrium means equilibrium at T + 20 K.
    feed = {"CO": 0.005, "CO2": 0.003, "H2": 0.74, "N2": 0.24, "CH4": 0.01, "H2O": 0.002}
    eq = equilibrate_with_approach(feed, 600.0, 28e5, approach={"methanation": 20.0}, method=solver)
    a = approach_temperatures(eq, reactions=["methanation"])["methanation"]
    assert a.approach_K == pytest.approx(20.0, abs=1e-6)
    assert a.T_eq == pytest.approx(620.0, abs=1e-6)


def test_two_approaches_at_once_and_a_negative_one(solver):
    eq = equilibrate_with_approach(REFORMER_FEED, T_OUT, P_OUT, approach={"SMR": 10.0, "shift": -5.0},
                                   species=REFORMER_SET, method=solver)
    reference = _two_reaction_reference(T_OUT - 10.0, T_OUT - 5.0)  # shift 5 K beyond: equilibrium at T - 5 K
    assert max(abs(eq.mole_fractions[s] - reference[s]) for s in REFORMER_SET) < 1e-9


def test_zero_approach_is_the_unrestricted_equilibrium(solver):
    restricted = equilibrate_with_approach(REFORMER_FEED, T_OUT, P_OUT, approach={"SMR": 0.0}, method=solver)
    plain = gibbsmin.equilibrate(REFORMER_FEED, T_OUT, P_OUT, method=solver)
    for s, y in plain.mole_fractions.items():
        assert restricted.mole_fractions[s] == pytest.approx(y, rel=1e-8, abs=1e-15)


SHIFT_FEED = {"CO": 0.15, "H2O": 0.35, "CO2": 0.05, "H2": 0.40, "CH4": 0.05}  # invented shift inlet


def test_frozen_at_feed_amount_is_the_inert_mechanism(solver):
    eq = equilibrate_with_approach(SHIFT_FEED, 650.0, 25e5, frozen=["CH4"], method=solver)
    assert eq.amounts["CH4"] == pytest.approx(0.05, rel=1e-12)
    inert = gibbsmin.equilibrate(SHIFT_FEED, 650.0, 25e5, inert=["CH4"], method=solver)
    for s, n in inert.amounts.items():
        assert eq.amounts[s] == pytest.approx(n, rel=1e-9, abs=1e-15)
    # Without freezing, methanation at 650 K would make much more methane (common practice, no source).
    assert gibbsmin.equilibrate(SHIFT_FEED, 650.0, 25e5, method=solver).amounts["CH4"] > 0.1
    assert abs(approach_temperatures(eq, reactions=["shift"])["water-gas shift"].approach_K) < 1e-6


def test_frozen_at_a_chosen_amount_conserves_every_element(solver):
    eq = equilibrate_with_approach(SHIFT_FEED, 650.0, 25e5, frozen={"CH4": 0.02, "NH3": 0.0}, method=solver)
    assert eq.amounts["CH4"] == pytest.approx(0.02, rel=1e-12)
    db = gibbsmin.default_database()
    for element in ("C", "H", "O"):
        fed = sum(n * db[s].elements.get(element, 0.0) for s, n in SHIFT_FEED.items())
        out = sum(n * db[s].elements.get(element, 0.0) for s, n in eq.amounts.items())
        assert out == pytest.approx(fed, rel=1e-10), element
    assert eq.extras["frozen mol"] == {"CH4": 0.02, "NH3": 0.0}


@pytest.mark.parametrize("kwargs, error, message", [
    ({"approach": {"ammonia synthesis": 10.0}}, InputError, "lacks|does not contain"),
    ({"approach": {"stean reforming": 10.0}}, InputError, "unknown reaction"),
    ({"approach": {"CH4 + H2O = CO + 2 H2": 10.0}}, InputError, "does not balance"),
    ({"approach": {"methanol synthesis": 10.0}, "species": REFORMER_SET}, InputError, "CH3OH, which the species set lacks"),
    ({"approach": {"SMR": 10.0, "methanation": 5.0}}, InputError, "combination of"),
    ({"approach": {"SMR": 10.0}, "frozen": ["CH4"]}, InputError, "frozen and cannot react"),
    ({"approach": {"SMR": math.nan}}, InputError, "finite number"),
    ({"approach": ["SMR"]}, InputError, "mapping of reaction"),
    ({"frozen": ["C(s)"]}, InputError, "must be gases"),
    ({"frozen": ["CO"]}, InputError, "not in the feed"),
    ({"frozen": {"CO2": 5.0}}, InputError, "more C"),
    ({"approach": {"SMR": 10.0}, "species": ["CH4", "H2O", "CO", "H2", "H2Q"]}, UnknownSpeciesError, "H2Q"),
])
def test_bad_restrictions_get_clear_errors(kwargs, error, message):
    with pytest.raises(error, match=message):
        equilibrate_with_approach(REFORMER_FEED, T_OUT, P_OUT, **kwargs)


# --- adiabatic, with a held reaction ------------------------------------------------------------------

#: Inlet of an invented HT shift converter, kmol/h as mol/s; 370 degC, 33 bar.
CONVERTER_FEED = {"H2": 41.0, "CO": 8.5, "CO2": 5.5, "CH4": 0.7, "N2": 13.5, "Ar": 0.2, "H2O": 34.0}
CONVERTER_SPECIES = list(CONVERTER_FEED)


def test_adiabatic_shift_converter_with_an_approach_closes_on_cantera_enthalpies(solver):
    # Outside check: Cantera 3.2 evaluates the inlet's and the outlet's enthalpy from the same NASA data
    # (tests/cantera_reference.py); the outlet must hold the inlet's enthalpy, and read back the asked
    # approach.  Only the shift reacts in this set (CH4 frozen, no carbon species besides CO/CO2).
    from cantera_reference import cantera_gas

    T_in, P = 370.0 + 273.15, 33e5
    eq = equilibrate_with_approach(CONVERTER_FEED, None, P, {"water-gas shift": 10.0}, frozen=["CH4", "N2", "Ar"],
                                   species=CONVERTER_SPECIES, T_feed=T_in, adiabatic=True, method=solver)
    gas = cantera_gas(CONVERTER_SPECIES)

    def enthalpy_J(amounts, T):
        total = sum(amounts.values())
        gas.TPX = T, P, {s: n for s, n in amounts.items() if n > 0}
        return gas.enthalpy_mole / 1000.0 * total

    H_in = enthalpy_J(CONVERTER_FEED, T_in)
    H_out = enthalpy_J({s: eq.amounts[s] for s in CONVERTER_SPECIES}, eq.T)
    assert H_out == pytest.approx(H_in, rel=1e-9, abs=1e-6 * abs(H_in))
    found = approach_temperatures(eq, reactions=["water-gas shift"])["water-gas shift"]
    assert found.approach_K == pytest.approx(10.0, abs=1e-6)
    assert eq.T - T_in > 30.0  # the shift is exothermic: the bed heats up by tens of K
    assert eq.extras["duty_W"] == 0.0 and eq.specification.startswith("H and P")


def test_adiabatic_with_zero_approach_is_the_adiabatic_equilibrium(solver):
    T_in, P = 370.0 + 273.15, 33e5
    held = equilibrate_with_approach(CONVERTER_FEED, None, P, {"water-gas shift": 0.0}, frozen=["CH4", "N2", "Ar"],
                                     species=CONVERTER_SPECIES, T_feed=T_in, adiabatic=True, method=solver)
    free = gibbsmin.equilibrate(CONVERTER_FEED, P=P, T_feed=T_in, adiabatic=True, species=CONVERTER_SPECIES,
                                inert=["CH4", "N2", "Ar"], method=solver)
    assert held.T == pytest.approx(free.T, abs=1e-6)
    # Short of equilibrium the exothermic shift releases less heat: a cooler outlet.
    short = equilibrate_with_approach(CONVERTER_FEED, None, P, {"water-gas shift": 20.0}, frozen=["CH4", "N2", "Ar"],
                                      species=CONVERTER_SPECIES, T_feed=T_in, adiabatic=True, method=solver)
    assert short.T < held.T - 1.0


@pytest.mark.parametrize(("kwargs", "message"), [
    ({"adiabatic": True}, "needs the feed temperature"),
    ({"adiabatic": True, "T_feed": 640.0, "ln_phi": {"H2": 0.0}}, "ln_phi is held fixed"),
])
def test_adiabatic_approach_bad_requests(kwargs, message):
    with pytest.raises(InputError, match=message):
        equilibrate_with_approach(CONVERTER_FEED, None, 33e5, {"water-gas shift": 10.0}, species=CONVERTER_SPECIES,
                                  **kwargs)


def test_temperature_and_adiabatic_together_are_refused():
    with pytest.raises(InputError, match="not both"):
        equilibrate_with_approach(CONVERTER_FEED, 700.0, 33e5, {"water-gas shift": 10.0}, species=CONVERTER_SPECIES,
                                  T_feed=640.0, adiabatic=True)
