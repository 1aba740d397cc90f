"""The trade's units: definitions against published conversion factors, round trips, and refused input."""

import math

import pytest

from gibbsmin.errors import InputError
from gibbsmin.thermo import R
from gibbsmin.units import (
    NORMAL_DIN_1343,
    STANDARD_ATMOSPHERE,
    STANDARD_ISO_13443,
    STANDARD_US_GAS,
    Quantity,
    ReferenceConditions,
    from_fraction,
    from_kelvin,
    from_mol_s,
    from_pascal,
    to_fraction,
    to_kelvin,
    to_mol_s,
    to_pascal,
    ureg,
)

# --- definitions against NIST SP 811 -----------------------------------------------------------
# Source for this block: B. N. Taylor and A. Thompson, "Guide for the Use of the International
# System of Units (SI)", NIST Special Publication 811, 2008 edition, Appendix B.8 (factors for
# units listed alphabetically) and B.9 (by kind of quantity); factors given there to seven
# significant figures, exact ones marked as such.  A seven-figure factor is good to half a unit in
# its last figure, 5e-7 relative at worst: that is the tolerance of the inexact ones.


@pytest.mark.parametrize(
    "text, pascal, rel",
    [
        ("1 psi", 6.894757e3, 5e-7),  # pound-force per square inch
        ("1 psia", 6.894757e3, 5e-7),
        ("1 atm", 1.01325e5, 0.0),  # standard atmosphere, exact
        ("1 bar", 1.0e5, 0.0),  # exact
        ("1 torr", 1.333224e2, 5e-7),
        ("1 mmHg", 1.333224e2, 5e-7),  # conventional millimetre of mercury
        ("1 inHg", 3.386389e3, 5e-7),  # conventional inch of mercury
        ("1 kgf/cm2", 9.80665e4, 1e-15),  # kilogram-force per square centimetre, exact
        ("1 MPa", 1.0e6, 0.0),
    ],
)
def test_pressure_units_match_nist_sp811(text, pascal, rel):
    assert to_pascal(text) == pytest.approx(pascal, rel=rel, abs=0)


@pytest.mark.parametrize("t_F", [-40.0, 32.0, 60.0, 212.0, 1562.0])
def test_fahrenheit_follows_nist_sp811_definition(t_F):
    # NIST SP 811 (2008), B.9 "Temperature": T/K = (t/degF + 459.67)/1.8.
    assert to_kelvin(f"{t_F} degF") == pytest.approx((t_F + 459.67) / 1.8, rel=1e-15)


@pytest.mark.parametrize("t_C", [-200.0, 0.0, 25.0, 850.0])
def test_celsius_and_rankine_follow_nist_sp811_definitions(t_C):
    # NIST SP 811 (2008), B.9: T/K = t/degC + 273.15 and T/K = (T/degR)/1.8.
    kelvin = t_C + 273.15
    assert to_kelvin(f"{t_C} degC") == pytest.approx(kelvin, rel=1e-15)
    assert to_kelvin(f"{kelvin * 1.8} degR") == pytest.approx(kelvin, rel=1e-15)


def test_mass_time_and_length_factors_match_nist_sp811():
    # NIST SP 811 (2008), B.8: pound (avoirdupois) = 0.45359237 kg exactly; metric ton = 1000 kg;
    # hour = 3600 s; day = 86400 s; cubic foot = 2.831685e-2 m3.  Checked through mass flows with a
    # molar mass of 1 g/mol, so that mol/s equals g/s.
    assert to_mol_s("1 lb/h", molar_mass=1.0) == pytest.approx(453.59237 / 3600, rel=1e-15)
    assert to_mol_s("1 t/d", molar_mass=1.0) == pytest.approx(1e6 / 86400, rel=1e-15)
    assert to_mol_s("3600 mol/h") == pytest.approx(1.0, rel=1e-15)
    assert Quantity(1, "ft**3").to("m**3").magnitude == pytest.approx(2.831685e-2, rel=5e-7)


def test_gas_constant_is_the_exact_si_value_everywhere():
    # CODATA 2018 (Tiesinga et al., Rev. Mod. Phys. 93, 025010, 2021): R = N_A k = 8.314462618... J/(mol K),
    # exact since the 2019 SI.  The registry and the thermodynamics must use the same number.
    assert Quantity(1, "molar_gas_constant").to("J/(mol*K)").magnitude == pytest.approx(8.314462618, rel=1e-10)
    assert Quantity(1, "molar_gas_constant").to("J/(mol*K)").magnitude == R


# --- normal and standard volumes ---------------------------------------------------------------


def test_normal_molar_volume_matches_codata():
    # CODATA 2018 molar volume of an ideal gas at 273.15 K and 101.325 kPa: 22.413 969 54e-3 m3/mol
    # (from memory; it follows from the exact R).  So 22.41397 Nm3 is one kmol.
    assert NORMAL_DIN_1343.molar_volume == pytest.approx(22.41396954e-3, rel=1e-9)
    assert to_mol_s("22.41396954 Nm3/h") * 3.6 == pytest.approx(1.0, rel=1e-9)


def test_nm3_per_hour_to_kmol_per_hour_by_hand():
    # By hand: V_m = R T / P = 8.314462618 J/(mol K) x 273.15 K / 101325 Pa
    #              = 2271.0955 / 101325 m3/mol = 0.02241397 m3/mol = 22.41397 m3/kmol.
    # 25000 Nm3/h / 22.41397 m3/kmol = 1115.376 kmol/h.
    assert to_mol_s("25000 Nm3/h") * 3.6 == pytest.approx(1115.376, rel=1e-6)
    assert from_mol_s(1115.376 / 3.6, "Nm3/h") == pytest.approx(25000, rel=1e-6)


def test_standard_cubic_foot_per_pound_mole():
    # 379.48 scf per lb-mol at 60 degF and 14.696 psia: common practice in the US gas trade, from memory.
    assert from_mol_s(to_mol_s("1 lbmol/h"), "scf/h") == pytest.approx(379.48, rel=2e-5)


def test_mmscfd_to_kmol_per_hour_by_hand():
    # By hand: 3 MMSCFD = 3e6 scf/d; / 379.48 scf/lbmol = 7905.55 lbmol/d;
    # x 0.45359237 kmol/lbmol = 3585.90 kmol/d; / 24 h/d = 149.41 kmol/h.
    assert to_mol_s("3 MMSCFD") * 3.6 == pytest.approx(3e6 / 379.48 * 0.45359237 / 24, rel=2e-5)
    assert to_mol_s("3 MMSCFD") * 3.6 == pytest.approx(149.41, rel=1e-4)


def test_roman_thousands_are_not_read_as_mega():
    # Gas trade usage (common practice, no source): M = thousand, MM = million.
    assert to_mol_s("1000 MSCFD") == pytest.approx(to_mol_s("1 MMSCFD"), rel=1e-15)
    assert to_mol_s("1 MMSCF/d") == pytest.approx(to_mol_s("1e6 scf/d"), rel=1e-15)


def test_standard_cubic_metre_at_15_degC():
    # ISO 13443 (1996) standard reference conditions: 288.15 K and 101.325 kPa.  At the same pressure an
    # ideal gas's volume scales with T: 1 Sm3 = 273.15/288.15 Nm3 = 0.947944 Nm3 (by hand).
    assert (STANDARD_ISO_13443.T, STANDARD_ISO_13443.P) == (288.15, 101325.0)
    assert to_mol_s("1 Sm3/h") / to_mol_s("1 Nm3/h") == pytest.approx(273.15 / 288.15, rel=1e-14)
    # 23.645 m3/kmol at 15 degC and 101.325 kPa, common practice (from memory).
    assert STANDARD_ISO_13443.molar_volume * 1e3 == pytest.approx(23.645, rel=2e-5)


def test_us_standard_conditions():
    # 60 degF = 288.7056 K by NIST SP 811's definition; 14.696 psi = 14.696 x 6894.757 Pa = 101325.3 Pa.
    assert STANDARD_US_GAS.T == pytest.approx((60 + 459.67) / 1.8, rel=1e-15)
    assert STANDARD_US_GAS.P == pytest.approx(14.696 * 6894.757, rel=5e-7)


def test_normal_conditions_are_a_parameter():
    # An ideal gas at 20 degC and 1 atm holds 273.15/293.15 of the moles it holds at 0 degC (by hand).
    at_20C = ReferenceConditions(293.15, 101325.0, "site convention")
    assert to_mol_s("1 Nm3/h", normal=at_20C) / to_mol_s("1 Nm3/h") == pytest.approx(273.15 / 293.15, rel=1e-14)
    assert from_mol_s(to_mol_s("1 Nm3/h", normal=at_20C), "Nm3/h", normal=at_20C) == pytest.approx(1.0, rel=1e-14)
    # Only Nm3 follows the parameter; Sm3 stays at ISO 13443 conditions.
    assert to_mol_s("1 Sm3/h", normal=at_20C) == to_mol_s("1 Sm3/h")
    assert "0 degC and 101.325 kPa (DIN 1343)" == NORMAL_DIN_1343.describe()


# --- gauge pressures and text forms ------------------------------------------------------------


@pytest.mark.parametrize(
    "text", ["30 bar(g)", "30 barg", "30 bar g", "30 bar gauge", "30 bar(G)", "3000 kPa(g)", "3 MPag"]
)
def test_gauge_pressure_adds_one_standard_atmosphere(text):
    # Gauge = absolute - atmosphere; the atmosphere is the standard one, 101325 Pa (NIST SP 811, exact).
    assert to_pascal(text) == pytest.approx(30e5 + 101325.0, rel=1e-15)


def test_gauge_pressure_with_local_atmosphere_and_psig():
    assert to_pascal("30 bar(g)", atmosphere=95000.0) == pytest.approx(30e5 + 95000.0, rel=1e-15)
    assert to_pascal("200 psig") == pytest.approx(200 * 6.894757e3 + STANDARD_ATMOSPHERE, rel=5e-7)
    assert to_pascal("0 psig") == STANDARD_ATMOSPHERE
    assert to_pascal("31 bara") == to_pascal("31 bar(a)") == to_pascal("31 bar") == 31e5


@pytest.mark.parametrize("text", ["850 degC", "850degC", "850 °C", "850 C", "850 deg C", "1123.15 K", "1562 degF"])
def test_temperature_text_forms(text):
    assert to_kelvin(text) == pytest.approx(1123.15, rel=1e-14)


def test_numbers_take_the_default_unit_and_quantities_are_accepted():
    assert to_kelvin(850, default_unit="degC") == pytest.approx(1123.15, rel=1e-15)
    assert to_kelvin(1123.15) == 1123.15
    assert to_pascal(30, default_unit="bar(g)") == pytest.approx(3101325.0, rel=1e-15)
    assert to_mol_s(1000, "kmol/h") == pytest.approx(1000 / 3.6, rel=1e-15)
    assert to_kelvin(Quantity(850, "degC")) == pytest.approx(1123.15, rel=1e-15)
    assert to_mol_s(Quantity(1000, "kmol/h")) == pytest.approx(1000 / 3.6, rel=1e-15)
    assert to_mol_s("25000 Nm³/h") == to_mol_s("25000 Nm3/h") == to_mol_s("25000 Nm^3/h")


def test_one_registry():
    # Quantities built from the exported registry are the ones the converters read.
    assert Quantity is ureg.Quantity
    assert to_mol_s(ureg.Quantity(2.0, "mol/s")) == 2.0


@pytest.mark.parametrize(
    "text, fraction",
    [
        ("12.5 mol%", 0.125), ("12.5 vol%", 0.125), ("0.125", 0.125),
        ("50 ppmv", 50e-6), ("7 ppbv", 7e-9), ("100 %", 1.0),
    ],
)
def test_composition_units(text, fraction):
    assert to_fraction(text) == pytest.approx(fraction, rel=1e-15)


# --- round trips -------------------------------------------------------------------------------

FLOW_UNITS = [
    "mol/s", "kmol/h", "kmol/s", "lbmol/h", "Nm3/h", "Nm3/d", "Sm3/h", "scf/h", "MSCFD", "MMSCFD",
    "kg/h", "kg/s", "g/s", "t/h", "t/d", "lb/h",
]


@pytest.mark.parametrize("unit", FLOW_UNITS)
@pytest.mark.parametrize("value", [0.0, 1e-6, 1.0, 1234.5678, 3.3e7])
def test_flow_round_trip(unit, value):
    molar_mass = 16.043  # any positive value; used by the mass units only
    mol_s = to_mol_s(value, unit, molar_mass=molar_mass)
    assert from_mol_s(mol_s, unit, molar_mass=molar_mass) == pytest.approx(value, rel=1e-14, abs=0)
    assert to_mol_s(f"{value!r} {unit}", molar_mass=molar_mass) == mol_s


@pytest.mark.parametrize("unit", ["K", "degC", "degF", "degR"])
@pytest.mark.parametrize("kelvin", [1.0, 273.15, 1123.15, 3000.0])
def test_temperature_round_trip(unit, kelvin):
    assert to_kelvin(from_kelvin(kelvin, unit), default_unit=unit) == pytest.approx(kelvin, rel=1e-14)


@pytest.mark.parametrize(
    "unit", ["Pa", "kPa", "MPa", "bar", "bar(g)", "barg", "psia", "psig", "atm", "kgf/cm2 g", "kPa(g)"]
)
@pytest.mark.parametrize("pascal", [101325.0, 2e5, 3.1e6, 3e7])
def test_pressure_round_trip(unit, pascal):
    assert to_pascal(from_pascal(pascal, unit), default_unit=unit) == pytest.approx(pascal, rel=1e-14)


@pytest.mark.parametrize("unit", ["fraction", "mol%", "ppmv", "ppbv"])
def test_fraction_round_trip(unit):
    for fraction in (0.0, 3.7e-9, 0.125, 1.0):
        assert to_fraction(from_fraction(fraction, unit), default_unit=unit) == pytest.approx(fraction, rel=1e-15)


# --- refused input -----------------------------------------------------------------------------

BAD_INPUT = [
    (to_kelvin, ("850 degX",), "unknown unit 'degX'"),
    (to_kelvin, ("30 bar",), "is a pressure, but a temperature is needed"),
    (to_kelvin, ("-300 degC",), "below absolute zero"),
    (to_kelvin, (-5.0,), "below absolute zero"),
    (to_kelvin, ("",), "must start with a number"),
    (to_kelvin, ("hot",), "must start with a number"),
    (to_kelvin, (math.nan,), "not a finite number"),
    (to_kelvin, (True,), "must be a number or a text"),
    (to_pascal, ("-2 barg",), "below vacuum"),
    (to_pascal, ("850 degC",), "is a temperature, but a pressure is needed"),
    (to_pascal, ("-1 bar",), "must be positive"),
    (to_pascal, ("30 kg",), "is a mass, but a pressure is needed"),
    (to_pascal, ("3 bar(g",), "is malformed"),
    (to_mol_s, ("-5 kmol/h",), "is negative"),
    (to_mol_s, ("100 kg/h",), "needs the molar mass"),
    (to_mol_s, ("100 m3/h",), "volume flow at actual conditions"),
    (to_mol_s, ("100 kmol",), "needs a time unit"),
    (to_mol_s, (100.0,), "has no unit"),
    (to_mol_s, ("25,000 Nm3/h",), "without thousands separators"),
    (to_mol_s, ("5 degC",), "is a temperature, but a molar flow is needed"),
    (to_mol_s, ("5 kg/h", None), "needs the molar mass"),
    (to_fraction, ("5 ppm",), "ambiguous"),
    (to_fraction, ("2 wt%",), "mass-based"),
    (to_fraction, ("120 mol%",), "between 0 and 1"),
    (to_fraction, ("3 furlongs",), "unknown composition unit"),
]


@pytest.mark.parametrize("convert, args, message", BAD_INPUT, ids=[f"{c.__name__}{a}" for c, a, _ in BAD_INPUT])
def test_bad_input_is_refused_with_a_message_naming_it(convert, args, message):
    with pytest.raises(InputError) as raised:
        convert(*args)
    assert message in str(raised.value)
    if isinstance(args[0], str) and args[0]:
        assert repr(args[0]) in str(raised.value)  # the message quotes what the user wrote


def test_input_error_is_also_a_value_error():
    with pytest.raises(ValueError):
        to_kelvin("-1 K")


def test_bad_molar_mass_and_reference_conditions():
    with pytest.raises(InputError, match="positive number in g/mol"):
        to_mol_s("5 kg/h", molar_mass=-1.0)
    with pytest.raises(InputError, match="positive, finite T"):
        ReferenceConditions(-10.0, 101325.0)
    with pytest.raises(InputError, match="ReferenceConditions"):
        to_mol_s("5 Nm3/h", normal=(273.15, 101325.0))
