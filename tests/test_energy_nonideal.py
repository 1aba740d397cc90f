"""The energy balance with a cubic gas where a condensed phase appears between two trial temperatures.

The answer there comes from the phase-boundary solve with T unknown
(``energy.phase_boundary.solve_on_phase_boundary``), which must hold the gas model's ln phi
and residual enthalpy as every fixed-T step does.  Each answer is checked here
from its amounts alone: the optimality conditions with ln phi evaluated afresh
at the answer's composition (condensed species included), and the energy
balance with the model's residual enthalpy (common practice, no source).
Feeds and duties are invented.
"""

from __future__ import annotations

import warnings

import pytest

import gibbsmin
from gibbsmin.energy import phase_boundary
from gibbsmin.energy import mixture_enthalpy
from gibbsmin.nonideal import residual_enthalpy_of_gas
from test_properties_nonideal import _stationarity

GAS = "peng-robinson"


def _nonideal_stationarity(eq: gibbsmin.Equilibrium) -> float:
    """max |mu_j/RT - a_j . lambda| over the present species (condensates included), lambda by least squares."""
    return _stationarity(eq, GAS)


def _energy_miss(eq: gibbsmin.Equilibrium, feed: dict[str, float], T_feed: float, heat: float) -> float:
    """(H_out - H_in - Q) over the gross enthalpy, the residual enthalpy of both gases included."""
    P = eq.P
    gas_out = {s: n for s, n in eq.amounts.items() if eq.phase_of[s] == "gas" and n > 0.0}
    H_in = mixture_enthalpy(feed, T_feed, P) + residual_enthalpy_of_gas(feed, T_feed, P, GAS)
    H_out = (mixture_enthalpy({s: n for s, n in eq.amounts.items() if n > 0.0}, eq.T, P)
             + residual_enthalpy_of_gas(gas_out, eq.T, P, GAS))
    return (H_out - H_in - heat) / (abs(H_in) + abs(H_out) + abs(heat))


def _settled(feed, T_feed, P, heat, method="auto"):
    calls = []
    solve = phase_boundary.solve_on_phase_boundary

    def spy(*args, **kwargs):
        answer = solve(*args, **kwargs)
        calls.append(answer is not None and answer[0].certificate.certified)
        return answer

    with pytest.MonkeyPatch.context() as patch, warnings.catch_warnings():
        patch.setattr(phase_boundary, "solve_on_phase_boundary", spy)
        warnings.simplefilter("ignore", RuntimeWarning)
        eq = gibbsmin.equilibrate(feed, P=P, T_feed=T_feed, heat_input=heat, gas=GAS, method=method)
    return eq, calls


# An invented wet hydrogen stream at 600 K cooled in a condenser: water condenses at the outlet.
WET_HYDROGEN = {"H2O": 1.0, "H2": 1.0, "CO2": 0.2}


@pytest.mark.parametrize("P, heat", [(30e5, -6.0e4), (80e5, -6.0e4)])
def test_condensing_outlet_with_a_cubic_holds_ln_phi_and_closes_the_balance(P, heat, solver):
    # Before the fix the phase-boundary solve returned the ideal-gas split, certified: stationarity with
    # ln phi was off by 0.13 (30 bar) and 0.23 (80 bar).
    eq, calls = _settled(WET_HYDROGEN, 600.0, P, heat, method=solver)
    assert True in calls, "the answer was meant to come from the phase-boundary solve"
    assert eq.amounts["H2O(l)"] > 0.1
    assert eq.certificate.certified, eq.certificate.summary()
    assert _nonideal_stationarity(eq) < 1e-8
    assert abs(_energy_miss(eq, WET_HYDROGEN, 600.0, heat)) < 1e-10
    assert eq.extras["ln_phi_change"] <= 1e-10 and "fugacity_coefficients" in eq.extras
    # The same T solved at fixed T with the cubic gives the same split.
    fixed = gibbsmin.equilibrate(WET_HYDROGEN, eq.T, P, gas=GAS, method=solver)
    assert fixed.amounts["H2O(l)"] == pytest.approx(eq.amounts["H2O(l)"], rel=1e-7)


def test_boiling_plateau_with_a_cubic_sits_at_the_models_saturation_temperature(solver):
    # Steam at 700 K and 30 bar, cooled until part of it condenses: the coexisting phases fix T.  Before the
    # fix the plateau was the ideal gas's (516.13 K, stationarity with ln phi off by 0.15).
    import CoolProp.CoolProp as CP

    steam = {"H2O": 1.0}
    eq, calls = _settled(steam, 700.0, 30e5, -2.0e4, method=solver)
    assert True in calls and "phase_boundary" in eq.extras
    assert 0.2 < eq.amounts["H2O(l)"] < 0.5 and eq.certificate.certified, eq.certificate.summary()
    assert _nonideal_stationarity(eq) < 1e-8
    assert abs(_energy_miss(eq, steam, 700.0, -2.0e4)) < 1e-10
    # Saturation temperature of water at 3 MPa: 507.00 K (CoolProp 8.0, IAPWS-95 as Wagner and Pruss 2002
    # give it).  Peng-Robinson's vapour fugacity with the NASA liquid puts it at 509.03 K; the ideal gas at
    # 516.13 K.
    T_saturation = CP.PropsSI("T", "P", 30e5, "Q", 0, "Water")
    assert abs(eq.T - T_saturation) < 2.5


def test_condensing_outlet_with_held_approach_machinery_and_a_cubic_holds_ln_phi(solver):
    # equilibrate_with_approach (nothing held) runs the same energy balance; it too took the ideal split
    # before the fix (494.51 K where the cubic's answer is 488.14 K; stationarity with ln phi off by 0.13).
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", RuntimeWarning)
        eq = gibbsmin.equilibrate_with_approach(WET_HYDROGEN, None, 30e5, T_feed=600.0, heat_input=-6.0e4, gas=GAS,
                                                method=solver)
    assert eq.amounts["H2O(l)"] > 0.1 and eq.certificate.certified, eq.certificate.summary()
    assert _nonideal_stationarity(eq) < 1e-8
    assert abs(_energy_miss(eq, WET_HYDROGEN, 600.0, -6.0e4)) < 1e-10


@pytest.mark.parametrize("heat", [-1.0e4, -1.5e4, -2.5e4])
def test_boiling_plateau_at_80_bar_is_reached_past_trial_temperatures_where_steam_has_no_vapour_root(heat, solver):
    # Steam from 700 K at 80 bar, cooled: the search tries temperatures far below the plateau, where the
    # cubic of the steam-like gas has one real root, liquid-like; its root used to fail there at some
    # temperatures (457.7 K here, with -1.5e4 J), raising ConvergenceError.  Saturation temperature at 8 MPa:
    # 568.16 K (CoolProp 8.0, IAPWS-95 after Wagner and Pruss 2002); Peng-Robinson's vapour with the NASA
    # liquid: 572.92 K.
    import CoolProp.CoolProp as CP

    steam = {"H2O": 1.0}
    eq, _ = _settled(steam, 700.0, 80e5, heat, method=solver)
    assert "phase_boundary" in eq.extras and eq.certificate.certified, eq.certificate.summary()
    assert 0.1 < eq.amounts["H2O(l)"] < 0.8
    assert _nonideal_stationarity(eq) < 1e-8 and abs(_energy_miss(eq, steam, 700.0, heat)) < 1e-10
    assert abs(eq.T - CP.PropsSI("T", "P", 80e5, "Q", 0, "Water")) < 5.5
