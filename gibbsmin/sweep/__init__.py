"""Sweeps: grids of independent equilibrium problems, solved in batches, streamed to disk, resumable."""

from .grid import Axis as Axis
from .grid import SweepSpec as SweepSpec
from .grid import grid as grid
from .grid import axis_from_text as axis_from_text
from .grid import axis_size as axis_size

from .chunk import solve_points as solve_points
from .run import SweepOutput as SweepOutput
from .run import run_sweep as run_sweep

__all__ = ["Axis", "SweepSpec", "grid", "axis_from_text", "axis_size", "solve_points", "SweepOutput", "run_sweep"]
