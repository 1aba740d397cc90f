"""The case-file reader: feeds in the trade's units, stages, lines of keys, and the keys that wait on modules.

Unit conversions are checked by hand arithmetic against exact definitions: 1 kmol/h = 1000/3600 mol/s;
a Nm3 at DIN 1343 is 101325 / (8.314462618 x 273.15) mol (CODATA 2018 R); the international-table
calorie is 4.1868 J and the international-table Btu 1055.05585262 J (NIST SP 811, 2008, appendix B.8);
a degree Fahrenheit difference is 5/9 K (NIST SP 811, B.8).
"""

from __future__ import annotations

import pytest

from gibbsmin.case import CASE_KEYS, CaseError, TomlSource, parse_case
from gibbsmin.case.values import read_power, read_temperature_difference

KMOL_H = 1000.0 / 3600.0
NM3 = 101325.0 / (8.314462618 * 273.15)  # mol in one DIN 1343 normal cubic metre
CONDITIONS = '[conditions]\nT = "850 degC"\nP = "30 bar(g)"\n'


def test_flows_in_kmol_h_and_conditions():
    case = parse_case('[feed]\nunit = "kmol/h"\nCH4 = 1000.0\nH2O = 3000.0\n' + CONDITIONS)
    assert case.mixed_feed() == pytest.approx({"CH4": 1000 * KMOL_H, "H2O": 3000 * KMOL_H}, rel=1e-15)
    stage = case.stages[0]
    assert stage.T == pytest.approx(1123.15, abs=1e-12)
    assert stage.P == pytest.approx(30e5 + 101325.0, rel=1e-15)  # gauge against a standard atmosphere
    assert stage.name == "outlet" and not stage.adiabatic


def test_mixed_units_per_species():
    case = parse_case('[feed]\nCH4 = "22.4 Nm3/h"\nH2O = "18.015 kg/h"\n' + CONDITIONS)
    feed = case.mixed_feed()
    assert feed["CH4"] == pytest.approx(22.4 * NM3 / 3600, rel=1e-9)
    assert feed["H2O"] == pytest.approx(18.015 / 18.015 * 1000 / 3600, rel=1e-4)  # M(H2O) = 18.015 g/mol


def test_dry_analysis_with_water_content():
    text = ('[feed]\nunit = "mol%"\nbasis = "dry"\ntotal = "100 kmol/h"\nwater_content = "20 mol%"\n'
            'CH4 = 90.0\nCO2 = 10.0\n' + CONDITIONS)
    feed = parse_case(text).mixed_feed()
    # 100 kmol/h wet, of which 20 % water; the dry 80 kmol/h split 90:10.
    assert feed["H2O"] == pytest.approx(20 * KMOL_H, rel=1e-12)
    assert feed["CH4"] == pytest.approx(72 * KMOL_H, rel=1e-12)
    assert feed["CO2"] == pytest.approx(8 * KMOL_H, rel=1e-12)


def test_dry_gas_with_steam_to_carbon():
    text = ('[feed]\nunit = "mol%"\nbasis = "dry"\ntotal = "1000 kmol/h"\nCH4 = 95.0\nC2H6 = 3.0\nCO2 = 2.0\n'
            'steam_to_carbon = 3.0\n' + CONDITIONS)
    feed = parse_case(text).mixed_feed()
    # Hydrocarbon carbon: 950 + 2 x 30 = 1010 kmol/h; CO2 not counted (common practice, no source).
    assert feed["H2O"] == pytest.approx(3030 * KMOL_H, rel=1e-12)


def test_named_feeds_are_mixed_and_keep_their_temperatures():
    text = ('[feed.gas]\nunit = "kmol/h"\nCH4 = 10.0\nT = "400 degC"\n'
            '[feed.steam]\nunit = "kmol/h"\nH2O = 30.0\nT = "450 degC"\n' + CONDITIONS)
    case = parse_case(text)
    assert [f.name for f in case.feeds] == ["gas", "steam"]
    assert case.feeds[1].stream.T == pytest.approx(723.15)
    assert case.feed_temperatures_known
    assert case.mixed_feed() == pytest.approx({"CH4": 10 * KMOL_H, "H2O": 30 * KMOL_H})


def test_stages_in_order_with_intercooling():
    text = ('[feed]\nunit = "kmol/h"\nSO2 = 10.0\nO2 = 10.0\nN2 = 80.0\nT = "420 degC"\nP = "1.3 bar"\n'
            '[[stage]]\nname = "bed 1"\nadiabatic = true\nP = "1.3 bar"\n'
            '[[stage]]\nname = "bed 2"\nT_in = "440 degC"\nadiabatic = true\nheat_loss = "0.25 MW"\nP = "1.28 bar"\n')
    case = parse_case(text)
    assert [s.name for s in case.stages] == ["bed 1", "bed 2"]
    assert case.stages[1].T_in == pytest.approx(713.15)
    assert case.stages[1].heat_input == pytest.approx(-0.25e6)
    assert case.stages[1].line == 12


def test_toml_lines_of_keys_quoted_keys_arrays_and_inline_tables():
    text = (
        '# a comment with [brackets] and key = value\n'          # 1
        '[case]\n'                                                # 2
        'title = "a [not a table] # not a comment"\n'             # 3
        '[feed]\n'                                                # 4
        '"C(s)" = 1.0\n'                                          # 5
        'list = [\n'                                              # 6
        '  "x = y",\n'                                            # 7
        ']\n'                                                     # 8
        'inline = { a = 1, b = 2 }\n'                             # 9
        '[[stage]]\n'                                             # 10
        'T = 1\n'                                                 # 11
        '[[stage]]\n'                                             # 12
        'T = 2\n'                                                 # 13
        '[stage.approach]\n'                                      # 14
        '"CO + H2O = CO2 + H2" = 3\n'                             # 15
    )
    source = TomlSource(text, "x.toml")
    assert source.line(("case", "title")) == 3
    assert source.line(("feed", "C(s)")) == 5
    assert source.line(("feed", "list")) == 6
    assert source.line(("feed", "inline", "b")) == 9            # inside an inline table: its key's line
    assert source.line(("stage", 0, "T")) == 11
    assert source.line(("stage", 1, "T")) == 13
    assert source.line(("stage", 1, "approach", "CO + H2O = CO2 + H2")) == 15


def test_error_names_file_line_and_key():
    with pytest.raises(CaseError) as caught:
        parse_case('[feed]\nunit = "kmol/h"\nCH4 = 1.0\n\n[conditions]\nT = "850 degC"\nP = "30 barg"\nTT = 4\n',
                   "plant.toml")
    error = caught.value
    assert (error.file, error.line, error.key) == ("plant.toml", 8, "conditions.TT")
    assert str(error).startswith("plant.toml, line 8: conditions.TT: unknown key")


def test_cubic_stage_takes_the_kij_choice():
    base = '[feed]\nunit = "kmol/h"\nN2 = 1.0\nH2 = 3.0\n[conditions]\nT = "450 degC"\nP = "200 bar"\n'
    assert parse_case(base + 'gas = "peng-robinson"\n').stages[0].kij == "shipped"
    assert parse_case(base + 'gas = "peng-robinson"\nkij = "none"\n').stages[0].kij == "none"


@pytest.mark.parametrize("text, kelvin", [
    ("10 K", 10.0), ("-5 K", -5.0), ("10 degC", 10.0), ("18 degF", 10.0), (12, 12.0), ("2.5", 2.5),
])
def test_temperature_difference(text, kelvin):
    assert read_temperature_difference(text) == pytest.approx(kelvin, rel=1e-12)


@pytest.mark.parametrize("text, watt", [
    ("85 MW", 85e6), ("1500 kW", 1.5e6), ("1 Gcal/h", 1e9 * 4.1868 / 3600), ("1 MMBtu/h", 1e6 * 1055.05585262 / 3600),
])
def test_heat_flow(text, watt):
    assert read_power(text) == pytest.approx(watt, rel=1e-9)
