"""Case files read as the engineer meant them (issue 16): units required, losses that are losses, deep
nesting refused in one line, and stages that react only as their service allows.

What counts as a clear refusal (the key, the line and the fix in one line, exit 2) is common practice,
no source.
"""

from __future__ import annotations

import pytest

from gibbsmin.case import CaseError, parse_case
from gibbsmin.cli import main
from gibbsmin.errors import InputError
from gibbsmin import units

FEED = '[feed]\nunit = "kmol/h"\nCH4 = 1000.0\nH2O = 3000.0\nT = "500 degC"\n'


def run_cli(tmp_path, monkeypatch, capsys, text: str, *extra: str) -> tuple[int, str, str]:
    (tmp_path / "case.toml").write_text(text)
    monkeypatch.chdir(tmp_path)
    code = main(["settle", "case.toml", *extra])
    out, err = capsys.readouterr()
    return code, out, err


# --- a bare number is no temperature ----------------------------------------------------------------


@pytest.mark.parametrize("key, value", [("T", "850"), ("T", '"850"'), ("T", "1123.15"), ("P", "30"), ("P", '"30"')])
def test_bare_temperature_or_pressure_in_conditions_is_refused_with_the_fix(key, value):
    values = {"T": '"850 degC"', "P": '"30 bar(g)"', key: value}
    text = FEED + f'[conditions]\nT = {values["T"]}\nP = {values["P"]}\n'
    with pytest.raises(CaseError) as caught:
        parse_case(text, "plant.toml")
    message = str(caught.value)
    assert caught.value.key == f"conditions.{key}" and caught.value.line == (7 if key == "T" else 8)
    assert "has no unit" in message
    number = value.strip('"')
    fixes = (f"'{float(number):g} degC'", f"'{float(number):g} K'") if key == "T" else ("bar(g)'", "bar' (absolute)")
    for fix in fixes:
        assert fix in message, message


@pytest.mark.parametrize("table, key", [("feed", "T"), ("stage", "T_in"), ("curve", "T_from")])
def test_bare_temperatures_are_refused_in_every_temperature_key(table, key):
    stages = ('[[stage]]\nadiabatic = true\nP = "30 bar"\n[[stage]]\nadiabatic = true\nP = "30 bar"\n'
              'T_in = "400 degC"\n')
    curve = '[curve]\ny = "CO"\nT_from = "400 degC"\nT_to = "600 degC"\n'
    text = FEED + stages + curve
    old = {"feed": 'T = "500 degC"', "stage": 'T_in = "400 degC"', "curve": 'T_from = "400 degC"'}[table]
    text = text.replace(old, f"{key} = 700")
    with pytest.raises(CaseError, match=f"{key}: temperature 700 has no unit"):
        parse_case(text)


def test_parse_temperature_and_pressure_require_a_unit_while_to_kelvin_keeps_floats_in_kelvin():
    assert units.parse_temperature("850 degC") == pytest.approx(1123.15, abs=1e-12)
    assert units.parse_temperature("1123.15 K") == pytest.approx(1123.15, abs=1e-12)
    assert units.parse_pressure("30 bar(g)") == pytest.approx(30e5 + 101325.0, rel=1e-15)  # gauge on 1 atm
    for bare in (850, 850.0, "850", " 850 "):
        with pytest.raises(InputError, match="has no unit"):
            units.parse_temperature(bare)
        with pytest.raises(InputError, match="has no unit"):
            units.parse_pressure(bare)
    with pytest.raises(InputError, match="is a pressure, but a temperature is needed"):
        units.parse_temperature("30 bar")


def test_bare_temperature_on_the_command_line_exits_2_with_one_line(tmp_path, monkeypatch, capsys):
    code, _, err = run_cli(tmp_path, monkeypatch, capsys, FEED + '[conditions]\nT = 850\nP = "30 bar(g)"\n')
    assert code == 2 and len(err.strip().splitlines()) == 1 and "Traceback" not in err
    assert "conditions.T" in err and "'850 degC'" in err


# --- a heat loss is heat leaving -------------------------------------------------------------------


def test_negative_heat_loss_is_refused_and_says_what_to_write():
    text = FEED + '[conditions]\nadiabatic = true\nheat_loss = "-0.2 MW"\nP = "30 bar(g)"\n'
    with pytest.raises(CaseError) as caught:
        parse_case(text, "plant.toml")
    assert caught.value.key == "conditions.heat_loss" and caught.value.line == 8
    assert "heat_loss = '0.2 MW'" in str(caught.value) and "heat_input = '0.2 MW'" in str(caught.value)
    loss = parse_case(text.replace('"-0.2 MW"', '"0.2 MW"')).stages[0].heat_input
    assert loss == pytest.approx(-0.2e6, rel=1e-15)  # a loss of 0.2 MW is a heat input of -0.2 MW
    assert parse_case(text.replace('heat_loss = "-0.2 MW"', 'heat_loss = "0 MW"')).stages[0].heat_input == 0.0


# --- deep nesting -----------------------------------------------------------------------------------


@pytest.mark.parametrize("nested", ["[" * 5000 + "]" * 5000, "{a = " * 3000 + "1" + "}" * 3000])
def test_deeply_nested_toml_gives_one_line_and_exit_2(nested, tmp_path, monkeypatch, capsys):
    text = FEED + '[conditions]\nT = "850 degC"\nP = "30 bar(g)"\n' + f"deep = {nested}\n"
    code, out, err = run_cli(tmp_path, monkeypatch, capsys, text)
    assert code == 2, (out, err[-500:])
    assert "Traceback" not in err and len(err.strip().splitlines()) == 1
    assert "case.toml, line 9" in err and "too deeply" in err
