"""Uncertainty of the amounts from the formation-enthalpy uncertainties: linear propagation against Monte Carlo.

The Monte Carlo draws every species' delta-f H(298.15 K) shift from a normal
distribution with the data set's standard uncertainty (independent draws, as
the propagation assumes), moves g0/RT by shift/RT, and solves each draw in
full (no linearisation).  Its standard deviations are the reference: common
practice (GUM Supplement 1, JCGM 101:2008, propagation of distributions), no
outside numbers.  With 2,000 draws the sampled standard deviation has a relative
standard error of 1/sqrt(2 x 2000) = 1.6 %, so 10 % is six standard errors.
"""

import numpy as np
import pytest

import gibbsmin
from gibbsmin import equilibrate
from gibbsmin.nonideal import gas_phase
from gibbsmin.fixed_step import build_problem, prepare
from gibbsmin.solve import solve
from gibbsmin.thermo import R, data_set
from gibbsmin.uncertainty import formation_uncertainties, propagated

DRAWS = 2000


def _monte_carlo(feed, T, P, species, gas="ideal", seed=1, inert=()):
    db = data_set("atct-anchored")
    setup = prepare(feed, species=species, inert=inert, T_span=(T, T), db=db)
    system = setup.system
    u = formation_uncertainties(system.records)
    rng = np.random.default_rng(seed)
    offsets = rng.normal(size=(DRAWS, len(system.names))) * u / (R * T)
    Ts, Ps = np.full(DRAWS, T), np.full(DRAWS, P)
    problem = build_problem(setup, Ts, Ps)
    problem = gibbsmin.system.Problem(problem.A, problem.b, problem.mu0 + offsets[:, problem.keep], problem.n_gas,
                                      problem.allowed, problem.keep, problem.basis)
    if gas == "ideal":
        result, certificates = solve(problem, "newton")
    else:
        from gibbsmin.nonideal import solve_batch_nonideal

        result, certificates = solve_batch_nonideal(problem, gas_phase(system, gas), Ts, Ps, method="newton")
    assert np.all(certificates.certified)
    G = problem.n_gas
    n = np.zeros((DRAWS, len(system.names)))
    n[:, problem.keep[:G]] = np.exp(result.ln_n_gas)
    n[:, problem.keep[G:]] = result.n_condensed
    return dict(zip(system.names, n.std(axis=0, ddof=1))), dict(zip(system.names, n.mean(axis=0)))


CASES = {
    # invented ammonia loop gas, 3:1 H2:N2 with argon, 450 degC, 30 bar (ideal gas: implicit derivatives)
    "ammonia ideal": ({"H2": 3.0, "N2": 1.0, "Ar": 0.1}, 723.15, 30e5, ["H2", "N2", "NH3", "Ar"], "ideal"),
    # the same gas at 200 bar with Peng-Robinson (differences of whole solves)
    "ammonia PR": ({"H2": 3.0, "N2": 1.0, "Ar": 0.1}, 723.15, 200e5, ["H2", "N2", "NH3", "Ar"], "peng-robinson"),
    # invented steam reformer outlet, S/C 3, 900 K (where CH4, CO and CO2 all matter), 30 bar
    "reformer": ({"CH4": 1.0, "H2O": 3.0}, 900.0, 30e5, ["CH4", "H2O", "CO", "CO2", "H2"], "ideal"),
    # invented steam-starved feed that lays down graphite (a present condensed phase), 1000 K, 5 bar
    "carbon forming": ({"CH4": 1.0, "H2O": 0.5}, 1000.0, 5e5, ["CH4", "H2O", "CO", "CO2", "H2", "C(s)"], "ideal"),
}


@pytest.mark.parametrize("case", sorted(CASES))
def test_linear_uncertainty_matches_monte_carlo(case):
    feed, T, P, species, gas = CASES[case]
    eq = equilibrate(feed, T=T, P=P, species=species, gas=gas, data="atct-anchored", uncertainty=True)
    sampled, mean = _monte_carlo(feed, T, P, species, gas)
    compared = [s for s in species if sampled[s] > 1e-12 * sum(feed.values())]
    assert len(compared) >= 3
    if "C(s)" in species:
        assert eq.amounts["C(s)"] > 0.1 and "C(s)" in compared
    for name in compared:
        assert eq.uncertainty[name] == pytest.approx(sampled[name], rel=0.10), (name, eq.uncertainty, sampled)
        # The draws centre on the answer (linear regime: the mean moves by far less than the spread).
        assert abs(mean[name] - eq.amounts[name]) < 0.2 * sampled[name] + 1e-12
    if "Ar" in feed:
        assert eq.uncertainty["Ar"] == 0.0  # inert, fixed by its own balance


def test_ammonia_uncertainty_is_the_ammonia_data():
    # Only NH3 carries uncertainty in the loop gas (H2, N2 are the reference states, 0 +/- 0):
    # dn_NH3 = dn/d(ln K) * 2 u_NH3 / RT, with u_NH3 = 15 J/mol (ATcT's +/- 30 J/mol, halved).
    eq = equilibrate({"H2": 3.0, "N2": 1.0}, T=723.15, P=30e5, species=["H2", "N2", "NH3"],
                     data="atct-anchored", uncertainty=True)
    assert data_set("atct-anchored")["NH3"].hf298_uncertainty == 15.0
    y = eq.amounts["NH3"]
    # Conversion is small: n_NH3 ~ sqrt(K), so d ln n / d ln K is close to 1/2.
    assert eq.uncertainty["NH3"] / y == pytest.approx(0.5 * 2 * 15.0 / (R * 723.15), rel=0.2)
    assert eq.uncertainty["N2"] == pytest.approx(eq.uncertainty["NH3"] / 2, rel=1e-9)  # element balance
    assert eq.to_dict()["amount_uncertainty_mol"]["NH3"] == eq.uncertainty["NH3"]


def test_propagation_with_correlated_inputs():
    # Two fully correlated inputs add linearly, two independent ones in quadrature.
    J = np.array([[1.0, 1.0]])
    u = np.array([3.0, 4.0])
    assert propagated(J, np.diag(u**2))[0] == pytest.approx(5.0)
    assert propagated(J, np.outer(u, u))[0] == pytest.approx(7.0)


def test_a_tied_phase_covaries_with_its_other_phase():
    from gibbsmin.uncertainty import input_covariance

    db = data_set("atct-anchored")
    records = db.resolve(["H2O", "H2O(l)", "H2O(s)"])
    covariance = input_covariance(records)
    u_liquid = db["H2O(l)"].hf298_uncertainty
    assert covariance[1, 2] == covariance[2, 1] == pytest.approx(u_liquid**2)
    assert covariance[0, 1] == covariance[0, 2] == 0.0
    assert covariance[2, 2] == pytest.approx(u_liquid**2 + 2000.0**2)
    # The melting of ice, H2O(s) -> H2O(l), cancels the shared part: only the default is left.
    assert propagated(np.array([[0.0, 1.0, -1.0]]), covariance)[0] == pytest.approx(2000.0)


def test_uncertainty_needs_a_data_set_that_states_it():
    with pytest.raises(gibbsmin.InputError, match="data set 'nasa-1993' states no uncertainty .* data='atct-anchored'"):
        equilibrate({"H2": 3.0, "N2": 1.0}, T=723.15, P=30e5, species=["H2", "N2", "NH3"], uncertainty=True,
                    data="nasa-1993")


def test_no_uncertainty_unless_asked():
    eq = equilibrate({"H2": 3.0, "N2": 1.0}, T=723.15, P=30e5, data="atct-anchored")
    assert eq.uncertainty is None and "amount_uncertainty_mol" not in eq.to_dict()


# ---------------------------------------------------------------- approach temperatures

# An invented reformer outlet and a shift-converter outlet, analysed as measured gases (Q fixed).
MEASURED = {
    "reformer": ({"H2": 47.0, "CO": 9.6, "CO2": 5.0, "CH4": 3.4, "H2O": 35.0}, 1123.15, 29.0e5,
                 ["steam methane reforming", "water-gas shift"]),
    "shift": ({"H2": 55.0, "CO": 0.6, "CO2": 15.0, "CH4": 0.3, "H2O": 29.0}, 493.15, 28.0e5, ["water-gas shift"]),
}


def _equilibrium_temperatures(rx, ln_Q, T_start, shifts):
    """T where ln K - sum(nu dH)/(R T) = ln Q, for each draw of shifts dH (rows), by Newton from T_start."""
    nu = np.array(rx.coefficients)
    moved = shifts @ nu  # J/mol
    T = np.full(moved.size, T_start)
    for _ in range(30):
        f = rx.ln_K(T, allow_extrapolation=True) - moved / (R * T) - ln_Q
        slope = rx.enthalpy(T, allow_extrapolation=True) / (R * T**2) + moved / (R * T**2)
        T = T - f / slope
    return T


@pytest.mark.parametrize("case", sorted(MEASURED))
def test_approach_uncertainty_matches_monte_carlo(case):
    from gibbsmin.reactions import approach_temperatures
    from gibbsmin.uncertainty import approach_uncertainty

    gas, T, P, reactions = MEASURED[case]
    found = approach_temperatures(gas, T, P, reactions, db=data_set("atct-anchored"))
    rng = np.random.default_rng(7)
    for name, approach in found.items():
        rx = approach.reaction
        shifts = rng.normal(size=(DRAWS, len(rx.records))) * formation_uncertainties(rx.records)
        T_eq = _equilibrium_temperatures(rx, approach.ln_Q, approach.T_eq, shifts)
        assert np.median(T_eq) == pytest.approx(approach.T_eq, abs=0.05)
        linear = approach_uncertainty(approach)
        assert linear == pytest.approx(T_eq.std(ddof=1), rel=0.10), (name, linear, T_eq.std(ddof=1))
        assert 0.01 < linear < 2.0  # tenths of a kelvin, as the formation data's tens of J/mol make it


def test_approach_uncertainty_needs_stated_uncertainties():
    from gibbsmin.reactions import approach_temperatures
    from gibbsmin.uncertainty import approach_uncertainty

    gas, T, P, reactions = MEASURED["shift"]
    approach = approach_temperatures(gas, T, P, reactions, db=data_set("nasa-1993"))["water-gas shift"]
    with pytest.raises(gibbsmin.InputError, match="states no uncertainty"):
        approach_uncertainty(approach)
