"""Kernel: laying the wire. A wire as the build reads it, the turn length, a layer's capacity and the
sections laid as rows (the bobbin in closed form, the toroid layer by layer); re-exported by ``kernel``."""

from __future__ import annotations

import math
from collections.abc import Sequence
from typing import TYPE_CHECKING, Any

import numpy as np
import numpy.typing as npt

from ..physics import geometry
from ..physics._types import Arr, ArrayLike
from ..physics._types import all_scalar as _scalar
from ..physics._types import as_array as _f
from ..physics._types import out as _out
from ..records import record

if TYPE_CHECKING:
    from ..catalog.models import Wire

FORMER_CODE = {"rect": 0, "round": 1, "toroid": 2}
WIRE_CODE = {"round": 0, "litz": 1, "tiw": 2, "foil": 3, "strip": 4}
_TOROID = FORMER_CODE["toroid"]
_FORMER_NAME = {code: name for name, code in FORMER_CODE.items()}


@record(slots=True)
class WireGeometry:
    """What the build and the AC factor read of a wire with its strands in hand (floats, or arrays for rows)."""
    kind: Any                     # WIRE_CODE (int, or an int array)
    strand_diameter_m: Arr        # bare strand (round, litz, tiw)
    strand_overall_m: Arr         # insulated strand (litz porosity)
    thickness_m: Arr              # foil, strip
    width_m: Arr
    strands_in_hand: Arr
    sub_layers: Arr               # Litz: strand layers per bundle layer, round(sqrt(strands)); else 1
    copper_area_m2: Arr           # all strands in hand
    pitch_m: Arr                  # along the layer per turn
    layer_height_m: Arr
    one_turn_per_layer: Any       # bool (foil), or a bool array
    bundle_strands: Arr = 1.0     # Litz: strands in one bundle (the catalogue's count); else 1


def section_turns(total: int, shares: Sequence[float]) -> tuple[int, ...]:
    """A winding's turns shared among its sections in proportion to ``shares`` (equal shares: N // n each,
    sections 1 .. N mod n one more), whole turns by the largest remainder (ties to the earlier section),
    each section at least one turn where the total allows."""
    n = len(shares)
    whole = sum(shares)
    exact = [total * x / whole for x in shares]
    base = [max(1, math.floor(e + 1e-9)) if total >= n else math.floor(e + 1e-9) for e in exact]
    left = total - sum(base)
    order = sorted(range(n), key=lambda k: (-(exact[k] - base[k]), k))
    for k in order[:max(left, 0)]:
        base[k] += 1
    for k in sorted(range(n), key=lambda k: (exact[k] - base[k], -k))[:max(-left, 0)]:
        base[k] -= 1          # the floor of one turn took too many: back from the most over-served
    return tuple(base)


def pitch_and_height(wire: Wire, strands: int) -> tuple[float, float, bool]:
    """(pitch along the layer, layer height, one turn per layer) of a wire with ``strands`` in hand side by
    side: foil is one full-width turn per layer; strip and round wire lie side by side."""
    if wire.kind == "foil":
        return wire.width_m, wire.thickness_m, True
    if wire.kind == "strip":
        return wire.overall_width_m * strands, wire.overall_thickness_m, False
    return wire.overall_diameter_m * strands, wire.overall_diameter_m, False


def wire_geometry(wire: Wire, strands: int) -> WireGeometry:
    """A catalogue wire with its strands in hand as the kernel reads it (scalar)."""
    pitch, height, foil = pitch_and_height(wire, strands)
    k = max(1, int(round(math.sqrt(wire.strands)))) if wire.kind == "litz" else 1
    return WireGeometry(kind=WIRE_CODE.get(wire.kind, 0), strand_diameter_m=wire.strand_diameter_m,
                        strand_overall_m=wire.strand_overall_m or wire.overall_diameter_m,
                        thickness_m=wire.thickness_m, width_m=wire.width_m, strands_in_hand=float(strands),
                        sub_layers=float(k), copper_area_m2=wire.copper_area_m2 * strands, pitch_m=pitch,
                        layer_height_m=height, one_turn_per_layer=foil,
                        bundle_strands=float(wire.strands) if wire.kind == "litz" else 1.0)


def stack_wires(geometries: Sequence[WireGeometry]) -> WireGeometry:
    """Rows of wire geometries as one record of arrays (for the search's option tables)."""
    def col(name: str, dtype: Any = float) -> Any:
        return np.array([getattr(g, name) for g in geometries], dtype=dtype)
    return WireGeometry(kind=col("kind", np.int8), strand_diameter_m=col("strand_diameter_m"),
                        strand_overall_m=col("strand_overall_m"), thickness_m=col("thickness_m"),
                        width_m=col("width_m"), strands_in_hand=col("strands_in_hand"), sub_layers=col("sub_layers"),
                        copper_area_m2=col("copper_area_m2"), pitch_m=col("pitch_m"),
                        layer_height_m=col("layer_height_m"), one_turn_per_layer=col("one_turn_per_layer", bool),
                        bundle_strands=col("bundle_strands"))


def mean_turn_length_m(former_kind: Any, centre_m: ArrayLike, *, tube_width_m: ArrayLike = 0.0,
                       tube_depth_m: ArrayLike = 0.0, od_m: ArrayLike = 0.0, id_m: ArrayLike = 0.0,
                       core_height_m: ArrayLike = 0.0) -> Arr:
    """Mean length of a turn whose centre line is ``centre_m`` out from the former: an offset rectangle
    (rect tube), a circle (round tube) or the toroid's section perimeter grown by the build
    (``physics.geometry``). ``former_kind``: 'rect' | 'round' | 'toroid' or FORMER_CODE values per row."""
    if isinstance(former_kind, str):
        if former_kind == "rect":
            return _out(geometry.mlt_rect_m(tube_width_m, tube_depth_m, centre_m))
        if former_kind == "round":
            return _out(geometry.mlt_round_m(tube_width_m, centre_m))
        return _out(geometry.toroid_turn_length_m(od_m, id_m, core_height_m, centre_m))
    code = np.asarray(former_kind)
    if code.size and code.min() == code.max():       # one shape for every row: its formula alone
        one = mean_turn_length_m(_FORMER_NAME[int(code.flat[0])], centre_m, tube_width_m=tube_width_m,
                                 tube_depth_m=tube_depth_m, od_m=od_m, id_m=id_m, core_height_m=core_height_m)
        if np.shape(one) == code.shape:      # (np.broadcast_shapes costs more than the formula)
            return one
        return _full(one, np.broadcast_shapes(code.shape, np.shape(centre_m), np.shape(tube_width_m),
                                              np.shape(tube_depth_m), np.shape(od_m), np.shape(id_m),
                                              np.shape(core_height_m)))
    is_rect, is_round = code == 0, code == 1     # only the formulas of the shapes present; np.where picks per row
    rect: Any = geometry.mlt_rect_m(tube_width_m, tube_depth_m, centre_m) if is_rect.any() else 0.0
    rnd: Any = geometry.mlt_round_m(tube_width_m, centre_m) if is_round.any() else 0.0
    tor: Any = 0.0
    if not (is_rect | is_round).all():
        with np.errstate(invalid="ignore", divide="ignore"):
            tor = geometry.toroid_turn_length_m(od_m, id_m, core_height_m, centre_m)
    return _out(np.where(is_rect, rect, np.where(is_round, rnd, tor)))


def _full(x: Any, shape: tuple[int, ...]) -> Arr:
    """``x`` as the broadcast result would be: a float for 0-d, else an array of ``shape``."""
    a = _f(x)
    if a.shape != shape:
        a = np.array(np.broadcast_to(a, shape))
    return _out(a)


def layer_centre_m(start_m: Arr, index: Arr, layer_height_m: Arr, layer_tape_m: Arr) -> Arr:
    """Build from the former to the centre line of layer ``index`` (0-based) of a section starting at
    ``start_m``: each layer its height, the layer tape between layers. (Plain arithmetic: floats stay floats,
    arrays broadcast.)"""
    return start_m + index * (layer_height_m + layer_tape_m) + layer_height_m / 2.0


def layer_capacity(former_kind: Any, pitch_m: ArrayLike, usable_m: ArrayLike, id_m: ArrayLike, centre_m: ArrayLike,
                   one_turn_per_layer: Any = False) -> tuple[Arr, Arr]:
    """(turns one layer holds, room along it [m]). Bobbin: floor(usable breadth / pitch) (1e-9 slack),
    foil one turn if it fits the breadth; room = the usable breadth. Toroid: the wire's centre line runs on
    the layer's inner face, so the layer holds floor(pi (ID - 2 centre) / pitch) and room is that
    circumference. ``former_kind``: a name (one former, floats) or FORMER_CODE per row."""
    if isinstance(former_kind, str) and _scalar(pitch_m, usable_m, id_m, centre_m, one_turn_per_layer):
        # one former, one layer (the engine's layer-by-layer build): the same rule without array overhead
        p1 = float(np.asarray(pitch_m))
        if former_kind == "toroid":
            c1 = float(geometry.toroid_inner_circumference_m(id_m, centre_m))
            return float(max(math.floor(c1 / p1 + 1e-9), 0)), c1
        u1 = float(np.asarray(usable_m))
        if one_turn_per_layer:
            return (1.0 if p1 <= u1 + 1e-12 else 0.0), u1
        return (float(math.floor(u1 / p1 + 1e-9)) if u1 > 0 else 0.0), u1
    pitch, usable = _f(pitch_m), _f(usable_m)
    code = FORMER_CODE[former_kind] if isinstance(former_kind, str) else np.asarray(former_kind)
    tor = np.asarray(code) == _TOROID
    any_tor = bool(tor.any())
    with np.errstate(divide="ignore", invalid="ignore"):
        if not tor.all():               # the bobbin rule, where a row is on a bobbin
            flat = np.where(usable > 0, np.floor(usable / pitch + 1e-9), 0.0)
            flat = np.where(one_turn_per_layer, np.where(pitch <= usable + 1e-12, 1.0, 0.0), flat)
            if not any_tor:
                return _out(flat), _out(usable)
        circ = _f(geometry.toroid_inner_circumference_m(id_m, centre_m))
        ring = np.maximum(np.floor(circ / pitch + 1e-9), 0.0)
        if tor.all():
            if tor.ndim == usable.ndim == np.ndim(one_turn_per_layer) == 0:     # the toroid's figures as they are
                return _out(ring), _out(circ)
            shape = np.broadcast_shapes(ring.shape, tor.shape, usable.shape, np.shape(one_turn_per_layer))
            return _full(ring, shape), _full(circ, shape)
    return _out(np.where(tor, ring, flat)), _out(np.where(tor, circ, usable))


@record(slots=True)
class FormerArrays:
    """Formers as rows: kind (FORMER_CODE int array) and their dimensions [m]."""
    kind: npt.NDArray[np.int8]
    tube_width_m: npt.NDArray[np.float64]
    tube_depth_m: npt.NDArray[np.float64]
    breadth_m: npt.NDArray[np.float64]
    od_m: npt.NDArray[np.float64]
    id_m: npt.NDArray[np.float64]
    core_height_m: npt.NDArray[np.float64]

    def take(self, idx: Any) -> FormerArrays:
        return FormerArrays(self.kind[idx], self.tube_width_m[idx], self.tube_depth_m[idx], self.breadth_m[idx],
                            self.od_m[idx], self.id_m[idx], self.core_height_m[idx])


@record(slots=True)
class SectionWinding:
    """Sections laid as rows (``wind_section``): ok, first-layer capacity, layers, turns in the last layer,
    build after the last layer, copper length without leads, usable breadth (toroid: first circumference)."""
    ok: npt.NDArray[np.bool_]
    turns_per_layer: npt.NDArray[np.float64]
    layers: npt.NDArray[np.float64]
    last_layer_turns: npt.NDArray[np.float64]
    end_build_m: npt.NDArray[np.float64]
    copper_length_m: npt.NDArray[np.float64]
    usable_breadth_m: npt.NDArray[np.float64]


@record(slots=True)
class _Rows:
    """``wind_section``'s per-row inputs, each broadcast to one value per row."""
    turns: npt.NDArray[np.float64]
    pitch: npt.NDArray[np.float64]
    lh: npt.NDArray[np.float64]             # layer height
    start: npt.NDArray[np.float64]
    layer_tape: npt.NDArray[np.float64]
    foil: npt.NDArray[np.bool_]             # one turn per layer
    limit: npt.NDArray[np.float64] | None   # the build a toroid row may reach


_TOROID_BINS = (4, 16, 64, 256, 1024)
_TOROID_BLOCKS = (1,) + _TOROID_BINS        # toroid layers are laid in blocks of columns ending here


def wind_section(former: FormerArrays, turns: ArrayLike, pitch_m: ArrayLike, layer_height_m: ArrayLike,
                 start_m: ArrayLike, margin_m: ArrayLike, layer_tape_m: ArrayLike, one_turn_per_layer: ArrayLike,
                 limit_m: ArrayLike | None = None) -> SectionWinding:
    """Lay one section per row from ``start_m`` outwards (``layer_tape_m`` already x the tape factor).

    Bobbin: every full layer holds the same ``layer_capacity`` and the MLT is affine in the build, so the
    layers' copper is their count times the MLT at their mean centre (closed form). Toroid: each layer's
    capacity shrinks with the hole; layers are laid as a rows x layers matrix (cumulative capacity against
    the turns), at most as many as fit below ``limit_m`` (rows needing more are not ok), and a layer that
    holds no turn ends the section (not ok). The engine's ``build.wind_section`` lays the same layers one
    by one with the same ``layer_centre_m``, ``layer_capacity`` and ``mean_turn_length_m``."""
    t_all = np.atleast_1d(_f(turns))
    n = t_all.shape[0]

    def row(x: ArrayLike) -> npt.NDArray[np.float64]:
        return np.broadcast_to(_f(x), (n,)).astype(float)
    pitch, lh, start, margin, lt = row(pitch_m), row(layer_height_m), row(start_m), row(margin_m), row(layer_tape_m)
    foil = np.broadcast_to(np.asarray(one_turn_per_layer, dtype=bool), (n,))
    out = {k: np.zeros(n) for k in ("cap", "layers", "last", "end", "length", "usable")}
    ok_all = np.zeros(n, dtype=bool)
    kind = former.kind
    bob = np.flatnonzero(kind != _TOROID)
    if bob.size:
        usable = former.breadth_m[bob] - 2.0 * margin[bob]
        cap, _room = layer_capacity(kind[bob], pitch[bob], usable, 0.0, 0.0, foil[bob])
        cap = _f(cap)
        t = t_all[bob]
        ok = (cap >= 1) & (t > 0)
        capc = np.maximum(cap, 1.0)
        layers = np.ceil(t / capc)
        last = t - (layers - 1.0) * capc
        s0, h, tape = start[bob], lh[bob], lt[bob]
        c_last = _f(layer_centre_m(s0, layers - 1.0, h, tape))
        c_mean = s0 + h / 2.0 + (h + tape) * (layers - 2.0) / 2.0

        def mlt(c: npt.NDArray[np.float64]) -> npt.NDArray[np.float64]:
            return _f(mean_turn_length_m(kind[bob], c, tube_width_m=former.tube_width_m[bob],
                                         tube_depth_m=former.tube_depth_m[bob]))

        out["length"][bob] = capc * (layers - 1.0) * mlt(c_mean) + last * mlt(c_last)
        out["end"][bob] = s0 + layers * h + (layers - 1.0) * tape
        out["cap"][bob], out["layers"][bob], out["last"][bob] = cap, layers, last
        out["usable"][bob], ok_all[bob] = usable, ok
    tor = np.flatnonzero(kind == _TOROID)
    if tor.size:
        rows = _Rows(t_all, pitch, lh, start, lt, foil, None if limit_m is None else row(limit_m))
        _wind_toroid(former, tor, rows, out, ok_all)
    return SectionWinding(ok=ok_all, turns_per_layer=out["cap"], layers=out["layers"], last_layer_turns=out["last"],
                          end_build_m=out["end"], copper_length_m=out["length"], usable_breadth_m=out["usable"])


def _toroid_layer_bound(fm: FormerArrays, tor: npt.NDArray[np.intp], rows: _Rows) -> npt.NDArray[np.float64]:
    """The most layers a toroid row may lay: as many as fit below ``limit``, and no more than its turns over
    the smallest capacity an allowed layer has."""
    turns, pitch, lh, start, layer_tape, limit = rows.turns, rows.pitch, rows.lh, rows.start, rows.layer_tape, rows.limit
    if limit is None:
        return np.full(tor.size, float(_TOROID_BINS[-1]))
    step = lh[tor] + layer_tape[tor]
    lmax = np.floor((limit[tor] - start[tor] + layer_tape[tor]) / step + 1e-9)
    top = _f(layer_centre_m(start[tor], np.maximum(lmax, 1.0) - 1.0, lh[tor], layer_tape[tor]))
    cap_min = np.floor(_f(geometry.toroid_inner_circumference_m(fm.id_m[tor], top)) / pitch[tor] + 1e-9)
    need = np.where(cap_min >= 1, np.ceil(turns[tor] / np.maximum(cap_min, 1.0)), lmax)
    return np.clip(np.minimum(lmax, need), 1.0, _TOROID_BINS[-1])


def _wind_toroid(fm: FormerArrays, tor: npt.NDArray[np.intp], rows: _Rows, out: dict[str, npt.NDArray[np.float64]],
                 ok_out: npt.NDArray[np.bool_]) -> None:
    """Toroid rows layer by layer: layers are laid in blocks of columns (``_TOROID_BLOCKS``), each block only for
    the rows that have not yet held all their turns, so a row costs about the layers it needs. The copper
    length is summed layer after layer (as the engine's build does)."""
    lmax = _toroid_layer_bound(fm, tor, rows)
    turns, pitch, lh, start, layer_tape, foil = rows.turns, rows.pitch, rows.lh, rows.start, rows.layer_tape, rows.foil
    t = turns[tor]
    n = tor.size
    length = np.zeros(n)
    layers = np.ones(n)
    last = t.copy()                          # turns in the last layer (all of them where none holds them)
    ok = np.zeros(n, dtype=bool)
    cap0 = np.zeros(n)
    circ0 = np.zeros(n)
    tl0 = np.zeros(n)
    pos = np.flatnonzero((t > 0) & ~foil[tor])       # rows still laying layers (positions in tor)
    # the rows' figures, kept compact: rows that stop are dropped after each block
    r = tor[pos]
    tg, lm, held, acc = t[pos], lmax[pos], np.zeros(pos.size), np.zeros(pos.size)
    s0, h, tape, pg = start[r][:, None], lh[r][:, None], layer_tape[r][:, None], pitch[r][:, None]
    idm, odm, hm = fm.id_m[r][:, None], fm.od_m[r][:, None], fm.core_height_m[r][:, None]
    lo = 0
    for hi in _TOROID_BLOCKS:
        if not pos.size:
            break
        width = int(min(hi, lm.max())) - lo
        if width <= 0:
            break
        j = np.arange(lo, lo + width, dtype=float)[None, :]
        centre = _f(layer_centre_m(s0, j, h, tape))
        cap, circ = layer_capacity("toroid", pg, 0.0, idm, centre)
        cap = np.where(j < lm[:, None], _f(cap), 0.0)
        dead = np.cumsum(cap < 1, axis=1) > 0     # a layer holding no turn ends the section
        cap = np.where(dead, 0.0, cap)
        tl = _f(mean_turn_length_m("toroid", centre, od_m=odm, id_m=idm, core_height_m=hm))
        if lo == 0:
            cap0[pos], circ0[pos], tl0[pos] = cap[:, 0], _f(circ)[:, 0], tl[:, 0]
        cum = held[:, None] + np.cumsum(cap, axis=1)
        reach = cum >= tg[:, None]
        done = reach[:, -1]
        first = np.argmax(reach, axis=1)
        ri = np.arange(pos.size)
        before = np.where(first > 0, cum[ri, np.maximum(first - 1, 0)], held)
        # turns in each layer of the block: full layers before the one that holds the last turn, that one
        # its remainder; rows not done yet lay every layer of the block full
        nturn = np.where(j - lo < np.where(done, first, width)[:, None], cap, 0.0)
        nturn[ri[done], first[done]] = (tg - before)[done]
        for col in range(width):
            acc = acc + nturn[:, col] * tl[:, col]
        held = cum[:, -1]
        # capacities only shrink towards the hole: a row the allowed layers left cannot complete at the last
        # layer's capacity never holds its turns (reported like any such row, from its first layer)
        short = held + cap[:, -1] * (lm - lo - width) < tg
        stop = done | dead[:, -1] | (lo + width >= lm) | short
        fin = pos[done]
        length[fin], layers[fin], last[fin], ok[fin] = acc[done], lo + first[done] + 1.0, (tg - before)[done], True
        keep = ~stop
        pos, tg, lm, held, acc = pos[keep], tg[keep], lm[keep], held[keep], acc[keep]
        s0, h, tape, pg, idm, odm, hm = (x[keep] for x in (s0, h, tape, pg, idm, odm, hm))
        lo += width
    # rows that never held their turns: reported as one layer of all the turns (not ok)
    bad = ~ok
    layers[bad] = 1.0
    length[bad] = t[bad] * tl0[bad]
    first_layer = np.flatnonzero(bad & ((t <= 0) | foil[tor]))
    if first_layer.size:       # never laid above: the first layer's figures for the report
        r = tor[first_layer]
        c0 = _f(layer_centre_m(start[r], 0.0, lh[r], layer_tape[r]))
        cp, cc = layer_capacity("toroid", pitch[r], 0.0, fm.id_m[r], c0)
        cap0[first_layer], circ0[first_layer] = _f(cp), _f(cc)
        length[first_layer] = t[first_layer] * _f(mean_turn_length_m(
            "toroid", c0, od_m=fm.od_m[r], id_m=fm.id_m[r], core_height_m=fm.core_height_m[r]))
    out["length"][tor] = length
    out["end"][tor] = start[tor] + layers * lh[tor] + (layers - 1.0) * layer_tape[tor]
    out["layers"][tor], out["last"][tor] = layers, last
    out["cap"][tor], out["usable"][tor], ok_out[tor] = cap0, circ0, ok
