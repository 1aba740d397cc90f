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
