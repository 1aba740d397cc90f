"""The connections of a flowsheet: which unit makes and takes each stream, the order units run in, the tear streams
that open every recycle, and the check that every inert has a way out of the loop it enters."""

from __future__ import annotations

import itertools
from collections.abc import Mapping
from dataclasses import dataclass

from ..errors import InputError
from .units import Context, Reactor, Unit

#: Most tear streams searched for automatically (a loop needing more names them, [flowsheet] tear).
_MOST_TEARS = 4


@dataclass(frozen=True)
class Structure:
    """What the connections say.

    Attributes
    ----------
    order : tuple of int
        Indexes of the units in the order they run, once the tear streams are given.
    tears : tuple of str
        The streams whose values are guessed and converged.
    sources, sinks : mapping
        Stream name to the index of the unit that makes it / takes it (feeds have no source, products no sink).
    boundary_in, boundary_out : tuple of str
        The feeds, and the streams no unit takes (the products, purges and vents).
    """

    order: tuple[int, ...]
    tears: tuple[str, ...]
    sources: Mapping[str, int]
    sinks: Mapping[str, int]
    boundary_in: tuple[str, ...]
    boundary_out: tuple[str, ...]


def structure(units: tuple[Unit, ...], feeds: tuple[str, ...], tears: tuple[str, ...] | None = None) -> Structure:
    """Check the connections and find the run order and the tear streams (``tears``: the user's choice)."""
    sources: dict[str, int] = {}
    sinks: dict[str, int] = {}
    for k, unit in enumerate(units):
        _check_counts(unit)
        for name in unit.outlets:
            if name in feeds:
                raise InputError(f"stream {name!r} is a feed and also an outlet of unit {unit.name!r}: a stream has one "
                                 "source; rename the outlet, or remove the feed")
            if name in sources:
                raise InputError(f"stream {name!r} is an outlet of both {units[sources[name]].name!r} and "
                                 f"{unit.name!r}: a stream has one source; rename one of them (join streams with a "
                                 "mixer)")
            sources[name] = k
        for name in unit.inlets:
            if name in unit.outlets:
                raise InputError(f"unit {unit.name!r} takes its own outlet {name!r} as an inlet; give the outlet "
                                 "another name (a recycle goes through at least one other unit)")
            if name in sinks:
                raise InputError(f"stream {name!r} is taken by both {units[sinks[name]].name!r} and {unit.name!r}: "
                                 "a stream goes to one unit; put a splitter before them")
            sinks[name] = k
    for name, k in sinks.items():
        if name not in sources and name not in feeds:
            known = ", ".join(sorted([*feeds, *sources]))
            raise InputError(f"unit {units[k].name!r} takes stream {name!r}, which no unit makes and no feed is; "
                             f"add a [feed.{name}] table or name it as a unit's outlet (streams: {known})")
    unused = [name for name in feeds if name not in sinks]
    if unused:
        raise InputError(f"feed {unused[0]!r} goes to no unit; name it in a unit's inlets, or remove it")
    internal = [name for name in sources if name in sinks]
    chosen = _tears(units, sources, sinks, internal, tears)
    order = _order(units, sources, sinks, chosen)
    boundary_out = tuple(name for name in sources if name not in sinks)
    if not boundary_out:
        raise InputError("no stream leaves the flowsheet: every outlet goes to another unit, so nothing fed can "
                         "leave; give the loop a purge (a splitter's outlet no unit takes) or a product stream")
    return Structure(order, chosen, sources, sinks, tuple(feeds), boundary_out)


def _check_counts(unit: Unit) -> None:
    for what, names, (least, most) in (("inlet", unit.inlets, unit.inlet_count),
                                       ("outlet", unit.outlets, unit.outlet_count)):
        if len(names) < least or (most is not None and len(names) > most):
            wanted = f"{least}" if least == most else f"at least {least}" if most is None else f"{least} to {most}"
            raise InputError(f"unit {unit.name!r} ({unit.kind}) has {len(names)} {what}(s); it takes {wanted}")
        if len(set(names)) != len(names):
            raise InputError(f"unit {unit.name!r} names the same {what} twice: {', '.join(names)}")


def _edges(units, sources, sinks, opened) -> dict[int, set[int]]:
    edges: dict[int, set[int]] = {k: set() for k in range(len(units))}
    for name, k in sources.items():
        if name in sinks and name not in opened:
            edges[k].add(sinks[name])
    return edges


def _acyclic(edges: Mapping[int, set[int]]) -> bool:
    return _topological(edges) is not None


def _topological(edges: Mapping[int, set[int]]) -> list[int] | None:
    """Units in an order where each comes after every unit it takes from (ties by their place in the file)."""
    incoming = {k: 0 for k in edges}
    for targets in edges.values():
        for j in targets:
            incoming[j] += 1
    ready = sorted(k for k, n in incoming.items() if n == 0)
    order = []
    while ready:
        k = ready.pop(0)
        order.append(k)
        for j in sorted(edges[k]):
            incoming[j] -= 1
            if incoming[j] == 0:
                ready.append(j)
                ready.sort()
    return order if len(order) == len(edges) else None


def _tears(units, sources, sinks, internal, given) -> tuple[str, ...]:
    if given is not None:
        wrong = [name for name in given if name not in internal]
        if wrong:
            raise InputError(f"tear stream {wrong[0]!r} is not a stream between two units; tear one of: "
                             f"{', '.join(internal)}")
        if not _acyclic(_edges(units, sources, sinks, set(given))):
            raise InputError(f"the tear streams {', '.join(given)} leave a recycle closed; add a stream of that loop "
                             "to [flowsheet] tear, or leave tear out to have them chosen")
        return tuple(given)
    if _acyclic(_edges(units, sources, sinks, set())):
        return ()
    # Prefer the stream that enters a mixer (the recycle joining the make-up), then the file's order.
    ranked = sorted(internal, key=lambda name: (units[sinks[name]].kind != "mixer", internal.index(name)))
    for count in range(1, _MOST_TEARS + 1):
        for chosen in itertools.combinations(ranked, count):
            if _acyclic(_edges(units, sources, sinks, set(chosen))):
                return chosen
    raise InputError(f"no {_MOST_TEARS} streams open every recycle of this flowsheet; name the tear streams in "
                     "[flowsheet] tear")


def _order(units, sources, sinks, tears) -> tuple[int, ...]:
    order = _topological(_edges(units, sources, sinks, set(tears)))
    assert order is not None
    return tuple(order)


def recycles(units: tuple[Unit, ...], s: Structure) -> list[set[int]]:
    """The recycles: sets of units that reach each other (strongly connected, more than one unit)."""
    edges = _edges(units, s.sources, s.sinks, set())
    reach = {k: reachable(edges, k) for k in edges}
    groups: list[set[int]] = []
    for k in edges:
        group = {j for j in reach[k] if k in reach[j]}
        if k in group and group not in groups:
            groups.append(group)
    return groups


def reachable(edges: Mapping[int, set[int]], start: int) -> set[int]:
    """The units reached from ``start`` along ``edges`` (unit to the units it feeds), ``start`` only by a cycle."""
    seen: set[int] = set()
    stack = list(edges[start])
    while stack:
        k = stack.pop()
        if k not in seen:
            seen.add(k)
            stack.extend(edges[k])
    return seen


def check_way_out(units: tuple[Unit, ...], s: Structure, fed: Mapping[str, Mapping[str, float]],
                  context: Context) -> None:
    """Refuse a recycle that a fed species enters and cannot leave: no exit stream carries it and no reactor of the
    loop turns it into anything else, so it would build up without end."""
    edges = _edges(units, s.sources, s.sinks, set())
    for group in recycles(units, s):
        entering: set[str] = set()
        for feed, flows in fed.items():
            first = s.sinks[feed]
            if first in group or group & reachable(edges, first):
                entering.update(name for name, n in flows.items() if n > 0.0)
        exits = [(name, k) for name, k in s.sources.items() if k in group and s.sinks.get(name) not in group]
        reactors = [units[k] for k in group if isinstance(units[k], Reactor)]
        for species in sorted(entering):
            if any(r.consumes(species, context) for r in reactors):
                continue
            if any(units[k].carries(species, name, context) for name, k in exits):
                continue
            loop = ", ".join(units[k].name for k in sorted(group))
            raise InputError(f"{species} enters the recycle through {loop} and nothing takes it out: no outlet of the "
                             f"loop carries it{' (no purge)' if exits else ' (the loop has no outlet)'} and no reactor "
                             f"there converts it, so it would build up without end; add a purge (a splitter whose "
                             "outlet leaves the flowsheet) or a removal step for it")
