"""The fast path of the adiabatic equilibrium (the T-unknown Newton, gibbsmin/energy/enthalpy_newton.py).

Reference answers: Cantera 3.2 (Goodwin, Moffat, Schoegl, Speth and Weber,
2025), ``ThermoPhase.equilibrate("HP", rtol=1e-12)`` on the same NASA
7-coefficient polynomials (McBride, Gordon and Reno, NASA TM-4513, 1993, as
gibbsmin's default data set holds them) handed to it from gibbsmin's own
species files (tests/cantera_reference.py), so the differences are the
algorithms'.  The feeds are invented plants; their
conditions are what the trade runs (common practice, no source).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

import gibbsmin
from cantera_reference import cantera_gas, cantera_species
from gibbsmin.energy.enthalpy_newton import ENTHALPY_NEWTON, PATH_KEY, SEARCH, equilibrium_heat_capacity
from gibbsmin.fixed_step import prepare, solve_fixed
from test_energy_cantera import cantera_enthalpy, cantera_tp_vcs

BAR = 1.0e5
ATM = 101325.0

#: Outlet temperature within this of Cantera's, [K]; mole fractions within this relative, above 1e-12.
T_TOLERANCE = 1e-6
Y_TOLERANCE = 1e-9
Y_FLOOR = 1e-12

# name, feed [mol], T_feed [K], P [Pa], species set
CASES = [
    # An invented prereformer: natural gas with a little ethane and recycle H2, S/C 3, 500 degC, 25 bar.
    ("prereformer", {"CH4": 1.0, "H2O": 3.0, "H2": 0.05, "C2H6": 0.04}, 773.15, 25 * BAR,
     ["H2", "H2O", "CO", "CO2", "CH4", "N2", "C2H6", "NH3", "O2"]),
    # An invented naphtha prereformer (butane and propane as the heavy end), 480 degC, 30 bar.
    ("naphtha prereformer", {"CH4": 0.2, "C2H6": 0.1, "C3H8": 0.1, "nC4H10": 0.05, "H2O": 2.5, "H2": 0.1},
     753.15, 30 * BAR, ["CH4", "C2H6", "C3H8", "nC4H10", "H2O", "H2", "CO", "CO2"]),
    # An invented ammonia plant's methanator: 0.4 % CO and 0.1 % CO2 left after CO2 removal, 300 degC, 28 bar
    # (NH3 left out: the catalyst does not make it).
    ("methanator", {"H2": 0.74, "N2": 0.245, "CO": 0.004, "CO2": 0.001, "CH4": 0.008, "Ar": 0.003, "H2O": 0.002},
     573.15, 28 * BAR, ["H2", "N2", "CO", "CO2", "CH4", "Ar", "H2O"]),
    # An invented high-temperature shift bed, 350 degC, 30 bar; shift only (no methane in the set).
    ("HT shift", {"H2": 0.38, "CO": 0.12, "CO2": 0.05, "N2": 0.005, "H2O": 0.45}, 623.15, 30 * BAR,
     ["H2", "CO", "CO2", "N2", "H2O"]),
    # A stoichiometric methane/air flame (air as 21 % O2, 79 % N2) at 1 atm with its radicals and NOx.
    ("methane/air flame", {"CH4": 1.0, "O2": 2.0, "N2": 7.52}, 298.15, ATM,
     ["CH4", "O2", "N2", "CO2", "H2O", "CO", "H2", "OH", "H", "O", "NO", "HO2", "N", "NO2", "N2O"]),
]


def cantera_hp(species, feed, T_feed, P):
    """Cantera 3.2's HP equilibrium of the feed at T_feed and P on the same NASA data."""
    gas = cantera_gas(species)
    gas.TPX = T_feed, P, feed
    gas.equilibrate("HP", rtol=1e-12, max_steps=10000)
    return gas


@pytest.mark.parametrize("name, feed, T_feed, P, species", CASES, ids=[c[0] for c in CASES])
def test_fast_path_matches_cantera_hp(name, feed, T_feed, P, species):
    eq = gibbsmin.equilibrate(feed, P=P, T_feed=T_feed, adiabatic=True, species=species)
    assert eq.energy.balance_path == eq.extras[PATH_KEY] == ENTHALPY_NEWTON
    assert eq.energy.T_evaluations == 2
    assert eq.specification == "H and P"
    assert eq.certificate.certified, eq.certificate.summary()
    assert eq.extras["energy_balance_residual"] <= 1e-11
    # Source: Cantera 3.2 equilibrate("HP") on the same NASA 7-coefficient data.
    gas = cantera_hp(species, feed, T_feed, P)
    assert abs(eq.T - gas.T) <= T_TOLERANCE
    for s, x in zip(gas.species_names, gas.X):
        if x > Y_FLOOR:
            assert eq.mole_fractions[s] == pytest.approx(x, rel=Y_TOLERANCE), s


def test_fast_path_answers_the_same_through_a_prepared_specification():
    name, feed, T_feed, P, species = CASES[0]
    plain = gibbsmin.equilibrate(feed, P=P, T_feed=T_feed, adiabatic=True, species=species)
    prepared = gibbsmin.prepare(species=species).equilibrate(feed, P=P, T_feed=T_feed, adiabatic=True)
    assert prepared.T == plain.T
    assert prepared.amounts == plain.amounts
    assert prepared.extras[PATH_KEY] == ENTHALPY_NEWTON


def test_fast_path_with_heat_added_matches_cantera_hp():
    # The invented prereformer with 20 kJ per mol of methane added through its wall.
    name, feed, T_feed, P, species = CASES[0]
    heat = 20e3
    eq = gibbsmin.equilibrate(feed, P=P, T_feed=T_feed, heat_input=heat, species=species)
    assert eq.extras[PATH_KEY] == ENTHALPY_NEWTON
    gas = cantera_gas(species)
    gas.TPX = T_feed, P, feed
    mass = gas.mean_molecular_weight * sum(feed.values()) / 1000.0   # kg
    gas.HP = gas.enthalpy_mass + heat / mass, P
    gas.equilibrate("HP", rtol=1e-12, max_steps=10000)
    # Source: Cantera 3.2 equilibrate("HP") on the same NASA 7-coefficient data.
    assert abs(eq.T - gas.T) <= T_TOLERANCE
    for s, x in zip(gas.species_names, gas.X):
        if x > Y_FLOOR:
            assert eq.mole_fractions[s] == pytest.approx(x, rel=Y_TOLERANCE), s


def _g_RT(name: str, T: float) -> float:
    """g0/RT of a species by Cantera's evaluation of its NASA polynomials (J/kmol inside Cantera)."""
    thermo = cantera_species(name).thermo
    return (thermo.h(T) - T * thermo.s(T)) / (8314.46261815324 * T)


def test_graphite_vanishing_on_the_way_falls_back_to_the_search():
    # Invented partial oxidation of methane with 0.6 O2 per CH4, both at 25 degC, 1 atm: graphite is stable
    # at the feed temperature, where the fast path starts, and gone at the adiabatic outlet.
    feed = {"CH4": 1.0, "O2": 0.6}
    gas_species = ["CH4", "O2", "CO", "CO2", "H2", "H2O"]
    eq = gibbsmin.equilibrate(feed, P=ATM, T_feed=298.15, adiabatic=True, species=[*gas_species, "C(s)"])
    assert eq.energy.balance_path == SEARCH
    assert eq.certificate.certified, eq.certificate.summary()
    assert eq.amounts["C(s)"] == 0.0
    # Source: Cantera 3.2 equilibrate("HP") on the same NASA data, gas only; and carbon's potential in that
    # gas (Boudouard, 2 CO = C + CO2: mu_C = 2 mu_CO - mu_CO2) below graphite's g0 (graphite would not form).
    gas = cantera_hp(gas_species, feed, 298.15, ATM)
    assert abs(eq.T - gas.T) <= T_TOLERANCE
    for s, x in zip(gas.species_names, gas.X):
        if x > Y_FLOOR:
            assert eq.mole_fractions[s] == pytest.approx(x, rel=Y_TOLERANCE), s
    mu = gas.chemical_potentials / (8314.46261815324 * gas.T)
    mu_C = 2.0 * mu[gas.species_index("CO")] - mu[gas.species_index("CO2")]
    assert mu_C < _g_RT("C(s)", gas.T) - 1e-3


def test_liquid_water_appearing_falls_back_to_the_search():
    # An invented methanator outlet gas with 20 % steam cooled from 300 degC by 20 kJ: water condenses.
    feed = {"H2": 0.74, "N2": 0.245, "CO": 0.004, "CO2": 0.001, "CH4": 0.008, "H2O": 0.2}
    P = 28 * BAR
    eq = gibbsmin.equilibrate(feed, P=P, T_feed=573.15, heat_input=-20e3,
                              species=["H2", "N2", "CO", "CO2", "CH4", "H2O", "H2O(l)"])
    assert eq.extras[PATH_KEY] == SEARCH
    assert eq.certificate.certified, eq.certificate.summary()
    assert eq.amounts["H2O(l)"] > 0.0
    assert eq.extras["energy_balance_residual"] <= 1e-9
    # With liquid water present the steam in the gas is at its vapour pressure: y P / P0 = exp(g_l - g_g)/RT,
    # both potentials from Cantera 3.2's evaluation of the same NASA polynomials.
    vapour = math.exp(_g_RT("H2O(l)", eq.T) - _g_RT("H2O", eq.T))
    assert eq.mole_fractions["H2O"] * P / 1e5 == pytest.approx(vapour, rel=1e-9)


def test_cubic_gas_and_held_approach_do_not_take_the_fast_path():
    # The fast path holds only the ideal gas with plain standard potentials (common practice, no source:
    # the scope this path is built for).
    name, feed, T_feed, P, species = CASES[0]
    cubic = gibbsmin.equilibrate(feed, P=P, T_feed=T_feed, adiabatic=True, species=species, gas="peng-robinson")
    assert cubic.extras[PATH_KEY] == SEARCH
    held = gibbsmin.equilibrate_with_approach(feed, None, P, {"water-gas shift": 10.0}, T_feed=T_feed,
                                              adiabatic=True, species=species)
    assert held.extras[PATH_KEY] == SEARCH


def test_method_convex_keeps_the_search():
    name, feed, T_feed, P, species = CASES[3]
    eq = gibbsmin.equilibrate(feed, P=P, T_feed=T_feed, adiabatic=True, species=species, method="convex")
    assert eq.extras[PATH_KEY] == SEARCH
    assert np.isfinite(eq.T)


@pytest.mark.parametrize("species, feed, T, P", [
    # An invented reformer gas at S/C 3 and one at S/C 0.3 with graphite present, 25 bar (away from the NASA
    # polynomials' 1000 K joint, where cp has a kink).
    (["H2", "H2O", "CO", "CO2", "CH4", "N2"], {"CH4": 1.0, "H2O": 3.0, "N2": 0.01}, 950.0, 25 * BAR),
    (["H2", "H2O", "CO", "CO2", "CH4", "C(s)"], {"CH4": 1.0, "H2O": 0.3}, 900.0, 25 * BAR),
], ids=["gas only", "with graphite"])
def test_lean_equilibrium_heat_capacity_matches_cantera_differences(species, feed, T, P):
    setup = prepare(feed, species=species, T_span=(T - 1.0, T + 1.0))
    eq, problem, result = solve_fixed(setup, T, P)
    assert ("C(s)" in species) == (eq.amounts.get("C(s)", 0.0) > 0.0)
    cp = equilibrium_heat_capacity(setup, problem, result, T, P)
    gases = [s for s in species if "(" not in s]
    condensed = [s for s in species if "(" in s]

    def H(T_i):
        # Cantera 3.2's equilibrium at T_i on the same NASA data (VCS where graphite may form), its enthalpy
        # by Cantera's evaluation of each species' polynomials.
        mix = cantera_tp_vcs(gases, condensed, feed, T_i, P)
        amounts = {s: n * 1000.0 for s, n in zip(mix.species_names, mix.species_moles)}
        return cantera_enthalpy(amounts, T_i)
    dT = 0.05
    # Source: central difference of Cantera 3.2's equilibrium enthalpy (error of order dT^2 H''' / 6).
    assert cp == pytest.approx((H(T + dT) - H(T - dT)) / (2 * dT), rel=1e-6)


_SETS = [["H2", "H2O", "CO", "CO2", "CH4", "N2", "C(s)", "H2O(l)"],
         ["CH4", "O2", "N2", "CO2", "H2O", "CO", "H2", "OH", "H", "O", "NO", "C(s)", "H2O(l)"],
         ["H2", "N2", "NH3", "Ar", "CH4"],
         ["CO", "CO2", "H2", "H2O", "CH4", "CH3OH", "C(s)"]]


def _random_case(seed: int):
    """An invented feed, feed temperature, pressure and heat input drawn from a fixed seed."""
    rng = np.random.default_rng(seed)
    species = _SETS[seed % len(_SETS)]
    gases = [s for s in species if "(" not in s]
    chosen = rng.choice(gases, int(rng.integers(2, min(5, len(gases)) + 1)), replace=False)
    feed = {str(s): float(rng.uniform(0.01, 2.0)) for s in chosen}
    heat = float(rng.choice([0.0, rng.uniform(-5e4, 5e4)]))
    return species, feed, float(rng.uniform(300.0, 1200.0)), float(10 ** rng.uniform(4.5, 7.0)), heat


@pytest.mark.parametrize("seed", range(40))
def test_fast_path_agrees_with_the_search_wherever_it_answers(seed):
    # Consistency of the two paths on random invented feeds (no outside source: the search is the trusted
    # path every other energy test checks against Cantera).  Where the fast path declines, both are the search.
    species, feed, T_feed, P, heat = _random_case(seed)
    db = gibbsmin.default_database()
    inlet = gibbsmin.energy.read_inlet(feed, T_feed, db)
    T_bounds = gibbsmin.energy.outlet_bounds(db, inlet, species)
    setup = prepare(inlet.total, species=species, T_span=T_bounds)
    H_in = inlet.enthalpy(P, db)
    gross = inlet.gross_enthalpy(P, db) + abs(heat)

    def balance(plain):
        return gibbsmin.energy.solve_energy_balance(setup, H_in + heat, P, T_bounds=T_bounds, gross_inlet=gross,
                                                    coldest_feed=T_feed, plain_ideal_gas=plain)[0]
    try:
        search = balance(False)
    except gibbsmin.InputError:
        with pytest.raises(gibbsmin.InputError):
            balance(True)
        return
    fast = balance(True)
    assert fast.certificate.certified and search.certificate.certified
    if fast.extras[PATH_KEY] == SEARCH:
        assert fast.T == search.T
        return
    assert abs(fast.T - search.T) <= 1e-6
    total = sum(fast.amounts.values())
    for s in species:
        assert abs(fast.amounts[s] - search.amounts[s]) <= 1e-9 * total, s
