"""The fast path of the fixed-H,P equilibrium: one compiled Newton with T among its unknowns.

``solve_energy_balance`` tries this first when its fixed-T step is the plain
ideal gas (no fugacity coefficients, no offsets of held reactions).  The
kernel (``solve._enthalpy_kernel``) solves at the starting temperature, runs
the T-unknown Newton on the phase set found there, and solves once more at
the temperature found.  Its answer is taken only when it certifies on its own
terms:

- the certificate (``solve.certify``) of the problem built afresh at the
  temperature found: element balance, stationarity, and no absent condensed
  species that would form there (complementarity);
- the phase set unchanged from the start to the end, every present condensed
  species inside its data range;
- the energy balance closed to the bracketed search's own tolerance of the
  gross enthalpy (``balance._TOLERANCE``, ``enthalpy_scale``).

Anything else (a phase appearing or vanishing on the way, phases that fix T,
a bound reached, no convergence) returns None, and the bracketed search runs
as it always has.
"""

from __future__ import annotations

import numpy as np

from .. import sensitivity
from ..equilibrium import Equilibrium
from ..fixed_step import Setup, fixed_problem, to_equilibrium
from ..solve import SolverResult, certify
from ..solve import _enthalpy_kernel as kernel
from ..solve.newton import NewtonOptions, _same_composition
from ..system import Problem
from ..thermo.nasa7 import R

#: ``Equilibrium.extras`` key naming the way the energy balance was solved.
PATH_KEY = "energy_balance_path"
#: Its value when this fast path gave the answer; the bracketed search writes ``SEARCH``.
ENTHALPY_NEWTON = "enthalpy-pressure Newton"
SEARCH = "temperature search"


def _kept_table(setup: Setup, problem: Problem):
    """The NASA arrays of a problem's kept species (kept with the System's reductions)."""
    system = setup.system
    key = ("nasa7 of kept species", problem.keep.tobytes())
    found = system.reductions.get(key)
    if found is None:
        table = system.table.take(problem.keep)
        found = tuple(np.ascontiguousarray(a) for a in (table.low, table.high, table.T_mid, table.T_min,
                                                        table.T_max))
        system.reductions[key] = found
    return found


def solve_at_fixed_enthalpy(setup: Setup, H_target: float, P: float, T_start: float,
                            T_bounds: tuple[float, float], allow_extrapolation: bool = False,
                            options: NewtonOptions = NewtonOptions()
                            ) -> tuple[Equilibrium, Problem, SolverResult] | None:
    """The fixed-H [J], P [Pa] equilibrium on the ideal gas by the T-unknown Newton, or None where it cannot certify.

    Returns the answer (specification "H and P", not yet checked), its
    problem and raw solve; the caller checks the energy balance's closure
    against its own tolerance.
    """
    if not T_bounds[0] <= T_start <= T_bounds[1]:
        return None
    start = fixed_problem(setup, T_start, P, allow_extrapolation=allow_extrapolation)
    low, high, T_mid, T_min, T_max = _kept_table(setup, start)
    A = np.ascontiguousarray(start.A, dtype=float)
    T, ln_n, n_c, present, pi, iterations, status = kernel.run(
        A, start.n_gas, np.ascontiguousarray(start.b[0], dtype=float), low, high, T_mid, T_min, T_max,
        bool(allow_extrapolation), float(P), H_target / R, float(T_start), float(T_bounds[0]),
        float(T_bounds[1]), _same_composition(A[:, start.n_gas:]), options.tol, options.max_iterations,
        options.phase_tol, options.max_phase_changes)
    if status != kernel.CONVERGED:
        return None
    problem = fixed_problem(setup, T, P, allow_extrapolation=allow_extrapolation)
    if not np.array_equal(problem.keep, start.keep) or not np.array_equal(problem.A, start.A):
        return None
    result = SolverResult(ln_n_gas=ln_n[None, :], n_condensed=n_c[None, :], present=present[None, :],
                          pi=pi[None, :], converged=np.ones(1, dtype=bool), iterations=np.array([iterations]),
                          method=("newton",))
    certificates = certify(problem, result)
    if not certificates.certified[0]:
        return None
    eq = to_equilibrium(setup, problem, result, certificates, 0, T, P, specification="H and P")
    return eq, problem, result


def equilibrium_heat_capacity(setup: Setup, problem: Problem, result: SolverResult, T: float, P: float) -> float:
    """dH/dT of a solved fixed-T,P point at fixed P [J/K], the composition shifting; NaN where the phases fix T.

    The temperature column alone of ``sensitivity.equilibrium_sensitivities``, compiled; that full
    computation where the compiled system cannot be solved.
    """
    low, high, T_mid, _, _ = _kept_table(setup, problem)
    cp = kernel.equilibrium_heat_capacity(
        np.ascontiguousarray(problem.A, dtype=float), problem.n_gas, float(problem.b[0].sum()),
        np.ascontiguousarray(result.ln_n_gas[0]), np.ascontiguousarray(result.n_condensed[0]),
        np.ascontiguousarray(result.present[0]), low, high, T_mid, float(T))
    if cp == kernel.UNSOLVED:
        return sensitivity.equilibrium_heat_capacity(setup, problem, result, T, P)
    return cp
