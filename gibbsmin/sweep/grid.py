"""A sweep: a base case and the axes along which it varies, as a grid of independent problems.

Points are numbered in C order (the last axis varies fastest), so that
consecutive points are neighbours along the last axis: a chunk of them is
solved as one batch with warm starts along that axis.  Nothing here solves or
writes anything; it only says what point i is.
"""

from __future__ import annotations

import difflib
import hashlib
import json
import math
import re
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field

import numpy as np
from numpy.typing import NDArray

from ..eos import InteractionTable, canonical_model_name, default_interactions
from ..errors import InputError, UnknownSpeciesError
from ..prepared import Specification
from ..streams import CARBON_BASES, counted_carbon
from ..thermo.database import SpeciesDatabase
from ..thermo.datasets import DEFAULT_DATA, UNNAMED_DATA, check_data_name, data_set, default_database
from ..units import to_kelvin, to_pascal

#: Axis names with a meaning of their own; any other name is a feed species.
SPECIAL_AXES = ("T", "P", "S/C")


@dataclass(frozen=True)
class Axis:
    """One varied quantity.

    Attributes
    ----------
    name : str
        "T" [K], "P" [Pa], "S/C" (steam-to-carbon ratio, [-]) or a feed species
        name (its amount, in the feed's own basis, e.g. mol or mol/s).
    values : tuple of float
        The values in those units.
    unit : str
        The unit the user wrote, for labels ("degC", "bar", ...).
    shown : tuple of float
        The values in that unit.
    """

    name: str
    values: tuple[float, ...]
    unit: str = ""
    shown: tuple[float, ...] = ()

    def __post_init__(self) -> None:
        if not self.values:
            raise InputError(f"axis {self.name!r} has no values")
        if not all(np.isfinite(self.values)):
            raise InputError(f"axis {self.name!r} has a value that is not a finite number")
        if not self.shown:
            object.__setattr__(self, "shown", tuple(self.values))

    @property
    def label(self) -> str:
        return f"{self.name} [{self.unit}]" if self.unit else self.name


@dataclass(frozen=True)
class SweepSpec:
    """The whole sweep: base case plus axes.

    Attributes
    ----------
    feed : dict
        Base feed, species to amount [mol] (or a consistent flow basis).
    T, P : float
        Base temperature [K] and pressure [Pa], used where no axis varies them.
    axes : tuple of Axis
    species, exclude, inert : species-set options as for ``equilibrate``.
    carbon_basis : str
        Which carbon an S/C axis counts: "hydrocarbon" (the trade's
        convention, CO and CO2 excluded) or "all".
    method : str
        Solver for the points Newton cannot certify is always the cone; this
        is the first solver tried ("auto" = Newton first).
    gas : str
        Gas model: "ideal" (default), "peng-robinson" or "srk".
    kij : str
        With a cubic: "shipped" (the published table, default) or "none".
    kij_pairs : tuple of (str, str, float)
        The engineer's own k_ij over that table.
    data : str
        The thermochemical data set by name (``gibbsmin.thermo.DATA_SETS``).
    uncertainty : bool
        Add columns ``u_y_<species>`` (gas) and ``u_n_<species>`` (condensed):
        the standard uncertainty of each mole fraction and condensed amount
        from the data set's formation-enthalpy uncertainties (ideal gas; a
        data set that states them, "atct-anchored").
    liquid : bool
        With a cubic gas model: split every point whose gas the tangent-plane
        test finds unstable into gas and liquid solution (the flash of
        ``equilibrate``), adding columns ``liquid_fraction`` (mole fraction of
        the fluid in the liquids) and ``x_<species>`` (the first liquid's mole
        fractions; NaN where there is none); the ``y_`` columns stay the gas's.
        Off by default, so a sweep's table keeps the columns it always had.
    """

    feed: Mapping[str, float]
    T: float
    P: float
    axes: tuple[Axis, ...]
    species: tuple[str, ...] | None = None
    exclude: tuple[str, ...] = ()
    inert: tuple[str, ...] = ()
    carbon_basis: str = "hydrocarbon"
    method: str = "auto"
    gas: str = "ideal"
    kij: str = "shipped"
    kij_pairs: tuple[tuple[str, str, float], ...] = ()
    data: str = DEFAULT_DATA
    uncertainty: bool = False
    liquid: bool = False
    _shape: tuple[int, ...] = field(init=False, repr=False, compare=False)

    def __post_init__(self) -> None:
        if not self.axes:
            raise InputError("a sweep needs at least one axis, e.g. Axis('T', (900.0, 1000.0))")
        names = [a.name for a in self.axes]
        if len(set(names)) != len(names):
            raise InputError(f"an axis is given twice: {', '.join(names)}")
        if self.carbon_basis not in CARBON_BASES:
            raise InputError(f"carbon_basis must be one of {', '.join(CARBON_BASES)}, not {self.carbon_basis!r}")
        for axis in self.axes:
            if axis.name in ("T", "P") and min(axis.values) <= 0:
                raise InputError(f"axis {axis.name} must hold positive values in K or Pa")
            if axis.name not in ("T", "P") and min(axis.values) < 0:
                raise InputError(f"axis {axis.name} must not hold negative values")
        object.__setattr__(self, "gas", canonical_model_name(self.gas))
        check_data_name(self.data)
        if self.uncertainty:
            self._check_uncertainty()
        if self.liquid and self.gas == "ideal":
            raise InputError("liquid-solution phases in a sweep need a cubic: pass gas='peng-robinson' or 'srk' with "
                             "liquid=True")
        if self.liquid and self.uncertainty:
            raise InputError("a sweep with liquid-solution phases has no uncertainty columns yet; drop one of them")
        if self.kij not in ("shipped", "none"):
            raise InputError(f"a sweep's kij is 'shipped' or 'none', not {self.kij!r}")
        object.__setattr__(self, "_shape", tuple(len(a.values) for a in self.axes))

    def _check_uncertainty(self) -> None:
        """Uncertainty columns need the ideal gas and a data set that states uncertainties: refused up front."""
        if self.gas != "ideal":
            raise InputError(f"a sweep's uncertainty columns are propagated for the ideal gas only, not {self.gas!r}: "
                             "drop the uncertainty, or compute the points you need with equilibrate(..., "
                             "uncertainty=True)")
        if any(r.hf298_uncertainty is None for r in data_set(self.data)):
            raise InputError(f"data set {self.data!r} states no uncertainty of the enthalpies of formation; pass "
                             "data='atct-anchored' to have the sweep's uncertainty columns")

    @property
    def shape(self) -> tuple[int, ...]:
        return self._shape

    @property
    def n_points(self) -> int:
        return int(np.prod(self._shape))

    def axis(self, name: str) -> Axis | None:
        return next((a for a in self.axes if a.name == name), None)

    def specification(self) -> Specification:
        """What every point computes, as the one specification every front door builds (``gibbsmin.prepare``)."""
        kij: object = self.kij
        if self.kij_pairs:
            base = default_interactions() if self.kij == "shipped" else InteractionTable([])
            kij = base.updated({(a, b): v for a, b, v in self.kij_pairs}, model=self.gas, source="sweep")
        return Specification.of(species=self.species, exclude=self.exclude, inert=self.inert, method=self.method,
                                gas=self.gas, kij=kij if self.gas != "ideal" else "shipped", data=self.data,
                                liquid=self.liquid if self.gas != "ideal" else None)

    def T_span(self) -> tuple[float, float]:
        axis = self.axis("T")
        return (min(axis.values), max(axis.values)) if axis else (self.T, self.T)

    def feed_species(self, db: SpeciesDatabase | None = None) -> list[str]:
        """Every species that any point feeds (base feed, component axes, and steam for S/C)."""
        db = db or default_database()
        names = [db[n].name for n in self.feed]
        for axis in self.axes:
            if axis.name not in SPECIAL_AXES and db[axis.name].name not in names:
                names.append(db[axis.name].name)
        if self.axis("S/C") and "H2O" not in names:
            names.append("H2O")
        return names

    def conditions(self, first: int, last: int, db: SpeciesDatabase | None = None
                   ) -> tuple[NDArray[np.float64], NDArray[np.float64], NDArray[np.float64], dict[str, NDArray]]:
        """T [K], P [Pa], feed amounts (B, len(feed_species)) and the axis values of points first..last-1."""
        db = db or default_database()
        index = np.arange(first, last)
        position = np.unravel_index(index, self._shape)
        values = {a.name: np.asarray(a.values)[position[k]] for k, a in enumerate(self.axes)}
        shown = {a.label: np.asarray(a.shown)[position[k]] for k, a in enumerate(self.axes)}
        B = index.size
        T = values.get("T", np.full(B, self.T))
        P = values.get("P", np.full(B, self.P))
        names = self.feed_species(db)
        feed = np.zeros((B, len(names)))
        for j, name in enumerate(names):
            feed[:, j] = next((v for k, v in self.feed.items() if db[k].name == name), 0.0)
        for axis in self.axes:
            if axis.name not in SPECIAL_AXES:
                feed[:, names.index(db[axis.name].name)] = values[axis.name]
        if "S/C" in values:
            carbon = feed @ np.array([counted_carbon(db[n], self.carbon_basis) for n in names])
            if np.any(carbon <= 0):
                raise InputError(f"an S/C axis needs carbon ({self.carbon_basis} basis) in every feed of the sweep")
            feed[:, names.index("H2O")] = values["S/C"] * carbon
        return np.asarray(T, float), np.asarray(P, float), feed, shown

    def to_json(self) -> str:
        """A canonical text form (also the basis of the fingerprint)."""
        data = {
            "feed": dict(self.feed), "T": self.T, "P": self.P,
            "axes": [{"name": a.name, "values": list(a.values), "unit": a.unit, "shown": list(a.shown)}
                     for a in self.axes],
            "species": list(self.species) if self.species is not None else None,
            "exclude": list(self.exclude), "inert": list(self.inert),
            "carbon_basis": self.carbon_basis, "method": self.method,
        }
        if self.gas != "ideal":  # only then, so that an ideal-gas sweep keeps the fingerprint it always had
            data.update(gas=self.gas, kij=self.kij)
            if self.kij_pairs:
                data["kij_pairs"] = [list(p) for p in self.kij_pairs]
        if self.data != UNNAMED_DATA:  # likewise: the NASA set keeps the old fingerprints
            data["data"] = self.data
        if self.uncertainty:  # and a sweep without uncertainty columns
            data["uncertainty"] = True
        if self.liquid:  # and one without liquids
            data["liquid"] = True
        return json.dumps(data, sort_keys=True)

    @classmethod
    def from_json(cls, text: str) -> SweepSpec:
        data = json.loads(text)
        return cls(
            feed=data["feed"], T=data["T"], P=data["P"],
            axes=tuple(Axis(a["name"], tuple(a["values"]), a["unit"], tuple(a["shown"])) for a in data["axes"]),
            species=tuple(data["species"]) if data["species"] is not None else None,
            exclude=tuple(data["exclude"]), inert=tuple(data["inert"]),
            carbon_basis=data["carbon_basis"], method=data["method"],
            gas=data.get("gas", "ideal"), kij=data.get("kij", "shipped"),
            kij_pairs=tuple((a, b, float(v)) for a, b, v in data.get("kij_pairs", [])),
            data=data.get("data", UNNAMED_DATA), uncertainty=data.get("uncertainty", False),
            liquid=data.get("liquid", False),
        )

    def fingerprint(self) -> str:
        return hashlib.sha256(self.to_json().encode()).hexdigest()[:16]


def grid(name: str, values: Sequence[float], unit: str = "", shown: Sequence[float] = ()) -> Axis:
    """An axis from a name and its values (in K, Pa, or the feed's basis)."""
    return Axis(name, tuple(float(v) for v in values), unit, tuple(float(v) for v in shown))


_RANGE = re.compile(r"^\s*([-+0-9.eE]+)\s*:\s*([-+0-9.eE]+)\s*:\s*([-+0-9.eE]+)\s*$")


#: The unit a bare number on a T or P axis would need, and examples of the fix.
_UNIT_NEEDED = {"T": ("degC", "K"), "P": ("bar", "bar(g)")}


def _read_axis(text: str) -> tuple[str, str, tuple[float, float, float] | None, list[float]]:
    """Name, unit, (start, stop, step) of a range (or None) and the listed values of an axis's text."""
    name, sep, rest = text.partition("=")
    name = name.strip()
    if not sep or not name or not rest.strip():
        raise InputError(f"cannot read axis {text!r}: write NAME=START:STOP:STEP[unit] or NAME=V1,V2,...[unit], "
                         "e.g. T=700:1000:25degC")
    match = re.match(r"^(.*?[0-9.])\s*([A-Za-z(][A-Za-z0-9()/ ]*)?$", rest.strip())
    if match is None:
        raise InputError(f"cannot read the values of axis {text!r}")
    numbers, unit = match.group(1), (match.group(2) or "").strip()
    if name in _UNIT_NEEDED and not unit:
        first, second = _UNIT_NEEDED[name]
        raise InputError(f"axis {text!r} has no unit, and a bare number is ambiguous for {name}: give a unit, "
                         f"e.g. {name}={numbers.strip()}{first} or {name}={numbers.strip()}{second}")
    ranged = _RANGE.match(numbers)
    try:
        parts = [float(v) for v in (ranged.groups() if ranged else numbers.split(","))]
    except ValueError:
        raise InputError(f"cannot read the numbers of axis {text!r}") from None
    if not ranged:
        return name, unit, None, parts
    start, stop, step = parts
    if step == 0 or (stop - start) / step < 0 or not math.isfinite((stop - start) / step):
        raise InputError(f"axis {text!r}: the step must be non-zero and lead from start to stop")
    return name, unit, (start, stop, step), []


def _range_count(start: float, stop: float, step: float) -> int:
    return int(math.floor((stop - start) / step + 1e-9)) + 1


def axis_size(text: str) -> int:
    """How many values an axis's text spans, without making them (a sweep's size is checked first)."""
    _, _, ranged, listed = _read_axis(text)
    return _range_count(*ranged) if ranged else len(listed)


def axis_from_text(text: str) -> Axis:
    """An axis from the command line's form: NAME=START:STOP:STEP[unit] or NAME=V1,V2,...[unit].

    Examples: ``T=700:1000:25degC``, ``P=20,30,40bar``, ``P=25:35:5bar(g)``,
    ``S/C=2:4:0.5``, ``CO2=0:0.2:0.05`` (a feed species, in the feed's basis).
    The stop value is included when the steps reach it.  T and P need their
    unit: a bare number is refused, as in a case file.
    """
    name, unit, ranged, shown = _read_axis(text)
    if ranged:
        start, _, step = ranged
        shown = [start + k * step for k in range(_range_count(*ranged))]
    if name == "T":
        values = [to_kelvin(f"{v} {unit}") for v in shown]
    elif name == "P":
        values = [to_pascal(f"{v} {unit}") for v in shown]
    elif unit:
        raise InputError(f"axis {name} takes plain numbers (the ratio, or amounts in the feed's basis), not {unit!r}")
    else:
        values = shown
    return Axis(name, tuple(values), unit, tuple(shown))


def check_axis_names(names: Sequence[str], feed: Sequence[str], db: SpeciesDatabase | None = None) -> None:
    """Refuse an axis that is neither T, P, S/C nor a species, naming the axes there are and the closest."""
    db = db or default_database()
    for name in names:
        if name in SPECIAL_AXES:
            continue
        try:
            db[name]
        except UnknownSpeciesError as unknown:
            choices = {c.casefold(): c for c in (*SPECIAL_AXES, *feed)}
            close = [choices[c] for c in difflib.get_close_matches(name.casefold(), list(choices), n=3, cutoff=0.6)]
            close = list(dict.fromkeys(close + unknown.suggestions))[:4]
            hint = f"; did you mean {', '.join(close)}?" if close else ""
            raise InputError(
                f"unknown sweep axis {name!r}: an axis is T (with a unit), P (with a unit), S/C, or the amount of a "
                f"species (the feed's: {', '.join(feed)}){hint}") from None
