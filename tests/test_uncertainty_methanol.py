"""Uncertainty of a methanol converter's equilibrium: linear propagation against a 2,000-draw Monte Carlo.

The reference is the Monte Carlo of test_uncertainty.py (every delta-f H(298.15 K)
drawn from a normal distribution with the anchored set's standard uncertainty,
each draw solved in full): common practice (GUM Supplement 1, JCGM 101:2008), no
outside numbers.  2,000 draws give the sampled standard deviation a relative
standard error of 1.6 %, so 10 % is six standard errors.

Methanol is the case where several species' uncertainties meet: CH3OH (90 J/mol),
CO (13), CO2 (7.5) and H2O (13.5) all enter, through two reactions that share
CO and H2.
"""

import pytest
from test_uncertainty import _monte_carlo

from gibbsmin import equilibrate

#: An invented methanol converter feed (our own made-up plant); methane passes through.
FEED = {"H2": 0.70, "CO": 0.12, "CO2": 0.06, "H2O": 0.002, "CH3OH": 0.003, "CH4": 0.115}
SPECIES = ["H2", "CO", "CO2", "H2O", "CH3OH", "CH4"]
CASES = {
    # 250 degC, 50 bar, ideal gas: implicit derivatives
    "methanol ideal": (523.15, 50e5, "ideal"),
    # 240 degC, 80 bar with SRK (Graaf et al.'s own gas model): differences of whole solves
    "methanol SRK": (513.15, 80e5, "srk"),
}


@pytest.mark.parametrize("case", sorted(CASES))
def test_methanol_uncertainty_matches_monte_carlo(case):
    T, P, gas = CASES[case]
    # CH4 is held as an inert in both: with it free to form, methanation would take the whole gas.
    eq = equilibrate(FEED, T=T, P=P, species=SPECIES, inert=["CH4"], gas=gas, data="atct-anchored",
                     uncertainty=True)
    sampled, mean = _monte_carlo(FEED, T, P, SPECIES, gas, inert=["CH4"])
    compared = [s for s in SPECIES if sampled[s] > 1e-12]
    assert set(compared) == {"H2", "CO", "CO2", "H2O", "CH3OH"}
    for name in compared:
        assert eq.uncertainty[name] == pytest.approx(sampled[name], rel=0.10), (name, eq.uncertainty, sampled)
        assert abs(mean[name] - eq.amounts[name]) < 0.2 * sampled[name] + 1e-12
    assert eq.uncertainty["CH4"] == 0.0
    # CH3OH's 90 J/mol moves ln K1 by 90/RT = 0.021; with most of the CO converted, the CO left over
    # takes the relative change (measured 1.2 % ideal, 1.7 % SRK) and the methanol made a fraction
    # of it (0.69 % and 0.33 %).
    relative = {s: eq.uncertainty[s] / eq.amounts[s] for s in ("CO", "CH3OH")}
    assert 0.002 < relative["CH3OH"] < 0.01 < relative["CO"] < 0.025
