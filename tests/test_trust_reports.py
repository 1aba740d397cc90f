"""Reports that can be trusted (issue 16): outputs all or none, findings first, a stream table in the trade's
layout, settle facts that say only what holds.

What a practising engineer expects of a stream table and an audit page is common practice, no source.
"""

from __future__ import annotations

import os
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
