"""``gibbsmin sweep`` on a flowsheet case file: the loop converged at every point of a grid of its settings, one
row per point (converged or why not) with the loop's figures, as CSV."""

from __future__ import annotations

import argparse
import sys

from ..case.toml import TomlSource
from ..errors import InputError
from ..flowsheet.reader import flowsheet_of
from ..flowsheet.summary import loop_summary
from ..flowsheet.sweep import LOOP_PRESSURE, SweepPoint, sweep_flowsheet
from ..report.files import write_atomic
from ..units import to_kelvin, to_mol_s, to_pascal
from .grid import _range_count, _read_axis

#: How an axis's values are read, by its setting (the text after the last '.'), with the unit they need.
_READERS = {"T": (to_kelvin, "degC"), "P": (to_pascal, "bar"), "flow": (to_mol_s, "kmol/h")}


def flowsheet_axis(text: str) -> tuple[str, list[float]]:
    """An axis of a flowsheet sweep: '<unit>.<setting>=...', '<feed>.flow=...[unit]' or 'pressure=...bar'."""
    name, unit, ranged, shown = _read_axis(text)
    if ranged:
        start, _, step = ranged
        shown = [start + k * step for k in range(_range_count(*ranged))]
    setting = "P" if name == LOOP_PRESSURE else name.rpartition(".")[2]
    if setting in _READERS:
        read, example = _READERS[setting]
        if not unit:
            raise InputError(f"axis {text!r} needs a unit, e.g. {name}={shown[0]:g}{example}")
        return name, [read(f"{v} {unit}") for v in shown]
    if unit:
        raise InputError(f"axis {name} takes plain numbers (a fraction, or W for a duty), not {unit!r}")
    return name, shown


def sweep_rows(points: list[SweepPoint], db) -> list[dict[str, object]]:
    """One row per point: the axes, converged, the certificate's figures and the loop summary's numbers."""
    rows = []
    for point in points:
        row: dict[str, object] = dict(point.values)
        row["converged"] = point.converged
        row["failure"] = point.failure or ""
        if point.converged:
            c = point.result.certificate
            s = loop_summary(point.result, db)
            row.update({"passes": c.passes, "tear_residual": c.tear_residual,
                        "element_balance_residual": c.element_balance_residual, "certified": c.certified,
                        "product": s.product, "production_mol_s": s.production_mol_s,
                        "conversion_per_pass": s.conversion_per_pass, "recycle_ratio": s.recycle_ratio,
                        "inert_fraction": s.inert_fraction, "purge_mol_s": s.purge_mol_s,
                        "hydrogen_loss": s.hydrogen_loss, "compressor_power_W": s.compressor_power_W})
        rows.append(row)
    return rows


def run_flowsheet(source: TomlSource, args: argparse.Namespace) -> int:
    """The sweep command for a flowsheet: every point converged (or marked), the table as CSV."""
    for option in ("out", "scheduler", "map", "uncertainty"):
        if getattr(args, option):
            raise InputError(f"--{option} is not yet available for a flowsheet sweep; write the table with --csv "
                             "(points run in --workers local processes)")
    if not args.csv:
        raise InputError("a flowsheet sweep writes its table with --csv FILE")
    case = flowsheet_of(source)
    axes = dict(flowsheet_axis(text) for text in args.vary)
    context = case.context()
    points = sweep_flowsheet(case.flowsheet, axes, context, processes=args.workers)
    import pandas as pd  # the table's edge only

    table = pd.DataFrame(sweep_rows(points, context.db))
    write_atomic(args.csv, table.to_csv(index=False))
    failed = sum(not p.converged for p in points)
    print(f"{len(points)} points; {failed} not converged; axes: " + ", ".join(f"{n} ({len(v)})" for n, v in axes.items()))
    print("Caution: thermodynamic limits, not designs; local codes and licensed engineering practice govern.")
    sys.stdout.flush()
    return 0 if failed == 0 else 3
