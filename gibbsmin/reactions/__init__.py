"""Reactions: equations, equilibrium constants, reaction quotients and approach temperatures.

A :class:`Reaction` is a balanced set of stoichiometric coefficients, positive
for products and negative for reactants.  Reactions are written by the user
(``"CH4 + H2O = CO + 3 H2"``), taken by the names the trade uses
(``"steam methane reforming"``, ``"water-gas shift"``, ``"Boudouard"`` ...; see
:data:`NAMED_REACTIONS`), or generated as a complete independent set for a
species set (:func:`independent_reactions`).

Equilibrium constants are those of the standard state of the species data:
ideal gas at P0 = 1 bar, pure condensed species.  K_r(T) = exp(-sum_j nu_j
g0_j(T)/RT) is therefore K_p in bar^dn, with dn the change in the number of
gas moles (``Reaction.K(T, "atm")`` gives it in another pressure unit).
Reaction quotients use the gas's fugacities over P0, f_j/P0 = y_j P/P0 phi_j
(phi_j = 1 for the ideal gas), and unit activity for pure condensed species.

Approach temperature (the sign convention used throughout gibbsmin)
--------------------------------------------------------------------
The equilibrium temperature T_eq of a reaction in a gas at T is the
temperature at which K_r(T_eq) equals the gas's quotient Q_r.  The approach is

    approach = T - T_eq    for an endothermic reaction (dH_r(T) > 0),
    approach = T_eq - T    for an exothermic reaction (dH_r(T) < 0),

so that a positive approach always means *short of equilibrium* in the
direction the equation is written (Q_r < K_r(T): the forward reaction could
still go on), and a negative approach means beyond it.  A reformer outlet with
a 10 K approach on steam methane reforming (endothermic) is a gas in reforming
equilibrium at T - 10 K; a shift outlet with a 10 K approach on the water-gas
shift (exothermic) is a gas in shift equilibrium at T + 10 K.  Writing an
equation the other way round keeps T_eq and flips the sign of the approach: a
gas 4 K beyond reforming equilibrium is 4 K short of methanation equilibrium.
"""

from .approach import Approach as Approach
from .approach import approach_table as approach_table
from .approach import approach_temperatures as approach_temperatures
from .approach import quotients as quotients
from .equations import NAMED_REACTIONS as NAMED_REACTIONS
from .equations import Reaction as Reaction
from .equations import parse_reaction as parse_reaction
from .equations import reaction as reaction
from .equations import steam_reforming as steam_reforming
from .sets import independent_reactions as independent_reactions
from .state import Composition as Composition
from .state import GasState as GasState
from .state import gas_state as gas_state

__all__ = [
    "NAMED_REACTIONS",
    "Approach",
    "Composition",
    "GasState",
    "Reaction",
    "approach_table",
    "approach_temperatures",
    "gas_state",
    "independent_reactions",
    "parse_reaction",
    "quotients",
    "reaction",
    "steam_reforming",
]
