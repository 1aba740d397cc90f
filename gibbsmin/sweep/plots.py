"""Pictures of a sweep table: a map over two axes with the carbon boundary, lines over one axis,
and an equilibrium curve with an operating line drawn on it.

Each function takes the table a sweep returns and gives back a matplotlib
Figure; saving it is the caller's business (the report layer writes files).
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from collections.abc import Sequence

import numpy as np

if TYPE_CHECKING:
    import pandas as pd

from ..errors import InputError


def _pyplot():
    """matplotlib's pyplot on the file-only backend (no screen on the machines this runs on), loaded on first
    use: an optional heavy dependency the sweep command needs only for --map and --plot."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    return plt

CAUTION = "Thermodynamic limits, not designs: check against local codes and licensed engineering practice."


def _need(table: pd.DataFrame, *columns: str) -> None:
    missing = [c for c in columns if c not in table.columns]
    if missing:
        raise InputError(f"the sweep table has no column {', '.join(map(repr, missing))}; "
                         f"columns are: {', '.join(map(str, table.columns))}")


def carbon_map(table: pd.DataFrame, x: str, y: str, value: str, carbon: str = "n_C(s)", title: str = ""):
    """A filled map of ``value`` over axes ``x`` and ``y`` with the graphite boundary drawn on it."""
    _need(table, x, y, value)
    grid = table.pivot_table(index=y, columns=x, values=value, aggfunc="first").sort_index()
    xs, ys = grid.columns.to_numpy(float), grid.index.to_numpy(float)
    figure, axes = _pyplot().subplots(figsize=(7, 5))
    mesh = axes.pcolormesh(xs, ys, grid.to_numpy(float), shading="nearest", cmap="viridis")
    figure.colorbar(mesh, ax=axes, label=value)
    if carbon in table.columns:
        present = table.pivot_table(index=y, columns=x, values=carbon, aggfunc="first").sort_index()
        solid = (present.to_numpy(float) > 0).astype(float)
        if 0 < solid.mean() < 1:
            axes.contour(xs, ys, solid, levels=[0.5], colors="white", linewidths=2)
            axes.contourf(xs, ys, solid, levels=[0.5, 1.5], colors="none", hatches=["//"])
            axes.plot([], [], color="white", linewidth=2, label="graphite boundary (hatched: graphite present)")
            axes.legend(loc="upper right", framealpha=0.6)
    axes.set_xlabel(x)
    axes.set_ylabel(y)
    axes.set_title(title or f"{value} over {x} and {y}")
    figure.text(0.01, 0.01, CAUTION, fontsize=7, color="0.4")
    return figure


def lines(table: pd.DataFrame, x: str, columns: Sequence[str], by: str | None = None, title: str = ""):
    """Result columns against one axis, one line per value of ``by`` when given."""
    _need(table, x, *columns, *([by] if by else []))
    figure, axes = _pyplot().subplots(figsize=(7, 5))
    groups = table.groupby(by) if by else [(None, table)]
    for key, part in groups:
        part = part.sort_values(x)
        for column in columns:
            label = column if key is None else f"{column}, {by} = {key:g}"
            axes.plot(part[x], part[column], label=label)
    axes.set_xlabel(x)
    axes.legend(fontsize=8)
    axes.set_title(title)
    figure.text(0.01, 0.01, CAUTION, fontsize=7, color="0.4")
    return figure


def equilibrium_curve(table: pd.DataFrame, x: str, y: str, operating_line: pd.DataFrame | None = None,
                      title: str = "", scale: float = 100.0, y_label: str | None = None):
    """The equilibrium curve y(x) (e.g. NH3 mol% against T) with an operating line (e.g. an adiabatic bed).

    ``operating_line`` has the same two columns; ``scale`` multiplies y
    (100 turns mole fractions into mol%).
    """
    _need(table, x, y)
    part = table.sort_values(x)
    figure, axes = _pyplot().subplots(figsize=(7, 5))
    axes.plot(part[x], scale * part[y], color="black", label="equilibrium")
    if operating_line is not None:
        _need(operating_line, x, y)
        axes.plot(operating_line[x], scale * np.asarray(operating_line[y]), color="tab:red",
                  marker="o", markersize=3, label="operating line")
    axes.set_xlabel(x)
    axes.set_ylabel(y_label or (f"{y} x {scale:g}" if scale != 1 else y))
    axes.legend()
    axes.set_title(title)
    figure.text(0.01, 0.01, CAUTION, fontsize=7, color="0.4")
    return figure
