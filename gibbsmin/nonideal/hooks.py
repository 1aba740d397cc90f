"""What the rest of the engine asks of a non-ideal answer: one-phase stability, sensitivities, energy hooks."""

from __future__ import annotations

import functools
import warnings
from collections.abc import Mapping
from dataclasses import replace

import numpy as np
from numpy.typing import NDArray

from ..equilibrium import Equilibrium
from ..settle import Setup
from ..solve import SolverResult
from ..thermo.database import SpeciesDatabase
from ..system import standard_mu0
from .loop import _finish, _gas_amounts, solve_nonideal
from .phase import GasPhase


#: The tangent-plane test is skipped above this multiple of the highest Tc among the gas's species present
#: above 1 ppm: no liquid-like phase of a gas mixture forms that far above its heaviest component's
#: critical temperature (common practice, no source), and the hot reactors are the common case.
STABILITY_SCREEN = 1.5
_SCREEN_FRACTION = 1e-6


def gas_stability(phase: GasPhase, eq: Equilibrium) -> dict[str, object]:
    """Whether an answer's gas is stable as one phase (``eos.stability``), as a JSON-ready record.

    ``{"tested": bool, "stable": bool or None, "distance": float, "would_form": {species: y} or None,
    "note": str}``; a liquid-like phase that would form means the one-gas answer is not the equilibrium.
    """
    from ..eos.stability import tangent_plane_test

    names = [phase.gas_names[j] for j in phase.described]
    n = np.array([eq.amounts.get(name, 0.0) for name in names])
    if phase.is_ideal or not n.sum() > 0.0:
        return {"tested": False, "stable": None, "distance": 0.0, "would_form": None,
                "note": "ideal gas" if phase.is_ideal else "no gas phase"}
    z = n / n.sum()
    Tc = phase.model.critical_temperatures
    hottest = float(Tc[z > _SCREEN_FRACTION].max())
    if eq.T > STABILITY_SCREEN * hottest:
        return {"tested": False, "stable": True, "distance": 0.0, "would_form": None,
                "note": f"not tested: T is above {STABILITY_SCREEN:g} times the highest Tc present ({hottest:.0f} K)"}
    verdict = tangent_plane_test(phase.model, eq.T, eq.P, z)
    would_form = None if verdict.trial is None else {
        name: float(w) for name, w in zip(names, verdict.trial) if w > 1e-4}
    held = _condensate_already_held(eq, would_form)
    if held:
        return {"tested": True, "stable": True, "distance": verdict.distance, "would_form": would_form,
                "note": f"the liquid-like phase the test finds is the {held} the answer already holds"}
    note = "stable as one gas (tangent-plane test)" if verdict.stable else (
        "NOT stable as one gas: a liquid-like phase would form (" + ", ".join(
            f"{s} {100 * w:.1f} mol%" for s, w in sorted(would_form.items(), key=lambda kv: -kv[1])[:4])
        + "); gibbsmin has no liquid-solution phase, so this one-gas answer is not the equilibrium: raise T, "
          "lower P, or treat the condensate separately")
    return {"tested": True, "stable": verdict.stable, "distance": verdict.distance, "would_form": would_form,
            "note": note}


def _condensate_already_held(eq: Equilibrium, would_form: Mapping[str, float] | None) -> str | None:
    """The present condensed species that is the would-be phase (one species at 99 % and more), if any."""
    if not would_form:
        return None
    main, share = max(would_form.items(), key=lambda kv: kv[1])
    if share < 0.99:
        return None
    from ..thermo.database import default_database

    db = default_database()
    elements = dict(db[main].elements)
    return next((s for s, n in eq.amounts.items()
                 if n > 0.0 and eq.phase_of.get(s) != "gas" and dict(db[s].elements) == elements), None)


def nonideal_sensitivities(setup: Setup, phase: GasPhase, result: SolverResult, T: float, P: float, *,
                           method: str = "auto", allow_extrapolation: bool = False,
                           db: SpeciesDatabase | None = None):
    """d(amounts)/dT, d/dP, d/d(feed) and heat capacities of a non-ideal answer, phi moving with them.

    Central differences of whole non-ideal solves, each warm-started from
    ``result`` (``sensitivity.difference_sensitivities``); the heat
    capacities include the residual enthalpy.
    """
    from .. import energy, sensitivity
    from ..thermo.database import default_database

    system = setup.system
    feed_species = list(setup.feed)
    columns = system.element_matrix((db or default_database()).resolve(feed_species))

    def amounts_at(T_now: float, P_now: float, b: NDArray[np.float64]) -> NDArray[np.float64]:
        moved = replace(setup, b=b)
        eq, _, _ = solve_nonideal(moved, T_now, P_now, phase, method=method, start=result,
                                  allow_extrapolation=allow_extrapolation)
        return energy.state_amounts(moved, eq)

    def enthalpy_at(T_now: float, n: NDArray[np.float64]) -> float:
        return energy.enthalpy(system.table, system.n_gas, n, T_now, P, phase.residual_enthalpy)

    return sensitivity.difference_sensitivities(
        system.names, T, P, setup.b, {name: columns[:, k] for k, name in enumerate(feed_species)},
        amounts_at, enthalpy_at)


# ----------------------------------------------------------------------------- the energy balance

def inlet_residual_enthalpy(phase: GasPhase, inlet, P: float) -> float:
    """Residual enthalpy of the inlet streams, each at its own temperature and the reactor pressure P [Pa], [J].

    ``inlet`` is an ``energy.Inlet`` with temperatures.  Feed species outside
    the set's gas phase contribute nothing.
    """
    return sum(phase.stream_residual_enthalpy(stream.amounts, stream.T, P) for stream in inlet.streams)


def inlet_enthalpies(phase: GasPhase | None, inlet, P: float, db: SpeciesDatabase,
                     allow_extrapolation: bool = False) -> tuple[float | None, float]:
    """The inlet's enthalpy [J] (residual enthalpy included under a cubic; None without feed temperatures)
    and its gross enthalpy [J], the scale of the energy balance's tolerance."""
    if not inlet.has_temperatures:
        return None, 0.0
    H_in = inlet.enthalpy(P, db, allow_extrapolation)
    if phase is not None:
        H_in += inlet_residual_enthalpy(phase, inlet, P)
    return H_in, inlet.gross_enthalpy(P, db)


def stability_checked(phase: GasPhase, eq: Equilibrium, stacklevel: int = 3) -> dict[str, object]:
    """:func:`gas_stability` of an answer, with a warning when its one gas would condense."""
    stability = gas_stability(phase, eq)
    if stability["stable"] is False:
        warnings.warn(stability["note"], RuntimeWarning, stacklevel=stacklevel)
    return stability


def with_stability_verdict(eq: Equilibrium) -> Equilibrium:
    """The answer with the verdict of ``extras["gas_phase_stability"]`` in its certificate.

    A gas the tangent-plane test finds unstable as one phase is not the
    equilibrium (gibbsmin has no liquid-solution phase), so it is not certified.
    """
    record = eq.extras.get("gas_phase_stability")
    if not record:
        return eq
    if record.get("tested"):
        verdict = "stable" if record.get("stable") else "unstable"
    else:
        verdict = "screened" if record.get("stable") else "not tested"
    return replace(eq, certificate=eq.certificate.with_phase_stability(verdict))


def energy_hooks(setup: Setup, P: float, phase: GasPhase, *, method: str = "auto",
                 allow_extrapolation: bool = False) -> dict[str, object]:
    """Keyword arguments of ``energy.solve_energy_balance`` that put this gas model into the energy balance.

    The residual enthalpy enters the balance, every fixed-T step is the
    non-ideal solve, and so is the solve with T unknown on a phase boundary;
    the temperatures where the model's enthalpy jumps are named.
    """
    def step(T: float, start: SolverResult | None):
        return solve_nonideal(setup, T, P, phase, method=method, start=start,
                              allow_extrapolation=allow_extrapolation, specification="H and P")
    return {"residual_enthalpy": phase.residual_enthalpy, "step": step,
            "phase_set_step": functools.partial(phase_set_step, phase), "enthalpy_kinks": phase.enthalpy_kinks}


def phase_set_step(phase: GasPhase, setup: Setup, *args, **kwargs):
    """``sensitivity.settle_on_phase_set`` with this gas model's ln phi, its answer dressed as a non-ideal one.

    Its certificate is already taken with phi at the answer's composition, so
    the extras of a fixed-T non-ideal answer (``loop._finish``) change nothing
    in it.
    """
    from .. import sensitivity

    settled = sensitivity.settle_on_phase_set(setup, *args, ln_phi=phase.ln_phi, gas_model=phase.name, **kwargs)
    if settled is None:
        return None
    eq, problem, result = settled
    n = _gas_amounts(problem, result, setup.system.n_gas)
    final = phase.ln_phi(eq.T, eq.P, n)
    held = final.copy()
    kept_gas = problem.keep[: problem.n_gas]
    held[kept_gas] = problem.mu0[0, : problem.n_gas] - standard_mu0(
        setup.system, np.array([eq.T]), np.array([eq.P]))[0, kept_gas]
    change = float(np.max(np.abs(final - held)[kept_gas]))
    eq = _finish(setup, phase, eq, problem, result, held, final, n, int(result.iterations[0]), change)
    return eq, problem, result
