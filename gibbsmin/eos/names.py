"""The names of the gas models: the canonical ones and the aliases accepted for them."""

from __future__ import annotations

import difflib

from ..errors import InputError
from .families import PENG_ROBINSON, SOAVE_REDLICH_KWONG

_ALIASES = {"pr": PENG_ROBINSON.name, "soave-redlich-kwong": SOAVE_REDLICH_KWONG.name, "ideal-gas": "ideal"}

#: Names accepted by :func:`gas_model`.
GAS_MODELS: tuple[str, ...] = ("ideal", PENG_ROBINSON.name, SOAVE_REDLICH_KWONG.name)


def canonical_model_name(name: str) -> str:
    """The canonical name of a gas model ("pr" -> "peng-robinson"); InputError for an unknown one."""
    key = str(name).strip().lower().replace("_", "-").replace(" ", "-")
    key = _ALIASES.get(key, key)
    if key not in GAS_MODELS:
        close = difflib.get_close_matches(key, [*GAS_MODELS, *_ALIASES], n=3, cutoff=0.5)
        hint = f"; did you mean {', '.join(repr(c) for c in close)}?" if close else ""
        raise InputError(f"unknown gas model {name!r}: choose one of {', '.join(GAS_MODELS)}{hint}")
    return key
