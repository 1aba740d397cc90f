"""The chemical system: which species, in which phases, and the element matrix.

A :class:`System` is fixed by a species set; a :class:`Problem` adds the
conditions (T, P, element totals) in the dimensionless form every solver takes.
Species are ordered gas first, then pure condensed species.  Each condensed
species is a phase of its own that is present or absent.

Elements whose total is zero are removed together with every species that
contains them (their amounts are exactly zero), and linearly dependent element
rows are reduced to an independent basis, so the solvers always see a full-rank
matrix.  An inert species carries a private pseudo-element: its amount is then
fixed by the element balance while it still dilutes the gas.
"""

from __future__ import annotations

import functools
import math

from collections.abc import Sequence
from dataclasses import dataclass, field

import numpy as np
import scipy.linalg
from numpy.typing import NDArray

from .errors import InputError
from .thermo.database import SpeciesDatabase, SpeciesRecord, nasa7_table
from .compiled import compiled
from .frozen import built
from .thermo.nasa7 import GIBBS, Nasa7Table, polynomials

#: Reference pressure of the standard state, [Pa] (that of the NASA data).
P_REF = 1.0e5


def inert_element(name: str) -> str:
    """The pseudo-element that pins an inert species."""
    return f"[{name}]"


@dataclass(frozen=True)
class System:
    """A species set with its phases and element matrix.

    Attributes
    ----------
    records : tuple of SpeciesRecord
        Gas species first, then pure condensed species.
    n_gas : int
        How many of ``records`` form the gas phase.
    elements : tuple of str
        Row labels of ``A``: chemical elements, then one pseudo-element per inert species.
    A : ndarray, shape (len(elements), len(records))
        Atoms of each element in each species.
    inert : tuple of str
        Species held at their feed amount.
    """

    records: tuple[SpeciesRecord, ...]
    n_gas: int
    elements: tuple[str, ...]
    A: NDArray[np.float64]
    inert: tuple[str, ...] = ()
    table: Nasa7Table = field(init=False, repr=False, compare=False)
    #: Reductions already worked out for this System (``reduce``), by the pattern of elements present.
    reductions: dict = field(init=False, repr=False, compare=False)
    #: Species names, gas first (as ``records``).
    names: tuple[str, ...] = field(init=False, repr=False, compare=False)
    #: Species name to its phase: "gas", or the species' own name for a pure condensed species.
    phase_of: dict[str, str] = field(init=False, repr=False, compare=False)

    def __post_init__(self) -> None:
        object.__setattr__(self, "table", nasa7_table(self.records))
        object.__setattr__(self, "reductions", {})
        object.__setattr__(self, "names", tuple(r.name for r in self.records))
        object.__setattr__(self, "phase_of", {r.name: ("gas" if r.is_gas else r.name) for r in self.records})

    @property
    def gas_names(self) -> tuple[str, ...]:
        return self.names[: self.n_gas]

    @property
    def condensed_names(self) -> tuple[str, ...]:
        return self.names[self.n_gas:]

    def index(self, name: str) -> int:
        return self.names.index(name)

    def element_matrix(self, records: Sequence[SpeciesRecord]) -> NDArray[np.float64]:
        """Atoms of each of the system's element rows in each of ``records`` (which may lie outside the set).

        Feed species need not belong to the species set (a feed of methanol
        may settle to a set without it); their atoms still count.
        """
        columns = []
        for record in records:
            if record.name in self.inert:
                column = [1.0 if el == inert_element(record.name) else 0.0 for el in self.elements]
            else:
                column = [record.elements.get(el, 0.0) for el in self.elements]
            columns.append(column)
        return np.array(columns, dtype=float).T.reshape(len(self.elements), len(records))

    @classmethod
    def from_records(
        cls, records: Sequence[SpeciesRecord], inert: Sequence[str] = ()
    ) -> System:
        gas = [r for r in records if r.is_gas]
        condensed = [r for r in records if not r.is_gas]
        if not gas:
            raise InputError("the species set has no gas species; add at least one gas (e.g. the feed gases)")
        ordered = tuple(gas + condensed)
        names = [r.name for r in ordered]
        elements = sorted({el for r in ordered for el in r.elements}, key=_element_order)
        A = np.array([[r.elements.get(el, 0.0) for r in ordered] for el in elements], dtype=float)
        for name in inert:
            if name not in names:
                raise InputError(f"inert species {name!r} is not in the species set")
            if not ordered[names.index(name)].is_gas:
                raise InputError(f"inert species {name!r} must be a gas")
            row = np.zeros((1, len(ordered)))
            row[0, names.index(name)] = 1.0
            # The inert no longer exchanges atoms: its true elements are carried by the pseudo-element.
            A[:, names.index(name)] = 0.0
            A = np.vstack([A, row])
        return cls(ordered, len(gas), tuple(elements) + tuple(inert_element(n) for n in inert), A, tuple(inert))


def _element_order(symbol: str) -> tuple[int, str]:
    # Hill-like reading order: C and H first, then the rest alphabetically.
    return ({"C": 0, "H": 1}.get(symbol, 2), symbol)


@dataclass(frozen=True)
class Problem:
    """One or many equilibrium problems on a reduced system, in dimensionless form.

    Arrays carry a leading batch axis of length B.

    Attributes
    ----------
    A : ndarray, shape (M, S)
        Full-rank element matrix of the species kept (``keep``).
    b : ndarray, shape (B, M)
        Element totals, [mol].
    mu0 : ndarray, shape (B, S)
        g0/RT of each kept species; for gases it already includes ln(P/P0)
        and ln(phi) so that mu/RT = mu0 + ln(y) in the gas.
    n_gas : int
        Kept gas species come first.
    allowed : ndarray of bool, shape (B, S)
        Condensed species that may appear (inside their data range).
    keep : ndarray of int
        Positions of the kept species in the System.
    basis : ndarray, shape (M, M_system)
        Maps the System's element rows to the independent rows used here.
    """

    A: NDArray[np.float64]
    b: NDArray[np.float64]
    mu0: NDArray[np.float64]
    n_gas: int
    allowed: NDArray[np.bool_]
    keep: NDArray[np.int_]
    basis: NDArray[np.float64]

    @property
    def batch_size(self) -> int:
        return self.b.shape[0]

    @property
    def n_species(self) -> int:
        return self.A.shape[1]

    def take(self, where: NDArray[np.int_]) -> Problem:
        """The problems at positions ``where``, as a batch of their own."""
        where = np.asarray(where, dtype=int)
        return Problem(self.A, self.b[where], self.mu0[where], self.n_gas, self.allowed[where],
                       self.keep, self.basis)


def reduce(system: System, b: NDArray[np.float64], mu0: NDArray[np.float64],
           allowed: NDArray[np.bool_]) -> Problem:
    """Drop species made impossible by zero element totals and reduce dependent element rows.

    ``b`` has shape (B, M_system), ``mu0`` and ``allowed`` (B, S_system).  Every
    point of a batch must have the same elements present.  The reduction of each
    pattern of elements present (and of condensed species allowed) is worked
    out once per System and kept (``System.reductions``).
    """
    b, mu0, allowed = np.asarray(b, dtype=float), np.asarray(mu0), np.asarray(allowed)
    if b.ndim != 2 or mu0.ndim != 2 or allowed.ndim != 2:
        b, mu0, allowed = np.atleast_2d(b), np.atleast_2d(mu0), np.atleast_2d(allowed)
    present = None
    if b.shape[0] == 1:
        # One point (the common call): the pattern in plain floats, cheaper than four array operations on five
        # numbers; the key is the bytes the array form would give.
        totals = b[0].tolist()
        threshold = 1e-14 * max(max(map(abs, totals)), 1e-300)
        key = (bytes([total > threshold for total in totals]), allowed[0].tobytes())
    else:
        scale = np.maximum(np.abs(b).max(axis=1, keepdims=True), 1e-300)
        every = (b / scale) > 1e-14
        if not np.all(every == every[0]):
            raise InputError("every point of a batch must contain the same elements; split the batch by element "
                             "set")
        present = every[0]
        key = (present.tobytes(), allowed.any(axis=0).tobytes())
    reduction = system.reductions.get(key)
    if reduction is None or reduction.dropped_rows:
        if present is None:
            present = np.frombuffer(key[0], dtype=bool)
        if reduction is None:
            reduction = _Reduction.of(system, present, allowed)
            system.reductions[key] = reduction
        if reduction.dropped_rows:
            _check_balance_possible(system, reduction.carried_usable, reduction.rows, b[:, present],
                                    np.flatnonzero(present))
    keep, rows = reduction.keep, reduction.element_rows
    B = b.shape[0]
    b_kept, mu0_kept, allowed_kept = np.empty((B, rows.size)), np.empty((B, keep.size)), np.empty((B, keep.size),
                                                                                                   dtype=bool)
    _gathered(b, mu0, allowed, rows, keep, b_kept, mu0_kept, allowed_kept)
    return built(Problem, A=reduction.A, b=b_kept, mu0=mu0_kept, n_gas=reduction.n_gas, allowed=allowed_kept,
                 keep=keep, basis=reduction.selector)


@compiled()
def _gathered(b, mu0, allowed, rows, keep, b_kept, mu0_kept, allowed_kept):
    """The kept element rows of b and the kept species' mu0 and allowed, every point (``reduce``).

    Compiled: three fancy-indexing copies of a few numbers cost more in numpy than the rest of ``reduce``.
    """
    for p in range(b.shape[0]):
        for k in range(rows.size):
            b_kept[p, k] = b[p, rows[k]]
        for j in range(keep.size):
            mu0_kept[p, j] = mu0[p, keep[j]]
            allowed_kept[p, j] = allowed[p, keep[j]]


@dataclass(frozen=True)
class _Reduction:
    """How a System's problem is reduced for one pattern of elements present and condensed species allowed."""

    keep: NDArray[np.int_]
    n_gas: int
    rows: NDArray[np.int_]
    A: NDArray[np.float64]
    selector: NDArray[np.float64]
    carried_usable: NDArray[np.float64]
    dropped_rows: bool
    element_rows: NDArray[np.int_]      # the System's element rows the solve keeps (``selector``'s ones)

    @classmethod
    def of(cls, system: System, present: NDArray[np.bool_], allowed: NDArray[np.bool_]) -> _Reduction:
        A = system.A
        possible = ~np.any(A[~present] > 0, axis=0)
        if not np.any(possible[: system.n_gas]):
            raise InputError("no gas species can be formed from the feed's elements")
        keep = np.flatnonzero(possible)
        carried = A[present][:, keep]
        # Condensed species that can appear at no point of the batch (outside their data) do not count
        # for the rank: rows independent only through them leave a potential the solve cannot fix.
        usable = allowed[:, keep].any(axis=0)
        n_gas = int(np.sum(keep < system.n_gas))
        usable[:n_gas] = True
        if np.any(~carried.any(axis=1)):
            missing = [system.elements[k] for k in np.flatnonzero(present)[~carried.any(axis=1)]]
            raise InputError(
                f"element(s) {', '.join(missing)} in the feed cannot be carried by any species of the set; "
                "add a species that contains them"
            )
        rows = _independent_rows(carried[:, usable])
        selector = np.zeros((len(rows), A.shape[0]))
        selector[np.arange(len(rows)), np.flatnonzero(present)[rows]] = 1.0
        return cls(keep, n_gas, rows, carried[rows], selector, carried[:, usable],
                   not usable.all() and len(rows) < carried.shape[0], np.flatnonzero(present)[rows])


def _check_balance_possible(system: System, carried: NDArray[np.float64], rows: NDArray[np.int_],
                            b: NDArray[np.float64], elements: NDArray[np.int_]) -> None:
    """Refuse element totals the species that can appear cannot balance (a dropped row must follow the others)."""
    dropped = np.setdiff1d(np.arange(carried.shape[0]), rows)
    if dropped.size == 0:
        return
    combination = np.linalg.lstsq(carried[rows].T, carried[dropped].T, rcond=None)[0]  # (kept, dropped)
    expected = b[:, rows] @ combination
    scale = np.maximum(np.abs(b).max(axis=1, keepdims=True), 1e-300)
    if np.any(np.abs(expected - b[:, dropped]) > 1e-9 * scale):
        names = ", ".join(system.elements[k] for k in elements[dropped])
        raise InputError(
            f"the feed's {names} cannot be balanced by the species that can appear at these temperatures (the "
            "condensed species that would carry it are outside their data range); add a gas species that "
            "contains it")


def _independent_rows(A: NDArray[np.float64]) -> NDArray[np.int_]:
    """Indices of a maximal set of linearly independent rows, in their original order."""
    # The same element matrix recurs call after call (a species set solved at many conditions).
    return _independent_rows_of(np.ascontiguousarray(A, dtype=float).tobytes(), A.shape).copy()


@functools.lru_cache(maxsize=256)
def _independent_rows_of(data: bytes, shape: tuple[int, int]) -> NDArray[np.int_]:
    A = np.frombuffer(data).reshape(shape)
    _, r, pivots = scipy.linalg.qr(A.T, mode="economic", pivoting=True)
    diag = np.abs(np.diag(r)) if r.size else np.zeros(0)
    rank = int(np.sum(diag > 1e-10 * max(diag.max(initial=0.0), 1.0)))
    return np.sort(pivots[:rank])


def standard_mu0(system: System, T: NDArray[np.float64], P: NDArray[np.float64],
                 ln_phi: NDArray[np.float64] | None = None) -> NDArray[np.float64]:
    """mu0 of every species of the system for temperatures T [K] and pressures P [Pa], shape (B, S)."""
    T = np.ascontiguousarray(np.atleast_1d(np.asarray(T, dtype=float)))
    P = np.ascontiguousarray(np.broadcast_to(np.atleast_1d(np.asarray(P, dtype=float)), T.shape))
    table = system.table
    mu0 = np.empty((T.size, len(system.records)))
    _standard_potentials(table.low, table.high, table.T_mid, T, P, system.n_gas, mu0)
    if ln_phi is not None:
        mu0[:, : system.n_gas] += ln_phi
    return mu0


@compiled()
def _standard_potentials(low, high, T_mid, T, P, n_gas, out):
    """g0/RT of every species at each (T, P), with ln(P/P0) on the gas species, into out (B, S)."""
    polynomials(low, high, T_mid, T, GIBBS, out)
    for p in range(T.shape[0]):
        ln_p = math.log(P[p] / P_REF)
        for j in range(n_gas):
            out[p, j] += ln_p


def select_species(
    db: SpeciesDatabase,
    feed_species: Sequence[str],
    species: Sequence[str] | None,
    exclude: Sequence[str],
) -> list[SpeciesRecord]:
    """The species set: explicit, or every species made of the feed's elements, less exclusions."""
    feed_records = db.resolve(feed_species)
    excluded = {db[name].name for name in exclude}
    for record in feed_records:
        if record.name in excluded:
            raise InputError(
                f"{record.name} is in the feed and also excluded; remove it from the feed or from the exclusions"
            )
    if species is not None:
        chosen = db.resolve(species)
    else:
        elements = {el for r in feed_records for el in r.elements}
        chosen = [r for r in db if set(r.elements) <= elements]
        names = {r.name for r in chosen}
        chosen += [r for r in feed_records if r.name not in names]
    unique: dict[str, SpeciesRecord] = {}
    for record in chosen:
        if record.name not in excluded:
            unique.setdefault(record.name, record)
    return list(unique.values())
