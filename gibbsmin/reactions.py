"""Reactions: equations, equilibrium constants, reaction quotients and approach temperatures.

A :class:`Reaction` is a balanced set of stoichiometric coefficients, positive
for products and negative for reactants.  Reactions are written by the user
(``"CH4 + H2O = CO + 3 H2"``), taken by the names the trade uses
(``"steam methane reforming"``, ``"water-gas shift"``, ``"Boudouard"`` ...; see
:data:`NAMED_REACTIONS`), or generated as a complete independent set for a
species set (:func:`independent_reactions`).

Equilibrium constants are those of the standard state of the species data:
ideal gas at P0 = 1 bar, pure condensed species.  K_r(T) = exp(-sum_j nu_j
g0_j(T)/RT) is therefore K_p in bar^dn, with dn the change in the number of
gas moles (``Reaction.K(T, "atm")`` gives it in another pressure unit).
Reaction quotients use the gas's fugacities over P0, f_j/P0 = y_j P/P0 phi_j
(phi_j = 1 for the ideal gas), and unit activity for pure condensed species.

Approach temperature (the sign convention used throughout gibbsmin)
--------------------------------------------------------------------
The equilibrium temperature T_eq of a reaction in a gas at T is the
temperature at which K_r(T_eq) equals the gas's quotient Q_r.  The approach is

    approach = T - T_eq    for an endothermic reaction (dH_r(T) > 0),
    approach = T_eq - T    for an exothermic reaction (dH_r(T) < 0),

so that a positive approach always means *short of equilibrium* in the
direction the equation is written (Q_r < K_r(T): the forward reaction could
still go on), and a negative approach means beyond it.  A reformer outlet with
a 10 K approach on steam methane reforming (endothermic) is a gas in reforming
equilibrium at T - 10 K; a shift outlet with a 10 K approach on the water-gas
shift (exothermic) is a gas in shift equilibrium at T + 10 K.  Writing an
equation the other way round keeps T_eq and flips the sign of the approach: a
gas 4 K beyond reforming equilibrium is 4 K short of methanation equilibrium.
"""

from __future__ import annotations

import difflib
import math
import numbers
import re
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass, field
from fractions import Fraction

import numpy as np
import scipy.optimize
from numpy.typing import ArrayLike, NDArray

from .equilibrium import Equilibrium
from .errors import InputError, TemperatureRangeError, UnknownSpeciesError
from .eos import canonical_model_name
from .streams import Stream
from .system import P_REF, System
from .thermo.database import SpeciesDatabase, SpeciesRecord, default_database, nasa7_table
from .thermo.nasa7 import Nasa7Table, R
from .units import from_pascal, to_kelvin, to_pascal

__all__ = [
    "NAMED_REACTIONS",
    "Approach",
    "Composition",
    "GasState",
    "Reaction",
    "approach_table",
    "approach_temperatures",
    "gas_state",
    "independent_reactions",
    "parse_reaction",
    "quotients",
    "reaction",
    "steam_reforming",
]

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

#: Species tried first as the building blocks of generated reactions (the major species of the trade's gases).
_BASIS_PREFERENCE = ("H2O", "H2", "CO2", "CO", "CH4", "N2", "NH3", "O2", "H2S", "SO2", "Ar", "He")

_ARROW = re.compile(r"<=>|<->|=>|->|\u21cc|\u2192|=")
_COEFFICIENT = re.compile(r"^(\d+(?:\.\d*)?(?:/\d+)?|\.\d+)\s*\*?\s*(\S.*)$")
#: Temperatures [K] an equilibrium temperature may be sought in when extrapolation is allowed.
_EXTRAPOLATION_RANGE = (50.0, 20000.0)


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
    close = difflib.get_close_matches(key, list(_NAME_OF_KEY), n=3, cutoff=0.6)
    suggestions = list(dict.fromkeys(_NAME_OF_KEY[c] for c in close))
    hint = f"did you mean {', '.join(map(repr, suggestions))}? " if close else ""
    raise InputError(
        f"unknown reaction {spec!r}; {hint}named reactions are {', '.join(NAMED_REACTIONS)}, "
        f"'steam reforming of <hydrocarbon>', or write an equation such as 'CH4 + H2O = CO + 3 H2'"
    )


# --- complete independent sets -------------------------------------------------------------------------


def _species_matrix(species: System | Sequence[str], db: SpeciesDatabase):
    """Names, records and element matrix of a System or a list of species names."""
    if isinstance(species, System):
        return list(species.names), list(species.records), species.A
    if isinstance(species, str):
        raise InputError("species takes a list of names, e.g. ['CH4', 'H2O', 'CO', 'CO2', 'H2']")
    records = list({r.name: r for r in db.resolve(species)}.values())
    elements = sorted({el for r in records for el in r.elements})
    A = np.array([[r.elements.get(el, 0.0) for r in records] for el in elements], dtype=float).reshape(len(elements), -1)
    return [r.name for r in records], records, A


def independent_reactions(
    species: System | Sequence[str],
    *,
    include: Iterable[str | Reaction] = (),
    db: SpeciesDatabase | None = None,
) -> list[Reaction]:
    """A complete set of independent reactions among a species set, in the trade's terms where possible.

    The set has S - rank(A) reactions (a basis of the null space of the
    element matrix).  Reactions are taken in this order, each kept only if it
    is independent of those already kept: ``include``; the named reactions of
    :data:`NAMED_REACTIONS` whose species are all in the set, in the order
    listed there; steam reforming of each other hydrocarbon; and, for the
    species still unaccounted for, the reaction forming each from the major
    species (H2O, H2, CO2, CO, CH4, N2, ... as present).

    Parameters
    ----------
    species : System or list of str
        A System (its inert pseudo-elements keep inert species out of every
        reaction) or species names.
    include : reactions, optional
        Names, equations or Reactions that must be in the set.
    db : SpeciesDatabase, optional

    Raises
    ------
    InputError
        An ``include`` reaction with a species not in the set, an inert
        species, or one that depends on the reactions before it.
    """
    db = db or default_database()
    names, records, A = _species_matrix(species, db)
    wanted = len(names) - (np.linalg.matrix_rank(A) if A.size else 0)
    chosen: list[Reaction] = []
    vectors: list[NDArray[np.float64]] = []

    def consider(candidate: Reaction, required: bool) -> None:
        if not set(candidate.species) <= set(names):
            if required:
                candidate.vector(names)  # raises, naming the missing species
            return
        nu = candidate.vector(names)
        if A.size and np.max(np.abs(A @ nu)) > 1e-9:
            if required:
                fixed = [s for s in candidate.species if s in _inert_names(species)]
                raise InputError(
                    f"reaction {candidate.name!r} cannot run in this system: "
                    + (f"{', '.join(fixed)} is held fixed (inert or frozen)" if fixed else "it does not balance")
                )
            return
        if np.linalg.matrix_rank(np.vstack(vectors + [nu])) > len(vectors):
            chosen.append(candidate)
            vectors.append(nu)
        elif required:
            raise InputError(
                f"reaction {candidate.name!r} is a combination of {', '.join(repr(r.name) for r in chosen)}; "
                f"give each independent reaction once (e.g. an approach on 'steam methane reforming' or on "
                f"'methanation', not both)"
            )

    for spec in include:
        consider(reaction(spec, db=db), required=True)
    for candidate in _candidates(names, records, A, db):
        if len(chosen) >= wanted:
            break
        consider(candidate, required=False)
    return chosen


def _inert_names(species: System | Sequence[str]) -> tuple[str, ...]:
    return species.inert if isinstance(species, System) else ()


def _candidates(names: list[str], records: list[SpeciesRecord], A: NDArray[np.float64], db: SpeciesDatabase):
    """Reactions worth trying, in order of preference (see :func:`independent_reactions`)."""
    present = set(names)
    for name, equation in NAMED_REACTIONS.items():
        if set(_species_of(equation)) <= present:
            yield parse_reaction(equation, name=name, db=db)
    if {"H2O", "CO", "H2"} <= present:
        for record in records:
            # An odd number of H atoms marks a radical, which the trade does not reform.
            elements = record.elements
            if record.is_gas and set(elements) == {"C", "H"} and elements["C"] >= 2 and elements["H"] % 2 == 0:
                yield steam_reforming(record.name, db=db)
    yield from _formation_reactions(names, records, A, db)


def _species_of(equation: str) -> list[str]:
    """Species names in one of the catalogue's own equations (written with database names)."""
    terms = [t.strip() for side in equation.split("=") for t in side.split("+")]
    return [t.split()[-1] for t in terms]


def _formation_reactions(names: list[str], records: list[SpeciesRecord], A: NDArray[np.float64], db: SpeciesDatabase):
    """For each species outside a basis of major species, the reaction forming it from that basis."""
    if not A.size:
        return
    preferred = [n for n in _BASIS_PREFERENCE if n in names]
    gases = [n for n, r in zip(names, records) if r.is_gas and n not in preferred]
    condensed = [n for n, r in zip(names, records) if not r.is_gas]
    basis: list[int] = []
    for n in preferred + gases + condensed:
        j = names.index(n)
        if np.linalg.matrix_rank(A[:, basis + [j]]) > len(basis):
            basis.append(j)
    for j, name in enumerate(names):
        if j in basis:
            continue
        x = np.linalg.lstsq(A[:, basis], A[:, j], rcond=None)[0]
        stoichiometry = {names[b]: -x[k] for k, b in enumerate(basis) if abs(x[k]) > 1e-12 and x[k] > 0}
        stoichiometry[name] = 1.0
        stoichiometry |= {names[b]: -x[k] for k, b in enumerate(basis) if abs(x[k]) > 1e-12 and x[k] < 0}
        yield _make(_whole_numbers(stoichiometry), db)


def _whole_numbers(stoichiometry: dict[str, float]) -> dict[str, float]:
    """The same reaction scaled to the smallest whole coefficients, where the coefficients are simple fractions."""
    fractions = {s: Fraction(c).limit_denominator(1000) for s, c in stoichiometry.items()}
    if any(abs(float(f) - c) > 1e-9 for f, c in zip(fractions.values(), stoichiometry.values())):
        return stoichiometry
    scale = math.lcm(*(f.denominator for f in fractions.values()))
    return {s: float(f * scale) for s, f in fractions.items()}


# --- the gas a quotient is taken of --------------------------------------------------------------------

#: What a quotient can be taken of: species to amount (with T and P given), an Equilibrium or a Stream.
Composition = Mapping[str, float] | Equilibrium | Stream


@dataclass(frozen=True)
class GasState:
    """A gas composition at T and P, as reaction quotients need it.

    Attributes
    ----------
    T : float
        Temperature, [K].
    P : float
        Pressure, [Pa].
    ln_y : dict
        Gas species to ln of its mole fraction (``-inf`` when absent).
    ln_phi : dict
        Gas species to ln of its fugacity coefficient (0 for the ideal gas).
    """

    T: float
    P: float
    ln_y: Mapping[str, float]
    ln_phi: Mapping[str, float] = field(default_factory=dict)

    def ln_fugacity(self, species: str) -> float:
        """ln(f/P0) of a gas species; ``-inf`` for a species the gas does not hold."""
        return self.ln_y.get(species, -math.inf) + math.log(self.P / P_REF) + self.ln_phi.get(species, 0.0)


def gas_state(
    composition: Composition,
    T: float | str | None = None,
    P: float | str | None = None,
    *,
    ln_phi: Mapping[str, float] | None = None,
    gas: str | None = None,
    kij: str | Mapping[tuple[str, str], float] | None = "shipped",
    db: SpeciesDatabase | None = None,
) -> GasState:
    """The gas of a composition, an Equilibrium or a Stream, at its T and P.

    Parameters
    ----------
    composition : mapping, Equilibrium or Stream
        A mapping of species to amount or mole fraction (any consistent unit:
        mol, mol/s, mol%; normalised over the gas species, condensed species
        ignored), or an Equilibrium or Stream, which bring their own T and P.
    T, P : float or str, optional
        Temperature [K] and pressure [Pa] (or texts such as ``"850 degC"``,
        ``"30 bar(g)"``); required for a mapping, and must agree with an
        Equilibrium's or Stream's own if given.
    ln_phi : mapping, optional
        Gas species to ln of its fugacity coefficient.  For an Equilibrium of
        a non-ideal gas model the default is its
        ``extras["fugacity_coefficients"]``.
    gas : {"ideal", "peng-robinson", "srk"}, optional
        For a mapping or a Stream (a measured gas): take ln phi from this gas
        model at the gas's own T, P and composition, with ``kij`` as in
        :func:`gibbsmin.equilibrate`.  An Equilibrium brings its own model; a
        different one named here is refused.  Not together with ``ln_phi``.
    """
    db = db or default_database()
    if gas is not None and ln_phi is not None:
        raise InputError("give either ln_phi (your own fugacity coefficients) or gas (a model to compute them), "
                         "not both")
    if isinstance(composition, (Equilibrium, Stream)):
        T = _same(composition.T, T, to_kelvin, "T", "K")
        P = _same(composition.P, P, to_pascal, "P", "Pa")
        if isinstance(composition, Equilibrium):
            if gas is not None and canonical_model_name(gas) != composition.gas_model:
                raise InputError(f"this equilibrium was settled with the {composition.gas_model} gas model; its "
                                 f"fugacities come with it, so leave gas={gas!r} out (or settle it again with it)")
            ln_y = _equilibrium_ln_y(composition)
            if ln_phi is None and composition.gas_model != "ideal":
                ln_phi = _equilibrium_ln_phi(composition)
            gas = None
        else:
            ln_y = _ln_fractions(composition.feed_mol(), db)
    elif isinstance(composition, Mapping):
        if T is None or P is None:
            raise InputError("a composition given as a mapping needs T and P, e.g. T='850 degC', P='30 bar(g)'")
        T, P = to_kelvin(T), to_pascal(P)
        ln_y = _ln_fractions(composition, db)
    else:
        raise InputError(
            f"composition must be a mapping of species to amount, an Equilibrium or a Stream, not {type(composition).__name__}"
        )
    if gas is not None:
        from .nonideal import ln_phi_of_gas  # the equilibrium machinery is only needed for a non-ideal gas

        ln_phi = ln_phi_of_gas({s: math.exp(v) for s, v in ln_y.items()}, T, P, gas, kij=kij, db=db)
    return GasState(T, P, ln_y, _checked_ln_phi(ln_phi, db))


def _same(own: float, given: float | str | None, convert, what: str, unit: str) -> float:
    if given is None:
        return own
    value = convert(given)
    if not math.isclose(value, own, rel_tol=1e-12):
        raise InputError(
            f"{what} = {value:g} {unit} differs from the {own:g} {unit} the composition was given at; "
            f"leave {what} out, or pass the composition as a mapping of amounts"
        )
    return own


def _equilibrium_ln_y(eq: Equilibrium) -> dict[str, float]:
    ln_total = math.log(eq.gas_amount)
    return {s: v - ln_total for s, v in eq.ln_gas_amounts.items()}


def _equilibrium_ln_phi(eq: Equilibrium) -> dict[str, float]:
    """ln phi of a non-ideal answer, from the fugacity coefficients its gas model left in ``extras``."""
    phi = eq.extras.get("fugacity_coefficients")
    if not isinstance(phi, Mapping):
        raise InputError(
            f"this equilibrium used the gas model {eq.gas_model!r} but carries no fugacity coefficients; "
            f"pass ln_phi=... (ln of each species' fugacity coefficient) so that quotients use fugacities"
        )
    return {s: math.log(v) for s, v in phi.items()}


def _ln_fractions(amounts: Mapping[str, float], db: SpeciesDatabase) -> dict[str, float]:
    gas: dict[str, float] = {}
    for name, amount in amounts.items():
        record = db[str(name)]
        if isinstance(amount, bool) or not isinstance(amount, numbers.Real) or not math.isfinite(amount) or amount < 0:
            raise InputError(f"amount of {name} must be a finite number, zero or positive, got {amount!r}")
        if record.is_gas:
            gas[record.name] = gas.get(record.name, 0.0) + float(amount)
    total = math.fsum(gas.values())
    if not total > 0:
        raise InputError("the composition has no gas; give at least one gas species a positive amount")
    with np.errstate(divide="ignore"):
        return {s: float(np.log(n / total)) for s, n in gas.items()}


def _checked_ln_phi(ln_phi: Mapping[str, float] | None, db: SpeciesDatabase) -> dict[str, float]:
    if ln_phi is None:
        return {}
    if not isinstance(ln_phi, Mapping):
        raise InputError("ln_phi must be a mapping of gas species to ln of its fugacity coefficient")
    checked = {}
    for name, value in ln_phi.items():
        if isinstance(value, bool) or not isinstance(value, numbers.Real) or not math.isfinite(value):
            raise InputError(f"ln_phi of {name} must be a finite number, got {value!r}")
        checked[db[str(name)].name] = float(value)
    return checked


# --- quotients and approach temperatures ---------------------------------------------------------------


@dataclass(frozen=True)
class Approach:
    """How far a gas is from equilibrium in one reaction.

    Attributes
    ----------
    reaction : Reaction
    T : float
        Temperature of the gas, [K].
    ln_K, ln_Q : float
        ln of the equilibrium constant at T and of the gas's quotient (both in bar^dn).
    T_eq : float
        Temperature at which K equals Q, [K]; NaN where none exists within the data range.
    approach_K : float
        The approach, [K]: positive = short of equilibrium (see the module docstring); NaN with T_eq.
    note : str
        Why T_eq is NaN, if it is.
    """

    reaction: Reaction
    T: float
    ln_K: float
    ln_Q: float
    T_eq: float
    approach_K: float
    note: str = ""

    @property
    def name(self) -> str:
        return self.reaction.name

    @property
    def K(self) -> float:
        """Equilibrium constant at T, [bar^dn]."""
        return float(np.exp(self.ln_K))

    @property
    def Q(self) -> float:
        """Reaction quotient of the gas, [bar^dn]."""
        return float(np.exp(self.ln_Q))

    @property
    def K_unit(self) -> str:
        return self.reaction.K_unit


def quotients(
    composition: Composition,
    T: float | str | None = None,
    P: float | str | None = None,
    reactions: Sequence[str | Reaction] | None = None,
    *,
    ln_phi: Mapping[str, float] | None = None,
    gas: str | None = None,
    kij: str | Mapping[tuple[str, str], float] | None = "shipped",
    db: SpeciesDatabase | None = None,
) -> dict[str, float]:
    """Reaction name to the quotient Q of a gas, [bar^dn] (arguments as for :func:`approach_temperatures`)."""
    db = db or default_database()
    state = gas_state(composition, T, P, ln_phi=ln_phi, gas=gas, kij=kij, db=db)
    return {r.name: float(np.exp(r.ln_quotient(state))) for r in _reactions_for(state, reactions, db)}


def approach_temperatures(
    composition: Composition,
    T: float | str | None = None,
    P: float | str | None = None,
    reactions: Sequence[str | Reaction] | None = None,
    *,
    ln_phi: Mapping[str, float] | None = None,
    gas: str | None = None,
    kij: str | Mapping[tuple[str, str], float] | None = "shipped",
    trace: float = 1e-6,
    db: SpeciesDatabase | None = None,
    allow_extrapolation: bool = False,
) -> dict[str, Approach]:
    """Equilibrium temperatures and approaches of a gas, one per reaction.

    Parameters
    ----------
    composition : mapping, Equilibrium or Stream
        The gas; see :func:`gas_state`.
    T, P : float or str, optional
        Temperature [K] and pressure [Pa]; see :func:`gas_state`.
    reactions : list, optional
        Names (``"steam methane reforming"``, ``"shift"``), equations or
        Reactions.  By default a complete independent set among the gas
        species above ``trace`` mole fraction (:func:`independent_reactions`).
    ln_phi : mapping, optional
        Species to ln of its fugacity coefficient, for a non-ideal gas.
    gas, kij : optional
        A gas model to compute them instead, for a measured gas at loop
        pressure (``gas="peng-robinson"``); see :func:`gas_state`.  The
        fugacity coefficients are taken at the gas's own T and P and held
        there while T_eq is sought.
    trace : float
        Mole fraction below which a species is left out of the default set, [-].
    db : SpeciesDatabase, optional
    allow_extrapolation : bool
        Evaluate K outside the species' data ranges.

    Returns
    -------
    dict
        Reaction name to :class:`Approach` (K, Q, T_eq, approach_K).  The
        approach is positive when the gas is short of equilibrium: T - T_eq
        for an endothermic reaction, T_eq - T for an exothermic one.

    Examples
    --------
    >>> outlet = {"H2": 47.0, "CO": 9.6, "CO2": 5.0, "CH4": 3.4, "H2O": 35.0}
    >>> result = approach_temperatures(outlet, T="850 degC", P="28 bar(g)", reactions=["SMR", "shift"])
    >>> sorted(result)
    ['steam methane reforming', 'water-gas shift']
    """
    db = db or default_database()
    state = gas_state(composition, T, P, ln_phi=ln_phi, gas=gas, kij=kij, db=db)
    return {r.name: _approach(r, state, allow_extrapolation) for r in _reactions_for(state, reactions, db, trace)}


def _reactions_for(state: GasState, reactions, db: SpeciesDatabase, trace: float = 1e-6) -> list[Reaction]:
    if reactions is None:
        present = [s for s, v in state.ln_y.items() if v >= math.log(trace)]
        return independent_reactions(present, db=db)
    if isinstance(reactions, (str, Reaction)):
        reactions = [reactions]
    return [reaction(r, db=db) for r in reactions]


def _approach(rx: Reaction, state: GasState, allow_extrapolation: bool) -> Approach:
    T = state.T
    ln_K = rx.ln_K(T, allow_extrapolation=allow_extrapolation)
    ln_Q = rx.ln_quotient(state)
    dH = rx.enthalpy(T, allow_extrapolation=allow_extrapolation)
    if not math.isfinite(ln_Q):
        absent = [s for s, r in zip(rx.species, rx.records) if r.is_gas and not math.isfinite(state.ln_y.get(s, -math.inf))]
        note = f"{', '.join(absent)} absent from the gas: Q is {'zero' if ln_Q < 0 else 'infinite' if ln_Q > 0 else 'undefined'}"
        return Approach(rx, T, ln_K, ln_Q, math.nan, math.nan, note)
    T_eq, note = _equilibrium_temperature(rx, ln_Q, T, ln_K, dH, allow_extrapolation)
    return Approach(rx, T, ln_K, ln_Q, T_eq, math.copysign(1.0, dH) * (T - T_eq), note)


def _equilibrium_temperature(rx: Reaction, ln_Q: float, T: float, ln_K: float, dH: float,
                             allow_extrapolation: bool) -> tuple[float, str]:
    """The temperature nearest T, on the side where K moves towards Q, at which ln K = ln Q."""
    gap = ln_K - ln_Q
    if gap == 0.0:
        return T, ""
    slope = dH / (R * T * T)
    if slope == 0.0:
        return math.nan, "K does not change with temperature here"
    low, high = _EXTRAPOLATION_RANGE if allow_extrapolation else rx.T_range
    direction = -1.0 if gap * slope > 0 else 1.0

    def mismatch(t: float) -> float:
        return rx.ln_K(t, allow_extrapolation=True) - ln_Q

    a, f_a = T, gap
    step = max(1.1 * abs(gap / slope), 1e-6)
    while low <= a <= high:
        b = min(max(a + direction * step, low), high)
        f_b = mismatch(b)
        if f_a * f_b <= 0.0:
            root = scipy.optimize.brentq(mismatch, min(a, b), max(a, b), xtol=1e-10, rtol=4 * np.finfo(float).eps)
            return float(root), ""
        if b in (low, high):
            break
        a, f_a, step = b, f_b, 2.0 * step
    return math.nan, f"no temperature from {low:g} K to {high:g} K (the data range) has K = Q"


def approach_table(approaches: Mapping[str, Approach]) -> str:
    """The approaches as a plain-text table (K and Q in bar^dn, temperatures in degC, approach in K)."""
    width = max([len(n) for n in approaches] + [8])
    lines = [f"{'reaction':<{width}}  {'K':>11}  {'Q':>11}  {'unit':<8} {'T/degC':>8} {'T_eq/degC':>10} {'approach/K':>11}"]
    for name, a in approaches.items():
        T_eq = f"{a.T_eq - 273.15:10.2f}" if math.isfinite(a.T_eq) else f"{'-':>10}"
        approach = f"{round(a.approach_K, 2) + 0.0:11.2f}" if math.isfinite(a.approach_K) else f"{'-':>11}"
        lines.append(f"{name:<{width}}  {a.K:11.5g}  {a.Q:11.5g}  {a.K_unit:<8} {a.T - 273.15:8.2f} {T_eq} {approach}"
                     + (f"  ({a.note})" if a.note else ""))
    lines.append("approach > 0: short of equilibrium (T - T_eq for endothermic, T_eq - T for exothermic reactions)")
    return "\n".join(lines)
