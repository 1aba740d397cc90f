"""No wrong answer marked pass: the core-numerics cases of issue 16.

Each test here failed before its fix.  Reference values are computed by hand
from the NASA polynomials (McBride, Gordon and Reno, NASA TM-4513, 1993, the
data the engine ships) or taken from Cantera where it can solve the case.
"""

from __future__ import annotations

import math
import re

import numpy as np
import pytest

import gibbsmin
from gibbsmin.errors import InputError


def test_feed_total_that_overflows_is_refused_with_the_limit_and_the_fix():
    with pytest.raises(InputError, match=r"1e\+308 mol.*1e\+100 mol.*scale the feed"):
        gibbsmin.equilibrate({"H2O": 1e308}, 300.0, 1e5)
    with pytest.raises(InputError, match="scale the feed"):
        gibbsmin.equilibrate({"N2": 1e-120}, 300.0, 1e5)


def test_feed_total_near_the_limits_gives_the_same_composition():
    species = ["CH4", "H2O", "H2", "CO", "CO2"]
    unit = gibbsmin.equilibrate({"CH4": 1.0, "H2O": 3.0}, 1100.0, 30e5, species=species)
    for scale in (1e99 / 4, 1e-99):
        big = gibbsmin.equilibrate({"CH4": scale, "H2O": 3 * scale}, 1100.0, 30e5, species=species)
        assert big.certificate.certified
        for s in species:
            assert big.mole_fractions[s] == pytest.approx(unit.mole_fractions[s], rel=1e-10)


def test_zero_feed_amount_with_a_feed_temperature_means_absent():
    with_zero = gibbsmin.equilibrate({"CH4": 1.0, "H2O": 3.0, "Ar": 0.0}, 1123.15, 30e5, T_feed=773.15)
    without = gibbsmin.equilibrate({"CH4": 1.0, "H2O": 3.0}, 1123.15, 30e5, T_feed=773.15)
    assert with_zero.amounts["Ar"] == 0.0
    assert with_zero.extras["duty_W"] == pytest.approx(without.extras["duty_W"], rel=1e-12)
    adiabatic = gibbsmin.equilibrate({"CH4": 1.0, "H2O": 3.0, "Ar": 0.0}, P=30e5, T_feed=1073.15, adiabatic=True)
    assert adiabatic.T == pytest.approx(
        gibbsmin.equilibrate({"CH4": 1.0, "H2O": 3.0}, P=30e5, T_feed=1073.15, adiabatic=True).T, abs=1e-6)


def test_zero_mol_percent_in_a_case_file_settles(tmp_path, capsys):
    from gibbsmin.cli import main

    case = tmp_path / "zero_argon.toml"
    case.write_text(
        '[case]\ntitle = "invented: a reformer feed with an argon line left at zero"\n'
        '[feed.gas]\nunit = "mol%"\ntotal = "100 kmol/h"\nCH4 = 25.0\nH2O = 75.0\nAr = 0.0\n'
        'T = "500 degC"\nP = "30 bar"\n'
        '[conditions]\nT = "850 degC"\nP = "30 bar"\n')
    assert main(["settle", str(case), "--json"]) == 0
    out = capsys.readouterr().out
    assert '"Ar"' in out and "duty" in out


def test_import_without_any_writable_numba_cache_folder_warns_and_works(tmp_path):
    """A read-only install with no writable home: numba's cache=True used to fail at import."""
    import os
    import shutil
    import subprocess
    import sys
    from pathlib import Path

    package = Path(gibbsmin.__file__).resolve().parent
    copy = tmp_path / "site" / "gibbsmin"
    shutil.copytree(package, copy, ignore=shutil.ignore_patterns("__pycache__"))
    # A regular file where a folder is wanted blocks writing even for root (chmod would not).
    for kernel_folder in ("solve",):
        (copy / kernel_folder / "__pycache__").write_text("not a folder")
    blocker = tmp_path / "blocker"
    blocker.write_text("not a folder")
    env = {k: v for k, v in os.environ.items() if not k.startswith(("NUMBA_", "XDG_"))}
    env.update(PYTHONPATH=str(tmp_path / "site"), HOME=str(blocker), NUMBA_CACHE_DIR=str(blocker / "numba"),
               PYTHONDONTWRITEBYTECODE="1")
    script = (
        "import warnings, numpy as np\n"
        "with warnings.catch_warnings(record=True) as caught:\n"
        "    warnings.simplefilter('always')\n"
        "    import gibbsmin\n"
        "    from gibbsmin.solve import certificate\n"
        f"assert gibbsmin.__file__.startswith({str(copy)!r}), gibbsmin.__file__\n"
        "print(sum('compiled-kernel cache' in str(w.message) for w in caught))\n"
        "out = np.array([[1e-12, 1e-12, 1.0, 1.0]])\n"
        "print(certificate._verdicts(out, np.array([True]), 1e-9, 1e-7, 1e-7)[0])\n"
    )
    run = subprocess.run([sys.executable, "-c", script], env=env, cwd=tmp_path, capture_output=True, text=True,
                         timeout=120)
    assert run.returncode == 0, run.stderr
    assert run.stdout.split() == ["1", "True"]


# --- Reference values from the NASA polynomials, evaluated by Cantera (an independent evaluation of the
# --- same coefficients: McBride, Gordon and Reno, NASA TM-4513, 1993), through tests/cantera_reference.py.

def _g_RT(names, T):
    """g0/RT at 1 bar of each named species, evaluated by Cantera."""
    pytest.importorskip("cantera")
    from cantera_reference import cantera_gas, cantera_pure

    values = {}
    gases = [n for n in names if not n.endswith(")")]
    if gases:
        gas = cantera_gas(gases)
        gas.TP = T, 1e5
        values.update(zip(gas.species_names, gas.standard_gibbs_RT))
    for name in (n for n in names if n.endswith(")")):
        pure = cantera_pure(name)
        pure.TP = T, 1e5
        values[name] = float(pure.standard_gibbs_RT[0])
    return values


def test_oxygen_in_steam_at_300_K_is_set_by_the_dissociation_constant_not_by_round_off():
    # 2 H2O = 2 H2 + O2 with x_H2 = 2 x_O2 (the feed's H:O is exactly 2) and x_H2O = 1 - 3e-27:
    # K = x_H2^2 x_O2 (P/P0) / x_H2O^2, so x_O2 = (K P0 / (4 P))^(1/3).  It was 3.5e-13, certified.
    T, P = 300.0, 1e5
    g = _g_RT(["H2O", "H2", "O2"], T)
    K = math.exp(-(2 * g["H2"] + g["O2"] - 2 * g["H2O"]))
    x_O2 = (K / 4.0 * 1e5 / P) ** (1.0 / 3.0)
    assert 1e-27 < x_O2 < 3e-27
    for method in ("newton", "convex", "auto"):
        eq = gibbsmin.equilibrate({"H2O": 1.0}, T, P, species=["H2O", "H2", "O2"], method=method)
        assert eq.certificate.certified
        assert eq.mole_fractions["O2"] == pytest.approx(x_O2, rel=1e-9, abs=0)
        assert eq.mole_fractions["H2"] == pytest.approx(2 * x_O2, rel=1e-9, abs=0)


def test_dissociation_traces_of_a_stoichiometric_feed_at_1e_minus_30_are_exact():
    # H2O = H + OH at 418 K and 58 bar: x_H = x_OH = sqrt(K x_H2O P0 / P), about 6.5e-30.
    T, P = 418.0, 58e5
    g = _g_RT(["H2O", "H", "OH"], T)
    x_H = math.sqrt(math.exp(-(g["H"] + g["OH"] - g["H2O"])) * 1e5 / P)
    eq = gibbsmin.equilibrate({"H2O": 1.0}, T, P, species=["H", "H2O", "OH"])
    assert eq.certificate.certified
    assert x_H < 1e-29
    assert eq.mole_fractions["H"] == pytest.approx(x_H, rel=1e-9, abs=0)
    assert eq.mole_fractions["OH"] == pytest.approx(x_H, rel=1e-9, abs=0)


def test_carbon_monoxide_beside_atomic_carbon_gas_is_solved():
    # 'C' is atomic carbon gas (NASA TM-4513).  C + CO2 = 2 CO has no change in moles, and the feed's
    # C:O is exactly 1, so x_C = x_CO2 = sqrt(1 / K) with K = exp(-(2 g_CO - g_C - g_CO2)/RT).  It raised
    # ConvergenceError suggesting method='convex', which had been tried.
    T, P = 800.0, 1e5
    g = _g_RT(["C", "CO", "CO2"], T)
    x_C = math.exp(-(g["C"] + g["CO2"] - 2 * g["CO"]) / 2)
    for method in ("auto", "newton", "convex"):
        eq = gibbsmin.equilibrate({"CO": 1.0}, T, P, species=["C", "CO", "CO2"], method=method)
        assert eq.certificate.certified
        assert eq.mole_fractions["C"] == pytest.approx(x_C, rel=1e-9, abs=0)
        assert eq.mole_fractions["CO2"] == pytest.approx(x_C, rel=1e-9, abs=0)


def test_a_feed_no_species_of_the_set_can_change_is_returned_as_it_is():
    # H2S, N2, O2 and S(l): hydrogen has no other home than H2S, so no sulfur can leave it, and the
    # only feasible state is the feed itself (S(l) at zero; its potential fixes sulfur's).  It raised
    # ConvergenceError.  Common practice, no source: the balance leaves one point.
    feed = {"N2": 0.075, "H2S": 0.137, "O2": 0.147}
    for method in ("auto", "newton", "convex"):
        eq = gibbsmin.equilibrate(feed, 1590.04, 898110.7, species=["H2S", "N2", "O2", "S(l)"], method=method)
        assert eq.certificate.certified
        for name, amount in feed.items():
            assert eq.amounts[name] == pytest.approx(amount, rel=1e-12)
        assert eq.amounts["S(l)"] == 0.0
        assert "S(l)" not in eq.phases_present


def test_pure_water_below_its_boiling_point_is_all_liquid_with_no_gas_composition():
    # It returned 4e-17 mol of a gas that was 96.5 % O2, certified.  With the gas absent, its margin is
    # -ln of the mole fractions it would have summed: ln(P / p_sat) for water, p_sat = exp(g_l - g_g) P0.
    import json

    T, P = 300.0, 1e5
    g = _g_RT(["H2O", "H2O(l)"], T)
    p_sat = math.exp(g["H2O(l)"] - g["H2O"]) * 1e5
    assert p_sat == pytest.approx(3536.8, rel=0.01)  # IAPWS-95 at 300 K: 3.5368 kPa (from memory)
    for method in ("auto", "newton", "convex"):
        eq = gibbsmin.equilibrate({"H2O": 1.0}, T, P, method=method)
        assert eq.certificate.certified
        assert not eq.gas_present
        assert eq.amounts["H2O(l)"] == pytest.approx(1.0, rel=1e-14)
        assert eq.gas_amount == 0.0
        assert all(math.isnan(y) for y in eq.mole_fractions.values())
        assert eq.phases_present == ("H2O(l)",)
        assert eq.certificate.complementarity == pytest.approx(math.log(P / p_sat), rel=1e-6)
        table = eq.table()
        assert re.search(r"^\w\S*\s+gas\s", table, re.M) is None and "no gas phase" in table
        document = json.loads(json.dumps(eq.to_dict(), allow_nan=False))
        assert document["species"]["O2"]["mole_fraction_in_phase"] is None
    # Above the boiling point the same feed is all steam, and the element potentials give its traces.
    steam = gibbsmin.equilibrate({"H2O": 1.0}, 400.0, P)
    assert steam.gas_present and steam.condensed == {}
    assert steam.mole_fractions["H2O"] == pytest.approx(1.0, abs=1e-12)


def test_a_vanishing_gas_beside_liquid_water_still_starts_a_warm_started_batch():
    # A batch warm-starts each point from the one before; an answer with the gas absent must not
    # poison the next point (300 K all liquid, then 400 K all steam, then 300 K again).
    from gibbsmin.fixed_step import build_problem, prepare
    from gibbsmin.solve import solve

    setup = prepare({"H2O": 1.0}, T_span=(300.0, 400.0))
    problem = build_problem(setup, np.array([300.0, 400.0, 300.0]), np.full(3, 1e5))
    result, certificates = solve(problem, "newton", chains=1)
    assert certificates.certified.all()
    gas_total = np.exp(result.ln_n_gas).sum(axis=1)
    assert gas_total[0] == 0.0 and gas_total[2] == 0.0 and gas_total[1] == pytest.approx(1.0, rel=1e-12)


def test_the_cone_solver_gives_the_same_answer_whatever_ran_before():
    # The cached cvxpy problem kept Clarabel's solver object between solves (cvxpy's default warm
    # start), and the same point came out different (ln n apart by 6e-4) as the first or second solve.
    from gibbsmin.fixed_step import fixed_problem, prepare
    from gibbsmin.solve import convex

    setup = prepare({"CH4": 1.0, "H2O": 1.0}, T_span=(800.0, 900.0))
    point = fixed_problem(setup, 900.0, 30e5)
    other = fixed_problem(setup, 800.0, 5e5)
    convex._compiled.cache_clear()
    first = convex.solve_convex(point, polish=False)
    second = convex.solve_convex(point, polish=False)
    convex.solve_convex(other, polish=False)
    after_other = convex.solve_convex(point, polish=False)
    convex._compiled.cache_clear()
    fresh = convex.solve_convex(point, polish=False)
    for again in (second, after_other, fresh):
        assert np.array_equal(again.ln_n_gas, first.ln_n_gas)
        assert np.array_equal(again.n_condensed, first.n_condensed)


def test_element_rows_independent_only_through_an_out_of_range_solid_are_reduced():
    # H2S, O2 and O with ice allowed only below 273 K: at 2120 K hydrogen and sulfur both sit in H2S
    # alone, so their potentials are not separately fixed; the rows were kept independent through the
    # ice column and Newton's system was singular (ConvergenceError).  H2S passes through; O2 = 2 O
    # follows K from the NASA data (via Cantera).
    T, P = 2120.79, 9.676e6
    feed = {"O2": 0.8022, "H2S": 0.8284}
    eq = gibbsmin.equilibrate(feed, T, P, species=["O2", "H2S", "O", "H2O(s)"])
    assert eq.certificate.certified
    assert eq.amounts["H2S"] == pytest.approx(0.8284, rel=1e-12)
    g = _g_RT(["O2", "O"], T)
    K = math.exp(-(2 * g["O"] - g["O2"]))
    y = eq.mole_fractions
    assert y["O"] ** 2 * P / 1e5 / y["O2"] == pytest.approx(K, rel=1e-9)


def test_species_the_balance_forces_to_zero_do_not_stall_newton():
    # CO2, NH3 and H2S each hold all of one element (O, N, S), so C2H and C3H6 can only be zero; Newton
    # chased round-off in the components' totals to ln n = -5e200 (ConvergenceError).  Common practice,
    # no source: the balance leaves one point, the feed.
    feed = {"CO2": 0.9015, "NH3": 0.3023, "H2S": 0.0470}
    eq = gibbsmin.equilibrate(feed, 1527.57, 64099.0, species=["CO2", "NH3", "H2S", "C2H", "C3H6"])
    assert eq.certificate.certified
    for name, amount in feed.items():
        assert eq.amounts[name] == pytest.approx(amount, rel=1e-12)
    assert eq.amounts["C2H"] < 1e-15 and eq.amounts["C3H6"] < 1e-15


def test_a_feed_the_species_that_can_appear_cannot_balance_is_refused():
    # Sulfur in the feed, but the set's only sulfur carrier is a solid outside its data at 1500 K.
    with pytest.raises(InputError, match="S cannot be balanced by the species that can appear"):
        gibbsmin.equilibrate({"H2S": 1.0}, 1500.0, 1e5, species=["H2", "S(s)"])


def test_a_refused_answer_says_which_solvers_were_tried():
    from gibbsmin.errors import ConvergenceError
    from gibbsmin.fixed_step import checked, prepare, solve_fixed

    setup = prepare({"CH4": 1.0, "H2O": 2.0}, T_span=(1000.0, 1000.0))
    eq = solve_fixed(setup, 1000.0, 20e5, method="newton")[0]
    for solver, expected in (("convex+newton", "Newton and the convex solver were both tried"),
                             ("newton", "try method='auto'")):
        wrong = type(eq)(**{**eq.__dict__, "certificate": type(eq.certificate)(
            **{**eq.certificate.__dict__, "stationarity": 1.0, "certified": False, "solver": solver})})
        with pytest.raises(ConvergenceError, match=expected) as raised:
            checked(wrong)
        assert ("method='convex'" in str(raised.value)) is False


def test_the_case_that_passed_only_as_the_second_solve_passes_both_times():
    # Found by a random search: SO2 and CH4 with S(s), which cannot appear at 2060 K (so nothing can
    # react).  In a fresh process the first method='convex' call was refused as imprecise (element
    # balance 4.0e-9 from the raw cone answer) and the second certified (3.4e-10), the Clarabel
    # object having been warm-started.  Now each cone solve is fresh and the Newton polish converges.
    # Common practice, no source: the feed is the only feasible state.
    from gibbsmin.solve import convex

    feed = {"SO2": 0.5877352634327311, "CH4": 0.8263292356676102}
    args = (feed, 2059.8150125674692, 511653.2014715459)
    convex._compiled.cache_clear()
    answers = [gibbsmin.equilibrate(*args, species=["SO2", "CH4", "S(s)"], method="convex") for _ in range(2)]
    for eq in answers:
        assert eq.certificate.certified and eq.certificate.element_balance < 1e-12
        for name, amount in feed.items():
            assert eq.amounts[name] == pytest.approx(amount, rel=1e-12)
    assert answers[0].amounts == answers[1].amounts


def test_steam_cooled_to_liquid_water_has_no_gas_and_the_outlet_temperature_of_its_enthalpy():
    # 1 mol of steam at 500 K and 1 bar gives up 50 kJ: all liquid, at the T where the liquid's
    # enthalpy is the steam's less 50 kJ (NASA data evaluated by Cantera).  The phase-boundary solve
    # used to return that T with a gas of 1e-16 mol, mostly O2, as a "coexisting" phase.
    pytest.importorskip("cantera")
    from cantera_reference import cantera_gas, cantera_pure
    from scipy.optimize import brentq

    steam, liquid = cantera_gas(["H2O"]), cantera_pure("H2O(l)")
    steam.TP = 500.0, 1e5

    def miss(T):
        liquid.TP = T, 1e5
        return liquid.enthalpy_mole / 1000.0 - (steam.enthalpy_mole / 1000.0 - 50000.0)

    T_ref = brentq(miss, 280.0, 370.0, xtol=1e-10)
    eq = gibbsmin.equilibrate({"H2O": 1.0}, P=1e5, T_feed=500.0, heat_input=-50000.0)
    assert eq.certificate.certified and not eq.gas_present
    assert eq.T == pytest.approx(T_ref, abs=1e-6)
    assert "phase_boundary" not in eq.extras


def test_pure_water_below_its_boiling_point_with_a_cubic_gas_is_all_liquid():
    eq = gibbsmin.equilibrate({"H2O": 1.0}, 300.0, 1e5, gas="peng-robinson", sensitivities=True)
    assert eq.certificate.certified and not eq.gas_present
    assert eq.extras["gas_phase_stability"]["note"] == "no gas phase"
