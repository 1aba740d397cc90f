"""Approach to equilibrium of a measured gas at loop pressure, with fugacities from a cubic.

Checks are internal consistency (common practice, no source): a gas that is
at equilibrium under a model must show a zero approach when its composition is
handed back as a measured stream with the same model.  The gas model itself is
checked against thermo and Cantera in test_eos_*.py.
"""

from __future__ import annotations

import math

import pytest

import gibbsmin
from gibbsmin.eos import gas_model_for_species
from gibbsmin.reactions import approach_temperatures, gas_state, quotients

FEED = {"H2": 64.5, "N2": 21.5, "NH3": 3.0, "CH4": 7.0, "Ar": 4.0}
T, P = 723.15, 200e5


@pytest.fixture(scope="module")
def outlet():
    return gibbsmin.equilibrate(FEED, T, P, inert=["CH4", "Ar"], gas="peng-robinson")


def _measured(eq):
    return {s: eq.mole_fractions[s] for s in FEED}


def test_an_equilibrium_gas_read_back_with_its_model_is_at_equilibrium(outlet):
    found = approach_temperatures(_measured(outlet), T, P, reactions=["ammonia synthesis"], gas="peng-robinson")
    assert found["ammonia synthesis"].approach_K == pytest.approx(0.0, abs=1e-3)


def test_the_ideal_gas_reads_the_same_gas_as_beyond_equilibrium(outlet):
    # At 200 bar the ideal-gas quotient misses phi_NH3 / (phi_N2^0.5 phi_H2^1.5), about 0.78 here:
    # the gas looks almost 10 K past equilibrium, a false alarm a loop engineer would chase.
    found = approach_temperatures(_measured(outlet), T, P, reactions=["ammonia synthesis"])
    assert -12.0 < found["ammonia synthesis"].approach_K < -7.0


def test_fugacity_coefficients_are_those_of_the_equilibrium(outlet):
    state = gas_state(_measured(outlet), T, P, gas="peng-robinson")
    for s in FEED:
        assert math.exp(state.ln_phi[s]) == pytest.approx(outlet.extras["fugacity_coefficients"][s], rel=1e-7)


def test_species_without_critical_constants_are_ideal_and_left_out():
    gas = {"H2": 0.7, "N2": 0.2, "NH3": 0.1, "NH2": 1e-3}
    state = gas_state(gas, T, P, gas="peng-robinson")
    assert state.ln_phi["NH2"] == 0.0
    described = ["H2", "N2", "NH3"]
    expected = gas_model_for_species("peng-robinson", described).ln_phi(T, P, [0.7, 0.2, 0.1])
    assert [state.ln_phi[s] for s in described] == pytest.approx(list(expected), abs=1e-14)


def test_kij_choice_reaches_the_quotient(outlet):
    shipped = quotients(_measured(outlet), T, P, reactions=["ammonia synthesis"], gas="pr")
    plain = quotients(_measured(outlet), T, P, reactions=["ammonia synthesis"], gas="pr", kij="none")
    assert shipped["ammonia synthesis"] != pytest.approx(plain["ammonia synthesis"], rel=1e-6)


def test_conflicting_requests_are_refused(outlet):
    with pytest.raises(gibbsmin.InputError, match="either ln_phi .* or gas"):
        gas_state(_measured(outlet), T, P, gas="peng-robinson", ln_phi={"NH3": 0.0})
    with pytest.raises(gibbsmin.InputError, match="settled with the peng-robinson gas model"):
        approach_temperatures(outlet, reactions=["ammonia synthesis"], gas="srk")
    with pytest.raises(gibbsmin.InputError, match="unknown gas model"):
        approach_temperatures(_measured(outlet), T, P, gas="virial")


def test_held_back_reaction_with_a_cubic_reads_back_at_its_approach(outlet, solver):
    # Internal consistency: the restricted equilibrium with the cubic iterated to convergence shows,
    # with its own fugacity coefficients, exactly the approach it was asked for.
    from gibbsmin import equilibrate_with_approach

    at_zero = equilibrate_with_approach(FEED, T, P, {"ammonia synthesis": 0.0}, frozen=["CH4", "Ar"],
                                        gas="peng-robinson", method=solver)
    assert at_zero.mole_fractions["NH3"] == pytest.approx(outlet.mole_fractions["NH3"], rel=1e-8)
    short = equilibrate_with_approach(FEED, T, P, {"ammonia synthesis": 10.0}, frozen=["CH4", "Ar"],
                                      gas="peng-robinson", method=solver)
    assert short.gas_model == "peng-robinson" and short.certificate.certified
    found = approach_temperatures(short, reactions=["ammonia synthesis"])["ammonia synthesis"]
    assert found.approach_K == pytest.approx(10.0, abs=1e-6)
    assert short.mole_fractions["NH3"] < outlet.mole_fractions["NH3"] - 0.01  # 10 K short: over 1 mol% less
    with pytest.raises(gibbsmin.InputError, match="either ln_phi"):
        equilibrate_with_approach(FEED, T, P, {"ammonia synthesis": 10.0}, frozen=["CH4", "Ar"],
                                  gas="peng-robinson", ln_phi={"NH3": 0.0}, method=solver)


def test_case_stage_with_approach_and_a_cubic(tmp_path):
    from gibbsmin.case import read_case, settle_case

    path = tmp_path / "loop.toml"
    path.write_text(
        '[feed]\nunit = "kmol/h"\nH2 = 64.5\nN2 = 21.5\nNH3 = 3.0\nCH4 = 7.0\nAr = 4.0\n'
        '[species]\nfrozen = ["CH4", "Ar"]\n'
        '[conditions]\nT = "450 degC"\nP = "200 bar"\ngas = "peng-robinson"\n'
        '[conditions.approach]\n"ammonia synthesis" = "10 K"\n')
    eq = settle_case(read_case(path)).stages[0].equilibrium
    found = approach_temperatures(eq, reactions=["ammonia synthesis"])["ammonia synthesis"]
    assert eq.gas_model == "peng-robinson" and found.approach_K == pytest.approx(10.0, abs=1e-6)
