"""Sweeps: grids of independent equilibrium problems, solved in batches, streamed to disk, resumable."""

from .grid import Axis as Axis
from .grid import SweepSpec as SweepSpec
from .grid import grid as grid
from .grid import axis_from_text as axis_from_text
from .grid import axis_size as axis_size

# The solving and writing halves import pandas (about 0.3 s); they load on first use, so that the command line
# (which reads this package for the `sweep` subcommand's arguments) and `settle` do not pay for them.
_LAZY = {"solve_points": ".chunk", "SweepOutput": ".run", "run_sweep": ".run"}

__all__ = ["Axis", "SweepSpec", "grid", "axis_from_text", "axis_size", *_LAZY]


def __getattr__(name: str) -> object:
    if name not in _LAZY:
        raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
    import importlib

    value = getattr(importlib.import_module(_LAZY[name], __name__), name)
    globals()[name] = value
    return value
