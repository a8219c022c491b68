"""Typed records the search stages pass to each other: kind codes, failure flags, and arrays over rows.

A row is one candidate (a core choice and one wire option per winding). The vector stage works on
numpy arrays over rows; these frozen records name every array instead of string-keyed dicts, and the
kind codes are an ``IntEnum`` per domain, each kept in its own typed field (a former's kind and a wire's
kind never share a key). Their values are the kernel's codes, which the kernel's arrays carry.
"""

from __future__ import annotations

from dataclasses import dataclass, fields, is_dataclass
from enum import IntEnum, IntFlag
from typing import Any, TypeVar

import numpy as np
from numpy.typing import NDArray

from ..design import kernel as K

FloatArray = NDArray[np.float64]
IntArray = NDArray[np.int64]
BoolArray = NDArray[np.bool_]
CodeArray = NDArray[np.int8]


class FormerKind(IntEnum):
    """What the winding is laid on; the values are the kernel's codes (``kernel.FORMER_CODE``)."""
    RECT = K.FORMER_CODE["rect"]        # rectangular bobbin tube
    ROUND = K.FORMER_CODE["round"]      # round bobbin tube
    TOROID = K.FORMER_CODE["toroid"]    # no bobbin: the toroid itself

    @classmethod
    def of(cls, name: str) -> FormerKind:
        return cls(K.FORMER_CODE[name])


class WireKind(IntEnum):
    """The catalogue's wire kinds; the values are the kernel's codes (``kernel.WIRE_CODE``)."""
    ROUND = K.WIRE_CODE["round"]
    LITZ = K.WIRE_CODE["litz"]
    TIW = K.WIRE_CODE["tiw"]            # triple-insulated
    FOIL = K.WIRE_CODE["foil"]
    STRIP = K.WIRE_CODE["strip"]

    @classmethod
    def of(cls, name: str) -> WireKind:
        return cls(K.WIRE_CODE.get(name, K.WIRE_CODE["round"]))


class Fail(IntFlag):
    """Why a row is not feasible (bits; a row may fail for several reasons)."""
    WINDOW = 1 << 0    # area-product screen (core choices only)
    PINS = 1 << 1
    GAP = 1 << 2       # powder rolls off faster than turns add
    FIT = 1 << 3
    SAT = 1 << 4
    HOT = 1 << 5
    RISE = 1 << 6
    CLASS = 1 << 7
    MASS = 1 << 8
    SIZE = 1 << 9
    INDUCTANCE = 1 << 10
    ENGINE = 1 << 20   # the design engine refused or failed the candidate


REASONS: dict[Fail, str] = {
    Fail.WINDOW: "too small a window", Fail.PINS: "too few pins on the bobbin",
    Fail.GAP: "cannot reach the inductance", Fail.FIT: "does not fit", Fail.SAT: "saturates", Fail.HOT: "too hot",
    Fail.RISE: "rises more than allowed", Fail.CLASS: "runs hotter than a wire or bobbin class",
    Fail.MASS: "too heavy", Fail.SIZE: "too large", Fail.INDUCTANCE: "inductance short",
    Fail.ENGINE: "refused by the design engine",
}
# how the report groups the flags for a family that has no feasible member
REASON_GROUPS: tuple[tuple[str, Fail], ...] = (
    ("too small a window", Fail.WINDOW), ("too few pins on the bobbin", Fail.PINS),
    ("cannot reach the inductance", Fail.GAP | Fail.INDUCTANCE), ("does not fit", Fail.FIT),
    ("saturates", Fail.SAT), ("too hot", Fail.HOT | Fail.CLASS | Fail.RISE), ("too heavy", Fail.MASS),
    ("too large", Fail.SIZE), ("refused by the design engine", Fail.ENGINE))


def flag(cond: Any, bit: Fail) -> IntArray:
    """``bit`` where ``cond`` holds, else 0 (an int64 array)."""
    out: IntArray = np.where(cond, np.int64(bit), np.int64(0)).astype(np.int64)
    return out


# ------------------------------------------------------------------------------------------------ row arrays

R = TypeVar("R", bound="RowArrays")


_FIELD_NAMES: dict[type, tuple[str, ...] | None] = {}


def _record_fields(value: Any) -> tuple[str, ...] | None:
    """The field names of a dataclass record (cached per type: the vector stage takes rows thousands of times),
    None for anything else."""
    cls = type(value)
    names = _FIELD_NAMES.get(cls, ())
    if names == ():
        names = tuple(f.name for f in fields(value)) if is_dataclass(value) and not isinstance(value, type) else None
        _FIELD_NAMES[cls] = names
    return names


def _take(value: Any, idx: Any) -> Any:
    if isinstance(value, np.ndarray):
        return value[..., idx]
    if isinstance(value, RowArrays):
        return value.take(idx)
    names = _record_fields(value)
    if names is not None:      # the kernel's records of arrays
        return type(value)(*[_take(getattr(value, n), idx) for n in names])     # fields in order
    if isinstance(value, tuple):
        return tuple(_take(v, idx) for v in value)
    return value


def _put(value: Any, idx: Any, sub: Any) -> None:
    if isinstance(value, np.ndarray):
        value[..., idx] = sub
    elif isinstance(value, RowArrays):
        value.put(idx, sub)
    elif (names := _record_fields(value)) is not None:
        for n in names:
            _put(getattr(value, n), idx, getattr(sub, n))
    elif isinstance(value, tuple):
        for v, s in zip(value, sub):
            _put(v, idx, s)


class RowArrays:
    """A record of arrays whose last axis runs over rows: ``take`` picks rows, ``put`` writes them back."""

    __slots__ = ()

    def take(self: R, idx: Any) -> R:
        return type(self)(**{n: _take(getattr(self, n), idx) for n in _record_fields(self) or ()})

    def put(self, idx: Any, sub: RowArrays) -> None:
        for n in _record_fields(self) or ():
            _put(getattr(self, n), idx, getattr(sub, n))


@dataclass(frozen=True, slots=True)
class OptionRows(RowArrays):
    """One winding's wire option per row (or per option of a winding's option table): the kernel's wire
    geometry, and what the search adds for class, cost and mass."""
    geometry: K.WireGeometry     # arrays; kind in WireKind codes
    class_c: FloatArray
    price_per_kg: FloatArray     # x (1 + the shop's wire scrap)
    mass_per_m_kg: FloatArray
    copper: BoolArray            # copper (else aluminium)

    @property
    def kind(self) -> CodeArray:
        return np.asarray(self.geometry.kind)

    @property
    def size(self) -> int:
        return int(np.asarray(self.geometry.kind).shape[0])


@dataclass(frozen=True, slots=True)
class SectionRows(RowArrays):
    """A wound section per row (the engine's ``SectionBuild``, reduced to what the search reads)."""
    ok: BoolArray            # the turns could be laid
    turns_per_layer: FloatArray  # first layer's capacity
    layers: FloatArray
    last_turns: FloatArray   # turns in the last layer
    end_build_m: FloatArray  # build after the last layer
    length_m: FloatArray     # copper, without leads
    usable_m: FloatArray     # usable breadth, or the first layer's circumference (toroid)
    start_m: FloatArray      # build where the section starts


@dataclass(frozen=True, slots=True)
class BuildRows(RowArrays):
    """Every winding laid in build order, per row."""
    sections: tuple[SectionRows, ...]
    height_m: FloatArray
    ok: BoolArray
    fits: BoolArray
    fits_slack: BoolArray
    fill: FloatArray         # bulged height / available


@dataclass(frozen=True, slots=True)
class ChokeMagnetics(RowArrays):
    """Turns, gap, inductance, flux and ripple core loss density of a choke per row."""
    turns: FloatArray
    gap_m: FloatArray
    inductance_h: FloatArray
    b_pk_t: FloatArray       # at the operating peak current
    b_max_t: FloatArray      # at the largest peak current
    delta_b_t: FloatArray    # peak-to-peak ripple flux
    core_loss_w_m3: FloatArray


@dataclass(frozen=True, slots=True)
class RowResult(RowArrays):
    """The vector stage's numbers per row; per-winding arrays are (windings, rows)."""
    flags: IntArray          # Fail bits, strict
    flags_slack: IntArray    # Fail bits with the fit and temperature slack
    total_w: FloatArray
    copper_w: FloatArray
    core_w: FloatArray
    hot_c: FloatArray
    rise_k: FloatArray
    fill: FloatArray
    mass_kg: FloatArray
    cost: FloatArray         # wire + core + bobbin (float estimate; the engine's Designs give the Decimal)
    size_m3: FloatArray
    primary_turns: FloatArray
    b_pk_max_t: FloatArray
    b_limit_t: FloatArray
    turns: FloatArray        # (windings, rows)
    length_m: FloatArray     # (windings, rows), with leads
    fr: FloatArray           # (windings, rows)
    gap_m: FloatArray        # choke; 0 for a transformer

    @classmethod
    def unevaluated(cls, rows: int, windings: int, flags: IntArray, fill: FloatArray,
                    primary_turns: FloatArray) -> RowResult:
        """Rows that failed before evaluation: infinite losses and temperatures, no flux."""
        inf = np.full(rows, np.inf)
        win = np.full((windings, rows), np.inf)
        return cls(flags=flags, flags_slack=flags.copy(), total_w=inf.copy(), copper_w=inf.copy(),
                   core_w=inf.copy(), hot_c=inf.copy(), rise_k=inf.copy(), fill=fill, mass_kg=inf.copy(),
                   cost=inf.copy(), size_m3=inf.copy(), primary_turns=primary_turns, b_pk_max_t=np.zeros(rows),
                   b_limit_t=np.ones(rows), turns=win.copy(), length_m=win.copy(), fr=win.copy(),
                   gap_m=np.zeros(rows))

    def merge(self, idx: IntArray, sub: RowResult, take: BoolArray) -> None:
        """Write ``sub``'s rows where ``take`` into this result's rows ``idx``."""
        self.put(idx[take], sub.take(np.flatnonzero(take)))


@dataclass(frozen=True, slots=True)
class VectorStage:
    """Every row of a search with its numbers: core choice index, option index per group, result."""
    core_index: IntArray
    option_index: tuple[IntArray, ...]   # per option group
    result: RowResult

    @property
    def rows(self) -> int:
        return int(self.core_index.size)
