"""Methanol synthesis at 50 to 100 bar: the answer's fugacity quotients, against our data and Graaf et al.

Graaf, Sijtsema, Stamhuis and Joosten (1986), Chem. Eng. Sci. 41, 2883,
measured the two equilibria CO + 2 H2 = CH3OH and CO2 + H2 = CO + H2O at
10 to 80 bar and 200 to 270 degC, and found them described by ideal-gas
equilibrium constants written with fugacities f_i = phi_i y_i P, the phi from
the Soave-Redlich-Kwong equation of state (their abstract).  Their constants
(log10 K = 5139/T - 12.621 and -2073/T + 2.029, as quoted in the issue, from
memory) and the tolerances on ln K that cover the spread of thermochemical
compilations are those of test_correlations.py, which also shows that our K
for the methanol reaction sits 0.23 to 0.25 in ln K above Graaf's with the NASA
data (their stated scatter we could not read); with the default data set used
here, "atct-anchored", 0.17 to 0.19 (test_methanol_graaf_data_sets.py).

Here: (1) the non-ideal answer's fugacity quotients equal the K of our data
to 1e-8 (internal; phi recomputed from the answer), and (2) read the same
way, they match Graaf's correlations within those tolerances, while the same
answer's partial-pressure quotient (phi left out) misses Graaf's methanol
constant by more, at 80 and 100 bar: the fugacity correction is what their
description needs.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from test_correlations import CORRELATIONS, graaf_1986_methanol, graaf_1986_reverse_shift

import gibbsmin
from gibbsmin.eos import gas_model_for_species

DB = gibbsmin.default_database()
BAR = 1e5  # Pa; the NASA data's reference pressure and Graaf's unit

#: An invented methanol-loop converter inlet (our own made-up plant); CH4 and N2 pass through.
FEED = {"H2": 0.68, "CO": 0.11, "CO2": 0.07, "H2O": 0.001, "CH3OH": 0.004, "CH4": 0.09, "N2": 0.045}
SPECIES = list(FEED)
INERT = ["CH4", "N2"]

#: Reactions as stoichiometric coefficients.
METHANOL = {"CO": -1, "H2": -2, "CH3OH": 1}
REVERSE_SHIFT = {"CO2": -1, "H2": -1, "CO": 1, "H2O": 1}


def _ln_K_data(reaction, T):
    """ln K from the NASA-7 data we ship: -sum nu_j g0_j/RT (standard state 1 bar)."""
    names = list(reaction)
    g = DB.nasa7(names).g_RT(np.array(T))
    return -float(sum(reaction[n] * g[i] for i, n in enumerate(names)))


def _ln_quotients(eq, gas):
    """ln of the fugacity and of the partial-pressure quotients of both reactions, phi from the answer."""
    y = eq.mole_fractions
    described = [s for s in SPECIES if DB[s].critical is not None]
    y_vector = np.array([y[s] for s in described])
    ln_phi = dict(zip(described, gas_model_for_species(gas, described).ln_phi(eq.T, eq.P, y_vector / y_vector.sum())))
    out = {}
    for label, reaction in (("methanol", METHANOL), ("reverse shift", REVERSE_SHIFT)):
        ln_Qp = sum(nu * math.log(y[s] * eq.P / BAR) for s, nu in reaction.items())
        ln_Qf = ln_Qp + sum(nu * ln_phi[s] for s, nu in reaction.items())
        out[label] = (ln_Qf, ln_Qp)
    return out


CONDITIONS = [(T, P) for T in (483.15, 523.15) for P in (50e5, 80e5, 100e5)]


@pytest.mark.parametrize("gas", ["srk", "peng-robinson"])
@pytest.mark.parametrize(("T", "P"), CONDITIONS, ids=[f"{T:.0f}K-{P / 1e5:.0f}bar" for T, P in CONDITIONS])
def test_fugacity_quotients_equal_the_data_constants(gas, T, P, solver):
    # Internal, common practice (no source): at equilibrium prod (phi_i y_i P/P0)^nu_i = K(T).
    eq = gibbsmin.equilibrate(FEED, T, P, species=SPECIES, inert=INERT, gas=gas, method=solver)
    assert eq.certificate.certified
    quotients = _ln_quotients(eq, gas)
    assert quotients["methanol"][0] == pytest.approx(_ln_K_data(METHANOL, T), abs=1e-8)
    assert quotients["reverse shift"][0] == pytest.approx(_ln_K_data(REVERSE_SHIFT, T), abs=1e-8)
    # The correction is not negligible here (so the check above could fail): |ln Kphi| > 0.05.
    assert abs(quotients["methanol"][0] - quotients["methanol"][1]) > 0.05


@pytest.mark.parametrize(("T", "P"), CONDITIONS, ids=[f"{T:.0f}K-{P / 1e5:.0f}bar" for T, P in CONDITIONS])
def test_srk_answer_read_as_graaf_did(T, P, solver):
    # Source: Graaf et al. (1986) correlations with SRK fugacities; tolerances of test_correlations.py.
    eq = gibbsmin.equilibrate(FEED, T, P, species=SPECIES, inert=INERT, gas="srk", method=solver)
    quotients = _ln_quotients(eq, "srk")
    methanol_tolerance = CORRELATIONS["Graaf 1986 methanol"][3]
    shift_tolerance = CORRELATIONS["Graaf 1986 reverse shift"][3]
    ln_Qf, ln_Qp = quotients["methanol"]
    assert abs(ln_Qf - graaf_1986_methanol(T)) < methanol_tolerance
    assert abs(quotients["reverse shift"][0] - graaf_1986_reverse_shift(T)) < shift_tolerance
    print(f"\n{T:.0f} K {P / 1e5:.0f} bar: ln Q_f - ln K_Graaf = {ln_Qf - graaf_1986_methanol(T):+.3f}, "
          f"ln Q_p - ln K_Graaf = {ln_Qp - graaf_1986_methanol(T):+.3f} (methanol); "
          f"{quotients['reverse shift'][0] - graaf_1986_reverse_shift(T):+.3f} (reverse shift); "
          f"y_CH3OH = {eq.mole_fractions['CH3OH']:.4f}")
    if P >= 80e5:
        # Without phi the same answer's quotient misses Graaf's constant by more than the tolerance.
        assert abs(ln_Qp - graaf_1986_methanol(T)) > methanol_tolerance


def test_real_gas_makes_more_methanol_than_the_ideal_gas(solver):
    # Common practice, no source: methanol's fugacity coefficient is well below one at 100 bar,
    # so a real gas carries more of it at equilibrium (Le Chatelier on the fugacities).
    real = gibbsmin.equilibrate(FEED, 523.15, 100e5, species=SPECIES, inert=INERT, gas="srk", method=solver)
    ideal = gibbsmin.equilibrate(FEED, 523.15, 100e5, species=SPECIES, inert=INERT, method=solver)
    assert real.extras["fugacity_coefficients"]["CH3OH"] < 0.9
    assert real.mole_fractions["CH3OH"] > 1.02 * ideal.mole_fractions["CH3OH"]
