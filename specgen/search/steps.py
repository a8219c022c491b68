"""The design engine's steps on arrays of rows: winding a section, AC factor, DCR, flux limit, core loss,
thermal state, choke turns and gap.

These are the engine's scalar steps (``design.build.wind_section``, ``engine._section_frs``, ``_dcr``,
``_flux_limit``, ``_core_loss_w_m3``, ``thermal_state``, ``inductor._turns_for_l``,
``gap.gap_for_inductance_m``) written again for arrays, each tested against the scalar step it mirrors
(tests/test_search.py). They belong in the shared design kernel, where the engine would call them too;
until the kernel offers them they live here, and only here.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..catalog.models import Material
from ..physics import coreloss, dowell, geometry, thermal
from ..physics import gap as gapmod
from ..physics import wire as wiremod
from ..physics.layers import layer_fr
from .records import BoolArray, FloatArray, FormerKind, FormerRows, IntArray, OptionRows, SectionRows, WireKind

_TOROID_BINS = (4, 16, 64, 256, 1024)


def wind_section_vec(fm: FormerRows, turns: FloatArray, pitch: FloatArray, lh: FloatArray, start: FloatArray,
                     margin: FloatArray, layer_tape: FloatArray, foil: BoolArray,
                     limit: FloatArray | None = None) -> SectionRows:
    """The engine's ``build.wind_section`` for arrays of rows (one section per row).

    turns, pitch, lh (layer height), start (build at the section's start), margin, layer_tape (already x the
    tape factor) [m], foil (bool). On a bobbin every full layer holds ``cap`` turns and the MLT is affine in
    the build, so the layers' sum is their count times the MLT at their mean build (closed form). On a toroid
    each layer's capacity shrinks with the hole: the layers are laid as a rows x layers matrix (cumulative
    capacity against the turns), at most as many layers as fit below ``limit`` (rows needing more are not
    ok: they cannot fit).
    """
    turns = np.asarray(turns, dtype=float)
    out = SectionRows.empty(turns.shape[0])
    bob = np.flatnonzero(fm.kind != FormerKind.TOROID)
    if bob.size:
        _wind_bobbin(fm, bob, turns, pitch, lh, start, margin, layer_tape, foil, out)
    tor = np.flatnonzero(fm.kind == FormerKind.TOROID)
    if tor.size:
        _wind_toroid(fm, tor, turns, pitch, lh, start, layer_tape, foil, limit, out)
    return out


def _wind_bobbin(fm: FormerRows, bob: IntArray, turns: FloatArray, pitch: FloatArray, lh: FloatArray,
                 start: FloatArray, margin: FloatArray, layer_tape: FloatArray, foil: BoolArray,
                 out: SectionRows) -> None:
    usable = fm.breadth_m[bob] - 2.0 * margin[bob]
    p = pitch[bob]
    with np.errstate(divide="ignore", invalid="ignore"):
        cap = np.where(usable > 0, np.floor(usable / p + 1e-9), 0.0)
    cap = np.where(foil[bob], np.where(p <= usable + 1e-12, 1.0, 0.0), cap)
    t = turns[bob]
    ok = (cap >= 1) & (t > 0)
    capc = np.maximum(cap, 1.0)
    layers = np.ceil(t / capc)
    last = t - (layers - 1.0) * capc
    s0, h, lt = start[bob], lh[bob], layer_tape[bob]
    c_last = s0 + (layers - 1.0) * (h + lt) + h / 2.0
    c_mean = s0 + h / 2.0 + (h + lt) * (layers - 2.0) / 2.0
    rect = fm.kind[bob] == FormerKind.RECT
    tw, td = fm.tube_width_m[bob], fm.tube_depth_m[bob]

    def mlt(c: FloatArray) -> FloatArray:
        return np.asarray(np.where(rect, geometry.mlt_rect_m(tw, td, c), geometry.mlt_round_m(tw, c)), dtype=np.float64)

    out.length_m[bob] = capc * (layers - 1.0) * mlt(c_mean) + last * mlt(c_last)
    out.end_build_m[bob] = s0 + layers * h + (layers - 1.0) * lt
    out.turns_per_layer[bob], out.layers[bob], out.last_turns[bob] = cap, layers, last
    out.usable_m[bob], out.ok[bob] = usable, ok


def _toroid_layer_limit(fm: FormerRows, tor: IntArray, turns: FloatArray, pitch: FloatArray, lh: FloatArray,
                        start: FloatArray, layer_tape: FloatArray, limit: FloatArray | None) -> FloatArray:
    """Most layers each toroid row may need: those below ``limit``, and no more than the turns over the
    smallest capacity an allowed layer has."""
    step = lh[tor] + layer_tape[tor]      # the engine: each layer, then the layer tape (already x2, half-lapped)
    if limit is None:
        return np.full(tor.size, float(_TOROID_BINS[-1]))
    lmax = np.floor((limit[tor] - start[tor] + layer_tape[tor]) / step + 1e-9)
    top = start[tor] + (np.maximum(lmax, 1.0) - 1.0) * step + lh[tor] / 2.0
    cap_min = np.floor(np.asarray(geometry.toroid_inner_circumference_m(fm.id_m[tor], top)) / pitch[tor] + 1e-9)
    need = np.where(cap_min >= 1, np.ceil(turns[tor] / np.maximum(cap_min, 1.0)), lmax)
    return np.asarray(np.clip(np.minimum(lmax, need), 1.0, _TOROID_BINS[-1]), dtype=float)


def _wind_toroid(fm: FormerRows, tor: IntArray, turns: FloatArray, pitch: FloatArray, lh: FloatArray,
                 start: FloatArray, layer_tape: FloatArray, foil: BoolArray, limit: FloatArray | None,
                 out: SectionRows) -> None:
    lmax = _toroid_layer_limit(fm, tor, turns, pitch, lh, start, layer_tape, limit)
    lo = 0
    for hi in _TOROID_BINS:       # rows binned by their layer count: each bin one rows x layers matrix
        sel = tor[(lmax > lo) & (lmax <= hi)]
        lo = hi
        if not sel.size:
            continue
        lsel = lmax[np.searchsorted(tor, sel)]
        j = np.arange(int(lsel.max()), dtype=float)[None, :]
        s0, h, lt, p = start[sel][:, None], lh[sel][:, None], layer_tape[sel][:, None], pitch[sel][:, None]
        centre = s0 + j * (h + lt) + h / 2.0
        idm = fm.id_m[sel][:, None]
        circ = geometry.toroid_inner_circumference_m(idm, centre)
        cap = np.where(j < lsel[:, None], np.maximum(np.floor(circ / p + 1e-9), 0.0), 0.0)
        # the engine stops (None) at the first layer that holds no turn: no capacity after it
        cap = np.where(np.cumsum(cap < 1, axis=1) > 0, 0.0, cap)
        cum = np.cumsum(cap, axis=1)
        t = turns[sel]
        reach = cum >= t[:, None]
        ok = reach[:, -1] & (t > 0) & ~foil[sel]
        layers = np.where(ok, np.argmax(reach, axis=1) + 1.0, 1.0)
        li = (layers - 1).astype(np.int64)
        rows = np.arange(sel.size)
        last = t - np.where(li > 0, cum[rows, np.maximum(li - 1, 0)], 0.0)
        nturn = np.where(j < (layers - 1.0)[:, None], cap, 0.0)
        nturn[rows, li] = last
        tl = geometry.toroid_turn_length_m(fm.od_m[sel][:, None], idm, fm.core_height_m[sel][:, None], centre)
        out.length_m[sel] = np.sum(nturn * tl, axis=1)
        out.end_build_m[sel] = start[sel] + layers * lh[sel] + (layers - 1.0) * layer_tape[sel]
        out.layers[sel], out.last_turns[sel] = layers, last
        out.turns_per_layer[sel], out.usable_m[sel], out.ok[sel] = cap[:, 0], circ[:, 0], ok


@dataclass(frozen=True, slots=True)
class Harmonics:
    """Harmonic orders of the current and their power weights (sum 1)."""
    order: FloatArray
    weight: FloatArray


def harmonics(waveform: str) -> Harmonics:
    """The engine's harmonic weighting of a square-wave current (odd n, power 1/n^2), else the fundamental."""
    from ..design.engine import SQUARE_HARMONICS

    h = np.array(SQUARE_HARMONICS if waveform == "square" else (1,), dtype=float)
    w = 1.0 / h ** 2
    return Harmonics(h, w / w.sum())


def _porosity(opt: OptionRows, sec: SectionRows) -> FloatArray:
    """Layer porosity per kind, as the engine: round/tiw the strands' share of the usable breadth in a full
    layer; Litz 0.9 x the strand porosity; foil width/breadth; strip the layer's copper fraction."""
    kind = opt.kind
    litz = kind == WireKind.LITZ
    usable = np.maximum(sec.usable_m, 1e-9)
    cap = np.maximum(sec.turns_per_layer, 1.0)
    eta_round = np.minimum(1.0, cap * opt.strands * opt.strand_diameter_m / usable)
    eta_litz = np.asarray(dowell.porosity(np.where(litz, opt.strand_diameter_m, 1.0),
                                          np.where(litz, opt.strand_overall_m, 1.0))) * 0.9
    eta_foil = np.minimum(1.0, opt.width_m / np.maximum(sec.usable_m, np.maximum(opt.width_m, 1e-12)))
    eta_strip = np.minimum(1.0, cap * opt.strands * opt.width_m / usable)
    return np.asarray(np.where(litz, eta_litz, np.where(kind == WireKind.FOIL, eta_foil,
                                                        np.where(kind == WireKind.STRIP, eta_strip, eta_round))))


def section_fr_vec(opt: OptionRows, sec: SectionRows, delta_m: FloatArray | float, f_start: FloatArray,
                   f_end: FloatArray, harm: Harmonics) -> FloatArray:
    """AC factor of a section: the engine's layer form averaged over layers of equal MMF step.

    ``physics.layers.layer_fr`` is affine in a = (F1^2 + F2^2)/(F2 - F1)^2 and b = 4 F1 F2/(F2 - F1)^2,
    and a = 1 + b/2 for every layer, so the mean over the section's L layers (faces stepping evenly from
    f_start to f_end) is layer_fr at faces (f*, f* + 1) with 4 f*(f* + 1) = mean b: the engine's per-layer
    mean for equal layers, in closed form. Delta per kind as the engine: round/tiw the equivalent foil of
    the strand; Litz k = round(sqrt(strands)) strand layers per bundle layer; foil and strip t/delta.
    """
    kind = opt.kind
    L = np.maximum(np.where(kind == WireKind.LITZ, sec.layers * opt.litz_sublayers, sec.layers), 1.0)
    span = f_end - f_start
    ok = np.abs(span) > 1e-12
    step = np.where(ok, span, 1.0) / L
    u0 = f_start / step
    mean_u = u0 + (L - 1.0) / 2.0
    mean_u2 = u0 * u0 + u0 * (L - 1.0) + (L - 1.0) * (2.0 * L - 1.0) / 6.0
    fstar = (-1.0 + np.sqrt(np.maximum(1.0 + 4.0 * (mean_u2 + mean_u), 0.0))) / 2.0
    eta = _porosity(opt, sec)
    round_like = (kind == WireKind.ROUND) | (kind == WireKind.LITZ) | (kind == WireKind.TIW)
    size = np.where(round_like, opt.strand_diameter_m, opt.thickness_m)
    fr = np.zeros(kind.shape[0])
    delta = np.asarray(delta_m, dtype=float)
    for n, w in zip(harm.order, harm.weight):
        dn = delta / math.sqrt(float(n))
        d = np.where(round_like, np.asarray(dowell.round_wire_delta(size, dn, eta)),
                     np.asarray(dowell.foil_delta(size, dn, eta)))
        fr += w * np.asarray(layer_fr(d, fstar, fstar + 1.0))
    return np.asarray(np.where(ok, fr, 1.0))


def resistance_ohm(opt: OptionRows, length_m: FloatArray, temp_c: FloatArray | float) -> FloatArray:
    """DCR of the rows' wires [ohm] (resistivity at temp_c, IEC 60028 / IEC 60889)."""
    r = np.asarray(wiremod.resistance_per_m_ohm(opt.copper_area_m2, temp_c, "copper")) * length_m
    if not opt.copper.all():
        al = ~opt.copper
        t = np.broadcast_to(np.asarray(temp_c, dtype=float), r.shape)
        r = r.copy()
        r[al] = np.asarray(wiremod.resistance_per_m_ohm(opt.copper_area_m2[al], t[al], "aluminium")) * length_m[al]
    return np.asarray(r, dtype=np.float64)


def skin_depth_m(freq_hz: float, temp_c: FloatArray | float) -> FloatArray:
    """Skin depth in copper at temp_c [m]."""
    return np.asarray(wiremod.skin_depth_m(freq_hz, wiremod.resistivity_ohm_m(temp_c)), dtype=np.float64)


@dataclass(frozen=True, slots=True)
class MaterialRows:
    """The core materials a search uses, indexed by material number."""
    materials: tuple[Material, ...]
    b_sat_25c_t: FloatArray
    b_sat_100c_t: FloatArray
    b_design_t: FloatArray       # NaN where the material has none
    b_r_t: FloatArray
    beta: FloatArray

    @classmethod
    def of(cls, materials: list[Material]) -> MaterialRows:
        return cls(tuple(materials), np.array([m.b_sat_25c_t for m in materials]),
                   np.array([m.b_sat_100c_t for m in materials]),
                   np.array([m.b_design_t if m.b_design_t is not None else np.nan for m in materials]),
                   np.array([m.b_r_t for m in materials]), np.array([m.steinmetz_beta for m in materials]))

    def b_sat_t(self, mi: IntArray, temp_c: FloatArray | float) -> FloatArray:
        """B_sat at temperature: the same physics function the engine calls."""
        return np.asarray(thermal.b_sat_at_temp_t(self.b_sat_25c_t[mi], self.b_sat_100c_t[mi], temp_c), dtype=np.float64)

    def flux_limit_t(self, mi: IntArray, temp_c: FloatArray | float, fraction: float,
                     given_t: float | None) -> FloatArray:
        """The engine's ``_flux_limit`` elementwise (value only): the given limit, else the material's design
        value where below ``fraction`` x B_sat, else ``fraction`` x B_sat at temp_c."""
        bsat = self.b_sat_t(mi, temp_c)
        if given_t is not None:
            return np.full(np.shape(bsat), given_t)
        bd = self.b_design_t[mi]
        use = ~np.isnan(bd) & (bd < fraction * bsat)
        return np.asarray(np.where(use, bd, fraction * bsat), dtype=float)

    def core_loss_w_m3(self, mi: IntArray, b_t: FloatArray, freq_hz: float, waveform: str,
                       duty: float) -> FloatArray:
        """Core loss density [W/m^3] by material group (the coreloss functions take scalar coefficients).
        waveform: sine, square or unipolar (b_t the peak flux), or 'ripple' (b_t the peak-to-peak ripple flux
        of a choke, the triangular-ripple form)."""
        out = np.zeros(np.shape(b_t))
        for m in np.unique(mi):
            sel = np.flatnonzero(mi == m)
            mat = self.materials[int(m)]
            k, a, b = mat.steinmetz_k, mat.steinmetz_alpha, mat.steinmetz_beta
            bt = b_t[sel]
            if waveform == "ripple":
                pos = bt > 0
                vals = np.zeros(bt.shape)
                if pos.any():
                    vals[pos] = coreloss.triangular_ripple_loss_w_m3(freq_hz, bt[pos], duty, k, a, b)
                out[sel] = vals
            elif waveform == "sine":
                out[sel] = coreloss.steinmetz_w_m3(freq_hz, bt, k, a, b)
            elif waveform == "square":
                out[sel] = coreloss.square_wave_loss_w_m3(freq_hz, bt, k, a, b)
            else:
                out[sel] = coreloss.unipolar_pulse_loss_w_m3(freq_hz, bt, duty, k, a, b)
        return out


@dataclass(frozen=True, slots=True)
class ThermalModel:
    """The engine's ``thermal_state`` elementwise: McLyman's rise x the cooling factor, held below the
    engine's MAX_HOT_C, plus the shop's hot-spot margin."""
    ambient_c: float
    cooling_factor: float
    hotspot_margin_k: float
    max_hot_c: float

    def state(self, total_loss_w: FloatArray, surface_m2: FloatArray) -> tuple[FloatArray, FloatArray]:
        """(hot spot [degC], rise [K])."""
        rise = np.asarray(thermal.temperature_rise_k(total_loss_w, surface_m2)) * self.cooling_factor
        rise = np.minimum(rise, self.max_hot_c - self.ambient_c)
        return self.ambient_c + rise + self.hotspot_margin_k, rise


def turns_for_l_vec(target_h: float, ae: FloatArray, le: FloatArray, mu: FloatArray, lg: FloatArray,
                    window: FloatArray) -> FloatArray:
    """The engine's ``inductor._turns_for_l`` elementwise: smallest N with L(N) >= target (L ~ N^2)."""
    l1 = np.where(lg > 0, np.asarray(gapmod.inductance_gapped_h(1.0, ae, le, mu, lg, window)),
                  np.asarray(gapmod.inductance_gapped_h(1.0, ae, le, mu, lg, None)))
    return np.asarray(np.maximum(1.0, np.ceil(np.sqrt(target_h / l1) - 1e-9)), dtype=float)


def gap_vec(target_h: float, turns: FloatArray, ae: FloatArray, le: FloatArray, mu: FloatArray,
            window: FloatArray) -> FloatArray:
    """``gap.gap_for_inductance_m`` for arrays: the smallest gap at which L falls to the target.

    L(lg) starts at mu0 N^2 Ae mu/le, rises a little at microscopic gaps (McLyman's F has an infinite
    slope at zero) and then falls: the crossing from above is unique, found by bisection on a log scale
    over [1e-12 x 2G, 2G]. NaN where even no gap cannot reach L (the scalar solver's None); where L(2G) is
    still above the target the fringing factor is 1 and the closed form applies, as in the scalar solver."""
    n = np.asarray(turns, dtype=float)
    k = wiremod.MU0_H_M * n * n * ae
    out = np.full(n.shape, np.nan)
    reach = target_h <= k * mu / le
    upper = 2.0 * window
    l_up = np.asarray(gapmod.inductance_gapped_h(n, ae, le, mu, upper, window))
    closed = reach & (l_up - target_h > 0.0)
    out[closed] = (k / target_h - le / mu)[closed]
    b = np.flatnonzero(reach & ~closed)
    if b.size:
        lo = np.log(1e-12 * upper[b])
        hi = np.log(upper[b])
        for _ in range(64):
            mid = 0.5 * (lo + hi)
            above = np.asarray(gapmod.inductance_gapped_h(n[b], ae[b], le[b], mu[b], np.exp(mid), window[b])) >= target_h
            lo = np.where(above, mid, lo)
            hi = np.where(above, hi, mid)
        out[b] = np.exp(0.5 * (lo + hi))
    return out
