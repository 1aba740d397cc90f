"""Quotients and approach temperatures of a gas, one per reaction."""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import numpy as np
import scipy.optimize

from ..thermo.database import SpeciesDatabase
from ..thermo.datasets import default_database
from ..thermo.nasa7 import R
from .equations import Reaction, reaction
from .sets import independent_reactions
from .state import Composition, GasState, gas_state

_EXTRAPOLATION_RANGE = (50.0, 20000.0)


@dataclass(frozen=True)
class Approach:
    """How far a gas is from equilibrium in one reaction.

    Attributes
    ----------
    reaction : Reaction
    T : float
        Temperature of the gas, [K].
    ln_K, ln_Q : float
        ln of the equilibrium constant at T and of the gas's quotient (both in bar^dn).
    T_eq : float
        Temperature at which K equals Q, [K]; NaN where none exists within the data range.
    approach_K : float
        The approach, [K]: positive = short of equilibrium (see the module docstring); NaN with T_eq.
    note : str
        Why T_eq is NaN, if it is.
    """

    reaction: Reaction
    T: float
    ln_K: float
    ln_Q: float
    T_eq: float
    approach_K: float
    note: str = ""

    @property
    def name(self) -> str:
        return self.reaction.name

    @property
    def K(self) -> float:
        """Equilibrium constant at T, [bar^dn]."""
        return float(np.exp(self.ln_K))

    @property
    def Q(self) -> float:
        """Reaction quotient of the gas, [bar^dn]."""
        return float(np.exp(self.ln_Q))

    @property
    def K_unit(self) -> str:
        return self.reaction.K_unit


def quotients(
    composition: Composition,
    T: float | str | None = None,
    P: float | str | None = None,
    reactions: Sequence[str | Reaction] | None = None,
    *,
    ln_phi: Mapping[str, float] | None = None,
    gas: str | None = None,
    kij: str | Mapping[tuple[str, str], float] | None = "shipped",
    db: SpeciesDatabase | None = None,
) -> dict[str, float]:
    """Reaction name to the quotient Q of a gas, [bar^dn] (arguments as for :func:`approach_temperatures`)."""
    db = db or default_database()
    state = gas_state(composition, T, P, ln_phi=ln_phi, gas=gas, kij=kij, db=db)
    return {r.name: float(np.exp(r.ln_quotient(state))) for r in _reactions_for(state, reactions, db)}


def approach_temperatures(
    composition: Composition,
    T: float | str | None = None,
    P: float | str | None = None,
    reactions: Sequence[str | Reaction] | None = None,
    *,
    ln_phi: Mapping[str, float] | None = None,
    gas: str | None = None,
    kij: str | Mapping[tuple[str, str], float] | None = "shipped",
    trace: float = 1e-6,
    db: SpeciesDatabase | None = None,
    allow_extrapolation: bool = False,
) -> dict[str, Approach]:
    """Equilibrium temperatures and approaches of a gas, one per reaction.

    Parameters
    ----------
    composition : mapping, Equilibrium or Stream
        The gas; see :func:`gas_state`.
    T, P : float or str, optional
        Temperature [K] and pressure [Pa]; see :func:`gas_state`.
    reactions : list, optional
        Names (``"steam methane reforming"``, ``"shift"``), equations or
        Reactions.  By default a complete independent set among the gas
        species above ``trace`` mole fraction (:func:`independent_reactions`).
    ln_phi : mapping, optional
        Species to ln of its fugacity coefficient, for a non-ideal gas.
    gas, kij : optional
        A gas model to compute them instead, for a measured gas at loop
        pressure (``gas="peng-robinson"``); see :func:`gas_state`.  The
        fugacity coefficients are taken at the gas's own T and P and held
        there while T_eq is sought.
    trace : float
        Mole fraction below which a species is left out of the default set, [-].
    db : SpeciesDatabase, optional
    allow_extrapolation : bool
        Evaluate K outside the species' data ranges.

    Returns
    -------
    dict
        Reaction name to :class:`Approach` (K, Q, T_eq, approach_K).  The
        approach is positive when the gas is short of equilibrium: T - T_eq
        for an endothermic reaction, T_eq - T for an exothermic one.

    Examples
    --------
    >>> outlet = {"H2": 47.0, "CO": 9.6, "CO2": 5.0, "CH4": 3.4, "H2O": 35.0}
    >>> result = approach_temperatures(outlet, T="850 degC", P="28 bar(g)", reactions=["SMR", "shift"])
    >>> sorted(result)
    ['steam methane reforming', 'water-gas shift']
    """
    db = db or default_database()
    state = gas_state(composition, T, P, ln_phi=ln_phi, gas=gas, kij=kij, db=db)
    return {r.name: _approach(r, state, allow_extrapolation) for r in _reactions_for(state, reactions, db, trace)}


def _reactions_for(state: GasState, reactions, db: SpeciesDatabase, trace: float = 1e-6) -> list[Reaction]:
    if reactions is None:
        present = [s for s, v in state.ln_y.items() if v >= math.log(trace)]
        return independent_reactions(present, db=db)
    if isinstance(reactions, (str, Reaction)):
        reactions = [reactions]
    return [reaction(r, db=db) for r in reactions]


def _approach(rx: Reaction, state: GasState, allow_extrapolation: bool) -> Approach:
    T = state.T
    ln_K = rx.ln_K(T, allow_extrapolation=allow_extrapolation)
    ln_Q = rx.ln_quotient(state)
    dH = rx.enthalpy(T, allow_extrapolation=allow_extrapolation)
    if not math.isfinite(ln_Q):
        absent = [s for s, r in zip(rx.species, rx.records) if r.is_gas and not math.isfinite(state.ln_y.get(s, -math.inf))]
        note = f"{', '.join(absent)} absent from the gas: Q is {'zero' if ln_Q < 0 else 'infinite' if ln_Q > 0 else 'undefined'}"
        return Approach(rx, T, ln_K, ln_Q, math.nan, math.nan, note)
    T_eq, note = _equilibrium_temperature(rx, ln_Q, T, ln_K, dH, allow_extrapolation)
    return Approach(rx, T, ln_K, ln_Q, T_eq, math.copysign(1.0, dH) * (T - T_eq), note)


def _equilibrium_temperature(rx: Reaction, ln_Q: float, T: float, ln_K: float, dH: float,
                             allow_extrapolation: bool) -> tuple[float, str]:
    """The temperature nearest T, on the side where K moves towards Q, at which ln K = ln Q."""
    gap = ln_K - ln_Q
    if gap == 0.0:
        return T, ""
    slope = dH / (R * T * T)
    if slope == 0.0:
        return math.nan, "K does not change with temperature here"
    low, high = _EXTRAPOLATION_RANGE if allow_extrapolation else rx.T_range
    direction = -1.0 if gap * slope > 0 else 1.0

    def mismatch(t: float) -> float:
        return rx.ln_K(t, allow_extrapolation=True) - ln_Q

    a, f_a = T, gap
    step = max(1.1 * abs(gap / slope), 1e-6)
    while low <= a <= high:
        b = min(max(a + direction * step, low), high)
        f_b = mismatch(b)
        if f_a * f_b <= 0.0:
            root = scipy.optimize.brentq(mismatch, min(a, b), max(a, b), xtol=1e-10, rtol=4 * np.finfo(float).eps)
            return float(root), ""
        if b in (low, high):
            break
        a, f_a, step = b, f_b, 2.0 * step
    return math.nan, f"no temperature from {low:g} K to {high:g} K (the data range) has K = Q"


def approach_table(approaches: Mapping[str, Approach]) -> str:
    """The approaches as a plain-text table (K and Q in bar^dn, temperatures in degC, approach in K)."""
    width = max([len(n) for n in approaches] + [8])
    lines = [f"{'reaction':<{width}}  {'K':>11}  {'Q':>11}  {'unit':<8} {'T/degC':>8} {'T_eq/degC':>10} {'approach/K':>11}"]
    for name, a in approaches.items():
        T_eq = f"{a.T_eq - 273.15:10.2f}" if math.isfinite(a.T_eq) else f"{'-':>10}"
        approach = f"{round(a.approach_K, 2) + 0.0:11.2f}" if math.isfinite(a.approach_K) else f"{'-':>11}"
        lines.append(f"{name:<{width}}  {a.K:11.5g}  {a.Q:11.5g}  {a.K_unit:<8} {a.T - 273.15:8.2f} {T_eq} {approach}"
                     + (f"  ({a.note})" if a.note else ""))
    lines.append("approach > 0: short of equilibrium (T - T_eq for endothermic, T_eq - T for exothermic reactions)")
    return "\n".join(lines)
