"""No wrong answer marked pass (issue 16): verdicts and command-line messages that must not mislead."""

from __future__ import annotations

import json
import textwrap

import pytest

import gibbsmin
from gibbsmin.carbon import carbon_activity
from gibbsmin.cli import main


def run(argv, capsys):
    code = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return code, out, err


def write_case(tmp_path, text: str, name: str = "case.toml"):
    path = tmp_path / name
    path.write_text(textwrap.dedent(text))
    return path


# --- 1. the carbon verdict fails whenever the answer holds graphite -------------------------------------

#: A steam-lean methane feed at 900 K and 25 bar: graphite is stable at equilibrium (by hand: S/C 0.5 is far
#: below any carbon limit of methane at 900 K; common practice, no source).  The amount is checked > 0.
CARBON_FEED = {"CH4": 1.0, "H2O": 0.5}


def test_carbon_verdict_fails_where_the_answer_holds_graphite():
    eq = gibbsmin.equilibrate(CARBON_FEED, 900.0, 25e5)
    assert eq.amounts["C(s)"] > 0.01
    found = carbon_activity(eq)
    assert found.graphite_mol == pytest.approx(eq.amounts["C(s)"], rel=1e-12)
    assert found.status == "fail" and not found.carbon_free
    assert "NOT carbon-free" in found.verdict


def test_carbon_verdict_passes_a_gas_below_saturation():
    eq = gibbsmin.equilibrate({"CH4": 1.0, "H2O": 3.0}, 1100.0, 25e5)
    found = carbon_activity(eq)
    assert found.graphite_mol == 0.0 and found.status == "pass" and found.carbon_free


CARBON_CASE = """\
    [case]
    title = "Invented steam-lean pre-reformer test"

    [feed]
    unit = "kmol/h"
    CH4 = 100.0
    H2O = 50.0

    [conditions]
    T = "626.85 degC"
    P = "25 bar"

    [report]
    carbon = true
    """


def test_carbon_table_of_a_case_fails_when_graphite_is_in_the_outlet(tmp_path, capsys):
    case = write_case(tmp_path, CARBON_CASE)
    code, out, err = run(["settle", case, "--json"], capsys)
    doc = json.loads(out)
    assert doc["species"]["C(s)"]["amount_mol"] > 0.0
    row = doc["tables"]["carbon"][0]
    assert row["carbon-free"] == "fail"
    assert "NOT carbon-free" in row["verdict"]
