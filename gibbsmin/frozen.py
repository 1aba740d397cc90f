"""Quick copies of the frozen result dataclasses, for the per-solve path.

``dataclasses.replace`` and a frozen dataclass's ``__init__`` set every field
through ``object.__setattr__`` after looking the fields up: about 5 us for an
``Equilibrium``, more than a warm Newton solve.  The classes given here have
no ``__post_init__`` and no ``init=False`` field, so filling the instance's
``__dict__`` makes the same object; the names are checked against the fields,
so a misspelt or missing one is still an error.
"""

from __future__ import annotations

import dataclasses
from typing import TypeVar

T = TypeVar("T")


@dataclasses.dataclass(frozen=True)
class _Layout:
    names: frozenset[str]
    defaults: dict[str, object]      # fields with a plain default
    factories: dict[str, object]     # fields with a default factory (each instance gets its own)
    required: frozenset[str]


_LAYOUTS: dict[type, _Layout] = {}


def _layout(cls: type) -> _Layout:
    layout = _LAYOUTS.get(cls)
    if layout is None:
        layout = _LAYOUTS.setdefault(cls, _layout_of(cls))
    return layout


def _layout_of(cls: type) -> _Layout:
    if not dataclasses.is_dataclass(cls) or hasattr(cls, "__post_init__") or "__slots__" in cls.__dict__ \
            or any(not f.init for f in dataclasses.fields(cls)):
        raise TypeError(f"{cls.__name__} is not a plain dataclass; use its constructor")
    fields = dataclasses.fields(cls)
    defaults = {f.name: f.default for f in fields if f.default is not dataclasses.MISSING}
    factories = {f.name: f.default_factory for f in fields if f.default_factory is not dataclasses.MISSING}
    names = frozenset(f.name for f in fields)
    return _Layout(names, defaults, factories, names - defaults.keys() - factories.keys())


def built(cls: type[T], **values: object) -> T:
    """``cls(**values)`` for a plain frozen dataclass, without the per-field ``object.__setattr__``."""
    layout = _layout(cls)
    given = values.keys()
    if not (layout.required <= given <= layout.names):
        wrong = sorted(given - layout.names) or sorted(layout.required - given)
        raise TypeError(f"{cls.__name__}: field {wrong[0]!r} unknown or missing")
    new = object.__new__(cls)
    state = new.__dict__
    state.update(layout.defaults)
    if layout.factories:
        for name, factory in layout.factories.items():
            if name not in values:
                state[name] = factory()
    state.update(values)
    return new


def replaced(obj: T, **changes: object) -> T:
    """``dataclasses.replace(obj, **changes)`` for a plain frozen dataclass (see the module docstring)."""
    layout = _layout(type(obj))
    if not changes.keys() <= layout.names:
        raise TypeError(f"{type(obj).__name__} has no field {sorted(changes.keys() - layout.names)[0]!r}")
    new = object.__new__(type(obj))
    state = new.__dict__
    state.update(obj.__dict__)
    state.update(changes)
    return new
