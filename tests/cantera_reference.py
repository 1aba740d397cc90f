"""Cantera objects built from gibbsmin's own species data, as an outside reference.

Cantera (Goodwin, Moffat, Schoegl, Speth and Weber, Cantera 3.2, 2025) is used
here only as a check: the same NASA-7 coefficients are handed to it, so any
difference between its equilibrium and ours comes from the algorithms.
"""

from __future__ import annotations

import cantera as ct
import numpy as np

import gibbsmin

_DB = gibbsmin.default_database()


def cantera_species(name: str) -> ct.Species:
    record = _DB[name]
    if len(record.T_ranges) == 3:
        T_min, T_mid, T_max = record.T_ranges
        coeffs = np.concatenate([[T_mid], record.high, record.low])
    else:
        T_min, T_max = record.T_ranges
        coeffs = np.concatenate([[T_max], record.low, record.low])
    species = ct.Species(record.name, dict(record.elements))
    species.thermo = ct.NasaPoly2(T_min, T_max, 1.0e5, coeffs)  # the NASA data are at 1 bar
    return species


def cantera_gas(names) -> ct.Solution:
    """An ideal-gas phase of the named species, without reactions."""
    species = [cantera_species(n) for n in names]
    return ct.Solution(thermo="ideal-gas", species=species, kinetics=None)


def cantera_pure(name: str) -> ct.Solution:
    """A fixed-stoichiometry phase of one condensed species.

    gibbsmin takes a pure condensed species' potential as g0(T), without the
    small pressure term v (P - P0); a near-zero molar volume (an enormous
    density) makes Cantera's phase follow the same model.
    """
    species = cantera_species(name)
    phase_yaml = f"""
phases:
- name: pure
  thermo: fixed-stoichiometry
  species: [{{s: [{name!r}]}}]
s:
- name: {name!r}
  composition: {dict(species.composition)}
  thermo: {{model: NASA7, temperature-ranges: {list(_ranges(name))}, data: {_data(name)}}}
  equation-of-state: {{model: constant-volume, density: 1.0e+20 kg/m^3}}
"""
    return ct.Solution(yaml=phase_yaml, name="pure")


def _ranges(name: str):
    return _DB[name].T_ranges


def _data(name: str):
    record = _DB[name]
    sets = [list(record.low)] + ([list(record.high)] if len(record.T_ranges) == 3 else [])
    return sets
