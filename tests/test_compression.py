"""Compressors, expanders and valves on one gas phase (gibbsmin.energy.compression) against outside references.

References, named again beside each check:
- the ideal gas: Cantera 3.2 (Goodwin, Moffat, Schoegl, Speth and Weber, 2025) given gibbsmin's own NASA-7
  coefficients (tests/cantera_reference.py), its isentropic state by ``gas.SP`` and the outlet by ``gas.HP``;
- Peng-Robinson: thermo 0.6 (Caleb Bell and contributors), CEOSGas of class PR78MIX with gibbsmin's critical
  constants and shipped kij (as tests/flash_reference.py) and an ideal-gas heat capacity handed over as the
  same NASA polynomial (low range, J/(mol K), within its 200 to 1000 K); its departures at given states and its
  entropy and enthalpy as functions of T, whose roots the test finds with brentq.

Hydrogen's quantum correction.  gibbsmin gives H2 Gunn-Chueh-Prausnitz constants Tc(T), Pc(T), and its
residual enthalpy and entropy carry their T derivatives (eos/cubic.py takes -T dg/dT with b(T)).  thermo handed
the constants at a fixed T treats them as plain numbers, so its H_dep and S_dep omit those terms: measured on the
invented loop gas below (66 % H2) the departures then differ by 3 to 6 % (not a tolerance question but a
different function), the isentropic outlet by 0.006 to 0.03 K and a 175 -> 20 bar let-down by 0.3 K.  The
H2-rich checks therefore take from thermo only what is exact at a fixed T, the residual Gibbs energy
G_dep = H_dep - T S_dep (a function of the constants at T alone), and differentiate it in T here:
H_res = -R T^2 d(G_dep/RT)/dT and S_res = (H_res - G_dep)/T, by a five-point central difference of step 0.05 K
(truncation about 1e-10 relative); the tolerances of those checks are stated beside them.
"""

from __future__ import annotations

import re

import numpy as np
import pytest
from cantera_reference import cantera_gas
from flash_reference import _constants_at
from scipy.optimize import brentq
from thermo import PR78MIX, CEOSGas, HeatCapacityGas

import gibbsmin
from gibbsmin.energy import Compression, Letdown, compress, expand_adiabatic, mixture_enthalpy, mixture_entropy
from gibbsmin.eos.interactions import shipped_kij_matrix
from gibbsmin.eos.phase import residual_enthalpy_of_gas, residual_entropy_of_gas
from gibbsmin.errors import InputError
from gibbsmin.thermo import R

BAR = 1e5
# Invented gases (our own round numbers): an ammonia loop's circulator suction after the separator, and a
# CH4/CO2/N2 gas without hydrogen.
LOOP_GAS = {"H2": 0.66, "N2": 0.22, "NH3": 0.04, "CH4": 0.05, "Ar": 0.03}
SOUR_GAS = {"CH4": 0.6, "CO2": 0.25, "N2": 0.15}
DB = gibbsmin.default_database()


# -- thermo's side -------------------------------------------------------------------------------------------------

def _thermo_gas(amounts, T, P):
    """thermo's PR78MIX vapour of ``amounts`` [mol] at T [K], P [Pa] (H2's effective constants at T) and N [mol]."""
    names = tuple(amounts)
    total = sum(amounts.values())
    Tc, Pc, omega = _constants_at(names, T, True)
    kij = shipped_kij_matrix("peng-robinson", list(names))
    given = {"Tcs": Tc, "Pcs": Pc, "omegas": omega, "kijs": kij.tolist()}
    # NASA low range: cp/R = a1 + a2 T + ... + a5 T^4, handed over in J/(mol K), highest power first.
    heat_capacities = [HeatCapacityGas(poly_fit=(DB[n].T_ranges[0], DB[n].T_ranges[1],
                                                 list(R * np.asarray(DB[n].low[:5])[::-1]))) for n in names]
    gas = CEOSGas(PR78MIX, given, HeatCapacityGases=heat_capacities, T=T, P=P,
                  zs=[amounts[n] / total for n in names])
    return gas, total


def _thermo_gibbs_departure(amounts, T, P):
    gas, total = _thermo_gas(amounts, T, P)
    return total * (gas.H_dep() - T * gas.S_dep())


def _departures_through_gibbs_helmholtz(amounts, T, P, step=0.05):
    """H_res [J] and S_res [J/K] from thermo's G_dep as a function of T (module docstring)."""
    g = [_thermo_gibbs_departure(amounts, T + k * step, P) / (T + k * step) for k in (-2, -1, 1, 2)]
    dg_dT = (g[0] - 8.0 * g[1] + 8.0 * g[2] - g[3]) / (12.0 * step)
    H = -T * T * dg_dT
    return H, (H - _thermo_gibbs_departure(amounts, T, P)) / T


def _thermo_entropy(amounts, T, P):
    gas, total = _thermo_gas(amounts, T, P)
    return total * gas.S()


def _thermo_enthalpy(amounts, T, P):
    gas, total = _thermo_gas(amounts, T, P)
    return total * gas.H()


def _root(f, low, high):
    return brentq(f, low, high, xtol=1e-12, rtol=1e-15)


# -- the ideal gas against Cantera -----------------------------------------------------------------------------------

@pytest.mark.parametrize("T_in, P_in, P_out, efficiency", [
    (300.0, 175 * BAR, 190 * BAR, 0.75),   # a loop circulator
    (300.0, 1 * BAR, 10 * BAR, 0.8),       # a large ratio, 270 K of rise
    (600.0, 30 * BAR, 2 * BAR, 0.85),      # an expander
])
def test_ideal_gas_outlet_and_power_match_cantera(T_in, P_in, P_out, efficiency):
    found = compress(LOOP_GAS, T_in, P_in, P_out, efficiency=efficiency)
    ct = cantera_gas(list(LOOP_GAS))
    ct.TPX = T_in, P_in, LOOP_GAS
    s_in, h_in = ct.s, ct.enthalpy_mole
    ct.SP = s_in, P_out
    # Cantera 3.2, gas.SP with our NASA data: the isentropic outlet.
    assert found.T_isentropic == pytest.approx(ct.T, rel=1e-8)
    h_s = ct.enthalpy_mole
    factor = 1.0 / efficiency if P_out > P_in else efficiency
    h_target = h_in + factor * (h_s - h_in)
    ct.HP = h_target / ct.mean_molecular_weight, P_out
    # Cantera 3.2, gas.HP: the outlet; power from Cantera's molar enthalpies (J/kmol to J/mol).
    assert found.T_out == pytest.approx(ct.T, rel=1e-8)
    assert found.power_W == pytest.approx((h_target - h_in) / 1000.0 * sum(LOOP_GAS.values()), rel=1e-8)
    assert (found.power_W > 0) == (P_out > P_in)


def test_ideal_gas_valve_keeps_its_temperature():
    # An ideal gas's enthalpy does not depend on pressure (common practice, no source): no Joule-Thomson change.
    found = expand_adiabatic(LOOP_GAS, 268.0, 175 * BAR, 20 * BAR)
    assert isinstance(found, Letdown)
    assert found.T_out == pytest.approx(268.0, rel=1e-12)
    assert found.power_W == 0.0
    # Throttling an ideal gas generates N R ln(P_in/P_out) of entropy (common practice, no source).
    assert found.S_out - found.S_in == pytest.approx(sum(LOOP_GAS.values()) * R * np.log(175 / 20), rel=1e-9)


def test_nitrogen_against_the_constant_cp_formula():
    # Diatomic ideal gas with cp = 7/2 R: T_s = T_in (P_out/P_in)^(2/7) (common practice, no source).  N2's real
    # cp rises from 3.50 R at 300 K to about 3.52 R at 400 K (NASA data), so the formula runs 0.3 K high at most.
    found = compress({"N2": 1.0}, 300.0, 1 * BAR, 2.5 * BAR)
    assert found.T_isentropic == pytest.approx(300.0 * 2.5 ** (2 / 7), abs=0.3)
    assert found.T_isentropic < 300.0 * 2.5 ** (2 / 7)
    # Isentropic work of that gas: cp (T_s - T_in) (common practice, no source); N2's mean cp over the span is
    # 0.3 % above 7/2 R (NASA data), so within 0.5 %.
    assert found.power_W == pytest.approx(3.5 * R * (found.T_isentropic - 300.0), rel=5e-3)


# -- Peng-Robinson against thermo ------------------------------------------------------------------------------------

STATES = [(300.0, 50 * BAR), (268.0, 175 * BAR), (308.0, 190 * BAR), (450.0, 100 * BAR)]


@pytest.mark.parametrize("T, P", STATES)
def test_departures_of_a_gas_without_hydrogen_match_thermo(T, P):
    # thermo 0.6 PR78MIX, H_dep and S_dep at T, P: the same functions without a quantum gas.
    gas, total = _thermo_gas(SOUR_GAS, T, P)
    found = compress(SOUR_GAS, T, P, P, gas="peng-robinson")
    ideal_H = mixture_enthalpy(SOUR_GAS, T, P)
    ideal_S = mixture_entropy(SOUR_GAS, T, P)
    assert found.H_in_W - ideal_H == pytest.approx(total * gas.H_dep(), rel=1e-8)
    assert found.S_in - ideal_S == pytest.approx(total * gas.S_dep(), rel=1e-8)
    assert residual_enthalpy_of_gas(SOUR_GAS, T, P, "pr") == pytest.approx(total * gas.H_dep(), rel=1e-8)
    assert residual_entropy_of_gas(SOUR_GAS, T, P, "pr") == pytest.approx(total * gas.S_dep(), rel=1e-8)


@pytest.mark.parametrize("T, P", STATES)
def test_departures_of_a_hydrogen_rich_gas_match_thermo_through_gibbs_helmholtz(T, P):
    # thermo 0.6 PR78MIX's G_dep at each T with H2's constants at that T, differentiated here (module docstring);
    # 1e-7 relative covers the five-point difference (measured 1e-9 with a three-point one of 0.01 K).
    H_res, S_res = _departures_through_gibbs_helmholtz(LOOP_GAS, T, P)
    found = compress(LOOP_GAS, T, P, P, gas="peng-robinson")
    assert found.H_in_W - mixture_enthalpy(LOOP_GAS, T, P) == pytest.approx(H_res, rel=1e-7)
    assert found.S_in - mixture_entropy(LOOP_GAS, T, P) == pytest.approx(S_res, rel=1e-7)
    assert residual_entropy_of_gas(LOOP_GAS, T, P, "pr") == pytest.approx(S_res, rel=1e-7)


def test_thermo_at_fixed_constants_is_a_different_function_for_hydrogen():
    # Why the test above goes through G_dep: thermo's S_dep at fixed effective constants lacks the dTc/dT and
    # dPc/dT terms (thermo 0.6 PR78MIX; measured 3.0 % of S_dep at 268 K, 175 bar).
    gas, total = _thermo_gas(LOOP_GAS, 268.0, 175 * BAR)
    ours = residual_entropy_of_gas(LOOP_GAS, 268.0, 175 * BAR, "pr")
    assert 0.01 < abs(ours / (total * gas.S_dep()) - 1.0) < 0.1


@pytest.mark.parametrize("T_in, P_in, P_out", [(300.0, 50 * BAR, 120 * BAR), (268.0, 175 * BAR, 190 * BAR),
                                               (308.0, 175 * BAR, 190 * BAR)])
def test_isentropic_outlet_of_a_gas_without_hydrogen_matches_thermo(T_in, P_in, P_out):
    found = compress(SOUR_GAS, T_in, P_in, P_out, efficiency=0.75, gas="peng-robinson")
    S_in = _thermo_entropy(SOUR_GAS, T_in, P_in)
    T_s = _root(lambda T: _thermo_entropy(SOUR_GAS, T, P_out) - S_in, T_in, T_in + 200.0)
    # thermo 0.6 PR78MIX's S(T, P) with the NASA cp; root by brentq here.
    assert found.T_isentropic == pytest.approx(T_s, abs=1e-6)
    H_in = _thermo_enthalpy(SOUR_GAS, T_in, P_in)
    H_out = H_in + (_thermo_enthalpy(SOUR_GAS, T_s, P_out) - H_in) / 0.75
    T_out = _root(lambda T: _thermo_enthalpy(SOUR_GAS, T, P_out) - H_out, T_in, T_in + 300.0)
    # thermo 0.6 PR78MIX's H(T, P): the outlet at efficiency 0.75 and the power.
    assert found.T_out == pytest.approx(T_out, abs=1e-6)
    assert found.power_W == pytest.approx(H_out - H_in, rel=1e-7)


def test_valve_on_a_gas_without_hydrogen_matches_thermo():
    found = expand_adiabatic(SOUR_GAS, 300.0, 175 * BAR, 20 * BAR, gas="peng-robinson")
    H_in = _thermo_enthalpy(SOUR_GAS, 300.0, 175 * BAR)
    T_out = _root(lambda T: _thermo_enthalpy(SOUR_GAS, T, 20 * BAR) - H_in, 200.0, 300.0)
    # thermo 0.6 PR78MIX's H(T, P); root by brentq here.  A 75 K Joule-Thomson cooling.
    assert found.T_out == pytest.approx(T_out, abs=1e-6)
    assert found.T_out < 230.0


def _gibbs_helmholtz_entropy(T, P):
    """The loop gas's entropy [J/K]: our ideal part (Cantera-checked above) and thermo's residual one."""
    return mixture_entropy(LOOP_GAS, T, P) + _departures_through_gibbs_helmholtz(LOOP_GAS, T, P)[1]


def test_isentropic_outlet_of_the_hydrogen_rich_loop_gas_matches_thermo_through_gibbs_helmholtz():
    found = compress(LOOP_GAS, 268.0, 175 * BAR, 190 * BAR, gas="peng-robinson")
    S_in = _gibbs_helmholtz_entropy(268.0, 175 * BAR)
    T_s = _root(lambda T: _gibbs_helmholtz_entropy(T, 190 * BAR) - S_in, 268.0, 290.0)
    # thermo 0.6's G_dep differentiated in T (module docstring); 1e-7 relative in S_res is below 1e-7 K here.
    assert found.T_isentropic == pytest.approx(T_s, abs=1e-6)


# -- the machine's own relations and the demo ----------------------------------------------------------------------

def test_efficiency_divides_compression_work_and_multiplies_expansion_work():
    ideal = compress(LOOP_GAS, 300.0, 175 * BAR, 190 * BAR, gas="pr")
    real = compress(LOOP_GAS, 300.0, 175 * BAR, 190 * BAR, efficiency=0.75, gas="pr")
    assert real.power_W == pytest.approx(ideal.power_W / 0.75, rel=1e-9)
    assert real.S_out > real.S_in  # an inefficient machine generates entropy (second law)
    assert ideal.S_isentropic == pytest.approx(ideal.S_in, rel=1e-9)
    turbine = compress(LOOP_GAS, 500.0, 60 * BAR, 10 * BAR, efficiency=0.8, gas="pr")
    free = compress(LOOP_GAS, 500.0, 60 * BAR, 10 * BAR, gas="pr")
    assert turbine.power_W == pytest.approx(0.8 * free.power_W, rel=1e-9)
    assert free.power_W < turbine.power_W < 0.0
    assert turbine.S_out > turbine.S_in


def test_invented_ammonia_loop_circulator_demo():
    # Demo, not a reference: an invented loop's circulator, 1,000 mol/s of separator gas at 30 degC, 175 to
    # 190 bar, efficiency 0.75.  With SRK too.  Figures stated in DEVELOPERS.md are these.
    flows = {name: 1000.0 * y for name, y in LOOP_GAS.items()}
    for gas in ("ideal", "peng-robinson", "srk"):
        found = compress(flows, 303.15, 175 * BAR, 190 * BAR, efficiency=0.75, gas=gas)
        assert isinstance(found, Compression)
        assert 200e3 < found.power_W < 400e3  # a quarter of a megawatt or so
        assert 7.0 < found.T_out - 303.15 < 12.0
        assert found.iterations < 20


# -- bad input -------------------------------------------------------------------------------------------------------

@pytest.mark.parametrize("call, words", [
    (lambda: compress(LOOP_GAS, 300.0, 175 * BAR, 0.0), "P_out must be a positive"),
    (lambda: compress(LOOP_GAS, 300.0, -1.0, 190 * BAR), "P_in must be a positive"),
    (lambda: compress(LOOP_GAS, 300.0, 175 * BAR, 190 * BAR, efficiency=0.0), "0 < efficiency <= 1"),
    (lambda: compress(LOOP_GAS, 300.0, 175 * BAR, 190 * BAR, efficiency=1.2), "0 < efficiency <= 1"),
    (lambda: compress(LOOP_GAS, 300.0, 175 * BAR, 190 * BAR, efficiency=True), "0 < efficiency <= 1"),
    (lambda: compress({}, 300.0, 175 * BAR, 190 * BAR), "non-empty mapping"),
    (lambda: compress({"H2": 0.0}, 300.0, 175 * BAR, 190 * BAR), "every feed amount is zero"),
    (lambda: compress({"H2O(l)": 1.0}, 300.0, 1 * BAR, 2 * BAR), "give gas species only"),
    (lambda: compress(LOOP_GAS, 150.0, 1 * BAR, 2 * BAR), "outside the data range of"),
    (lambda: compress(LOOP_GAS, 300.0, 100 * BAR, 1 * BAR), "outside the species' common data range"),
    (lambda: expand_adiabatic(LOOP_GAS, 300.0, 175 * BAR, 20 * BAR, gas="virial"), "unknown gas model"),
])
def test_bad_input_is_refused_with_a_clear_message(call, words):
    with pytest.raises(InputError, match=re.escape(words)):
        call()


def test_unknown_species_names_a_close_match():
    with pytest.raises(KeyError, match="did you mean"):
        compress({"h2": 1.0, "Nitrogen-gas": 1.0}, 300.0, 1 * BAR, 2 * BAR)
