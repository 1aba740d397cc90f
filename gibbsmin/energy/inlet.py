"""The inlet: feeds at their own temperatures, mixed; its enthalpy, and the outlet temperatures allowed."""

from __future__ import annotations

import math
import numbers
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass

import numpy as np

from ..errors import InputError
from ..fixed_step import check_feed
from ..thermo.database import SpeciesDatabase
from .properties import _temperature, mixture_enthalpy, species_enthalpies



@dataclass(frozen=True)
class InletStream:
    """One stream entering the reactor.

    Attributes
    ----------
    name : str
    amounts : dict
        Canonical species name to amount, [mol] (or mol/s).
    T : float or None
        Temperature, [K]; None when it was not given.
    """

    name: str
    amounts: Mapping[str, float]
    T: float | None


@dataclass(frozen=True)
class Inlet:
    """The streams mixed at the reactor inlet."""

    streams: tuple[InletStream, ...]

    @property
    def total(self) -> dict[str, float]:
        """The mixed feed: species to total amount, [mol]."""
        total: dict[str, float] = {}
        for stream in self.streams:
            for name, amount in stream.amounts.items():
                total[name] = total.get(name, 0.0) + amount
        return total

    @property
    def has_temperatures(self) -> bool:
        return all(stream.T is not None for stream in self.streams)

    @property
    def temperatures(self) -> dict[str, float | None]:
        return {stream.name: stream.T for stream in self.streams}

    def enthalpy(self, P: float, db: SpeciesDatabase, allow_extrapolation: bool = False,
                 stream_residual: Callable[[InletStream, float], float] | None = None) -> float:
        """Total enthalpy of the streams, each at its own temperature and at P [Pa], [J].

        ``stream_residual(stream, P)`` adds a stream's departure from the
        ideal gas, [J] (for a cubic equation of state); none by default.
        """
        if not self.has_temperatures:
            raise InputError("the energy balance needs the feed temperature: pass T_feed (K), one number "
                             "or one per feed species or stream")
        total = 0.0
        for stream in self.streams:
            total += mixture_enthalpy(stream.amounts, stream.T, P, db=db, allow_extrapolation=allow_extrapolation)
            if stream_residual is not None:
                total += float(stream_residual(stream, P))
        return total

    def gross_enthalpy(self, P: float, db: SpeciesDatabase) -> float:
        """Sum of |n_j h_j| over the inlet, [J]: the scale the energy-balance residual is measured on."""
        # A zero amount means the species is absent: it adds nothing.  One evaluation per stream.
        return sum(float(np.abs(species_enthalpies(present, s.T, db=db, allow_extrapolation=True)).sum())
                   for s in self.streams if (present := {name: n for name, n in s.amounts.items() if n > 0.0}))


def read_inlet(feed: Mapping[str, object], T_feed: object, db: SpeciesDatabase) -> Inlet:
    """The inlet described by a feed and its temperatures.

    Parameters
    ----------
    feed : mapping
        Either species name to amount [mol], or stream name to such a mapping
        (several streams mixed at the inlet).
    T_feed : float, mapping or None
        Temperature of the feed, [K]: one number for everything; for a feed of
        species, a mapping species to temperature (every species its own
        stream); for a feed of streams, a mapping stream name to temperature.
    """
    if isinstance(feed, Mapping) and feed and all(isinstance(v, Mapping) for v in feed.values()):
        streams = {str(name): check_feed(amounts, db) for name, amounts in feed.items()}
        temperatures = _temperatures_of(T_feed, list(streams), "stream", lambda key: str(key))
        return Inlet(tuple(InletStream(name, amounts, temperatures[name]) for name, amounts in streams.items()))
    if isinstance(feed, Mapping) and any(isinstance(v, Mapping) for v in feed.values()):
        raise InputError("feed mixes species amounts with streams; give either {species: mol} or "
                         "{stream name: {species: mol}}")
    amounts = check_feed(feed, db)
    if isinstance(T_feed, Mapping):
        temperatures = _temperatures_of(T_feed, list(amounts), "species", lambda key: db[str(key)].name)
        return Inlet(tuple(InletStream(name, {name: amount}, temperatures[name]) for name, amount in amounts.items()))
    T = None if T_feed is None else _temperature(T_feed, "T_feed")
    return Inlet((InletStream("feed", amounts, T),))


def _temperatures_of(T_feed: object, keys: list[str], kind: str, canonical) -> dict[str, float | None]:
    if T_feed is None:
        return {key: None for key in keys}
    if not isinstance(T_feed, Mapping):
        T = _temperature(T_feed, "T_feed")
        return {key: T for key in keys}
    plural = "streams" if kind == "stream" else kind
    given: dict[str, float] = {}
    for key, value in T_feed.items():
        name = canonical(key)
        if name not in keys:
            raise InputError(f"T_feed names {key!r}, which is not a feed {kind}; the feed {plural} are "
                             f"{', '.join(keys)}")
        if name in given:
            raise InputError(f"T_feed gives {name} two temperatures (under two of its names); give it one")
        given[name] = _temperature(value, f"T_feed[{key!r}]")
    missing = [key for key in keys if key not in given]
    if missing:
        raise InputError(f"T_feed gives no temperature for {', '.join(missing)}; give every feed {kind} "
                         "a temperature in K, or one number for all")
    return given


def heat_input_of(value: object) -> float:
    """A validated heat input, [J per the amounts given]."""
    if isinstance(value, bool) or not isinstance(value, numbers.Real) or not math.isfinite(float(value)):
        raise InputError(f"heat_input must be a finite number (J per the feed amounts, W for mol/s; "
                         f"positive = heat added), got {value!r}")
    return float(value)


def outlet_bounds(db: SpeciesDatabase, inlet: Inlet, species: Sequence[str] | None,
                  T_bounds: object = None) -> tuple[float, float]:
    """Temperatures the outlet may take, [K].

    By default the range over which every gas species the caller named (in the
    feed or in ``species``) has data; species of the default set with a
    narrower range are then left out.
    """
    if T_bounds is not None:
        if isinstance(T_bounds, (str, bytes)) or not isinstance(T_bounds, Sequence) or len(T_bounds) != 2:
            raise InputError(f"T_bounds must be (lowest, highest) outlet temperature in K, got {T_bounds!r}")
        low, high = (_temperature(v, "T_bounds") for v in T_bounds)
        if not low < high:
            raise InputError(f"T_bounds must be (lowest, highest) with lowest < highest, got {T_bounds!r}")
        return low, high
    named = list(inlet.total) + list(species or [])
    gases = [r for r in db.resolve(named) if r.is_gas]
    if not gases:
        return 200.0, 6000.0
    low, high = max(r.T_min for r in gases), min(r.T_max for r in gases)
    if not low < high:
        raise InputError("the named gas species share no temperature range; leave one out of the set")
    return low, high
