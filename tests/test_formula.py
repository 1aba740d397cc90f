"""Formula parsing and molar masses.

Molar masses are checked against the ``periodictable`` package (P. Kienzle et
al., version 2.x), whose masses are the IUPAC CIAAW standard atomic weights
2021 (Prohaska et al., Pure Appl. Chem. 94 (2022) 573).
"""

import periodictable
import pytest

import gibbsmin
from gibbsmin.formula import ATOMIC_WEIGHTS, molar_mass, parse_formula, split_state

# Element counts of these are a fact of the trade (common practice, no source).
PARSED = {
    "CH4": {"C": 1, "H": 4},
    "CH3OH": {"C": 1, "H": 4, "O": 1},
    "C2H5OH": {"C": 2, "H": 6, "O": 1},
    "(CH3)2O": {"C": 2, "H": 6, "O": 1},
    "NH4Cl": {"N": 1, "H": 4, "Cl": 1},
    "H2O(l)": {"H": 2, "O": 1},
    "CO2(g)": {"C": 1, "O": 2},
    "C(s)": {"C": 1},
    "S(cr)": {"S": 1},
    "Ca(OH)2": {"Ca": 1, "O": 2, "H": 2},
    "K4[Fe(CN)6]": {"K": 4, "Fe": 1, "C": 6, "N": 6},
    "Mg(OH)2(s)": {"Mg": 1, "O": 2, "H": 2},
    "O((H)2)3": {"O": 1, "H": 6},
    "CH3COOH": {"C": 2, "H": 4, "O": 2},
    "C8H18": {"C": 8, "H": 18},
}


@pytest.mark.parametrize("formula, expected", PARSED.items())
def test_parse_formula_counts(formula, expected):
    assert parse_formula(formula) == pytest.approx(expected)
    assert set(parse_formula(formula)) == set(expected)


def test_parse_keeps_first_appearance_order():
    assert list(parse_formula("CH3OH")) == ["C", "H", "O"]


def test_surrounding_whitespace_is_ignored():
    assert parse_formula("  CH4 ") == {"C": 1.0, "H": 4.0}


@pytest.mark.parametrize(
    "formula, bare, state",
    [
        ("H2O(l)", "H2O", "liquid"),
        ("C(s)", "C", "solid"),
        ("S(cr)", "S", "solid"),
        ("CO2(g)", "CO2", "gas"),
        ("NH3(aq)", "NH3", "aqueous"),
        ("CH4", "CH4", None),
        ("Ca(OH)2", "Ca(OH)2", None),
    ],
)
def test_split_state(formula, bare, state):
    assert split_state(formula) == (bare, state)


# (formula, position the error must point at, words the reason must contain)
MALFORMED = [
    ("", 0, "empty formula"),
    ("   ", 0, "empty formula"),
    ("Xx2", 0, "unknown element 'Xx'"),
    ("CH3Q", 3, "unknown element 'Q'"),
    ("ch4", 0, "unexpected character 'c'"),
    ("H2O+", 3, "unexpected character '+'"),
    ("C-H", 1, "unexpected character '-'"),
    ("C H4", 1, "unexpected character ' '"),
    ("2H2O", 0, "a count must follow an element or a group"),
    ("C0", 1, "a count must be positive"),
    ("CH3)2", 3, "closing bracket without an opening one"),
    ("(CH3", 0, "bracket is never closed"),
    ("C(OH", 1, "bracket is never closed"),
    ("((CH3)", 0, "bracket is never closed"),
    ("C()", 2, "empty group"),
    ("(CH3]2O", 4, "']' closes the '(' at position 0"),
    ("[CH3)2O", 4, "')' closes the '[' at position 0"),
    ("H2O(x)", 4, "unexpected character 'x'"),
    ("(s)", 0, "no element found"),
]


@pytest.mark.parametrize("formula, position, reason", MALFORMED)
def test_malformed_formula_points_at_the_fault(formula, position, reason):
    with pytest.raises(gibbsmin.FormulaError) as caught:
        parse_formula(formula)
    error = caught.value
    assert error.position == position
    assert reason in error.reason
    message = str(error)
    assert f"at position {position}" in message
    assert reason in message
    # The last two lines echo the formula and put a caret under the fault.
    echoed, caret = message.splitlines()[-2:]
    assert echoed.strip() == formula.strip()
    assert caret == "    " + " " * position + "^"


def test_caret_sits_under_the_offending_character():
    with pytest.raises(gibbsmin.FormulaError) as caught:
        parse_formula("CH3OH+Na")
    echoed, caret = str(caught.value).splitlines()[-2:]
    assert echoed[caret.index("^")] == "+"


@pytest.mark.parametrize("not_text", [None, 5, ["CH4"]])
def test_non_text_formula_is_refused_by_type(not_text):
    with pytest.raises(gibbsmin.FormulaError, match="a formula must be text"):
        parse_formula(not_text)


def test_formula_error_is_a_value_error():
    # Callers may catch the built-in type (the exception family's contract).
    with pytest.raises(ValueError):
        parse_formula("Zz")


@pytest.mark.parametrize("element", sorted(ATOMIC_WEIGHTS))
def test_atomic_weight_matches_periodictable(element):
    # Our table holds the IUPAC 2021 abridged values (five significant figures,
    # fewer for elements whose abridged value is shorter); periodictable holds
    # the full standard values.  Rounding to five figures moves a value by at
    # most half a unit in the fifth figure, 5e-5 relative.
    reference = getattr(periodictable, element).mass
    assert ATOMIC_WEIGHTS[element] == pytest.approx(reference, rel=5e-5)


MOLAR_MASS_FORMULAS = [
    "H2", "N2", "O2", "Ar", "He", "H2O", "CO", "CO2", "CH4", "NH3", "CH3OH",
    "C2H5OH", "(CH3)2O", "NH4Cl", "H2S", "SO2", "C6H6", "C8H18", "HCOOH",
    "CH3COOH", "N2O4", "CS2", "K4[Fe(CN)6]",
]


@pytest.mark.parametrize("formula", MOLAR_MASS_FORMULAS)
def test_molar_mass_matches_periodictable(formula):
    # Source: periodictable (IUPAC CIAAW 2021 standard atomic weights).
    # 0.01 g/mol: the abridged weights differ from periodictable's by at most
    # 5e-5 relative per element (previous test), i.e. under 0.01 g/mol for
    # every formula here (the heaviest, K4[Fe(CN)6], is 368 g/mol).
    # periodictable reads only round brackets.
    reference = periodictable.formula(formula.replace("[", "(").replace("]", ")")).mass
    assert molar_mass(formula) == pytest.approx(reference, abs=0.01)


def test_molar_mass_of_known_values():
    # Water 18.015 g/mol and carbon dioxide 44.009 g/mol with IUPAC 2021
    # abridged weights (from memory); the state suffix does not change the mass.
    assert molar_mass("H2O(l)") == pytest.approx(18.015, abs=1e-3)
    assert molar_mass("CO2") == pytest.approx(44.009, abs=1e-3)


def test_molar_mass_accepts_element_counts():
    assert molar_mass({"C": 1.0, "H": 4.0}) == pytest.approx(molar_mass("CH4"), rel=1e-15)
