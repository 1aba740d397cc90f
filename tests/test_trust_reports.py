"""Reports that can be trusted (issue 16): outputs all or none, findings first, a stream table in the trade's
layout, settle facts that say only what holds.

What a practising engineer expects of a stream table and an audit page is common practice, no source.
"""

from __future__ import annotations

import os
import shutil
import tempfile
from pathlib import Path

import pytest

from gibbsmin.cli import main
from gibbsmin.errors import InputError
from gibbsmin.report.files import write_all

EXAMPLES = Path(__file__).resolve().parents[1] / "examples"


# --- item 4: outputs all or none, errors naming the user's path --------------------------------------


def test_a_bad_output_path_writes_nothing_and_names_the_path(tmp_path, capsys):
    good = tmp_path / "n.csv"
    bad = tmp_path / "no such folder" / "n.html"
    code = main(["settle", str(EXAMPLES / "n2o4.toml"), "--csv", str(good), "--html", str(bad), "--quiet"])
    err = capsys.readouterr().err
    assert code == 2 and err.count("\n") == 1
    assert str(bad) in err and ".part" not in err
    assert list(tmp_path.iterdir()) == []  # the good CSV was not written either


@pytest.mark.skipif(hasattr(os, "geteuid") and os.geteuid() == 0, reason="root may write to a read-only folder")
def test_a_read_only_folder_writes_nothing_and_names_the_path(tmp_path, capsys):
    locked = tmp_path / "locked"
    locked.mkdir()
    locked.chmod(0o555)
    try:
        code = main(["settle", str(EXAMPLES / "n2o4.toml"), "--csv", str(tmp_path / "n.csv"),
                     "--html", str(locked / "n.html"), "--quiet"])
        err = capsys.readouterr().err
        assert code == 2 and str(locked / "n.html") in err and ".part" not in err
        assert sorted(p.name for p in tmp_path.iterdir()) == ["locked"]
    finally:
        locked.chmod(0o755)


def test_an_unwritable_temporary_is_reported_under_the_users_path(tmp_path, monkeypatch):
    # The temporary file cannot be made (as in a folder the user may not write to): the message names
    # the file asked for, not the hidden temporary, and the other output is not written.
    target = tmp_path / "report.html"
    real = tempfile.mkstemp

    def refused(*args, prefix="", dir=None, **kwargs):
        if prefix.startswith(".report.html"):
            raise PermissionError(13, "Permission denied", os.path.join(dir, prefix + "x1y2.part"))
        return real(*args, prefix=prefix, dir=dir, **kwargs)

    monkeypatch.setattr(tempfile, "mkstemp", refused)
    with pytest.raises(InputError) as caught:
        write_all([(tmp_path / "a.csv", lambda: "x"), (target, lambda: "<html>")])
    message = str(caught.value)
    assert str(target) in message and "Permission denied" in message and ".part" not in message
    assert list(tmp_path.iterdir()) == []


def test_a_failing_render_writes_nothing(tmp_path):
    def broken():
        raise RuntimeError("render failed")

    with pytest.raises(RuntimeError):
        write_all([(tmp_path / "a.csv", lambda: "x"), (tmp_path / "b.html", broken)])
    assert list(tmp_path.iterdir()) == []


def test_one_file_named_for_two_outputs_is_refused(tmp_path):
    with pytest.raises(InputError, match="same file"):
        write_all([(tmp_path / "a.csv", lambda: "x"), (tmp_path / "a.csv", lambda: "y")])


# --- item 1: the audit page opens with its findings, failures first, imbalances in MW and K --------


@pytest.fixture(scope="module")
def plant_audit():
    from gibbsmin.audit import audit_plant, read_plant

    return audit_plant(read_plant(EXAMPLES / "plant" / "units.toml"))


def test_audit_page_opens_with_the_findings_failures_first(plant_audit):
    import re

    from gibbsmin.report.audit import audit_report
    from gibbsmin.report.html import render_html

    page = render_html(audit_report(plant_audit))
    findings = page.index("<h2>Findings")
    assert findings < page.index("<figure>") and findings < page.index("<h2>Verdicts")
    body = page[findings:page.index("</table>", findings)]
    verdicts = re.findall(r'<td class="(pass|warn|fail|n/a)">', body)
    assert verdicts == ["fail"] * 4 + ["warn", "n/a"]
    # Only the methanator's element closure is outside its limits: one closure chart, beside five approach charts.
    assert page.count("<figure>") == 6
    assert set(re.findall(r">([^<>]*): element closures<", page)) == {"R-105 methanator"}


def test_energy_imbalance_is_given_in_mw_as_well_as_kelvin(plant_audit):
    from gibbsmin.report.audit import audit_document, audit_report
    from gibbsmin.report.text import render_text

    check = next(c for c in plant_audit.checks if c.where == "R-101 primary reformer" and c.name == "energy balance")
    (imbalance_MW, unit), = check.also
    # The planted error (examples/plant/make_balance.py): the stated 62.3 MW is 85 % of the need, so the
    # imbalance is 62.3 (1/0.85 - 1) = 10.99 MW, within the sheet's rounding of the streams.
    assert unit == "MW" and imbalance_MW == pytest.approx(62.3 * (1 / 0.85 - 1), abs=0.15)
    text = render_text(audit_report(plant_audit, details=False), width=200)
    row = next(line for line in text.splitlines() if line.startswith("R-101 primary reformer    energy balance"))
    assert f"+{check.value:.4g} K (+{imbalance_MW:.4g} MW)" in row
    document = audit_document(plant_audit)
    reformer = next(u for u in document["units"] if u["id"].startswith("R-101"))
    energy = next(c for c in reformer["checks"] if c["check"] == "energy balance")
    assert energy["also"] == [{"value": pytest.approx(imbalance_MW, rel=1e-12), "unit": "MW"}]


# --- item 2: the stream table in the trade's layout, in every form --------------------------------

def float_noise(text):
    """Numbers in a file written with a sum's last bit (865.0000000000001: more than 12 significant digits)
    or as a negative zero."""
    import csv
    import io

    noisy = []
    for row in csv.reader(line for line in io.StringIO(text) if not line.startswith("#")):
        for cell in row:
            try:
                x = float(cell)
            except ValueError:
                continue
            if float(f"{x:.12g}") != x or (x == 0.0 and cell.startswith("-")):
                noisy.append(cell)
    return noisy


def test_float_noise_is_recognised():
    assert float_noise("a,865.0000000000001,52.20000000000002\nb,-0.0,9.99999993505,1e-20\n") == [
        "865.0000000000001", "52.20000000000002", "-0.0"]


@pytest.fixture(scope="module")
def so2_files(tmp_path_factory):
    folder = tmp_path_factory.mktemp("so2")
    code = main(["settle", str(EXAMPLES / "so2_converter.toml"), "--quiet", "--csv", str(folder / "s.csv"),
                 "--xlsx", str(folder / "s.xlsx"), "--html", str(folder / "s.html")])
    assert code == 0
    return folder


@pytest.fixture(scope="module")
def so2_result():
    from gibbsmin.case import read_case, settle_case

    return settle_case(read_case(EXAMPLES / "so2_converter.toml"))


SO2_STREAMS = ["feed", "bed 1 outlet", "bed 2 inlet", "bed 2 outlet", "bed 3 inlet", "bed 3 outlet"]


def _csv_blocks(text):
    """The CSV's table blocks by name: the block's lines without its '#' lines."""
    blocks = {}
    for block in text.split("\n\n")[1:]:
        lines = block.strip("\n").splitlines()
        name = lines[0].removeprefix("# table ").split(":")[0]
        blocks[name] = "\n".join(line for line in lines if not line.startswith("#"))
    return blocks


def test_stream_table_figures_of_the_so2_converter(so2_files):
    pandas = pytest.importorskip("pandas")
    periodictable = pytest.importorskip("periodictable")
    table = pandas.read_excel(so2_files / "s.xlsx", sheet_name="streams", header=0, index_col=[0, 1])
    assert list(table.columns) == SO2_STREAMS
    feed = table["feed"]
    # As typed in the case file: 420 degC, 1.35 bar absolute, 5200 kmol/h of 10.5 % SO2, 10 % O2, 79.5 % N2;
    # the intercoolers' 440 and 430 degC.
    assert feed["temperature", "degC"] == pytest.approx(420.0, abs=1e-9)
    assert table.loc[("temperature", "degC"), "bed 2 inlet"] == pytest.approx(440.0, abs=1e-9)
    assert table.loc[("temperature", "degC"), "bed 3 inlet"] == pytest.approx(430.0, abs=1e-9)
    assert feed["pressure", "bar abs"] == pytest.approx(1.35, abs=1e-12)
    # Gauge pressure against one standard atmosphere, 1.01325 bar (NIST SP 811, Appendix B).
    assert feed["pressure", "bar(g)"] == pytest.approx(1.35 - 1.01325, abs=1e-12)
    assert feed["total flow", "kmol/h"] == pytest.approx(5200.0, rel=1e-12)
    # Normal volume: 22.41397 m3/kmol of ideal gas at 0 degC, 1.01325 bar (CODATA 2018 R = 8.314462618).
    assert feed["total flow", "Nm3/h (0 degC, 1.01325 bar)"] == pytest.approx(5200 * 22.41397, rel=1e-6)
    S, O, N = periodictable.S.mass, periodictable.O.mass, periodictable.N.mass
    kg_h = 5200 * (0.105 * (S + 2 * O) + 0.10 * 2 * O + 0.795 * 2 * N)
    assert feed["total flow", "kg/h"] == pytest.approx(kg_h, rel=1e-4)  # periodictable's weights differ slightly
    for stream in SO2_STREAMS:
        column = table[stream]
        assert column["total flow", "kg/h"] == pytest.approx(feed["total flow", "kg/h"], rel=1e-12)  # mass kept
        assert column["SO2", "kmol/h"] + column["SO3", "kmol/h"] == pytest.approx(546.0, rel=1e-12)  # sulfur kept
        assert column["N2", "kmol/h"] == pytest.approx(4134.0, rel=1e-12)  # frozen
        wet = sum(column[s, "mol% wet"] for s in ("SO2", "SO3", "O2", "N2"))
        assert wet == pytest.approx(100.0, rel=1e-12)
        assert column["SO3", "mol% dry"] == pytest.approx(column["SO3", "mol% wet"], rel=1e-12)  # no water
    # Each intercooler changes the temperature only.
    assert table["bed 2 inlet"].drop(("temperature", "degC")).tolist() == pytest.approx(
        table["bed 1 outlet"].drop(("temperature", "degC")).tolist(), rel=1e-12)


def test_stream_table_files_parse_and_carry_no_float_noise(so2_files):
    pandas = pytest.importorskip("pandas")
    import io

    text = (so2_files / "s.csv").read_text()
    assert float_noise(text) == []
    blocks = _csv_blocks(text)
    assert "streams" in blocks and "stages" in blocks
    from_csv = pandas.read_csv(io.StringIO(blocks["streams"]), index_col=[0, 1])
    from_xlsx = pandas.read_excel(so2_files / "s.xlsx", sheet_name="streams", header=0, index_col=[0, 1])
    assert list(from_csv.columns) == SO2_STREAMS
    assert from_csv.to_numpy() == pytest.approx(from_xlsx.to_numpy(), rel=1e-15)
    for name, frame in pandas.read_excel(so2_files / "s.xlsx", sheet_name=None, header=0).items():
        if name == "summary":
            continue
        assert not any(str(c).startswith("Unnamed") for c in frame.columns), name  # headings in row 1
        numbers = frame.select_dtypes("number").to_numpy().ravel()
        assert all(float(f"{x:.12g}") == x for x in numbers if x == x), name
        assert not any(x == 0 and str(x).startswith("-") for x in numbers), name


def test_stream_table_in_the_terminal_and_the_page(so2_result, so2_files, capsys):
    from gibbsmin.report.settle import settle_report
    from gibbsmin.report.text import render_text

    text = render_text(settle_report(so2_result), width=200)
    block = text[text.index("Stream table"):].split("\n\n")[0].splitlines()
    assert block[1].split()[:2] == ["item", "unit"] and "bed 3 outlet" in block[1]
    temperature = next(line for line in block if line.startswith("temperature"))
    assert temperature.split()[2:5] == ["420.00", f"{so2_result.stages[0].equilibrium.T - 273.15:.2f}", "440.00"]
    gauge = next(line for line in block if line.startswith("pressure") and "bar(g)" in line)
    assert gauge.split()[2] == "0.33675"
    assert any("Nm3/h (0 degC, 1.01325 bar)" in line for line in block)
    page = (so2_files / "s.html").read_text()
    assert page.index("<h2>Stream table</h2>") < page.index("<figure>")


def test_stream_table_of_the_reformer_splits_steam_from_the_dry_gas():
    from gibbsmin.case import read_case, settle_case
    from gibbsmin.report.stream_table import stream_table

    table = stream_table(settle_case(read_case(EXAMPLES / "reformer.toml")))
    names = [c.title for c in table.columns]
    assert names == ["item", "unit", "natural_gas", "recycle_hydrogen", "outlet"]
    rows = {(r[0], r[1]): r[2:] for r in table.rows}
    # As typed: the dry analysis of the natural gas, and steam at S/C 3.0 on its hydrocarbon carbon:
    # 3.0 x 1450 x (0.931 + 2 x 0.036 + 3 x 0.006) = 4441.35 kmol/h.
    for species, typed in {"CH4": 93.1, "C2H6": 3.6, "C3H8": 0.6, "CO2": 1.2, "N2": 1.5}.items():
        assert rows[species, "mol% dry"][0] == pytest.approx(typed, rel=1e-12)
    assert rows["H2O", "kmol/h"][0] == pytest.approx(4441.35, rel=1e-12)
    assert ("H2O", "mol% dry") not in rows
    assert rows["pressure", "bar(g)"][0] == pytest.approx(31.5, rel=1e-12)
    assert rows["pressure", "bar(g)"][2] == pytest.approx(29.8, rel=1e-12)
    assert rows["temperature", "degC"][2] == pytest.approx(865.0, abs=1e-9)


# --- item 3: the settle report's facts say only what holds -----------------------------------------


def _facts(case_path, capsys=None):
    import warnings

    from gibbsmin.case import read_case, settle_case
    from gibbsmin.report.settle import settle_report

    case = read_case(case_path)
    result = settle_case(case)
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        report = settle_report(result)
    return dict(report.facts), report, [str(w.message) for w in caught]


def test_reformer_feed_line_gives_dry_gas_and_steam_apart():
    facts, _, caught = _facts(EXAMPLES / "reformer.toml")
    # As typed: 1450 kmol/h of dry gas, steam at S/C 3.0 = 4441.35 kmol/h (see the stream-table test).
    assert facts["feed natural_gas"].startswith("1450 kmol/h dry gas + 4441.35 kmol/h steam (5891.35 kmol/h in all)")
    assert "S/C 3.000 (hydrocarbon basis)" in facts["feed natural_gas"]
    assert "at 520.00 degC, 31.5 bar(g) (32.5132 bar abs)" in facts["feed natural_gas"]  # typed 31.5 bar(g)
    assert "S/C" not in facts["feed recycle_hydrogen"] and "steam" not in facts["feed recycle_hydrogen"]
    assert caught == []


def test_no_steam_to_carbon_line_where_no_hydrocarbon_free_to_react_meets_steam():
    # The methanol loop: its methane is held inert and its CH3OH carbon is not S/C carbon; no S/C was asked for,
    # so neither an S/C line nor a warning about CH3OH. The ammonia loop has no steam at all.
    facts, _, caught = _facts(EXAMPLES / "methanol_converter_pr.toml")
    assert "S/C" not in facts["feed feed"] and facts["feed feed"].startswith("10000 kmol/h dry gas + 50 kmol/h H2O")
    assert not any("CH3OH" in w for w in caught)
    facts, _, caught = _facts(EXAMPLES / "ammonia_converter_pr.toml")
    assert "S/C" not in facts["feed feed"] and caught == []


def test_no_steam_to_carbon_line_where_every_reactor_holds_the_hydrocarbons():
    # The shift train: its CH4 is held by both shift services, so S/C (15.1 here) would mean nothing.
    facts, _, _ = _facts(EXAMPLES / "shift_train.toml")
    assert "S/C" not in facts["feed feed"] and facts["feed feed"].startswith("4603 kmol/h dry gas + 2640 kmol/h H2O")


def test_steam_to_carbon_of_separate_gas_and_steam_feeds(tmp_path):
    case = tmp_path / "two_feeds.toml"
    case.write_text('[case]\ntitle = "invented"\n[feed.gas]\nunit = "kmol/h"\nCH4 = 100.0\nCH3OH = 5.0\n'
                    'T = "500 degC"\n[feed.steam]\nunit = "kmol/h"\nH2O = 300.0\nT = "500 degC"\n'
                    '[conditions]\nT = "850 degC"\nP = "20 bar(g)"\n')
    facts, _, caught = _facts(case)
    assert "S/C" not in facts["feed gas"] and facts["feed steam"].startswith("300 kmol/h steam")
    # 300 kmol/h H2O over 100 kmol/h of methane carbon (the CH3OH carbon is not hydrocarbon carbon).
    assert facts["feeds mixed"] == "S/C 3.000 (hydrocarbon basis; the carbon of CH3OH not counted)"
    assert caught == []


def test_duty_note_names_the_residual_enthalpy_of_a_cubic(tmp_path):
    text = (EXAMPLES / "ammonia_bed.toml").read_text().replace('P = "144 bar(g)"\n',
                                                              'P = "144 bar(g)"\ngas = "peng-robinson"\n')
    assert "peng-robinson" in text
    case = tmp_path / "bed_pr.toml"
    case.write_text(text)
    _, report, _ = _facts(case)
    stages = next(t for t in report.tables if t.key == "stages")
    assert "plus the peng-robinson residual enthalpy of the gas" in stages.notes[0]
    _, ideal, _ = _facts(EXAMPLES / "ammonia_bed.toml")
    note = next(t for t in ideal.tables if t.key == "stages").notes[0]
    assert "ideal-gas enthalpies" in note and "residual" not in note


def test_a_failed_carbon_limit_search_is_named_not_dropped(monkeypatch):
    import gibbsmin.case.run
    from gibbsmin.errors import ConvergenceError

    def failing(*args, **kwargs):
        raise ConvergenceError("no sign change of ln a_C found")

    # The case run searches the limit (the report only formats it).
    monkeypatch.setattr(gibbsmin.case.run, "carbon_limit", failing)
    _, report, _ = _facts(EXAMPLES / "reformer.toml")
    carbon = next(t for t in report.tables if t.key == "carbon")
    assert carbon.rows[0][4] == pytest.approx(3.0, rel=1e-12) and carbon.rows[0][5] is None
    assert "outlet: min S/C not found (no sign change of ln a_C found)" in carbon.notes


def test_stream_table_with_graphite_and_liquid_water(tmp_path):
    from gibbsmin.case import read_case, settle_case
    from gibbsmin.report.stream_table import stream_table

    case = tmp_path / "low_steam.toml"
    case.write_text('[case]\ntitle = "invented low-steam reformer and its cooler"\n[feed]\nunit = "kmol/h"\n'
                    'CH4 = 100.0\nH2O = 50.0\nT = "500 degC"\nP = "20 bar(g)"\n'
                    '[[stage]]\nname = "reformer"\nT = "700 degC"\nP = "20 bar(g)"\n'
                    '[[stage]]\nname = "cooler"\nT = "40 degC"\nP = "19 bar(g)"\n')
    table = stream_table(settle_case(read_case(case)))
    rows = {(r[0], r[1]): r[2:] for r in table.rows}
    reformer, cooler = 1, 2
    assert rows["C(s)", "kmol/h"][reformer] > 1.0 and rows["H2O(l)", "kmol/h"][cooler] > 40.0
    assert ("C(s)", "mol% wet") not in rows and ("H2O(l)", "mol% wet") not in rows
    for k in (reformer, cooler):
        condensed = rows["C(s)", "kmol/h"][k] + rows["H2O(l)", "kmol/h"][k]
        assert rows["gas flow", "kmol/h"][k] + condensed == pytest.approx(rows["total flow", "kmol/h"][k], rel=1e-12)
    # Over liquid water at 40 degC the gas holds p_sat/P of steam: 7.3849 kPa (IAPWS-95, Wagner and Pruss 2002)
    # over 2001.325 kPa = 0.3690 mol%; the NASA liquid data and the ideal gas give it within 1 %.
    assert rows["H2O", "mol% wet"][cooler] == pytest.approx(100 * 7.3849 / 2001.325, rel=0.01)
    assert any("C(s), H2O(l): condensed" in note for note in table.notes)


def test_audit_workbook_and_csv_read_as_tables(plant_audit, tmp_path):
    import io

    pandas = pytest.importorskip("pandas")
    from gibbsmin.report.audit import audit_report
    from gibbsmin.report.files import write_report_files

    write_report_files(audit_report(plant_audit), csv=str(tmp_path / "a.csv"), xlsx=str(tmp_path / "a.xlsx"))
    verdicts = pandas.read_excel(tmp_path / "a.xlsx", sheet_name="verdicts", header=0)
    assert list(verdicts.columns) == ["where", "check", "value", "unit", "also", "verdict"]
    assert (verdicts["verdict"] == "fail").sum() == 4 and len(verdicts) == len(plant_audit.checks)
    text = (tmp_path / "a.csv").read_text()
    assert float_noise(text) == []
    findings = pandas.read_csv(io.StringIO(_csv_blocks(text)["findings"]), keep_default_na=False)  # "n/a" as text
    assert findings["verdict"].tolist() == ["fail"] * 4 + ["warn", "n/a"]


@pytest.mark.skipif(not (shutil.which("chromium") or os.path.exists("/usr/bin/chromium")),
                    reason="headless Chromium is not installed on this machine")
def test_audit_findings_are_on_the_first_screen_in_a_browser(plant_audit, tmp_path):
    # Laid out by headless Chromium 1200 px wide: the findings heading within the first 800 px (it was at
    # 4,783 px below ten closure charts before issue 16).
    import re
    import subprocess

    from gibbsmin.report.audit import audit_report
    from gibbsmin.report.html import render_html

    page = tmp_path / "audit.html"
    page.write_text(render_html(audit_report(plant_audit)))
    probe = tmp_path / "probe.html"
    probe.write_text(
        f'<!DOCTYPE html><html><body><iframe id="f" src="{page.as_uri()}" style="width:1200px;height:800px">'
        '</iframe><pre id="out">pending</pre><script>'
        "document.getElementById('f').onload = function () {"
        " var d = document.getElementById('f').contentDocument;"
        " var h = Array.from(d.querySelectorAll('h2')).find(function (e) {"
        "  return e.textContent.indexOf('Findings') === 0; });"
        " document.getElementById('out').textContent = 'findings at ' + Math.round(h.getBoundingClientRect().top);"
        "};</script></body></html>")
    browser = shutil.which("chromium") or "/usr/bin/chromium"
    done = subprocess.run([browser, "--headless", "--disable-gpu", "--no-sandbox", "--allow-file-access-from-files",
                           "--virtual-time-budget=5000", "--dump-dom", probe.as_uri()],
                          capture_output=True, text=True, timeout=90)
    found = re.search(r"findings at (\d+)", done.stdout)
    assert found, done.stderr[-500:]
    assert int(found.group(1)) < 800


def test_an_outlet_with_no_gas_phase_shows_no_gas_composition(tmp_path):
    # Water at 27 degC and 1 bar is all liquid (its vapour pressure is 3.6 kPa, IAPWS-95, from memory):
    # no gas mol% may be printed, neither 100 % for an empty gas nor 0 % per species.
    case = tmp_path / "water.toml"
    case.write_text('[case]\ntitle = "invented: water cooled"\n[feed]\nunit = "kmol/h"\nH2O = 100.0\n'
                    '[conditions]\nT = "27 degC"\nP = "1 bar"\n')
    _, report, _ = _facts(case)
    tables = {t.key: t for t in report.tables}
    outlet = tables["outlet"]
    assert [r[0] for r in outlet.rows] == ["H2O(l)", "total gas"]
    assert outlet.rows[-1][2:] == (0.0, None, None)
    assert outlet.notes == ("(no gas phase: the condensed phases hold every atom)",)
    stream = next(t for t in report.tables if t.title.startswith("Stream table"))
    wet = next(r for r in stream.rows if r[:2] == ("H2O", "mol% wet"))
    assert wet[2] == pytest.approx(100.0) and wet[3] is None  # feed: all steam; outlet: no gas


def test_a_feed_typed_without_a_temperature_shows_none(tmp_path):
    # The case gives the feed no T: the stream table must not show the reader's 25 degC placeholder.
    case = tmp_path / "no_feed_T.toml"
    case.write_text('[case]\ntitle = "invented"\n[feed]\nunit = "kmol/h"\nCH4 = 100.0\nH2O = 300.0\n'
                    '[conditions]\nT = "850 degC"\nP = "20 bar(g)"\n')
    _, report, _ = _facts(case)
    stream = next(t for t in report.tables if t.title.startswith("Stream table"))
    temperature = next(r for r in stream.rows if r[0] == "temperature")
    assert temperature[2] is None and temperature[3] == pytest.approx(850.0)
