"""The stream table of a settled case in the trade's layout: one column per stream, one row per figure.

Columns: each feed as given, then each stage's outlet (and a stage's inlet
where the case heats or cools the gas before it, ``T_in``); an outlet with a
liquid solution (a separator's, or a reactor's cooled below its dew point) is
two columns, its vapour and its liquid, whose mol% rows are of that phase
(a separator's next stage takes the one its ``next`` names).  Rows: T, P gauge
and absolute, the stream's total molar, normal-volume and mass flow and its
molar mass, then per species its molar flow, its mol% of the gas (wet) and its
mol% of the dry gas.  Every conversion is :class:`gibbsmin.streams.Stream`'s.

The first two columns (``item``, ``unit``) name each row, so a spreadsheet
reader takes the table as it is (``pandas.read_excel(..., index_col=[0, 1])``).
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass

from ..case import CaseResult, ReportSpec
from ..case.run import separator_outlets
from ..errors import InputError
from ..streams import Stream
from ..thermo import SpeciesDatabase, database_holding
from ..units import ReferenceConditions, from_kelvin
from .document import Column, Table
from .numbers import cutoff_text

#: The flow unit of the species rows and the total, as the trade's stream tables give it.
_FLOW = "kmol/h"


@dataclass(frozen=True)
class _Column:
    """One stream of the table: its heading, the whole stream and the fluid its mol% rows are of: its gas alone
    (None where it has no gas), or a liquid column's liquid solution (``liquid``)."""

    title: str
    whole: Stream
    gas: Stream | None
    T_given: bool = True  # a feed typed without a temperature has none to show
    liquid: bool = False


def _stream(amounts: Mapping[str, float], T: float, P: float, like: Stream, db: SpeciesDatabase) -> Stream:
    return Stream(tuple(amounts), tuple(amounts.values()), T, P, normal=like.normal, carbon_basis=like.carbon_basis,
                  database=db)


def _column(title: str, amounts: Mapping[str, float], T: float, P: float, like: Stream,
            liquid: bool = False) -> _Column:
    # A stage may use another data set than the feeds were read with, holding species theirs lacks.
    db = database_holding(amounts, like.database)
    present = {s: n for s, n in amounts.items() if n > 0.0 or db[s].is_gas}
    gas = {s: n for s, n in present.items() if db[s].is_gas}  # a liquid column: its solution, in gas species
    return _Column(title, _stream(present, T, P, like, db),
                   _stream(gas, T, P, like, db) if sum(gas.values()) > 0 else None, liquid=liquid)


def _outlet_title(name: str) -> str:
    return name if "outlet" in name.casefold() else f"{name} outlet"


def stream_columns(result: CaseResult) -> list[_Column]:
    """The streams of the table: the feeds, then each stage's inlet (where heated or cooled to it) and outlet."""
    case = result.case
    like = case.feeds[0].stream
    columns = []
    for feed in case.feeds:
        stream = feed.stream
        gas = {s: n for s, n in stream.feed_mol().items() if stream.database[s].is_gas}
        columns.append(_Column(feed.name, stream, _stream(gas, stream.T, stream.P, stream, stream.database) if sum(gas.values()) > 0
                               else None, feed.T_given))
    previous = None
    for stage in result.stages:
        eq = stage.equilibrium
        if stage.stage.T_in is not None and previous is not None:
            columns.append(_column(f"{stage.stage.name} inlet", stage.inlet.mixed, stage.stage.T_in, previous.P, like))
        outlets = separator_outlets(eq)
        if stage.stage.type == "separator" or eq.fluid_phases is not None:
            columns += [_column(f"{stage.stage.name} {outlet}", amounts, eq.T, eq.P, like, liquid=outlet == "liquid")
                        for outlet, amounts in outlets.items() if amounts]
        else:
            columns.append(_column(_outlet_title(stage.stage.name), eq.amounts, eq.T, eq.P, like))
        previous = eq
    return columns


def _normal_text(normal: ReferenceConditions) -> str:
    return f"Nm3/h ({normal.T - 273.15:.6g} degC, {normal.P / 1e5:.6g} bar)"


def _dry(column: _Column) -> dict[str, float]:
    gas = column.gas
    if gas is None or column.liquid:  # a liquid's composition is given wet only
        return {}
    try:
        return gas.composition("mol%", dry=True)
    except InputError:  # all water: no dry gas, so no dry composition
        return {}


def _species_order(columns: list[_Column], spec: ReportSpec) -> tuple[list[str], int]:
    """Species to list, by their largest share in any gas (then in any liquid solution), and how many gas species
    are left out."""
    largest: dict[str, float] = {}
    in_gas: dict[str, float] = {}
    condensed = []
    for column in columns:
        wet = column.gas.composition() if column.gas is not None else {}
        for s, n in column.whole.feed_mol().items():
            if s in wet:
                largest[s] = max(largest.get(s, 0.0), wet[s])
                if not column.liquid:
                    in_gas[s] = max(in_gas.get(s, 0.0), wet[s])
            elif n > 0.0 and s not in condensed:
                condensed.append(s)
    if spec.show is not None:
        shown = [s for s in largest if s in spec.show]
    else:
        shown = [s for s, y in largest.items() if y >= spec.cutoff]
    shown.sort(key=lambda s: (-in_gas.get(s, 0.0), -largest[s]))
    return shown + condensed, len(largest) - len(shown)


def stream_table(result: CaseResult) -> Table:
    """The stream table of a settled case (see the module docstring)."""
    spec = result.case.report
    columns = stream_columns(result)
    normal = result.case.feeds[0].stream.normal
    wet = [c.gas.composition("mol%") if c.gas is not None else {} for c in columns]
    dry = [_dry(c) for c in columns]
    flows = [c.whole.component_flows(_FLOW) for c in columns]
    unit = spec.temperature_unit
    rows: list[tuple[object, ...]] = [
        ("temperature", unit, *(from_kelvin(c.whole.T, unit) if c.T_given else None for c in columns)),
        ("pressure", "bar(g)", *(c.whole.pressure_in("bar(g)") for c in columns)),
        ("pressure", "bar abs", *(c.whole.pressure_in("bar") for c in columns)),
    ]
    styles = ["fixed2", "number", "number"]
    if spec.pressure_unit not in ("bar", "bar(g)"):
        rows.append(("pressure", spec.pressure_unit, *(c.whole.pressure_in(spec.pressure_unit) for c in columns)))
        styles.append("number")
    rows += [
        ("total flow", _FLOW, *(c.whole.total_flow(_FLOW) for c in columns)),
        ("total flow", _normal_text(normal), *(c.whole.total_flow("Nm3/h") for c in columns)),
        ("total flow", "kg/h", *(c.whole.total_flow("kg/h") for c in columns)),
        ("molar mass", "kg/kmol", *(c.whole.average_molar_mass() for c in columns)),
    ]
    styles += ["flow", "flow", "flow", "fixed3"]
    species, hidden = _species_order(columns, spec)
    gas_species = [s for s in species if any(s in w for w in wet)]
    condensed = [s for s in species if s not in gas_species]
    if condensed:  # the gas alone as well, where a stream carries graphite or liquid water
        gases = [None if c.liquid else c.gas for c in columns]
        rows += [("gas flow", _FLOW, *(g.total_flow(_FLOW) if g else 0.0 for g in gases)),
                 ("gas flow", _normal_text(normal), *(g.total_flow("Nm3/h") if g else 0.0 for g in gases))]
        styles += ["flow", "flow"]
    for s in species:
        rows.append((s, _FLOW, *(f.get(s, 0.0) for f in flows)))
        styles.append("flow")
    for s in gas_species:
        rows.append((s, "mol% wet", *(w.get(s, 0.0) if w else None for w in wet)))  # blank: no gas
        styles.append("percent")
    for s in gas_species:
        if any(s in d for d in dry):
            rows.append((s, "mol% dry", *(d.get(s, 0.0) if d else None for d in dry)))
            styles.append("percent")
    notes = [f"Nm3 at {normal.describe()}; mol% wet and dry are of the gas (water left out of the dry basis)"]
    liquids = [c.title for c in columns if c.liquid]
    if liquids:
        notes.append(f"{', '.join(liquids)}: a liquid solution; its mol% wet rows are of that liquid, with no dry "
                     "basis (Nm3 counted as if it were a gas)")
    if condensed:
        notes.append(f"{', '.join(condensed)}: condensed, in the total flows (Nm3 counted as ideal gas, as the "
                     "trade states it) but not in the gas flows or the gas mol%")
    if hidden:
        why = "not listed in [report] show" if spec.show else f"below {cutoff_text(spec.cutoff)} in every stream"
        notes.append(f"({hidden} gas species {why} not shown; the totals include them)")
    table_columns = (Column("item", "text"), Column("unit", "text"), *(Column(c.title, "number") for c in columns))
    return Table("Stream table", table_columns, tuple(rows), tuple(notes), key="streams", row_styles=tuple(styles))
