"""The carbon limit in temperature: where, for a feed as it is, graphite starts or stops being stable.

ln a_C of the gas-only equilibrium is scanned on a temperature grid and
every change of sign is refined as a root.  A reformer feed typically has
one boundary (carbon above it, by methane cracking); a gas rich in CO can
have another at lower temperature (Boudouard), so all are returned, with the
ranges in which graphite is stable.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import numpy as np
import scipy.optimize

from ..errors import InputError
from ..fixed_step import check_feed, check_method
from ..streams import Stream
from ..thermo.database import SpeciesDatabase
from ..thermo.datasets import default_database
from ..units import to_kelvin, to_pascal
from .scan import GasOnlyEquilibria


@dataclass(frozen=True)
class CarbonTemperatureLimits:
    """Where graphite is stable at equilibrium over a temperature range, for one feed at one pressure.

    Attributes
    ----------
    P : float
        Pressure, [Pa].
    T_range : (float, float)
        The range searched, [K].
    boundaries : tuple of float
        Temperatures at which the equilibrium gas is just saturated with graphite, [K], rising.
    carbon_ranges : tuple of (float, float)
        The parts of the range in which graphite is stable, [K].
    evaluations : int
        Equilibria computed.
    """

    P: float
    T_range: tuple[float, float]
    boundaries: tuple[float, ...]
    carbon_ranges: tuple[tuple[float, float], ...]
    evaluations: int

    def describe(self) -> str:
        """The result in words, in degC."""
        low, high = (t - 273.15 for t in self.T_range)
        if not self.carbon_ranges:
            return f"no carbon from {low:.1f} to {high:.1f} degC at {self.P / 1e5:.4g} bar"
        parts = [f"{a - 273.15:.2f} to {b - 273.15:.2f} degC" for a, b in self.carbon_ranges]
        return f"graphite stable from {' and from '.join(parts)} at {self.P / 1e5:.4g} bar"


def carbon_limit_temperatures(
    feed: Mapping[str, float] | Stream,
    P: float | str,
    *,
    T_range: tuple[float | str, float | str] = ("400 degC", "1000 degC"),
    points: int = 61,
    species: Sequence[str] | None = None,
    exclude: Sequence[str] = (),
    xtol: float = 1e-6,
    method: str = "auto",
    gas: str = "ideal",
    kij: str | Mapping[tuple[str, str], float] | None = "shipped",
    db: SpeciesDatabase | None = None,
) -> CarbonTemperatureLimits:
    """The temperatures at which graphite starts or stops being stable at equilibrium, for a feed as it is.

    Parameters
    ----------
    feed : mapping or Stream
        The feed with its steam (species to amount in any proportion).
    P : float or str
        Pressure, [Pa] (or text such as ``"30 bar(g)"``).
    T_range : (float or str, float or str)
        Lowest and highest temperature searched, [K] or texts.
    points : int
        Grid points of the scan; boundaries closer together than one grid
        step can be missed.
    species, exclude, method, gas, kij
        As for :func:`gibbsmin.equilibrate` (graphite must stay in).
    xtol : float
        Absolute tolerance of each boundary, [K].

    Examples
    --------
    >>> limits = carbon_limit_temperatures({"CH4": 1.0, "H2O": 0.5}, "25 bar")
    >>> [round(T - 273.15) for T in limits.boundaries]
    [502]
    >>> limits.describe()
    'graphite stable from 501.58 to 1000.00 degC at 25 bar'
    """
    db = db or default_database()
    P = to_pascal(P)
    check_method(method)
    try:
        low, high = (to_kelvin(t) for t in T_range)
    except (TypeError, ValueError):
        raise InputError(f"T_range must be (lowest, highest) temperature, got {T_range!r}") from None
    if not low < high:
        raise InputError(f"T_range must be (lowest, highest) with lowest < highest, got {T_range!r}")
    if isinstance(points, bool) or not isinstance(points, int) or points < 3:
        raise InputError(f"points must be a whole number of at least 3, got {points!r}")
    amounts = check_feed(feed.feed_mol() if isinstance(feed, Stream) else feed, db)
    if not any("C" in db[s].elements for s, n in amounts.items() if n > 0):
        raise InputError("the feed holds no carbon, so graphite cannot form from it")
    equilibria = GasOnlyEquilibria(amounts, (low, high), P, species, exclude, method, db, gas=gas, kij=kij)
    grid = np.linspace(low, high, points)
    values = np.array([equilibria.ln_activity(float(T)) for T in grid])
    boundaries = []
    for a, b, fa, fb in zip(grid, grid[1:], values, values[1:]):
        if fa == 0.0:
            boundaries.append(float(a))
        elif fa * fb < 0.0:
            boundaries.append(float(scipy.optimize.brentq(equilibria.ln_activity, a, b, xtol=xtol)))
    edges = [low, *boundaries, high]
    ranges = []
    for a, b in zip(edges, edges[1:]):
        middle = 0.5 * (a + b)
        if b > a and equilibria.ln_activity(middle) > 0.0:
            ranges.append((a, b))
    return CarbonTemperatureLimits(P, (low, high), tuple(boundaries), tuple(ranges), equilibria.evaluations)
