"""Which case-file keys need which module, and whether this version has it.

gibbsmin grows module by module; a key whose computation has not landed gives
a clear "not available yet" error instead of being ignored.  The tests and
``gibbsmin settle --keys`` read :data:`FEATURES`.
"""

from __future__ import annotations

import importlib
import inspect
from collections.abc import Callable
from dataclasses import dataclass

from ..api import equilibrate


def engine_accepts(keyword: str) -> bool:
    """Whether this version's :func:`gibbsmin.equilibrate` takes ``keyword``."""
    return keyword in inspect.signature(equilibrate).parameters


def module_has(module: str, name: str) -> bool:
    """Whether ``gibbsmin.<module>`` exists and defines ``name``."""
    try:
        return hasattr(importlib.import_module(f"gibbsmin.{module}"), name)
    except ImportError:
        return False


@dataclass(frozen=True)
class Feature:
    """A computation some keys need: what it is called and how to tell that it is there."""

    module: str
    available: Callable[[], bool]


FEATURES: dict[str, Feature] = {
    "energy": Feature("the energy balance (gibbsmin.energy)",
                      lambda: engine_accepts("adiabatic") and engine_accepts("T_feed")),
    "approach": Feature("restricted equilibrium (gibbsmin.restricted)",
                        lambda: module_has("api", "equilibrate_with_approach")),
    "gas": Feature("non-ideal gas models in the solve (equilibrate(gas=...))", lambda: engine_accepts("gas")),
    "reactions": Feature("reactions and approach temperatures (gibbsmin.reactions)",
                         lambda: module_has("reactions", "approach_temperatures")),
    "carbon": Feature("carbon activity (gibbsmin.carbon)", lambda: module_has("carbon", "carbon_activity")),
}

#: Case-file keys (table.key) and the feature each needs.
KEY_NEEDS: dict[str, str] = {
    "conditions.adiabatic": "energy",
    "conditions.heat_loss": "energy",
    "conditions.heat_input": "energy",
    "conditions.T_in": "energy",
    "conditions.duty": "energy",
    "conditions.approach": "approach",
    "conditions.gas": "gas",
    "curve": "energy",
    "report.kp": "reactions",
    "report.approach": "reactions",
    "report.carbon": "carbon",
}


def missing(feature: str) -> str | None:
    """None when ``feature`` is available; otherwise the phrase for the error message."""
    wanted = FEATURES[feature]
    if wanted.available():
        return None
    return f"needs {wanted.module}, which this version of gibbsmin does not have yet"
