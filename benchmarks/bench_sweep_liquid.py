"""Sweep throughput with liquid-solution phases against the same sweep without them, one run.

    python benchmarks/bench_sweep_liquid.py [--repeat N]

An invented methanol loop gas (every species held: the separator flash) on a P x T grid of 8 pressures from 50 to
100 bar and 25 temperatures from 290 to 460 K (its dew point lies near 437 K at 79 bar), Peng-Robinson:
``solve_points`` with ``liquid=True`` (every point the tangent-plane test finds unstable is split into gas and
liquid) and with ``liquid=False`` (one gas everywhere). Points per second, best of the repeats; run it against
another checkout (PYTHONPATH) in the same session to compare code, the machine's load moves the figures.
"""

from __future__ import annotations

import argparse
import sys
import time
import warnings

import numpy as np

from gibbsmin.sweep import Axis, SweepSpec, solve_points

LOOP = {"H2": 60.0, "CO": 5.0, "CO2": 4.0, "CH4": 8.0, "N2": 3.0, "CH3OH": 12.0, "H2O": 8.0}


def spec(liquid: bool) -> SweepSpec:
    axes = (Axis("P", tuple(np.linspace(50e5, 100e5, 8))), Axis("T", tuple(np.linspace(290.0, 460.0, 25))))
    return SweepSpec(feed=LOOP, T=313.15, P=79e5, axes=axes,
                     species=tuple(LOOP), inert=tuple(LOOP), gas="peng-robinson", liquid=liquid)


def rate(liquid: bool, repeat: int) -> tuple[float, int]:
    sweep = spec(liquid)
    table = solve_points(sweep, 0, sweep.n_points)  # warm-up: kernels compiled, caches filled
    best = np.inf
    for _ in range(repeat):
        t0 = time.perf_counter()
        table = solve_points(sweep, 0, sweep.n_points)
        best = min(best, time.perf_counter() - t0)
    if not table["certified"].all():
        raise SystemExit("a point is not certified")
    split = int((table["liquid_fraction"] > 0.0).sum()) if liquid else 0
    return sweep.n_points / best, split


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=3)
    args = parser.parse_args()
    warnings.simplefilter("ignore", RuntimeWarning)
    with_liquid, split = rate(True, args.repeat)
    one_gas, _ = rate(False, args.repeat)
    print(f"{spec(True).n_points} points, {split} with a liquid: {with_liquid:,.0f} points/s with liquids, "
          f"{one_gas:,.0f} without ({one_gas / with_liquid:.1f} times)")
    return 0


if __name__ == "__main__":
    sys.exit(main())
