"""The Equilibrium result: amounts by phase, compositions, element potentials and the certificate."""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field

import numpy as np

from .solve.certificate import Certificate
from .system import P_REF

#: Species left out of dry-basis compositions.
WATER = "H2O"


@dataclass(frozen=True)
class EnergyFigures:
    """The energy figures of an answer, [J and J/K per the feed amounts given; W and W/K for mol/s].

    Attributes
    ----------
    enthalpy_J, entropy_J_per_K : float
        Of the outlet: the enthalpy with a cubic's residual part, the entropy its ideal-gas part (ideal
        mixing within each fluid phase; the residual entropy is ``GasModelState.residual_entropy_J_per_K``).
    feed_temperatures_K : mapping or None
        Feed stream (or species) to its temperature, where the feed's were given.
    feed_enthalpy_J : float or None
        Of the inlet, each stream at its own temperature.
    duty_W : float or None
        Heat added to the reactor (negative: removed); positive = heat added.
    balance_residual : float or None
        |H_out - H_in - duty| over the gross enthalpy.
    T_evaluations : int or None
        Fixed-T solves the energy balance took (None at a fixed T).
    balance_path : str or None
        How the energy balance was solved: "enthalpy-pressure Newton" (T among the Newton's unknowns, the
        plain ideal gas on one phase set) or "temperature search" (bracketed, phase changes and plateaus
        included); None at a fixed T.
    phase_boundary : mapping or None
        Where coexisting phases fix the outlet T (a plateau), as the energy balance reports it.
    enthalpy_kink : mapping or None
        Where a cubic's enthalpy jumps at the outlet (its alpha function's minimum), with the jump.
    balance_miss_K : float or None
        How far the outlet would move were that jump smooth, [K].
    """

    enthalpy_J: float
    entropy_J_per_K: float
    feed_temperatures_K: Mapping[str, float | None] | None = None
    feed_enthalpy_J: float | None = None
    duty_W: float | None = None
    balance_residual: float | None = None
    T_evaluations: int | None = None
    balance_path: str | None = None
    phase_boundary: Mapping[str, object] | None = None
    enthalpy_kink: Mapping[str, object] | None = None
    balance_miss_K: float | None = None


@dataclass(frozen=True)
class GasModelState:
    """What a cubic gas model found at the answer's gas (an ideal-gas answer has none).

    Attributes
    ----------
    fugacity_coefficients : mapping
        Gas species to phi [-] at the answer's composition.
    compressibility_factor : float
        Z [-].
    residual_enthalpy_J, residual_entropy_J_per_K : float
        Departures from the ideal gas.
    iterations : int
        Frozen-phi solves of the outer loop.
    ln_phi_change : float
        The loop's last change of ln phi [-].
    note : str
        The model, its kij and the species it treats as ideal.
    binary_interactions : mapping
        "A-B" to the non-zero kij in use.
    stability : mapping or None
        The one-phase stability record (tested, stable, distance, would_form, note).
    """

    fugacity_coefficients: Mapping[str, float]
    compressibility_factor: float
    residual_enthalpy_J: float
    residual_entropy_J_per_K: float
    iterations: int
    ln_phi_change: float
    note: str
    binary_interactions: Mapping[str, float]
    stability: Mapping[str, object] | None = None


@dataclass(frozen=True)
class Restriction:
    """What a restricted answer held: reactions at an approach, species frozen.

    Attributes
    ----------
    approach_K : mapping
        Held reaction to its approach, [K] (positive: short of equilibrium).
    settling_temperature_K : mapping
        Held reaction to the temperature whose K it settled at, [K].
    reactions_at_equilibrium : tuple of str
        The other reactions of the complete independent set, as equations.
    frozen_mol : mapping
        Frozen species to the amount it was held at, [mol].
    """

    approach_K: Mapping[str, float]
    settling_temperature_K: Mapping[str, float]
    reactions_at_equilibrium: tuple[str, ...]
    frozen_mol: Mapping[str, float]


@dataclass(frozen=True)
class FluidPhase:
    """One fluid phase of an answer that holds liquid-solution phases (``Equilibrium.fluid_phases``).

    Attributes
    ----------
    name : str
        "gas", "liquid", "liquid 2".
    amounts : mapping
        Species to its amount in this phase, [mol].
    compressibility_factor : float
        Z [-] at this phase's root of the cubic.
    molar_volume : float
        Z R T / P, [m3/mol].
    density : float
        [kg/m3].
    fugacity_coefficients : mapping
        Species to phi [-] in this phase.
    """

    name: str
    amounts: Mapping[str, float]
    compressibility_factor: float
    molar_volume: float
    density: float
    fugacity_coefficients: Mapping[str, float]

    @property
    def amount(self) -> float:
        """Total amount of the phase, [mol]."""
        return float(sum(self.amounts.values()))

    @property
    def mole_fractions(self) -> dict[str, float]:
        total = self.amount
        return {s: n / total for s, n in self.amounts.items()}


@dataclass(frozen=True)
class Equilibrium:
    """The equilibrium state of one problem.

    Attributes
    ----------
    T : float
        Temperature, [K].
    P : float
        Pressure, [Pa].
    amounts : dict
        Species name to amount, [mol], for every species of the set (all phases).
    phase_of : dict
        Species name to its phase: ``"gas"``, or the species' own name for a
        pure condensed species (each is a phase of its own).
    ln_gas_amounts : dict
        Natural logarithm of each gas amount [ln mol]; exact where ``amounts``
        underflows to zero (``-inf`` for species absent by element balance).
    element_potentials : dict
        Element to lambda_k = mu/RT per atom [-]; NaN for elements absent from
        the feed.  Pseudo-elements of inert species are named ``[species]``.
    G_RT : float
        Total Gibbs energy over RT, [mol] (formation basis).
    certificate : Certificate
    specification : str
        What was held fixed, e.g. "T and P".
    gas_model : str
    omitted : dict
        Species of the default set left out, with the reason.
    extras : dict
        Every further result by name, as JSON-ready values (duty, approach
        temperatures, ...): the typed fields below flattened, and the notes
        of the layers above the core (a case stage's scope, say).
    data_set : str
        The thermochemical data set the answer was computed with.
    energy : EnergyFigures or None
        Outlet enthalpy and entropy; with feed temperatures the duty and the
        energy balance.
    gas : GasModelState or None
        What a cubic gas model found (None for the ideal gas).
    restriction : Restriction or None
        What a restricted equilibrium held (``equilibrate_with_approach``).
    fluid_phases : tuple of FluidPhase or None
        With a cubic and liquid-solution phases allowed, every fluid phase
        present (the gas first); ``amounts`` are then the totals over all
        phases, ``ln_gas_amounts`` and the mole fractions the gas phase's.
        None for a one-fluid answer.
    uncertainty : dict or None
        Species name to the standard uncertainty of its amount [mol] from the
        data set's formation-enthalpy uncertainties (``equilibrate(...,
        uncertainty=True)``; ``gibbsmin.uncertainty``); None when not asked for.
    mole_fraction_uncertainty, dry_mole_fraction_uncertainty : dict or None
        Gas species to the standard uncertainty of its mole fraction, wet and
        dry [-], with the same origin (each amount's correlation with the
        total included); None when not asked for.
    T_uncertainty : float or None
        Standard uncertainty of the temperature [K] where the energy balance
        set it (``adiabatic=True, uncertainty=True``); None at a fixed T or
        when not asked for.
    """

    T: float
    P: float
    amounts: Mapping[str, float]
    phase_of: Mapping[str, str]
    ln_gas_amounts: Mapping[str, float]
    element_potentials: Mapping[str, float]
    G_RT: float
    certificate: Certificate
    specification: str = "T and P"
    gas_model: str = "ideal"
    omitted: Mapping[str, str] = field(default_factory=dict)
    extras: Mapping[str, object] = field(default_factory=dict)
    uncertainty: Mapping[str, float] | None = None
    mole_fraction_uncertainty: Mapping[str, float] | None = None
    dry_mole_fraction_uncertainty: Mapping[str, float] | None = None
    T_uncertainty: float | None = None
    data_set: str = ""
    energy: EnergyFigures | None = None
    gas: GasModelState | None = None
    restriction: Restriction | None = None
    fluid_phases: tuple[FluidPhase, ...] | None = None

    @property
    def species(self) -> tuple[str, ...]:
        return tuple(self.amounts)

    @property
    def gas_amount(self) -> float:
        """Total amount of the gas phase, [mol]."""
        if self.fluid_phases is not None:
            return float(sum(np.exp(v) for v in self.ln_gas_amounts.values() if v > -np.inf))
        return float(sum(n for s, n in self.amounts.items() if self.phase_of[s] == "gas"))

    @property
    def liquid_amount(self) -> float:
        """Total amount of the liquid-solution phases, [mol] (zero for a one-fluid answer)."""
        return float(sum(p.amount for p in self.fluid_phases or () if p.name != "gas"))

    @property
    def gas_present(self) -> bool:
        """False when the condensed phases hold every atom and no gas can form (cold pure water at 1 bar).

        The solver then returns every gas amount as exactly zero rather than a
        gas at the round-off of the element balance, whose composition would be
        meaningless; the certificate's condensed-phase margin includes the
        absent gas's (``Certificate.complementarity``).
        """
        return any(v > -np.inf for v in self.ln_gas_amounts.values())

    @property
    def mole_fractions(self) -> dict[str, float]:
        """Gas-phase mole fractions, wet basis, computed from the log amounts (exact for trace species).

        NaN for every species when the gas phase is absent (``gas_present``).
        """
        if not self.gas_present:
            return {s: float("nan") for s in self.ln_gas_amounts}
        return _fractions(self.ln_gas_amounts)

    @property
    def dry_mole_fractions(self) -> dict[str, float]:
        """Gas-phase mole fractions with water left out (from the log amounts: exact for a trace dry gas in steam).

        NaN where there is no dry gas (no gas, or a gas of water alone).
        """
        dry = {s: v for s, v in self.ln_gas_amounts.items() if s != WATER}
        if not any(v > -np.inf for v in dry.values()):
            return {s: float("nan") for s in dry}
        return _fractions(dry)

    @property
    def partial_pressures(self) -> dict[str, float]:
        """y_j P for each gas species, [Pa]."""
        return {s: y * self.P for s, y in self.mole_fractions.items()}

    @property
    def amounts_by_phase(self) -> dict[str, dict[str, float]]:
        """Phase name to {species: mol} for every phase present (each liquid-solution phase under its name)."""
        phases: dict[str, dict[str, float]] = {}
        if self.fluid_phases is not None:
            for fluid in self.fluid_phases:
                phases[fluid.name] = {s: n for s, n in fluid.amounts.items() if n > 0.0}
            for s, n in self.condensed.items():
                phases[s] = {s: n}
            return phases
        gas_present = self.gas_present
        for s, n in self.amounts.items():
            phase = self.phase_of[s]
            if (phase != "gas" and n <= 0.0) or (phase == "gas" and not gas_present):
                continue
            phases.setdefault(phase, {})[s] = n
        return phases

    @property
    def phases_present(self) -> tuple[str, ...]:
        return tuple(self.amounts_by_phase)

    @property
    def condensed(self) -> dict[str, float]:
        """Amounts of the condensed species present, [mol]."""
        return {s: n for s, n in self.amounts.items() if self.phase_of[s] != "gas" and n > 0.0}

    def to_dict(self) -> dict[str, object]:
        """A JSON-ready description (SI units: K, Pa, mol)."""
        y = self.mole_fractions
        return {
            "T_K": self.T,
            "P_Pa": self.P,
            "specification": self.specification,
            "gas_model": self.gas_model,
            "reference_pressure_Pa": P_REF,
            "species": {
                s: {"phase": self.phase_of[s], "amount_mol": n,
                    "mole_fraction_in_phase": (y[s] if self.gas_present else None) if self.phase_of[s] == "gas"
                    else (1.0 if n > 0 else 0.0)}
                for s, n in self.amounts.items()
            },
            "phases_present": list(self.phases_present),
            "element_potentials": {k: (None if np.isnan(v) else v) for k, v in self.element_potentials.items()},
            "G_RT_mol": self.G_RT,
            "certificate": {
                "certified": self.certificate.certified,
                "solver": self.certificate.solver,
                "iterations": self.certificate.iterations,
                "element_balance_residual": self.certificate.element_balance,
                "stationarity_residual": self.certificate.stationarity,
                "condensed_phase_margin": (None if np.isinf(self.certificate.complementarity)
                                           else self.certificate.complementarity),
                "phase_stability": self.certificate.phase_stability,
            },
            "omitted_species": dict(self.omitted),
            **({} if self.fluid_phases is None else {"fluid_phases": {
                p.name: {"amounts_mol": dict(p.amounts), "mole_fractions": p.mole_fractions,
                         "compressibility_factor": p.compressibility_factor, "molar_volume_m3_per_mol": p.molar_volume,
                         "density_kg_per_m3": p.density, "fugacity_coefficients": dict(p.fugacity_coefficients)}
                for p in self.fluid_phases}}),
            **{key: {s: (None if np.isnan(v) else v) for s, v in values.items()}
               for key, values in (("amount_uncertainty_mol", self.uncertainty),
                                   ("mole_fraction_uncertainty", self.mole_fraction_uncertainty),
                                   ("dry_mole_fraction_uncertainty", self.dry_mole_fraction_uncertainty))
               if values is not None},
            **({} if self.T_uncertainty is None else
               {"T_uncertainty_K": None if np.isnan(self.T_uncertainty) else self.T_uncertainty}),
            **{k: v for k, v in self.extras.items()},
        }

    def table(self, cutoff: float = 1e-12) -> str:
        """A plain-text table of the species above ``cutoff`` mole fraction in their phase (mol% in that phase)."""
        y = self.mole_fractions
        dry = self.dry_mole_fractions
        lines = [
            f"Equilibrium at T = {self.T:.2f} K ({self.T - 273.15:.2f} degC), "
            f"P = {self.P / 1e5:.5g} bar; fixed {self.specification}; gas model: {self.gas_model}",
            f"{'species':<12} {'phase':<8} {'amount/mol':>14} {'mol% wet':>12} {'mol% dry':>12}",
        ]
        gas_rows = sorted((s for s in y if y[s] >= cutoff), key=lambda s: -y[s]) if self.gas_present else []
        for s in gas_rows:
            dry_text = f"{100 * dry[s]:12.6g}" if s in dry else f"{'-':>12}"
            in_gas = float(np.exp(self.ln_gas_amounts[s])) if self.fluid_phases is not None else self.amounts[s]
            lines.append(f"{s:<12} {'gas':<8} {in_gas:14.6g} {100 * y[s]:12.6g} {dry_text}")
        for liquid in (p for p in self.fluid_phases or () if p.name != "gas"):
            x = liquid.mole_fractions
            for s in sorted((s for s in x if x[s] >= cutoff), key=lambda s: -x[s]):
                lines.append(f"{s:<12} {liquid.name:<8} {liquid.amounts[s]:14.6g} {100 * x[s]:12.6g} {'':>12}")
        for s, n in self.condensed.items():
            lines.append(f"{s:<12} {'cond.':<8} {n:14.6g} {'':>12} {'':>12}")
        hidden = len(y) - len(gas_rows)
        if not self.gas_present:
            lines.append("(no gas phase: the condensed phases hold every atom and a gas cannot form here)"
                         if self.fluid_phases is None else "(no gas phase: the liquid holds every species)")
        elif hidden:
            lines.append(f"({hidden} gas species below {cutoff:g} mole fraction not shown)")
        if "duty_W" in self.extras:
            lines.append(f"duty {self.extras['duty_W']:.6g} W ({self.extras.get('duty_sign_convention', '')})")
        lines.append(self.certificate.summary())
        return "\n".join(lines)

    def __str__(self) -> str:
        return self.table()


def _fractions(ln_amounts: Mapping[str, float]) -> dict[str, float]:
    """Mole fractions from log amounts, the total taken in log form (no underflow, no cancellation)."""
    values = np.array(list(ln_amounts.values()))
    top = values.max()
    ln_total = top + np.log(np.sum(np.exp(values - top)))
    return {s: float(np.exp(v - ln_total)) for s, v in ln_amounts.items()}
