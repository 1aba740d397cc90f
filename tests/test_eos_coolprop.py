"""Pure-gas compressibility factors against reference equations of state.

Reference: CoolProp (Bell, Wronski, Quoilin and Lemort 2014, Ind. Eng. Chem. Res.
53, 2498), which evaluates the reference equations of state of each fluid:
N2 Span, Lemmon, Jacobsen, Wagner and Yokozeki (2000, J. Phys. Chem. Ref. Data
29, 1361); CH4 Setzmann and Wagner (1991, J. Phys. Chem. Ref. Data 20, 1061);
normal H2 Leachman, Jacobsen, Penoncello and Lemmon (2009, J. Phys. Chem. Ref.
Data 38, 721); CO2 Span and Wagner (1996, J. Phys. Chem. Ref. Data 25, 1509).
Their stated uncertainty in density is 0.1 % or better over this range, far
below the cubic's error, so they serve as the truth here.

Tolerance, and why.  A two-constant cubic is fitted to the critical point and
(through omega) to one vapour pressure, never to supercritical densities: it
is exact at zero density and its error grows with density.  For gases well
above their critical temperature (N2, CH4, H2 here: Tr >= 1.5) a few percent up
to the critical density is common practice (no source); we allow 5 %.  CO2 at
300 to 400 K and 100 to 300 bar is a dense near-critical fluid (up to twice the
critical density).  There a cubic's worst error is set by its universal
critical compressibility, PR 0.3074 and SRK 1/3 against CO2's 0.2746 (from the
reference EOS): 12 % and 21 %.  We allow that mismatch for CO2.
"""

from __future__ import annotations

import itertools

import CoolProp.CoolProp as CP
import numpy as np
import pytest

from gibbsmin.eos import gas_model_for_species

COOLPROP_NAMES = {"N2": "Nitrogen", "CH4": "Methane", "H2": "Hydrogen", "CO2": "CarbonDioxide"}
TEMPERATURES = (300.0, 350.0, 400.0, 500.0, 600.0, 700.0)  # K
PRESSURES = (50e5, 100e5, 200e5, 300e5)  # Pa
GRID = tuple(itertools.product(TEMPERATURES, PRESSURES))
CRITICAL_Z = {"peng-robinson": 0.30740, "srk": 1.0 / 3.0}  # Peng and Robinson 1976; Redlich and Kwong 1949


def _reference_Z(species: str) -> np.ndarray:
    fluid = COOLPROP_NAMES[species]
    return np.array([CP.PropsSI("Z", "T", T, "P", P, fluid) for T, P in GRID])


def _relative_errors(family: str, species: str, quantum_correction: bool = True) -> np.ndarray:
    model = gas_model_for_species(family, [species], quantum_correction=quantum_correction)
    T = np.array([t for t, _ in GRID])
    P = np.array([p for _, p in GRID])
    Z = model.properties(T, P, np.ones((len(GRID), 1))).Z
    return Z / _reference_Z(species) - 1.0


def _tolerance(family: str, species: str) -> float:
    if species != "CO2":
        return 0.05
    fluid = COOLPROP_NAMES["CO2"]
    Zc = CP.PropsSI("Z", "T", CP.PropsSI("Tcrit", fluid), "Dmolar", CP.PropsSI("rhomolar_critical", fluid), fluid)
    return CRITICAL_Z[family] / Zc - 1.0


@pytest.mark.parametrize("family", ["peng-robinson", "srk"])
@pytest.mark.parametrize("species", list(COOLPROP_NAMES))
def test_pure_gas_Z_within_cubic_accuracy(family: str, species: str):
    # Source: CoolProp reference equations of state (module docstring).
    errors = _relative_errors(family, species)
    worst = np.abs(errors).max()
    T, P = GRID[int(np.abs(errors).argmax())]
    assert worst < _tolerance(family, species), (
        f"{family} {species}: worst |Z/Z_ref - 1| = {worst:.2%} at {T:g} K, {P / 1e5:g} bar"
    )


def test_quantum_correction_improves_peng_robinson_for_hydrogen():
    # Source: CoolProp's normal-hydrogen EOS (Leachman et al. 2009).  With the
    # Gunn-Chueh-Prausnitz constants PR's Z of H2 is closer to the reference, in
    # both worst and mean error (measured: 4.5 % -> 2.3 % worst, 1.8 % -> 0.9 % mean).
    # SRK is not asserted: with the true constants it is already within 0.6 %,
    # and the correction moves it slightly the other way (about 0.5 % -> 0.7 %).
    corrected = np.abs(_relative_errors("peng-robinson", "H2", quantum_correction=True))
    plain = np.abs(_relative_errors("peng-robinson", "H2", quantum_correction=False))
    assert corrected.max() < 0.7 * plain.max()
    assert corrected.mean() < 0.7 * plain.mean()
    assert corrected.max() < 0.025
