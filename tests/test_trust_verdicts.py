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


# --- 2. a cubic gas the stability test calls unstable is not certified ----------------------------------

#: A methanol loop gas (invented) at 40 degC and 80 bar: the tangent-plane test finds that methanol and water
#: would condense (tests/test_eos_stability.py checks the test itself against thermo's PR78 dew point).
COLD_LOOP = {"H2": 66.0, "CO": 9.0, "CO2": 6.0, "CH4": 16.0, "H2O": 0.5, "CH3OH": 2.5}


def test_an_unstable_one_gas_answer_is_not_certified():
    # liquid=False: the one-gas answer, which the liquid-solution phases (the default with a cubic) replace.
    with pytest.warns(RuntimeWarning, match="NOT stable as one gas"):
        eq = gibbsmin.equilibrate(COLD_LOOP, 313.15, 80e5, species=list(COLD_LOOP), gas="peng-robinson",
                                  liquid=False)
    assert eq.extras["gas_phase_stability"]["stable"] is False
    assert eq.certificate.phase_stability == "unstable"
    assert eq.certificate.certified is False
    assert "NOT certified" in eq.certificate.summary() and "NOT stable" in eq.certificate.summary()
    assert eq.to_dict()["certificate"]["phase_stability"] == "unstable"
    # The residuals themselves are fine: it is the missing phase that makes the answer wrong.
    assert eq.certificate.stationarity < 1e-7 and eq.certificate.element_balance < 1e-9


def test_a_stable_cubic_answer_stays_certified_and_says_so():
    eq = gibbsmin.equilibrate(COLD_LOOP, 523.15, 80e5, species=list(COLD_LOOP), gas="peng-robinson")
    assert eq.certificate.phase_stability == "stable" and eq.certificate.certified is True
    ideal = gibbsmin.equilibrate(COLD_LOOP, 523.15, 80e5, species=list(COLD_LOOP))
    assert ideal.certificate.phase_stability == "not tested" and ideal.certificate.certified is True


def test_a_held_back_reaction_with_an_unstable_gas_is_not_certified():
    from gibbsmin import equilibrate_with_approach

    with pytest.warns(RuntimeWarning, match="NOT stable as one gas"):
        eq = equilibrate_with_approach(COLD_LOOP, 313.15, 80e5, {"methanol synthesis": 5.0},
                                       species=list(COLD_LOOP), gas="peng-robinson", liquid=False)
    assert eq.certificate.phase_stability == "unstable" and not eq.certificate.certified


COLD_LOOP_CASE = """\
    [case]
    title = "Invented methanol loop gas at the separator, Peng-Robinson"

    [feed]
    unit = "kmol/h"
    H2 = 66.0
    CO = 9.0
    CO2 = 6.0
    CH4 = 16.0
    H2O = 0.5
    CH3OH = 2.5

    [species]
    only = ["H2", "CO", "CO2", "CH4", "H2O", "CH3OH"]

    [conditions]
    T = "40 degC"
    P = "80 bar"
    gas = "peng-robinson"
    """


def test_settle_marks_the_unstable_gas_failed_and_fail_on_exits_non_zero(tmp_path, capsys):
    case = write_case(tmp_path, COLD_LOOP_CASE)
    code, out, err = run(["settle", case], capsys)
    assert code == 0  # without --fail-on the report is written and read, not judged
    assert "NOT stable as one gas" in err
    stage_row, certificate_row = [line.split() for line in out.splitlines() if line.startswith("outlet ")]
    assert stage_row[-1] == "fail"  # the stages table's "certified" column
    assert certificate_row[1] == "fail" and certificate_row[-1] == "unstable"
    code, out, err = run(["settle", case, "--fail-on", "fail"], capsys)
    assert code == 1
    doc = json.loads(run(["settle", case, "--json"], capsys)[1])
    assert doc["certificate"]["certified"] is False and doc["certificate"]["phase_stability"] == "unstable"
    html = tmp_path / "cold.html"
    run(["settle", case, "--quiet", "--html", html], capsys)
    page = html.read_text()
    assert '<td class="fail">fail</td>' in page and '<td class="pass">' not in page  # red, never green


def test_fail_on_passes_a_certified_carbon_free_case(capsys):
    from pathlib import Path

    reformer = Path(__file__).resolve().parents[1] / "examples" / "reformer.toml"
    code, out, err = run(["settle", reformer, "--fail-on", "fail"], capsys)
    assert code == 0, err


def test_fail_on_fails_a_case_whose_outlet_holds_graphite(tmp_path, capsys):
    case = write_case(tmp_path, CARBON_CASE)
    assert run(["settle", case, "--fail-on", "fail"], capsys)[0] == 1
    assert run(["settle", case], capsys)[0] == 0


# --- 3. a requested approach is met, or the answer is refused ------------------------------------------

#: An invented steam-lean partial-oxidation syngas entering an adiabatic bed at 350 degC and 30 bar: on the way
#: to equilibrium graphite appears, and the outlet temperature lies where the phase set changes.
POX_GAS = {"CO": 45.0, "H2O": 5.0, "H2": 40.0, "CO2": 5.0, "CH4": 2.0}
POX_SPECIES = ["CO", "H2O", "H2", "CO2", "CH4", "C(s)"]


def _adiabatic_pox(**kw):
    from gibbsmin import equilibrate_with_approach

    return equilibrate_with_approach(POX_GAS, None, 30e5, {"water-gas shift": 10.0}, species=POX_SPECIES,
                                     T_feed=623.15, adiabatic=True, **kw)


def test_adiabatic_approach_is_met_when_graphite_appears():
    from gibbsmin.reactions import approach_temperatures

    eq = _adiabatic_pox()
    assert eq.amounts["C(s)"] > 1.0 and eq.certificate.certified
    # The approach recomputed from the answer's own composition (not the solver's bookkeeping).
    found = approach_temperatures(eq, reactions=["water-gas shift"])["water-gas shift"]
    assert found.approach_K == pytest.approx(10.0, abs=1e-6)
    assert abs(eq.extras["energy_balance_residual"]) < 1e-10


def test_an_approach_that_is_not_met_is_refused(monkeypatch):
    # The solve on a phase boundary knows only the unshifted potentials; forced back on, it returns the free
    # equilibrium (0 K approach), which the check of the answer must refuse rather than certify.
    import gibbsmin.energy as energy

    plain = energy.solve_energy_balance
    monkeypatch.setattr(energy, "solve_energy_balance",
                        lambda *a, **kw: plain(*a, **{**kw, "phase_set_solve": True}))
    with pytest.raises(gibbsmin.ConvergenceError, match=r"approach asked for on 'water-gas shift' \(10 K\) is not met"):
        _adiabatic_pox()


def test_an_approach_on_a_carbon_reaction_without_carbon_is_refused():
    from gibbsmin import equilibrate_with_approach

    with pytest.raises(gibbsmin.ConvergenceError, match="holds no C\\(s\\)"):
        equilibrate_with_approach({"CH4": 1.0, "H2O": 4.0}, 1100.0, 25e5, {"Boudouard": 10.0})


# --- 4. sweep axes: a unit for T and P, a size asked for, an unknown axis named -----------------------

REFORMER = __import__("pathlib").Path(__file__).resolve().parents[1] / "examples" / "reformer.toml"


@pytest.mark.parametrize("axis, fix", [
    ("T=650:950:25", "T=650:950:25degC or T=650:950:25K"),
    ("P=20,30,40", "P=20,30,40bar or P=20,30,40bar(g)"),
])
def test_a_bare_temperature_or_pressure_axis_is_refused_with_the_fix(axis, fix, capsys):
    code, out, err = run(["sweep", REFORMER, "--vary", axis], capsys)
    assert code == 2
    assert "no unit" in err and fix in err and "\n" not in err.strip()


def test_a_huge_sweep_says_its_size_and_asks_for_yes(tmp_path, capsys):
    # 300,000,001 x 3 points: refused at once (before any value is made), with the size in the message.
    code, out, err = run(["sweep", REFORMER, "--vary", "T=650:950:0.000001degC", "--vary", "S/C=1:3:1"], capsys)
    assert code == 2
    assert "900,000,003 points (300,000,001 x 3)" in err and "--yes" in err


def test_a_sweep_just_above_the_limit_runs_with_yes(monkeypatch, tmp_path, capsys):
    import gibbsmin.sweep.command as command

    monkeypatch.setattr(command, "LARGE_SWEEP", 5)
    argv = ["sweep", REFORMER, "--vary", "T=700:900:100degC", "--vary", "S/C=2:3:1"]
    code, out, err = run(argv, capsys)
    assert code == 2 and "6 points (3 x 2)" in err
    code, out, err = run([*argv, "--yes"], capsys)
    assert code == 0, err
    assert "6 points (3 x 2)" in err and "6 points; 0 not certified" in out


@pytest.mark.parametrize("axis, closest", [("Tx=700,800", "did you mean T?"), ("S/c=1,2", "did you mean S/C?"),
                                           ("CH5=1,2", "CH4")])
def test_an_unknown_sweep_axis_names_the_axes_and_the_closest(axis, closest, capsys):
    code, out, err = run(["sweep", REFORMER, "--vary", axis], capsys)
    assert code == 2
    assert "unknown sweep axis" in err and closest in err
    assert "T (with a unit), P (with a unit), S/C" in err and "CH4, C2H6" in err


# --- 5. command-line messages name case-file keys; species and reactions suggest the trade's names -------

HOT_CASE = """\
    [feed]
    unit = "kmol/h"
    H2O = 10.0

    [species]
    only = ["H2O", "H2", "O2"]

    [conditions]
    T = "7000 K"
    P = "1 bar"
    """


def test_a_range_error_on_the_command_line_names_the_case_file_key(tmp_path, capsys):
    code, out, err = run(["settle", write_case(tmp_path, HOT_CASE)], capsys)
    assert code == 2
    assert "[species] allow_extrapolation = true" in err
    assert "allow_extrapolation=True" not in err


METHANOL_REFORMER_CASE = """\
    [case]
    title = "Invented methanol-bearing reformer feed, steam set by S/C"

    [feed]
    unit = "kmol/h"
    CH4 = 90.0
    CH3OH = 10.0
    steam_to_carbon = 3.0

    [conditions]
    T = "800 degC"
    P = "20 bar"
    """


def test_a_warning_on_the_command_line_names_the_case_file_key(tmp_path, capsys):
    # S/C is asked for and the feed holds methanol, whose carbon the default basis leaves out: the
    # reader warns, and the warning must name the case-file key, not the Python option.
    code, out, err = run(["settle", write_case(tmp_path, METHANOL_REFORMER_CASE), "--quiet"], capsys)
    assert code == 0
    assert '[feed] carbon_basis = "all"' in err and "carbon_basis='all'" not in err


def test_the_python_api_keeps_its_own_option_names():
    with pytest.raises(gibbsmin.TemperatureRangeError, match=r"allow_extrapolation=True"):
        gibbsmin.equilibrate({"H2O": 1.0}, 7000.0, 1e5, species=["H2O", "H2", "O2"])


def test_every_translated_option_is_a_case_file_key():
    from gibbsmin.case import CASE_KEYS
    from gibbsmin.cli import CASE_FILE_KEYS, in_case_file_words

    for option, (table, key) in CASE_FILE_KEYS.items():
        assert key in CASE_KEYS[table], (option, table, key)
    assert in_case_file_words("try method='convex', or exclude=['C(s)']") == \
        'try [conditions] method = "convex", or [species] exclude = ["C(s)"]'


def test_species_search_suggests_the_species_of_a_misspelt_alias(capsys):
    code, out, err = run(["species", "amonia"], capsys)
    assert code == 0 and out == ""
    assert "did you mean NH3 (ammonia)?" in err


def test_species_close_matches_name_the_species_and_its_alias():
    db = gibbsmin.default_database()
    assert db.close_matches("amonia")[0] == "NH3 (ammonia)"
    assert "CH4" in db.close_matches("CH5")
    assert db.close_matches("xyzzy") == []


@pytest.mark.parametrize("text", ["shift reaction", "the shift", "shfit reaction"])
def test_a_shift_reaction_suggests_the_water_gas_shift(text):
    from gibbsmin.reactions import reaction

    with pytest.raises(gibbsmin.InputError, match=r"did you mean 'water-gas shift'[?,]"):
        reaction(text)
