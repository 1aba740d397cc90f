"""Process streams: a composition with a flow, T and P, built from and shown in the trade's units.

A :class:`Stream` holds component molar flows [mol/s], T [K] and P [Pa] and
nothing else; every other figure (mol% wet and dry, kg/h, Nm3/h, average molar
mass, steam-to-carbon ratio) is a view computed from them, so conversions
round-trip to float precision.  Species names go through the species database,
so aliases (``"methane"``, ``"steam"``) resolve to the database names.

Steam-to-carbon ratio (S/C): moles of H2O per mole of carbon.  Which carbon
counts is a convention, and each stream records the one it uses in
``carbon_basis``:

* ``"hydrocarbon"`` (default, common practice in reforming): carbon in species
  made of carbon and hydrogen only; CO, CO2 and any other carbon compound are
  not counted.
* ``"all"``: every carbon atom in the stream, CO and CO2 included.

Normal and standard volumes (Nm3/h, Sm3/h, MMSCFD) are ideal-gas amounts, as
the trade states them, whatever the phase of a species.

Molar masses are gibbsmin's own (:attr:`SpeciesRecord.molar_mass`, IUPAC 2021
abridged atomic weights).
"""

from __future__ import annotations

import dataclasses
import math
import numbers
import warnings
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from typing import TYPE_CHECKING

from .errors import InputError
from .thermo import SpeciesDatabase, SpeciesRecord, default_database
from .units import (
    NORMAL_DIN_1343,
    STANDARD_ATMOSPHERE,
    ReferenceConditions,
    from_fraction,
    from_kelvin,
    from_mol_s,
    from_pascal,
    to_fraction,
    to_kelvin,
    to_mol_s,
    to_pascal,
)

if TYPE_CHECKING:
    import pandas

__all__ = ["CARBON_BASES", "Stream"]

#: The steam-to-carbon conventions a stream can use; see the module docstring.
CARBON_BASES = ("hydrocarbon", "all")
_STEAM = "H2O"
_NOT_ORGANIC_CARBON = ("CO", "CO2")
#: Tolerance on a composition's sum before it is called wrong rather than rounded, [-] (0.0001 mol%).
_SUM_TOLERANCE = 1e-6


def _is_water(record: SpeciesRecord) -> bool:
    return dict(record.elements) == {"H": 2.0, "O": 1.0}


def _is_hydrocarbon(record: SpeciesRecord) -> bool:
    return set(record.elements) == {"C", "H"}


def counted_carbon(record: SpeciesRecord, carbon_basis: str) -> float:
    """Carbon atoms of one species that a steam-to-carbon ratio on ``carbon_basis`` counts."""
    if carbon_basis == "all" or _is_hydrocarbon(record):
        return record.elements.get("C", 0.0)
    return 0.0


def _check_carbon_basis(carbon_basis: object) -> str:
    if carbon_basis not in CARBON_BASES:
        raise InputError(
            f"carbon_basis must be one of {', '.join(map(repr, CARBON_BASES))}, not {carbon_basis!r}: "
            f"'hydrocarbon' counts carbon in hydrocarbons only (CO and CO2 excluded), 'all' counts every carbon"
        )
    return str(carbon_basis)


def _resolve(names: Sequence[str], database: SpeciesDatabase) -> list[SpeciesRecord]:
    """Records for names or aliases, refusing a species given twice under two names."""
    records = database.resolve(names)
    seen: dict[str, str] = {}
    for given, record in zip(names, records):
        if record.name in seen:
            raise InputError(
                f"species {record.name} is given twice (as {seen[record.name]!r} and {given!r}); give each species once"
            )
        seen[record.name] = given
    return records


def _closed(fractions: dict[str, float], normalize: bool) -> dict[str, float]:
    """An analysis scaled to a sum of one; one that is off by more than rounding is refused unless ``normalize``."""
    total = math.fsum(fractions.values())
    if not total > 0:
        raise InputError("the composition sums to zero; give at least one species a positive amount")
    if not normalize and abs(total - 1.0) > _SUM_TOLERANCE:
        raise InputError(
            f"the composition sums to {total * 100:.8g} mol%, not 100; correct it, or pass normalize=True "
            f"to scale it to 100 %"
        )
    # Within the tolerance the difference is rounding in the analysis; scaling makes the flows add up exactly.
    return {name: x / total for name, x in fractions.items()}


def _about(species: str, convert, *args, **kwargs):
    """Call a unit conversion, naming the species in any error it raises."""
    try:
        return convert(*args, **kwargs)
    except InputError as exc:
        raise InputError(f"{species}: {exc}") from None


@dataclass(frozen=True)
class Stream:
    """A process stream: component molar flows, temperature and pressure.

    Parameters
    ----------
    species : sequence of str
        Species names or aliases; stored as the database names.
    flow_mol_s : sequence of float
        Component molar flows, [mol/s], zero or positive, with a positive total.
    T : float or str
        Temperature, [K], or a text such as ``"850 degC"``.
    P : float or str
        Absolute pressure, [Pa], or a text such as ``"30 bar(g)"``.
    normal : ReferenceConditions
        Conditions that define Nm3 for this stream; DIN 1343 (0 degC,
        101.325 kPa) by default.  Written into :meth:`table`.
    carbon_basis : {"hydrocarbon", "all"}
        Which carbon the steam-to-carbon ratio counts; see the module docstring.
    database : SpeciesDatabase, optional
        Where species are looked up; the shipped database by default.

    The trade's ways of giving a stream are the constructors
    :meth:`from_flows` and :meth:`from_composition`; a dry gas takes its
    steam with :meth:`with_steam` (a rate) or :meth:`with_steam_to_carbon`.

    Examples
    --------
    >>> dry_gas = Stream.from_composition({"CH4": 95, "C2H6": 3, "CO2": 2}, "1000 kmol/h",
    ...                                   dry_basis=True, T="500 degC", P="30 bar(g)")
    >>> feed = dry_gas.with_steam_to_carbon(3.0)
    >>> round(feed.component_flows("kmol/h")["H2O"], 6)
    3030.0
    """

    species: tuple[str, ...]
    flow_mol_s: tuple[float, ...]
    T: float
    P: float
    normal: ReferenceConditions = NORMAL_DIN_1343
    carbon_basis: str = "hydrocarbon"
    database: SpeciesDatabase | None = field(default=None, compare=False, repr=False)

    def __post_init__(self) -> None:
        database = self.database if self.database is not None else default_database()
        if isinstance(self.species, str) or isinstance(self.flow_mol_s, (str, numbers.Number)):
            raise InputError("species and flow_mol_s must be sequences (one flow per species), not single values")
        names, flows = tuple(self.species), tuple(self.flow_mol_s)
        if len(names) != len(flows):
            raise InputError(f"{len(names)} species but {len(flows)} flows; give one flow [mol/s] per species")
        records = _resolve(names, database)
        for record, flow in zip(records, flows):
            if isinstance(flow, bool) or not isinstance(flow, numbers.Real) or not math.isfinite(flow):
                raise InputError(f"flow of {record.name} must be a finite number in mol/s, got {flow!r}")
            if flow < 0:
                raise InputError(f"flow of {record.name} is negative ({flow!r} mol/s); flows must be zero or positive")
        if not sum(flows) > 0:
            raise InputError("the stream has no flow; at least one species needs a positive flow")
        if not isinstance(self.normal, ReferenceConditions):
            raise InputError(f"normal must be a ReferenceConditions (e.g. units.NORMAL_DIN_1343), not {self.normal!r}")
        set_field = object.__setattr__
        set_field(self, "species", tuple(r.name for r in records))
        set_field(self, "flow_mol_s", tuple(float(f) for f in flows))
        set_field(self, "T", to_kelvin(self.T))
        set_field(self, "P", to_pascal(self.P))
        set_field(self, "carbon_basis", _check_carbon_basis(self.carbon_basis))
        set_field(self, "database", database)
        set_field(self, "_records", tuple(records))

    # --- constructors in the trade's units ---------------------------------------------------------

    @classmethod
    def from_flows(
        cls,
        flows: Mapping[str, float | str],
        unit: str | None = None,
        *,
        T: float | str,
        P: float | str,
        normal: ReferenceConditions = NORMAL_DIN_1343,
        carbon_basis: str = "hydrocarbon",
        database: SpeciesDatabase | None = None,
    ) -> Stream:
        """A stream from component flows in any molar, normal-volume or mass flow unit.

        Parameters
        ----------
        flows : mapping of str to float or str
            Species to flow: numbers in ``unit``, or texts with their own unit
            (``{"CH4": "1200 kg/h", "H2O": "3.2 t/h", "N2": "40 Nm3/h"}``).
        unit : str, optional
            Unit of the numeric flows (``"kmol/h"``, ``"kg/h"``, ``"Nm3/h"`` ...).
        T, P : float or str
            Temperature [K] and absolute pressure [Pa], or texts with units.
        normal, carbon_basis, database
            As for :class:`Stream`.
        """
        database = database if database is not None else default_database()
        records = _resolve(list(flows), database)
        mol_s = [
            _about(record.name, to_mol_s, value, unit, molar_mass=record.molar_mass, normal=normal)
            for record, value in zip(records, flows.values())
        ]
        return cls(tuple(flows), tuple(mol_s), T, P, normal, carbon_basis, database)

    @classmethod
    def from_composition(
        cls,
        composition: Mapping[str, float | str],
        total_flow: float | str,
        *,
        T: float | str,
        P: float | str,
        unit: str = "mol%",
        flow_unit: str | None = None,
        dry_basis: bool = False,
        water: float | str | None = None,
        normalize: bool = False,
        normal: ReferenceConditions = NORMAL_DIN_1343,
        carbon_basis: str = "hydrocarbon",
        database: SpeciesDatabase | None = None,
    ) -> Stream:
        """A stream from a composition and the stream's total flow.

        Parameters
        ----------
        composition : mapping of str to float or str
            Species to amount in the analysis: numbers in ``unit`` or texts
            such as ``"12.5 mol%"``, ``"40 ppmv"``, ``"0.02"`` (mixed units allowed).
        total_flow : float or str
            Total flow of the whole stream, water included, in any molar,
            normal-volume or mass flow unit (``"1000 kmol/h"``, ``"25000 Nm3/h"``, ``"20 t/h"``).
        T, P : float or str
            Temperature [K] and absolute pressure [Pa], or texts with units.
        unit : str
            Unit of numeric composition values: ``"mol%"``, ``"fraction"``, ``"ppmv"`` ...
        flow_unit : str, optional
            Unit of a numeric ``total_flow``.
        dry_basis : bool
            The analysis excludes water (as a dried sample is analysed); it
            then may not list H2O, and ``water`` gives the water content.
        water : float or str, optional
            Only with ``dry_basis``: the H2O mole fraction of the wet stream,
            as a number in ``unit`` or a text (``"35 mol%"``); none by default.
        normalize : bool
            Scale the analysis to 100 %.  Without it, a sum off 100 % by more
            than 0.0001 mol% is an error.
        normal, carbon_basis, database
            As for :class:`Stream`.
        """
        database = database if database is not None else default_database()
        records = _resolve(list(composition), database)
        fractions = {
            record.name: _about(record.name, to_fraction, value, unit)
            for record, value in zip(records, composition.values())
        }
        fractions = _closed(fractions, normalize)
        if dry_basis:
            listed_water = [r.name for r in records if _is_water(r)]
            if listed_water:
                raise InputError(
                    f"a dry-basis analysis cannot list {', '.join(listed_water)}; give the water content as "
                    f"water=... (mole fraction of the wet stream), or add steam with with_steam or with_steam_to_carbon"
                )
            water_fraction = 0.0 if water is None else _about(_STEAM, to_fraction, water, unit)
            if water_fraction >= 1.0:
                raise InputError(f"water content {water!r} leaves no dry gas; it must be below 100 mol%")
            fractions = {name: x * (1.0 - water_fraction) for name, x in fractions.items()}
            if water_fraction > 0.0:
                fractions[_STEAM] = water_fraction
        elif water is not None:
            raise InputError("water=... is the water content added to a dry-basis analysis; pass dry_basis=True too")
        by_name = {r.name: r for r in database.resolve(fractions)}
        average_molar_mass = sum(x * by_name[name].molar_mass for name, x in fractions.items())
        total = _about("total flow", to_mol_s, total_flow, flow_unit, molar_mass=average_molar_mass, normal=normal)
        flows = tuple(x * total for x in fractions.values())
        return cls(tuple(fractions), flows, T, P, normal, carbon_basis, database)

    # --- derived streams ---------------------------------------------------------------------------

    def _with_added_steam(self, added_mol_s: float, carbon_basis: str) -> Stream:
        species, flows = list(self.species), list(self.flow_mol_s)
        if _STEAM in species:
            flows[species.index(_STEAM)] += added_mol_s
        else:
            species.append(_STEAM)
            flows.append(added_mol_s)
        return dataclasses.replace(self, species=tuple(species), flow_mol_s=tuple(flows), carbon_basis=carbon_basis)

    def with_steam(self, rate: float | str, unit: str | None = None) -> Stream:
        """This stream with steam (gaseous H2O) added at ``rate``, in any molar, normal-volume or mass flow unit."""
        molar_mass = self.database[_STEAM].molar_mass
        added = _about("steam", to_mol_s, rate, unit, molar_mass=molar_mass, normal=self.normal)
        return self._with_added_steam(added, self.carbon_basis)

    def with_steam_to_carbon(self, ratio: float, carbon_basis: str | None = None) -> Stream:
        """This stream with steam added until the steam-to-carbon ratio is ``ratio``, [-].

        Water already in the stream counts towards the ratio.  The new stream
        records the carbon basis used (this stream's unless given).
        """
        basis = self.carbon_basis if carbon_basis is None else _check_carbon_basis(carbon_basis)
        if isinstance(ratio, bool) or not isinstance(ratio, numbers.Real) or not math.isfinite(ratio) or ratio < 0:
            raise InputError(f"steam-to-carbon ratio must be a finite number, zero or positive, got {ratio!r}")
        carbon = self._carbon_mol_s(basis, stacklevel=3)
        if carbon == 0.0:
            raise InputError(self._no_carbon_message(basis))
        present, wanted = self._water_mol_s(), ratio * carbon
        if present > wanted * (1.0 + 1e-12):
            raise InputError(
                f"the stream already holds {present / carbon:.6g} mol H2O per mol carbon ({basis} basis), more "
                f"than S/C = {ratio:g}; start from the dry gas or ask for a ratio of at least that"
            )
        return self._with_added_steam(max(wanted - present, 0.0), basis)

    # --- views -------------------------------------------------------------------------------------

    @property
    def total_mol_s(self) -> float:
        """Total molar flow, [mol/s]."""
        return math.fsum(self.flow_mol_s)

    @property
    def molar_masses(self) -> dict[str, float]:
        """Molar mass of each species, [g/mol]."""
        return {r.name: r.molar_mass for r in self._records}

    def feed_mol(self) -> dict[str, float]:
        """Species to molar flow [mol/s], the amounts the equilibrium engine takes.

        Equilibrium composition is intensive in the total, so flows in mol/s
        serve as amounts in mol, and the amounts of the answer read as mol/s.
        """
        return dict(zip(self.species, self.flow_mol_s))

    def component_flows(self, unit: str = "kmol/h") -> dict[str, float]:
        """Species to flow in ``unit``: molar (``kmol/h``), normal volume (``Nm3/h``) or mass (``kg/h``)."""
        return {
            r.name: from_mol_s(flow, unit, molar_mass=r.molar_mass, normal=self.normal)
            for r, flow in zip(self._records, self.flow_mol_s)
        }

    def total_flow(self, unit: str = "kmol/h") -> float:
        """Total flow in ``unit``; a mass unit uses the average molar mass."""
        return from_mol_s(self.total_mol_s, unit, molar_mass=self.average_molar_mass(), normal=self.normal)

    def _basis(self, dry: bool) -> list[tuple[SpeciesRecord, float]]:
        pairs = [(r, f) for r, f in zip(self._records, self.flow_mol_s) if not (dry and _is_water(r))]
        if dry and not sum(f for _, f in pairs) > 0:
            raise InputError("the stream is all water; it has no dry-basis composition")
        return pairs

    def composition(self, unit: str = "fraction", dry: bool = False) -> dict[str, float]:
        """Species to mole fraction in ``unit`` (``"fraction"``, ``"mol%"``, ``"ppmv"``), wet or dry (water out)."""
        pairs = self._basis(dry)
        total = math.fsum(f for _, f in pairs)
        return {r.name: from_fraction(f / total, unit) for r, f in pairs}

    def average_molar_mass(self, dry: bool = False) -> float:
        """Mole-weighted average molar mass, wet or dry, [g/mol]."""
        pairs = self._basis(dry)
        return math.fsum(r.molar_mass * f for r, f in pairs) / math.fsum(f for _, f in pairs)

    def temperature_in(self, unit: str = "degC") -> float:
        """The temperature in ``unit`` (``"degC"``, ``"K"``, ``"degF"``)."""
        return from_kelvin(self.T, unit)

    def pressure_in(self, unit: str = "bar", *, atmosphere: float = STANDARD_ATMOSPHERE) -> float:
        """The pressure in ``unit`` (``"bar"``, ``"bar(g)"``, ``"psig"``); gauge units subtract ``atmosphere`` [Pa]."""
        return from_pascal(self.P, unit, atmosphere=atmosphere)

    def _water_mol_s(self) -> float:
        return math.fsum(f for r, f in zip(self._records, self.flow_mol_s) if _is_water(r))

    def _carbon_mol_s(self, basis: str, stacklevel: int) -> float:
        """Carbon flow counted on ``basis``, [mol/s]; warns, at ``stacklevel``, of carbon the basis leaves out."""
        counted, uncounted = [], []
        for record, flow in zip(self._records, self.flow_mol_s):
            counted.append(counted_carbon(record, basis) * flow)
            if counted[-1] == 0 and record.elements.get("C", 0.0) * flow > 0 and record.name not in _NOT_ORGANIC_CARBON:
                uncounted.append(record.name)
        if uncounted:
            warnings.warn(
                f"the hydrocarbon basis of S/C does not count the carbon of {', '.join(uncounted)}; "
                f"pass carbon_basis='all' to count every carbon",
                stacklevel=stacklevel,
            )
        return math.fsum(counted)

    def _no_carbon_message(self, basis: str) -> str:
        what = "hydrocarbon carbon" if basis == "hydrocarbon" else "carbon"
        return f"the stream has no {what}, so its steam-to-carbon ratio is undefined; give a steam rate instead"

    def carbon_flow(self, carbon_basis: str | None = None) -> float:
        """Flow of the carbon the S/C ratio counts, [mol/s] of C atoms; ``carbon_basis`` defaults to the stream's."""
        basis = self.carbon_basis if carbon_basis is None else _check_carbon_basis(carbon_basis)
        return self._carbon_mol_s(basis, stacklevel=3)

    def steam_to_carbon(self, carbon_basis: str | None = None) -> float:
        """Moles of H2O (all phases) per mole of carbon, [-]; ``carbon_basis`` defaults to the stream's."""
        basis = self.carbon_basis if carbon_basis is None else _check_carbon_basis(carbon_basis)
        carbon = self._carbon_mol_s(basis, stacklevel=3)
        if carbon == 0.0:
            raise InputError(self._no_carbon_message(basis))
        return self._water_mol_s() / carbon

    def table(
        self, flow_unit: str = "kmol/h", mass_unit: str = "kg/h", volume_unit: str = "Nm3/h"
    ) -> pandas.DataFrame:
        """The stream as a DataFrame, one row per species.

        Columns: flow in ``flow_unit``, mol% wet, mol% dry (empty for water),
        mass flow, normal-volume flow and molar mass [g/mol].  ``attrs`` hold
        T [K], P [Pa], the normal conditions, the carbon basis and the S/C
        ratio (None without hydrocarbon carbon).
        """
        import pandas

        has_dry_gas = any(not _is_water(r) and f > 0 for r, f in zip(self._records, self.flow_mol_s))
        dry = self.composition("mol%", dry=True) if has_dry_gas else {}
        frame = pandas.DataFrame(
            {
                f"flow [{flow_unit}]": self.component_flows(flow_unit),
                "mol% wet": self.composition("mol%"),
                "mol% dry": {name: dry.get(name, math.nan) for name in self.species},
                f"mass flow [{mass_unit}]": self.component_flows(mass_unit),
                f"volume flow [{volume_unit}]": self.component_flows(volume_unit),
                "molar mass [g/mol]": self.molar_masses,
            }
        )
        frame.index.name = "species"
        carbon = self._carbon_mol_s(self.carbon_basis, stacklevel=3)
        frame.attrs.update(
            {
                "T [K]": self.T,
                "P [Pa]": self.P,
                "normal conditions": self.normal.describe(),
                "carbon basis": self.carbon_basis,
                "steam to carbon": self._water_mol_s() / carbon if carbon > 0 else None,
            }
        )
        return frame
