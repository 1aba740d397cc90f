"""Phase behaviour of a stream with the cubic, no chemistry: dew and bubble points, and the condensation curve.

The front doors for a stream that does not react: ``dew_point`` and
``bubble_point`` (temperature at a pressure, or pressure at a temperature;
``eos.dew_bubble``), and ``condensation_curve``, the flash of the stream at
each temperature of a list (every species held: the prepared pipeline with
liquid-solution phases), giving the liquid fraction and the liquid's
composition along the cooler.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import numpy as np

from .api import prepared_for
from .eos.dew_bubble import incipient_point
from .eos.phase import model_of_gas
from .equilibrium import Equilibrium
from .errors import InputError
from .fixed_step import check_feed, positive_number
from .prepared import Specification
from .thermo.database import SpeciesDatabase
from .thermo.datasets import choose_database

__all__ = ["PhasePoint", "dew_point", "bubble_point", "condensation_curve"]


@dataclass(frozen=True)
class PhasePoint:
    """A dew or bubble point of a stream.

    Attributes
    ----------
    kind : str
        "dew" or "bubble".
    T, P : float
        [K], [Pa].
    incipient : dict
        Species to mole fraction of the phase about to form (the first drop of liquid at a dew point, the first
        bubble of vapour at a bubble point).
    """

    kind: str
    T: float
    P: float
    incipient: Mapping[str, float]


def dew_point(feed: Mapping[str, float], *, P: float | None = None, T: float | None = None,
              gas: str = "peng-robinson", kij: object = "shipped", data: str | None = None,
              db: SpeciesDatabase | None = None, T_range: tuple[float, float] = (60.0, 900.0),
              P_range: tuple[float, float] = (1e3, 5e7)) -> PhasePoint:
    """The dew point of a stream (species to mol): its temperature [K] at P [Pa], or its pressure [Pa] at T [K].

    Searched over ``T_range`` [K] (or ``P_range`` [Pa]) from the side where the stream is all vapour.

    Examples
    --------
    >>> point = dew_point({"CH4": 0.9, "C2H6": 0.05, "H2O": 0.05}, P=30e5)
    >>> 375 < point.T < 385   # water at 1.5 bar of partial pressure boils near 385 K
    True
    """
    return _point("dew", feed, P, T, gas, kij, data, db, T_range, P_range)


def bubble_point(feed: Mapping[str, float], *, P: float | None = None, T: float | None = None,
                 gas: str = "peng-robinson", kij: object = "shipped", data: str | None = None,
                 db: SpeciesDatabase | None = None, T_range: tuple[float, float] = (60.0, 900.0),
                 P_range: tuple[float, float] = (1e3, 5e7)) -> PhasePoint:
    """The bubble point of a stream: its temperature [K] at P [Pa], or its pressure [Pa] at T [K] (as
    :func:`dew_point`, from the side where the stream is all liquid)."""
    return _point("bubble", feed, P, T, gas, kij, data, db, T_range, P_range)


def _point(kind, feed, P, T, gas, kij, data, db, T_range, P_range) -> PhasePoint:
    db = choose_database(data, db)
    amounts = check_feed(feed, db)
    if gas == "ideal":
        raise InputError(f"a {kind} point needs a cubic: pass gas='peng-robinson' or 'srk'")
    if (P is None) == (T is None):
        raise InputError(f"give P (to find the {kind}-point temperature) or T (to find its pressure), not both")
    model, described, z, names = model_of_gas(amounts, gas, kij, db)
    ideal = [name for name in names if name not in described]
    if ideal:
        raise InputError(f"{', '.join(ideal)} {'has' if len(ideal) == 1 else 'have'} no critical constants, so the "
                         f"cubic cannot say how {'it' if len(ideal) == 1 else 'they'} would condense; leave "
                         f"{'it' if len(ideal) == 1 else 'them'} out of the stream")
    low, high = T_range if P is not None else P_range
    T_found, P_found, incipient = incipient_point(
        model, z, kind, P=None if P is None else positive_number(P, "P", "Pa"),
        T=None if T is None else positive_number(T, "T", "K"), low=float(low), high=float(high))
    return PhasePoint(kind, float(T_found), float(P_found), {s: float(w) for s, w in zip(described, incipient)})


def condensation_curve(feed: Mapping[str, float], P: float, temperatures: Sequence[float], *,
                       gas: str = "peng-robinson", kij: object = "shipped", data: str | None = None,
                       db: SpeciesDatabase | None = None) -> list[Equilibrium]:
    """The flash of a stream (every species held) at each temperature [K] of a list at P [Pa], warm-started in
    order: each answer's ``liquid_amount`` and ``fluid_phases`` give the liquid fraction and its composition along
    a cooler.  Sort the temperatures to profit from the warm starts."""
    if gas == "ideal":
        raise InputError("a condensation curve needs a cubic: pass gas='peng-robinson' or 'srk'")
    names = list(check_feed(feed, choose_database(data, db)))
    prepared = prepared_for(Specification.of(species=names, inert=names, gas=gas, kij=kij, data=data, liquid=True), db)
    return prepared.equilibrate_many(feed, np.asarray(temperatures, dtype=float), P)
