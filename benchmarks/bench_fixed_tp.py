"""Per-solve time of gibbsmin's solvers against Cantera on the same species and data.

    python benchmarks/bench_fixed_tp.py [--repeat N]

Three species sets: a 9-species reformer gas, the same plus graphite, and
every C-H-O-N gas species of the database (70-odd).  For each, the same
conditions (a steam reformer outlet) are solved cold, again and again:
gibbsmin on a prepared problem ("solver only", comparable with Cantera's
equilibrate on a prepared phase), gibbsmin's full `equilibrate` call (input
checks, species set, result object), and Cantera (default gas solver, or VCS
for the graphite set).  Printed: milliseconds per solve and the ratio to
Cantera measured in the same run (below 1 means gibbsmin is faster).
"""

from __future__ import annotations

import argparse
import sys
import time
from pathlib import Path

import cantera as ct
import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent.parent / "tests"))

import gibbsmin  # noqa: E402
from cantera_reference import cantera_gas, cantera_pure  # noqa: E402
from gibbsmin.fixed_step import build_problem, prepare  # noqa: E402
from gibbsmin.solve import solve  # noqa: E402

FEED = {"CH4": 1.0, "H2O": 2.5, "N2": 0.02, "Ar": 0.001, "C2H6": 0.05}
T, P = 1050.0, 25e5
REFORMER_GAS = ["CH4", "H2O", "CO", "CO2", "H2", "N2", "Ar", "C2H6", "C2H4"]


def _per_call(fn, repeat: int) -> float:
    fn()  # warm-up (compilation, caches)
    best = np.inf
    for _ in range(3):
        t0 = time.perf_counter()
        for _ in range(repeat):
            fn()
        best = min(best, (time.perf_counter() - t0) / repeat)
    return best * 1e3


def _gibbsmin_timers(species, repeat):
    setup = prepare(FEED, species=species, T_span=(T, T))
    problem = build_problem(setup, np.array([T]), np.array([P]))
    out = {}
    for method in ("newton", "convex"):
        n = repeat if method == "newton" else max(5, repeat // 20)
        out[f"gibbsmin {method} (solver only)"] = _per_call(lambda m=method: solve(problem, m), n)
    out["gibbsmin equilibrate() (whole call)"] = _per_call(
        lambda: gibbsmin.equilibrate(FEED, T, P, species=species), repeat)
    return out, len(setup.system.names)


def _cantera_gas_timer(names, repeat):
    gas = cantera_gas(names)

    def run():
        gas.TPX = T, P, FEED
        gas.equilibrate("TP")
    return _per_call(run, repeat)


def _cantera_vcs_timer(names, repeat):
    gas = cantera_gas(names)
    graphite = cantera_pure("C(s)")

    def run():
        gas.TPX = T, P, FEED
        graphite.TP = T, P
        mix = ct.Mixture([(gas, sum(FEED.values())), (graphite, 0.0)])
        mix.T, mix.P = T, P
        mix.equilibrate("TP", solver="vcs")
    return _per_call(run, repeat)


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=200)
    args = parser.parse_args()
    db = gibbsmin.default_database()
    chon_gas = [r.name for r in db if r.is_gas and set(r.elements) <= {"C", "H", "O", "N", "Ar"}]
    sets = [
        ("9-species reformer gas", REFORMER_GAS, _cantera_gas_timer, "Cantera gas equilibrate"),
        ("reformer gas + graphite", REFORMER_GAS + ["C(s)"], _cantera_vcs_timer, "Cantera VCS"),
        (f"all C-H-O-N gases ({len(chon_gas)})", chon_gas, _cantera_gas_timer, "Cantera gas equilibrate"),
    ]
    print(f"conditions: T = {T} K, P = {P / 1e5} bar, feed {FEED}; best of 3 rounds of {args.repeat} solves")
    for title, species, cantera_timer, cantera_name in sets:
        timings, size = _gibbsmin_timers(species, args.repeat)
        gas_names = [s for s in species if db[s].is_gas]
        reference = cantera_timer(gas_names, args.repeat)
        print(f"\n{title}: {size} species")
        print(f"  {cantera_name:<40} {reference:9.3f} ms   ratio 1.00")
        for label, ms in timings.items():
            print(f"  {label:<40} {ms:9.3f} ms   ratio {ms / reference:5.2f}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
