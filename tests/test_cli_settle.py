"""The command line on the shipped reformer case: table, JSON against the Python API and against Cantera."""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import pytest

import gibbsmin
from gibbsmin.cli import main
from gibbsmin.report.caution import CAUTION

EXAMPLES = Path(__file__).resolve().parents[1] / "examples"
REFORMER = EXAMPLES / "reformer.toml"


def run(argv, capsys):
    code = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return code, out, err


@pytest.fixture(scope="module")
def reformer_json():
    from gibbsmin.case import read_case, settle_case
    from gibbsmin.report.settle import settle_document

    return settle_document(settle_case(read_case(REFORMER)))


def test_settle_prints_a_readable_table(capsys):
    code, out, err = run(["settle", REFORMER], capsys)
    assert code == 0, err
    assert err == ""
    for heading in ("flow [kmol/h]", "mol% wet", "mol% dry", "phases: gas", "certified", "Caution:"):
        assert heading in out
    assert "hazardous" in out and "local codes" in out
    # The table rounds what JSON holds exactly: the H2 row shows the outlet flow to 0.01 kmol/h.
    h2_row = [line for line in out.splitlines() if line.startswith("H2 ")][-1]  # the outlet's, after the feed's
    doc = json.loads(run(["settle", REFORMER, "--json"], capsys)[1])
    h2_kmol_h = doc["species"]["H2"]["amount_mol"] * 3.6
    assert f"{h2_kmol_h:.2f}" in h2_row


def test_json_holds_the_promised_fields(capsys):
    code, out, err = run(["settle", REFORMER, "--json"], capsys)
    assert code == 0 and err == ""
    doc = json.loads(out)
    assert doc["T_K"] == pytest.approx(865 + 273.15, abs=1e-9)
    assert doc["P_Pa"] == pytest.approx(29.8e5 + 101325, rel=1e-12)  # bar(g) against a standard atmosphere
    assert doc["certificate"]["certified"] is True
    for name, entry in doc["species"].items():
        assert entry["amount_mol"] >= 0.0
        assert 0.0 <= entry["mole_fraction_in_phase"] <= 1.0
    gas = [e["mole_fraction_in_phase"] for e in doc["species"].values() if e["phase"] == "gas"]
    assert sum(gas) == pytest.approx(1.0, rel=1e-12)
    assert doc["caution"] == CAUTION


def test_json_equals_the_python_api(reformer_json):
    # The same feed, by hand arithmetic from the case file: dry gas 1450 kmol/h, S/C 3.0 on hydrocarbon carbon,
    # plus 45 kmol/h hydrogen; flows in mol/s serve as amounts.
    dry = {"CH4": 93.1, "C2H6": 3.6, "C3H8": 0.6, "CO2": 1.2, "N2": 1.5}
    kmol_h = {s: x / 100 * 1450.0 for s, x in dry.items()}
    carbon = kmol_h["CH4"] + 2 * kmol_h["C2H6"] + 3 * kmol_h["C3H8"]
    kmol_h["H2O"] = 3.0 * carbon
    kmol_h["H2"] = 45.0
    feed = {s: v / 3.6 for s, v in kmol_h.items()}
    for s, v in feed.items():
        assert reformer_json["feed_mol_s"][s] == pytest.approx(v, rel=1e-12)
    eq = gibbsmin.equilibrate(feed, 865 + 273.15, 29.8e5 + 101325, inert=["N2"])
    for s, n in eq.amounts.items():
        assert reformer_json["species"][s]["amount_mol"] == pytest.approx(n, rel=1e-9, abs=1e-300)


def test_json_agrees_with_cantera(reformer_json):
    cantera_reference = pytest.importorskip("cantera_reference")
    major = ["CH4", "H2O", "CO", "CO2", "H2", "C2H6", "C3H8"]
    gas = cantera_reference.cantera_gas(major)
    feed = reformer_json["feed_mol_s"]
    # N2 is frozen in the case: Cantera sees the reacting gas only, and the N2 dilutes it.
    reacting = {s: feed[s] for s in major if s in feed}
    n_reacting, n_n2 = sum(reacting.values()), feed["N2"]
    gas.TPX = reformer_json["T_K"], 1e5, reacting
    # Equilibrium of the reacting part at its own partial pressure P (1 - y_N2) is the same state.
    y = {s: reformer_json["species"][s]["mole_fraction_in_phase"] for s in major}
    y_n2 = reformer_json["species"]["N2"]["mole_fraction_in_phase"]
    gas.TP = reformer_json["T_K"], reformer_json["P_Pa"] * (1 - y_n2)
    gas.equilibrate("TP")
    assert n_n2 > 0 and n_reacting > 0
    for s in ("H2", "H2O", "CO", "CO2", "CH4"):
        # Major species; the case's larger species set changes them by far less than 1e-4 relative.
        assert y[s] / (1 - y_n2) == pytest.approx(gas[s].X[0], rel=1e-4)


def test_species_lists_and_filters(capsys):
    code, out, _ = run(["species", "methan"], capsys)
    assert code == 0
    names = [line.split()[0] for line in out.splitlines()[1:-1]]
    assert "CH4" in names and "CH3OH" in names  # methane, methanol by alias
    code, out, _ = run(["species", "--element", "S", "--json"], capsys)
    names = {s["name"] for s in json.loads(out)["species"]}
    assert {"SO2", "SO3", "H2S", "COS"} <= names
    assert all("S" in gibbsmin.default_database()[n].elements for n in names)


def test_help_of_every_subcommand_shows_a_worked_example(capsys):
    for command in ("settle", "audit", "species"):
        code = main([command, "--help"])
        out = capsys.readouterr().out
        assert code == 0
        assert "example:" in out and f"gibbsmin {command}" in out


def test_console_script_runs_in_a_subprocess(tmp_path):
    # Through a real interpreter, as the README's command runs it.
    done = subprocess.run([sys.executable, "-m", "gibbsmin.cli", "settle", str(REFORMER), "--json"],
                          capture_output=True, text=True, timeout=120)
    assert done.returncode == 0, done.stderr
    assert json.loads(done.stdout)["certificate"]["certified"]
    bad = tmp_path / "bad.toml"
    bad.write_text('[feed]\nunit = "kmol/h"\nCH4 = 1.0\n[conditions]\nT = "850 degX"\nP = "1 bar"\n')
    done = subprocess.run([sys.executable, "-m", "gibbsmin.cli", "settle", str(bad)],
                          capture_output=True, text=True, timeout=120)
    assert done.returncode == 2
    assert done.stderr.count("\n") == 1 and "Traceback" not in done.stderr
    assert "line 5" in done.stderr and "conditions.T" in done.stderr


def test_duty_agrees_with_cantera_enthalpies(reformer_json):
    cantera_reference = pytest.importorskip("cantera_reference")
    # Feeds at 520 degC, outlet at 865 degC: the duty is the enthalpy rise, species by species (ideal gas).
    feed = reformer_json["feed_mol_s"]
    outlet = {s: e["amount_mol"] for s, e in reformer_json["species"].items() if e["amount_mol"] > 1e-12}
    names = sorted(set(feed) | set(outlet))
    gas = cantera_reference.cantera_gas(names)

    def enthalpy(amounts, T):
        gas.TPX = T, 1e5, amounts
        return gas.enthalpy_mole / 1000.0 * sum(amounts.values())  # J/kmol to J/mol, times mol/s

    duty = enthalpy(outlet, 865 + 273.15) - enthalpy(feed, 520 + 273.15)
    assert reformer_json["duty_W"] == pytest.approx(duty, rel=1e-6)


def test_reformer_report_shows_approach_and_carbon_verdict(capsys):
    code, out, _ = run(["settle", REFORMER], capsys)
    assert code == 0
    row = next(line for line in out.splitlines() if line.startswith("outlet  steam methane reforming"))
    assert row.split()[-1] == "0.00"  # an equilibrium outlet has a zero approach
    assert "no carbon" in out and "duty [MW]" in out


def test_reformer_report_gives_the_steam_to_carbon_limit(reformer_json):
    # Internal consistency: the report's min S/C is carbon_limit of the inlet's dry gas at the outlet's T and P,
    # and at that S/C the gas-only equilibrium is just saturated with graphite.
    from gibbsmin.carbon import carbon_activity, carbon_limit
    from gibbsmin.case import read_case

    row = reformer_json["tables"]["carbon"][0]
    feed = read_case(REFORMER).mixed_feed()
    dry = {s: n for s, n in feed.items() if s != "H2O"}
    limit = carbon_limit(dry, reformer_json["T_K"], reformer_json["P_Pa"])
    assert row["S/C of inlet"] == pytest.approx(3.0, abs=1e-9)
    assert row["min S/C"] == pytest.approx(limit.steam_to_carbon, rel=1e-9)
    carbon = sum(n * gibbsmin.default_database()[s].elements.get("C", 0)
                 for s, n in dry.items() if set(gibbsmin.default_database()[s].elements) == {"C", "H"})
    eq = gibbsmin.equilibrate({**dry, "H2O": limit.steam_to_carbon * carbon}, reformer_json["T_K"],
                              reformer_json["P_Pa"], exclude=["C(s)"])
    assert carbon_activity(eq).activity == pytest.approx(1.0, abs=1e-7)
    assert 0.5 < limit.steam_to_carbon < 1.2  # well below the 3.0 fed: the reformer has a wide margin
