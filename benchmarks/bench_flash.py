"""Two-phase flashes against thermo's flash of the same mixture and gibbsmin's own one-gas solve, one run.

    python benchmarks/bench_flash.py [--repeat N]

The methanol separator (40 degC, 79 bar) and the ammonia separator (-20 degC, 180 bar) of invented loops:
gibbsmin's flash on a prepared specification (every species held), its reactive two-phase solve (the chemistry
free, methanol synthesis and shift held at equilibrium), its one-gas Peng-Robinson solve of the same gas
(liquid=False), and thermo's PR78 flash (Caleb Bell, thermo 0.6; tests/flash_reference.py, gibbsmin's constants).
Targets (issue 13): the flash faster than thermo's, the reactive two-phase solve within 10 times the one-gas solve.
Milliseconds per call, best of 3 runs.
"""

from __future__ import annotations

import argparse
import sys
import timeit
import warnings
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent / "tests"))

import gibbsmin  # noqa: E402
from flash_reference import thermo_flash  # noqa: E402

CASES = {
    "methanol separator": ({"H2": 60.0, "CO": 5.0, "CO2": 4.0, "CH4": 8.0, "N2": 3.0, "CH3OH": 12.0, "H2O": 8.0},
                           313.15, 79e5, ["CH4", "N2"]),
    "ammonia separator": ({"H2": 58.0, "N2": 19.5, "NH3": 16.0, "CH4": 5.0, "Ar": 1.5}, 253.15, 180e5, ["CH4", "Ar"]),
}


def _ms(call, repeat: int) -> float:
    call()
    return min(timeit.repeat(call, number=repeat, repeat=3)) / repeat * 1e3


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=30)
    args = parser.parse_args()
    warnings.simplefilter("ignore", RuntimeWarning)  # the one-gas answers below their dew point warn so
    print(f"{'case':20s} {'flash':>8s} {'thermo':>8s} {'ratio':>6s} {'reactive':>9s} {'one gas':>8s} {'ratio':>6s}")
    for name, (z, T, P, inerts) in CASES.items():
        names = list(z)
        flash = gibbsmin.prepare(species=names, inert=names, gas="peng-robinson")
        reactive = gibbsmin.prepare(species=names, inert=inerts, gas="peng-robinson")
        one_gas = gibbsmin.prepare(species=names, inert=inerts, gas="peng-robinson", liquid=False)
        t_flash = _ms(lambda: flash.equilibrate(z, T, P), args.repeat)
        t_thermo = _ms(lambda: thermo_flash(z, T, P), args.repeat)
        t_reactive = _ms(lambda: reactive.equilibrate(z, T, P), args.repeat)
        t_gas = _ms(lambda: one_gas.equilibrate(z, T, P), args.repeat)
        print(f"{name:20s} {t_flash:8.3f} {t_thermo:8.3f} {t_flash / t_thermo:6.2f} {t_reactive:9.3f} {t_gas:8.3f} "
              f"{t_reactive / t_gas:6.2f}")
    print("targets: flash / thermo < 1; reactive / one gas <= 10")
    return 0


if __name__ == "__main__":
    sys.exit(main())
