"""Peng-Robinson equilibrium against Cantera's Peng-Robinson phase on the same species, data and constants.

Reference: Cantera 3.2 (Goodwin, Moffat, Schoegl, Speth and Weber, 2025),
thermo model "Peng-Robinson", its Gibbs minimiser (``equilibrate("TP",
solver="gibbs")``).  The phase is built here from our NASA-7 coefficients
(reference pressure 1 bar) and our critical constants, so a difference between
its equilibrium and ours comes from the algorithms alone.  Cantera has no
quantum-gas correction, so ours is switched off for the comparison, and its
kappa for omega > 0.491 (methanol) differs from Robinson and Peng (1978), so
the comparison uses Cantera's variant (test_eos_cantera.py shows that this is
the only difference between the two models).
"""

from __future__ import annotations

import dataclasses

import cantera as ct
import numpy as np
import pytest

import gibbsmin
from gibbsmin.eos import PENG_ROBINSON, CubicModel
from gibbsmin.nonideal import GasPhase, gas_phase, solve_nonideal
from gibbsmin.fixed_step import prepare

_DB = gibbsmin.default_database()


def cantera_peng_robinson(names) -> ct.Solution:
    """A Cantera Peng-Robinson phase of the named species, with our NASA-7 data and critical constants."""
    records = [_DB[name] for name in names]
    elements = sorted({e for r in records for e in r.elements})
    entries = []
    for r in records:
        c = r.critical
        fits = [list(r.low)] + ([list(r.high)] if len(r.T_ranges) == 3 else [])
        entries.append(
            f"- name: {r.name}\n"
            f"  composition: {{{', '.join(f'{e}: {n:g}' for e, n in r.elements.items())}}}\n"
            f"  thermo: {{model: NASA7, reference-pressure: 1.0e+05, "
            f"temperature-ranges: {list(r.T_ranges)}, data: {fits}}}\n"
            f"  critical-parameters: {{critical-temperature: {c.Tc!r}, critical-pressure: {c.Pc!r}, "
            f"acentric-factor: {c.omega!r}}}\n")
    text = ("phases:\n- name: gas\n  thermo: Peng-Robinson\n"
            f"  elements: [{', '.join(elements)}]\n  species: [{', '.join(names)}]\n"
            "  state: {T: 300.0, P: 1.0e+05}\nspecies:\n" + "".join(entries))
    return ct.Solution(yaml=text)


# Invented loop gases of our own made-up plants (ammonia converter inlets, a methanol loop).
CASES = [
    ("ammonia loop 200 bar", ["H2", "N2", "NH3", "CH4", "Ar"],
     {"H2": 0.60, "N2": 0.20, "NH3": 0.05, "CH4": 0.10, "Ar": 0.05}, 700.0, 200e5),
    ("ammonia loop 300 bar", ["H2", "N2", "NH3", "Ar"],
     {"H2": 0.70, "N2": 0.24, "NH3": 0.03, "Ar": 0.03}, 660.0, 300e5),
    # No methane in the set: it would take the carbon (the catalyst does not make it; Cantera has no inerts).
    ("methanol loop 80 bar", ["H2", "CO", "CO2", "H2O", "CH3OH", "N2"],
     {"H2": 0.70, "CO": 0.12, "CO2": 0.07, "H2O": 0.002, "CH3OH": 0.005, "N2": 0.103}, 520.0, 80e5),
]


def _cantera_kappa(omega):
    # Cantera 3.2's kappa above omega = 0.491 (its PengRobinsonPhase source); below, Peng and Robinson (1976).
    omega = np.asarray(omega, dtype=float)
    high = 0.374642 + omega * (1.487503 + omega * (-0.164423 + 0.016666 * omega))
    return np.where(omega > 0.491, high, PENG_ROBINSON.kappa(omega))


def _as_cantera(phase: GasPhase) -> GasPhase:
    """The same gas phase with Cantera's kappa convention and without the quantum correction."""
    records = [_DB[phase.gas_names[j]] for j in phase.described]
    model = CubicModel(dataclasses.replace(PENG_ROBINSON, kappa=_cantera_kappa),
                       [r.critical.Tc for r in records], [r.critical.Pc for r in records],
                       [r.critical.omega for r in records], names=[r.name for r in records])
    return dataclasses.replace(phase, model=model)


@pytest.mark.parametrize(("label", "names", "feed", "T", "P"), CASES, ids=[c[0] for c in CASES])
def test_equilibrium_matches_cantera_peng_robinson(label, names, feed, T, P, solver):
    # Source: Cantera 3.2 Peng-Robinson phase, Gibbs minimiser; same data, kij = 0.
    phase_ct = cantera_peng_robinson(names)
    phase_ct.TPX = T, P, feed
    phase_ct.equilibrate("TP", solver="gibbs")
    reference = dict(zip(phase_ct.species_names, phase_ct.X))

    setup = prepare(feed, species=names, T_span=(T, T))
    eq, _, _ = solve_nonideal(setup, T, P, _as_cantera(gas_phase(setup.system, "peng-robinson")), method=solver)
    assert eq.certificate.certified
    for name in names:
        assert eq.mole_fractions[name] == pytest.approx(reference[name], rel=1e-8, abs=1e-14), name
    # Cantera's fugacity coefficients (its activity coefficients in this phase) at its own answer.
    phi_ct = dict(zip(phase_ct.species_names, phase_ct.activity_coefficients))
    for name in names:
        assert eq.extras["fugacity_coefficients"][name] == pytest.approx(phi_ct[name], rel=1e-8), name
    # The comparison is not trivial: the real gas moves the answer well beyond that tolerance.
    ideal = gibbsmin.equilibrate(feed, T, P, species=names, method=solver)
    product = "NH3" if "NH3" in names else "CH3OH"
    assert abs(ideal.mole_fractions[product] / reference[product] - 1.0) > 1e-3
