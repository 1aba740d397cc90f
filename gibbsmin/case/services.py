"""Reactor services of the trade and the reactions each lets proceed, which fix the stage's species set.

Full Gibbs minimisation over every species the elements allow is the right answer for a reformer
but the wrong one for a converter whose catalyst drives one or two reactions: over shift catalyst
it would make methane and graphite that no plant sees.  A service names the reactions its catalyst
drives; every other species of the inlet keeps its flow, and no species outside those reactions
forms (no graphite, no higher hydrocarbons, no DME).  These choices are common practice, no
source; a case that wants more lists its own ``reactions`` instead.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Service:
    """A reactor service: the reactions that proceed, and why the others are held.

    Attributes
    ----------
    reactions : tuple of str
        Named reactions (:data:`gibbsmin.reactions.NAMED_REACTIONS`) allowed to reach equilibrium.
    practice : str
        What the choice rests on, for the report.
    """

    reactions: tuple[str, ...]
    practice: str


_SHIFT = ("only the water-gas shift proceeds over shift catalyst; methane formation is kinetically "
          "negligible there, so CH4 and every other species keep their inlet flows and no graphite forms "
          "(common practice, no source)")

SERVICES: dict[str, Service] = {
    "HT shift": Service(("water-gas shift",), _SHIFT),
    "LT shift": Service(("water-gas shift",), _SHIFT),
    "methanation": Service(
        ("methanation", "CO2 methanation"),
        "CO and CO2 are hydrogenated to CH4 and H2O over nickel catalyst (the shift follows from the two); "
        "N2, Ar and every other species keep their inlet flows: no ammonia, no higher hydrocarbons, no "
        "graphite (common practice, no source)"),
    "ammonia synthesis": Service(
        ("ammonia synthesis",),
        "only N2 + 3 H2 = 2 NH3 proceeds over iron catalyst; CH4, Ar, He and every other species are inerts "
        "at their inlet flows (common practice, no source)"),
    "methanol synthesis": Service(
        ("methanol synthesis", "water-gas shift"),
        "CO and CO2 are hydrogenated to CH3OH over copper catalyst, with the water-gas shift (CO2 + 3 H2 = "
        "CH3OH + H2O follows from the two); CH4, N2, Ar keep their inlet flows; no graphite, DME, higher "
        "alcohols or hydrocarbons form (common practice, no source)"),
}
