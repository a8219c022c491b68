"""``specgen.records.record`` against the standard library's ``dataclass(frozen=True)``: the same
equality, hash, repr, immutability and pickling (the reference is Python's own dataclasses module)."""

from __future__ import annotations

import dataclasses
import pickle
from dataclasses import field

import pytest

from specgen.records import record


def _pair(slots: bool):
    @dataclasses.dataclass(frozen=True, slots=slots)
    class Ref:
        a: int
        b: tuple = ()
        c: float = field(default=0.0, compare=False)
        d: str = field(default="x", repr=False)
        e: int = field(default=0, hash=False)

    @record(slots=slots)
    class Ref2:
        a: int
        b: tuple = ()
        c: float = field(default=0.0, compare=False)
        d: str = field(default="x", repr=False)
        e: int = field(default=0, hash=False)

    return Ref, Ref2


@record(slots=True)
class Slotted:
    a: int
    b: tuple = ()


@record
class Node:
    name: str
    child: list = field(default_factory=list)


@pytest.mark.parametrize("slots", [False, True])
def test_record_behaves_as_a_frozen_dataclass(slots):
    ref, ours = _pair(slots)
    cases = [(1, (2,), 0.5, "y", 3), (1, (2,), 0.7, "y", 3), (1, (2,), 0.5, "z", 3), (1, (2,), 0.5, "y", 4), (2, (), 0, "x", 0)]
    for x in cases:
        for y in cases:
            assert (ours(*x) == ours(*y)) == (ref(*x) == ref(*y))
            assert (ours(*x) != ours(*y)) == (ref(*x) != ref(*y))
        assert hash(ours(*x)) == hash(ref(*x))
        assert repr(ours(*x)).split("(", 1)[1] == repr(ref(*x)).split("(", 1)[1]
        assert repr(ours(*x)).startswith("_pair.<locals>.Ref2(")
    assert ours(1) != ref(1) and ours(1).__eq__(ref(1)) is NotImplemented
    with pytest.raises(dataclasses.FrozenInstanceError):
        ours(1).a = 2
    assert dataclasses.replace(ours(1), a=5) == ours(5)
    assert dataclasses.asdict(ours(1, (3,))) == dataclasses.asdict(ref(1, (3,)))
    assert ours.__match_args__ == ref.__match_args__
    assert hasattr(ours(1), "__dict__") is (not slots)


@pytest.mark.parametrize("slots", [False, True])
def test_record_binds_arguments_as_a_frozen_dataclass(slots):
    ref, ours = _pair(slots)
    for args, kwargs in (((1,), {}), ((), {"a": 1, "e": 4}), ((1, (2,)), {"d": "q"}), ((1, (), 0.5, "y", 3), {})):
        r, o = ref(*args, **kwargs), ours(*args, **kwargs)
        assert dataclasses.astuple(o) == dataclasses.astuple(r)
    for args, kwargs in (((), {}), ((1,), {"a": 2}), ((1,), {"z": 2}), ((1, (), 0.5, "y", 3, 9), {})):
        with pytest.raises(TypeError):
            ref(*args, **kwargs)
        with pytest.raises(TypeError):
            ours(*args, **kwargs)
    with pytest.raises(dataclasses.FrozenInstanceError):
        del ours(1).a
    assert Node("a").child is not Node("b").child      # a fresh default per instance, as default_factory


def test_record_pickles_and_guards_recursion():
    for p in (Slotted(4, ("w",)), Node("m", [1])):
        assert pickle.loads(pickle.dumps(p)) == p
    n = Node("n")
    n.child.append(n)
    assert repr(n) == "Node(name='n', child=[...])"


def test_a_method_the_class_defines_is_kept():
    @record
    class Own:
        a: int

        def __repr__(self) -> str:
            return "own"

        def __eq__(self, other):
            return True

    assert repr(Own(1)) == "own" and Own(1) == Own(2)
    assert hash(Own(1)) == hash(Own(1))  # as dataclasses: __eq__ alone still gets the fields' hash
