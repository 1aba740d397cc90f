"""Stream tables as engineers receive them: one column per stream, one row per property, units in the sheet.

Layout (CSV, or the first sheet of an XLSX workbook)::

    Stream,      unit,    1,            2,       3
    Description, ,        Natural gas,  Steam,   Reformer feed
    Temperature, degC,    380,          400,     385.2
    Pressure,    bar(g),  40,           40,      39.5
    Phase,       ,        gas,          gas,     gas
    Total flow,  kmol/h,  1500,         5050,    6550
    CH4,         mol%,    93.5,         ,        21.4
    H2O,         kmol/h,  ,             5050,    5050
    ...

The first row holds the stream numbers (its first cell reads "Stream"); the
second column holds each row's unit.  Rows are recognised by their label
(case does not matter): description, temperature, pressure, phase (gas or
liquid), total flow (the wet total; molar, mass or normal-volume units), dry
flow (the total without water) and one row per species, whose unit is a flow
(kmol/h, kg/h, Nm3/h) or a composition: ``mol%`` (wet), ``mol% dry``,
``ppmv``, ``ppmv dry``.  An empty cell (or ``-``) is zero.  A liquid stream's
water is liquid water.  Rows whose label starts with ``#`` are comments.

Every unreadable cell is an :class:`~gibbsmin.errors.InputError` naming the
file, the cell (``C7``) and the stream and row.
"""

from __future__ import annotations

import csv
import difflib
import io
import math
import os
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from pathlib import Path

from ..errors import InputError, UnknownSpeciesError
from ..streams import Stream
from ..thermo import SpeciesDatabase, default_database
from ..units import NORMAL_DIN_1343, ReferenceConditions, to_fraction, to_kelvin, to_mol_s, to_pascal

__all__ = ["ROW_LABELS", "StreamTable", "TableStream", "read_stream_table"]

#: Row labels with a meaning of their own (any other row is a species).
ROW_LABELS: dict[str, str] = {
    "stream": "first row: the stream numbers or names (the unit column left empty)",
    "description": "what the stream is, e.g. 'Reformer outlet'",
    "temperature": "temperature, unit e.g. degC, K, degF",
    "pressure": "pressure, unit e.g. bar(g), bar, MPa, psig",
    "phase": "'gas' (default) or 'liquid' (water in a liquid stream is liquid water)",
    "total flow": "the stream's total (wet) flow: kmol/h, kg/h, Nm3/h ...; checked against the components",
    "dry flow": "the total without water, for dry compositions with water given as a flow",
    "<species>": "one row per species: a flow (kmol/h, kg/h, Nm3/h) or a composition (mol%, mol% dry, ppmv, ppmv dry)",
}
_ALIASES = {"name": "description", "temp": "temperature", "t": "temperature", "pressure (abs)": "pressure",
            "p": "pressure", "total": "total flow", "total molar flow": "total flow", "total mass flow": "total flow",
            "flow": "total flow", "dry gas flow": "dry flow", "dry total flow": "dry flow", "stream number": "stream",
            "stream no.": "stream", "stream no": "stream"}
_EMPTY = ("", "-", "\u2013", "\u2014", "nil", "none")
_LIQUID_FORMS = {"H2O": "H2O(l)"}


@dataclass(frozen=True)
class TableStream:
    """One column of a stream table, read.

    Attributes
    ----------
    id : str
        The stream number or name, as in the first row.
    description : str
    stream : Stream
        Species flows [mol/s] (liquid water as ``H2O(l)`` in a liquid stream), T [K], P [Pa].
    phase : str
        "gas" or "liquid".
    stated_total : float or None
        The total flow the sheet states, [mol/s]; None when it states none.
    composition_sum : float or None
        Sum of the stated composition, [-] (1 when it adds up), for streams given by composition.
    column : str
        Spreadsheet column letter of the stream, for messages.
    """

    id: str
    description: str
    stream: Stream
    phase: str
    stated_total: float | None
    composition_sum: float | None
    column: str

    @property
    def flows(self) -> dict[str, float]:
        """Species to flow, [mol/s]."""
        return self.stream.feed_mol()

    @property
    def T(self) -> float:
        return self.stream.T

    @property
    def P(self) -> float:
        return self.stream.P


@dataclass(frozen=True)
class StreamTable:
    """All streams of a table, by id, with the file they came from."""

    source: str
    streams: Mapping[str, TableStream]
    species: tuple[str, ...]

    def __getitem__(self, stream_id: str) -> TableStream:
        try:
            return self.streams[stream_id]
        except KeyError:
            close = difflib.get_close_matches(stream_id, list(self.streams), n=1)
            hint = f"; did you mean {close[0]!r}?" if close else f"; the table has {', '.join(self.streams)}"
            raise InputError(f"{self.source} has no stream {stream_id!r}{hint}") from None


def _column_letter(index: int) -> str:
    letters = ""
    index += 1
    while index:
        index, remainder = divmod(index - 1, 26)
        letters = chr(65 + remainder) + letters
    return letters


def _read_rows(path: Path) -> tuple[list[list[object]], str]:
    """The cells of a CSV file or of the first sheet of an XLSX workbook, and how to name the file in messages."""
    suffix = path.suffix.lower()
    if not path.exists():
        raise InputError(f"{path}: no such file; check the path")
    if suffix == ".csv":
        try:
            text = path.read_text(encoding="utf-8-sig")
        except UnicodeDecodeError:
            raise InputError(f"{path.name} is not UTF-8 text; save the CSV as UTF-8") from None
        try:
            dialect = csv.Sniffer().sniff(text[:4096], delimiters=",;\t")
        except csv.Error:
            dialect = csv.excel
        return [list(row) for row in csv.reader(io.StringIO(text), dialect)], path.name
    if suffix in (".xlsx", ".xlsm"):
        from openpyxl import load_workbook

        try:
            book = load_workbook(path, read_only=True, data_only=True)
        except Exception as exc:  # openpyxl raises many kinds for a damaged file; all mean the same to the user
            raise InputError(f"{path.name} cannot be read as an XLSX workbook ({type(exc).__name__}); "
                             "save it again from the spreadsheet program") from None
        sheet = book.worksheets[0]
        rows = [list(row) for row in sheet.iter_rows(values_only=True)]
        book.close()
        return rows, f"{path.name}, sheet {sheet.title!r}"
    raise InputError(f"{path.name}: a stream table must be a .csv or .xlsx file, not {suffix or 'a file without suffix'}")


def _text(value: object) -> str:
    if value is None:
        return ""
    if isinstance(value, float) and value.is_integer():
        return str(int(value))
    return str(value).strip()


def _number(value: object, where: str) -> float | None:
    """A cell as a number; None for an empty cell."""
    if value is None:
        return None
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        if not math.isfinite(value):
            raise InputError(f"{where}: {value!r} is not a finite number")
        return float(value)
    text = str(value).strip()
    if text.lower() in _EMPTY:
        return None
    try:
        number = float(text)
    except ValueError:
        hint = " (write decimals with a point, without thousands separators)" if "," in text else ""
        raise InputError(f"{where}: {text!r} is not a number{hint}") from None
    if not math.isfinite(number):
        raise InputError(f"{where}: {text!r} is not a finite number")
    return number


def _label(text: str) -> str:
    key = text.strip().lower()
    return _ALIASES.get(key, key)


def read_stream_table(path: str | os.PathLike[str], *, normal: ReferenceConditions = NORMAL_DIN_1343,
                      db: SpeciesDatabase | None = None) -> StreamTable:
    """Read a stream table (CSV or XLSX; see the module docstring for the layout).

    Raises
    ------
    InputError
        Naming the file and cell of the first problem.
    """
    db = db or default_database()
    path = Path(path)
    rows, name = _read_rows(path)
    # Keep each row's number in the sheet for messages, then drop the empty rows.
    row_number = {id(r): i + 1 for i, r in enumerate(rows)}
    rows = [r for r in rows if any(_text(c) for c in r)]
    if not rows:
        raise InputError(f"{name} is empty; the first row must hold 'Stream' and the stream numbers")
    header = rows[0]
    if _label(_text(header[0])) != "stream":
        raise InputError(f"{name}, cell A{row_number[id(header)]}: the first row must start with 'Stream' followed by the unit column "
                         f"and the stream numbers, not {_text(header[0])!r}")
    ids = [(j, _text(c)) for j, c in enumerate(header) if j >= 2 and _text(c)]
    if not ids:
        raise InputError(f"{name}: the first row names no streams (they start in column C)")
    seen: set[str] = set()
    for j, stream_id in ids:
        if stream_id in seen:
            raise InputError(f"{name}, cell {_column_letter(j)}{row_number[id(header)]}: stream {stream_id!r} appears twice")
        seen.add(stream_id)
    properties: dict[str, tuple[int, str, list[object]]] = {}
    species_rows: list[tuple[int, str, str, list[object]]] = []
    for row in rows[1:]:
        label = _text(row[0]) if row else ""
        if not label or label.startswith("#"):
            continue
        unit = _text(row[1]) if len(row) > 1 else ""
        key = _label(label)
        number = row_number[id(row)]
        if key in ROW_LABELS and key != "stream":
            if key in properties:
                raise InputError(f"{name}, row {number}: the row {label!r} appears twice")
            properties[key] = (number, unit, row)
            continue
        try:
            record = db[label]
        except UnknownSpeciesError as exc:
            rows_hint = difflib.get_close_matches(key, [k for k in ROW_LABELS if not k.startswith("<")], n=1)
            hint = f"did you mean the row {rows_hint[0]!r}?" if rows_hint else exc.message.split("; ", 1)[1]
            raise InputError(f"{name}, cell A{number}: {label!r} is neither a row label nor a known species; {hint}") from None
        species_rows.append((number, record.name, unit, row))
    if not species_rows:
        raise InputError(f"{name}: no species rows; add one row per species (e.g. 'CH4', 'kmol/h', ...)")
    names = [s for _, s, _, _ in species_rows]
    duplicate = next((s for s in names if names.count(s) > 1), None)
    if duplicate:
        raise InputError(f"{name}: species {duplicate} has two rows; give each species once")
    streams = {}
    for j, stream_id in ids:
        streams[stream_id] = _read_column(name, j, stream_id, properties, species_rows, normal, db)
    return StreamTable(name, streams, tuple(names))


def _cell(row: Sequence[object], j: int) -> object:
    return row[j] if j < len(row) else None


def _read_column(name: str, j: int, stream_id: str, properties, species_rows, normal: ReferenceConditions,
                 db: SpeciesDatabase) -> TableStream:
    letter = _column_letter(j)

    def where(number: int, what: str) -> str:
        return f"{name}, cell {letter}{number} (stream {stream_id}, {what})"

    def quantity(key: str, convert, required: bool = True):
        if key not in properties:
            if required:
                raise InputError(f"{name}: the table needs a {key!r} row (with its unit in column B)")
            return None
        number, unit, row = properties[key]
        value = _number(_cell(row, j), where(number, key))
        if value is None:
            if required:
                raise InputError(f"{where(number, key)}: empty; every stream needs its {key}")
            return None
        if not unit:
            raise InputError(f"{name}, cell B{number}: the {key} row needs its unit, e.g. "
                             f"{'degC' if key == 'temperature' else 'bar(g)' if key == 'pressure' else 'kmol/h'}")
        try:
            return convert(f"{value!r} {unit}")
        except InputError as exc:
            raise InputError(f"{where(number, key)}: {exc}") from None

    T = quantity("temperature", to_kelvin)
    P = quantity("pressure", to_pascal)
    phase = "gas"
    description = ""
    if "description" in properties:
        description = _text(_cell(properties["description"][2], j))
    if "phase" in properties:
        number, _, row = properties["phase"]
        phase = _text(_cell(row, j)).lower() or "gas"
        phase = {"vapour": "gas", "vapor": "gas", "v": "gas", "l": "liquid", "liq": "liquid"}.get(phase, phase)
        if phase not in ("gas", "liquid"):
            raise InputError(f"{where(number, 'phase')}: {phase!r} is not 'gas' or 'liquid'")
    flows: dict[str, float] = {}
    wet: dict[str, float] = {}
    dry: dict[str, float] = {}
    for number, species, unit, row in species_rows:
        value = _number(_cell(row, j), where(number, species))
        if value is None or value == 0.0:
            continue
        if value < 0:
            raise InputError(f"{where(number, species)}: {value:g} is negative; flows and fractions are zero or positive")
        if not unit:
            raise InputError(f"{name}, cell B{number}: the {species} row needs its unit (kmol/h, kg/h, mol%, mol% dry ...)")
        basis, text = _composition_basis(unit)
        try:
            if basis is None:
                flows[species] = to_mol_s(f"{value!r} {unit}", molar_mass=db[species].molar_mass, normal=normal)
            else:
                (dry if basis == "dry" else wet)[species] = to_fraction(f"{value!r} {text}")
        except InputError as exc:
            raise InputError(f"{where(number, species)}: {exc}") from None
    stated_total = None
    if "total flow" in properties:
        stated_total = _total(quantity, flows, wet, dry, db)
    dry_flow = quantity("dry flow", lambda text: to_mol_s(text, molar_mass=None, normal=normal), required=False) \
        if "dry flow" in properties else None
    flows, composition_sum = _combine(flows, wet, dry, stated_total, dry_flow, where, stream_id, name)
    if phase == "liquid":
        flows = {_LIQUID_FORMS.get(s, s): n for s, n in flows.items()}
    if not flows:
        raise InputError(f"{name}, column {letter}: stream {stream_id} has no flow in any species row")
    stream = Stream(tuple(flows), tuple(flows.values()), T, P, normal, database=db)
    return TableStream(stream_id, description, stream, phase, stated_total, composition_sum, letter)


def _composition_basis(unit: str) -> tuple[str | None, str]:
    """('wet' or 'dry', the fraction unit) for a composition unit ('mol% dry', 'ppmv (dry)'); (None, unit) for a flow."""
    words = unit.strip().replace("(", " ").replace(")", " ").split()
    basis = "dry" if "dry" in words else "wet"
    bare = " ".join(w for w in words if w not in ("dry", "wet")) or unit.strip()
    try:
        to_fraction(f"1 {bare}")
    except InputError as exc:
        if "unknown composition unit" in str(exc):
            return None, unit.strip()
        # A composition unit the reader refuses with its own reason (ppm, wt%): let the conversion say why.
    return basis, bare


def _total(quantity, flows, wet, dry, db) -> float:
    """The stated total [mol/s]; a mass total uses the stream's own average molar mass."""

    def convert(text: str) -> float:
        try:
            return to_mol_s(text)
        except InputError as exc:
            if "mass flow" not in str(exc):
                raise
        composition = flows or wet or dry
        total = sum(composition.values())
        molar_mass = sum(n * db[s].molar_mass for s, n in composition.items()) / total
        return to_mol_s(text, molar_mass=molar_mass)

    return quantity("total flow", convert)


def _combine(flows, wet, dry, stated_total, dry_flow, where, stream_id, name) -> tuple[dict[str, float], float | None]:
    """Component flows [mol/s] from flows and compositions, and the sum of the composition as stated."""
    if not wet and not dry:
        return flows, None
    if wet and dry and set(wet) != {"H2O"}:
        raise InputError(f"{name}: stream {stream_id} mixes wet and dry compositions; give one basis per stream "
                         "(only H2O may be a wet mol% beside a dry analysis)")
    if wet and not dry:
        if flows:
            raise InputError(f"{name}: stream {stream_id} mixes flows and a wet composition; give one or the other")
        if stated_total is None:
            raise InputError(f"{name}: stream {stream_id} is given as a composition and needs its total flow")
        total = sum(wet.values())
        return {s: x / total * stated_total for s, x in wet.items()}, total
    total = sum(dry.values())
    if wet:  # a dry analysis with the water content of the wet stream
        if stated_total is None:
            raise InputError(f"{name}: stream {stream_id} has a dry analysis with its water content and needs its "
                             "total flow")
        water_fraction = wet["H2O"]
        result = {s: x / total * stated_total * (1.0 - water_fraction) for s, x in dry.items()}
        result["H2O"] = stated_total * water_fraction
        return result, total
    water = flows.pop("H2O", None)
    if flows:
        raise InputError(f"{name}: stream {stream_id} mixes flows and a dry composition; only H2O may be a flow")
    if water is None:
        water = 0.0
    if dry_flow is None:
        if stated_total is None:
            raise InputError(f"{name}: stream {stream_id} has a dry composition and needs its dry flow or total flow")
        dry_flow = stated_total - water
    result = {s: x / total * dry_flow for s, x in dry.items()}
    if water:
        result["H2O"] = water
    return result, total
