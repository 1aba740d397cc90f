"""Property-based tests of the liquid-solution phases: random loop and condensate mixtures (common practice,
no source).

Every drawn flash (every species held) must be certified, balance each species over its phases, give each
present species the same fugacity in every phase (recomputed here from the model at each phase's own
composition and root), report no trivial split (two phases of one composition), and leave a phase set the
tangent-plane test finds stable.
"""

from __future__ import annotations

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st

import gibbsmin
from gibbsmin.eos import gas_model_for_species
from gibbsmin.eos.stability import tangent_plane_test

SPECIES = ("H2", "N2", "CH4", "Ar", "CO", "CO2", "NH3", "H2O", "CH3OH")
amounts = st.one_of(st.just(0.0), st.floats(min_value=0.01, max_value=5.0))
mixtures = st.fixed_dictionaries({name: amounts for name in SPECIES}).map(
    lambda z: {name: n for name, n in z.items() if n > 0.0}).filter(
    lambda z: len(z) >= 2 and any(s in z for s in ("NH3", "H2O", "CH3OH", "CO2")))


@settings(max_examples=30, deadline=None)
@given(z=mixtures, T=st.floats(min_value=235.0, max_value=340.0), P=st.floats(min_value=10e5, max_value=200e5))
def test_every_flash_is_certified_balanced_and_equal_in_fugacity(z, T, P):
    names = list(z)
    eq = gibbsmin.equilibrate(z, T, P, species=names, inert=names, gas="peng-robinson")
    assert eq.certificate.certified, eq.certificate.summary()
    for s, n in z.items():
        assert eq.amounts[s] == np.float64(eq.amounts[s]) and abs(eq.amounts[s] - n) <= 1e-9 * sum(z.values())
    if eq.fluid_phases is None:
        return
    model = gas_model_for_species("peng-robinson", names)
    ln_f = []
    for phase in eq.fluid_phases:
        x = np.array([phase.mole_fractions.get(s, 0.0) for s in names])
        ln_phi, _, Z = model.least_gibbs_root(T, P, x) if phase.name != "gas" else (
            model.ln_phi(T, P, x), None, phase.compressibility_factor)
        with np.errstate(divide="ignore"):
            ln_f.append(np.log(x) + ln_phi)
        if phase.name != "gas":
            assert abs(Z - phase.compressibility_factor) < 1e-9
    fractions = [np.array([phase.mole_fractions.get(s, 0.0) for s in names]) for phase in eq.fluid_phases]
    for a in range(len(ln_f)):
        for b in range(a + 1, len(ln_f)):
            there = np.isfinite(ln_f[a]) & np.isfinite(ln_f[b])
            assert np.max(np.abs(ln_f[a] - ln_f[b])[there]) < 1e-7          # equal fugacities
            assert np.max(np.abs(fractions[a] - fractions[b])) > 1e-4        # not one phase reported twice
    first = eq.fluid_phases[0]
    x = np.array([first.mole_fractions.get(s, 0.0) for s in names])
    assert tangent_plane_test(model, T, P, x, liquid=first.name != "gas").stable
