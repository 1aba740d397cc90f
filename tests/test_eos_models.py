"""Gas-model behaviour: the registry, the ideal gas, batches, root choice and limiting cases."""

from __future__ import annotations

import numpy as np
import pytest
from eos_cases import AMMONIA_LOOP, CO2_VAPOUR, METHANOL_LOOP

from gibbsmin.eos import (
    GAS_MODELS,
    HELIUM,
    HYDROGEN,
    PENG_ROBINSON,
    SOAVE_REDLICH_KWONG,
    CubicModel,
    IdealGasModel,
    gas_model,
    gas_model_for_species,
)

CUBICS = ("peng-robinson", "srk")


def test_registry_names_and_aliases():
    assert GAS_MODELS == ("ideal", "peng-robinson", "srk")
    assert gas_model("PR", [190.6], [46e5], [0.01]).name == "peng-robinson"
    assert gas_model("Soave-Redlich-Kwong", [190.6], [46e5], [0.01]).name == "srk"
    assert isinstance(gas_model("ideal", Tc=[190.6, 304.2]), IdealGasModel)
    assert gas_model("ideal", Tc=[190.6, 304.2]).n_species == 2


def test_ideal_gas_has_no_departures():
    # Ideal gas: Z = 1, phi = 1, no residual properties (definition).
    model = gas_model_for_species("ideal", AMMONIA_LOOP.species)
    one = model.properties(700.0, 200e5, AMMONIA_LOOP.mole_fractions, dT=True)
    assert (one.Z, one.H_res_RT, one.S_res_R) == (1.0, 0.0, 0.0)
    np.testing.assert_array_equal(one.ln_phi, np.zeros(5))
    np.testing.assert_array_equal(one.dln_phi_dT, np.zeros(5))
    batch = model.properties(np.array([600.0, 700.0]), 200e5, AMMONIA_LOOP.mole_fractions)
    assert batch.Z.shape == (2,) and batch.ln_phi.shape == (2, 5)


@pytest.mark.parametrize("family", CUBICS)
def test_batch_equals_one_condition_at_a_time(family: str):
    # With kij and the quantum gases switched on, so every code path is batched.
    mixture = METHANOL_LOOP
    n = len(mixture.species)
    kij = np.full((n, n), 0.03) - 0.03 * np.eye(n)
    model = gas_model_for_species(family, mixture.species, kij=kij)
    T = np.linspace(450.0, 800.0, 7)
    P = np.linspace(30e5, 300e5, 7)
    rng = np.random.default_rng(3)
    y = rng.dirichlet(np.ones(n), size=7)
    batch = model.properties(T, P, y, dT=True)
    for k in range(7):
        one = model.properties(float(T[k]), float(P[k]), y[k], dT=True)
        assert batch.Z[k] == pytest.approx(one.Z, rel=1e-14)
        assert batch.H_res_RT[k] == pytest.approx(one.H_res_RT, rel=1e-12, abs=1e-15)
        assert batch.S_res_R[k] == pytest.approx(one.S_res_R, rel=1e-12, abs=1e-15)
        np.testing.assert_allclose(batch.ln_phi[k], one.ln_phi, rtol=0, atol=1e-14)
        np.testing.assert_allclose(batch.dln_phi_dT[k], one.dln_phi_dT, rtol=0, atol=1e-16)


@pytest.mark.parametrize("family", CUBICS)
def test_vapour_root_is_the_largest_real_root(family: str):
    # Reference: numpy.roots (companion-matrix eigenvalues) of the same cubic.
    # CO2 at 280 K and 30 bar is below its vapour pressure: three real roots.
    fam = {"peng-robinson": PENG_ROBINSON, "srk": SOAVE_REDLICH_KWONG}[family]
    Tc, Pc, omega = CO2_VAPOUR.critical()
    T, P = CO2_VAPOUR.T, CO2_VAPOUR.P
    alpha = (1 + fam.kappa(omega[0]) * (1 - np.sqrt(T / Tc[0]))) ** 2
    A = fam.omega_a * alpha * (T / Tc[0]) ** -2 * P / Pc[0]
    B = fam.omega_b * (T / Tc[0]) ** -1 * P / Pc[0]
    u, w = fam.delta1 + fam.delta2, fam.delta1 * fam.delta2
    roots = np.roots([1.0, -(1 + B - u * B), A + w * B**2 - u * B - u * B**2, -(A * B + w * B**2 + w * B**3)])
    real = np.sort(roots[np.abs(roots.imag) < 1e-12].real)
    assert len(real) == 3
    Z = CubicModel(fam, Tc, Pc, omega).properties(T, P, np.ones(1)).Z
    assert Z == pytest.approx(real[-1], rel=1e-12)


@pytest.mark.parametrize("family, Zc", [("peng-robinson", 0.30740), ("srk", 1.0 / 3.0)])
def test_pure_fluid_at_its_critical_point_has_the_eos_critical_Z(family: str, Zc: float):
    # Peng and Robinson (1976) state Zc = 0.307 for their equation (0.307401
    # exactly); for Redlich-Kwong forms it is 1/3 (Redlich and Kwong 1949).  At
    # (Tc, Pc) the cubic has a triple root there, which also checks Omega_a and
    # Omega_b.  A triple root is only found to about cube-root precision.
    model = gas_model(family, [190.564], [4.599e6], [0.008])
    assert model.properties(190.564, 4.599e6, np.ones(1)).Z == pytest.approx(Zc, abs=1e-4)


@pytest.mark.parametrize("family", CUBICS)
def test_low_pressure_limit_is_the_ideal_gas(family: str):
    # As P -> 0 every gas becomes ideal (common practice, no source).
    model = gas_model_for_species(family, AMMONIA_LOOP.species)
    got = model.properties(700.0, 1.0, AMMONIA_LOOP.mole_fractions)
    assert got.Z == pytest.approx(1.0, abs=1e-7)
    np.testing.assert_allclose(got.ln_phi, 0.0, atol=1e-7)
    assert abs(got.H_res_RT) < 1e-7


@pytest.mark.parametrize("family", CUBICS)
def test_absent_species_has_its_infinite_dilution_ln_phi(family: str):
    # ln phi_i is continuous as y_i -> 0 (common practice, no source); a solver
    # needs it for species about to appear.
    model = gas_model_for_species(family, AMMONIA_LOOP.species)
    y0 = np.array([0.75, 0.25, 0.0, 0.0, 0.0])
    y_small = np.array([0.75, 0.25 - 3e-9, 1e-9, 1e-9, 1e-9])
    np.testing.assert_allclose(model.ln_phi(700.0, 200e5, y0), model.ln_phi(700.0, 200e5, y_small), atol=1e-8)


def test_quantum_gas_constants():
    # Smith, Van Ness and Abbott, Introduction to Chemical Engineering
    # Thermodynamics, 7th ed., eqs. 3.58-3.59 (after Gunn, Chueh and Prausnitz 1966):
    # Tc = 43.6 / (1 + 21.8 / (2.016 T)) K and Pc = 20.5 / (1 + 44.2 / (2.016 T)) bar.
    Tc, Pc = HYDROGEN.critical(300.0)
    assert Tc == pytest.approx(43.6 / (1 + 21.8 / (2.016 * 300.0)), rel=1e-15)
    assert Pc == pytest.approx(20.5e5 / (1 + 44.2 / (2.016 * 300.0)), rel=1e-15)
    # He-4: Tc0 = 10.47 K, Pc0 = 6.67 atm, same c1 and c2 (from memory).
    Tc, Pc = HELIUM.critical(500.0)
    assert Tc == pytest.approx(10.47 / (1 + 21.8 / (4.003 * 500.0)), rel=1e-15)
    assert Pc == pytest.approx(6.67 * 101325 / (1 + 44.2 / (4.003 * 500.0)), rel=2e-3)


def test_quantum_correction_switch():
    on = gas_model_for_species("peng-robinson", ["H2", "N2"])
    off = gas_model_for_species("peng-robinson", ["H2", "N2"], quantum_correction=False)
    assert list(on.quantum_gases) == [0] and on.quantum_gases[0] is HYDROGEN
    assert off.quantum_gases == {}
    y = np.array([0.75, 0.25])
    assert on.properties(400.0, 200e5, y).Z != pytest.approx(off.properties(400.0, 200e5, y).Z, rel=1e-3)


def test_quantum_gases_marked_by_flag_name_or_constants():
    Tc, Pc, omega = [33.2, 126.2], [13e5, 34e5], [-0.22, 0.04]
    by_flag = gas_model("pr", Tc, Pc, omega, quantum=[True, False], names=["H2", "N2"])
    by_name = gas_model("pr", Tc, Pc, omega, quantum=["H2", None])
    by_constants = gas_model("pr", Tc, Pc, omega, quantum=[HYDROGEN, None])
    y = np.array([0.75, 0.25])
    expected = by_name.ln_phi(500.0, 150e5, y)
    np.testing.assert_array_equal(by_flag.ln_phi(500.0, 150e5, y), expected)
    np.testing.assert_array_equal(by_constants.ln_phi(500.0, 150e5, y), expected)


def test_result_conveniences():
    model = gas_model_for_species("srk", AMMONIA_LOOP.species)
    got = model.properties(AMMONIA_LOOP.T, AMMONIA_LOOP.P, AMMONIA_LOOP.mole_fractions)
    np.testing.assert_allclose(got.phi, np.exp(got.ln_phi))
    assert got.G_res_RT == pytest.approx(AMMONIA_LOOP.mole_fractions @ got.ln_phi, abs=1e-14)
    assert got.model == "srk"


def test_residual_enthalpy_jumps_only_where_a_species_alpha_passes_its_minimum():
    # Peng and Robinson (1976): kappa = 0.37464 + 1.54226 omega - 0.26992 omega^2 and sqrt(alpha) =
    # 1 + kappa (1 - sqrt(Tr)), which vanishes at Tr = (1 + 1/kappa)^2.  CO (Tc 132.91 K, omega 0.049, the
    # shipped constants): 1381.82 K.  H2 with the Gunn-Chueh-Prausnitz constants (omega = 0, Tc0 43.6 K,
    # c1/M = 21.8/2.016 K): Tc0 (1 + 1/0.37464)^2 - c1/M = 576.18 K.
    model = gas_model_for_species("peng-robinson", ["H2", "CO"])
    kinks = model.alpha_minimum_temperatures
    kappa = 0.37464 + 1.54226 * 0.049 - 0.26992 * 0.049**2
    assert kinks[1] == pytest.approx(132.91 * (1 + 1 / kappa) ** 2, rel=1e-12)
    assert kinks[0] == pytest.approx(43.6 * (1 + 1 / 0.37464) ** 2 - 21.8 / 2.016, rel=1e-12)
    y = np.array([0.5, 0.5])

    def step_of_H_res(T, h=1e-6):
        return (model.properties(T + h, 150e5, y).H_res_RT * (T + h)
                - model.properties(T - h, 150e5, y).H_res_RT * (T - h))

    # Across each kink H_res/R steps up (by 7.3 K and 5.0 K for this gas at 150 bar); a kelvin away it moves
    # by its smooth slope over 2 uK only.
    for T_k in kinks:
        assert step_of_H_res(T_k) > 1.0
        assert abs(step_of_H_res(T_k + 1.0)) < 1e-6 and abs(step_of_H_res(T_k - 1.0)) < 1e-6


@pytest.mark.parametrize("family, T", [("peng-robinson", 488.5), ("srk", 499.6)])
def test_the_one_liquid_like_root_is_found_where_no_vapour_root_exists(family: str, T: float):
    # Reference: numpy.roots of the same cubic.  Pure water at 80 bar far below its boiling point (568 K at
    # 80 bar, steam tables, from memory): the cubic has one real root, liquid-like, left of the inflection
    # point, where Newton from 1 + B wandered and at these temperatures raised ConvergenceError.
    model = gas_model_for_species(family, ["H2O"])
    one = model.properties(T, 80e5, np.ones(1))
    batch = model.properties(np.array([T, 700.0]), 80e5, np.ones((2, 1)))
    assert one.Z < 0.1 and batch.Z[0] == pytest.approx(one.Z, rel=1e-12) and batch.Z[1] > 0.8
    fam = {"peng-robinson": PENG_ROBINSON, "srk": SOAVE_REDLICH_KWONG}[family]
    Tc, Pc, omega = 647.14, 22048320.0, 0.344  # the shipped constants of H2O
    alpha = (1 + fam.kappa(omega) * (1 - np.sqrt(T / Tc))) ** 2
    A = fam.omega_a * alpha * (T / Tc) ** -2 * 80e5 / Pc
    B = fam.omega_b * (T / Tc) ** -1 * 80e5 / Pc
    u, w = fam.delta1 + fam.delta2, fam.delta1 * fam.delta2
    roots = np.roots([1.0, -(1 + B - u * B), A + w * B**2 - u * B - u * B**2, -(A * B + w * B**2 + w * B**3)])
    real = roots[np.abs(roots.imag) < 1e-12].real
    assert len(real) == 1 and one.Z == pytest.approx(real[0], rel=1e-10)
