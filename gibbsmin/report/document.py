"""A report as data: facts, tables and plots, rendered alike as text, CSV, XLSX or HTML.

Builders (the settle report, the audit report) fill a :class:`Report`; the
renderers only lay it out, so every form shows the same figures.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from .caution import CAUTION

#: Verdicts of a check, mildest first.
VERDICTS = ("pass", "warn", "fail")


@dataclass(frozen=True)
class Column:
    """A table column: its heading and how its numbers are written.

    Attributes
    ----------
    title : str
    style : str
        ``"text"``, ``"percent"`` (mol%), ``"flow"``, ``"number"`` (six significant digits),
        ``"fixed2"`` (two decimals; ``"fixed1"``, ``"fixed3"`` alike), ``"exp"`` (scientific), ``"figure"`` (four significant digits, noise as 0),
        ``"uncertainty"`` (a standard uncertainty: two significant digits),
        ``"verdict"`` (pass, warn, fail, n/a) or ``"longtext"`` (text the terminal wraps).
    """

    title: str
    style: str = "number"


@dataclass(frozen=True)
class Table:
    """A titled table; cells are numbers, texts or None (empty).

    ``row_styles``, where given, hold one style per row for that row's number
    cells (a stream table's temperature row and mol% rows differ); a text
    column keeps its own style.
    """

    title: str
    columns: tuple[Column, ...]
    rows: tuple[tuple[object, ...], ...]
    notes: tuple[str, ...] = ()
    key: str = ""  # a short machine name (sheet name, CSV block name)
    row_styles: tuple[str, ...] = ()

    def __post_init__(self) -> None:
        for row in self.rows:
            if len(row) != len(self.columns):
                raise ValueError(f"table {self.title!r}: a row has {len(row)} cells for {len(self.columns)} columns")
        if self.row_styles and len(self.row_styles) != len(self.rows):
            raise ValueError(f"table {self.title!r}: {len(self.row_styles)} row styles for {len(self.rows)} rows")

    def style(self, row: int, column: int) -> str:
        """How the cell at (row, column) is written: its row's style for a number column, else its column's."""
        own = self.columns[column].style
        if self.row_styles and own not in _TEXT_STYLES:
            return self.row_styles[row]
        return own


_TEXT_STYLES = ("text", "verdict", "longtext")


@dataclass(frozen=True)
class Series:
    """One line or set of points of a plot: x and y values [in the axis units], and a label."""

    label: str
    x: tuple[float, ...]
    y: tuple[float, ...]
    style: str = "line"  # "line", "points" or "line+points"


@dataclass(frozen=True)
class Plot:
    """A line plot (``kind="line"``: series over x) or a bar chart (``kind="bar"``: one value per category).

    For bar charts ``categories`` name the bars, ``values`` give their lengths,
    and ``limits`` draw reference lines (e.g. a warn and a fail threshold).
    """

    title: str
    kind: str
    x_label: str = ""
    y_label: str = ""
    series: tuple[Series, ...] = ()
    categories: tuple[str, ...] = ()
    values: tuple[float, ...] = ()
    verdicts: tuple[str, ...] = ()
    limits: tuple[tuple[str, float], ...] = ()


@dataclass(frozen=True)
class Report:
    """A whole report: a title, facts (label, text) about the case, tables, plots and the caution.

    ``tables_before_plots`` tables (the findings of an audit, say) come before
    the plots in the HTML page; the others after them.
    """

    title: str
    facts: tuple[tuple[str, str], ...] = ()
    tables: tuple[Table, ...] = ()
    plots: tuple[Plot, ...] = ()
    notes: tuple[str, ...] = ()
    caution: str = field(default=CAUTION)
    tables_before_plots: int = 0
