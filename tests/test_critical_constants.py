"""Critical constants of the shipped gases against a standard compilation.

Reference: B. E. Poling, J. M. Prausnitz and J. P. O'Connell, The Properties
of Gases and Liquids, 5th ed., McGraw-Hill (2001), Appendix A, section A
(Tc [K], Pc [bar], omega [-]).  All values below are from memory.

Our values come from other compilations (IUPAC series, Mathews 1972, PSRK
2005, via the chemicals package; see species/SOURCES.md), so agreement is
within the spread between compilations, not exact: 1% for Tc and Pc, 0.02 for
omega (differences in the vapour-pressure data behind each omega).
"""

import pytest

from gibbsmin.thermo import default_database

TC_RTOL = 0.01
PC_RTOL = 0.01
OMEGA_ATOL = 0.02

# name: (Tc [K], Pc [bar], omega [-]), Poling et al. 2001, Appendix A (from memory)
POLING_2001 = {
    "CH4": (190.56, 45.99, 0.011),
    "N2": (126.20, 33.98, 0.037),
    "H2": (33.19, 13.13, -0.216),
    "O2": (154.58, 50.43, 0.022),
    "Ar": (150.86, 48.98, -0.002),
    "He": (5.19, 2.27, -0.390),
    "CO": (132.85, 34.94, 0.045),
    "CO2": (304.12, 73.74, 0.225),
    "H2O": (647.14, 220.64, 0.344),
    "NH3": (405.40, 113.53, 0.257),
    "CH3OH": (512.64, 80.97, 0.565),
    "C2H5OH": (513.92, 61.48, 0.649),
    "C2H6": (305.32, 48.72, 0.099),
    "C2H4": (282.34, 50.41, 0.087),
    "C3H8": (369.83, 42.48, 0.152),
    "nC4H10": (425.12, 37.96, 0.200),
    "nC5H12": (469.70, 33.70, 0.252),
    "C6H6": (562.05, 48.95, 0.210),
    "H2S": (373.40, 89.63, 0.090),
    "SO2": (430.80, 78.84, 0.245),
}

# Hydrogen: Poling's Pc of 13.13 bar is 1.2% above our Mathews value of
# 12.97 bar.  The modern value for normal hydrogen, Pc = 1.2964 MPa and
# Tc = 33.145 K (Leachman, Jacobsen, Penoncello and Lemmon, J. Phys. Chem.
# Ref. Data 38 (2009) 721, from memory), sides with ours; Poling's is held to
# 1.5% and Leachman's to 0.1%.
PC_RTOL_BY_SPECIES = {"H2": 0.015}
LEACHMAN_2009_H2 = {"Tc": 33.145, "Pc": 1.2964e6}  # K, Pa (from memory)


@pytest.mark.parametrize("name", sorted(POLING_2001))
def test_critical_constants_match_poling(name):
    Tc, Pc_bar, omega = POLING_2001[name]
    critical = default_database()[name].critical
    assert critical is not None, f"{name} carries no critical constants"
    assert critical.Tc == pytest.approx(Tc, rel=TC_RTOL)
    # Our files store Pc in Pa.
    assert critical.Pc == pytest.approx(Pc_bar * 1e5, rel=PC_RTOL_BY_SPECIES.get(name, PC_RTOL))
    assert critical.omega == pytest.approx(omega, abs=OMEGA_ATOL)


def test_hydrogen_critical_point_matches_leachman():
    critical = default_database()["H2"].critical
    assert critical.Tc == pytest.approx(LEACHMAN_2009_H2["Tc"], rel=0.002)
    assert critical.Pc == pytest.approx(LEACHMAN_2009_H2["Pc"], rel=0.001)


def test_critical_constants_are_physical():
    # Every stored set: Tc above 5 K and below 1000 K, Pc between 1 bar and
    # 300 bar, omega between -0.4 and 1 (the span of Poling's Appendix A for
    # small molecules; common practice, no source).
    for record in default_database():
        c = record.critical
        if c is None:
            continue
        assert 5.0 < c.Tc < 1000.0, record.name
        assert 1e5 < c.Pc < 3e7, record.name
        assert -0.4 < c.omega < 1.0, record.name
