"""What may change in one stage: the species set it sees, the species it holds, and the reactions it allows.

A reactor with ``reactions`` (its own or its service's) is solved over exactly the species of those
reactions, with every other species of its inlet held at its inlet flow (a private pseudo-element,
as for an inert).  That is the equilibrium of the listed reactions only when the listed reactions
span every reaction their species admit; otherwise (C3H8 + H2 = C2H6 + CH4 alone, whose species
also admit 2 CH4 = C2H6 + H2) the case is refused with the reaction to add.  Liquid water may
appear beside a reacting H2O (a phase change, not a reaction).

A heater or cooler holds every species; a knock-out holds every species but water, which may
condense as pure liquid H2O(l) with an ideal gas (or the stage's gas model) above it.  A separator
holds every species too, and its cubic shares each between the vapour and a liquid solution (a flash).
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass

import numpy as np

from ..errors import InputError
from ..reactions import independent_reactions, reaction
from ..thermo import SpeciesDatabase
from .services import SERVICES
from .spec import Case, Stage

#: Liquid water, the one species a knock-out condenses.
LIQUID_WATER = "H2O(l)"
#: Mole fraction above which a gas species below its critical temperature is named as a possible condensate.
_CONDENSABLE_FRACTION = 1e-3


@dataclass(frozen=True)
class StageScope:
    """What may change in one stage.

    Attributes
    ----------
    type : str
        The stage's type ("reactor", "heater", "cooler", "knock-out", "separator").
    species : tuple of str or None
        The species set handed to the engine (None: the case's set).
    exclude : tuple of str
        Species left out of the case's default set.
    held : tuple of str
        Species kept at their inlet flow.
    reactions : tuple of str or None
        Equations of the reactions allowed (None: every reaction of the species set).
    practice : str
        Where the reactions come from, for the report ("" when the case file lists them or none are set).
    service : str or None
    """

    type: str
    species: tuple[str, ...] | None
    exclude: tuple[str, ...]
    held: tuple[str, ...]
    reactions: tuple[str, ...] | None = None
    practice: str = ""
    service: str | None = None
    frozen_here: tuple[str, ...] = ()

    @property
    def restricted(self) -> bool:
        """Whether the stage is anything but a full equilibrium over the case's species set and frozen species."""
        return self.type != "reactor" or self.reactions is not None or bool(self.frozen_here)

    @property
    def changes(self) -> str:
        """What may change, in a few words: the reactions allowed, or what a non-reacting stage does."""
        if self.type in ("heater", "cooler"):
            return "none (composition unchanged)"
        if self.type == "knock-out":
            return f"water condenses ({LIQUID_WATER} drawn off)"
        if self.type == "separator":
            return "none (flash: vapour and liquid split)"
        if self.reactions is None:
            return "every reaction of the species set"
        return "; ".join(self.reactions)

    @property
    def basis(self) -> str:
        """Why the stage reacts as it does, for the report."""
        if self.service:
            return f"{self.service} service: {self.practice}"
        if self.type == "knock-out":
            return ("water alone condenses, as pure liquid under the stage's gas; any other condensable stays in the "
                    "gas (no liquid solution is modelled)")
        if self.type == "separator":
            return ("a flash: every species keeps its flow, shared between the vapour and the liquid solution by the "
                    "stage's cubic (equal fugacities)")
        if self.type != "reactor":
            return f"a {self.type} changes temperature only"
        listed = "reactions listed in the case file" if self.reactions is not None else "the case's species set"
        return listed + (f"; held in this stage: {', '.join(self.frozen_here)}" if self.frozen_here else "")

    def to_dict(self) -> dict[str, object]:
        return {"type": self.type, "service": self.service, "reactions allowed": self.reactions,
                "species": self.species, "held at inlet flow": list(self.held), "practice": self.practice or None}


def stage_scope(case: Case, stage: Stage, inlet: Mapping[str, float], db: SpeciesDatabase) -> StageScope:
    """The scope of ``stage`` for an inlet of species to amount [mol]; raises InputError naming the fix."""
    present = [s for s, n in inlet.items() if n > 0.0]
    if not stage.reacts:
        return _non_reacting(stage, present, db)
    wanted = tuple(dict.fromkeys([*case.species.frozen, *stage.frozen]))
    absent = [s for s in stage.frozen if s not in present]
    if absent:
        raise InputError(f"frozen: {', '.join(absent)} is not in this stage's inlet, so it has no inlet flow to keep; "
                         "remove it from frozen")
    names = SERVICES[stage.service].reactions if stage.service else stage.reactions
    if names is None:
        return StageScope("reactor", case.species.only, case.species.exclude, wanted, frozen_here=stage.frozen)
    return _reacting(case, stage, names, present, wanted, db)


def _non_reacting(stage: Stage, present: list[str], db: SpeciesDatabase) -> StageScope:
    solids = [s for s in present if not db[s].is_gas and not (stage.type == "knock-out" and s == LIQUID_WATER)]
    if solids and stage.type == "separator":
        raise InputError(f"the inlet holds {', '.join(solids)} as a pure condensed species, but a separator describes "
                         "its liquid with the cubic (a solution): leave it out of the species set of the stage before "
                         f"(e.g. [species] exclude = {solids!r}), so that the liquid stays in the solution")
    if solids:
        raise InputError(f"the inlet holds {', '.join(solids)}, but a {stage.type} carries a gas "
                         f"{'and its water condensate ' if stage.type == 'knock-out' else ''}only; keep "
                         f"{', '.join(solids)} out of the stage before it (exclude it from that stage's reactions)")
    gases = tuple(s for s in present if db[s].is_gas)
    if stage.type != "knock-out":
        return StageScope(stage.type, gases, (), gases)
    water = "H2O" in present or LIQUID_WATER in present
    species = tuple(dict.fromkeys([*gases, *(("H2O", LIQUID_WATER) if water else ())]))
    return StageScope("knock-out", species, (), tuple(s for s in gases if s != "H2O"))


def _reacting(case: Case, stage: Stage, names: tuple[str, ...], present: list[str], wanted: tuple[str, ...],
              db: SpeciesDatabase) -> StageScope:
    reactions = [reaction(name, db=db) for name in names]
    reacting = list(dict.fromkeys(s for rx in reactions for s in rx.species))
    clash = [s for s in reacting if s in wanted]
    if clash:
        raise InputError(f"{', '.join(clash)} is held (frozen) but takes part in the reactions allowed here "
                         f"({', '.join(rx.name for rx in reactions if set(rx.species) & set(clash))}); "
                         "remove it from frozen or change the reactions")
    only, exclude = case.species.only, case.species.exclude
    left_out = [s for s in reacting if s in exclude or (only is not None and s not in only)]
    if left_out:
        raise InputError(f"the reactions allowed here need {', '.join(left_out)}, which [species] leaves out; "
                         "add it to [species] only (or take it out of exclude), or change the reactions")
    water_phase = "H2O" in reacting and LIQUID_WATER not in exclude and (only is None or LIQUID_WATER in only)
    solids = [s for s in present if not db[s].is_gas and s not in reacting
              and not (water_phase and s == LIQUID_WATER)]
    if solids:
        raise InputError(f"the inlet holds {', '.join(solids)}, which none of the reactions allowed here "
                         f"({', '.join(names)}) takes part in; add a reaction of it, or keep it out of the stage "
                         "before this one")
    _check_complete(reactions, reacting, db)
    held = tuple(s for s in present if s not in reacting and db[s].is_gas)
    species = tuple(dict.fromkeys([*reacting, *held, *((LIQUID_WATER,) if water_phase else ())]))
    service = SERVICES.get(stage.service) if stage.service else None
    return StageScope("reactor", species, (), held, tuple(rx.equation for rx in reactions),
                      service.practice if service else "", stage.service, stage.frozen)


def _check_complete(reactions, reacting: list[str], db: SpeciesDatabase) -> None:
    """Refuse a list of reactions whose species admit a reaction outside their span (it would run too)."""
    listed = np.array([rx.vector(reacting) for rx in reactions])
    rank = np.linalg.matrix_rank(listed)
    for candidate in independent_reactions(reacting, db=db):
        if np.linalg.matrix_rank(np.vstack([listed, candidate.vector(reacting)])) > rank:
            raise InputError(
                f"the species of the reactions allowed here ({', '.join(reacting)}) can also react by "
                f"{candidate.equation} ({candidate.name}), which is not listed and would proceed as well; add it "
                "to reactions (or list reactions whose species admit no other)")


def possible_condensates(amounts: Mapping[str, float], T: float, db: SpeciesDatabase) -> list[str]:
    """Gas species other than water, below their critical temperature [K] and above 0.1 mol%: they may condense
    in a real drum, which a knock-out here does not model."""
    gas = {s: n for s, n in amounts.items() if db[s].is_gas and n > 0.0}
    total = sum(gas.values())
    found = []
    for name, n in gas.items():
        critical = db[name].critical
        if name != "H2O" and critical is not None and critical.Tc > T and n / total >= _CONDENSABLE_FRACTION:
            found.append(f"{name} (Tc {critical.Tc - 273.15:.0f} degC)")
    return found
