"""The fixed-T step: a feed on its species set (Setup), its Problem at T and P, the solve, the Equilibrium.

This module turns names and numbers into a System and a Problem, hands the
Problem to a solver, and turns the solver's arrays back into an Equilibrium;
``prepared.Prepared`` runs it for every specification.
Everything here works in K, Pa and mol; the trade's units are read elsewhere.
"""

from __future__ import annotations

import math
import numbers
import warnings
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field

import numpy as np
from numpy.typing import NDArray

from .equilibrium import Equilibrium
from .errors import ConvergenceError, InputError, TemperatureRangeError
from .frozen import built
from .compiled import compiled
from .solve import SOLVERS, SolverResult, solve
from .system import P_REF, Problem, System, reduce, select_species
from .thermo.database import SpeciesDatabase, SpeciesRecord
from .thermo.datasets import default_database
from .thermo.nasa7 import GIBBS, polynomials

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


def positive_number(value: object, name: str, unit: str) -> float:
    """A validated positive finite number (T in K, P in Pa, ...), or an InputError naming it."""
    # A float is the common case: taken before the abstract-class test, which costs more than the rest.
    if type(value) is not float and (isinstance(value, bool) or not isinstance(value, numbers.Real)):
        raise InputError(f"{name} must be a number in {unit}, got {value!r}")
    value = float(value)
    if not math.isfinite(value) or value <= 0.0:
        raise InputError(f"{name} must be a positive finite number in {unit}, got {value!r}")
    return value


def finite_number(value: object, what: str) -> float:
    """A validated finite number (an approach in K, an amount in mol, ...), or an InputError naming it."""
    if isinstance(value, bool) or not isinstance(value, numbers.Real) or not math.isfinite(value):
        raise InputError(f"{what} must be a finite number, got {value!r}")
    return float(value)


def check_feed(feed: object, db: SpeciesDatabase) -> dict[str, float]:
    """Canonical names and validated amounts of a feed mapping."""
    if not (type(feed) is dict or isinstance(feed, Mapping)) or not feed:
        raise InputError("feed must be a non-empty mapping of species name to amount in mol, e.g. {'CH4': 1, 'H2O': 3}")
    amounts: dict[str, float] = {}
    for name, amount in feed.items():
        record = db[str(name)]
        if (type(amount) is not float and (isinstance(amount, bool) or not isinstance(amount, numbers.Real))) \
                or not math.isfinite(float(amount)):
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


@dataclass(frozen=True, eq=False)
class SpeciesSet:
    """The species a feed may settle to, before the temperature range leaves any out.

    Depends only on the names of the feed species and the set options, so it is
    built once per database (``feed_species_set``) and keeps the System of each
    subset the data ranges leave (``setup_on``).
    """

    records: tuple[SpeciesRecord, ...]
    feed_records: tuple[SpeciesRecord, ...]
    inert: tuple[str, ...]
    explicit: frozenset[str]
    T_min: NDArray[np.float64]
    T_max: NDArray[np.float64]
    is_gas: NDArray[np.bool_]
    is_explicit: NDArray[np.bool_]
    #: The temperatures every gas species has data for, [K] (lowest, highest): inside them none is left out.
    gas_span: tuple[float, float]
    systems: dict[bytes, tuple[System, NDArray[np.float64]]] = field(default_factory=dict, repr=False)


#: Species sets a database keeps (``SpeciesDatabase.memo``) before it forgets them all.
_MEMO_LIMIT = 1024


def feed_species_set(amounts: Mapping[str, float], *, species: Sequence[str] | None = None,
                     exclude: Sequence[str] = (), inert: Sequence[str] = (),
                     db: SpeciesDatabase) -> SpeciesSet:
    """The species set of a feed (canonical names to amounts) and the set options, from the database's memo."""
    key = ("species set", tuple(amounts), None if species is None else tuple(species), tuple(exclude), tuple(inert))
    found = db.memo.get(key)
    if found is not None:
        return found
    if isinstance(species, str) or isinstance(exclude, str) or isinstance(inert, str):
        raise InputError("species, exclude and inert take lists of names, e.g. exclude=['C(s)']")
    records = select_species(db, list(amounts), species, exclude)
    explicit = set(amounts) | ({db[s].name for s in species} if species is not None else set())
    inert_names = tuple(db[name].name for name in inert)
    for name in inert_names:
        if name not in amounts:
            raise InputError(f"inert species {name} is not in the feed; inert species keep their feed amount")
    found = SpeciesSet(
        tuple(records), tuple(db.resolve(list(amounts))), inert_names, frozenset(explicit),
        np.array([r.T_min for r in records]), np.array([r.T_max for r in records]),
        np.array([r.is_gas for r in records], dtype=bool), np.array([r.name in explicit for r in records], dtype=bool),
        (max((r.T_min for r in records if r.is_gas), default=0.0),
         min((r.T_max for r in records if r.is_gas), default=np.inf)))
    if len(db.memo) >= _MEMO_LIMIT:
        db.memo.clear()
    db.memo[key] = found
    return found


def setup_on(species_set: SpeciesSet, amounts: Mapping[str, float], T_span: tuple[float, float] | None,
             allow_extrapolation: bool = False) -> Setup:
    """The Setup of a feed on its species set, the gas species without data over ``T_span`` left out."""
    if T_span is None or allow_extrapolation or (species_set.gas_span[0] <= T_span[0]
                                                 and T_span[1] <= species_set.gas_span[1]):
        kept = None   # every species: the common case, taken without the array tests below
    else:
        T_lo, T_hi = T_span
        kept = ~species_set.is_gas | ((species_set.T_min <= T_lo) & (T_hi <= species_set.T_max))
        short = np.flatnonzero(~kept & species_set.is_explicit)
        if short.size:
            record = species_set.records[short[0]]
            T_bad = T_lo if T_lo < record.T_min else T_hi
            raise TemperatureRangeError(record.name, T_bad, record.T_min, record.T_max)
        if kept.all():
            kept = None
    key = b"" if kept is None else kept.tobytes()
    known = species_set.systems.get(key)
    if known is None:
        known = _system_of(species_set, [r for r, k in zip(species_set.records, kept) if k] if kept is not None
                           else list(species_set.records))
        species_set.systems[key] = known
    system, feed_matrix = known
    omitted: dict[str, str] = {}
    if kept is not None:
        T_lo, T_hi = T_span
        for j in np.flatnonzero(~kept):
            record = species_set.records[j]
            omitted[record.name] = (f"no data from {T_lo:g} K to {T_hi:g} K (fitted {record.T_min:g} to "
                                    f"{record.T_max:g} K)")
    b = feed_matrix @ np.fromiter(amounts.values(), dtype=float, count=len(amounts))
    return built(Setup, system=system, feed=amounts, b=b, omitted=omitted, explicit=species_set.explicit)


def _system_of(species_set: SpeciesSet, records: list[SpeciesRecord]) -> tuple[System, NDArray[np.float64]]:
    """The System of the records kept and the matrix from feed amounts to its element totals."""
    system = System.from_records(records, inert=species_set.inert)
    missing = sorted({el for r in species_set.feed_records if r.name not in species_set.inert for el in r.elements}
                     - set(system.elements))
    if missing:
        raise InputError(
            f"element(s) {', '.join(missing)} in the feed cannot be carried by any species of the set; "
            "add a species that contains them"
        )
    return system, system.element_matrix(species_set.feed_records)


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
    return setup_on(feed_species_set(amounts, species=species, exclude=exclude, inert=inert, db=db), amounts,
                    T_span, allow_extrapolation)


def build_problem(setup: Setup, T: NDArray[np.float64], P: NDArray[np.float64],
                  b: NDArray[np.float64] | None = None, ln_phi: NDArray[np.float64] | None = None,
                  allow_extrapolation: bool = False) -> Problem:
    """The dimensionless problem of a setup at temperatures T [K] and pressures P [Pa] (batches)."""
    system = setup.system
    table = system.table
    T = np.ascontiguousarray(np.atleast_1d(np.asarray(T, dtype=float)))
    P = np.atleast_1d(np.asarray(P, dtype=float))
    if P.shape != T.shape:
        P = np.ascontiguousarray(np.broadcast_to(P, T.shape))
    mu0 = np.empty((T.size, len(system.records)))
    allowed = np.empty((T.size, len(system.records)), dtype=bool)
    point, j = _conditions(table.low, table.high, table.T_mid, table.T_min, table.T_max, system.n_gas, T, P,
                           allow_extrapolation, mu0, allowed)
    if point >= 0:
        record = system.records[j]
        raise TemperatureRangeError(record.name, float(T[point]), record.T_min, record.T_max)
    if ln_phi is not None:
        mu0[:, : system.n_gas] += ln_phi
    b = setup.b if b is None else np.asarray(b, dtype=float)
    if b.ndim == 1:
        b = b.reshape(1, -1)
    if b.shape[0] != T.size:
        b = np.broadcast_to(b, (T.size, system.A.shape[0]))
    return reduce(system, b, mu0, allowed)


@compiled()
def _conditions(low, high, T_mid, T_min, T_max, n_gas, T, P, extrapolate, mu0, allowed):
    """g0/RT (with ln(P/P0) on the gas) and which condensed species may appear, at every (T, P).

    Returns the point and species of the first gas species outside its data
    range (an error unless extrapolating), or (-1, -1).  Compiled with the
    polynomials: one point of ten species is the common case, where array
    operations would cost more than the sums.
    """
    polynomials(low, high, T_mid, T, GIBBS, mu0)
    for p in range(T.shape[0]):
        ln_p = math.log(P[p] / P_REF)
        for j in range(mu0.shape[1]):
            inside = T_min[j] <= T[p] <= T_max[j]
            if j < n_gas:
                mu0[p, j] += ln_p
                allowed[p, j] = True
                if not inside and not extrapolate:
                    return p, j
            else:
                allowed[p, j] = inside or extrapolate
    return -1, -1


def to_equilibrium(setup: Setup, problem: Problem, result: SolverResult, certificates, i: int,
                   T: float, P: float, gas_model: str = "ideal", specification: str = "T and P") -> Equilibrium:
    """The Equilibrium of point i of a solved batch."""
    system = setup.system
    names = system.names
    S = len(names)
    ln_n = np.empty(S)
    n = np.empty(S)
    G_RT = _unpacked(problem.keep, problem.n_gas, result.ln_n_gas[i], result.n_condensed[i], problem.mu0[i],
                     ln_n, n)
    omitted = dict(setup.omitted)
    # Gas species are always allowed: only condensed species can be outside their data here.
    if problem.n_gas < problem.n_species and not problem.allowed[i].all():
        for local in np.flatnonzero(~problem.allowed[i]):
            omitted[names[problem.keep[local]]] = "outside its data range at this temperature: cannot appear"
    return built(
        Equilibrium, T=T, P=P,
        amounts=dict(zip(names, n.tolist())),
        phase_of=dict(system.phase_of),
        ln_gas_amounts=dict(zip(system.gas_names, ln_n[: system.n_gas].tolist())),
        element_potentials=_element_potentials(system, problem, result.pi[i]),
        G_RT=G_RT,
        certificate=certificates[i],
        specification=specification,
        gas_model=gas_model,
        omitted=omitted,
    )


@compiled()
def _unpacked(keep, n_gas, ln_n_gas, n_condensed, mu0, ln_n, n):
    """Amounts (and logs of the gas's) on the whole System from a solve on its kept species; returns G/RT.

    Compiled: a result is unpacked after every solve, where a dozen array
    operations on ten numbers would cost more than the solve's last iterations.
    """
    for j in range(ln_n.shape[0]):
        ln_n[j] = -np.inf
        n[j] = 0.0
    gas_total = 0.0
    for j in range(n_gas):
        ln_n[keep[j]] = ln_n_gas[j]
        n[keep[j]] = math.exp(ln_n_gas[j])
        gas_total += n[keep[j]]
    for c in range(keep.shape[0] - n_gas):
        n[keep[n_gas + c]] = n_condensed[c]
    ln_total = math.log(gas_total) if gas_total > 0.0 else 0.0
    G_RT = 0.0
    for j in range(keep.shape[0]):
        amount = n[keep[j]]
        if amount > 0.0:
            G_RT += amount * (mu0[j] + (ln_n_gas[j] - ln_total if j < n_gas else 0.0))
    return G_RT


def _element_potentials(system: System, problem: Problem, pi: NDArray[np.float64]) -> dict[str, float]:
    """Potentials on the System's element rows; NaN for elements absent from the feed."""
    present, rows_dropped = _present_elements(system, problem)
    if not rows_dropped:
        # No row was dropped: the solve's potentials are those of the present elements, in order.
        potentials = dict.fromkeys(system.elements, math.nan)
        for element, value in zip(present, pi.tolist()):
            potentials[element] = value
        return potentials
    # Dependent element rows were dropped for the solve; the least-norm
    # potentials reproduce the same species potentials on all rows.
    rows = np.any(system.A[:, problem.keep] != 0.0, axis=1)
    lam = np.full(len(system.elements), np.nan)
    lam[rows] = np.linalg.lstsq(system.A[:, problem.keep][rows].T, pi @ problem.A, rcond=None)[0]
    return dict(zip(system.elements, lam.tolist()))


def _present_elements(system: System, problem: Problem) -> tuple[tuple[str, ...], bool]:
    """The System's elements some kept species carries, and whether the solve dropped any of their rows."""
    key = ("present elements", problem.keep.tobytes(), problem.A.shape[0])
    found = system.reductions.get(key)
    if found is None:
        present = np.any(system.A[:, problem.keep] != 0.0, axis=1)
        found = (tuple(system.elements[k] for k in np.flatnonzero(present)),
                 problem.A.shape[0] != np.count_nonzero(present))
        system.reductions[key] = found
    return found


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
