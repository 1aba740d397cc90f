"""The front doors: ``equilibrate`` and ``equilibrate_with_approach``, thin over one prepared pipeline.

Each call finds (or builds) the ``prepared.Prepared`` of its options in a small
cache keyed on those options and the database, and runs its ``equilibrate``;
so a call gives exactly what ``gibbsmin.prepare(...).equilibrate(...)`` gives.
A specification whose options cannot be compared (an unhashable kij table, say)
is prepared afresh.
"""

from __future__ import annotations

import threading
from collections import OrderedDict
from collections.abc import Mapping, Sequence

from .eos.interactions import InteractionTable
from .equilibrium import Equilibrium
from .prepared import Prepared, Specification
from .reactions import Reaction
from .streams import Stream
from .thermo.database import SpeciesDatabase
from .thermo.datasets import choose_database
from .units import to_kelvin, to_pascal

__all__ = ["equilibrate", "equilibrate_with_approach", "prepared_for"]

#: Prepared specifications kept; the least recently used goes first.
CACHE_SIZE = 64

_cache: OrderedDict[object, Prepared] = OrderedDict()
_cache_lock = threading.Lock()


def prepared_for(specification: Specification, db: SpeciesDatabase | None) -> Prepared:
    """The prepared form of a specification on the database of its data set (or ``db``), from the cache."""
    database = choose_database(specification.data, db)
    try:
        key = (specification, id(database))
        hash(key)
    except TypeError:
        return Prepared(specification, database)
    with _cache_lock:
        found = _cache.get(key)
        if found is not None and found.db is database:
            _cache.move_to_end(key)
            return found
    found = Prepared(specification, database)
    with _cache_lock:
        _cache[key] = found
        while len(_cache) > CACHE_SIZE:
            _cache.popitem(last=False)
    return found


def equilibrate(
    feed: Mapping[str, object],
    T: float | None = None,
    P: float | None = None,
    *,
    T_feed: float | Mapping[str, float] | None = None,
    adiabatic: bool = False,
    heat_input: float = 0.0,
    species: Sequence[str] | None = None,
    exclude: Sequence[str] = (),
    inert: Sequence[str] = (),
    method: str = "auto",
    gas: str = "ideal",
    kij: str | Mapping[tuple[str, str], float] | InteractionTable | None = "shipped",
    db: SpeciesDatabase | None = None,
    data: str | None = None,
    allow_extrapolation: bool = False,
    sensitivities: bool = False,
    T_bounds: tuple[float, float] | None = None,
    uncertainty: bool = False,
    liquid: bool | None = None,
) -> Equilibrium:
    """Equilibrium of a feed at fixed temperature and pressure, or at the temperature the energy balance sets.

    Parameters
    ----------
    feed : mapping
        Species name (or alias) to amount, [mol]; or, for several streams
        mixed at the inlet, stream name to such a mapping.  Any time basis
        will do (mol/s makes every heat figure a power in W).
    T : float, optional
        Outlet temperature, [K].  Leave it out with ``adiabatic=True`` (or a
        ``heat_input``) to have the energy balance find it.
    P : float
        Pressure, [Pa].
    T_feed : float or mapping, optional
        Inlet temperature, [K]: one number for the whole feed, or a mapping
        per feed species or per feed stream (each mixed in at its own
        temperature).  Needed for the energy balance; with ``T`` given it
        adds the reactor's duty to the result.
    adiabatic : bool
        Find the outlet temperature at which the outlet enthalpy equals the
        inlet enthalpy plus ``heat_input`` (specification "H and P").
    heat_input : float
        Heat added to the reactor, [J per the feed amounts; W for mol/s];
        negative for heat removed or lost.
    species : list of str, optional
        The species set; by default every species of the database made only
        of the feed's elements.
    exclude : list of str
        Species to leave out of the set (e.g. ``["C(s)"]`` to suppress carbon).
    inert : list of str
        Feed species that do not react but still dilute the gas.
    method : {"auto", "newton", "convex"}
    gas : {"ideal", "peng-robinson", "srk"}
        The gas model; the cubic equations of state take their critical
        constants from the species data and treat species without them as
        ideal (``gibbsmin.nonideal``).  The result's ``gas_model`` names it.
    kij : "shipped", "none" or mapping
        Binary interaction parameters of the cubic: "shipped" (default) takes
        the published values of ``species/interactions.toml`` (Peng-Robinson
        only; zero for pairs it lacks), "none" sets every one to zero, a
        mapping ``{("H2", "NH3"): 0.05}`` gives exactly those pairs, and an
        ``InteractionTable`` (``gibbsmin.eos.default_interactions().updated({...})``)
        its pairs of the model.  The result's ``extras["binary_interactions"]``
        lists the non-zero ones used.
    db : SpeciesDatabase, optional
    data : str, optional
        The thermochemical data set by name (``gibbsmin.thermo.DATA_SETS``):
        "atct-anchored" (the default) or "nasa-1993"; not with a ``db`` of
        another set.  The result's ``extras["data_set"]`` names the one used.
    allow_extrapolation : bool
        Use polynomials outside their fitted temperature ranges.
    sensitivities : bool
        Add ``extras["sensitivities"]``: d(amounts)/dT, d/dP, d/d(feed) and
        the equilibrium and frozen heat capacities (``sensitivity.Sensitivities``);
        with a cubic gas by central differences of whole solves, so that phi
        moves with the conditions.
    T_bounds : (float, float), optional
        Lowest and highest outlet temperature the energy balance may give,
        [K]; by default the range where every named gas species has data.
    liquid : bool, optional
        With a cubic gas model, liquid-solution phases on the same cubic
        (``nonideal.fluid_phases``): at a fixed T, a gas the tangent-plane
        test finds unstable is split into gas and liquid (and more liquids
        where the test finds them), each phase in ``Equilibrium.fluid_phases``
        with its amounts, Z and density; the certificate covers every phase.
        None (the default) allows them with a cubic, False keeps the one-gas
        answer (flagged not certified where it would condense).  Not yet in
        the energy balance, which keeps the one-gas answer.
    uncertainty : bool
        Fill ``Equilibrium.uncertainty``: the standard uncertainty [mol] of
        every amount, propagated linearly from the data set's uncertainties of
        the enthalpies of formation (``gibbsmin.uncertainty``; needs a data set
        that states them, ``data="atct-anchored"``).  Where the energy balance
        sets T (ideal gas), also ``Equilibrium.T_uncertainty`` [K], with the
        amounts' uncertainties along the energy balance.

    Returns
    -------
    Equilibrium
        ``extras`` holds ``enthalpy_J`` and ``entropy_J_per_K`` of the outlet;
        with ``T_feed`` also ``feed_enthalpy_J``, ``duty_W`` (heat added to
        the reactor, sign convention in ``duty_sign_convention``) and
        ``energy_balance_residual`` (relative to the gross enthalpy).

    Examples
    --------
    >>> eq = equilibrate({"CH4": 1.0, "H2O": 3.0}, T=1100.0, P=30e5)
    >>> round(eq.mole_fractions["H2"], 3) > 0.4
    True
    >>> flame = equilibrate({"CH4": 1.0, "O2": 2.0, "N2": 7.52}, P=101325.0, T_feed=298.15,
    ...                     adiabatic=True, exclude=["C(s)", "H2O(l)", "H2O(s)"])
    >>> 2200 < flame.T < 2250
    True
    """
    specification = Specification.of(species=species, exclude=exclude, inert=inert, gas=gas, kij=kij, method=method,
                                     data=data, allow_extrapolation=allow_extrapolation, T_bounds=T_bounds,
                                     liquid=liquid)
    return prepared_for(specification, db).equilibrate(feed, T, P, T_feed=T_feed, adiabatic=adiabatic,
                                                       heat_input=heat_input, sensitivities=sensitivities,
                                                       uncertainty=uncertainty)


def equilibrate_with_approach(
    feed: Mapping[str, object] | Stream,
    T: float | str | None,
    P: float | str,
    approach: Mapping[str | Reaction, float] | None = None,
    *,
    frozen: Sequence[str] | Mapping[str, float] | None = None,
    species: Sequence[str] | None = None,
    exclude: Sequence[str] = (),
    reactions: Sequence[str | Reaction] = (),
    method: str = "auto",
    ln_phi: Mapping[str, float] | None = None,
    gas: str = "ideal",
    kij: str | Mapping[tuple[str, str], float] | None = "shipped",
    T_feed: float | Mapping[str, float] | None = None,
    adiabatic: bool = False,
    heat_input: float = 0.0,
    T_bounds: tuple[float, float] | None = None,
    db: SpeciesDatabase | None = None,
    allow_extrapolation: bool = False,
    data: str | None = None,
    uncertainty: bool = False,
    liquid: bool | None = None,
) -> Equilibrium:
    """Equilibrium with reactions held at a temperature approach and species frozen, at fixed T or adiabatic.

    Parameters
    ----------
    feed : mapping or Stream
        Species to amount [mol] (or a Stream, whose mol/s serve as mol); for
        the energy balance also stream name to such a mapping, as for
        :func:`gibbsmin.equilibrate`.
    T : float or str or None
        Outlet temperature, [K] (or text such as ``"850 degC"``); None with
        ``adiabatic=True`` (or a ``heat_input``), where the energy balance sets it.
    P : float or str
        Pressure, [Pa] (or text such as ``"30 bar(g)"``).
    approach : mapping, optional
        Reaction (name, equation or Reaction) to its approach, [K]: positive =
        short of equilibrium, e.g. ``{"steam methane reforming": 10.0}``.
    frozen : list or mapping, optional
        Gas species held at their feed amount (a list), or at a chosen amount
        [mol] (a mapping); they do not react but dilute the gas.
    species, exclude
        The species set, as for :func:`gibbsmin.equilibrate`.
    reactions : list, optional
        Reactions that must stay at equilibrium, placed in the independent set
        before the default choice (see the module docstring).
    method : {"auto", "newton", "convex"}
    ln_phi : mapping, optional
        Gas species to ln of its fugacity coefficient, held fixed for the solve.
    gas, kij : optional
        A cubic gas model instead (``gas="peng-robinson"``), iterated to
        convergence as in :func:`gibbsmin.equilibrate`; not with ``ln_phi``.
        The approach is then on the fugacity quotient: K(T_settle) = Q_f.
    T_feed, adiabatic, heat_input, T_bounds
        The energy balance, as for :func:`gibbsmin.equilibrate` (with T given,
        ``T_feed`` adds the duty to the result): the outlet
        temperature at which the outlet with its held reactions holds the
        inlet enthalpy plus ``heat_input``.  Each held reaction settles at
        its approach from that outlet temperature.
    db : SpeciesDatabase, optional
    allow_extrapolation : bool
    data : str, optional
        The thermochemical data set by name, as for :func:`gibbsmin.equilibrate`.
    uncertainty : bool
        Fill the answer's uncertainty fields as :func:`gibbsmin.equilibrate`
        does, with each held reaction's K(T_r) moving with the formation data
        (``held_offset_map``); at a fixed T, not with ``ln_phi``.

    Returns
    -------
    Equilibrium
        With ``extras``: "approach K", "settling temperature K", "reactions at
        equilibrium" (equations) and "frozen mol"; with the energy balance also
        the energy figures of :func:`gibbsmin.equilibrate`.

    Examples
    --------
    >>> eq = equilibrate_with_approach({"CH4": 1.0, "H2O": 3.0}, "850 degC", "30 bar",
    ...                                approach={"steam methane reforming": 10.0})
    >>> round(eq.extras["settling temperature K"]["steam methane reforming"], 2)
    1113.15
    """
    specification = Specification.of(
        species=species, exclude=exclude, frozen=frozen, approach=approach, reactions=reactions, gas=gas, kij=kij,
        ln_phi=ln_phi, method=method, data=data, allow_extrapolation=allow_extrapolation, T_bounds=T_bounds,
        liquid=liquid,
        restricted=True)
    if T is not None:
        T = to_kelvin(T)
    return prepared_for(specification, db).equilibrate(feed, T, None if P is None else to_pascal(P), T_feed=T_feed, adiabatic=adiabatic,
                                                       heat_input=heat_input, uncertainty=uncertainty)
