"""Frozen records: ``@record`` is ``@dataclass(frozen=True)`` with shared methods.

Why: for every class, dataclasses writes the source of each method it adds and compiles it at import,
and the ~50 records a design loads (the catalogue, the spec, the design's state and result) spent a
large share of `specgen design`'s start-up doing that (~0.5 ms a class). Here ``__init__``, the
frozen ``__setattr__``/``__delattr__``, the comparison, hash and repr are shared functions reading
the class's field names: dataclasses only collects the fields, and nothing is compiled per class. A
class without a docstring gets its name as one (dataclasses would build one from
``inspect.signature``).

They behave as the generated ones do (Python 3.10-3.12 dataclasses): equal only to an instance of the
very same class with equal compared fields, in field order; the hash of those fields (fields with
``hash=True``, or ``compare=True`` and no ``hash``); the repr ``Name(field=value, ...)`` of the fields
with ``repr=True``, ``...`` on recursion; ``__init__`` takes the fields positionally or by keyword,
fills defaults and calls default factories, and raises TypeError for a missing, repeated or unknown
argument. A method the class body defines itself is kept.
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


def _init(self: Any, *args: Any, **kwargs: Any) -> None:
    # One __init__ for every record: binds the arguments to the class's fields as dataclasses' generated
    # one does (positional in field order, keywords, defaults and default factories), then sets them past
    # the frozen guard.
    cls = self.__class__
    names = cls._record_init
    setter = object.__setattr__
    if not kwargs and len(args) == len(names):          # every field given in order: the common case
        for name, value in zip(names, args):
            setter(self, name, value)
        return
    if len(args) > len(names):
        raise TypeError(f"{cls.__qualname__}.__init__() takes {len(names) + 1} positional arguments "
                        f"but {len(args) + 1} were given")
    values = dict(zip(names, args))
    for key, value in kwargs.items():
        if key in values:
            raise TypeError(f"{cls.__qualname__}.__init__() got multiple values for argument {key!r}")
        if key not in cls._record_init_set:
            raise TypeError(f"{cls.__qualname__}.__init__() got an unexpected keyword argument {key!r}")
        values[key] = value
    if len(values) < len(names):
        for name, default, factory in cls._record_defaults:
            if name not in values:
                values[name] = factory() if factory is not None else default
        missing = [name for name in names if name not in values]
        if missing:
            raise TypeError(f"{cls.__qualname__}.__init__() missing required argument(s): "
                            + ", ".join(repr(m) for m in missing))
    for name in names:
        setter(self, name, values[name])


def _frozen_setattr(self: Any, name: str, value: Any) -> None:
    raise dataclasses.FrozenInstanceError(f"cannot assign to field {name!r}")


def _frozen_delattr(self: Any, name: str) -> None:
    raise dataclasses.FrozenInstanceError(f"cannot delete field {name!r}")


def _getstate(self: Any) -> list[Any]:
    return [getattr(self, name) for name in self._record_fields]


def _setstate(self: Any, state: list[Any]) -> None:
    for name, value in zip(self._record_fields, state):
        object.__setattr__(self, name, value)


def _finish(cls: T, slots: bool) -> T:
    own = set(cls.__dict__)
    if not cls.__doc__:
        # dataclasses would write one from inspect.signature (a seventh of what is left of its cost)
        cls.__doc__ = cls.__name__
    # dataclasses only collects the fields (and makes the slots); every method is one of the shared ones
    made: Any = dataclasses.dataclass(init=False, frozen=False, eq=False, repr=False, slots=slots)(cls)
    fields = dataclasses.fields(made)
    made._record_fields = tuple(f.name for f in fields)
    made._record_init = tuple(f.name for f in fields if f.init)
    made._record_init_set = frozenset(made._record_init)
    made._record_defaults = tuple(
        (f.name, f.default, None if f.default_factory is dataclasses.MISSING else f.default_factory)
        for f in fields if f.init and not (f.default is dataclasses.MISSING and f.default_factory is dataclasses.MISSING))
    made._record_compare = tuple(f.name for f in fields if f.compare)
    made._record_hash = tuple(f.name for f in fields if (f.compare if f.hash is None else f.hash))
    made._record_repr = tuple(f.name for f in fields if f.repr)
    shared = {"__init__": _init, "__setattr__": _frozen_setattr, "__delattr__": _frozen_delattr,
              "__repr__": _repr, "__eq__": _eq}
    if slots:    # the frozen guard stops pickle's default slot setting (as in dataclasses)
        shared.update({"__getstate__": _getstate, "__setstate__": _setstate})
    for name, fn in shared.items():
        if name not in own:
            setattr(made, name, fn)
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
