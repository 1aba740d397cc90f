"""Readers of case-file values: each turns a TOML value into K, Pa, W, a fraction or a name, or raises InputError."""

from __future__ import annotations

import difflib
import math
import numbers
from collections.abc import Callable
from typing import TYPE_CHECKING

from .. import units
from ..errors import InputError
from ..units import (
    NORMAL_DIN_1343,
    STANDARD_ISO_13443,
    STANDARD_US_GAS,
    ReferenceConditions,
    from_mol_s,
    parse_pressure,
    parse_temperature,
    to_fraction,
)
from .toml import kind

if TYPE_CHECKING:
    import pint


def read_text(value: object) -> str:
    if not isinstance(value, str):
        raise InputError(f"must be a text in quotes, not {kind(value)} ({value!r})")
    return value


def read_bool(value: object) -> bool:
    if not isinstance(value, bool):
        raise InputError(f"must be true or false (without quotes), not {value!r}")
    return value


def read_names(value: object) -> tuple[str, ...]:
    if isinstance(value, str):
        raise InputError(f"must be a list of names in brackets, e.g. [{value!r}]")
    if not isinstance(value, list) or not all(isinstance(v, str) for v in value):
        raise InputError(f"must be a list of names in quotes, e.g. [\"C(s)\", \"H2O(l)\"], not {value!r}")
    return tuple(value)


def read_positive_number(value: object) -> float:
    if isinstance(value, bool) or not isinstance(value, numbers.Real) or not math.isfinite(value) or value <= 0:
        raise InputError(f"must be a positive number, not {value!r}")
    return float(value)


def read_positive_int(value: object) -> int:
    if isinstance(value, bool) or not isinstance(value, int) or value <= 0:
        raise InputError(f"must be a positive whole number, not {value!r}")
    return value


def choice(*options: str) -> Callable[[object], str]:
    def read(value: object) -> str:
        text = read_text(value)
        if text not in options:
            close = difflib.get_close_matches(text, options, n=1)
            hint = f"did you mean {close[0]!r}? " if close else ""
            raise InputError(f"{text!r} is not one of {', '.join(map(repr, options))}; {hint}".rstrip("; "))
        return text

    return read


def _quantity(value: object, what: str, example: str) -> pint.Quantity:
    import pint  # loaded with the unit registry (units._registry), not on import

    if isinstance(value, bool) or not isinstance(value, (str, numbers.Real)):
        raise InputError(f"must be {what} such as {example}, not {kind(value)}")
    if not isinstance(value, str):
        raise InputError(f"{value!r} has no unit; write {what} with one, e.g. {example}")
    try:
        quantity = units.Quantity(value.replace("°", "deg"))
    except (pint.PintError, ValueError, TypeError, AttributeError, SyntaxError):
        raise InputError(f"cannot read {what} {value!r}; write e.g. {example}") from None
    if not isinstance(quantity, pint.Quantity) or not math.isfinite(float(quantity.magnitude)):
        raise InputError(f"cannot read {what} {value!r}; write a number and a unit, e.g. {example}")
    return quantity


def read_temperature(value: object) -> float:
    """An absolute temperature, [K]: '850 degC', '1123.15 K'; bare numbers are refused (degC or K?)."""
    return parse_temperature(value)


def read_pressure(value: object) -> float:
    """An absolute pressure, [Pa]: '30 bar(g)', '31 bara', '3.1 MPa'; bare numbers are refused (bar or bar(g)?)."""
    return parse_pressure(value)


_DIFFERENCE_UNITS = {"K": "kelvin", "kelvin": "kelvin", "degC": "kelvin", "C": "kelvin", "°C": "kelvin",
                     "delta_degC": "kelvin", "degF": "delta_degF", "F": "delta_degF", "°F": "delta_degF",
                     "delta_degF": "delta_degF", "R": "delta_degF", "degR": "delta_degF"}


def read_temperature_difference(value: object) -> float:
    """A temperature difference, [K]: '10 K', '10 degC' (a difference, so the same as 10 K), '18 degF', or K."""
    if isinstance(value, bool) or not isinstance(value, (str, numbers.Real)):
        raise InputError(f"must be a temperature difference such as '10 K', not {kind(value)}")
    if isinstance(value, numbers.Real):
        magnitude, unit = float(value), "K"
    else:
        number, _, unit = value.strip().partition(" ")
        try:
            magnitude = float(number)
        except ValueError:
            raise InputError(f"cannot read the temperature difference {value!r}; write e.g. '10 K' or '-5 K'") from None
        unit = unit.strip() or "K"
    if unit not in _DIFFERENCE_UNITS or not math.isfinite(magnitude):
        raise InputError(f"cannot read the temperature difference {value!r}; write e.g. '10 K', '10 degC' or '18 degF'")
    return float(units.Quantity(magnitude, _DIFFERENCE_UNITS[unit]).to("kelvin").magnitude)


def read_power(value: object) -> float:
    """A heat flow, [W]: '85 MW', '1500 kW', '73 Gcal/h', '290 MMBtu/h'.

    Gcal and MMBtu are the trade's units of the international table: 1 cal = 4.1868 J, 1 Btu =
    1055.05585262 J (NIST SP 811, 2008, B.8); they are spelled out here because pint's Btu is a
    rounded ISO value.
    """
    if isinstance(value, str):
        value = (value.replace("MMBtu", "(1055.05585262e6 * J)").replace("Gcal", "(4.1868e9 * J)"))
    quantity = _quantity(value, "a heat flow", "'85 MW', '1500 kW' or '290 MMBtu/h'")
    import pint  # already loaded by _quantity

    try:
        return float(quantity.to("W").magnitude)
    except pint.DimensionalityError:
        raise InputError(f"{value!r} is not a heat flow (power); write e.g. '85 MW' or '290 MMBtu/h'") from None


def read_fraction(value: object) -> float:
    """A mole fraction, [-]: '1 ppmv', '0.5 mol%', or a plain fraction."""
    return to_fraction(value)


_NORMAL_CONDITIONS = {
    "DIN 1343": NORMAL_DIN_1343,
    "ISO 13443": STANDARD_ISO_13443,
    "US gas": STANDARD_US_GAS,
}


def read_normal_conditions(value: object) -> ReferenceConditions:
    text = read_text(value)
    if text not in _NORMAL_CONDITIONS:
        raise InputError(f"{text!r} is not one of {', '.join(map(repr, _NORMAL_CONDITIONS))}")
    return _NORMAL_CONDITIONS[text]


def flow_unit(value: object) -> str:
    text = read_text(value)
    from_mol_s(1.0, text, molar_mass=1.0)  # refuses what is not a molar, normal-volume or mass flow
    return text
