"""Sweeps of a flowsheet over its inputs: every point a converged flowsheet, or marked as not converged.

An axis is a unit's or feed's setting, written as a design specification's ``vary`` ("purge split.fraction",
"bed 1.P", "makeup.flow"), or "pressure": the loop pressure, every pressure of the flowsheet (feeds and units)
scaled together so that the highest feed pressure takes the value.  Points run row by row over the grid (the
last axis fastest), each started from its neighbour's converged tear streams; rows may run in worker processes.
"""

from __future__ import annotations

import dataclasses
import itertools
from collections.abc import Mapping, Sequence
from concurrent.futures import ProcessPoolExecutor
from dataclasses import dataclass

from ..errors import ConvergenceError, GibbsminError, InputError
from .converge import FlowsheetResult, settle_flowsheet
from .material import Material
from .model import Flowsheet
from .units import Context, Reactor

#: The axis that scales every pressure of the flowsheet together.
LOOP_PRESSURE = "pressure"


@dataclass(frozen=True)
class SweepPoint:
    """One point: the axes' values, the converged result (None where it failed) and why it failed."""

    values: Mapping[str, float]
    result: FlowsheetResult | None
    failure: str | None = None

    @property
    def converged(self) -> bool:
        return self.result is not None


def with_value(sheet: Flowsheet, axis: str, value: float) -> Flowsheet:
    """The flowsheet with one axis set."""
    if axis == LOOP_PRESSURE:
        return _pressures_scaled(sheet, value / max(m.P for m in sheet.feeds.values()))
    owner, _, setting = axis.rpartition(".")
    if owner in sheet.feeds:
        m = sheet.feeds[owner]
        if setting == "flow":
            m = Material(m.T, m.P, {s: n * value / m.total for s, n in m.flows.items()})
        elif setting in ("T", "P"):
            m = dataclasses.replace(m, **{setting: float(value)})
        else:
            raise InputError(f"a feed's sweep axis is its flow, T or P, not {setting!r} ({axis!r})")
        return dataclasses.replace(sheet, feeds={**sheet.feeds, owner: m})
    unit = sheet.unit(owner)
    return dataclasses.replace(sheet, units=tuple(unit.with_value(setting, value) if u is unit else u
                                                  for u in sheet.units))


def _pressures_scaled(sheet: Flowsheet, factor: float) -> Flowsheet:
    feeds = {name: dataclasses.replace(m, P=m.P * factor) for name, m in sheet.feeds.items()}
    units = []
    for unit in sheet.units:
        if isinstance(unit, Reactor) and unit.stage.P is not None:
            unit = dataclasses.replace(unit, stage=dataclasses.replace(unit.stage, P=unit.stage.P * factor))
        elif getattr(unit, "P", None) is not None and "P" in unit.variables:
            unit = unit.with_value("P", unit.P * factor)
        units.append(unit)
    return dataclasses.replace(sheet, feeds=feeds, units=tuple(units))


def sweep_flowsheet(sheet: Flowsheet, axes: Mapping[str, Sequence[float]], context: Context | None = None, *,
                    processes: int = 1) -> list[SweepPoint]:
    """Every point of the grid of ``axes`` (axis to values), in grid order (the last axis fastest)."""
    names = list(axes)
    if not names:
        raise GibbsminError("a sweep needs at least one axis, e.g. {'purge split.fraction': [0.01, 0.02]}")
    for name in names:  # refuse a wrong axis before anything runs
        with_value(sheet, name, float(axes[name][0]))
        held = [spec.name for spec in sheet.specifications if f"{spec.vary}.{spec.setting}" == name]
        if held:
            raise InputError(f"axis {name!r} is the setting specification {held[0]!r} varies to meet its target; "
                             "sweep the specification's target instead, or another setting")
    rows = [[dict(zip(names, values)) for values in itertools.product(*(axes[n] for n in names))]]
    if len(names) > 1:
        inner = len(axes[names[-1]])
        flat = rows[0]
        rows = [flat[k:k + inner] for k in range(0, len(flat), inner)]
    if processes <= 1:
        return [point for row in rows for point in _row(sheet, context, row)]
    with ProcessPoolExecutor(processes) as pool:
        return [point for done in pool.map(_row, itertools.repeat(sheet), itertools.repeat(context), rows)
                for point in done]


def _row(sheet: Flowsheet, context: Context | None, row: list[dict[str, float]]) -> list[SweepPoint]:
    points, neighbour = [], None
    for values in row:
        point_sheet = sheet
        for axis, value in values.items():
            point_sheet = with_value(point_sheet, axis, float(value))
        try:
            result = settle_flowsheet(point_sheet, context, start=neighbour)
        except (ConvergenceError, GibbsminError, ValueError) as exc:
            points.append(SweepPoint(values, None, " ".join(str(exc).split())))
            continue
        neighbour = result
        points.append(SweepPoint(values, result))
    return points
