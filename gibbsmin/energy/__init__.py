"""The reactor energy balance: enthalpy and entropy of any phase split, inlets, duty, fixed-enthalpy equilibrium.

Enthalpies are on the formation basis of the NASA data (elements in their
reference states have h = 0 at 298.15 K), so one number per state carries both
the heat of reaction and the sensible heat, and every balance reads

    H_out = H_in + Q

Sign convention (written into every result): Q, the heat input or duty, is
positive when heat is added to the reactor.  Amounts may be on any basis: Q is
in J per the amounts given, which is W when the amounts are mol/s.

An inlet is one or several streams, each at its own temperature, mixed at the
reactor inlet; all streams are taken at the reactor pressure (for an ideal gas
the enthalpy does not depend on it).

Fixed enthalpy and pressure
---------------------------
The outlet temperature is the root of f(T) = H_eq(T) - H_target, where H_eq is
the enthalpy of the equilibrium at T.  f rises with T (its slope is the
equilibrium heat capacity), so the root is bracketed and found by Newton steps
on T using the slope from the equilibrium's sensitivities, falling back to
bisection whenever a step leaves the bracket or stalls; each fixed-T solve is
warm-started from the nearest temperature already solved.

Where the phases at the two ends of the bracket differ, the root may lie on a
phase boundary.  A dew point only bends H_eq(T), but coexisting phases that
leave no freedom in T at fixed P (ice and liquid water, a liquid boiling off a
one-component feed) make H_eq(T) jump: every H inside the jump belongs to the
boundary temperature, and only the split between the phases changes.  Both
cases are solved exactly by Newton on the optimality conditions with the union
of the two phase sets present and T as an unknown closed by the energy balance
(``phase_boundary.solve_on_phase_boundary``); its answer is accepted when every
condensed amount is non-negative and it certifies.

For the ideal gas with the plain standard potentials this search is the
fallback: ``enthalpy_newton.solve_at_fixed_enthalpy`` first runs one compiled
Newton with ln T among the unknowns (the energy balance as one more row,
Gordon and McBride, NASA RP-1311, 1994) on the phase set a fixed-T solve at
the frozen-mixture temperature finds, and its answer is taken where the
problem built afresh at the temperature found certifies it (no absent
condensed species that would form there), the phase set has not changed and
the balance closes to the search's own tolerance.

A condensed species cannot form outside its fitted range, so H_eq(T) also
jumps at the ends of those ranges; the search steps onto each such temperature
rather than over it, and names the species when no temperature balances.

Non-ideal gas
-------------
Everything here takes the gas's residual enthalpy as a hook, zero by default:
``enthalpy(..., residual_enthalpy=)``, ``solve_energy_balance(...,
residual_enthalpy=, step=)`` (``step`` being the fixed-T solve with the
equation of state's fugacity coefficients), ``energy_extras(...,
residual_enthalpy=)`` and ``Inlet.enthalpy(..., stream_residual=)``.  The
phase-boundary Newton takes the model's ln phi too (``phase_set_step=``):
evaluated afresh at every iterate and held within its step, so its answer
meets the non-ideal conditions; the Newton steps on T use the ideal heat
capacity, which slows but does not misdirect them.
"""

from .balance import enthalpy_scale as enthalpy_scale
from .balance import frozen_temperature as frozen_temperature
from .balance import solve_energy_balance as solve_energy_balance
from .inlet import Inlet as Inlet
from .inlet import InletStream as InletStream
from .inlet import heat_input_of as heat_input_of
from .inlet import outlet_bounds as outlet_bounds
from .inlet import read_inlet as read_inlet
from .properties import FixedTStep as FixedTStep
from .properties import ResidualEnthalpy as ResidualEnthalpy
from .properties import enthalpy as enthalpy
from .properties import entropy as entropy
from .properties import heat_capacity as heat_capacity
from .properties import mixture_enthalpy as mixture_enthalpy
from .properties import mixture_entropy as mixture_entropy
from .properties import state_amounts as state_amounts
from .results import SIGN_CONVENTION as SIGN_CONVENTION
from .results import energy_extras as energy_extras
from .results import energy_figures as energy_figures
from .results import with_extras as with_extras
from .compression import Compression as Compression
from .compression import Letdown as Letdown
from .compression import compress as compress
from .compression import expand_adiabatic as expand_adiabatic
