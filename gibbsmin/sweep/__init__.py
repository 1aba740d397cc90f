"""Sweeps: grids of independent equilibrium problems, solved in batches, streamed to disk, resumable."""

from .chunk import solve_points as solve_points
from .grid import Axis as Axis
from .grid import SweepSpec as SweepSpec
from .grid import grid as grid
from .run import SweepOutput as SweepOutput
from .run import run_sweep as run_sweep
from .grid import axis_from_text as axis_from_text
from .grid import axis_size as axis_size
