"""The converter beds of a converged flowsheet on their equilibrium curve: the product's mol% against T.

The curve is the equilibrium of the first bed's inlet at the first bed's pressure, over the beds' temperatures
with a margin, under the first bed's chemistry (its service's or listed reactions; at equilibrium, without its
approach, which is what the lines are measured against).  Equilibrium at T and P depends only on the element
totals, which an intercooled train of beds shares, so one curve serves every bed; a quench that adds gas between
beds moves the next bed off it, as in the plant.  Each bed is a line from its inlet to its outlet.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass

import numpy as np

from ..errors import GibbsminError
from .converge import FlowsheetResult
from .units import Reactor

#: Points of the equilibrium curve, and its margin beyond the beds' temperatures [K].
_POINTS, _MARGIN = 41, 60.0


@dataclass(frozen=True)
class BedLines:
    """The curve (T [K], mole fraction [-]) and each bed's (name, (T_in, T_out), (y_in, y_out))."""

    species: str
    P: float
    T: tuple[float, ...]
    fraction: tuple[float, ...]
    beds: tuple[tuple[str, tuple[float, float], tuple[float, float]], ...]


def bed_lines(result: FlowsheetResult, species: str) -> BedLines | None:
    """The beds (reactors in run order) on the equilibrium curve of ``species``; None with no reactor."""
    units = result.units
    reactors = [units[k] for k in result.structure.order if isinstance(units[k], Reactor)]
    if not reactors:
        return None
    beds = []
    for r in reactors:
        inlet = [result.streams[name] for name in r.inlets]
        outlet = result.streams[r.outlets[0]]
        total_in = sum(m.total for m in inlet)
        y_in = sum(m.flows.get(species, 0.0) for m in inlet) / total_in
        T_in = sum(m.T * m.total for m in inlet) / total_in  # one inlet in a train; flow-weighted otherwise
        beds.append((r.name, (T_in, outlet.T), (y_in, outlet.fraction(species))))
    first = reactors[0]
    temperatures = [T for _, ends, _ in beds for T in ends]
    grid = np.linspace(min(temperatures) - _MARGIN, max(temperatures) + _MARGIN, _POINTS)
    inlet_streams = tuple(result.streams[name] for name in first.inlets)
    P = result.streams[first.outlets[0]].P
    stage = dataclasses.replace(first.stage, adiabatic=False, heat_input=0.0, approach={}, P=P)
    values = []
    for T in grid:
        at_T = dataclasses.replace(first, stage=dataclasses.replace(stage, T=float(T)))
        try:
            values.append(at_T.run(inlet_streams, result.context).outlets[0].fraction(species))
        except (GibbsminError, ValueError):  # outside the data's range: a gap in the curve
            values.append(float("nan"))
    return BedLines(species, P, tuple(map(float, grid)), tuple(values), tuple(beds))
