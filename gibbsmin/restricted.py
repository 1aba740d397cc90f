"""Restricted equilibrium: reactions held at a temperature approach, species held at fixed amounts.

Both are solved by the same minimiser as an ordinary equilibrium.

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
import functools
import math
import numbers
from collections.abc import Mapping, Sequence

import numpy as np
from numpy.typing import NDArray

from .equilibrium import Equilibrium
from .errors import InputError
from .reactions import Reaction, independent_reactions, reaction
from .settle import Setup, check_method, checked, prepare, solve_fixed
from .streams import Stream
from .system import System
from .thermo.database import SpeciesDatabase
from .thermo.datasets import choose_database
from .thermo.nasa7 import R
from .units import to_kelvin, to_pascal

__all__ = ["equilibrate_with_approach", "reaction_offsets", "settling_temperature"]


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
        Offsets in the system's species order, for ``settle.solve_fixed(..., offsets=...)``.
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


def _with_held_uncertainties(eq, setup, problem, result, complete, held, offsets_at, data_set, phase, method,
                             allow_extrapolation):
    """The answer with its uncertainties, the held reactions' K(T_r) moving with the data (implicit derivatives
    for the ideal gas; differences of whole solves, warm-started, where a cubic's phi moves with them)."""
    from .settle import with_uncertainties
    from .uncertainty import point_uncertainties

    T = eq.T
    offset_map = held_offset_map(setup.system, complete, {rx.name: settling_temperature(rx, T, dT)
                                                          for rx, dT in held}, T)
    amounts_at = None
    if phase is not None:
        base = offsets_at(T)

        def amounts_at(offsets):
            from .nonideal import solve_nonideal

            moved = solve_nonideal(setup, T, eq.P, phase, method=method, start=result,
                                   offsets=base + offsets + offset_map @ (offsets * R * T),
                                   allow_extrapolation=allow_extrapolation)[0]
            return np.array([moved.amounts[s] for s in setup.system.names])
    return with_uncertainties(eq, point_uncertainties(setup, problem, result, T, data_set, amounts_at=amounts_at,
                                                      offset_map=offset_map))


def _finite(value: object, what: str) -> float:
    if isinstance(value, bool) or not isinstance(value, numbers.Real) or not math.isfinite(value):
        raise InputError(f"{what} must be a finite number, got {value!r}")
    return float(value)


def _frozen_amounts(frozen, feed: Mapping[str, float], db: SpeciesDatabase) -> dict[str, float]:
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
        amount = _finite(amount, f"frozen amount of {record.name}")
        if amount < 0:
            raise InputError(f"frozen amount of {record.name} is negative ({amount}); give zero or a positive amount in mol")
        amounts[record.name] = amount
    return amounts


def _with_frozen_totals(setup: Setup, feed: Mapping[str, float], frozen: Mapping[str, float]) -> Setup:
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


def _check_held(rx: Reaction, setup: Setup, frozen: Mapping[str, float]) -> None:
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


def _check_approaches_met(eq: Equilibrium, held: Sequence[tuple[Reaction, float]],
                          ln_phi: Mapping[str, float] | None, db: SpeciesDatabase,
                          allow_extrapolation: bool) -> None:
    """Refuse an answer whose composition does not hold each reaction at the approach asked for.

    The quotients are recomputed from the answer's gas; a reaction with a
    condensed species the answer does not hold cannot stand at any approach.
    """
    from .errors import ConvergenceError
    from .reactions import approach_temperatures, gas_state

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


def equilibrate_with_approach(
    feed: Mapping[str, object] | Stream,
    T: float | str | None,
    P: float | str,
    approach: Mapping[str | Reaction, float] | None = None,
    *,
    frozen: Sequence[str] | Mapping[str, float] | None = None,
    species: Sequence[str] | None = None,
    exclude: Sequence[str] = (),
    reactions: Sequence[str | Reaction] = (),
    method: str = "auto",
    ln_phi: Mapping[str, float] | None = None,
    gas: str = "ideal",
    kij: str | Mapping[tuple[str, str], float] | None = "shipped",
    T_feed: float | Mapping[str, float] | None = None,
    adiabatic: bool = False,
    heat_input: float = 0.0,
    T_bounds: tuple[float, float] | None = None,
    db: SpeciesDatabase | None = None,
    allow_extrapolation: bool = False,
    data: str | None = None,
    uncertainty: bool = False,
) -> Equilibrium:
    """Equilibrium with reactions held at a temperature approach and species frozen, at fixed T or adiabatic.

    Parameters
    ----------
    feed : mapping or Stream
        Species to amount [mol] (or a Stream, whose mol/s serve as mol); for
        the energy balance also stream name to such a mapping, as for
        :func:`gibbsmin.equilibrate`.
    T : float or str or None
        Outlet temperature, [K] (or text such as ``"850 degC"``); None with
        ``adiabatic=True`` (or a ``heat_input``), where the energy balance sets it.
    P : float or str
        Pressure, [Pa] (or text such as ``"30 bar(g)"``).
    approach : mapping, optional
        Reaction (name, equation or Reaction) to its approach, [K]: positive =
        short of equilibrium, e.g. ``{"steam methane reforming": 10.0}``.
    frozen : list or mapping, optional
        Gas species held at their feed amount (a list), or at a chosen amount
        [mol] (a mapping); they do not react but dilute the gas.
    species, exclude
        The species set, as for :func:`gibbsmin.equilibrate`.
    reactions : list, optional
        Reactions that must stay at equilibrium, placed in the independent set
        before the default choice (see the module docstring).
    method : {"auto", "newton", "convex"}
    ln_phi : mapping, optional
        Gas species to ln of its fugacity coefficient, held fixed for the solve.
    gas, kij : optional
        A cubic gas model instead (``gas="peng-robinson"``), iterated to
        convergence as in :func:`gibbsmin.equilibrate`; not with ``ln_phi``.
        The approach is then on the fugacity quotient: K(T_settle) = Q_f.
    T_feed, adiabatic, heat_input, T_bounds
        The energy balance, as for :func:`gibbsmin.equilibrate` (with T given,
        ``T_feed`` adds the duty to the result): the outlet
        temperature at which the outlet with its held reactions holds the
        inlet enthalpy plus ``heat_input``.  Each held reaction settles at
        its approach from that outlet temperature.
    db : SpeciesDatabase, optional
    allow_extrapolation : bool
    data : str, optional
        The thermochemical data set by name, as for :func:`gibbsmin.equilibrate`.
    uncertainty : bool
        Fill the answer's uncertainty fields as :func:`gibbsmin.equilibrate`
        does, with each held reaction's K(T_r) moving with the formation data
        (``held_offset_map``); at a fixed T, not with ``ln_phi``.

    Returns
    -------
    Equilibrium
        With ``extras``: "approach K", "settling temperature K", "reactions at
        equilibrium" (equations) and "frozen mol"; with the energy balance also
        the energy figures of :func:`gibbsmin.equilibrate`.

    Examples
    --------
    >>> eq = equilibrate_with_approach({"CH4": 1.0, "H2O": 3.0}, "850 degC", "30 bar",
    ...                                approach={"steam methane reforming": 10.0})
    >>> round(eq.extras["settling temperature K"]["steam methane reforming"], 2)
    1113.15
    """
    from . import energy

    db = choose_database(data, db)
    P = to_pascal(P)
    check_method(method)
    if isinstance(feed, Stream):
        feed = feed.feed_mol()
    heat = energy.heat_input_of(heat_input)
    energy_balance = T is None
    if energy_balance != bool(adiabatic or heat):
        raise InputError("give the outlet temperature T, or T=None with adiabatic=True (or a heat_input) to have the "
                         "energy balance find it; not both")
    if energy_balance and ln_phi is not None:
        raise InputError("ln_phi is held fixed at one state, which an energy balance moves away from; use "
                         "gas='peng-robinson' (iterated) or leave ln_phi out")
    if uncertainty and (energy_balance or ln_phi is not None):
        raise InputError("uncertainty=True with held approaches is propagated at a fixed outlet temperature and "
                         "with the gas model iterated: give T, and gas='peng-robinson' instead of ln_phi if "
                         "the gas is not ideal")
    inlet = energy.read_inlet(feed, T_feed, db)
    if energy_balance and not inlet.has_temperatures:
        raise InputError("the energy balance needs the feed temperature: pass T_feed in K")
    if approach is None:
        approach = {}
    if not isinstance(approach, Mapping):
        raise InputError("approach takes a mapping of reaction to approach in K, e.g. {'steam methane reforming': 10.0}")
    held = [(reaction(spec, db=db), _finite(value, f"approach of {spec}")) for spec, value in approach.items()]
    canonical_feed = inlet.total
    frozen_mol = _frozen_amounts(frozen, canonical_feed, db)
    if energy_balance:
        T_span = energy.outlet_bounds(db, inlet, species, T_bounds)
    else:
        T = to_kelvin(T)
        T_span = (T, T)
    setup = prepare({**canonical_feed, **frozen_mol}, species=species, exclude=exclude, inert=list(frozen_mol),
                    T_span=T_span, db=db, allow_extrapolation=allow_extrapolation)
    setup = _with_frozen_totals(setup, canonical_feed, frozen_mol)
    for rx, _ in held:
        _check_held(rx, setup, frozen_mol)
    complete = independent_reactions(setup.system, include=[rx for rx, _ in held] + list(reactions), db=db)

    def offsets_at(T_now: float) -> NDArray[np.float64]:
        shift = {rx.name: rx.ln_K(T_now, allow_extrapolation=allow_extrapolation)
                 - rx.ln_K(settling_temperature(rx, T_now, dT), allow_extrapolation=allow_extrapolation)
                 for rx, dT in held}
        return reaction_offsets(setup.system, complete, [shift.get(r.name, 0.0) for r in complete])

    ln_phi_gas = None
    if ln_phi is not None:
        if gas != "ideal":
            raise InputError("give either ln_phi (held fixed) or a gas model (iterated), not both")
        by_name = {db[str(s)].name: _finite(v, f"ln_phi of {s}") for s, v in ln_phi.items()}
        ln_phi_gas = np.array([by_name.get(s, 0.0) for s in setup.system.gas_names])
    parts = [f"{rx.name} at {dT:g} K approach" for rx, dT in held] + [f"{s} frozen" for s in frozen_mol]
    specification = "; ".join(["H and P" if energy_balance else "T and P"] + parts)
    phase = None
    if gas != "ideal":
        from .nonideal import gas_phase  # the outer loop builds on solve_fixed

        phase = gas_phase(setup.system, gas, kij=kij)

    def step(T_now: float, start=None):
        if phase is not None:
            from .nonideal import solve_nonideal

            return solve_nonideal(setup, T_now, P, phase, method=method, offsets=offsets_at(T_now), start=start,
                                  allow_extrapolation=allow_extrapolation, specification=specification)
        return solve_fixed(setup, T_now, P, method=method, offsets=offsets_at(T_now), ln_phi=ln_phi_gas,
                           start=start, allow_extrapolation=allow_extrapolation, specification=specification)

    residual = None if phase is None else phase.residual_enthalpy
    # Imported here: the cubic's helpers build on solve_fixed.
    from .nonideal import inlet_enthalpies, phase_set_step, stability_checked, with_stability_verdict

    H_in, gross_in = inlet_enthalpies(phase, inlet, P, db, allow_extrapolation)
    if energy_balance:
        eq, _, _ = energy.solve_energy_balance(
            setup, H_in + heat, P, T_bounds=T_span, gross_inlet=gross_in + abs(heat),
            coldest_feed=min(inlet.temperatures.values()), method=method, allow_extrapolation=allow_extrapolation,
            residual_enthalpy=residual, step=step, phase_set_solve=not held,
            phase_set_step=None if phase is None else functools.partial(phase_set_step, phase),
            enthalpy_kinks=None if phase is None else phase.enthalpy_kinks)
        eq = dataclasses.replace(eq, specification=specification)
    else:
        eq, problem, result = step(T)
        if uncertainty:
            eq = _with_held_uncertainties(eq, setup, problem, result, complete, held, offsets_at, db.data_set,
                                          phase, method, allow_extrapolation)
    extras_energy = energy.energy_extras(setup, eq, P, inlet, H_in, heat, residual_enthalpy=residual,
                                         inlet_gross=gross_in)
    if phase is not None:
        extras_energy["gas_phase_stability"] = stability_checked(phase, eq)
    eq = checked(eq)
    _check_approaches_met(eq, held, ln_phi, db, allow_extrapolation)
    extras = {
        **eq.extras,
        **extras_energy,
        "approach K": {rx.name: dT for rx, dT in held},
        "settling temperature K": {rx.name: settling_temperature(rx, eq.T, dT) for rx, dT in held},
        "reactions at equilibrium": [r.equation for r in complete if r.name not in {rx.name for rx, _ in held}],
        "frozen mol": dict(frozen_mol),
        "data_set": db.data_set,
    }
    return with_stability_verdict(dataclasses.replace(eq, extras=extras))
