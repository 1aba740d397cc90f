"""Dew and bubble points and the condensation curve of a stream by its cubic (issue 13).

Outside references: thermo's PR78 dew and bubble points (Caleb Bell, thermo 0.6, FlashVL with gibbsmin's
constants, kij and H2 quantum correction; tests/flash_reference.py), to 0.05 K as the issue asks; and pure
ammonia's saturation by CoolProp's reference equation (Gao et al. 2020) within Peng-Robinson's usual few per
cent (tests/test_saturation.py measures -0.47 % at worst over 220-400 K).
"""

from __future__ import annotations

import CoolProp.CoolProp as coolprop
import numpy as np
import pytest
from flash_reference import FLASH_CASES, thermo_dew_bubble

from gibbsmin import InputError
from gibbsmin.flash import bubble_point, condensation_curve, dew_point

#: Cases whose dew points are checked (one of each kind of mixture; thermo's dew search costs a second each).
DEW_CASES = [FLASH_CASES[k] for k in (0, 10, 20, 30, 40, 50) if k < len(FLASH_CASES)]


@pytest.mark.parametrize(("name", "z", "T", "P"), DEW_CASES, ids=[c[0] for c in DEW_CASES])
def test_dew_point_agrees_with_thermo(name, z, T, P):
    reference = thermo_dew_bubble(z, P)
    if reference.dew_T is None:
        pytest.skip("thermo finds no dew point for this feed")
    point = dew_point(z, P=P)
    assert point.T == pytest.approx(reference.dew_T, abs=0.05)
    main = max(reference.incipient_liquid, key=reference.incipient_liquid.get)
    assert point.incipient[main] == pytest.approx(reference.incipient_liquid[main], rel=1e-4)


def test_a_binary_has_a_bubble_point_below_its_dew_point_as_thermo_has():
    z = {"CO2": 0.5, "CH4": 0.5}
    reference = thermo_dew_bubble(z, 50e5)
    bubble, dew = bubble_point(z, P=50e5), dew_point(z, P=50e5)
    assert bubble.T == pytest.approx(reference.bubble_T, abs=0.05)
    assert dew.T == pytest.approx(reference.dew_T, abs=0.05)
    # The first bubble is rich in the light component, the first drop in the heavy one.
    assert bubble.incipient["CH4"] > 0.5 > dew.incipient["CH4"]


def test_the_dew_pressure_at_the_dew_temperature_is_the_pressure_given():
    z = {"CO2": 0.5, "CH4": 0.5}
    dew = dew_point(z, P=50e5)
    assert dew_point(z, T=dew.T, P_range=(1e5, 70e5)).P == pytest.approx(50e5, rel=1e-6)


def test_pure_ammonia_dew_and_bubble_points_are_its_saturation():
    T_sat = coolprop.PropsSI("T", "P", 20e5, "Q", 0, "Ammonia")  # Gao et al. 2020 through CoolProp
    dew, bubble = dew_point({"NH3": 1.0}, P=20e5), bubble_point({"NH3": 1.0}, P=20e5)
    assert dew.T == pytest.approx(bubble.T, abs=1e-3)
    assert dew.T == pytest.approx(T_sat, abs=1.0)


def test_the_condensation_curve_runs_from_all_vapour_to_more_and_more_liquid():
    z, _, P = dict(FLASH_CASES[0][1]), FLASH_CASES[0][2], FLASH_CASES[0][3]
    dew = dew_point(z, P=P)
    temperatures = np.linspace(dew.T + 5.0, dew.T - 80.0, 18)
    curve = condensation_curve(z, P, temperatures)
    liquid = [eq.liquid_amount / sum(eq.amounts[s] for s in z) for eq in curve]
    assert liquid[0] == 0.0 and curve[0].fluid_phases is None       # above the dew point: one gas
    assert all(b >= a for a, b in zip(liquid[1:], liquid[2:]))       # colder, more liquid
    assert all(eq.certificate.certified for eq in curve)


@pytest.mark.parametrize(("call", "message"), [
    (lambda: dew_point({"CH4": 1.0, "H2O": 0.1}, P=30e5, gas="ideal"), "needs a cubic"),
    (lambda: dew_point({"CH4": 1.0, "H2O": 0.1}), "give P"),
    (lambda: dew_point({"CH4": 1.0, "OH": 0.1}, P=30e5), "no critical constants"),
    (lambda: dew_point({"H2": 1.0, "N2": 1.0}, P=30e5, T_range=(200.0, 900.0)), "no dew point between"),
    (lambda: dew_point({"CH4": 1.0, "H2O": 0.1}, P=30e5, T_range=(200.0, 300.0)), "already splits"),
])
def test_bad_requests_are_refused_with_the_fix(call, message):
    with pytest.raises(InputError, match=message):
        call()
