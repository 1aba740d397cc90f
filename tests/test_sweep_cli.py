"""`gibbsmin sweep` through the command line, checked against the Python API (no outside source needed)."""

from __future__ import annotations

from pathlib import Path

import pandas as pd
import pytest

import gibbsmin
from gibbsmin.cli import main

CASE = Path(__file__).resolve().parent.parent / "examples" / "reformer.toml"


def test_sweep_writes_csv_and_map_and_matches_the_api(tmp_path, capsys):
    csv, png = tmp_path / "s.csv", tmp_path / "m.png"
    code = main(["sweep", str(CASE), "--vary", "T=700:900:100degC", "--vary", "S/C=0.5:2.5:1",
                 "--csv", str(csv), "--map", "T,S/C,y_CH4", "--png", str(png)])
    assert code == 0
    assert "9 points; 0 not certified" in capsys.readouterr().out
    table = pd.read_csv(csv)
    assert len(table) == 9 and png.stat().st_size > 5000
    row = table[(table["T [degC]"] == 800) & (table["S/C"] == 1.5)].iloc[0]
    from gibbsmin.case import read_case
    feed = read_case(CASE).mixed_feed()
    db = gibbsmin.default_database()
    # Hydrocarbon carbon, the trade's S/C convention (CO and CO2 not counted).
    carbon = sum(n * db[s].elements.get("C", 0) for s, n in feed.items() if set(db[s].elements) == {"C", "H"})
    feed["H2O"] = 1.5 * carbon
    eq = gibbsmin.equilibrate(feed, 1073.15, row["P_Pa"], inert=["N2"])  # the case freezes N2
    assert row["y_H2"] == pytest.approx(eq.mole_fractions["H2"], rel=1e-9)


def test_sweep_of_the_peng_robinson_converter_case(tmp_path, capsys):
    # The case file's gas model and kij reach the sweep: each row is what equilibrate gives with them.
    converter = CASE.parent / "ammonia_converter_pr.toml"
    csv = tmp_path / "loop.csv"
    code = main(["sweep", str(converter), "--vary", "P=150,200,250bar", "--vary", "T=420:480:30degC",
                 "--csv", str(csv)])
    assert code == 0 and "9 points; 0 not certified" in capsys.readouterr().out
    row = pd.read_csv(csv).query("`P [bar]` == 250 and `T [degC]` == 480").iloc[0]
    feed = {"H2": 64.5, "N2": 21.5, "NH3": 3.0, "CH4": 7.0, "Ar": 4.0}
    eq = gibbsmin.equilibrate({s: n / 3.6 for s, n in feed.items()}, 753.15, 250e5, inert=["CH4", "Ar"],
                              gas="peng-robinson")
    assert row["y_NH3"] == pytest.approx(eq.mole_fractions["NH3"], rel=1e-8)


@pytest.mark.parametrize("argv, words", [
    (["sweep", str(CASE), "--vary", "T=1:2:0K"], "step must be non-zero"),
    (["sweep", str(CASE), "--vary", "Q"], "write NAME=START:STOP:STEP"),
    (["sweep", str(CASE), "--vary", "T=700,800K", "--map", "T,y_CH4"], "--map takes X,Y,COLUMN"),
    (["sweep", "missing.toml", "--vary", "T=700,800K"], "missing.toml"),
])
def test_sweep_bad_input_is_one_line(argv, words, capsys):
    assert main(argv) == 2
    err = capsys.readouterr().err.strip()
    assert words in err and "\n" not in err and "Traceback" not in err
