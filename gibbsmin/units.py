"""The trade's units at the edge of the program: one pint registry and the conversions to K, Pa, mol and mol/s.

Everything inside gibbsmin works in kelvin, pascal, mole (and mol/s for
flows).  This module turns what an engineer writes -- ``"850 degC"``,
``"30 bar(g)"``, ``"25000 Nm3/h"``, ``"3 MMSCFD"``, ``"50 t/d"``, ``"5 ppmv"``
-- into those units and back, and refuses nonsense with an
:class:`~gibbsmin.errors.InputError` that names the text and the fix.

Conventions, written here once:

* Gauge pressures (``bar(g)``, ``barg``, ``psig``, ``kPa(g)``, ``bar g``) are
  relative to a standard atmosphere, 101325 Pa, unless the caller passes the
  local barometric pressure as ``atmosphere``.  A gauge pressure below minus
  one atmosphere is an error (below vacuum).
* Normal cubic metres (``Nm3``) are an amount of ideal gas: one Nm3 holds
  P V / (R T) moles at the normal conditions, by default 0 degC and
  101.325 kPa (DIN 1343).  Other normal conditions are a parameter
  (``normal=``) and every output that uses them should say which.
* Standard cubic metres (``Sm3``) are at 15 degC and 101.325 kPa (ISO 13443
  standard reference conditions for natural gas).
* Standard cubic feet (``scf``, ``MSCF`` = 1e3 scf, ``MMSCF`` = 1e6 scf,
  ``MMSCFD`` = 1e6 scf per day) are at 60 degF and 14.696 psia, common
  practice in the US gas trade (some contracts use 14.73 psia instead).
* Gas volumes are converted as ideal gas; no compressibility factor is
  applied, which is how the trade states normal and standard volumes.
* Compositions: ``fraction`` (mole fraction), ``mol%``, ``vol%`` (equal to
  mol% for an ideal gas), ``ppmv``, ``ppbv``.  A bare ``ppm`` is refused as
  ambiguous (by volume or by mass), and mass-based units (``wt%``, ``ppmw``)
  are refused: give mass flows instead.

The molar gas constant is the exact SI value (2019), the same number as
:data:`gibbsmin.thermo.R`.
"""

from __future__ import annotations

import math
import numbers
import re
import sys
import threading
import tokenize
from collections.abc import Mapping
from dataclasses import dataclass
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    import pint

from .errors import InputError
from .thermo import R

__all__ = [
    "ureg",
    "Quantity",
    "STANDARD_ATMOSPHERE",
    "ReferenceConditions",
    "NORMAL_DIN_1343",
    "STANDARD_ISO_13443",
    "STANDARD_US_GAS",
    "to_kelvin",
    "from_kelvin",
    "parse_temperature",
    "to_pascal",
    "parse_pressure",
    "from_pascal",
    "to_mol_s",
    "from_mol_s",
    "to_fraction",
    "from_fraction",
]

#: One standard atmosphere [Pa], exact by definition (NIST SP 811, Appendix B).
STANDARD_ATMOSPHERE = 101325.0


@dataclass(frozen=True)
class ReferenceConditions:
    """The temperature and pressure at which a 'normal' or 'standard' gas volume is stated.

    Parameters
    ----------
    T : float
        Temperature, [K]
    P : float
        Absolute pressure, [Pa]
    source : str
        The standard or practice that fixes these conditions.
    """

    T: float
    P: float
    source: str = "given by the user"

    def __post_init__(self) -> None:
        for name, value in (("T", self.T), ("P", self.P)):
            if not (isinstance(value, numbers.Real) and math.isfinite(value) and value > 0):
                raise InputError(
                    f"reference conditions need a positive, finite {name} (in K and Pa), got {value!r}"
                )

    @property
    def molar_volume(self) -> float:
        """Ideal-gas molar volume at these conditions, [m3/mol]."""
        return R * self.T / self.P

    def describe(self) -> str:
        """The conditions in words, for reports: ``'0 degC and 101.325 kPa (DIN 1343)'``."""
        return f"{self.T - 273.15:.6g} degC and {self.P / 1e3:.6g} kPa ({self.source})"


#: Normal conditions of DIN 1343 (1990): 273.15 K and 101325 Pa; the default for Nm3.
NORMAL_DIN_1343 = ReferenceConditions(273.15, 101325.0, "DIN 1343")
#: Standard reference conditions of ISO 13443 (1996) for natural gas: 288.15 K, 101325 Pa; used for Sm3.
STANDARD_ISO_13443 = ReferenceConditions(288.15, 101325.0, "ISO 13443")
#: 60 degF and 14.696 psia, common practice in the US gas trade; used for scf, MSCF, MMSCF, MMSCFD.
#: The two floats are pint's own conversions of 60 degF and 14.696 psi, written out so that importing gibbsmin
#: does not build the registry (tests/test_startup.py checks them against pint).
STANDARD_US_GAS = ReferenceConditions(288.7055555555556, 101325.35318040226, "60 degF and 14.696 psia, US gas practice")


def _ideal_gas_unit(conditions: ReferenceConditions, volume: str) -> str:
    """A pint definition of the amount of ideal gas that fills ``volume`` at ``conditions``."""
    return f"{conditions.P!r} * pascal * {volume} / (molar_gas_constant * {conditions.T!r} * kelvin)"


_TRADE_UNITS = (
    f"normal_cubic_meter = {_ideal_gas_unit(NORMAL_DIN_1343, 'meter ** 3')} = Nm3",
    f"standard_cubic_meter = {_ideal_gas_unit(STANDARD_ISO_13443, 'meter ** 3')} = Sm3",
    f"standard_cubic_foot = {_ideal_gas_unit(STANDARD_US_GAS, 'foot ** 3')} = scf = SCF",
    # Roman-numeral multiples of the gas trade, defined explicitly so that pint
    # does not read the leading M as the SI prefix mega.
    "thousand_standard_cubic_feet = 1e3 * standard_cubic_foot = MSCF = Mscf",
    "million_standard_cubic_feet = 1e6 * standard_cubic_foot = MMSCF = MMscf",
    "MSCFD = thousand_standard_cubic_feet / day = Mscfd",
    "MMSCFD = million_standard_cubic_feet / day = MMscfd",
    "pound_mole = 453.59237 * mole = lbmol = lb_mol",
)

# pint and its registry cost about 0.4 s, so the registry is built on the first conversion of a unit, not on
# import; one lock, because quantities of two registries cannot be mixed.
_REGISTRY: list[pint.UnitRegistry] = []
_REGISTRY_LOCK = threading.Lock()


def _registry() -> pint.UnitRegistry:
    """The application's one unit registry (``ureg``), built on first use."""
    if not _REGISTRY:
        with _REGISTRY_LOCK:
            if not _REGISTRY:
                import pint

                registry = pint.UnitRegistry()
                for definition in _TRADE_UNITS:
                    registry.define(definition)
                _REGISTRY.append(registry)
    return _REGISTRY[0]


def __getattr__(name: str) -> object:
    # ``units.ureg`` (the application's one unit registry; build quantities for gibbsmin with it) and
    # ``units.Quantity`` stay public names; they build the registry when first asked for.
    if name == "ureg":
        return _registry()
    if name == "Quantity":
        return _registry().Quantity
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")


def _is_quantity(value: object) -> bool:
    """Whether ``value`` is a pint quantity (none can exist before pint is imported)."""
    pint = sys.modules.get("pint")
    return pint is not None and isinstance(value, pint.Quantity)


def _quantity(magnitude: float, unit: str | pint.Unit) -> pint.Quantity:
    return _registry().Quantity(magnitude, unit)


def _dimensionality(unit: str) -> object:
    return _quantity(1.0, unit).dimensionality

_NORMAL_UNIT = "normal_cubic_meter"
_NUMBER = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")
_UNIT_TOKEN = re.compile(r"[A-Za-z_]+(?:\^?\d+)?")
_SUPERSCRIPTS = str.maketrans({"²": "2", "³": "3", "−": "-", "·": "*"})

_TEMPERATURE_ALIASES = {
    "C": "degC", "°C": "degC", "deg C": "degC", "deg_C": "degC", "celsius": "degC",
    "F": "degF", "°F": "degF", "deg F": "degF", "deg_F": "degF", "fahrenheit": "degF",
    "R": "degR", "°R": "degR", "deg R": "degR", "rankine": "degR",
    "K": "kelvin", "kelvin": "kelvin",
}
_PRESSURE_ALIASES = {"kg/cm2": "kgf/cm2", "kg/cm^2": "kgf/cm2", "kg/cm²": "kgf/cm2"}
_EXPLICIT_GAUGE = re.compile(
    r"^(?P<unit>.+?)\s*(?:\((?P<paren>g|a|gauge|abs)\)|\s(?P<word>g|a|gauge|abs|absolute))$", re.IGNORECASE
)

# How many of each unit make a whole: dividing by 1e6 gives the float nearest to 5 ppmv,
# multiplying by 1e-6 may not.
_FRACTION_UNITS: Mapping[str, float] = {
    "fraction": 1.0, "mole fraction": 1.0, "mol fraction": 1.0, "mol/mol": 1.0, "-": 1.0,
    "mol%": 1e2, "mole%": 1e2, "mol %": 1e2, "%": 1e2, "vol%": 1e2, "%vol": 1e2, "v%": 1e2,
    "ppmv": 1e6, "ppm(v)": 1e6, "ppm mol": 1e6, "vppm": 1e6,
    "ppbv": 1e9, "ppb(v)": 1e9, "vppb": 1e9,
}
_MASS_FRACTION_UNITS = ("wt%", "w%", "mass%", "%wt", "ppmw", "ppm(w)", "wppm", "ppbw", "mass fraction")
_AMBIGUOUS_FRACTION_UNITS = ("ppm", "ppb")

_DIMENSION_NAMES = {
    "[temperature]": "temperature",
    "[mass] / [length] / [time] ** 2": "pressure",
    "[substance] / [time]": "molar flow",
    "[mass] / [time]": "mass flow",
    "[length] ** 3 / [time]": "volume flow at actual conditions",
    "[substance]": "amount of substance",
    "[mass]": "mass",
    "[length] ** 3": "volume at actual conditions",
    "[time]": "time",
    "[length]": "length",
    "[mass] / [length] ** 2": "mass per area",
    "dimensionless": "pure number",
}

_EXAMPLES = {
    "temperature": "e.g. '850 degC', '1123.15 K', '1562 degF'",
    "pressure": "e.g. '30 bar(g)', '31 bar', '3.1 MPa', '450 psia', '435 psig'",
    "molar flow": "e.g. '1000 kmol/h', '25000 Nm3/h', '3 MMSCFD', '12 t/h' (mass flows need a molar mass)",
    "fraction": "e.g. '12.5 mol%', '0.125', '50 ppmv'",
}


# --- reading text ---------------------------------------------------------------------------------


def _split(value: object, default_unit: str | None, what: str) -> tuple[float, str, str]:
    """Magnitude, unit text and the original text (for messages) of a value given as text, number or Quantity."""
    if _is_quantity(value):
        magnitude, unit, shown = value.magnitude, str(value.units), str(value)
        if not isinstance(magnitude, numbers.Real):
            raise InputError(f"{what} {shown!r}: give a single number, not an array")
    elif isinstance(value, str):
        shown = value
        text = value.translate(_SUPERSCRIPTS)
        match = _NUMBER.match(text)
        if match is None:
            raise InputError(f"cannot read {what} {value!r}: it must start with a number; {_EXAMPLES[what]}")
        magnitude, unit = float(match.group(1)), match.group(2)
        if unit.startswith(","):
            raise InputError(
                f"cannot read {what} {value!r}: write the number without thousands separators or a decimal "
                f"comma (e.g. '25000.5'); {_EXAMPLES[what]}"
            )
        if not unit:
            unit = default_unit
    elif isinstance(value, numbers.Real) and not isinstance(value, bool):
        magnitude, unit = float(value), default_unit
        shown = f"{value!r} {unit}" if unit is not None else repr(value)
    else:
        raise InputError(f"{what} must be a number or a text such as {_EXAMPLES[what][5:]}, not {value!r}")
    if unit is None:
        raise InputError(f"{what} {shown} has no unit; write it with one, {_EXAMPLES[what]}")
    if not math.isfinite(magnitude):
        raise InputError(f"{what} {shown!r} is not a finite number; {_EXAMPLES[what]}")
    return float(magnitude), unit.strip(), shown


def _normalise_unit_text(unit: str) -> str:
    """Write exponents the way pint reads them: 'm3/h' -> 'm**3/h', while names the registry holds ('Nm3') stay."""

    def replace(match: re.Match[str]) -> str:
        token = match.group(0).replace("^", "")
        if token in _registry():
            return token
        stem = token.rstrip("0123456789")
        if stem != token and stem in _registry():
            return f"{stem}**{token[len(stem):]}"
        return match.group(0)

    return _UNIT_TOKEN.sub(replace, unit.translate(_SUPERSCRIPTS))


def _parse_unit(unit: str, what: str, shown: str) -> pint.Unit:
    import pint  # loaded with the registry (see _registry)

    try:
        return _registry().parse_units(_normalise_unit_text(unit))
    except pint.UndefinedUnitError as exc:
        names = ", ".join(repr(name) for name in exc.unit_names)
        raise InputError(f"cannot read {what} {shown!r}: unknown unit {names} in {unit!r}; {_EXAMPLES[what]}") from None
    except (pint.PintError, AssertionError, ValueError, TypeError, SyntaxError, tokenize.TokenError):
        # pint's parser fails in several ways on malformed text; none of its messages help the user more than this.
        raise InputError(f"cannot read {what} {shown!r}: unit {unit!r} is malformed; {_EXAMPLES[what]}") from None


def _dimension_name(unit: pint.Unit) -> str:
    dimensionality = str(unit.dimensionality)
    return _DIMENSION_NAMES.get(dimensionality, dimensionality)


def _with_article(noun: str) -> str:
    return f"{'an' if noun[:1] in 'aeiou' else 'a'} {noun}"


def _wrong_dimension(what: str, shown: str, unit: pint.Unit) -> InputError:
    return InputError(
        f"{shown!r} is {_with_article(_dimension_name(unit))}, but {_with_article(what)} is needed here; "
        f"{_EXAMPLES[what]}"
    )


# --- temperature ----------------------------------------------------------------------------------


def _temperature_unit(unit: str, shown: str) -> pint.Unit:
    parsed = _parse_unit(_TEMPERATURE_ALIASES.get(unit, unit), "temperature", shown)
    if _dimension_name(parsed) != "temperature":
        raise _wrong_dimension("temperature", shown, parsed)
    return parsed


def to_kelvin(value: float | str | pint.Quantity, default_unit: str = "K") -> float:
    """A temperature in kelvin.

    Parameters
    ----------
    value : float, str or pint.Quantity
        ``"850 degC"``, ``"1562 degF"``, ``"1123.15 K"``, ``"2021.67 degR"``
        (``C``, ``F``, ``R`` and ``°C`` are read as degrees), or a number in
        ``default_unit``.
    default_unit : str
        Unit of a bare number, [K] unless stated.

    Returns
    -------
    float
        Absolute temperature, [K]

    Raises
    ------
    InputError
        Unknown unit, a unit that is not a temperature, or a temperature at
        or below absolute zero.

    Examples
    --------
    >>> to_kelvin("850 degC")
    1123.15
    """
    magnitude, unit, shown = _split(value, default_unit, "temperature")
    kelvin = float(_quantity(magnitude, _temperature_unit(unit, shown)).to("kelvin").magnitude)
    if kelvin <= 0.0:
        raise InputError(
            f"temperature {shown!r} is {kelvin:.6g} K, at or below absolute zero; "
            f"check the sign and the unit ({_EXAMPLES['temperature']})"
        )
    return kelvin


def from_kelvin(T: float, unit: str) -> float:
    """A temperature [K] expressed in ``unit`` (``"degC"``, ``"degF"``, ``"K"``, ``"degR"``)."""
    return float(_quantity(T, "kelvin").to(_temperature_unit(unit, unit)).magnitude)


def _unit_required(value: object, what: str, fix: str) -> None:
    """Refuse a number, or a text that is only a number, where an engineer typed ``what``: say how to write it."""
    if isinstance(value, bool) or _is_quantity(value):
        return  # true/false is refused by the converter; a Quantity carries its unit
    if isinstance(value, numbers.Real):
        number = value
    elif isinstance(value, str):
        match = _NUMBER.match(value.translate(_SUPERSCRIPTS))
        if match is None or match.group(2):
            return
        number = float(match.group(1))
    else:
        return
    shown = f"{number:g}" if isinstance(number, float) and math.isfinite(number) else repr(number)
    raise InputError(f"{what} {value.strip() if isinstance(value, str) else value!r} has no unit; "
                     f"{fix.format(shown)}")


def parse_temperature(value: str | pint.Quantity | float) -> float:
    """A temperature an engineer typed (case file, command line), [K]: the unit is required.

    ``"850 degC"``, ``"1123.15 K"``, ``"1562 degF"`` are read as :func:`to_kelvin`
    reads them; a bare number (``850`` or ``"850"``) is refused with the fix,
    because 850 may mean degC as easily as K.  The API's floats in K stay with
    :func:`to_kelvin`.

    Examples
    --------
    >>> parse_temperature("850 degC")
    1123.15
    """
    _unit_required(value, "temperature", "a bare number is not taken as kelvin: write e.g. '{0} degC' or '{0} K'")
    return to_kelvin(value)


# --- pressure -------------------------------------------------------------------------------------


def _pressure_unit(unit: str, shown: str) -> tuple[pint.Unit, bool]:
    """The pint unit of a pressure unit text and whether it is gauge (True) or absolute (False)."""
    explicit = _EXPLICIT_GAUGE.match(unit)
    if explicit:
        marker = (explicit.group("paren") or explicit.group("word")).lower()
        candidates = [(explicit.group("unit"), marker in ("g", "gauge"))]
    else:
        # 'Pa' ends in 'a' and must not become 'P' (poise): try the text as written first.
        candidates = [(unit, False)]
        if unit[-1:] in "gaGA" and len(unit) > 1:
            candidates.append((unit[:-1], unit[-1] in "gG"))
    failure: InputError | None = None
    for text, gauge in candidates:
        try:
            parsed = _parse_unit(_PRESSURE_ALIASES.get(text, text), "pressure", shown)
        except InputError as exc:
            failure = failure or exc
            continue
        if _dimension_name(parsed) == "pressure":
            return parsed, gauge
        failure = failure or _wrong_dimension("pressure", shown, parsed)
    assert failure is not None
    raise failure


def to_pascal(
    value: float | str | pint.Quantity, default_unit: str = "Pa", *, atmosphere: float = STANDARD_ATMOSPHERE
) -> float:
    """An absolute pressure in pascal.

    Parameters
    ----------
    value : float, str or pint.Quantity
        ``"30 bar(g)"``, ``"30 barg"``, ``"30 bar g"``, ``"31 bara"``,
        ``"1.2 MPa"``, ``"14.7 psia"``, ``"200 psig"``, ``"5 kg/cm2g"``, or a
        number in ``default_unit``.
    default_unit : str
        Unit of a bare number, [Pa] unless stated; may itself be gauge.
    atmosphere : float
        Atmospheric pressure added to gauge pressures, [Pa]; a standard
        atmosphere (101325 Pa) unless the local barometric pressure is given.

    Returns
    -------
    float
        Absolute pressure, [Pa]

    Raises
    ------
    InputError
        Unknown unit, a unit that is not a pressure, a gauge pressure below
        vacuum, or an absolute pressure that is not positive.

    Examples
    --------
    >>> to_pascal("30 bar(g)")
    3101325.0
    """
    magnitude, unit, shown = _split(value, default_unit, "pressure")
    parsed, gauge = _pressure_unit(unit, shown)
    pascal = float(_quantity(magnitude, parsed).to("pascal").magnitude)
    if gauge:
        if pascal < -atmosphere:
            raise InputError(
                f"gauge pressure {shown!r} is below vacuum ({pascal:.6g} Pa gauge against an atmosphere of "
                f"{atmosphere:.6g} Pa); check the sign, or write an absolute pressure such as '0.5 bara'"
            )
        pascal += atmosphere
    if pascal <= 0.0:
        raise InputError(
            f"absolute pressure {shown!r} is {pascal:.6g} Pa; it must be positive "
            f"(for a gauge pressure write e.g. 'bar(g)' or 'psig')"
        )
    return pascal


def from_pascal(P: float, unit: str, *, atmosphere: float = STANDARD_ATMOSPHERE) -> float:
    """An absolute pressure [Pa] in ``unit``; gauge units (``"bar(g)"``, ``"psig"``) subtract ``atmosphere`` [Pa]."""
    parsed, gauge = _pressure_unit(unit, unit)
    return float(_quantity(P - atmosphere if gauge else P, "pascal").to(parsed).magnitude)


def parse_pressure(value: str | pint.Quantity | float, *, atmosphere: float = STANDARD_ATMOSPHERE) -> float:
    """An absolute pressure an engineer typed (case file, command line), [Pa]: the unit is required.

    Read as :func:`to_pascal` reads it; a bare number (``30`` or ``"30"``) is
    refused with the fix (gauge or absolute, bar or MPa?).

    Examples
    --------
    >>> parse_pressure("30 bar(g)")
    3101325.0
    """
    _unit_required(value, "pressure", "write it with one, e.g. '{0} bar(g)' (gauge) or '{0} bar' (absolute)")
    return to_pascal(value, atmosphere=atmosphere)


# --- flows --------------------------------------------------------------------------------------


def _normal_scale(unit: pint.Unit, normal: ReferenceConditions) -> float:
    """Factor from the registry's DIN 1343 normal cubic metre to the normal conditions asked for."""
    if not isinstance(normal, ReferenceConditions):
        raise InputError(f"normal must be a ReferenceConditions (e.g. units.NORMAL_DIN_1343), not {normal!r}")
    exponent = dict(_quantity(1.0, unit).unit_items()).get(_NORMAL_UNIT, 0)
    ratio = (normal.P / normal.T) / (NORMAL_DIN_1343.P / NORMAL_DIN_1343.T)
    return ratio**exponent


def _check_molar_mass(molar_mass: float | None, shown: str) -> float:
    if molar_mass is None:
        raise InputError(
            f"{shown!r} is a mass flow; converting it to moles needs the molar mass [g/mol] "
            f"(a Stream supplies it per species), or give a molar unit such as kmol/h"
        )
    if not (isinstance(molar_mass, numbers.Real) and math.isfinite(molar_mass) and molar_mass > 0):
        raise InputError(f"molar mass must be a positive number in g/mol, got {molar_mass!r}")
    return float(molar_mass)




def _not_a_flow(shown: str, unit: pint.Unit) -> InputError:
    found = _dimension_name(unit)
    if "actual" in found:
        hint = (
            "an actual volume flow depends on T, P and compressibility; give Nm3/h, Sm3/h or MMSCFD "
            "(ideal-gas normal or standard volume), or a molar or mass flow"
        )
    elif found in ("amount of substance", "mass"):
        hint = "a flow needs a time unit, e.g. kmol/h or kg/h"
    else:
        hint = _EXAMPLES["molar flow"]
    return InputError(f"{shown!r} is {_with_article(found)}, but a molar flow is needed here; {hint}")


def to_mol_s(
    value: float | str | pint.Quantity,
    unit: str | None = None,
    *,
    molar_mass: float | None = None,
    normal: ReferenceConditions = NORMAL_DIN_1343,
) -> float:
    """A molar flow in mol/s.

    Parameters
    ----------
    value : float, str or pint.Quantity
        ``"1000 kmol/h"``, ``"25000 Nm3/h"``, ``"3 MMSCFD"``, ``"50 t/d"``,
        ``"1200 kg/h"``, ``"2.5 mol/s"``, ``"80 lbmol/h"``, or a number in ``unit``.
    unit : str, optional
        Unit of a bare number; required when ``value`` is a number.
    molar_mass : float, optional
        Molar mass for mass flows, [g/mol] (= kg/kmol).
    normal : ReferenceConditions
        Conditions that define Nm3; DIN 1343 (0 degC, 101.325 kPa) by default.

    Returns
    -------
    float
        Molar flow, [mol/s]

    Raises
    ------
    InputError
        Unknown unit, a unit that is not a flow (an actual m3/h, an amount
        without time), a mass flow without a molar mass, a negative flow.

    Examples
    --------
    >>> round(to_mol_s("25000 Nm3/h") * 3.6, 3)   # kmol/h
    1115.376
    """
    magnitude, unit_text, shown = _split(value, unit, "molar flow")
    parsed = _parse_unit(unit_text, "molar flow", shown)
    if parsed.dimensionality == _dimensionality("mol/s"):
        mol_s = float(_quantity(magnitude, parsed).to("mol/s").magnitude) * _normal_scale(parsed, normal)
    elif parsed.dimensionality == _dimensionality("g/s"):
        mol_s = float(_quantity(magnitude, parsed).to("g/s").magnitude) / _check_molar_mass(molar_mass, shown)
    else:
        raise _not_a_flow(shown, parsed)
    if mol_s < 0.0:
        raise InputError(f"molar flow {shown!r} is negative; flows must be zero or positive")
    return mol_s


def from_mol_s(
    flow: float, unit: str, *, molar_mass: float | None = None, normal: ReferenceConditions = NORMAL_DIN_1343
) -> float:
    """A molar flow [mol/s] in ``unit``: molar, normal or standard volume, or mass (with ``molar_mass`` [g/mol])."""
    parsed = _parse_unit(unit, "molar flow", unit)
    if parsed.dimensionality == _dimensionality("mol/s"):
        return float(_quantity(flow / _normal_scale(parsed, normal), "mol/s").to(parsed).magnitude)
    if parsed.dimensionality == _dimensionality("g/s"):
        return float(_quantity(flow * _check_molar_mass(molar_mass, unit), "g/s").to(parsed).magnitude)
    raise _not_a_flow(unit, parsed)


# --- composition ----------------------------------------------------------------------------------


def _parts_per_whole(unit: str, shown: str) -> float:
    key = unit.strip()
    if key in _FRACTION_UNITS:
        return _FRACTION_UNITS[key]
    if key.lower() in _AMBIGUOUS_FRACTION_UNITS:
        raise InputError(
            f"{shown!r}: '{key}' is ambiguous (by volume or by mass); write '{key}v' for a gas analysis by "
            f"volume (= by mole); mass-based analyses need mass flows instead"
        )
    if key.lower() in _MASS_FRACTION_UNITS:
        raise InputError(
            f"{shown!r} is a mass-based composition; give the species as mass flows "
            f"(Stream.from_flows with kg/h) or convert to mol% first"
        )
    known = ", ".join(_FRACTION_UNITS)
    raise InputError(f"cannot read fraction {shown!r}: unknown composition unit {key!r}; use one of {known}")


def to_fraction(value: float | str, default_unit: str = "fraction") -> float:
    """A mole fraction from ``"12.5 mol%"``, ``"50 ppmv"``, ``"0.125"`` or a number in ``default_unit``.

    Returns
    -------
    float
        Mole fraction, [-], between 0 and 1.
    """
    if _is_quantity(value):
        raise InputError(f"give a composition as text ('12.5 mol%') or a number, not the quantity {value!r}")
    magnitude, unit, shown = _split(value, default_unit, "fraction")
    fraction = magnitude / _parts_per_whole(unit, shown)
    if not 0.0 <= fraction <= 1.0:
        raise InputError(f"mole fraction {shown!r} is {fraction:.6g}; it must lie between 0 and 1 (0 and 100 mol%)")
    return fraction


def from_fraction(fraction: float, unit: str) -> float:
    """A mole fraction [-] expressed in ``unit`` (``"mol%"``, ``"ppmv"``, ``"fraction"`` ...)."""
    return fraction * _parts_per_whole(unit, unit)
