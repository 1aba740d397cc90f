"""Reports as plain text for the terminal."""

from __future__ import annotations

import shutil
import textwrap

from .document import Report, Table
from .numbers import format_cell


def render_table(table: Table, width: int = 120) -> str:
    """A table with aligned columns: text left, numbers right; a last ``longtext`` column wraps."""
    header = [c.title for c in table.columns]
    body = [[format_cell(v, table.style(i, j)) for j, v in enumerate(row)] for i, row in enumerate(table.rows)]
    wraps = bool(table.columns) and table.columns[-1].style == "longtext"
    widths = [max(len(h), *(len(r[i]) for r in body)) if body else len(h) for i, h in enumerate(header)]
    if wraps:
        widths[-1] = max(len(header[-1]), width - sum(w + 2 for w in widths[:-1]), 30)
    left = [c.style in ("text", "verdict", "longtext") for c in table.columns]

    def lines_of(cells: list[str]) -> list[str]:
        last = textwrap.wrap(cells[-1], widths[-1]) or [""] if wraps else [cells[-1]]
        first = [cell.ljust(w) if is_left else cell.rjust(w) for cell, w, is_left in zip(cells[:-1], widths, left)]
        out = ["  ".join([*first, last[0].ljust(widths[-1]) if left[-1] else last[0].rjust(widths[-1])]).rstrip()]
        indent = sum(w + 2 for w in widths[:-1])
        out += [" " * indent + more for more in last[1:]]
        return out

    lines = [table.title, *lines_of(header), "  ".join("-" * w for w in widths)]
    for row in body:
        lines += lines_of(row)
    lines += [textwrap.fill(note, width) for note in table.notes]
    return "\n".join(lines)


def render_text(report: Report, width: int | None = None) -> str:
    """The whole report as text: title, facts, tables, notes, caution (plots are left to the HTML report)."""
    width = width or min(shutil.get_terminal_size((100, 24)).columns, 120)
    parts = [report.title + "\n" + "=" * min(len(report.title), width)]
    if report.facts:
        label_width = max(len(label) for label, _ in report.facts)
        parts.append("\n".join(f"{label:<{label_width}}  {text}" for label, text in report.facts))
    parts += [render_table(t, width) for t in report.tables]
    if report.notes:
        parts.append("\n".join(textwrap.fill(n, width) for n in report.notes))
    parts.append(textwrap.fill(report.caution, width))
    return "\n\n".join(parts) + "\n"
