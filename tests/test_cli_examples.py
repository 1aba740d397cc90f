"""The shipped classic cases, end to end through the command line, checked against Cantera's equilibrium.

Cantera 3.2 (Goodwin et al., 2025) is handed the same NASA 7-coefficient data
(tests/cantera_reference.py), so agreement tests the case reading, the staging,
the energy balance and the reports, not the data.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from gibbsmin.cli import main

EXAMPLES = Path(__file__).resolve().parents[1] / "examples"
cantera_reference = pytest.importorskip("cantera_reference")


def settle_json(name, capsys):
    code = main(["settle", str(EXAMPLES / name), "--json"])
    out, err = capsys.readouterr()
    assert code == 0, err
    return json.loads(out)


def fractions(stage):
    return {s: e["mole_fraction_in_phase"] for s, e in stage["species"].items() if e["phase"] == "gas"}


def cantera_hp(species, feed_mol_s, T_feed, P):
    gas = cantera_reference.cantera_gas(species)
    gas.TPX = T_feed, P, {s: n for s, n in feed_mol_s.items() if s in species and n > 0}
    gas.equilibrate("HP")
    return gas


def test_n2o4_kp_in_atm(capsys):
    doc = settle_json("n2o4.toml", capsys)
    y = fractions(doc)
    P_atm = doc["P_Pa"] / 101325.0
    gas = cantera_reference.cantera_gas(["N2O4", "NO2"])
    gas.TPX = doc["T_K"], doc["P_Pa"], {"N2O4": 1.0}
    gas.equilibrate("TP")
    assert y["NO2"] == pytest.approx(gas["NO2"].X[0], rel=1e-6)
    kp_cantera = gas["NO2"].X[0] ** 2 / gas["N2O4"].X[0] * P_atm  # atm^1
    text_code = main(["settle", str(EXAMPLES / "n2o4.toml")])
    table = capsys.readouterr().out
    assert text_code == 0 and "atm^1" in table
    row = next(line for line in table.splitlines() if line.startswith("outlet  N2O4 = 2 NO2"))
    kp_shown, q_shown = float(row.split()[5]), float(row.split()[6])
    assert kp_shown == pytest.approx(kp_cantera, rel=1e-5)
    assert q_shown == pytest.approx(kp_shown, rel=1e-5)  # at equilibrium the quotient equals Kp


def test_ammonia_bed_adiabatic_outlet_and_curve(capsys):
    doc = settle_json("ammonia_bed.toml", capsys)
    species = ["N2", "H2", "NH3", "CH4", "Ar"]  # CH4 and Ar cannot react in this set: frozen either way
    gas = cantera_hp(species, doc["feed_mol_s"], 380 + 273.15, doc["P_Pa"])
    assert doc["T_K"] == pytest.approx(gas.T, abs=0.02)
    assert fractions(doc)["NH3"] == pytest.approx(gas["NH3"].X[0], rel=1e-5)
    curve = doc["curve"]
    assert len(curve["T_K"]) == 51 and curve["quantity"] == "mole fraction of NH3"
    assert all(a > b for a, b in zip(curve["value"], curve["value"][1:]))  # NH3 falls with T (exothermic)
    line = curve["lines"][0]
    assert line["T_K"][0] == pytest.approx(380 + 273.15, abs=1e-3) and line["T_K"][-1] == pytest.approx(doc["T_K"], abs=1e-3)


def test_so2_converter_beds_with_intercooling(capsys):
    doc = settle_json("so2_converter.toml", capsys)
    species = ["SO2", "O2", "SO3", "N2"]
    bed1, bed2, bed3 = doc["stages"]
    gas = cantera_hp(species, doc["feed_mol_s"], 420 + 273.15, bed1["P_Pa"])
    assert bed1["T_K"] == pytest.approx(gas.T, abs=0.02)
    outlet1 = {s: e["amount_mol"] for s, e in bed1["species"].items()}
    gas = cantera_hp(species, outlet1, 440 + 273.15, bed2["P_Pa"])
    assert bed2["T_K"] == pytest.approx(gas.T, abs=0.02)
    assert fractions(bed2)["SO3"] == pytest.approx(gas["SO3"].X[0], rel=1e-5)
    assert bed3["duty_W"] == pytest.approx(-0.2e6, rel=1e-9)  # the stated shell loss
    conversion = 1 - bed3["species"]["SO2"]["amount_mol"] / doc["feed_mol_s"]["SO2"]
    assert doc["curve"]["lines"][-1]["value"][-1] == pytest.approx(conversion, rel=1e-9)
    assert conversion > 0.95


def test_shift_held_at_its_approach(capsys):
    doc = settle_json("shift_approach.toml", capsys)
    # With CH4 and N2 frozen only the shift reacts; it has no change in moles, so its composition is that of
    # shift equilibrium at T + 12 K whatever the dilution (exothermic: positive approach = settles hotter).
    gas = cantera_reference.cantera_gas(["CO", "H2O", "CO2", "H2"])
    feed = {s: n for s, n in doc["feed_mol_s"].items() if s in ("CO", "H2O", "CO2", "H2")}
    gas.TPX = doc["T_K"] + 12.0, 1e5, feed
    gas.equilibrate("TP")
    total = sum(doc["species"][s]["amount_mol"] for s in feed)
    for s in feed:
        assert doc["species"][s]["amount_mol"] / total == pytest.approx(gas[s].X[0], rel=1e-6)
    code = main(["settle", str(EXAMPLES / "shift_approach.toml")])
    table = capsys.readouterr().out
    assert code == 0
    row = next(line for line in table.splitlines() if line.startswith("outlet  water-gas shift"))
    assert "12.00" in row
    assert "carbon possible" in table  # shift gas at 430 degC is beyond graphite saturation by Boudouard


def test_adiabatic_shift_bed_held_at_its_approach(tmp_path, capsys):
    # The shipped shift case made adiabatic: the outlet must hold the inlet's enthalpy (Cantera's, from the
    # same NASA data) and still read back its 12 K approach.
    text = (EXAMPLES / "shift_approach.toml").read_text().replace('T = "430 degC"\n', "adiabatic = true\n")
    case = tmp_path / "adiabatic_shift.toml"
    case.write_text(text)
    code = main(["settle", str(case), "--json"])
    out, err = capsys.readouterr()
    assert code == 0, err
    doc = json.loads(out)
    species = ["H2", "CO", "CO2", "CH4", "H2O", "N2"]
    gas = cantera_reference.cantera_gas(species)
    feed = {s: n for s, n in doc["feed_mol_s"].items() if n > 0}
    gas.TPX = 350.0 + 273.15, doc["P_Pa"], feed
    H_in = gas.enthalpy_mole / 1000.0 * sum(feed.values())
    outlet = {s: doc["species"][s]["amount_mol"] for s in species}
    gas.TPX = doc["T_K"], doc["P_Pa"], outlet
    H_out = gas.enthalpy_mole / 1000.0 * sum(outlet.values())
    assert H_out == pytest.approx(H_in, rel=1e-9)
    assert 400.0 + 273.15 < doc["T_K"] < 450.0 + 273.15  # the exothermic shift heats the bed from 350 degC
    code = main(["settle", str(case)])
    table = capsys.readouterr().out
    row = next(line for line in table.splitlines() if line.startswith("outlet  water-gas shift"))
    assert code == 0 and "12.00" in row


def test_html_of_a_curve_case_is_written(tmp_path, capsys):
    out = tmp_path / "ammonia.html"
    assert main(["settle", str(EXAMPLES / "ammonia_bed.toml"), "--html", str(out), "--csv",
                 str(tmp_path / "a.csv"), "--xlsx", str(tmp_path / "a.xlsx"), "--quiet"]) == 0
    page = out.read_text()
    assert page.count("<svg") == 2 and "Equilibrium curve at 145 bar and operating lines" in page
    assert (tmp_path / "a.csv").read_text().startswith("\"gibbsmin 0.1.0 - Invented ammonia")
    assert capsys.readouterr().out == ""


def test_ammonia_converter_with_peng_robinson(capsys):
    # The case file's gas and kij keys reach the engine: the command line answers as the Python API does.
    import gibbsmin

    doc = settle_json("ammonia_converter_pr.toml", capsys)
    feed = {"H2": 64.5, "N2": 21.5, "NH3": 3.0, "CH4": 7.0, "Ar": 4.0}
    eq = gibbsmin.equilibrate(feed, 723.15, 200e5, inert=["CH4", "Ar"], gas="peng-robinson")
    assert doc["gas_model"] == "peng-robinson"
    assert fractions(doc)["NH3"] == pytest.approx(eq.mole_fractions["NH3"], rel=1e-9)
    ideal = gibbsmin.equilibrate(feed, 723.15, 200e5, inert=["CH4", "Ar"])
    assert fractions(doc)["NH3"] - ideal.mole_fractions["NH3"] > 0.01  # the cubic adds over 1 mol% NH3 here
    assert main(["settle", str(EXAMPLES / "ammonia_converter_pr.toml")]) == 0
    table = capsys.readouterr().out
    assert "shipped kij: H2-N2 +0.0711" in table and "N2-NH3 +0.2193" in table
    assert "with partial pressures alone gives" in table


def test_methanol_converter_with_peng_robinson(capsys):
    # The shipped methanol case: the command line answers as the Python API does, the outlet is one gas,
    # and the fugacity correction raises methanol against the ideal gas at 80 bar.
    import gibbsmin

    doc = settle_json("methanol_converter_pr.toml", capsys)
    feed = {"H2": 6600.0, "CO": 900.0, "CO2": 600.0, "CH4": 1600.0, "N2": 250.0, "H2O": 50.0, "CH3OH": 50.0}
    feed = {s: n / 3.6 for s, n in feed.items()}
    species = list(feed)
    eq = gibbsmin.equilibrate(feed, 528.15, 80e5, species=species, inert=["CH4", "N2"], gas="peng-robinson")
    assert fractions(doc)["CH3OH"] == pytest.approx(eq.mole_fractions["CH3OH"], rel=1e-9)
    assert eq.extras["gas_phase_stability"]["stable"] is True
    ideal = gibbsmin.equilibrate(feed, 528.15, 80e5, species=species, inert=["CH4", "N2"])
    assert eq.mole_fractions["CH3OH"] > ideal.mole_fractions["CH3OH"] + 0.002
    assert main(["settle", str(EXAMPLES / "methanol_converter_pr.toml")]) == 0
    assert "stable as one gas" in capsys.readouterr().out


def test_adiabatic_ammonia_bed_with_peng_robinson_and_its_curve(tmp_path, capsys):
    # The shipped bed made non-ideal: the curve is the Peng-Robinson equilibrium and the operating line,
    # drawn with the same model's enthalpies, ends at the stage's own outlet temperature.
    import gibbsmin

    text = (EXAMPLES / "ammonia_bed.toml").read_text().replace('P = "144 bar(g)"\n',
                                                              'P = "144 bar(g)"\ngas = "peng-robinson"\n')
    case = tmp_path / "bed_pr.toml"
    case.write_text(text)
    code = main(["settle", str(case), "--json"])
    out, err = capsys.readouterr()
    assert code == 0, err
    doc = json.loads(out)
    line = doc["curve"]["lines"][0]
    assert line["T_K"][-1] == pytest.approx(doc["T_K"], abs=1e-3)
    T = doc["curve"]["T_K"][10]
    feed = doc["feed_mol_s"]
    eq = gibbsmin.equilibrate(feed, T, doc["P_Pa"], species=["N2", "H2", "NH3", "CH4", "Ar"], inert=["CH4", "Ar"],
                              gas="peng-robinson")
    assert doc["curve"]["value"][10] == pytest.approx(eq.mole_fractions["NH3"], rel=1e-9)


def test_methanol_loop_separator(capsys):
    # The shipped loop with its separators: every stage certified, the HP separator's liquid passed on as crude
    # methanol, and the converter's methanol shared out between the recycle gas and the crude with none lost.
    doc = settle_json("methanol_loop_separator.toml", capsys)
    stages = {s["name"]: s for s in doc["stages"]}
    assert all(s["certificate"]["certified"] for s in doc["stages"])
    hp, letdown = stages["HP separator"], stages["let-down vessel"]
    assert hp["phases_present"] == ["gas", "liquid"] and hp["next_stage_takes"] == "liquid"
    converter = stages["converter"]["flows"]
    outlets = hp["outlets"]
    assert outlets["vapour"]["flows"]["CH3OH"] + outlets["liquid"]["flows"]["CH3OH"] == \
        pytest.approx(converter["CH3OH"], rel=1e-10)
    # At 40 degC and 79 bar the crude holds over 90 % of the converter's methanol (common practice, no source).
    assert outlets["liquid"]["flows"]["CH3OH"] > 0.9 * converter["CH3OH"]
    assert letdown["flows"] == pytest.approx(outlets["liquid"]["flows"], rel=1e-10)
    assert main(["settle", str(EXAMPLES / "methanol_loop_separator.toml")]) == 0
    assert "HP separator liquid" in capsys.readouterr().out


def test_ammonia_loop_separator_splits_off_liquid_ammonia_as_thermo_does():
    # The shipped ammonia loop cooled to -20 degC at 180 bar: a certified gas and liquid, the liquid nearly pure
    # ammonia; outside check: thermo's PR78 flash of the separator's inlet (Caleb Bell, thermo 0.6, with
    # gibbsmin's constants; tests/flash_reference.py), vapour fraction within 1e-7.
    from flash_reference import thermo_flash

    from gibbsmin.case import read_case, settle_case

    result = settle_case(read_case(EXAMPLES / "ammonia_loop_separator.toml"))
    separator = result.stages[-1]
    eq = separator.equilibrium
    assert all(stage.equilibrium.certificate.certified for stage in result.stages)
    assert eq.phases_present == ("gas", "liquid") and eq.fluid_phases[1].mole_fractions["NH3"] > 0.97
    reference = thermo_flash(separator.inlet.mixed, eq.T, eq.P)
    assert eq.gas_amount / sum(eq.amounts.values()) == pytest.approx(reference.vapour_fraction, abs=1e-7)
