"""Equilibrium constants from the engine's own data against published correlations.

K(T) = exp(-sum_j nu_j g0_j(T)/RT) with g0 from the shipped NASA-7 polynomials,
partial pressures in bar (the data's reference pressure P0 = 1 bar).  Each
correlation is compared over the temperature range it was fitted for, as the
largest |ln K_ours - ln K_correlation| on a 10 K grid; ln K differences are
relative differences of K (0.05 in ln K is 5 % in K) and, times RT, a
difference in the reaction's standard Gibbs energy.

The printed forms of the correlations are as quoted in the issue, from memory
(not read from the papers).  A search of public code found the same printed
forms of Moe, Xu and Froment and Gillespie and Beattie in several independent
implementations that cite those papers, and Graaf et al.'s pair
log10 K = 3066/T - 10.592 (CO2 + 3 H2 = CH3OH + H2O) and -2073/T + 2.029; the
quoted methanol form is their difference (5139 = 3066 + 2073, -12.621 =
-10.592 - 2.029).  That confirms the quotation, not the papers themselves.

Where a correlation disagrees with our data by more than the spread of the
thermochemical compilations, the test below it compares our K with an
independent compilation as well (enthalpies of formation from the Active
Thermochemical Tables, entropies from the CRC Handbook, ideal-gas heat
capacities from the ``thermo`` package), to show on which side the difference
lies.

The last group checks that an equilibrate() answer reproduces these K through
its own partial pressures: an internal consistency check, source-free.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

import gibbsmin
from gibbsmin.thermo import R, data_set

#: The NASA polynomials as published: every measured figure below is theirs (the default data set,
#: "atct-anchored", is checked against Graaf et al. in test_methanol_graaf_data_sets.py).
DB = data_set("nasa-1993")
LN10 = math.log(10.0)
ATM_IN_BAR = 1.01325  # bar per standard atmosphere (exact by definition)

SHIFT = {"CO": -1, "H2O": -1, "CO2": 1, "H2": 1}                # CO + H2O = CO2 + H2
REFORMING = {"CH4": -1, "H2O": -1, "CO": 1, "H2": 3}            # CH4 + H2O = CO + 3 H2
AMMONIA = {"N2": -0.5, "H2": -1.5, "NH3": 1}                    # 1/2 N2 + 3/2 H2 = NH3
METHANOL = {"CO": -1, "H2": -2, "CH3OH": 1}                     # CO + 2 H2 = CH3OH
REVERSE_SHIFT = {"CO2": -1, "H2": -1, "CO": 1, "H2O": 1}        # CO2 + H2 = CO + H2O
METHANATION = {"CO": -1, "H2": -3, "CH4": 1, "H2O": 1}          # CO + 3 H2 = CH4 + H2O


def ln_K(reaction: dict[str, float], T) -> np.ndarray:
    """ln K of a reaction from the engine's g0/RT, pressures in bar."""
    names = list(reaction)
    g_RT = DB.nasa7(names).g_RT(np.atleast_1d(np.asarray(T, dtype=float)))
    return -(g_RT @ np.array([reaction[n] for n in names], dtype=float))


def moe_1962(T):
    # Moe (1962), water-gas shift: K = exp(4577.8/T - 4.33), dimensionless.
    # As quoted in the issue, from memory.
    return 4577.8 / T - 4.33


def xu_froment_1989_shift(T):
    # Xu and Froment (1989), AIChE J. 35, 88: K_WGS = exp(4400/T - 4.036).
    # As quoted in the issue, from memory.
    return 4400.0 / T - 4.036


def xu_froment_1989_reforming(T):
    # Xu and Froment (1989), AIChE J. 35, 88: K_SMR = exp(-26830/T + 30.114), bar^2.
    # As quoted in the issue, from memory.
    return -26830.0 / T + 30.114


def gillespie_beattie_1930(T):
    # Gillespie and Beattie (1930), Phys. Rev. 36, 743, for 1/2 N2 + 3/2 H2 = NH3:
    # log10 Ka = -2.691122 log10 T - 5.519265e-5 T + 1.848863e-7 T^2 + 2001.6/T + 2.6899,
    # Ka in atm^-1 (as quoted in the issue, from memory).  With p/bar = 1.01325 p/atm
    # and sum(nu) = -1, K_bar = K_atm / 1.01325.
    log10_Ka = (-2.691122 * np.log10(T) - 5.519265e-5 * T + 1.848863e-7 * T**2
                + 2001.6 / T + 2.6899)
    return LN10 * log10_Ka - math.log(ATM_IN_BAR)


def graaf_1986_methanol(T):
    # Graaf, Sijtsema, Stamhuis and Joosten (1986), Chem. Eng. Sci. 41, 2883:
    # log10 K = 5139/T - 12.621 for CO + 2 H2 = CH3OH, bar^-2 (as quoted in the issue, from memory).
    return LN10 * (5139.0 / T - 12.621)


def graaf_1986_reverse_shift(T):
    # Graaf et al. (1986), as above: log10 K = -2073/T + 2.029 for CO2 + H2 = CO + H2O.
    return LN10 * (-2073.0 / T + 2.029)


# (reaction, correlation, fitted range [K], tolerance on ln K, why that tolerance)
CORRELATIONS = {
    # Moe's form has a constant reaction enthalpy; over 500-800 K the shift's
    # enthalpy changes by 3.0 kJ/mol, so the best such line through our
    # own K already misses it by 0.023 in ln K.  The compilations' enthalpies
    # of formation of CO, CO2 and H2O carry about 0.25 kJ/mol together (JANAF's
    # stated uncertainties, see test_formation_vs_janaf.py), 0.06 in ln K at
    # 500 K.  Tolerance 0.12 (12 % in K).  Measured: +0.095 at 500 K, +0.03 to
    # +0.05 from 600 to 800 K.
    "Moe 1962 shift": (SHIFT, moe_1962, (500.0, 800.0), 0.12),
    # Xu and Froment fitted reformer conditions; tested over 700-1100 K.
    # Same two-constant form: the best such line through our own K misses it
    # by 0.022 in ln K over this range for the shift, 0.034 for reforming.  Tolerance
    # 0.05 (5 % in K).  Measured: shift -0.025 to +0.023, reforming -0.028 to +0.018.
    "Xu-Froment 1989 shift": (SHIFT, xu_froment_1989_shift, (700.0, 1100.0), 0.05),
    "Xu-Froment 1989 reforming": (REFORMING, xu_froment_1989_reforming, (700.0, 1100.0), 0.05),
    # Fitted to ammonia equilibria measured at 300-500 degC (573-773 K, from
    # memory).  The compilations disagree on delta-f H298 of NH3: -45.94 kJ/mol
    # in the NASA data we ship, -45.56 kJ/mol in the Active Thermochemical
    # Tables (via `chemicals`), 0.38 kJ/mol or 0.08 in ln K at 573 K; the
    # correlation sits nearer the latter.  Tolerance 0.12.  Measured: +0.066
    # (773 K) to +0.105 (573 K), our K the larger.
    "Gillespie-Beattie 1930 ammonia": (AMMONIA, gillespie_beattie_1930, (573.0, 773.0), 0.12),
    # Graaf et al. measured at 473-573 K (from memory).  Shift data are the
    # best known of all (see the first entry): tolerance 0.08.  Measured: -0.046 to -0.052.
    "Graaf 1986 reverse shift": (REVERSE_SHIFT, graaf_1986_reverse_shift, (473.0, 573.0), 0.08),
    # Investigated before setting a tolerance: our K is 26-28 % above the
    # quoted correlation all over 473-573 K (ln K +0.23 to +0.25, 1.1 kJ/mol in
    # delta-r G).  Not units: an atm/bar mix-up would move ln K by
    # 2 ln 1.01325 = 0.026, log10/ln by a factor 2.3.  Not our data: the
    # independent compilation in test_methanol_constant_matches_independent_data
    # agrees with ours within 0.05 in ln K.  So the quoted correlation itself
    # sits 1.1 kJ/mol from today's data (or the form used in public code is
    # off: to be read against the paper).  Tolerance 0.30, which still catches a sign or
    # unit error in the data; the measured offset is asserted separately below.
    "Graaf 1986 methanol": (METHANOL, graaf_1986_methanol, (473.0, 573.0), 0.30),
}


def _worst_deviation(name: str) -> tuple[float, float]:
    """Largest |ln K_ours - ln K_correlation| over the fitted range, and where [K]."""
    reaction, correlation, (T_lo, T_hi), _ = CORRELATIONS[name]
    T = np.arange(T_lo, T_hi + 1e-9, 10.0)
    deviation = ln_K(reaction, T) - correlation(T)
    worst = int(np.argmax(np.abs(deviation)))
    return float(deviation[worst]), float(T[worst])


@pytest.mark.parametrize("name", list(CORRELATIONS))
def test_equilibrium_constant_matches_correlation(name):
    tolerance = CORRELATIONS[name][3]
    deviation, T = _worst_deviation(name)
    print(f"{name}: worst ln K difference {deviation:+.4f} at {T:g} K (K ratio {math.exp(deviation):.4f})")
    assert abs(deviation) <= tolerance, f"{name}: ln K off by {deviation:+.4f} at {T:g} K"


def test_methanol_offset_from_graaf_is_the_measured_one():
    # The disagreement described above, pinned so that a change in the
    # methanol data shows up here: ln K_ours - ln K_Graaf between +0.20 and +0.28
    # on all of 473-573 K.
    T = np.arange(473.0, 574.0, 10.0)
    deviation = ln_K(METHANOL, T) - graaf_1986_methanol(T)
    assert np.all((deviation > 0.20) & (deviation < 0.28))


# An independent compilation: delta-f H298 from the Active Thermochemical
# Tables (Ruscic et al., via `chemicals`, method ATCT_G), S0 298 from the CRC
# Handbook (via `chemicals`, method CRC), ideal-gas cp(T) from the `thermo`
# package's default correlations; delta-r G(T) by Kirchhoff integration.
CAS = {"CO": "630-08-0", "H2": "1333-74-0", "CH3OH": "67-56-1", "N2": "7727-37-9",
       "NH3": "7664-41-7", "CO2": "124-38-9", "H2O": "7732-18-5"}


def _independent_ln_K(reaction: dict[str, float], T: float) -> float:
    reaction_data = pytest.importorskip("chemicals.reaction")
    thermo = pytest.importorskip("thermo")
    from scipy.integrate import quad

    heat_capacities = {s: thermo.HeatCapacityGas(CASRN=CAS[s]) for s in reaction}

    def delta_cp(t):
        return sum(nu * heat_capacities[s].T_dependent_property(t) for s, nu in reaction.items())

    T0 = 298.15
    dH0 = sum(nu * reaction_data.Hfg(CAS[s], method="ATCT_G") for s, nu in reaction.items())
    dS0 = sum(nu * reaction_data.S0g(CAS[s], method="CRC") for s, nu in reaction.items())
    dH = dH0 + quad(delta_cp, T0, T)[0]
    dS = dS0 + quad(lambda t: delta_cp(t) / t, T0, T)[0]
    return -(dH - T * dS) / (R * T)


@pytest.mark.parametrize("reaction_name, reaction", [("methanol", METHANOL), ("ammonia", AMMONIA)])
@pytest.mark.parametrize("T", [500.0, 523.0, 573.0, 700.0])
def test_constant_matches_independent_data(reaction_name, reaction, T):
    # The compilations' enthalpies of formation spread by up to 0.4 kJ/mol for
    # these molecules (NH3: NASA -45.94, ATcT -45.56 kJ/mol; CH3OH: NASA
    # -200.94, ATcT -200.70 kJ/mol), so 500 J/mol on delta-r G.  Measured:
    # methanol 220 J/mol, ammonia 370 J/mol at 500 K, both ours the larger K.
    difference = (ln_K(reaction, T)[0] - _independent_ln_K(reaction, T)) * R * T
    assert abs(difference) <= 500.0, f"{reaction_name} at {T:g} K: delta-r G off by {difference:+.0f} J/mol"


# Internal consistency (source-free): at an equilibrate() answer the quotient
# of partial pressures (bar) of every independent reaction equals K from the data.
CONSISTENCY_CASES = [
    # feed [mol], T [K], P [Pa], species set, reactions
    ({"CH4": 1.0, "H2O": 3.0}, 900.0, 20e5, ["CH4", "H2O", "CO", "CO2", "H2"], [SHIFT, REFORMING, METHANATION]),
    ({"N2": 1.0, "H2": 3.0}, 700.0, 50e5, ["N2", "H2", "NH3"], [AMMONIA]),
    ({"CO": 1.0, "CO2": 0.3, "H2": 3.0}, 523.0, 50e5, ["CO", "CO2", "H2", "H2O", "CH3OH"],
     [METHANOL, REVERSE_SHIFT]),
]


@pytest.mark.parametrize("method", ["newton", "convex"])
@pytest.mark.parametrize("feed, T, P, species, reactions", CONSISTENCY_CASES,
                         ids=["reforming", "ammonia", "methanol"])
def test_answer_quotients_equal_data_constants(feed, T, P, species, reactions, method):
    eq = gibbsmin.equilibrate(feed, T, P, species=species, method=method, data="nasa-1993")
    p_bar = {s: p / 1e5 for s, p in eq.partial_pressures.items()}
    for reaction in reactions:
        ln_Q = sum(nu * math.log(p_bar[s]) for s, nu in reaction.items())
        # 1e-8 relative on K is 1e-8 on ln K.
        assert ln_Q == pytest.approx(ln_K(reaction, T)[0], abs=1e-8), reaction
