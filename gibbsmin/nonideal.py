"""Equilibrium with a non-ideal gas: fugacity coefficients from a cubic equation of state.

In a non-ideal gas the potentials are

    mu_j/RT = g0_j/RT + ln(P/P0) + ln y_j + ln phi_j(T, P, y).

With phi held fixed, ln phi_j only shifts g0_j/RT, and the problem is the
convex one every solver of the package takes.  The non-ideal equilibrium is
therefore the fixed point  ln phi = F(ln phi),  where F solves the frozen-phi
problem (``settle.solve_fixed`` builds it once; each later pass only shifts
the gas potentials and re-solves, warm-started from the previous answer) and
evaluates the equation of state at the composition it returns.  The plain
iteration converges linearly (each pass cuts the change in ln phi by about ten
in an ammonia loop at 300 bar: 11 passes to 1e-10); Anderson acceleration
over the last three passes needs 5 or 6, and whenever the change stops
shrinking it forgets its history and takes a half step instead.

Certificate
-----------
The loop ends when ln phi, evaluated at the final composition, differs from
the value the final solve held fixed by less than ``tolerance`` (1e-10).  The
returned ``certificate`` is then recomputed with ln phi at the final
composition, so its ``stationarity`` is the residual of the non-ideal
condition mu_j/RT = sum_k a_kj lambda_k, and its condensed-phase margin uses
the same potentials.

Species without critical constants
----------------------------------
Radicals and atoms (OH, H, CH3, NH2, ...) have no critical constants.  They
are treated as ideal gases: ln phi = 0, and they are left out of the mixture's
a and b; the cubic describes the other species at their mole fractions
renormalised among themselves.  This is a consistent model (the residual
Gibbs energy is that of the described species alone), and in loop gases these
species sit at mole fractions of 1e-10 and below, where it changes nothing
measurable.  The result names them in ``extras["gas_model_note"]``, and a
warning is given if together they exceed ``IDEAL_SPECIES_WARNING`` of the gas.
"""

from __future__ import annotations

import warnings
from collections.abc import Mapping
from dataclasses import dataclass, field, replace

import numpy as np
from numpy.typing import NDArray

from .equilibrium import Equilibrium
from .errors import ConvergenceError, InputError
from .eos import (GasModel, GasProperties, IdealGasModel, canonical_model_name, default_interactions,
                  gas_model_for_species)
from .settle import Setup, build_problem, fixed_problem, solve_fixed, to_equilibrium
from .solve import CertificateBatch, SolverResult, certify, solve
from .system import Problem, System
from .thermo.database import SpeciesDatabase
from .thermo.nasa7 import R

#: Above this total mole fraction of species treated as ideal for lack of critical constants, warn.
IDEAL_SPECIES_WARNING = 1e-3


@dataclass(frozen=True)
class OuterLoopOptions:
    """Tuning of the fixed-point iteration on ln phi.

    Attributes
    ----------
    tolerance : float
        Converged when max |ln phi(y) - ln phi held fixed| is below this [-].
    max_iterations : int
        Frozen-phi solves allowed before giving up.
    memory : int
        Past passes Anderson acceleration combines (0: plain iteration).
    """

    tolerance: float = 1e-10
    max_iterations: int = 60
    memory: int = 3


@dataclass(frozen=True, eq=False)
class GasPhase:
    """The gas model of a System's gas phase.

    Attributes
    ----------
    name : str
        Canonical model name: "ideal", "peng-robinson" or "srk".
    model : GasModel
        The equation of state over the described species, in their order.
    described : ndarray of int
        Positions, among the System's gas species, of the species the model
        describes (every species with critical constants).
    gas_names : tuple of str
        All gas species of the System, in its order.
    ideal_species : tuple of str
        Gas species treated as ideal for lack of critical constants.
    kij : mapping
        The non-zero binary interaction parameters in use, ``{(a, b): kij}``.
    kij_origin : str
        Where they come from: "shipped table", "none" (all zero) or "given".
    """

    name: str
    model: GasModel
    described: NDArray[np.int_]
    gas_names: tuple[str, ...]
    ideal_species: tuple[str, ...]
    kij: Mapping[tuple[str, str], float] = field(default_factory=dict)
    kij_origin: str = "none"

    @property
    def is_ideal(self) -> bool:
        return self.name == "ideal"

    def _described_fractions(self, n_gas: NDArray[np.float64]) -> tuple[NDArray[np.float64], float]:
        """Mole fractions among the described species and their total amount [mol]."""
        part = np.asarray(n_gas, dtype=float)[self.described]
        total = float(part.sum())
        if not total > 0.0:
            raise InputError("the gas holds none of the species the equation of state describes; "
                             "use gas='ideal' for this species set")
        return part / total, total

    def properties(self, T: float, P: float, n_gas: NDArray[np.float64]) -> GasProperties:
        """Z, ln phi, H_res/RT and S_res/R of the described species for gas amounts n_gas [mol] (System order)."""
        y, _ = self._described_fractions(n_gas)
        return self.model.properties(float(T), float(P), y)

    def ln_phi(self, T: float, P: float, n_gas: NDArray[np.float64]) -> NDArray[np.float64]:
        """ln phi of every gas species of the System [-]; zero for the species treated as ideal.

        Parameters
        ----------
        T : float
            Temperature, [K].
        P : float
            Pressure, [Pa].
        n_gas : ndarray, shape (n_gas,)
            Gas amounts (or mole fractions) in the System's gas order, [mol].
        """
        ln_phi = np.zeros(len(self.gas_names))
        if not self.is_ideal:
            y, _ = self._described_fractions(n_gas)
            ln_phi[self.described] = self.model.ln_phi(float(T), float(P), y)
        return ln_phi

    def ln_phi_batch(self, T: NDArray[np.float64], P: NDArray[np.float64],
                     n_gas: NDArray[np.float64]) -> NDArray[np.float64]:
        """ln phi of every gas species for a batch: T [K], P [Pa] of shape (B,), amounts (B, n_gas) [mol]."""
        ln_phi = np.zeros(np.shape(n_gas))
        if not self.is_ideal:
            part = np.asarray(n_gas, dtype=float)[:, self.described]
            y = part / part.sum(axis=1, keepdims=True)
            ln_phi[:, self.described] = self.model.ln_phi(np.asarray(T, float), np.asarray(P, float), y)
        return ln_phi

    def residual_enthalpy(self, T: float, P: float, n_gas: NDArray[np.float64]) -> float:
        """Residual enthalpy h - h_ideal of the gas, [J], for amounts n_gas [mol] in the System's gas order.

        This is the ``energy.ResidualEnthalpy`` hook of the energy balance.
        """
        if self.is_ideal or not np.any(np.asarray(n_gas)[self.described] > 0.0):
            return 0.0
        y, total = self._described_fractions(n_gas)
        return float(total * R * T * self.model.properties(float(T), float(P), y).H_res_RT)

    def stream_residual_enthalpy(self, amounts: Mapping[str, float], T: float, P: float) -> float:
        """Residual enthalpy of a gas stream given by species name [mol] at T [K] and P [Pa], [J].

        Species outside the System's gas phase (condensed, or not in the set)
        contribute nothing.
        """
        n_gas = np.array([amounts.get(name, 0.0) for name in self.gas_names], dtype=float)
        return self.residual_enthalpy(T, P, n_gas)


def gas_phase(system: System, gas: str = "peng-robinson", *,
              kij: str | Mapping[tuple[str, str], float] | None = "shipped",
              quantum_correction: bool = True) -> GasPhase:
    """The gas model ``gas`` for the gas species of a System.

    Parameters
    ----------
    system : System
    gas : {"ideal", "peng-robinson", "srk"}
        Model name ("pr" and "soave-redlich-kwong" are accepted too).
    kij : "shipped", "none" or mapping
        Binary interaction parameters [-].  "shipped" (the default): the
        published values of ``species/interactions.toml`` for this model,
        zero for every other pair (the table has Peng-Robinson values only).
        "none" (or None): all zero.  A mapping such as ``{("H2", "NH3"): 0.05}``:
        exactly those pairs, zero for the rest (start from
        ``gibbsmin.eos.default_interactions().for_model(gas)`` to extend the table).
    quantum_correction : bool
        Effective critical constants for H2 and He (Gunn, Chueh and Prausnitz;
        see ``gibbsmin.eos.quantum``).

    Raises
    ------
    InputError
        An unknown model name, or a kij pair naming a species that is not a
        gas of the set or has no critical constants.
    """
    gas_records = system.records[: system.n_gas]
    gas_names = tuple(r.name for r in gas_records)
    described = np.array([j for j, r in enumerate(gas_records) if r.critical is not None], dtype=int)
    records = [gas_records[j] for j in described]
    # The registry validates the name and refuses a cubic without constants; with no species to
    # describe, asking it for the first gas species gets the right message.
    asked = records or list(gas_records[:1])
    names = [r.name for r in records]
    pairs, origin = _interaction_pairs(kij, gas, names)
    model = gas_model_for_species(gas, [r.name for r in asked], database=SpeciesDatabase(asked),
                                  kij=_kij_matrix(pairs, names, gas_names) if pairs else "none",
                                  quantum_correction=quantum_correction)
    if isinstance(model, IdealGasModel):
        return GasPhase("ideal", IdealGasModel(len(gas_names)), np.arange(len(gas_names)), gas_names, ())
    ideal = tuple(name for name in gas_names if name not in names)
    used = {pair: float(value) for pair, value in pairs.items() if value != 0.0}
    return GasPhase(model.name, model, described, gas_names, ideal, used, origin if used else "none")


KIJ_CHOICES = ("shipped", "none")


def _interaction_pairs(kij: str | Mapping[tuple[str, str], float] | None, gas: str,
                       names: list[str]) -> tuple[Mapping[tuple[str, str], float], str]:
    """The kij pairs asked for, and a word for where they come from."""
    if kij is None:
        return {}, "none"
    if isinstance(kij, str):
        if kij not in KIJ_CHOICES:
            raise InputError(f"kij={kij!r} is not understood: give 'shipped' (the published table, the default), "
                             "'none' (all zero) or a mapping of species pairs to values, e.g. {('H2', 'NH3'): 0.05}")
        if kij == "none" or canonical_model_name(gas) == "ideal":
            return {}, "none"
        return default_interactions().for_model(gas, names), "shipped table"
    if not isinstance(kij, Mapping):
        raise InputError(f"kij must be 'shipped', 'none' or a mapping of species pairs to values, got {kij!r}")
    return kij, "given"


def _kij_matrix(kij: Mapping[tuple[str, str], float] | None, names: list[str],
                gas_names: tuple[str, ...]) -> NDArray[np.float64] | None:
    if not kij:
        return None
    k = np.zeros((len(names), len(names)))
    for pair, value in kij.items():
        if not (isinstance(pair, tuple) and len(pair) == 2):
            raise InputError(f"kij keys must be pairs of species names, e.g. ('H2', 'NH3'), got {pair!r}")
        for name in pair:
            if name not in names:
                reason = ("has no critical constants and is treated as an ideal gas" if name in gas_names
                          else "is not a gas species of the set")
                raise InputError(f"kij names {name!r}, which {reason}; give pairs of the described species "
                                 f"({', '.join(names)})")
        i, j = names.index(pair[0]), names.index(pair[1])
        if i == j:
            raise InputError(f"kij pair {pair!r} names one species twice; k_ii is zero by definition")
        if isinstance(value, bool) or not isinstance(value, (int, float, np.floating)) or not -1.0 < value < 1.0:
            raise InputError(f"kij for {pair[0]}-{pair[1]} must be a number between -1 and 1, got {value!r}")
        k[i, j] = k[j, i] = float(value)
    return k


def _model_of_gas(fractions: Mapping[str, float], gas: str, kij, db: SpeciesDatabase | None):
    """The cubic over the species of a composition that have critical constants, their fractions, and all names."""
    from .thermo.database import default_database

    db = db or default_database()
    names = [s for s, v in fractions.items() if v > 0.0]
    records = db.resolve(names)
    described = [r.name for r in records if r.critical is not None]
    if not described:
        raise InputError(f"none of {', '.join(names)} has critical constants, so the {gas} model describes nothing "
                         "here; use the ideal gas")
    pairs, _ = _interaction_pairs(kij, gas, described)
    model = gas_model_for_species(gas, described, database=db,
                                  kij=_kij_matrix(pairs, described, tuple(described)) if pairs else "none")
    amounts = np.array([float(fractions[next(k for k in fractions if db[k].name == s)]) for s in described])
    return model, described, amounts, [r.name for r in records]


def ln_phi_of_gas(fractions: Mapping[str, float], T: float, P: float, gas: str, *,
                  kij: str | Mapping[tuple[str, str], float] | None = "shipped",
                  db: SpeciesDatabase | None = None) -> dict[str, float]:
    """ln phi of each gas species of a composition at T [K] and P [Pa], as an equilibrium's gas model gives it.

    ``fractions`` maps gas species to mole fraction or amount (normalised
    here).  As in :func:`gas_phase`, species without critical constants are
    ideal (ln phi = 0) and left out of the mixture; ``kij`` as there.
    """
    if canonical_model_name(gas) == "ideal" or not any(v > 0.0 for v in fractions.values()):
        return {s: 0.0 for s, v in fractions.items() if v > 0.0}
    model, described, amounts, names = _model_of_gas(fractions, gas, kij, db)
    ln_phi = dict(zip(described, model.ln_phi(float(T), float(P), amounts / amounts.sum())))
    return {name: float(ln_phi.get(name, 0.0)) for name in names}


def residual_enthalpy_of_gas(amounts: Mapping[str, float], T: float, P: float, gas: str, *,
                             kij: str | Mapping[tuple[str, str], float] | None = "shipped",
                             db: SpeciesDatabase | None = None) -> float:
    """Residual enthalpy h - h_ideal of a gas given as species amounts [mol] at T [K], P [Pa], [J].

    Species without critical constants are left out, as in :func:`gas_phase`;
    zero for the ideal gas.
    """
    if canonical_model_name(gas) == "ideal" or not any(v > 0.0 for v in amounts.values()):
        return 0.0
    model, _, described_amounts, _ = _model_of_gas(amounts, gas, kij, db)
    total = float(described_amounts.sum())
    return float(total * R * T * model.properties(float(T), float(P), described_amounts / total).H_res_RT)


# ----------------------------------------------------------------------------- the outer loop

def _gas_amounts(problem: Problem, result: SolverResult, n_gas: int) -> NDArray[np.float64]:
    """Gas amounts of a solver answer in the System's gas order, [mol], relative to the largest (no underflow)."""
    ln_n = result.ln_n_gas[0]
    amounts = np.zeros(n_gas)
    amounts[problem.keep[: problem.n_gas]] = np.exp(ln_n - ln_n.max())
    return amounts


def _first_guess(setup: Setup, phase: GasPhase, T: float, P: float, start: SolverResult | None,
                 allow_extrapolation: bool) -> NDArray[np.float64]:
    """ln phi to hold in the first pass: at the warm start's composition, else zero (the ideal gas).

    (ln phi at the feed's composition saves no pass in loop gases: their composition moves too far.)
    """
    if start is not None:
        problem = build_problem(setup, np.array([T]), np.array([P]), allow_extrapolation=allow_extrapolation)
        return phase.ln_phi(T, P, _gas_amounts(problem, start, setup.system.n_gas))
    return np.zeros(setup.system.n_gas)


def _anderson_step(xs: list, gs: list) -> NDArray[np.float64]:
    """Next iterate from the last iterates x_i and their images g_i = F(x_i) (Anderson, 1965, type II).

    Minimises the linearised residual over the affine span of the stored
    residuals f_i = g_i - x_i, and maps the combination through the images.
    """
    f = [g - x for x, g in zip(xs, gs)]
    dF = np.column_stack([f[i + 1] - f[i] for i in range(len(f) - 1)])
    dG = np.column_stack([gs[i + 1] - gs[i] for i in range(len(gs) - 1)])
    gamma = np.linalg.lstsq(dF, f[-1], rcond=None)[0]
    return gs[-1] - dG @ gamma


def solve_nonideal(
    setup: Setup,
    T: float,
    P: float,
    phase: GasPhase,
    *,
    method: str = "auto",
    offsets: NDArray[np.float64] | None = None,
    start: SolverResult | None = None,
    allow_extrapolation: bool = False,
    specification: str = "T and P",
    options: OuterLoopOptions = OuterLoopOptions(),
) -> tuple[Equilibrium, Problem, SolverResult]:
    """Equilibrium of a prepared setup at T [K] and P [Pa] with the gas described by ``phase``.

    The counterpart of ``settle.solve_fixed`` for a non-ideal gas, with the
    same arguments and returns; for the ideal gas it is ``solve_fixed`` itself.

    Parameters
    ----------
    setup : Setup
    T : float
        Temperature, [K].
    P : float
        Pressure, [Pa].
    phase : GasPhase
        From :func:`gas_phase` on ``setup.system``.
    method, offsets, allow_extrapolation, specification
        As for ``solve_fixed``.
    start : SolverResult, optional
        Warm start (a neighbouring answer on the same setup); ln phi then
        starts from its composition too.
    options : OuterLoopOptions

    Returns
    -------
    (Equilibrium, Problem, SolverResult)
        The answer, the last frozen-phi problem and its raw solver output.
        ``certificate`` is recomputed with phi at the answer's composition
        (its stationarity is the non-ideal residual); ``extras`` holds
        ``fugacity_coefficients`` (species to phi [-]), ``compressibility_factor``
        Z [-], ``residual_enthalpy_J`` [J], ``gas_model_iterations`` (frozen-phi
        solves), ``ln_phi_change`` (the last change [-]) and ``gas_model_note``.
        The answer is not checked here: see ``settle.checked``.

    Raises
    ------
    ConvergenceError
        ln phi did not settle within ``options.max_iterations`` solves.
    """
    if phase.is_ideal:
        return solve_fixed(setup, T, P, method=method, offsets=offsets, start=start,
                           allow_extrapolation=allow_extrapolation, gas_model=phase.name,
                           specification=specification)
    n_gas = setup.system.n_gas
    x = _first_guess(setup, phase, T, P, start, allow_extrapolation)
    # The first pass builds the problem (data ranges, offsets); the later ones change only the gas
    # potentials, by the new ln phi, and re-solve the same problem from the previous answer.
    problem = fixed_problem(setup, T, P, offsets=offsets, ln_phi=x, allow_extrapolation=allow_extrapolation)
    result, certificates = solve(problem, method, start=start)
    kept_gas = problem.keep[: problem.n_gas]
    ideal_mu0 = problem.mu0.copy()
    ideal_mu0[:, : problem.n_gas] -= x[kept_gas]
    xs: list[NDArray[np.float64]] = []
    gs: list[NDArray[np.float64]] = []
    change = np.inf
    for iteration in range(1, options.max_iterations + 1):
        if iteration > 1:
            mu0 = ideal_mu0.copy()
            mu0[:, : problem.n_gas] += x[kept_gas]
            problem = replace(problem, mu0=mu0)
            result, certificates = solve(problem, method, start=result)
        n = _gas_amounts(problem, result, n_gas)
        if not np.all(np.isfinite(n)):
            raise ConvergenceError(
                f"the frozen-phi solve at T = {T:g} K, P = {P:g} Pa returned no usable composition "
                f"(solver {result.method[0]}, converged: {bool(result.converged[0])}); try method='convex'")
        g = phase.ln_phi(T, P, n)
        previous, change = change, float(np.max(np.abs(g - x)))
        if change <= options.tolerance:
            eq = to_equilibrium(setup, problem, result, certificates, 0, T, P, gas_model=phase.name,
                                specification=specification)
            return _finish(setup, phase, eq, problem, result, x, g, n, iteration, change), problem, result
        if change >= previous:
            # Not contracting (an extrapolation too far, or a vapour root that jumps): forget the
            # history and take a half step from here.
            xs, gs = [], []
            x = x + 0.5 * (g - x)
            continue
        xs.append(x)
        gs.append(g)
        del xs[: -(options.memory + 1)], gs[: -(options.memory + 1)]
        x = _anderson_step(xs, gs) if len(xs) > 1 else g
    raise ConvergenceError(
        f"the fugacity coefficients did not settle at T = {T:g} K, P = {P:g} Pa: after "
        f"{options.max_iterations} frozen-phi solves ln phi still changes by {change:.2e} "
        f"(tolerance {options.tolerance:g}); the gas may be close to condensing there (the cubic's vapour "
        "root then jumps with composition): try a higher temperature, a lower pressure, or gas='ideal'")


def solve_batch_nonideal(problem: Problem, phase: GasPhase, T: NDArray[np.float64], P: NDArray[np.float64], *,
                         method: str = "auto", chains: int | None = None,
                         options: OuterLoopOptions = OuterLoopOptions()) -> tuple[SolverResult, CertificateBatch]:
    """A batch of frozen-phi solves iterated until every point's ln phi settles (the sweep's non-ideal path).

    ``problem`` is the ideal-gas batch at T [K], P [Pa] (shape (B,)).  Plain
    fixed-point passes over the whole batch, each warm-started from the last;
    the returned certificates are recomputed with ln phi at each point's own
    final composition, and a point whose ln phi has not settled within
    ``options.max_iterations`` passes is not certified.
    """
    n_gas = len(phase.gas_names)
    kept_gas = problem.keep[: problem.n_gas]
    ideal_mu0 = problem.mu0.copy()

    def shifted(ln_phi: NDArray[np.float64]) -> Problem:
        mu0 = ideal_mu0.copy()
        mu0[:, : problem.n_gas] += ln_phi[:, kept_gas]
        return replace(problem, mu0=mu0)

    result, _ = solve(problem, method, chains=chains)
    held = np.zeros((problem.batch_size, n_gas))
    settled = np.zeros(problem.batch_size, dtype=bool)
    for _ in range(options.max_iterations):
        amounts = np.zeros((problem.batch_size, n_gas))
        ln_n = result.ln_n_gas
        with np.errstate(invalid="ignore"):
            amounts[:, kept_gas] = np.exp(ln_n - ln_n.max(axis=1, keepdims=True))
        usable = np.all(np.isfinite(amounts), axis=1)
        amounts[~usable] = 1.0  # a failed point: any composition, it stays uncertified
        found = phase.ln_phi_batch(T, P, amounts)
        settled = usable & (np.max(np.abs(found - held), axis=1) <= options.tolerance)
        if settled.all():
            break
        held = found
        result, _ = solve(shifted(held), method, start=result, chains=chains)
    certificates = certify(shifted(found), result)
    return result, replace(certificates, certified=certificates.certified & settled)


def _finish(setup: Setup, phase: GasPhase, eq: Equilibrium, problem: Problem, result: SolverResult,
            held: NDArray[np.float64], final: NDArray[np.float64], n: NDArray[np.float64],
            iterations: int, change: float) -> Equilibrium:
    """The answer with its certificate recomputed at phi(final composition) and the gas-model extras."""
    kept_gas = problem.keep[: problem.n_gas]
    mu0 = problem.mu0.copy()
    mu0[0, : problem.n_gas] += (final - held)[kept_gas]
    certificate = certify(replace(problem, mu0=mu0), result)[0]
    properties = phase.properties(eq.T, eq.P, n)
    # Residual properties scale with the amount the cubic describes.
    total = float(sum(eq.amounts[phase.gas_names[j]] for j in phase.described))
    y = n / n.sum()
    ideal_fraction = float(sum(y[phase.gas_names.index(s)] for s in phase.ideal_species))
    if ideal_fraction > IDEAL_SPECIES_WARNING:
        warnings.warn(
            f"{', '.join(phase.ideal_species)} have no critical constants and were treated as ideal gases, but "
            f"make up {ideal_fraction:.2g} of the gas; the {phase.name} answer is approximate there",
            RuntimeWarning, stacklevel=4)
    return replace(eq, certificate=certificate, extras={
        **eq.extras,
        "fugacity_coefficients": {s: float(np.exp(v)) for s, v in zip(phase.gas_names, final)},
        "compressibility_factor": float(properties.Z),
        "residual_enthalpy_J": float(total * R * eq.T * properties.H_res_RT),
        "residual_entropy_J_per_K": float(total * R * properties.S_res_R),
        "gas_model_iterations": iterations,
        "ln_phi_change": change,
        "gas_model_note": _note(phase, ideal_fraction),
        "binary_interactions": {f"{a}-{b}": v for (a, b), v in phase.kij.items()},
    })


#: The tangent-plane test is skipped above this multiple of the highest Tc among the gas's species present
#: above 1 ppm: no liquid-like phase of a gas mixture forms that far above its heaviest component's
#: critical temperature (common practice, no source), and the hot reactors are the common case.
STABILITY_SCREEN = 1.5
_SCREEN_FRACTION = 1e-6


def gas_stability(phase: GasPhase, eq: Equilibrium) -> dict[str, object]:
    """Whether an answer's gas is stable as one phase (``eos.stability``), as a JSON-ready record.

    ``{"tested": bool, "stable": bool or None, "distance": float, "would_form": {species: y} or None,
    "note": str}``; a liquid-like phase that would form means the one-gas answer is not the equilibrium.
    """
    from .eos.stability import tangent_plane_test

    names = [phase.gas_names[j] for j in phase.described]
    n = np.array([eq.amounts.get(name, 0.0) for name in names])
    if phase.is_ideal or not n.sum() > 0.0:
        return {"tested": False, "stable": None, "distance": 0.0, "would_form": None, "note": "ideal gas"}
    z = n / n.sum()
    Tc = phase.model.critical_temperatures
    hottest = float(Tc[z > _SCREEN_FRACTION].max())
    if eq.T > STABILITY_SCREEN * hottest:
        return {"tested": False, "stable": True, "distance": 0.0, "would_form": None,
                "note": f"not tested: T is above {STABILITY_SCREEN:g} times the highest Tc present ({hottest:.0f} K)"}
    verdict = tangent_plane_test(phase.model, eq.T, eq.P, z)
    would_form = None if verdict.trial is None else {
        name: float(w) for name, w in zip(names, verdict.trial) if w > 1e-4}
    held = _condensate_already_held(eq, would_form)
    if held:
        return {"tested": True, "stable": True, "distance": verdict.distance, "would_form": would_form,
                "note": f"the liquid-like phase the test finds is the {held} the answer already holds"}
    note = "stable as one gas (tangent-plane test)" if verdict.stable else (
        "NOT stable as one gas: a liquid-like phase would form (" + ", ".join(
            f"{s} {100 * w:.1f} mol%" for s, w in sorted(would_form.items(), key=lambda kv: -kv[1])[:4])
        + "); gibbsmin has no liquid-solution phase, so this one-gas answer is not the equilibrium: raise T, "
          "lower P, or treat the condensate separately")
    return {"tested": True, "stable": verdict.stable, "distance": verdict.distance, "would_form": would_form,
            "note": note}


def _condensate_already_held(eq: Equilibrium, would_form: Mapping[str, float] | None) -> str | None:
    """The present condensed species that is the would-be phase (one species at 99 % and more), if any."""
    if not would_form:
        return None
    main, share = max(would_form.items(), key=lambda kv: kv[1])
    if share < 0.99:
        return None
    from .thermo.database import default_database

    db = default_database()
    elements = dict(db[main].elements)
    return next((s for s, n in eq.amounts.items()
                 if n > 0.0 and eq.phase_of.get(s) != "gas" and dict(db[s].elements) == elements), None)


def _kij_note(phase: GasPhase) -> str:
    if not phase.kij:
        return "kij = 0 for every pair"
    return (f"kij from the {phase.kij_origin} ({len(phase.kij)} pairs, listed in extras['binary_interactions']; "
            "zero for the other pairs)")


def _note(phase: GasPhase, ideal_fraction: float) -> str:
    text = f"{phase.name} with van der Waals mixing, {_kij_note(phase)}; certificate stationarity uses phi at " \
           "the final composition"
    if phase.ideal_species:
        text += (f"; {', '.join(phase.ideal_species)} have no critical constants: treated as ideal gases "
                 f"(phi = 1) and left out of the mixture's a and b (together {ideal_fraction:.2g} of the gas)")
    return text


def nonideal_sensitivities(setup: Setup, phase: GasPhase, result: SolverResult, T: float, P: float, *,
                           method: str = "auto", allow_extrapolation: bool = False,
                           db: SpeciesDatabase | None = None):
    """d(amounts)/dT, d/dP, d/d(feed) and heat capacities of a non-ideal answer, phi moving with them.

    Central differences of whole non-ideal solves, each warm-started from
    ``result`` (``sensitivity.difference_sensitivities``); the heat
    capacities include the residual enthalpy.
    """
    from . import energy, sensitivity
    from .thermo.database import default_database

    system = setup.system
    feed_species = list(setup.feed)
    columns = system.element_matrix((db or default_database()).resolve(feed_species))

    def amounts_at(T_now: float, P_now: float, b: NDArray[np.float64]) -> NDArray[np.float64]:
        moved = replace(setup, b=b)
        eq, _, _ = solve_nonideal(moved, T_now, P_now, phase, method=method, start=result,
                                  allow_extrapolation=allow_extrapolation)
        return energy.state_amounts(moved, eq)

    def enthalpy_at(T_now: float, n: NDArray[np.float64]) -> float:
        return energy.enthalpy(system.table, system.n_gas, n, T_now, P, phase.residual_enthalpy)

    return sensitivity.difference_sensitivities(
        system.names, T, P, setup.b, {name: columns[:, k] for k, name in enumerate(feed_species)},
        amounts_at, enthalpy_at)


# ----------------------------------------------------------------------------- the energy balance

def inlet_residual_enthalpy(phase: GasPhase, inlet, P: float) -> float:
    """Residual enthalpy of the inlet streams, each at its own temperature and the reactor pressure P [Pa], [J].

    ``inlet`` is an ``energy.Inlet`` with temperatures.  Feed species outside
    the set's gas phase contribute nothing.
    """
    return sum(phase.stream_residual_enthalpy(stream.amounts, stream.T, P) for stream in inlet.streams)


def energy_hooks(setup: Setup, P: float, phase: GasPhase, *, method: str = "auto",
                 allow_extrapolation: bool = False) -> dict[str, object]:
    """Keyword arguments of ``energy.solve_energy_balance`` that put this gas model into the energy balance.

    The residual enthalpy enters the balance, and every fixed-T step is the
    non-ideal solve.
    """
    def step(T: float, start: SolverResult | None):
        return solve_nonideal(setup, T, P, phase, method=method, start=start,
                              allow_extrapolation=allow_extrapolation, specification="H and P")
    return {"residual_enthalpy": phase.residual_enthalpy, "step": step}
