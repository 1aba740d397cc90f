"""Shared test settings.

Property-based tests draw the same examples on every run (``derandomize``, no example database), so a green
CI run is repeatable and a red one is a change in the code, not the luck of the draw. To explore new random
draws locally, run ``HYPOTHESIS_PROFILE=explore python -m pytest tests/test_properties*.py``; a failure found
that way is fixed and its draw added to the test as an ``@example``.

The ``solver`` fixture runs a test once per solver of the registry (``gibbsmin.solve.SOLVERS``), so a suite
checks the Newton answer and the cone's answer against the same numbers; "auto" is left out because it is
Newton with the cone behind it, which adds no third answer.
"""

import os

import pytest
from hypothesis import settings

from gibbsmin.solve import SOLVERS

#: The solvers proper, as ``method=`` takes them.
SOLVER_NAMES = [name for name in SOLVERS if name != "auto"]

settings.register_profile("repeatable", derandomize=True, database=None)
settings.register_profile("explore", derandomize=False)
settings.load_profile(os.environ.get("HYPOTHESIS_PROFILE", "repeatable"))


@pytest.fixture(params=SOLVER_NAMES)
def solver(request) -> str:
    """The name of one solver of the registry, passed as ``method=solver``."""
    return request.param
