"""Sweep pictures: they draw what the table holds (checks of our own plotting, no outside source)."""

from __future__ import annotations

import numpy as np
import pytest

import gibbsmin
from gibbsmin.sweep import SweepSpec, grid, run_sweep
from gibbsmin.sweep.plots import carbon_map, equilibrium_curve, lines


@pytest.fixture(scope="module")
def reformer_table():
    spec = SweepSpec(feed={"CH4": 1.0, "H2O": 2.0}, T=1000.0, P=30e5,
                     axes=(grid("S/C", np.linspace(0.4, 2.0, 9)), grid("T", np.linspace(750.0, 1250.0, 11))),
                     species=("CH4", "H2O", "CO", "CO2", "H2", "C(s)"))
    return run_sweep(spec)


def test_carbon_map_draws_the_graphite_boundary(reformer_table, tmp_path):
    assert 0 < reformer_table["n_C(s)"].gt(0).mean() < 1
    figure = carbon_map(reformer_table, "T", "S/C", "y_H2")
    axes = figure.axes[0]
    assert axes.get_xlabel() == "T" and axes.get_ylabel() == "S/C"
    assert axes.collections, "a filled map"
    assert any("graphite boundary" in text.get_text() for text in axes.get_legend().get_texts())
    figure.savefig(tmp_path / "map.png")
    assert (tmp_path / "map.png").stat().st_size > 10_000


def test_lines_one_per_group(reformer_table):
    figure = lines(reformer_table, "T", ["y_CH4"], by="S/C")
    assert len(figure.axes[0].get_lines()) == 9


def test_equilibrium_curve_with_operating_line(reformer_table):
    part = reformer_table[reformer_table["S/C"] == 2.0]
    line = part.iloc[::3][["T", "y_CH4"]]
    figure = equilibrium_curve(part, "T", "y_CH4", operating_line=line)
    drawn = figure.axes[0].get_lines()
    assert len(drawn) == 2
    np.testing.assert_allclose(drawn[0].get_ydata(), 100 * part.sort_values("T")["y_CH4"])


def test_missing_column_is_named(reformer_table):
    with pytest.raises(gibbsmin.InputError, match="no column 'y_NH3'"):
        carbon_map(reformer_table, "T", "S/C", "y_NH3")
