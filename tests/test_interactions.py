"""The shipped kij table: its content against its source, and the loader's checks.

Source of the values: the ChemSep Peng-Robinson kij table (Kooijman and
Taylor, ChemSep) as distributed with the `thermo` package (Bell et al.,
version 0.6, table "ChemSep PR"), key ``chemsep-pr`` in species/SOURCES.md.
"""

from __future__ import annotations

import pytest
from thermo.interaction_parameters import IPDB

import gibbsmin
from gibbsmin.errors import DataError
from gibbsmin.eos import default_interactions, load_interactions

DB = gibbsmin.default_database()


def test_every_shipped_value_is_the_sources_value():
    table = default_interactions()
    assert len(table) > 100
    for entry in table:
        a, b = entry.species
        cas = [DB[a].critical.CAS, DB[b].critical.CAS]
        assert IPDB.has_ip_specific("ChemSep PR", cas, "kij")
        assert entry.kij == IPDB.get_ip_specific("ChemSep PR", cas, "kij")
        assert entry.model == "peng-robinson" and entry.source == "chemsep-pr"


def test_no_pair_of_the_source_is_left_out():
    described = [r for r in DB if r.is_gas and r.critical is not None]
    shipped = {frozenset(e.species) for e in default_interactions()}
    for i, a in enumerate(described):
        for b in described[i + 1:]:
            if IPDB.has_ip_specific("ChemSep PR", [a.critical.CAS, b.critical.CAS], "kij"):
                assert frozenset((a.name, b.name)) in shipped, (a.name, b.name)


def test_look_up_is_by_unordered_pair_and_model():
    table = default_interactions()
    assert table.entry("pr", "NH3", "N2").kij == 0.2193
    assert table.entry("peng-robinson", "N2", "NH3").page == "p326"
    assert table.entry("srk", "N2", "NH3") is None
    assert table.for_model("srk") == {}
    assert set(table.for_model("pr", ["H2", "N2", "NH3"])) == {("H2", "N2"), ("N2", "NH3")}


@pytest.mark.parametrize(("text", "message"), [
    ('[[pair]]\nspecies = ["H2", "N2"]\nmodel = "peng-robinson"\nkij = 0.1\n', "missing key 'source'"),
    ('[[pair]]\nspecies = ["H2"]\nmodel = "peng-robinson"\nkij = 0.1\nsource = "x"\n', "list of two names"),
    ('[[pair]]\nspecies = ["H2", "H2"]\nmodel = "peng-robinson"\nkij = 0.1\nsource = "x"\n', "twice"),
    ('[[pair]]\nspecies = ["H2", "Xe9"]\nmodel = "peng-robinson"\nkij = 0.1\nsource = "x"\n', "'Xe9' is not"),
    ('[[pair]]\nspecies = ["H2", "N2"]\nmodel = "virial"\nkij = 0.1\nsource = "x"\n', "not a cubic"),
    ('[[pair]]\nspecies = ["H2", "N2"]\nmodel = "srk"\nkij = 1.2\nsource = "x"\n', "between -1 and 1"),
    ('[[pair]]\nspecies = ["H2", "N2"]\nmodel = "srk"\nkij = 0.1\nsource = "x"\n'
     '[[pair]]\nspecies = ["N2", "H2"]\nmodel = "srk"\nkij = 0.2\nsource = "x"\n', "given twice"),
    ("[[pair]\n", "not valid TOML"),
])
def test_a_bad_table_is_refused_with_the_entry_named(tmp_path, text, message):
    path = tmp_path / "interactions.toml"
    path.write_text(text, encoding="utf-8")
    with pytest.raises(DataError, match=message):
        load_interactions(path, gas_species=[r.name for r in DB if r.is_gas])


def test_a_missing_table_is_named():
    with pytest.raises(DataError, match="not found"):
        load_interactions("/nonexistent/interactions.toml")


def test_own_pairs_over_the_shipped_table():
    table = default_interactions().updated({("NH3", "H2"): 0.05})
    assert table.entry("pr", "H2", "NH3").kij == 0.05 and table.entry("pr", "H2", "NH3").source == "given"
    assert table.entry("pr", "N2", "NH3").kij == 0.2193  # the rest of the shipped table stays
    assert len(table) == len(default_interactions()) + 1
    replaced = default_interactions().updated({("N2", "NH3"): 0.1})
    assert replaced.entry("pr", "NH3", "N2").kij == 0.1 and len(replaced) == len(default_interactions())
    with pytest.raises(gibbsmin.InputError, match="between -1 and 1"):
        default_interactions().updated({("H2", "NH3"): 1.5})
    with pytest.raises(gibbsmin.InputError, match="pairs of species names"):
        default_interactions().updated({"H2": 0.1})


def test_a_table_reaches_the_equation_of_state():
    # The answer with the table equals the answer with the same pairs given as a plain mapping.
    import gibbsmin as g

    feed, T, P = {"H2": 3.0, "N2": 1.0}, 723.15, 200e5
    table = default_interactions().updated({("H2", "NH3"): 0.05})
    with_table = g.equilibrate(feed, T, P, gas="peng-robinson", kij=table)
    pairs = {("H2", "N2"): 0.0711, ("N2", "NH3"): 0.2193, ("H2", "NH3"): 0.05}
    with_pairs = g.equilibrate(feed, T, P, gas="peng-robinson", kij=pairs)
    assert with_table.mole_fractions["NH3"] == pytest.approx(with_pairs.mole_fractions["NH3"], rel=1e-12)
    assert with_table.extras["binary_interactions"]["H2-NH3"] == 0.05
    shipped = g.equilibrate(feed, T, P, gas="peng-robinson")
    assert with_table.mole_fractions["NH3"] != pytest.approx(shipped.mole_fractions["NH3"], rel=1e-7)


def test_case_file_pairs_and_their_errors(tmp_path):
    from gibbsmin.case import CaseError, parse_case, settle_case

    base = ('[feed]\nunit = "kmol/h"\nH2 = 3.0\nN2 = 1.0\n[conditions]\nT = "450 degC"\nP = "200 bar"\n'
            'gas = "peng-robinson"\n')
    case = parse_case(base + '[conditions.kij_pairs]\n"H2 NH3" = 0.05\n')
    assert case.stages[0].kij_pairs == {("H2", "NH3"): 0.05}
    eq = settle_case(case).stages[0].equilibrium
    assert eq.extras["binary_interactions"]["H2-NH3"] == 0.05
    for text, words in (('"H2" = 0.05', "not a pair"), ('"H2 NH4" = 0.05', "unknown species"),
                        ('"H2 OH" = 0.05', "no critical constants"), ('"H2 NH3" = 2.0', "between -1 and 1"),
                        ('"H2 H2" = 0.05', "twice")):
        with pytest.raises(CaseError, match=words):
            parse_case(base + "[conditions.kij_pairs]\n" + text + "\n")
    with pytest.raises(CaseError, match="only goes with a cubic"):
        parse_case(base.replace('gas = "peng-robinson"\n', "") + '[conditions.kij_pairs]\n"H2 NH3" = 0.05\n')


def test_sweep_takes_the_own_pairs():
    import numpy as np

    from gibbsmin.sweep import SweepSpec, grid, solve_points

    spec = SweepSpec(feed={"H2": 3.0, "N2": 1.0}, T=723.15, P=200e5, axes=(grid("T", [700.0, 750.0]),),
                     gas="peng-robinson", kij_pairs=(("H2", "NH3", 0.05),))
    assert SweepSpec.from_json(spec.to_json()) == spec
    table = solve_points(spec, 0, 2)
    own = default_interactions().updated({("H2", "NH3"): 0.05})
    for T, y in zip(table["T_K"], table["y_NH3"]):
        eq = gibbsmin.equilibrate({"H2": 3.0, "N2": 1.0}, T, 200e5, gas="peng-robinson", kij=own)
        assert y == pytest.approx(eq.mole_fractions["NH3"], rel=1e-8)
    assert np.all(table["certified"])
