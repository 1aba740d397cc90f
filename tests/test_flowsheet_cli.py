"""`gibbsmin settle` on flowsheet case files: the shipped loops, their JSON, the audit of their own streams, and
bad flowsheet files."""

import json
from pathlib import Path

import pytest

from gibbsmin.cli import BAD_INPUT, NOT_CERTIFIED, OK, main
from gibbsmin.thermo import default_database

EXAMPLES = Path(__file__).resolve().parent.parent / "examples"


def settle_json(path, capsys):
    assert main(["settle", str(path), "--json"]) == OK
    return json.loads(capsys.readouterr().out)


def element_flows(streams, names):
    db, total = default_database(), {}
    for name in names:
        for species, n in streams[name]["flows_mol_s"].items():
            for element, count in db[species].elements.items():
                total[element] = total.get(element, 0.0) + count * n
    return total


@pytest.mark.parametrize("example, product, low, high", [
    # Trade figures for sanity, not tight checks: an ammonia converter outlet at 150 to 200 bar holds about 15 to
    # 25 mol% NH3; a methanol loop's recycle ratio is a few (from memory).
    ("ammonia_loop.toml", "NH3", 0.15, 0.25),
    ("methanol_loop.toml", "CH3OH", 2.0, 8.0),
])
def test_the_shipped_loops_converge_and_balance(example, product, low, high, capsys):
    doc = settle_json(EXAMPLES / example, capsys)
    sheet, streams, boundary = doc["flowsheet"], doc["streams"], doc["boundary"]
    assert sheet["converged"] is True and sheet["tear_residual"] <= 1e-8
    assert sheet["element_balance_residual"] <= 1e-9
    into, out = element_flows(streams, boundary["in"]), element_flows(streams, boundary["out"])
    for element, n in into.items():  # recomputed here from the JSON's own streams
        assert out[element] == pytest.approx(n, rel=1e-9)
    for stream in streams.values():
        assert set(stream) >= {"T_K", "P_Pa", "flows_mol_s"}
    if product == "NH3":
        outlet = streams["converter outlet"]["flows_mol_s"]
        assert low <= outlet["NH3"] / sum(outlet.values()) <= high
        inlet = streams["bed 1 inlet"]["flows_mol_s"]
        assert (inlet["CH4"] + inlet["Ar"]) / sum(inlet.values()) == pytest.approx(0.12, rel=1e-9)
    else:
        recycle = sum(streams["recycle"]["flows_mol_s"].values())
        assert low <= recycle / sum(streams["makeup"]["flows_mol_s"].values()) <= high


def test_the_audit_of_the_converged_ammonia_loop_passes(tmp_path, capsys):
    folder = tmp_path / "loop"
    assert main(["settle", str(EXAMPLES / "ammonia_loop.toml"), "--quiet", "--audit-files", str(folder)]) == OK
    assert main(["audit", str(folder / "streams.csv"), str(folder / "units.toml"), "--fail-on", "warn"]) == OK
    assert "0 fail, 0 warn" in capsys.readouterr().out


LOOP = """
[feed.makeup]
unit = "mol/s"
H2 = 74.0
N2 = 24.7
Ar = 1.3
T = "40 degC"
P = "190 bar"

[species]
only = ["H2", "N2", "NH3", "Ar"]

[flowsheet]
{flowsheet}

[[unit]]
name = "mixer"
type = "mixer"
in = ["makeup", "recycle"]
out = "feed"

[[unit]]
name = "converter"
type = "reactor"
in = "feed"
out = "hot"
T = "470 degC"
P = "190 bar"

[[unit]]
name = "drum"
type = "separator"
in = "hot"
out = ["vapour", "liquid"]
T = "-20 degC"
{drum_gas}

[[unit]]
name = "purge split"
type = "splitter"
in = "vapour"
out = ["purge", "recycle"]
fraction = 0.05
"""


def write_loop(tmp_path, flowsheet="", drum_gas='gas = "peng-robinson"'):
    path = tmp_path / "loop.toml"
    path.write_text(LOOP.format(flowsheet=flowsheet, drum_gas=drum_gas))
    return path


def test_a_small_loop_file_converges(tmp_path, capsys):
    doc = settle_json(write_loop(tmp_path), capsys)
    assert doc["flowsheet"]["converged"] and doc["boundary"] == {"in": ["makeup"], "out": ["liquid", "purge"]}


def test_a_loop_out_of_passes_exits_not_certified(tmp_path, capsys):
    assert main(["settle", str(write_loop(tmp_path, "max_passes = 3"))]) == NOT_CERTIFIED
    assert "did not converge in" in capsys.readouterr().err


def test_argon_with_no_way_out_of_the_loop_is_refused(tmp_path, capsys):
    # No purge, and an ideal-gas drum, whose liquid is water alone: argon can only build up.
    text = write_loop(tmp_path, drum_gas="").read_text()
    text = text[:text.index('[[unit]]\nname = "purge split"')].replace('out = ["vapour", "liquid"]',
                                                                     'out = ["recycle", "liquid"]')
    path = tmp_path / "closed.toml"
    path.write_text(text)
    assert main(["settle", str(path)]) == BAD_INPUT
    err = capsys.readouterr().err
    assert "Ar enters the recycle" in err and "add a purge" in err and "Traceback" not in err


@pytest.mark.parametrize("edit, message", [
    (lambda t: t.replace('in = "vapour"', 'in = "vapor"'), "takes stream 'vapor', which no unit makes"),
    (lambda t: t.replace('type = "splitter"', 'type = "splitter"\nefficiency = 0.7'), "a splitter takes"),
    (lambda t: t.replace('tear', 'tear') + '\n[[unit]]\nname = "mixer"\ntype = "mixer"\nin = "liquid"\nout = "x"\n',
     "two units are named 'mixer'"),
    (lambda t: t.replace('fraction = 0.05', 'fraction = 1.5'), "it must lie between 0 and 1"),
])
def test_bad_flowsheet_files_get_one_clear_line(edit, message, tmp_path, capsys):
    path = tmp_path / "bad.toml"
    path.write_text(edit(write_loop(tmp_path).read_text()))
    assert main(["settle", str(path)]) == BAD_INPUT
    err = capsys.readouterr().err
    assert message in err and "Traceback" not in err


def test_the_invented_plant_front_end_runs_as_a_train(capsys):
    doc = settle_json(EXAMPLES / "plant" / "front_end.toml", capsys)
    assert doc["flowsheet"]["converged"] and doc["flowsheet"]["element_balance_residual"] <= 1e-12
    assert doc["flowsheet"]["passes"] == 1  # no recycle: every unit once
    gas = doc["streams"]["synthesis gas"]["flows_mol_s"]
    # A methanator outlet holds no more than traces of CO and CO2 and about 3 H2 per N2 for the ammonia loop
    # (common practice, no source).
    assert (gas.get("CO", 0.0) + gas.get("CO2", 0.0)) / sum(gas.values()) < 1e-4
    assert 2.8 < gas["H2"] / gas["N2"] < 3.6


def test_the_beds_of_the_ammonia_loop_lie_short_of_their_equilibrium_curve():
    import numpy as np

    from gibbsmin.flowsheet import settle_flowsheet
    from gibbsmin.flowsheet.beds import bed_lines
    from gibbsmin.flowsheet.reader import read_flowsheet
    from gibbsmin.report.flowsheet import flowsheet_report

    case = read_flowsheet(EXAMPLES / "ammonia_loop.toml")
    result = settle_flowsheet(case.flowsheet, case.context())
    lines = bed_lines(result, "NH3")
    # Ammonia synthesis is exothermic: less NH3 at equilibrium the hotter the gas (common practice, no source).
    assert all(np.diff(lines.fraction) < 0.0)
    for name, (T_in, T_out), (y_in, y_out) in lines.beds:
        assert T_out > T_in and y_out > y_in  # each adiabatic bed makes ammonia and heats up
        # Each bed is held 15 K short of equilibrium: its outlet holds what equilibrium gives 15 K hotter, so it
        # lies below the curve at its own T and above it 30 K hotter.
        assert y_out < np.interp(T_out, lines.T, lines.fraction)
        assert y_out > np.interp(T_out + 30.0, lines.T, lines.fraction)
    report = flowsheet_report(result, context=result.context)
    assert [p.title for p in report.plots] == ["Converter beds on the equilibrium curve at 185 bar"]


def test_a_flowsheet_sweep_writes_one_row_per_point(tmp_path, capsys):
    import pandas as pd

    table = tmp_path / "loop.csv"
    code = main(["sweep", str(write_loop(tmp_path)), "--vary", "purge split.fraction=0.03,0.06",
                 "--vary", "pressure=150,190bar", "--csv", str(table)])
    assert code == OK
    rows = pd.read_csv(table)
    assert list(rows["purge split.fraction"]) == [0.03, 0.03, 0.06, 0.06]
    assert list(rows["pressure"]) == pytest.approx([150e5, 190e5] * 2, rel=1e-12)
    assert rows["converged"].all() and rows["certified"].all() and (rows["tear_residual"] <= 1e-8).all()
    # More purge, fewer inerts in the loop; higher pressure, more ammonia condensed (common practice, no source).
    assert rows["inert_fraction"][0] > rows["inert_fraction"][2]
    assert rows["production_mol_s"][1] > rows["production_mol_s"][0]


def test_a_sweep_axis_that_a_specification_varies_is_refused(capsys):
    code = main(["sweep", str(EXAMPLES / "ammonia_loop.toml"), "--vary", "purge split.fraction=0.01,0.02",
                 "--csv", "never-written.csv"])
    assert code == BAD_INPUT
    assert "is the setting specification 'inerts at the converter inlet' varies" in capsys.readouterr().err
    assert not Path("never-written.csv").exists()
