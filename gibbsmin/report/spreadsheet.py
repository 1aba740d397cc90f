"""Reports as spreadsheets: CSV (every table a block of its own) and XLSX (one sheet per table).

CSV: the report's title, facts and caution come first; then each table is a
block after a blank line: lines starting with ``#`` (its name and title, then
its notes), then a plain rectangular table (a header row and the rows), so
that a block read without its ``#`` lines is what ``pandas.read_csv`` takes.

XLSX: a summary sheet (title, facts, notes, caution, and each sheet's title and
notes), then one sheet per table with the column headings in row 1 and the
rows below, so that ``pandas.read_excel(path, sheet_name=...)`` reads it as it is.

Numbers are written to 12 significant digits (the terminal and HTML forms
round further), so a sum's last bit (865.0000000000001) and a negative zero do
not show; text that a spreadsheet would read as a formula (starting with =, +,
- or @) is written as text.
"""

from __future__ import annotations

import csv
import io
import re

from .document import Report, Table
from .numbers import clean_number

_FORMULA_START = ("=", "+", "-", "@")
_NUMBER_FORMATS = {"percent": "0.0000", "flow": "0.00", "fixed2": "0.00", "fixed1": "0.0", "fixed3": "0.000",
                   "exp": "0.000E+00", "number": "General", "uncertainty": "0.0E+00"}
_FILLS = {"pass": "D8F0DF", "warn": "FBEFC5", "fail": "F6D0CB"}


def _safe_text(value: object) -> object:
    """A cell value that no spreadsheet runs as a formula."""
    if isinstance(value, str) and value.startswith(_FORMULA_START):
        return "'" + value
    return value


def _number(value: object) -> object:
    """Numbers as clean floats (bools and texts as they are)."""
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        return clean_number(float(value))
    return value


def _csv_value(value: object) -> object:
    if value is None:
        return ""
    if isinstance(value, float) or isinstance(value, int) and not isinstance(value, bool):
        return repr(_number(value))
    return _safe_text(value)


def _comment(text: str) -> str:
    """A '#' line of a CSV block (one line, whatever the text holds)."""
    return "# " + " ".join(str(text).split()) + "\n"


def render_csv(report: Report) -> str:
    """The report as CSV: title, facts and caution, then each table as a block (see the module docstring)."""
    out = io.StringIO()
    writer = csv.writer(out, lineterminator="\n")
    writer.writerow([_safe_text(report.title)])
    for label, text in report.facts:
        writer.writerow([_safe_text(label), _safe_text(text)])
    writer.writerow([_safe_text(report.caution)])
    for table in report.tables:
        out.write("\n")
        out.write(_comment(f"table {table.key}: {table.title}" if table.key else f"table: {table.title}"))
        for note in table.notes:
            out.write(_comment(note))
        _write_table(writer, table)
    return out.getvalue()


def _write_table(writer, table: Table) -> None:
    writer.writerow([_safe_text(c.title) for c in table.columns])
    for row in table.rows:
        writer.writerow([_csv_value(v) for v in row])


def render_table_csv(table: Table) -> str:
    """One table alone as CSV: its header row and its rows, nothing else (a file another reader takes as it is)."""
    out = io.StringIO()
    _write_table(csv.writer(out, lineterminator="\n"), table)
    return out.getvalue()


def _sheet_name(table: Table, taken: set[str]) -> str:
    base = re.sub(r"[\[\]:*?/\\']", " ", table.key or table.title).strip()[:28] or "table"
    name, i = base, 2
    while name.casefold() in taken:
        name = f"{base[:25]} {i}"
        i += 1
    taken.add(name.casefold())
    return name


def _text_cell(sheet, row: int, column: int, value: str):
    cell = sheet.cell(row=row, column=column, value=value)
    cell.data_type = "s"  # never a formula, whatever the text starts with
    return cell


def render_xlsx(report: Report) -> bytes:
    """The report as an XLSX workbook: a summary sheet, then one sheet per table (headings in row 1)."""
    from openpyxl import Workbook
    from openpyxl.styles import Alignment, Font, PatternFill

    book = Workbook()
    summary = book.active
    summary.title = "summary"
    _text_cell(summary, 1, 1, report.title).font = Font(bold=True, size=14)
    row = 3
    for label, text in report.facts:
        _text_cell(summary, row, 1, label).font = Font(bold=True)
        _text_cell(summary, row, 2, text)
        row += 1
    row += 1
    for note in report.notes:
        _text_cell(summary, row, 1, note)
        row += 1
    caution = _text_cell(summary, row + 1, 1, report.caution)
    caution.font = Font(bold=True, color="C0392B")
    caution.alignment = Alignment(wrap_text=True)
    row += 3
    summary.column_dimensions["A"].width = 24
    summary.column_dimensions["B"].width = 90
    taken = {"summary"}
    for table in report.tables:
        name = _sheet_name(table, taken)
        _text_cell(summary, row, 1, f"sheet {name}").font = Font(bold=True)
        _text_cell(summary, row, 2, table.title)
        for note in table.notes:
            row += 1
            _text_cell(summary, row, 2, note)
        row += 1
        sheet = book.create_sheet(name)
        for j, column in enumerate(table.columns, start=1):
            _text_cell(sheet, 1, j, column.title).font = Font(bold=True)
            sheet.column_dimensions[sheet.cell(row=1, column=j).column_letter].width = max(12, len(column.title) + 2)
        sheet.freeze_panes = "A2"
        for i, values in enumerate(table.rows):
            for j, (value, column) in enumerate(zip(values, table.columns)):
                if isinstance(value, str):
                    cell = _text_cell(sheet, i + 2, j + 1, value)
                    if column.style == "verdict" and value in _FILLS:
                        cell.fill = PatternFill("solid", fgColor=_FILLS[value])
                elif value is not None:
                    cell = sheet.cell(row=i + 2, column=j + 1, value=_number(value))
                    cell.number_format = _NUMBER_FORMATS.get(table.style(i, j), "General")
    buffer = io.BytesIO()
    book.save(buffer)
    return buffer.getvalue()
