"""Flowsheets: feeds, units and streams with recycle, converged together with design specifications."""

from .converge import FlowsheetCertificate as FlowsheetCertificate
from .converge import FlowsheetResult as FlowsheetResult
from .converge import settle_flowsheet as settle_flowsheet
from .material import Material as Material
from .model import DesignSpecification as DesignSpecification
from .model import Flowsheet as Flowsheet
