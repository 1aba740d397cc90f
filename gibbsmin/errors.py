"""The exception family of gibbsmin.

Every error a user can cause derives from :class:`GibbsminError` and from the
built-in exception it most resembles, so callers may catch either.  Messages
say what is wrong and what to do about it; the command line prints them as one
line without a traceback.
"""

from __future__ import annotations

import difflib
from collections.abc import Iterable


class GibbsminError(Exception):
    """Base class of every error raised on purpose by gibbsmin."""


class FormulaError(ValueError, GibbsminError):
    """A chemical formula that cannot be read."""

    def __init__(self, formula: str, position: int, reason: str):
        self.formula = formula
        self.position = position
        self.reason = reason
        pointer = " " * position + "^"
        super().__init__(
            f"cannot read formula {formula!r}: {reason} at position {position}\n"
            f"    {formula}\n    {pointer}"
        )


class DataError(ValueError, GibbsminError):
    """A species data file that is malformed or inconsistent."""


class UnknownSpeciesError(KeyError, GibbsminError):
    """A species name that the database does not hold."""

    def __init__(self, name: str, known: Iterable[str]):
        self.name = name
        known = list(dict.fromkeys(known))
        # Match without regard to case (engineers type "ch4"), but suggest the real spelling.
        folded = {k.casefold(): k for k in known}
        close = difflib.get_close_matches(name.casefold(), list(folded), n=4, cutoff=0.6)
        self.suggestions = list(dict.fromkeys(folded[c] for c in close))
        hint = (
            f"; did you mean {', '.join(self.suggestions)}?"
            if self.suggestions
            else "; `gibbsmin species` lists the names the database knows"
        )
        self.message = f"unknown species {name!r}{hint}"
        super().__init__(self.message)

    def __str__(self) -> str:  # KeyError would otherwise quote the message
        return self.message


class TemperatureRangeError(ValueError, GibbsminError):
    """A temperature outside a species' fitted data range."""

    def __init__(self, species: str, T: float, T_min: float, T_max: float):
        self.species = species
        self.T = T
        self.T_min = T_min
        self.T_max = T_max
        super().__init__(
            f"T = {T:.6g} K is outside the data range of {species} "
            f"({T_min:g} K to {T_max:g} K); choose a temperature inside it, "
            f"leave {species} out of the species set, or pass allow_extrapolation=True"
        )


class InputError(ValueError, GibbsminError):
    """A problem specification that cannot be solved as stated."""


class ConvergenceError(RuntimeError, GibbsminError):
    """No solver could produce a certified answer."""
