"""gibbsmin: equilibrium of reacting gas mixtures by minimisation of the Gibbs energy."""

from .errors import ConvergenceError as ConvergenceError
from .errors import DataError as DataError
from .errors import FormulaError as FormulaError
from .errors import GibbsminError as GibbsminError
from .errors import InputError as InputError
from .errors import TemperatureRangeError as TemperatureRangeError
from .errors import UnknownSpeciesError as UnknownSpeciesError
from .carbon import carbon_activity as carbon_activity
from .carbon import carbon_limit as carbon_limit
from .carbon import carbon_limit_curve as carbon_limit_curve
from .equilibrium import Equilibrium as Equilibrium
from .formula import molar_mass as molar_mass
from .formula import parse_formula as parse_formula
from .reactions import Reaction as Reaction
from .reactions import approach_temperatures as approach_temperatures
from .reactions import independent_reactions as independent_reactions
from .reactions import parse_reaction as parse_reaction
from .reactions import quotients as quotients
from .reactions import reaction as reaction
from .api import equilibrate_with_approach as equilibrate_with_approach
from .api import equilibrate as equilibrate
from .prepared import Prepared as Prepared
from .prepared import prepare as prepare
from .solve.certificate import Certificate as Certificate
from .thermo import default_database as default_database
from .thermo import formation_properties as formation_properties

__version__ = "0.1.0"
