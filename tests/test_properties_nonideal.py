"""Property-based tests with a cubic gas: random loop feeds and conditions (common practice, no source).

For every drawn case at 10 to 300 bar the Peng-Robinson and SRK answers must
be certified with phi at their own composition, with the non-ideal optimality
condition checked here from the answer alone: mu_j/RT = g0_j/RT + ln(P/P0) +
ln y_j + ln phi_j(y), with ln phi from the model evaluated afresh at the
answer's composition and element potentials fitted by least squares.
"""

from __future__ import annotations

import math
import warnings

import numpy as np
from hypothesis import HealthCheck, assume, example, given, settings
from hypothesis import strategies as st

import gibbsmin
from gibbsmin.eos import gas_model_for_species

DB = gibbsmin.default_database()
P_REF = 1.0e5  # Pa
LOOP_SPECIES = ("H2", "N2", "NH3", "CH4", "Ar", "CO", "CO2", "H2O", "CH3OH")
FEED_SPECIES = ("H2", "N2", "NH3", "CH4", "CO", "CO2", "H2O")
STATIONARITY = 1e-7

amounts = st.one_of(st.just(0.0), st.floats(min_value=0.01, max_value=5.0))
feeds = st.fixed_dictionaries({name: amounts for name in FEED_SPECIES}).map(
    lambda feed: {name: n for name, n in feed.items() if n > 0.0}
).filter(lambda feed: "H2" in feed or "CH4" in feed or "NH3" in feed)


def _stationarity(eq: gibbsmin.Equilibrium, gas: str, db=DB) -> float:
    gas_names = [s for s in eq.amounts if eq.phase_of[s] == "gas" and math.isfinite(eq.ln_gas_amounts[s])]
    # Present condensed species too (pure phases: mu = g0), for the energy-balance tests' condensates.
    names = gas_names + [s for s, n in eq.amounts.items() if eq.phase_of[s] != "gas" and n > 0.0]
    described = [s for s in gas_names if db[s].critical is not None]
    y = np.array([eq.mole_fractions[s] for s in described])
    ln_phi = dict(zip(described, gas_model_for_species(gas, described).ln_phi(eq.T, eq.P, y / y.sum())))
    elements = sorted({el for s in names for el in db[s].elements})
    A = np.array([[db[s].elements.get(el, 0.0) for el in elements] for s in names])
    g0 = db.nasa7(names).g_RT(np.array([eq.T]))[0]
    mu = np.array([g0[i] + (math.log(eq.P / P_REF) + math.log(eq.mole_fractions[s]) + ln_phi.get(s, 0.0)
                            if s in gas_names else 0.0) for i, s in enumerate(names)])
    # Every gas species present, traces included: the solver keeps ln n exact however small n is.
    lam = np.linalg.lstsq(A, mu, rcond=None)[0]
    return float(np.max(np.abs(A @ lam - mu)))


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(feed=feeds, T=st.floats(min_value=500.0, max_value=1000.0), P=st.floats(min_value=10e5, max_value=300e5),
       gas=st.sampled_from(["peng-robinson", "srk"]))
def test_cubic_answers_are_certified_with_phi_at_their_own_composition(feed, T, P, gas):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", RuntimeWarning)  # a drawn cold, wet gas may be told it would condense
        eq = gibbsmin.equilibrate(feed, T, P, species=[*LOOP_SPECIES], gas=gas)
    # A drawn gas that the tangent-plane test finds unstable is rightly not certified (it is not the
    # equilibrium); its one-gas minimum must still meet every residual limit.
    cert = eq.certificate
    assert cert.certified or cert.phase_stability == "unstable", cert.summary()
    assert cert.element_balance <= 1e-9 and cert.stationarity <= 1e-7, cert.summary()
    assert eq.extras["ln_phi_change"] <= 1e-10
    assert _stationarity(eq, gas) < STATIONARITY


@settings(max_examples=15, deadline=None, suppress_health_check=[HealthCheck.too_slow])
# Feeds above water's critical temperature: colder, a water-rich feed at loop pressure is a liquid, which the
# one-gas model refuses with a ConvergenceError that says so (NH3 + 2 H2O at 550 K and 135 bar, found here).
@given(feed=feeds, T_feed=st.floats(min_value=650.0, max_value=850.0), P=st.floats(min_value=20e5, max_value=250e5))
# Found here: the outlet sits on the kink of CO's Soave alpha at 1381.82 K (see the regression test below).
@example(feed={"H2": 3.75, "CO": 4.3125, "H2O": 0.5078125}, T_feed=767.0, P=19401849.0)
# Found here: outlets on hydrogen's kink (576.18 K) 0.36 K and 0.32 K from the nearer side of jumps of 423 J and
# 610 J; with the heat capacity of the ideal-gas sensitivities (261 J/K where H_eq's own slope is 362 J/K) the
# miss came out as 0.50000 K.
@example(feed={"N2": 0.015625, "NH3": 2.0}, T_feed=767.0, P=20669376.0)
@example(feed={"NH3": 2.0625, "CO": 0.01, "H2O": 1.3125}, T_feed=730.0, P=15690592.0)
def test_adiabatic_cubic_answers_close_their_energy_balance(feed, T_feed, P):
    # The outlet's enthalpy, residual enthalpy included, equals the inlet's: recomputed here from the
    # answer's amounts with the model, not read from the solver.
    from gibbsmin.energy import mixture_enthalpy
    from gibbsmin.nonideal import residual_enthalpy_of_gas

    with warnings.catch_warnings():
        warnings.simplefilter("ignore", RuntimeWarning)
        eq = gibbsmin.equilibrate(feed, P=P, T_feed=T_feed, adiabatic=True, species=[*LOOP_SPECIES],
                                  gas="peng-robinson")
    # Cracking ammonia cools the gas: a water-rich feed can leave below its dew point, where the one-gas answer
    # is rightly not certified (NH3 + 2 H2O from 650 K at 89 bar, found here; see the test below).
    assume(eq.certificate.phase_stability != "unstable")
    assert eq.certificate.certified, eq.certificate.summary()
    gas_out = {s: n for s, n in eq.amounts.items() if eq.phase_of[s] == "gas" and n > 0.0}
    H_in = mixture_enthalpy(feed, T_feed, P) + residual_enthalpy_of_gas(feed, T_feed, P, "peng-robinson")
    H_out = mixture_enthalpy(eq.amounts, eq.T, P) + residual_enthalpy_of_gas(gas_out, eq.T, P, "peng-robinson")
    scale = sum(abs(v) for v in (H_in, H_out)) + 8.314 * eq.T * sum(feed.values())
    if "energy_balance_miss_K" in eq.extras:  # the outlet sits on the alpha kink of hydrogen (see below)
        assert eq.extras["energy_balance_miss_K"] <= 0.5
    else:
        assert abs(H_out - H_in) <= 1e-8 * scale


def test_an_adiabatic_outlet_below_its_dew_point_is_not_certified_and_still_closes_its_balance():
    # Found by the property test above: NH3 + 2 H2O from 650 K at 89 bar cracks to 538.8 K, where the
    # water-rich gas is past its dew point.  At 100 bar it leaves at 544.2 K with 61 mol% water, about 61 bar
    # of it against a vapour pressure near 55 bar at that temperature (steam tables, from memory): the
    # tangent-plane test finds a water-rich liquid (90 mol% H2O), so the one-gas answer is not certified.
    import pytest

    from gibbsmin.energy import mixture_enthalpy
    from gibbsmin.nonideal import residual_enthalpy_of_gas

    feed = {"NH3": 1.0, "H2O": 2.0}
    # liquid=False: the one-gas answer (with liquids allowed, the default, the outlet is gas and liquid).
    with pytest.warns(RuntimeWarning, match="NOT stable as one gas"):
        eq = gibbsmin.equilibrate(feed, P=100e5, T_feed=650.0, adiabatic=True, species=[*LOOP_SPECIES],
                                  gas="peng-robinson", liquid=False)
    assert not eq.certificate.certified and eq.certificate.phase_stability == "unstable"
    assert eq.extras["gas_phase_stability"]["would_form"]["H2O"] > 0.8 and 540.0 < eq.T < 550.0
    gas_out = {s: n for s, n in eq.amounts.items() if n > 0.0}
    H_in = mixture_enthalpy(feed, 650.0, eq.P) + residual_enthalpy_of_gas(feed, 650.0, eq.P, "peng-robinson")
    H_out = mixture_enthalpy(gas_out, eq.T, eq.P) + residual_enthalpy_of_gas(gas_out, eq.T, eq.P, "peng-robinson")
    assert abs(H_out - H_in) <= 1e-8 * (abs(H_in) + abs(H_out))


def test_a_liquid_like_feed_is_refused_with_a_reason():
    import pytest

    # With the one gas only (liquid=False) the balance has no answer; with liquids (the default) see below.
    with pytest.raises(gibbsmin.ConvergenceError, match="condens"):
        gibbsmin.equilibrate({"NH3": 1.0, "H2O": 2.0}, P=135.5e5, T_feed=550.0, adiabatic=True,
                             species=[*LOOP_SPECIES], gas="peng-robinson", liquid=False)


def test_the_adiabatic_flash_of_that_feed_closes_its_balance_with_each_phases_residual_enthalpy():
    # Outside check of the residual parts: thermo's PR78 departure enthalpies (Caleb Bell, thermo 0.6, through
    # tests/flash_reference.py's constants) of the gas and the liquid at the answer's T, P and compositions.
    import pytest
    from flash_reference import thermo_departure_enthalpy, thermo_flash

    from gibbsmin.energy import mixture_enthalpy

    feed = {"NH3": 1.0, "H2O": 2.0}
    # Only NH3 and H2O: thermo takes the quantum gases' constants fixed at T, without their T-derivatives, so a
    # hydrogen-bearing outlet would differ from gibbsmin's by those terms (2.5 J of 68 kJ with 0.1 mol H2).
    eq = gibbsmin.equilibrate(feed, P=135.5e5, T_feed=550.0, adiabatic=True, species=["NH3", "H2O"],
                              gas="peng-robinson")
    assert eq.certificate.certified and eq.phases_present == ("gas", "liquid") and eq.liquid_amount > 0.1
    # The feed itself is two phases at 550 K and 135.5 bar (water's vapour pressure there is near 60 bar):
    # thermo's flash splits it, and each of its phases brings its own departure enthalpy.
    inlet = thermo_flash(feed, 550.0, eq.P)
    total = sum(feed.values())
    gas_in = mixture_enthalpy(feed, 550.0, eq.P) + sum(
        share * total * thermo_departure_enthalpy(z, 550.0, eq.P, root=name) / sum(z.values())
        for name, share, z in (("gas", inlet.vapour_fraction, inlet.y), ("liquid", 1.0 - inlet.vapour_fraction,
                                                                          inlet.x)) if z is not None and share > 0.0)
    totals = {s: n for s, n in eq.amounts.items() if n > 0.0}
    H_out = mixture_enthalpy(totals, eq.T, eq.P) + sum(
        thermo_departure_enthalpy(phase.amounts, eq.T, eq.P, root=phase.name) for phase in eq.fluid_phases)
    # Measured 6.6e-9 relative: thermo's own flash of the inlet is converged to about 1e-7 in ln f.
    assert H_out == pytest.approx(gas_in, rel=2e-8)
    assert eq.extras["energy_balance_residual"] < 1e-9  # the balance on gibbsmin's own enthalpies


def test_an_outlet_on_hydrogens_alpha_kink_is_accepted_with_a_warning():
    # Found by the test above: with the quantum correction hydrogen's Soave alpha passes its minimum near
    # 576 K, where sqrt(a_i a_j) has a kink, so the residual enthalpy jumps (by 187 J here) and no outlet
    # temperature closes the balance exactly.  The answer at the jump misses by 0.11 K and says so.
    import pytest

    feed = {"H2": 3.0, "N2": 0.01171875, "H2O": 2.0}
    with pytest.warns(RuntimeWarning, match="jumps by"):
        eq = gibbsmin.equilibrate(feed, P=20e5, T_feed=569.0, adiabatic=True, species=[*LOOP_SPECIES],
                                  gas="peng-robinson")
    assert eq.certificate.certified
    assert abs(eq.T - 576.18) < 0.01 and eq.extras["energy_balance_miss_K"] < 0.2


def test_an_outlet_on_carbon_monoxides_alpha_kink_is_pinned_there():
    # Found by the property test above (it raised ConvergenceError: "pinned at 1381.8 K, 149 J off"): CO's
    # Soave alpha passes its minimum at Tc (1 + 1/kappa)^2 = 132.91 K x 10.397 = 1381.82 K, where the cubic's
    # enthalpy of this CO-rich gas at 194 bar jumps by 602 J.  The target lies inside the jump, so the outlet
    # is that temperature; 149 J from the side below, 0.15 K at the equilibrium heat capacity (1019 J/K).
    import pytest

    # The draw was found with the NASA data, which put its adiabatic target inside the jump: named here
    # (the ATcT-anchored enthalpies of formation move the target out of it).
    feed = {"H2": 3.75, "CO": 4.3125, "H2O": 0.5078125}
    nasa = gibbsmin.thermo.data_set("nasa-1993")
    with pytest.warns(RuntimeWarning, match="Soave alpha of CO"):
        eq = gibbsmin.equilibrate(feed, P=19401849.0, T_feed=767.0, adiabatic=True, species=[*LOOP_SPECIES],
                                  gas="peng-robinson", data="nasa-1993")
    assert eq.certificate.certified, eq.certificate.summary()
    assert abs(eq.T - 1381.819) < 1e-3
    kink = eq.extras["enthalpy_kink"]
    assert kink["species"] == "CO" and kink["below_J"] < 0.0 < kink["above_J"]
    assert 500.0 < kink["jump_J"] < 700.0 and eq.extras["energy_balance_miss_K"] < 0.3
    assert _stationarity(eq, "peng-robinson", db=nasa) < STATIONARITY
    # The target enthalpy lies between the model's enthalpies just below and just above the kink, recomputed
    # here from the answer's amounts.
    from gibbsmin.energy import mixture_enthalpy
    from gibbsmin.nonideal import residual_enthalpy_of_gas

    H_in = mixture_enthalpy(feed, 767.0, eq.P, db=nasa) + residual_enthalpy_of_gas(feed, 767.0, eq.P, "peng-robinson",
                                                                                  db=nasa)
    gas_out = {s: n for s, n in eq.amounts.items() if n > 0.0}
    below, above = (mixture_enthalpy(gas_out, T, eq.P, db=nasa)
                    + residual_enthalpy_of_gas(gas_out, T, eq.P, "peng-robinson", db=nasa)
                    for T in (eq.T - 1e-6, eq.T + 1e-6))
    assert below < H_in < above and above - below > 500.0
