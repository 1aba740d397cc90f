"""A cubic gas model in the energy balance: inlet residual enthalpies, the hooks of ``solve_energy_balance``."""

from __future__ import annotations

import functools

import numpy as np

from ..energy import phase_boundary
from ..eos.phase import GasPhase, gas_phase
from ..fixed_step import Setup
from ..fixed_step import prepare as feed_setup
from ..solve import SolverResult
from ..system import standard_mu0
from ..thermo.database import SpeciesDatabase
from .fluid_phases import solve_fluid_phases
from .loop import _finish, _gas_amounts, solve_nonideal


def inlet_residual_enthalpy(phase: GasPhase, inlet, P: float) -> float:
    """Residual enthalpy of the inlet streams, each at its own temperature and the reactor pressure P [Pa], [J].

    ``inlet`` is an ``energy.Inlet`` with temperatures.  Feed species outside
    the set's gas phase contribute nothing.
    """
    return sum(phase.stream_residual_enthalpy(stream.amounts, stream.T, P) for stream in inlet.streams)


def inlet_enthalpies(phase: GasPhase | None, inlet, P: float, db: SpeciesDatabase,
                     allow_extrapolation: bool = False, liquids: bool = False) -> tuple[float | None, float]:
    """The inlet's enthalpy [J] (residual enthalpy included under a cubic; None without feed temperatures)
    and its gross enthalpy [J], the scale of the energy balance's tolerance.

    With ``liquids`` each stream is flashed on its own at its temperature and the reactor pressure (every
    species held), so a liquid feed brings a liquid's residual enthalpy, not a supersaturated gas's.
    """
    if not inlet.has_temperatures:
        return None, 0.0
    H_in = inlet.enthalpy(P, db, allow_extrapolation)
    if phase is not None and liquids:
        H_in += sum(_flashed_residual_enthalpy(phase, stream.amounts, stream.T, P, db) for stream in inlet.streams)
    elif phase is not None:
        H_in += inlet_residual_enthalpy(phase, inlet, P)
    return H_in, inlet.gross_enthalpy(P, db)


def _flashed_residual_enthalpy(phase: GasPhase, amounts, T: float, P: float, db: SpeciesDatabase) -> float:
    """Residual enthalpy [J] of a stream flashed alone at T [K], P [Pa]: over its fluid phases where it splits."""
    gases = [name for name, n in amounts.items() if n > 0.0 and db[name].is_gas and name in phase.gas_names]
    if not gases:
        return 0.0
    stream = {name: amounts[name] for name in gases}
    setup = feed_setup(stream, species=gases, inert=gases, T_span=(T, T), db=db)
    pairs = {pair: value for pair, value in phase.kij.items() if pair[0] in stream and pair[1] in stream}
    own = gas_phase(setup.system, phase.name, kij=pairs or "none")
    one_gas, _, result = solve_nonideal(setup, T, P, own)
    split = solve_fluid_phases(setup, T, P, own, one_gas=one_gas, one_gas_result=result)
    answer = one_gas if split is None else split[0]
    return 0.0 if answer.gas is None else answer.gas.residual_enthalpy_J


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
    """``energy.phase_boundary.solve_on_phase_boundary`` with this gas model's ln phi, its answer dressed as a
    non-ideal one.

    Its certificate is already taken with phi at the answer's composition, so
    the extras of a fixed-T non-ideal answer (``loop._finish``) change nothing
    in it.
    """
    settled = phase_boundary.solve_on_phase_boundary(setup, *args, ln_phi=phase.ln_phi, gas_model=phase.name,
                                                     **kwargs)
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
