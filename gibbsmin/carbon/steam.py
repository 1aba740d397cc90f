"""The carbon limit in steam: the lowest steam-to-carbon ratio at which graphite is not stable, as a root."""

from __future__ import annotations

import math
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass

import scipy.optimize

from ..errors import InputError
from ..fixed_step import check_feed, check_method
from ..streams import CARBON_BASES, Stream
from ..thermo.database import SpeciesDatabase
from ..thermo.datasets import choose_database
from ..uncertainty import carbon_limit_uncertainty, formation_uncertainties
from ..units import to_kelvin, to_pascal
from .activity import GRAPHITE, STEAM
from .scan import GasOnlyEquilibria


@dataclass(frozen=True)
class CarbonLimit:
    """The lowest steam-to-carbon ratio at which graphite is not stable at equilibrium.

    Attributes
    ----------
    T : float
        Temperature, [K].
    P : float
        Pressure, [Pa].
    steam_to_carbon : float
        The limit, [mol H2O / mol C]; NaN when it lies outside the range searched (see ``status``).
    carbon_basis : str
        Which carbon the ratio counts ("hydrocarbon" or "all").
    status : str
        "found", or why no limit is given.
    evaluations : int
        Equilibria computed to find it.
    uncertainty : float or None
        Standard uncertainty of the limit [-] from the data set's
        formation-enthalpy uncertainties (``carbon_limit(..., uncertainty=True)``);
        NaN where no limit was found, None when not asked for.
    """

    T: float
    P: float
    steam_to_carbon: float
    carbon_basis: str
    status: str
    evaluations: int
    uncertainty: float | None = None



class _SteamScan:
    """Gas-only equilibria of a feed with a variable amount of steam, at one T and P."""

    def __init__(self, feed: Mapping[str, float], T: float, P: float, carbon_basis: str,
                 species: Sequence[str] | None, exclude: Sequence[str], method: str, db: SpeciesDatabase,
                 *, gas: str = "ideal", kij="shipped"):
        amounts = check_feed(feed, db)
        # Steam goes into the feed (zero if absent) so that the default species set holds the oxygen species.
        amounts.setdefault(STEAM, 0.0)
        self.carbon = Stream(tuple(amounts), tuple(amounts.values()), T, P, carbon_basis=carbon_basis,
                             database=db).carbon_flow()
        if self.carbon <= 0.0:
            raise InputError(f"the feed has no {'hydrocarbon ' if carbon_basis == 'hydrocarbon' else ''}carbon, "
                             f"so its steam-to-carbon ratio is undefined")
        self.water = amounts[STEAM]
        self.T = T
        self.equilibria = GasOnlyEquilibria(amounts, (T, T), P, species, exclude, method, db, gas=gas, kij=kij)
        self.b_steam = self.equilibria.setup.system.element_matrix([db[STEAM]])[:, 0]

    @property
    def evaluations(self) -> int:
        return self.equilibria.evaluations

    @property
    def lowest_ratio(self) -> float:
        """The S/C of the feed as it is, with no steam added, [-]."""
        return self.water / self.carbon

    def ln_activity(self, steam_to_carbon: float, offsets=None) -> float:
        """ln a_C of the gas-only equilibrium at this S/C, [-] (``offsets`` on g0/RT of the gas species)."""
        added = steam_to_carbon * self.carbon - self.water
        return self.equilibria.ln_activity(self.T, added * self.b_steam, offsets)

    def uncertainty(self, steam_to_carbon: float, db: SpeciesDatabase) -> float:
        """Standard uncertainty [-] of the limit found at ``steam_to_carbon``."""
        return carbon_limit_uncertainty(self.ln_activity, steam_to_carbon, self.T,
                                        self.equilibria.setup.system.records, db[GRAPHITE], db.data_set)


def carbon_limit(
    feed: Mapping[str, float] | Stream,
    T: float | str,
    P: float | str,
    *,
    carbon_basis: str = "hydrocarbon",
    species: Sequence[str] | None = None,
    exclude: Sequence[str] = (),
    bracket: tuple[float, float] = (0.05, 8.0),
    xtol: float = 1e-9,
    method: str = "auto",
    gas: str = "ideal",
    kij: str | Mapping[tuple[str, str], float] | None = "shipped",
    db: SpeciesDatabase | None = None,
    data: str | None = None,
    uncertainty: bool = False,
) -> CarbonLimit:
    """The minimum steam-to-carbon ratio at which graphite stops being stable at equilibrium.

    Parameters
    ----------
    feed : mapping or Stream
        The gas before steam is added (species to amount in any proportion);
        water already in it counts towards the ratio.
    T : float or str
        Temperature, [K] (or text such as ``"650 degC"``).
    P : float or str
        Pressure, [Pa] (or text such as ``"30 bar(g)"``).
    carbon_basis : {"hydrocarbon", "all"}
        Which carbon the ratio counts: carbon in hydrocarbons (the trade's
        usual S/C, CO and CO2 left out) or every carbon atom.
    species, exclude
        The species set, as for :func:`gibbsmin.equilibrate` (graphite must stay in).
    bracket : (float, float)
        S/C range searched first, [-]; the upper end is doubled up to 64 if needed.
    xtol : float
        Absolute tolerance of the limit, [-].
    method : {"auto", "newton", "convex"}
    gas, kij : optional
        The gas model of the equilibria, as for :func:`gibbsmin.equilibrate`.
    db : SpeciesDatabase, optional
    data : str, optional
        The thermochemical data set by name, as for :func:`gibbsmin.equilibrate`.
    uncertainty : bool
        Fill ``CarbonLimit.uncertainty``, the limit's standard uncertainty
        from the data set's formation-enthalpy uncertainties (needs a set
        that states them, ``data="atct-anchored"``): 2 (species + 1) more
        gas-only solves.

    Returns
    -------
    CarbonLimit
        ``steam_to_carbon`` is NaN, with the reason in ``status``, when the
        feed is carbon-free at the low end of the bracket or deposits graphite
        at every ratio up to 64.

    Examples
    --------
    >>> limit = carbon_limit({"CH4": 1.0}, T="600 degC", P="25 bar")
    >>> 0.5 < limit.steam_to_carbon < 2.0
    True
    """
    db = choose_database(data, db)
    T, P = to_kelvin(T), to_pascal(P)
    check_method(method)
    if carbon_basis not in CARBON_BASES:
        raise InputError(f"carbon_basis must be one of {', '.join(map(repr, CARBON_BASES))}, not {carbon_basis!r}")
    low, high = _checked_bracket(bracket)
    scan = _SteamScan(feed.feed_mol() if isinstance(feed, Stream) else feed, T, P, carbon_basis,
                      species, exclude, method, db, gas=gas, kij=kij)
    if uncertainty:
        # A data set without uncertainties is refused before the search, not after it.
        formation_uncertainties([*scan.equilibria.setup.system.records, db[GRAPHITE]], db.data_set)
    not_found = math.nan if uncertainty else None
    low = max(low, scan.lowest_ratio)
    if scan.ln_activity(low) <= 0.0:
        return CarbonLimit(T, P, math.nan, carbon_basis, f"carbon-free down to S/C = {low:g}", scan.evaluations,
                           not_found)
    while scan.ln_activity(high) > 0.0:
        if high >= 64.0:
            return CarbonLimit(T, P, math.nan, carbon_basis, f"graphite stable up to S/C = {high:g}",
                               scan.evaluations, not_found)
        low, high = high, 2.0 * high
    root = float(scipy.optimize.brentq(scan.ln_activity, low, high, xtol=xtol))
    u = scan.uncertainty(root, db) if uncertainty else None
    return CarbonLimit(T, P, root, carbon_basis, "found", scan.evaluations, u)


def _checked_bracket(bracket: object) -> tuple[float, float]:
    try:
        low, high = (float(v) for v in bracket)  # type: ignore[union-attr]
    except (TypeError, ValueError):
        raise InputError(f"bracket must be two S/C values (low, high), got {bracket!r}") from None
    if not (math.isfinite(low) and math.isfinite(high) and 0.0 < low < high):
        raise InputError(f"bracket must satisfy 0 < low < high, got {bracket!r}")
    return low, high


def carbon_limit_curve(
    feed: Mapping[str, float] | Stream,
    temperatures: Iterable[float | str],
    P: float | str,
    **options,
) -> list[CarbonLimit]:
    """The carbon limit at each temperature (K or texts) at one pressure; options as for :func:`carbon_limit`."""
    return [carbon_limit(feed, T, P, **options) for T in temperatures]


def carbon_limit_table(limits: Sequence[CarbonLimit]) -> str:
    """Carbon limits as plain-text rows: temperature, pressure and the minimum S/C."""
    lines = [f"{'T/degC':>8} {'P/bara':>8} {'min S/C':>9}  basis"]
    for limit in limits:
        value = f"{limit.steam_to_carbon:9.3f}" if math.isfinite(limit.steam_to_carbon) else f"{'-':>9}"
        note = "" if limit.status == "found" else f"  ({limit.status})"
        lines.append(f"{limit.T - 273.15:8.1f} {limit.P / 1e5:8.3g} {value}  {limit.carbon_basis}{note}")
    return "\n".join(lines)
