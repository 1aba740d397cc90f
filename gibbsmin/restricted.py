"""Restricted equilibrium's parts: reactions held at a temperature approach, species held at fixed amounts.

Both are solved by the same minimiser as an ordinary equilibrium
(``prepared.Prepared`` runs it; ``gibbsmin.equilibrate_with_approach`` is its front door).

A reaction r held at K_r(T_r) instead of K_r(T) is a change of the standard
potentials: offsets delta are added to g0/RT such that

    nu_r . delta = ln K_r(T) - ln K_r(T_r)   for each held reaction,
    nu_s . delta = 0                         for every other reaction s of a complete independent set,

(the least-norm delta, which has no part along the rows of the element
matrix; those would change nothing).  The minimum of G with these potentials
is the state in which each held reaction has Q_r = K_r(T_r) while every other
reaction of the set keeps Q_s = K_s(T).  With the sign convention of
:mod:`gibbsmin.reactions` (positive approach = short of equilibrium), a held
reaction settles at T_r = T - approach when endothermic and T + approach when
exothermic, so the approach temperatures of the answer are the ones asked for.

Which reactions stay at equilibrium is part of the question: holding reforming
back while the water-gas shift stays at K(T) is not the same as holding it back
while dry reforming stays at K(T).  The set is that of
:func:`gibbsmin.reactions.independent_reactions` (the held reactions first,
then any the caller lists, then the trade's named reactions), and the answer
lists it in ``extras["reactions at equilibrium"]``.

A frozen species keeps a fixed amount: its feed amount, or one the caller
chooses.  It gets a private pseudo-element, like an inert species (it still
dilutes the gas), and when its amount differs from the feed the difference in
atoms is given to, or taken from, the other species.

The element potentials and G/RT of a restricted answer belong to the shifted
potentials; use quotients (:mod:`gibbsmin.reactions`, :mod:`gibbsmin.carbon`),
not element potentials, to judge it.
"""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Mapping, Sequence

import numpy as np
from numpy.typing import NDArray

from .equilibrium import Equilibrium
from .errors import ConvergenceError, InputError
from .reactions import Reaction, approach_temperatures, gas_state
from .fixed_step import Setup, finite_number
from .system import System
from .thermo.database import SpeciesDatabase
from .thermo.nasa7 import R

__all__ = ["reaction_offsets", "settling_temperature", "held_offset_map"]


def settling_temperature(rx: Reaction, T: float, approach_K: float) -> float:
    """The temperature [K] whose K a reaction with approach ``approach_K`` [K] at ``T`` [K] settles at.

    T - approach for an endothermic reaction, T + approach for an exothermic one.
    """
    return T - math.copysign(1.0, rx.enthalpy(T)) * approach_K


def reaction_offsets(system: System, reactions: Sequence[Reaction], ln_K_shift: Sequence[float]) -> NDArray[np.float64]:
    """Least-norm offsets to g0/RT [-] that move ln K of each reaction by minus its shift.

    Parameters
    ----------
    system : System
    reactions : list of Reaction
        A set of independent reactions among the system's species; reactions
        left out of it are unconstrained, so pass a complete set.
    ln_K_shift : list of float
        ln K_r(T) - ln K_r(T_r) for each reaction (zero for a reaction held at equilibrium), [-]; or an
        array of shape (reactions, k), giving k columns of offsets.

    Returns
    -------
    ndarray, shape (S,)
        Offsets in the system's species order, for ``fixed_step.solve_fixed(..., offsets=...)``.
    """
    if not reactions:
        return np.zeros(len(system.names))
    N = np.array([r.vector(system.names) for r in reactions])
    offsets, *_ = np.linalg.lstsq(N, np.asarray(ln_K_shift, dtype=float), rcond=None)
    return offsets


def held_offset_map(system: System, reactions: Sequence[Reaction], settling: Mapping[str, float],
                    T: float) -> NDArray[np.float64]:
    """How the offsets of held reactions move with the enthalpies of formation, [per J/mol], shape (S, S).

    A held reaction r keeps K_r(T_r): shifts dH of the formation enthalpies
    move ln K_r(T) by -nu_r.dH/(RT) and ln K_r(T_r) by -nu_r.dH/(R T_r), so
    its ln K shift moves by nu_r.dH (1/(R T_r) - 1/(R T)); column j is the
    least-norm offset change per unit dH_j.  ``settling`` gives T_r [K] by
    reaction name; the other reactions of the set keep a zero shift.
    """
    D = np.zeros((len(reactions), len(system.names)))
    for k, r in enumerate(reactions):
        if r.name in settling:
            D[k] = r.vector(system.names) * (1.0 / (R * settling[r.name]) - 1.0 / (R * T))
    return reaction_offsets(system, reactions, D)


def frozen_amounts(frozen, feed: Mapping[str, float], db: SpeciesDatabase) -> dict[str, float]:
    """Frozen species to their fixed amount [mol]."""
    if frozen is None:
        return {}
    if isinstance(frozen, str):
        raise InputError("frozen takes a list of names (held at their feed amount) or a mapping of name to amount in mol")
    chosen = frozen if isinstance(frozen, Mapping) else dict.fromkeys(frozen)
    amounts: dict[str, float] = {}
    for name, amount in chosen.items():
        record = db[str(name)]
        if not record.is_gas:
            raise InputError(f"frozen species must be gases; {record.name} is not (leave it out with exclude=[...] instead)")
        if amount is None:
            if record.name not in feed:
                raise InputError(f"{record.name} is not in the feed, so it has no feed amount to keep; "
                                 f"give its amount, e.g. frozen={{'{record.name}': 0.001}}")
            amount = feed[record.name]
        amount = finite_number(amount, f"frozen amount of {record.name}")
        if amount < 0:
            raise InputError(f"frozen amount of {record.name} is negative ({amount}); give zero or a positive amount in mol")
        amounts[record.name] = amount
    return amounts


def with_frozen_totals(setup: Setup, feed: Mapping[str, float], frozen: Mapping[str, float]) -> Setup:
    """The setup's element totals with each frozen species' atoms beyond its fixed amount given back to the rest."""
    system = setup.system
    b = setup.b.copy()
    for name, amount in frozen.items():
        released = feed.get(name, 0.0) - amount
        record = system.records[system.index(name)]
        for k, element in enumerate(system.elements):
            b[k] += released * record.elements.get(element, 0.0)
    scale = max(float(np.abs(b).max()), 1e-300)
    short = [system.elements[k] for k in np.flatnonzero(b < -1e-12 * scale)]
    if short:
        raise InputError(
            f"the frozen amounts need more {', '.join(short)} than the feed holds; lower them or add to the feed"
        )
    return dataclasses.replace(setup, b=np.maximum(b, 0.0))


def check_held(rx: Reaction, setup: Setup, frozen: Mapping[str, float]) -> None:
    system = setup.system
    missing = [s for s in rx.species if s not in system.names]
    if missing:
        raise InputError(
            f"the approach on {rx.name!r} involves {', '.join(missing)}, which the species set lacks (excluded, or "
            f"not made of the feed's elements); put {'them' if len(missing) > 1 else 'it'} in species=[...] or drop that approach"
        )
    fixed = [s for s in rx.species if s in frozen]
    if fixed:
        raise InputError(f"the approach on {rx.name!r} involves {', '.join(fixed)}, which is frozen and cannot react")
    b = dict(zip(system.elements, setup.b))
    absent = sorted({el for r in rx.records for el in r.elements if b.get(el, 0.0) <= 0.0})
    if absent:
        raise InputError(f"the approach on {rx.name!r} needs {', '.join(absent)}, which the feed does not contain")


#: A held reaction's ln Q may miss ln K at its settling temperature by this much, [-] (the solver's
#: stationarity tolerance is 1e-7 per species; a reaction sums a few of them).
APPROACH_LN_TOLERANCE = 1e-6


def check_approaches_met(eq: Equilibrium, held: Sequence[tuple[Reaction, float]],
                          ln_phi: Mapping[str, float] | None, db: SpeciesDatabase,
                          allow_extrapolation: bool) -> None:
    """Refuse an answer whose composition does not hold each reaction at the approach asked for.

    The quotients are recomputed from the answer's gas; a reaction with a
    condensed species the answer does not hold cannot stand at any approach.
    """
    state = gas_state(eq, ln_phi=ln_phi, db=db)
    for rx, dT in held:
        T_settle = settling_temperature(rx, eq.T, dT)
        miss = rx.ln_quotient(state) - rx.ln_K(T_settle, allow_extrapolation=allow_extrapolation)
        if abs(miss) <= APPROACH_LN_TOLERANCE:
            continue
        absent = [s for s in rx.species if eq.phase_of.get(s, "gas") != "gas" and eq.amounts.get(s, 0.0) <= 0.0]
        if absent:
            why = (f"the answer holds no {', '.join(absent)}, so the reaction is not at any approach (its gas is "
                   f"on the side where {', '.join(absent)} cannot form); drop that approach or hold another reaction")
        else:
            found = approach_temperatures(eq, reactions=[rx], ln_phi=ln_phi, db=db,
                                          allow_extrapolation=allow_extrapolation)[rx.name].approach_K
            why = (f"the answer's own composition gives an approach of {found:.4g} K (ln Q misses ln K at "
                   f"{T_settle:.6g} K by {miss:.3g}); try method='convex', or leave out the species that appear "
                   f"only at the outlet (e.g. exclude=['C(s)'])")
        raise ConvergenceError(f"the approach asked for on {rx.name!r} ({dT:g} K) is not met at T = {eq.T:.6g} K: "
                               f"{why}")
