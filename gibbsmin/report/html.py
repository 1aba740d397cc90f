"""Reports as one self-contained HTML file: inline style, inline SVG plots, no scripts, no fetches.

Every text that comes from an input file (stream names, titles, species,
notes) passes through :func:`html.escape`, so a stream called ``<script>``
stays text.  A Content-Security-Policy forbids any network fetch outright.
"""

from __future__ import annotations

from html import escape

from .document import Report, Table
from .numbers import format_cell
from .svg import render_svg

_STYLE = """
body { font-family: sans-serif; margin: 2em auto; max-width: 1100px; color: #222; }
h1 { font-size: 1.5em; } h2 { font-size: 1.15em; margin-top: 1.8em; }
table { border-collapse: collapse; margin: 0.6em 0; }
th, td { border: 1px solid #ccc; padding: 0.25em 0.6em; }
th { background: #eef2f7; text-align: left; }
td.num { text-align: right; font-variant-numeric: tabular-nums; }
td.pass { background: #d8f0df; } td.warn { background: #fbefc5; } td.fail { background: #f6d0cb; font-weight: bold; }
.caution { border: 2px solid #c0392b; background: #fdf2f0; padding: 0.8em 1em; margin: 1.5em 0; }
.facts th { background: none; border: none; padding-right: 1.5em; } .facts td { border: none; }
.note { color: #555; font-size: 0.9em; }
figure { margin: 1em 0; }
"""

_POLICY = "default-src 'none'; style-src 'unsafe-inline'; img-src data:"


def _table_html(table: Table) -> str:
    head = "".join(f"<th>{escape(c.title)}</th>" for c in table.columns)
    rows = []
    for i, row in enumerate(table.rows):
        cells = []
        for j, (value, column) in enumerate(zip(row, table.columns)):
            text = escape(format_cell(value, table.style(i, j)))
            if column.style == "verdict":
                cells.append(f'<td class="{escape(str(value))}">{text}</td>')
            elif column.style == "text" or isinstance(value, str) or value is None:
                cells.append(f"<td>{text}</td>")
            else:
                cells.append(f'<td class="num">{text}</td>')
        rows.append("<tr>" + "".join(cells) + "</tr>")
    notes = "".join(f'<p class="note">{escape(n)}</p>' for n in table.notes)
    return (f"<h2>{escape(table.title)}</h2>\n<table>\n<thead><tr>{head}</tr></thead>\n<tbody>\n"
            + "\n".join(rows) + f"\n</tbody>\n</table>\n{notes}")


def render_html(report: Report) -> str:
    """The whole report as an HTML document (UTF-8 text)."""
    facts = "".join(f"<tr><th>{escape(label)}</th><td>{escape(text)}</td></tr>" for label, text in report.facts)
    plots = "".join(f"<figure>{render_svg(p)}</figure>\n" for p in report.plots)
    notes = "".join(f'<p class="note">{escape(n)}</p>' for n in report.notes)
    lead = report.tables_before_plots
    leading = "\n".join(_table_html(t) for t in report.tables[:lead])
    tables = "\n".join(_table_html(t) for t in report.tables[lead:])
    return f"""<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="{_POLICY}">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>{escape(report.title)}</title>
<style>{_STYLE}</style>
</head>
<body>
<h1>{escape(report.title)}</h1>
<div class="caution"><strong>{escape(report.caution)}</strong></div>
<table class="facts">{facts}</table>
{leading}
{plots}
{tables}
{notes}
<div class="caution">{escape(report.caution)}</div>
</body>
</html>
"""
