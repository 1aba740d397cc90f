"""How numbers are written in reports: readable for engineers, exact enough for trace species."""

from __future__ import annotations

import math


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
    if style in ("fixed2", "fixed1"):
        decimals = 2 if style == "fixed2" else 1
        return f"{round(x, decimals) + 0.0:.{decimals}f}"  # + 0.0: a rounded -0.001 reads 0.00, not -0.00
    if style == "exp":
        return f"{x:.3e}"
    if style == "figure":
        # A checked figure: four significant digits, and rounding noise shown as the zero it is.
        return "0" if abs(x) < 5e-5 else f"{x:.4g}"
    return f"{x:.6g}"


def _fixed_or_exp(x: float, decimals: int, smallest_fixed: float) -> str:
    """Fixed decimals where they carry digits, three significant digits in e-notation below."""
    if x == 0.0 or abs(x) >= smallest_fixed:
        return f"{x:.{decimals}f}"
    return f"{x:.3g}"
