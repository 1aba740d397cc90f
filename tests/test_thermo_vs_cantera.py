"""Every shipped species evaluated by gibbsmin against Cantera's own evaluation.

Reference: Cantera 3.2 (D. G. Goodwin et al., https://cantera.org) evaluating
the NASA 7-coefficient polynomials of McBride, Gordon and Reno, NASA TM-4513
(1993), as shipped in its files ``nasa_gas.yaml`` and ``nasa_condensed.yaml``.
Each of our species is matched to Cantera's by the ``nasa_name`` our TOML
files record.  Agreement to 1e-10 proves the loader (coefficients, ranges and
their order) and the evaluator (formulas, range switch) together.
"""

import tomllib
from pathlib import Path

import numpy as np
import pytest

ct = pytest.importorskip("cantera")

from gibbsmin.thermo import R, data_set  # noqa: E402

#: Cantera evaluates the NASA polynomials as published: the data set "nasa-1993", named.
NASA = data_set("nasa-1993")

SPECIES_DIR = Path(__file__).resolve().parent.parent / "species"
POINTS_PER_RANGE = 20

# Both evaluators compute the same double-precision polynomial; differences
# are rounding only (about 1e-15 of the largest term).  1e-10 relative leaves
# a wide margin for rounding yet catches any wrong digit in a coefficient.
# The absolute floor, in the dimensionless units cp/R, h/RT, s/R and g/RT,
# serves the points where a property crosses zero (h of H2 near 298 K is
# 1e-5 J/mol); 1e-10 there is 2.5e-7 J/mol at 298 K.
RTOL = 1e-10
ATOL = 1e-10


def _nasa_names() -> dict[str, tuple[str, str]]:
    """Our species name -> (Cantera file, name in that file), read from the shipped TOML."""
    names = {}
    for filename in ("gas.toml", "condensed.toml"):
        document = tomllib.loads((SPECIES_DIR / filename).read_text(encoding="utf-8"))
        cantera_file = "nasa_gas.yaml" if filename == "gas.toml" else "nasa_condensed.yaml"
        for entry in document["species"]:
            names[entry["name"]] = (cantera_file, entry["nasa_name"])
    return names


NASA_NAMES = _nasa_names()


@pytest.fixture(scope="module")
def cantera_species():
    found = {}
    for cantera_file in ("nasa_gas.yaml", "nasa_condensed.yaml"):
        found[cantera_file] = {s.name: s for s in ct.Species.list_from_file(cantera_file)}
    return found


def _reference_species(cantera_species, name):
    cantera_file, nasa_name = NASA_NAMES[name]
    return cantera_species[cantera_file][nasa_name]


def _fitted_ranges(species) -> list[float]:
    # Cantera reports a one-fit species' ranges as [T_min, T_max, T_max].
    return sorted(set(species.input_data["thermo"]["temperature-ranges"]))


def _temperature_grid(species) -> np.ndarray:
    """POINTS_PER_RANGE temperatures in each fitted range, both ends included."""
    ranges = _fitted_ranges(species)
    return np.concatenate([np.linspace(lo, hi, POINTS_PER_RANGE) for lo, hi in zip(ranges, ranges[1:])])


def test_every_shipped_species_is_compared():
    db = NASA
    assert set(NASA_NAMES) == set(db.names)
    assert len(NASA_NAMES) == len(db)


def _ours_and_cantera(name, cantera_species):
    """Temperatures, and our and Cantera's dimensionless properties at them."""
    reference = _reference_species(cantera_species, name)
    T = _temperature_grid(reference)
    table = NASA.nasa7([name])
    # Cantera returns per kmol: J/(kmol K) and J/kmol; its gas constant is per kmol.
    R_kmol = ct.gas_constant
    thermo = reference.thermo
    expected = {
        "cp/R": np.array([thermo.cp(t) for t in T]) / R_kmol,
        "h/RT": np.array([thermo.h(t) for t in T]) / (R_kmol * T),
        "s/R": np.array([thermo.s(t) for t in T]) / R_kmol,
    }
    expected["g/RT"] = expected["h/RT"] - expected["s/R"]
    ours = {
        "cp/R": table.cp_R(T)[:, 0],
        "h/RT": table.h_RT(T)[:, 0],
        "s/R": table.s_R(T)[:, 0],
        "g/RT": table.g_RT(T)[:, 0],
    }
    return T, ours, expected


@pytest.mark.parametrize("name", sorted(NASA_NAMES))
def test_nasa7_properties_equal_cantera(name, cantera_species):
    _, ours, expected = _ours_and_cantera(name, cantera_species)
    for quantity in expected:
        np.testing.assert_allclose(
            ours[quantity], expected[quantity], rtol=RTOL, atol=ATOL,
            err_msg=f"{name} ({NASA_NAMES[name][1]}): {quantity}",
        )


@pytest.mark.parametrize("name", sorted(NASA_NAMES))
def test_ranges_composition_and_hf298_equal_cantera(name, cantera_species):
    reference = _reference_species(cantera_species, name)
    record = NASA[name]
    assert record.T_ranges == tuple(_fitted_ranges(reference))
    table = NASA.nasa7([name])
    assert table.T_min[0] == reference.thermo.min_temp
    assert table.T_max[0] == reference.thermo.max_temp
    # The formula field must give the composition Cantera holds for the species.
    assert dict(record.elements) == pytest.approx({el: n for el, n in reference.composition.items()})
    # hf298 in our file is the polynomial's h at 298.15 K [J/mol]; Cantera's is per kmol.
    # Single-range condensed species that begin above 298.15 K (S(l)) are extrapolated,
    # as the NASA convention does for their hf298 too.
    assert record.hf298 == pytest.approx(reference.thermo.h(298.15) / 1000.0, rel=1e-10, abs=1e-6)


def test_molar_gas_constant_equals_cantera():
    # Source: Cantera's ct.gas_constant (CODATA 2018 exact value) per kmol.
    assert R == pytest.approx(ct.gas_constant / 1000.0, rel=1e-15)


def test_worst_deviation_is_within_tolerance(cantera_species, capsys):
    """All species at once, printing the worst deviation (relative, floored at 1 for values near 0)."""
    worst = (0.0, "", "", 0.0)
    for name in NASA_NAMES:
        T, ours, expected = _ours_and_cantera(name, cantera_species)
        for quantity in expected:
            scale = np.maximum(np.abs(expected[quantity]), ATOL / RTOL)
            relative = np.abs(ours[quantity] - expected[quantity]) / scale
            k = int(np.argmax(relative))
            if relative[k] > worst[0]:
                worst = (float(relative[k]), name, quantity, float(T[k]))
    with capsys.disabled():
        print(f"\nworst deviation from Cantera: {worst[0]:.2e} relative ({worst[1]}, {worst[2]}, T = {worst[3]:g} K)")
    assert worst[0] < RTOL
