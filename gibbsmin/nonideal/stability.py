"""Whether a cubic answer's gas is stable as one phase: the tangent-plane test on it, and its verdict."""

from __future__ import annotations

import warnings
from collections.abc import Mapping
from dataclasses import replace

import numpy as np
from numpy.typing import NDArray

from ..eos.phase import GasPhase
from ..eos.stability import tangent_plane_test
from ..equilibrium import Equilibrium

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
    return stability_and_trial(phase, eq)[0]


def stability_and_trial(phase: GasPhase, eq: Equilibrium) -> tuple[dict[str, object], NDArray[np.float64] | None]:
    """:func:`gas_stability`'s record, and the composition of the phase that would form over the System's gas
    species (None where the gas is stable, untested, or the phase is a condensate the answer already holds)."""
    names = [phase.gas_names[j] for j in phase.described]
    n = np.array([eq.amounts.get(name, 0.0) for name in names])
    if phase.is_ideal or not n.sum() > 0.0:
        return {"tested": False, "stable": None, "distance": 0.0, "would_form": None,
                "note": "ideal gas" if phase.is_ideal else "no gas phase"}, None
    z = n / n.sum()
    Tc = phase.model.critical_temperatures
    hottest = float(Tc[z > _SCREEN_FRACTION].max())
    if eq.T > STABILITY_SCREEN * hottest:
        return {"tested": False, "stable": True, "distance": 0.0, "would_form": None,
                "note": f"not tested: T is above {STABILITY_SCREEN:g} times the highest Tc present ({hottest:.0f} K)"
                }, None
    verdict = tangent_plane_test(phase.model, eq.T, eq.P, z)
    would_form = None if verdict.trial is None else {
        name: float(w) for name, w in zip(names, verdict.trial) if w > 1e-4}
    held = _condensate_already_held(eq, would_form, phase.condensed_forms)
    if held:
        return {"tested": True, "stable": True, "distance": verdict.distance, "would_form": would_form,
                "note": f"the liquid-like phase the test finds is the {held} the answer already holds"}, None
    note = "stable as one gas (tangent-plane test)" if verdict.stable else (
        "NOT stable as one gas: a liquid-like phase would form (" + ", ".join(
            f"{s} {100 * w:.1f} mol%" for s, w in sorted(would_form.items(), key=lambda kv: -kv[1])[:4])
        + "); this one-gas answer is not the equilibrium: allow liquid-solution phases (the default with a "
          "cubic gas model, turned off by liquid=False), raise T or lower P")
    record = {"tested": True, "stable": verdict.stable, "distance": verdict.distance, "would_form": would_form,
              "note": note}
    if verdict.stable:
        return record, None
    trial = np.zeros(len(phase.gas_names))
    trial[phase.described] = verdict.trial
    return record, trial


def _condensate_already_held(eq: Equilibrium, would_form: Mapping[str, float] | None,
                             condensed_forms: Mapping[str, tuple[str, ...]]) -> str | None:
    """The present condensed species that is the would-be phase (one species at 99 % and more), if any.

    ``condensed_forms`` maps a gas species to the condensed species of the same elements
    (``GasPhase.condensed_forms``).
    """
    if not would_form:
        return None
    main, share = max(would_form.items(), key=lambda kv: kv[1])
    if share < 0.99:
        return None
    return next((s for s in condensed_forms.get(main, ()) if eq.amounts.get(s, 0.0) > 0.0), None)


def stability_checked(phase: GasPhase, eq: Equilibrium, stacklevel: int = 3) -> dict[str, object]:
    """:func:`gas_stability` of an answer, with a warning when its one gas would condense."""
    stability = gas_stability(phase, eq)
    if stability["stable"] is False:
        warnings.warn(stability["note"], RuntimeWarning, stacklevel=stacklevel)
    return stability


def with_stability_verdict(eq: Equilibrium, record: Mapping[str, object]) -> Equilibrium:
    """The answer with the verdict of a one-phase stability record (``gas_stability``) in its certificate, and
    the record in its gas model's state (and ``extras["gas_phase_stability"]``).

    A gas the tangent-plane test finds unstable as one phase is not the
    equilibrium (gibbsmin has no liquid-solution phase), so it is not certified.
    """
    gas = None if eq.gas is None else replace(eq.gas, stability=record)
    eq = replace(eq, gas=gas, extras={**eq.extras, "gas_phase_stability": record})
    if record.get("tested"):
        verdict = "stable" if record.get("stable") else "unstable"
    else:
        verdict = "screened" if record.get("stable") else "not tested"
    return replace(eq, certificate=eq.certificate.with_phase_stability(verdict))
