"""Uncertainty where the energy balance sets the outlet temperature: linear propagation against Monte Carlo.

The Monte Carlo draws every species' delta-f H(298.15 K) shift from a normal
distribution with the data set's standard uncertainty, shifts the inlet's and
the outlet's enthalpies and g0/RT by it, and solves each draw's energy balance
in full: a batch of fixed-T solves per step of a Newton iteration on each
draw's own outlet temperature (every draw converged to 1e-6 K).  Its standard
deviations are the reference: common practice (GUM Supplement 1, JCGM
101:2008, propagation of distributions), no outside numbers.  With 2,000 draws
the sampled standard deviation has a relative standard error of 1.6 %, so 10 %
is six standard errors.
"""

import numpy as np
import pytest

import gibbsmin
from gibbsmin import equilibrate
from gibbsmin.fixed_step import build_problem, prepare
from gibbsmin.solve import solve
from gibbsmin.system import Problem
from gibbsmin.thermo import R, data_set
from gibbsmin.uncertainty import formation_uncertainties

DRAWS = 2000

CASES = {
    # invented adiabatic prereformer: steam and methane with a little hydrogen in at 500 degC, 30 bar
    "prereformer": ({"CH4": 1.0, "H2O": 2.5, "H2": 0.05}, 773.15, 30e5, ["CH4", "H2O", "CO", "CO2", "H2"]),
    # invented first bed of an ammonia converter: 3:1 H2:N2 with 4 % NH3 in at 380 degC, 150 bar (ideal gas)
    "ammonia bed": ({"H2": 3.0, "N2": 1.0, "NH3": 0.17}, 653.15, 150e5, ["H2", "N2", "NH3"]),
    # invented methanator: CO and CO2 traces in hydrogen and nitrogen at 300 degC, 28 bar
    "methanator": ({"H2": 0.74, "N2": 0.245, "CO": 0.004, "CO2": 0.002, "CH4": 0.006, "H2O": 0.003}, 573.15, 28e5,
                   ["H2", "N2", "CO", "CO2", "CH4", "H2O"]),
}


def _adiabatic_monte_carlo(feed, T_feed, P, species, T_start, slope, seed=3):
    """Outlet T and amounts of every draw, each draw's energy balance solved by Newton on its T.

    ``slope`` [J/K] is the step's divisor (the nominal answer's equilibrium heat capacity): it only sets how
    fast the iteration contracts; each draw is converged on its own energy balance whatever it is.
    """
    db = data_set("atct-anchored")
    setup = prepare(feed, species=species, T_span=(300.0, 2000.0), db=db)
    system = setup.system
    rng = np.random.default_rng(seed)
    shifts = rng.normal(size=(DRAWS, len(system.names))) * formation_uncertainties(system.records)  # J/mol
    n_in = np.array([feed.get(s, 0.0) for s in system.names])
    H_in = float(n_in @ system.table.h_RT(T_feed)) * R * T_feed + shifts @ n_in
    T = np.full(DRAWS, T_start)
    result = None
    for _ in range(40):
        problem = build_problem(setup, T, np.full(DRAWS, P))
        problem = Problem(problem.A, problem.b, problem.mu0 + shifts[:, problem.keep] / (R * T[:, None]),
                          problem.n_gas, problem.allowed, problem.keep, problem.basis)
        result, certificates = solve(problem, "newton", start=result)
        assert np.all(certificates.certified)
        n = np.zeros((DRAWS, len(system.names)))
        n[:, problem.keep] = result.amounts
        H_out = np.einsum("ij,ij->i", n, system.table.h_RT(T) * (R * T[:, None]) + shifts)
        step = (H_out - H_in) / slope
        T = T - step
        if np.max(np.abs(step)) < 1e-6:
            break
    else:
        raise AssertionError("the Monte Carlo energy balances did not converge")
    return T, dict(zip(system.names, n.T))


@pytest.mark.parametrize("case", sorted(CASES))
def test_adiabatic_uncertainty_matches_monte_carlo(case):
    feed, T_feed, P, species = CASES[case]
    eq = equilibrate(feed, P=P, T_feed=T_feed, adiabatic=True, species=species, data="atct-anchored",
                     uncertainty=True, sensitivities=True)
    slope = eq.extras["sensitivities"]["heat_capacity_equilibrium_J_per_K"]
    T_draws, n_draws = _adiabatic_monte_carlo(feed, T_feed, P, species, eq.T, slope)
    assert abs(eq.T - T_feed) > 10.0  # the reaction moves the temperature: a real energy balance
    assert np.median(T_draws) == pytest.approx(eq.T, abs=0.1 * T_draws.std() + 1e-6)
    assert eq.T_uncertainty == pytest.approx(T_draws.std(ddof=1), rel=0.10), (eq.T_uncertainty, T_draws.std())
    assert 1e-3 < eq.T_uncertainty < 5.0  # hundredths to tenths of a kelvin from tens of J/mol
    # Amounts whose spread is above round-off (in the methanator only the CO and CO2 traces move visibly).
    compared = [s for s in species if n_draws[s].std() > 1e-6 * eq.amounts[s]]
    assert len(compared) >= 2
    for name in compared:
        assert eq.uncertainty[name] == pytest.approx(n_draws[name].std(ddof=1), rel=0.10), name
    assert eq.to_dict()["T_uncertainty_K"] == eq.T_uncertainty
    # Mole fractions, wet and dry, from the drawn amounts (each amount correlates with the totals).
    wet = sum(n_draws.values())
    dry = wet - n_draws.get("H2O", 0.0)
    for name in compared:
        y = n_draws[name] / wet
        assert eq.mole_fraction_uncertainty[name] == pytest.approx(y.std(ddof=1), rel=0.10), name
        if name != "H2O":
            y_dry = n_draws[name] / dry
            assert eq.dry_mole_fraction_uncertainty[name] == pytest.approx(y_dry.std(ddof=1), rel=0.10), name


def test_outlet_temperature_uncertainty_by_hand_for_ammonia():
    # Only NH3's enthalpy of formation is uncertain in the loop gas (u = 15 J/mol).  A shift dH of it
    # changes the reaction heat released by (n_out - n_in) dH and K at fixed T; the outlet T moves by
    # dT = -dF/dH / Cp_eq.  The formula's own parts, computed apart, must add up to the result.
    from gibbsmin.sensitivity import equilibrium_sensitivities, formation_enthalpy_sensitivities
    from gibbsmin.fixed_step import solve_fixed

    feed, T_feed, P, species = CASES["ammonia bed"]
    eq = equilibrate(feed, P=P, T_feed=T_feed, adiabatic=True, species=species, data="atct-anchored",
                     uncertainty=True)
    db = data_set("atct-anchored")
    setup = prepare(feed, species=species, T_span=(eq.T, eq.T), db=db)
    _, problem, result = solve_fixed(setup, eq.T, P)
    names = setup.system.names
    j = names.index("NH3")
    at_T = formation_enthalpy_sensitivities(setup, problem, result, eq.T)[:, j]
    along = equilibrium_sensitivities(setup, problem, result, eq.T, P, feed_species=())
    h = R * eq.T * setup.system.table.h_RT(eq.T)
    dF = eq.amounts["NH3"] - feed["NH3"] + h @ at_T
    assert eq.T_uncertainty == pytest.approx(15.0 * abs(dF) / along.heat_capacity_equilibrium, rel=1e-6)


def test_energy_balance_uncertainty_with_a_cubic_is_refused_clearly():
    with pytest.raises(gibbsmin.InputError, match="ideal gas only.*give the outlet temperature T"):
        equilibrate({"H2": 3.0, "N2": 1.0}, P=150e5, T_feed=653.15, adiabatic=True, gas="peng-robinson",
                    species=["H2", "N2", "NH3"], data="atct-anchored", uncertainty=True)


def test_no_temperature_uncertainty_at_a_fixed_temperature():
    eq = equilibrate({"H2": 3.0, "N2": 1.0}, T=723.15, P=30e5, species=["H2", "N2", "NH3"], data="atct-anchored",
                     uncertainty=True)
    assert eq.T_uncertainty is None and "T_uncertainty_K" not in eq.to_dict()


def test_on_a_phase_plateau_the_uncertainties_are_not_given():
    # Steam at 1 bar with part of its latent heat removed lands on the boiling plateau, where the phases fix T
    # (Cp_eq is infinite): the linear propagation has no derivative there and says so with NaN, not a number.
    eq = equilibrate({"H2O": 1.0}, P=1e5, T_feed=400.0, adiabatic=True, heat_input=-22000.0, data="atct-anchored",
                     uncertainty=True)
    assert "phase_boundary" in eq.extras and 0.1 < eq.condensed["H2O(l)"] < 0.9
    assert np.isnan(eq.T_uncertainty) and np.isnan(eq.uncertainty["H2O"])
    assert eq.to_dict()["T_uncertainty_K"] is None
