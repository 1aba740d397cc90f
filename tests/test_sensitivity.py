"""Equilibrium sensitivities by implicit differentiation against central finite differences.

The derivatives come from the linearised optimality conditions
(gibbsmin/sensitivity.py); the check differences fixed-T,P equilibria solved
afresh at T +/- h, P +/- h and n_feed +/- h.  Central differences are exact to
O(h^2); the steps below keep that error and the solver's round-off both under
the tolerances.  Cantera (Goodwin et al., Cantera 3.2, 2025) supplies an
independent equilibrium enthalpy for the heat capacity check.
"""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest

import gibbsmin
from cantera_reference import cantera_gas

DB = gibbsmin.default_database()
CONDENSED = [r.name for r in DB if not r.is_gas]
BAR = 1.0e5

CASES = {
    # name: (feed, T [K], P [Pa], keywords); invented services.  No T sits within h of 1000 K, where the
    # NASA polynomials switch from one fit to the other and cp steps slightly.
    "steam reformer gas": ({"CH4": 1.0, "H2O": 3.0}, 1050.0, 20 * BAR, dict(exclude=CONDENSED)),
    "graphite present": ({"CH4": 1.0, "H2O": 0.5}, 900.0, 5 * BAR, dict(exclude=[c for c in CONDENSED if c != "C(s)"])),
    "liquid water present": ({"H2": 0.45, "CO": 0.02, "CO2": 0.15, "H2O": 0.33, "N2": 0.05}, 400.0, 30 * BAR,
                             dict(species=["H2", "CO", "CO2", "H2O", "N2", "H2O(l)"])),
    "ammonia with inert argon": ({"N2": 1.0, "H2": 3.0, "Ar": 0.2}, 750.0, 100 * BAR,
                                 dict(species=["N2", "H2", "NH3", "Ar"], inert=["Ar"])),
}


def _amounts(feed, T, P, kwargs):
    eq = gibbsmin.equilibrate(feed, T, P, **kwargs)
    assert eq.certificate.certified
    return eq, np.array([eq.amounts[s] for s in eq.species])


def _assert_close(analytic, numeric, what):
    scale = np.max(np.abs(numeric))
    assert scale > 0, f"{what}: nothing moves, the check would be empty"
    worst = np.max(np.abs(analytic - numeric))
    print(f"{what}: worst |analytic - central difference| {worst:.1e} of {scale:.1e}")
    assert worst <= 1e-5 * scale


@pytest.mark.parametrize("case", CASES)
def test_derivatives_match_central_differences(case, solver):
    feed, T, P, kwargs = CASES[case]
    kwargs = dict(kwargs, method=solver)
    eq, n = _amounts(feed, T, P, dict(kwargs, sensitivities=True))
    s = eq.extras["sensitivities"]
    names = list(eq.species)
    assert eq.condensed.keys() == ({"C(s)"} if case == "graphite present" else
                                   {"H2O(l)"} if case == "liquid water present" else set())

    h = 1e-3
    dT = (_amounts(feed, T + h, P, kwargs)[1] - _amounts(feed, T - h, P, kwargs)[1]) / (2 * h)
    _assert_close(np.array([s["dn_dT_mol_per_K"][k] for k in names]), dT, f"{case} dn/dT")

    h = 1e-5 * P
    dP = (_amounts(feed, T, P + h, kwargs)[1] - _amounts(feed, T, P - h, kwargs)[1]) / (2 * h)
    _assert_close(np.array([s["dn_dP_mol_per_Pa"][k] for k in names]), dP, f"{case} dn/dP")

    for species in feed:
        h = 1e-5 * feed[species]
        more, less = dict(feed), dict(feed)
        more[species] += h
        less[species] -= h
        d_feed = (_amounts(more, T, P, kwargs)[1] - _amounts(less, T, P, kwargs)[1]) / (2 * h)
        _assert_close(np.array([s["dn_dfeed_mol_per_mol"][species][k] for k in names]), d_feed,
                      f"{case} dn/dn({species})")


@pytest.mark.parametrize("case", ["steam reformer gas", "graphite present", "liquid water present"])
def test_equilibrium_heat_capacity_is_the_slope_of_the_equilibrium_enthalpy(case, solver):
    feed, T, P, kwargs = CASES[case]
    kwargs = dict(kwargs, method=solver)
    eq = gibbsmin.equilibrate(feed, T, P, sensitivities=True, **kwargs)
    h = 1e-3
    slope = (gibbsmin.equilibrate(feed, T + h, P, **kwargs).extras["enthalpy_J"]
             - gibbsmin.equilibrate(feed, T - h, P, **kwargs).extras["enthalpy_J"]) / (2 * h)
    s = eq.extras["sensitivities"]
    assert s["heat_capacity_equilibrium_J_per_K"] == pytest.approx(slope, rel=1e-6)
    # Reaction that absorbs heat as T rises adds to the frozen heat capacity (Le Chatelier).
    assert s["heat_capacity_equilibrium_J_per_K"] > s["heat_capacity_frozen_J_per_K"]


def test_equilibrium_heat_capacity_against_cantera_enthalpy_slope(solver):
    # Cantera's TP equilibrium on the same species, differenced in T: an outside evaluation of dH/dT.
    feed, T, P, kwargs = CASES["steam reformer gas"]
    eq = gibbsmin.equilibrate(feed, T, P, sensitivities=True, **kwargs, method=solver)
    gas = cantera_gas([s for s in eq.species if eq.phase_of[s] == "gas"])
    total_mass = None

    def enthalpy(T_):
        nonlocal total_mass
        gas.TPX = T_, P, feed
        total_mass = total_mass or gas.mean_molecular_weight * sum(feed.values()) / 1000.0
        gas.equilibrate("TP", rtol=1e-12)
        return gas.enthalpy_mass * total_mass

    h = 1e-2
    slope = (enthalpy(T + h) - enthalpy(T - h)) / (2 * h)
    assert eq.extras["sensitivities"]["heat_capacity_equilibrium_J_per_K"] == pytest.approx(slope, rel=1e-5)


def test_frozen_heat_capacity_is_the_sum_of_the_species_heat_capacities(solver):
    eq = gibbsmin.equilibrate({"N2": 1.0, "Ar": 1.0}, 300.0, BAR, species=["N2", "Ar"], sensitivities=True,
                              method=solver)
    # Argon: cp = 5/2 R exactly (monatomic ideal gas); N2 at 300 K: 29.125 J/(mol K) (JANAF, Chase 1998).
    expected = 2.5 * 8.314462618 + 29.125
    assert eq.extras["sensitivities"]["heat_capacity_frozen_J_per_K"] == pytest.approx(expected, abs=0.01)


def test_on_a_two_phase_plateau_temperature_derivatives_do_not_exist(solver):
    eq = gibbsmin.equilibrate({"N2": 1.0, "H2O": 0.1}, P=101325.0, T_feed=300.0, heat_input=-5300.0,
                              species=["N2", "H2O", "O2", "H2", "H2O(l)", "H2O(s)"], sensitivities=True, method=solver)
    s = eq.extras["sensitivities"]
    assert "phase_boundary" in eq.extras
    assert s["heat_capacity_equilibrium_J_per_K"] is None
    assert s["dn_dT_mol_per_K"]["H2O(s)"] is None
    assert s["heat_capacity_frozen_J_per_K"] > 0


# --- with a cubic gas: central differences of whole solves ------------------------------------------------

LOOP = {"H2": 64.5, "N2": 21.5, "NH3": 3.0, "CH4": 7.0, "Ar": 4.0}


def test_difference_path_equals_implicit_differentiation_on_the_ideal_gas(solver):
    # Two independent methods on the same ideal-gas answer: the central differences used for cubic gases
    # and the implicit differentiation of the optimality conditions agree to 1e-6 relative.
    from gibbsmin import energy
    from gibbsmin.sensitivity import difference_sensitivities, equilibrium_sensitivities
    from gibbsmin.fixed_step import prepare, solve_fixed

    T, P = 723.15, 200e5
    setup = prepare(LOOP, inert=["CH4", "Ar"], T_span=(T, T))
    eq, problem, result = solve_fixed(setup, T, P, method=solver)
    exact = equilibrium_sensitivities(setup, problem, result, T, P)
    system = setup.system
    columns = system.element_matrix(gibbsmin.default_database().resolve(list(setup.feed)))

    def amounts_at(T_now, P_now, b):
        moved = dataclasses.replace(setup, b=b)
        return energy.state_amounts(moved, solve_fixed(moved, T_now, P_now, start=result, method=solver)[0])

    def enthalpy_at(T_now, n):
        return energy.enthalpy(system.table, system.n_gas, n, T_now, P)

    differenced = difference_sensitivities(system.names, T, P, setup.b,
                                           {name: columns[:, k] for k, name in enumerate(setup.feed)},
                                           amounts_at, enthalpy_at)
    scale = np.abs(exact.dn_dT).max()
    np.testing.assert_allclose(differenced.dn_dT, exact.dn_dT, rtol=0, atol=1e-6 * scale)
    np.testing.assert_allclose(differenced.dn_dP, exact.dn_dP, rtol=0, atol=1e-6 * np.abs(exact.dn_dP).max())
    for name in setup.feed:
        np.testing.assert_allclose(differenced.dn_dfeed[name], exact.dn_dfeed[name], rtol=0, atol=1e-6)
    assert differenced.heat_capacity_equilibrium == pytest.approx(exact.heat_capacity_equilibrium, rel=1e-6)
    assert differenced.heat_capacity_frozen == pytest.approx(exact.heat_capacity_frozen, rel=1e-6)


def test_peng_robinson_sensitivities_let_phi_move(solver):
    # Internal consistency: against central differences of equilibrate itself with another step, and
    # conservation of every element; the cubic moves dNH3/dT by 8 % from the ideal gas's here.
    T, P = 723.15, 200e5
    eq = gibbsmin.equilibrate(LOOP, T, P, inert=["CH4", "Ar"], gas="peng-robinson", sensitivities=True, method=solver)
    found = eq.extras["sensitivities"]
    h = 0.05
    up = gibbsmin.equilibrate(LOOP, T + h, P, inert=["CH4", "Ar"], gas="peng-robinson", method=solver)
    down = gibbsmin.equilibrate(LOOP, T - h, P, inert=["CH4", "Ar"], gas="peng-robinson", method=solver)
    assert found["dn_dT_mol_per_K"]["NH3"] == pytest.approx((up.amounts["NH3"] - down.amounts["NH3"]) / (2 * h),
                                                             rel=1e-6)
    assert found["heat_capacity_equilibrium_J_per_K"] == pytest.approx(
        (up.extras["enthalpy_J"] - down.extras["enthalpy_J"]) / (2 * h), rel=1e-6)
    dn_dT = found["dn_dT_mol_per_K"]
    assert abs(3 * dn_dT["NH3"] + 2 * dn_dT["H2"]) < 1e-8 and abs(dn_dT["NH3"] + 2 * dn_dT["N2"]) < 1e-8
    ideal = gibbsmin.equilibrate(LOOP, T, P, inert=["CH4", "Ar"], sensitivities=True, method=solver)
    ideal_phi = ideal.extras["sensitivities"]
    assert abs(dn_dT["NH3"] / ideal_phi["dn_dT_mol_per_K"]["NH3"] - 1.0) > 0.05
