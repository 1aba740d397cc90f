"""How numbers are written in reports: readable for engineers, exact enough for trace species."""

from __future__ import annotations

import math

from ..units import from_fraction

#: Decimals of the fixed-point styles.
_FIXED = {"fixed1": 1, "fixed2": 2, "fixed3": 3}


def format_cell(value: object, style: str) -> str:
    """The text of one table cell in a column of ``style`` (see :class:`~gibbsmin.report.document.Column`)."""
    if value is None:
        return ""
    if isinstance(value, str) or style in ("text", "verdict"):
        return str(value)
    if isinstance(value, bool):
        return "yes" if value else "no"
    x = float(value)
    if not math.isfinite(x):
        return "-" if math.isnan(x) else ("inf" if x > 0 else "-inf")
    if style == "percent":
        return _fixed_or_exp(x, 4, 1e-3)
    if style == "flow":
        return _fixed_or_exp(x, 2, 1e-2) if abs(x) < 1e7 else f"{x:.6g}"
    if style in _FIXED:
        decimals = _FIXED[style]
        return f"{round(x, decimals) + 0.0:.{decimals}f}"  # + 0.0: a rounded -0.001 reads 0.00, not -0.00
    if style == "uncertainty":
        # A standard uncertainty: two significant digits say all it knows.
        return _unsigned_zero(f"{x:.2g}")
    if style == "exp":
        return _unsigned_zero(f"{x:.3e}")
    if style == "figure":
        # A checked figure: four significant digits, and rounding noise shown as the zero it is.
        return "0" if abs(x) < 5e-5 else f"{x:.4g}"
    return _unsigned_zero(f"{x:.6g}")


def _unsigned_zero(text: str) -> str:
    """'-0' and '-0.00' read as the zero they are."""
    return text[1:] if text.startswith("-") and float(text) == 0.0 else text


def clean_number(x: float) -> float:
    """A float for a file: rounded to 12 significant digits, so that 865.0000000000001 (a sum's last bit) is
    written 865.0 and -0.0 as 0.0, while a trace amount of 1.2345e-20 keeps its digits."""
    if not math.isfinite(x) or x == 0.0:
        return 0.0 if x == 0.0 else x
    return float(f"{x:.12g}") + 0.0


def _fixed_or_exp(x: float, decimals: int, smallest_fixed: float) -> str:
    """Fixed decimals where they carry digits, three significant digits in e-notation below."""
    if x == 0.0 or abs(x) >= smallest_fixed:
        return _unsigned_zero(f"{x:.{decimals}f}")
    return f"{x:.3g}"


def cutoff_text(cutoff: float) -> str:
    """A mole-fraction cutoff in the unit that writes it shortest: mol%, ppmv or ppbv."""
    if cutoff >= 1e-4:
        return f"{from_fraction(cutoff, 'mol%'):g} mol%"
    if cutoff >= 1e-7:
        return f"{from_fraction(cutoff, 'ppmv'):g} ppmv"
    return f"{from_fraction(cutoff, 'ppbv'):g} ppbv"
