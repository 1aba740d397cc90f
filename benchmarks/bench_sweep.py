"""Sweep throughput, scaling and memory, with ratios against Cantera measured in the same run.

    python benchmarks/bench_sweep.py [--points 10000] [--million]

1. Throughput on a T x S/C grid at 30 bar (an invented reformer feed, 9 gas
   species), graphite allowed: gibbsmin's batch sweep against a loop over
   Cantera's multiphase VCS solver on the same species and data (Cantera
   timed on a sample of the grid, reported per point).  Target: 10 times
   Cantera's points per second.
2. The same grid gas-only against Cantera's default gas solver.  Target: 5 times.
3. Scaling: points per second with 1 and 2 threads, and with 2 local worker processes.
4. With --million: a 1,000,000-point sweep streamed to Parquet; peak memory
   of this process and its workers (target: under 1 GiB).
"""

from __future__ import annotations

import argparse
import resource
import sys
import tempfile
import time
from pathlib import Path

import cantera as ct
import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent.parent / "tests"))

from cantera_reference import cantera_gas, cantera_pure  # noqa: E402
from gibbsmin.sweep import SweepSpec, grid, run_sweep  # noqa: E402

GAS = ("CH4", "H2O", "CO", "CO2", "H2", "N2", "Ar", "C2H6", "C2H4")
FEED = {"CH4": 1.0, "H2O": 3.0, "N2": 0.02, "Ar": 0.001, "C2H6": 0.04}
P = 30e5


def spec_for(points: int, graphite: bool) -> SweepSpec:
    side = int(round(np.sqrt(points)))
    return SweepSpec(
        feed=FEED, T=1000.0, P=P,
        axes=(grid("S/C", np.linspace(0.3, 3.0, side)), grid("T", np.linspace(700.0, 1300.0, side))),
        species=GAS + (("C(s)",) if graphite else ()),
    )


def gibbsmin_rate(spec: SweepSpec, workers: int = 1, chunk_size: int = 5000) -> tuple[float, object]:
    run_sweep(spec if spec.n_points <= 2000 else _small(spec), chunk_size=chunk_size)  # warm-up: compile, caches
    t0 = time.perf_counter()
    if workers == 1:
        table = run_sweep(spec, chunk_size=chunk_size)
    else:
        with tempfile.TemporaryDirectory() as folder:
            table = run_sweep(spec, folder, chunk_size=chunk_size, workers=workers).frame()
    return spec.n_points / (time.perf_counter() - t0), table


def _small(spec: SweepSpec) -> SweepSpec:
    return SweepSpec(feed=spec.feed, T=spec.T, P=spec.P,
                     axes=tuple(grid(a.name, a.values[:10]) for a in spec.axes), species=spec.species)


def cantera_rate(spec: SweepSpec, graphite: bool, sample: int = 400) -> float:
    gas = cantera_gas(list(GAS))
    solid = cantera_pure("C(s)") if graphite else None
    rng = np.random.default_rng(1)
    index = rng.choice(spec.n_points, size=min(sample, spec.n_points), replace=False)
    T_all, P_all, feed_all, _ = spec.conditions(0, spec.n_points)
    names = spec.feed_species()
    t0 = time.perf_counter()
    for i in index:
        feed = dict(zip(names, feed_all[i]))
        gas.TPX = T_all[i], P_all[i], feed
        if graphite:
            solid.TP = T_all[i], P_all[i]
            mix = ct.Mixture([(gas, sum(feed.values())), (solid, 0.0)])
            mix.T, mix.P = T_all[i], P_all[i]
            try:
                mix.equilibrate("TP", solver="vcs")
            except ct.CanteraError:
                pass  # VCS fails on some feeds; its time still counts
        else:
            gas.equilibrate("TP")
    return len(index) / (time.perf_counter() - t0)


def peak_memory_mib() -> tuple[float, float]:
    own = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    children = resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss / 1024
    return own, children


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--points", type=int, default=10_000)
    parser.add_argument("--million", action="store_true", help="also run the 1,000,000-point memory check")
    args = parser.parse_args()

    for graphite, target, reference in ((True, 10, "Cantera VCS loop"), (False, 5, "Cantera gas equilibrate loop")):
        spec = spec_for(args.points, graphite)
        ours, table = gibbsmin_rate(spec)
        theirs = cantera_rate(spec, graphite)
        label = "graphite allowed" if graphite else "gas only"
        carbon = f", graphite at {100 * table['n_C(s)'].gt(0).mean():.0f} % of points" if graphite else ""
        print(f"{spec.n_points}-point T x S/C grid at 30 bar, {label}{carbon}; "
              f"{100 * table['certified'].mean():.2f} % certified")
        print(f"  gibbsmin sweep (1 process, 2 threads): {ours:10.0f} points/s")
        print(f"  {reference:<38} {theirs:10.0f} points/s")
        print(f"  ratio {ours / theirs:6.1f}  (target {target})")

    import numba

    spec = spec_for(args.points * 4, True)
    numba.set_num_threads(1)
    one, _ = gibbsmin_rate(spec)
    numba.set_num_threads(numba.config.NUMBA_NUM_THREADS)
    two, _ = gibbsmin_rate(spec)
    big = spec_for(args.points * 40, True)
    procs, _ = gibbsmin_rate(big, workers=2, chunk_size=20_000)
    print(f"\nscaling on {spec.n_points} points: 1 thread {one:.0f} points/s, "
          f"{numba.config.NUMBA_NUM_THREADS} threads {two:.0f} points/s (ratio {two / one:.2f}); "
          f"2 worker processes on {big.n_points} points {procs:.0f} points/s (process start-up included)")

    if args.million:
        spec = spec_for(1_000_000, True)
        with tempfile.TemporaryDirectory() as folder:
            t0 = time.perf_counter()
            out = run_sweep(spec, folder, chunk_size=20_000)
            elapsed = time.perf_counter() - t0
            own, children = peak_memory_mib()
            size = sum(p.stat().st_size for p in Path(folder).glob("*.parquet")) / 2**20
        print(f"\n1,000,000 points in {elapsed:.0f} s ({spec.n_points / elapsed:.0f} points/s), "
              f"{out.uncertified} uncertified, {size:.0f} MiB of Parquet; "
              f"peak memory {own:.0f} MiB (this process), {children:.0f} MiB (largest child); target < 1024 MiB")
    return 0


if __name__ == "__main__":
    sys.exit(main())
