"""Sweep uncertainty columns: each point's mole-fraction uncertainties against a Monte Carlo at that point.

The Monte Carlo draws every species' delta-f H(298.15 K) shift from a normal
distribution with the data set's standard uncertainty and solves every draw at
every point of the sweep in full (one batch of 2,000 x points solves); its
standard deviations are the reference: common practice (GUM Supplement 1,
JCGM 101:2008), no outside numbers.  10 % is six standard errors of a
2,000-draw standard deviation.
"""

import numpy as np
import pytest

import gibbsmin
from gibbsmin.fixed_step import build_problem, prepare
from gibbsmin.solve import solve
from gibbsmin.sweep import SweepSpec, grid, solve_points
from gibbsmin.system import Problem
from gibbsmin.thermo import R, data_set
from gibbsmin.uncertainty import formation_uncertainties

DRAWS = 2000
GAS = ("CH4", "H2O", "CO", "CO2", "H2")


def _reformer(**options):
    # invented steam reformer: S/C 3 at 30 bar over 850 to 1000 K, where CH4, CO and CO2 all matter
    options = {"data": "atct-anchored", **options}
    return SweepSpec(feed={"CH4": 1.0, "H2O": 3.0}, T=900.0, P=30e5, axes=(grid("T", [850.0, 925.0, 1000.0]),),
                     species=GAS, **options)


def _monte_carlo_mole_fractions(spec, seed=2):
    db = data_set("atct-anchored")
    setup = prepare(dict(spec.feed), species=list(spec.species), T_span=spec.T_span(), db=db)
    system = setup.system
    T_points = np.array(spec.axes[0].values)
    T = np.repeat(T_points, DRAWS)
    shifts = np.random.default_rng(seed).normal(size=(DRAWS, len(system.names))) * formation_uncertainties(
        system.records)
    shifts = np.tile(shifts, (T_points.size, 1))
    problem = build_problem(setup, T, np.full(T.size, spec.P))
    problem = Problem(problem.A, problem.b, problem.mu0 + shifts[:, problem.keep] / (R * T[:, None]),
                      problem.n_gas, problem.allowed, problem.keep, problem.basis)
    result, certificates = solve(problem, "newton")
    assert np.all(certificates.certified)
    y = np.exp(result.ln_n_gas)
    y /= y.sum(axis=1, keepdims=True)
    names = [system.names[k] for k in problem.keep[: problem.n_gas]]
    return {name: y[:, j].reshape(T_points.size, DRAWS).std(axis=1, ddof=1) for j, name in enumerate(names)}


def test_sweep_uncertainty_columns_match_monte_carlo():
    spec = _reformer(uncertainty=True)
    table = solve_points(spec, 0, spec.n_points)
    sampled = _monte_carlo_mole_fractions(spec)
    for name in GAS:
        assert np.all(table[f"u_y_{name}"] > 0)
        np.testing.assert_allclose(table[f"u_y_{name}"], sampled[name], rtol=0.10, err_msg=name)
    # The same figures as equilibrate's at that point (one formula for both).
    eq = gibbsmin.equilibrate(dict(spec.feed), T=925.0, P=30e5, species=list(GAS), data="atct-anchored",
                              uncertainty=True)
    for name in GAS:
        assert table[f"u_y_{name}"][1] == pytest.approx(eq.mole_fraction_uncertainty[name], rel=1e-6)


def test_no_uncertainty_columns_unless_asked_and_the_fingerprint_says_so():
    plain, asked = _reformer(), _reformer(uncertainty=True)
    assert not any(c.startswith("u_") for c in solve_points(plain, 0, 1).columns)
    assert plain.fingerprint() != asked.fingerprint()
    assert SweepSpec.from_json(asked.to_json()) == asked


def test_sweep_uncertainty_is_refused_clearly_where_it_cannot_be_given():
    with pytest.raises(gibbsmin.InputError, match="data set 'nasa-1993' states no uncertainty.*atct-anchored"):
        _reformer(uncertainty=True, data="nasa-1993")
    with pytest.raises(gibbsmin.InputError, match="ideal gas only"):
        _reformer(uncertainty=True, gas="peng-robinson")
