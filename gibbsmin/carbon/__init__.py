"""Carbon against graphite: the carbon activity of a gas, a verdict, and the carbon limit of a feed.

Carbon activity a_C (against graphite; a_C = 1 is a gas saturated with
graphite, and graphite can form where a_C > 1):

* through a reaction that deposits carbon, a_C = K_r(T) / Q_r, with Q_r the
  quotient of the reaction's gas species only:

  - methane cracking, CH4 = C(s) + 2 H2:    a_C = K f_CH4 / f_H2^2
  - Boudouard, 2 CO = C(s) + CO2:            a_C = K f_CO^2 / f_CO2
  - CO reduction, CO + H2 = C(s) + H2O:      a_C = K f_CO f_H2 / f_H2O

  (fugacities over P0 = 1 bar).  A gas that is not at equilibrium has three
  different activities; carbon is thermodynamically possible if any exceeds 1.
  Whether it forms is a matter of kinetics and catalyst, which this module
  does not judge;

* in an equilibrium gas the three agree, and equal exp(lambda_C - g0_C(s)/RT)
  with lambda_C the element potential of carbon.

The margin of a verdict is -ln(a_C) of the highest activity: positive on the
carbon-free side (0.1 is a gas about 10 % below saturation), negative where
carbon is possible.

Carbon limit of a feed: the lowest steam-to-carbon ratio at which graphite is
not stable at equilibrium at T and P.  It is the root in S/C of ln a_C of the
equilibrium gas computed without graphite: where that gas is over-saturated
(a_C > 1) the full minimisation deposits graphite, and where it is not, the
full minimisation has none (the problem is convex, so the gas-only minimum
with a non-negative graphite margin is the minimum with graphite allowed).
S/C counts carbon as :class:`gibbsmin.streams.Stream` does (``carbon_basis``).

Carbon limit in temperature (:func:`carbon_limit_temperatures`): for a feed as
it is, the temperatures at which that gas-only equilibrium crosses a_C = 1, and
the ranges in which graphite is stable.

These are thermodynamic figures for screening; carbon formation in a real
reformer also depends on catalyst, heat flux and feed quality, and design
margins are set by licensed engineering practice and local codes.
"""

from .activity import CARBON_REACTIONS as CARBON_REACTIONS
from .activity import GRAPHITE as GRAPHITE
from .activity import SATURATION_TOLERANCE as SATURATION_TOLERANCE
from .activity import STEAM as STEAM
from .activity import CarbonActivity as CarbonActivity
from .activity import carbon_activity as carbon_activity
from .steam import CarbonLimit as CarbonLimit
from .steam import carbon_limit as carbon_limit
from .steam import carbon_limit_curve as carbon_limit_curve
from .steam import carbon_limit_table as carbon_limit_table
from .temperature import CarbonTemperatureLimits as CarbonTemperatureLimits
from .temperature import carbon_limit_temperatures as carbon_limit_temperatures

__all__ = [
    "CARBON_REACTIONS",
    "CarbonActivity",
    "CarbonLimit",
    "CarbonTemperatureLimits",
    "carbon_activity",
    "carbon_limit",
    "carbon_limit_curve",
    "carbon_limit_table",
    "carbon_limit_temperatures",
]
