"""Carbon against graphite: the carbon activity of a gas, a verdict, and the carbon limit of a feed.

Carbon activity a_C (against graphite; a_C = 1 is a gas saturated with
graphite, and graphite can form where a_C > 1):

* through a reaction that deposits carbon, a_C = K_r(T) / Q_r, with Q_r the
  quotient of the reaction's gas species only:

  - methane cracking, CH4 = C(s) + 2 H2:    a_C = K f_CH4 / f_H2^2
  - Boudouard, 2 CO = C(s) + CO2:            a_C = K f_CO^2 / f_CO2
  - CO reduction, CO + H2 = C(s) + H2O:      a_C = K f_CO f_H2 / f_H2O

  (fugacities over P0 = 1 bar).  A gas that is not at equilibrium has three
  different activities; carbon is thermodynamically possible if any exceeds 1.
  Whether it forms is a matter of kinetics and catalyst, which this module
  does not judge;

* in an equilibrium gas the three agree, and equal exp(lambda_C - g0_C(s)/RT)
  with lambda_C the element potential of carbon.

The margin of a verdict is -ln(a_C) of the highest activity: positive on the
carbon-free side (0.1 is a gas about 10 % below saturation), negative where
carbon is possible.

Carbon limit of a feed: the lowest steam-to-carbon ratio at which graphite is
not stable at equilibrium at T and P.  It is the root in S/C of ln a_C of the
equilibrium gas computed without graphite: where that gas is over-saturated
(a_C > 1) the full minimisation deposits graphite, and where it is not, the
full minimisation has none (the problem is convex, so the gas-only minimum
with a non-negative graphite margin is the minimum with graphite allowed).
S/C counts carbon as :class:`gibbsmin.streams.Stream` does (``carbon_basis``).

These are thermodynamic figures for screening; carbon formation in a real
reformer also depends on catalyst, heat flux and feed quality, and design
margins are set by licensed engineering practice and local codes.
"""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass

import numpy as np
import scipy.optimize

from .equilibrium import Equilibrium
from .errors import InputError
from .reactions import Composition, gas_state, reaction
from .settle import check_feed, check_method, checked, prepare, solve_fixed
from .streams import CARBON_BASES, Stream
from .thermo.database import SpeciesDatabase, default_database
from .units import to_kelvin, to_pascal

__all__ = [
    "CARBON_REACTIONS",
    "CarbonActivity",
    "CarbonLimit",
    "carbon_activity",
    "carbon_limit",
    "carbon_limit_curve",
    "carbon_limit_table",
]

#: The carbon-depositing reactions a gas is judged by.
CARBON_REACTIONS = ("methane cracking", "Boudouard", "CO reduction")
GRAPHITE = "C(s)"
STEAM = "H2O"
#: |ln a_C| below which a gas counts as saturated with graphite rather than over or under, [-].
SATURATION_TOLERANCE = 1e-9


@dataclass(frozen=True)
class CarbonActivity:
    """The carbon activity of a gas against graphite.

    Attributes
    ----------
    T : float
        Temperature, [K].
    P : float
        Pressure, [Pa].
    by_reaction : dict
        Reaction name to a_C [-] through it; NaN where the gas lacks the
        reaction's species on both sides.
    from_element_potential : float or None
        exp(lambda_C - g0_C(s)/RT) [-], for an (unrestricted) Equilibrium.
    """

    T: float
    P: float
    by_reaction: Mapping[str, float]
    from_element_potential: float | None = None

    @property
    def activity(self) -> float:
        """The highest activity over the reactions, [-]."""
        finite = [a for a in self.by_reaction.values() if not math.isnan(a)]
        return max(finite) if finite else 0.0

    @property
    def limiting_reaction(self) -> str | None:
        """The reaction that gives the highest activity."""
        finite = {n: a for n, a in self.by_reaction.items() if not math.isnan(a)}
        return max(finite, key=finite.get) if finite else None

    @property
    def margin(self) -> float:
        """-ln of the highest activity, [-]: positive on the carbon-free side."""
        a = self.activity
        return math.inf if a == 0.0 else -math.log(a)

    @property
    def possible(self) -> bool:
        """True where graphite is thermodynamically possible (over-saturated beyond the tolerance)."""
        return self.margin < -SATURATION_TOLERANCE

    @property
    def verdict(self) -> str:
        """The judgement in words, with the activity, the reaction and the margin."""
        a, margin = self.activity, self.margin
        if self.possible:
            return f"carbon possible: a_C = {a:.4g} by {self.limiting_reaction} (margin {margin:.3g})"
        if margin <= SATURATION_TOLERANCE:
            return f"at graphite saturation: a_C = {a:.6g} (graphite present or on the boundary)"
        where = f" by {self.limiting_reaction}" if self.limiting_reaction else ""
        return f"no carbon: a_C at most {a:.4g}{where} (margin {margin:.3g})"


def carbon_activity(
    composition: Composition,
    T: float | str | None = None,
    P: float | str | None = None,
    *,
    ln_phi: Mapping[str, float] | None = None,
    gas: str | None = None,
    kij: str | Mapping[tuple[str, str], float] | None = "shipped",
    db: SpeciesDatabase | None = None,
) -> CarbonActivity:
    """Carbon activity of a gas against graphite, by methane cracking, Boudouard and CO reduction.

    Parameters
    ----------
    composition : mapping, Equilibrium or Stream
        The gas; see :func:`gibbsmin.reactions.gas_state` (a mapping needs T and P).
    T, P : float or str, optional
        Temperature [K] and pressure [Pa], or texts with units.
    ln_phi : mapping, optional
        Gas species to ln of its fugacity coefficient, for a non-ideal gas.
    gas, kij : optional
        A cubic gas model to compute them instead (a measured gas at
        pressure); see :func:`gibbsmin.reactions.gas_state`.
    db : SpeciesDatabase, optional

    Returns
    -------
    CarbonActivity
        ``verdict`` says whether carbon is possible, with the margin.

    Examples
    --------
    >>> gas = {"CH4": 4.0, "H2": 70.0, "CO": 10.0, "CO2": 6.0, "H2O": 10.0}
    >>> carbon_activity(gas, T="650 degC", P="25 bar").possible
    True
    """
    db = db or default_database()
    state = gas_state(composition, T, P, ln_phi=ln_phi, gas=gas, kij=kij, db=db)
    by_reaction = {}
    for name in CARBON_REACTIONS:
        rx = reaction(name, db=db)
        with np.errstate(over="ignore"):
            by_reaction[name] = float(np.exp(rx.ln_K(state.T) - rx.ln_quotient(state)))
    potential = None
    if isinstance(composition, Equilibrium) and not composition.extras.get("approach K"):
        lam = composition.element_potentials.get("C", math.nan)
        if math.isfinite(lam):
            potential = float(np.exp(lam - _g0_graphite(state.T, db)))
    return CarbonActivity(state.T, state.P, by_reaction, potential)


def _g0_graphite(T: float, db: SpeciesDatabase) -> float:
    """g0/RT of graphite at T [K], [-]."""
    return float(db.nasa7([GRAPHITE]).g_RT(np.array([T]))[0, 0])


# --- the carbon limit ----------------------------------------------------------------------------------


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
    """

    T: float
    P: float
    steam_to_carbon: float
    carbon_basis: str
    status: str
    evaluations: int


class _SteamScan:
    """Gas-only equilibria of a feed with a variable amount of steam, at one T and P."""

    def __init__(self, feed: Mapping[str, float], T: float, P: float, carbon_basis: str,
                 species: Sequence[str] | None, exclude: Sequence[str], method: str, db: SpeciesDatabase,
                 *, gas: str = "ideal", kij="shipped"):
        if GRAPHITE in {db[name].name for name in exclude}:
            raise InputError("a carbon limit needs graphite in the species set; do not exclude C(s)")
        amounts = check_feed(feed, db)
        # Steam goes into the feed (zero if absent) so that the default species set holds the oxygen species.
        amounts.setdefault(STEAM, 0.0)
        self.carbon = Stream(tuple(amounts), tuple(amounts.values()), T, P, carbon_basis=carbon_basis,
                             database=db).carbon_flow()
        if self.carbon <= 0.0:
            raise InputError(f"the feed has no {'hydrocarbon ' if carbon_basis == 'hydrocarbon' else ''}carbon, "
                             f"so its steam-to-carbon ratio is undefined")
        self.water = amounts[STEAM]
        gas_species = None if species is None else [s for s in species if db[s].name != GRAPHITE]
        self.setup = prepare(amounts, species=gas_species, exclude=[*exclude, GRAPHITE], T_span=(T, T), db=db)
        self.b_steam = self.setup.system.element_matrix([db[STEAM]])[:, 0]
        self.T, self.P, self.method = T, P, method
        self.g0_graphite = _g0_graphite(T, db)
        self.start = None
        self.evaluations = 0
        self.phase = None
        if gas != "ideal":
            from .nonideal import gas_phase  # the cubic's outer loop builds on the ideal-gas solve

            self.phase = gas_phase(self.setup.system, gas, kij=kij)

    @property
    def lowest_ratio(self) -> float:
        """The S/C of the feed as it is, with no steam added, [-]."""
        return self.water / self.carbon

    def ln_activity(self, steam_to_carbon: float) -> float:
        """ln a_C of the gas-only equilibrium at this S/C, [-]."""
        added = steam_to_carbon * self.carbon - self.water
        setup = dataclasses.replace(self.setup, b=self.setup.b + added * self.b_steam)
        if self.phase is None:
            eq, _, result = solve_fixed(setup, self.T, self.P, method=self.method, start=self.start)
        else:
            from .nonideal import solve_nonideal

            eq, _, result = solve_nonideal(setup, self.T, self.P, self.phase, method=self.method, start=self.start)
        eq = checked(eq, stacklevel=4)
        self.start = result
        self.evaluations += 1
        return eq.element_potentials["C"] - self.g0_graphite


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
    db = db or default_database()
    T, P = to_kelvin(T), to_pascal(P)
    check_method(method)
    if carbon_basis not in CARBON_BASES:
        raise InputError(f"carbon_basis must be one of {', '.join(map(repr, CARBON_BASES))}, not {carbon_basis!r}")
    low, high = _checked_bracket(bracket)
    scan = _SteamScan(feed.feed_mol() if isinstance(feed, Stream) else feed, T, P, carbon_basis,
                      species, exclude, method, db, gas=gas, kij=kij)
    low = max(low, scan.lowest_ratio)
    if scan.ln_activity(low) <= 0.0:
        return CarbonLimit(T, P, math.nan, carbon_basis, f"carbon-free down to S/C = {low:g}", scan.evaluations)
    while scan.ln_activity(high) > 0.0:
        if high >= 64.0:
            return CarbonLimit(T, P, math.nan, carbon_basis, f"graphite stable up to S/C = {high:g}",
                               scan.evaluations)
        low, high = high, 2.0 * high
    root = scipy.optimize.brentq(scan.ln_activity, low, high, xtol=xtol)
    return CarbonLimit(T, P, float(root), carbon_basis, "found", scan.evaluations)


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
