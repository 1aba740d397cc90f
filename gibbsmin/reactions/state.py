"""The gas a quotient is taken of: composition, T, P and fugacity coefficients."""

from __future__ import annotations

import math
import numbers
from collections.abc import Mapping
from dataclasses import dataclass, field

import numpy as np

from ..eos import canonical_model_name
from ..eos.phase import ln_phi_of_gas
from ..equilibrium import Equilibrium
from ..errors import InputError
from ..streams import Stream
from ..system import P_REF
from ..thermo.database import SpeciesDatabase
from ..thermo.datasets import default_database
from ..units import to_kelvin, to_pascal

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
        ``Equilibrium.gas.fugacity_coefficients``.
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
    """ln phi of a non-ideal answer, from the fugacity coefficients its gas model found (``Equilibrium.gas``)."""
    phi = None if eq.gas is None else eq.gas.fugacity_coefficients
    if phi is None:
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
