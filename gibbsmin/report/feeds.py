"""The report's lines about a case's feeds: dry gas and steam apart, and S/C only where it means something.

A steam-to-carbon ratio says something where a hydrocarbon that can react
meets steam: in one feed, or where a hydrocarbon feed and a steam feed are
mixed.  A loop gas whose methane is held inert, or a gas without steam, gets
no S/C line.  The report never warns about the ratio itself; where the case
asked for S/C (``steam_to_carbon``), the case reader has warned already of
carbon the basis leaves out, and the line names that carbon too.
"""

from __future__ import annotations

import warnings
from collections.abc import Iterable

from ..case import Case, Feed, ReportSpec
from ..streams import Stream, counted_carbon
from ..units import from_mol_s

_STEAM = "H2O"
#: Carbon that no S/C basis is meant to count as feed carbon, so it is not worth naming.
_OXIDES = ("CO", "CO2")


def _flow(mol_s: float, spec: ReportSpec, molar_mass: float) -> str:
    return f"{from_mol_s(mol_s, spec.flow_unit, molar_mass=molar_mass):.6g} {spec.flow_unit}"


def _reacting_hydrocarbon(stream: Stream, frozen: Iterable[str]) -> bool:
    """Whether the stream holds a hydrocarbon that is free to react (not held at its feed amount)."""
    held = set(frozen)
    return any(n > 0.0 and s not in held and counted_carbon(stream.database[s], "hydrocarbon") > 0.0
               for s, n in stream.feed_mol().items())


def _steam(stream: Stream) -> float:
    return stream.feed_mol().get(_STEAM, 0.0)


def meets_steam(stream: Stream, frozen: Iterable[str]) -> bool:
    """Whether S/C means something for this stream: a hydrocarbon free to react, and steam."""
    return _steam(stream) > 0.0 and _reacting_hydrocarbon(stream, frozen)


def _uncounted_carbon(stream: Stream) -> list[str]:
    return [s for s, n in stream.feed_mol().items() if n > 0.0 and s not in _OXIDES
            and stream.database[s].elements.get("C", 0.0) > 0.0
            and counted_carbon(stream.database[s], stream.carbon_basis) == 0.0]


def steam_to_carbon_text(stream: Stream) -> str:
    """', S/C 3.000 (hydrocarbon basis)', naming any carbon the basis leaves out; no warning."""
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # the uncounted carbon is named in the text instead
        ratio = stream.steam_to_carbon()
    left_out = _uncounted_carbon(stream)
    also = f"; the carbon of {', '.join(left_out)} not counted" if left_out else ""
    return f", S/C {ratio:.3f} ({stream.carbon_basis} basis{also})"


def flow_text(feed: Feed, spec: ReportSpec, frozen: Iterable[str]) -> str:
    """The feed's flow, with its dry gas and its steam apart where it holds both."""
    stream = feed.stream
    amounts = stream.feed_mol()
    steam = amounts.get(_STEAM, 0.0)
    total = stream.total_flow(spec.flow_unit)
    if steam <= 0.0:
        return f"{total:.6g} {spec.flow_unit}"
    water_molar_mass = stream.database[_STEAM].molar_mass
    if steam >= stream.total_mol_s:
        return f"{_flow(steam, spec, water_molar_mass)} steam"
    dry = stream.total_mol_s - steam
    word = "steam" if meets_steam(stream, frozen) else "H2O"
    return (f"{_flow(dry, spec, stream.average_molar_mass(dry=True))} dry gas + "
            f"{_flow(steam, spec, water_molar_mass)} {word} ({total:.6g} {spec.flow_unit} in all)")


def mixed_steam_to_carbon(case: Case, frozen: Iterable[str]) -> str | None:
    """The S/C of the feeds mixed, where a hydrocarbon feed meets steam only there (None elsewhere)."""
    if len(case.feeds) < 2 or any(meets_steam(f.stream, frozen) for f in case.feeds):
        return None
    if not any(_reacting_hydrocarbon(f.stream, frozen) for f in case.feeds):
        return None
    if not any(_steam(f.stream) > 0.0 for f in case.feeds):
        return None
    like = case.feeds[0].stream
    mixed = case.mixed_feed()
    stream = Stream(tuple(mixed), tuple(mixed.values()), like.T, like.P, normal=like.normal,
                    carbon_basis=like.carbon_basis, database=like.database)
    return steam_to_carbon_text(stream).removeprefix(", ")
