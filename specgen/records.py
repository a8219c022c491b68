"""Frozen records: ``@record`` is ``@dataclass(frozen=True)`` with shared ``__eq__``, ``__hash__`` and
``__repr__``.

Why: for every class, dataclasses writes the source of each method it adds and compiles it at import,
and the ~50 records a design loads (the catalogue, the spec, the design's state and result) spent a
large share of `specgen design`'s start-up doing that. Here the comparison, hash and repr are three
shared functions reading the class's field names, so only ``__init__`` and the frozen
``__setattr__``/``__delattr__`` are still compiled per class. A class without a docstring gets its
name as one (dataclasses would build one from ``inspect.signature``).

They behave as the generated ones do (Python 3.10-3.12 dataclasses): equal only to an instance of the
very same class with equal compared fields, in field order; the hash of those fields (fields with
``hash=True``, or ``compare=True`` and no ``hash``); the repr ``Name(field=value, ...)`` of the fields
with ``repr=True``, ``...`` on recursion. A method the class body defines itself is kept.
``tests/test_records.py`` checks them against dataclasses' own.
"""

from __future__ import annotations

import dataclasses
import reprlib
from collections.abc import Callable
from typing import TYPE_CHECKING, Any, TypeVar, overload

if TYPE_CHECKING:
    from typing_extensions import dataclass_transform
else:
    def dataclass_transform(**_kwargs: Any) -> Callable[[Any], Any]:
        return lambda f: f

T = TypeVar("T", bound=type)


def _compared(self: Any) -> tuple[Any, ...]:
    return tuple([getattr(self, name) for name in self._record_compare])


def _eq(self: Any, other: Any) -> Any:
    if other.__class__ is self.__class__:
        return _compared(self) == _compared(other)
    return NotImplemented


def _hash(self: Any) -> int:
    return hash(tuple([getattr(self, name) for name in self._record_hash]))


@reprlib.recursive_repr()
def _repr(self: Any) -> str:
    shown = ", ".join(f"{name}={getattr(self, name)!r}" for name in self._record_repr)
    return f"{self.__class__.__qualname__}({shown})"


def _finish(cls: T, slots: bool) -> T:
    own = set(cls.__dict__)
    if not cls.__doc__:
        # dataclasses would write one from inspect.signature (a seventh of what is left of its cost)
        cls.__doc__ = cls.__name__
    made: Any = dataclasses.dataclass(frozen=True, eq=False, repr=False, slots=slots)(cls)
    fields = dataclasses.fields(made)
    made._record_compare = tuple(f.name for f in fields if f.compare)
    made._record_hash = tuple(f.name for f in fields if (f.compare if f.hash is None else f.hash))
    made._record_repr = tuple(f.name for f in fields if f.repr)
    if "__repr__" not in own:
        made.__repr__ = _repr
    if "__eq__" not in own:
        made.__eq__ = _eq
    # as dataclasses: a hash of the fields unless the class body sets one (defining __eq__ alone does not)
    if "__hash__" not in own or (cls.__dict__["__hash__"] is None and "__eq__" in own):
        made.__hash__ = _hash
    return made


@overload
def record(cls: T, /) -> T: ...


@overload
def record(*, slots: bool = False) -> Callable[[T], T]: ...


@dataclass_transform(frozen_default=True)
def record(cls: T | None = None, /, *, slots: bool = False) -> T | Callable[[T], T]:
    """``@record`` or ``@record(slots=True)``: a frozen dataclass (see the module docstring)."""
    if cls is None:
        return lambda c: _finish(c, slots)
    return _finish(cls, slots)
