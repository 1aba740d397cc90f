"""An outside reference for a flowsheet with recycle: an invented ammonia synthesis loop solved by successive
substitution on the recycle, with Cantera for the converter and thermo for the separator.

Converter: Cantera 3.2 (Goodwin, Moffat, Schoegl, Speth and Weber, 2025), an ideal-gas ``Solution`` of H2, N2,
NH3, CH4 and Ar built by tests/cantera_reference.py from gibbsmin's default data set ("atct-anchored": the NASA
TM-4513 polynomials re-anchored to ATcT delta-f H), each species' NASA-7 coefficients handed over with a 1 bar
reference pressure, and ``equilibrate("TP", solver="gibbs")`` (Cantera's MultiPhaseEquil).  C appears in CH4
alone and Ar in Ar alone, so the element balance keeps both at their inlet flows: they are inert without any
option.  Cantera works in mole fractions; the outlet's total amount is the inlet's total of atoms over the
equilibrium mixture's atoms per mole.

Separator: thermo 0.6 (Caleb Bell and contributors), ``FlashVL`` with ``CEOSGas`` and ``CEOSLiquid`` of class
``PR78MIX``, through tests/flash_reference.py: gibbsmin's Tc, Pc and omega, the shipped kij
(species/interactions.toml), H2's Gunn-Chueh-Prausnitz effective constants at the separator's T, and the
phases named by molar density; its successive substitution run to a tighter tolerance than thermo's default
(FLASH_SS_TOLERANCE), so the two phases' ln f agree to about 1e-13.  Every species is inert there (a T, P flash); the vapour and the liquid are
the feed times thermo's vapour fraction and its phase compositions.

Nothing here calls gibbsmin's solvers: gibbsmin supplies only the data both libraries are handed.  The loop
itself (REFERENCE_LOOP) is invented, test-only numbers; flows in mol/s, T in K, P in Pa.  The mixer adds
flows and has no temperature of its own (the converter runs at a fixed T).  The tear stream is the recycle,
started at zero; a pass runs the operations in their listed order.
"""

from __future__ import annotations

import functools
import math
import time
from collections.abc import Mapping
from typing import NamedTuple

from cantera_reference import cantera_gas
from flash_reference import thermo_flash

import gibbsmin

SPECIES = ("H2", "N2", "NH3", "CH4", "Ar")

REFERENCE_LOOP: dict = {
    "units": {"flow": "mol/s", "T": "K", "P": "Pa"},
    "species": SPECIES,
    "boundary_in": {
        "makeup": {"mole_fractions": {"H2": 0.7400, "N2": 0.2470, "CH4": 0.0095, "Ar": 0.0035},
                   "total": 1000.0, "T": 313.15, "P": 190e5},
    },
    "boundary_out": ("product", "purge"),
    "tear": "recycle",
    "operations": (
        {"kind": "mixer", "name": "loop mixer", "inlets": ("makeup", "recycle"), "outlet": "converter feed"},
        {"kind": "reactor", "name": "converter", "inlet": "converter feed", "outlet": "converter out",
         "T": 743.15, "P": 190e5, "gas": "ideal", "data": "atct-anchored", "inert": ("CH4", "Ar")},
        {"kind": "separator", "name": "separator", "inlet": "converter out", "T": 253.15, "P": 190e5,
         "gas": "peng-robinson", "vapour": "separator vapour", "liquid": "product"},
        {"kind": "splitter", "name": "purge split", "inlet": "separator vapour",
         "fractions": {"purge": 0.04, "recycle": 0.96}},
    ),
}

#: thermo's tolerance of its flash's successive substitution (FlashVL.PT_SS_TOL; its default 1e-13 leaves
#: about 4e-8 between the phases' ln f here, this one 3e-14).
FLASH_SS_TOLERANCE = 1e-26

#: Cantera's relative tolerance of the converter's equilibrium (its default, 1e-9, is coarser than the loop's).
EQUILIBRIUM_RTOL = 1e-14


class LoopReference(NamedTuple):
    """The converged reference loop.

    streams: name -> {species: flow [mol/s]} (every species of SPECIES, zero where absent); T and P: name ->
    temperature [K] (None for the converter feed, whose T the reference does not need) and pressure [Pa];
    passes: successive-substitution passes run; change: the largest relative change of any stream's flow in
    the last pass [-]; equilibrium_calls and flash_calls: Cantera equilibria and thermo flashes run;
    wall_time: seconds of the whole solve.
    """

    streams: dict[str, dict[str, float]]
    T: dict[str, float | None]
    P: dict[str, float]
    passes: int
    change: float
    equilibrium_calls: int
    flash_calls: int
    wall_time: float


def element_totals(flows: Mapping[str, float]) -> dict[str, float]:
    """Moles of each element [mol/s] in a stream's flows, by gibbsmin's species formulas."""
    database = gibbsmin.default_database()
    totals: dict[str, float] = {}
    for name, flow in flows.items():
        for element, count in database[name].elements.items():
            totals[element] = totals.get(element, 0.0) + count * flow
    return totals


def _check_inert_by_balance(names, inert) -> None:
    """The converter hands Cantera no inert list: each inert species must be alone in holding some element."""
    database = gibbsmin.default_database()
    for name in inert:
        others = {el for other in names if other != name for el in database[other].elements}
        if set(database[name].elements) <= others:
            raise ValueError(f"{name} shares all its elements with other species; the element balance would not "
                             "hold it fixed in Cantera's equilibrium")


@functools.cache
def _converter_gas(names: tuple[str, ...]):
    return cantera_gas(names)


def cantera_converter(flows: Mapping[str, float], T: float, P: float) -> dict[str, float]:
    """Cantera's ideal-gas equilibrium [mol/s] of ``flows`` at T [K], P [Pa]."""
    gas = _converter_gas(SPECIES)
    gas.TPX = T, P, {name: flows[name] for name in SPECIES}
    gas.equilibrate("TP", solver="gibbs", rtol=EQUILIBRIUM_RTOL)
    atoms_in = sum(element_totals(flows).values())
    atoms_per_mole = sum(element_totals(dict(zip(gas.species_names, gas.X))).values())
    total = atoms_in / atoms_per_mole
    return {name: float(total * x) for name, x in zip(gas.species_names, gas.X)}


def thermo_separator(flows: Mapping[str, float], T: float, P: float, gas: str) -> tuple[dict, dict]:
    """(vapour, liquid) flows [mol/s] of thermo's T, P flash of ``flows``."""
    present = {name: flow for name, flow in flows.items() if flow > 0.0}
    total = sum(present.values())
    result = thermo_flash(present, T, P, gas=gas, ss_tolerance=FLASH_SS_TOLERANCE)
    beta = result.vapour_fraction
    vapour = {name: (beta * total * result.y[name] if result.y else 0.0) for name in present}
    liquid = {name: ((1.0 - beta) * total * result.x[name] if result.x else 0.0) for name in present}
    return _complete(vapour), _complete(liquid)


def _complete(flows: Mapping[str, float]) -> dict[str, float]:
    return {name: float(flows.get(name, 0.0)) for name in SPECIES}


def _boundary_flows(spec: Mapping) -> dict[str, float]:
    return _complete({name: spec["total"] * y for name, y in spec["mole_fractions"].items()})


def _relative_change(new: Mapping[str, dict], old: Mapping[str, dict]) -> float:
    worst = 0.0
    for stream, flows in new.items():
        before = old.get(stream)
        for name, flow in flows.items():
            previous = before[name] if before is not None else 0.0
            if flow != previous:
                worst = max(worst, abs(flow - previous) / max(abs(flow), abs(previous)))
    return worst


class _Counts:
    def __init__(self) -> None:
        self.equilibria = 0
        self.flashes = 0


def _run_pass(loop: Mapping, streams: dict[str, dict], T: dict, P: dict, counts: _Counts) -> None:
    """One pass over the operations in order, writing each outlet into ``streams`` (and its T, P)."""
    for operation in loop["operations"]:
        kind = operation["kind"]
        if kind == "mixer":
            inlets = [streams[name] for name in operation["inlets"]]
            streams[operation["outlet"]] = {name: sum(inlet[name] for inlet in inlets) for name in SPECIES}
            T[operation["outlet"]] = None
            P[operation["outlet"]] = min(P[name] for name in operation["inlets"])
        elif kind == "reactor":
            outlet = cantera_converter(streams[operation["inlet"]], operation["T"], operation["P"])
            counts.equilibria += 1
            streams[operation["outlet"]] = outlet
            T[operation["outlet"]], P[operation["outlet"]] = operation["T"], operation["P"]
        elif kind == "separator":
            vapour, liquid = thermo_separator(streams[operation["inlet"]], operation["T"], operation["P"],
                                              operation["gas"])
            counts.flashes += 1
            for stream, flows in ((operation["vapour"], vapour), (operation["liquid"], liquid)):
                streams[stream] = flows
                T[stream], P[stream] = operation["T"], operation["P"]
        elif kind == "splitter":
            inlet = operation["inlet"]
            for stream, fraction in operation["fractions"].items():
                streams[stream] = {name: fraction * flow for name, flow in streams[inlet].items()}
                T[stream], P[stream] = T[inlet], P[inlet]
        else:
            raise ValueError(f"unknown operation kind {kind!r} in the reference loop")


def _check_loop(loop: Mapping) -> None:
    for operation in loop["operations"]:
        if operation["kind"] == "reactor":
            if operation["gas"] != "ideal" or operation["data"] != gibbsmin.thermo.datasets.DEFAULT_DATA:
                raise ValueError("the reference converter is Cantera's ideal gas on gibbsmin's default data set")
            _check_inert_by_balance(SPECIES, operation["inert"])


def reference_ammonia_loop(tolerance: float = 1e-12, max_passes: int = 5000,
                           loop: Mapping = REFERENCE_LOOP) -> LoopReference:
    """The loop solved by successive substitution on its tear stream until no stream's flow changes by more
    than ``tolerance`` (relative) in a pass; RuntimeError after ``max_passes`` passes without it.  ``loop`` has
    REFERENCE_LOOP's shape and species (a variant of its numbers, for a test)."""
    _check_loop(loop)
    start = time.perf_counter()
    streams: dict[str, dict] = {name: _boundary_flows(spec) for name, spec in loop["boundary_in"].items()}
    T = {name: spec["T"] for name, spec in loop["boundary_in"].items()}
    P = {name: spec["P"] for name, spec in loop["boundary_in"].items()}
    tear = loop["tear"]
    streams[tear] = _complete({})
    T[tear], P[tear] = None, max(P.values())
    counts = _Counts()
    previous: dict[str, dict] = {}
    change = math.inf
    for passes in range(1, max_passes + 1):
        _run_pass(loop, streams, T, P, counts)
        change = _relative_change(streams, previous)
        previous = {name: dict(flows) for name, flows in streams.items()}
        if change < tolerance:
            return LoopReference(previous, dict(T), dict(P), passes, change, counts.equilibria, counts.flashes,
                                 time.perf_counter() - start)
    raise RuntimeError(f"the reference loop did not settle in {max_passes} passes (last relative change "
                       f"{change:.3g} against {tolerance:g}); raise max_passes")


@functools.cache
def converged_reference() -> LoopReference:
    """The reference loop at the default tolerance, solved once per process (tests share it)."""
    return reference_ammonia_loop()
