"""Is the cubic's gas stable as one phase?  The tangent-plane test against thermo's flash.

Reference: thermo (Bell and contributors, Python package), class PR78MIX
(Peng-Robinson with the 1978 kappa, as ours) with its vapour-liquid flash
FlashVL, and the pure-fluid vapour pressure of its PR class; both given our
Tc, Pc and omega, kij = 0 and no quantum correction, as ours here.
"""

from __future__ import annotations

import warnings

import numpy as np
import pytest
from thermo import PR, PR78MIX, CEOSGas, CEOSLiquid, ChemicalConstantsPackage, FlashVL

import gibbsmin
from gibbsmin.eos import gas_model_for_species
from gibbsmin.eos.stability import tangent_plane_test

# chemicals' data reader uses a pandas option pandas 3 deprecates; not ours to fix.
pytestmark = pytest.mark.filterwarnings("ignore:The 'float_precision' argument is deprecated")

DB = gibbsmin.default_database()
METHANOL_LOOP = ["H2", "CO", "CO2", "CH4", "H2O", "CH3OH"]
LOOP_GAS = [0.66, 0.09, 0.06, 0.16, 0.005, 0.025]  # an invented methanol loop gas
P_LOOP = 80e5


def _critical(names):
    return ([DB[n].critical.Tc for n in names], [DB[n].critical.Pc for n in names],
            [DB[n].critical.omega for n in names])


@pytest.fixture(scope="module")
def thermo_dew_point():
    """thermo's PR78 dew point of the loop gas at 80 bar: (T [K], incipient liquid mole fractions)."""
    Tc, Pc, omega = _critical(METHANOL_LOOP)
    cas = [DB[n].critical.CAS for n in METHANOL_LOOP]
    found, properties = ChemicalConstantsPackage.from_IDs(cas)
    constants = ChemicalConstantsPackage(Tcs=Tc, Pcs=Pc, omegas=omega, MWs=found.MWs, CASs=cas)
    given = {"Tcs": Tc, "Pcs": Pc, "omegas": omega}
    flash = FlashVL(constants, properties,
                    liquid=CEOSLiquid(PR78MIX, given, HeatCapacityGases=properties.HeatCapacityGases),
                    gas=CEOSGas(PR78MIX, given, HeatCapacityGases=properties.HeatCapacityGases))
    dew = flash.flash(P=P_LOOP, VF=1.0, zs=LOOP_GAS)
    return dew.T, np.array(dew.liquids[0].zs)


def _loop_model():
    return gas_model_for_species("peng-robinson", METHANOL_LOOP, quantum_correction=False, kij="none")


def test_the_verdict_flips_at_thermos_dew_point(thermo_dew_point):
    # Source: thermo PR78MIX + FlashVL dew point (about 349.8 K here); ours flips within 0.1 K of it.
    T_dew, liquid = thermo_dew_point
    model = _loop_model()
    assert tangent_plane_test(model, T_dew + 0.1, P_LOOP, LOOP_GAS).stable
    below = tangent_plane_test(model, T_dew - 0.1, P_LOOP, LOOP_GAS)
    assert not below.stable and below.distance < 0.0
    # Just below the dew point the phase that would form is the incipient liquid of the flash.
    np.testing.assert_allclose(below.trial, liquid, atol=5e-3)


def test_a_pure_fluid_is_unstable_as_gas_above_its_vapour_pressure():
    # Source: thermo PR vapour pressure of CO2 at 280 K on our constants (about 41.5 bar).
    c = DB["CO2"].critical
    P_sat = PR(Tc=c.Tc, Pc=c.Pc, omega=c.omega, T=280.0, P=40e5).Psat(280.0)
    model = gas_model_for_species("peng-robinson", ["CO2"])
    assert tangent_plane_test(model, 280.0, 0.98 * P_sat, [1.0]).stable
    assert not tangent_plane_test(model, 280.0, 1.02 * P_sat, [1.0]).stable


def test_equilibrate_warns_when_its_one_gas_would_condense():
    feed = dict(zip(METHANOL_LOOP, [66.0, 9.0, 6.0, 16.0, 0.5, 2.5]))
    hot = gibbsmin.equilibrate(feed, 523.15, P_LOOP, species=METHANOL_LOOP, gas="peng-robinson")
    assert hot.extras["gas_phase_stability"]["tested"] and hot.extras["gas_phase_stability"]["stable"]
    with pytest.warns(RuntimeWarning, match="NOT stable as one gas"):
        cold = gibbsmin.equilibrate(feed, 313.15, P_LOOP, species=METHANOL_LOOP, gas="peng-robinson", liquid=False)
    assert cold.extras["gas_phase_stability"]["stable"] is False
    would_form = cold.extras["gas_phase_stability"]["would_form"]
    assert max(would_form, key=would_form.get) == "H2O"  # the answer at 40 degC has made water: it condenses


def test_a_condensate_the_answer_holds_is_no_alarm():
    feed = dict(zip(METHANOL_LOOP, [66.0, 9.0, 6.0, 16.0, 10.5, 2.5]))
    with warnings.catch_warnings():
        warnings.simplefilter("error", RuntimeWarning)
        eq = gibbsmin.equilibrate(feed, 313.15, P_LOOP, species=[*METHANOL_LOOP, "H2O(l)"], gas="peng-robinson",
                                  liquid=False)
    assert eq.amounts["H2O(l)"] > 0.0
    assert "already holds" in eq.extras["gas_phase_stability"]["note"]


def test_hot_loop_gas_is_not_tested():
    eq = gibbsmin.equilibrate({"H2": 3.0, "N2": 1.0}, 723.15, 200e5, gas="peng-robinson")
    assert eq.extras["gas_phase_stability"]["tested"] is False
    assert "not tested" in eq.extras["gas_phase_stability"]["note"]


def test_a_held_back_reaction_with_a_cubic_is_checked_too():
    from gibbsmin import equilibrate_with_approach

    feed = dict(zip(METHANOL_LOOP, [66.0, 9.0, 6.0, 16.0, 0.5, 2.5]))
    with pytest.warns(RuntimeWarning, match="NOT stable as one gas"):
        eq = equilibrate_with_approach(feed, 313.15, P_LOOP, {"methanol synthesis": 5.0}, species=METHANOL_LOOP,
                                       gas="peng-robinson", liquid=False)
    assert eq.extras["gas_phase_stability"]["stable"] is False
