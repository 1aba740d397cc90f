"""Standard-state thermodynamics: NASA 7-coefficient polynomials and the species database."""

from .database import CriticalConstants as CriticalConstants
from .database import SpeciesDatabase as SpeciesDatabase
from .database import SpeciesRecord as SpeciesRecord
from .datasets import default_database as default_database
from .database import load_database as load_database
from .formation import FormationProperties as FormationProperties
from .formation import formation_properties as formation_properties
from .nasa7 import R as R
from .nasa7 import Nasa7Table as Nasa7Table
from .datasets import DATA_SETS as DATA_SETS
from .datasets import DEFAULT_DATA as DEFAULT_DATA
from .datasets import choose_database as choose_database
from .datasets import data_set as data_set
from .datasets import database_holding as database_holding
