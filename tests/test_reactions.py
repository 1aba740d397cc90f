"""gibbsmin.reactions: equations, K(T), quotients and approach temperatures.

Outside sources:
- published correlations of K(T) (Moe 1962; Xu and Froment 1989, AIChE J. 35,
  88; Gillespie and Beattie 1930, Phys. Rev. 36, 743; Graaf et al. 1986, Chem.
  Eng. Sci. 41, 2883).  Their printed forms were quoted by the issue author
  from memory, not read from the papers; tests/test_correlations.py holds
  them, with the investigation behind each tolerance, and is reused here so
  the two files cannot drift apart;
- NIST-JANAF Thermochemical Tables (Chase 1998, 4th ed., J. Phys. Chem. Ref.
  Data Monograph 9), log Kf columns, through the ``janaf`` package;
- Cantera 3.2 (Goodwin et al. 2025) evaluating the same NASA-7 data, to build
  gases at a known K independently of gibbsmin's own evaluation;
- NIST SP 811 (2008), Appendix B: 1 atm = 101325 Pa exactly, 1 bar = 1e5 Pa.
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np
import pytest

import gibbsmin
from gibbsmin.equilibrium import GasModelState
from cantera_reference import cantera_species
from gibbsmin.errors import InputError, TemperatureRangeError, UnknownSpeciesError
from gibbsmin.reactions import (
    NAMED_REACTIONS,
    approach_table,
    approach_temperatures,
    independent_reactions,
    parse_reaction,
    quotients,
    reaction,
    steam_reforming,
)
from gibbsmin.streams import Stream
from gibbsmin.thermo import data_set
from test_correlations import AMMONIA, CORRELATIONS, METHANOL, REFORMING, REVERSE_SHIFT, SHIFT

DB = gibbsmin.default_database()
#: The NASA polynomials as published, named where a check uses tolerances measured on them.
NASA = data_set("nasa-1993")
R_GAS = 8.31446261815324  # J/(mol K), exact (2019 SI)
LN10 = math.log(10.0)


# --- K(T) against the published correlations ------------------------------------------------------------

# The correlation's reaction (as written in test_correlations.py) -> our named reaction and the factor
# that turns our ln K into theirs (our ammonia synthesis is N2 + 3 H2 = 2 NH3, theirs per mol NH3).
OURS = {
    id(SHIFT): ("water-gas shift", 1.0),
    id(REFORMING): ("steam methane reforming", 1.0),
    id(AMMONIA): ("ammonia synthesis", 0.5),
    id(METHANOL): ("methanol synthesis", 1.0),
    id(REVERSE_SHIFT): ("reverse water-gas shift", 1.0),
}


@pytest.mark.parametrize("correlation_name", list(CORRELATIONS))
def test_named_reaction_K_matches_published_correlation(correlation_name):
    # Tolerances and ranges: those of tests/test_correlations.py, where each is explained.
    stoichiometry, correlation, (T_lo, T_hi), tolerance = CORRELATIONS[correlation_name]
    name, factor = OURS[id(stoichiometry)]
    T = np.arange(T_lo, T_hi + 1e-9, 10.0)
    deviation = factor * reaction(name, db=NASA).ln_K(T) - correlation(T)
    print(f"{correlation_name}: worst ln K difference {deviation[np.argmax(np.abs(deviation))]:+.4f}")
    assert np.max(np.abs(deviation)) <= tolerance


def test_ammonia_K_in_atm_matches_gillespie_beattie_as_printed():
    # Gillespie and Beattie (1930), in its atm-based printed form (quoted from memory):
    # log10 Ka = -2.691122 log10 T - 5.519265e-5 T + 1.848863e-7 T^2 + 2001.6/T + 2.6899,
    # for 1/2 N2 + 3/2 H2 = NH3, Ka in atm^-1.  Here the unit conversion is ours
    # (K(T, "atm")), so this checks it too.  Tolerance 0.12 in ln Ka, as in
    # tests/test_correlations.py (measured there +0.066 to +0.105 over 573-773 K).
    T = np.arange(573.0, 774.0, 10.0)
    log10_Ka = -2.691122 * np.log10(T) - 5.519265e-5 * T + 1.848863e-7 * T**2 + 2001.6 / T + 2.6899
    ours = parse_reaction("0.5 N2 + 1.5 H2 = NH3").K(T, "atm")
    assert np.max(np.abs(np.log(ours) - LN10 * log10_Ka)) <= 0.12


def test_K_unit_conversion_follows_the_definition_of_the_atmosphere():
    # NIST SP 811, Appendix B: 1 atm = 101325 Pa, 1 bar = 1e5 Pa, so
    # K_atm = K_bar (1e5/101325)^dn; SMR has dn = +2.
    smr = reaction("steam methane reforming")
    assert smr.delta_n_gas == 2.0 and smr.K_unit == "bar^2"
    assert smr.K(1000.0, "atm") == pytest.approx(smr.K(1000.0) * (1e5 / 101325.0) ** 2, rel=1e-13)
    assert smr.K(1000.0, "MPa") == pytest.approx(smr.K(1000.0) * 0.1**2, rel=1e-13)
    assert reaction("shift").K_unit == "-"
    assert reaction("ammonia synthesis").K_unit == "bar^-2"
    with pytest.raises(InputError, match="absolute pressure unit"):
        smr.K(1000.0, "bar(g)")


# NIST-JANAF log Kf of the species, by our name -> (formula, phase) in the janaf index; elements in their
# reference states have log Kf = 0 by definition.
JANAF_KEYS = {"H2O": ("H2O", "g"), "CO": ("CO", "g"), "CO2": ("CO2", "g"), "CH4": ("CH4", "g"), "NH3": ("H3N", "g")}
# Tolerance on log10 K: the sum over species of |nu| times the per-species agreement of delta-f G
# between our NASA data and JANAF established in tests/test_formation_vs_janaf.py (H2O, CO, CO2
# 100 J/mol; CH4 350 J/mol; NH3 200 J/mol), over RT ln 10, plus JANAF's printed rounding of log Kf
# (0.0005 per species).  Measured: shift 0.0017, reforming 0.020 (the CH4 data), ammonia 0.0024.
JANAF_G_AGREEMENT = {"H2O": 100.0, "CO": 100.0, "CO2": 100.0, "CH4": 350.0, "NH3": 200.0}


@pytest.mark.parametrize("name", ["water-gas shift", "steam methane reforming", "ammonia synthesis"])
@pytest.mark.parametrize("T", [600.0, 800.0, 1000.0])
def test_K_matches_janaf_log_Kf(name, T):
    janaf = pytest.importorskip("janaf")
    rx = reaction(name, db=NASA)
    expected, tolerance = 0.0, 0.0
    for species, nu in rx.stoichiometry.items():
        if species not in JANAF_KEYS:
            continue  # H2, N2: reference states
        formula, phase = JANAF_KEYS[species]
        table = janaf.search(formula=f"^{formula}$", phase=f"^{phase}$").df
        expected += nu * table.filter(table["T(K)"] == T)["log Kf"].to_numpy()[0]
        tolerance += abs(nu) * (JANAF_G_AGREEMENT[species] / (R_GAS * T * LN10) + 0.0005)
    assert abs(math.log10(rx.K(T)) - expected) <= tolerance


def test_K_outside_the_data_range_is_refused():
    with pytest.raises(TemperatureRangeError, match="outside the data range"):
        reaction("shift").K(150.0)


# --- reading equations ---------------------------------------------------------------------------------


@pytest.mark.parametrize("text", ["CH4 + H2O = CO + 3 H2", "CH4+H2O=CO+3H2", "methane + steam -> CO + 3*H2",
                                  "CH4 + H2O <=> CO + 3 hydrogen"])
def test_equations_are_read_in_the_usual_spellings(text):
    rx = parse_reaction(text)
    assert rx.stoichiometry == {"CH4": -1.0, "H2O": -1.0, "CO": 1.0, "H2": 3.0}
    assert rx.equation == "CH4 + H2O = CO + 3 H2"


def test_fractional_coefficients_and_condensed_species():
    rx = parse_reaction("CO + 1/2 O2 = CO2")
    assert rx.stoichiometry == {"CO": -1.0, "O2": -0.5, "CO2": 1.0}
    boudouard = parse_reaction("2 CO = C(s) + CO2")
    assert boudouard.delta_n_gas == -1.0  # graphite is not a gas


def test_unbalanced_equation_names_the_elements():
    with pytest.raises(InputError, match=r"does not balance: H 6 on the left, 4 on the right"):
        parse_reaction("CH4 + H2O = CO + 2 H2")


def test_unknown_species_in_an_equation_is_named_with_a_suggestion():
    with pytest.raises(UnknownSpeciesError, match=r"unknown species 'methan'; did you mean methane.*in reaction"):
        parse_reaction("methan + H2O = CO + 3 H2")


@pytest.mark.parametrize("text, message", [
    ("CH4 + H2O", "exactly one '='"),
    ("CH4 = CO = H2", "exactly one '='"),
    ("CH4 + = C(s) + 2 H2", "empty term"),
    ("CO + 0 H2 = CO", "zero coefficient"),
    ("CO + H2 = H2 + CO", "changes nothing"),
])
def test_malformed_equations_get_clear_errors(text, message):
    with pytest.raises(InputError, match=message):
        parse_reaction(text)


# --- named reactions and independent sets --------------------------------------------------------------


def test_every_named_reaction_balances_and_reads_back():
    for name, equation in NAMED_REACTIONS.items():
        rx = reaction(name)
        assert rx.name == name
        assert parse_reaction(rx.equation).stoichiometry == rx.stoichiometry, equation


@pytest.mark.parametrize("alias, name", [("SMR", "steam methane reforming"), ("steam reforming", "steam methane reforming"),
                                         ("Shift", "water-gas shift"), ("water gas shift", "water-gas shift"),
                                         ("boudouard reaction", "Boudouard"), ("methane decomposition", "methane cracking")])
def test_trade_words_reach_the_named_reactions(alias, name):
    assert reaction(alias).name == name


def test_unknown_reaction_name_suggests_the_close_ones():
    with pytest.raises(InputError, match="did you mean 'water-gas shift'"):
        reaction("water-gas shfit")


def test_steam_reforming_of_a_higher_hydrocarbon():
    # CnHm + n H2O = n CO + (n + m/2) H2: propane gives 3 CO + 7 H2.
    rx = reaction("steam reforming of propane")
    assert rx.stoichiometry == {"C3H8": -1.0, "H2O": -3.0, "CO": 3.0, "H2": 7.0}
    with pytest.raises(InputError, match="needs a hydrocarbon"):
        steam_reforming("CH3OH")


@pytest.mark.parametrize("species, expected", [
    (["CH4", "H2O", "CO", "CO2", "H2"], ["steam methane reforming", "water-gas shift"]),
    (["CH4", "H2O", "CO", "CO2", "H2", "C(s)"], ["steam methane reforming", "water-gas shift", "Boudouard"]),
    (["N2", "H2", "NH3", "Ar"], ["ammonia synthesis"]),
    (["CO", "CO2", "H2", "H2O", "CH3OH"], ["water-gas shift", "methanol synthesis"]),
    (["CH4", "C2H6", "H2O", "CO", "CO2", "H2"], ["steam methane reforming", "water-gas shift",
                                                 "steam reforming of C2H6"]),
])
def test_independent_sets_prefer_the_named_reactions(species, expected):
    # The count is S - rank(A) (linear algebra: a basis of the null space of the element matrix).
    reactions = independent_reactions(species)
    assert [r.name for r in reactions] == expected
    A = np.array([[DB[s].elements.get(el, 0.0) for s in species] for el in ("C", "H", "O", "N", "Ar")])
    N = np.array([r.vector(species) for r in reactions])
    assert len(reactions) == len(species) - np.linalg.matrix_rank(A)
    assert np.all(np.abs(A @ N.T) < 1e-12)
    assert np.linalg.matrix_rank(N) == len(reactions)


def test_independent_set_of_a_large_species_set_is_complete():
    system = gibbsmin.fixed_step.prepare({"CH4": 1.0, "H2O": 2.0, "N2": 0.1}, T_span=(1000.0, 1000.0)).system
    reactions = independent_reactions(system)
    N = np.array([r.vector(system.names) for r in reactions])
    assert len(reactions) == len(system.names) - np.linalg.matrix_rank(system.A)
    assert np.linalg.matrix_rank(N) == len(reactions)
    assert np.all(np.abs(system.A @ N.T) < 1e-9)


def test_dependent_included_reactions_are_refused():
    with pytest.raises(InputError, match="combination of"):
        independent_reactions(["CH4", "H2O", "CO", "CO2", "H2"], include=["SMR", "methanation"])


# --- quotients and approach temperatures ---------------------------------------------------------------

T_OUT = 1123.15  # K, an invented reformer outlet at 850 degC
P_OUT = 29.0e5   # Pa


def _cantera_ln_K(stoichiometry, T):
    """ln K (bar^dn) from Cantera's evaluation of the NASA data: independent of gibbsmin's evaluation."""
    g_RT = {s: (cantera_species(s).thermo.h(T) - T * cantera_species(s).thermo.s(T)) / (8314.46261815324 * T)
            for s in stoichiometry}
    return -sum(nu * g_RT[s] for s, nu in stoichiometry.items())


def _gas_at_known_approach(smr_approach, shift_approach):
    """Mole fractions whose SMR quotient is K_SMR(T - a1) and shift quotient K_WGS(T + a2), N2 to 100 %."""
    K_smr = math.exp(_cantera_ln_K({"CH4": -1, "H2O": -1, "CO": 1, "H2": 3}, T_OUT - smr_approach))
    K_wgs = math.exp(_cantera_ln_K({"CO": -1, "H2O": -1, "CO2": 1, "H2": 1}, T_OUT + shift_approach))
    y = {"H2": 0.46, "H2O": 0.33, "CO2": 0.055}
    y["CO"] = y["CO2"] * y["H2"] / (y["H2O"] * K_wgs)
    y["CH4"] = y["CO"] * y["H2"] ** 3 * (P_OUT / 1e5) ** 2 / (y["H2O"] * K_smr)
    y["N2"] = 1.0 - sum(y.values())
    assert y["N2"] > 0
    return y


def test_approach_of_a_gas_built_at_known_K_is_recovered():
    # Reforming (endothermic) 12.5 K short: equilibrium at T - 12.5 K.  Shift (exothermic) 7.25 K short:
    # equilibrium at T + 7.25 K.  Required: recovered to 0.01 K.
    y = _gas_at_known_approach(12.5, 7.25)
    result = approach_temperatures(y, T_OUT, P_OUT, reactions=["SMR", "water-gas shift"])
    smr, wgs = result["steam methane reforming"], result["water-gas shift"]
    print(f"approach recovery error: SMR {smr.approach_K - 12.5:+.2e} K, shift {wgs.approach_K - 7.25:+.2e} K")
    assert smr.approach_K == pytest.approx(12.5, abs=0.01)
    assert smr.T_eq == pytest.approx(T_OUT - 12.5, abs=0.01)
    assert wgs.approach_K == pytest.approx(7.25, abs=0.01)
    assert wgs.T_eq == pytest.approx(T_OUT + 7.25, abs=0.01)


def test_approach_beyond_equilibrium_is_negative_and_reversal_flips_it():
    y = _gas_at_known_approach(-4.0, 3.0)
    result = approach_temperatures(y, T_OUT, P_OUT, reactions=["SMR", "methanation"])
    assert result["steam methane reforming"].approach_K == pytest.approx(-4.0, abs=0.01)
    # Methanation is reforming reversed: 4 K beyond reforming equilibrium is 4 K short of methanation's.
    assert result["methanation"].approach_K == pytest.approx(4.0, abs=0.01)
    assert result["methanation"].T_eq == pytest.approx(result["steam methane reforming"].T_eq, abs=1e-6)


def test_approach_from_a_dry_analysis_stream_in_trade_units():
    # The same gas as a dry analysis plus a water content, in kmol/h, degC and bar(g).
    y = _gas_at_known_approach(12.5, 7.25)
    dry = {s: 100 * v / (1 - y["H2O"]) for s, v in y.items() if s != "H2O"}
    stream = Stream.from_composition(dry, "1500 kmol/h", dry_basis=True, water=100 * y["H2O"], unit="mol%",
                                     T=f"{T_OUT - 273.15} degC", P=f"{(P_OUT - 101325) / 1e5} bar(g)")
    result = approach_temperatures(stream, reactions=["SMR", "shift"])
    assert result["steam methane reforming"].approach_K == pytest.approx(12.5, abs=0.01)
    assert result["water-gas shift"].approach_K == pytest.approx(7.25, abs=0.01)


def test_quotients_are_partial_pressure_products_in_bar():
    # Hand arithmetic: Q_SMR = p_CO p_H2^3 / (p_CH4 p_H2O) with p in bar.
    y = {"CH4": 0.05, "H2O": 0.35, "CO": 0.08, "CO2": 0.05, "H2": 0.47}
    p = {s: v * 20.0 for s, v in y.items()}
    Q = quotients(y, 900.0, 20e5, reactions=["SMR", "shift"])
    assert Q["steam methane reforming"] == pytest.approx(p["CO"] * p["H2"] ** 3 / (p["CH4"] * p["H2O"]), rel=1e-13)
    assert Q["water-gas shift"] == pytest.approx(p["CO2"] * p["H2"] / (p["CO"] * p["H2O"]), rel=1e-13)


def test_quotients_use_fugacities_when_given_ln_phi():
    # Q with fugacity coefficients = Q_ideal * prod phi^nu (definition of fugacity, f = phi y P).
    y = {"CH4": 0.05, "H2O": 0.35, "CO": 0.08, "CO2": 0.05, "H2": 0.47}
    ln_phi = {"CH4": -0.02, "H2O": -0.09, "CO": 0.01, "H2": 0.015}
    ideal = quotients(y, 900.0, 20e5, reactions=["SMR"])["steam methane reforming"]
    real = quotients(y, 900.0, 20e5, reactions=["SMR"], ln_phi=ln_phi)["steam methane reforming"]
    assert real == pytest.approx(ideal * math.exp(0.01 + 3 * 0.015 + 0.02 + 0.09), rel=1e-13)


def test_non_ideal_equilibrium_quotients_use_its_fugacity_coefficients():
    # A non-ideal answer carries phi in its gas model's state (Equilibrium.gas); Q = Q_ideal prod phi^nu.
    eq = gibbsmin.equilibrate({"CH4": 1.0, "H2O": 3.0}, 1000.0, 20e5, species=["CH4", "H2O", "CO", "CO2", "H2"])
    phi = {"CH4": 0.98, "H2O": 0.91, "CO": 1.01, "CO2": 0.97, "H2": 1.015}
    state = GasModelState(fugacity_coefficients=phi, compressibility_factor=1.0, residual_enthalpy_J=0.0,
                          residual_entropy_J_per_K=0.0, iterations=1, ln_phi_change=0.0, note="",
                          binary_interactions={})
    real = dataclasses.replace(eq, gas_model="peng-robinson", gas=state)
    ideal_Q = quotients(eq, reactions=["SMR"])["steam methane reforming"]
    real_Q = quotients(real, reactions=["SMR"])["steam methane reforming"]
    assert real_Q == pytest.approx(ideal_Q * phi["CO"] * phi["H2"] ** 3 / (phi["CH4"] * phi["H2O"]), rel=1e-13)
    without = dataclasses.replace(eq, gas_model="peng-robinson")
    with pytest.raises(InputError, match="pass ln_phi"):
        approach_temperatures(without)


def test_equilibrium_answer_has_zero_approach_in_every_reaction():
    eq = gibbsmin.equilibrate({"CH4": 1.0, "H2O": 3.0, "N2": 0.05}, 1050.0, 25e5)
    result = approach_temperatures(eq)
    assert {"steam methane reforming", "water-gas shift", "ammonia synthesis"} <= set(result)
    for name, a in result.items():
        assert abs(a.approach_K) < 1e-6, name


def test_absent_species_give_no_temperature_and_say_why():
    y = {"CH4": 0.05, "H2O": 0.35, "CO2": 0.05, "H2": 0.55}
    a = approach_temperatures(y, 900.0, 20e5, reactions=["SMR"])["steam methane reforming"]
    assert math.isnan(a.T_eq) and a.Q == 0.0 and "CO absent" in a.note
    assert "-" in approach_table({"steam methane reforming": a})


def test_far_from_equilibrium_beyond_the_data_says_so():
    # Almost no CO2 against much CO: the shift's K would have to be tiny, far above 6000 K.
    y = {"CO": 0.5, "H2O": 0.5, "CO2": 1e-30, "H2": 1e-30}
    a = approach_temperatures(y, 600.0, 1e5, reactions=["shift"])["water-gas shift"]
    assert math.isnan(a.T_eq) and "data range" in a.note


def test_mapping_without_conditions_and_mismatched_conditions_are_refused():
    with pytest.raises(InputError, match="needs T and P"):
        approach_temperatures({"CH4": 1.0, "H2": 1.0})
    eq = gibbsmin.equilibrate({"CH4": 1.0, "H2O": 3.0}, 1000.0, 20e5, species=["CH4", "H2O", "CO", "CO2", "H2"])
    with pytest.raises(InputError, match="differs from"):
        approach_temperatures(eq, T=1010.0)
    with pytest.raises(InputError, match="finite number"):
        approach_temperatures({"CH4": -1.0, "H2": 1.0}, 900.0, 1e5)
