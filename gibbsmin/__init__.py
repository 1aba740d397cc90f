"""gibbsmin: equilibrium of reacting gas mixtures by minimisation of the Gibbs energy."""

from .errors import ConvergenceError as ConvergenceError
from .errors import DataError as DataError
from .errors import FormulaError as FormulaError
from .errors import GibbsminError as GibbsminError
from .errors import InputError as InputError
from .errors import TemperatureRangeError as TemperatureRangeError
from .errors import UnknownSpeciesError as UnknownSpeciesError
from .equilibrium import Equilibrium as Equilibrium
from .formula import molar_mass as molar_mass
from .formula import parse_formula as parse_formula
from .settle import equilibrate as equilibrate
from .solve.certificate import Certificate as Certificate
from .thermo import default_database as default_database
from .thermo import formation_properties as formation_properties

__version__ = "0.1.0"
