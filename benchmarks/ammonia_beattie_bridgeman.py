"""Side calculation: ammonia at equilibrium with Beattie-Bridgeman fugacity coefficients, against Larson's data.

    python benchmarks/ammonia_beattie_bridgeman.py

What the README's accuracy section reports as tried for 300 atm.  Not part of the engine:
the equation of state of Beattie and Bridgeman (1928),
P = RT (1 - eps)/v^2 (v + B) - A/v^2, A = A0 (1 - a/v), B = B0 (1 - b/v), eps = c/(v T^3),
with their constants for H2, N2 and NH3 (from memory, as textbooks reproduce them; atm,
L/mol, K) and Beattie's mixing rules (A0 by the square root, a, B0, b and c linearly in
mole fraction).  ln phi_i is the derivative of the residual Helmholtz energy at fixed T
and total volume, taken numerically; the equilibrium is then solved by one extent with
K from each data set, iterating phi at fixed composition.  The measured points are
those of benchmarks/ammonia_accuracy.py (with their sources).
"""

from __future__ import annotations

import math
import sys
from pathlib import Path

import numpy as np
from scipy.optimize import brentq

sys.path.insert(0, str(Path(__file__).resolve().parent))

from ammonia_accuracy import LARSON_1924_HIGH  # noqa: E402
from ammonia_accuracy import ALL_POINTS  # noqa: E402

from gibbsmin.thermo import data_set  # noqa: E402

R_ATM = 0.0820574  # L atm / (mol K)
SPECIES = ("H2", "N2", "NH3")
NU = np.array([-1.5, -0.5, 1.0])  # 3/2 H2 + 1/2 N2 = NH3
#: Beattie and Bridgeman (1928), from memory: A0, a, B0, b, c (atm, L/mol, K).
CONSTANTS = {
    "H2": (0.1975, -0.00506, 0.02096, -0.04359, 0.0504e4),
    "N2": (1.3445, 0.02617, 0.05046, -0.00691, 4.20e4),
    "NH3": (2.3930, 0.17031, 0.03415, 0.19112, 476.87e4),
}


def _virial_terms(n: np.ndarray, T: float) -> tuple[float, float, float]:
    """The equation written as P = RT/v + beta/v^2 + gamma/v^3 + delta/v^4, for the mixture n."""
    y = n / n.sum()
    A0 = sum(y[i] * math.sqrt(CONSTANTS[s][0]) for i, s in enumerate(SPECIES)) ** 2
    a, B0, b, c = (sum(y[i] * CONSTANTS[s][k] for i, s in enumerate(SPECIES)) for k in (1, 2, 3, 4))
    beta = R_ATM * T * B0 - A0 - R_ATM * c / T**2
    gamma = -R_ATM * T * B0 * b + A0 * a - R_ATM * c * B0 / T**2
    delta = R_ATM * B0 * b * c / T**2
    return beta, gamma, delta


def _residual_helmholtz(n: np.ndarray, V: float, T: float) -> float:
    """A_res / RT of n mol in V litres."""
    N = n.sum()
    beta, gamma, delta = _virial_terms(n, T)
    return (N**2 * beta / V + N**3 * gamma / (2 * V**2) + N**4 * delta / (3 * V**3)) / (R_ATM * T)


def ln_phi(n: np.ndarray, T: float, P_atm: float) -> np.ndarray:
    beta, gamma, delta = _virial_terms(n, T)

    def pressure(v):
        return R_ATM * T / v + beta / v**2 + gamma / v**3 + delta / v**4

    ideal = R_ATM * T / P_atm
    v = brentq(lambda v: pressure(v) - P_atm, 0.15 * ideal, 10.0 * ideal)
    V, Z = v * n.sum(), P_atm * v / (R_ATM * T)
    out = np.empty(3)
    for i in range(3):
        step = np.zeros(3)
        step[i] = 1e-6 * n.sum()
        out[i] = (_residual_helmholtz(n + step, V, T) - _residual_helmholtz(n - step, V, T)) / (2 * step[i])
    return out - math.log(Z)


def ammonia_mol_percent(T_C: float, P_atm: float, data: str) -> float:
    T = T_C + 273.15
    g_RT = np.asarray(data_set(data).nasa7(list(SPECIES)).g_RT(np.array([T]))).reshape(-1)
    ln_K = -(g_RT @ NU)
    P_bar = P_atm * 1.01325
    phi = np.zeros(3)
    for _ in range(100):
        def residual(x, phi=phi):
            n = np.array([3.0 - 1.5 * x, 1.0 - 0.5 * x, x])
            return (np.log(n / n.sum()) + phi) @ NU + math.log(P_bar) * NU.sum() - ln_K

        x = brentq(residual, 1e-12, 2.0 - 1e-12)
        n = np.array([3.0 - 1.5 * x, 1.0 - 0.5 * x, x])
        new = ln_phi(n, T, P_atm)
        if np.max(np.abs(new - phi)) < 1e-11:
            break
        phi = new
    return 100.0 * n[2] / n.sum()


def main() -> None:
    print(f"{'T/degC':>6} {'P/atm':>6} {'meas.':>6} {'BB nasa-1993':>16} {'BB atct-anchored':>18}")
    for T_C, P_atm, measured in sorted(ALL_POINTS + LARSON_1924_HIGH, key=lambda p: (p[1], p[0])):
        if P_atm < 50.0:
            continue
        raw, new = (ammonia_mol_percent(T_C, P_atm, d) for d in ("nasa-1993", "atct-anchored"))
        print(f"{T_C:6.0f} {P_atm:6.0f} {measured:6.2f} {raw:8.2f} ({raw - measured:+5.2f}) "
              f"{new:10.2f} ({new - measured:+5.2f})")


if __name__ == "__main__":
    main()
