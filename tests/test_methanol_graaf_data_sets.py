"""Methanol synthesis equilibrium against Graaf et al. (1986), with both data sets.

Source: Graaf, Sijtsema, Stamhuis and Joosten (1986), "Chemical equilibria in
methanol synthesis", Chem. Eng. Sci. 41, 2883-2890: the equilibria
CO + 2 H2 = CH3OH and CO2 + H2 = CO + H2O measured at 10 to 80 bar and 200 to
270 degC and described by ideal-gas constants Kp(T) (with SRK fugacities).

The coefficients are from memory: a search of public pages found the paper's
first page (title, abstract, reaction equations) but not its correlations.
Two forms are used, both from memory, as two independent recollections:

* the two-constant form log10 K = 5139/T - 12.621 (bar^-2) and
  -2073/T + 2.029, the one quoted in test_correlations.py (where a search of
  public code found the same numbers in several implementations citing the paper);
* the full form ln K = (a + b T + c T^2 + d T^3 + e T^4 + f T^5 + g T ln T) / (R T)
  written out below.

The two agree within 0.04 in ln K over 473-573 K
(test_the_two_recollections_agree), which is what a wrong digit in either
would break.  Because both are from memory the tolerances are wide: 0.30 in
ln K for methanol, 0.08 for the reverse shift (those of test_correlations.py).

Which set fits better (measured, largest |ln K_ours - ln K_Graaf| on 473-573 K,
two-constant form; full form in brackets): methanol nasa-1993 +0.248 (+0.211),
atct-anchored +0.194 (+0.157); reverse shift nasa-1993 -0.052 (-0.024),
atct-anchored -0.046 (-0.018).  The anchored data fit both
reactions better; ATcT's CH3OH (-200.70 kJ/mol against NASA's -200.94) closes
a fifth of the methanol gap, which stays 0.19 in ln K (0.8 kJ/mol in delta-r G):
more than ATcT's stated uncertainty (0.09 kJ/mol standard on CH3OH), so the rest
lies in Graaf's 1980s thermochemical data or in our recollection of the fit,
not in today's formation enthalpies.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.optimize import brentq
from test_correlations import METHANOL, REVERSE_SHIFT, graaf_1986_methanol, graaf_1986_reverse_shift

import gibbsmin
from gibbsmin.thermo import R, data_set

DATA_SETS = ("nasa-1993", "atct-anchored")
GRAAF_RANGE = np.arange(473.0, 573.0 + 1e-9, 10.0)  # K; their 200-270 degC with a little margin (from memory)
TOLERANCE = {"methanol": 0.30, "reverse shift": 0.08}  # ln K; from-memory coefficients (module docstring)
REACTIONS = {"methanol": METHANOL, "reverse shift": REVERSE_SHIFT}

# Graaf et al. (1986), full form, from memory: ln K = (sum of terms) / (R T), J/mol, T in K.
_GRAAF_FULL = {
    "methanol": (7.44140e4, 1.89260e2, 3.2443e-2, 7.0432e-6, -5.6053e-9, 1.0344e-12, -6.4364e1),
    "reverse shift": (-3.94121e4, -5.41516e1, -5.5642e-2, 2.5760e-5, -7.6594e-9, 1.0161e-12, 1.8429e1),
}


def graaf_full(reaction: str, T):
    a, b, c, d, e, f, g = _GRAAF_FULL[reaction]
    T = np.asarray(T, dtype=float)
    return (a + b * T + c * T**2 + d * T**3 + e * T**4 + f * T**5 + g * T * np.log(T)) / (R * T)


GRAAF_FORMS = {
    "two-constant": {"methanol": graaf_1986_methanol, "reverse shift": graaf_1986_reverse_shift},
    "full": {"methanol": lambda T: graaf_full("methanol", T), "reverse shift": lambda T: graaf_full("reverse shift", T)},
}


def ln_K(data: str, reaction: dict[str, float], T) -> np.ndarray:
    """ln K of a reaction from a data set's g0/RT, pressures in bar (P0 = 1 bar, Graaf's unit)."""
    names = list(reaction)
    g_RT = data_set(data).nasa7(names).g_RT(np.atleast_1d(np.asarray(T, dtype=float)))
    return -(g_RT @ np.array([reaction[n] for n in names], dtype=float))


def _worst(data: str, reaction: str, form: str) -> float:
    deviation = ln_K(data, REACTIONS[reaction], GRAAF_RANGE) - GRAAF_FORMS[form][reaction](GRAAF_RANGE)
    return float(deviation[np.argmax(np.abs(deviation))])


def test_the_two_recollections_agree():
    # Both forms are Graaf et al.'s (1986) fit of the same data, from memory: they must agree far
    # inside the tolerances used below.  Measured: methanol within 0.040, reverse shift within 0.029.
    for reaction in REACTIONS:
        difference = GRAAF_FORMS["full"][reaction](GRAAF_RANGE) - GRAAF_FORMS["two-constant"][reaction](GRAAF_RANGE)
        assert np.max(np.abs(difference)) < 0.05, reaction


@pytest.mark.parametrize("form", sorted(GRAAF_FORMS))
@pytest.mark.parametrize("reaction", sorted(REACTIONS))
@pytest.mark.parametrize("data", DATA_SETS)
def test_constant_within_tolerance_of_graaf(data, reaction, form):
    worst = _worst(data, reaction, form)
    assert abs(worst) <= TOLERANCE[reaction], f"{data} {reaction} ({form}): ln K off by {worst:+.3f}"


@pytest.mark.parametrize("form", sorted(GRAAF_FORMS))
@pytest.mark.parametrize("reaction", sorted(REACTIONS))
def test_anchored_data_fit_graaf_better(reaction, form):
    # Measured (two-constant form): methanol 0.248 -> 0.194, reverse shift 0.052 -> 0.046;
    # full form: 0.211 -> 0.157 and 0.024 -> 0.018.
    raw, anchored = abs(_worst("nasa-1993", reaction, form)), abs(_worst("atct-anchored", reaction, form))
    assert anchored < raw, (reaction, form, raw, anchored)
    if reaction == "methanol":
        # The anchoring moves methanol's ln K by -0.054 at 523 K (240 J/mol on CH3OH, less CO's 10 J/mol over RT).
        assert raw - anchored > 0.04


def test_methanol_gap_exceeds_the_data_uncertainty():
    # What remains after the anchoring is not within ATcT's stated uncertainty of the three species.
    db = data_set("atct-anchored")
    u = math.sqrt(sum((nu * db[s].hf298_uncertainty) ** 2 for s, nu in METHANOL.items()))
    gap = _worst("atct-anchored", "methanol", "two-constant")
    assert gap * R * 523.0 > 5.0 * u, (gap, u)


# The equilibrium itself: an invented methanol converter feed (our own made-up plant), methane as
# an inert, ideal gas at 50 bar.  The extents that satisfy Graaf's two constants are solved for here
# (a one-unknown root in the methanol extent, the shift's solved in closed form inside it) and
# compared with the whole Gibbs minimisation of each data set.
FEED = {"H2": 0.70, "CO": 0.12, "CO2": 0.06, "H2O": 0.002, "CH3OH": 0.003, "CH4": 0.115}
SPECIES = ["H2", "CO", "CO2", "H2O", "CH3OH", "CH4"]


def _graaf_methanol_fraction(T: float, P_bar: float) -> float:
    """y_CH3OH at the ideal-gas equilibrium of Graaf's two-constant Kp (bar)."""
    K1 = math.exp(graaf_1986_methanol(T))
    K2 = math.exp(graaf_1986_reverse_shift(T))
    n0 = FEED

    def shift_extent(x1):
        # CO2 + H2 = CO + H2O at fixed methanol extent x1: (CO + x2)(H2O + x2) = K2 (CO2 - x2)(H2 - x2),
        # a quadratic in x2 (the total is unchanged by the shift).
        co, h2, co2, w = n0["CO"] - x1, n0["H2"] - 2 * x1, n0["CO2"], n0["H2O"]
        a = 1.0 - K2
        b = co + w + K2 * (co2 + h2)
        c = co * w - K2 * co2 * h2
        roots = np.roots([a, b, c])
        real = [r.real for r in roots if abs(r.imag) < 1e-14 and -min(co, w) < r.real < min(co2, h2)]
        assert len(real) == 1
        return real[0]

    def methanol_residual(x1):
        x2 = shift_extent(x1)
        total = sum(n0.values()) - 2 * x1
        co, h2, m = n0["CO"] - x1 + x2, n0["H2"] - 2 * x1 - x2, n0["CH3OH"] + x1
        return math.log(m * total**2 / (co * h2**2 * P_bar**2)) - math.log(K1)

    x1 = brentq(methanol_residual, -n0["CH3OH"] + 1e-12, min(n0["CO"], n0["H2"] / 2) - 1e-9, xtol=1e-15)
    return (n0["CH3OH"] + x1) / (sum(n0.values()) - 2 * x1)


@pytest.mark.parametrize("T", [493.15, 523.15])
def test_methanol_fraction_against_graaf_and_which_set_fits(T):
    P_bar = 50.0
    reference = _graaf_methanol_fraction(T, P_bar)
    found = {}
    for data in DATA_SETS:
        eq = gibbsmin.equilibrate(FEED, T, P_bar * 1e5, species=SPECIES, inert=["CH4"], data=data)
        assert eq.certificate.certified
        found[data] = eq.mole_fractions["CH3OH"]
    # A 0.30 miss in ln K1 moves y_CH3OH by well under 30 % here (the extent is partly limited by
    # the feed): 25 % relative.  Measured: nasa-1993 +4.9 % and +10.6 %, atct-anchored +3.8 % and
    # +8.3 % at 220 and 250 degC (y_CH3OH from Graaf's constants 0.1415 and 0.0937).
    for data, y in found.items():
        assert y == pytest.approx(reference, rel=0.25), (data, y, reference)
    assert abs(found["atct-anchored"] - reference) < abs(found["nasa-1993"] - reference)
