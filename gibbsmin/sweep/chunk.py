"""Solving a run of sweep points as batches, with certified answers only.

Every executor (in-process, local processes, a Dask cluster) calls
``solve_points`` on a range of point numbers; the answer depends on nothing
else, so a chunk solved twice gives the same table.
"""

from __future__ import annotations

import functools

import numpy as np
import pandas as pd

from ..settle import Setup, build_problem, prepare
from ..solve import solve
from ..thermo.datasets import data_set
from .grid import SweepSpec

#: Columns every sweep table has besides the axes and the species.
SUMMARY_COLUMNS = ("point", "T_K", "P_Pa", "certified", "solver", "iterations",
                   "element_balance", "stationarity", "condensed_margin")


@functools.lru_cache(maxsize=8)
def _gas_phase(spec_json: str):
    """The sweep's cubic gas model on its species set (None for the ideal gas)."""
    spec = SweepSpec.from_json(spec_json)
    if spec.gas == "ideal":
        return None
    from ..nonideal import gas_phase

    kij = spec.kij
    if spec.kij_pairs:
        from ..eos import InteractionTable, default_interactions

        base = default_interactions() if spec.kij == "shipped" else InteractionTable([])
        kij = base.updated({(a, b): v for a, b, v in spec.kij_pairs}, model=spec.gas, source="sweep")
    return gas_phase(_setup(spec_json).system, spec.gas, kij=kij)


@functools.lru_cache(maxsize=8)
def _setup(spec_json: str) -> Setup:
    spec = SweepSpec.from_json(spec_json)
    names = spec.feed_species()
    # Unit amounts only fix the species set and element rows; each point brings its own totals.
    return prepare({n: 1.0 for n in names}, species=spec.species, exclude=spec.exclude, inert=spec.inert,
                   T_span=spec.T_span(), db=data_set(spec.data))


def solve_points(spec: SweepSpec, first: int, last: int) -> pd.DataFrame:
    """The table of points first..last-1: axis values, T, P, gas mole fractions, condensed amounts, certificate.

    Points are solved by the sweep's method (by default Newton in runs along
    the last axis, each point warm-started from its neighbour, and the cone for
    any point Newton cannot certify), marked by its ``solver``; a point no
    solver certifies keeps ``certified = False``.  No point is dropped.
    """
    db = data_set(spec.data)
    setup = _setup(spec.to_json())
    system = setup.system
    T, P, feed, shown = spec.conditions(first, last, db)
    feed_matrix = system.element_matrix(db.resolve(spec.feed_species(db)))
    b = feed @ feed_matrix.T
    B = last - first
    n_gas = system.n_gas
    y = np.zeros((B, n_gas))
    n_condensed = np.zeros((B, len(system.names) - n_gas))
    summary = {name: np.zeros(B) for name in ("element_balance", "stationarity", "condensed_margin")}
    certified = np.zeros(B, dtype=bool)
    iterations = np.zeros(B, dtype=int)
    solver = np.empty(B, dtype="<U16")
    run = spec.shape[-1]
    phase = _gas_phase(spec.to_json())
    if spec.uncertainty:
        u_y, u_condensed = np.full((B, n_gas), np.nan), np.full((B, len(system.names) - n_gas), np.nan)
    for group in _element_groups(b):
        problem = build_problem(setup, T[group], P[group], b=b[group])
        chains = max(1, group.size // run)
        if phase is None:
            result, certificates = solve(problem, spec.method, chains=chains)
        else:
            from ..nonideal import solve_batch_nonideal

            result, certificates = solve_batch_nonideal(problem, phase, T[group], P[group], method=spec.method,
                                                        chains=chains)
        keep = problem.keep
        gas_keep = keep[keep < n_gas]
        with np.errstate(divide="ignore", invalid="ignore"):  # NaN where the gas is absent (all liquid water)
            ln_y = result.ln_n_gas - np.log(np.exp(result.ln_n_gas).sum(axis=1, keepdims=True))
        y[np.ix_(group, gas_keep)] = np.exp(ln_y)
        n_condensed[np.ix_(group, keep[keep >= n_gas] - n_gas)] = result.n_condensed
        certified[group] = certificates.certified
        iterations[group] = certificates.iterations
        solver[group] = certificates.solver
        summary["element_balance"][group] = certificates.element_balance
        summary["stationarity"][group] = certificates.stationarity
        summary["condensed_margin"][group] = certificates.complementarity
        if spec.uncertainty:
            from ..uncertainty import batch_uncertainty

            u_y[group], u_condensed[group] = batch_uncertainty(setup, problem, result, T[group], spec.data)
    columns: dict[str, object] = {"point": np.arange(first, last)}
    columns.update(shown)
    columns.update({"T_K": T, "P_Pa": P})
    columns.update({f"y_{name}": y[:, j] for j, name in enumerate(system.gas_names)})
    columns.update({f"n_{name}": n_condensed[:, j] for j, name in enumerate(system.condensed_names)})
    if spec.uncertainty:
        columns.update({f"u_y_{name}": u_y[:, j] for j, name in enumerate(system.gas_names)})
        columns.update({f"u_n_{name}": u_condensed[:, j] for j, name in enumerate(system.condensed_names)})
    columns.update({"certified": certified, "solver": pd.Categorical(solver), "iterations": iterations})
    columns.update(summary)
    return pd.DataFrame(columns)


def _element_groups(b: np.ndarray) -> list[np.ndarray]:
    """Points grouped by which elements they contain (a solve needs one element set)."""
    present = b / np.maximum(b.max(axis=1, keepdims=True), 1e-300) > 1e-14
    if np.all(present == present[0]):
        return [np.arange(b.shape[0])]
    codes = present @ (1 << np.arange(present.shape[1], dtype=np.int64))
    return [np.flatnonzero(codes == code) for code in np.unique(codes)]
