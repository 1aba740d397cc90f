"""The flash reference harness (tests/flash_reference.py) checked against outside facts before the engine uses it.

Sources: thermo 0.6 (Bell and contributors) FlashVL with PR78MIX, as the harness
runs it; CoolProp 8.0 (Bell et al. 2014) with the ammonia reference equation of
Gao et al. (2020, J. Phys. Chem. Ref. Data 49); the engineering facts in the
comments are common practice, no source, unless named.
"""

from __future__ import annotations

import math

import CoolProp.CoolProp as CP
import numpy as np
import pytest
from flash_reference import (
    AMMONIA_CONVERTER_OUTLET,
    FLASH_CASES,
    METHANOL_CONVERTER_OUTLET,
    SHIFT_OUTLET,
    flash_case,
    mole_fraction_sum_error,
    thermo_dew_bubble,
    thermo_flash,
)

from gibbsmin.eos import gas_model_for_species
from gibbsmin.eos.saturation import saturation_temperature

pytestmark = [
    pytest.mark.filterwarnings("ignore:The 'float_precision' argument is deprecated"),
    pytest.mark.filterwarnings("ignore::RuntimeWarning:fluids"),  # thermo's pure-fluid Newton, inside the library
]


@pytest.mark.parametrize("P", [1.01325e5, 5e5, 10e5, 20e5, 50e5])
def test_thermo_pure_ammonia_boiling_point_against_the_reference_equation(P):
    # thermo's PR78 boiling point of NH3 on gibbsmin's constants against Gao et al. (2020) by CoolProp:
    # measured -0.057, -0.018, -0.004, -0.004, -0.030 K at 1 atm, 5, 10, 20 and 50 bar (PR is good for ammonia).
    T_dew = thermo_dew_bubble({"NH3": 1.0}, P).dew_T
    assert T_dew == pytest.approx(CP.PropsSI("T", "P", P, "Q", 1, "Ammonia"), abs=0.3)
    # And the same cubic in gibbsmin (eos/saturation.py), an independent implementation: same answer.
    assert T_dew == pytest.approx(saturation_temperature("NH3", P), abs=1e-5)


def test_methanol_separator_splits_into_gas_and_a_methanol_water_liquid():
    # An invented methanol converter outlet at the separator, 40 degC and 80 bar: the liquid is crude
    # methanol (methanol + water with a little dissolved gas), the vapour the recycle gas with a few
    # tenths of a percent methanol (common practice, no source).
    result = thermo_flash(METHANOL_CONVERTER_OUTLET, 313.15, 80e5)
    assert [name for name, _ in result.phases] == ["vapour", "liquid"]
    assert result.x["CH3OH"] + result.x["H2O"] > 0.95
    assert result.x["CH3OH"] > 0.7
    assert result.y["H2"] > 0.7
    assert 1e-3 < result.y["CH3OH"] < 1e-2
    # The vapour fraction is at most the non-condensable share of the feed (75 of 100 mol).
    assert 0.70 < result.vapour_fraction < 0.76


def test_ammonia_separator_liquid_is_mostly_ammonia_with_little_dissolved_gas():
    # -20 degC, 180 bar: liquid ammonia with about one to a few percent of dissolved H2, N2, CH4 and Ar
    # (common practice, no source); the vapour holds a few percent NH3.
    result = thermo_flash(AMMONIA_CONVERTER_OUTLET, 253.15, 180e5)
    assert result.x["NH3"] > 0.9
    assert 0.01 < result.y["NH3"] < 0.08
    assert result.phases[0][1] < result.phases[1][1]


def test_shift_condensate_is_water_with_dissolved_co2():
    result = thermo_flash(SHIFT_OUTLET, 313.15, 30e5)
    assert result.x["H2O"] > 0.99
    assert result.x["CO2"] > result.x["H2"]  # CO2 is far more soluble than H2 (common practice, no source)


def test_the_flash_cases_are_at_least_fifty_and_well_formed():
    assert len(FLASH_CASES) >= 50
    assert len({name for name, *_ in FLASH_CASES}) == len(FLASH_CASES)
    for name, z, T, P in FLASH_CASES:
        assert all(v > 0 for v in z.values()) and 150.0 < T < 500.0 and 1e5 < P < 300e5, name
    z, T, P = flash_case("methanol separator outlet 40 degC 80 bar")
    assert z is METHANOL_CONVERTER_OUTLET and T == pytest.approx(313.15) and P == 80e5


def test_every_flash_case_runs_balances_and_meets_gibbsmins_equal_fugacity():
    # The harness hands thermo gibbsmin's constants, kij and (at T) H2's effective constants; so at
    # thermo's answer gibbsmin's own cubic must show equal fugacities. Measured worst 2.0e-7 in
    # ln f over the two-phase cases (thermo's flash tolerance).
    two_phase = 0
    for name, z, T, P in FLASH_CASES:
        result = thermo_flash(z, T, P)
        assert mole_fraction_sum_error(result, z) < 1e-12, name
        if result.x is None or result.y is None:
            continue
        two_phase += 1
        names = list(z)
        model = gas_model_for_species("peng-robinson", names)
        y = np.array([result.y[n] for n in names])
        x = np.array([result.x[n] for n in names])
        ln_f_vapour = np.log(y) + model.ln_phi(T, P, y)
        ln_f_liquid = np.log(x) + model.ln_phi(T, P, x, root="liquid")
        assert np.max(np.abs(ln_f_vapour - ln_f_liquid)) < 1e-6, name
    assert two_phase >= 50


def test_the_quantum_correction_matters_at_the_dew_point():
    # With H2's effective constants the methanol outlet's 80 bar dew point is 436.2 K, without 433.3 K
    # (measured, thermo PR78): the engine must be compared with the quantum_correction it runs.
    with_quantum = thermo_dew_bubble(METHANOL_CONVERTER_OUTLET, 80e5)
    without = thermo_dew_bubble(METHANOL_CONVERTER_OUTLET, 80e5, quantum_correction=False)
    assert with_quantum.dew_T - without.dew_T == pytest.approx(2.9, abs=0.3)
    assert with_quantum.bubble_T is None  # 55 % H2 has no bubble point at 80 bar
    assert with_quantum.incipient_liquid["CH3OH"] > 0.6


def test_a_binary_has_both_points_and_they_bracket_a_two_phase_flash():
    # CH4 + CO2 at 50 bar (an invented sour-gas-like mixture): dew 253.6 K, bubble 210.0 K by PR78.
    z = {"CO2": 0.5, "CH4": 0.5}
    points = thermo_dew_bubble(z, 50e5)
    assert points.bubble_T < points.dew_T
    middle = thermo_flash(z, 0.5 * (points.bubble_T + points.dew_T), 50e5)
    assert 0.0 < middle.vapour_fraction < 1.0
    assert thermo_flash(z, points.dew_T + 1.0, 50e5).x is None
    assert math.isclose(thermo_flash(z, points.bubble_T - 1.0, 50e5).vapour_fraction, 0.0)
