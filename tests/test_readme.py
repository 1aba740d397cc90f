"""The README's promises: its commands match CI, and its Python examples run."""

from __future__ import annotations

import re
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
README = (ROOT / "README.md").read_text(encoding="utf-8")
PYTHON_BLOCKS = re.findall(r"```python\n(.*?)```", README, flags=re.S)
SETUP = "python3 -m venv .venv && .venv/bin/pip install -e '.[test]'"


def test_the_first_paragraph_states_the_job():
    first = README.split("\n\n")[1]
    for words in ("reformers", "equilibrium", "Gibbs energy", "carbon"):
        assert words in first


def test_the_two_commands_are_there_and_ci_runs_the_tests_command():
    commands = re.findall(r"```\n(python3 -m venv[^\n]*)\n```", README)
    assert len(commands) == 2
    assert all(c.startswith(SETUP) for c in commands)
    assert commands[0].endswith("gibbsmin settle examples/reformer.toml")
    test_command = commands[1].split("&& ")[-1].replace(".venv/bin/", "")
    ci = (ROOT / ".ci" / "run").read_text()
    assert test_command in ci.replace(".venv/bin/", "")


def test_the_readme_carries_the_safety_caution():
    assert "licensed engineering practice" in README and "local" in README


@pytest.mark.parametrize("block", PYTHON_BLOCKS, ids=[f"block{i}" for i in range(len(PYTHON_BLOCKS))])
def test_python_examples_run(block, tmp_path, monkeypatch, capsys):
    monkeypatch.chdir(tmp_path)
    exec(compile(block, "README.md", "exec"), {})


def test_the_high_pressure_table_is_what_the_engine_gives():
    # The README's ammonia converter at 200 bar: every printed figure reproduced to its last digit.
    import gibbsmin

    block = README[README.index("species   ideal mol%   PR mol%   phi (PR)"):]
    rows = [line.split() for line in block.split("```")[0].splitlines()[1:] if line.strip()]
    feed = {"H2": 64.5, "N2": 21.5, "NH3": 3.0, "CH4": 7.0, "Ar": 4.0}
    ideal = gibbsmin.equilibrate(feed, 723.15, 200e5, inert=["CH4", "Ar"])
    pr = gibbsmin.equilibrate(feed, 723.15, 200e5, inert=["CH4", "Ar"], gas="peng-robinson")
    assert [r[0] for r in rows] == list(feed)
    for name, y_ideal, y_pr, phi in rows:
        assert float(y_ideal) == pytest.approx(100 * ideal.mole_fractions[name], abs=0.005)
        assert float(y_pr) == pytest.approx(100 * pr.mole_fractions[name], abs=0.005)
        assert float(phi) == pytest.approx(pr.extras["fugacity_coefficients"][name], abs=0.0005)


def _python_blocks_with_their_output():
    blocks = [(m.group(1), m.group(2), m.start(), m.end()) for m in re.finditer(r"```(\w*)\n(.*?)```", README, re.S)]
    return [(code, shown) for (lang, code, _, end), (lang2, shown, start2, _) in zip(blocks, blocks[1:])
            if lang == "python" and lang2 == "" and not README[end:start2].strip()]


SHOWN = _python_blocks_with_their_output()


def test_some_example_shows_its_output():
    assert SHOWN, "the README should show what at least one example prints"


@pytest.mark.parametrize(("code", "shown"), SHOWN, ids=[f"output{i}" for i in range(len(SHOWN))])
def test_an_example_prints_what_the_readme_shows(code, shown, tmp_path, monkeypatch, capsys):
    monkeypatch.chdir(tmp_path)
    exec(compile(code, "README.md", "exec"), {})
    assert capsys.readouterr().out.strip() == shown.strip()
