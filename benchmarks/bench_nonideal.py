"""Per-solve time of a Peng-Robinson equilibrium against gibbsmin's ideal gas and Cantera's Peng-Robinson phase.

    python benchmarks/bench_nonideal.py [--repeat N]

An invented ammonia loop gas (converter inlet of our own made-up plant) at
700 K and 200 bar, on two species sets: the five loop species, and every gas
species of the database made of H, N, C and Ar that has critical constants
(the largest set a Cantera Peng-Robinson phase can hold: it needs a and b for
every species).  Both engines get the same NASA-7 data and critical constants;
the quantum-gas correction is off, as Cantera has none, and kij = 0 on both
sides, so the answers agree (the largest relative difference in mole fraction
is printed).  The equilibrate() rows are the default call: quantum correction
and the shipped kij table on.

Rows: gibbsmin on a prepared setup ("solver only": ``solve_fixed`` for the
ideal gas, ``nonideal.solve_nonideal`` for PR), gibbsmin's whole
``equilibrate`` call (input checks, species set, result object), and
Cantera 3.2's ``equilibrate("TP")`` on a prepared Peng-Robinson phase (its
default solver and its Gibbs minimiser).  Printed: milliseconds per solve,
best of three runs, and the ratios measured in the same run.  Target: the
non-ideal solve within 5 times gibbsmin's own ideal solve.

Then a 1,000-point T x P grid of the same gas: gibbsmin's sweep with the ideal
gas and with Peng-Robinson, against Cantera's Peng-Robinson phase equilibrated
point by point, in points per second.
"""

from __future__ import annotations

import argparse
import sys
import timeit
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent / "tests"))

import gibbsmin  # noqa: E402
from gibbsmin.nonideal import gas_phase, solve_nonideal  # noqa: E402
from gibbsmin.fixed_step import prepare, solve_fixed  # noqa: E402
from test_nonideal_cantera import cantera_peng_robinson  # noqa: E402

FEED = {"H2": 0.62, "N2": 0.21, "NH3": 0.04, "CH4": 0.08, "Ar": 0.05}
T, P = 700.0, 200e5
LOOP_SPECIES = list(FEED)


def _per_call_ms(fn, number: int) -> float:
    fn()  # warm-up: compilation, caches
    return min(timeit.repeat(fn, number=number, repeat=3)) / number * 1e3


def _with_constants() -> list[str]:
    """Every H-N-C-Ar gas species of the database with critical constants."""
    return [r.name for r in gibbsmin.default_database()
            if r.is_gas and r.critical is not None and set(r.elements) <= {"H", "N", "C", "Ar"}]


def _measure(names: list[str], repeat: int) -> tuple[dict[str, float], float, int]:
    setup = prepare(FEED, species=names, T_span=(T, T))
    phase = gas_phase(setup.system, "peng-robinson", quantum_correction=False, kij="none")
    times = {
        "gibbsmin ideal, solver only": _per_call_ms(lambda: solve_fixed(setup, T, P), repeat),
        "gibbsmin PR, solver only": _per_call_ms(lambda: solve_nonideal(setup, T, P, phase), repeat),
        "gibbsmin ideal, equilibrate()": _per_call_ms(lambda: gibbsmin.equilibrate(FEED, T, P, species=names), repeat),
    }
    # equilibrate() always uses the quantum correction; the PR call differs from the solver row only in overhead.
    times["gibbsmin PR, equilibrate()"] = _per_call_ms(
        lambda: gibbsmin.equilibrate(FEED, T, P, species=names, gas="peng-robinson"), repeat)
    cantera = cantera_peng_robinson(names)
    for label, solver in (("Cantera PR, default solver", "auto"), ("Cantera PR, gibbs solver", "gibbs")):
        def run(solver=solver):
            cantera.TPX = T, P, FEED
            cantera.equilibrate("TP", solver=solver)
        times[label] = _per_call_ms(run, repeat)
    ours, _, _ = solve_nonideal(setup, T, P, phase)
    cantera.TPX = T, P, FEED
    cantera.equilibrate("TP", solver="gibbs")
    difference = max(abs(ours.mole_fractions[s] / x - 1.0) for s, x in zip(cantera.species_names, cantera.X)
                     if x > 1e-12)
    return times, difference, ours.extras["gas_model_iterations"]


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=50, help="solves per timed run (default 50)")
    args = parser.parse_args()
    print(f"ammonia loop gas {FEED} at {T:g} K, {P / 1e5:g} bar; milliseconds per solve, best of 3")
    for label, names in (("loop species", LOOP_SPECIES), ("all H-N-C-Ar gases with critical constants",
                                                         _with_constants())):
        times, difference, iterations = _measure(names, args.repeat)
        print(f"\n{label} ({len(names)} species); PR answer needs {iterations} frozen-phi solves; "
              f"largest relative difference from Cantera's answer {difference:.1e}")
        for row, ms in times.items():
            print(f"  {row:34s} {ms:9.3f} ms")
        solver_ratio = times["gibbsmin PR, solver only"] / times["gibbsmin ideal, solver only"]
        call_ratio = times["gibbsmin PR, equilibrate()"] / times["gibbsmin ideal, equilibrate()"]
        print(f"  PR / ideal, solver only:      {solver_ratio:6.2f}  (target <= 5)")
        print(f"  PR / ideal, equilibrate():    {call_ratio:6.2f}  (target <= 5)")
        for row in ("Cantera PR, default solver", "Cantera PR, gibbs solver"):
            print(f"  gibbsmin PR (solver) / {row[11:]:15s} {times['gibbsmin PR, solver only'] / times[row]:6.2f}"
                  "  (below 1: gibbsmin faster)")


def _sweep_rates(points_T: int = 50, points_P: int = 20) -> dict[str, float]:
    """Points per second of a T x P grid of the loop gas: gibbsmin's sweep (PR and ideal) and a Cantera PR loop."""
    import numpy as np

    from gibbsmin.sweep import SweepSpec, grid, solve_points

    temperatures, pressures = np.linspace(650.0, 800.0, points_T), np.linspace(50e5, 300e5, points_P)
    rates = {}
    for gas in ("ideal", "peng-robinson"):
        spec = SweepSpec(feed=FEED, T=T, P=P, species=tuple(LOOP_SPECIES), axes=(grid("P", pressures),
                         grid("T", temperatures)), gas=gas, kij="none", inert=())
        solve_points(spec, 0, min(100, spec.n_points))  # warm-up
        start = timeit.default_timer()
        table = solve_points(spec, 0, spec.n_points)
        rates[f"gibbsmin sweep, {gas}"] = spec.n_points / (timeit.default_timer() - start)
        assert table["certified"].all()
    cantera = cantera_peng_robinson(LOOP_SPECIES)
    start = timeit.default_timer()
    for P_now in pressures:
        for T_now in temperatures:
            cantera.TPX = T_now, P_now, FEED
            cantera.equilibrate("TP")
    rates["Cantera PR loop (default solver)"] = points_T * points_P / (timeit.default_timer() - start)
    return rates


if __name__ == "__main__":
    main()
    rates = _sweep_rates()
    print("\nsweep of the loop gas, 650 to 800 K x 50 to 300 bar (1,000 points; kij = 0, quantum correction on "
          "for gibbsmin only); points per second")
    for row, rate in rates.items():
        print(f"  {row:34s} {rate:10.0f}")
    versus = rates["gibbsmin sweep, peng-robinson"] / rates["Cantera PR loop (default solver)"]
    print(f"  PR sweep / Cantera PR loop:     {versus:6.1f}  (above 1: gibbsmin faster)")
    print(f"  PR sweep / ideal sweep:         {rates['gibbsmin sweep, peng-robinson'] / rates['gibbsmin sweep, ideal']:6.2f}")
