"""How far an answer can be trusted: the standard uncertainty of each amount from the formation data.

The inputs are the per-species standard uncertainties of delta-f H(298.15 K)
that a data set states (``SpeciesRecord.hf298_uncertainty``; the set
"atct-anchored" has them).  A shift dH_j of species j's enthalpy of formation
moves its g0 by dH_j at every temperature; the amounts respond linearly,
dn = J dH, with J = d n / d(delta-f H) from the implicit differentiation of the
optimality conditions (``sensitivity.formation_enthalpy_sensitivities``) or,
for a cubic gas whose fugacity coefficients move with the composition, from
central differences of whole solves.  With the covariance Sigma of the inputs
(diagonal, each species' value being its own ATcT entry or the default, except
where a phase is tied to another's anchor), the amounts' standard
uncertainties are sqrt(diag(J Sigma J^T)) [mol].
"""

from __future__ import annotations

from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from .equilibrium import WATER
from .errors import InputError
from .sensitivity import equilibrium_sensitivities, formation_enthalpy_sensitivities
from .fixed_step import Setup
from .solve import SolverResult
from .system import Problem
from .thermo.database import SpeciesRecord
from .thermo.nasa7 import R


def formation_uncertainties(records: Sequence[SpeciesRecord], data_set: str = "") -> NDArray[np.float64]:
    """Standard uncertainty of each species' delta-f H(298.15 K), [J/mol]; an error where the data state none."""
    missing = [r.name for r in records if r.hf298_uncertainty is None]
    if missing:
        where = f"data set {data_set!r}" if data_set else "the species data"
        raise InputError(f"{where} states no uncertainty of the enthalpy of formation of {', '.join(missing[:5])}"
                         f"{' ...' if len(missing) > 5 else ''}; pass data='atct-anchored', whose species all "
                         "carry one, to have uncertainty=True")
    return np.array([float(r.hf298_uncertainty) for r in records])


def input_covariance(records: Sequence[SpeciesRecord], data_set: str = "") -> NDArray[np.float64]:
    """Covariance of the formation enthalpies of records, [(J/mol)^2].

    Independent, except a species tied to another phase's anchor
    (``hf298_tied_to``): it shares that species' uncertainty in full, so the
    two covary by the other's variance.
    """
    u = formation_uncertainties(records, data_set)
    covariance = np.diag(u**2)
    position = {r.name: i for i, r in enumerate(records)}
    for i, record in enumerate(records):
        j = position.get(record.hf298_tied_to)
        if j is not None:
            covariance[i, j] = covariance[j, i] = u[j] ** 2
    return covariance


def propagated(jacobian: NDArray[np.float64], covariance: NDArray[np.float64]) -> NDArray[np.float64]:
    """Standard uncertainty of each output, sqrt(diag(J Sigma J^T)), for J of shape (outputs, inputs)."""
    return np.sqrt(np.maximum(np.einsum("ij,jk,ik->i", jacobian, covariance, jacobian), 0.0))


def difference_jacobian(amounts_at: Callable[[NDArray[np.float64]], NDArray[np.float64]], T: float,
                        u: NDArray[np.float64], outputs: int | None = None) -> NDArray[np.float64]:
    """d n / d(delta-f H) by central differences of whole solves, [mol per J/mol].

    ``amounts_at(offsets)`` solves with ``offsets`` added to g0/RT of the
    system's species and returns every amount in the system's order (or any
    ``outputs`` figures).  The step of species j is its own uncertainty u_j,
    so each column is the secant over plus and minus one standard
    uncertainty; species with u_j = 0 move nothing.
    """
    S = u.size
    jacobian = np.zeros((S if outputs is None else outputs, S))
    for j in np.flatnonzero(u > 0.0):
        offsets = np.zeros(S)
        offsets[j] = u[j] / (R * T)
        jacobian[:, j] = (amounts_at(offsets) - amounts_at(-offsets)) / (2.0 * u[j])
    return jacobian


@dataclass(frozen=True)
class Uncertainties:
    """Standard uncertainties of one answer from the formation data.

    Attributes
    ----------
    amounts : dict
        Every species' amount, [mol].
    mole_fractions, dry_mole_fractions : dict
        Every gas species' mole fraction, wet and dry (water left out), [-]:
        propagated with the correlation of each amount and the total.
    T : float or None
        The temperature, [K], where the energy balance set it.
    """

    amounts: Mapping[str, float]
    mole_fractions: Mapping[str, float]
    dry_mole_fractions: Mapping[str, float]
    T: float | None = None


def fraction_jacobian(jacobian: NDArray[np.float64], n: NDArray[np.float64],
                      rows: NDArray[np.int_]) -> NDArray[np.float64]:
    """d y / d(delta-f H) of the mole fractions y_i = n_i / N over the species ``rows``: (dn_i - y_i dN) / N."""
    N = n[rows].sum()
    part = jacobian[rows]
    return (part - np.outer(n[rows] / N, part.sum(axis=0))) / N


def described(system, jacobian: NDArray[np.float64], covariance: NDArray[np.float64], n: NDArray[np.float64],
              T_row: NDArray[np.float64] | None = None) -> Uncertainties:
    """The uncertainties of amounts n [mol] (system order) that move by ``jacobian`` [mol per J/mol]."""
    gas = np.arange(system.n_gas)
    dry = np.array([j for j in gas if system.names[j] != WATER], dtype=int)

    def by_name(rows, values):
        return {system.names[j]: float(v) for j, v in zip(rows, values)}

    return Uncertainties(
        amounts=by_name(range(len(system.names)), propagated(jacobian, covariance)),
        mole_fractions=by_name(gas, propagated(fraction_jacobian(jacobian, n, gas), covariance)),
        dry_mole_fractions=by_name(dry, propagated(fraction_jacobian(jacobian, n, dry), covariance)),
        T=None if T_row is None else float(propagated(T_row[None, :], covariance)[0]),
    )


def _system_amounts(system, problem: Problem, result: SolverResult) -> NDArray[np.float64]:
    """The amounts of a one-point result in the system's order, [mol]."""
    n = np.zeros(len(system.names))
    n[problem.keep] = result.amounts[0]
    return n


def point_uncertainties(setup: Setup, problem: Problem, result: SolverResult, T: float, data_set: str = "",
                        amounts_at: Callable[[NDArray[np.float64]], NDArray[np.float64]] | None = None,
                        offset_map: NDArray[np.float64] | None = None) -> Uncertainties:
    """Standard uncertainties of a solved fixed-T,P point.

    ``amounts_at`` (see :func:`difference_jacobian`) replaces the implicit
    derivatives, for a gas model whose potentials depend on the composition.
    ``offset_map`` [per J/mol], shape (species, species), says how offsets on
    g0/RT that depend on the formation data (a reaction held at an approach:
    ``restricted.held_offset_map``) move with them, beside the shift dH/RT of
    g0/RT itself; with ``amounts_at`` the caller's solves carry it.
    NaN everywhere where the present phases fix T (the derivatives do not exist).
    """
    system = setup.system
    covariance = input_covariance(system.records, data_set)
    if amounts_at is None:
        jacobian = formation_enthalpy_sensitivities(setup, problem, result, T)
        if offset_map is not None:
            # The derivatives are per dH with g0/RT moved by dH/RT; an offset moves g0/RT by itself.
            jacobian = jacobian + (jacobian * (R * T)) @ offset_map
    else:
        jacobian = difference_jacobian(amounts_at, T, np.sqrt(np.diag(covariance)))
        # A species that alone holds an element is fixed by that element's balance: its differences are
        # round-off of two solves, not a derivative.
        holders = system.A != 0.0
        jacobian[np.any(holders[holders.sum(axis=1) == 1], axis=0)] = 0.0
    return described(system, jacobian, covariance, _system_amounts(system, problem, result))


def approach_uncertainty(approach) -> float:
    """Standard uncertainty [K] of a measured gas's equilibrium temperature (and so of its approach).

    ``approach`` is a ``reactions.Approach`` whose reaction was built on a data
    set that states uncertainties.  The gas's quotient Q is measured, so only K
    moves: shifts dH_j of the formation enthalpies move ln K by
    -sum_j nu_j dH_j / (R T) at every T, and T_eq, where ln K = ln Q, by
    T_eq sum_j nu_j dH_j / dH_r(T_eq).  NaN where T_eq does not exist.
    """
    if not np.isfinite(approach.T_eq):
        return float("nan")
    rx = approach.reaction
    nu = np.array(rx.coefficients, dtype=float)
    u_dG = float(propagated(nu[None, :], input_covariance(rx.records))[0])  # J/mol
    return approach.T_eq * u_dG / abs(rx.enthalpy(approach.T_eq, allow_extrapolation=True))


def energy_balance_uncertainty(setup: Setup, problem: Problem, result: SolverResult, T: float, P: float,
                               feed: Mapping[str, float], data_set: str = "") -> Uncertainties:
    """Standard uncertainties of the amounts [mol] and of the outlet temperature [K] where the energy balance set T.

    The outlet satisfies F(T, dH) = H_out(T, n(T, dH), dH) - H_in(dH) - Q = 0.
    A shift dH_j moves every h_j by dH_j, so at fixed T

        dF/dH_j = n_out,j - n_in,j + sum_i h_i(T) dn_i/dH_j,

    and dF/dT is the equilibrium heat capacity.  Implicit differentiation
    gives dT/dH_j = -(dF/dH_j) / Cp_eq and the amounts' total derivatives
    dn/dH_j = (dn/dH_j)_T + (dn/dT) dT/dH_j.  The gas is ideal (the implicit
    derivatives of :mod:`gibbsmin.sensitivity`); NaN everywhere where the
    present phases fix T (a phase plateau: Cp_eq is infinite there).

    ``feed`` is the inlet's amounts by species name [mol]; the heat input and
    the feed temperatures do not enter (dH shifts h at every T alike).
    """
    system = setup.system
    covariance = input_covariance(system.records, data_set)
    n_out = _system_amounts(system, problem, result)
    S = len(system.names)
    along = equilibrium_sensitivities(setup, problem, result, T, P, feed_species=())
    if not np.isfinite(along.heat_capacity_equilibrium):
        return described(system, np.full((S, S), np.nan), covariance, n_out, np.full(S, np.nan))
    at_T = formation_enthalpy_sensitivities(setup, problem, result, T)
    n_in = np.array([feed.get(name, 0.0) for name in system.names])
    h = R * T * system.table.h_RT(T)
    h = np.where(n_out > 0.0, h, 0.0)  # absent species: their dn is zero, and their h may lie outside the data
    dF = n_out - n_in + h @ at_T
    dT = -dF / along.heat_capacity_equilibrium
    return described(system, at_T + np.outer(along.dn_dT, dT), covariance, n_out, dT)


def carbon_limit_uncertainty(ln_activity_at: Callable[[float, NDArray[np.float64]], float], steam_to_carbon: float,
                             T: float, records: Sequence[SpeciesRecord], graphite: SpeciesRecord,
                             data_set: str = "") -> float:
    """Standard uncertainty [-] of a carbon limit in S/C, the root x of ln a_C(x, dH) = 0.

    ``ln_activity_at(x, offsets)`` is ln a_C of the gas-only equilibrium at
    S/C x with ``offsets`` on g0/RT of ``records`` (the gas species, in the
    setup's order); graphite's own g0 enters ln a_C as -g0_C(s)/RT.  By the
    implicit function theorem dx/dH_j = -(d ln a_C/dH_j) / (d ln a_C/dx): the
    numerator by central differences over plus and minus one standard
    uncertainty (as :func:`difference_jacobian`), the slope by a central
    difference in x.  Whole solves, so a cubic gas's phi moves with them.
    """
    covariance = input_covariance([*records, graphite], data_set)
    u = np.sqrt(np.diag(covariance))

    def at_root(offsets):
        return np.array([ln_activity_at(steam_to_carbon, offsets)])

    d_ln_a = np.append(difference_jacobian(at_root, T, u[:-1], outputs=1)[0], -1.0 / (R * T))
    h = 1e-4 * steam_to_carbon
    slope = (ln_activity_at(steam_to_carbon + h, None) - ln_activity_at(steam_to_carbon - h, None)) / (2.0 * h)
    return float(propagated((-d_ln_a / slope)[None, :], covariance)[0])


def batch_uncertainty(setup: Setup, problem: Problem, result: SolverResult, T: NDArray[np.float64],
                      data_set: str = "") -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """Standard uncertainties of every gas mole fraction [-] and condensed amount [mol] of a solved batch.

    Shapes (B, gas species) and (B, condensed species) in the system's order;
    point by point the implicit derivatives of
    :func:`~gibbsmin.sensitivity.formation_enthalpy_sensitivities`.  NaN where
    the present phases fix T.
    """
    system = setup.system
    covariance = input_covariance(system.records, data_set)
    G = system.n_gas
    gas = np.arange(G)
    u_y = np.full((T.size, G), np.nan)
    u_condensed = np.full((T.size, len(system.names) - G), np.nan)
    for i in range(T.size):
        point, answer = problem.take([i]), result.take([i])
        jacobian = formation_enthalpy_sensitivities(setup, point, answer, float(T[i]))
        n = _system_amounts(system, point, answer)
        u_y[i] = propagated(fraction_jacobian(jacobian, n, gas), covariance)
        u_condensed[i] = propagated(jacobian[G:], covariance)
    return u_y, u_condensed
