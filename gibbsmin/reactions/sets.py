"""Complete sets of independent reactions among a species set, the trade's named reactions first."""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence
from fractions import Fraction

import numpy as np
from numpy.typing import NDArray

from ..errors import InputError
from ..system import System
from ..thermo.database import SpeciesDatabase, SpeciesRecord
from ..thermo.datasets import default_database
from .equations import (
    NAMED_REACTIONS,
    Reaction,
    _make,
    parse_reaction,
    reaction,
    steam_reforming,
)

#: Species tried first as the building blocks of generated reactions (the major species of the trade's gases).
_BASIS_PREFERENCE = ("H2O", "H2", "CO2", "CO", "CH4", "N2", "NH3", "O2", "H2S", "SO2", "Ar", "He")

def _species_matrix(species: System | Sequence[str], db: SpeciesDatabase):
    """Names, records and element matrix of a System or a list of species names."""
    if isinstance(species, System):
        return list(species.names), list(species.records), species.A
    if isinstance(species, str):
        raise InputError("species takes a list of names, e.g. ['CH4', 'H2O', 'CO', 'CO2', 'H2']")
    records = list({r.name: r for r in db.resolve(species)}.values())
    elements = sorted({el for r in records for el in r.elements})
    A = np.array([[r.elements.get(el, 0.0) for r in records] for el in elements], dtype=float).reshape(len(elements), -1)
    return [r.name for r in records], records, A


def independent_reactions(
    species: System | Sequence[str],
    *,
    include: Iterable[str | Reaction] = (),
    db: SpeciesDatabase | None = None,
) -> list[Reaction]:
    """A complete set of independent reactions among a species set, in the trade's terms where possible.

    The set has S - rank(A) reactions (a basis of the null space of the
    element matrix).  Reactions are taken in this order, each kept only if it
    is independent of those already kept: ``include``; the named reactions of
    :data:`NAMED_REACTIONS` whose species are all in the set, in the order
    listed there; steam reforming of each other hydrocarbon; and, for the
    species still unaccounted for, the reaction forming each from the major
    species (H2O, H2, CO2, CO, CH4, N2, ... as present).

    Parameters
    ----------
    species : System or list of str
        A System (its inert pseudo-elements keep inert species out of every
        reaction) or species names.
    include : reactions, optional
        Names, equations or Reactions that must be in the set.
    db : SpeciesDatabase, optional

    Raises
    ------
    InputError
        An ``include`` reaction with a species not in the set, an inert
        species, or one that depends on the reactions before it.
    """
    db = db or default_database()
    names, records, A = _species_matrix(species, db)
    wanted = len(names) - (np.linalg.matrix_rank(A) if A.size else 0)
    chosen: list[Reaction] = []
    vectors: list[NDArray[np.float64]] = []

    def consider(candidate: Reaction, required: bool) -> None:
        if not set(candidate.species) <= set(names):
            if required:
                candidate.vector(names)  # raises, naming the missing species
            return
        nu = candidate.vector(names)
        if A.size and np.max(np.abs(A @ nu)) > 1e-9:
            if required:
                fixed = [s for s in candidate.species if s in _inert_names(species)]
                raise InputError(
                    f"reaction {candidate.name!r} cannot run in this system: "
                    + (f"{', '.join(fixed)} is held fixed (inert or frozen)" if fixed else "it does not balance")
                )
            return
        if np.linalg.matrix_rank(np.vstack(vectors + [nu])) > len(vectors):
            chosen.append(candidate)
            vectors.append(nu)
        elif required:
            raise InputError(
                f"reaction {candidate.name!r} is a combination of {', '.join(repr(r.name) for r in chosen)}; "
                f"give each independent reaction once (e.g. an approach on 'steam methane reforming' or on "
                f"'methanation', not both)"
            )

    for spec in include:
        consider(reaction(spec, db=db), required=True)
    for candidate in _candidates(names, records, A, db):
        if len(chosen) >= wanted:
            break
        consider(candidate, required=False)
    return chosen


def _inert_names(species: System | Sequence[str]) -> tuple[str, ...]:
    return species.inert if isinstance(species, System) else ()


def _candidates(names: list[str], records: list[SpeciesRecord], A: NDArray[np.float64], db: SpeciesDatabase):
    """Reactions worth trying, in order of preference (see :func:`independent_reactions`)."""
    present = set(names)
    for name, equation in NAMED_REACTIONS.items():
        if set(_species_of(equation)) <= present:
            yield parse_reaction(equation, name=name, db=db)
    if {"H2O", "CO", "H2"} <= present:
        for record in records:
            # An odd number of H atoms marks a radical, which the trade does not reform.
            elements = record.elements
            if record.is_gas and set(elements) == {"C", "H"} and elements["C"] >= 2 and elements["H"] % 2 == 0:
                yield steam_reforming(record.name, db=db)
    yield from _formation_reactions(names, records, A, db)


def _species_of(equation: str) -> list[str]:
    """Species names in one of the catalogue's own equations (written with database names)."""
    terms = [t.strip() for side in equation.split("=") for t in side.split("+")]
    return [t.split()[-1] for t in terms]


def _formation_reactions(names: list[str], records: list[SpeciesRecord], A: NDArray[np.float64], db: SpeciesDatabase):
    """For each species outside a basis of major species, the reaction forming it from that basis."""
    if not A.size:
        return
    preferred = [n for n in _BASIS_PREFERENCE if n in names]
    gases = [n for n, r in zip(names, records) if r.is_gas and n not in preferred]
    condensed = [n for n, r in zip(names, records) if not r.is_gas]
    basis: list[int] = []
    for n in preferred + gases + condensed:
        j = names.index(n)
        if np.linalg.matrix_rank(A[:, basis + [j]]) > len(basis):
            basis.append(j)
    for j, name in enumerate(names):
        if j in basis:
            continue
        x = np.linalg.lstsq(A[:, basis], A[:, j], rcond=None)[0]
        stoichiometry = {names[b]: -x[k] for k, b in enumerate(basis) if abs(x[k]) > 1e-12 and x[k] > 0}
        stoichiometry[name] = 1.0
        stoichiometry |= {names[b]: -x[k] for k, b in enumerate(basis) if abs(x[k]) > 1e-12 and x[k] < 0}
        yield _make(_whole_numbers(stoichiometry), db)


def _whole_numbers(stoichiometry: dict[str, float]) -> dict[str, float]:
    """The same reaction scaled to the smallest whole coefficients, where the coefficients are simple fractions."""
    fractions = {s: Fraction(c).limit_denominator(1000) for s, c in stoichiometry.items()}
    if any(abs(float(f) - c) > 1e-9 for f, c in zip(fractions.values(), stoichiometry.values())):
        return stoichiometry
    scale = math.lcm(*(f.denominator for f in fractions.values()))
    return {s: float(f * scale) for s, f in fractions.items()}
