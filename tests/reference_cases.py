"""Shared equilibrium problems for the tests and the benchmarks.

Each family is a feed and a range of conditions typical of one service
(steam reforming, shift, methanation, ...).  Feeds are invented; the
conditions span what the trade runs (common practice, no source).
Conditions are drawn from a seeded generator so every run sees the same set.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

BAR = 1.0e5


@dataclass(frozen=True)
class Case:
    family: str
    feed: dict[str, float]
    T: float   # K
    P: float   # Pa


def _draw(rng, family, count, feed_of, T_range, P_range_bar):
    cases = []
    for _ in range(count):
        T = rng.uniform(*T_range)
        P = BAR * np.exp(rng.uniform(np.log(P_range_bar[0]), np.log(P_range_bar[1])))
        cases.append(Case(family, feed_of(rng), float(T), float(P)))
    return cases


def gas_cases(seed: int = 20261202) -> list[Case]:
    """About 325 gas-phase conditions over nine services."""
    rng = np.random.default_rng(seed)
    families = [
        ("steam reforming", 80, lambda r: {"CH4": 1.0, "H2O": r.uniform(1.5, 5.0)}, (600, 1300), (1, 40)),
        ("shift", 35, lambda r: {"CO": r.uniform(0.1, 0.3), "H2O": r.uniform(0.2, 0.5), "CO2": 0.05,
                                 "H2": 0.4, "N2": 0.1}, (450, 750), (10, 35)),
        ("methanation", 30, lambda r: {"CO": r.uniform(0.002, 0.01), "CO2": 0.002, "H2": 0.7, "N2": 0.25,
                                       "H2O": 0.01, "CH4": 0.01}, (500, 750), (20, 30)),
        ("CO2 reforming", 30, lambda r: {"CH4": 1.0, "CO2": r.uniform(0.8, 1.5)}, (900, 1300), (1, 10)),
        ("partial oxidation with air", 35, lambda r: (lambda o2: {"CH4": 1.0, "O2": o2, "N2": 3.76 * o2})(
            r.uniform(0.5, 0.8)), (900, 1600), (1, 30)),
        ("ammonia synthesis", 30, lambda r: {"N2": 1.0, "H2": 3.0, "Ar": r.uniform(0.0, 0.1)}, (500, 900), (1, 10)),
        ("methanol synthesis", 30, lambda r: {"CO": 1.0, "CO2": r.uniform(0.1, 0.4), "H2": 3.0, "CH4": 0.1},
         (450, 600), (1, 10)),
        ("SO2 oxidation", 30, lambda r: {"SO2": r.uniform(0.05, 0.11), "O2": 0.11, "N2": 0.79}, (600, 1000), (1, 2)),
        ("N2O4 dissociation", 25, lambda r: {"N2O4": 1.0, "N2": r.uniform(0.0, 1.0)}, (300, 400), (0.5, 5)),
    ]
    cases = []
    for family, count, feed_of, T_range, P_range in families:
        cases += _draw(rng, family, count, feed_of, T_range, P_range)
    return cases


def graphite_cases(seed: int = 7) -> list[Case]:
    """Reformer and CO-rich gases where graphite may or may not form."""
    rng = np.random.default_rng(seed)
    cases = _draw(rng, "low steam reforming", 25, lambda r: {"CH4": 1.0, "H2O": r.uniform(0.3, 1.5)},
                  (700, 1300), (1, 30))
    cases += _draw(rng, "CO-rich gas", 15, lambda r: {"CO": 1.0, "H2": r.uniform(0.2, 2.0), "CO2": 0.1},
                   (700, 1100), (1, 30))
    return cases
