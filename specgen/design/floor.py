"""The shop-floor records of a Design: the catalogue figures the documents show, read here once.

Tapes as wound per section (with the build each adds, by the build's own tape factor), the core's
outline for the drawings, the bobbin's pins (or a toroid's free leads), the varnish and its cure, and
the spec's history as typed entries. The documents read these from the Design and never the catalogue.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping

from ..catalog.models import Catalog
from .acceptance import AcceptedWarning
from .build import tape_factor
from .result import CoreOutline, FloorData, HistoryEntry, PinLayout, SectionTapes, TapeWrap, VarnishCure, WindingResult
from .spec import TapeUse
from .state import BuiltWindow, Parts


def tape_wrap(cat: Catalog, tape_id: str | None, layers: int, lap_factor: float, widths: int = 1,
              breadth_m: float = 0.0) -> TapeWrap | None:
    """A tape as wound: ``layers`` wraps of the catalogue's tape, building ``thickness x layers x lap``;
    in two widths a layer, one against each flange of ``breadth_m``, overlapping by ``2 w - breadth``."""
    if not tape_id or layers <= 0 or tape_id not in cat.tapes:
        return None
    t = cat.tapes[tape_id]
    return TapeWrap(id=t.id, name=t.name, thickness_m=t.thickness_m, width_m=t.width_m, layers=layers,
                    lap_factor=lap_factor, build_m=t.thickness_m * layers * lap_factor, widths=widths,
                    overlap_m=2.0 * t.width_m - breadth_m if widths > 1 else None)


def section_tapes(cat: Catalog, parts: Parts, built: BuiltWindow, windings: Iterable[WindingResult],
                  layer_widths: int = 1, barriers: Mapping[tuple[str, int], str] | None = None
                  ) -> tuple[SectionTapes, ...]:
    """Each section's layer height and tapes, in build order (the Design's sections name the tapes)."""
    lap = tape_factor(parts.former)
    barriers = barriers or {}
    by_key = {(w.name, s.index): s for w in windings for s in w.sections}
    out = []
    for b in sorted(built.sections, key=lambda x: x.order):
        s = by_key[(b.winding, b.index)]
        f = parts.former
        breadth = f.chambers[b.chamber - 1] if b.chamber and f.chambers else f.breadth_m
        between = (tape_wrap(cat, s.layer_tape, s.layer_tape_layers, lap, layer_widths, breadth)
                   if len(s.layers) > 1 else None)
        out.append(SectionTapes(winding=b.winding, index=b.index, order=b.order,
                                barrier=barriers.get((b.winding, b.index), ""),
                                layer_height_m=b.build.layer_height_m, between_layers=between,
                                after=tape_wrap(cat, s.tape_after, s.tape_after_layers, lap, b.tape_after_widths,
                                                breadth)))
    return tuple(out)


def core_outline(parts: Parts) -> CoreOutline:
    """The dimensions the window or ring drawing needs (the bare core's, as the catalogue gives them)."""
    core = parts.core
    if core.is_toroid:
        dims = core.dims
        return CoreOutline(shape=core.shape, inner_diameter_m=dims.get("id"), outer_diameter_m=dims.get("od"),
                           height_m=dims.get("height"), coating_m=core.coating_m,
                           winding_breadth_m=parts.window_breadth_m, coating_voltage_v=core.coating_voltage_v)
    former = parts.former
    if former.chambers:
        whole = sum(former.chambers) + former.divider_m * (len(former.chambers) - 1)
        return CoreOutline(shape=core.shape, inner_diameter_m=None, outer_diameter_m=None, height_m=None,
                           coating_m=0.0, winding_breadth_m=whole, chambers=former.chambers,
                           divider_m=former.divider_m,
                           divider_height_m=(parts.bobbin.divider_height_m or former.height_m) if parts.bobbin
                           else former.height_m)
    return CoreOutline(shape=core.shape, inner_diameter_m=None, outer_diameter_m=None, height_m=None,
                       coating_m=0.0, winding_breadth_m=former.breadth_m)


def pin_layout(parts: Parts, windings: Iterable[WindingResult]) -> PinLayout:
    """The bobbin's pins in the catalogue's order, or (no bobbin) the leads the sections name, in order."""
    b = parts.bobbin
    if b is not None and not parts.core.is_toroid:
        return PinLayout(bobbin=b.id, pins=tuple(str(p) for p in b.pins), rows=b.pin_rows, pitch_m=b.pin_pitch_m,
                         free_leads=False)
    leads: list[str] = []
    for w in windings:
        for s in w.sections:
            for p in (s.start_pin, s.finish_pin):
                if p and p not in leads:
                    leads.append(p)
    return PinLayout(bobbin=None, pins=tuple(leads), rows=1, pitch_m=None, free_leads=True)


def varnish_cure(cat: Catalog, varnish_id: str | None) -> VarnishCure | None:
    if not varnish_id or varnish_id not in cat.varnishes:
        return None
    v = cat.varnishes[varnish_id]
    return VarnishCure(id=v.id, name=v.name, thermal_class_c=v.thermal_class_c,
                       cure_temperature_c=v.cure_temperature_c, cure_time_s=v.cure_time_s)


def floor_data(cat: Catalog, parts: Parts, built: BuiltWindow, windings: Iterable[WindingResult],
               varnish_id: str | None, core_wrap: TapeUse | None = None, layer_widths: int = 1,
               barriers: Mapping[tuple[str, int], str] | None = None) -> FloorData:
    ws = tuple(windings)
    wrap = None
    if core_wrap is not None and parts.core.is_toroid:
        # half-lapped, so each wrap builds two thicknesses (the same factor the build and the barrier count)
        wrap = tape_wrap(cat, core_wrap.tape, core_wrap.layers, 2.0)
    return FloorData(sections=section_tapes(cat, parts, built, ws, layer_widths, barriers), outline=core_outline(parts),
                     pins=pin_layout(parts, ws), varnish=varnish_cure(cat, varnish_id), core_wrap=wrap)


def history_entries(history: Iterable[Mapping[str, object]]) -> tuple[HistoryEntry, ...]:
    """The spec's history lines as typed entries (missing keys read as '')."""
    return tuple(HistoryEntry(revision=str(e.get("revision", "") or ""), date=str(e.get("date", "") or ""),
                              by=str(e.get("by", "") or ""), note=str(e.get("note", "") or ""),
                              fingerprint=str(e.get("fingerprint", "") or ""),
                              accepted=tuple(a for a in _items(e.get("accepted")) if isinstance(a, AcceptedWarning)),
                              supersedes=str(e.get("supersedes", "") or ""),
                              effective=str(e.get("effective", "") or ""),
                              open_orders=(tuple(str(n) for n in _items(e.get("open_orders")))
                                           if e.get("open_orders") is not None else None)) for e in history)


def _items(value: object) -> tuple[object, ...]:
    return tuple(value) if isinstance(value, (tuple, list)) else ()
