"""A flowsheet as data: feeds, units, design specifications and the convergence settings."""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass

from ..errors import InputError
from .material import Material
from .units import Unit


@dataclass(frozen=True)
class DesignSpecification:
    """A target on one stream met by varying one setting.

    Attributes
    ----------
    name : str
    stream : str
        The stream the target is read on.
    quantity : str
        "fraction" (mole fraction of ``species`` together, [-]) or "flow" (their flow, [mol/s]).
    species : tuple of str
    target : float
        In the quantity's unit.
    vary : str
        The unit's name (or a feed's), whose ``setting`` is varied.
    setting : str
        A unit's variable ("fraction", "flow", "T", "duty", "P") or a feed's "flow" (its total, [mol/s]).
    low, high : float
        The range the setting may take.
    line : int or None
    """

    name: str
    stream: str
    quantity: str
    species: tuple[str, ...]
    target: float
    vary: str
    setting: str
    low: float
    high: float
    line: int | None = None

    def value(self, streams: Mapping[str, Material]) -> float:
        m = streams[self.stream]
        if self.quantity == "fraction":
            return m.fraction(self.species)
        return sum(m.flows.get(s, 0.0) for s in self.species)

    @property
    def scale(self) -> float:
        """What one unit of residual means: the target itself, or a mole fraction of 1e-3 near a zero target."""
        return max(abs(self.target), 1e-3 if self.quantity == "fraction" else 1e-6)


@dataclass(frozen=True)
class Flowsheet:
    """Feeds, units (in the file's order), design specifications and how to converge.

    Attributes
    ----------
    title : str
    feeds : mapping
        Feed stream name to its state (boundary in).
    units : tuple of Unit
    specifications : tuple of DesignSpecification
    tears : tuple of str or None
        The user's tear streams (None: chosen from the connections).
    tolerance : float
        Largest relative tear residual accepted (flows over the stream's total flow, T and P relative).
    max_passes : int
        Most flowsheet passes (a pass runs every unit once) before giving up.
    """

    title: str
    feeds: Mapping[str, Material]
    units: tuple[Unit, ...]
    specifications: tuple[DesignSpecification, ...] = ()
    tears: tuple[str, ...] | None = None
    tolerance: float = 1e-10
    max_passes: int = 200

    def __post_init__(self):
        if not self.units:
            raise InputError("a flowsheet needs at least one unit ([[unit]] tables)")
        if not (0.0 < self.tolerance < 1e-2):
            raise InputError(f"tolerance {self.tolerance!r} must be a small positive number, e.g. 1e-10")
        names = [u.name for u in self.units]
        twice = sorted({n for n in names if names.count(n) > 1})
        if twice:
            raise InputError(f"two units are named {twice[0]!r}; give each unit its own name")
        for spec in self.specifications:
            if not (math.isfinite(spec.low) and math.isfinite(spec.high) and spec.low < spec.high):
                raise InputError(f"specification {spec.name!r}: its range {spec.low!r} to {spec.high!r} must be two "
                                 "finite numbers, the lower first")

    def unit(self, name: str) -> Unit:
        for u in self.units:
            if u.name == name:
                return u
        raise InputError(f"no unit named {name!r}; units: {', '.join(u.name for u in self.units)}")
