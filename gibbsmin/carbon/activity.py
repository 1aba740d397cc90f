"""The carbon activity of a gas against graphite, by the three carbon reactions, and its verdict."""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass

import numpy as np

from ..equilibrium import Equilibrium
from ..reactions import Composition, gas_state, reaction
from ..thermo.database import SpeciesDatabase
from ..thermo.datasets import default_database


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
    graphite_mol : float
        Graphite the judged answer holds, [mol] (0 for a gas given on its own).
    """

    T: float
    P: float
    by_reaction: Mapping[str, float]
    from_element_potential: float | None = None
    graphite_mol: float = 0.0

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
    def carbon_free(self) -> bool:
        """True only where the answer holds no graphite and its gas could not deposit any."""
        return self.graphite_mol <= 0.0 and not self.possible

    @property
    def status(self) -> str:
        """``"fail"`` where the answer holds graphite, ``"warn"`` where its gas could deposit some, else ``"pass"``."""
        if self.graphite_mol > 0.0:
            return "fail"
        return "warn" if self.possible else "pass"

    @property
    def verdict(self) -> str:
        """The judgement in words, with the activity, the reaction and the margin (and graphite held)."""
        a, margin = self.activity, self.margin
        if self.possible:
            words = f"carbon possible: a_C = {a:.4g} by {self.limiting_reaction} (margin {margin:.3g})"
        elif margin <= SATURATION_TOLERANCE:
            words = f"at graphite saturation: a_C = {a:.6g}"
        else:
            where = f" by {self.limiting_reaction}" if self.limiting_reaction else ""
            words = f"no carbon: a_C at most {a:.4g}{where} (margin {margin:.3g})"
        if self.graphite_mol > 0.0:
            return f"{words}; the answer holds {self.graphite_mol:.4g} mol graphite: NOT carbon-free"
        if margin <= SATURATION_TOLERANCE and not self.possible:
            return f"{words} (on the boundary)"
        return words


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
        ``verdict`` says whether carbon is possible, with the margin;
        ``status`` is "fail" whenever an Equilibrium given holds graphite.

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
    graphite = 0.0
    if isinstance(composition, Equilibrium):
        graphite = graphite_held(composition, db)
        lam = composition.element_potentials.get("C", math.nan)
        held = composition.restriction is not None and composition.restriction.approach_K
        if math.isfinite(lam) and not held:
            potential = float(np.exp(lam - _g0_graphite(state.T, db)))
    return CarbonActivity(state.T, state.P, by_reaction, potential, graphite)


def graphite_held(eq: Equilibrium, db: SpeciesDatabase | None = None) -> float:
    """Amount of solid carbon (any condensed species made of carbon alone) an answer holds, [mol of C]."""
    db = db or default_database()
    held = 0.0
    for name, n in eq.condensed.items():
        elements = dict(db[name].elements)
        if set(elements) == {"C"}:
            held += n * elements["C"]
    return held


def _g0_graphite(T: float, db: SpeciesDatabase) -> float:
    """g0/RT of graphite at T [K], [-]."""
    return float(db.nasa7([GRAPHITE]).g_RT(np.array([T]))[0, 0])


# --- the carbon limit ----------------------------------------------------------------------------------
