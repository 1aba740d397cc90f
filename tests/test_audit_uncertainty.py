"""The audit's approach temperatures with their data uncertainty, on the invented Birchwood front end.

With ``[plant] data = "atct-anchored"`` every approach carries the standard
uncertainty of its T_eq from the formation enthalpies' stated uncertainties.
The reference is a 2,000-draw Monte Carlo of T_eq over the same inputs (common
practice, GUM Supplement 1, JCGM 101:2008; no outside numbers): each draw
shifts the enthalpies of formation and solves ln K(T) = ln Q of the stated gas
anew.
"""

from __future__ import annotations

import csv
import io
import json
from pathlib import Path

import numpy as np
import pytest
from test_uncertainty import DRAWS, _equilibrium_temperatures

from gibbsmin.audit import audit_plant, read_plant
from gibbsmin.cli import main
from gibbsmin.report.audit import audit_document, audit_report
from gibbsmin.report.spreadsheet import render_csv
from gibbsmin.report.html import render_html
from gibbsmin.report.text import render_text
from gibbsmin.thermo import data_set
from gibbsmin.uncertainty import formation_uncertainties

PLANT = Path(__file__).resolve().parents[1] / "examples" / "plant"
SHIFT = "R-103 HT shift converter"


def _anchored_units(tmp_path: Path) -> Path:
    """The example's unit description with the ATcT-anchored data chosen in its [plant] table."""
    text = (PLANT / "units.toml").read_text()
    text = text.replace('stream_table = "streams.csv"\n',
                        f'stream_table = {str(PLANT / "streams.csv")!r}\ndata = "atct-anchored"\n')
    path = tmp_path / "units.toml"
    path.write_text(text)
    return path


@pytest.fixture(scope="module")
def anchored(tmp_path_factory):
    return audit_plant(read_plant(_anchored_units(tmp_path_factory.mktemp("plant"))))


def _finding(result, unit_label, reaction):
    unit = next(u for u in result.units if u.spec.label == unit_label)
    return next(f for f in unit.reactions if f.name == reaction)


def test_shift_approach_uncertainty_matches_monte_carlo(anchored):
    from gibbsmin.reactions import approach_temperatures

    finding = _finding(anchored, SHIFT, "water-gas shift")
    outlet = anchored.plant.table["9"]
    db = data_set("atct-anchored")
    gas = {s: n for s, n in outlet.flows.items() if db[s].is_gas}
    approach = approach_temperatures(gas, outlet.T, outlet.P, ["water-gas shift"], db=db)["water-gas shift"]
    rx = approach.reaction
    rng = np.random.default_rng(11)
    shifts = rng.normal(size=(DRAWS, len(rx.records))) * formation_uncertainties(rx.records)
    T_eq = _equilibrium_temperatures(rx, approach.ln_Q, approach.T_eq, shifts)
    assert finding.uncertainty_K == pytest.approx(T_eq.std(ddof=1), rel=0.10)
    assert 0.05 < finding.uncertainty_K < 2.0
    # The planted error: the shift went 8 K beyond equilibrium, far outside the data's uncertainty.
    assert finding.approach_K < -3.0 and finding.verdict == "fail"


def test_every_approach_has_its_uncertainty_and_says_it(anchored):
    findings = [f for u in anchored.units for f in u.reactions]
    assert len(findings) >= 3
    assert all(f.uncertainty_K is not None and f.uncertainty_K > 0 for f in findings)
    check = next(c for c in anchored.checks if c.where == SHIFT and c.name == "approach water-gas shift")
    u = _finding(anchored, SHIFT, "water-gas shift").uncertainty_K
    assert f"K beyond equilibrium, data uncertainty {float(f'{u:.2g}'):g} K" in check.detail
    assert "within twice" not in check.detail


def test_the_report_files_carry_the_uncertainty(anchored):
    report = audit_report(anchored)
    table = next(t for t in report.tables if t.key == "approach")
    column = [c.title for c in table.columns].index("data uncertainty [K]")
    assert all(isinstance(row[column], float) for row in table.rows)
    text = render_text(report)
    assert "data uncertainty [K]" in text and "atct-anchored" in text
    assert "data uncertainty [K]" in render_html(report)
    rows = list(csv.reader(io.StringIO(render_csv(report))))
    header = next(r for r in rows if "data uncertainty [K]" in r)
    assert len(header) == len(table.columns)
    document = audit_document(anchored)
    assert document["data_set"] == "atct-anchored"
    shift = next(u for u in document["units"] if u["id"] == "R-103")
    assert shift["reactions"][0]["approach_uncertainty_K"] == pytest.approx(
        _finding(anchored, SHIFT, "water-gas shift").uncertainty_K)


def test_a_data_set_without_uncertainties_says_how_to_have_them(tmp_path):
    result = audit_plant(read_plant(PLANT / "units.toml"), db=data_set("nasa-1993"))
    assert all(f.uncertainty_K is None for u in result.units for f in u.reactions)
    table = next(t for t in audit_report(result).tables if t.key == "approach")
    assert any("set [plant] data = 'atct-anchored'" in note for note in table.notes)
    assert "data uncertainty" not in next(c for c in result.checks if c.name == "approach water-gas shift").detail


def test_the_command_line_audit_reads_the_data_key(tmp_path, capsys):
    units = _anchored_units(tmp_path)
    assert main(["audit", str(units), "--json"]) in (0, 1)
    document = json.loads(capsys.readouterr().out)
    assert document["data_set"] == "atct-anchored"
    assert all(r["approach_uncertainty_K"] > 0 for u in document["units"] for r in u["reactions"])


def test_an_unknown_data_set_in_the_plant_table_is_named(tmp_path):
    import gibbsmin

    units = _anchored_units(tmp_path)
    units.write_text(units.read_text().replace('data = "atct-anchored"', 'data = "atct"'))
    with pytest.raises(gibbsmin.InputError, match="data.*atct-anchored"):
        read_plant(units)
