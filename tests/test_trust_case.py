"""Case files read as the engineer meant them (issue 16): units required, losses that are losses, deep
nesting refused in one line, and stages that react only as their service allows.

What counts as a clear refusal (the key, the line and the fix in one line, exit 2) is common practice,
no source.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from CoolProp.CoolProp import PropsSI

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


# --- stages that react only as their type and service allow -----------------------------------------
#
# Outside reference: Cantera 3.2 (Goodwin et al., 2025), handed the same NASA 7-coefficient data
# (tests/cantera_reference.py).  A species held at its inlet flow is given to Cantera as the same
# amount of argon: at fixed T and P an ideal-gas diluent's identity does not move an equilibrium.

KMOL_H = 1000.0 / 3600.0  # mol/s in one kmol/h (exact)
EXAMPLES = Path(__file__).resolve().parents[1] / "examples"


def settle_json(path, capsys) -> dict:
    code = main(["settle", str(path), "--json"])
    out, err = capsys.readouterr()
    assert code == 0, err
    return json.loads(out)


def amounts(stage: dict) -> dict[str, float]:
    return {s: e["amount_mol"] for s, e in stage["species"].items()}


def present(amounts_by_species) -> dict[str, float]:
    """Species above 1e-12 of the total: the engine treats element totals below 1e-14 of the largest as absent,
    so a held trace at 1e-29 mol is not carried through a cooler."""
    total = sum(dict(amounts_by_species).values())
    return {s: n for s, n in dict(amounts_by_species).items() if n > 1e-12 * total}


def cantera_tp(inlet: dict[str, float], T: float, P: float, reacting: list[str]) -> dict[str, float]:
    """Amounts [mol] at Cantera's T, P equilibrium over ``reacting``, the rest of ``inlet`` stood in for by Ar."""
    reference = pytest.importorskip("cantera_reference")
    held = sum(n for s, n in inlet.items() if s not in reacting)
    gas = reference.cantera_gas([*reacting, "Ar"])
    gas.TPX = T, P, {**{s: n for s, n in inlet.items() if s in reacting and n > 0}, "Ar": held}
    gas.equilibrate("TP")
    total = held / gas["Ar"].X[0]
    return {s: gas[s].X[0] * total for s in reacting}


def cantera_enthalpy(gas_amounts: dict[str, float], T: float, P: float, liquid_water: float = 0.0) -> float:
    """Enthalpy [W for mol/s] of a gas (and pure liquid water) by Cantera's evaluation of the NASA data."""
    reference = pytest.importorskip("cantera_reference")
    names = [s for s, n in gas_amounts.items() if n > 0]
    gas = reference.cantera_gas(names)
    total = sum(gas_amounts[s] for s in names)
    gas.TPX = T, P, {s: gas_amounts[s] for s in names}
    H = gas.enthalpy_mole / 1000.0 * total  # J/kmol to J/mol
    if liquid_water:
        water = reference.cantera_pure("H2O(l)")
        water.TP = T, P
        H += water.enthalpy_mole / 1000.0 * liquid_water
    return H


def test_shift_train_example_each_stage_as_its_type_and_service_allow(capsys):
    doc = settle_json(EXAMPLES / "shift_train.toml", capsys)
    ht, cooler, lt, drum = doc["stages"]
    feed = doc["feed_mol_s"]
    shift = ["CO", "H2O", "CO2", "H2"]
    # HT shift: only the shift moved; CH4 and N2 at their feed flows, no graphite, no other species.
    out = amounts(ht)
    assert {s for s, n in out.items() if n > 0} == {"CO", "H2O", "CO2", "H2", "CH4", "N2"}
    for held in ("CH4", "N2"):
        assert out[held] == pytest.approx(feed[held], rel=1e-12)
    reference = cantera_tp(feed, ht["T_K"], ht["P_Pa"], shift)
    for s in shift:
        assert out[s] == pytest.approx(reference[s], rel=1e-7), s
    # ... adiabatic with its 0.3 MW loss: Cantera's enthalpies close the balance (to 1e-6 of the 15 MW cooler duty).
    H_in = cantera_enthalpy(feed, 355 + 273.15, ht["P_Pa"])
    assert cantera_enthalpy(out, ht["T_K"], ht["P_Pa"]) - H_in == pytest.approx(-0.3e6, abs=20.0)
    # Before stages had types and services this train ran to 722 degC making 589 kmol/h CH4, its cooler made
    # 1174 kmol/h CH4 and its knock-out 200 kmol/h graphite (full equilibrium in every stage).
    assert 400 + 273.15 < ht["T_K"] < 450 + 273.15
    # Cooler: composition exactly as it came, duty = Cantera's enthalpy change of that gas.
    assert present(amounts(cooler)) == pytest.approx(present(out), rel=1e-12)
    assert cooler["T_K"] == pytest.approx(205 + 273.15, abs=1e-9)
    duty = cantera_enthalpy(out, cooler["T_K"], cooler["P_Pa"]) - cantera_enthalpy(out, ht["T_K"], cooler["P_Pa"])
    assert cooler["duty_W"] == pytest.approx(duty, rel=1e-7)
    # LT shift: held 10 K short of shift equilibrium, CH4 and N2 still at feed flows.
    out_lt = amounts(lt)
    assert out_lt["CH4"] == pytest.approx(feed["CH4"], rel=1e-12)
    assert out_lt["CO"] < out["CO"] and "C(s)" not in out_lt
    # Knock-out at 40 degC: water alone condenses; the vapour's water is at the vapour pressure of water.
    out_drum = amounts(drum)
    for s in ("CO", "CO2", "H2", "CH4", "N2"):
        assert out_drum[s] == pytest.approx(out_lt[s], rel=1e-12), s
    gas_total = sum(n for s, n in out_drum.items() if drum["species"][s]["phase"] == "gas")
    p_water = out_drum["H2O"] / gas_total * drum["P_Pa"]
    saturation = PropsSI("P", "T", 313.15, "Q", 0, "Water")  # IAPWS-95 through CoolProp (Bell et al., 2014)
    assert p_water == pytest.approx(saturation, rel=0.01)  # NASA ideal-gas data against IAPWS-95
    assert out_drum["H2O"] + out_drum["H2O(l)"] == pytest.approx(out_lt["H2O"], rel=1e-12)
    H_out = cantera_enthalpy({s: n for s, n in out_drum.items() if s != "H2O(l)"}, drum["T_K"], drum["P_Pa"],
                             liquid_water=out_drum["H2O(l)"])
    assert drum["duty_W"] == pytest.approx(H_out - cantera_enthalpy(out_lt, lt["T_K"], drum["P_Pa"]), rel=1e-7)
    assert drum["stage"]["held at inlet flow"] == ["CO", "CO2", "H2", "CH4", "N2"]


def test_shift_train_report_states_what_each_stage_lets_react(capsys):
    assert main(["settle", str(EXAMPLES / "shift_train.toml")]) == 0
    text = capsys.readouterr().out
    table = text[text.index("What each stage lets react"):]
    assert "HT shift                    reactor    CO + H2O = CO2 + H2" in table
    assert "knock-out  water condenses (H2O(l) drawn off)  CO, CO2, H2, CH4, N2" in table
    assert "no graphite forms (common practice, no source)" in " ".join(table.split())


SHIFT_GAS = ('[feed]\nunit = "kmol/h"\nH2 = 3920.0\nCO = 735.0\nCO2 = 455.0\nCH4 = 120.0\nN2 = 21.8\nH2O = 3010.0\n'
             'T = "360 degC"\nP = "28.5 bar(g)"\n[species]\nonly = ["H2", "CO", "CO2", "CH4", "H2O", "N2", "C(s)"]\n')


@pytest.mark.parametrize("key", ['service = "HT shift"', 'reactions = ["water-gas shift"]'])
def test_ht_shift_with_graphite_in_the_species_list_makes_no_graphite(key):
    from gibbsmin.case import settle_case

    text = SHIFT_GAS + f'[[stage]]\nname = "HT shift"\n{key}\nadiabatic = true\nP = "28 bar(g)"\n'
    result = settle_case(parse_case(text))
    eq = result.outlet
    assert "C(s)" not in eq.condensed and eq.amounts["CH4"] == pytest.approx(120 * KMOL_H, rel=1e-12)
    feed = result.case.mixed_feed()
    reference = cantera_tp(feed, eq.T, eq.P, ["CO", "H2O", "CO2", "H2"])
    assert eq.amounts["CO"] == pytest.approx(reference["CO"], rel=1e-7)
    assert eq.T < 450 + 273.15  # full equilibrium ran to 731 degC, 474 kmol/h CH4 formed
    H_in = cantera_enthalpy(feed, 360 + 273.15, eq.P)
    cp = 40.0 * sum(feed.values())  # J/(s K), a generous bound of the gas's heat capacity (about 35 J/(mol K))
    assert abs(cantera_enthalpy(dict(eq.amounts), eq.T, eq.P) - H_in) / cp < 0.01  # K


METHANOL_LOOP = ('[feed]\nunit = "kmol/h"\nH2 = 6600.0\nCO = 900.0\nCO2 = 600.0\nCH4 = 1600.0\nN2 = 250.0\n'
                 'H2O = 50.0\nCH3OH = 50.0\nT = "230 degC"\nP = "80 bar"\n'
                 '[[stage]]\nname = "converter"\nservice = "methanol synthesis"\nT = "255 degC"\nP = "80 bar"\n')


def test_methanol_final_cooler_keeps_methanol_and_co2_and_refuses_condensation():
    from gibbsmin.case import settle_case

    warm = METHANOL_LOOP + '[[stage]]\nname = "final cooler"\ntype = "cooler"\nT = "150 degC"\nP = "78 bar"\n'
    result = settle_case(parse_case(warm))
    converter, cooler = (s.equilibrium for s in result.stages)
    reference = cantera_tp(result.case.mixed_feed(), converter.T, converter.P, ["CO", "H2", "CH3OH", "H2O", "CO2"])
    for s, n in reference.items():
        assert converter.amounts[s] == pytest.approx(n, rel=1e-7), s
    assert present(cooler.amounts) == pytest.approx(present(converter.amounts), rel=1e-12)
    # Before, this stage re-equilibrated at its T: 16.8 mol% methanol or more, and the CO2 gone.
    assert cooler.amounts["CO2"] == pytest.approx(converter.amounts["CO2"], rel=1e-12)
    cold = warm.replace('T = "150 degC"', 'T = "40 degC"')
    with pytest.raises(CaseError, match=r"water condenses at this cooler's outlet .*type = 'knock-out'") as caught:
        settle_case(parse_case(cold))
    # The liquid named: all water above the vapour pressure at 40 degC, 78 bar (IAPWS-95 through CoolProp).
    y_saturated = PropsSI("P", "T", 313.15, "Q", 0, "Water") / 78e5
    dry = sum(n for s, n in converter.amounts.items() if s != "H2O")
    liquid = (converter.amounts["H2O"] - y_saturated * dry / (1 - y_saturated)) / KMOL_H
    shown = float(str(caught.value).split("outlet (")[1].split(" kmol/h")[0])
    assert shown == pytest.approx(liquid, rel=0.01)


def test_knock_out_at_40_degC_turns_nothing_into_graphite_and_passes_on_its_vapour():
    from gibbsmin.case import settle_case

    text = (METHANOL_LOOP + '[[stage]]\nname = "knock-out"\ntype = "knock-out"\nT = "40 degC"\nP = "78 bar"\n'
            '[[stage]]\nname = "reheater"\ntype = "heater"\nT = "120 degC"\nP = "77 bar"\n')
    with pytest.warns(UserWarning, match="CH3OH .* may condense in a real drum"):
        result = settle_case(parse_case(text))
    converter, drum, heater = (s.equilibrium for s in result.stages)
    assert set(drum.condensed) == {"H2O(l)"}
    for s in ("CO", "CO2", "H2", "CH3OH", "CH4", "N2"):
        assert drum.amounts[s] == pytest.approx(converter.amounts[s], rel=1e-12), s
    p_water = drum.mole_fractions["H2O"] * drum.P
    assert p_water == pytest.approx(PropsSI("P", "T", 313.15, "Q", 0, "Water"), rel=0.01)  # IAPWS-95, CoolProp
    assert "H2O(l)" not in result.stages[2].inlet.mixed  # the drum's liquid is drawn off
    assert heater.amounts["H2O"] == pytest.approx(drum.amounts["H2O"], rel=1e-12) and not heater.condensed


@pytest.mark.parametrize("service, feed, reacting", [
    ("methanation", 'H2 = 740.0\nCO = 3.0\nCO2 = 1.0\nN2 = 245.0\nAr = 3.0\nCH4 = 8.0\nH2O = 2.0\n',
     ["CO", "H2", "CH4", "H2O", "CO2"]),
    ("ammonia synthesis", 'H2 = 645.0\nN2 = 215.0\nNH3 = 30.0\nCH4 = 70.0\nAr = 40.0\n', ["N2", "H2", "NH3"]),
])
def test_services_hold_everything_outside_their_reactions(service, feed, reacting):
    from gibbsmin.case import settle_case

    T = "320 degC" if service == "methanation" else "450 degC"
    text = (f'[feed]\nunit = "kmol/h"\n{feed}[[stage]]\nservice = "{service}"\nT = "{T}"\nP = "150 bar"\n')
    result = settle_case(parse_case(text))
    eq, inlet = result.outlet, result.case.mixed_feed()
    assert {s for s, n in eq.amounts.items() if n > 0} == set(reacting) | set(inlet)  # no graphite, no C2H6, no HCN, no NH3 in a methanator
    for s in set(inlet) - set(reacting):
        assert eq.amounts[s] == pytest.approx(inlet[s], rel=1e-12), s
    reference = cantera_tp(inlet, eq.T, eq.P, reacting)
    for s in reacting:
        assert eq.amounts[s] == pytest.approx(reference[s], rel=1e-6, abs=1e-12 * sum(inlet.values())), s


def test_stage_frozen_holds_a_species_in_a_full_equilibrium_stage():
    from gibbsmin.case import settle_case

    text = ('[feed]\nunit = "kmol/h"\nCH4 = 100.0\nH2O = 300.0\nC2H6 = 5.0\n[species]\nexclude = ["C(s)"]\n'
            '[[stage]]\nT = "700 degC"\nP = "30 bar"\nfrozen = ["C2H6"]\n')
    result = settle_case(parse_case(text))
    eq = result.outlet
    assert eq.amounts["C2H6"] == pytest.approx(5 * KMOL_H, rel=1e-12)
    assert eq.amounts["CH4"] < 100 * KMOL_H  # the rest reforms
    from gibbsmin.report.settle import settle_report
    from gibbsmin.report.text import render_text

    assert "outlet: the case's species set; held in this stage: C2H6" in render_text(settle_report(result))


@pytest.mark.parametrize("stage, words", [
    ('reactions = ["C3H8 + H2 = C2H6 + CH4"]\nT = "500 degC"', ["can also react by", "add it to reactions"]),
    ('service = "HT shift"\nfrozen = ["CO"]\nT = "400 degC"', ["CO is held (frozen)", "water-gas shift"]),
    ('service = "HT shift"\nfrozen = ["Ar"]\nT = "400 degC"', ["Ar is not in this stage's inlet"]),
])
def test_reaction_lists_that_cannot_mean_what_they_say_are_refused(stage, words):
    from gibbsmin.case import settle_case

    text = ('[feed]\nunit = "kmol/h"\nC3H8 = 10.0\nH2 = 50.0\nCO = 10.0\nH2O = 20.0\n'
            f'[[stage]]\n{stage}\nP = "30 bar"\n')
    with pytest.raises(CaseError) as caught:
        settle_case(parse_case(text, "plant.toml"))
    assert caught.value.line == 7
    for word in words:
        assert word in str(caught.value), str(caught.value)


@pytest.mark.parametrize("stage, key, words", [
    ('type = "cooler"\nduty = "12 MW"', "stage[2].duty", ["duty = '-12 MW'", "type = 'heater'"]),
    ('type = "heater"\nduty = "-12 MW"', "stage[2].duty", ["duty = '12 MW'", "type = 'cooler'"]),
    ('type = "cooler"\nT = "40 degC"\nduty = "-1 MW"', "stage[2]", ["either its outlet T", "not both"]),
    ('type = "cooler"\nT = "40 degC"\nservice = "HT shift"', "stage[2].service", ["only goes with type = 'reactor'"]),
    ('type = "knock-out"\nT = "40 degC"\nadiabatic = true', "stage[2].adiabatic", ["nothing reacts in a knock-out"]),
    ('type = "exchanger"\nT = "40 degC"', "stage[2].type", ["'cooler'"]),
    ('service = "shift"\nT = "400 degC"', "stage[2].service", ["'HT shift'"]),
    ('service = "HT shift"\nreactions = ["water-gas shift"]\nT = "400 degC"', "stage[2].reactions",
     ["not both"]),
    ('duty = "-5 MW"\nT = "400 degC"', "stage[2].duty", ["type = 'heater', 'cooler' or 'knock-out'"]),
])
def test_stage_types_refuse_keys_that_do_not_fit(stage, key, words):
    text = (FEED + '[[stage]]\nT = "850 degC"\nP = "30 bar"\n' + f'[[stage]]\n{stage}\nP = "29 bar"\n')
    with pytest.raises(CaseError) as caught:
        parse_case(text)
    assert caught.value.key == key, str(caught.value)
    for word in words:
        assert word in str(caught.value), str(caught.value)


def test_a_cooler_that_heats_is_refused():
    from gibbsmin.case import settle_case

    text = (FEED + '[[stage]]\nT = "850 degC"\nP = "30 bar"\n'
            '[[stage]]\nname = "cooler"\ntype = "cooler"\nT = "900 degC"\nP = "29 bar"\n')
    with pytest.raises(CaseError, match=r"hotter than its inlet \(850\.00 degC\).*type = 'heater'"):
        settle_case(parse_case(text))


def test_cooler_with_a_duty_finds_its_outlet_temperature_by_cantera_enthalpies():
    from gibbsmin.case import settle_case

    text = (FEED + '[[stage]]\nT = "850 degC"\nP = "30 bar"\n[species]\nexclude = ["C(s)"]\n'
            '[[stage]]\nname = "boiler"\ntype = "cooler"\nduty = "-20 MW"\nP = "29 bar"\n')
    result = settle_case(parse_case(text))
    hot, cold = (s.equilibrium for s in result.stages)
    assert present(cold.amounts) == pytest.approx(present(hot.amounts), rel=1e-12)
    removed = cantera_enthalpy(dict(cold.amounts), cold.T, cold.P) - cantera_enthalpy(dict(hot.amounts), hot.T, cold.P)
    assert removed == pytest.approx(-20e6, rel=1e-6)
    assert result.stages[1].duty_W == pytest.approx(-20e6, rel=1e-12)


# --- total with basis = "dry" ------------------------------------------------------------------------


def test_total_with_a_dry_basis_is_the_dry_gas_flow_and_steam_comes_on_top():
    from gibbsmin.case import read_case

    natural_gas = read_case(EXAMPLES / "reformer.toml").feeds[0].stream.feed_mol()
    dry = sum(n for s, n in natural_gas.items() if s != "H2O")
    assert dry == pytest.approx(1450 * KMOL_H, rel=1e-12)  # total = "1450 kmol/h" with basis = "dry"
    carbon = natural_gas["CH4"] + 2 * natural_gas["C2H6"] + 3 * natural_gas["C3H8"]  # hydrocarbon carbon
    assert natural_gas["H2O"] == pytest.approx(3.0 * carbon, rel=1e-12)  # steam_to_carbon = 3.0 on top
    # With water_content the total is the wet flow, of which that share is water.
    wet = parse_case('[feed]\nunit = "mol%"\nbasis = "dry"\ntotal = "100 kmol/h"\nwater_content = "20 mol%"\n'
                     'CH4 = 100.0\n[conditions]\nT = "850 degC"\nP = "30 bar(g)"\n').mixed_feed()
    assert sum(wet.values()) == pytest.approx(100 * KMOL_H, rel=1e-12) and wet["H2O"] == pytest.approx(20 * KMOL_H)


def test_a_sweep_refuses_a_first_stage_it_would_settle_as_a_full_equilibrium(tmp_path, monkeypatch, capsys):
    text = SHIFT_GAS + '[[stage]]\nservice = "HT shift"\nT = "400 degC"\nP = "28 bar(g)"\n'
    (tmp_path / "case.toml").write_text(text)
    monkeypatch.chdir(tmp_path)
    code = main(["sweep", "case.toml", "--vary", "T=350:450:50degC"])
    err = capsys.readouterr().err
    assert code == 2 and "service" in err and len(err.strip().splitlines()) == 1
