"""Start-up of gibbsmin as a whole process, against Cantera's import measured in the same run.

    python benchmarks/bench_startup.py [--repeat N]

Printed, each the median of N fresh processes (default 5): the bare interpreter, `import gibbsmin`,
`import cantera` (the comparison; Cantera is not used by the engine), and the whole
`gibbsmin settle examples/reformer.toml` command; then, inside this process, the same case settled
again (warm: no imports, no kernel load), its one equilibrium solve, and the Newton kernel alone on
that problem, so the overhead above the kernel is visible.  Also the first equilibrium solve of a fresh
process (it loads the compiled kernels from numba's cache).  Issue 12's target: the settle command
under 1.5 s.
"""

from __future__ import annotations

import argparse
import statistics
import subprocess
import sys
import time
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parent.parent
CASE = ROOT / "examples" / "reformer.toml"


def _median_process(argv: list[str], repeat: int) -> float:
    """Median wall time of ``argv`` as a fresh process, [s]."""
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        subprocess.run(argv, check=True, cwd=ROOT, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def _settle_command() -> list[str]:
    script = Path(sys.executable).parent / "gibbsmin"
    if script.exists():
        return [str(script), "settle", str(CASE)]
    return [sys.executable, "-c", "import sys; from gibbsmin.cli import main; sys.exit(main())", "settle", str(CASE)]


def _median_call(fn, repeat: int) -> float:
    fn()  # warm-up
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


_FIRST_SOLVE = """
import time
import gibbsmin
t0 = time.perf_counter()
gibbsmin.equilibrate({"CH4": 1.0, "H2O": 3.0}, 1100.0, 25e5)
print(time.perf_counter() - t0)
"""


def _first_solve(repeat: int) -> float:
    times = []
    for _ in range(repeat):
        out = subprocess.run([sys.executable, "-c", _FIRST_SOLVE], check=True, cwd=ROOT, capture_output=True, text=True)
        times.append(float(out.stdout.split()[-1]))
    return statistics.median(times)


def _in_process(repeat: int) -> dict[str, float]:
    """The reformer case settled in this (warm) process, its one solve, and the kernel alone on that problem."""
    import gibbsmin
    from gibbsmin.case import read_case, settle_case
    from gibbsmin.fixed_step import build_problem, prepare
    from gibbsmin.solve import solve

    case = read_case(CASE)
    stage = settle_case(case).stages[0]
    eq = stage.equilibrium
    scope = stage.scope
    feed = stage.inlet.mixed
    species = list(eq.amounts) + [s for s in eq.condensed if s not in eq.amounts]
    setup = prepare(feed, species=species, inert=scope.held, T_span=(eq.T, eq.T))
    problem = build_problem(setup, np.array([eq.T]), np.array([eq.P]))
    return {
        "settle_case(), warm, in-process": _median_call(lambda: settle_case(read_case(CASE)), repeat),
        "equilibrate() of its outlet, fixed T": _median_call(
            lambda: gibbsmin.equilibrate(feed, eq.T, eq.P, species=species, inert=scope.held), repeat * 20),
        "Newton kernel alone (solve, newton)": _median_call(lambda: solve(problem, "newton"), repeat * 200),
    }


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=5, help="fresh processes per figure (median printed)")
    args = parser.parse_args()
    n = args.repeat
    bare = _median_process([sys.executable, "-c", "pass"], n)
    cantera = _median_process([sys.executable, "-c", "import cantera"], n)
    rows = [
        ("python -c pass (the interpreter)", bare),
        ("python -c 'import cantera'", cantera),
        ("python -c 'import gibbsmin'", _median_process([sys.executable, "-c", "import gibbsmin"], n)),
        ("gibbsmin settle examples/reformer.toml", _median_process(_settle_command(), n)),
        ("first equilibrate() of a fresh process", _first_solve(n)),
    ]
    print(f"median of {n} fresh processes; ratios against `import cantera` measured in this run")
    for label, seconds in rows:
        print(f"  {label:<42} {seconds * 1e3:9.1f} ms   ratio {seconds / cantera:5.2f}")
    settle = rows[3][1]
    print(f"  settle command target 1500 ms: {'met' if settle < 1.5 else 'missed'} ({settle * 1e3:.0f} ms)")
    print("\nin this process (warm: modules imported, kernels loaded), median")
    for label, seconds in _in_process(n).items():
        print(f"  {label:<42} {seconds * 1e3:9.3f} ms")
    return 0


if __name__ == "__main__":
    sys.exit(main())
