"""Liquid-solution phases with the gas's cubic (issue 13): flashes against thermo, the reactive flash, the phase set.

Outside reference: the `thermo` package's vapour-liquid flash (Caleb Bell, thermo 0.6: FlashVL with
PR78MIX, given gibbsmin's critical constants, acentric factors, shipped kij and the H2 quantum correction at the
flash temperature; tests/flash_reference.py), on 54 invented separator conditions of methanol loops, ammonia
loops and shift condensate. thermo solves its flash to about 1e-7 in ln f (tests/test_flash_reference.py
measures 2e-7 at its answers with gibbsmin's cubic), which sets the tolerances below.
"""

from __future__ import annotations

import numpy as np
import pytest
from flash_reference import FLASH_CASES, thermo_flash

import gibbsmin
from gibbsmin import InputError, equilibrate

#: Mole-fraction agreement with thermo's flash, relative (above 1e-10), and of the vapour fraction, absolute.
COMPOSITION_TOLERANCE = 1e-6
VAPOUR_FRACTION_TOLERANCE = 1e-7


def _flash(z, T, P, **options):
    """gibbsmin's non-reactive flash: every species inert, so only the phase split moves."""
    return equilibrate(z, T, P, species=list(z), inert=list(z), gas="peng-robinson", **options)


def _liquid(eq):
    return next((p for p in eq.fluid_phases or () if p.name != "gas"), None)


@pytest.mark.parametrize(("name", "z", "T", "P"), FLASH_CASES, ids=[c[0] for c in FLASH_CASES])
def test_flash_agrees_with_thermo(name, z, T, P):
    eq = _flash(z, T, P)
    reference = thermo_flash(z, T, P)
    assert eq.certificate.certified, eq.certificate.summary()
    total = sum(eq.amounts[s] for s in z)
    assert eq.gas_amount / total == pytest.approx(reference.vapour_fraction, abs=VAPOUR_FRACTION_TOLERANCE)
    if reference.y is not None:
        y = eq.mole_fractions
        for s, value in reference.y.items():
            if value > 1e-10:
                assert y[s] == pytest.approx(value, rel=COMPOSITION_TOLERANCE), s
    liquid = _liquid(eq)
    if reference.x is not None:
        assert liquid is not None, "thermo finds a liquid"
        for s, value in reference.x.items():
            if value > 1e-10:
                assert liquid.mole_fractions[s] == pytest.approx(value, rel=COMPOSITION_TOLERANCE), s
    else:
        assert liquid is None


def test_a_separator_answer_has_each_phase_with_its_density():
    z, T, P = dict(FLASH_CASES[0][1]), FLASH_CASES[0][2], FLASH_CASES[0][3]
    eq = _flash(z, T, P)
    assert eq.phases_present[:2] == ("gas", "liquid")
    gas, liquid = eq.fluid_phases
    # A liquid is hundreds of times denser than a loop gas (common practice, no source).
    assert liquid.density > 20 * gas.density and liquid.compressibility_factor < 0.3 < gas.compressibility_factor
    for s in z:  # totals are the sum over the phases, each species' fugacity equal in both
        assert eq.amounts[s] == pytest.approx(gas.amounts.get(s, 0.0) + liquid.amounts.get(s, 0.0), rel=1e-12)
        if s in liquid.amounts and s in gas.amounts:
            f_gas = gas.mole_fractions[s] * gas.fugacity_coefficients[s]
            f_liquid = liquid.mole_fractions[s] * liquid.fugacity_coefficients[s]
            assert f_gas == pytest.approx(f_liquid, rel=1e-7)
    assert eq.certificate.phase_stability == "stable"
    document = eq.to_dict()
    assert set(document["fluid_phases"]) == {"gas", "liquid"}
    assert "liquid" in eq.table()


def test_liquid_false_keeps_the_one_gas_answer_flagged():
    z, T, P = dict(FLASH_CASES[0][1]), FLASH_CASES[0][2], FLASH_CASES[0][3]
    with pytest.warns(RuntimeWarning, match="NOT stable as one gas"):
        eq = _flash(z, T, P, liquid=False)
    assert eq.fluid_phases is None and not eq.certificate.certified


def test_a_stable_gas_is_one_phase():
    eq = equilibrate({"H2": 3.0, "N2": 1.0, "NH3": 0.05}, 700.0, 200e5, gas="peng-robinson")
    assert eq.fluid_phases is None and eq.certificate.certified


def test_the_reactive_flash_closes_the_chemistry_and_the_split():
    # An invented methanol converter outlet cooled to 40 degC at 80 bar, the chemistry free (graphite left out):
    # at 40 degC the equilibrium turns the carbon oxides to methane and water, and the water condenses.
    z = {"H2": 60.0, "CO": 5.0, "CO2": 4.0, "CH4": 8.0, "N2": 3.0, "CH3OH": 12.0, "H2O": 8.0}
    eq = equilibrate(z, 313.15, 80e5, species=list(z), gas="peng-robinson")
    assert eq.certificate.certified and eq.phases_present == ("gas", "liquid")
    liquid = _liquid(eq)
    assert liquid.mole_fractions["H2O"] > 0.99
    # Outside check: at the answer, thermo's flash of the same overall composition gives the same split.
    reference = thermo_flash({s: eq.amounts[s] for s in z if eq.amounts[s] > 1e-12}, 313.15, 80e5)
    assert eq.gas_amount / sum(eq.amounts[s] for s in z) == pytest.approx(reference.vapour_fraction, abs=1e-7)


def test_held_reactions_and_the_split_together():
    # Methanol synthesis held 10 K short at 40 degC: the liquid is methanol and water with the dissolved gases.
    z = {"H2": 60.0, "CO": 5.0, "CO2": 4.0, "CH4": 8.0, "N2": 3.0, "CH3OH": 12.0, "H2O": 8.0}
    eq = gibbsmin.equilibrate_with_approach(z, 313.15, 80e5, {"methanol synthesis": 10.0},
                                            frozen=["CH4", "N2"], reactions=["water-gas shift"],
                                            species=list(z), gas="peng-robinson")
    assert eq.certificate.certified and "liquid" in eq.phases_present


@pytest.mark.parametrize(("options", "message"), [
    (dict(liquid=True), "described by a cubic"),
    (dict(liquid="yes", gas="peng-robinson"), "liquid takes True"),
])
def test_bad_liquid_options_are_refused(options, message):
    with pytest.raises(InputError, match=message):
        equilibrate({"CH4": 1.0, "H2O": 1.0}, 300.0, 10e5, **options)


def test_sensitivities_of_a_split_answer_are_refused_with_the_fix():
    z, T, P = dict(FLASH_CASES[0][1]), FLASH_CASES[0][2], FLASH_CASES[0][3]
    with pytest.raises(InputError, match="liquid=False"):
        _flash(z, T, P, sensitivities=True)


def test_phase_fractions_are_continuous_in_temperature():
    z, T, P = dict(FLASH_CASES[0][1]), FLASH_CASES[0][2], FLASH_CASES[0][3]
    p = gibbsmin.prepare(species=list(z), inert=list(z), gas="peng-robinson")
    liquid = [p.equilibrate(z, t, P).liquid_amount for t in np.linspace(T - 1.0, T + 1.0, 5)]
    steps = np.abs(np.diff(liquid))
    assert np.all(np.diff(liquid) < 0.0)  # warmer, less liquid
    assert steps.max() < 2.0 * steps.min()
