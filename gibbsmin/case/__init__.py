"""Case files: an equilibrium problem written in the trade's words (TOML), read and settled.

A case file names its feeds (component flows, or a composition with a total
flow, wet or dry, optionally with steam by S/C ratio), the conditions of each
stage, the species set and what to report.  Every key is checked: an unknown
key, a value of the wrong kind or a quantity in the wrong unit is a
:class:`CaseError` naming the file, the line and the key, with the fix.

A minimal case::

    [feed]
    unit = "kmol/h"
    CH4 = 1000.0
    H2O = 3000.0

    [conditions]
    T = "850 degC"
    P = "30 bar(g)"

Every key, with its meaning, is listed in :data:`CASE_KEYS` (``gibbsmin settle
--keys`` prints it) and used in ``examples/reformer.toml``.

Amounts: the feeds' flows are converted to mol/s and handed to the engine as
amounts in mol; equilibrium composition is intensive, so the answer's amounts
read as mol/s and are shown in the report's flow unit.
"""

from .reader import parse_case as parse_case
from .reader import read_case as read_case
from .run import CaseResult as CaseResult
from .run import Curve as Curve
from .run import StageInlet as StageInlet
from .run import StageResult as StageResult
from .run import settle_case as settle_case
from .spec import CASE_KEYS as CASE_KEYS
from .spec import Case as Case
from .spec import CurveSpec as CurveSpec
from .spec import Feed as Feed
from .spec import ReportSpec as ReportSpec
from .spec import SpeciesSpec as SpeciesSpec
from .spec import Stage as Stage
from .toml import CaseError as CaseError
from .toml import Section as Section
from .toml import TomlSource as TomlSource
