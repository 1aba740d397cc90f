"""The report, JSON document and audit files of a converged flowsheet (the invented ammonia loop of
test_flowsheet_summary): the JSON equals the result's streams, the text shows the stream table's numbers, and
``gibbsmin audit``'s reader and checks pass every closure of gibbsmin's own loop and fail exactly the units
next to a stream edited by 1 %."""

from __future__ import annotations

import csv
import json

import pytest

from gibbsmin.audit import audit_plant, read_plant
from gibbsmin.audit.checks import mass_flow
from gibbsmin.report import CAUTION, render_text
from gibbsmin.report.files import write_report_files
from gibbsmin.report.flowsheet import flowsheet_json, flowsheet_report, write_audit_files

from test_flowsheet_summary import MAKEUP, loop  # noqa: F401 (loop: the converged loop, a fixture)

#: kmol/h in mol/s (definition).
KMOL_H = 1000.0 / 3600.0
CLOSURES = ("element closure", "mass closure", "component closure")


def test_json_keys_and_values(loop):
    result, db, context = loop
    document = flowsheet_json(result, db, context=context)
    json.dumps(document, allow_nan=False)  # plain JSON
    assert {"streams", "boundary", "flowsheet", "summary", "units", "caution"} <= set(document)
    assert set(document["streams"]) == set(result.streams)
    for name, m in result.streams.items():
        entry = document["streams"][name]
        assert entry["T_K"] == m.T and entry["P_Pa"] == m.P
        assert entry["flows_mol_s"] == pytest.approx(dict(m.flows), rel=0, abs=0)
    assert document["boundary"] == {"in": ["makeup"], "out": ["product", "purge"]}
    sheet = document["flowsheet"]
    assert sheet["converged"] is True
    assert sheet["tear_residual"] == result.certificate.tear_residual <= 1e-10
    assert sheet["element_balance_residual"] == result.certificate.element_balance_residual <= 1e-9
    summary = document["summary"]
    assert summary["product"] == "NH3"
    assert summary["recycle_ratio"] == pytest.approx(result.streams["recycle"].total / sum(MAKEUP.values()), rel=1e-12)
    assert document["units"]["converter"]["duty_W"] == result.outcomes["converter"].duty_W
    assert document["units"]["purge split"]["duty_W"] is None
    assert document["caution"] == CAUTION


def _row(text: str, label: str, unit: str) -> list[str]:
    for line in text.splitlines():
        cells = line.split()
        if cells[:2] == [label, unit]:
            return cells[2:]
    raise AssertionError(f"no row {label} {unit}")


def test_text_report_shows_the_stream_table(loop):
    result, db, context = loop
    text = render_text(flowsheet_report(result, db, context=context), width=200)
    streams = result.streams
    names = ["makeup", "converter feed", "converter out", "separator vapour", "product", "purge", "recycle"]
    nh3 = _row(text, "NH3", "kmol/h")
    assert len(nh3) == len(names)
    for name, cell in zip(names, nh3):  # kmol/h to two decimals
        assert float(cell) == pytest.approx(streams[name].flows.get("NH3", 0.0) / KMOL_H, abs=0.006)
    temperature = _row(text, "Temperature", "degC")
    assert float(temperature[names.index("product")]) == pytest.approx(-20.0, abs=0.006)
    total = _row(text, "Total", "flow")  # "Total flow kmol/h ..."
    assert total[0] == "kmol/h" and float(total[2]) == pytest.approx(streams["converter feed"].total / KMOL_H, abs=0.006)
    h2 = _row(text, "H2", "mol%")
    feed = streams["converter feed"]
    assert float(h2[1]) == pytest.approx(100 * feed.flows["H2"] / feed.total, abs=6e-5)
    vapour = _row(text, "Vapour", "fraction")
    assert vapour[1 + names.index("product")] == "0.000" and vapour[1] == "1.000"
    assert "Loop summary" in text and "recycle over makeup" in text
    assert "Caution: these figures are thermodynamic limits" in text


def test_report_files_all_forms(loop, tmp_path):
    result, db, context = loop
    report = flowsheet_report(result, db, context=context)
    paths = write_report_files(report, csv=tmp_path / "r.csv", xlsx=tmp_path / "r.xlsx", html=tmp_path / "r.html")
    assert [p.name for p in paths] == ["r.csv", "r.xlsx", "r.html"]
    assert "# table streams: Stream table" in (tmp_path / "r.csv").read_text()
    assert "Loop summary" in (tmp_path / "r.html").read_text()


def _audit(streams_csv, units_toml, db):
    return audit_plant(read_plant(units_toml, streams_csv, db=db), db=db)


def test_audit_of_the_converged_loop_passes(loop, tmp_path):
    result, db, context = loop
    streams_csv, units_toml = write_audit_files(result, tmp_path, db, context)
    audit = _audit(streams_csv, units_toml, db)
    closures = [c for c in audit.checks if c.name in CLOSURES]
    assert {c.where for c in closures} == {"loop mixer", "converter", "separator", "purge split"}
    assert len(closures) == 11  # element and mass everywhere, component where nothing reacts
    for check in closures:
        assert check.verdict == "pass" and abs(check.value) < 1e-8, check
    for check in audit.checks:  # the energy, equilibrium and approach checks too, but the separator's energy
        assert check.verdict == ("n/a" if (check.where, check.name) == ("separator", "energy balance") else "pass")
    converter = {c.name: c for c in audit.checks if c.where == "converter"}
    assert abs(converter["equilibrium at stated T, P"].value) < 1e-6  # mol% dry
    assert abs(converter["approach ammonia synthesis"].value) < 1e-6  # K
    assert abs(converter["energy balance"].value) < 1e-6  # K


def test_a_stream_edited_by_one_percent_fails_its_units(loop, tmp_path):
    result, db, context = loop
    streams_csv, units_toml = write_audit_files(result, tmp_path, db, context)
    rows = list(csv.reader(streams_csv.open()))
    column = rows[0].index("recycle")
    for row in rows:
        if row[1] == "kmol/h":  # the total and every species' flow
            row[column] = repr(float(row[column]) * 1.01)
    with streams_csv.open("w", newline="") as out:
        csv.writer(out, lineterminator="\n").writerows(rows)
    audit = _audit(streams_csv, units_toml, db)
    for check in audit.checks:
        failing = check.where in ("loop mixer", "purge split") and check.name in CLOSURES
        assert (check.verdict == "fail") == failing, check
    # Mass closure of each unit, worked out by hand from the streams: 1 % of the recycle's mass over the inflow.
    mass = {name: mass_flow(m.flows, db) for name, m in result.streams.items()}
    mixer = next(c for c in audit.checks if (c.where, c.name) == ("loop mixer", "mass closure"))
    assert mixer.value == pytest.approx(-100 * 0.01 * mass["recycle"] / (mass["makeup"] + 1.01 * mass["recycle"]),
                                        rel=1e-6)
    splitter = next(c for c in audit.checks if (c.where, c.name) == ("purge split", "mass closure"))
    assert splitter.value == pytest.approx(100 * 0.01 * mass["recycle"] / mass["separator vapour"], rel=1e-6)
