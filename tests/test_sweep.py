"""Sweeps: batch = point by point, warm = cold, distributed = local, resume = uninterrupted.

These are consistency checks of the sweep machinery (no outside source needed:
each compares two ways of computing the same equilibria); the equilibria
themselves are checked against Cantera in test_equilibrium_vs_cantera.py.
"""

from __future__ import annotations

import os

import numpy as np
import pandas as pd
import pytest

import gibbsmin
from gibbsmin.fixed_step import build_problem, prepare
from gibbsmin.solve import certify, solve_newton
from gibbsmin.sweep import Axis, SweepSpec, axis_from_text, grid, run_sweep, solve_points

REFORMER = ("CH4", "H2O", "CO", "CO2", "H2", "N2", "C(s)")


def reformer_sweep(n_sc=6, n_T=7) -> SweepSpec:
    """An invented reformer feed over S/C and T at 30 bar, crossing the carbon boundary."""
    return SweepSpec(
        feed={"CH4": 1.0, "H2O": 3.0, "N2": 0.02}, T=1000.0, P=30e5,
        axes=(grid("S/C", np.linspace(0.6, 3.0, n_sc)), grid("T", np.linspace(750.0, 1250.0, n_T))),
        species=REFORMER,
    )


def test_batch_equals_point_by_point():
    spec = reformer_sweep()
    table = solve_points(spec, 0, spec.n_points)
    assert table["certified"].all()
    assert table["n_C(s)"].gt(0).any() and table["n_C(s)"].eq(0).any(), "the grid must cross the carbon boundary"
    for row in table.to_dict("records"):
        steam = row["S/C"] * 1.0  # hydrocarbon carbon of the feed: 1 mol CH4
        eq = gibbsmin.equilibrate({"CH4": 1.0, "H2O": steam, "N2": 0.02}, row["T_K"], row["P_Pa"], species=REFORMER)
        for name, y in eq.mole_fractions.items():
            assert row[f"y_{name}"] == pytest.approx(y, rel=1e-10, abs=1e-12)
        assert row["n_C(s)"] == pytest.approx(eq.amounts["C(s)"], abs=1e-12)


def test_warm_and_cold_starts_agree():
    setup = prepare({"CH4": 1.0, "H2O": 1.0, "N2": 0.02}, species=REFORMER, T_span=(750, 1250))
    T = np.linspace(750.0, 1250.0, 200)
    problem = build_problem(setup, T, np.full(T.size, 30e5))
    cold = solve_newton(problem)              # every point from its own start
    warm = solve_newton(problem, chains=1)    # each point from its neighbour
    assert certify(problem, cold).certified.all() and certify(problem, warm).certified.all()
    np.testing.assert_allclose(np.exp(warm.ln_n_gas), np.exp(cold.ln_n_gas), rtol=1e-10, atol=1e-13)
    np.testing.assert_allclose(warm.n_condensed, cold.n_condensed, rtol=1e-10, atol=1e-13)
    assert warm.iterations.sum() < 0.6 * cold.iterations.sum()


def test_no_point_is_dropped_and_each_is_certified_or_marked():
    spec = reformer_sweep(3, 4)
    table = run_sweep(spec, chunk_size=5)
    assert list(table["point"]) == list(range(spec.n_points))
    assert set(table["solver"]) <= {"newton", "convex+newton", "convex"}
    assert table["certified"].all()


def test_output_folder_and_resume_after_interruption(tmp_path):
    spec = reformer_sweep()
    whole = run_sweep(spec, tmp_path / "whole", chunk_size=6).frame()

    class Interrupted(Exception):
        pass

    def stop_after_two(chunks):
        for k, chunk in enumerate(chunks):
            if k == 2:
                raise Interrupted
            yield chunk

    partial = tmp_path / "partial"
    with pytest.raises(Interrupted):
        run_sweep(spec, partial, chunk_size=6, progress=stop_after_two)
    written = sorted(p.name for p in partial.glob("chunk-*.parquet"))
    assert len(written) == 2
    assert not [p for p in partial.iterdir() if p.name.startswith(".")], "no temporary file may be left behind"
    solved_again = []
    resumed = run_sweep(spec, partial, chunk_size=6, progress=lambda items: (solved_again.append(i) or i for i in items))
    assert len(solved_again) == resumed.chunks - 2
    pd.testing.assert_frame_equal(resumed.frame(), whole)


def test_a_folder_holding_another_sweep_is_refused(tmp_path):
    run_sweep(reformer_sweep(2, 2), tmp_path, chunk_size=2)
    with pytest.raises(gibbsmin.InputError, match="holds the results of a different sweep"):
        run_sweep(reformer_sweep(3, 2), tmp_path, chunk_size=2)


def test_local_processes_equal_this_process(tmp_path):
    spec = reformer_sweep()
    here = run_sweep(spec, chunk_size=10)
    there = run_sweep(spec, tmp_path, chunk_size=10, workers=2).frame()
    pd.testing.assert_frame_equal(here, there)


def test_dask_cluster_equals_local_and_survives_a_killed_worker(tmp_path):
    distributed = pytest.importorskip("dask.distributed")
    spec = reformer_sweep(12, 10)
    local = run_sweep(spec, chunk_size=4)
    with distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                                  dashboard_address=None) as cluster, distributed.Client(cluster) as client:
        calm = run_sweep(spec, tmp_path / "calm", chunk_size=4, scheduler=client).frame()
        pd.testing.assert_frame_equal(calm, local)

        killed = []

        def kill_one_worker_midway(finished):
            for k, item in enumerate(finished):
                if k == 3 and not killed:
                    victim = sorted(client.scheduler_info()["workers"])[0]
                    killed.append(victim)
                    try:
                        client.run(os._exit, 1, workers=[victim])
                    except Exception:  # the worker dies before it can answer
                        pass
                yield item

        rough = run_sweep(spec, tmp_path / "rough", chunk_size=4, scheduler=client,
                          progress=kill_one_worker_midway)
        assert killed
        table = rough.frame()
        assert list(table["point"]) == list(range(spec.n_points))
        pd.testing.assert_frame_equal(table, local)


@pytest.mark.parametrize("text, name, first, count, unit", [
    ("T=700:1000:25degC", "T", 973.15, 13, "degC"),
    ("P=20,30,40bar", "P", 20e5, 3, "bar"),
    ("P=25:35:5bar(g)", "P", 25e5 + 101325.0, 3, "bar(g)"),
    ("S/C=2:4:0.5", "S/C", 2.0, 5, ""),
    ("CO2=0:0.2:0.05", "CO2", 0.0, 5, ""),
])
def test_axis_text(text, name, first, count, unit):
    axis = axis_from_text(text)
    assert (axis.name, len(axis.values), axis.unit) == (name, count, unit)
    assert axis.values[0] == pytest.approx(first, rel=1e-12)


@pytest.mark.parametrize("text, words", [
    ("T", "write NAME=START:STOP:STEP"),
    ("T=700:600:25K", "the step must be non-zero"),
    ("T=1,x,3K", "cannot read the numbers"),
    ("S/C=1:3:1bar", "takes plain numbers"),
    ("T=100:200:50furlong", "furlong"),
])
def test_axis_text_errors(text, words):
    with pytest.raises(gibbsmin.InputError, match=words):
        axis_from_text(text)


def test_sweep_definition_errors():
    with pytest.raises(gibbsmin.InputError, match="at least one axis"):
        SweepSpec(feed={"CH4": 1.0}, T=900.0, P=1e5, axes=())
    with pytest.raises(gibbsmin.InputError, match="given twice"):
        SweepSpec(feed={"CH4": 1.0}, T=900.0, P=1e5, axes=(grid("T", [900.0]), grid("T", [1000.0])))
    with pytest.raises(gibbsmin.InputError, match="positive"):
        SweepSpec(feed={"CH4": 1.0}, T=900.0, P=1e5, axes=(grid("P", [0.0, 1e5]),))
    with pytest.raises(gibbsmin.InputError, match="no values"):
        Axis("T", ())


# --- a sweep with the Peng-Robinson gas ---------------------------------------------------------------

LOOP_FEED = {"H2": 64.5, "N2": 21.5, "NH3": 3.0, "CH4": 7.0, "Ar": 4.0}


def _loop_spec(**kwargs):
    return SweepSpec(feed=LOOP_FEED, T=723.15, P=200e5, species=tuple(LOOP_FEED), inert=("CH4", "Ar"),
                     axes=(grid("P", [100e5, 200e5, 300e5]), grid("T", [650.0, 700.0, 750.0, 800.0])), **kwargs)


def test_peng_robinson_sweep_equals_equilibrate_point_by_point():
    # Internal consistency (common practice, no source): the batched outer loop over phi gives every point
    # the answer of a single non-ideal solve, and certifies it with phi at its own composition.
    table = solve_points(_loop_spec(gas="peng-robinson"), 0, 12)
    assert table["certified"].all()
    for _, row in table.iterrows():
        eq = gibbsmin.equilibrate(LOOP_FEED, row["T_K"], row["P_Pa"], species=list(LOOP_FEED),
                                  inert=["CH4", "Ar"], gas="peng-robinson")
        assert row["y_NH3"] == pytest.approx(eq.mole_fractions["NH3"], rel=1e-8)
    ideal = solve_points(_loop_spec(), 0, 12)
    # At 300 bar and 650 K the cubic adds several mol% of ammonia: the model reached the sweep.
    assert (table["y_NH3"] - ideal["y_NH3"]).iloc[8] > 0.02


def test_ideal_sweep_keeps_its_fingerprint_and_a_cubic_changes_it():
    assert '"gas"' not in _loop_spec().to_json()
    assert _loop_spec(gas="pr").gas == "peng-robinson"
    assert _loop_spec(gas="pr").fingerprint() != _loop_spec().fingerprint()
    assert _loop_spec(gas="pr", kij="none").fingerprint() != _loop_spec(gas="pr").fingerprint()
    assert SweepSpec.from_json(_loop_spec(gas="srk").to_json()).gas == "srk"
    with pytest.raises(gibbsmin.InputError, match="unknown gas model"):
        _loop_spec(gas="virial")
    with pytest.raises(gibbsmin.InputError, match="'shipped' or 'none'"):
        _loop_spec(gas="pr", kij="fitted")
