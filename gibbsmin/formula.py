"""Chemical formulas: text to element counts, and molar masses.

Accepted: element symbols with counts (``CH3OH``), groups in parentheses or
brackets with a multiplier (``(CH3)2O``), and one trailing state suffix in
IUPAC notation (``H2O(l)``, ``C(s)``, ``S(cr)``, ``CO2(g)``, ``NH3(aq)``).

Atomic weights are the IUPAC conventional/abridged standard atomic weights,
IUPAC Commission on Isotopic Abundances and Atomic Weights, "Standard atomic
weights of the elements 2021", Prohaska et al., Pure Appl. Chem. 94 (2022) 573
(values given from memory to five significant figures; checked in the tests
against the ``periodictable`` package).
"""

from __future__ import annotations

import re
from collections.abc import Mapping

from .errors import FormulaError

ATOMIC_WEIGHTS: Mapping[str, float] = {
    "H": 1.0080, "He": 4.0026, "Li": 6.94, "Be": 9.0122, "B": 10.81,
    "C": 12.011, "N": 14.007, "O": 15.999, "F": 18.998, "Ne": 20.180,
    "Na": 22.990, "Mg": 24.305, "Al": 26.982, "Si": 28.085, "P": 30.974,
    "S": 32.06, "Cl": 35.45, "Ar": 39.95, "K": 39.098, "Ca": 40.078,
    "Sc": 44.956, "Ti": 47.867, "V": 50.942, "Cr": 51.996, "Mn": 54.938,
    "Fe": 55.845, "Co": 58.933, "Ni": 58.693, "Cu": 63.546, "Zn": 65.38,
    "Ga": 69.723, "Ge": 72.630, "As": 74.922, "Se": 78.971, "Br": 79.904,
    "Kr": 83.798, "Rb": 85.468, "Sr": 87.62, "Y": 88.906, "Zr": 91.224,
    "Nb": 92.906, "Mo": 95.95, "Ru": 101.07, "Rh": 102.91, "Pd": 106.42,
    "Ag": 107.87, "Cd": 112.41, "In": 114.82, "Sn": 118.71, "Sb": 121.76,
    "Te": 127.60, "I": 126.90, "Xe": 131.29, "Cs": 132.91, "Ba": 137.33,
    "Pt": 195.08, "Au": 196.97, "Hg": 200.59, "Pb": 207.2,
}

#: State suffixes and the state each one names.
STATE_SUFFIXES: Mapping[str, str] = {
    "g": "gas", "l": "liquid", "s": "solid", "cr": "solid", "aq": "aqueous",
}

_SUFFIX = re.compile(r"\((g|l|s|cr|aq)\)$")
_CLOSING = {"(": ")", "[": "]"}
_TOKEN = re.compile(r"([A-Z][a-z]?)|(\d+(?:\.\d+)?)|([(\[])|([)\]])")


def split_state(formula: str) -> tuple[str, str | None]:
    """Split a trailing state suffix off a formula.

    Returns the bare formula and the state (``"gas"``, ``"liquid"``,
    ``"solid"``, ``"aqueous"``) or None when there is no suffix.
    """
    match = _SUFFIX.search(formula)
    if match is None:
        return formula, None
    return formula[: match.start()], STATE_SUFFIXES[match.group(1)]


def parse_formula(formula: str) -> dict[str, float]:
    """Element counts of a formula.

    Parameters
    ----------
    formula : str
        For example ``"CH3OH"``, ``"(CH3)2O"``, ``"H2O(l)"``.

    Returns
    -------
    dict
        Element symbol to count, in order of first appearance.

    Raises
    ------
    FormulaError
        Naming the offending character and its position.

    Examples
    --------
    >>> parse_formula("(CH3)2O")
    {'C': 2.0, 'H': 6.0, 'O': 1.0}
    """
    if not isinstance(formula, str):
        raise FormulaError(str(formula), 0, f"a formula must be text, not {type(formula).__name__}")
    if not formula.strip():
        raise FormulaError(formula, 0, "empty formula")
    text = formula.strip()
    bare, _ = split_state(text)
    stack: list[dict[str, float]] = [{}]
    opened_at: list[int] = []
    last: dict[str, float] | str | None = None  # what a following count multiplies
    pos = 0
    while pos < len(bare):
        match = _TOKEN.match(bare, pos)
        if match is None:
            raise FormulaError(text, pos, f"unexpected character {bare[pos]!r}")
        symbol, count, opener, closer = match.groups()
        if symbol:
            if symbol not in ATOMIC_WEIGHTS:
                raise FormulaError(text, pos, f"unknown element {symbol!r}")
            stack[-1][symbol] = stack[-1].get(symbol, 0.0) + 1.0
            last = symbol
        elif count:
            value = float(count)
            if last is None:
                raise FormulaError(text, pos, "a count must follow an element or a group")
            if value <= 0:
                raise FormulaError(text, pos, "a count must be positive")
            if isinstance(last, str):
                stack[-1][last] += value - 1.0
            else:
                for element, n in last.items():
                    stack[-1][element] = stack[-1].get(element, 0.0) + n * (value - 1.0)
            last = None
        elif opener:
            stack.append({})
            opened_at.append(pos)
            last = None
        else:
            if len(stack) == 1:
                raise FormulaError(text, pos, "closing bracket without an opening one")
            if _CLOSING[bare[opened_at[-1]]] != closer:
                raise FormulaError(
                    text, pos, f"{closer!r} closes the {bare[opened_at[-1]]!r} at position {opened_at[-1]}"
                )
            group = stack.pop()
            opened_at.pop()
            if not group:
                raise FormulaError(text, pos, "empty group")
            for element, n in group.items():
                stack[-1][element] = stack[-1].get(element, 0.0) + n
            last = group
        pos = match.end()
    if opened_at:
        raise FormulaError(text, opened_at[-1], "bracket is never closed")
    if not stack[0]:
        raise FormulaError(text, 0, "no element found")
    return stack[0]


def molar_mass(formula: str | Mapping[str, float]) -> float:
    """Molar mass of a formula or of element counts, [g/mol] (= kg/kmol)."""
    counts = parse_formula(formula) if isinstance(formula, str) else formula
    return sum(ATOMIC_WEIGHTS[element] * n for element, n in counts.items())
