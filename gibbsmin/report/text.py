"""Reports as plain text for the terminal."""

from __future__ import annotations

import shutil
import textwrap

from .document import Report, Table
from .numbers import format_cell


def render_table(table: Table) -> str:
    """A table with aligned columns: text left, numbers right."""
    header = [c.title for c in table.columns]
    body = [[format_cell(v, c.style) for v, c in zip(row, table.columns)] for row in table.rows]
    widths = [max(len(h), *(len(r[i]) for r in body)) if body else len(h) for i, h in enumerate(header)]
    left = [c.style in ("text", "verdict") for c in table.columns]

    def line(cells: list[str]) -> str:
        parts = [cell.ljust(w) if is_left else cell.rjust(w) for cell, w, is_left in zip(cells, widths, left)]
        return "  ".join(parts).rstrip()

    lines = [table.title, line(header), "  ".join("-" * w for w in widths)]
    lines += [line(r) for r in body]
    lines += table.notes
    return "\n".join(lines)


def render_text(report: Report, width: int | None = None) -> str:
    """The whole report as text: title, facts, tables, notes, caution (plots are left to the HTML report)."""
    width = width or min(shutil.get_terminal_size((100, 24)).columns, 120)
    parts = [report.title + "\n" + "=" * min(len(report.title), width)]
    if report.facts:
        label_width = max(len(label) for label, _ in report.facts)
        parts.append("\n".join(f"{label:<{label_width}}  {text}" for label, text in report.facts))
    parts += [render_table(t) for t in report.tables]
    if report.notes:
        parts.append("\n".join(textwrap.fill(n, width) for n in report.notes))
    parts.append(textwrap.fill(report.caution, width))
    return "\n\n".join(parts) + "\n"
