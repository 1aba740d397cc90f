"""``gibbsmin sweep CASE --vary ...``: a case file's first stage over a grid, to Parquet or CSV, with a map."""

from __future__ import annotations

import argparse
import io
import math
import sys

from ..case import TomlSource, read_case
from ..flowsheet.reader import is_flowsheet
from ..errors import InputError
from ..report.files import write_atomic
from .grid import SweepSpec, axis_from_text, axis_size, check_axis_names
from .flowsheets import run_flowsheet
from .plots import carbon_map
from .run import run_sweep

#: Above this many points a sweep runs only with --yes (at the 79,000 to 255,000 points/s of DEVELOPERS.md a
#: million points take seconds; far larger grids are usually a typing slip in a step).
LARGE_SWEEP = 1_000_000

SWEEP_EXAMPLE = """\
example:
  gibbsmin sweep examples/reformer.toml --vary T=700:1000:25degC --vary "S/C=1.5:4:0.25" --csv map.csv
  gibbsmin sweep examples/reformer.toml --vary T=650:950:10degC --vary P=20,30,40bar --out runs/reformer
  gibbsmin sweep examples/reformer.toml --vary T=650:950:10degC --vary "S/C=0.4:2:0.1" \\
      --map T,S/C,y_CH4 --png carbon-map.png
  gibbsmin sweep CASE --vary ... --out runs/x --scheduler tcp://10.0.0.5:8786   (a Dask cluster)

A flowsheet case file ([[unit]] tables) is converged at every point instead, its
axes its settings: gibbsmin sweep examples/ammonia_loop.toml --vary "purge split.fraction=0.002,0.004"
--vary pressure=160:200:20bar --csv loop.csv ('<unit>.<setting>', '<feed>.flow' with a unit, or
'pressure': every pressure of the flowsheet scaled together).

The first stage of the case (fixed T and P) is solved at every point of the
grid spanned by the --vary axes: T, P (with units), S/C (steam to hydrocarbon
carbon; the case's steam is replaced) or a feed species' flow in mol/s.
--out keeps Parquet chunks in a folder and resumes an interrupted run.
T and P need a unit (T=650:950:25degC, not T=650:950:25).  Above
1,000,000 points the sweep asks for --yes.
"""


def add_arguments(p: argparse.ArgumentParser) -> None:
    p.add_argument("case", help="the case file (TOML)")
    p.add_argument("--vary", action="append", required=True, metavar="AXIS",
                   help="NAME=START:STOP:STEP[unit] or NAME=V1,V2,...[unit]; repeat for more axes")
    p.add_argument("--out", metavar="FOLDER", help="Parquet chunks here (resumable)")
    p.add_argument("--csv", metavar="FILE", help="write the whole table as CSV")
    p.add_argument("--map", metavar="X,Y,COLUMN", help="draw COLUMN over axes X and Y with the graphite boundary")
    p.add_argument("--png", metavar="FILE", help="where --map is written (default sweep-map.png)")
    p.add_argument("--workers", type=int, default=1, help="local worker processes (default 1)")
    p.add_argument("--scheduler", metavar="ADDRESS", help="run the chunks on this Dask scheduler")
    p.add_argument("--chunk-size", type=int, default=5000, help="points per chunk (default 5000)")
    p.add_argument("--yes", action="store_true", help=f"run a sweep of more than {LARGE_SWEEP:,} points")
    p.add_argument("--uncertainty", action="store_true",
                   help="add u_y_<species> and u_n_<species> columns: the standard uncertainty of each mole fraction "
                        "and condensed amount from the data set's formation enthalpies (as [conditions] "
                        "uncertainty = true; needs data = 'atct-anchored', ideal gas)")


def spec_from_case(case, axes, uncertainty: bool = False) -> SweepSpec:
    """The sweep of a case's first stage along ``axes`` (with uncertainty columns if asked here or in the stage)."""
    stage = case.stages[0]
    # A sweep settles a full equilibrium; a stage type, service, reactions or frozen would be silently dropped.
    restricted = not stage.reacts or stage.service or stage.reactions is not None or stage.frozen
    if stage.T is None or stage.adiabatic or stage.approach or restricted:
        raise InputError(f"{case.source}: a sweep runs the first stage at fixed T and P; "
                         "stage " + repr(stage.name) + " asks for more (adiabatic, approach, a type, service, "
                         "reactions or frozen)")
    return SweepSpec(feed=case.mixed_feed(), T=stage.T, P=stage.P, axes=tuple(axes),
                     species=case.species.only, exclude=case.species.exclude, inert=case.species.frozen,
                     method=stage.method, gas=stage.gas, kij=stage.kij,
                     kij_pairs=tuple((a, b, v) for (a, b), v in stage.kij_pairs.items()),
                     uncertainty=uncertainty or stage.uncertainty,
                     **({} if stage.data is None else {"data": stage.data}))


def run(args: argparse.Namespace) -> int:
    sizes = [axis_size(text) for text in args.vary]
    total = math.prod(sizes)
    size_text = f"{total:,} points ({' x '.join(f'{n:,}' for n in sizes)})"
    if total > LARGE_SWEEP and not args.yes:
        raise InputError(f"this sweep spans {size_text}, more than {LARGE_SWEEP:,}: check the steps, or add --yes "
                         "to run it")
    if total > LARGE_SWEEP:
        sys.stderr.write(f"gibbsmin sweep: {size_text}\n")
    source = TomlSource.from_file(args.case)
    if is_flowsheet(source):
        return run_flowsheet(source, args)
    case = read_case(args.case)
    names = [text.partition("=")[0].strip() for text in args.vary]
    check_axis_names(names, list(case.mixed_feed()))
    spec = spec_from_case(case, [axis_from_text(text) for text in args.vary], uncertainty=args.uncertainty)
    result = run_sweep(spec, args.out, chunk_size=args.chunk_size, workers=args.workers,
                       scheduler=args.scheduler, progress=sys.stderr.isatty())
    table = result if args.out is None else result.frame()
    uncertified = int((~table["certified"]).sum())
    if args.csv:
        write_atomic(args.csv, table.to_csv(index=False))
    if args.map:
        parts = args.map.split(",")
        if len(parts) != 3:
            raise InputError(f"--map takes X,Y,COLUMN (e.g. T,S/C,y_CH4), not {args.map!r}")
        x, y, column = parts
        labels = {a.name: a.label for a in spec.axes}
        figure = carbon_map(table, labels.get(x, x), labels.get(y, y), column, title=case.title)
        picture = io.BytesIO()
        figure.savefig(picture, format="png", dpi=120)
        write_atomic(args.png or "sweep-map.png", picture.getvalue())
    where = f" in {args.out}" if args.out else ""
    print(f"{spec.n_points} points{where}; {uncertified} not certified; axes: "
          + ", ".join(f"{a.label} ({len(a.values)})" for a in spec.axes))
    print("Caution: thermodynamic limits, not designs; local codes and licensed engineering practice govern.")
    return 0 if uncertified == 0 else 3
