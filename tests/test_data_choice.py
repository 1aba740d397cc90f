"""The data set as a plain choice: data="..." on equilibrate, the restricted solve, sweeps and case files."""

import json
import math

import numpy as np
import pytest

import gibbsmin
from gibbsmin import equilibrate
from gibbsmin.case import parse_case, settle_case
from gibbsmin.report.settle import settle_document, settle_report
from gibbsmin.report.text import render_text
from gibbsmin import equilibrate_with_approach
from gibbsmin.sweep import SweepSpec, grid, solve_points
from gibbsmin.thermo import R, data_set

LOOP = {"H2": 3.0, "N2": 1.0}
LOOP_SET = ["H2", "N2", "NH3"]
# delta-f H(298.15 K) of NH3: ATcT 1.112 -45.558 kJ/mol (via chemicals) against the NASA TM-4513
# polynomial's -45.940 kJ/mol; both ranges of the polynomial move by the difference.
ATCT_NH3, NASA_NH3 = -45558.0, -45939.7  # J/mol


def _ammonia_quotient(eq):
    y = eq.mole_fractions
    return y["NH3"] ** 2 / (y["N2"] * y["H2"] ** 3) * (1e5 / eq.P) ** 2


def test_default_is_the_anchored_set():
    eq = equilibrate(LOOP, T=723.15, P=30e5, species=LOOP_SET)
    assert eq.extras["data_set"] == "atct-anchored"
    assert eq.to_dict()["data_set"] == "atct-anchored"
    assert gibbsmin.default_database() is data_set("atct-anchored")


def test_anchored_set_moves_the_ammonia_constant_by_the_anchor_shift():
    # K of N2 + 3 H2 = 2 NH3 scales by exp(-2 (ATcT - NASA) / RT) (ideal gas: K = Q at equilibrium).
    T = 723.15
    raw = equilibrate(LOOP, T=T, P=30e5, species=LOOP_SET, data="nasa-1993")
    new = equilibrate(LOOP, T=T, P=30e5, species=LOOP_SET, data="atct-anchored")
    assert new.extras["data_set"] == "atct-anchored"
    expected = math.exp(-2.0 * (ATCT_NH3 - NASA_NH3) / (R * T))  # 0.880: K 12 % lower
    assert _ammonia_quotient(new) / _ammonia_quotient(raw) == pytest.approx(expected, rel=2e-4)
    assert new.amounts["NH3"] < raw.amounts["NH3"]


def test_data_and_db_agree_or_the_call_is_refused():
    db = data_set("atct-anchored")
    by_name = equilibrate(LOOP, T=723.15, P=30e5, species=LOOP_SET, data="atct-anchored")
    by_db = equilibrate(LOOP, T=723.15, P=30e5, species=LOOP_SET, db=db, data="atct-anchored")
    assert by_db.amounts == by_name.amounts
    with pytest.raises(gibbsmin.InputError, match="data='nasa-1993' and db= .*disagree"):
        equilibrate(LOOP, T=723.15, P=30e5, db=db, data="nasa-1993")
    with pytest.raises(gibbsmin.InputError, match="unknown data set 'ATcT'; choose one of nasa-1993, atct-anchored"):
        equilibrate(LOOP, T=723.15, P=30e5, data="ATcT")


def test_adiabatic_balance_uses_the_chosen_set():
    # The feed enthalpy and the outlet's come from the same set: the balance closes in both.
    for name in ("nasa-1993", "atct-anchored"):
        eq = equilibrate(LOOP, P=150e5, T_feed=650.0, adiabatic=True, species=LOOP_SET, data=name)
        assert eq.extras["data_set"] == name
        assert abs(eq.extras["energy_balance_residual"]) < 1e-8


def test_approach_solve_takes_the_data_set():
    feed = {"CH4": 1.0, "H2O": 3.0}
    raw = equilibrate_with_approach(feed, 1100.0, 30e5, approach={"steam methane reforming": 10.0},
                                    data="nasa-1993")
    new = equilibrate_with_approach(feed, 1100.0, 30e5, approach={"steam methane reforming": 10.0})
    assert raw.extras["data_set"] == "nasa-1993" and new.extras["data_set"] == "atct-anchored"
    # CH4 moves by +66 J/mol, CO by +4, H2O by +3 (ATcT - NASA): methane conversion changes a little.
    assert new.amounts["CH4"] != pytest.approx(raw.amounts["CH4"], rel=1e-6)
    assert new.amounts["CH4"] == pytest.approx(raw.amounts["CH4"], rel=0.02)


def test_sweep_takes_the_data_set_and_keeps_old_fingerprints():
    axes = (grid("T", [650.0, 700.0, 750.0]),)
    raw = SweepSpec(feed=LOOP, T=700.0, P=100e5, axes=axes, species=tuple(LOOP_SET), data="nasa-1993")
    new = SweepSpec(feed=LOOP, T=700.0, P=100e5, axes=axes, species=tuple(LOOP_SET))
    assert new.data == "atct-anchored"  # the default
    # A spec written without a data set was made with the NASA data (the default until the switch):
    # that meaning is kept, and the new default is written out by name, so an old sweep is never
    # resumed with other data.
    assert "data" not in json.loads(raw.to_json()) and json.loads(new.to_json())["data"] == "atct-anchored"
    assert SweepSpec.from_json(raw.to_json()) == raw and SweepSpec.from_json(new.to_json()) == new
    y_raw = solve_points(raw, 0, 3)["y_NH3"].to_numpy()
    y_new = solve_points(new, 0, 3)["y_NH3"].to_numpy()
    for k, T in enumerate((650.0, 700.0, 750.0)):
        point = equilibrate(LOOP, T=T, P=100e5, species=LOOP_SET, data="atct-anchored")
        assert y_new[k] == pytest.approx(point.mole_fractions["NH3"], rel=1e-8)
    assert np.all(y_new < y_raw)
    with pytest.raises(gibbsmin.InputError, match="unknown data set"):
        SweepSpec(feed=LOOP, T=700.0, P=100e5, axes=axes, data="janaf")


CASE = """
[case]
title = "invented ammonia loop, data-set check"
[feed]
unit = "kmol/h"
H2 = 3000.0
N2 = 1000.0
[species]
only = ["H2", "N2", "NH3"]
[conditions]
T = "450 degC"
P = "30 atm"
"""


def test_case_file_names_the_data_set_in_report_and_json():
    raw = settle_case(parse_case(CASE + 'data = "nasa-1993"\n'))
    new = settle_case(parse_case(CASE))  # the default set
    assert new.outlet.amounts["NH3"] < raw.outlet.amounts["NH3"]
    text = render_text(settle_report(new))
    assert "thermochemical data" in text and "atct-anchored: NASA TM-4513 polynomials re-anchored" in text
    assert "nasa-1993: NASA TM-4513" in render_text(settle_report(raw))
    assert settle_document(new)["data_set"] == "atct-anchored"
    assert settle_document(new)["stages"][0]["data_set"] == "atct-anchored"


def test_case_file_with_an_unknown_data_set_says_which_exist():
    with pytest.raises(gibbsmin.InputError) as caught:
        parse_case(CASE + 'data = "atct"\n')
    message = str(caught.value)
    assert "data" in message and "'nasa-1993', 'atct-anchored'" in message


def test_sweep_of_a_case_takes_its_data_set():
    from gibbsmin.sweep.command import spec_from_case

    axes = (grid("T", [700.0, 750.0]),)
    assert spec_from_case(parse_case(CASE + 'data = "atct-anchored"\n'), axes).data == "atct-anchored"
    assert spec_from_case(parse_case(CASE + 'data = "nasa-1993"\n'), axes).data == "nasa-1993"
    assert spec_from_case(parse_case(CASE), axes).data == "atct-anchored"  # the default
