"""Settle reports with uncertainty: the figures beside each flow, mol%, outlet T, approach and carbon limit.

The propagated figures themselves are checked against Monte Carlo in
test_uncertainty.py, test_uncertainty_energy.py and test_carbon_uncertainty.py;
here each report form (text, JSON, CSV, HTML) must carry exactly those figures
for the invented cases of examples/, and a case that asks for uncertainty its
data cannot give must be refused with the fix.
"""

from __future__ import annotations

import csv
import io
import json
from pathlib import Path

import pytest

from gibbsmin.case import CaseError, parse_case, settle_case
from gibbsmin.cli import main
from gibbsmin.report.html import render_html
from gibbsmin.report.settle import settle_document, settle_report
from gibbsmin.report.spreadsheet import render_csv
from gibbsmin.report.text import render_text

EXAMPLES = Path(__file__).resolve().parents[1] / "examples"


def _case_text(name: str, extra: str) -> str:
    """An example case with lines added to its [conditions] table."""
    text = (EXAMPLES / name).read_text()
    return text.replace("[conditions]\n", "[conditions]\n" + extra, 1)


ANCHORED = 'data = "atct-anchored"\nuncertainty = true\n'


@pytest.fixture(scope="module")
def reformer():
    return settle_case(parse_case(_case_text("reformer.toml", ANCHORED), "reformer.toml"))


@pytest.fixture(scope="module")
def bed():
    return settle_case(parse_case(_case_text("ammonia_bed.toml", ANCHORED), "ammonia_bed.toml"))


def _table(report, key):
    return next(t for t in report.tables if t.key == key)


def _column(table, title):
    return [row[[c.title for c in table.columns].index(title)] for row in table.rows]


def test_outlet_table_shows_each_flow_and_mol_percent_with_its_uncertainty(reformer):
    eq = reformer.outlet
    report = settle_report(reformer)
    table = _table(report, "outlet")
    species = _column(table, "species")
    wet, dry = _column(table, "u(mol% wet)"), _column(table, "u(mol% dry)")
    flow = _column(table, "u(flow) [kmol/h]")
    h2 = species.index("H2")
    assert wet[h2] == pytest.approx(100 * eq.mole_fraction_uncertainty["H2"], rel=1e-12)
    assert dry[h2] == pytest.approx(100 * eq.dry_mole_fraction_uncertainty["H2"], rel=1e-12)
    assert flow[h2] == pytest.approx(eq.uncertainty["H2"] * 3.6, rel=1e-9)  # mol/s to kmol/h
    assert 0 < wet[h2] < 0.1  # hundredths of a mol% from tens of J/mol
    assert species[-1] == "total gas" and wet[-1] is None
    assert any("standard uncertainty" in note for note in table.notes)
    text = render_text(report)
    assert "u(mol% wet)" in text and "u(flow) [kmol/h]" in text
    assert "u(mol% dry)" in render_html(report)
    rows = list(csv.reader(io.StringIO(render_csv(report))))
    header = next(r for r in rows if "u(mol% wet)" in r)
    assert header.index("u(mol% wet)") == header.index("mol% wet") + 1


def test_approach_and_carbon_limit_carry_their_uncertainty(reformer):
    from gibbsmin.carbon import carbon_limit

    report = settle_report(reformer)
    approach = _table(report, "approach")
    assert all(0 < u < 5 for u in _column(approach, "u(approach) [K]"))
    carbon = _table(report, "carbon")
    limit, u = _column(carbon, "min S/C")[0], _column(carbon, "u(min S/C)")[0]
    assert limit is not None and u is not None and 0 < u < 0.1 * limit
    document = settle_document(reformer)
    assert document["tables"]["carbon"][0]["u(min S/C)"] == pytest.approx(u)
    assert document["amount_uncertainty_mol"]["H2"] == pytest.approx(reformer.outlet.uncertainty["H2"])
    assert document["flow_uncertainty"]["H2"] == pytest.approx(reformer.outlet.uncertainty["H2"] * 3.6)
    # The same limit and uncertainty as the library gives for the stage's inlet less its water.
    stage = reformer.stages[0]
    dry = {s: n for s, n in stage.inlet.mixed.items() if s != "H2O"}
    direct = carbon_limit(dry, stage.equilibrium.T, stage.equilibrium.P, data="atct-anchored", uncertainty=True)
    assert (limit, u) == pytest.approx((direct.steam_to_carbon, direct.uncertainty), rel=1e-6)


def test_adiabatic_stage_shows_the_outlet_temperature_uncertainty(bed):
    eq = bed.outlet
    assert eq.T_uncertainty is not None and 0.01 < eq.T_uncertainty < 1.0
    report = settle_report(bed)
    stages = _table(report, "stages")
    assert _column(stages, "u(T out) [K]") == [eq.T_uncertainty]
    assert "u(T out) [K]" in render_text(report)
    assert settle_document(bed)["T_uncertainty_K"] == pytest.approx(eq.T_uncertainty)


def test_no_uncertainty_columns_unless_asked():
    result = settle_case(parse_case(_case_text("reformer.toml", 'data = "atct-anchored"\n'), "reformer.toml"))
    report = settle_report(result)
    titles = [c.title for t in report.tables for c in t.columns]
    assert not any(t.startswith("u(") for t in titles)
    assert "amount_uncertainty_mol" not in settle_document(result)


def test_uncertainty_with_a_data_set_that_states_none_is_refused_with_the_fix():
    case = parse_case(_case_text("reformer.toml", 'data = "nasa-1993"\nuncertainty = true\n'), "reformer.toml")
    with pytest.raises(CaseError, match=r"uncertainty: data set 'nasa-1993' states no uncertainty.*"
                                        r"data = \"atct-anchored\""):
        settle_case(case)


def test_the_settle_flag_asks_for_uncertainty_in_every_stage(tmp_path, capsys):
    path = tmp_path / "bed.toml"
    path.write_text(_case_text("ammonia_bed.toml", 'data = "atct-anchored"\n'))
    assert main(["settle", str(path), "--uncertainty", "--json"]) == 0
    document = json.loads(capsys.readouterr().out)
    assert 0.01 < document["T_uncertainty_K"] < 1.0
    path.write_text(_case_text("ammonia_bed.toml", 'data = "nasa-1993"\n'))
    assert main(["settle", str(path), "--uncertainty"]) == 2
    assert 'data = "atct-anchored"' in capsys.readouterr().err


def test_a_stage_with_a_held_approach_has_its_uncertainty():
    text = _case_text("reformer.toml", ANCHORED) + '\n[conditions.approach]\n"steam methane reforming" = "10 K"\n'
    result = settle_case(parse_case(text, "reformer.toml"))
    eq = result.outlet
    assert "approach" in eq.specification and 0 < eq.uncertainty["H2"] < 0.01 * eq.amounts["H2"]
    assert "u(mol% wet)" in render_text(settle_report(result))


def test_uncertainty_with_held_approaches_and_the_energy_balance_is_refused_clearly():
    text = (EXAMPLES / "ammonia_bed.toml").read_text().replace(
        "[conditions]\n", "[conditions]\n" + ANCHORED + 'approach = { "ammonia synthesis" = "10 K" }\n', 1)
    with pytest.raises(CaseError, match="uncertainty: is not propagated through held approaches with the energy"):
        settle_case(parse_case(text, "ammonia_bed.toml"))


def test_a_sweep_from_a_case_with_uncertainty_has_the_columns(tmp_path, capsys):
    path = tmp_path / "reformer.toml"
    path.write_text(_case_text("reformer.toml", ANCHORED))
    out = tmp_path / "map.csv"
    assert main(["sweep", str(path), "--vary", "T=800,850degC", "--csv", str(out)]) == 0
    header = out.read_text().splitlines()[0].split(",")
    assert "u_y_H2" in header and "u_y_CH4" in header
    path.write_text(_case_text("reformer.toml", 'data = "nasa-1993"\n'))
    assert main(["sweep", str(path), "--vary", "T=800,850degC", "--uncertainty", "--csv", str(out)]) == 2
    assert "atct-anchored" in capsys.readouterr().err
