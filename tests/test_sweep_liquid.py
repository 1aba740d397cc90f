"""Sweeps with liquid-solution phases (issue 13): every point the tangent-plane test finds unstable is flashed.

The points are checked against thermo's PR78 flash (Caleb Bell, thermo 0.6, gibbsmin's constants;
tests/flash_reference.py) and against single calls of the pipeline.
"""

from __future__ import annotations

import numpy as np
import pytest
from flash_reference import thermo_flash

import gibbsmin
from gibbsmin import InputError
from gibbsmin.sweep import Axis, SweepSpec, solve_points

#: An invented methanol loop gas.
LOOP = {"H2": 60.0, "CO": 5.0, "CO2": 4.0, "CH4": 8.0, "N2": 3.0, "CH3OH": 12.0, "H2O": 8.0}


def _spec(**options):
    return SweepSpec(feed=LOOP, T=313.15, P=79e5, axes=(Axis("T", (300.0, 330.0, 380.0, 460.0)),),
                     species=tuple(LOOP), inert=tuple(LOOP), gas="peng-robinson", **options)


def test_a_sweep_with_liquids_flashes_the_points_below_the_dew_point():
    table = solve_points(_spec(liquid=True), 0, 4)
    assert table["certified"].all()
    liquid = table["liquid_fraction"].to_numpy()
    assert liquid[0] > liquid[1] > liquid[2] > 0.0 and liquid[3] == 0.0   # the dew point is near 437 K
    assert np.isnan(table["x_CH3OH"].iloc[3]) and table["x_CH3OH"].iloc[0] > 0.5
    for i in range(3):
        T = float(table["T_K"].iloc[i])
        reference = thermo_flash(LOOP, T, 79e5)
        assert liquid[i] == pytest.approx(1.0 - reference.vapour_fraction, abs=1e-7)
        assert table["y_CH3OH"].iloc[i] == pytest.approx(reference.y["CH3OH"], rel=1e-6)
        single = gibbsmin.equilibrate(LOOP, T, 79e5, species=list(LOOP), inert=list(LOOP), gas="peng-robinson")
        # A sweep's split starts from its neighbour's phases, a single call from the one gas's stability test:
        # the same answer within the outer loop's tolerance on ln phi (1e-10; common practice, no source).
        assert table["x_H2O"].iloc[i] == pytest.approx(single.fluid_phases[1].mole_fractions["H2O"], rel=1e-9)


def test_a_sweep_without_liquids_keeps_its_columns():
    table = solve_points(_spec(), 0, 4)
    assert "liquid_fraction" not in table and not any(c.startswith("x_") for c in table)


@pytest.mark.parametrize(("options", "message"), [
    (dict(liquid=True, gas="ideal"), "need a cubic"),
    (dict(liquid=True, uncertainty=True), "uncertainty"),
])
def test_bad_liquid_sweeps_are_refused(options, message):
    base = dict(feed=LOOP, T=313.15, P=79e5, axes=(Axis("T", (300.0, 330.0)),), species=tuple(LOOP),
                gas="peng-robinson", data="atct-anchored")
    with pytest.raises(InputError, match=message):
        SweepSpec(**{**base, **options})


def test_the_liquid_choice_survives_the_sweeps_json():
    spec = _spec(liquid=True)
    assert SweepSpec.from_json(spec.to_json()).liquid is True
    assert SweepSpec.from_json(_spec().to_json()).liquid is False


def test_a_sweeps_two_phase_points_start_from_their_neighbours_split():
    """Each two-phase point after the first starts at its neighbour's phases and takes fewer phi passes than the
    same point started cold (measured 6.1 against 7.6 on average on the benchmark's grid; here the first two-phase
    point of the run is cold, the next ones seeded)."""
    table = solve_points(_spec(liquid=True), 0, 4)
    cold = [gibbsmin.equilibrate(LOOP, float(T), 79e5, species=list(LOOP), inert=list(LOOP), gas="peng-robinson")
            for T in table["T_K"].iloc[:3]]
    assert table["iterations"].iloc[0] == cold[0].certificate.iterations
    assert all(table["iterations"].iloc[i] < cold[i].certificate.iterations for i in (1, 2))
