"""Latency of a prepared specification and of the plain calls against Cantera, measured in the same run.

    python benchmarks/bench_prepared.py [--repeat N]

The targets of the prepared-specification work, each a ratio to Cantera 3.2
on the same species and the same NASA data (below 1: gibbsmin faster):

1. ``gibbsmin.prepare(...).equilibrate(feed, T=..., P=...)`` on the 9-species
   reformer gas (H2 H2O CO CO2 CH4 N2 C2H6 NH3 O2; CH4:H2O 1:3; 25 bar; T
   stepped over 700 to 1300 K) against ``equilibrate("TP")``: at most 1.0.
2. The plain ``gibbsmin.equilibrate()`` on the same: at most 3.0.
3. The same species with graphite against Cantera's multiphase (VCS) solver:
   at most 0.5.
4. Adiabatic (``adiabatic=True, T_feed=...``) against ``equilibrate("HP")``:
   at most 1.0.
5. Peng-Robinson on the 5-species ammonia loop gas at 200 bar against
   Cantera's Peng-Robinson phase: at most 1.0 (the quantum correction off and
   kij = 0 on both sides, as Cantera has neither).

Each figure is the best of three runs of ``repeat`` calls, every call at a
new temperature of the list (so no call is served a cached answer), and the
kernel alone (the Newton solve of a built problem) is printed beside it so
the overhead left above the kernel is visible.
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
from gibbsmin.fixed_step import build_problem, prepare as feed_setup  # noqa: E402
from gibbsmin.solve import solve  # noqa: E402
from test_nonideal_cantera import cantera_peng_robinson  # noqa: E402

REFORMER = ["H2", "H2O", "CO", "CO2", "CH4", "N2", "C2H6", "NH3", "O2"]
FEED = {"CH4": 1.0, "H2O": 3.0}
P = 25e5
TEMPERATURES = np.linspace(700.0, 1300.0, 61)
#: An invented prereformer inlet for the adiabatic case (our own numbers): 500 degC, 25 bar.
ADIABATIC_FEED = {"CH4": 1.0, "H2O": 3.0, "H2": 0.05, "C2H6": 0.04}
T_FEED = 773.15
LOOP_FEED = {"H2": 0.62, "N2": 0.21, "NH3": 0.04, "CH4": 0.08, "Ar": 0.05}
LOOP_T, LOOP_P = 700.0, 200e5


def _per_call_ms(call, repeat: int) -> float:
    """Best of three runs of ``repeat`` calls, call(i) cycling through the temperatures, [ms per call]."""
    for i in range(len(TEMPERATURES)):
        call(i)  # warm-up: compilation, caches
    best = np.inf
    for _ in range(3):
        start = time.perf_counter()
        for i in range(repeat):
            call(i % len(TEMPERATURES))
        best = min(best, (time.perf_counter() - start) / repeat)
    return best * 1e3


def _rows(repeat: int) -> list[tuple[str, float, float, float]]:
    """(label, gibbsmin ms, Cantera ms, target ratio) for each target."""
    rows = []
    gas = cantera_gas(REFORMER)

    def cantera_tp(i):
        gas.TPX = TEMPERATURES[i], P, FEED
        gas.equilibrate("TP")
    cantera_ms = _per_call_ms(cantera_tp, repeat)
    prepared = gibbsmin.prepare(species=REFORMER)
    rows.append(("prepared, fixed T and P", _per_call_ms(
        lambda i: prepared.equilibrate(FEED, T=TEMPERATURES[i], P=P), repeat), cantera_ms, 1.0))
    rows.append(("plain equilibrate(), fixed T and P", _per_call_ms(
        lambda i: gibbsmin.equilibrate(FEED, T=TEMPERATURES[i], P=P, species=REFORMER), repeat), cantera_ms, 3.0))
    setup = feed_setup(FEED, species=REFORMER, T_span=(700.0, 1300.0))
    problems = [build_problem(setup, np.array([T]), np.array([P])) for T in TEMPERATURES]
    rows.append(("  kernel alone (Newton, built problem)", _per_call_ms(
        lambda i: solve(problems[i], "newton"), repeat), cantera_ms, np.nan))

    graphite = cantera_pure("C(s)")

    def cantera_vcs(i):
        gas.TPX = TEMPERATURES[i], P, FEED
        graphite.TP = TEMPERATURES[i], P
        mix = ct.Mixture([(gas, sum(FEED.values())), (graphite, 0.0)])
        mix.T, mix.P = TEMPERATURES[i], P
        mix.equilibrate("TP", solver="vcs")
    rows.append(("plain equilibrate() with graphite", _per_call_ms(
        lambda i: gibbsmin.equilibrate(FEED, T=TEMPERATURES[i], P=P, species=[*REFORMER, "C(s)"]), repeat),
        _per_call_ms(cantera_vcs, repeat), 0.5))

    def cantera_hp(i):
        gas.TPX = T_FEED, P, ADIABATIC_FEED
        gas.equilibrate("HP")
    rows.append(("plain equilibrate(), adiabatic", _per_call_ms(
        lambda i: gibbsmin.equilibrate(ADIABATIC_FEED, P=P, T_feed=T_FEED, adiabatic=True, species=REFORMER),
        repeat), _per_call_ms(cantera_hp, repeat), 1.0))

    loop = list(LOOP_FEED)
    peng_robinson = cantera_peng_robinson(loop)

    def cantera_pr(i):
        peng_robinson.TPX = LOOP_T, LOOP_P, LOOP_FEED
        peng_robinson.equilibrate("TP")
    rows.append(("plain equilibrate(), Peng-Robinson, 200 bar", _per_call_ms(
        lambda i: gibbsmin.equilibrate(LOOP_FEED, T=LOOP_T, P=LOOP_P, species=loop, gas="peng-robinson",
                                       kij="none"), repeat), _per_call_ms(cantera_pr, repeat), 1.0))
    return rows


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=300, help="calls per timed run (default 300)")
    args = parser.parse_args()
    print(f"gibbsmin {gibbsmin.__version__}, Cantera {ct.__version__}; ms per call, best of 3 runs of {args.repeat}")
    print(f"{'case':46s} {'gibbsmin':>9s} {'Cantera':>9s} {'ratio':>7s} {'target':>7s}")
    missed = 0
    for label, ours, theirs, target in _rows(args.repeat):
        ratio = ours / theirs
        verdict = "" if np.isnan(target) else (" met" if ratio <= target else " MISSED")
        missed += verdict == " MISSED"
        target_text = "" if np.isnan(target) else f"{target:7.2f}"
        print(f"{label:46s} {ours:9.4f} {theirs:9.4f} {ratio:7.2f} {target_text:>7s}{verdict}")
    print(f"\n{missed} target(s) missed" if missed else "\nevery target met")
    return 0


if __name__ == "__main__":
    sys.exit(main())
