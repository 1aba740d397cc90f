"""Solving a run of sweep points as batches, with certified answers only.

Every executor (in-process, local processes, a Dask cluster) calls
``solve_points`` on a range of point numbers; the answer depends on nothing
else, so a chunk solved twice gives the same table.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

if TYPE_CHECKING:
    import pandas as pd

from ..api import prepared_for
from ..prepared import Prepared
from ..fixed_step import Setup
from ..eos.stability import tangent_plane_test
from ..uncertainty import batch_uncertainty
from ..thermo.datasets import data_set
from .grid import SweepSpec

#: Columns every sweep table has besides the axes and the species.
SUMMARY_COLUMNS = ("point", "T_K", "P_Pa", "certified", "solver", "iterations",
                   "element_balance", "stationarity", "condensed_margin")


def prepared_sweep(spec: SweepSpec) -> tuple[Prepared, Setup]:
    """The sweep's prepared specification and the setup of its feed species (unit amounts: they fix the species
    set and element rows; each point brings its own totals)."""
    prepared = prepared_for(spec.specification(), data_set(spec.data))
    return prepared, prepared.feed_setup({n: 1.0 for n in spec.feed_species()}, spec.T_span())


def solve_points(spec: SweepSpec, first: int, last: int) -> pd.DataFrame:
    """The table of points first..last-1: axis values, T, P, gas mole fractions, condensed amounts, certificate.

    Points are solved by the sweep's method (by default Newton in runs along
    the last axis, each point warm-started from its neighbour, and the cone for
    any point Newton cannot certify), marked by its ``solver``; a point no
    solver certifies keeps ``certified = False``.  No point is dropped.
    """
    import pandas as pd  # optional heavy dependency: loaded where a table is made

    db = data_set(spec.data)
    prepared, setup = prepared_sweep(spec)
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
    if spec.uncertainty:
        u_y, u_condensed = np.full((B, n_gas), np.nan), np.full((B, len(system.names) - n_gas), np.nan)
    x, liquid_fraction = np.full((B, n_gas), np.nan), np.zeros(B)
    for group in _element_groups(b):
        problem, result, certificates = prepared.solve_batch(setup, T[group], P[group], b[group],
                                                             chains=max(1, group.size // run))
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
            u_y[group], u_condensed[group] = batch_uncertainty(setup, problem, result, T[group], spec.data)
        if spec.liquid:
            _split_points(prepared, setup, group, T, P, feed, spec.feed_species(db), y, x, liquid_fraction,
                          n_condensed, certified, iterations, solver, summary)
    columns: dict[str, object] = {"point": np.arange(first, last)}
    columns.update(shown)
    columns.update({"T_K": T, "P_Pa": P})
    columns.update({f"y_{name}": y[:, j] for j, name in enumerate(system.gas_names)})
    columns.update({f"n_{name}": n_condensed[:, j] for j, name in enumerate(system.condensed_names)})
    if spec.liquid:
        columns["liquid_fraction"] = liquid_fraction
        columns.update({f"x_{name}": x[:, j] for j, name in enumerate(system.gas_names)})
    if spec.uncertainty:
        columns.update({f"u_y_{name}": u_y[:, j] for j, name in enumerate(system.gas_names)})
        columns.update({f"u_n_{name}": u_condensed[:, j] for j, name in enumerate(system.condensed_names)})
    columns.update({"certified": certified, "solver": pd.Categorical(solver), "iterations": iterations})
    columns.update(summary)
    return pd.DataFrame(columns)


def _split_points(prepared: Prepared, setup: Setup, group, T, P, feed, feed_names, y, x, liquid_fraction,
                  n_condensed, certified, iterations, solver, summary) -> None:
    """The points of a batch whose gas the tangent-plane test finds unstable, flashed through the pipeline in
    order, each warm-started from the one before (``equilibrate_many``: split into gas and liquid, certified
    over every phase), written over their one-gas rows."""
    system = setup.system
    phase = prepared.gas_phase_of(setup)
    unstable = []
    for i in group:
        z = y[i, phase.described]
        if np.all(np.isfinite(z)) and z.sum() > 0.0 and not tangent_plane_test(
                phase.model, float(T[i]), float(P[i]), z / z.sum()).stable:
            unstable.append(i)
    if not unstable:
        return
    answers = prepared.equilibrate_many([dict(zip(feed_names, map(float, feed[i]))) for i in unstable],
                                        T[unstable], P[unstable])
    for i, eq in zip(unstable, answers):
        if eq.fluid_phases is None:
            continue
        fluid_total = sum(p.amount for p in eq.fluid_phases)
        liquid_fraction[i] = eq.liquid_amount / fluid_total
        fractions = eq.mole_fractions if eq.gas_present else {}
        y[i] = [fractions.get(name, np.nan) for name in system.gas_names]
        first_liquid = next(p for p in eq.fluid_phases if p.name != "gas")
        x[i] = [first_liquid.mole_fractions.get(name, 0.0) for name in system.gas_names]
        n_condensed[i] = [eq.amounts[name] for name in system.condensed_names]
        c = eq.certificate
        certified[i], iterations[i], solver[i] = c.certified, c.iterations, c.solver[:16]
        summary["element_balance"][i], summary["stationarity"][i] = c.element_balance, c.stationarity
        summary["condensed_margin"][i] = c.complementarity


def _element_groups(b: np.ndarray) -> list[np.ndarray]:
    """Points grouped by which elements they contain (a solve needs one element set)."""
    present = b / np.maximum(b.max(axis=1, keepdims=True), 1e-300) > 1e-14
    if np.all(present == present[0]):
        return [np.arange(b.shape[0])]
    codes = present @ (1 << np.arange(present.shape[1], dtype=np.int64))
    return [np.flatnonzero(codes == code) for code in np.unique(codes)]
