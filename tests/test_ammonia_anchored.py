"""Ammonia from 3:1 H2:N2 with the re-anchored data against Larson and Dodge (1923) and Larson (1924).

The measured points and their sources are those of test_ammonia_experiment.py
(Larson and Dodge 1923, J. Am. Chem. Soc. 45, 2918, 10 to 100 atm; Larson 1924,
J. Am. Chem. Soc. 46, 367, 300 atm; the 30 and 50 atm points and 450 degC, 10 atm
from memory, as that module says), imported from there, not copied.

With the NASA data the cubic is 0.2 to 0.8 mol% high at 10 to 50 atm, where the
gas is nearly ideal: the NASA enthalpy of formation of NH3 is 0.38 kJ/mol below
ATcT 1.112's.  With the data set "atct-anchored" Peng-Robinson falls within
0.15 mol% at every point from 10 to 50 atm, 400 to 500 degC (measured: within
0.07).  At 300 atm the anchoring moves the cubic's answer down by about 1.3 mol%
at each temperature, which helps at 400 degC and hurts at 500 degC (see
test_ammonia_experiment.py for the cubic's own temperature trend); run with -s
for the whole table with raw and anchored data side by side.
"""

from __future__ import annotations

import pytest
from test_ammonia_experiment import ALL_POINTS, ATM

import gibbsmin

FEED = {"H2": 3.0, "N2": 1.0}
#: Points where the gas is nearly ideal and the data decide: 10 to 50 atm, 400 to 500 degC.
LOW_PRESSURE = [p for p in ALL_POINTS if p[1] <= 50.0 and 400.0 <= p[0] <= 500.0]
TOLERANCE = 0.15  # mol%, absolute (the figure)


def _mol_percent(T_C, P_atm, gas, data, uncertainty=False):
    eq = gibbsmin.equilibrate(FEED, T_C + 273.15, P_atm * ATM, gas=gas, data=data, uncertainty=uncertainty)
    y = 100.0 * eq.mole_fractions["NH3"]
    if not uncertainty:
        return y, None
    # Standard uncertainty of y_NH3 from that of n_NH3 (the total moves by -n_NH3, so
    # dy/dn_NH3 = (N + n_NH3) / N^2 with N the gas total).
    N = eq.gas_amount
    return y, 100.0 * eq.uncertainty["NH3"] * (N + eq.amounts["NH3"]) / N**2


@pytest.fixture(scope="module")
def table():
    rows = []
    for T_C, P_atm, measured in sorted(ALL_POINTS):
        pr_raw, _ = _mol_percent(T_C, P_atm, "peng-robinson", "nasa-1993")
        pr_new, u = _mol_percent(T_C, P_atm, "peng-robinson", "atct-anchored", uncertainty=True)
        srk_raw, _ = _mol_percent(T_C, P_atm, "srk", "nasa-1993")
        srk_new, _ = _mol_percent(T_C, P_atm, "srk", "atct-anchored")
        rows.append((T_C, P_atm, measured, pr_raw, pr_new, u, srk_raw, srk_new))
    print("\nNH3 mol% at equilibrium, 3:1 H2:N2, measured (Larson and Dodge 1923; Larson 1924) against "
          "Peng-Robinson and SRK with the NASA data (nasa-1993) and the ATcT-anchored data")
    print(f"{'T/degC':>6} {'P/atm':>6} {'meas.':>6} | {'PR nasa':>8} {'(off)':>6} | {'PR atct':>8} {'+/-':>5} "
          f"{'(off)':>6} | {'SRK nasa':>8} {'(off)':>6} | {'SRK atct':>8} {'(off)':>6}")
    for T_C, P_atm, m, a, b, u, c, d in rows:
        print(f"{T_C:6.0f} {P_atm:6.0f} {m:6.2f} | {a:8.2f} {a - m:+6.2f} | {b:8.2f} {u:5.3f} {b - m:+6.2f} | "
              f"{c:8.2f} {c - m:+6.2f} | {d:8.2f} {d - m:+6.2f}")
    return {(r[0], r[1]): r for r in rows}


@pytest.mark.parametrize("point", LOW_PRESSURE, ids=[f"{t:.0f}C-{p:.0f}atm" for t, p, _ in LOW_PRESSURE])
def test_peng_robinson_with_anchored_data_within_0_15_mol_percent(table, point):
    T_C, P_atm, measured = point
    pr_new = table[(T_C, P_atm)][4]
    assert abs(pr_new - measured) < TOLERANCE


def test_the_anchoring_is_what_closes_the_low_pressure_gap(table):
    # The same model with the NASA data misses the same points by more: at 30 and 50 atm at
    # 400 and 450 degC by more than the tolerance, and on average 5 times the anchored miss.
    raw = [abs(table[(t, p)][3] - m) for t, p, m in LOW_PRESSURE]
    new = [abs(table[(t, p)][4] - m) for t, p, m in LOW_PRESSURE]
    assert sum(raw) > 5.0 * sum(new)
    for t, p, m in LOW_PRESSURE:
        if p in (30.0, 50.0) and t in (400.0, 450.0):
            assert table[(t, p)][3] - m > TOLERANCE


def test_data_uncertainty_is_far_below_the_misses(table):
    # ATcT's +/- 30 J/mol (95 %) on NH3 is worth a few hundredths of a mol% (measured 0.003 at
    # 500 degC, 10 atm to 0.051 at 400 degC, 300 atm): far below the 300-atm misses of the cubic.
    for T_C, P_atm, measured, pr_raw, pr_new, u, *_ in table.values():
        assert 0.0 < u < 0.06
        if P_atm == 300.0 and T_C != 400.0:
            assert abs(pr_new - measured) > 10.0 * u


@pytest.mark.parametrize("point", LOW_PRESSURE, ids=[f"{t:.0f}C-{p:.0f}atm" for t, p, _ in LOW_PRESSURE])
def test_default_data_with_peng_robinson_within_0_15_mol_percent(point):
    # The check as a user meets it: no data set named (the default is "atct-anchored").
    T_C, P_atm, measured = point
    eq = gibbsmin.equilibrate(FEED, T_C + 273.15, P_atm * ATM, gas="peng-robinson")
    assert eq.extras["data_set"] == "atct-anchored"
    assert abs(100.0 * eq.mole_fractions["NH3"] - measured) < TOLERANCE
