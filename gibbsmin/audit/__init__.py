"""The heat-and-mass-balance audit: a vendor's stream table checked unit by unit.

Read a unit description and its stream table with :func:`read_plant`, run
every check with :func:`audit_plant`, and present the result with
:func:`gibbsmin.report.audit.audit_report` (text, CSV, XLSX, HTML) or
:func:`gibbsmin.report.audit.audit_document` (JSON).
"""

from .checks import AuditResult as AuditResult
from .checks import Check as Check
from .checks import UnitAudit as UnitAudit
from .checks import audit_plant as audit_plant
from .plant import AUDIT_KEYS as AUDIT_KEYS
from .plant import THRESHOLDS as THRESHOLDS
from .plant import Limit as Limit
from .plant import Plant as Plant
from .plant import UnitSpec as UnitSpec
from .plant import read_plant as read_plant
from .table import StreamTable as StreamTable
from .table import TableStream as TableStream
from .table import read_stream_table as read_stream_table
