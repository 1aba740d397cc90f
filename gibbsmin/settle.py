"""``equilibrate``: the public entry point for equilibrium at fixed temperature and pressure.

This module turns names and numbers into a System and a Problem, hands the
Problem to a solver, and turns the solver's arrays back into an Equilibrium.
Everything here works in K, Pa and mol; the trade's units are read elsewhere.
"""

from __future__ import annotations

import math
import numbers
import warnings
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, replace

import numpy as np
from numpy.typing import NDArray

from .eos.interactions import InteractionTable
from .equilibrium import Equilibrium
from .errors import ConvergenceError, InputError, TemperatureRangeError
from .solve import SOLVERS, SolverResult, solve
from .system import Problem, System, reduce, select_species, standard_mu0
from .thermo.database import SpeciesDatabase, default_database
from .thermo.datasets import choose_database

#: The total feed amounts accepted, [mol].  The answer does not depend on the total, and far beyond
#: these the element totals, G/RT and the enthalpies leave the range of floating-point numbers
#: (a total of 1e308 mol overflows its hydrogen count); within them every solve keeps a margin of
#: more than 1e100 on either side.
FEED_TOTAL_RANGE = (1e-100, 1e100)

#: Beyond this stationarity residual an uncertified answer is refused rather than returned with a warning.
_USABLE_STATIONARITY = 1e-4


@dataclass(frozen=True)
class Setup:
    """A feed on a species set, ready to be solved at any T inside the data ranges.

    Attributes
    ----------
    system : System
    feed : dict
        Canonical species name to amount, [mol].
    b : ndarray
        Element totals of the feed on the system's element rows, [mol].
    omitted : dict
        Default-set species left out, with the reason.
    explicit : frozenset
        Species the caller named (feed, explicit set): out of range is an error for them.
    """

    system: System
    feed: Mapping[str, float]
    b: NDArray[np.float64]
    omitted: Mapping[str, str]
    explicit: frozenset[str]


def _positive_number(value: object, name: str, unit: str) -> float:
    if isinstance(value, bool) or not isinstance(value, numbers.Real):
        raise InputError(f"{name} must be a number in {unit}, got {value!r}")
    value = float(value)
    if not math.isfinite(value) or value <= 0.0:
        raise InputError(f"{name} must be a positive finite number in {unit}, got {value!r}")
    return value


def check_feed(feed: object, db: SpeciesDatabase) -> dict[str, float]:
    """Canonical names and validated amounts of a feed mapping."""
    if not isinstance(feed, Mapping) or not feed:
        raise InputError("feed must be a non-empty mapping of species name to amount in mol, e.g. {'CH4': 1, 'H2O': 3}")
    amounts: dict[str, float] = {}
    for name, amount in feed.items():
        record = db[str(name)]
        if isinstance(amount, bool) or not isinstance(amount, numbers.Real) or not math.isfinite(float(amount)):
            raise InputError(f"feed amount of {name} must be a finite number of mol, got {amount!r}")
        if amount < 0:
            raise InputError(f"feed amount of {name} is negative ({amount}); amounts must be zero or positive")
        amounts[record.name] = amounts.get(record.name, 0.0) + float(amount)
    total = sum(amounts.values())
    if total <= 0.0:
        raise InputError("every feed amount is zero; give at least one species a positive amount")
    low, high = FEED_TOTAL_RANGE
    if not low <= total <= high:
        raise InputError(
            f"the feed totals {total:g} mol, outside the {low:g} to {high:g} mol that can be computed; "
            "scale the feed, e.g. to fractions that sum to one (the equilibrium composition does not depend "
            "on the total)")
    return amounts


def prepare(
    feed: Mapping[str, float],
    *,
    species: Sequence[str] | None = None,
    exclude: Sequence[str] = (),
    inert: Sequence[str] = (),
    T_span: tuple[float, float] | None = None,
    db: SpeciesDatabase | None = None,
    allow_extrapolation: bool = False,
) -> Setup:
    """Build the species set and element totals of a feed.

    ``T_span`` (lowest and highest temperature the solve may visit, [K]) decides
    which default-set gas species are left out for lack of data.
    """
    db = db or default_database()
    amounts = check_feed(feed, db)
    if isinstance(species, str) or isinstance(exclude, str) or isinstance(inert, str):
        raise InputError("species, exclude and inert take lists of names, e.g. exclude=['C(s)']")
    records = select_species(db, list(amounts), species, exclude)
    explicit = set(amounts) | ({db[s].name for s in species} if species is not None else set())
    inert_names = [db[name].name for name in inert]
    for name in inert_names:
        if name not in amounts:
            raise InputError(f"inert species {name} is not in the feed; inert species keep their feed amount")
    omitted: dict[str, str] = {}
    if T_span is not None and not allow_extrapolation:
        T_lo, T_hi = T_span
        kept = []
        for record in records:
            if not record.is_gas or record.T_min <= T_lo and T_hi <= record.T_max:
                kept.append(record)
            elif record.name in explicit:
                T_bad = T_lo if T_lo < record.T_min else T_hi
                raise TemperatureRangeError(record.name, T_bad, record.T_min, record.T_max)
            else:
                omitted[record.name] = f"no data from {T_lo:g} K to {T_hi:g} K (fitted {record.T_min:g} to {record.T_max:g} K)"
        records = kept
    system = System.from_records(records, inert=inert_names)
    feed_records = db.resolve(list(amounts))
    missing = sorted({el for r in feed_records if r.name not in inert_names for el in r.elements}
                     - set(system.elements))
    if missing:
        raise InputError(
            f"element(s) {', '.join(missing)} in the feed cannot be carried by any species of the set; "
            "add a species that contains them"
        )
    b = system.element_matrix(feed_records) @ np.array(list(amounts.values()))
    return Setup(system, amounts, b, omitted, frozenset(explicit))


def build_problem(setup: Setup, T: NDArray[np.float64], P: NDArray[np.float64],
                  b: NDArray[np.float64] | None = None, ln_phi: NDArray[np.float64] | None = None,
                  allow_extrapolation: bool = False) -> Problem:
    """The dimensionless problem of a setup at temperatures T [K] and pressures P [Pa] (batches)."""
    system = setup.system
    T = np.atleast_1d(np.asarray(T, dtype=float))
    outside = system.table.outside_range(T)
    if not allow_extrapolation:
        gas_outside = outside[:, : system.n_gas]
        if np.any(gas_outside):
            point, j = np.argwhere(gas_outside)[0]
            record = system.records[j]
            raise TemperatureRangeError(record.name, float(T[point]), record.T_min, record.T_max)
    allowed = ~outside if not allow_extrapolation else np.ones_like(outside)
    allowed[:, : system.n_gas] = True
    b = setup.b if b is None else b
    b = np.broadcast_to(np.atleast_2d(b), (T.size, system.A.shape[0]))
    return reduce(system, b, standard_mu0(system, T, P, ln_phi), allowed)


def to_equilibrium(setup: Setup, problem: Problem, result: SolverResult, certificates, i: int,
                   T: float, P: float, gas_model: str = "ideal", specification: str = "T and P") -> Equilibrium:
    """The Equilibrium of point i of a solved batch."""
    system = setup.system
    names = system.names
    S = len(names)
    ln_n = np.full(S, -np.inf)
    n = np.zeros(S)
    G = problem.n_gas
    keep = problem.keep
    ln_n[keep[:G]] = result.ln_n_gas[i]
    n[keep[:G]] = np.exp(result.ln_n_gas[i])
    n[keep[G:]] = result.n_condensed[i]
    mu = problem.mu0[i].copy()
    gas_total = n[keep[:G]].sum()
    if gas_total > 0.0:
        mu[:G] += result.ln_n_gas[i] - np.log(gas_total)
    n_kept = n[keep]
    G_RT = float(np.sum(n_kept[n_kept > 0] * mu[n_kept > 0]))
    potentials = _element_potentials(system, problem, result.pi[i])
    omitted = dict(setup.omitted)
    for local in np.flatnonzero(~problem.allowed[i]):
        omitted[names[keep[local]]] = "outside its data range at this temperature: cannot appear"
    return Equilibrium(
        T=T, P=P,
        amounts={s: float(v) for s, v in zip(names, n)},
        phase_of={r.name: ("gas" if r.is_gas else r.name) for r in system.records},
        ln_gas_amounts={s: float(ln_n[j]) for j, s in enumerate(system.gas_names)},
        element_potentials=potentials,
        G_RT=G_RT,
        certificate=certificates[i],
        specification=specification,
        gas_model=gas_model,
        omitted=omitted,
    )


def _element_potentials(system: System, problem: Problem, pi: NDArray[np.float64]) -> dict[str, float]:
    """Potentials on the System's element rows; NaN for elements absent from the feed."""
    A_kept = system.A[:, problem.keep]
    present = np.any(A_kept != 0.0, axis=1)
    lam = np.full(len(system.elements), np.nan)
    if problem.A.shape[0] == np.count_nonzero(present):
        # No row was dropped: the solve's potentials are those of the present elements, in order.
        lam[present] = (pi @ problem.basis)[present]
    else:
        # Dependent element rows were dropped for the solve; the least-norm
        # potentials reproduce the same species potentials on all rows.
        lam[present] = np.linalg.lstsq(A_kept[present].T, pi @ problem.A, rcond=None)[0]
    return {el: float(v) for el, v in zip(system.elements, lam)}


def equilibrate(
    feed: Mapping[str, object],
    T: float | None = None,
    P: float | None = None,
    *,
    T_feed: float | Mapping[str, float] | None = None,
    adiabatic: bool = False,
    heat_input: float = 0.0,
    species: Sequence[str] | None = None,
    exclude: Sequence[str] = (),
    inert: Sequence[str] = (),
    method: str = "auto",
    gas: str = "ideal",
    kij: str | Mapping[tuple[str, str], float] | InteractionTable | None = "shipped",
    db: SpeciesDatabase | None = None,
    data: str | None = None,
    allow_extrapolation: bool = False,
    sensitivities: bool = False,
    T_bounds: tuple[float, float] | None = None,
    uncertainty: bool = False,
) -> Equilibrium:
    """Equilibrium of a feed at fixed temperature and pressure, or at the temperature the energy balance sets.

    Parameters
    ----------
    feed : mapping
        Species name (or alias) to amount, [mol]; or, for several streams
        mixed at the inlet, stream name to such a mapping.  Any time basis
        will do (mol/s makes every heat figure a power in W).
    T : float, optional
        Outlet temperature, [K].  Leave it out with ``adiabatic=True`` (or a
        ``heat_input``) to have the energy balance find it.
    P : float
        Pressure, [Pa].
    T_feed : float or mapping, optional
        Inlet temperature, [K]: one number for the whole feed, or a mapping
        per feed species or per feed stream (each mixed in at its own
        temperature).  Needed for the energy balance; with ``T`` given it
        adds the reactor's duty to the result.
    adiabatic : bool
        Find the outlet temperature at which the outlet enthalpy equals the
        inlet enthalpy plus ``heat_input`` (specification "H and P").
    heat_input : float
        Heat added to the reactor, [J per the feed amounts; W for mol/s];
        negative for heat removed or lost.
    species : list of str, optional
        The species set; by default every species of the database made only
        of the feed's elements.
    exclude : list of str
        Species to leave out of the set (e.g. ``["C(s)"]`` to suppress carbon).
    inert : list of str
        Feed species that do not react but still dilute the gas.
    method : {"auto", "newton", "convex"}
    gas : {"ideal", "peng-robinson", "srk"}
        The gas model; the cubic equations of state take their critical
        constants from the species data and treat species without them as
        ideal (``gibbsmin.nonideal``).  The result's ``gas_model`` names it.
    kij : "shipped", "none" or mapping
        Binary interaction parameters of the cubic: "shipped" (default) takes
        the published values of ``species/interactions.toml`` (Peng-Robinson
        only; zero for pairs it lacks), "none" sets every one to zero, a
        mapping ``{("H2", "NH3"): 0.05}`` gives exactly those pairs, and an
        ``InteractionTable`` (``gibbsmin.eos.default_interactions().updated({...})``)
        its pairs of the model.  The result's ``extras["binary_interactions"]``
        lists the non-zero ones used.
    db : SpeciesDatabase, optional
    data : str, optional
        The thermochemical data set by name (``gibbsmin.thermo.DATA_SETS``):
        "nasa-1993" (the default) or "atct-anchored"; not with a ``db`` of
        another set.  The result's ``extras["data_set"]`` names the one used.
    allow_extrapolation : bool
        Use polynomials outside their fitted temperature ranges.
    sensitivities : bool
        Add ``extras["sensitivities"]``: d(amounts)/dT, d/dP, d/d(feed) and
        the equilibrium and frozen heat capacities (``sensitivity.Sensitivities``);
        with a cubic gas by central differences of whole solves, so that phi
        moves with the conditions.
    T_bounds : (float, float), optional
        Lowest and highest outlet temperature the energy balance may give,
        [K]; by default the range where every named gas species has data.
    uncertainty : bool
        Fill ``Equilibrium.uncertainty``: the standard uncertainty [mol] of
        every amount, propagated linearly from the data set's uncertainties of
        the enthalpies of formation (``gibbsmin.uncertainty``; needs a data set
        that states them, ``data="atct-anchored"``).  Where the energy balance
        sets T (ideal gas), also ``Equilibrium.T_uncertainty`` [K], with the
        amounts' uncertainties along the energy balance.

    Returns
    -------
    Equilibrium
        ``extras`` holds ``enthalpy_J`` and ``entropy_J_per_K`` of the outlet;
        with ``T_feed`` also ``feed_enthalpy_J``, ``duty_W`` (heat added to
        the reactor, sign convention in ``duty_sign_convention``) and
        ``energy_balance_residual`` (relative to the gross enthalpy).

    Examples
    --------
    >>> eq = equilibrate({"CH4": 1.0, "H2O": 3.0}, T=1100.0, P=30e5)
    >>> round(eq.mole_fractions["H2"], 3) > 0.4
    True
    >>> flame = equilibrate({"CH4": 1.0, "O2": 2.0, "N2": 7.52}, P=101325.0, T_feed=298.15,
    ...                     adiabatic=True, exclude=["C(s)", "H2O(l)", "H2O(s)"])
    >>> 2200 < flame.T < 2250
    True
    """
    # energy.py builds on this module's solve_fixed, so it is imported where it is needed.
    from . import energy, nonideal, sensitivity

    if P is None:
        raise InputError("P is required: the pressure in Pa, e.g. P=30e5")
    P = _positive_number(P, "P", "Pa")
    check_method(method)
    db = choose_database(data, db)
    inlet = energy.read_inlet(feed, T_feed, db)
    heat = energy.heat_input_of(heat_input)
    energy_balance = T is None
    if energy_balance and not (adiabatic or heat):
        raise InputError("give the outlet temperature T, or adiabatic=True (with T_feed) to have the energy "
                         "balance find it")
    if not energy_balance and (adiabatic or heat):
        raise InputError("T fixes the outlet temperature, so the energy balance cannot also fix it: leave T out "
                         "for an adiabatic reactor (or one with heat_input), or drop adiabatic/heat_input to get "
                         "the duty at T (pass T_feed)")
    if uncertainty and energy_balance and gas != "ideal":
        raise InputError(f"uncertainty=True with the energy balance is propagated for the ideal gas only; with "
                         f"gas={gas!r} give the outlet temperature T, or drop uncertainty")
    if energy_balance:
        if not inlet.has_temperatures:
            raise InputError("the energy balance needs the feed temperature: pass T_feed in K (one number, or one "
                             "per feed species or stream)")
        T_span = energy.outlet_bounds(db, inlet, species, T_bounds)
    else:
        if T_bounds is not None:
            raise InputError("T_bounds limits the outlet temperature the energy balance may find; with T given "
                             "there is nothing to find, so leave T_bounds out")
        T = _positive_number(T, "T", "K")
        T_span = (T, T)
    setup = prepare(inlet.total, species=species, exclude=exclude, inert=inert, T_span=T_span, db=db,
                    allow_extrapolation=allow_extrapolation)
    if gas == "ideal" and not (kij is None or (isinstance(kij, str) and kij in nonideal.KIJ_CHOICES)
                               or (isinstance(kij, Mapping) and not kij) or isinstance(kij, InteractionTable)):
        raise InputError(f"kij={kij!r} only applies to a cubic gas model: pass gas='peng-robinson' or 'srk' "
                         "with it, or leave kij out for the ideal gas")
    phase = None if gas == "ideal" else nonideal.gas_phase(setup.system, gas, kij=kij)
    H_in, gross_in = nonideal.inlet_enthalpies(phase, inlet, P, db, allow_extrapolation)
    if energy_balance:
        eq, problem, result = energy.solve_energy_balance(
            setup, H_in + heat, P, T_bounds=T_span, gross_inlet=gross_in + abs(heat),
            coldest_feed=min(inlet.temperatures.values()), method=method,
            allow_extrapolation=allow_extrapolation,
            **({} if phase is None else nonideal.energy_hooks(setup, P, phase, method=method,
                                                              allow_extrapolation=allow_extrapolation)))
    elif phase is None:
        eq, problem, result = solve_fixed(setup, T, P, method=method, allow_extrapolation=allow_extrapolation)
    else:
        eq, problem, result = nonideal.solve_nonideal(setup, T, P, phase, method=method,
                                                      allow_extrapolation=allow_extrapolation)
    extras = energy.energy_extras(setup, eq, P, inlet, H_in, heat, inlet_gross=gross_in,
                                  residual_enthalpy=None if phase is None else phase.residual_enthalpy)
    extras["data_set"] = db.data_set
    if phase is not None:
        extras["gas_phase_stability"] = nonideal.stability_checked(phase, eq)
    if sensitivities and phase is not None:
        extras["sensitivities"] = nonideal.nonideal_sensitivities(
            setup, phase, result, eq.T, P, method=method, allow_extrapolation=allow_extrapolation, db=db).to_dict()
    elif sensitivities:
        extras["sensitivities"] = sensitivity.equilibrium_sensitivities(setup, problem, result, eq.T, P,
                                                                        db=db).to_dict()
    if uncertainty:
        eq = with_uncertainties(eq, _uncertainties(setup, problem, result, eq, phase, method, allow_extrapolation,
                                                   db.data_set, inlet.total if energy_balance else None))
    # The stability verdict enters the certificate after the precision check, which judges the residuals alone.
    return nonideal.with_stability_verdict(checked(energy.with_extras(eq, extras)))


def with_uncertainties(eq: Equilibrium, u) -> Equilibrium:
    """The answer with an ``uncertainty.Uncertainties`` in its typed fields."""
    return replace(eq, uncertainty=u.amounts, mole_fraction_uncertainty=u.mole_fractions,
                   dry_mole_fraction_uncertainty=u.dry_mole_fractions, T_uncertainty=u.T)


def _uncertainties(setup, problem, result, eq, phase, method, allow_extrapolation, data_set, balanced_feed):
    """The answer's uncertainties: along the energy balance where ``balanced_feed`` (the inlet) is given."""
    from . import nonideal, uncertainty

    if balanced_feed is not None:
        return uncertainty.energy_balance_uncertainty(setup, problem, result, eq.T, eq.P, balanced_feed, data_set)
    amounts_at = None
    if phase is not None:  # phi moves with the composition: differences of whole solves
        def amounts_at(offsets):
            moved = nonideal.solve_nonideal(setup, eq.T, eq.P, phase, method=method, offsets=offsets, start=result,
                                            allow_extrapolation=allow_extrapolation)[0]
            return np.array([moved.amounts[s] for s in setup.system.names])
    return uncertainty.point_uncertainties(setup, problem, result, eq.T, data_set, amounts_at=amounts_at)


def check_method(method: str) -> None:
    if method not in SOLVERS:
        raise InputError(f"unknown method {method!r}; choose one of {', '.join(SOLVERS)}")


def solve_fixed(
    setup: Setup,
    T: float,
    P: float,
    *,
    method: str = "auto",
    offsets: NDArray[np.float64] | None = None,
    ln_phi: NDArray[np.float64] | None = None,
    start: SolverResult | None = None,
    allow_extrapolation: bool = False,
    gas_model: str = "ideal",
    specification: str = "T and P",
) -> tuple[Equilibrium, Problem, SolverResult]:
    """Equilibrium of a prepared setup at one T [K] and P [Pa]: the step every other specification repeats.

    Parameters
    ----------
    offsets : ndarray, shape (S,), optional
        Added to g0/RT of the system's species (restricted equilibrium: a
        reaction held away from its equilibrium constant).
    ln_phi : ndarray, shape (n_gas,), optional
        Fugacity coefficients of the gas species, held fixed for this solve.
    start : SolverResult, optional
        Warm start (a neighbouring answer on the same setup).

    Returns
    -------
    (Equilibrium, Problem, SolverResult)
        The answer, and the problem and raw solver output it came from (for
        sensitivities and warm starts).  The answer is not checked here: see
        ``checked``.
    """
    problem = fixed_problem(setup, T, P, offsets=offsets, ln_phi=ln_phi, allow_extrapolation=allow_extrapolation)
    result, certificates = solve(problem, method, start=start)
    eq = to_equilibrium(setup, problem, result, certificates, 0, T, P,
                        gas_model=gas_model, specification=specification)
    return eq, problem, result


def fixed_problem(setup: Setup, T: float, P: float, *, offsets: NDArray[np.float64] | None = None,
                  ln_phi: NDArray[np.float64] | None = None, allow_extrapolation: bool = False) -> Problem:
    """The one-point Problem that ``solve_fixed`` solves (offsets and ln phi as there)."""
    problem = build_problem(setup, np.array([T]), np.array([P]), ln_phi=ln_phi,
                            allow_extrapolation=allow_extrapolation)
    if offsets is not None:
        problem = Problem(problem.A, problem.b, problem.mu0 + np.asarray(offsets)[problem.keep][None, :],
                          problem.n_gas, problem.allowed, problem.keep, problem.basis)
    return problem


def checked(eq: Equilibrium, stacklevel: int = 3) -> Equilibrium:
    """Pass a certified answer, warn on a usable one, refuse a wrong one."""
    c = eq.certificate
    if c.certified:
        return eq
    if c.element_balance < 1e-6 and c.stationarity < _USABLE_STATIONARITY and c.complementarity > -1e-4:
        warnings.warn(f"equilibrium answer is imprecise: {c.summary()}", RuntimeWarning, stacklevel=stacklevel)
        return eq
    # Say what was tried: the cone solver has run whenever its name is in the certificate's solver.
    advice = ("Newton and the convex solver were both tried; check that the species set can represent the feed"
              if "convex" in c.solver else
              "try method='auto' (the convex solver where Newton fails), or check that the species set can "
              "represent the feed")
    raise ConvergenceError(
        f"no solver could certify an equilibrium at T = {eq.T:g} K, P = {eq.P:g} Pa ({c.summary()}); {advice}")
