"""Reports: one document model (facts, tables, plots) rendered as text, CSV, XLSX or HTML."""

from .caution import CAUTION as CAUTION
from .document import Column as Column
from .document import Plot as Plot
from .document import Report as Report
from .document import Series as Series
from .document import Table as Table
from .text import render_text as render_text
