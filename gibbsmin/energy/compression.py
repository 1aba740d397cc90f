"""A compressor, circulator or expander, and a let-down valve, on one gas phase without reaction.

Every species keeps its flow; only T and P change.  The gas is the ideal gas or
a cubic (Peng-Robinson, SRK) on its vapour root: h = h_ideal(T) + h_res(T, P)
and s = s_ideal(T, P) + s_res(T, P), the residual parts from
``gibbsmin.eos`` over the species that have critical constants (the others
ideal, as in ``eos.phase.gas_phase``).  Amounts are taken as mol/s, so
enthalpies are in W and entropies in W/K.

A machine from P_in to P_out with isentropic efficiency e:

1. T_s, the isentropic outlet temperature: s(T_s, P_out) = s(T_in, P_in);
2. compression (P_out >= P_in): h_out = h_in + (h_s - h_in) / e; expansion
   (P_out < P_in, a turbo-expander): h_out = h_in + e (h_s - h_in), the
   efficiency taking from the isentropic work instead of adding to it;
3. T_out from h(T_out, P_out) = h_out, and the power h_out - h_in (positive
   when the machine takes work, negative for an expander).

A valve is adiabatic and does no work: h(T_out, P_out) = h(T_in, P_in) (the
Joule-Thomson let-down; an ideal gas keeps its temperature).

Each temperature is found by Newton steps on T with the heat capacity
(ds/dT = cp/T, dh/dT = cp; the residual part of cp by a central difference of
h_res), kept inside a bracket that starts as the species' common data range and
bisected where a step would leave it; converged to 1e-12 of the quantity's
scale (|s| + N R, |h| + N R T) and refused above 1e-9.  The gas stays one
phase: a state below its dew point is computed on the vapour root as if it did
not condense (a flash of a let-down that forms a liquid is for the caller).
"""

from __future__ import annotations

import numbers
from collections.abc import Callable, Mapping
from dataclasses import dataclass

import numpy as np

from ..errors import ConvergenceError, InputError
from ..fixed_step import check_feed, positive_number
from ..eos.names import canonical_model_name
from ..eos.phase import model_of_gas
from ..thermo.database import SpeciesDatabase
from ..thermo.datasets import default_database
from ..thermo.nasa7 import R
from .properties import enthalpy, entropy, heat_capacity

#: Convergence of each temperature solve, relative to the quantity's scale, and the largest residual accepted.
TOLERANCE = 1e-12
ACCEPTED = 1e-9
MAX_ITERATIONS = 100
#: Step of the central difference of h_res in the heat capacity that steers the Newton steps, [K].
_RESIDUAL_CP_STEP = 1e-3


@dataclass(frozen=True)
class Outlet:
    """What every machine's and valve's result holds.

    Amounts are taken as mol/s, so energies are in W.

    Attributes
    ----------
    T_out : float
        Outlet temperature, [K].
    P_in, P_out : float
        Inlet and outlet pressure, [Pa].
    power_W : float
        H_out - H_in, [W]: positive when the machine takes work (compression), negative for an expander.
    H_in_W, H_out_W : float
        Enthalpy flow on the formation basis at the inlet and outlet, [W].
    S_in, S_out : float
        Entropy flow at the inlet and outlet, [W/K]; S_out - S_in is the entropy the machine or valve generates.
    iterations : int
        Temperature iterations of the solves.
    """

    T_out: float
    P_in: float
    P_out: float
    power_W: float
    H_in_W: float
    H_out_W: float
    S_in: float
    S_out: float
    iterations: int


@dataclass(frozen=True)
class Letdown(Outlet):
    """A valve's outlet: isenthalpic, no work (power_W is 0); the fields of :class:`Outlet`."""


@dataclass(frozen=True)
class Compression(Outlet):
    """A compressor's (or expander's) outlet and power: the fields of :class:`Outlet`, and

    Attributes
    ----------
    T_isentropic : float
        Outlet temperature of the isentropic machine, [K].
    S_isentropic : float
        Entropy flow at the isentropic outlet, [W/K]; S_isentropic - S_in is the match's residual.
    efficiency : float
        Isentropic efficiency used, [-].
    """

    T_isentropic: float
    S_isentropic: float
    efficiency: float


class _Gas:
    """h(T, P), s(T, P) and cp(T, P) of fixed gas amounts under one gas model."""

    def __init__(self, amounts: Mapping[str, float], gas: str, kij, db: SpeciesDatabase | None):
        db = db or default_database()
        canonical = check_feed(amounts, db)
        records = db.resolve(list(canonical))
        condensed = [r.name for r in records if not r.is_gas]
        if condensed:
            raise InputError(f"{', '.join(condensed)} is a condensed species; a compressor or valve here takes one "
                             "gas phase: give gas species only (flash a stream that holds a liquid first)")
        self.names = [r.name for r in records]
        self.n = np.array([canonical[name] for name in self.names])
        self.total = float(self.n.sum())
        self.table = db.nasa7(self.names)
        self.T_min = max(r.T_min for r in records)
        self.T_max = min(r.T_max for r in records)
        self._ranges = {r.name: (r.T_min, r.T_max) for r in records}
        self.model = None
        if canonical_model_name(gas) != "ideal":
            self.model, _, described, _ = model_of_gas(dict(zip(self.names, self.n)), gas, kij, db)
            self._described_total = float(described.sum())
            self._y = described / self._described_total

    def check_temperature(self, T: float, where: str) -> None:
        for name, (low, high) in self._ranges.items():
            if not low <= T <= high:
                raise InputError(f"the {where} temperature {T:.6g} K is outside the data range of {name} "
                                 f"({low:g} K to {high:g} K); choose conditions that keep the gas inside it, "
                                 f"or leave {name} out")

    def _residual(self, T: float, P: float) -> tuple[float, float]:
        """h_res [W] and s_res [W/K]; zero for the ideal gas."""
        if self.model is None:
            return 0.0, 0.0
        found = self.model.properties(float(T), float(P), self._y)
        N = self._described_total
        return N * R * T * float(found.H_res_RT), N * R * float(found.S_res_R)

    def enthalpy(self, T: float, P: float) -> float:
        return enthalpy(self.table, len(self.names), self.n, T, P) + self._residual(T, P)[0]

    def entropy(self, T: float, P: float) -> float:
        return entropy(self.table, len(self.names), self.n, T, P) + self._residual(T, P)[1]

    def heat_capacity(self, T: float, P: float) -> float:
        """cp [W/K]: the ideal gas's exactly, the residual part by a central difference (it only steers Newton)."""
        cp = heat_capacity(self.table, self.n, T)
        if self.model is not None:
            # The cubic has no data range of its own, so the difference may straddle the NASA range's ends.
            step = _RESIDUAL_CP_STEP
            cp += (self._residual(T + step, P)[0] - self._residual(T - step, P)[0]) / (2.0 * step)
        return cp


def _temperature_where(value: Callable[[float], float], slope: Callable[[float], float], target: float,
                       scale: float, guess: float, gas: _Gas, what: str) -> tuple[float, float, int]:
    """T with value(T) = target for a value rising with T, its value there and the iterations taken.

    Newton steps inside a bracket [lo, hi], which starts as the gas's common data range; a step that would leave
    it is replaced by bisection, after checking once that the range's end does not already lie past the root.
    """
    lo, hi = gas.T_min, gas.T_max
    checked = {lo: False, hi: False}
    T = min(max(guess, lo), hi)
    for iteration in range(1, MAX_ITERATIONS + 1):
        found = value(T)
        residual = found - target
        if abs(residual) <= TOLERANCE * scale:
            return T, found, iteration
        if residual < 0.0:
            lo = T
        else:
            hi = T
        step = -residual / slope(T)
        T_next = T + step
        if abs(step) <= 1e-15 * T and abs(residual) <= ACCEPTED * scale:
            return T, found, iteration  # round-off: no step can improve it
        if not lo < T_next < hi:
            end = gas.T_min if T_next <= lo else gas.T_max
            if end in (lo, hi) and not checked.get(end, True):
                checked[end] = True
                past = value(end) - target
                if (end == gas.T_min and past > 0.0) or (end == gas.T_max and past < 0.0):
                    raise InputError(f"the {what} lies outside the species' common data range "
                                     f"({gas.T_min:g} K to {gas.T_max:g} K); choose a smaller pressure ratio "
                                     "or another inlet temperature")
            T_next = 0.5 * (lo + hi)
        T = T_next
    raise ConvergenceError(f"the {what} did not converge in {MAX_ITERATIONS} iterations "
                           f"(residual {residual:.3g} of a scale {scale:.3g})")


def _read_state(amounts, T_in, P_in, P_out, gas, kij, db) -> tuple[_Gas, float, float, float]:
    T_in = positive_number(T_in, "T_in", "K")
    P_in = positive_number(P_in, "P_in", "Pa")
    P_out = positive_number(P_out, "P_out", "Pa")
    state = _Gas(amounts, gas, kij, db)
    state.check_temperature(T_in, "inlet")
    return state, T_in, P_in, P_out


def _isentropic(state: _Gas, T_in: float, P_in: float, P_out: float) -> tuple[float, float, float, int]:
    """T_s [K], s(T_s, P_out) [W/K], s_in [W/K] and the iterations."""
    S_in = state.entropy(T_in, P_in)
    # The ideal gas of constant cp: T (P_out/P_in)^(N R / cp), the usual start (common practice).
    guess = T_in * (P_out / P_in) ** (state.total * R / heat_capacity(state.table, state.n, T_in))
    T_s, S_s, iterations = _temperature_where(lambda T: state.entropy(T, P_out),
                                              lambda T: state.heat_capacity(T, P_out) / T, S_in,
                                              abs(S_in) + state.total * R, guess, state, "isentropic outlet")
    return T_s, S_s, S_in, iterations


def _at_enthalpy(state: _Gas, H: float, P: float, guess: float, what: str) -> tuple[float, float, int]:
    return _temperature_where(lambda T: state.enthalpy(T, P), lambda T: state.heat_capacity(T, P), H,
                              abs(H) + state.total * R * guess, guess, state, what)


def compress(amounts: Mapping[str, float], T_in: float, P_in: float, P_out: float, *, efficiency: float = 1.0,
             gas: str = "ideal", kij="shipped", db: SpeciesDatabase | None = None) -> Compression:
    """Outlet and power of a compressor or circulator (P_out > P_in) or expander (P_out < P_in).

    Parameters
    ----------
    amounts : mapping
        Gas species to flow, [mol/s] (any amount basis: energies then come per that basis).
    T_in : float
        Inlet temperature, [K].
    P_in, P_out : float
        Inlet and outlet pressure, [Pa].
    efficiency : float
        Isentropic efficiency, 0 < e <= 1.  Compression: h_out = h_in + (h_s - h_in) / e; expansion (P_out <
        P_in): h_out = h_in + e (h_s - h_in), so the expander gives back e times the isentropic work.
    gas : {"ideal", "peng-robinson", "srk"}
        Gas model (aliases as in ``gibbsmin.eos``).
    kij : "shipped", "none" or mapping
        Binary interaction parameters, as in ``eos.phase.gas_phase``.
    db : SpeciesDatabase, optional
        Species data; the default data set's when omitted.

    Returns
    -------
    Compression
        power_W = H_out - H_in: positive for compression, negative for an expander.

    Raises
    ------
    InputError
        A pressure or temperature that is not a positive number, an efficiency outside (0, 1], an unknown or
        condensed species, no positive flow, an unknown gas model, or a state outside the species' data ranges.
    """
    if isinstance(efficiency, bool) or not isinstance(efficiency, numbers.Real) \
            or not 0.0 < float(efficiency) <= 1.0:
        raise InputError(f"efficiency must be a number with 0 < efficiency <= 1 (isentropic; 0.75 is typical of a "
                         f"circulator), got {efficiency!r}")
    efficiency = float(efficiency)
    state, T_in, P_in, P_out = _read_state(amounts, T_in, P_in, P_out, gas, kij, db)
    H_in = state.enthalpy(T_in, P_in)
    T_s, S_s, S_in, iterations = _isentropic(state, T_in, P_in, P_out)
    H_s = state.enthalpy(T_s, P_out)
    factor = 1.0 / efficiency if P_out >= P_in else efficiency
    H_target = H_in + factor * (H_s - H_in)
    if efficiency == 1.0:
        T_out, H_out, more = T_s, H_s, 0
    else:
        T_out, H_out, more = _at_enthalpy(state, H_target, P_out, T_s, "outlet temperature")
    return Compression(T_out=T_out, P_in=P_in, P_out=P_out, power_W=H_out - H_in, H_in_W=H_in, H_out_W=H_out,
                       S_in=S_in, S_out=state.entropy(T_out, P_out), iterations=iterations + more,
                       T_isentropic=T_s, S_isentropic=S_s, efficiency=efficiency)


def expand_adiabatic(amounts: Mapping[str, float], T_in: float, P_in: float, P_out: float, *, gas: str = "ideal",
                     kij="shipped", db: SpeciesDatabase | None = None) -> Letdown:
    """Outlet of a valve: adiabatic and without work, h(T_out, P_out) = h(T_in, P_in), one gas phase.

    The parameters are those of :func:`compress` (without an efficiency).  The ideal gas leaves at T_in; a cubic
    gives the Joule-Thomson change (a cooling for most gases at loop conditions, a warming for H2).
    """
    state, T_in, P_in, P_out = _read_state(amounts, T_in, P_in, P_out, gas, kij, db)
    H_in = state.enthalpy(T_in, P_in)
    T_out, H_out, iterations = _at_enthalpy(state, H_in, P_out, T_in, "valve outlet temperature")
    return Letdown(T_out=T_out, P_in=P_in, P_out=P_out, power_W=0.0, H_in_W=H_in, H_out_W=H_out,
                   S_in=state.entropy(T_in, P_in), S_out=state.entropy(T_out, P_out), iterations=iterations)
