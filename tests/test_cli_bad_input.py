"""Bad input through the command line: exit code 2, one line on stderr naming the problem, no traceback.

Table-driven: (id, files to write, arguments, words the one line must contain).  What counts as
a clear error (file, line, key and the fix) is common practice, no source.
"""

from __future__ import annotations

import pytest

from gibbsmin.cli import main

GOOD_FEED = '[feed]\nunit = "kmol/h"\nCH4 = 1000.0\nH2O = 3000.0\n'
GOOD_CONDITIONS = '[conditions]\nT = "850 degC"\nP = "30 bar(g)"\n'


def case(text: str) -> dict[str, str]:
    return {"case.toml": text}


TABLE = (
    "Stream,unit,1,2\n"
    "Temperature,degC,400,850\n"
    "Pressure,bar(g),30,29\n"
    "CH4,kmol/h,100,10\n"
    "H2O,kmol/h,300,210\n"
    "CO,kmol/h,,60\n"
    "CO2,kmol/h,,30\n"
    "H2,kmol/h,,330\n"
)
UNITS = ('[unit.R-1]\nname = "reformer"\ntype = "reactor"\ninlets = ["1"]\noutlets = ["2"]\n'
         'duty = "10 MW"\nreactions = ["steam methane reforming"]\n')


def plant(table: str = TABLE, units: str = UNITS) -> dict[str, str]:
    return {"streams.csv": table, "units.toml": units}


CASES = [
    # the command line itself
    ("no-command", {}, [], ["usage"]),
    ("unknown-command", {}, ["settl"], ["invalid choice", "settl"]),
    ("unknown-option", case(GOOD_FEED + GOOD_CONDITIONS), ["settle", "case.toml", "--jsn"], ["unrecognized", "--jsn"]),
    ("settle-without-case", {}, ["settle"], ["needs a case file"]),
    ("missing-case-file", {}, ["settle", "nothere.toml"], ["nothere.toml", "no such file"]),
    ("case-is-a-directory", {"sub/x.toml": ""}, ["settle", "sub"], ["directory"]),
    ("unknown-element", {}, ["species", "--element", "Xx"], ["unknown element", "Xx"]),
    ("element-lower-case", {}, ["species", "--element", "s"], ["did you mean S"]),
    # TOML and keys
    ("not-toml", case("[feed\nCH4 = 1\n"), ["settle", "case.toml"], ["case.toml", "not valid TOML", "line 1"]),
    ("unknown-table", case(GOOD_FEED + GOOD_CONDITIONS + "[reprot]\ncutoff = 1\n"), ["settle", "case.toml"],
     ["reprot", "did you mean 'report'"]),
    ("unknown-condition-key", case(GOOD_FEED + GOOD_CONDITIONS + "Tout = 5\n"), ["settle", "case.toml"],
     ["line 8", "conditions.Tout", "unknown key"]),
    ("no-conditions", case(GOOD_FEED), ["settle", "case.toml"], ["needs a [conditions] table"]),
    ("no-feed", case(GOOD_CONDITIONS), ["settle", "case.toml"], ["needs a table [feed]"]),
    ("conditions-and-stages", case(GOOD_FEED + GOOD_CONDITIONS + '[[stage]]\nT = "800 degC"\nP = "1 bar"\n'),
     ["settle", "case.toml"], ["either one [conditions]", "[[stage]]"]),
    # species
    ("unknown-species", case('[feed]\nunit = "kmol/h"\nCH5 = 1.0\n' + GOOD_CONDITIONS), ["settle", "case.toml"],
     ["line 3", "feed.CH5", "CH4"]),
    ("feed-setting-typo", case('[feed]\nunits = "kmol/h"\nCH4 = 1.0\n' + GOOD_CONDITIONS), ["settle", "case.toml"],
     ["feed.units", "did you mean the setting 'unit'"]),
    ("unknown-excluded-species", case(GOOD_FEED + GOOD_CONDITIONS + '[species]\nexclude = ["graphit"]\n'),
     ["settle", "case.toml"], ["species.exclude", "graphite"]),
    ("exclude-not-a-list", case(GOOD_FEED + GOOD_CONDITIONS + '[species]\nexclude = "C(s)"\n'),
     ["settle", "case.toml"], ["species.exclude", "list of names"]),
    ("frozen-not-in-feed", case(GOOD_FEED + GOOD_CONDITIONS + '[species]\nfrozen = ["N2"]\n'),
     ["settle", "case.toml"], ["line 9", "species.frozen", "N2", "not in the feed"]),
    # units and values
    ("unknown-temperature-unit", case(GOOD_FEED + '[conditions]\nT = "850 degX"\nP = "30 bar"\n'),
     ["settle", "case.toml"], ["line 6", "conditions.T", "degX"]),
    ("temperature-in-bar", case(GOOD_FEED + '[conditions]\nT = "850 bar"\nP = "30 bar"\n'),
     ["settle", "case.toml"], ["conditions.T", "pressure", "temperature is needed"]),
    ("pressure-without-unit", case(GOOD_FEED + '[conditions]\nT = "850 degC"\nP = 30\n'),
     ["settle", "case.toml"], ["conditions.P", "no unit", "bar(g)"]),
    ("pressure-below-vacuum", case(GOOD_FEED + '[conditions]\nT = "850 degC"\nP = "-2 bar(g)"\n'),
     ["settle", "case.toml"], ["conditions.P", "below vacuum"]),
    ("below-absolute-zero", case(GOOD_FEED + '[conditions]\nT = "-300 degC"\nP = "1 bar"\n'),
     ["settle", "case.toml"], ["conditions.T", "absolute zero"]),
    ("actual-volume-flow", case('[feed]\nunit = "m3/h"\nCH4 = 1.0\n' + GOOD_CONDITIONS), ["settle", "case.toml"],
     ["feed.unit", "actual volume", "Nm3/h"]),
    ("negative-flow", case('[feed]\nunit = "kmol/h"\nCH4 = -5.0\n' + GOOD_CONDITIONS), ["settle", "case.toml"],
     ["feed.CH4", "negative"]),
    ("flow-as-boolean", case('[feed]\nunit = "kmol/h"\nCH4 = true\n' + GOOD_CONDITIONS), ["settle", "case.toml"],
     ["feed.CH4", "number or a text"]),
    ("numbers-without-unit", case('[feed]\nCH4 = 1.0\n' + GOOD_CONDITIONS), ["settle", "case.toml"],
     ["feed", "without a unit", "kmol/h"]),
    ("composition-without-total", case('[feed]\nunit = "mol%"\nCH4 = 100.0\n' + GOOD_CONDITIONS),
     ["settle", "case.toml"], ["feed", "total"]),
    ("composition-not-100", case('[feed]\nunit = "mol%"\ntotal = "100 kmol/h"\nCH4 = 90.0\nH2O = 5\n' + GOOD_CONDITIONS),
     ["settle", "case.toml"], ["sums to 95", "normalize = true"]),
    ("ambiguous-ppm", case('[feed]\nunit = "ppm"\ntotal = "1 kmol/h"\nCH4 = 1e6\n' + GOOD_CONDITIONS),
     ["settle", "case.toml"], ["ambiguous", "ppmv"]),
    ("steam-rate-and-ratio", case(GOOD_FEED + 'steam_rate = "1 t/h"\nsteam_to_carbon = 3.0\n' + GOOD_CONDITIONS),
     ["settle", "case.toml"], ["either steam_rate or steam_to_carbon"]),
    ("ratio-without-carbon", case('[feed]\nunit = "kmol/h"\nH2 = 1.0\nsteam_to_carbon = 3.0\n' + GOOD_CONDITIONS),
     ["settle", "case.toml"], ["feed.steam_to_carbon", "no hydrocarbon carbon"]),
    ("adiabatic-with-T", case(GOOD_FEED + '[conditions]\nT = "850 degC"\nP = "1 bar"\nadiabatic = true\n'),
     ["settle", "case.toml"], ["conditions.T", "adiabatic"]),
    ("heat-loss-at-fixed-T", case(GOOD_FEED + GOOD_CONDITIONS + 'heat_loss = "1 MW"\n'), ["settle", "case.toml"],
     ["conditions.heat_loss", "only goes with adiabatic"]),
    ("heat-loss-not-power", case(GOOD_FEED + 'T = "500 degC"\n[conditions]\nadiabatic = true\nP = "1 bar"\n'
                                 'heat_loss = "5 kg"\n'), ["settle", "case.toml"], ["heat_loss", "heat flow"]),
    ("adiabatic-without-feed-T", case(GOOD_FEED + '[conditions]\nadiabatic = true\nP = "1 bar"\n'),
     ["settle", "case.toml"], ["feed", "feed temperature"]),
    ("T_in-on-first-stage", case(GOOD_FEED + GOOD_CONDITIONS + 'T_in = "500 degC"\n'), ["settle", "case.toml"],
     ["conditions.T_in", "first stage"]),
    ("unknown-reaction", case(GOOD_FEED + GOOD_CONDITIONS + '[conditions.approach]\n"steam reformin" = "10 K"\n'),
     ["settle", "case.toml"], ["line 9", "steam reformin"]),
    ("approach-not-a-difference", case(GOOD_FEED + GOOD_CONDITIONS + '[conditions.approach]\nshift = "ten"\n'),
     ["settle", "case.toml"], ["approach.shift", "temperature difference"]),
    ("unbalanced-kp-reaction", case(GOOD_FEED + GOOD_CONDITIONS + '[report]\nkp = ["CH4 = CO + H2"]\n'),
     ["settle", "case.toml"], ["report.kp", "CH4 = CO + H2"]),
    ("unknown-gas-model", case(GOOD_FEED + GOOD_CONDITIONS + 'gas = "van der waals"\n'), ["settle", "case.toml"],
     ["conditions.gas", "peng-robinson"]),
    ("kij-without-cubic", case(GOOD_FEED + GOOD_CONDITIONS + 'kij = "none"\n'), ["settle", "case.toml"],
     ["conditions.kij", "cubic gas model"]),
    ("unknown-kij-choice", case(GOOD_FEED + GOOD_CONDITIONS + 'gas = "peng-robinson"\nkij = "fitted"\n'),
     ["settle", "case.toml"], ["conditions.kij", "shipped"]),
    ("bad-report-flow-unit", case(GOOD_FEED + GOOD_CONDITIONS + '[report]\nflow_unit = "bar"\n'),
     ["settle", "case.toml"], ["report.flow_unit", "molar flow"]),
    ("temperature-out-of-data", case(GOOD_FEED + '[conditions]\nT = "9000 K"\nP = "1 bar"\n'),
     ["settle", "case.toml"], ["case.toml, line 5", "outside the data range"]),
    ("output-folder-missing", case(GOOD_FEED + GOOD_CONDITIONS), ["settle", "case.toml", "--html", "no/such/r.html"],
     ["cannot write", "does not exist"]),
    # the audit
    ("audit-without-description", plant(), ["audit", "streams.csv"], ["needs a unit description"]),
    ("audit-description-names-no-table", plant(), ["audit", "units.toml"], ["names no stream_table"]),
    ("audit-table-wrong-suffix", {"t.txt": "x", "units.toml": UNITS}, ["audit", "t.txt", "units.toml"],
     ["must be a .csv or .xlsx"]),
    ("audit-unknown-row", plant(TABLE.replace("CO2,", "CO3,")), ["audit", "streams.csv", "units.toml"],
     ["cell A7", "CO3"]),
    ("audit-text-in-cell", plant(TABLE.replace("100,10", "100,ten")), ["audit", "streams.csv", "units.toml"],
     ["cell D4", "stream 2", "CH4", "'ten' is not a number"]),
    ("audit-decimal-comma", plant(TABLE.replace("CH4,kmol/h,100,10", 'CH4,kmol/h,"100,5",10')),
     ["audit", "streams.csv", "units.toml"], ["cell C4", "decimals with a point"]),
    ("audit-missing-temperature-unit", plant(TABLE.replace("Temperature,degC", "Temperature,")),
     ["audit", "streams.csv", "units.toml"], ["cell B2", "unit"]),
    ("audit-unknown-stream", plant(units=UNITS.replace('outlets = ["2"]', 'outlets = ["3"]')),
     ["audit", "streams.csv", "units.toml"], ["units.toml", "line 5", "outlets", "no stream '3'"]),
    ("audit-unknown-unit-type", plant(units=UNITS.replace('"reactor"', '"reacter"')),
     ["audit", "streams.csv", "units.toml"], ["unit.R-1.type", "reacter", "not a unit type"]),
    ("audit-unknown-unit-key", plant(units=UNITS + "dutty = 5\n"), ["audit", "streams.csv", "units.toml"],
     ["unit.R-1.dutty", "did you mean 'duty'"]),
    ("audit-bad-threshold", plant(units='[thresholds]\nelement_closure = { warn = "1 %", fail = "0.5 %" }\n' + UNITS),
     ["audit", "streams.csv", "units.toml"], ["thresholds.element_closure", "below warn"]),
    ("audit-reactor-keys-on-mixer", plant(units=UNITS.replace('"reactor"', '"mixer"')),
     ["audit", "streams.csv", "units.toml"], ["reactions", "only goes with type = 'reactor'"]),
]


@pytest.mark.parametrize("files, argv, words", [c[1:] for c in CASES], ids=[c[0] for c in CASES])
def test_bad_input_gives_one_clear_line(files, argv, words, tmp_path, monkeypatch, capsys):
    for name, text in files.items():
        (tmp_path / name).parent.mkdir(parents=True, exist_ok=True)
        (tmp_path / name).write_text(text)
    monkeypatch.chdir(tmp_path)
    code = main(argv)
    out, err = capsys.readouterr()
    assert code == 2, (out, err)
    assert "Traceback" not in err
    lines = err.strip().splitlines()
    if argv:  # a bare `gibbsmin` prints its help, which is more than one line by design
        assert len(lines) == 1, err
    for word in words:
        assert word.lower() in err.lower(), (word, err)
    assert not [p for p in tmp_path.rglob("*.part")], "a temporary file was left behind"


def test_there_are_at_least_25_cases():
    assert len(CASES) >= 25
