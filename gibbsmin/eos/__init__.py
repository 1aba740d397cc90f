"""Gas models: the ideal gas and the cubic equations of state Peng-Robinson and SRK.

Each model turns (T [K], P [Pa], y) into the compressibility factor, ln phi of
each species and the residual enthalpy and entropy, for one condition or a batch.
Choose one by name with :func:`gas_model` or :func:`gas_model_for_species`.
"""

from .cubic import CubicModel as CubicModel
from .families import PENG_ROBINSON as PENG_ROBINSON
from .families import SOAVE_REDLICH_KWONG as SOAVE_REDLICH_KWONG
from .families import CubicFamily as CubicFamily
from .ideal import IdealGasModel as IdealGasModel
from .inputs import MOLE_FRACTION_SUM_TOLERANCE as MOLE_FRACTION_SUM_TOLERANCE
from .quantum import HELIUM as HELIUM
from .quantum import HYDROGEN as HYDROGEN
from .quantum import QUANTUM_GASES as QUANTUM_GASES
from .quantum import QuantumGas as QuantumGas
from .registry import GAS_MODELS as GAS_MODELS
from .registry import GasModel as GasModel
from .registry import gas_model as gas_model
from .registry import gas_model_for_species as gas_model_for_species
from .result import GasProperties as GasProperties
from .registry import canonical_model_name as canonical_model_name
from .interactions import InteractionParameter as InteractionParameter
from .interactions import InteractionTable as InteractionTable
from .interactions import default_interactions as default_interactions
from .interactions import load_interactions as load_interactions
