"""Equilibrium with a non-ideal gas: fugacity coefficients from a cubic equation of state.

In a non-ideal gas the potentials are

    mu_j/RT = g0_j/RT + ln(P/P0) + ln y_j + ln phi_j(T, P, y).

With phi held fixed, ln phi_j only shifts g0_j/RT, and the problem is the
convex one every solver of the package takes.  The non-ideal equilibrium is
therefore the fixed point  ln phi = F(ln phi),  where F solves the frozen-phi
problem (``fixed_step.solve_fixed`` builds it once; each later pass only shifts
the gas potentials and re-solves, warm-started from the previous answer) and
evaluates the equation of state at the composition it returns.  The plain
iteration converges linearly (each pass cuts the change in ln phi by about ten
in an ammonia loop at 300 bar: 11 passes to 1e-10); Anderson acceleration
over the last three passes needs 5 or 6, and whenever the change stops
shrinking it forgets its history and takes a half step instead.

Certificate
-----------
The loop ends when ln phi, evaluated at the final composition, differs from
the value the final solve held fixed by less than ``tolerance`` (1e-10).  The
returned ``certificate`` is then recomputed with ln phi at the final
composition, so its ``stationarity`` is the residual of the non-ideal
condition mu_j/RT = sum_k a_kj lambda_k, and its condensed-phase margin uses
the same potentials.

Species without critical constants
----------------------------------
Radicals and atoms (OH, H, CH3, NH2, ...) have no critical constants.  They
are treated as ideal gases: ln phi = 0, and they are left out of the mixture's
a and b; the cubic describes the other species at their mole fractions
renormalised among themselves.  This is a consistent model (the residual
Gibbs energy is that of the described species alone), and in loop gases these
species sit at mole fractions of 1e-10 and below, where it changes nothing
measurable.  The result names them in ``extras["gas_model_note"]``, and a
warning is given if together they exceed ``IDEAL_SPECIES_WARNING`` of the gas.
"""

from ..eos.phase import KIJ_CHOICES as KIJ_CHOICES
from ..eos.phase import GasPhase as GasPhase
from ..eos.phase import gas_phase as gas_phase
from ..eos.phase import ln_phi_of_gas as ln_phi_of_gas
from ..eos.phase import residual_enthalpy_of_gas as residual_enthalpy_of_gas
from .energy_balance import energy_hooks as energy_hooks
from .energy_balance import inlet_enthalpies as inlet_enthalpies
from .energy_balance import inlet_residual_enthalpy as inlet_residual_enthalpy
from .energy_balance import phase_set_step as phase_set_step
from .loop import IDEAL_SPECIES_WARNING as IDEAL_SPECIES_WARNING
from .loop import OuterLoopOptions as OuterLoopOptions
from .loop import solve_batch_nonideal as solve_batch_nonideal
from .loop import solve_nonideal as solve_nonideal
from .sensitivities import nonideal_sensitivities as nonideal_sensitivities
from .stability import STABILITY_SCREEN as STABILITY_SCREEN
from .stability import gas_stability as gas_stability
from .stability import stability_checked as stability_checked
from .stability import with_stability_verdict as with_stability_verdict
