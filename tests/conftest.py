"""Shared test settings.

Property-based tests draw the same examples on every run (``derandomize``, no example database), so a green
CI run is repeatable and a red one is a change in the code, not the luck of the draw. To explore new random
draws locally, run ``HYPOTHESIS_PROFILE=explore python -m pytest tests/test_properties*.py``; a failure found
that way is fixed and its draw added to the test as an ``@example``.
"""

import os

from hypothesis import settings

settings.register_profile("repeatable", derandomize=True, database=None)
settings.register_profile("explore", derandomize=False)
settings.load_profile(os.environ.get("HYPOTHESIS_PROFILE", "repeatable"))
