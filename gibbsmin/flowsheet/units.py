"""The units of a flowsheet: each takes its inlet streams and gives its outlet streams, with its duty or power.

Every unit that changes temperature, pressure or phase runs the engine's one pipeline (``prepared_for``): a
mixer is the adiabatic flash of its inlets at the lowest inlet pressure, a heater or cooler the flash at its outlet
T (or at the T its duty sets), a valve the adiabatic flash at its outlet pressure, a separator the flash split into
its vapour and liquid, a reactor a case stage.  Nothing reacts outside a reactor: every species is inert there,
except water with the ideal gas, which may condense as pure ``H2O(l)`` (a phase change only).  With a cubic gas
model the same cubic describes the liquid solution that may form.  A splitter and a component splitter only
share flows; a compressor takes the gas model's entropy.
"""

from __future__ import annotations

import dataclasses
import warnings
from collections.abc import Mapping
from dataclasses import dataclass
from typing import ClassVar

from ..api import prepared_for
from ..case.run import StageInlet, separator_outlets, settle_stage
from ..case.scope import LIQUID_WATER, stage_scope
from ..case.services import SERVICES
from ..case.spec import Case, ReportSpec, SpeciesSpec, Stage
from ..energy.compression import compress
from ..equilibrium import Equilibrium
from ..errors import InputError
from ..prepared import Specification
from ..reactions import reaction
from ..thermo import SpeciesDatabase, default_database
from .material import Material, added, cleaned, scaled


@dataclass(frozen=True)
class Context:
    """What every unit of one flowsheet shares: the case's species set and report (as a case with no stages, for
    the reactors' scope) and the species database."""

    case: Case
    db: SpeciesDatabase

    @classmethod
    def of(cls, *, species: tuple[str, ...] | None = None, frozen: tuple[str, ...] = (), exclude: tuple[str, ...] = (),
           db: SpeciesDatabase | None = None) -> Context:
        """The context of a flowsheet built in Python: the reactors' species set (``species``: None for every
        species of the feeds' elements), the species no reactor converts (``frozen``), and the database."""
        spec = SpeciesSpec(None if species is None else tuple(species), tuple(exclude), tuple(frozen))
        return cls(Case("flowsheet", (), spec, (), ReportSpec(), None, "<flowsheet>"), db or default_database())


@dataclass(frozen=True)
class Outcome:
    """What one unit gave: its outlet streams (in the order of ``Unit.outlets``), the heat added [W], the shaft
    power [W], the equilibrium it solved (None for splitters) and notes for the report."""

    outlets: tuple[Material, ...]
    duty_W: float | None = None
    power_W: float | None = None
    equilibrium: Equilibrium | None = None
    notes: tuple[str, ...] = ()

    @property
    def certified(self) -> bool:
        return self.equilibrium is None or bool(self.equilibrium.certificate.certified)


@dataclass(frozen=True)
class Unit:
    """A unit's name, the streams it takes and the streams it makes (by name), and its line in the case file."""

    name: str
    inlets: tuple[str, ...]
    outlets: tuple[str, ...]
    line: int | None = None

    kind: ClassVar[str] = "unit"
    #: The settings a design specification may vary (attribute names, each a float).
    variables: ClassVar[tuple[str, ...]] = ()
    #: How many inlets and outlets the unit takes: (least, most); None for no upper limit.
    inlet_count: ClassVar[tuple[int, int | None]] = (1, 1)
    outlet_count: ClassVar[tuple[int, int | None]] = (1, 1)

    def run(self, inputs: tuple[Material, ...], context: Context) -> Outcome:
        raise NotImplementedError

    def with_value(self, variable: str, value: float) -> Unit:
        """The same unit with one of its ``variables`` set (a design specification's trial)."""
        if variable not in self.variables:
            raise InputError(f"unit {self.name!r} ({self.kind}) has no setting {variable!r} a specification can "
                             f"vary; it has: {', '.join(self.variables) or 'none'}")
        return dataclasses.replace(self, **{variable: float(value)})

    def carries(self, species: str, outlet: str, context: Context) -> bool:
        """Whether ``species`` can leave by ``outlet`` (for the check that every inert has a way out of a loop)."""
        return True


# --- phase changes without chemistry -------------------------------------------------------------------------


@dataclass(frozen=True)
class FluidModel:
    """The gas model of a unit that keeps every species: "ideal" (water may condense as pure H2O(l)) or a cubic
    (its liquid solution may form)."""

    gas: str = "ideal"
    kij: object = "shipped"

    def specification(self, flows: Mapping[str, float], context: Context) -> Specification:
        """Every species held; water free to condense as H2O(l) with the ideal gas, a liquid solution with a cubic."""
        db = context.db
        names = list(flows)
        gases = [s for s in names if db[s].is_gas]
        extrapolate = context.case.species.allow_extrapolation
        if self.gas == "ideal":
            water = "H2O" in names or LIQUID_WATER in names
            species = list(dict.fromkeys([*names, *(("H2O", LIQUID_WATER) if water else ())]))
            held = [s for s in gases if not (water and s == "H2O")]
            return Specification.of(species=species, inert=held, allow_extrapolation=extrapolate)
        solids = [s for s in names if not db[s].is_gas]
        if solids:
            raise InputError(f"the inlet holds {', '.join(solids)} as a pure condensed species, which a unit with "
                             f"gas = {self.gas!r} describes as part of its liquid solution; keep it out of the "
                             "stream (exclude it from the reactor before) or give this unit gas = 'ideal'")
        return Specification.of(species=gases, inert=gases, gas=self.gas, kij=self.kij, liquid=True,
                                allow_extrapolation=extrapolate)

    def flash(self, inputs: tuple[Material, ...], names: tuple[str, ...], context: Context, *, T: float | None,
              P: float, heat_input: float = 0.0) -> Equilibrium:
        """The inlets' equilibrium with nothing reacting: at T, or at the T that heat_input [W] sets (T None)."""
        streams = {name: dict(m.flows) for name, m in zip(names, inputs)}
        prepared = prepared_for(self.specification(added(*streams.values()), context), context.db)
        return prepared.equilibrate(streams, T, P, T_feed={name: m.T for name, m in zip(names, inputs)},
                                    P_feed={name: m.P for name, m in zip(names, inputs)}, adiabatic=T is None,
                                    heat_input=heat_input)


def material_of(eq: Equilibrium) -> Material:
    """The whole of an answer as one stream at its T and P, with its liquid fraction and phases."""
    phases = _phases(eq)
    kept = cleaned({s: n for s, n in eq.amounts.items() if n > 0.0})
    total = sum(kept.values())
    in_liquid = sum(sum(a.values()) for name, a in phases.items() if name != "gas")
    return Material(eq.T, eq.P, kept, in_liquid / total if total > 0 else 0.0, phases)


def _phases(eq: Equilibrium) -> dict[str, dict[str, float]]:
    if eq.fluid_phases is not None:
        phases = {p.name: cleaned(p.amounts) for p in eq.fluid_phases}
    else:
        phases = {"gas": cleaned({s: n for s, n in eq.amounts.items() if eq.phase_of[s] == "gas" and n > 0})}
    for name, n in eq.condensed.items():
        if n > 0.0:
            phases[name] = {name: float(n)}
    return {name: a for name, a in phases.items() if a}


@dataclass(frozen=True)
class Mixer(Unit):
    """Streams joined: the adiabatic flash of the inlets at the lowest inlet pressure (or at ``P``)."""

    P: float | None = None
    model: FluidModel = FluidModel()

    kind: ClassVar[str] = "mixer"
    variables: ClassVar[tuple[str, ...]] = ("P",)
    inlet_count: ClassVar[tuple[int, int | None]] = (1, None)

    def run(self, inputs, context):
        present = tuple((name, m) for name, m in zip(self.inlets, inputs) if not m.empty)
        if not present:
            raise InputError(f"mixer {self.name!r}: every inlet is empty ({', '.join(self.inlets)})")
        P = self.P if self.P is not None else min(m.P for _, m in present)
        if len(present) == 1 and present[0][1].P == P:
            return Outcome((present[0][1],), duty_W=0.0)
        names, materials = zip(*present)
        eq = self.model.flash(materials, names, context, T=None, P=P)
        return Outcome((material_of(eq),), duty_W=0.0, equilibrium=eq)


@dataclass(frozen=True)
class Exchanger(Unit):
    """A heater or cooler: the outlet at ``T`` or with ``duty`` [W] added (negative: removed), at ``P`` (default:
    the inlet's); with a cubic gas model a liquid may condense in it (carried on in the same stream)."""

    T: float | None = None
    duty: float | None = None
    P: float | None = None
    model: FluidModel = FluidModel()
    kind: ClassVar[str] = "exchanger"
    variables: ClassVar[tuple[str, ...]] = ("T", "duty", "P")

    def run(self, inputs, context):
        inlet = inputs[0]
        P = self.P if self.P is not None else inlet.P
        eq = self.model.flash(inputs, self.inlets, context, T=self.T, P=P, heat_input=self.duty or 0.0)
        return Outcome((material_of(eq),), duty_W=eq.energy.duty_W if self.T is not None else self.duty,
                       equilibrium=eq)


@dataclass(frozen=True)
class Heater(Exchanger):
    kind: ClassVar[str] = "heater"


@dataclass(frozen=True)
class Cooler(Exchanger):
    kind: ClassVar[str] = "cooler"


@dataclass(frozen=True)
class Valve(Unit):
    """An adiabatic let-down to ``P`` (the flash at constant enthalpy)."""

    P: float = 0.0
    model: FluidModel = FluidModel()
    kind: ClassVar[str] = "valve"
    variables: ClassVar[tuple[str, ...]] = ("P",)

    def run(self, inputs, context):
        if self.P > inputs[0].P:
            raise InputError(f"valve {self.name!r}: its outlet pressure ({self.P / 1e5:.6g} bar) is above its inlet's "
                             f"({inputs[0].P / 1e5:.6g} bar); a valve only lets down (use a compressor to raise it)")
        eq = self.model.flash(inputs, self.inlets, context, T=None, P=self.P)
        return Outcome((material_of(eq),), duty_W=0.0, equilibrium=eq)


@dataclass(frozen=True)
class Separator(Unit):
    """A flash drum: its inlet at ``T`` (default: adiabatic) and ``P`` (default: the inlet's), split into the vapour
    (first outlet) and the liquid (second: the liquid solution with a cubic, pure H2O(l) with the ideal gas)."""

    T: float | None = None
    P: float | None = None
    model: FluidModel = FluidModel()
    kind: ClassVar[str] = "separator"
    variables: ClassVar[tuple[str, ...]] = ("T", "P")
    outlet_count: ClassVar[tuple[int, int | None]] = (2, 2)

    def run(self, inputs, context):
        P = self.P if self.P is not None else inputs[0].P
        eq = self.model.flash(inputs, self.inlets, context, T=self.T, P=P)
        parts = separator_outlets(eq)
        vapour, liquid = Material(eq.T, eq.P, cleaned(parts["vapour"])), Material(eq.T, eq.P, cleaned(parts["liquid"]), 1.0)
        notes = ()
        if liquid.empty:
            notes = (f"nothing condenses at {eq.T - 273.15:.2f} degC and {eq.P / 1e5:.6g} bar: the liquid outlet "
                     f"{self.outlets[1]!r} is empty",)
            warnings.warn(f"separator {self.name!r}: {notes[0]}", stacklevel=2)
        return Outcome((vapour, liquid), duty_W=eq.energy.duty_W if self.T is not None else 0.0, equilibrium=eq,
                       notes=notes)

    def carries(self, species, outlet, context):
        if outlet == self.outlets[0]:
            return True
        if self.model.gas == "ideal":
            return species in ("H2O", LIQUID_WATER)
        return context.db[species].critical is not None


@dataclass(frozen=True)
class Splitter(Unit):
    """One stream shared between two outlets at the same state: ``fraction`` of the flow to the first outlet (or a
    total ``flow`` [mol/s] to it), the rest to the second."""

    fraction: float | None = None
    flow: float | None = None
    kind: ClassVar[str] = "splitter"
    variables: ClassVar[tuple[str, ...]] = ("fraction", "flow")
    outlet_count: ClassVar[tuple[int, int | None]] = (2, 2)

    def run(self, inputs, context):
        inlet = inputs[0]
        total = inlet.total
        share = self.fraction if self.flow is None else (self.flow / total if total > 0 else 0.0)
        if not 0.0 <= share <= 1.0:
            asked = f"a flow of {self.flow:.6g} mol/s" if self.flow is not None else f"fraction {share:.6g}"
            raise InputError(f"splitter {self.name!r}: {asked} to {self.outlets[0]!r} is not between none and all of "
                             f"its inlet ({total:.6g} mol/s); lower it, or split by fraction")
        return Outcome(tuple(_share(inlet, s) for s in (share, 1.0 - share)))


def _share(inlet: Material, share: float) -> Material:
    return Material(inlet.T, inlet.P, scaled(inlet.flows, share), inlet.liquid_fraction,
                    {name: scaled(a, share) for name, a in inlet.phases.items()})


@dataclass(frozen=True)
class ComponentSplitter(Unit):
    """A removal step: ``recovery`` (species to fraction) of each species to the first outlet, the rest to the
    second, both at the inlet's state (e.g. CO2 removal, a drier); its energy is not modelled."""

    recovery: Mapping[str, float] = dataclasses.field(default_factory=dict)
    kind: ClassVar[str] = "component splitter"
    outlet_count: ClassVar[tuple[int, int | None]] = (2, 2)

    def run(self, inputs, context):
        inlet = inputs[0]
        taken = {s: n * self.recovery.get(s, 0.0) for s, n in inlet.flows.items()}
        left = {s: n - taken[s] for s, n in inlet.flows.items()}
        return Outcome((Material(inlet.T, inlet.P, cleaned(taken)), Material(inlet.T, inlet.P, cleaned(left))))

    def carries(self, species, outlet, context):
        share = self.recovery.get(species, 0.0)
        return share > 0.0 if outlet == self.outlets[0] else share < 1.0


@dataclass(frozen=True)
class Compressor(Unit):
    """A compressor or circulator: the gas to ``P`` with isentropic ``efficiency``, by the gas model's entropy;
    ``power_W`` is the shaft power taken (H_out - H_in)."""

    P: float = 0.0
    efficiency: float = 1.0
    model: FluidModel = FluidModel()
    kind: ClassVar[str] = "compressor"
    variables: ClassVar[tuple[str, ...]] = ("P",)

    def run(self, inputs, context):
        inlet = inputs[0]
        if inlet.liquid_fraction > 0.0 or any(not context.db[s].is_gas for s in inlet.flows):
            raise InputError(f"compressor {self.name!r}: its inlet holds a liquid; a compressor takes a gas (put a "
                             "separator before it)")
        done = compress(inlet.flows, inlet.T, inlet.P, self.P, efficiency=self.efficiency, gas=self.model.gas,
                        kij=self.model.kij, db=context.db)
        return Outcome((Material(done.T_out, self.P, dict(inlet.flows)),), duty_W=0.0, power_W=done.power_W)


@dataclass(frozen=True)
class Reactor(Unit):
    """An equilibrium reactor: a case stage (every mode a stage has: fixed T, adiabatic, heat input, approach per
    reaction, frozen species, a service's reactions, ideal or cubic gas); ``stage.P`` None takes the inlet's."""

    stage: Stage | None = None
    kind: ClassVar[str] = "reactor"
    variables: ClassVar[tuple[str, ...]] = ("T", "P")
    inlet_count: ClassVar[tuple[int, int | None]] = (1, None)

    def with_value(self, variable, value):
        if variable not in self.variables or (variable == "T" and self.stage.adiabatic):
            raise InputError(f"reactor {self.name!r}: a specification or sweep can vary its T (not adiabatic) or P, "
                             f"not {variable!r}")
        return dataclasses.replace(self, stage=dataclasses.replace(self.stage, **{variable: float(value)}))

    def run(self, inputs, context):
        stage = self.stage
        if stage.P is None:
            stage = dataclasses.replace(stage, P=min(m.P for m in inputs))
        inlet = StageInlet({n: dict(m.flows) for n, m in zip(self.inlets, inputs) if not m.empty},
                           {n: m.T for n, m in zip(self.inlets, inputs) if not m.empty},
                           any(m.liquid_fraction > 0.0 for m in inputs),
                           {n: m.P for n, m in zip(self.inlets, inputs) if not m.empty})
        case = _holding_present(context.case, inlet.mixed)
        scope = stage_scope(case, stage, inlet.mixed, context.db)
        eq = settle_stage(case, stage, scope, inlet, context.db)
        duty = eq.energy.duty_W if eq.energy is not None else None
        return Outcome((material_of(eq),), duty_W=None if duty is None else float(duty), equilibrium=eq)

    def consumes(self, species: str, context: Context) -> bool:
        """Whether the reactor can turn ``species`` into others: not held (frozen), among its reactions' species
        where it has a list, and not a noble gas."""
        stage = self.stage
        if species in context.case.species.frozen or species in stage.frozen or species in NOBLE_GASES:
            return False
        names = SERVICES[stage.service].reactions if stage.service else stage.reactions
        if names is None:
            return True
        return any(species in reaction(name, db=context.db).species for name in names)


def _holding_present(case: Case, flows: Mapping[str, float]) -> Case:
    """The flowsheet's frozen species that this reactor's inlet holds (a loop's inerts need not be everywhere)."""
    present = tuple(s for s in case.species.frozen if flows.get(s, 0.0) > 0.0)
    if present == case.species.frozen:
        return case
    return dataclasses.replace(case, species=dataclasses.replace(case.species, frozen=present))


#: Gases no reactor turns into anything else.
NOBLE_GASES = frozenset({"He", "Ne", "Ar", "Kr", "Xe"})
