"""One specification of what equilibrium to compute, prepared once and solved for any feed, T and P.

``Specification`` says what to compute: the species-set rules, inerts and
frozen species, the gas model and its kij, the data set, reactions held at an
approach, the solver.  ``Prepared`` holds it with everything that does not
depend on the feed or the conditions worked out once (the held reactions
parsed, the data set loaded) and, per species set it meets, the System with
its NASA tables and element rows, the cubic's constants and the complete
reaction set.  ``Prepared.equilibrate`` is the one pipeline every front door
runs (``gibbsmin.equilibrate``, ``equilibrate_with_approach``, case files,
sweeps, the audit):

    feed -> inlet -> species set (cached) -> one fixed-T step (ideal or cubic
    gas, offsets of held reactions) -> at fixed T, or inside the energy
    balance -> energy figures, stability, sensitivities, uncertainty -> checks

The same specification with the same feed and conditions gives the same
answer to the last bit however it is reached: a single call starts cold, so
nothing depends on what was solved before.  ``equilibrate_many`` solves a
batch with each point warm-started from its neighbour.
"""

from __future__ import annotations

import dataclasses
import functools
import threading
from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from . import energy, nonideal, sensitivity
from .eos.interactions import InteractionTable
from .equilibrium import Equilibrium, Restriction
from .errors import InputError
from .frozen import built, replaced
from .reactions import Reaction, independent_reactions, reaction
from .restricted import (check_approaches_met, check_held, frozen_amounts, held_offset_map, reaction_offsets,
                         settling_temperature, with_frozen_totals)
from .nonideal.fluid_phases import solve_fluid_phases
from .fixed_step import (Setup, build_problem, check_feed, check_method, checked, feed_species_set, finite_number,
                     positive_number, setup_on, solve_fixed)
from .solve import CertificateBatch, SolverResult, solve
from .system import Problem
from .streams import Stream
from .thermo.database import SpeciesDatabase
from .thermo.datasets import choose_database
from .thermo.nasa7 import R
from .uncertainty import Uncertainties, energy_balance_uncertainty, point_uncertainties

__all__ = ["Specification", "Prepared", "prepare"]


def _names(value: object, what: str) -> tuple[str, ...]:
    if isinstance(value, str):
        raise InputError(f"{what} takes a list of names, e.g. {what}=['C(s)']")
    return tuple(map(str, value))


@dataclass(frozen=True)
class Specification:
    """What equilibrium to compute, apart from the feed and the conditions.

    Attributes
    ----------
    species : tuple of str or None
        The species set; None for every species made of the feed's elements.
    exclude : tuple of str
        Species left out of the set.
    inert : tuple of str
        Feed species that keep their feed amount and still dilute the gas.
    frozen : tuple of (str, float or None) pairs, or None
        Gas species held at a fixed amount [mol] (None: at their feed amount);
        named in the answer's specification.
    approach : tuple of (reaction, float) pairs
        Reactions (name, equation or Reaction) held at an approach, [K].
    reactions : tuple
        Reactions that stay at equilibrium, first in the independent set.
    gas : str
        "ideal", "peng-robinson" or "srk".
    kij : str, tuple of ((str, str), float) pairs, InteractionTable or None
        The cubic's binary interaction parameters.
    ln_phi : tuple of (str, float) pairs or None
        Fugacity coefficients held fixed at one state (ideal gas model only).
    method : str
        "auto", "newton" or "convex".
    data : str or None
        The data set by name (None: the engine's default, or that of ``db``).
    allow_extrapolation : bool
    T_bounds : (float, float) or None
        Lowest and highest outlet temperature the energy balance may give, [K].
    liquid : bool or None
        Liquid-solution phases with the cubic (``nonideal.fluid_phases``): None
        (the default) allows them with a cubic gas model and not with the
        ideal gas; False keeps the one-fluid answer.
    restricted : bool
        Report the restricted-equilibrium figures (approaches, settling
        temperatures, the reactions at equilibrium, frozen amounts) as
        ``equilibrate_with_approach`` does, even with none held.
    """

    species: tuple[str, ...] | None = None
    exclude: tuple[str, ...] = ()
    inert: tuple[str, ...] = ()
    frozen: tuple[tuple[str, float | None], ...] | None = None
    approach: tuple[tuple[object, float], ...] = ()
    reactions: tuple[object, ...] = ()
    gas: str = "ideal"
    kij: object = "shipped"
    ln_phi: tuple[tuple[str, float], ...] | None = None
    method: str = "auto"
    data: str | None = None
    allow_extrapolation: bool = False
    T_bounds: tuple[float, float] | None = None
    liquid: bool | None = None
    restricted: bool = False

    @classmethod
    def of(cls, *, species: Sequence[str] | None = None, exclude: Sequence[str] = (), inert: Sequence[str] = (),
           frozen: Sequence[str] | Mapping[str, float] | None = None,
           approach: Mapping[str | Reaction, float] | None = None, reactions: Sequence[str | Reaction] = (),
           gas: str = "ideal", kij: object = "shipped", ln_phi: Mapping[str, float] | None = None,
           method: str = "auto", data: str | None = None, allow_extrapolation: bool = False,
           T_bounds: tuple[float, float] | None = None, liquid: bool | None = None,
           restricted: bool = False) -> Specification:
        """The specification of the keyword options of ``gibbsmin.equilibrate`` and ``equilibrate_with_approach``,
        in a form that can be compared and hashed (mappings become sorted pairs)."""
        if approach is None:
            approach = {}
        if not isinstance(approach, Mapping):
            raise InputError("approach takes a mapping of reaction to approach in K, e.g. "
                             "{'steam methane reforming': 10.0}")
        if frozen is not None and isinstance(frozen, str):
            raise InputError("frozen takes a list of names (held at their feed amount) or a mapping of name to "
                             "amount in mol")
        if frozen is not None:
            frozen = tuple(frozen.items()) if isinstance(frozen, Mapping) else tuple((s, None) for s in frozen)
        if isinstance(species, str) or isinstance(exclude, str) or isinstance(inert, str):
            raise InputError("species, exclude and inert take lists of names, e.g. exclude=['C(s)']")
        if isinstance(kij, Mapping):
            kij = tuple(sorted(((tuple(pair), value) for pair, value in kij.items()), key=repr))
        return built(
            cls, species=None if species is None else _names(species, "species"),
            exclude=_names(exclude, "exclude"), inert=_names(inert, "inert"), frozen=frozen,
            approach=tuple(approach.items()), reactions=tuple(reactions), gas=gas, kij=kij,
            ln_phi=None if ln_phi is None else tuple(ln_phi.items()), method=method, data=data,
            allow_extrapolation=bool(allow_extrapolation),
            T_bounds=None if T_bounds is None else tuple(T_bounds) if isinstance(T_bounds, Sequence) else T_bounds,
            liquid=liquid, restricted=restricted)

    @property
    def kij_argument(self) -> object:
        """kij as ``nonideal.gas_phase`` takes it (pairs back to a mapping)."""
        return dict(self.kij) if isinstance(self.kij, tuple) else self.kij


@dataclass
class _SpeciesSet:
    """What a species set needs beyond its System, built on first use (the cubic, the reaction set)."""

    system: object
    phase: object = None
    complete: list[Reaction] | None = None


class Prepared:
    """A specification ready to be solved for any feed, T and P (see the module docstring).

    Built by :func:`prepare`; safe to share between threads.
    """

    def __init__(self, specification: Specification, db: SpeciesDatabase):
        spec = specification
        check_method(spec.method)
        if not isinstance(spec.gas, str):
            raise InputError(f"gas must be a model name ('ideal', 'peng-robinson', 'srk'), got {spec.gas!r}")
        if spec.gas == "ideal" and not (spec.kij is None or (isinstance(spec.kij, str) and spec.kij in
                                                             nonideal.KIJ_CHOICES)
                                        or spec.kij == () or isinstance(spec.kij, InteractionTable)):
            raise InputError(f"kij={spec.kij_argument!r} only applies to a cubic gas model: pass gas='peng-robinson' "
                             "or 'srk' with it, or leave kij out for the ideal gas")
        if spec.ln_phi is not None and spec.gas != "ideal":
            raise InputError("give either ln_phi (held fixed) or a gas model (iterated), not both")
        if spec.liquid not in (None, True, False):
            raise InputError(f"liquid takes True, False or None (the default: liquids with a cubic gas model), "
                             f"got {spec.liquid!r}")
        if spec.liquid and spec.gas == "ideal":
            raise InputError("liquid-solution phases are described by a cubic: pass gas='peng-robinson' or 'srk' "
                             "with liquid=True (with the ideal gas, liquids are pure condensed species such as "
                             "H2O(l) in the species set)")
        #: Whether the fixed-T step splits an unstable gas into liquid-solution phases.
        self.liquids = spec.gas != "ideal" and spec.liquid is not False
        self.specification = spec
        self.db = db
        self.held = [(reaction(name, db=db), finite_number(value, f"approach of {name}")) for name, value in spec.approach]
        self.ln_phi = None if spec.ln_phi is None else {
            db[str(s)].name: finite_number(v, f"ln_phi of {s}") for s, v in spec.ln_phi}
        self._species_sets: dict[int, _SpeciesSet] = {}
        self._lock = threading.Lock()

    def __repr__(self) -> str:
        return f"Prepared({self.specification!r}, data={self.db.data_set!r})"

    # ------------------------------------------------------------------ the pipeline

    def equilibrate(self, feed: Mapping[str, object] | Stream, T: float | None = None,
                    P: float | None = None, *, T_feed: float | Mapping[str, float] | None = None,
                    P_feed: float | Mapping[str, float] | None = None,
                    adiabatic: bool = False, heat_input: float = 0.0, sensitivities: bool = False,
                    uncertainty: bool = False) -> Equilibrium:
        """The equilibrium of a feed: at fixed T and P, or at the T the energy balance sets.

        The arguments are those of :func:`gibbsmin.equilibrate` that change
        from call to call (T in K, P in Pa); the answer is exactly what that
        function returns for the same options.
        """
        return self._equilibrate(feed, T, P, T_feed, adiabatic, heat_input, sensitivities, uncertainty,
                                 P_feed=P_feed)[0]

    def equilibrate_many(self, feeds: Mapping[str, object] | Sequence[Mapping[str, object]],
                         T: float | Sequence[float] | NDArray[np.float64],
                         P: float | Sequence[float] | NDArray[np.float64]) -> list[Equilibrium]:
        """The equilibria of many (feed, T, P) points at fixed T and P, each warm-started from the one before.

        Parameters
        ----------
        feeds : mapping or sequence of mappings
            One feed for every point, or a feed per point (species to mol).
        T, P : float or array
            Temperatures [K] and pressures [Pa], broadcast against each other
            and the feeds.

        Returns
        -------
        list of Equilibrium
            One per point, in order, each checked as ``equilibrate`` checks it.
            Order the points along a sweep axis to profit from the warm starts;
            an answer starts from its neighbour's, so it may differ from a
            cold single call in the last digits (within the certificate's
            tolerances), never in what is certified.
        """
        single = isinstance(feeds, (Mapping, Stream))
        if not single and (isinstance(feeds, str) or not isinstance(feeds, Sequence) or not feeds):
            raise InputError("feeds takes one feed mapping, or a non-empty list of them (one per point)")
        try:
            T_all, P_all = (np.atleast_1d(np.asarray(v, dtype=float)) for v in (T, P))
            count = np.broadcast(T_all, P_all, np.empty(1 if single else len(feeds))).size
        except (TypeError, ValueError):
            sizes = [np.size(T), np.size(P), 1 if single else len(feeds)]
            raise InputError(f"T, P and feeds give {sizes[0]}, {sizes[1]} and {sizes[2]} points: give each one value "
                             "or the same number of values (T in K and P in Pa as numbers)") from None
        if T_all.ndim > 1 or P_all.ndim > 1:
            raise InputError("T and P take one number or a flat list of numbers each")
        T_all, P_all = np.broadcast_to(T_all, (count,)), np.broadcast_to(P_all, (count,))
        answers: list[Equilibrium] = []
        start = None
        for i in range(count):
            feed = feeds if single else feeds[i if len(feeds) > 1 else 0]
            eq, start = self._equilibrate(feed, float(T_all[i]), float(P_all[i]), start=start)
            answers.append(eq)
        return answers

    def feed_setup(self, feed: Mapping[str, float], T_span: tuple[float, float]) -> Setup:
        """The Setup of a feed (species to mol) on this specification's species set over ``T_span`` [K].

        For a batch (``solve_batch``) unit amounts will do: they fix the species
        set and element rows; each point brings its own element totals.
        """
        return self._setup(check_feed(feed, self.db), T_span)[0]

    def solve_batch(self, setup: Setup, T: NDArray[np.float64], P: NDArray[np.float64], b: NDArray[np.float64], *,
                    chains: int = 1) -> tuple[Problem, SolverResult, CertificateBatch]:
        """The raw, certified solves of many points of one setup at fixed T [K] and P [Pa] (element totals ``b``,
        shape (B, elements)), in ``chains`` runs of warm-started neighbours: what a sweep stores.

        Every point must hold the same elements (split a batch by element set first).  The gas model and the
        held reactions' offsets are this specification's, as in ``equilibrate``.
        """
        spec = self.specification
        if self.ln_phi is not None:
            raise InputError("a batch iterates the gas model point by point; use gas='peng-robinson' instead of "
                             "ln_phi held fixed")
        problem = build_problem(setup, T, P, b=b, allow_extrapolation=spec.allow_extrapolation)
        if self.held:
            offsets_at = self._offsets(setup, self._complete_reactions(setup, self._species_set(setup)))
            problem = dataclasses.replace(problem, mu0=problem.mu0 + np.array(
                [offsets_at(float(T_i))[problem.keep] for T_i in T]))
        phase = self._gas_phase(setup, self._species_set(setup))
        if phase.is_ideal:
            result, certificates = solve(problem, spec.method, chains=chains)
        else:
            result, certificates = nonideal.solve_batch_nonideal(problem, phase, T, P, method=spec.method,
                                                                 chains=chains)
        return problem, result, certificates

    def _equilibrate(self, feed, T, P, T_feed=None, adiabatic=False, heat_input=0.0, sensitivities=False,
                     uncertainty=False, start=None, P_feed=None) -> tuple[Equilibrium, tuple[object, SolverResult]]:
        """The pipeline: the answer, and the warm start it offers a neighbour (its Setup and raw solve).

        ``start`` is such a warm start; it is used only at fixed T, on the same System with the same elements
        present.
        """
        spec, db = self.specification, self.db
        if P is None:
            raise InputError("P is required: the pressure in Pa, e.g. P=30e5")
        P = positive_number(P, "P", "Pa")
        if isinstance(feed, Stream):
            feed = feed.feed_mol()
        inlet = energy.read_inlet(feed, T_feed, db, P_feed)
        heat = energy.heat_input_of(heat_input)
        energy_balance = T is None
        self._check_energy_specification(energy_balance, adiabatic, heat, inlet, uncertainty, sensitivities)
        if energy_balance:
            T_span = energy.outlet_bounds(db, inlet, spec.species, spec.T_bounds)
        else:
            if spec.T_bounds is not None:
                raise InputError("T_bounds limits the outlet temperature the energy balance may find; with T given "
                                 "there is nothing to find, so leave T_bounds out")
            T = positive_number(T, "T", "K")
            T_span = (T, T)
        setup, frozen_mol = self._setup(inlet.total, T_span)
        held = self.held
        for rx, _ in held:
            check_held(rx, setup, frozen_mol)
        known = self._species_set(setup)
        phase = self._gas_phase(setup, known)
        complete = self._complete_reactions(setup, known) if spec.restricted or held else None
        text = self._specification_text(energy_balance, frozen_mol)
        offsets_at = self._offsets(setup, complete) if held else None
        step = functools.partial(self._step, setup, P, phase, offsets_at, text, self.liquids)
        residual = None if phase.is_ideal else phase.residual_enthalpy
        H_in, gross_in = nonideal.inlet_enthalpies(None if phase.is_ideal else phase, inlet, P, db,
                                                   spec.allow_extrapolation, liquids=self.liquids)
        if energy_balance:
            eq, problem, result = energy.solve_energy_balance(
                setup, H_in + heat, P, T_bounds=T_span, gross_inlet=gross_in + abs(heat),
                coldest_feed=min(inlet.temperatures.values()), method=spec.method,
                allow_extrapolation=spec.allow_extrapolation, residual_enthalpy=residual, step=step,
                phase_set_solve=not held,
                phase_set_step=None if phase.is_ideal else functools.partial(nonideal.phase_set_step, phase),
                enthalpy_kinks=None if phase.is_ideal else phase.enthalpy_kinks,
                plain_ideal_gas=phase.is_ideal and not held)
            eq = dataclasses.replace(eq, specification=text)
        else:
            warm = start is not None and _start_key(start[0]) == _start_key(setup)
            eq, problem, result = step(T, start[1] if warm else None, seed=start[2] if warm else None)
        if eq.fluid_phases is not None and (sensitivities or uncertainty):
            raise InputError("sensitivities and uncertainty are not yet computed for an answer with liquid-solution "
                             "phases; drop them, or pass liquid=False for the one-gas answer")
        figures = energy.energy_figures(setup, eq, P, inlet, H_in, heat, inlet_gross=gross_in,
                                        residual_enthalpy=residual)
        extras = {**energy.energy_extras(figures), "data_set": db.data_set}
        stability = None if phase.is_ideal else (eq.gas.stability if eq.fluid_phases is not None else
                                                 nonideal.stability_checked(phase, eq, stacklevel=4))
        if sensitivities:
            extras["sensitivities"] = self._sensitivities(setup, phase, problem, result, eq.T, P)
        if uncertainty:
            eq = self._with_uncertainties(eq, setup, problem, result, phase, complete, offsets_at,
                                          inlet.total if energy_balance else None)
        eq = checked(replaced(eq, energy=figures, data_set=db.data_set, extras={**eq.extras, **extras}), stacklevel=4)
        if held:
            check_approaches_met(eq, held, self.ln_phi, db, spec.allow_extrapolation)
        if spec.restricted or held:
            restriction = Restriction(
                approach_K={rx.name: dT for rx, dT in held},
                settling_temperature_K={rx.name: settling_temperature(rx, eq.T, dT) for rx, dT in held},
                reactions_at_equilibrium=tuple(r.equation for r in complete
                                               if r.name not in {rx.name for rx, _ in held}),
                frozen_mol=dict(frozen_mol))
            eq = dataclasses.replace(eq, restriction=restriction, extras={**eq.extras, **restriction_extras(
                restriction)})
        if stability is not None:
            # The verdict enters the certificate after the precision check, which judges the residuals alone.
            eq = nonideal.with_stability_verdict(eq, stability)
        return eq, (setup, result, eq.fluid_phases)

    def _check_energy_specification(self, energy_balance: bool, adiabatic: bool, heat: float, inlet,
                                    uncertainty: bool, sensitivities: bool) -> None:
        spec = self.specification
        if energy_balance and not (adiabatic or heat):
            raise InputError("give the outlet temperature T, or adiabatic=True (with T_feed) to have the energy "
                             "balance find it")
        if not energy_balance and (adiabatic or heat):
            raise InputError("T fixes the outlet temperature, so the energy balance cannot also fix it: leave T out "
                             "for an adiabatic reactor (or one with heat_input), or drop adiabatic/heat_input to get "
                             "the duty at T (pass T_feed); not both")
        if energy_balance and self.ln_phi is not None:
            raise InputError("ln_phi is held fixed at one state, which an energy balance moves away from; use "
                             "gas='peng-robinson' (iterated) or leave ln_phi out")
        if energy_balance and not inlet.has_temperatures:
            raise InputError("the energy balance needs the feed temperature: pass T_feed in K (one number, or one "
                             "per feed species or stream)")
        if uncertainty and ((self.held and energy_balance) or self.ln_phi is not None):
            raise InputError("uncertainty=True with held approaches is propagated at a fixed outlet temperature and "
                             "with the gas model iterated: give T, and gas='peng-robinson' instead of ln_phi if "
                             "the gas is not ideal")
        if uncertainty and energy_balance and spec.gas != "ideal":
            raise InputError(f"uncertainty=True with the energy balance is propagated for the ideal gas only; with "
                             f"gas={spec.gas!r} give the outlet temperature T, or drop uncertainty")
        if sensitivities and self.held:
            raise InputError("sensitivities are not computed with reactions held at an approach (their offsets "
                             "move with T); drop sensitivities, or the approach")

    def _setup(self, total: Mapping[str, float], T_span: tuple[float, float]) -> tuple[Setup, dict[str, float]]:
        """The feed on its species set (the System cached per set), frozen species' totals given back."""
        spec = self.specification
        frozen_mol = frozen_amounts(None if spec.frozen is None else dict(spec.frozen), total, self.db)
        inert = [*spec.inert, *frozen_mol]
        amounts = {**total, **frozen_mol}
        setup = setup_on(feed_species_set(amounts, species=spec.species, exclude=spec.exclude, inert=inert,
                                          db=self.db), amounts, T_span, spec.allow_extrapolation)
        if frozen_mol:
            setup = with_frozen_totals(setup, total, frozen_mol)
        return setup, frozen_mol

    def gas_phase_of(self, setup: Setup):
        """This specification's gas model on a setup's species set (kept per set)."""
        return self._gas_phase(setup, self._species_set(setup))

    def _species_set(self, setup: Setup) -> _SpeciesSet:
        key = id(setup.system)
        known = self._species_sets.get(key)
        if known is None or known.system is not setup.system:
            with self._lock:
                known = _SpeciesSet(setup.system)   # which keeps the System alive while its id is a key
                self._species_sets[key] = known
        return known

    def _gas_phase(self, setup: Setup, known: _SpeciesSet):
        if known.phase is None:
            known.phase = nonideal.gas_phase(setup.system, self.specification.gas, kij=self.specification.kij_argument)
        return known.phase

    def _complete_reactions(self, setup: Setup, known: _SpeciesSet) -> list[Reaction]:
        if known.complete is None:
            known.complete = independent_reactions(
                setup.system, include=[rx for rx, _ in self.held] + list(self.specification.reactions), db=self.db)
        return known.complete

    def _specification_text(self, energy_balance: bool, frozen_mol: Mapping[str, float]) -> str:
        parts = [f"{rx.name} at {dT:g} K approach" for rx, dT in self.held]
        if self.specification.frozen is not None:
            parts += [f"{s} frozen" for s in frozen_mol]
        return "; ".join(["H and P" if energy_balance else "T and P", *parts])

    def _offsets(self, setup: Setup, complete: Sequence[Reaction]):
        """The offsets to g0/RT that hold each held reaction at its approach, as a function of T [K]."""
        extrapolate = self.specification.allow_extrapolation

        def offsets_at(T: float) -> NDArray[np.float64]:
            shift = {rx.name: rx.ln_K(T, allow_extrapolation=extrapolate)
                     - rx.ln_K(settling_temperature(rx, T, dT), allow_extrapolation=extrapolate)
                     for rx, dT in self.held}
            return reaction_offsets(setup.system, complete, [shift.get(r.name, 0.0) for r in complete])
        return offsets_at

    def _step(self, setup: Setup, P: float, phase, offsets_at, text: str, liquids: bool, T: float,
              start: SolverResult | None, seed=None) -> tuple[Equilibrium, object, SolverResult]:
        """The one fixed-T step: the gas model's solve at T with the held reactions' offsets at T, and with
        ``liquids`` the split into liquid-solution phases where the one gas is not stable (``seed``: a
        neighbour's fluid phases, where the split starts).

        With "auto" a warm start that fails (a phase swapped since the
        neighbour) is retried cold before the cone solver is tried, which is
        far slower.
        """
        eq, problem, result = self._one_fluid_step(setup, P, phase, offsets_at, text, T, start)
        if liquids:
            split = solve_fluid_phases(setup, T, P, phase, one_gas=eq, one_gas_result=result,
                                       offsets=None if offsets_at is None else offsets_at(T),
                                       allow_extrapolation=self.specification.allow_extrapolation, seed=seed)
            if split is not None:
                eq = split[0]
        return eq, problem, result

    def _one_fluid_step(self, setup: Setup, P: float, phase, offsets_at, text: str, T: float,
                        start: SolverResult | None) -> tuple[Equilibrium, object, SolverResult]:
        spec = self.specification
        offsets = None if offsets_at is None else offsets_at(T)
        ln_phi = None if self.ln_phi is None else np.array([self.ln_phi.get(s, 0.0) for s in setup.system.gas_names])

        def solve_with(method: str, warm: SolverResult | None):
            if ln_phi is not None:
                return solve_fixed(setup, T, P, method=method, offsets=offsets, ln_phi=ln_phi, start=warm,
                                   allow_extrapolation=spec.allow_extrapolation, specification=text)
            return nonideal.solve_nonideal(setup, T, P, phase, method=method, offsets=offsets, start=warm,
                                           allow_extrapolation=spec.allow_extrapolation, specification=text)
        if spec.method == "auto" and start is not None:
            warm = solve_with("newton", start)
            if warm[0].certificate.certified:
                return warm
            start = None
        return solve_with(spec.method, start)

    def _sensitivities(self, setup: Setup, phase, problem, result, T: float, P: float) -> dict[str, object]:
        spec = self.specification
        if phase.is_ideal:
            return sensitivity.equilibrium_sensitivities(setup, problem, result, T, P, db=self.db).to_dict()
        return nonideal.nonideal_sensitivities(setup, phase, result, T, P, method=spec.method,
                                               allow_extrapolation=spec.allow_extrapolation, db=self.db).to_dict()

    def _with_uncertainties(self, eq: Equilibrium, setup: Setup, problem, result, phase, complete, offsets_at,
                            balanced_feed: Mapping[str, float] | None) -> Equilibrium:
        """The answer with the uncertainties from the data set's formation enthalpies (``gibbsmin.uncertainty``).

        Along the energy balance where ``balanced_feed`` (the inlet) is given;
        at fixed T by implicit derivatives for the ideal gas, and by
        differences of whole solves, warm-started, where a cubic's phi moves
        with the data.  A held reaction's K(T_r) moves with the data too
        (``restricted.held_offset_map``).
        """
        data_set, T = self.db.data_set, eq.T
        if balanced_feed is not None:
            return _with_uncertainty_fields(eq, energy_balance_uncertainty(
                setup, problem, result, T, eq.P, balanced_feed, data_set))
        offset_map, base = None, 0.0
        if self.held:
            offset_map = held_offset_map(setup.system, complete, {rx.name: settling_temperature(rx, T, dT)
                                                                  for rx, dT in self.held}, T)
            base = offsets_at(T)
        amounts_at = None if phase.is_ideal else self._amounts_at(eq, setup, result, phase, base, offset_map)
        return _with_uncertainty_fields(eq, point_uncertainties(
            setup, problem, result, T, data_set, amounts_at=amounts_at, offset_map=offset_map))

    def _amounts_at(self, eq: Equilibrium, setup: Setup, result: SolverResult, phase, base, offset_map):
        """The amounts of whole non-ideal solves with g0/RT moved by given offsets (and the held reactions' K
        moved with them), warm-started from the answer: the cubic's differences for its uncertainties."""
        spec, T = self.specification, eq.T

        def amounts_at(offsets):
            moved_by = offsets if offset_map is None else base + offsets + offset_map @ (offsets * R * T)
            moved = nonideal.solve_nonideal(setup, T, eq.P, phase, method=spec.method, offsets=moved_by,
                                            start=result, allow_extrapolation=spec.allow_extrapolation)[0]
            return np.array([moved.amounts[s] for s in setup.system.names])
        return amounts_at


def restriction_extras(restriction: Restriction) -> dict[str, object]:
    """A restricted answer's figures by the names ``Equilibrium.extras`` has always used."""
    return {"approach K": dict(restriction.approach_K),
            "settling temperature K": dict(restriction.settling_temperature_K),
            "reactions at equilibrium": list(restriction.reactions_at_equilibrium),
            "frozen mol": dict(restriction.frozen_mol)}


def _start_key(setup: Setup) -> tuple[int, bytes]:
    """What a warm start must share with the point it starts: the System, and which elements are present."""
    return id(setup.system), (setup.b > 1e-14 * max(float(setup.b.max()), 1e-300)).tobytes()


def _with_uncertainty_fields(eq: Equilibrium, u: Uncertainties) -> Equilibrium:
    return dataclasses.replace(eq, uncertainty=u.amounts, mole_fraction_uncertainty=u.mole_fractions,
                               dry_mole_fraction_uncertainty=u.dry_mole_fractions, T_uncertainty=u.T)


def prepare(*, species: Sequence[str] | None = None, exclude: Sequence[str] = (), inert: Sequence[str] = (),
            frozen: Sequence[str] | Mapping[str, float] | None = None,
            approach: Mapping[str | Reaction, float] | None = None, reactions: Sequence[str | Reaction] = (),
            gas: str = "ideal", kij: object = "shipped", ln_phi: Mapping[str, float] | None = None,
            method: str = "auto", data: str | None = None, db: SpeciesDatabase | None = None,
            allow_extrapolation: bool = False, T_bounds: tuple[float, float] | None = None,
            liquid: bool | None = None) -> Prepared:
    """Prepare an equilibrium specification once, to solve it for many feeds and conditions.

    The options are those of :func:`gibbsmin.equilibrate` and
    :func:`gibbsmin.equilibrate_with_approach` that do not change from call to
    call; ``p.equilibrate(feed, T=..., P=...)`` (or ``T_feed=...,
    adiabatic=True``) then returns exactly what those functions return, and
    ``p.equilibrate_many(feeds, T, P)`` a batch.

    Examples
    --------
    >>> p = prepare(species=["CH4", "H2O", "CO", "CO2", "H2"])
    >>> eq = p.equilibrate({"CH4": 1.0, "H2O": 3.0}, T=1100.0, P=30e5)
    >>> round(eq.mole_fractions["H2"], 3) > 0.4
    True
    """
    restricted = bool(approach) or frozen is not None or bool(reactions) or ln_phi is not None
    specification = Specification.of(
        species=species, exclude=exclude, inert=inert, frozen=frozen, approach=approach, reactions=reactions,
        gas=gas, kij=kij, ln_phi=ln_phi, method=method, data=data, allow_extrapolation=allow_extrapolation,
        T_bounds=T_bounds, liquid=liquid, restricted=restricted)
    return Prepared(specification, choose_database(data, db))
