"""The figures a loop engineer reads first off a converged flowsheet: production, conversion per pass, recycle
ratio, inerts at the converter inlet, purge and its hydrogen loss, compressor power and exchanger duties.

Pure computation on a :class:`~gibbsmin.flowsheet.FlowsheetResult`: flows in mol/s, fractions in [-], powers and
duties in W.  A figure that does not apply to the flowsheet (no reactor, no recycle, no purge) is None.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass

from ..errors import InputError
from ..thermo import SpeciesDatabase
from .converge import FlowsheetResult
from .graph import recycles
from .material import Material, added
from .units import Context, Exchanger, Mixer, Reactor, Splitter

#: Relative change of a species' flow over the reactors below which, with no context to ask, it counts as not
#: consumed (an inert the reactors hold).
_UNCHANGED = 1e-9

#: Where the production was counted.
LIQUID_BASIS = "liquid boundary-out streams"
ALL_OUT_BASIS = "all boundary-out streams"


@dataclass(frozen=True)
class LoopSummary:
    """The loop's headline figures (None where a figure does not apply).

    Attributes
    ----------
    product : str or None
        The species counted as the product (the reactors' largest net production unless named).
    production_mol_s : float or None
        The product's flow in ``product_streams``, [mol/s].
    production_basis : str or None
        ``LIQUID_BASIS`` (its liquid in the boundary-out streams that carry it as liquid) or ``ALL_OUT_BASIS``.
    product_streams : tuple of str
    product_elsewhere_mol_s : float or None
        The product leaving by the other boundary-out streams (purge, vents, its vapour), [mol/s].
    key_reactant : str or None
        The fed species the reactors consume most (in mol/s).
    conversion_per_pass : float or None
        Its consumption over all reactors over its flow at the first reactor's inlet, [-].
    reactor_inlets : tuple of str
        The first reactor's inlet streams.
    recycle_streams : tuple of str
        The streams that close the recycles (those joining the make-up at a mixer; else the tear streams).
    feed_streams : tuple of str
        The boundary-in streams.
    recycle_ratio : float or None
        Recycle flow over the total boundary-in flow, [-].
    inerts : mapping
        Species no reactor consumes to its mole fraction at the first reactor's inlet, [-].
    inert_fraction : float or None
        Their sum, [-].
    inert_basis : str
        How the inerts were told: the reactors' own rule (``Reactor.consumes``), or their flows unchanged over the
        reactors when no context was given.
    purge_streams : tuple of str
        Boundary-out gas streams that leave from a splitter.
    purge_mol_s : float or None
    hydrogen_loss : float or None
        H2 in the purge over H2 fed, [-].
    compressor_power_W : float or None
        Shaft power of every unit that reports one, together, [W].
    exchanger_duties_W : mapping
        Each heater's or cooler's heat added (negative: removed), [W].
    """

    product: str | None
    production_mol_s: float | None
    production_basis: str | None
    product_streams: tuple[str, ...]
    product_elsewhere_mol_s: float | None
    key_reactant: str | None
    conversion_per_pass: float | None
    reactor_inlets: tuple[str, ...]
    recycle_streams: tuple[str, ...]
    feed_streams: tuple[str, ...]
    recycle_ratio: float | None
    inerts: Mapping[str, float]
    inert_fraction: float | None
    inert_basis: str
    purge_streams: tuple[str, ...]
    purge_mol_s: float | None
    hydrogen_loss: float | None
    compressor_power_W: float | None
    exchanger_duties_W: Mapping[str, float]


def loop_summary(result: FlowsheetResult, db: SpeciesDatabase, product: str | None = None,
                 context: Context | None = None) -> LoopSummary:
    """The headline figures of a converged flowsheet (see :class:`LoopSummary`).

    ``product`` names the species counted as the product (default: the reactors' largest net production);
    ``context`` (the flowsheet's, with the case's frozen species) lets each reactor say what it consumes.
    """
    streams, s = result.streams, result.structure
    units = result.units
    reactors = [units[k] for k in s.order if isinstance(units[k], Reactor)]
    change = _net_change(reactors, streams, db)
    fed = _folded(added(*(streams[name].flows for name in s.boundary_in)), db)
    if product is not None:
        product = db[product].name if product in db else product
        if not any(product in _folded(streams[name].flows, db) for name in s.boundary_out):
            raise InputError(f"product {product!r} leaves by no boundary-out stream "
                             f"({', '.join(s.boundary_out)}); name a species one of them carries")
    elif reactors:
        made = {sp: n for sp, n in change.items() if n > 0.0}
        product = max(made, key=made.__getitem__) if made else None
    production, basis, product_streams, elsewhere = _production(result, product, db)
    key, conversion, inlets = _conversion(reactors, streams, change, fed, db)
    recycle = _recycle_streams(result)
    feed_total = sum(streams[name].total for name in s.boundary_in)
    ratio = sum(streams[name].total for name in recycle) / feed_total if recycle and feed_total > 0 else None
    context = context or result.context
    inerts, inert_basis = _inerts(reactors, inlets, streams, change, context, db)
    purges = tuple(name for name in s.boundary_out
                   if isinstance(units[s.sources[name]], Splitter) and streams[name].liquid_fraction == 0.0)
    purge_flow = sum(streams[name].total for name in purges) if purges else None
    h2_fed = fed.get("H2", 0.0)
    h2_loss = (sum(streams[name].flows.get("H2", 0.0) for name in purges) / h2_fed
               if purges and h2_fed > 0.0 else None)
    powers = [o.power_W for o in result.outcomes.values() if o.power_W is not None]
    duties = {u.name: float(result.outcomes[u.name].duty_W) for u in units
              if isinstance(u, Exchanger) and result.outcomes[u.name].duty_W is not None}
    return LoopSummary(product, production, basis, product_streams, elsewhere, key, conversion, inlets, recycle,
                       s.boundary_in, ratio, inerts, sum(inerts.values()) if inlets else None, inert_basis, purges,
                       purge_flow, h2_loss, float(sum(powers)) if powers else None, duties)


def _gas_name(species: str, db: SpeciesDatabase) -> str:
    """A condensed form under its gas's name (H2O(l) as H2O), so that a species' balance counts both."""
    if species.endswith("(l)") and species[:-3] in db:
        return db[species[:-3]].name
    return species


def _folded(flows: Mapping[str, float], db: SpeciesDatabase) -> dict[str, float]:
    folded: dict[str, float] = {}
    for sp, n in flows.items():
        name = _gas_name(sp, db)
        folded[name] = folded.get(name, 0.0) + n
    return folded


def _net_change(reactors, streams: Mapping[str, Material], db) -> dict[str, float]:
    """Species to their net production over every reactor (negative: consumed), [mol/s]."""
    change: dict[str, float] = {}
    for r in reactors:
        inflow = _folded(added(*(streams[name].flows for name in r.inlets)), db)
        outflow = _folded(added(*(streams[name].flows for name in r.outlets)), db)
        for sp in set(inflow) | set(outflow):
            change[sp] = change.get(sp, 0.0) + outflow.get(sp, 0.0) - inflow.get(sp, 0.0)
    return change


def _liquid_part(m: Material, species: str, db) -> float:
    """The species' flow in the stream's liquid (its liquid solutions and its condensed form), [mol/s]."""
    if m.liquid_fraction >= 1.0:
        return _folded(m.flows, db).get(species, 0.0)
    return sum(n for name, phase in m.phases.items() if name != "gas"
               for sp, n in phase.items() if _gas_name(sp, db) == species)


def _production(result: FlowsheetResult, product: str | None, db):
    if product is None:
        return None, None, (), None
    streams, out = result.streams, result.structure.boundary_out
    liquid = {name: _liquid_part(streams[name], product, db) for name in out if streams[name].liquid_fraction > 0.0}
    liquid = {name: n for name, n in liquid.items() if n > 0.0}
    everywhere = sum(_folded(streams[name].flows, db).get(product, 0.0) for name in out)
    if liquid:
        production = sum(liquid.values())
        return production, LIQUID_BASIS, tuple(liquid), everywhere - production
    carrying = tuple(name for name in out if _folded(streams[name].flows, db).get(product, 0.0) > 0.0)
    return everywhere, ALL_OUT_BASIS, carrying, 0.0


def _conversion(reactors, streams, change, fed, db):
    if not reactors:
        return None, None, ()
    inlets = reactors[0].inlets
    consumed = {sp: -n for sp, n in change.items() if n < 0.0 and fed.get(sp, 0.0) > 0.0}
    if not consumed:
        return None, None, inlets
    key = max(consumed, key=consumed.__getitem__)
    at_inlet = _folded(added(*(streams[name].flows for name in inlets)), db).get(key, 0.0)
    return key, consumed[key] / at_inlet if at_inlet > 0.0 else None, inlets


def _recycle_streams(result: FlowsheetResult) -> tuple[str, ...]:
    """In each recycle, the streams from inside it into a mixer that also takes a stream from outside (the make-up);
    where no mixer joins a loop that way, the tear streams."""
    units, s = result.units, result.structure
    found: list[str] = []
    for group in recycles(units, s):
        for k in sorted(group):
            unit = units[k]
            if not isinstance(unit, Mixer):
                continue
            inside = [name for name in unit.inlets if s.sources.get(name) in group]
            if len(inside) < len(unit.inlets):
                found += [name for name in inside if name not in found]
    return tuple(found) if found else tuple(s.tears)


def _inerts(reactors, inlets, streams, change, context, db) -> tuple[dict[str, float], str]:
    if not reactors:
        return {}, ""
    inlet = _folded(added(*(streams[name].flows for name in inlets)), db)
    total = sum(inlet.values())
    held, basis = inert_species(reactors, inlet, streams, db, context)
    return {sp: inlet[sp] / total for sp in held}, basis


def inert_species(reactors, flows: Mapping[str, float], streams: Mapping[str, Material], db: SpeciesDatabase,
                  context: Context | None = None) -> tuple[list[str], str]:
    """The species of ``flows`` that none of ``reactors`` consumes, and how that was told: by each reactor's own rule
    with the context, else by their flows unchanged over the reactors."""
    if context is not None:
        held = [sp for sp in flows if not any(r.consumes(sp, context) for r in reactors)]
        return held, "species no reactor consumes (each reactor's frozen species, reactions and the noble gases)"
    change = _net_change(reactors, streams, db)
    inflow = _folded(added(*(streams[name].flows for r in reactors for name in r.inlets)), db)
    held = [sp for sp in flows if abs(change.get(sp, 0.0)) <= _UNCHANGED * inflow.get(sp, 0.0)]
    return held, "species whose flow the reactors leave unchanged (no context given to ask the reactors)"
