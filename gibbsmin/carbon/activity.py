"""The carbon activity of a gas against graphite, by the three carbon reactions, and its verdict."""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass

import numpy as np

from ..equilibrium import Equilibrium
from ..reactions import Composition, gas_state, reaction
from ..thermo.database import SpeciesDatabase, default_database


#: The carbon-depositing reactions a gas is judged by.
CARBON_REACTIONS = ("methane cracking", "Boudouard", "CO reduction")
GRAPHITE = "C(s)"
STEAM = "H2O"
#: |ln a_C| below which a gas counts as saturated with graphite rather than over or under, [-].
SATURATION_TOLERANCE = 1e-9


@dataclass(frozen=True)
class CarbonActivity:
    """The carbon activity of a gas against graphite.

    Attributes
    ----------
    T : float
        Temperature, [K].
    P : float
        Pressure, [Pa].
    by_reaction : dict
        Reaction name to a_C [-] through it; NaN where the gas lacks the
        reaction's species on both sides.
    from_element_potential : float or None
        exp(lambda_C - g0_C(s)/RT) [-], for an (unrestricted) Equilibrium.
    """

    T: float
    P: float
    by_reaction: Mapping[str, float]
    from_element_potential: float | None = None

    @property
    def activity(self) -> float:
        """The highest activity over the reactions, [-]."""
        finite = [a for a in self.by_reaction.values() if not math.isnan(a)]
        return max(finite) if finite else 0.0

    @property
    def limiting_reaction(self) -> str | None:
        """The reaction that gives the highest activity."""
        finite = {n: a for n, a in self.by_reaction.items() if not math.isnan(a)}
        return max(finite, key=finite.get) if finite else None

    @property
    def margin(self) -> float:
        """-ln of the highest activity, [-]: positive on the carbon-free side."""
        a = self.activity
        return math.inf if a == 0.0 else -math.log(a)

    @property
    def possible(self) -> bool:
        """True where graphite is thermodynamically possible (over-saturated beyond the tolerance)."""
        return self.margin < -SATURATION_TOLERANCE

    @property
    def verdict(self) -> str:
        """The judgement in words, with the activity, the reaction and the margin."""
        a, margin = self.activity, self.margin
        if self.possible:
            return f"carbon possible: a_C = {a:.4g} by {self.limiting_reaction} (margin {margin:.3g})"
        if margin <= SATURATION_TOLERANCE:
            return f"at graphite saturation: a_C = {a:.6g} (graphite present or on the boundary)"
        where = f" by {self.limiting_reaction}" if self.limiting_reaction else ""
        return f"no carbon: a_C at most {a:.4g}{where} (margin {margin:.3g})"


def carbon_activity(
    composition: Composition,
    T: float | str | None = None,
    P: float | str | None = None,
    *,
    ln_phi: Mapping[str, float] | None = None,
    gas: str | None = None,
    kij: str | Mapping[tuple[str, str], float] | None = "shipped",
    db: SpeciesDatabase | None = None,
) -> CarbonActivity:
    """Carbon activity of a gas against graphite, by methane cracking, Boudouard and CO reduction.

    Parameters
    ----------
    composition : mapping, Equilibrium or Stream
        The gas; see :func:`gibbsmin.reactions.gas_state` (a mapping needs T and P).
    T, P : float or str, optional
        Temperature [K] and pressure [Pa], or texts with units.
    ln_phi : mapping, optional
        Gas species to ln of its fugacity coefficient, for a non-ideal gas.
    gas, kij : optional
        A cubic gas model to compute them instead (a measured gas at
        pressure); see :func:`gibbsmin.reactions.gas_state`.
    db : SpeciesDatabase, optional

    Returns
    -------
    CarbonActivity
        ``verdict`` says whether carbon is possible, with the margin.

    Examples
    --------
    >>> gas = {"CH4": 4.0, "H2": 70.0, "CO": 10.0, "CO2": 6.0, "H2O": 10.0}
    >>> carbon_activity(gas, T="650 degC", P="25 bar").possible
    True
    """
    db = db or default_database()
    state = gas_state(composition, T, P, ln_phi=ln_phi, gas=gas, kij=kij, db=db)
    by_reaction = {}
    for name in CARBON_REACTIONS:
        rx = reaction(name, db=db)
        with np.errstate(over="ignore"):
            by_reaction[name] = float(np.exp(rx.ln_K(state.T) - rx.ln_quotient(state)))
    potential = None
    if isinstance(composition, Equilibrium) and not composition.extras.get("approach K"):
        lam = composition.element_potentials.get("C", math.nan)
        if math.isfinite(lam):
            potential = float(np.exp(lam - _g0_graphite(state.T, db)))
    return CarbonActivity(state.T, state.P, by_reaction, potential)


def _g0_graphite(T: float, db: SpeciesDatabase) -> float:
    """g0/RT of graphite at T [K], [-]."""
    return float(db.nasa7([GRAPHITE]).g_RT(np.array([T]))[0, 0])


# --- the carbon limit ----------------------------------------------------------------------------------
