"""Kernel: the copper's resistance. DC resistance, skin depth, the current's harmonics, Dowell's AC factor of
a layer and of a section, copper loss; re-exported by ``kernel``."""

from __future__ import annotations

import math
from collections.abc import Sequence
from typing import Any

import numpy as np
import numpy.typing as npt

from ..physics import dowell
from ..physics import litz as litzmod
from ..physics import wire as wiremod
from ..physics._types import Arr, ArrayLike
from ..physics._types import as_array as _f
from ..physics._types import out as _out
from ..physics.layers import layer_fr
from ..records import record
from .kernel_winding import WIRE_CODE, WireGeometry
from .limits import SQUARE_HARMONICS


def dc_resistance_ohm(copper_area_m2: ArrayLike, length_m: ArrayLike, temp_c: ArrayLike,
                      conductor: str | Sequence[str] | npt.NDArray[np.str_] = "copper") -> Arr:
    """DC resistance R = rho(T) l / A of a winding's copper at a temperature (IEC 60028 / IEC 60889).

    ``conductor``: one name for every row, or a name per row ('copper', 'aluminium')."""
    if isinstance(conductor, str):
        return _out(_f(wiremod.resistance_per_m_ohm(copper_area_m2, temp_c, conductor)) * _f(length_m))
    names = np.asarray(conductor)
    out = np.zeros(np.broadcast_shapes(names.shape, np.shape(copper_area_m2), np.shape(length_m), np.shape(temp_c)))
    for name in np.unique(names):
        sel = np.broadcast_to(names == name, out.shape)
        r = _f(wiremod.resistance_per_m_ohm(copper_area_m2, temp_c, str(name))) * _f(length_m)
        out = np.where(sel, np.broadcast_to(r, out.shape), out)
    return out


def skin_depth_m(freq_hz: ArrayLike, temp_c: ArrayLike, conductor: str = "copper") -> Arr:
    """Skin depth in the conductor at its temperature (``physics.wire.skin_depth_m``); infinite at DC."""
    return _out(wiremod.skin_depth_m(freq_hz, wiremod.resistivity_ohm_m(temp_c, conductor)))


@record(slots=True)
class Harmonics:
    """Harmonic orders of a current and their share of its loss (weights sum to 1)."""
    orders: npt.NDArray[np.float64]
    weights: npt.NDArray[np.float64]


def current_harmonics(waveform: str) -> Harmonics:
    """A square-wave current's odd harmonics weighted 1/n^2 (its power spectrum, SQUARE_HARMONICS); any other
    waveform: the fundamental alone."""
    orders = np.array(SQUARE_HARMONICS if waveform == "square" else (1,), dtype=float)
    w = 1.0 / orders ** 2
    return Harmonics(orders, w / w.sum())


def _layer_porosity(wire: WireGeometry, turns_in_layer: Any, usable_m: Any) -> npt.NDArray[np.float64]:
    """Copper fraction across a layer, Dowell's eta: round/tiw turns x strands x d over the usable breadth;
    Litz at strand level, the strands across the breadth in one of the bundle layer's strand layers
    (turns x bundles in hand x strands per bundle / strand layers) x strand d over the usable breadth, so a
    layer the bundles cover only in part has the porosity of the strands it holds; foil its width over the
    breadth; strip like round."""
    usable = _f(usable_m)
    room = np.maximum(usable, 1e-9)

    def litz() -> Any:
        across = _f(turns_in_layer) * _f(wire.strands_in_hand) * _f(wire.bundle_strands) / _f(wire.sub_layers)
        return np.minimum(1.0, across * _f(wire.strand_diameter_m) / room)

    def foil() -> Any:
        return np.minimum(1.0, _f(wire.width_m) / np.maximum(usable, _f(wire.width_m)))

    def side_by_side(size: Arr) -> Any:
        return np.minimum(1.0, _f(turns_in_layer) * _f(wire.strands_in_hand) * _f(size) / room)

    if np.ndim(wire.kind) == 0:         # one wire (the engine): only its own rule
        kind = int(wire.kind)
        if kind == WIRE_CODE["litz"]:
            return _f(litz())
        if kind == WIRE_CODE["foil"]:
            return _f(foil())
        return _f(side_by_side(wire.width_m if kind == WIRE_CODE["strip"] else wire.strand_diameter_m))
    kinds = np.asarray(wire.kind)
    with np.errstate(divide="ignore", invalid="ignore"):
        lz = np.where(kinds == 1, litz(), 0.0)
        fo = foil()
    return _f(np.where(kinds == 1, lz, np.where(kinds == 3, fo, np.where(kinds == 4, side_by_side(wire.width_m),
                                                                          side_by_side(wire.strand_diameter_m)))))


def _layer_delta(wire: WireGeometry, skin: Any, eta: Any) -> npt.NDArray[np.float64]:
    """Dowell's Delta: the equivalent foil of a round strand (round, tiw, Litz), t/delta for foil and strip."""
    if np.ndim(wire.kind) == 0:
        if int(wire.kind) in (WIRE_CODE["foil"], WIRE_CODE["strip"]):
            return _f(dowell.foil_delta(wire.thickness_m, skin, eta))
        return _f(dowell.round_wire_delta(wire.strand_diameter_m, skin, eta))
    kind = np.asarray(wire.kind)
    flat = (kind == 3) | (kind == 4)
    with np.errstate(divide="ignore", invalid="ignore"):
        rnd = _f(dowell.round_wire_delta(wire.strand_diameter_m, skin, eta))
        foil = _f(dowell.foil_delta(wire.thickness_m, skin, eta))
    return np.where(flat, foil, rnd)


def layer_porosity(wire: WireGeometry, turns_in_layer: ArrayLike, usable_m: ArrayLike) -> npt.NDArray[np.float64]:
    """Dowell's porosity eta of a layer of this wire (see ``_layer_porosity``); one wire or a wire per row."""
    return _layer_porosity(wire, turns_in_layer, usable_m)


def layer_delta(wire: WireGeometry, skin_depth: ArrayLike, porosity: ArrayLike) -> npt.NDArray[np.float64]:
    """Dowell's Delta of a layer of this wire at a skin depth and porosity (see ``_layer_delta``)."""
    return _layer_delta(wire, skin_depth, porosity)


def layer_ac_factor(wire: WireGeometry, turns_in_layer: ArrayLike, usable_m: ArrayLike, skin_depth: ArrayLike,
                    f_inner: ArrayLike, f_outer: ArrayLike, harmonics: Harmonics) -> Arr:
    """Rac/Rdc of one layer between the enclosed ampere-turns f_inner and f_outer (Dowell's layer form,
    ``physics.layers.layer_fr``), weighted over the current's harmonics (skin depth / sqrt(n) each).
    ``wire``: one wire (floats) for every row, or a wire per row (``stack_wires``).

    A layer of Litz bundles is k = round(sqrt(strands)) layers of strands (common practice approximation):
    the MMF steps evenly across them, each at the porosity of the strands the layer holds, and the factor is
    their mean, rescaled from Dowell's square strands to round ones (``litz_fr``)."""
    eta = _layer_porosity(wire, turns_in_layer, usable_m)[..., None]
    skin = _f(skin_depth)[..., None] / np.sqrt(harmonics.orders)          # rows x harmonics
    # a wire per row: its fields get the harmonics axis too
    wide = wire if np.ndim(wire.kind) == 0 else WireGeometry(
        **{f: np.asarray(getattr(wire, f))[..., None] for f in WireGeometry.__dataclass_fields__})
    d = _layer_delta(wide, skin, eta)                                      # rows x harmonics
    k = _f(wire.sub_layers)
    if k.size and float(k.max()) == 1.0:                                   # no Litz: one layer of conductors
        fr1 = _f(layer_fr(d, _f(f_inner)[..., None], _f(f_outer)[..., None]))
        return _out(litz_fr(wire.kind, fr1 @ harmonics.weights))
    rows = np.broadcast_shapes(np.shape(turns_in_layer), np.shape(usable_m), np.shape(skin_depth),
                               np.shape(f_inner), np.shape(f_outer), np.shape(wire.kind))
    k = np.broadcast_to(k, rows)
    kmax = int(k.max()) if k.size else 1
    j = np.arange(kmax, dtype=float)
    kk = k[..., None]
    f1 = np.broadcast_to(_f(f_inner), rows)[..., None]
    f2 = np.broadcast_to(_f(f_outer), rows)[..., None]
    span = f2 - f1
    one = kk == 1.0
    a = np.where(one, f1, f1 + span * j / kk)                              # rows x sub-layers
    b = np.where(one, f2, f1 + span * (j + 1.0) / kk)
    fr = _f(layer_fr(d[..., None], a[..., None, :], b[..., None, :]))     # rows x harmonics x sub-layers
    used = (j < kk)[..., None, :]
    mean = np.where(used, fr, 0.0).sum(axis=-1) / kk
    return _out(litz_fr(wire.kind, mean @ harmonics.weights))


def litz_fr(wire_kind: Any, fr_dowell: ArrayLike) -> Arr:
    """Rows' AC factors with the Litz rows (``wire_kind`` == WIRE_CODE['litz']) rescaled from Dowell's square
    strands to round ones (``physics.litz.litz_fr_round_strands``, which then agrees with Sullivan's
    strand-level result at low frequency); other kinds unchanged. ``wire_kind``: one code or a code per row."""
    kind = np.asarray(wire_kind)
    fr = _f(fr_dowell)
    if kind.ndim == 0:
        return _out(litzmod.litz_fr_round_strands(fr) if int(kind) == WIRE_CODE["litz"] else fr)
    return _out(np.where(kind == WIRE_CODE["litz"], _f(litzmod.litz_fr_round_strands(fr)), fr))


def section_ac_factor(wire: WireGeometry, layers: ArrayLike, turns_per_layer: ArrayLike, usable_m: ArrayLike,
                      skin_depth: ArrayLike, f_start: ArrayLike, f_end: ArrayLike, harmonics: Harmonics) -> Arr:
    """Mean AC factor of a section whose layers step the MMF evenly from f_start to f_end, in closed form.

    ``layer_fr`` is affine in a = (F1^2 + F2^2)/(F2 - F1)^2 and b = 4 F1 F2/(F2 - F1)^2, and a = 1 + b/2 for
    every layer, so the mean over L layers is layer_fr at faces (f*, f* + 1) with 4 f*(f* + 1) = mean b
    (Litz: L x k strand layers). The porosity is the full layer's (``turns_per_layer``), the mean unweighted
    by layer length: the search's screening form; the engine takes each layer with ``layer_ac_factor``."""
    kind = np.asarray(wire.kind)
    L = np.maximum(np.where(kind == 1, _f(layers) * _f(wire.sub_layers), _f(layers)), 1.0)
    span = _f(f_end) - _f(f_start)
    ok = np.abs(span) > 1e-12
    step = np.where(ok, span, 1.0) / L
    u0 = _f(f_start) / step
    mean_u = u0 + (L - 1.0) / 2.0
    mean_u2 = u0 * u0 + u0 * (L - 1.0) + (L - 1.0) * (2.0 * L - 1.0) / 6.0
    fstar = (-1.0 + np.sqrt(np.maximum(1.0 + 4.0 * (mean_u2 + mean_u), 0.0))) / 2.0
    eta = _layer_porosity(wire, np.maximum(_f(turns_per_layer), 1.0), np.maximum(_f(usable_m), 1e-9))
    fr = np.zeros(np.broadcast_shapes(fstar.shape, eta.shape))
    for n, w in zip(harmonics.orders, harmonics.weights):
        d = _layer_delta(wire, _f(skin_depth) / math.sqrt(float(n)), eta)
        fr = fr + w * _f(layer_fr(d, fstar, fstar + 1.0))
    return _out(np.where(ok, _f(litz_fr(kind, fr)), 1.0))


def copper_loss_w(dcr_ohm: ArrayLike, fr: ArrayLike, i_ac_rms_a: ArrayLike, i_dc_a: ArrayLike = 0.0) -> Arr:
    """Copper loss I_dc^2 R + I_ac^2 R Fr: the DC part sees the DC resistance, the AC part the AC factor."""
    r = _f(dcr_ohm)
    return _out(_f(i_dc_a) ** 2 * r + _f(i_ac_rms_a) ** 2 * r * _f(fr))
