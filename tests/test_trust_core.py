"""No wrong answer marked pass: the core-numerics cases of issue 16.

Each test here failed before its fix.  Reference values are computed by hand
from the NASA polynomials (McBride, Gordon and Reno, NASA TM-4513, 1993, the
data the engine ships) or taken from Cantera where it can solve the case.
"""

from __future__ import annotations

import math

import pytest

import gibbsmin
from gibbsmin.errors import InputError


def test_feed_total_that_overflows_is_refused_with_the_limit_and_the_fix():
    with pytest.raises(InputError, match=r"1e\+308 mol.*1e\+100 mol.*scale the feed"):
        gibbsmin.equilibrate({"H2O": 1e308}, 300.0, 1e5)
    with pytest.raises(InputError, match="scale the feed"):
        gibbsmin.equilibrate({"N2": 1e-120}, 300.0, 1e5)


def test_feed_total_near_the_limits_gives_the_same_composition():
    species = ["CH4", "H2O", "H2", "CO", "CO2"]
    unit = gibbsmin.equilibrate({"CH4": 1.0, "H2O": 3.0}, 1100.0, 30e5, species=species)
    for scale in (1e99 / 4, 1e-99):
        big = gibbsmin.equilibrate({"CH4": scale, "H2O": 3 * scale}, 1100.0, 30e5, species=species)
        assert big.certificate.certified
        for s in species:
            assert big.mole_fractions[s] == pytest.approx(unit.mole_fractions[s], rel=1e-10)


def test_zero_feed_amount_with_a_feed_temperature_means_absent():
    with_zero = gibbsmin.equilibrate({"CH4": 1.0, "H2O": 3.0, "Ar": 0.0}, 1123.15, 30e5, T_feed=773.15)
    without = gibbsmin.equilibrate({"CH4": 1.0, "H2O": 3.0}, 1123.15, 30e5, T_feed=773.15)
    assert with_zero.amounts["Ar"] == 0.0
    assert with_zero.extras["duty_W"] == pytest.approx(without.extras["duty_W"], rel=1e-12)
    adiabatic = gibbsmin.equilibrate({"CH4": 1.0, "H2O": 3.0, "Ar": 0.0}, P=30e5, T_feed=1073.15, adiabatic=True)
    assert adiabatic.T == pytest.approx(
        gibbsmin.equilibrate({"CH4": 1.0, "H2O": 3.0}, P=30e5, T_feed=1073.15, adiabatic=True).T, abs=1e-6)


def test_zero_mol_percent_in_a_case_file_settles(tmp_path, capsys):
    from gibbsmin.cli import main

    case = tmp_path / "zero_argon.toml"
    case.write_text(
        '[case]\ntitle = "invented: a reformer feed with an argon line left at zero"\n'
        '[feed.gas]\nunit = "mol%"\ntotal = "100 kmol/h"\nCH4 = 25.0\nH2O = 75.0\nAr = 0.0\n'
        'T = "500 degC"\nP = "30 bar"\n'
        '[conditions]\nT = "850 degC"\nP = "30 bar"\n')
    assert main(["settle", str(case), "--json"]) == 0
    out = capsys.readouterr().out
    assert '"Ar"' in out and "duty" in out


def test_import_without_any_writable_numba_cache_folder_warns_and_works(tmp_path):
    """A read-only install with no writable home: numba's cache=True used to fail at import."""
    import os
    import shutil
    import subprocess
    import sys
    from pathlib import Path

    package = Path(gibbsmin.__file__).resolve().parent
    copy = tmp_path / "site" / "gibbsmin"
    shutil.copytree(package, copy, ignore=shutil.ignore_patterns("__pycache__"))
    # A regular file where a folder is wanted blocks writing even for root (chmod would not).
    for kernel_folder in ("solve",):
        (copy / kernel_folder / "__pycache__").write_text("not a folder")
    blocker = tmp_path / "blocker"
    blocker.write_text("not a folder")
    env = {k: v for k, v in os.environ.items() if not k.startswith(("NUMBA_", "XDG_"))}
    env.update(PYTHONPATH=str(tmp_path / "site"), HOME=str(blocker), NUMBA_CACHE_DIR=str(blocker / "numba"),
               PYTHONDONTWRITEBYTECODE="1")
    script = (
        "import warnings, numpy as np\n"
        "with warnings.catch_warnings(record=True) as caught:\n"
        "    warnings.simplefilter('always')\n"
        "    import gibbsmin\n"
        "    from gibbsmin.solve import certificate\n"
        f"assert gibbsmin.__file__.startswith({str(copy)!r}), gibbsmin.__file__\n"
        "print(sum('compiled-kernel cache' in str(w.message) for w in caught))\n"
        "out = np.array([[1e-12, 1e-12, 1.0, 1.0]])\n"
        "print(certificate._verdicts(out, np.array([True]), 1e-9, 1e-7, 1e-7)[0])\n"
    )
    run = subprocess.run([sys.executable, "-c", script], env=env, cwd=tmp_path, capture_output=True, text=True,
                         timeout=120)
    assert run.returncode == 0, run.stderr
    assert run.stdout.split() == ["1", "True"]
