"""The outside reference of the invented ammonia loop: passes, calls and wall time of its solve.

    python benchmarks/loop_reference_timing.py [--repeat N] [--tolerance TOL]

Successive substitution on the recycle with Cantera's ideal-gas equilibrium in the converter and thermo's
PR78 flash in the separator (tests/loop_reference.py names both and what each gets).  Run N times from a
zero recycle in one process; the first run also pays for building the Cantera phase and thermo's flasher.
gibbsmin's own loop is timed against these figures by the flowsheet benchmark.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent / "tests"))

from loop_reference import reference_ammonia_loop  # noqa: E402


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=3)
    parser.add_argument("--tolerance", type=float, default=1e-12)
    args = parser.parse_args()
    times = []
    for run in range(1, args.repeat + 1):
        reference = reference_ammonia_loop(tolerance=args.tolerance)
        times.append(reference.wall_time)
        print(f"run {run}: {reference.passes} passes, {reference.equilibrium_calls} Cantera equilibria, "
              f"{reference.flash_calls} thermo flashes, last change {reference.change:.2e}, "
              f"{reference.wall_time:.3f} s ({reference.wall_time / reference.passes * 1e3:.2f} ms a pass)")
    print(f"best of {args.repeat}: {min(times):.3f} s")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
