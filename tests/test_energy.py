"""Enthalpy, entropy, inlets, duty and the fixed-enthalpy solve: published values, trade facts, input errors.

Every reference value names its source beside it.  JANAF: Chase, NIST-JANAF
Thermochemical Tables, 4th ed., J. Phys. Chem. Ref. Data Monograph 9, 1998,
read through the ``janaf`` package (1.4), which ships the tables as published.
CODATA: Cox, Wagman and Medvedev, CODATA Key Values for Thermodynamics, 1989.
Values marked "from memory" were not re-read from the source for this test.
"""

from __future__ import annotations

import json
import math

import numpy as np
import pytest

import gibbsmin
import janaf
from gibbsmin.energy import mixture_enthalpy, mixture_entropy, read_inlet
from gibbsmin.thermo.nasa7 import R

DB = gibbsmin.default_database()
CONDENSED = [r.name for r in DB if not r.is_gas]
BAR = 1.0e5
ATM = 101325.0


# --- enthalpy and entropy of mixtures -------------------------------------------------------------

def _janaf(formula: str, phase: str, T: float, column: str) -> float:
    """One value of a NIST-JANAF table (Chase 1998) as the ``janaf`` package ships it, in J and K."""
    frame = janaf.search(formula=f"^{formula}$", phase=f"^{phase}$").df
    row = frame.filter(frame["T(K)"] == T)
    assert row.height == 1, f"JANAF table of {formula} ({phase}) lacks {T} K"
    return float(row[column][0]) * (1000.0 if column in ("H-H(Tr)", "delta-f H") else 1.0)


def test_formation_enthalpies_of_steam_and_liquid_water():
    # JANAF delta-f H at 298.15 K: H2O(g) -241.826 kJ/mol, H2O(l) -285.830 kJ/mol (also the CODATA 1989 values).
    steam = _janaf("H2O", "g", 298.15, "delta-f H")
    water = _janaf("H2O", "l", 298.15, "delta-f H")
    assert mixture_enthalpy({"H2O": 1.0}, 298.15) == pytest.approx(steam, abs=50.0)
    assert mixture_enthalpy({"H2O(l)": 1.0}, 298.15) == pytest.approx(water, abs=50.0)
    # The phase is part of the name: 2 mol of each phase add up.
    assert mixture_enthalpy({"H2O": 2.0, "H2O(l)": 2.0}, 298.15) == pytest.approx(2 * (steam + water), abs=200.0)


@pytest.mark.parametrize("T", [1000.0, 1500.0, 2000.0])
def test_sensible_heat_of_nitrogen(T):
    # JANAF N2, H(T) - H(298.15 K).  The NASA fit rests on Gurvich et al. (1989) and falls 46 J/mol
    # below JANAF at 2000 K (0.08 %): the spread between the two sources, hence 60 J/mol.
    assert mixture_enthalpy({"N2": 1.0}, T) == pytest.approx(_janaf("N2", "ref", T, "H-H(Tr)"), abs=60.0)


def test_entropy_of_air_includes_ideal_mixing():
    # JANAF S(N2), S(O2) at 298.15 K and 1 bar; ideal mixing adds -R sum n_j ln y_j.
    s_n2, s_o2 = _janaf("N2", "ref", 298.15, "S"), _janaf("O2", "ref", 298.15, "S")
    expected = 0.79 * s_n2 + 0.21 * s_o2 - R * (0.79 * math.log(0.79) + 0.21 * math.log(0.21))
    assert mixture_entropy({"N2": 0.79, "O2": 0.21}, 298.15, 1e5) == pytest.approx(expected, abs=0.05)
    # Ten times the pressure takes R ln 10 per mol away.
    assert mixture_entropy({"N2": 1.0}, 298.15, 1e6) == pytest.approx(s_n2 - R * math.log(10.0), abs=0.05)


def test_heat_of_fusion_of_ice():
    # Heat of fusion of ice at 273.15 K: 6.007 kJ/mol (Feistel and Wagner, J. Phys. Chem. Ref. Data 35, 2006;
    # from memory).
    fusion = mixture_enthalpy({"H2O(l)": 1.0}, 273.15) - mixture_enthalpy({"H2O(s)": 1.0}, 273.15)
    assert fusion == pytest.approx(6007.0, abs=30.0)


def test_mixture_enthalpy_refuses_a_temperature_outside_the_data():
    with pytest.raises(gibbsmin.TemperatureRangeError, match="H2O\\(l\\)"):
        mixture_enthalpy({"H2O(l)": 1.0}, 700.0)


# --- the inlet ------------------------------------------------------------------------------------

def test_inlet_forms():
    one = read_inlet({"CH4": 1.0, "steam": 3.0}, 800.0, DB)
    assert [(s.name, s.T) for s in one.streams] == [("feed", 800.0)]
    assert one.total == {"CH4": 1.0, "H2O": 3.0}
    per_species = read_inlet({"CH4": 1.0, "H2O": 3.0}, {"methane": 600.0, "H2O": 700.0}, DB)
    assert per_species.temperatures == {"CH4": 600.0, "H2O": 700.0}
    streams = read_inlet({"gas": {"CH4": 1.0, "H2O": 0.1}, "steam": {"H2O": 2.9}}, {"gas": 600.0, "steam": 700.0}, DB)
    assert streams.total == pytest.approx({"CH4": 1.0, "H2O": 3.0})


@pytest.mark.parametrize("feed, T_feed, message", [
    ({"CH4": 1.0, "H2O": 3.0}, {"CH4": 600.0}, "no temperature for H2O"),
    ({"CH4": 1.0}, {"CH4": 600.0, "O2": 300.0}, "not a feed species"),
    ({"a": {"CH4": 1.0}, "b": {"O2": 1.0}}, {"a": 600.0}, "no temperature for b"),
    ({"a": {"CH4": 1.0}, "H2O": 1.0}, 600.0, "mixes species amounts with streams"),
    ({"CH4": 1.0}, -5.0, "T_feed must be a positive finite number in K"),
    ({"CH4": 1.0}, "hot", "T_feed must be a number in K"),
])
def test_inlet_errors_name_the_fix(feed, T_feed, message):
    with pytest.raises(gibbsmin.InputError, match=message):
        read_inlet(feed, T_feed, DB)


def test_one_stream_per_species_equals_one_mixed_stream_at_the_same_temperatures(solver):
    as_species = gibbsmin.equilibrate({"CH4": 1.0, "O2": 0.6, "H2O": 1.0}, P=20 * BAR, adiabatic=True,
                                      T_feed={"CH4": 800.0, "O2": 500.0, "H2O": 800.0}, exclude=CONDENSED,
                                      method=solver)
    as_streams = gibbsmin.equilibrate({"gas": {"CH4": 1.0, "H2O": 1.0}, "oxygen": {"O2": 0.6}}, P=20 * BAR,
                                      adiabatic=True, T_feed={"gas": 800.0, "oxygen": 500.0}, exclude=CONDENSED,
                                      method=solver)
    assert as_species.T == pytest.approx(as_streams.T, abs=1e-8)


# --- duty of a reactor at a given outlet temperature -----------------------------------------------

def test_duty_of_burning_hydrogen_at_room_temperature_is_the_heat_of_formation_of_steam(solver):
    # JANAF delta-f H(H2O, g, 298.15 K) = -241.826 kJ/mol; the reactor must give that heat away.
    eq = gibbsmin.equilibrate({"H2": 1.0, "O2": 0.5}, 298.15, 1e5, T_feed=298.15, exclude=CONDENSED, method=solver)
    assert eq.extras["duty_W"] == pytest.approx(_janaf("H2O", "g", 298.15, "delta-f H"), abs=50.0)
    assert eq.extras["duty_sign_convention"].startswith("positive = heat added to the reactor")
    assert eq.specification == "T and P"


def test_duty_of_heating_nitrogen(solver):
    # JANAF N2: H(1000 K) - H(298.15 K) = 21.463 kJ/mol.
    eq = gibbsmin.equilibrate({"N2": 2.0}, 1000.0, 1e5, T_feed=298.15, method=solver)
    assert eq.extras["duty_W"] == pytest.approx(2 * _janaf("N2", "ref", 1000.0, "H-H(Tr)"), abs=40.0)
    assert "duty 42" in eq.table()


def test_fired_reformer_duty_is_positive_and_rises_with_outlet_temperature(solver):
    # Fact of the trade (common practice, no source): the hotter the reformer outlet, the more
    # methane is reformed and the more heat the furnace must fire.  Invented feed: S/C 3 at 500 degC, 25 bar.
    duties = [gibbsmin.equilibrate({"CH4": 1.0, "H2O": 3.0}, T, 25 * BAR, T_feed=773.15, method=solver).extras["duty_W"]
              for T in (1023.15, 1073.15, 1123.15, 1173.15)]
    assert duties[0] > 0
    assert all(b > a for a, b in zip(duties, duties[1:]))


def test_duty_at_the_adiabatic_outlet_temperature_is_zero(solver):
    feed = {"CH4": 1.0, "H2O": 1.2, "O2": 0.55}
    adiabatic = gibbsmin.equilibrate(feed, P=30 * BAR, T_feed=800.0, adiabatic=True, exclude=CONDENSED, method=solver)
    at_T = gibbsmin.equilibrate(feed, adiabatic.T, 30 * BAR, T_feed=800.0, exclude=CONDENSED, method=solver)
    assert abs(at_T.extras["duty_W"]) <= 1e-9 * abs(at_T.extras["feed_enthalpy_J"])


# --- fixed enthalpy and pressure --------------------------------------------------------------------

def test_adiabatic_flame_temperature_of_stoichiometric_methane_air(solver):
    # Turns, An Introduction to Combustion, 2nd ed., 2000, Table 2.1: 2226 K for stoichiometric
    # methane-air from 298 K at 1 atm, with dissociation (from memory).  The species set matters at
    # the kelvin level; this is the full C-H-O-N gas set of the database.
    eq = gibbsmin.equilibrate({"CH4": 1.0, "O2": 2.0, "N2": 7.52}, P=ATM, T_feed=298.0, adiabatic=True,
                              exclude=CONDENSED, method=solver)
    print(f"adiabatic flame temperature {eq.T:.2f} K")
    assert abs(eq.T - 2226.0) <= 5.0
    assert eq.extras["energy_balance_residual"] <= 1e-9


def test_an_adiabatic_exothermic_bed_heats_up_and_its_conversion_falls(solver):
    # Fact of the trade (common practice, no source), for an ammonia bed and a shift converter:
    # the outlet is hotter than the inlet and converts less than an isothermal bed at the inlet T.
    ammonia = {"H2": 0.675, "N2": 0.225, "NH3": 0.03, "Ar": 0.03, "CH4": 0.04}
    hot = gibbsmin.equilibrate(ammonia, P=150 * BAR, T_feed=673.15, adiabatic=True, species=list(ammonia),
                               method=solver)
    cold = gibbsmin.equilibrate(ammonia, 673.15, 150 * BAR, species=list(ammonia), method=solver)
    assert hot.T > 673.15 + 50
    assert hot.amounts["NH3"] < cold.amounts["NH3"]
    shift = {"H2": 38.0, "CO": 10.0, "CO2": 5.0, "H2O": 34.0, "N2": 0.5}
    hot = gibbsmin.equilibrate(shift, P=30 * BAR, T_feed=633.15, adiabatic=True, species=list(shift), method=solver)
    cold = gibbsmin.equilibrate(shift, 633.15, 30 * BAR, species=list(shift), method=solver)
    assert hot.T > 633.15 + 30
    assert hot.amounts["CO"] > cold.amounts["CO"]


def test_freezing_plateau_sits_at_the_melting_point_and_heat_sets_the_ice(solver):
    # Melting point of ice at 101325 Pa: 273.1525 K (IAPWS R14-08, 2011; from memory); the NASA fits of
    # ice and water cross 8 mK below it.  Heat of fusion 6.007 kJ/mol (Feistel and Wagner 2006; from
    # memory): on the plateau each further joule removed freezes 1/6007 mol more water.
    species = ["N2", "H2O", "O2", "H2", "H2O(l)", "H2O(s)"]
    feed = {"N2": 1.0, "H2O": 0.1}
    a = gibbsmin.equilibrate(feed, P=ATM, T_feed=300.0, heat_input=-5200.0, species=species, method=solver)
    b = gibbsmin.equilibrate(feed, P=ATM, T_feed=300.0, heat_input=-5400.0, species=species, method=solver)
    for eq in (a, b):
        assert abs(eq.T - 273.1525) <= 0.02
        assert eq.certificate.certified
        assert eq.extras["energy_balance_residual"] <= 1e-9
        assert "phase_boundary" in eq.extras
    assert b.T == pytest.approx(a.T, abs=1e-9)
    frozen_per_joule = (b.amounts["H2O(s)"] - a.amounts["H2O(s)"]) / 200.0
    assert frozen_per_joule == pytest.approx(1 / 6007.0, rel=0.01)
    # Vapour over ice at its triple point: 611.657 Pa (IAPWS R10-06, 2009; from memory).
    assert a.partial_pressures["H2O"] == pytest.approx(611.657, rel=0.01)


def test_steam_condensing_on_its_own_sits_at_the_boiling_point(solver):
    # One-component feed: the gas cannot change composition, so liquid and vapour coexist at one T.
    # Reference: CoolProp 8 (Bell et al., Ind. Eng. Chem. Res. 53, 2014), water by IAPWS-95 (Wagner and
    # Pruss 2002): T_sat(101325 Pa) = 373.124 K and the heat of vaporisation there.  The NASA fit of
    # liquid water puts the boiling point 0.42 K high and its heat of vaporisation 0.5 % high, hence the
    # tolerances.
    CP = pytest.importorskip("CoolProp.CoolProp")
    T_sat = CP.PropsSI("T", "P", ATM, "Q", 0, "Water")
    M = CP.PropsSI("M", "Water")  # kg/mol
    h_vap = (CP.PropsSI("H", "P", ATM, "Q", 1, "Water") - CP.PropsSI("H", "P", ATM, "Q", 0, "Water")) * M
    species = ["H2O", "H2", "O2", "OH", "H", "O", "H2O(l)"]
    a = gibbsmin.equilibrate({"H2O": 1.0}, P=ATM, T_feed=500.0, heat_input=-20000.0, species=species, method=solver)
    b = gibbsmin.equilibrate({"H2O": 1.0}, P=ATM, T_feed=500.0, heat_input=-30000.0, species=species, method=solver)
    assert abs(a.T - T_sat) <= 0.5
    assert b.T == pytest.approx(a.T, abs=1e-9)
    assert "phase_boundary" in a.extras and a.certificate.certified
    condensed_per_joule = (b.amounts["H2O(l)"] - a.amounts["H2O(l)"]) / 10000.0
    assert condensed_per_joule == pytest.approx(1 / h_vap, rel=0.01)


def test_every_result_closes_its_energy_balance(solver):
    cases = [
        dict(feed={"CH4": 1.0, "H2O": 3.0}, P=25 * BAR, T_feed=773.15, heat_input=150e3),
        dict(feed={"CH4": 1.0, "H2O": 0.8, "O2": 0.6}, P=30 * BAR, T_feed=700.0, adiabatic=True),
        dict(feed={"CO": 1.0, "H2": 2.2, "CO2": 0.1}, P=50 * BAR, T_feed=500.0, adiabatic=True),
    ]
    for case in cases:
        eq = gibbsmin.equilibrate(**case, method=solver)
        assert eq.certificate.certified
        assert eq.extras["energy_balance_residual"] <= 1e-9
        balance = eq.extras["enthalpy_J"] - eq.extras["feed_enthalpy_J"] - eq.extras["duty_W"]
        assert abs(balance) <= 1e-9 * abs(eq.extras["feed_enthalpy_J"])


def test_result_describes_itself_in_json(solver):
    eq = gibbsmin.equilibrate({"CH4": 1.0, "O2": 2.0, "N2": 7.52}, P=ATM, T_feed=298.15, adiabatic=True,
                              exclude=CONDENSED, sensitivities=True, method=solver)
    text = json.dumps(eq.to_dict(), allow_nan=False)
    data = json.loads(text)
    assert data["specification"] == "H and P"
    assert data["duty_W"] == 0.0
    assert data["sensitivities"]["heat_capacity_equilibrium_J_per_K"] > data["sensitivities"][
        "heat_capacity_frozen_J_per_K"]
    assert "fixed H and P" in eq.table()


# --- errors ------------------------------------------------------------------------------------------

def test_no_temperature_in_the_data_range_balances(solver):
    with pytest.raises(gibbsmin.InputError, match="no outlet temperature between 200 K and 6000 K"):
        gibbsmin.equilibrate({"N2": 1.0}, P=ATM, T_feed=300.0, heat_input=1e7, species=["N2"], method=solver)
    with pytest.raises(gibbsmin.InputError, match="between 400 K and 900 K"):
        gibbsmin.equilibrate({"N2": 1.0}, P=ATM, T_feed=300.0, adiabatic=True, species=["N2"],
                             T_bounds=(400.0, 900.0), method=solver)


def test_a_condensed_species_cut_off_by_its_data_is_named(solver):
    # Without ice in the set, water cannot condense below 273.15 K (the end of the liquid's data).
    with pytest.raises(gibbsmin.InputError, match="H2O\\(l\\) has data only from 273.15 K"):
        gibbsmin.equilibrate({"N2": 1.0, "H2O": 0.1}, P=ATM, T_feed=300.0, heat_input=-8000.0,
                             species=["N2", "H2O", "H2O(l)"], method=solver)


@pytest.mark.parametrize("kwargs, message", [
    (dict(T=1000.0, adiabatic=True, T_feed=300.0), "leave T out"),
    (dict(T=1000.0, heat_input=5.0, T_feed=300.0), "leave T out"),
    (dict(adiabatic=True), "T_feed"),
    (dict(), "give the outlet temperature T"),
    (dict(adiabatic=True, T_feed=300.0, heat_input="lots"), "heat_input must be a finite number"),
    (dict(adiabatic=True, T_feed=300.0, T_bounds=(900.0, 400.0)), "lowest < highest"),
    (dict(T=900.0, T_bounds=(400.0, 1000.0)), "leave T_bounds out"),
])
def test_inconsistent_specifications_are_refused(kwargs, message):
    with pytest.raises(gibbsmin.InputError, match=message):
        gibbsmin.equilibrate({"CH4": 1.0, "H2O": 3.0}, P=10 * BAR, **kwargs)


def test_pressure_is_required():
    with pytest.raises(gibbsmin.InputError, match="P is required"):
        gibbsmin.equilibrate({"CH4": 1.0, "H2O": 3.0}, T_feed=800.0, adiabatic=True)


def test_feed_temperature_outside_a_feed_species_data_is_refused():
    with pytest.raises(gibbsmin.TemperatureRangeError, match="H2O\\(l\\)"):
        gibbsmin.equilibrate({"CH4": 1.0, "H2O(l)": 3.0}, P=10 * BAR, T_feed=700.0, adiabatic=True)


def test_fixed_temperature_answers_are_unchanged_by_the_energy_keywords(solver):
    plain = gibbsmin.equilibrate({"CH4": 1.0, "H2O": 3.0}, 1100.0, 30 * BAR, method=solver)
    with_duty = gibbsmin.equilibrate({"CH4": 1.0, "H2O": 3.0}, 1100.0, 30 * BAR, T_feed=800.0, method=solver)
    assert plain.amounts == with_duty.amounts
    assert "duty_W" not in plain.extras and "enthalpy_J" in plain.extras
    assert np.isfinite(with_duty.extras["duty_W"])
