"""Reports: self-contained HTML that escapes every input string, spreadsheets that run no formulas, atomic files.

What makes a page self-contained and safe (no scripts, no fetches, escaped text) and a
spreadsheet safe from formula injection is common practice, no source.
"""

from __future__ import annotations

import csv
import io
import os
import re
import shutil
import subprocess
import xml.etree.ElementTree as ElementTree
from pathlib import Path

import pytest

from gibbsmin.audit import audit_plant, read_plant
from gibbsmin.cli import main
from gibbsmin.report import CAUTION
from gibbsmin.report.audit import audit_report
from gibbsmin.report.document import Column, Plot, Report, Series, Table
from gibbsmin.report.files import write_atomic
from gibbsmin.report.html import render_html
from gibbsmin.report.spreadsheet import render_csv, render_xlsx
from gibbsmin.report.svg import nice_ticks, render_svg
from gibbsmin.report.text import render_table

EXAMPLES = Path(__file__).resolve().parents[1] / "examples"
HOSTILE = "<script>alert('x')</script>"

TABLE = (
    "Stream,unit,<script>,=HYPERLINK(\"http://evil\")\n"
    f"Description,,{HOSTILE},<img src=x onerror=alert(1)>\n"
    "Temperature,degC,400,850\n"
    "Pressure,bar(g),30,29\n"
    "CH4,kmol/h,100,25\n"
    "H2O,kmol/h,300,225\n"
    "CO,kmol/h,,45\n"
    "CO2,kmol/h,,30\n"
    "H2,kmol/h,,300\n"
)
UNITS = (
    '[plant]\ntitle = "<b>bold</b> & <i>plant</i>"\nstream_table = "streams.csv"\n'
    f'[unit."{HOSTILE}"]\nname = "<svg onload=alert(1)>"\ntype = "reactor"\ninlets = ["<script>"]\n'
    'outlets = [\'=HYPERLINK("http://evil")\']\nduty = "10 MW"\nreactions = ["steam methane reforming", "shift"]\n'
)


@pytest.fixture(scope="module")
def hostile_report(tmp_path_factory):
    folder = tmp_path_factory.mktemp("hostile")
    (folder / "streams.csv").write_text(TABLE)
    (folder / "units.toml").write_text(UNITS)
    return audit_report(audit_plant(read_plant(folder / "units.toml")))


def test_html_escapes_every_input_string(hostile_report):
    page = render_html(hostile_report)
    assert "<script" not in page.lower()
    assert "<img" not in page and "<b>" not in page and "<svg onload" not in page
    assert "&lt;script&gt;" in page and "&lt;b&gt;bold&lt;/b&gt; &amp; &lt;i&gt;plant&lt;/i&gt;" in page
    # The SVG plots parse as XML, so no label broke out of its element.
    for svg in re.findall(r"<svg.*?</svg>", page, re.S):
        ElementTree.fromstring(svg)
    assert len(re.findall(r"<svg", page)) == len(hostile_report.plots) > 0


def test_html_is_self_contained(hostile_report):
    assert not re.search(r"<[^>]*\s(src|href)=", render_html(hostile_report))  # hostile text makes no attributes
    page = render_html(audit_report(audit_plant(read_plant(EXAMPLES / "plant" / "units.toml"))))
    assert 'http-equiv="Content-Security-Policy"' in page and "default-src 'none'" in page
    without_namespace = page.replace('xmlns="http://www.w3.org/2000/svg"', "")
    for fetch in ("http://", "https://", " src=", " href=", "url(", "@import", "<link", "<iframe"):
        assert fetch not in without_namespace, fetch
    assert page.count(CAUTION.split(".")[0]) >= 1 and "local codes" in page


def test_spreadsheets_run_no_formulas(hostile_report, tmp_path):
    text = render_csv(hostile_report)
    cells = [c for row in csv.reader(io.StringIO(text)) for c in row]
    assert not any(c.startswith(("=", "+", "@")) for c in cells)
    assert any(c.startswith("'=HYPERLINK") for c in cells)
    openpyxl = pytest.importorskip("openpyxl")
    path = tmp_path / "r.xlsx"
    path.write_bytes(render_xlsx(hostile_report))
    book = openpyxl.load_workbook(path)
    texts = [cell for sheet in book.worksheets for row in sheet.iter_rows() for cell in row
             if isinstance(cell.value, str) and cell.value.startswith("=")]
    assert texts and all(cell.data_type == "s" for cell in texts)  # kept as text, never a formula
    assert book.sheetnames[0] == "summary" and "verdicts" in book.sheetnames


def test_xlsx_keeps_numbers_as_numbers(tmp_path):
    openpyxl = pytest.importorskip("openpyxl")
    report = Report("t", tables=(Table("x", (Column("a", "text"), Column("b", "percent")), (("H2", 47.52841),)),))
    path = tmp_path / "n.xlsx"
    path.write_bytes(render_xlsx(report))
    sheet = openpyxl.load_workbook(path)["x"]
    assert sheet["B2"].value == pytest.approx(47.52841, rel=1e-15)  # unrounded, with a display format (row 1: headings)
    assert sheet["B2"].number_format == "0.0000"


def test_atomic_write_leaves_nothing_half_written(tmp_path, monkeypatch):
    target = tmp_path / "report.html"
    target.write_text("old")

    def interrupted(*args):
        raise KeyboardInterrupt

    monkeypatch.setattr(os, "replace", interrupted)
    with pytest.raises(KeyboardInterrupt):
        write_atomic(target, "new")
    assert target.read_text() == "old"
    assert [p.name for p in tmp_path.iterdir()] == ["report.html"]


def test_interrupted_command_line_reports_one_line(tmp_path, monkeypatch, capsys):
    import gibbsmin.report.files as files

    def interrupted(*args):
        raise KeyboardInterrupt

    monkeypatch.setattr(files.os, "replace", interrupted)
    code = main(["settle", str(EXAMPLES / "n2o4.toml"), "--html", str(tmp_path / "n.html"), "--quiet"])
    err = capsys.readouterr().err
    assert code == 130 and err.count("\n") == 1 and "interrupted" in err
    assert list(tmp_path.iterdir()) == []


def test_written_files_have_the_usual_mode(tmp_path):
    path = write_atomic(tmp_path / "a.csv", "x")
    mask = os.umask(0)
    os.umask(mask)
    assert path.stat().st_mode & 0o777 == 0o666 & ~mask


def test_terminal_table_wraps_long_text_and_aligns_numbers():
    table = Table("t", (Column("where", "text"), Column("value", "figure"), Column("detail", "longtext")),
                  (("R-1", 1.23456, "word " * 40), ("R-22", -0.00001, "short")))
    lines = render_table(table, width=60).splitlines()
    assert all(len(line) <= 60 for line in lines)
    assert lines[3].startswith("R-1 ") and "1.235" in lines[3]
    assert any(line.startswith(" " * 10) and "word" in line for line in lines[4:])  # continuation lines
    assert "R-22" in render_table(table, 60) and " 0  short" in render_table(table, 60)  # noise shown as 0


@pytest.mark.parametrize("low, high", [(0.0, 1.0), (-0.37, 0.52), (380.0, 650.0), (1e-5, 3e-5), (5.0, 5.0)])
def test_ticks_are_round_and_cover_the_range(low, high):
    ticks = nice_ticks(low, high)
    assert ticks[0] <= low and ticks[-1] >= high and len(ticks) <= 12
    steps = {round(b - a, 12) for a, b in zip(ticks, ticks[1:])}
    assert len(steps) == 1


def test_line_and_bar_plots_are_valid_svg():
    line = Plot("T <curve>", "line", "T [degC]", "y", (Series("eq & more", (1.0, 2.0, 3.0), (0.1, 0.4, 0.2)),
                                                       Series("pts", (1.5,), (0.3,), "points")))
    bar = Plot("bars", "bar", "", "K", categories=("a<b", "c"), values=(3.0, -2.0), verdicts=("pass", "fail"),
               limits=(("warn", 1.0),))
    for plot in (line, bar):
        root = ElementTree.fromstring(render_svg(plot))
        assert root.tag.endswith("svg")


@pytest.mark.skipif(not (shutil.which("chromium") or os.path.exists("/usr/bin/chromium")),
                    reason="headless Chromium is not installed on this machine")
def test_report_opens_in_headless_chromium(hostile_report, tmp_path):
    page = tmp_path / "audit.html"
    page.write_text(render_html(hostile_report))
    browser = shutil.which("chromium") or "/usr/bin/chromium"
    done = subprocess.run([browser, "--headless", "--disable-gpu", "--no-sandbox", "--dump-dom", page.as_uri()],
                          capture_output=True, text=True, timeout=60)
    assert done.returncode == 0, done.stderr
    assert "&lt;script&gt;" in done.stdout and "<script>alert" not in done.stdout
