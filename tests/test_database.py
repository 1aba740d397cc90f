"""The species database: provenance, look-up, range flags, data-file checks, speed, checksums."""

import re
import time
import tomllib
from pathlib import Path

import numpy as np
import pytest

import gibbsmin
from checksums import assert_unchanged
from gibbsmin.thermo import DATA_SETS, data_set, default_database, load_database

SPECIES_DIR = Path(__file__).resolve().parent.parent / "species"

# Digests of the shipped data files (line endings normalised to LF).  They are
# set by hand after a deliberate regeneration, never by the test itself.
SHIPPED_DIGESTS = {
    "gas.toml": "947bd9039158dfdf555c510d4babf8111ac507b90da4f953f508dc53149eb283",
    "condensed.toml": "4ca773fda8e64aa8fe7fb14245aa1eccc03c3748ee42d2f0c6aa57b0bb1e7500",
}
SHIPPED_COUNTS = {"gas.toml": 82, "condensed.toml": 9}


# ---------------------------------------------------------------- provenance


def _listed_source_keys() -> set[str]:
    text = (SPECIES_DIR / "SOURCES.md").read_text(encoding="utf-8")
    return set(re.findall(r"^\|\s*`([^`]+)`\s*\|", text, flags=re.MULTILINE))


def test_sources_file_lists_keys():
    keys = _listed_source_keys()
    assert {"nasa-tm4513", "chemicals"} <= keys


def test_every_species_source_is_listed():
    keys = _listed_source_keys()
    # Every data set's records; a compound key (a/b) names one source per part.
    sources = {part for name in DATA_SETS for r in data_set(name) for part in r.source.split("/")}
    unlisted = sorted(sources - keys)
    assert not unlisted, f"source keys missing from species/SOURCES.md: {unlisted}"


def test_every_critical_constant_source_is_listed():
    keys = _listed_source_keys()
    problems = []
    for record in default_database():
        if record.critical is None:
            continue
        compilation, _, parts = record.critical.source.partition("-")
        if compilation not in keys:
            problems.append(f"{record.name}: {compilation}")
        # chemicals-A/B/C: Tc from A, Pc from B, omega from C; each must be listed.
        pieces = parts.split("/")
        if len(pieces) != 3:
            problems.append(f"{record.name}: {record.critical.source} is not of the form chemicals-A/B/C")
        problems += [f"{record.name}: {p}" for p in pieces if p not in keys]
    assert not problems, f"critical-constant sources missing from species/SOURCES.md: {problems}"


def test_gases_with_critical_constants_are_present():
    # The engine's cubic equations of state need these for the bulk species.
    db = default_database()
    for name in ("H2", "N2", "CO", "CO2", "CH4", "H2O", "NH3", "CH3OH", "Ar"):
        assert db[name].critical is not None, name


# ---------------------------------------------------------------- look-up


@pytest.mark.parametrize(
    "alias, name",
    [
        ("methane", "CH4"),
        ("Methane", "CH4"),
        ("graphite", "C(s)"),
        ("C(gr)", "C(s)"),
        ("steam", "H2O"),
        ("water", "H2O"),
        ("H2O(g)", "H2O"),
        ("ammonia", "NH3"),
        ("methanol", "CH3OH"),
        ("liquid water", "H2O(l)"),
        (" hydrogen ", "H2"),
        ("CH4", "CH4"),
    ],
)
def test_alias_resolves(alias, name):
    db = default_database()
    assert db[alias].name == name
    assert alias in db
    assert db.index(alias) == db.names.index(name)


def test_resolve_keeps_order():
    assert [r.name for r in default_database().resolve(["steam", "methane", "graphite"])] == ["H2O", "CH4", "C(s)"]


@pytest.mark.parametrize(
    "typo, suggestion",
    [("methan", "methane"), ("CH5", "CH4"), ("nitrogn", "nitrogen"), ("H2OO", "H2O"),
     ("ch5", "CH4"), ("co2x", "CO2")],
)
def test_unknown_species_suggests_close_matches(typo, suggestion):
    db = default_database()
    assert typo not in db
    with pytest.raises(gibbsmin.UnknownSpeciesError) as caught:
        db[typo]
    error = caught.value
    assert suggestion in error.suggestions
    assert str(error).startswith(f"unknown species {typo!r}; did you mean")
    assert suggestion in str(error)
    assert isinstance(error, KeyError)


def test_unknown_species_without_close_match_says_where_to_look():
    with pytest.raises(gibbsmin.UnknownSpeciesError) as caught:
        default_database()["xyzzy"]
    assert caught.value.suggestions == []
    assert "lists the names the database knows" in str(caught.value)


def test_nasa7_selection_follows_the_names():
    db = default_database()
    table = db.nasa7(["steam", "CH4", "C(s)"])
    for row, name in enumerate(["H2O", "CH4", "C(s)"]):
        record = db[name]
        np.testing.assert_array_equal(table.low[row], record.low)
        np.testing.assert_array_equal(table.high[row], record.high)
        assert table.T_min[row] == record.T_min and table.T_max[row] == record.T_max
    assert db.nasa7().low.shape == (len(db), 7)


def test_search_by_text_and_element():
    db = default_database()
    assert [r.name for r in db.search("butane")] == ["nC4H10", "iC4H10"]
    sulfur = {r.name for r in db.search(element="S")}
    assert {"H2S", "SO2", "COS", "S(s)"} <= sulfur
    assert all("S" in r.elements for r in db.search(element="S"))
    assert {r.name for r in db.search("water")} == {"H2O", "H2O(l)"}
    assert len(db.search()) == len(db)


def test_states_of_condensed_species():
    db = default_database()
    assert db["C(s)"].state == "solid"
    assert db["H2O(l)"].state == "liquid"
    assert db["H2O"].is_gas and not db["H2O(l)"].is_gas


# ---------------------------------------------------------------- temperature range


def test_outside_range_flags_each_species_separately():
    db = default_database()
    table = db.nasa7(["H2O(l)", "CH4"])  # 273.15-600 K and 200-6000 K (NASA TM-4513)
    T = np.array([150.0, 250.0, 273.15, 300.0, 600.0, 700.0, 6000.0, 6500.0])
    flags = table.outside_range(T)
    assert flags.shape == (T.size, 2)
    np.testing.assert_array_equal(flags[:, 0], [True, True, False, False, False, True, True, True])
    np.testing.assert_array_equal(flags[:, 1], [True, False, False, False, False, False, False, True])


def test_outside_range_of_a_scalar_temperature():
    flags = default_database().nasa7(["H2O(s)"]).outside_range(300.0)
    assert flags.shape == (1,) and bool(flags[0])


# ---------------------------------------------------------------- malformed data files


def _toml_value(value) -> str:
    if isinstance(value, str):
        return '"' + value.replace("\\", "\\\\").replace('"', '\\"') + '"'
    if isinstance(value, (list, tuple)):
        return "[" + ", ".join(_toml_value(v) for v in value) + "]"
    return repr(value)


def _write_species(directory: Path, entries: list[dict], filename: str = "test.toml") -> Path:
    lines = []
    for entry in entries:
        lines.append("[[species]]")
        tables = {k: v for k, v in entry.items() if isinstance(v, dict)}
        lines += [f"{k} = {_toml_value(v)}" for k, v in entry.items() if k not in tables]
        for key, table in tables.items():
            lines.append(f"[species.{key}]")
            lines += [f"{k} = {_toml_value(v)}" for k, v in table.items()]
        lines.append("")
    path = directory / filename
    path.write_text("\n".join(lines), encoding="utf-8")
    return path


@pytest.fixture()
def methane_entry() -> dict:
    """The shipped methane entry, as a template to break."""
    document = tomllib.loads((SPECIES_DIR / "gas.toml").read_text(encoding="utf-8"))
    return next(dict(e) for e in document["species"] if e["name"] == "CH4")


def test_template_entry_loads(tmp_path, methane_entry):
    # The malformed-file tests below are meaningful only if the unbroken entry loads.
    _write_species(tmp_path, [methane_entry])
    db = load_database(tmp_path)
    assert db.names == ("CH4",)
    assert db["methane"].critical.Tc == methane_entry["critical"]["Tc"]


def _breaks(entry: dict, change) -> dict:
    broken = {k: (dict(v) if isinstance(v, dict) else v) for k, v in entry.items()}
    change(broken)
    return broken


MALFORMED = [
    ("missing key", lambda e: e.pop("hf298"), "missing hf298"),
    ("missing two keys", lambda e: [e.pop("state"), e.pop("low")], "missing state, low"),
    ("bad state", lambda e: e.update(state="plasma"), "state must be one of gas, liquid, solid, not 'plasma'"),
    ("bad formula", lambda e: e.update(formula="CH4x"), "cannot read formula 'CH4x': unexpected character 'x' at position 3"),
    ("unknown element", lambda e: e.update(formula="Cq4"), "unknown element"),
    ("six coefficients", lambda e: e.update(low=e["low"][:6]), "NASA 7-coefficient sets must have 7 values each"),
    ("eight coefficients", lambda e: e.update(high=[*e["high"], 0.0]), "NASA 7-coefficient sets must have 7 values each"),
    ("unknown key", lambda e: e.update(colour="blue"), "unknown key(s) colour"),
    ("hf298 off", lambda e: e.update(hf298=e["hf298"] + 500.0), "disagrees with its polynomial"),
    ("ranges decreasing", lambda e: e.update(T_ranges=[1000.0, 200.0, 6000.0]), "T_ranges must be 2 or 3 increasing"),
    ("ranges too many", lambda e: e.update(T_ranges=[200.0, 500.0, 1000.0, 6000.0]), "T_ranges must be 2 or 3 increasing"),
    ("high without 3 ranges", lambda e: e.update(T_ranges=[200.0, 6000.0]), "two need none"),
    ("3 ranges without high", lambda e: e.pop("high"), "three T_ranges need a 'high' set"),
    ("critical lacks omega", lambda e: e["critical"].pop("omega"), "critical constants lack omega"),
    ("critical unknown key", lambda e: e["critical"].update(Vc=1.0), "unknown key(s) in critical constants: Vc"),
    ("critical not a number", lambda e: e["critical"].update(Tc="hot"), "Tc, Pc and omega must be numbers"),
    ("aliases as text", lambda e: e.update(aliases="methane"), "aliases must be a list of strings"),
    ("coefficient not a number", lambda e: e.update(low=["a", *e["low"][1:]]), "must be numbers"),
]


@pytest.mark.parametrize("change, problem", [m[1:] for m in MALFORMED], ids=[m[0] for m in MALFORMED])
def test_malformed_entry_raises_data_error(tmp_path, methane_entry, change, problem):
    _write_species(tmp_path, [_breaks(methane_entry, change)], filename="broken.toml")
    with pytest.raises(gibbsmin.DataError) as caught:
        load_database(tmp_path)
    message = str(caught.value)
    assert message.startswith("broken.toml, species 'CH4': "), message
    assert problem in message


def test_hf298_tolerance_is_one_joule(tmp_path, methane_entry):
    # A rounding of the stored hf298 (well under 1 J/mol) is accepted.
    _write_species(tmp_path, [_breaks(methane_entry, lambda e: e.update(hf298=round(e["hf298"])))])
    assert load_database(tmp_path)["CH4"].hf298 == round(methane_entry["hf298"])


def test_duplicate_species_raises(tmp_path, methane_entry):
    _write_species(tmp_path, [methane_entry, methane_entry])
    with pytest.raises(gibbsmin.DataError, match="species 'CH4' is defined twice"):
        load_database(tmp_path)


def test_alias_taken_twice_raises(tmp_path, methane_entry):
    other = _breaks(methane_entry, lambda e: e.update(name="CH4-copy"))
    _write_species(tmp_path, [methane_entry, other])
    with pytest.raises(gibbsmin.DataError, match="alias 'methane' of CH4-copy is already taken"):
        load_database(tmp_path)


def test_toml_syntax_error_names_the_file(tmp_path):
    (tmp_path / "typo.toml").write_text('[[species]]\nname = "CH4\n', encoding="utf-8")
    with pytest.raises(gibbsmin.DataError, match=r"^typo\.toml: "):
        load_database(tmp_path)


def test_empty_directory_says_how_to_point_at_the_data(tmp_path):
    with pytest.raises(gibbsmin.DataError, match="no species files .* set GIBBSMIN_SPECIES"):
        load_database(tmp_path)


def test_environment_variable_selects_the_species_folder(tmp_path, methane_entry, monkeypatch):
    _write_species(tmp_path, [methane_entry])
    monkeypatch.setenv("GIBBSMIN_SPECIES", str(tmp_path))
    assert load_database().names == ("CH4",)


def test_a_species_folder_without_the_default_set_says_how_to_proceed(tmp_path, methane_entry, monkeypatch):
    # The default set lives in a subfolder; a folder of one's own files lacks it: the error names both ways on.
    _write_species(tmp_path, [methane_entry])
    monkeypatch.setenv("GIBBSMIN_SPECIES", str(tmp_path))
    with pytest.raises(gibbsmin.DataError, match="no folder 'atct-anchored' .* pass data='nasa-1993'"):
        default_database()
    assert data_set("nasa-1993").names == ("CH4",)


# ---------------------------------------------------------------- speed


def test_database_loads_quickly(capsys):
    # Target 0.2 s; asserted at 0.5 s so a loaded test machine does not fail it.
    load_database()  # warm the file cache and imports
    start = time.perf_counter()
    db = load_database()
    elapsed = time.perf_counter() - start
    with capsys.disabled():
        print(f"\nload_database(): {len(db)} species in {elapsed * 1000:.1f} ms")
    assert elapsed < 0.5


# ---------------------------------------------------------------- shape and checksum


@pytest.mark.parametrize("filename", sorted(SHIPPED_DIGESTS))
def test_shipped_file_checksum(filename):
    assert_unchanged(SPECIES_DIR / filename, SHIPPED_DIGESTS[filename], "species/build_species.py",
                     "SHIPPED_DIGESTS in tests/test_database.py")


@pytest.mark.parametrize("filename", sorted(SHIPPED_COUNTS))
def test_shipped_file_shape(filename):
    document = tomllib.loads((SPECIES_DIR / filename).read_text(encoding="utf-8"))
    entries = document["species"]
    assert len(entries) == SHIPPED_COUNTS[filename], (
        f"species/{filename} holds {len(entries)} species, expected {SHIPPED_COUNTS[filename]}; "
        "regenerate with `python species/build_species.py` and update SHIPPED_COUNTS deliberately."
    )
    for entry in entries:
        assert len(entry["low"]) == 7
        assert len(entry.get("high", entry["low"])) == 7
        assert len(entry["T_ranges"]) == (3 if "high" in entry else 2)
    states = {e["state"] for e in entries}
    assert states == ({"gas"} if filename == "gas.toml" else {"liquid", "solid"})


def test_database_holds_every_shipped_species():
    # The shipped files at the top of species/ are the data set "nasa-1993", named.
    assert len(data_set("nasa-1993")) == sum(SHIPPED_COUNTS.values())
