"""Plots as inline SVG text: line charts and bar charts, with every label escaped.

Hand-written rather than drawn by matplotlib so that an HTML report is one
small self-contained file, renders the same everywhere, and carries no text
that did not pass through :func:`html.escape`.
"""

from __future__ import annotations

import math
from html import escape

from .document import Plot

_WIDTH, _HEIGHT = 720, 420
_MARGIN = {"left": 78, "right": 200, "top": 40, "bottom": 56}
_COLOURS = ("#1f4e79", "#c0392b", "#2e8b57", "#8e44ad", "#d35400", "#16a085", "#7f8c8d", "#b7950b")
_VERDICT_COLOURS = {"pass": "#2e8b57", "warn": "#d4a017", "fail": "#c0392b"}


def nice_ticks(low: float, high: float, count: int = 6) -> list[float]:
    """Round tick values covering [low, high] (1, 2 or 5 times a power of ten apart)."""
    if not (math.isfinite(low) and math.isfinite(high)):
        return [0.0, 1.0]
    if high <= low:
        high, low = low + 1.0, low - 1.0 if high == low else high
    raw = (high - low) / max(count - 1, 1)
    power = 10 ** math.floor(math.log10(raw))
    step = next(m * power for m in (1, 2, 5, 10) if m * power >= raw)
    first = math.floor(low / step) * step
    ticks = []
    value = first
    while value <= high + step * 1e-9:
        ticks.append(round(value, 12))
        value += step
    if ticks[-1] < high:
        ticks.append(round(value, 12))
    return ticks


def _short(text: str, length: int) -> str:
    return text if len(text) <= length else text[: length - 1] + "…"


def _tick_text(value: float) -> str:
    return f"{value + 0.0:.6g}" if value != 0 else "0"


def _frame(title: str, x_label: str, y_label: str) -> list[str]:
    return [
        f'<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 {_WIDTH} {_HEIGHT}" width="{_WIDTH}" '
        f'height="{_HEIGHT}" role="img" aria-label="{escape(title)}" font-family="sans-serif" font-size="12">',
        f"<title>{escape(title)}</title>",
        f'<text x="{_WIDTH / 2}" y="22" text-anchor="middle" font-size="13" font-weight="bold">'
        f'{escape(_short(title, 90))}</text>',
        f'<text x="{_MARGIN["left"] + (_WIDTH - _MARGIN["left"] - _MARGIN["right"]) / 2}" y="{_HEIGHT - 14}" '
        f'text-anchor="middle">{escape(x_label)}</text>',
        f'<text transform="translate(18 {_HEIGHT / 2}) rotate(-90)" text-anchor="middle">{escape(y_label)}</text>',
    ]


def line_chart(plot: Plot) -> str:
    """A line chart of the plot's series, with axes, ticks and a legend."""
    xs = [x for s in plot.series for x in s.x if math.isfinite(x)]
    ys = [y for s in plot.series for y in s.y if math.isfinite(y)]
    parts = _frame(plot.title, plot.x_label, plot.y_label)
    if not xs or not ys:
        parts.append(f'<text x="{_WIDTH / 2}" y="{_HEIGHT / 2}" text-anchor="middle">no data</text></svg>')
        return "\n".join(parts)
    x_ticks, y_ticks = nice_ticks(min(xs), max(xs)), nice_ticks(min(ys), max(ys))
    left, right = _MARGIN["left"], _WIDTH - _MARGIN["right"]
    top, bottom = _MARGIN["top"], _HEIGHT - _MARGIN["bottom"]

    def sx(x: float) -> float:
        return left + (x - x_ticks[0]) / (x_ticks[-1] - x_ticks[0]) * (right - left)

    def sy(y: float) -> float:
        return bottom - (y - y_ticks[0]) / (y_ticks[-1] - y_ticks[0]) * (bottom - top)

    parts.append(f'<rect x="{left}" y="{top}" width="{right - left}" height="{bottom - top}" fill="none" stroke="#444"/>')
    for x in x_ticks:
        parts.append(f'<line x1="{sx(x):.1f}" y1="{top}" x2="{sx(x):.1f}" y2="{bottom}" stroke="#ddd"/>')
        parts.append(f'<text x="{sx(x):.1f}" y="{bottom + 16}" text-anchor="middle">{_tick_text(x)}</text>')
    for y in y_ticks:
        parts.append(f'<line x1="{left}" y1="{sy(y):.1f}" x2="{right}" y2="{sy(y):.1f}" stroke="#ddd"/>')
        parts.append(f'<text x="{left - 6}" y="{sy(y) + 4:.1f}" text-anchor="end">{_tick_text(y)}</text>')
    for i, series in enumerate(plot.series):
        colour = _COLOURS[i % len(_COLOURS)]
        points = [(sx(x), sy(y)) for x, y in zip(series.x, series.y) if math.isfinite(x) and math.isfinite(y)]
        path = " ".join(f"{x:.1f},{y:.1f}" for x, y in points)
        if "line" in series.style or series.style == "dashed":
            dash = ' stroke-dasharray="5 4"' if series.style == "dashed" else ""
            parts.append(f'<polyline points="{path}" fill="none" stroke="{colour}" stroke-width="2"{dash}/>')
        if "points" in series.style:
            parts += [f'<circle cx="{x:.1f}" cy="{y:.1f}" r="3" fill="{colour}"/>' for x, y in points]
        legend_y = top + 14 + 18 * i
        dash = ' stroke-dasharray="5 4"' if series.style == "dashed" else ""
        parts.append(f'<line x1="{right + 12}" y1="{legend_y - 4}" x2="{right + 32}" y2="{legend_y - 4}" '
                     f'stroke="{colour}" stroke-width="3"{dash}/>')
        parts.append(f'<text x="{right + 38}" y="{legend_y}" font-size="11">{escape(_short(series.label, 26))}</text>')
    parts.append("</svg>")
    return "\n".join(parts)


def bar_chart(plot: Plot) -> str:
    """Horizontal bars, one per category, coloured by verdict when given, with reference lines at the limits."""
    parts = _frame(plot.title, plot.y_label, "")
    values = [v if math.isfinite(v) else 0.0 for v in plot.values]
    if not values:
        parts.append(f'<text x="{_WIDTH / 2}" y="{_HEIGHT / 2}" text-anchor="middle">no data</text></svg>')
        return "\n".join(parts)
    limits = [value for _, value in plot.limits]
    ticks = nice_ticks(min(0.0, *values, *limits), max(0.0, *values, *limits))
    left, right = 170, _WIDTH - 60
    top, bottom = _MARGIN["top"], _HEIGHT - _MARGIN["bottom"]
    band = (bottom - top) / len(values)

    def sx(x: float) -> float:
        return left + (x - ticks[0]) / (ticks[-1] - ticks[0]) * (right - left)

    for x in ticks:
        parts.append(f'<line x1="{sx(x):.1f}" y1="{top}" x2="{sx(x):.1f}" y2="{bottom}" stroke="#ddd"/>')
        parts.append(f'<text x="{sx(x):.1f}" y="{bottom + 16}" text-anchor="middle">{_tick_text(x)}</text>')
    for i, (category, value) in enumerate(zip(plot.categories, values)):
        verdict = plot.verdicts[i] if i < len(plot.verdicts) else ""
        colour = _VERDICT_COLOURS.get(verdict, _COLOURS[0])
        y = top + i * band + band * 0.15
        x0, x1 = sorted((sx(0.0), sx(value)))
        parts.append(f'<rect x="{x0:.1f}" y="{y:.1f}" width="{max(x1 - x0, 0.5):.1f}" height="{band * 0.7:.1f}" '
                     f'fill="{colour}"><title>{escape(category)}: {_tick_text(value)}</title></rect>')
        parts.append(f'<text x="{left - 6}" y="{y + band * 0.35 + 4:.1f}" text-anchor="end">{escape(_short(category, 26))}</text>')
        parts.append(f'<text x="{x1 + 4:.1f}" y="{y + band * 0.35 + 4:.1f}" font-size="11">{_tick_text(float(f"{value:.4g}"))}</text>')
    parts.append(f'<line x1="{sx(0.0):.1f}" y1="{top}" x2="{sx(0.0):.1f}" y2="{bottom}" stroke="#444"/>')
    for label, value in plot.limits:
        parts.append(f'<line x1="{sx(value):.1f}" y1="{top}" x2="{sx(value):.1f}" y2="{bottom}" stroke="#c0392b" '
                     f'stroke-dasharray="4 3"/>')
        parts.append(f'<text x="{sx(value):.1f}" y="{top - 4}" text-anchor="middle" fill="#c0392b">{escape(label)}</text>')
    parts.append("</svg>")
    return "\n".join(parts)


def render_svg(plot: Plot) -> str:
    if plot.kind == "bar":
        return bar_chart(plot)
    if plot.kind == "line":
        return line_chart(plot)
    raise ValueError(f"unknown plot kind {plot.kind!r}; use 'line' or 'bar'")
