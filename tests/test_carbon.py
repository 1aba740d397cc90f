"""gibbsmin.carbon: carbon activity against graphite, the verdict, and the carbon limit of a feed.

Outside sources:
- Cantera 3.2 (Goodwin et al. 2025): its evaluation of the same NASA-7 data
  for the equilibrium constants of the hand-computed activities, and its
  multiphase VCS solver (tests/test_equilibrium_vs_cantera.py::_vcs) for the
  graphite boundary;
- the stoichiometric argument for the high-temperature limit is written
  beside its test.
Published thermodynamic carbon-limit data: a search found studies that plot
the critical O/C ratio against temperature (Jaworski and Pianko-Oprych, 2017
and 2018), but no numbers that could be read and cited, so none are compared.
Feeds and conditions are invented.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

import gibbsmin
from gibbsmin.carbon import carbon_activity, carbon_limit, carbon_limit_curve, carbon_limit_table
from gibbsmin.errors import InputError
from kkt import _g0_RT
from reference_cases import Case
from test_equilibrium_vs_cantera import _vcs

NATURAL_GAS = {"CH4": 0.93, "C2H6": 0.04, "CO2": 0.02, "N2": 0.01}  # invented dry feed, mol fractions
GAS_SET = ["CH4", "C2H6", "H2O", "CO", "CO2", "H2", "N2"]


def _cantera_ln_K(stoichiometry, T):
    return -sum(nu * _g0_RT(s, T) for s, nu in stoichiometry.items())


def test_activities_by_hand_from_partial_pressures():
    # a_C = K p_CH4 / p_H2^2 (cracking), K p_CO^2 / p_CO2 (Boudouard), K p_CO p_H2 / p_H2O (CO reduction),
    # p in bar, K from Cantera's evaluation of the data.
    T, P = 923.15, 25e5
    y = {"CH4": 0.04, "H2": 0.70, "CO": 0.10, "CO2": 0.06, "H2O": 0.10}
    p = {s: v * P / 1e5 for s, v in y.items()}
    expected = {
        "methane cracking": math.exp(_cantera_ln_K({"CH4": -1, "C(s)": 1, "H2": 2}, T)) * p["CH4"] / p["H2"] ** 2,
        "Boudouard": math.exp(_cantera_ln_K({"CO": -2, "C(s)": 1, "CO2": 1}, T)) * p["CO"] ** 2 / p["CO2"],
        "CO reduction": math.exp(_cantera_ln_K({"CO": -1, "H2": -1, "C(s)": 1, "H2O": 1}, T)) * p["CO"] * p["H2"] / p["H2O"],
    }
    found = carbon_activity(y, T, P)
    for name, a in expected.items():
        assert found.by_reaction[name] == pytest.approx(a, rel=1e-10), name
    assert found.possible and found.margin < 0
    assert found.limiting_reaction == "CO reduction"
    assert found.verdict.startswith("carbon possible")


def test_equilibrium_gas_gives_one_activity_by_every_route(solver):
    eq = gibbsmin.equilibrate({"CH4": 1.0, "H2O": 1.5}, 900.0, 25e5, exclude=["C(s)"], method=solver)
    found = carbon_activity(eq)
    values = list(found.by_reaction.values()) + [found.from_element_potential]
    assert max(values) == pytest.approx(min(values), rel=1e-9)
    assert not found.possible and found.margin > 0
    assert found.verdict.startswith("no carbon")


def test_gas_over_graphite_is_saturated(solver):
    eq = gibbsmin.equilibrate({"CH4": 1.0, "H2O": 0.5}, 900.0, 25e5, method=solver)
    assert eq.amounts["C(s)"] > 0
    found = carbon_activity(eq)
    for a in [*found.by_reaction.values(), found.from_element_potential]:
        assert a == pytest.approx(1.0, abs=1e-9)
    assert found.verdict.startswith("at graphite saturation")


def test_gas_without_carbon_species_has_no_carbon():
    found = carbon_activity({"H2": 3.0, "N2": 1.0}, 700.0, 1e5)
    assert found.activity == 0.0 and not found.possible


# --- the carbon limit ----------------------------------------------------------------------------------


def _feed_at(steam_to_carbon, feed=NATURAL_GAS):
    carbon = sum(n * gibbsmin.default_database()[s].elements.get("C", 0.0) for s, n in feed.items() if s != "CO2")
    return {**feed, "H2O": steam_to_carbon * carbon}


@pytest.mark.parametrize("T, P", [(873.15, 25e5), (1123.15, 1e5)])
def test_limit_coincides_with_graphite_appearing_in_the_full_minimisation(T, P, solver):
    limit = carbon_limit(NATURAL_GAS, T, P, xtol=1e-10, method=solver)
    assert limit.status == "found"
    # Half a step off the limit itself, where graphite is zero only to the root's xtol (the convex
    # solver gave 2.5e-14 mol there with the ATcT-anchored data, Newton exactly zero).
    grid = limit.steam_to_carbon + np.arange(-0.00975, 0.0100001, 0.0005)
    present = [gibbsmin.equilibrate(_feed_at(sc), T, P, method=solver).amounts["C(s)"] > 0 for sc in grid]
    below = grid < limit.steam_to_carbon
    assert present == list(below), f"graphite on the grid: {present}"
    # Just below the limit graphite is present in a trace that vanishes at the limit.
    trace = gibbsmin.equilibrate(_feed_at(limit.steam_to_carbon - 1e-5), T, P, method=solver).amounts["C(s)"]
    assert 0 < trace < 1e-4


def _vcs_graphite(steam_to_carbon, T, P):
    case = Case("carbon limit", _feed_at(steam_to_carbon), T, P)
    result = _vcs(GAS_SET, case)
    if result is None:
        pytest.skip("Cantera's VCS solver fails at this point")
    return result[0][-1]


def test_limit_curve_matches_cantera_vcs_boundary(solver):
    temperatures = [773.15, 973.15, 1173.15]
    curve = carbon_limit_curve(NATURAL_GAS, temperatures, 25e5, species=GAS_SET + ["C(s)"], xtol=1e-10, method=solver)
    worst = 0.0
    for limit in curve:
        low, high = limit.steam_to_carbon - 0.01, limit.steam_to_carbon + 0.01
        assert _vcs_graphite(low, limit.T, limit.P) > 1e-9
        assert _vcs_graphite(high, limit.T, limit.P) < 1e-9
        while high - low > 1e-7:
            middle = 0.5 * (low + high)
            low, high = (middle, high) if _vcs_graphite(middle, limit.T, limit.P) > 1e-9 else (low, middle)
        worst = max(worst, abs(0.5 * (low + high) - limit.steam_to_carbon))
    print(f"carbon limit against Cantera VCS: worst |dS/C| {worst:.1e}")
    assert worst < 1e-5


def test_high_temperature_limit_approaches_one_oxygen_per_carbon(solver):
    # Stoichiometry: far above 1000 K the gas is CO + H2 with only traces of CH4, CO2 and H2O, so every
    # carbon atom needs an oxygen atom; below O/C = 1 the rest is graphite.  For methane with steam
    # O/C = S/C, so the limit lies just below 1 (the traces carry a little carbon or oxygen).
    limit = carbon_limit({"CH4": 1.0}, 1500.0, 1e5, method=solver)
    assert 0.98 < limit.steam_to_carbon < 1.0


def test_carbon_basis_changes_the_ratio_not_the_boundary(solver):
    # The same steam amount at the boundary, counted against two carbon totals (hand arithmetic):
    # hydrocarbon carbon 0.93 + 2 * 0.04 = 1.01, all carbon 1.03.
    by_hydrocarbon = carbon_limit(NATURAL_GAS, 1000.0, 10e5, method=solver)
    by_all = carbon_limit(NATURAL_GAS, 1000.0, 10e5, carbon_basis="all", method=solver)
    assert by_all.steam_to_carbon * 1.03 == pytest.approx(by_hydrocarbon.steam_to_carbon * 1.01, rel=1e-7)


def test_feed_carbon_free_without_steam_and_bracket_growth(solver):
    free = carbon_limit({"CH4": 1.0, "CO2": 3.0}, 1100.0, 1e5, method=solver)
    assert math.isnan(free.steam_to_carbon) and "carbon-free" in free.status
    grown = carbon_limit({"CH4": 1.0, "CO2": 0.5}, 1100.0, 1e5, bracket=(0.05, 0.1), method=solver)
    assert grown.status == "found" and grown.steam_to_carbon > 0.1
    assert "min S/C" in carbon_limit_table([free, grown])


def test_water_in_the_feed_counts_towards_the_ratio(solver):
    dry = carbon_limit({"CH4": 1.0}, 900.0, 20e5, method=solver)
    wet = carbon_limit({"CH4": 1.0, "H2O": 0.3}, 900.0, 20e5, method=solver)
    assert wet.steam_to_carbon == pytest.approx(dry.steam_to_carbon, abs=1e-8)


@pytest.mark.parametrize("kwargs, message", [
    ({"exclude": ["C(s)"]}, "needs graphite"),
    ({"carbon_basis": "organic"}, "carbon_basis must be"),
    ({"bracket": (1.0, 0.5)}, "0 < low < high"),
    ({"bracket": "wide"}, "two S/C values"),
])
def test_bad_carbon_limit_requests_get_clear_errors(kwargs, message):
    with pytest.raises(InputError, match=message):
        carbon_limit({"CH4": 1.0}, 900.0, 20e5, **kwargs)


def test_feed_without_hydrocarbon_carbon_is_refused():
    with pytest.raises(InputError, match="no hydrocarbon carbon"):
        carbon_limit({"CO": 1.0, "H2": 2.0}, 900.0, 20e5)


def test_restricted_answer_does_not_use_element_potentials(solver):
    from gibbsmin import equilibrate_with_approach

    eq = equilibrate_with_approach({"CH4": 1.0, "H2O": 2.0}, 1000.0, 20e5, approach={"SMR": 20.0}, method=solver)
    assert carbon_activity(eq).from_element_potential is None


def test_carbon_limit_with_a_cubic_gas_is_where_its_own_equilibrium_reaches_graphite(solver):
    # Internal consistency (common practice, no source): at the limit found with Peng-Robinson the
    # gas-only Peng-Robinson equilibrium has carbon activity 1, by every carbon reaction.
    from gibbsmin.carbon import carbon_activity, carbon_limit

    feed = {"CH4": 1.0, "C2H6": 0.05, "CO2": 0.02}
    ideal = carbon_limit(feed, "600 degC", "35 bar", method=solver)
    pr = carbon_limit(feed, "600 degC", "35 bar", gas="peng-robinson", method=solver)
    carbon = 1.0 + 2 * 0.05  # hydrocarbon carbon, the trade's S/C basis
    eq = gibbsmin.equilibrate({**feed, "H2O": pr.steam_to_carbon * carbon}, 873.15, 35e5, gas="peng-robinson",
                              exclude=["C(s)"], method=solver)
    activity = carbon_activity(eq)
    assert activity.from_element_potential == pytest.approx(1.0, abs=1e-8)
    assert all(a == pytest.approx(1.0, abs=1e-8) for a in activity.by_reaction.values())
    # At 35 bar the cubic moves the limit by about 1 %: small, but it is the model the user chose.
    assert 0.002 < pr.steam_to_carbon - ideal.steam_to_carbon < 0.03
    # A measured gas read with the cubic: the same gas at the same state gives the same activity.
    gas = {s: n for s, n in eq.amounts.items() if eq.phase_of[s] == "gas" and n > 1e-12}
    measured = carbon_activity(gas, eq.T, eq.P, gas="peng-robinson")
    assert measured.by_reaction["methane cracking"] == pytest.approx(1.0, abs=1e-6)


# --- the carbon limit in temperature -------------------------------------------------------------------

def test_temperature_limit_coincides_with_graphite_appearing_and_with_the_steam_limit(solver):
    # Internal consistency (common practice, no source): on each side of the boundary the full minimisation
    # has or lacks graphite as the ranges say, and the S/C limit at the boundary temperature is the feed's S/C.
    from gibbsmin.carbon import carbon_limit_temperatures

    feed = _feed_at(0.8)
    limits = carbon_limit_temperatures(feed, 25e5, T_range=(700.0, 1300.0), xtol=1e-8, method=solver)
    assert len(limits.boundaries) == 1
    (T_b,) = limits.boundaries
    inside = limits.carbon_ranges[0]
    above_carbon = inside[0] == pytest.approx(T_b)
    for T, carbon in ((T_b - 0.05, not above_carbon), (T_b + 0.05, above_carbon)):
        assert (gibbsmin.equilibrate(feed, T, 25e5, method=solver).amounts["C(s)"] > 0) is carbon
    limit = carbon_limit(NATURAL_GAS, T_b, 25e5, xtol=1e-12, method=solver)
    assert limit.steam_to_carbon == pytest.approx(0.8, abs=1e-6)


def test_temperature_limit_matches_cantera_vcs(solver):
    # Source: Cantera 3.2 VCS (multiphase, graphite allowed) on the same species and NASA data: graphite
    # appears on the same side of our boundary, 0.5 K either way.
    from gibbsmin.carbon import carbon_limit_temperatures

    feed = _feed_at(0.8)
    (T_b,) = carbon_limit_temperatures(feed, 25e5, T_range=(700.0, 1300.0), species=GAS_SET + ["C(s)"],
                                       method=solver).boundaries

    def graphite(T):
        result = _vcs(GAS_SET, Case("carbon T limit", feed, T, 25e5))
        if result is None:
            pytest.skip("Cantera's VCS solver fails at this point")
        return result[0][-1]

    amounts_below, amounts_above = graphite(T_b - 0.5), graphite(T_b + 0.5)
    assert (amounts_below > 1e-9) != (amounts_above > 1e-9)


def test_a_feed_without_carbon_or_a_bad_range_is_refused():
    from gibbsmin.carbon import carbon_limit_temperatures

    with pytest.raises(InputError, match="no carbon"):
        carbon_limit_temperatures({"H2": 3.0, "N2": 1.0}, 25e5)
    with pytest.raises(InputError, match="lowest < highest"):
        carbon_limit_temperatures(NATURAL_GAS, 25e5, T_range=(900.0, 800.0))
    with pytest.raises(InputError, match="points"):
        carbon_limit_temperatures(NATURAL_GAS, 25e5, points=2)
