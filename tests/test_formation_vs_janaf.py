"""Formation properties against the NIST-JANAF Thermochemical Tables.

Reference: M. W. Chase, Jr., NIST-JANAF Thermochemical Tables, 4th ed.,
J. Phys. Chem. Ref. Data Monograph 9 (1998), columns delta-f H, delta-f G and
log Kf, read through the ``janaf`` package (version 1.4), which ships the
tables as published.  Both the tables and our data use a standard pressure of
1 bar and the same reference states (H2, O2, N2 gas; graphite).

Our polynomials are not fitted to JANAF: they are the NASA TM-4513 fits
(McBride, Gordon and Reno 1993), whose underlying tables for several species
are those of Gurvich, Veyts and Alcock (1989-1991).  Two evaluations of the
same molecules differ by their data, not only by the fit, so the tolerances
below are the measured spread between the two sources plus margin, never
more than a few hundred J/mol.
"""

import math

import numpy as np
import pytest

janaf = pytest.importorskip("janaf")

from gibbsmin import formation_properties  # noqa: E402
from gibbsmin.thermo import R, data_set  # noqa: E402

#: The tolerances below are the measured spread of the NASA polynomials from JANAF: the data set
#: "nasa-1993", named (the default set moves some of these species to ATcT; test_data_sets.py
#: checks that set against JANAF).
NASA = data_set("nasa-1993")

TEMPERATURES = (298.15, 400.0, 500.0, 600.0, 800.0, 1000.0, 1200.0, 1500.0)  # K

# our name -> (formula in the janaf index, phase in the janaf index)
JANAF_KEYS = {
    "H2O": ("H2O", "g"),
    "CO": ("CO", "g"),
    "CO2": ("CO2", "g"),
    "CH4": ("CH4", "g"),
    "NH3": ("H3N", "g"),
    "H2O(l)": ("H2O", "l"),
}

# Tolerances in J/mol, with the highest temperature each applies to, [K].
# H2O, CO, CO2: the NASA data and JANAF agree within 62 J/mol on 298-1500 K,
#   inside JANAF's own stated uncertainty of delta-f H298 (0.04, 0.17 and
#   0.13 kJ/mol; Chase 1998, from memory); 100 J/mol.
# NH3: NASA's cp (Gurvich et al. 1989) is below JANAF's by up to
#   0.75 J/(mol K) at 1500 K, which integrates to -430 J/mol in delta-f H at
#   1500 K; delta-f G, where enthalpy and entropy differences largely cancel,
#   stays within 150 J/mol.  500 J/mol for H, 200 for G.
# CH4: the NASA values start 273 J/mol above JANAF's delta-f H298
#   (-74.60 vs -74.873 kJ/mol; -74.6 is also the CRC Handbook's value and near
#   the Active Thermochemical Tables' -74.5, from memory) and NASA's cp
#   exceeds JANAF's by 1.8 J/(mol K) at 1000 K and 3.5 at 1500 K (CoolProp's
#   ideal-gas methane of Setzmann and Wagner 1991, 72.8 and 89.0 J/(mol K),
#   lies between the two, so the difference is between sources).  Compared within 350 J/mol up
#   to 600 K for H and up to 1000 K for G; the higher temperatures are checked
#   in test_methane_high_temperature_spread with the spread stated there.
# H2O(l): within 10 J/mol of JANAF; compared below 1 bar boiling only.
TOLERANCES = {
    #          dH tol, dH T_max, dG tol, dG T_max
    "H2O": (100.0, 1500.0, 100.0, 1500.0),
    "CO": (100.0, 1500.0, 100.0, 1500.0),
    "CO2": (100.0, 1500.0, 100.0, 1500.0),
    "NH3": (500.0, 1500.0, 200.0, 1500.0),
    "CH4": (350.0, 600.0, 350.0, 1000.0),
    "H2O(l)": (50.0, 360.0, 50.0, 360.0),
}
LIQUID_TEMPERATURES = (298.15, 320.0, 340.0, 360.0)  # K, JANAF rows below 372.78 K

# JANAF prints delta-f H and delta-f G to 1 J/mol and log Kf to 0.001.
JANAF_LOGK_ROUNDING = 0.0005


def _janaf_rows(name, temperatures):
    """JANAF delta-f H, delta-f G [J/mol] and log Kf at the given temperatures."""
    formula, phase = JANAF_KEYS[name]
    frame = janaf.search(formula=f"^{formula}$", phase=f"^{phase}$").df
    rows = frame.filter(frame["T(K)"].is_in(list(temperatures))).sort("T(K)")
    assert rows["T(K)"].to_list() == sorted(temperatures), f"JANAF table of {name} lacks a temperature"
    return (
        rows["delta-f H"].to_numpy() * 1000.0,
        rows["delta-f G"].to_numpy() * 1000.0,
        rows["log Kf"].to_numpy(),
    )


def _cases():
    for name, (h_tol, h_tmax, g_tol, g_tmax) in TOLERANCES.items():
        grid = LIQUID_TEMPERATURES if name == "H2O(l)" else TEMPERATURES
        for T in grid:
            if T <= h_tmax:
                yield pytest.param(name, T, "dH", h_tol, id=f"{name}-dH-{T:g}K")
            if T <= g_tmax:
                yield pytest.param(name, T, "dG", g_tol, id=f"{name}-dG-{T:g}K")


@pytest.fixture(scope="module")
def deviations():
    """Our value minus JANAF's, per species and property, at every tabulated temperature."""
    found = {}
    for name in TOLERANCES:
        grid = LIQUID_TEMPERATURES if name == "H2O(l)" else TEMPERATURES
        T = np.array(sorted(grid))
        dH, dG, logK = _janaf_rows(name, T)
        ours = formation_properties([name], T, db=NASA)
        found[name] = {
            "T": T,
            "dH": ours.dH[:, 0] - dH,
            "dG": ours.dG[:, 0] - dG,
            "log10_Kf": ours.log10_Kf[:, 0] - logK,
        }
    return found


@pytest.mark.parametrize("name, T, quantity, tolerance", list(_cases()))
def test_formation_property_matches_janaf(deviations, name, T, quantity, tolerance):
    table = deviations[name]
    deviation = table[quantity][np.searchsorted(table["T"], T)]
    assert abs(deviation) <= tolerance, f"{name} {quantity} at {T} K: {deviation:+.1f} J/mol from JANAF"


@pytest.mark.parametrize("name, T, quantity, tolerance", [c for c in _cases() if c.values[2] == "dG"])
def test_log10_Kf_matches_janaf(deviations, name, T, quantity, tolerance):
    # The Gibbs tolerance carried over to log10 Kf = -dG/(RT ln 10), plus JANAF's rounding.
    table = deviations[name]
    deviation = table["log10_Kf"][np.searchsorted(table["T"], T)]
    assert abs(deviation) <= tolerance / (R * T * math.log(10.0)) + JANAF_LOGK_ROUNDING


def test_methane_high_temperature_spread(deviations):
    # Above the ranges tested above the NASA and JANAF methane data part further
    # (see TOLERANCES): measured +1.92 kJ/mol in delta-f H and -0.54 kJ/mol in
    # delta-f G at 1500 K.  Bounding the spread still catches a loader fault,
    # which would move these by tens of kJ/mol.
    table = deviations["CH4"]
    hot = table["T"] > 600.0
    assert np.all(np.abs(table["dH"][hot]) <= 2500.0)
    hot = table["T"] > 1000.0
    assert np.all(np.abs(table["dG"][hot]) <= 800.0)


def test_worst_deviations_are_printed(deviations, capsys):
    lines = []
    for name, table in deviations.items():
        h_tol, h_tmax, g_tol, g_tmax = TOLERANCES[name]
        in_h = table["T"] <= h_tmax
        in_g = table["T"] <= g_tmax
        worst_h = np.max(np.abs(table["dH"][in_h]))
        worst_g = np.max(np.abs(table["dG"][in_g]))
        lines.append(f"{name:7s} |dH| <= {worst_h:6.1f} J/mol (to {h_tmax:g} K), |dG| <= {worst_g:6.1f} J/mol (to {g_tmax:g} K)")
        assert worst_h <= h_tol and worst_g <= g_tol
    with capsys.disabled():
        print("\nworst deviations from NIST-JANAF:\n  " + "\n  ".join(lines))


# Methanol is not in the JANAF tables.  At 298.15 K:
#   delta-f G = -162.3 kJ/mol and delta-f H = -201.0 kJ/mol: CRC Handbook of
#   Chemistry and Physics, "Standard thermodynamic properties of chemical
#   substances" (from memory); tolerance 1 kJ/mol, as the compilations spread
#   by that much (ATcT gives -200.7 kJ/mol for delta-f H).
METHANOL_298 = {"dG": -162.3e3, "dH": -201.0e3}  # J/mol, CRC (from memory)


@pytest.mark.parametrize("quantity", ["dG", "dH"])
def test_methanol_formation_at_298K(quantity):
    ours = formation_properties(["CH3OH"], [298.15], db=NASA)
    value = getattr(ours, quantity)[0, 0]
    assert value == pytest.approx(METHANOL_298[quantity], abs=1000.0)


def test_methanol_formation_from_chemicals_data():
    # Independent of the NASA data: delta-f G298 = delta-f H - T delta-f S, with
    # delta-f H from the Active Thermochemical Tables (Ruscic et al., via the
    # `chemicals` package, method ATCT_G), S0 of CH3OH(g) from the CRC Handbook
    # (via `chemicals`, method CRC), and S0 of the elements C(graphite) 5.74,
    # H2 130.680, O2 205.152 J/(mol K) from the CODATA Key Values (Cox, Wagman
    # and Medvedev 1989, from memory).  Tolerance 500 J/mol: the CRC S0 is given
    # to 0.1 J/(mol K) (30 J/mol) and the ATcT and NASA delta-f H differ by 240 J/mol.
    from chemicals.reaction import Hfg, S0g

    T = 298.15
    dH = Hfg("67-56-1", method="ATCT_G")
    dS = S0g("67-56-1", method="CRC") - (5.74 + 2 * 130.680 + 0.5 * 205.152)
    ours = formation_properties(["CH3OH"], [T], db=NASA)
    assert ours.dG[0, 0] == pytest.approx(dH - T * dS, abs=500.0)
    assert ours.dH[0, 0] == pytest.approx(dH, abs=500.0)
