"""Start-up: `import gibbsmin` leaves the heavy edge dependencies unloaded (issue 12)."""

import subprocess
import sys

from gibbsmin import units

# Each costs 0.1 to 0.4 s to import and is needed only by one edge of the program (the cone solver, plots, tables,
# XLSX files, unit text); dask comes in through pint.
_HEAVY = ("cvxpy", "matplotlib", "openpyxl", "pandas", "pint", "dask", "pyarrow")


def _loaded_after(code: str) -> list[str]:
    probe = f"{code}\nimport sys\nprint(' '.join(m for m in {_HEAVY!r} if m in sys.modules))"
    out = subprocess.run([sys.executable, "-c", probe], capture_output=True, text=True, check=True, timeout=120)
    return out.stdout.split()


def test_import_gibbsmin_loads_no_heavy_edge_dependency():
    assert _loaded_after("import gibbsmin") == []


def test_command_line_parser_loads_no_heavy_edge_dependency():
    # `gibbsmin settle` reads the parser of every subcommand; building it must not load pandas for `sweep`.
    assert _loaded_after("from gibbsmin.cli import build_parser\nbuild_parser()") == []


def test_a_unit_conversion_loads_pint():
    # The probe itself can fail: the registry is built on first use, so pint must appear here.
    assert "pint" in _loaded_after("from gibbsmin.units import to_kelvin\nto_kelvin('850 degC')")


def test_us_gas_standard_conditions_are_pints_conversions():
    # The written-out floats of STANDARD_US_GAS against pint's own conversion of 60 degF and 14.696 psi
    # (pint's definitions of degF and psi; the conditions are common practice, no source), to the last bit.
    assert units.STANDARD_US_GAS.T == float(units.Quantity(60.0, "degF").to("kelvin").magnitude)
    assert units.STANDARD_US_GAS.P == float(units.Quantity(14.696, "psi").to("pascal").magnitude)
