"""The ``gibbsmin`` command: settle a case file, audit a heat-and-mass balance, list species.

Thin by design: it reads arguments, calls the library, writes what was asked
for.  Exit codes: 0 success; 1 a check failed (or warned) and ``--fail-on`` asked
to be told; 2 bad input (one line on stderr, no traceback); 3 no certified
answer; 130 interrupted.  ``settle --fail-on fail`` exits with 1 when any verdict
of the report fails (an uncertified answer, graphite in a carbon-free check).
``--traceback`` shows the Python traceback of an error (for reporting a bug).
"""

from __future__ import annotations

import argparse
import json
import re
import sys
import warnings
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from pathlib import Path

from tqdm import tqdm

from . import audit
from .case import CASE_KEYS, TomlSource, read_case, settle_case
from .errors import ConvergenceError, GibbsminError, UnknownSpeciesError
from .flowsheet import settle_flowsheet
from .flowsheet.reader import FLOWSHEET_KEYS, flowsheet_of, is_flowsheet
from .formula import ATOMIC_WEIGHTS
from .report.audit import audit_document, audit_report
from .report.document import VERDICTS
from .report.files import write_report_files
from .report.flowsheet import flowsheet_json, flowsheet_report, write_audit_files
from .report.settle import settle_document, settle_report
from .report.text import render_text
from .sweep import command as sweep_command
from .thermo import default_database
from .version import __version__

#: Exit codes.
OK, CHECKS_FAILED, BAD_INPUT, NOT_CERTIFIED, INTERRUPTED = 0, 1, 2, 3, 130

SETTLE_EXAMPLE = """\
example:
  gibbsmin settle examples/reformer.toml
  gibbsmin settle examples/reformer.toml --json > outlet.json
  gibbsmin settle examples/reformer.toml --html reformer.html --xlsx reformer.xlsx
  gibbsmin settle examples/reformer.toml --fail-on fail     exit 1 if any verdict fails

A case file, e.g. reformer.toml:

  [case]
  title = "Steam reformer outlet"

  [feed]
  unit = "kmol/h"
  CH4 = 1000.0
  H2O = 3000.0

  [conditions]
  T = "850 degC"
  P = "30 bar(g)"

`gibbsmin settle --keys` lists every key a case file may hold.
"""

SPECIES_EXAMPLE = """\
example:
  gibbsmin species              every species of the database
  gibbsmin species CH           names, formulas or aliases containing 'CH'
  gibbsmin species --element S  every species holding sulfur
  gibbsmin species methanol --json
"""

AUDIT_EXAMPLE = """\
example:
  gibbsmin audit examples/plant/streams.csv examples/plant/units.toml
  gibbsmin audit examples/plant/streams.xlsx examples/plant/units.toml --html audit.html --fail-on fail

The stream table (CSV or XLSX) has one column per stream; the unit description
(TOML) says which streams enter and leave each unit and what the unit is.
`gibbsmin audit --keys` lists every key of the unit description and every row
label of the stream table.
"""


class _Parser(argparse.ArgumentParser):
    """An argument parser whose usage errors are one line on stderr and exit code 2."""

    def error(self, message: str) -> None:  # type: ignore[override]
        self.exit(BAD_INPUT, f"{self.prog}: error: {message} (see {self.prog} --help)\n")


def _one_line(text: str) -> str:
    return " ".join(part.strip() for part in str(text).splitlines() if part.strip())


#: Keyword arguments of the Python API that the library's messages name, and the case-file table and key that
#: do the same: a message printed for a case file names the key, not the Python option.
CASE_FILE_KEYS: dict[str, tuple[str, str]] = {
    "allow_extrapolation": ("species", "allow_extrapolation"),
    "species": ("species", "only"),
    "exclude": ("species", "exclude"),
    "frozen": ("species", "frozen"),
    "inert": ("species", "frozen"),
    "carbon_basis": ("feed", "carbon_basis"),
    "method": ("conditions", "method"),
    "gas": ("conditions", "gas"),
    "kij": ("conditions", "kij"),
    "adiabatic": ("conditions", "adiabatic"),
    "heat_input": ("conditions", "heat_input"),
    "data": ("conditions", "data"),
    "uncertainty": ("conditions", "uncertainty"),
}
_PYTHON_OPTION = re.compile(r"(?:\b(pass|use) )?\b(" + "|".join(CASE_FILE_KEYS) + r")="
                            r"(True|False|'[^']*'|\[[^\]]*\]|[-+0-9.eE]+)")


def in_case_file_words(message: str) -> str:
    """A library message with each Python option (``allow_extrapolation=True``) written as its case-file key
    (``set [species] allow_extrapolation = true``)."""
    def key(match: re.Match) -> str:
        verb, option, value = match.groups()
        table, name = CASE_FILE_KEYS[option]
        value = {"True": "true", "False": "false"}.get(value, value.replace("'", '"'))
        lead = "set " if verb == "pass" else f"{verb} " if verb else ""
        return f"{lead}[{table}] {name} = {value}"
    return _PYTHON_OPTION.sub(key, message)


def _add_outputs(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("--json", action="store_true", help="print a machine-readable JSON document instead of the table")
    parser.add_argument("--csv", metavar="FILE", help="also write the tables as CSV")
    parser.add_argument("--xlsx", metavar="FILE", help="also write the tables as an Excel workbook")
    parser.add_argument("--html", metavar="FILE", help="also write a self-contained HTML report with plots")
    parser.add_argument("--quiet", action="store_true", help="print nothing but errors (files are still written)")


def _write_outputs(report, args: argparse.Namespace) -> list[Path]:
    return write_report_files(report, csv=args.csv, xlsx=args.xlsx, html=args.html)


def _print_json(document: dict) -> None:
    sys.stdout.write(json.dumps(document, indent=2, allow_nan=False) + "\n")


def _progress(total: int, what: str):
    """A progress display on stderr for runs of several steps (silent when stderr is not a terminal)."""
    return tqdm(total=total, desc=what, unit="step", file=sys.stderr, disable=None, leave=False)


def _ticker(bar) -> Callable[[str], None]:
    """A progress callback: called with the name of each step as it starts."""

    def tick(name: str) -> None:
        bar.set_postfix_str(name, refresh=False)
        bar.update(1)

    return tick


# --- settle -------------------------------------------------------------------------------------------


def _settle(args: argparse.Namespace) -> int:
    if args.keys:
        sys.stdout.write(_keys_text({**CASE_KEYS, **FLOWSHEET_KEYS}))
        return OK
    if args.case is None:
        raise _UsageError("settle needs a case file, e.g. gibbsmin settle examples/reformer.toml")
    source = TomlSource.from_file(args.case)
    if is_flowsheet(source):
        return _settle_flowsheet(source, args)
    if args.audit_files:
        raise _UsageError("--audit-files goes with a flowsheet case file ([[unit]] tables), whose streams the audit "
                          "can read back")
    case = read_case(args.case)
    if args.uncertainty:
        case = case.with_uncertainty()
    with _progress(len(case.stages), "settling") as bar:
        result = settle_case(case, progress=_ticker(bar))
    report = settle_report(result)
    _write_outputs(report, args)
    if args.json:
        _print_json(settle_document(result))
    elif not args.quiet:
        sys.stdout.write(render_text(report))
    return CHECKS_FAILED if _fails(args.fail_on, _worst_verdict(report)) else OK


def _settle_flowsheet(source: TomlSource, args: argparse.Namespace) -> int:
    """A flowsheet case file: converged, then reported as any case (and its streams written for the audit)."""
    if args.uncertainty:
        raise _UsageError("--uncertainty is not yet propagated through a flowsheet; settle its reactors as a case of "
                          "stages for their uncertainty")
    case = flowsheet_of(source)
    context = case.context()
    result = settle_flowsheet(case.flowsheet, context)
    flow_unit = case.report.flow_unit
    report = flowsheet_report(result, context.db, case.product, context, flow_unit=flow_unit)
    _write_outputs(report, args)
    if args.audit_files:
        Path(args.audit_files).mkdir(parents=True, exist_ok=True)
        write_audit_files(result, args.audit_files, context.db, context, flow_unit=flow_unit)
    if args.json:
        _print_json(flowsheet_json(result, context.db, case.product, context))
    elif not args.quiet:
        sys.stdout.write(render_text(report))
    return CHECKS_FAILED if _fails(args.fail_on, _worst_verdict(report)) else OK


def _worst_verdict(report) -> str:
    """The worst verdict in any verdict column of a report's tables ("pass" where there is none)."""
    found = [row[i] for table in report.tables for i, column in enumerate(table.columns)
             if column.style == "verdict" for row in table.rows]
    return max((v for v in found if v in VERDICTS), key=VERDICTS.index, default="pass")


def _fails(fail_on: str, worst: str) -> bool:
    """Whether the worst verdict is one ``--fail-on`` asked to be told of."""
    return fail_on == "fail" and worst == "fail" or fail_on == "warn" and worst in ("warn", "fail")


def _keys_text(keys: dict[str, dict[str, str]]) -> str:
    lines = []
    for table, entries in keys.items():
        lines.append(f"[{table}]")
        width = max(len(k) for k in entries)
        lines += [f"  {k:<{width}}  {meaning}" for k, meaning in entries.items()]
        lines.append("")
    return "\n".join(lines)


# --- species ------------------------------------------------------------------------------------------


def _species(args: argparse.Namespace) -> int:
    if args.element is not None and args.element not in ATOMIC_WEIGHTS:
        folded = [e for e in ATOMIC_WEIGHTS if e.casefold() == args.element.casefold()]
        hint = f"; did you mean {folded[0]}?" if folded else "; give an element symbol such as C, H, O, N or S"
        raise _UsageError(f"unknown element {args.element!r}{hint}")
    found = default_database().search(args.text or "", element=args.element)
    if args.json:
        _print_json({"species": [
            {"name": r.name, "formula": r.formula, "state": r.state, "T_min_K": r.T_min, "T_max_K": r.T_max,
             "molar_mass_g_mol": r.molar_mass, "aliases": list(r.aliases), "source": r.source} for r in found]})
        return OK
    if not found:
        what = " and ".join(filter(None, [f"{args.text!r}" if args.text else "", args.element and f"element {args.element}"]))
        close = default_database().close_matches(args.text) if args.text else []
        hint = f"; did you mean {', '.join(close)}?" if close else ""
        sys.stderr.write(f"gibbsmin species: no species match {what}{hint}\n")
        return OK
    rows = [(r.name, r.formula, r.state, f"{r.T_min:g}-{r.T_max:g}", f"{r.molar_mass:.3f}", ", ".join(r.aliases))
            for r in found]
    header = ("name", "formula", "state", "T range [K]", "M [g/mol]", "aliases")
    widths = [max(len(h), *(len(row[i]) for row in rows)) for i, h in enumerate(header)]
    out = ["  ".join(h.ljust(w) for h, w in zip(header, widths)).rstrip()]
    out += ["  ".join(c.ljust(w) for c, w in zip(row, widths)).rstrip() for row in rows]
    out.append(f"({len(found)} species)")
    sys.stdout.write("\n".join(out) + "\n")
    return OK


# --- audit --------------------------------------------------------------------------------------------


def _audit(args: argparse.Namespace) -> int:
    if args.keys:
        sys.stdout.write(_keys_text(audit.AUDIT_KEYS))
        return OK
    given = [f for f in (args.table, args.units) if f is not None]
    descriptions = [f for f in given if f.lower().endswith(".toml")]
    tables = [f for f in given if not f.lower().endswith(".toml")]
    if len(descriptions) != 1 or len(tables) > 1:
        raise _UsageError("audit needs a unit description (.toml) and, unless it names one, a stream table "
                          "(.csv or .xlsx), e.g. gibbsmin audit examples/plant/streams.csv examples/plant/units.toml")
    plant = audit.read_plant(descriptions[0], tables[0] if tables else None)
    with _progress(len(plant.units), "auditing") as bar:
        result = audit.audit_plant(plant, progress=_ticker(bar))
    _write_outputs(audit_report(result), args)
    if args.json:
        _print_json(audit_document(result))
    elif not args.quiet:
        sys.stdout.write(render_text(audit_report(result, details=args.details)))
    return CHECKS_FAILED if _fails(args.fail_on, result.worst) else OK


# --- the parser ---------------------------------------------------------------------------------------


class _UsageError(GibbsminError, ValueError):
    """A command line that cannot be run as given."""


@dataclass(frozen=True)
class Command:
    """A subcommand: what it does, a worked example, how it takes its arguments and how it runs."""

    summary: str
    example: str
    add_arguments: Callable[[argparse.ArgumentParser], None]
    run: Callable[[argparse.Namespace], int]


def _add_fail_on(parser: argparse.ArgumentParser, what: str) -> None:
    parser.add_argument("--fail-on", choices=("never", "warn", "fail"), default="never",
                        help=f"exit with code 1 when {what} fails (or warns); default: never")


def _settle_arguments(p: argparse.ArgumentParser) -> None:
    p.add_argument("case", nargs="?", help="the case file (TOML)")
    p.add_argument("--keys", action="store_true", help="list every key a case file may hold, and exit")
    p.add_argument("--uncertainty", action="store_true",
                   help="show the standard uncertainty from the data set's formation enthalpies beside each figure "
                        "(as [conditions] uncertainty = true in every stage; needs data = 'atct-anchored')")
    p.add_argument("--audit-files", metavar="FOLDER",
                   help="a flowsheet: also write its stream table and unit description there (streams.csv, "
                        "units.toml), which `gibbsmin audit` reads back")
    _add_fail_on(p, "a verdict of the report (an uncertified answer, a carbon check)")
    _add_outputs(p)


def _species_arguments(p: argparse.ArgumentParser) -> None:
    p.add_argument("text", nargs="?", help="part of a name, formula or alias (any case)")
    p.add_argument("--element", metavar="X", help="only species holding element X (e.g. C, S, N)")
    p.add_argument("--json", action="store_true", help="print the list as JSON")


def _audit_arguments(p: argparse.ArgumentParser) -> None:
    p.add_argument("table", nargs="?", help="the stream table (CSV or XLSX); optional when the unit "
                   "description names it")
    p.add_argument("units", nargs="?", help="the unit description (TOML); the two may come in either order")
    p.add_argument("--keys", action="store_true",
                   help="list the keys of a unit description and the row labels of a stream table")
    p.add_argument("--details", action="store_true", help="print the figures behind every check, not only "
                   "behind those that did not pass")
    _add_fail_on(p, "a check")
    _add_outputs(p)


#: The subcommands by name; another module may add one (``COMMANDS["sweep"] = Command(...)``).
COMMANDS: dict[str, Command] = {
    "settle": Command("settle a case file: the equilibrium outlet of each stage", SETTLE_EXAMPLE,
                      _settle_arguments, _settle),
    "audit": Command("audit a heat-and-mass balance: a stream table against its units", AUDIT_EXAMPLE,
                     _audit_arguments, _audit),
    "species": Command("list and search the species database", SPECIES_EXAMPLE, _species_arguments, _species),
    "sweep": Command("sweep a case over a grid of T, P, S/C or feed flows", sweep_command.SWEEP_EXAMPLE,
                     sweep_command.add_arguments, sweep_command.run),
}


#: The subcommands whose input is a case file.
CASE_FILE_COMMANDS = ("settle", "sweep")


def build_parser() -> argparse.ArgumentParser:
    parser = _Parser(prog="gibbsmin", description="Chemical equilibrium by Gibbs energy minimisation, for reformer, "
                     "shift, methanation, ammonia and methanol engineers.",
                     epilog="`gibbsmin COMMAND --help` shows a worked example of each command.")
    parser.add_argument("--version", action="version", version=f"gibbsmin {__version__}")
    parser.add_argument("--traceback", action="store_true", help="show the Python traceback of an error")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    for name, cmd in COMMANDS.items():
        p = sub.add_parser(name, help=cmd.summary, description=cmd.summary[0].upper() + cmd.summary[1:] + ".",
                           epilog=cmd.example, formatter_class=argparse.RawDescriptionHelpFormatter)
        cmd.add_arguments(p)
        p.set_defaults(run=cmd.run)
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line; returns the exit code (the console script passes it to the shell)."""
    parser = build_parser()
    argv = list(sys.argv[1:] if argv is None else argv)
    try:
        args = parser.parse_args(argv)
    except SystemExit as exit_:
        return int(exit_.code or 0)
    if args.command is None:
        parser.print_help(sys.stderr)
        return BAD_INPUT
    # Settle and sweep read case files: there the library's messages name the case-file keys.
    words = in_case_file_words if args.command in CASE_FILE_COMMANDS else str
    try:
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always")
            code = args.run(args)
        for w in caught:
            sys.stderr.write(f"gibbsmin: warning: {words(_one_line(w.message))}\n")
        return code
    except KeyboardInterrupt:
        sys.stderr.write("gibbsmin: interrupted; no partial output files were left behind\n")
        return INTERRUPTED
    except ConvergenceError as exc:
        if args.traceback:
            raise
        sys.stderr.write(f"gibbsmin: error: {words(_one_line(exc))}\n")
        return NOT_CERTIFIED
    except (GibbsminError, UnknownSpeciesError) as exc:
        if args.traceback:
            raise
        sys.stderr.write(f"gibbsmin: error: {words(_one_line(exc))}\n")
        return BAD_INPUT
    except OSError as exc:
        if args.traceback:
            raise
        where = f" {exc.filename}" if exc.filename else ""
        sys.stderr.write(f"gibbsmin: error: cannot use{where}: {exc.strerror or exc}\n")
        return BAD_INPUT


if __name__ == "__main__":
    sys.exit(main())
