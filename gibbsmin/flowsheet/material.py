"""What flows in a flowsheet's stream: temperature, pressure and species flows, the same numbers every unit reads."""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass, field

#: Relative flow below which a species is left out of a stream (traces of a flash or a reactor's round-off).
NEGLIGIBLE_FLOW = 1e-14


@dataclass(frozen=True)
class Material:
    """One stream's state.

    Attributes
    ----------
    T : float
        Temperature, [K].
    P : float
        Pressure, [Pa].
    flows : mapping
        Species to flow, [mol/s] (a pure condensed species under its own name, e.g. ``H2O(l)``).
    liquid_fraction : float
        Mole fraction of the flow in liquid-solution phases, [-] (0 for a gas, 1 for a separator's liquid; what the
        unit that made the stream found).
    phases : mapping
        Phase name ("gas", "liquid", "liquid 2", or a condensed species) to its flows, [mol/s], where the unit
        that made the stream solved its phases (empty otherwise).
    """

    T: float
    P: float
    flows: Mapping[str, float]
    liquid_fraction: float = 0.0
    phases: Mapping[str, Mapping[str, float]] = field(default_factory=dict)

    @property
    def total(self) -> float:
        """Total flow, [mol/s]."""
        return float(sum(self.flows.values()))

    def fraction(self, species: str | tuple[str, ...]) -> float:
        """Mole fraction of a species, or of several together, [-]; NaN for an empty stream."""
        names = (species,) if isinstance(species, str) else species
        total = self.total
        return sum(self.flows.get(s, 0.0) for s in names) / total if total > 0.0 else math.nan

    @property
    def empty(self) -> bool:
        return self.total <= 0.0


def cleaned(flows: Mapping[str, float]) -> dict[str, float]:
    """Flows without zeros, negatives of round-off and traces below NEGLIGIBLE_FLOW of the total."""
    total = sum(n for n in flows.values() if n > 0.0)
    return {s: float(n) for s, n in flows.items() if n > NEGLIGIBLE_FLOW * total}


def added(*flows: Mapping[str, float]) -> dict[str, float]:
    """Species flows of several streams together."""
    total: dict[str, float] = {}
    for amounts in flows:
        for name, n in amounts.items():
            total[name] = total.get(name, 0.0) + n
    return total


def scaled(flows: Mapping[str, float], factor: float) -> dict[str, float]:
    return {s: n * factor for s, n in flows.items()}
