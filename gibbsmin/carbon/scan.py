"""Gas-only equilibria of a feed, graphite left out, and their carbon activity: what both carbon limits solve."""

from __future__ import annotations

import dataclasses
from collections.abc import Mapping, Sequence

from ..errors import InputError
from ..nonideal import gas_phase, solve_nonideal
from ..fixed_step import checked, prepare, solve_fixed
from ..thermo.database import SpeciesDatabase
from .activity import GRAPHITE, _g0_graphite


class GasOnlyEquilibria:
    """Equilibria of a feed without graphite, at any T of a span and any element totals, warm-started in turn.

    ln a_C = lambda_C - g0_C(s)/RT of such a gas says on which side of the graphite boundary the full
    minimisation lies (see the package docstring).
    """

    def __init__(self, amounts: Mapping[str, float], T_span: tuple[float, float], P: float,
                 species: Sequence[str] | None, exclude: Sequence[str], method: str, db: SpeciesDatabase,
                 *, gas: str = "ideal", kij="shipped"):
        if GRAPHITE in {db[name].name for name in exclude}:
            raise InputError("a carbon limit needs graphite in the species set; do not exclude C(s)")
        gas_species = None if species is None else [s for s in species if db[s].name != GRAPHITE]
        self.setup = prepare(amounts, species=gas_species, exclude=[*exclude, GRAPHITE], T_span=T_span, db=db)
        self.P, self.method, self.db = P, method, db
        self.start = None
        self.evaluations = 0
        self.phase = None
        if gas != "ideal":
            self.phase = gas_phase(self.setup.system, gas, kij=kij)

    def ln_activity(self, T: float, added=None, offsets=None) -> float:
        """ln a_C [-] of the gas-only equilibrium at T [K], with ``added`` element totals on the feed's [mol]
        and ``offsets`` added to g0/RT of the setup's species (a shifted formation enthalpy)."""
        setup = self.setup if added is None else dataclasses.replace(self.setup, b=self.setup.b + added)
        if self.phase is None:
            eq, _, result = solve_fixed(setup, T, self.P, method=self.method, start=self.start, offsets=offsets)
        else:
            eq, _, result = solve_nonideal(setup, T, self.P, self.phase, method=self.method, start=self.start,
                                           offsets=offsets)
        eq = checked(eq, stacklevel=5)
        self.start = result
        self.evaluations += 1
        return eq.element_potentials["C"] - _g0_graphite(T, self.db)
