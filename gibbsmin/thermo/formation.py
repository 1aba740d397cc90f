"""Standard properties of formation from the elements in their reference states.

The reference state of an element at T is its most stable form at 1 bar among
the candidates below (for sulfur the crystal, liquid or S2 gas, whichever has
the lowest Gibbs energy per atom), following the convention of the NIST-JANAF
tables (Chase 1998): H2, O2 and N2 ideal gas at every temperature, graphite
for carbon.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ..errors import InputError
from .database import SpeciesDatabase
from .datasets import default_database
from .nasa7 import R

REFERENCE_FORMS: dict[str, tuple[str, ...]] = {
    "H": ("H2",), "O": ("O2",), "N": ("N2",), "C": ("C(s)",),
    "S": ("S(s)", "S(s,monoclinic)", "S(l)", "S2"),
    "Ar": ("Ar",), "He": ("He",),
}


@dataclass(frozen=True)
class FormationProperties:
    """Formation properties, each of shape ``np.shape(T) + (len(species),)``.

    Attributes
    ----------
    dH : ndarray
        Standard enthalpy of formation, [J/mol].
    dG : ndarray
        Standard Gibbs energy of formation, [J/mol].
    log10_Kf : ndarray
        Base-10 logarithm of the formation equilibrium constant, -dG/(RT ln 10), [-].
    """

    dH: NDArray[np.float64]
    dG: NDArray[np.float64]
    log10_Kf: NDArray[np.float64]


def _reference_h_g(db: SpeciesDatabase, element: str, T: NDArray[np.float64]) -> tuple[NDArray, NDArray]:
    """Per-atom h/RT and g/RT of an element's reference form at each T."""
    forms = [f for f in REFERENCE_FORMS.get(element, ()) if f in db]
    if not forms:
        raise InputError(f"no reference form of element {element} in the database; add one to REFERENCE_FORMS")
    records = db.resolve(forms)
    atoms = np.array([r.elements[element] for r in records])
    table = db.nasa7(forms)
    g = table.g_RT(T) / atoms
    g = np.where(table.outside_range(T), np.inf, g)
    choice = np.argmin(g, axis=-1)
    if np.any(~np.isfinite(np.take_along_axis(g, choice[..., None], -1))):
        raise InputError(f"no reference form of {element} covers every requested temperature")
    h = np.take_along_axis(table.h_RT(T) / atoms, choice[..., None], -1)[..., 0]
    return h, np.take_along_axis(g, choice[..., None], -1)[..., 0]


def formation_properties(
    species: Sequence[str], T: ArrayLike, db: SpeciesDatabase | None = None
) -> FormationProperties:
    """Standard enthalpy and Gibbs energy of formation, and log10 Kf, at temperatures T [K]."""
    db = db or default_database()
    T = np.asarray(T, dtype=float)
    records = db.resolve(species)
    table = db.nasa7([r.name for r in records])
    h = table.h_RT(T)
    g = table.g_RT(T)
    elements = sorted({el for r in records for el in r.elements})
    for element in elements:
        h_ref, g_ref = _reference_h_g(db, element, T)
        counts = np.array([r.elements.get(element, 0.0) for r in records])
        h = h - h_ref[..., None] * counts
        g = g - g_ref[..., None] * counts
    RT = R * T[..., None]
    return FormationProperties(dH=h * RT, dG=g * RT, log10_Kf=-g / np.log(10.0))
