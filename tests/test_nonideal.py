"""The non-ideal gas inside the minimisation: limits, certificate, policy for species without constants.

Outside references: Peng and Robinson (1976, Ind. Eng. Chem. Fundam. 15, 59),
the pure-fluid fugacity coefficient of their eq. 15 with Omega_a = 0.45724 and
Omega_b = 0.07780 and kappa of their eq. 18, written out here independently of
gibbsmin.eos; the optimality conditions of the Gibbs minimisation, evaluated
from the answer alone (common practice, no source).
"""

from __future__ import annotations

import math
import warnings

import numpy as np
import pytest

import gibbsmin
from gibbsmin.eos import gas_model_for_species
from gibbsmin.nonideal import OuterLoopOptions, gas_phase, solve_nonideal
from gibbsmin.fixed_step import prepare, solve_fixed
from gibbsmin.system import P_REF
from gibbsmin.thermo.nasa7 import R

DB = gibbsmin.default_database()

# An invented ammonia loop gas (converter inlet of our own made-up plant).
LOOP_FEED = {"H2": 0.66, "N2": 0.22, "NH3": 0.04, "CH4": 0.05, "Ar": 0.03}


def _g0_RT(name: str, T: float) -> float:
    return float(DB.nasa7([name]).g_RT(np.array(T))[0])


def _peng_robinson_pure_ln_phi(name: str, T: float, P: float) -> tuple[float, float]:
    """Z and ln phi of a pure fluid, Peng and Robinson (1976) eqs. 6-18, paper's rounded constants."""
    c = DB[name].critical
    kappa = 0.37464 + 1.54226 * c.omega - 0.26992 * c.omega**2
    alpha = (1.0 + kappa * (1.0 - math.sqrt(T / c.Tc))) ** 2
    a = 0.45724 * (R * c.Tc) ** 2 / c.Pc * alpha
    b = 0.07780 * R * c.Tc / c.Pc
    A, B = a * P / (R * T) ** 2, b * P / (R * T)
    roots = np.roots([1.0, -(1.0 - B), A - 3 * B**2 - 2 * B, -(A * B - B**2 - B**3)])
    Z = max(r.real for r in roots if abs(r.imag) < 1e-12)
    s2 = math.sqrt(2.0)
    ln_phi = Z - 1 - math.log(Z - B) - A / (2 * s2 * B) * math.log((Z + (1 + s2) * B) / (Z + (1 - s2) * B))
    return Z, ln_phi


@pytest.mark.parametrize(("name", "T", "P"), [("N2", 300.0, 200e5), ("CO2", 350.0, 100e5), ("CH4", 250.0, 80e5)])
def test_pure_gas_takes_z_and_fugacity_from_the_equation_of_state(name, T, P, solver):
    # Source: Peng and Robinson (1976) eq. 15 for a pure fluid (our transcription, rounded Omegas:
    # they move ln phi by about 1e-5, hence the 1e-4 tolerance).
    eq = gibbsmin.equilibrate({name: 2.0}, T, P, species=[name], gas="peng-robinson", method=solver)
    Z_paper, ln_phi_paper = _peng_robinson_pure_ln_phi(name, T, P)
    assert eq.gas_model == "peng-robinson"
    assert eq.extras["compressibility_factor"] == pytest.approx(Z_paper, rel=1e-4)
    assert math.log(eq.extras["fugacity_coefficients"][name]) == pytest.approx(ln_phi_paper, abs=1e-4)
    # The same numbers the equation of state module gives (plumbing, exact).
    props = gas_model_for_species("peng-robinson", [name]).properties(T, P, np.array([1.0]))
    assert eq.extras["compressibility_factor"] == pytest.approx(props.Z, rel=1e-13)
    # G of a pure real gas: n (g0/RT + ln P/P0 + ln phi).
    expected_G = 2.0 * (_g0_RT(name, T) + math.log(P / P_REF) + ln_phi_paper)
    assert eq.G_RT == pytest.approx(expected_G, abs=2.5e-4)
    assert eq.amounts[name] == pytest.approx(2.0, rel=1e-14)


def test_ideal_keyword_is_the_default_bit_for_bit(solver):
    default = gibbsmin.equilibrate(LOOP_FEED, 700.0, 200e5, method=solver)
    ideal = gibbsmin.equilibrate(LOOP_FEED, 700.0, 200e5, gas="ideal", method=solver)
    assert ideal.amounts == default.amounts
    assert ideal.ln_gas_amounts == default.ln_gas_amounts
    assert ideal.G_RT == default.G_RT
    assert ideal.gas_model == default.gas_model == "ideal"


def test_ideal_phase_through_the_non_ideal_path_is_solve_fixed(solver):
    setup = prepare(LOOP_FEED, T_span=(700.0, 700.0))
    reference, _, _ = solve_fixed(setup, 700.0, 200e5, method=solver)
    through, _, _ = solve_nonideal(setup, 700.0, 200e5, gas_phase(setup.system, "ideal"), method=solver)
    assert through.amounts == reference.amounts
    assert through.G_RT == reference.G_RT


@pytest.mark.parametrize("gas", ["peng-robinson", "srk"])
def test_non_ideal_stationarity_recomputed_from_the_answer(gas, solver):
    # Common practice, no source: at the optimum mu_j/RT = g0_j/RT + ln(P/P0) + ln y_j + ln phi_j(T, P, y)
    # equals sum_k a_kj lambda_k for every gas species, with phi evaluated at the answer itself.
    T, P = 700.0, 250e5
    eq = gibbsmin.equilibrate(LOOP_FEED, T, P, gas=gas, method=solver)
    gas_species = [s for s in eq.species if eq.phase_of[s] == "gas"]
    described = [s for s in gas_species if DB[s].critical is not None]
    y = eq.mole_fractions
    y_described = np.array([y[s] for s in described])
    model = gas_model_for_species(gas, described)  # with the shipped kij, as equilibrate uses by default
    ln_phi = dict(zip(described, model.ln_phi(T, P, y_described / y_described.sum())))
    worst = 0.0
    for s in gas_species:
        if not math.isfinite(eq.ln_gas_amounts[s]):
            continue
        mu = _g0_RT(s, T) + math.log(P / P_REF) + math.log(y[s]) + ln_phi.get(s, 0.0)
        potential = sum(n * eq.element_potentials[el] for el, n in DB[s].elements.items())
        worst = max(worst, abs(mu - potential))
    assert worst < 1e-8
    assert eq.certificate.stationarity < 1e-8
    assert eq.certificate.certified
    # Trace species matter: the test covers species far below 1e-10.
    assert min(y[s] for s in gas_species if y[s] > 0) < 1e-15


def test_the_ideal_answer_fails_the_non_ideal_stationarity(solver):
    # The check above can fail: the ideal-gas answer violates the PR condition by about |ln phi|.
    T, P = 700.0, 250e5
    ideal = gibbsmin.equilibrate(LOOP_FEED, T, P, method=solver)
    described = [s for s in ideal.species if ideal.phase_of[s] == "gas" and DB[s].critical is not None]
    y = np.array([ideal.mole_fractions[s] for s in described])
    ln_phi = gas_model_for_species("peng-robinson", described).ln_phi(T, P, y / y.sum())
    nh3 = described.index("NH3")
    mu = _g0_RT("NH3", T) + math.log(P / P_REF) + math.log(y[nh3]) + ln_phi[nh3]
    potential = ideal.element_potentials["N"] + 3 * ideal.element_potentials["H"]
    assert abs(mu - potential) > 1e-3


def test_species_without_critical_constants_are_ideal_and_left_out_of_the_mixture(solver):
    T, P = 700.0, 200e5
    eq = gibbsmin.equilibrate(LOOP_FEED, T, P, gas="peng-robinson", method=solver)
    phi = eq.extras["fugacity_coefficients"]
    lacking = [s for s in phi if DB[s].critical is None]
    assert {"H", "NH2", "CH3"} <= set(lacking)
    assert all(phi[s] == 1.0 for s in lacking)
    for s in lacking[:3]:
        assert s in eq.extras["gas_model_note"]
    assert "left out of the mixture's a and b" in eq.extras["gas_model_note"]
    # The described species see the mixture of the described species alone.
    described = [s for s in phi if s not in lacking]
    y = np.array([eq.mole_fractions[s] for s in described])
    expected = gas_model_for_species("peng-robinson", described).ln_phi(T, P, y / y.sum())
    np.testing.assert_allclose([math.log(phi[s]) for s in described], expected, rtol=0, atol=2e-10)


def test_a_gas_rich_in_species_without_constants_warns(solver):
    # Hydrogen atoms at 3500 K: a few per cent of the gas, treated as ideal.
    with pytest.warns(RuntimeWarning, match="no critical constants"):
        eq = gibbsmin.equilibrate({"H2": 1.0}, 3500.0, 50e5, gas="peng-robinson", method=solver)
    assert eq.mole_fractions["H"] > 1e-3


def test_loop_that_cannot_settle_raises_a_clear_error(solver):
    setup = prepare(LOOP_FEED, T_span=(700.0, 700.0))
    phase = gas_phase(setup.system, "peng-robinson")
    with pytest.raises(gibbsmin.ConvergenceError, match="fugacity coefficients did not settle"):
        solve_nonideal(setup, 700.0, 300e5, phase, options=OuterLoopOptions(max_iterations=2), method=solver)


def test_warm_start_gives_the_cold_answer(solver):
    setup = prepare(LOOP_FEED, T_span=(690.0, 700.0))
    phase = gas_phase(setup.system, "peng-robinson")
    cold, _, _ = solve_nonideal(setup, 700.0, 200e5, phase, method=solver)
    _, _, neighbour = solve_nonideal(setup, 690.0, 200e5, phase, method=solver)
    warm, _, _ = solve_nonideal(setup, 700.0, 200e5, phase, start=neighbour, method=solver)
    assert warm.extras["gas_model_iterations"] < cold.extras["gas_model_iterations"]
    for s in ("NH3", "H2", "N2"):
        assert warm.mole_fractions[s] == pytest.approx(cold.mole_fractions[s], rel=1e-9)


def test_plain_iteration_and_anderson_agree(solver):
    setup = prepare(LOOP_FEED, T_span=(700.0, 700.0))
    phase = gas_phase(setup.system, "peng-robinson")
    plain, _, _ = solve_nonideal(setup, 700.0, 300e5, phase, options=OuterLoopOptions(memory=0), method=solver)
    fast, _, _ = solve_nonideal(setup, 700.0, 300e5, phase, method=solver)
    assert fast.extras["gas_model_iterations"] < plain.extras["gas_model_iterations"]
    assert fast.mole_fractions["NH3"] == pytest.approx(plain.mole_fractions["NH3"], rel=1e-9)


def test_residual_enthalpy_matches_the_equation_of_state(solver):
    T, P = 700.0, 200e5
    eq = gibbsmin.equilibrate(LOOP_FEED, T, P, gas="peng-robinson", method=solver)
    described = [s for s in eq.species if eq.phase_of[s] == "gas" and DB[s].critical is not None]
    n = np.array([eq.amounts[s] for s in described])
    props = gas_model_for_species("peng-robinson", described).properties(T, P, n / n.sum())
    assert eq.extras["residual_enthalpy_J"] == pytest.approx(n.sum() * R * T * props.H_res_RT, rel=1e-9)
    assert eq.extras["residual_entropy_J_per_K"] == pytest.approx(n.sum() * R * props.S_res_R, rel=1e-9)


def test_kij_by_pair_reaches_the_model():
    setup = prepare({"H2": 3.0, "N2": 1.0}, T_span=(700.0, 700.0))
    plain = gas_phase(setup.system, "peng-robinson", kij="none")
    tuned = gas_phase(setup.system, "peng-robinson", kij={("NH3", "H2"): 0.1})
    names = setup.system.gas_names
    y = np.array([{"H2": 0.5, "N2": 0.25, "NH3": 0.25}.get(s, 0.0) for s in names])
    nh3 = names.index("NH3")
    # A positive k_ij weakens the H2-NH3 attraction, so ammonia's fugacity coefficient rises.
    assert tuned.ln_phi(700.0, 200e5, y)[nh3] > plain.ln_phi(700.0, 200e5, y)[nh3] + 2e-4
    described = ["H2", "N2", "NH3", "N2H4"]
    k = np.zeros((4, 4))
    k[0, 2] = k[2, 0] = 0.1
    where = [names.index(s) for s in described]
    direct = gas_model_for_species("peng-robinson", described, kij=k).ln_phi(700.0, 200e5, y[where])
    np.testing.assert_allclose(tuned.ln_phi(700.0, 200e5, y)[where], direct, rtol=0, atol=1e-14)


def test_shipped_kij_is_the_default_and_the_result_says_so(solver):
    # Source of the values: ChemSep PR table as served by thermo 0.6 (species/SOURCES.md, key chemsep-pr).
    eq = gibbsmin.equilibrate(LOOP_FEED, 700.0, 200e5, gas="peng-robinson", method=solver)
    assert eq.extras["binary_interactions"]["H2-N2"] == 0.0711
    assert eq.extras["binary_interactions"]["N2-NH3"] == 0.2193
    assert "kij from the shipped table" in eq.extras["gas_model_note"]
    plain = gibbsmin.equilibrate(LOOP_FEED, 700.0, 200e5, gas="peng-robinson", kij="none", method=solver)
    assert plain.extras["binary_interactions"] == {}
    assert "kij = 0 for every pair" in plain.extras["gas_model_note"]
    # The table moves ammonia by about 7e-4 mol% here: small, but measurable.
    shift = abs(eq.mole_fractions["NH3"] - plain.mole_fractions["NH3"])
    assert 1e-6 < shift < 1e-3
    # SRK has no shipped values, so its answer is the same either way.
    srk = gibbsmin.equilibrate(LOOP_FEED, 700.0, 200e5, gas="srk", method=solver)
    assert srk.extras["binary_interactions"] == {}


def test_kij_with_the_ideal_gas_or_an_unknown_word_is_refused():
    with pytest.raises(gibbsmin.InputError, match="only applies to a cubic gas model"):
        gibbsmin.equilibrate(LOOP_FEED, 700.0, 200e5, kij={("H2", "N2"): 0.1})
    with pytest.raises(gibbsmin.InputError, match="'shipped'.*'none'"):
        gibbsmin.equilibrate(LOOP_FEED, 700.0, 200e5, gas="peng-robinson", kij="published")


@pytest.mark.parametrize(("kij", "message"), [
    ({("H2", "NH2"): 0.1}, "no critical constants"),
    ({("H2", "CO"): 0.1}, "not a gas species of the set"),
    ({("H2", "H2"): 0.1}, "names one species twice"),
    ({"H2": 0.1}, "pairs of species names"),
    ({("H2", "N2"): "0.1"}, "number between -1 and 1"),
    ({("H2", "N2"): 1.5}, "number between -1 and 1"),
])
def test_bad_kij_names_the_problem(kij, message):
    setup = prepare({"H2": 3.0, "N2": 1.0}, T_span=(700.0, 700.0))
    with pytest.raises(gibbsmin.InputError, match=message):
        gas_phase(setup.system, "peng-robinson", kij=kij)


def test_unknown_gas_model_is_refused_with_the_choices():
    with pytest.raises(gibbsmin.InputError, match="unknown gas model 'virial'.*ideal, peng-robinson, srk"):
        gibbsmin.equilibrate(LOOP_FEED, 700.0, 200e5, gas="virial")


def test_cubic_without_any_described_species_is_refused():
    # Atomic hydrogen alone: no species of the set has critical constants.
    with pytest.raises(gibbsmin.InputError, match="no critical constants for H"):
        gibbsmin.equilibrate({"H": 1.0}, 3000.0, 1e5, species=["H"], gas="srk")


def test_aliases_of_the_model_names_are_accepted(solver):
    eq = gibbsmin.equilibrate({"H2": 3.0, "N2": 1.0}, 700.0, 200e5, gas="PR", method=solver)
    assert eq.gas_model == "peng-robinson"


def test_adiabatic_solve_carries_the_residual_enthalpy(solver):
    # The energy balance closes on the real-gas enthalpy: H_out (with H_res) = H_in (with the feed's H_res).
    feed = {"H2": 0.66, "N2": 0.22, "NH3": 0.04, "CH4": 0.05, "Ar": 0.03}
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        real = gibbsmin.equilibrate(feed, P=200e5, T_feed=650.0, adiabatic=True, gas="peng-robinson", method=solver)
    ideal = gibbsmin.equilibrate(feed, P=200e5, T_feed=650.0, adiabatic=True, method=solver)
    assert real.gas_model == "peng-robinson"
    assert real.specification == "H and P"
    assert real.certificate.stationarity < 1e-8
    assert real.extras["energy_balance_residual"] < 1e-9
    # Recompute both sides independently: ideal-gas enthalpies from the NASA data plus the cubic's H_res.
    setup = prepare(feed, T_span=(real.T, real.T))
    phase = gas_phase(setup.system, "peng-robinson")
    names = list(feed)
    h_in = DB.nasa7(names).h_RT(np.array(650.0)) * R * 650.0
    H_in = float(np.dot([feed[s] for s in names], h_in)) + phase.stream_residual_enthalpy(feed, 650.0, 200e5)
    out = [s for s in real.species if real.amounts[s] > 0]
    h_out = DB.nasa7(out).h_RT(np.array(real.T)) * R * real.T
    H_out = float(np.dot([real.amounts[s] for s in out], h_out)) + real.extras["residual_enthalpy_J"]
    assert H_out == pytest.approx(H_in, abs=1e-6 * abs(H_in))
    # The ammonia formed releases heat; the real gas makes more of it, so it runs hotter.
    assert real.T > ideal.T + 1.0
