"""The data set "atct-anchored": NASA polynomials re-anchored to ATcT 1.112 at 298.15 K.

Outside references: the Active Thermochemical Tables 1.112 (Ruscic et al.; the
tables the `chemicals` package ships, read here straight from that package, not
from our files), and the NIST-JANAF Thermochemical Tables (Chase 1998, 4th ed.,
through the `janaf` package, as in test_formation_vs_janaf.py).
"""

import re
import tomllib
from pathlib import Path

import numpy as np
import pytest

import gibbsmin
from checksums import assert_unchanged
from gibbsmin import formation_properties
from gibbsmin.formula import parse_formula
from gibbsmin.thermo import DATA_SETS, data_set, default_database

SPECIES_DIR = Path(__file__).resolve().parent.parent / "species"
ANCHORED_DIR = SPECIES_DIR / "atct-anchored"

# Set by hand after a deliberate regeneration (python species/build_anchored.py), never by the test.
ANCHORED_DIGESTS = {
    "gas.toml": "98946ef6ced0213b13ecf632aa364e7d116d80264e88b42597de42aec319eb8d",
    "condensed.toml": "663d6c72dd36ab30c2e6e6a0fba8c5c5a8ae63cc2a3f8482e86c07bfe5d6f33e",
}
ANCHORED_COUNTS = {"gas.toml": 82, "condensed.toml": 10}
# Species the ATcT 1.112 files lack (measured when the set was built; the test below checks it).
NOT_IN_ATCT = {"nC5H12", "iC5H12", "C4H6", "HCOOH", "CH3COOH", "H2S", "COS", "CS2", "SO2", "SO3", "SO",
               "SH", "S2", "S", "S(s,monoclinic)", "S(l)"}
# Condensed species ATcT lacks that move with their other phase, which ATcT has (build_anchored.TIED).
TIED = {"H2O(s)": "H2O(l)", "C6H6(l)": "C6H6"}
# Liquids the shipped NASA file lacks, built by build_anchored.NEW_LIQUIDS (checked in test_methanol_liquid.py).
BUILT_HERE = {"condensed.toml": ["CH3OH(l)"], "gas.toml": []}


@pytest.fixture(scope="module")
def anchored():
    return data_set("atct-anchored")


@pytest.fixture(scope="module")
def atct():
    reaction = pytest.importorskip("chemicals.reaction")
    return reaction.Hfg_ATcT_data, reaction.Hfl_ATcT_data


def _entries(filename):
    return tomllib.loads((ANCHORED_DIR / filename).read_text(encoding="utf-8"))["species"]


def _atct_formula_counts(text):
    # ATcT writes structural formulas: "CH3CH2OH (g)", "O2NNO2 (g)", "(CH2OH)2 (g)".
    text = text.rsplit(" (", 1)[0]
    while "(" in text:
        text = re.sub(r"\(([^()]*)\)(\d*)", lambda m: m.group(1) * int(m.group(2) or 1), text)
    return dict(parse_formula(text))


# ---------------------------------------------------------------- shape and checksum


@pytest.mark.parametrize("filename", sorted(ANCHORED_DIGESTS))
def test_anchored_file_checksum(filename):
    assert_unchanged(ANCHORED_DIR / filename, ANCHORED_DIGESTS[filename], "species/build_anchored.py",
                     "ANCHORED_DIGESTS in tests/test_data_sets.py")


@pytest.mark.parametrize("filename", sorted(ANCHORED_COUNTS))
def test_anchored_file_shape(filename):
    entries = _entries(filename)
    assert len(entries) == ANCHORED_COUNTS[filename]
    shipped = tomllib.loads((SPECIES_DIR / filename).read_text(encoding="utf-8"))["species"]
    assert [e["name"] for e in entries] == [e["name"] for e in shipped] + BUILT_HERE[filename]
    for entry, raw in zip(entries, shipped):
        # Only a6 moves, by the same amount in both ranges; everything else is the shipped entry.
        for key in ("low", "high"):
            if key in raw:
                assert entry[key][:5] == raw[key][:5] and entry[key][6] == raw[key][6]
                assert (entry[key][5] - raw[key][5]) * gibbsmin.thermo.R == pytest.approx(entry["hf298_shift"],
                                                                                        abs=1e-6)
        assert entry.get("critical") == raw.get("critical")
        assert entry["hf298_uncertainty"] >= 0.0
        assert entry["hf298"] == pytest.approx(raw["hf298"] + entry["hf298_shift"], abs=1e-6)


def test_anchored_sources_are_listed():
    text = (SPECIES_DIR / "SOURCES.md").read_text(encoding="utf-8")
    keys = set(re.findall(r"^\|\s*`([^`]+)`\s*\|", text, flags=re.MULTILINE))
    used = {e["hf298_source"] for f in ANCHORED_COUNTS for e in _entries(f)}
    assert used == {"atct-1.112", "nasa-tm4513", "reference-state"}
    assert used <= keys
    # The polynomials' own sources (compound keys name one source per part).
    polynomials = {part for f in ANCHORED_COUNTS for e in _entries(f) for part in e["source"].split("/")}
    assert polynomials == {"nasa-tm4513", "zabransky-1996", "nist-webbook"}
    assert polynomials <= keys


def test_the_data_sets_are_named(anchored):
    assert set(DATA_SETS) == {"nasa-1993", "atct-anchored"}
    assert anchored.data_set == "atct-anchored"
    assert data_set("atct-anchored") is default_database()  # the default set
    assert default_database().data_set == "atct-anchored"
    assert data_set("nasa-1993").data_set == "nasa-1993"
    with pytest.raises(gibbsmin.InputError, match="unknown data set 'atct'; choose one of nasa-1993, atct-anchored"):
        data_set("atct")


# ---------------------------------------------------------------- against ATcT


def _atct_value(tables, entry):
    gas, liquid = tables
    table, column = (gas, "Hfg") if entry["state"] == "gas" else (liquid, "Hfl")
    return table, column


def test_every_anchored_enthalpy_of_formation_is_atct(anchored, atct):
    # ATcT 1.112 (Ruscic et al.), via chemicals: delta-f H(298.15 K) to 1 J/mol, the stated
    # uncertainty halved (a 95 % interval, from memory), and the ATcT entry's formula ours.
    checked = 0
    for filename in ANCHORED_COUNTS:
        for entry in _entries(filename):
            if entry["hf298_source"] != "atct-1.112":
                continue
            table, column = _atct_value(atct, entry)
            cas = next(c for c, row in table.iterrows()
                       if f"{row['Chemical']} ({row['Formula']})" == entry["atct_entry"])
            row = table.loc[cas]
            assert _atct_formula_counts(row["Formula"]) == dict(parse_formula(entry["formula"])), entry["name"]
            ours = formation_properties([entry["name"]], [298.15], db=anchored).dH[0, 0]
            assert ours == pytest.approx(float(row[column]), abs=1.0), entry["name"]
            assert anchored[entry["name"]].hf298_uncertainty == pytest.approx(float(row["uncertainty"]) / 2.0)
            checked += 1
    assert checked == sum(ANCHORED_COUNTS.values()) - len(NOT_IN_ATCT) - len(TIED) - 2  # graphite, rhombic S


def test_species_atct_lacks_keep_nasa_values(anchored, atct):
    gas, liquid = atct
    for name in NOT_IN_ATCT:
        record, raw = anchored[name], default_database()[name]
        assert record.hf298_source == "nasa-tm4513"
        assert record.low == raw.low and record.high == raw.high
        assert record.hf298_uncertainty == 2000.0  # the stated default of build_anchored.py
        table = gas if record.is_gas else liquid
        assert not _named_cas(name) & set(table.index), name


def test_tied_phases_move_with_their_other_phase(anchored, atct):
    gas, liquid = atct
    for name, parent in TIED.items():
        record, raw = anchored[name], default_database()[name]
        assert record.hf298_tied_to == parent
        assert not _named_cas(name) & set(liquid.index)
        shift = anchored[parent].hf298 - default_database()[parent].hf298
        assert record.hf298 - raw.hf298 == pytest.approx(shift, abs=1e-6)
        assert record.hf298_uncertainty == pytest.approx(np.hypot(anchored[parent].hf298_uncertainty, 2000.0))


@pytest.mark.parametrize("pair, bracket", [(("H2O(s)", "H2O(l)"), (272.0, 274.0)),
                                           (("C6H6(l)", "C6H6"), (300.0, 400.0))])
def test_phase_change_temperatures_are_kept(anchored, pair, bracket):
    # Ice melts and benzene boils (at 1 bar) where the NASA data put it: the anchoring moved both
    # phases alike.  Anchoring benzene's gas alone would move the boiling point by 3.5 K (measured; ice: 0.15 K).
    import scipy.optimize

    def crossing(db):
        table = db.nasa7(list(pair))
        return scipy.optimize.brentq(lambda T: float(np.diff(table.g_RT(T))[0]), *bracket, xtol=1e-12)

    assert crossing(anchored) == pytest.approx(crossing(default_database()), abs=1e-6)


def _named_cas(name):
    # CAS numbers of the shipped species that have one (critical constants), for the check above.
    record = default_database()[name]
    return {record.critical.CAS} if record.critical is not None else set()


def test_reference_forms_are_zero(anchored):
    for name in ("H2", "O2", "N2", "C(s)", "S(s)", "Ar", "He"):
        assert anchored[name].hf298 == 0.0
        assert anchored[name].hf298_uncertainty == 0.0


def test_heat_capacity_and_entropy_unchanged(anchored):
    T = np.array([250.0, 298.15, 600.0, 999.0, 1001.0, 1500.0, 3000.0])
    names = [n for n in anchored.names if anchored[n].T_min <= 250.0 and anchored[n].T_max >= 3000.0]
    raw, new = default_database().nasa7(names), anchored.nasa7(names)
    np.testing.assert_array_equal(new.cp_R(T), raw.cp_R(T))
    np.testing.assert_allclose(new.s_R(T), raw.s_R(T), rtol=0, atol=1e-12)
    shifts = np.array([(anchored[n].hf298 - default_database()[n].hf298) for n in names])
    np.testing.assert_allclose((new.h_RT(T) - raw.h_RT(T)) * gibbsmin.thermo.R * T[:, None],
                               np.broadcast_to(shifts, (T.size, len(names))), atol=1e-6)


# ---------------------------------------------------------------- against NIST-JANAF

JANAF_KEYS = {"H2O": ("H2O", "g"), "CO": ("CO", "g"), "CO2": ("CO2", "g"), "CH4": ("CH4", "g"),
              "NH3": ("H3N", "g"), "NO": ("NO", "g"), "NO2": ("NO2", "g"), "OH": ("HO", "g"),
              "HCN": ("CHN", "g"), "N2O": ("N2O", "g")}
TEMPERATURES = (298.15, 400.0, 500.0, 600.0, 800.0, 1000.0, 1200.0, 1500.0)  # K


@pytest.mark.parametrize("name", sorted(JANAF_KEYS))
def test_gibbs_energy_against_janaf_moves_by_no_more_than_the_shift(anchored, name):
    # NIST-JANAF (Chase 1998), delta-f G from 298.15 to 1500 K: the anchored data's deviation
    # from JANAF differs from the raw data's by no more than the anchor shift (plus 1 J/mol),
    # at every temperature, so the re-anchoring moved the whole curve and nothing else.
    janaf = pytest.importorskip("janaf")
    formula, phase = JANAF_KEYS[name]
    frame = janaf.search(formula=f"^{formula}$", phase=f"^{phase}$").df
    rows = frame.filter(frame["T(K)"].is_in(list(TEMPERATURES))).sort("T(K)")
    T = rows["T(K)"].to_numpy()
    assert T.size == len(TEMPERATURES)
    reference = rows["delta-f G"].to_numpy() * 1000.0
    raw = formation_properties([name], T).dG[:, 0] - reference
    new = formation_properties([name], T, db=anchored).dG[:, 0] - reference
    shift = anchored[name].hf298 - default_database()[name].hf298
    assert np.all(np.abs(new - raw) <= abs(shift) + 1.0), (new - raw, shift)
    # And the move is the anchor shift of delta-f H(298.15 K) itself, the same at every T (only a6
    # changed; the elements' reference forms moved by less than 1e-4 J/mol, to exactly zero).
    anchor = (formation_properties([name], [298.15], db=anchored).dH - formation_properties([name], [298.15]).dH)[0, 0]
    assert anchor == pytest.approx(shift, abs=1e-4)
    np.testing.assert_allclose(new - raw, np.full(T.size, anchor), atol=1e-6)
