"""Uncertainty of an equilibrium with a reaction held at an approach, against Monte Carlo.

Each of 2,000 draws shifts every species' delta-f H(298.15 K) by a normal
deviate of the data set's standard uncertainty, and builds that draw's own
restricted problem from the definition: g0/RT moved by dH/RT, and the held
reaction's offsets for K'(T_r) of the shifted data (ln K' = ln K - nu.dH/RT at
each temperature).  Every draw is solved in full; the held reaction's quotient
of each answer is checked to be that draw's K'(T_r).  The standard deviations
are the reference: common practice (GUM Supplement 1, JCGM 101:2008), no
outside numbers; 10 % is six standard errors of a 2,000-draw standard deviation.
"""

import numpy as np
import pytest

import gibbsmin
from gibbsmin import equilibrate_with_approach
from gibbsmin.reactions import independent_reactions, reaction
from gibbsmin.restricted import reaction_offsets, settling_temperature
from gibbsmin.fixed_step import build_problem, prepare
from gibbsmin.solve import solve
from gibbsmin.system import Problem
from gibbsmin.thermo import R, data_set
from gibbsmin.uncertainty import formation_uncertainties

DRAWS = 2000
GAS = ["CH4", "H2O", "CO", "CO2", "H2"]
# invented reformer outlet: S/C 3 at 850 degC, 30 bar, methane reforming held 10 K short of equilibrium
FEED, T, P, HELD = {"CH4": 1.0, "H2O": 3.0}, 1123.15, 30e5, {"steam methane reforming": 10.0}


def _monte_carlo():
    db = data_set("atct-anchored")
    setup = prepare(FEED, species=GAS, T_span=(T, T), db=db)
    system = setup.system
    held = [(reaction(name, db=db), dT) for name, dT in HELD.items()]
    complete = independent_reactions(system, include=[rx for rx, _ in held], db=db)
    rng = np.random.default_rng(9)
    shifts = rng.normal(size=(DRAWS, len(system.names))) * formation_uncertainties(system.records)
    ln_K_shift = np.zeros((len(complete), DRAWS))
    settle_at = {}
    for rx, dT in held:
        k = [r.name for r in complete].index(rx.name)
        T_r = settle_at[rx.name] = settling_temperature(rx, T, dT)
        moved = shifts @ rx.vector(system.names)  # nu . dH per draw, J/mol
        ln_K_shift[k] = (rx.ln_K(T) - moved / (R * T)) - (rx.ln_K(T_r) - moved / (R * T_r))
    offsets = reaction_offsets(system, complete, ln_K_shift).T + shifts / (R * T)
    problem = build_problem(setup, np.full(DRAWS, T), np.full(DRAWS, P))
    problem = Problem(problem.A, problem.b, problem.mu0 + offsets[:, problem.keep], problem.n_gas, problem.allowed,
                      problem.keep, problem.basis)
    result, certificates = solve(problem, "newton")
    assert np.all(certificates.certified)
    n = np.exp(result.ln_n_gas)
    names = [system.names[k] for k in problem.keep]
    # Each draw's reforming quotient is its own K'(T_r) (ideal gas, pressures over 1 bar).
    rx = held[0][0]
    y = n / n.sum(axis=1, keepdims=True)
    nu = np.array([rx.stoichiometry.get(s, 0.0) for s in names])
    ln_Q = (np.log(y * P / 1e5) * nu).sum(axis=1)
    T_r = settle_at[rx.name]
    np.testing.assert_allclose(ln_Q, rx.ln_K(T_r) - shifts @ rx.vector(system.names) / (R * T_r), atol=1e-8)
    return {s: n[:, j].std(ddof=1) for j, s in enumerate(names)}


def test_held_approach_uncertainty_matches_monte_carlo():
    eq = equilibrate_with_approach(FEED, T, P, HELD, species=GAS, data="atct-anchored", uncertainty=True)
    sampled = _monte_carlo()
    for name in GAS:
        assert eq.uncertainty[name] == pytest.approx(sampled[name], rel=0.10), (name, eq.uncertainty, sampled)
    # The held reaction's data move its K(T_r) as well as K(T): without that, the figures would differ.
    plain = gibbsmin.equilibrate(FEED, T=T, P=P, species=GAS, data="atct-anchored", uncertainty=True)
    assert eq.uncertainty["CH4"] != pytest.approx(plain.uncertainty["CH4"], rel=0.01)


def test_held_approach_uncertainty_with_a_cubic_agrees_with_the_ideal_gas_at_low_pressure():
    # At 1 bar Peng-Robinson's phi are within a fraction of a per cent of 1: differences of whole solves
    # with the cubic and the ideal gas's implicit derivatives must give the same figures.
    ideal = equilibrate_with_approach(FEED, T, 1e5, HELD, species=GAS, data="atct-anchored", uncertainty=True)
    cubic = equilibrate_with_approach(FEED, T, 1e5, HELD, species=GAS, data="atct-anchored", uncertainty=True,
                                      gas="peng-robinson")
    for name in GAS:
        assert cubic.uncertainty[name] == pytest.approx(ideal.uncertainty[name], rel=0.02), name


def test_held_approach_uncertainty_with_an_energy_balance_is_refused_clearly():
    with pytest.raises(gibbsmin.InputError, match="fixed outlet temperature"):
        equilibrate_with_approach(FEED, None, P, HELD, species=GAS, T_feed=900.0, adiabatic=True,
                                  data="atct-anchored", uncertainty=True)
