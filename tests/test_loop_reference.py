"""Checks of the reference ammonia loop (tests/loop_reference.py) itself, before gibbsmin's loop is held to it.

The loop is solved once per process (loop_reference.converged_reference) and shared by these tests.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from flash_reference import thermo_phase
from loop_reference import REFERENCE_LOOP, converged_reference, element_totals, reference_ammonia_loop

import gibbsmin

P0 = 1e5  # the NASA polynomials' reference pressure [Pa]


def _operation(kind: str) -> dict:
    return next(op for op in REFERENCE_LOOP["operations"] if op["kind"] == kind)


def _g_RT(name: str, T: float) -> float:
    """g0/RT of a species from its NASA-7 coefficients in the default data set, written out here (McBride,
    Gordon and Reno 1993, NASA TM-4513, eqs. 4 to 6: h/RT and s/R as polynomials in T)."""
    record = gibbsmin.default_database()[name]
    a = record.low if T <= record.T_ranges[1] or len(record.T_ranges) == 2 else record.high
    h_RT = a[0] + a[1] * T / 2 + a[2] * T**2 / 3 + a[3] * T**3 / 4 + a[4] * T**4 / 5 + a[5] / T
    s_R = a[0] * math.log(T) + a[1] * T + a[2] * T**2 / 2 + a[3] * T**3 / 3 + a[4] * T**4 / 4 + a[6]
    return h_RT - s_R


def test_reference_loop_converged():
    reference = converged_reference()
    assert reference.change < 1e-12
    assert reference.equilibrium_calls == reference.flash_calls == reference.passes


def test_reference_loop_refuses_to_report_an_unsettled_loop():
    with pytest.raises(RuntimeError, match="did not settle in 3 passes"):
        reference_ammonia_loop(max_passes=3)


def test_reference_loop_closes_every_element_balance():
    streams = converged_reference().streams
    into = element_totals(streams["makeup"])
    out = element_totals({name: streams["product"][name] + streams["purge"][name] for name in streams["product"]})
    assert set(into) == {"H", "N", "C", "Ar"}
    for element, total in into.items():
        assert out[element] == pytest.approx(total, rel=1e-10), element


def test_reference_converter_holds_the_inert_species():
    streams = converged_reference().streams
    for name in _operation("reactor")["inert"]:
        assert streams["converter out"][name] == pytest.approx(streams["converter feed"][name], rel=1e-12)


def test_reference_converter_outlet_ammonia_in_the_trade_range():
    # 12 to 25 mol% NH3 leaving a converter at about 190 bar and 470 degC: common practice, no source.
    outlet = converged_reference().streams["converter out"]
    assert 0.12 < outlet["NH3"] / sum(outlet.values()) < 0.25


def test_reference_converter_outlet_meets_K_of_the_nasa_polynomials():
    # K of N2 + 3 H2 = 2 NH3 at the converter's T from the data set's coefficients (TM-4513 form), not Cantera's.
    reactor = _operation("reactor")
    T, P = reactor["T"], reactor["P"]
    ln_K = -(2 * _g_RT("NH3", T) - _g_RT("N2", T) - 3 * _g_RT("H2", T))
    outlet = converged_reference().streams["converter out"]
    total = sum(outlet.values())
    y = {name: flow / total for name, flow in outlet.items()}
    ln_Q = 2 * math.log(y["NH3"]) - math.log(y["N2"]) - 3 * math.log(y["H2"]) - 2 * math.log(P / P0)
    assert abs(ln_Q - ln_K) < 1e-9


def test_reference_separator_phases_have_equal_fugacities_by_thermo():
    # thermo's own ln phi of each phase at its root (CEOSGas, CEOSLiquid of PR78MIX, gibbsmin's constants).
    separator = _operation("separator")
    T, P = separator["T"], separator["P"]
    streams = converged_reference().streams
    ln_f = {}
    for stream, root in ((separator["vapour"], "gas"), (separator["liquid"], "liquid")):
        flows = streams[stream]
        phase = thermo_phase(flows, T, P, root=root)
        assert phase.zs == pytest.approx(np.array(list(flows.values())) / sum(flows.values()), rel=1e-14)
        ln_f[root] = np.log(np.array(phase.zs) * P) + np.array(phase.lnphis())
    assert np.max(np.abs(ln_f["gas"] - ln_f["liquid"])) < 1e-8
    assert streams["product"]["NH3"] > 0.9 * sum(streams["product"].values())  # a real liquid, not the vapour twice


def test_reference_loop_refuses_an_inert_species_the_balance_does_not_hold():
    operations = tuple({**op, "inert": ("NH3",)} if op["kind"] == "reactor" else op
                       for op in REFERENCE_LOOP["operations"])
    with pytest.raises(ValueError, match="NH3 shares all its elements"):
        reference_ammonia_loop(loop={**REFERENCE_LOOP, "operations": operations})
