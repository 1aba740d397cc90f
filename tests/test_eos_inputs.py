"""Bad input to the gas models: each raises InputError with a message that names the problem and the fix."""

from __future__ import annotations

import math

import numpy as np
import pytest

from gibbsmin import InputError, UnknownSpeciesError
from gibbsmin.eos import PENG_ROBINSON, CubicModel, gas_model, gas_model_for_species

SPECIES = ("H2", "N2", "NH3")
Y = np.array([0.7, 0.2, 0.1])


@pytest.fixture(scope="module", params=["ideal", "peng-robinson", "srk"])
def model(request):
    return gas_model_for_species(request.param, SPECIES)


def test_mole_fractions_not_summing_to_one(model):
    with pytest.raises(InputError, match=r"mole fractions sum to 0\.95, not 1 .*normalise y"):
        model.properties(700.0, 200e5, [0.7, 0.2, 0.05])


def test_mole_fractions_within_tolerance_are_renormalised(model):
    # A sum off by 1e-9 is accepted (solver round-off) and gives the normalised answer.
    slightly_off = Y * (1 + 1e-9)
    np.testing.assert_allclose(
        model.ln_phi(700.0, 200e5, slightly_off), model.ln_phi(700.0, 200e5, Y), rtol=0, atol=1e-14
    )


def test_negative_mole_fraction(model):
    with pytest.raises(InputError, match=r"negative mole fraction \(-0\.1\).*>= 0"):
        model.properties(700.0, 200e5, [0.9, 0.2, -0.1])


def test_nan_mole_fraction(model):
    with pytest.raises(InputError, match="NaN or infinite"):
        model.properties(700.0, 200e5, [0.7, math.nan, 0.1])


def test_wrong_number_of_mole_fractions(model):
    expected = r"y has shape \(2,\) but the model expects \(3,\).*one mole fraction per species"
    with pytest.raises(InputError, match=expected):
        model.properties(700.0, 200e5, [0.5, 0.5])


@pytest.mark.parametrize("T", [0.0, -300.0, math.nan, math.inf])
def test_temperature_not_positive(model, T):
    with pytest.raises(InputError, match=r"T must be finite and positive in \[K\]"):
        model.properties(T, 200e5, Y)


@pytest.mark.parametrize("P", [0.0, -1e5, math.nan])
def test_pressure_not_positive(model, P):
    with pytest.raises(InputError, match=r"P must be finite and positive in \[Pa\]"):
        model.properties(700.0, P, Y)


def test_bad_entry_in_a_batch(model):
    with pytest.raises(InputError, match=r"T must be finite and positive in \[K\], got T = -1\.0"):
        model.properties(np.array([600.0, -1.0]), 200e5, Y)


def test_batch_lengths_that_do_not_match(model):
    with pytest.raises(InputError, match="different numbers of conditions"):
        model.properties(np.array([600.0, 700.0, 800.0]), np.array([1e7, 2e7]), Y)


def test_missing_critical_constants_named_by_species():
    with pytest.raises(InputError, match=r"critical constants of species 'NH3' are missing .*Tc = nan K.*ideal gas"):
        gas_model("peng-robinson", [33.2, 126.2, None], [13e5, 34e5, 113e5], [-0.22, 0.04, 0.25],
                  names=["H2x", "N2", "NH3"])


def test_non_positive_critical_pressure():
    with pytest.raises(InputError, match=r"species number 1 .*Pc = 0 Pa.*Pc > 0 \[Pa\]"):
        CubicModel(PENG_ROBINSON, [190.6, 304.2], [46e5, 0.0], [0.01, 0.22])


def test_cubic_model_needs_critical_constants():
    with pytest.raises(InputError, match=r"the srk model needs critical constants: give Pc, omega"):
        gas_model("srk", Tc=[190.6])


def test_species_without_critical_constants_in_database():
    expected = r"no critical constants for OH in the species database.*\[species\.critical\]"
    with pytest.raises(InputError, match=expected):
        gas_model_for_species("peng-robinson", ["H2", "OH"])


def test_unknown_species():
    with pytest.raises(UnknownSpeciesError, match="unknown species 'H3'"):
        gas_model_for_species("peng-robinson", ["H3"])


def test_unknown_model_name_suggests_close_names():
    expected = (
        r"unknown gas model 'peng-robinsen': choose one of ideal, peng-robinson, srk; "
        r"did you mean 'peng-robinson'"
    )
    with pytest.raises(InputError, match=expected):
        gas_model("peng-robinsen", [190.6], [46e5], [0.01])


def test_asymmetric_kij():
    with pytest.raises(InputError, match="kij must be symmetric with a zero diagonal"):
        gas_model("pr", [190.6, 304.2], [46e5, 73.8e5], [0.01, 0.22], kij=[[0.0, 0.1], [0.0, 0.0]])


def test_kij_of_wrong_shape():
    with pytest.raises(InputError, match=r"kij must be a finite 2 x 2 matrix, got shape \(3, 3\)"):
        gas_model("pr", [190.6, 304.2], [46e5, 73.8e5], [0.01, 0.22], kij=np.zeros((3, 3)))


def test_unknown_quantum_gas():
    expected = r"quantum entry 'Ne' of species 0 is not a known quantum gas; use one of \['H2', 'He'\]"
    with pytest.raises(InputError, match=expected):
        gas_model("pr", [44.4], [27.6e5], [-0.03], quantum=["Ne"])


def test_critical_constant_arrays_of_unequal_length():
    with pytest.raises(InputError, match=r"Pc must be a 1-D array with 2 entries"):
        gas_model("pr", [190.6, 304.2], [46e5], [0.01, 0.22])


def test_quantum_flag_without_a_name():
    with pytest.raises(InputError, match=r"quantum entry True of species 0 \(None\) does not say which gas it is"):
        gas_model("pr", [33.2], [13e5], [-0.22], quantum=[True])
