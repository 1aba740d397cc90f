"""Reactions: the trade's named ones, equations written as text, and K(T), Kp, enthalpy and quotients of each."""

from __future__ import annotations

import difflib
import math
import re
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from fractions import Fraction
from typing import TYPE_CHECKING

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ..errors import InputError, TemperatureRangeError, UnknownSpeciesError
from ..system import P_REF
from ..thermo.database import (
    SpeciesDatabase,
    SpeciesRecord,
    nasa7_table,
)
from ..thermo.datasets import default_database
from ..thermo.nasa7 import Nasa7Table, R
from ..units import from_pascal

if TYPE_CHECKING:  # only an annotation here; the state module builds on this one
    from .state import GasState


#: Reactions by the names the trade uses, in the order :func:`independent_reactions` prefers them.
NAMED_REACTIONS: dict[str, str] = {
    "steam methane reforming": "CH4 + H2O = CO + 3 H2",
    "water-gas shift": "CO + H2O = CO2 + H2",
    "ammonia synthesis": "N2 + 3 H2 = 2 NH3",
    "methanol synthesis": "CO + 2 H2 = CH3OH",
    "Boudouard": "2 CO = C(s) + CO2",
    "methane cracking": "CH4 = C(s) + 2 H2",
    "CO reduction": "CO + H2 = C(s) + H2O",
    "CO2 methanol synthesis": "CO2 + 3 H2 = CH3OH + H2O",
    "methanol dehydration": "2 CH3OH = CH3OCH3 + H2O",
    "methanation": "CO + 3 H2 = CH4 + H2O",
    "CO2 methanation": "CO2 + 4 H2 = CH4 + 2 H2O",
    "dry reforming": "CH4 + CO2 = 2 CO + 2 H2",
    "reverse water-gas shift": "CO2 + H2 = CO + H2O",
    "ammonia cracking": "2 NH3 = N2 + 3 H2",
    "methane partial oxidation": "CH4 + 0.5 O2 = CO + 2 H2",
    "hydrogen combustion": "2 H2 + O2 = 2 H2O",
}

#: Other words for the named reactions (compared without regard to case, hyphens or spaces).
_ALIASES: dict[str, str] = {
    "steam reforming": "steam methane reforming",
    "methane steam reforming": "steam methane reforming",
    "smr": "steam methane reforming",
    "reforming": "steam methane reforming",
    "shift": "water-gas shift",
    "co shift": "water-gas shift",
    "wgs": "water-gas shift",
    "nh3 synthesis": "ammonia synthesis",
    "meoh synthesis": "methanol synthesis",
    "boudouard reaction": "Boudouard",
    "co disproportionation": "Boudouard",
    "methane decomposition": "methane cracking",
    "carbon monoxide reduction": "CO reduction",
    "co2 hydrogenation": "CO2 methanol synthesis",
    "dme synthesis": "methanol dehydration",
    "co methanation": "methanation",
    "co2 reforming": "dry reforming",
    "rwgs": "reverse water-gas shift",
    "ammonia decomposition": "ammonia cracking",
    "partial oxidation": "methane partial oxidation",
    "hydrogen oxidation": "hydrogen combustion",
}

_ARROW = re.compile(r"<=>|<->|=>|->|\u21cc|\u2192|=")
_COEFFICIENT = re.compile(r"^(\d+(?:\.\d*)?(?:/\d+)?|\.\d+)\s*\*?\s*(\S.*)$")
#: Temperatures [K] an equilibrium temperature may be sought in when extrapolation is allowed.


def _key(text: str) -> str:
    return re.sub(r"[\s_\-]+", " ", text.strip().casefold())


_NAME_OF_KEY = {_key(name): name for name in NAMED_REACTIONS} | {_key(a): n for a, n in _ALIASES.items()}


@dataclass(frozen=True)
class Reaction:
    """One balanced reaction.

    Attributes
    ----------
    name : str
        The trade's name, or the equation itself for a reaction without one.
    species : tuple of str
        Database names, reactants first.
    coefficients : tuple of float
        Stoichiometric coefficients, [-]: negative for reactants, positive for products.
    records : tuple of SpeciesRecord
        The species' data, in the order of ``species``.
    """

    name: str
    species: tuple[str, ...]
    coefficients: tuple[float, ...]
    records: tuple[SpeciesRecord, ...] = field(repr=False, compare=False)
    _table: Nasa7Table = field(init=False, repr=False, compare=False)
    _nu: NDArray[np.float64] = field(init=False, repr=False, compare=False)

    def __post_init__(self) -> None:
        object.__setattr__(self, "_table", nasa7_table(self.records))
        object.__setattr__(self, "_nu", np.array(self.coefficients, dtype=float))

    def __str__(self) -> str:
        return self.equation if self.name == self.equation else f"{self.name}: {self.equation}"

    def __repr__(self) -> str:
        return f"<Reaction {self}>"

    @property
    def equation(self) -> str:
        """The reaction as text, e.g. ``"CH4 + H2O = CO + 3 H2"``."""
        def side(sign: int) -> str:
            return " + ".join(_term_text(abs(c), s) for s, c in zip(self.species, self.coefficients) if c * sign > 0)
        return f"{side(-1)} = {side(+1)}"

    @property
    def stoichiometry(self) -> dict[str, float]:
        """Species to coefficient, [-]."""
        return dict(zip(self.species, self.coefficients))

    @property
    def delta_n_gas(self) -> float:
        """Change in the number of gas moles, [-]: the exponent of bar in K."""
        return float(sum(c for c, r in zip(self.coefficients, self.records) if r.is_gas))

    @property
    def K_unit(self) -> str:
        """Unit of K and Q: ``"bar^2"``, ``"bar^-2"``, or ``"-"`` when the gas moles do not change."""
        dn = self.delta_n_gas
        return "-" if abs(dn) < 1e-12 else f"bar^{dn:g}"

    @property
    def T_range(self) -> tuple[float, float]:
        """Temperatures covered by the data of every species, [K]."""
        return max(r.T_min for r in self.records), min(r.T_max for r in self.records)

    def vector(self, names: Sequence[str]) -> NDArray[np.float64]:
        """The coefficients on the species order ``names``, [-]."""
        position = {name: i for i, name in enumerate(names)}
        missing = [s for s in self.species if s not in position]
        if missing:
            raise InputError(
                f"reaction {self.name!r} involves {', '.join(missing)}, which the species set lacks; "
                f"add {'them' if len(missing) > 1 else 'it'} to the species set or leave the reaction out"
            )
        nu = np.zeros(len(names))
        for s, c in zip(self.species, self.coefficients):
            nu[position[s]] = c
        return nu

    def _check_range(self, T: NDArray[np.float64]) -> None:
        for record in self.records:
            outside = (T < record.T_min) | (T > record.T_max)
            if np.any(outside):
                raise TemperatureRangeError(record.name, float(T[outside].flat[0]), record.T_min, record.T_max)

    def ln_K(self, T: ArrayLike, *, allow_extrapolation: bool = False) -> float | NDArray[np.float64]:
        """Natural logarithm of K at T [K] (scalar or array), K in bar^dn."""
        T = np.asarray(T, dtype=float)
        if not allow_extrapolation:
            self._check_range(T)
        value = -(self._table.g_RT(T) @ self._nu)
        return float(value) if value.ndim == 0 else value

    def K(self, T: ArrayLike, pressure_unit: str = "bar", *, allow_extrapolation: bool = False) -> float | NDArray:
        """Equilibrium constant at T [K], in ``pressure_unit``^dn (an absolute unit: "bar", "atm", "MPa" ...)."""
        factor = _absolute_unit_factor(pressure_unit)
        return np.exp(self.ln_K(T, allow_extrapolation=allow_extrapolation)) * factor ** self.delta_n_gas

    def enthalpy(self, T: ArrayLike, *, allow_extrapolation: bool = False) -> float | NDArray[np.float64]:
        """Standard reaction enthalpy dH_r at T [K], [J/mol of reaction as written]."""
        T = np.asarray(T, dtype=float)
        if not allow_extrapolation:
            self._check_range(T)
        value = R * T * (self._table.h_RT(T) @ self._nu)
        return float(value) if value.ndim == 0 else value

    def reversed(self, name: str | None = None) -> Reaction:
        """The same reaction written the other way round."""
        reverse = tuple(-c for c in self.coefficients)
        order = sorted(range(len(reverse)), key=lambda i: reverse[i] > 0)
        species = tuple(self.species[i] for i in order)
        coefficients = tuple(reverse[i] for i in order)
        records = tuple(self.records[i] for i in order)
        text = _equation_text(species, coefficients)
        return Reaction(name or text, species, coefficients, records)

    def ln_quotient(self, state: GasState) -> float:
        """ln Q of the reaction in a gas, Q in bar^dn; pure condensed species count at unit activity."""
        total = 0.0
        for s, c, record in zip(self.species, self.coefficients, self.records):
            if record.is_gas:
                total += c * state.ln_fugacity(s)
        return total


def _term_text(coefficient: float, name: str) -> str:
    rounded = round(coefficient)
    text = str(int(rounded)) if abs(coefficient - rounded) < 1e-12 else f"{coefficient:g}"
    return name if text == "1" else f"{text} {name}"


def _equation_text(species: Sequence[str], coefficients: Sequence[float]) -> str:
    left = " + ".join(_term_text(-c, s) for s, c in zip(species, coefficients) if c < 0)
    right = " + ".join(_term_text(c, s) for s, c in zip(species, coefficients) if c > 0)
    return f"{left} = {right}"


def _absolute_unit_factor(unit: str) -> float:
    """Value of P0 = 1 bar in ``unit``; gauge units are refused (K needs absolute pressures)."""
    one, two = from_pascal(P_REF, unit), from_pascal(2 * P_REF, unit)
    if not math.isclose(two, 2.0 * one, rel_tol=1e-12):
        raise InputError(f"equilibrium constants need an absolute pressure unit such as 'bar' or 'atm', not {unit!r}")
    return one


def _make(stoichiometry: Mapping[str, float], db: SpeciesDatabase, name: str | None = None) -> Reaction:
    species = tuple(s for s, c in stoichiometry.items() if c != 0.0)
    coefficients = tuple(float(stoichiometry[s]) for s in species)
    records = tuple(db[s] for s in species)
    return Reaction(name or _equation_text(species, coefficients), species, coefficients, records)


# --- reading reactions ---------------------------------------------------------------------------------


def _read_term(text: str, db: SpeciesDatabase, equation: str) -> tuple[float, SpeciesRecord]:
    text = text.strip()
    if not text:
        raise InputError(f"reaction {equation!r} has an empty term; check for a doubled or trailing '+'")
    if text in db:
        return 1.0, db[text]
    match = _COEFFICIENT.match(text)
    coefficient, name = (float(Fraction(match.group(1))), match.group(2).strip()) if match else (1.0, text)
    if coefficient == 0.0:
        raise InputError(f"reaction {equation!r} gives {name} a zero coefficient; leave the term out")
    try:
        return coefficient, db[name]
    except UnknownSpeciesError as exc:
        exc.message = f"{exc.message} (in reaction {equation!r})"
        raise


def parse_reaction(equation: str, *, name: str | None = None, db: SpeciesDatabase | None = None) -> Reaction:
    """A reaction from its equation, checked for balance.

    Parameters
    ----------
    equation : str
        Reactants and products separated by ``=`` (or ``->``, ``<=>``), terms
        by ``+``, each an optional coefficient (``3``, ``0.5``, ``1/2``) and a
        species name or alias: ``"CH4 + H2O = CO + 3 H2"``, ``"2 CO -> C(s) + CO2"``.
    name : str, optional
        What to call it; the equation itself by default.
    db : SpeciesDatabase, optional

    Raises
    ------
    InputError
        No or several ``=``, an empty term, a zero coefficient, no net change,
        or an equation that does not balance (the message names the elements).
    UnknownSpeciesError
        A species the database does not hold (with suggestions).
    """
    if not isinstance(equation, str):
        raise InputError(f"a reaction equation must be text such as 'CH4 + H2O = CO + 3 H2', not {equation!r}")
    db = db or default_database()
    sides = _ARROW.split(equation)
    if len(sides) != 2:
        raise InputError(
            f"reaction {equation!r} needs exactly one '=' between reactants and products, "
            f"e.g. 'CH4 + H2O = CO + 3 H2'"
        )
    net: dict[str, float] = {}
    records: dict[str, SpeciesRecord] = {}
    for sign, side in zip((-1.0, 1.0), sides):
        for term in side.split("+"):
            coefficient, record = _read_term(term, db, equation)
            records[record.name] = record
            net[record.name] = net.get(record.name, 0.0) + sign * coefficient
    net = {s: c for s, c in net.items() if abs(c) > 1e-12}
    if not net:
        raise InputError(f"reaction {equation!r} changes nothing: every species is on both sides equally")
    _check_balance(equation, net, records)
    return _make(net, db, name)


def _check_balance(equation: str, net: Mapping[str, float], records: Mapping[str, SpeciesRecord]) -> None:
    elements = sorted({el for s in net for el in records[s].elements})
    problems = []
    for el in elements:
        left = sum(-c * records[s].elements.get(el, 0.0) for s, c in net.items() if c < 0)
        right = sum(c * records[s].elements.get(el, 0.0) for s, c in net.items() if c > 0)
        if abs(left - right) > 1e-9 * max(left, right, 1.0):
            problems.append(f"{el} {left:g} on the left, {right:g} on the right")
    if problems:
        raise InputError(f"reaction {equation!r} does not balance: {'; '.join(problems)}; correct the coefficients")


def steam_reforming(hydrocarbon: str, *, db: SpeciesDatabase | None = None) -> Reaction:
    """Steam reforming of a hydrocarbon CnHm: CnHm + n H2O = n CO + (n + m/2) H2."""
    db = db or default_database()
    record = db[hydrocarbon]
    if set(record.elements) != {"C", "H"}:
        raise InputError(f"steam reforming needs a hydrocarbon (only C and H); {record.name} is {record.formula}")
    n, m = record.elements["C"], record.elements["H"]
    name = "steam methane reforming" if record.name == "CH4" else f"steam reforming of {record.name}"
    return _make({record.name: -1.0, "H2O": -n, "CO": n, "H2": n + m / 2.0}, db, name)


def reaction(spec: str | Reaction, *, db: SpeciesDatabase | None = None) -> Reaction:
    """A reaction from a trade name (``"water-gas shift"``, ``"SMR"``, ``"steam reforming of C2H6"``), an equation, or itself."""
    if isinstance(spec, Reaction):
        return spec
    if not isinstance(spec, str):
        raise InputError(f"a reaction is a name such as 'water-gas shift' or an equation as text, not {spec!r}")
    db = db or default_database()
    if _ARROW.search(spec):
        return parse_reaction(spec, db=db)
    key = _key(spec)
    if key in _NAME_OF_KEY:
        name = _NAME_OF_KEY[key]
        return parse_reaction(NAMED_REACTIONS[name], name=name, db=db)
    for pattern in (r"^steam reforming of (.+)$", r"^(.+) steam reforming$"):
        match = re.match(pattern, spec.strip(), flags=re.IGNORECASE)
        if match and match.group(1) in db:
            return steam_reforming(match.group(1), db=db)
    # "shift reaction", "the shift": the trade's name is in there once the filler words are gone.
    core = re.sub(r"\b(?:the|reactions?)\b", " ", key).strip()
    close = (core and difflib.get_close_matches(re.sub(r"\s+", " ", core), list(_NAME_OF_KEY), n=3, cutoff=0.6)) \
        or difflib.get_close_matches(key, list(_NAME_OF_KEY), n=3, cutoff=0.6)
    suggestions = list(dict.fromkeys(_NAME_OF_KEY[c] for c in close))
    hint = f"did you mean {', '.join(map(repr, suggestions))}? " if close else ""
    raise InputError(
        f"unknown reaction {spec!r}; {hint}named reactions are {', '.join(NAMED_REACTIONS)}, "
        f"'steam reforming of <hydrocarbon>', or write an equation such as 'CH4 + H2O = CO + 3 H2'"
    )
