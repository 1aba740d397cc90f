"""Streams: construction in the trade's units, wet and dry views, steam-to-carbon, round trips, refused input.

Every plant and composition here is invented.  Molar masses by hand use the IUPAC 2021 abridged
standard atomic weights (Prohaska et al., Pure Appl. Chem. 94 (2022) 573; from memory):
H 1.008, C 12.011, N 14.007, O 15.999.
"""

import dataclasses
import math

import pytest

from gibbsmin.errors import InputError, UnknownSpeciesError
from gibbsmin.streams import Stream
from gibbsmin.units import ReferenceConditions

# An invented natural gas for an invented reformer, with CO2 and nitrogen present (mol%, dry).
NATURAL_GAS = {"CH4": 89.5, "C2H6": 4.5, "C3H8": 1.2, "n-butane": 0.3, "CO2": 2.0, "N2": 2.5}
FEED_CONDITIONS = {"T": "510 degC", "P": "32 bar(g)"}


def dry_gas(**kwargs):
    return Stream.from_composition(NATURAL_GAS, "1000 kmol/h", dry_basis=True, **FEED_CONDITIONS, **kwargs)


# --- steam-to-carbon --------------------------------------------------------------------------


def test_steam_to_carbon_counts_hydrocarbon_carbon_only():
    # By hand, per kmol of dry gas: hydrocarbon carbon = 0.895 x 1 + 0.045 x 2 + 0.012 x 3 + 0.003 x 4
    # = 0.895 + 0.090 + 0.036 + 0.012 = 1.033 kmol C.  1000 kmol/h of gas -> 1033 kmol/h C;
    # S/C = 3.0 -> 3099 kmol/h steam.  CO2 (20 kmol/h) is not counted (common practice, no source).
    feed = dry_gas().with_steam_to_carbon(3.0)
    assert feed.carbon_basis == "hydrocarbon"
    assert feed.component_flows("kmol/h")["H2O"] == pytest.approx(3099.0, rel=1e-13)
    assert feed.carbon_flow() * 3.6 == pytest.approx(1033.0, rel=1e-13)
    assert feed.steam_to_carbon() == pytest.approx(3.0, rel=1e-13)
    # On the all-carbon basis the same steam is 3099 / (1033 + 20) = 2.943020 (by hand).
    assert feed.steam_to_carbon("all") == pytest.approx(3099.0 / 1053.0, rel=1e-13)


def test_steam_to_carbon_on_the_all_carbon_basis():
    # By hand: all carbon = 1033 + 20 (CO2) = 1053 kmol/h; S/C 3.0 -> 3159 kmol/h steam.
    feed = dry_gas(carbon_basis="all").with_steam_to_carbon(3.0)
    assert feed.carbon_basis == "all"
    assert feed.component_flows("kmol/h")["H2O"] == pytest.approx(3159.0, rel=1e-13)
    assert dry_gas().with_steam_to_carbon(3.0, carbon_basis="all").component_flows("kmol/h")["H2O"] == (
        pytest.approx(3159.0, rel=1e-13)
    )


def test_steam_to_carbon_counts_water_already_present():
    # 1000 kmol/h of steam already in; S/C 3.0 needs 3099 in all, so 2099 more (by hand).
    part_wet = dry_gas().with_steam("1000 kmol/h")
    assert part_wet.with_steam_to_carbon(3.0).component_flows("kmol/h")["H2O"] == pytest.approx(3099.0, rel=1e-13)


def test_steam_as_a_mass_rate():
    # By hand: 62 t/h of steam / 18.015 kg/kmol = 3441.577 kmol/h.
    feed = dry_gas().with_steam("62 t/h")
    assert feed.component_flows("kmol/h")["H2O"] == pytest.approx(62000 / 18.015, rel=1e-13)
    assert feed.component_flows("t/h")["H2O"] == pytest.approx(62.0, rel=1e-13)
    assert dry_gas().with_steam(62, "t/h") == feed


def test_carbon_outside_both_definitions_is_warned_about():
    stream = Stream.from_flows({"CH4": 100, "methanol": 5, "H2O": 300}, "kmol/h", T=800, P=2e6)
    with pytest.warns(UserWarning, match="does not count the carbon of CH3OH") as caught:
        ratio = stream.steam_to_carbon()
    assert caught[0].filename == __file__  # the warning points at the caller
    assert ratio == pytest.approx(3.0, rel=1e-13)
    assert stream.steam_to_carbon("all") == pytest.approx(300 / 105, rel=1e-13)


# --- wet and dry -------------------------------------------------------------------------------

# An invented reformer outlet, wet mol%: H2 50, CO 10, CO2 5, CH4 5, H2O 30.
OUTLET_WET = {"H2": 50.0, "CO": 10.0, "CO2": 5.0, "CH4": 5.0, "H2O": 30.0}
# By hand, dry = wet / (1 - 0.30): H2 71.428571, CO 14.285714, CO2 7.142857, CH4 7.142857 mol%.
OUTLET_DRY = {"H2": 50 / 0.7, "CO": 10 / 0.7, "CO2": 5 / 0.7, "CH4": 5 / 0.7}


def test_dry_basis_view_by_hand():
    outlet = Stream.from_composition(OUTLET_WET, "5000 kmol/h", T="870 degC", P="28 bar(g)")
    dry = outlet.composition("mol%", dry=True)
    assert dry == pytest.approx(OUTLET_DRY, rel=1e-13)
    assert dry["H2"] == pytest.approx(71.428571, rel=1e-8)
    assert outlet.composition("mol%") == pytest.approx(OUTLET_WET, rel=1e-13)


def test_dry_analysis_plus_water_content_rebuilds_the_wet_stream():
    wet = Stream.from_composition(OUTLET_WET, "5000 kmol/h", T="870 degC", P="28 bar(g)")
    from_dry = Stream.from_composition(
        OUTLET_DRY, "5000 kmol/h", dry_basis=True, water="30 mol%", T="870 degC", P="28 bar(g)"
    )
    assert from_dry.component_flows() == pytest.approx(wet.component_flows(), rel=1e-13)


def test_average_molar_mass_and_mass_total_by_hand():
    # An invented ammonia synthesis gas, H2 75 / N2 25 mol%.
    # By hand: M = 0.75 x 2.016 + 0.25 x 28.014 = 1.512 + 7.0035 = 8.5155 g/mol,
    # so 8515.5 kg/h of it is 1000 kmol/h.
    syngas = Stream.from_composition({"H2": 75, "N2": 25}, "8515.5 kg/h", T="400 degC", P="150 bar(g)")
    assert syngas.average_molar_mass() == pytest.approx(8.5155, rel=1e-13)
    assert syngas.total_flow("kmol/h") == pytest.approx(1000.0, rel=1e-13)
    assert syngas.component_flows("kg/h") == pytest.approx({"H2": 750 * 2.016, "N2": 250 * 28.014}, rel=1e-13)


def test_dry_molar_mass_by_hand():
    # Dry outlet gas by hand: (50 x 2.016 + 10 x 28.010 + 5 x 44.009 + 5 x 16.043) / 70
    # = (100.8 + 280.1 + 220.045 + 80.215) / 70 = 681.16 / 70 = 9.730857 g/mol.
    outlet = Stream.from_composition(OUTLET_WET, "5000 kmol/h", T="870 degC", P="28 bar(g)")
    assert outlet.average_molar_mass(dry=True) == pytest.approx(681.16 / 70, rel=1e-13)


def test_normal_volume_view_by_hand():
    # 1000 kmol/h x 22.41397 m3/kmol (CODATA 2018 molar volume at 0 degC, 101.325 kPa; from memory)
    # = 22413.97 Nm3/h.
    stream = Stream.from_flows({"H2": 750, "N2": 250}, "kmol/h", T=300, P=1e5)
    assert stream.total_flow("Nm3/h") == pytest.approx(22413.97, rel=1e-6)
    # Normal conditions of 20 degC instead: 22413.97 x 293.15 / 273.15 = 24055.11 Nm3/h (by hand).
    at_20C = dataclasses.replace(stream, normal=ReferenceConditions(293.15, 101325.0, "site convention"))
    assert at_20C.total_flow("Nm3/h") == pytest.approx(22413.97 * 293.15 / 273.15, rel=1e-6)
    assert at_20C.table().attrs["normal conditions"] == "20 degC and 101.325 kPa (site convention)"


def test_ppmv_traces_and_normalisation():
    # 99.9995 mol% plus 5 ppmv H2S sums to 100 exactly; 100 mol% plus 5 ppmv is off and needs normalize.
    gas = Stream.from_composition({"CH4": 99.9995, "H2S": "5 ppmv"}, "100 kmol/h", T=300, P=1e5)
    assert gas.composition("ppmv")["H2S"] == pytest.approx(5.0, rel=1e-9)
    with pytest.raises(InputError, match="sums to 100.0005 mol%"):
        Stream.from_composition({"CH4": 100, "H2S": "5 ppmv"}, "100 kmol/h", T=300, P=1e5)
    scaled = Stream.from_composition({"CH4": 100, "H2S": "5 ppmv"}, "100 kmol/h", T=300, P=1e5, normalize=True)
    assert scaled.composition("ppmv")["H2S"] == pytest.approx(5 / 1.000005, rel=1e-12)
    assert scaled.total_flow("kmol/h") == pytest.approx(100.0, rel=1e-14)


# --- round trips and the stream's own state ----------------------------------------------------

FLOW_UNITS = ["mol/s", "kmol/h", "lbmol/h", "Nm3/h", "Sm3/h", "MMSCFD", "kg/h", "t/d", "lb/h"]


@pytest.mark.parametrize("unit", FLOW_UNITS)
def test_component_flows_round_trip(unit):
    feed = dry_gas().with_steam_to_carbon(3.0)
    again = Stream.from_flows(feed.component_flows(unit), unit, T=feed.T, P=feed.P)
    assert again.flow_mol_s == pytest.approx(feed.flow_mol_s, rel=1e-14)
    assert again.species == feed.species


def test_composition_round_trip_in_each_unit():
    feed = dry_gas().with_steam_to_carbon(3.0)
    for unit in ("fraction", "mol%", "ppmv"):
        again = Stream.from_composition(feed.composition(unit), feed.total_flow("kmol/h"), flow_unit="kmol/h",
                                        unit=unit, T=feed.T, P=feed.P)
        assert again.flow_mol_s == pytest.approx(feed.flow_mol_s, rel=1e-14)


def test_temperature_and_pressure_views():
    feed = dry_gas()
    assert feed.T == pytest.approx(783.15, rel=1e-15)
    assert feed.P == pytest.approx(32e5 + 101325.0, rel=1e-15)
    assert feed.temperature_in("degC") == pytest.approx(510.0, rel=1e-14)
    assert feed.pressure_in("bar(g)") == pytest.approx(32.0, rel=1e-14)


def test_aliases_resolve_to_database_names():
    stream = Stream.from_flows({"methane": "10 kmol/h", "steam": "30 kmol/h", "carbon dioxide": "1 kmol/h"},
                               T=900, P=2e6)
    assert stream.species == ("CH4", "H2O", "CO2")
    assert set(stream.feed_mol()) == {"CH4", "H2O", "CO2"}


def test_feed_for_the_engine_is_in_mol_per_second():
    feed = dry_gas().with_steam_to_carbon(3.0)
    amounts = feed.feed_mol()
    assert amounts["CH4"] == pytest.approx(895.0 / 3.6, rel=1e-14)  # 895 kmol/h = 248.611 mol/s
    assert math.fsum(amounts.values()) == pytest.approx(feed.total_mol_s, rel=1e-15)


def test_stream_is_immutable_and_hashable():
    feed = dry_gas()
    with pytest.raises(dataclasses.FrozenInstanceError):
        feed.T = 900.0
    assert hash(feed) == hash(dry_gas())
    assert feed == dry_gas()
    assert feed.with_steam("1 kmol/h") != feed  # derived streams are new objects


def test_table():
    feed = dry_gas().with_steam_to_carbon(3.0)
    table = feed.table()
    assert list(table.index) == list(feed.species)
    assert table["mol% wet"].sum() == pytest.approx(100.0, rel=1e-13)
    assert table["mol% dry"].sum() == pytest.approx(100.0, rel=1e-13)
    assert math.isnan(table.loc["H2O", "mol% dry"])
    assert table.loc["H2O", "flow [kmol/h]"] == pytest.approx(3099.0, rel=1e-13)
    assert table.attrs["carbon basis"] == "hydrocarbon"
    assert table.attrs["steam to carbon"] == pytest.approx(3.0, rel=1e-13)
    assert table.attrs["normal conditions"] == "0 degC and 101.325 kPa (DIN 1343)"


# --- refused input -----------------------------------------------------------------------------

CONDITIONS = {"T": 800.0, "P": 3e6}

BAD_STREAMS = [
    ("composition off 100", lambda: Stream.from_composition({"CH4": 90, "CO2": 5}, "1 kmol/h", **CONDITIONS),
     "sums to 95 mol%"),
    ("dry basis lists water", lambda: Stream.from_composition(OUTLET_WET, "1 kmol/h", dry_basis=True, **CONDITIONS),
     "dry-basis analysis cannot list H2O"),
    ("water without dry basis", lambda: Stream.from_composition(OUTLET_WET, "1 kmol/h", water=0.3, **CONDITIONS),
     "pass dry_basis=True"),
    ("all water", lambda: Stream.from_composition({"CH4": 100}, "1 kmol/h", dry_basis=True, water="100 mol%",
                                                   **CONDITIONS), "leaves no dry gas"),
    ("species twice", lambda: Stream.from_flows({"CH4": 1, "methane": 2}, "kmol/h", **CONDITIONS),
     "CH4 is given twice (as 'CH4' and 'methane')"),
    ("negative flow", lambda: Stream.from_flows({"CH4": -1}, "kmol/h", **CONDITIONS),
     "CH4: molar flow '-1 kmol/h' is negative"),
    ("no flow", lambda: Stream.from_flows({"CH4": 0, "H2O": 0}, "kmol/h", **CONDITIONS), "has no flow"),
    ("lengths differ", lambda: Stream(("CH4", "H2O"), (1.0,), 800, 3e6), "2 species but 1 flows"),
    ("flow not a number", lambda: Stream(("CH4",), ("1 kmol/h",), 800, 3e6), "finite number in mol/s"),
    ("no unit", lambda: Stream.from_flows({"CH4": 1}, **CONDITIONS), "has no unit"),
    ("mass-based analysis", lambda: Stream.from_composition({"CH4": "100 wt%"}, "1 kmol/h", **CONDITIONS),
     "mass-based composition"),
    ("pressure as temperature", lambda: Stream.from_flows({"CH4": 1}, "kmol/h", T="30 bar", P=3e6),
     "is a pressure, but a temperature is needed"),
    ("gauge below vacuum", lambda: Stream.from_flows({"CH4": 1}, "kmol/h", T=800, P="-1.5 barg"), "below vacuum"),
    ("S/C without hydrocarbon", lambda: Stream.from_flows({"CO": 1, "H2": 3}, "kmol/h", **CONDITIONS)
     .with_steam_to_carbon(3.0), "no hydrocarbon carbon"),
    ("S/C below water present", lambda: dry_gas().with_steam("5000 kmol/h").with_steam_to_carbon(3.0),
     "more than S/C = 3"),
    ("negative S/C", lambda: dry_gas().with_steam_to_carbon(-1.0), "zero or positive"),
    ("unknown carbon basis", lambda: dry_gas(carbon_basis="organic"), "carbon_basis must be one of"),
    ("dry view of pure water", lambda: Stream.from_flows({"H2O": 1}, "kmol/h", **CONDITIONS).composition(dry=True),
     "all water"),
    ("steam without unit", lambda: dry_gas().with_steam(100), "steam: molar flow 100 has no unit"),
]


@pytest.mark.parametrize("build, message", [case[1:] for case in BAD_STREAMS], ids=[c[0] for c in BAD_STREAMS])
def test_bad_stream_is_refused_with_a_message_naming_it(build, message):
    with pytest.raises(InputError) as raised:
        build()
    assert message in str(raised.value)


def test_unknown_species_suggests_names():
    with pytest.raises(UnknownSpeciesError, match="did you mean"):
        Stream.from_flows({"metane": 1}, "kmol/h", **CONDITIONS)
