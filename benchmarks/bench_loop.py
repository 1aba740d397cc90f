"""Converging a synthesis loop: gibbsmin's flowsheet against plain successive substitution with Cantera and thermo.

    python benchmarks/bench_loop.py [--repeat N] [--sweep]

The invented ammonia loop of tests/loop_reference.py (make-up, mixer, converter at a fixed T, Peng-Robinson
separator, purge), converged by gibbsmin (Newton with Broyden's update on the tear stream) and by the reference's
successive substitution (Cantera's equilibrium, thermo's flash) to the same 1e-12, in the same run: time, passes,
equilibrium and flash calls, and the ratios.  Then the example loops (examples/ammonia_loop.toml, with its purge
held by a specification, and examples/methanol_loop.toml) as `gibbsmin settle` converges them.  ``--sweep`` adds a
200-point sweep of the reference loop over loop pressure and purge fraction, reporting points per second.
"""

from __future__ import annotations

import argparse
import sys
import time
import warnings
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT / "tests"))

import numpy as np  # noqa: E402
from loop_reference import reference_ammonia_loop  # noqa: E402
from test_flowsheet import CONTEXT, reference_flowsheet  # noqa: E402

from gibbsmin.flowsheet import settle_flowsheet  # noqa: E402
from gibbsmin.flowsheet.reader import read_flowsheet  # noqa: E402
from gibbsmin.flowsheet.sweep import sweep_flowsheet  # noqa: E402


def best_of(repeat, call):
    times, result = [], None
    for _ in range(repeat):
        start = time.perf_counter()
        result = call()
        times.append(time.perf_counter() - start)
    return min(times), result


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=3)
    parser.add_argument("--sweep", action="store_true")
    args = parser.parse_args()
    sheet = reference_flowsheet()
    settle_flowsheet(sheet, CONTEXT)  # compile and cache once
    ours_t, ours = best_of(args.repeat, lambda: settle_flowsheet(sheet, CONTEXT))
    ref_t, ref = best_of(args.repeat, reference_ammonia_loop)
    c = ours.certificate
    print("reference ammonia loop (tests/loop_reference.py), converged to 1e-12:")
    print(f"  gibbsmin:                       {ours_t:7.3f} s  {c.passes:4d} passes  {c.jacobians} Jacobians  "
          f"{c.unit_solves:4d} equilibrium and flash solves")
    print(f"  substitution, Cantera + thermo: {ref_t:7.3f} s  {ref.passes:4d} passes  "
          f"{ref.equilibrium_calls + ref.flash_calls:4d} equilibria and flashes")
    print(f"  ratio (gibbsmin / substitution): time {ours_t / ref_t:.3f}, passes {c.passes / ref.passes:.3f} "
          f"({ref.passes / c.passes:.1f} times fewer)")
    for example in ("ammonia_loop.toml", "methanol_loop.toml"):
        case = read_flowsheet(ROOT / "examples" / example)
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            t, result = best_of(args.repeat, lambda: settle_flowsheet(case.flowsheet, case.context()))
        c = result.certificate
        print(f"examples/{example}: {t:.3f} s, {c.passes} passes, {c.jacobians} Jacobians, {c.unit_solves} solves, "
              f"tear residual {c.tear_residual:.1e}, element balance {c.element_balance_residual:.1e}")
    if args.sweep:
        axes = {"pressure": list(np.linspace(150e5, 220e5, 10)), "purge split.fraction": list(np.linspace(0.01, 0.08, 20))}
        start = time.perf_counter()
        points = sweep_flowsheet(sheet, axes, CONTEXT)
        elapsed = time.perf_counter() - start
        failed = sum(not p.converged for p in points)
        print(f"sweep over loop pressure x purge: {len(points)} points in {elapsed:.1f} s, "
              f"{len(points) / elapsed:.1f} points/s, {failed} not converged")
    return 0


if __name__ == "__main__":
    sys.exit(main())
