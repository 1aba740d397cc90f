"""The carbon limit in S/C with its uncertainty from the formation data: linear propagation against Monte Carlo.

Each of 2,000 draws shifts every species' delta-f H(298.15 K) by a normal
deviate of the data set's standard uncertainty (graphite included), and finds
that draw's own limit: the S/C where the gas-only equilibrium's carbon activity
against graphite is 1, by a secant iteration on the whole batch of draws
(every root converged to 1e-10 in S/C).  Its standard deviation is the
reference: common practice (GUM Supplement 1, JCGM 101:2008), no outside
numbers; 10 % is six standard errors of a 2,000-draw standard deviation.
"""

import numpy as np
import pytest

import gibbsmin
from gibbsmin.carbon import carbon_limit
from gibbsmin.carbon.activity import _g0_graphite
from gibbsmin.fixed_step import build_problem, prepare
from gibbsmin.solve import solve
from gibbsmin.system import Problem
from gibbsmin.thermo import R, data_set
from gibbsmin.uncertainty import formation_uncertainties

DRAWS = 2000
GAS = ["CH4", "H2O", "CO", "CO2", "H2"]

CASES = {
    # invented: pure methane before steam at 600 degC, 25 bar (methane cracking sets the limit)
    "methane 600 degC": ({"CH4": 1.0}, 873.15, 25e5),
    # invented: a recycle-rich feed with CO2 and hydrogen at 850 degC, 20 bar
    "CO2-rich 850 degC": ({"CH4": 0.8, "CO2": 0.2, "H2": 0.1}, 1123.15, 20e5),
}


def _monte_carlo_limits(feed, T, P, start, seed=5):
    db = data_set("atct-anchored")
    setup = prepare({**feed, "H2O": 0.0}, species=GAS, T_span=(T, T), db=db)
    system = setup.system
    carbon = sum(n * db[s].elements.get("C", 0) for s, n in feed.items() if s not in ("CO", "CO2"))
    rng = np.random.default_rng(seed)
    shifts = rng.normal(size=(DRAWS, len(system.names))) * formation_uncertainties(system.records)
    graphite_shift = rng.normal(size=DRAWS) * db["C(s)"].hf298_uncertainty
    b_steam = system.element_matrix([db["H2O"]])[:, 0]
    c = system.elements.index("C")
    g0_graphite = _g0_graphite(T, db) + graphite_shift / (R * T)
    Ts, Ps = np.full(DRAWS, T), np.full(DRAWS, P)
    state = {"start": None}

    def ln_activity(x):
        problem = build_problem(setup, Ts, Ps, b=setup.b + np.outer(x * carbon, b_steam))
        problem = Problem(problem.A, problem.b, problem.mu0 + shifts[:, problem.keep] / (R * T), problem.n_gas,
                          problem.allowed, problem.keep, problem.basis)
        result, certificates = solve(problem, "newton", start=state["start"])
        assert np.all(certificates.certified)
        state["start"] = result
        lam = result.pi @ problem.basis  # no element row is dropped in C-H-O
        return lam[:, c] - g0_graphite

    x0, x1 = np.full(DRAWS, 0.98 * start), np.full(DRAWS, 1.02 * start)
    f0, f1 = ln_activity(x0), ln_activity(x1)
    for _ in range(30):
        x2 = x1 - f1 * (x1 - x0) / (f1 - f0)
        if np.max(np.abs(x2 - x1)) < 1e-10:
            return x2
        x0, f0, x1, f1 = x1, f1, x2, ln_activity(x2)
    raise AssertionError("the Monte Carlo carbon limits did not converge")


@pytest.mark.parametrize("case", sorted(CASES))
def test_carbon_limit_uncertainty_matches_monte_carlo(case):
    feed, T, P = CASES[case]
    limit = carbon_limit(feed, T, P, species=[*GAS, "C(s)"], data="atct-anchored", uncertainty=True)
    assert limit.status == "found"
    draws = _monte_carlo_limits(feed, T, P, limit.steam_to_carbon)
    assert np.median(draws) == pytest.approx(limit.steam_to_carbon, abs=0.1 * draws.std())
    assert limit.uncertainty == pytest.approx(draws.std(ddof=1), rel=0.10), (limit.uncertainty, draws.std())
    assert limit.uncertainty > 1e-5


def test_carbon_limit_uncertainty_needs_stated_uncertainties():
    with pytest.raises(gibbsmin.InputError, match="states no uncertainty.*data='atct-anchored'"):
        carbon_limit({"CH4": 1.0}, 873.15, 25e5, data="nasa-1993", uncertainty=True)


def test_no_limit_found_has_no_uncertainty():
    limit = carbon_limit({"CH4": 1.0, "H2O": 20.0}, 873.15, 25e5, data="atct-anchored", uncertainty=True)
    assert limit.status.startswith("carbon-free") and np.isnan(limit.uncertainty)
    assert carbon_limit({"CH4": 1.0}, 873.15, 25e5, data="atct-anchored").uncertainty is None
