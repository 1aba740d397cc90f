"""What a case says: its feeds, species set, stages, curve and report, as frozen dataclasses, and the key reference."""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field, replace

from ..eos import InteractionTable, default_interactions
from ..streams import Stream


@dataclass(frozen=True)
class Feed:
    """One named feed stream.

    Attributes
    ----------
    name : str
    stream : Stream
        Flows [mol/s], T [K], P [Pa].
    T_given : bool
        Whether the case file gave the feed's temperature (the energy balance needs it).
    line : int or None
        Line of the feed's table in the case file.
    """

    name: str
    stream: Stream
    T_given: bool = False
    line: int | None = None


@dataclass(frozen=True)
class SpeciesSpec:
    """The species set: an explicit list (``only``) or the default set, less ``exclude``; ``frozen`` keep their feed amount."""

    only: tuple[str, ...] | None = None
    exclude: tuple[str, ...] = ()
    frozen: tuple[str, ...] = ()
    allow_extrapolation: bool = False


@dataclass(frozen=True)
class Stage:
    """What is held fixed in one equilibrium stage.

    Attributes
    ----------
    name : str
    T : float or None
        Outlet temperature, [K]; None when adiabatic.
    P : float
        Pressure, [Pa].
    line : int or None
        Line of the stage's table in the case file.
    T_in : float or None
        Temperature the previous stage's outlet is cooled or heated to before this stage, [K].
    adiabatic : bool
    heat_input : float
        Heat added to an adiabatic stage, [W] (negative for a heat loss).
    approach : dict
        Reaction (name or equation) to temperature approach, [K]; positive = short of equilibrium.
    gas : str
        Gas model name.
    kij : str
        Binary interaction parameters of a cubic: "shipped" (the published table) or "none".
    kij_pairs : dict
        The engineer's own k_ij by species pair, over the ``kij`` table.
    method : str
        Solver.
    type : str
        "reactor" (reacts to equilibrium, or as ``service`` / ``reactions`` allow), "heater" and
        "cooler" (composition unchanged), "knock-out" (only water condenses; the liquid is drawn off),
        "separator" (a flash at T and P with the stage's cubic: vapour and liquid outlets).
    service : str or None
        A reactor's service (:data:`gibbsmin.case.services.SERVICES`), which sets its reactions.
    reactions : tuple of str or None
        Reactions that may proceed (None: every reaction of the species set).
    frozen : tuple of str
        Species held at their inlet flow in this stage (besides the case's frozen species).
    duty : float or None
        Heat added to a heater, cooler or knock-out instead of its outlet T, [W] (negative: removed).
    data : str or None
        The thermochemical data set by name; None for the engine's default.
    uncertainty : bool
        Propagate the data set's formation-enthalpy uncertainties to the
        stage's answer (amounts, mol%, outlet T where the energy balance sets
        it) and to the report's approach temperatures and carbon limit.
    passes_on : str
        A separator's outlet the next stage takes: "vapour" (default) or "liquid".
    """

    name: str
    T: float | None
    P: float
    line: int | None = None
    T_in: float | None = None
    adiabatic: bool = False
    heat_input: float = 0.0
    approach: Mapping[str, float] = field(default_factory=dict)
    gas: str = "ideal"
    kij: str = "shipped"
    kij_pairs: Mapping[tuple[str, str], float] = field(default_factory=dict)
    method: str = "auto"
    type: str = "reactor"
    service: str | None = None
    reactions: tuple[str, ...] | None = None
    frozen: tuple[str, ...] = ()
    duty: float | None = None
    data: str | None = None
    uncertainty: bool = False
    passes_on: str = "vapour"

    @property
    def reacts(self) -> bool:
        """Whether the stage is a reactor (heaters, coolers, knock-outs and separators keep every species' amount)."""
        return self.type == "reactor"

    @property
    def interactions(self):
        """What the engine's ``kij=`` takes for this stage: the choice, or the table with the own pairs."""
        if not self.kij_pairs:
            return self.kij

        base = default_interactions() if self.kij == "shipped" else InteractionTable([])
        return base.updated(dict(self.kij_pairs), model=self.gas, source="case file")  # "given table" in notes


@dataclass(frozen=True)
class CurveSpec:
    """An equilibrium curve over temperature with each adiabatic stage's operating line drawn on it.

    Attributes
    ----------
    species : str
        The species plotted: its mol% (``y``), or its conversion from the feed (``conversion``).
    conversion : bool
        Plot the fraction of the feed's ``species`` converted, [-], instead of its mol%.
    T_from, T_to : float
        Temperature range of the equilibrium curve, [K].
    points : int
    """

    species: str
    conversion: bool
    T_from: float
    T_to: float
    points: int = 41


@dataclass(frozen=True)
class ReportSpec:
    """What the report shows.

    Attributes
    ----------
    flow_unit, temperature_unit, pressure_unit : str
    cutoff : float
        Smallest mole fraction shown, [-].
    show : tuple of str or None
        Only these species (None: all above the cutoff).
    partial_pressures : bool
    kp : tuple of str
        Reactions whose equilibrium constant Kp (with its units) is reported with the outlet's quotient.
    approach : tuple of str
        Reactions whose approach temperature at each outlet is reported.
    carbon : bool
        Report the carbon activity against graphite and the carbon verdict.
    """

    flow_unit: str = "kmol/h"
    temperature_unit: str = "degC"
    pressure_unit: str = "bar"
    cutoff: float = 1e-6
    show: tuple[str, ...] | None = None
    partial_pressures: bool = False
    kp: tuple[str, ...] = ()
    approach: tuple[str, ...] = ()
    carbon: bool = False


@dataclass(frozen=True)
class Case:
    """A whole case: feeds, species set, stages (run in order, each taking the previous outlet), report."""

    title: str
    feeds: tuple[Feed, ...]
    species: SpeciesSpec
    stages: tuple[Stage, ...]
    report: ReportSpec
    curve: CurveSpec | None = None
    source: str = "<case>"

    def mixed_feed(self) -> dict[str, float]:
        """All feeds together, species to flow [mol/s]."""
        total: dict[str, float] = {}
        for feed in self.feeds:
            for name, flow in feed.stream.feed_mol().items():
                total[name] = total.get(name, 0.0) + flow
        return total

    @property
    def feed_temperatures_known(self) -> bool:
        return all(feed.T_given for feed in self.feeds)

    def with_uncertainty(self) -> Case:
        """The same case with uncertainty asked for in every stage (``settle --uncertainty``)."""
        return replace(self, stages=tuple(replace(stage, uncertainty=True) for stage in self.stages))


#: Every key of a case file, by table, with its meaning (the reference printed by `gibbsmin settle --keys`).
CASE_KEYS: dict[str, dict[str, str]] = {
    "case": {
        "title": "a title for the report",
        "normal_conditions": "what Nm3 means: 'DIN 1343' (0 degC, 1.01325 bar; default), 'ISO 13443' "
                             "(15 degC), 'US gas' (60 degF, 14.696 psia)",
    },
    "feed": {
        "unit": "unit of the species' numbers: a flow (kmol/h, kg/h, Nm3/h, t/h, lbmol/h) or a composition "
                "(mol%, fraction, ppmv)",
        "<species>": "flow or composition of a species, e.g. CH4 = 950.0, or with its own unit: "
                     "H2O = \"52 t/h\"",
        "total": "total flow when the species are a composition, e.g. '25000 Nm3/h'; with basis = 'dry' the "
                 "dry gas flow (steam from steam_to_carbon or steam_rate comes on top), with water_content the "
                 "wet flow including that water",
        "basis": "'wet' (default) or 'dry': a dry analysis leaves water out",
        "water_content": "with basis = 'dry': water in the wet stream, e.g. '2 mol%' (total is then the wet flow)",
        "normalize": "true to scale a composition that does not sum to 100 %",
        "steam_to_carbon": "add steam up to this S/C ratio [mol H2O per mol C]",
        "steam_rate": "add this much steam, e.g. '52 t/h'",
        "carbon_basis": "which carbon S/C counts: 'hydrocarbon' (default; CO, CO2 left out) or 'all'",
        "T": "feed temperature, e.g. '520 degC' (the energy balance needs it)",
        "P": "feed pressure, e.g. '32 bar(g)'",
        "<name>": "sub-tables [feed.<name>] with the keys above: several feeds, mixed at the inlet",
    },
    "conditions": {
        "T": "outlet temperature with its unit, e.g. '850 degC' or '1123.15 K' (not with adiabatic; a bare "
             "number is refused)",
        "P": "pressure, e.g. '30 bar(g)', '31 bar', '450 psia'",
        "adiabatic": "true: the outlet temperature follows from the energy balance",
        "heat_loss": "with adiabatic: heat lost, e.g. '0.5 MW' (zero or positive; a gain is a heat_input)",
        "heat_input": "with adiabatic: heat added, e.g. '85 MW' (negative: removed)",
        "T_in": "stages after the first: temperature the previous outlet is cooled or heated to",
        "approach": "table of reaction = temperature approach, e.g. \"steam methane reforming\" = '10 K' "
                    "(positive: short of equilibrium)",
        "gas": "gas model: 'ideal' (default), 'peng-robinson', 'srk'",
        "kij": "with a cubic gas model: 'shipped' (default; the published kij table) or 'none' (all zero)",
        "kij_pairs": "with a cubic gas model: your own kij over that table, e.g. [conditions.kij_pairs] "
                     "\"H2 NH3\" = 0.05 (two species names and a value between -1 and 1)",
        "method": "solver: 'auto' (default), 'newton', 'convex'",
        "data": "thermochemical data set: 'atct-anchored' (default: NASA polynomials re-anchored to the "
                "Active Thermochemical Tables at 298.15 K, with uncertainties) or 'nasa-1993' (as published)",
        "uncertainty": "true: the report shows the standard uncertainty from the data set's formation enthalpies "
                       "beside each flow, mol%, outlet temperature, approach and carbon limit (needs a data set "
                       "that states them, 'atct-anchored'; `settle --uncertainty` asks for it in every stage)",
        "name": "a name for the stage in the report",
        "type": "what the stage is: 'reactor' (default; settles to equilibrium as its reactions allow), "
                "'heater' or 'cooler' (composition unchanged; T or duty), 'knock-out' (cooled to T: only water "
                "condenses, as pure liquid; the liquid is drawn off and the next stage takes the vapour), 'separator' "
                "(a flash at its T and P with the stage's cubic gas model, which describes the vapour and the "
                "liquid solution alike: nothing reacts, every species keeps its flow and is shared between the two "
                "outlets; needs gas = 'peng-robinson' or 'srk')",
        "next": "a separator: the outlet the next stage takes, 'vapour' (default) or 'liquid'",
        "service": "a reactor's service, which sets the reactions allowed and so the species set: 'HT shift', "
                   "'LT shift', 'methanation', 'ammonia synthesis', 'methanol synthesis' (the report states "
                   "the set; not with reactions)",
        "reactions": "reactions that may proceed in this reactor, e.g. ['water-gas shift']; every other "
                     "species keeps its inlet flow, no other species forms (default: every reaction of the "
                     "species set)",
        "frozen": "species held at their inlet flow in this stage, e.g. ['CH4'] (besides [species] frozen)",
        "duty": "a heater, cooler or knock-out: heat added instead of the outlet T, e.g. '-12.5 MW' "
                "(negative: removed)",
    },
    "stage": {"(keys of [conditions])": "[[stage]] tables, one per stage in order, each taking the last outlet"},
    "species": {
        "only": "the species set, e.g. ['CH4', 'H2O', 'CO', 'CO2', 'H2'] (default: every species made of "
                "the feed's elements)",
        "exclude": "species left out, e.g. ['C(s)']",
        "frozen": "species that keep their feed amount (inerts such as N2, Ar), e.g. ['N2']",
        "allow_extrapolation": "true to use species data outside their fitted temperature ranges",
    },
    "curve": {
        "y": "species whose equilibrium mol% is drawn against T, e.g. 'NH3'",
        "conversion": "or: species whose conversion from the feed is drawn, e.g. 'SO2'",
        "T_from": "lowest temperature of the curve, e.g. '350 degC'",
        "T_to": "highest temperature of the curve, e.g. '650 degC'",
        "points": "number of points (default 41)",
    },
    "report": {
        "flow_unit": "unit of flows in the report (default kmol/h)",
        "temperature_unit": "degC (default), K or degF",
        "pressure_unit": "bar (default), bar(g), MPa, psia, psig, atm ...",
        "cutoff": "smallest mole fraction shown, e.g. '1 ppmv' (default) or '1 ppbv'",
        "show": "only these species, e.g. ['H2', 'CO', 'CO2', 'CH4']",
        "partial_pressures": "true to add partial pressures",
        "kp": "reactions whose Kp (with its units) is reported, e.g. ['N2O4 = 2 NO2']",
        "approach": "reactions whose approach temperature at each outlet is reported, e.g. ['shift']",
        "carbon": "true to report the carbon activity against graphite",
    },
}
