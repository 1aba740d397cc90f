"""Reports as spreadsheets: CSV (all tables in blocks, one after another) and XLSX (one sheet per table).

Numbers are written unrounded (the terminal and HTML forms round); text that
a spreadsheet would read as a formula (starting with =, +, - or @) is written
as text.
"""

from __future__ import annotations

import csv
import io
import re

from .document import Report, Table

_FORMULA_START = ("=", "+", "-", "@")
_NUMBER_FORMATS = {"percent": "0.0000", "flow": "0.00", "fixed2": "0.00", "fixed1": "0.0", "exp": "0.000E+00",
                   "number": "General"}
_FILLS = {"pass": "D8F0DF", "warn": "FBEFC5", "fail": "F6D0CB"}


def _safe_text(value: object) -> object:
    """A cell value that no spreadsheet runs as a formula."""
    if isinstance(value, str) and value.startswith(_FORMULA_START):
        return "'" + value
    return value


def _csv_value(value: object) -> object:
    if value is None:
        return ""
    if isinstance(value, float):
        return repr(value)
    return _safe_text(value)


def render_csv(report: Report) -> str:
    """All of the report's tables as CSV blocks: a title line, the header, the rows, a blank line."""
    out = io.StringIO()
    writer = csv.writer(out, lineterminator="\n")
    writer.writerow([_safe_text(report.title)])
    for label, text in report.facts:
        writer.writerow([_safe_text(label), _safe_text(text)])
    writer.writerow([_safe_text(report.caution)])
    writer.writerow([])
    for table in report.tables:
        writer.writerow([_safe_text(table.title)])
        writer.writerow([_safe_text(c.title) for c in table.columns])
        for row in table.rows:
            writer.writerow([_csv_value(v) for v in row])
        for note in table.notes:
            writer.writerow([_safe_text(note)])
        writer.writerow([])
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
    """The report as an XLSX workbook: a summary sheet (title, facts, notes, caution), then one sheet per table."""
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
    summary.column_dimensions["A"].width = 24
    summary.column_dimensions["B"].width = 90
    taken = {"summary"}
    for table in report.tables:
        sheet = book.create_sheet(_sheet_name(table, taken))
        _text_cell(sheet, 1, 1, table.title).font = Font(bold=True)
        for j, column in enumerate(table.columns, start=1):
            _text_cell(sheet, 2, j, column.title).font = Font(bold=True)
            sheet.column_dimensions[sheet.cell(row=2, column=j).column_letter].width = max(12, len(column.title) + 2)
        for i, values in enumerate(table.rows, start=3):
            for j, (value, column) in enumerate(zip(values, table.columns), start=1):
                if isinstance(value, str):
                    cell = _text_cell(sheet, i, j, value)
                    if column.style == "verdict" and value in _FILLS:
                        cell.fill = PatternFill("solid", fgColor=_FILLS[value])
                elif value is not None:
                    cell = sheet.cell(row=i, column=j, value=float(value) if not isinstance(value, bool) else value)
                    cell.number_format = _NUMBER_FORMATS.get(column.style, "General")
        for k, note in enumerate(table.notes):
            _text_cell(sheet, len(table.rows) + 4 + k, 1, note)
    buffer = io.BytesIO()
    book.save(buffer)
    return buffer.getvalue()
