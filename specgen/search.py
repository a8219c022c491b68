"""Catalogue-wide design search: every core x stack x bobbin x wire x strands choice in stock, ranked.

A requirement file (``load_requirement``) says what the part must do; ``search`` answers which of the
shop's cores and wires can do it, and at what loss, temperature, size and material cost. Three stages:

1. Screen, per core choice (McLyman's area product, ``physics.sizing.area_product_m4``): a core whose
   Wa Ae is below the area product the requirement needs even at a generous window utilisation
   (``AP_KU``), the highest current density considered (``J_HIGH`` x the shop's) and the flux limit is
   set aside as "too small a window"; so is a bobbin with too few pins. Nothing else is evaluated for it.
2. Vectorised evaluation: one numpy row per (core choice, wire option of every winding), evaluated with
   the design engine's own functions applied to arrays (faraday, wire, geometry MLT, layers/dowell,
   coreloss, thermal; the engine's ``_resolve_core``, ``_pitch_and_height`` and ``_magnetizing``; its
   ``thermal_state``, ``b_sat_at_t`` and ``_flux_limit`` mirrored elementwise and tested against it), so
   the vector code is the scalar code applied elementwise. Where it follows the
   engine exactly (tested against it to 1e-9): core parameters and former; primary turns from Faraday's
   law at the flux limit of the first-guess hot spot; the layer build (turns per layer, layers, layer and
   winding tapes, each layer's own MLT - a closed-form sum on a bobbin, where the MLT is affine in the
   build, a layer loop on a toroid); copper length and DCR; B_peak and the core loss density; the
   McLyman rise and hot spot; flux limit, class and fit checks.
   Simplified, for screening and ranking only:
   - the AC factor of a winding is the engine's layer form (``physics.layers.layer_fr``) averaged over
     layers of equal MMF step at the full-layer porosity, unweighted by layer length (the engine takes
     each layer's own porosity and weights by its length), at the first-guess temperature;
   - secondary turns are compensated for the resistive drop at the first-guess temperature only, and
     the thermal loop then iterates resistance and efficiency (the engine re-derives turns and AC factor
     at every step);
   - above 1 kHz the engine scans the primary turns up to 3 n0 for the least loss; the vector stage
     evaluates n0 and one analytic optimum N = n0 (beta P_core / (2 P_cu))^(1/(beta + 2)) (core loss
     ~ N^-beta, copper loss ~ N^2);
   - chokes: turns and gap at the first-guess temperature, the gap by a vectorised bisection of the
     same ``gap.inductance_gapped_h`` (the engine's scalar solver scans then bisects).
   Rows: for a transformer, each winding's options are first evaluated alone on each core (height from
   the tube, copper loss, cost, class) and an option no better than another of the same winding in all
   four is dropped (``prune_options``): it could only make every design it enters worse. Only where a
   core still has more than ``ROWS_PER_CORE_MAX`` combinations (four or more windings) are the options
   thinned further, to each winding's height-loss and height-cost fronts (an approximation; reported).
   Chokes have one winding: every core x option row is evaluated.
3. Scalar confirmation: the best rows by the sort key, and the rows on the loss-cost Pareto front, are
   written as draft specs (``draft_spec_text``) and run through ``api.run_design``. Every number the
   search prints is from those Designs, so ``--write`` + ``specgen design`` reproduce them exactly. The
   vector ranking is corrected core by core from the engine results as they come in (its cost leaves
   out tapes, sleeving and varnish), and rows keep being run while they could still enter the list.

Material cost per unit is ``quote.material_total(quote.material_lines(design, cat))`` when the quote
module is there (wire mass x price x scrap, core, bobbin, tapes, sleeving, varnish), else wire mass x
price x (1 + scrap) + core + bobbin from catalogue prices (Decimal either way; the vector stage ranks
with a float estimate of wire + core + bobbin).
"""

from __future__ import annotations

import json
import math
import sys
import time
from dataclasses import dataclass, field
from decimal import Decimal
from pathlib import Path
from types import SimpleNamespace

import numpy as np

from .catalog.models import Catalog
from .errors import SpecError
from .loading import Reader, load_yaml
from .physics import coreloss, dowell, faraday, geometry, permeability, sizing, thermal
from .physics import gap as gapmod
from .physics import wire as wiremod
from .physics.layers import layer_fr

KINDS = ("transformer", "inductor")
RATINGS = ("functional", "basic", "reinforced")
SORTS = ("cost", "loss", "size", "rise")

# wire options: total copper area within [I / (J_HIGH J), I / (J_LOW J)], J the shop's current density
J_LOW = 1.0 / 3.0
J_HIGH = 1.5
MAX_STRANDS_ROUND = 8      # strands in hand of round wire (the engine's own limit for auto)
MAX_BUNDLES_LITZ = 6       # Litz bundles in parallel (the engine's own limit for auto)
MAX_STRANDS_TIW = 4
SINGLE_WIRE_MAX_M = 1.2e-3 # above this a single wire winds badly; strands in hand then (shop labor's
                           # heavy_wire_above when it gives one; 1.2 mm common practice)
AP_KU = 0.5                # generous window utilisation for the area-product screen (common practice
                           # reaches 0.3-0.4 on a bobbin): the screen only drops cores clearly too small
FIT_SLACK = 0.03           # the vector stage keeps rows within 3 % of fitting / 3 K of a limit for the
TEMP_SLACK_K = 3.0         # engine to decide (its model is the finer one)
SCALAR_BUDGET = 60         # most designs the engine runs per search
PARETO_MAX = 8
CHUNK_ROWS = 65536
PROGRESS_AFTER_S = 1.0

F_WINDOW, F_PINS, F_GAP, F_FIT, F_SAT, F_HOT, F_RISE, F_CLASS, F_MASS, F_SIZE, F_L = (1 << i for i in range(11))
REASONS = {
    F_WINDOW: "too small a window", F_PINS: "too few pins on the bobbin",
    F_GAP: "cannot reach the inductance", F_FIT: "does not fit", F_SAT: "saturates", F_HOT: "too hot",
    F_RISE: "rises more than allowed", F_CLASS: "runs hotter than a wire or bobbin class",
    F_MASS: "too heavy", F_SIZE: "too large", F_L: "inductance short",
}
MAX_TURNS = 20000          # the engine's own limit (design.spec.MAX_TURNS)
KIND_CODE = {"round": 0, "litz": 1, "tiw": 2, "foil": 3, "strip": 4}


# ================================================================================================ requirement

@dataclass(frozen=True)
class ReqWinding:
    name: str
    role: str                       # primary | secondary | auxiliary
    voltage_v: float
    voltage_min_v: float | None
    voltage_max_v: float | None
    current_a: float | None
    va: float | None
    match: str | None
    text: dict                      # key -> the text as written (copied into the draft spec)

    @property
    def load_current_a(self) -> float:
        return self.current_a if self.current_a is not None else self.va / self.voltage_v


@dataclass(frozen=True)
class Requirement:
    file: str
    id: str
    part: str | None
    title: str
    customer: str
    kind: str
    frequency_hz: float
    waveform: str
    duty: float
    ambient_c: float
    cooling: str
    insulation_class_c: int
    max_rise_k: float | None
    flux_limit_t: float | None
    efficiency: float | None
    windings: tuple                 # ReqWinding (transformer); empty for a choke
    rating: str                     # between windings: functional | basic | reinforced
    to_core: str                    # windings to core
    working_voltage_v: float
    max_mass_kg: float | None
    max_length_m: float | None      # largest outline dimension
    max_width_m: float | None       # middle
    max_height_m: float | None      # smallest (seated height)
    inductance_h: float | None = None
    current_dc_a: float | None = None
    ripple_a: float = 0.0
    current_peak_a: float | None = None
    text: dict = field(default_factory=dict)   # operating/inductor texts as written
    notes: str = ""

    @property
    def efficiency_guess(self) -> float:
        return self.efficiency if self.efficiency is not None else 0.9

    @property
    def primary(self) -> ReqWinding:
        return next(w for w in self.windings if w.role == "primary")

    @property
    def loads(self) -> list:
        return [w for w in self.windings if w.role != "primary"]

    @property
    def output_va(self) -> float:
        return sum(w.voltage_v * w.load_current_a for w in self.loads)

    def summary(self) -> str:
        f = f"{self.frequency_hz / 1e3:g} kHz" if self.frequency_hz >= 1e3 else f"{self.frequency_hz:g} Hz"
        if self.kind == "inductor":
            return (f"choke {self.inductance_h * 1e6:.4g} µH at {self.current_dc_a:g} A DC, ripple "
                    f"{self.ripple_a:g} A p-p at {f}")
        p = self.primary
        outs = ", ".join(f"{w.voltage_v:g} V {w.load_current_a:.3g} A" for w in self.loads)
        return f"transformer {p.voltage_v:g} V {f} {self.waveform} -> {outs} ({self.output_va:.4g} VA)"


TOP_KEYS = ("requirement", "part", "title", "customer", "kind", "operating", "windings", "inductor", "insulation",
            "limits", "notes")
OPERATING_KEYS = ("frequency", "waveform", "duty", "ambient", "cooling", "insulation_class", "max_rise",
                  "flux_limit", "efficiency")
WINDING_KEYS = ("name", "role", "voltage", "voltage_min", "voltage_max", "current", "va", "match")
INDUCTOR_KEYS = ("inductance", "current", "ripple", "current_peak", "duty")


def _text(r: Reader, key: str):
    v = r.data.get(key)
    return None if v is None else str(v).strip()


def parse_requirement(data, name: str) -> Requirement:
    """The requirement file's mapping -> Requirement; every mistake a located SpecError."""
    from .design.spec import COOLING, WAVEFORMS, _insulation_class
    from .standards.thermal_classes import LETTER_BY_LIMIT as IEC_60085

    r = Reader(data, name)
    r.done(TOP_KEYS)             # a typo is named as such before a key it hides is reported missing
    kind = r.choice("kind", KINDS)
    op = r.mapping("operating")
    op.done(OPERATING_KEYS)
    freq = op.quantity("frequency", "frequency")
    if not 1.0 <= freq <= 50e6:
        raise op.error("frequency must lie between 1 Hz and 50 MHz", "frequency")
    waveform = op.choice("waveform", WAVEFORMS, "sine")
    if kind == "inductor" and op.has("waveform"):
        raise op.error("a choke carries DC with a triangular ripple; give the ripple under 'inductor'",
                       "waveform")
    duty = op.number("duty", 0.5, minimum=0.01, maximum=0.99)
    ambient = op.quantity("ambient", "temperature", 25.0)
    if not -60.0 <= ambient <= 200.0:
        raise op.error(f"ambient {ambient:g} degC is outside -60..200 degC", "ambient")
    cooling = op.choice("cooling", COOLING, "natural")
    cls = _insulation_class(op, op.raw("insulation_class", 130), IEC_60085)
    max_rise = op.quantity("max_rise", "temperature_difference", None)
    if max_rise is not None and max_rise <= 0:
        raise op.error("max_rise must be above zero", "max_rise")
    flux = op.quantity("flux_limit", "flux_density", None)
    eff = op.number("efficiency", None, minimum=0.3, maximum=0.999)
    optext = {k: _text(op, k) for k in ("frequency", "ambient", "flux_limit", "insulation_class")}
    op.done()

    windings: list = []
    ind = {}
    if kind == "transformer":
        names = []
        for wr in r.items("windings", min_items=2):
            wr.done(WINDING_KEYS)
            role = wr.choice("role", ("primary", "secondary", "auxiliary"))
            w = ReqWinding(
                name=wr.text("name", max_len=40), role=role, voltage_v=wr.quantity("voltage", "voltage"),
                voltage_min_v=wr.quantity("voltage_min", "voltage", None),
                voltage_max_v=wr.quantity("voltage_max", "voltage", None),
                current_a=wr.quantity("current", "current", None), va=wr.quantity("va", "apparent_power", None),
                match=wr.text("match", None),
                text={k: _text(wr, k) for k in ("voltage", "voltage_min", "voltage_max", "current", "va")})
            wr.done()
            if w.name in names:
                raise wr.error(f"a second winding named '{w.name}'", "name")
            if w.name.lower() in ("core", "all") or "+" in w.name:
                raise wr.error("'core', 'all' and names with '+' are reserved for the insulation barriers", "name")
            if role != "primary" and w.current_a is None and w.va is None:
                raise wr.error(f"a {role} winding needs its current (or va)", "current")
            if role == "primary" and (w.current_a is not None or w.va is not None):
                raise wr.error("the primary current follows from the loads; give the secondaries' currents",
                               "current")
            if w.voltage_max_v is not None and w.voltage_max_v < w.voltage_v:
                raise wr.error("voltage_max is below the nominal voltage", "voltage_max")
            if w.voltage_min_v is not None and w.voltage_min_v > w.voltage_v:
                raise wr.error("voltage_min is above the nominal voltage", "voltage_min")
            names.append(w.name)
            windings.append((w, wr))
        prim = [w for w, _ in windings if w.role == "primary"]
        if len(prim) != 1:
            raise r.error(f"a transformer needs exactly one primary winding, found {len(prim)}", "windings")
        for w, wr in windings:
            if w.match is not None:
                other = next((o for o, _ in windings if o.name == w.match), None)
                if other is None or other is w or other.role != w.role or other.voltage_v != w.voltage_v:
                    raise wr.error(f"'{w.match}' names no other winding of the same role and voltage", "match")
                if other.match is not None:
                    raise wr.error(f"'{w.match}' itself matches another winding; match every one to the same",
                                   "match")
        windings = [w for w, _ in windings]
        if r.has("inductor"):
            raise r.error("only a choke has an 'inductor' section", "inductor")
    else:
        ir = r.mapping("inductor")
        ir.done(INDUCTOR_KEYS)
        ind = dict(inductance_h=ir.quantity("inductance", "inductance"), current_dc_a=ir.quantity("current", "current"),
                   ripple_a=ir.quantity("ripple", "current", 0.0, allow_zero=True),
                   current_peak_a=ir.quantity("current_peak", "current", None))
        duty = ir.number("duty", duty, minimum=0.01, maximum=0.99)
        if ind["current_peak_a"] is not None and ind["current_peak_a"] < ind["current_dc_a"]:
            raise ir.error("current_peak is below the DC current", "current_peak")
        optext.update({f"inductor.{k}": _text(ir, k) for k in ("inductance", "current", "ripple", "current_peak")})
        ir.done()
        if r.has("windings"):
            raise r.error("a choke has one winding; the search sizes it (remove 'windings')", "windings")

    ins = r.mapping("insulation", None)
    rating, to_core, wv = "functional", None, None
    if ins is not None:
        ins.done(("between_windings", "to_core", "working_voltage") if kind == "transformer"
                 else ("to_core", "working_voltage"))
        if kind == "transformer":
            rating = ins.choice("between_windings", RATINGS, "basic")
        to_core = ins.choice("to_core", ("functional", "basic"), None)
        wv = ins.quantity("working_voltage", "voltage", None)
        ins.done()
    elif kind == "transformer":
        rating = "basic"
    if to_core is None:
        to_core = "functional" if kind == "inductor" or rating == "functional" else "basic"
    if wv is None:
        if kind == "transformer":
            p = next(w for w in windings if w.role == "primary")
            wv = p.voltage_max_v or p.voltage_v
        else:
            wv = 50.0
    lim = r.mapping("limits", None)
    limits = dict(max_mass_kg=None, max_length_m=None, max_width_m=None, max_height_m=None)
    if lim is not None:
        lim.done(("max_mass", "max_length", "max_width", "max_height"))
        limits = dict(max_mass_kg=lim.quantity("max_mass", "mass", None),
                      max_length_m=lim.quantity("max_length", "length", None),
                      max_width_m=lim.quantity("max_width", "length", None),
                      max_height_m=lim.quantity("max_height", "length", None))
        lim.done()
    rid = r.text("requirement", Path(name).stem, max_len=60)
    req = Requirement(
        file=name, id=rid, part=r.text("part", None, max_len=60), title=r.text("title", "", max_len=200),
        customer=r.text("customer", "", max_len=200), kind=kind, frequency_hz=freq, waveform=waveform,
        duty=duty, ambient_c=ambient, cooling=cooling, insulation_class_c=cls, max_rise_k=max_rise,
        flux_limit_t=flux, efficiency=eff, windings=tuple(windings), rating=rating, to_core=to_core,
        working_voltage_v=wv, text=optext, notes=r.text("notes", "", max_len=5000), **limits, **ind)
    r.done()
    return req


def load_requirement(path) -> Requirement:
    """Read a requirement file (YAML); every mistake is a located SpecError (one line, exit 2)."""
    data = load_yaml(path, "requirement file")
    if data is None:
        raise SpecError("is empty; a requirement needs at least kind, operating and windings (or inductor)",
                        file=str(path))
    return parse_requirement(data, str(path))


# ================================================================================================ catalogue side

@dataclass(frozen=True)
class CoreChoice:
    """One way to take a core from stock: core x stack x bobbin (the engine's resolved parts)."""
    core: object
    stack_m: float | None
    bobbin: object | None
    parts: object                   # engine _Parts
    mass_kg: float                  # core mass per unit
    family: str
    plan: dict                      # insulation construction (tapes, margins) for this choice

    @property
    def label(self) -> str:
        s = f"{self.core.id}"
        if self.stack_m:
            s += f" {self.stack_m * 1e3:g} mm"
        return s


@dataclass(frozen=True)
class WireOption:
    wire: object
    strands: int

    @property
    def label(self) -> str:
        return self.wire.id + (f" x{self.strands}" if self.strands > 1 else "")


def _engine_ns(req: Requirement, core_id: str = "", stack_m=None, bobbin_id=None) -> SimpleNamespace:
    """A stand-in for a Spec with exactly the attributes the engine helpers read."""
    return SimpleNamespace(core_id=core_id, stack_m=stack_m, core_count=1, bobbin_id=bobbin_id, data={},
                           file=req.file, flux_limit_t=req.flux_limit_t, cooling=req.cooling,
                           ambient_c=req.ambient_c, frequency_hz=req.frequency_hz,
                           waveform=req.waveform if req.kind == "transformer" else "sine", duty=req.duty)


def _is_margin_tape(t) -> bool:
    return "margin" in t.name.lower()


WRAP_BREAKDOWN_V = 5000.0   # a wrap between windings should hold 5 kV, so two or three wraps pass a 3 kV
                            # reinforced test with margin (common practice, from memory)


def _pick_tape(cat: Catalog, cls: int, breadth_m: float | None, prefer: str):
    """A tape of at least the insulation class, as wide as the bobbin breadth where one is stocked.

    'thin' (layer tape): the cheapest within 20 % of the thinnest. 'strong' (between windings and the outer
    wrap): the cheapest film tape (at least 50 kV/mm, at most 0.1 mm) holding ``WRAP_BREAKDOWN_V`` per wrap,
    else the one holding the most."""
    tapes = [t for t in cat.tapes.values() if not _is_margin_tape(t)]
    ok = [t for t in tapes if t.thermal_class_c >= cls] or sorted(tapes, key=lambda t: -t.thermal_class_c)[:3]
    if prefer == "strong":
        films = [t for t in ok if t.thickness_m <= 0.1e-3 and t.dielectric_strength_v_m >= 50e6] or ok
        holds = [t for t in films if t.thickness_m * t.dielectric_strength_v_m >= WRAP_BREAKDOWN_V]
        ok = holds or [max(films, key=lambda t: (t.thickness_m * t.dielectric_strength_v_m, t.id))]
    else:
        thin = min(t.thickness_m for t in ok)
        ok = [t for t in ok if t.thickness_m <= 1.2 * thin]
    wide = [t for t in ok if breadth_m is None or t.width_m >= breadth_m - 1e-9]
    return min(wide or ok, key=lambda t: (t.price_per_m2, t.width_m, t.id))


def _margin_for(rating: str, working_v: float) -> float:
    """Creepage margin each side of a winding on a bobbin (common practice, from memory: about 2 mm for
    basic insulation at mains voltages up to 300 V, 3 mm to 600 V; reinforced twice that). The applicable
    product safety standard decides; these are starting points for a draft."""
    if rating == "functional":
        return 0.0
    basic = 2e-3 if working_v <= 300.0 else 3e-3 if working_v <= 600.0 else 4e-3
    return basic if rating == "basic" else 2.0 * basic


def insulation_plan(req: Requirement, cat: Catalog, core, bobbin) -> dict:
    """The draft spec's insulation construction for one core choice: tapes, margins, sleeving, varnish.

    Layer tape: one wrap of the thinnest tape of the class. Between windings: 1 wrap (functional),
    2 (basic) or 3 (reinforced: thin-sheet insulation, any two of three pass the test - common practice,
    from memory of IEC 61558-1 / IEC 62368-1) of the tape with the most breakdown per wrap; the outer wrap
    two of those. Tapes as wide as the bobbin breadth where stocked."""
    cls = req.insulation_class_c
    breadth = bobbin.breadth_m if bobbin is not None else None
    layer = _pick_tape(cat, cls, breadth, "thin")
    strong = _pick_tape(cat, cls, breadth, "strong")
    layers = {"functional": 1, "basic": 2, "reinforced": 3}[req.rating if req.kind == "transformer" else "functional"]
    toroid = bobbin is None
    margin = 0.0 if toroid else _margin_for(req.rating if req.kind == "transformer" else req.to_core,
                                             req.working_voltage_v)
    margin_tape = None
    if margin > 0:
        mts = [t for t in cat.tapes.values() if _is_margin_tape(t) and t.width_m >= margin - 1e-9]
        if mts:
            best_w = min(t.width_m for t in mts)
            mts = [t for t in mts if t.width_m == best_w]
            margin_tape = max(mts, key=lambda t: (t.thermal_class_c, -t.price_per_m2)).id
            margin = best_w
    varn = sorted((v for v in cat.varnishes.values() if v.thermal_class_c >= cls),
                  key=lambda v: (v.price_per_litre, v.id))
    return dict(layer_tape=layer.id, layer_tape_m=layer.thickness_m, winding_tape=strong.id,
                winding_tape_layers=layers, winding_tape_m=strong.thickness_m * layers,
                outer_wrap=strong.id, outer_wrap_layers=2, outer_wrap_m=strong.thickness_m * 2,
                margin_m=margin, margin_tape=margin_tape, varnish=varn[0].id if varn else None)


def _sleeving_for(cat: Catalog, cls: int, diameter_m: float):
    ok = [s for s in cat.sleevings.values() if s.thermal_class_c >= cls]
    if not ok:
        return None
    fit = [s for s in ok if s.bore_m >= 1.1 * diameter_m]
    if fit:
        return min(fit, key=lambda s: (s.bore_m, s.price_per_m, s.id)).id
    return max(ok, key=lambda s: (s.bore_m, s.id)).id


def core_choices(req: Requirement, cat: Catalog) -> list:
    """Every core x stack x bobbin in stock, resolved by the engine (EI: each stocked stack with the
    single-section bobbin made for it; split bobbins only where no single-section one fits)."""
    from .design.engine import _core_result, _resolve_core

    out = []
    for core in sorted(cat.cores.values(), key=lambda c: c.id):
        stacks = list(core.stacks_m) if core.shape == "EI" else [None]
        for stack in stacks:
            if core.is_toroid:
                bobbins = [None]
            else:
                fits = [b for b in cat.bobbins_for(core.id)
                        if b.stack_m is None or stack is None or abs(b.stack_m - stack) < 1e-6]
                single = [b for b in fits if b.sections == 1]
                bobbins = sorted(single or fits, key=lambda b: b.id)
                if not bobbins:
                    continue
            for bob in bobbins:
                ns = _engine_ns(req, core.id, stack, bob.id if bob else None)
                try:
                    parts = _resolve_core(ns, cat)
                except (SpecError, ValueError):
                    continue
                mass = _core_result(ns, cat, parts, req.ambient_c).mass_kg
                out.append(CoreChoice(core=core, stack_m=stack, bobbin=bob, parts=parts, mass_kg=mass,
                                      family=f"{core.shape} / {core.material}",
                                      plan=insulation_plan(req, cat, core, bob)))
    return out


def _heavy_wire_m(cat: Catalog) -> float:
    labor = getattr(cat.shop, "labor", None) or {}
    raw = (labor.get("data") or labor).get("heavy_wire_above") if isinstance(labor, dict) else None
    if raw is None:
        return SINGLE_WIRE_MAX_M
    try:
        from .units import parse

        return parse(raw, "length")
    except Exception:   # a malformed shop figure is the quote's to report; the search keeps its default
        return SINGLE_WIRE_MAX_M


def wire_options(cat: Catalog, current_a: float, density_a_m2: float, freq_hz: float, *, skin_limited: bool,
                 allow_tiw: bool, heavy_m: float) -> list:
    """Every stocked (wire, strands) whose copper carries ``current_a`` within the density window.

    Round wire of every grade with strands no thicker than two skin depths (the engine's rule); strands
    in hand 2..8 only where needed (one wire at the shop's density would be thicker than two skin depths
    or than ``heavy_m``); Litz (strands at most half a skin depth, the engine's rule) in 1..6 bundles only
    where a single round wire would be thicker than two skin depths; triple-insulated wire when
    ``allow_tiw``; foil and strip no thicker than two skin depths.
    """
    from .design.engine import _skin_depth_m
    from .design.transformer import WIRE_CHOICE_TEMP_C

    i = max(current_a, 1e-6)
    lo, hi = i / (J_HIGH * density_a_m2), i / (J_LOW * density_a_m2)
    target = i / density_a_m2
    delta = _skin_depth_m(freq_hz, WIRE_CHOICE_TEMP_C) if skin_limited else math.inf
    limit = 2.0 * delta
    single_d = math.sqrt(4.0 * target / math.pi)
    strands_needed = single_d > min(limit, heavy_m)
    out = []

    def add(w, n_max, needed):
        for n in range(1, n_max + 1):
            if n > 1 and not needed:
                break
            a = w.copper_area_m2 * n
            if lo <= a <= hi:
                out.append(WireOption(w, n))

    for w in sorted(cat.wires.values(), key=lambda w: (w.kind, w.copper_area_m2, w.id)):
        if w.kind == "round" and w.strand_diameter_m <= limit:
            add(w, MAX_STRANDS_ROUND, strands_needed)
        elif w.kind == "tiw" and allow_tiw and w.strand_diameter_m <= limit:
            add(w, MAX_STRANDS_TIW, strands_needed)
        elif w.kind == "litz" and skin_limited and single_d > limit and w.strand_diameter_m <= delta / 2.0:
            add(w, MAX_BUNDLES_LITZ, True)
        elif w.kind in ("foil", "strip") and w.thickness_m <= limit:
            add(w, 2 if w.kind == "strip" else 1, strands_needed)
    return out


def _option_table(options: list, cat: Catalog) -> dict:
    """Arrays over one winding's wire options (what the vectorised model reads)."""
    from .design.engine import _pitch_and_height

    n = len(options)
    t = {k: np.zeros(n) for k in ("pitch", "lh", "area", "d", "d_over", "k_sub", "thick", "width",
                                  "cls", "price", "mass_per_m", "strands", "overall")}
    t["kind"] = np.zeros(n, dtype=np.int8)
    t["foil"] = np.zeros(n, dtype=bool)
    t["copper"] = np.ones(n, dtype=bool)
    for j, o in enumerate(options):
        w = o.wire
        pitch, lh, foil = _pitch_and_height(w, o.strands)
        t["pitch"][j], t["lh"][j], t["foil"][j] = pitch, lh, foil
        t["kind"][j] = KIND_CODE.get(w.kind, 0)
        area = w.copper_area_m2 * o.strands
        t["area"][j] = area
        t["d"][j] = w.strand_diameter_m
        t["d_over"][j] = w.strand_overall_m or w.overall_diameter_m
        t["k_sub"][j] = max(1, int(round(math.sqrt(w.strands)))) if w.kind == "litz" else 1
        t["thick"][j], t["width"][j] = w.thickness_m, w.width_m
        t["cls"][j] = w.thermal_class_c
        t["price"][j] = float(w.price_per_kg) * (1.0 + float(cat.shop.scrap_wire))
        t["mass_per_m"][j] = wiremod.mass_per_m_kg(area, w.conductor)
        t["strands"][j] = o.strands
        t["overall"][j] = _pitch_and_height(w, 1)[1]
        t["copper"][j] = w.conductor == "copper"
    return t


# ================================================================================================ outline

def outline_m(core, stack_m, bulged_build_m):
    """Bounding box of the assembled part, sorted largest first (length, width, height) [m].

    The same conventions as ``geometry.outer_surface_area_m2``: EI - lamination outline x (stack + 2
    window widths, the coil standing proud of the stack); E-types - width x height x max(depth, centre leg
    + 2 window builds); POT/RM - the cylinder's box; toroid - the core over its coating plus the bulged
    winding build on every face. ``bulged_build_m`` may be an array (toroids)."""
    d = core.dims
    s = core.shape
    b = np.asarray(bulged_build_m, dtype=float)
    if s == "EI":
        e = geometry._ei_dims(d)
        dims = (e["tongue"] + 2 * e["window_width"] + 2 * e["leg"], e["window_height"] + 2 * e["yoke"],
                stack_m + 2 * e["window_width"])
    elif s == "toroid":
        c = core.coating_m
        o = d["od"] + 2 * c + 2 * b
        dims = (o, o, d["height"] + 2 * c + 2 * b)
    elif s in ("POT", "RM"):
        dims = (d["outer_diameter"], d["outer_diameter"], d["height"])
    else:
        build = geometry.window_height_m(s, d)
        centre = d["centre_leg_diameter"] if s in ("ETD", "PQ") else d.get("centre_leg_depth", d["depth"])
        dims = (d["width"], d["height"], max(d["depth"], centre + 2 * build))
    arr = np.broadcast_arrays(*[np.asarray(x, dtype=float) for x in dims])
    stacked = -np.sort(-np.stack(arr), axis=0)
    return stacked[0], stacked[1], stacked[2]


# ================================================================================================ vectorised model

def wind_section_vec(fm: dict, turns, pitch, lh, start, margin, layer_tape, foil, limit=None) -> dict:
    """The engine's ``build.wind_section`` for arrays of rows (one section per row).

    fm: the former per row - ``kind`` (0 rect, 1 round, 2 toroid), ``tube_w``, ``tube_d``, ``breadth``,
    ``od``, ``id``, ``core_h`` [m]. turns, pitch, lh (layer height), start (build at the section's start),
    margin, layer_tape (already x the tape factor), foil (bool): arrays [m]. On a bobbin every full layer
    holds ``cap`` turns and the MLT is affine in the build, so the layers' sum is their count times the MLT
    at their mean build (closed form). On a toroid each layer's capacity shrinks with the hole: the layers
    are laid as a rows x layers matrix (cumulative capacity against the turns), at most as many layers as
    fit below ``limit`` (rows needing more are not ok: they cannot fit). Returns ok, cap (first-layer
    capacity), layers, last (turns in the last layer), end (build after the last layer), length (copper,
    without leads), usable (breadth, or the first layer's circumference).
    """
    turns = np.asarray(turns, dtype=float)
    n = turns.shape[0]
    out = {k: np.zeros(n) for k in ("cap", "layers", "last", "end", "length", "usable")}
    out["ok"] = np.zeros(n, dtype=bool)
    kind = fm["kind"]
    bob = np.flatnonzero(kind != 2)
    if bob.size:
        usable = fm["breadth"][bob] - 2.0 * margin[bob]
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
        rect = kind[bob] == 0
        tw, td = fm["tube_w"][bob], fm["tube_d"][bob]

        def mlt(c):
            return np.where(rect, geometry.mlt_rect_m(tw, td, c), geometry.mlt_round_m(tw, c))

        out["length"][bob] = capc * (layers - 1.0) * mlt(c_mean) + last * mlt(c_last)
        out["end"][bob] = s0 + layers * h + (layers - 1.0) * lt
        out["cap"][bob], out["layers"][bob], out["last"][bob] = cap, layers, last
        out["usable"][bob], out["ok"][bob] = usable, ok
    tor = np.flatnonzero(kind == 2)
    if tor.size:
        _wind_toroid(fm, tor, turns, pitch, lh, start, layer_tape, foil, limit, out)
    return out


_TOROID_BINS = (4, 16, 64, 256, 1024)


def _wind_toroid(fm, tor, turns, pitch, lh, start, layer_tape, foil, limit, out) -> None:
    step = lh[tor] + layer_tape[tor]      # the engine: each layer, then the layer tape (already x2, half-lapped)
    if limit is None:
        lmax = np.full(tor.size, float(_TOROID_BINS[-1]))
    else:
        lmax = np.floor((limit[tor] - start[tor] + layer_tape[tor]) / step + 1e-9)
        # no more layers are needed than the turns over the smallest capacity an allowed layer has
        top = start[tor] + (np.maximum(lmax, 1.0) - 1.0) * step + lh[tor] / 2.0
        cap_min = np.floor(np.asarray(geometry.toroid_inner_circumference_m(fm["id"][tor], top)) / pitch[tor] + 1e-9)
        need = np.where(cap_min >= 1, np.ceil(turns[tor] / np.maximum(cap_min, 1.0)), lmax)
        lmax = np.clip(np.minimum(lmax, need), 1.0, _TOROID_BINS[-1])
    lo = 0
    for hi in _TOROID_BINS:
        sel = tor[(lmax > lo) & (lmax <= hi)]
        lo = hi
        if not sel.size:
            continue
        m = int(lmax[np.searchsorted(tor, sel)].max())
        j = np.arange(m, dtype=float)[None, :]
        s0, h, lt, p = start[sel][:, None], lh[sel][:, None], layer_tape[sel][:, None], pitch[sel][:, None]
        allowed = j < lmax[np.searchsorted(tor, sel)][:, None]
        centre = s0 + j * (h + lt) + h / 2.0
        idm = fm["id"][sel][:, None]
        circ = geometry.toroid_inner_circumference_m(idm, centre)
        cap = np.where(allowed, np.maximum(np.floor(circ / p + 1e-9), 0.0), 0.0)
        # the engine stops (None) at the first layer that holds no turn: no capacity after it
        dead = np.cumsum(cap < 1, axis=1) > 0
        cap = np.where(dead, 0.0, cap)
        cum = np.cumsum(cap, axis=1)
        t = turns[sel]
        reach = cum >= t[:, None]
        ok = reach[:, -1] & (t > 0) & ~foil[sel]
        layers = np.where(ok, np.argmax(reach, axis=1) + 1.0, 1.0)
        li = (layers - 1).astype(np.int64)
        rows = np.arange(sel.size)
        before = np.where(li > 0, cum[rows, np.maximum(li - 1, 0)], 0.0)
        last = t - before
        nturn = np.where(j < (layers - 1.0)[:, None], cap, 0.0)
        nturn[rows, li] = last
        tl = geometry.toroid_turn_length_m(fm["od"][sel][:, None], idm, fm["core_h"][sel][:, None], centre)
        out["length"][sel] = np.sum(nturn * tl, axis=1)
        out["end"][sel] = start[sel] + layers * lh[sel] + (layers - 1.0) * layer_tape[sel]
        out["layers"][sel], out["last"][sel] = layers, last
        out["cap"][sel], out["usable"][sel], out["ok"][sel] = cap[:, 0], circ[:, 0], ok


def _harmonics(waveform: str):
    """The engine's harmonic weighting of a square-wave current (odd n, power 1/n^2), else the fundamental."""
    from .design.engine import SQUARE_HARMONICS

    h = np.array(SQUARE_HARMONICS if waveform == "square" else (1,), dtype=float)
    w = 1.0 / h ** 2
    return h, w / w.sum()


def section_fr_vec(opt: dict, sec: dict, delta_m, f_start, f_end, harmonics) -> np.ndarray:
    """AC factor of a section: the engine's layer form averaged over layers of equal MMF step.

    ``physics.layers.layer_fr`` is affine in a = (F1^2 + F2^2)/(F2 - F1)^2 and b = 4 F1 F2/(F2 - F1)^2,
    and a = 1 + b/2 for every layer, so the mean over the section's L layers (faces stepping evenly from
    f_start to f_end) is layer_fr at faces (f*, f* + 1) with 4 f*(f* + 1) = mean b: the engine's per-layer
    mean for equal layers, in closed form. Delta per kind as the engine: round/tiw the equivalent foil of
    the strand at the full-layer porosity; Litz k = round(sqrt(strands)) strand layers per bundle layer at
    0.9 x the strand porosity; foil t/delta at width/breadth; strip t/delta at the layer's copper fraction.
    """
    kind = opt["kind"]
    L = np.maximum(np.where(kind == 1, sec["layers"] * opt["k_sub"], sec["layers"]), 1.0)
    span = f_end - f_start
    ok = np.abs(span) > 1e-12
    step = np.where(ok, span, 1.0) / L
    u0 = f_start / step
    mean_u = u0 + (L - 1.0) / 2.0
    mean_u2 = u0 * u0 + u0 * (L - 1.0) + (L - 1.0) * (2.0 * L - 1.0) / 6.0
    fstar = (-1.0 + np.sqrt(np.maximum(1.0 + 4.0 * (mean_u2 + mean_u), 0.0))) / 2.0
    usable = np.maximum(sec["usable"], 1e-9)
    cap = np.maximum(sec["cap"], 1.0)
    round_like = kind <= 2
    eta_round = np.minimum(1.0, cap * opt["strands"] * opt["d"] / usable)
    eta_litz = np.asarray(dowell.porosity(np.where(kind == 1, opt["d"], 1.0),
                                          np.where(kind == 1, opt["d_over"], 1.0))) * 0.9
    eta_foil = np.minimum(1.0, opt["width"] / np.maximum(sec["usable"], np.maximum(opt["width"], 1e-12)))
    eta_strip = np.minimum(1.0, cap * opt["strands"] * opt["width"] / usable)
    eta = np.where(kind == 1, eta_litz, np.where(kind == 3, eta_foil, np.where(kind == 4, eta_strip, eta_round)))
    size = np.where(round_like, opt["d"], opt["thick"])
    fr = np.zeros(kind.shape[0])
    h_n, w_n = harmonics
    delta_m = np.asarray(delta_m, dtype=float)
    for n, w in zip(h_n, w_n):
        dn = delta_m / math.sqrt(n)
        d = np.where(round_like, np.asarray(dowell.round_wire_delta(size, dn, eta)),
                     np.asarray(dowell.foil_delta(size, dn, eta)))
        fr += w * np.asarray(layer_fr(d, fstar, fstar + 1.0))
    return np.where(ok, fr, 1.0)


def _resistance(opt: dict, length_m, temp_c):
    """DCR of the rows' wires [ohm] (resistivity at temp_c, IEC 60028 / IEC 60889)."""
    r = np.asarray(wiremod.resistance_per_m_ohm(opt["area"], temp_c, "copper")) * length_m
    if not opt["copper"].all():
        al = ~opt["copper"]
        t = np.broadcast_to(np.asarray(temp_c, dtype=float), r.shape)
        r = r.copy()
        r[al] = np.asarray(wiremod.resistance_per_m_ohm(opt["area"][al], t[al], "aluminium")) * length_m[al]
    return r


def b_sat_vec(b25, b100, temp_c):
    """B_sat at temperature for arrays of materials: the same physics function the engine calls."""
    return np.asarray(thermal.b_sat_at_temp_t(b25, b100, temp_c))


def thermal_state_vec(ctx, total_loss_w, surface_m2):
    """The engine's ``thermal_state`` elementwise: McLyman's rise x the engine's cooling factor (read off
    the engine itself at setup), held below the engine's MAX_HOT_C; returns (hot spot, rise)."""
    rise = np.asarray(thermal.temperature_rise_k(total_loss_w, surface_m2)) * ctx.cooling_factor
    rise = np.minimum(rise, ctx.max_hot_c - ctx.req.ambient_c)
    return ctx.req.ambient_c + rise + ctx.cat.shop.hotspot_margin_k, rise


def flux_limit_vec(ctx, mi, temp_c):
    """The engine's ``_flux_limit`` elementwise (value only) for material indices ``mi``."""
    mt = ctx.mats
    bsat = b_sat_vec(mt["b25"][mi], mt["b100"][mi], temp_c)
    frac = ctx.cat.shop.flux_limit_fraction
    if ctx.req.flux_limit_t is not None:
        return np.full(np.shape(bsat), ctx.req.flux_limit_t)
    bd = mt["b_design"][mi]
    use = ~np.isnan(bd) & (bd < frac * bsat)
    return np.where(use, bd, frac * bsat)


def _core_loss_vec(ctx, mi, b_t, kind: str):
    """Core loss density [W/m^3] by material group (the coreloss functions take scalar coefficients).
    kind: the transformer waveform, or 'choke' (b_t is then the peak-to-peak ripple flux)."""
    out = np.zeros(np.shape(b_t))
    f = ctx.req.frequency_hz
    for m in np.unique(mi):
        sel = np.flatnonzero(mi == m)
        mat = ctx.mat_objs[m]
        k, a, b = mat.steinmetz_k, mat.steinmetz_alpha, mat.steinmetz_beta
        bt = b_t[sel]
        if kind == "choke":
            pos = bt > 0
            vals = np.zeros(bt.shape)
            if pos.any():
                vals[pos] = coreloss.triangular_ripple_loss_w_m3(f, bt[pos], ctx.req.duty, k, a, b)
            out[sel] = vals
        elif kind == "sine":
            out[sel] = coreloss.steinmetz_w_m3(f, bt, k, a, b)
        elif kind == "square":
            out[sel] = coreloss.square_wave_loss_w_m3(f, bt, k, a, b)
        else:
            out[sel] = coreloss.unipolar_pulse_loss_w_m3(f, bt, ctx.req.duty, k, a, b)
    return out


class _Ctx:
    """Everything the row evaluation reads: requirement constants, core table, wire option tables."""

    def __init__(self, req: Requirement, cat: Catalog, choices: list, groups: list, options: list):
        from .design.engine import _Thermal

        self.req, self.cat, self.choices = req, cat, choices
        self.groups = groups                  # per winding (build order): its option group index
        self.options = options                # per group: list of WireOption
        self.opt_tables = [_option_table(o, cat) for o in options]
        shop = cat.shop
        self.t0 = _Thermal(req.ambient_c + 40.0, req.ambient_c + 40.0 + shop.hotspot_margin_k, 40.0)
        self.ns = _engine_ns(req)
        from .design import engine as _engine

        ref = _engine.thermal_state(1.0, SimpleNamespace(surface_m2=0.01), self.ns, cat)
        self.cooling_factor = ref.rise_k / thermal.temperature_rise_k(1.0, 0.01)
        self.max_hot_c = getattr(_engine, "MAX_HOT_C", math.inf)
        mats = sorted({c.core.material for c in choices})
        self.mat_objs = [cat.materials[m] for m in mats]
        mindex = {m: i for i, m in enumerate(mats)}
        self.mats = {
            "b25": np.array([m.b_sat_25c_t for m in self.mat_objs]),
            "b100": np.array([m.b_sat_100c_t for m in self.mat_objs]),
            "b_design": np.array([m.b_design_t if m.b_design_t is not None else np.nan for m in self.mat_objs]),
            "b_r": np.array([m.b_r_t for m in self.mat_objs]),
            "beta": np.array([m.steinmetz_beta for m in self.mat_objs]),
        }
        n = len(choices)
        ct = {k: np.zeros(n) for k in ("ae", "le", "ve", "wa", "surface", "tube_w", "tube_d", "breadth", "avail",
                                       "od", "id", "core_h", "mu_w", "mu_i", "G", "price", "mass", "bob_cls",
                                       "lt", "wt", "wrap", "margin", "pins", "len", "wid", "hgt")}
        ct["kind"] = np.zeros(n, dtype=np.int8)
        ct["mat"] = np.zeros(n, dtype=np.int64)
        ct["fixed_outline"] = np.ones(n, dtype=bool)
        for i, c in enumerate(choices):
            p = c.parts
            fm = p.former
            ct["ae"][i], ct["le"][i], ct["ve"][i], ct["wa"][i] = p.ae_m2, p.le_m, p.ve_m3, p.wa_m2
            ct["surface"][i] = p.surface_m2
            ct["kind"][i] = {"rect": 0, "round": 1, "toroid": 2}[fm.kind]
            ct["tube_w"][i], ct["tube_d"][i], ct["breadth"][i], ct["avail"][i] = (fm.tube_width_m, fm.tube_depth_m,
                                                                                  fm.breadth_m, fm.height_m)
            ct["od"][i], ct["id"][i], ct["core_h"][i] = fm.od_m, fm.id_m, fm.core_height_m
            m = cat.materials[c.core.material]
            ct["mat"][i] = mindex[c.core.material]
            ct["mu_w"][i], ct["mu_i"][i] = m.mu_working, m.mu_initial
            ct["G"][i] = p.window_breadth_m
            price = float(c.core.price) * (c.mass_kg if c.core.price_unit == "kg" else 1.0)
            ct["price"][i] = price + (float(c.bobbin.price) if c.bobbin is not None else 0.0)
            ct["mass"][i] = c.mass_kg
            ct["bob_cls"][i] = c.bobbin.thermal_class_c if c.bobbin is not None else 1e9
            tf = 2.0 if fm.kind == "toroid" else 1.0
            ct["lt"][i] = c.plan["layer_tape_m"] * tf
            ct["wt"][i] = c.plan["winding_tape_m"] * tf
            ct["wrap"][i] = c.plan["outer_wrap_m"] * tf
            ct["margin"][i] = c.plan["margin_m"] if fm.kind != "toroid" else 0.0
            ct["pins"][i] = len(c.bobbin.pins) if c.bobbin is not None else 1e9
            if c.core.is_toroid:
                ct["fixed_outline"][i] = False
            else:
                a, b, h = outline_m(c.core, c.stack_m, 0.0)
                ct["len"][i], ct["wid"][i], ct["hgt"][i] = float(a), float(b), float(h)
        self.ct = ct
        self.bulge = shop.bulge_factor
        self.lead = shop.lead_length_m
        self.harm = _harmonics(req.waveform if req.kind == "transformer" else "sine")
        self.core_flags = np.zeros(n, dtype=np.int64)
        # row blocks: bobbin cores take every option; toroids no foil or strip (one turn per layer is a
        # bobbin build)
        tor = ct["kind"] == 2
        self.blocks = []
        for mask, no_flat in ((~tor, False), (tor, True)):
            cores = np.flatnonzero(mask)
            if not cores.size:
                continue
            opts = []
            for t in self.opt_tables:
                keep = np.flatnonzero(t["kind"] < 3) if no_flat else np.arange(len(t["kind"]))
                opts.append(keep)
            if all(o.size for o in opts):
                self.blocks.append((cores, opts))
        if req.kind == "transformer":
            self._transformer_setup()
        else:
            self._choke_setup()

    def _swing(self, limit, mi):
        """A unipolar pulse starts from the residual flux: only B_limit - B_r is usable (the engine)."""
        if self.req.waveform == "unipolar":
            return np.maximum(limit - self.mats["b_r"][mi], 0.05 * limit)
        return limit

    def _transformer_setup(self):
        req, ct = self.req, self.ct
        p = req.primary
        self.vp, self.vp_max = p.voltage_v, p.voltage_max_v or p.voltage_v
        self.p_out = req.output_va
        limit = flux_limit_vec(self, ct["mat"], self.t0.hot_c)
        n = faraday.turns_for_voltage(self.vp_max, req.frequency_hz, self._swing(limit, ct["mat"]), ct["ae"],
                                      req.waveform, req.duty)
        self.np0 = np.maximum(1.0, np.ceil(np.asarray(n) - 1e-9))
        self.core_flags |= np.where(ct["pins"] < 2 * len(req.windings), F_PINS, 0)

    def _choke_setup(self):
        req, ct, cat = self.req, self.ct, self.cat
        self.i_dc = req.current_dc_a
        self.ripple = req.ripple_a
        self.i_ac = self.ripple / math.sqrt(12.0)
        self.i_op_pk = self.i_dc + self.ripple / 2.0
        self.i_pk = max(req.current_peak_a or 0.0, self.i_op_pk)
        self.i_rms = math.hypot(self.i_dc, self.i_ac)
        n = len(self.choices)
        self.powder = np.array([cat.materials[c.core.material].is_powder for c in self.choices], dtype=bool)
        self.gappable = np.array([c.core.gappable for c in self.choices], dtype=bool)
        # powder: turns from the DC-bias roll-off, independent of temperature (per core; the function
        # scans N = 1..2000 as arrays)
        self.pow = {k: np.zeros(n) for k in ("turns", "l", "b_pk", "b_max")}
        ae, le, mu = ct["ae"], ct["le"], ct["mu_i"]
        for i in np.flatnonzero(self.powder):
            m = cat.materials[self.choices[i].core.material]
            a, b, c = m.rolloff_a, m.rolloff_b, m.rolloff_c
            nn = permeability.turns_for_biased_inductance(req.inductance_h, self.i_dc, ae[i], le[i], mu[i], a, b, c)
            if nn is None:
                self.core_flags[i] |= F_GAP
                nn = 1
            self.pow["turns"][i] = nn
            self.pow["l"][i] = permeability.powder_inductance_h(nn, ae[i], le[i], mu[i], self.i_dc, a, b, c)
            h_pk = nn * self.i_pk / le[i]
            self.pow["b_max"][i] = wiremod.MU0_H_M * mu[i] * permeability.rolloff_fraction(h_pk, a, b, c) * h_pk
            h_op = nn * self.i_op_pk / le[i]
            self.pow["b_pk"][i] = wiremod.MU0_H_M * mu[i] * permeability.rolloff_fraction(h_op, a, b, c) * h_op
        self.mag0 = choke_magnetics(self, np.arange(n), np.full(n, self.t0.hot_c))
        tol = cat.shop.tolerances["inductance"]
        self.core_flags |= np.where(self.mag0["l"] < req.inductance_h * (1 - tol), F_L, 0)
        self.core_flags |= np.where(ct["pins"] < 2, F_PINS, 0)


def choke_magnetics(ctx: _Ctx, ci, temp_c) -> dict:
    """Turns, gap, inductance, flux and ripple core loss for rows (core ``ci`` at hot spot ``temp_c``), as the
    engine's inductor magnetics: powder by roll-off; an ungappable core without a gap (turns for L); a
    gappable one by McLyman's energy method (N = L I_pk / (B_limit Ae)), the gap for L with fringing, rounded
    down to the shop's step, and a turn added while the rounded gap pushes B_pk over the limit."""
    from .design.inductor import GAP_STEP_M

    req, ct = ctx.req, ctx.ct
    target = req.inductance_h
    ci = np.asarray(ci, dtype=np.int64)
    ae, le, mu, G = ct["ae"][ci], ct["le"][ci], ct["mu_i"][ci], ct["G"][ci]
    mi = ct["mat"][ci]
    n_rows = ci.size
    turns = np.ones(n_rows)
    lg = np.zeros(n_rows)
    powder = ctx.powder[ci]
    solid = ~powder & ~ctx.gappable[ci]
    s = np.flatnonzero(solid)
    if s.size:
        turns[s] = _turns_for_l_vec(target, ae[s], le[s], mu[s], np.zeros(s.size), G[s])
    g = np.flatnonzero(~powder & ctx.gappable[ci])
    if g.size:
        limit = flux_limit_vec(ctx, mi[g], np.asarray(temp_c)[g])
        ag, lgg, mg, Gg = ae[g], le[g], mu[g], G[g]
        nn = np.maximum(1.0, np.ceil(np.asarray(gapmod.turns_for_peak_b(target, ctx.i_pk, limit, ag)) - 1e-9))
        gp = _gap_vec(target, nn, ag, lgg, mg, Gg)
        none = np.isnan(gp)
        if none.any():
            nn[none] = _turns_for_l_vec(target, ag[none], lgg[none], mg[none], np.zeros(int(none.sum())), Gg[none])
            gp[none] = np.nan_to_num(_gap_vec(target, nn[none], ag[none], lgg[none], mg[none], Gg[none]), nan=0.0)
        gp = np.floor(gp / GAP_STEP_M + 1e-6) * GAP_STEP_M
        for _ in range(20):
            l_try = np.asarray(gapmod.inductance_gapped_h(nn, ag, lgg, mg, gp, Gg))
            over = np.asarray(gapmod.b_peak_from_inductance_t(l_try, ctx.i_pk, nn, ag)) > limit
            if not over.any():
                break
            nn = np.where(over, nn + 1.0, nn)
            re = _gap_vec(target, nn[over], ag[over], lgg[over], mg[over], Gg[over])
            gp[over] = np.floor(np.nan_to_num(re, nan=0.0) / GAP_STEP_M + 1e-6) * GAP_STEP_M
        turns[g], lg[g] = nn, gp
    l_built = np.asarray(gapmod.inductance_gapped_h(turns, ae, le, mu, lg, G))
    b_pk = np.asarray(gapmod.b_peak_from_inductance_t(l_built, ctx.i_op_pk, turns, ae))
    b_max = np.asarray(gapmod.b_peak_from_inductance_t(l_built, ctx.i_pk, turns, ae))
    p = np.flatnonzero(powder)
    if p.size:
        pc = ci[p]
        turns[p], l_built[p] = ctx.pow["turns"][pc], ctx.pow["l"][pc]
        b_pk[p], b_max[p] = ctx.pow["b_pk"][pc], ctx.pow["b_max"][pc]
    delta_b = l_built * ctx.ripple / (turns * ae)
    return {"turns": turns, "gap": lg, "l": l_built, "b_pk": b_pk, "b_max": b_max, "delta_b": delta_b,
            "pv": _core_loss_vec(ctx, mi, delta_b, "choke")}


def _turns_for_l_vec(target_h, ae, le, mu, lg, G):
    """The engine's ``inductor._turns_for_l`` elementwise: smallest N with L(N) >= target (L ~ N^2)."""
    l1 = np.where(lg > 0, np.asarray(gapmod.inductance_gapped_h(1.0, ae, le, mu, lg, G)),
                  np.asarray(gapmod.inductance_gapped_h(1.0, ae, le, mu, lg, None)))
    return np.maximum(1.0, np.ceil(np.sqrt(target_h / l1) - 1e-9))


def _gap_vec(target_h, turns, ae, le, mu, G):
    """``gap.gap_for_inductance_m`` for arrays: the smallest gap at which L falls to the target.

    L(lg) starts at mu0 N^2 Ae mu/le, rises a little at microscopic gaps (McLyman's F has an infinite
    slope at zero) and then falls: the crossing from above is unique, found by bisection on a log scale
    over [1e-12 x 2G, 2G]. NaN where even no gap cannot reach L (the scalar solver's None); where L(2G) is
    still above the target the fringing factor is 1 and the closed form applies, as in the scalar solver."""
    n = np.asarray(turns, dtype=float)
    k = wiremod.MU0_H_M * n * n * ae
    out = np.full(n.shape, np.nan)
    reach = target_h <= k * mu / le
    upper = 2.0 * G
    l_up = np.asarray(gapmod.inductance_gapped_h(n, ae, le, mu, upper, G))
    closed = reach & (l_up - target_h > 0.0)
    out[closed] = (k / target_h - le / mu)[closed]
    b = np.flatnonzero(reach & ~closed)
    if b.size:
        lo = np.log(1e-12 * upper[b])
        hi = np.log(upper[b])
        args = (n[b], ae[b], le[b], mu[b])
        for _ in range(64):
            mid = 0.5 * (lo + hi)
            above = np.asarray(gapmod.inductance_gapped_h(*args, np.exp(mid), G[b])) >= target_h
            lo = np.where(above, mid, lo)
            hi = np.where(above, hi, mid)
        out[b] = np.exp(0.5 * (lo + hi))
    return out


def _take(d, idx):
    if isinstance(d, dict):
        return {k: _take(v, idx) for k, v in d.items()}
    if isinstance(d, list):
        return [_take(v, idx) for v in d]
    return d[idx]


def _put(d, idx, sub) -> None:
    if isinstance(d, dict):
        for k in d:
            if isinstance(d[k], (dict, list)):
                _put(d[k], idx, sub[k])
            else:
                d[k][idx] = sub[k]
    else:
        for a, b in zip(d, sub):
            _put(a, idx, b) if isinstance(a, (dict, list)) else a.__setitem__(idx, b)


def _build_rows(ctx: _Ctx, ci, opts, turns: list) -> dict:
    """Lay out every winding in build order (one section each), as the engine's ``_lay_out``."""
    ct = ctx.ct
    fm = {k: ct[k][ci] for k in ("kind", "tube_w", "tube_d", "breadth", "od", "id", "core_h")}
    avail = ct["avail"][ci]
    limit = (avail * (1.0 + FIT_SLACK) + 1e-12) / ctx.bulge
    lt, wt, wrap, margin = ct["lt"][ci], ct["wt"][ci], ct["wrap"][ci], ct["margin"][ci]
    h = np.zeros(len(ci))
    ok = np.ones(len(ci), dtype=bool)
    secs = []
    last = len(opts) - 1
    tiw_margin = ctx.req.kind == "transformer" and ctx.req.rating == "reinforced"
    for j, (opt, n) in enumerate(zip(opts, turns)):
        m = margin
        if tiw_margin and j > 0:
            m = np.where(opt["kind"] == KIND_CODE["tiw"], 0.0, margin)
        sec = wind_section_vec(fm, n, opt["pitch"], opt["lh"], h, m, lt, opt["foil"], limit)
        ok &= sec["ok"]
        h = sec["end"] + (wrap if j == last else wt)
        secs.append(sec)
    bulged = h * ctx.bulge
    return {"secs": secs, "height": h, "ok": ok, "fits": ok & (bulged <= avail + 1e-12),
            "fits_slack": ok & (bulged <= avail * (1.0 + FIT_SLACK) + 1e-12),
            "fill": bulged / np.maximum(avail, 1e-12)}


def _gather(table: dict, idx) -> dict:
    return {k: v[idx] for k, v in table.items()}


def _finish_rows(ctx: _Ctx, ci, opts, build, hot_c, rise_k, sat_flags) -> tuple:
    """(strict flags, flags with the slack, mass, cost, outline volume) of evaluated rows."""
    req, ct = ctx.req, ctx.ct
    base = ctx.core_flags[ci] | sat_flags
    cls = ct["bob_cls"][ci].copy()
    for opt in opts:
        cls = np.minimum(cls, opt["cls"])
    copper_mass = np.zeros(len(ci))
    wire_cost = np.zeros(len(ci))
    for opt, sec in zip(opts, build["secs"]):
        m = opt["mass_per_m"] * (sec["length"] + 2.0 * ctx.lead)
        copper_mass += m
        wire_cost += m * opt["price"]
    mass = ct["mass"][ci] + copper_mass
    cost = ct["price"][ci] + wire_cost
    if req.max_mass_kg is not None:
        base = base | np.where(mass > req.max_mass_kg, F_MASS, 0)
    a, b, c = ct["len"][ci].copy(), ct["wid"][ci].copy(), ct["hgt"][ci].copy()
    tor = np.flatnonzero(~ct["fixed_outline"][ci])
    if tor.size:
        for i in np.unique(ci[tor]):
            sel = tor[ci[tor] == i]
            a[sel], b[sel], c[sel] = outline_m(ctx.choices[i].core, None, build["height"][sel] * ctx.bulge)
    for lim, dim in ((req.max_length_m, a), (req.max_width_m, b), (req.max_height_m, c)):
        if lim is not None:
            base = base | np.where(dim > lim + 1e-12, F_SIZE, 0)
    out = []
    for slack, fits in ((0.0, build["fits"]), (TEMP_SLACK_K, build["fits_slack"])):
        fl = base | np.where(fits, 0, F_FIT)
        fl |= np.where(hot_c > req.insulation_class_c + slack, F_HOT, 0)
        if req.max_rise_k is not None:
            fl |= np.where(rise_k > req.max_rise_k + slack, F_RISE, 0)
        fl |= np.where(cls + slack < hot_c, F_CLASS, 0)
        out.append(fl)
    return out[0], out[1], mass, cost, a * b * c


def _core_alone_ok(ctx, core_w, surface) -> np.ndarray:
    """Rows whose core loss alone leaves the hot spot and the rise within the limits (with the slack):
    copper only adds to it, so the others are too hot whatever the winding."""
    hot, rise = thermal_state_vec(ctx, core_w, surface)
    ok = hot <= ctx.req.insulation_class_c + TEMP_SLACK_K
    if ctx.req.max_rise_k is not None:
        ok &= rise <= ctx.req.max_rise_k + TEMP_SLACK_K
    return ok


def _thermal_loop(ctx, rows, copper, core_w, surface, hot, extra=None):
    """The engine's thermal loop, row by row: the hot spot from the loss, the loss again at that hot spot,
    until a row's hot spot moves less than 0.02 K (that row then stops, as the engine stops a design).
    ``copper(hot)`` gives every row's copper loss; ``extra(total_w, rows)`` updates state between steps.
    Returns (copper loss, hot spot, rise) with the loss at the final hot spot."""
    hot = np.array(hot, dtype=float)
    cu = copper(hot)
    rise = np.zeros(rows)
    active = np.ones(rows, dtype=bool)
    for _ in range(60):
        new, new_rise = thermal_state_vec(ctx, cu + core_w, surface)
        if extra is not None:
            extra(cu + core_w, active)
        settled = np.abs(new - hot) < 0.02
        hot = np.where(active, new, hot)
        rise = np.where(active, new_rise, rise)
        cu = np.where(active, copper(hot), cu)
        active &= ~settled
        if not active.any():
            break
    return cu, hot, rise


def _eval_transformer(ctx: _Ctx, ci, oi: list, np_, t_start) -> dict:
    """One pass of the transformer model over rows at primary turns ``np_``; secondary turns and the AC
    factor at ``t_start`` (per row), then the thermal loop. Rows whose primary alone cannot be wound, or
    already outgrows the window, are marked not fitting and skip the rest."""
    rows = len(ci)
    g0 = ctx.groups[0]
    first = _build_rows(ctx, ci, [_gather(ctx.opt_tables[g0], oi[g0])], [np_])
    sec = first["secs"][0]
    avail = ctx.ct["avail"][ci]
    alive = sec["ok"] & (sec["end"] * ctx.bulge <= avail * (1.0 + FIT_SLACK) + 1e-12) & (np_ <= MAX_TURNS)
    if alive.all():
        return _eval_transformer_rows(ctx, ci, oi, np_, t_start)
    a = np.flatnonzero(alive)
    t_start = np.broadcast_to(np.asarray(t_start, dtype=float), (rows,))
    sub = _eval_transformer_rows(ctx, ci[a], [o[a] for o in oi], np_[a], t_start[a]) if a.size else None
    dead_flags = ctx.core_flags[ci] | F_FIT
    fill = np.where(sec["ok"], sec["end"] * ctx.bulge / np.maximum(avail, 1e-12), np.inf)
    out = {"flags": dead_flags, "flags_slack": dead_flags.copy(), "fill": fill, "np": np.asarray(np_, float).copy(),
           "b_limit": np.ones(rows)}
    keys = (["total_w", "copper_w", "core_w", "hot_c", "rise_k", "mass_kg", "cost", "size_m3", "b_pk_max"]
            + [f"{k}{j}" for j in range(len(ctx.req.windings)) for k in ("n", "len", "fr")])
    for k in keys:
        out[k] = np.full(rows, np.inf)
    out["b_pk_max"][:] = 0.0
    if sub is not None:
        for k, v in out.items():
            v[a] = sub[k]
    return out


def _eval_transformer_rows(ctx: _Ctx, ci, oi: list, np_, t_start) -> dict:
    from .design.transformer import _magnetizing

    req, ct = ctx.req, ctx.ct
    f = req.frequency_hz
    rows = len(ci)
    opts = [_gather(ctx.opt_tables[g], oi[g]) for g in ctx.groups]
    t_start = np.broadcast_to(np.asarray(t_start, dtype=float), (rows,)).copy()
    ae, le, mi = ct["ae"][ci], ct["le"][ci], ct["mat"][ci]
    lm = faraday.magnetizing_inductance_h(np_, ae, le, ct["mu_w"][ci])
    imag = np.asarray(_magnetizing(ctx.ns, ctx.vp, lm)[0])
    windings = req.windings
    loads = [j for j, w in enumerate(windings) if w.role != "primary"]
    turns = [np_.copy() if w.role == "primary" else np.maximum(1.0, np.ceil(np_ * w.voltage_v / ctx.vp - 1e-9))
             for w in windings]
    by_name = {w.name: j for j, w in enumerate(windings)}
    # secondary turns raised for the resistive drop at full load, as the engine (up to 12 passes; only the
    # rows that changed are laid out again)
    build = _build_rows(ctx, ci, opts, turns)
    todo = np.arange(rows)
    for _ in range(12):
        ok_t = build["ok"][todo]
        lengths = [s["length"][todo] + 2.0 * ctx.lead for s in build["secs"]]
        tt = [t[todo] for t in turns]
        np_t, ts = np_[todo], t_start[todo]
        rp = _resistance(_take(opts[0], todo), lengths[0], ts)
        # the primary carries every load's current referred through its ratio: its drop is shared (engine)
        i_ref = sum(windings[j].load_current_a * tt[j] / np_t for j in loads)
        v_prim = ctx.vp - i_ref * rp
        changed = np.zeros(todo.size, dtype=bool)
        for j in loads:
            w = windings[j]
            rs = _resistance(_take(opts[j], todo), lengths[j], ts)
            v_loaded = tt[j] / np_t * v_prim - w.load_current_a * rs
            need = ok_t & (v_loaded < w.voltage_v - 1e-9) & (tt[j] <= MAX_TURNS)
            add = np.maximum(1.0, np.ceil((w.voltage_v - v_loaded) / (v_prim / np_t) - 1e-9))
            tt[j] = np.where(need, tt[j] + add, tt[j])
            changed |= need
        for j in loads:
            w = windings[j]
            if w.match:
                k = by_name[w.match]
                mx = np.maximum(tt[j], tt[k])
                changed |= (tt[j] != mx) | (tt[k] != mx)
                tt[j], tt[k] = mx, mx.copy()
        for j in range(len(turns)):
            turns[j][todo] = tt[j]
        todo = todo[changed]
        if not todo.size:
            break
        _put(build, todo, _build_rows(ctx, ci[todo], _take(opts, todo), [t[todo] for t in turns]))
    lengths = [s["length"] + 2.0 * ctx.lead for s in build["secs"]]
    delta = np.asarray(wiremod.skin_depth_m(f, wiremod.resistivity_ohm_m(t_start)))
    mmf = np.zeros(rows)
    frs = []
    eta = np.full(rows, req.efficiency_guess)
    ip = np.hypot(ctx.p_out / eta / ctx.vp, imag)
    b_pk = np.asarray(faraday.b_peak_t(ctx.vp, f, np_, ae, req.waveform, req.duty))
    core_w = _core_loss_vec(ctx, mi, b_pk, req.waveform) * ct["ve"][ci]
    # the AC factor only where it can matter: rows that fit and that the core loss alone does not overheat
    live = np.flatnonzero(build["fits_slack"] & _core_alone_ok(ctx, core_w, ct["surface"][ci]))
    for j, (w, opt, sec) in enumerate(zip(windings, opts, build["secs"])):
        cur = ip if w.role == "primary" else w.load_current_a
        f_end = mmf + (1.0 if w.role == "primary" else -1.0) * turns[j] * cur
        fr = np.ones(rows)
        if live.size:
            fr[live] = section_fr_vec(_take(opt, live), _take(sec, live), delta[live], mmf[live], f_end[live],
                                      ctx.harm)
        frs.append(fr)
        mmf = f_end
    b_pk_max = np.asarray(faraday.b_peak_t(ctx.vp_max, f, np_, ae, req.waveform, req.duty))
    state = {"ip": ip}

    def copper(hot):
        total = np.zeros(rows)
        for _j, (w, opt, length, fr) in enumerate(zip(windings, opts, lengths, frs)):
            i = state["ip"] if w.role == "primary" else w.load_current_a
            total += i * i * _resistance(opt, length, hot) * fr
        return total

    def efficiency(total_w, active):
        eta = ctx.p_out / (ctx.p_out + total_w)
        state["ip"] = np.where(active, np.hypot(ctx.p_out / eta / ctx.vp, imag), state["ip"])

    cu, hot, rise = _thermal_loop(ctx, rows, copper, core_w, ct["surface"][ci], t_start.copy(), efficiency)
    limit = ctx._swing(flux_limit_vec(ctx, mi, hot), mi)
    sat = np.where(b_pk_max > limit * 1.0005, F_SAT, 0)
    if req.waveform == "unipolar":
        bsat = b_sat_vec(ctx.mats["b25"][mi], ctx.mats["b100"][mi], hot)
        sat |= np.where(b_pk_max + ctx.mats["b_r"][mi] > bsat, F_SAT, 0)
    for t in turns:       # the engine refuses more turns than it winds
        sat |= np.where(t > MAX_TURNS, F_FIT, 0)
    flags, slack, mass, cost, size = _finish_rows(ctx, ci, opts, build, hot, rise, sat)
    res = {"flags": flags, "flags_slack": slack, "total_w": cu + core_w, "copper_w": cu, "core_w": core_w,
           "hot_c": hot, "rise_k": rise, "fill": build["fill"], "mass_kg": mass, "cost": cost, "size_m3": size,
           "np": np.asarray(np_, dtype=float).copy(), "b_pk_max": b_pk_max, "b_limit": limit}
    for j, t in enumerate(turns):
        res[f"n{j}"] = t
        res[f"len{j}"] = lengths[j]
        res[f"fr{j}"] = frs[j]
    return res


def _eval_choke(ctx: _Ctx, ci, oi: list, mag: dict, t_start) -> dict:
    """One pass of the choke model over rows with magnetics ``mag`` (per row); AC factor at ``t_start``."""
    req, ct = ctx.req, ctx.ct
    rows = len(ci)
    opts = [_gather(ctx.opt_tables[0], oi[0])]
    n = mag["turns"]
    t_start = np.broadcast_to(np.asarray(t_start, dtype=float), (rows,)).copy()
    build = _build_rows(ctx, ci, opts, [n])
    length = build["secs"][0]["length"] + 2.0 * ctx.lead
    delta = np.asarray(wiremod.skin_depth_m(req.frequency_hz, wiremod.resistivity_ohm_m(t_start)))
    core_w = mag["pv"] * ct["ve"][ci]
    fr = np.ones(rows)
    live = np.flatnonzero(build["fits_slack"] & _core_alone_ok(ctx, core_w, ct["surface"][ci]))
    if live.size:
        fr[live] = section_fr_vec(_take(opts[0], live), _take(build["secs"][0], live), delta[live],
                                  np.zeros(live.size), n[live] * ctx.i_rms, ctx.harm)

    def copper(hot):
        r = _resistance(opts[0], length, hot)
        return ctx.i_dc ** 2 * r + ctx.i_ac ** 2 * r * fr

    cu, hot, rise = _thermal_loop(ctx, rows, copper, core_w, ct["surface"][ci], t_start.copy())
    mi = ct["mat"][ci]
    bsat = b_sat_vec(ctx.mats["b25"][mi], ctx.mats["b100"][mi], hot)
    sat = np.where(mag["b_max"] > bsat, F_SAT, 0) | np.where(n > MAX_TURNS, F_FIT, 0)
    flags, slack, mass, cost, size = _finish_rows(ctx, ci, opts, build, hot, rise, sat)
    return {"flags": flags, "flags_slack": slack, "total_w": cu + core_w, "copper_w": cu, "core_w": core_w,
            "hot_c": hot, "rise_k": rise, "fill": build["fill"], "mass_kg": mass, "cost": cost, "size_m3": size,
            "np": n.astype(float).copy(), "b_pk_max": mag["b_max"].copy(), "b_limit": bsat, "n0": n.astype(float).copy(),
            "len0": length, "fr0": fr, "gap": mag["gap"].copy()}


def _merge(res: dict, idx, sub: dict, take) -> None:
    rows = idx[take]
    for k, v in res.items():
        if k in sub:
            v[rows] = sub[k][take]


def evaluate_rows(ctx: _Ctx, ci, oi: list, second_pass: bool = True) -> dict:
    """The vectorised model over rows (core choice index ``ci``, option index per group ``oi``).

    Pass 1 at the first-guess temperature; above 1 kHz a transformer row is also tried at the analytic
    least-loss primary turns; rows that pass (with the slack) are evaluated again with turns, gap and AC
    factor at the temperature pass 1 settled at, as the engine's thermal loop ends."""
    ci = np.asarray(ci, dtype=np.int64)
    oi = [np.asarray(o, dtype=np.int64) for o in oi]
    t0 = ctx.t0.hot_c
    if ctx.req.kind == "transformer":
        res = _eval_transformer(ctx, ci, oi, ctx.np0[ci], t0)
        if ctx.req.frequency_hz >= 1000.0:
            beta = ctx.mats["beta"][ctx.ct["mat"][ci]]
            with np.errstate(divide="ignore", invalid="ignore"):
                ratio = (beta * res["core_w"] / (2.0 * res["copper_w"])) ** (1.0 / (beta + 2.0))
            ratio = np.clip(np.nan_to_num(ratio, nan=1.0, posinf=3.0), 1.0, 3.0)
            n1 = np.ceil(ctx.np0[ci] * ratio - 1e-9)
            again = np.flatnonzero(((res["flags_slack"] & F_FIT) == 0) & (n1 > res["np"]))
            if again.size:
                sub = _eval_transformer(ctx, ci[again], [o[again] for o in oi], n1[again], t0)
                better = ((sub["flags_slack"] & F_FIT) == 0) & (sub["total_w"] < res["total_w"][again])
                _merge(res, again, sub, better)
        if second_pass:
            near = np.flatnonzero(res["flags_slack"] == 0)
            if near.size:
                sub = _eval_transformer(ctx, ci[near], [o[near] for o in oi], res["np"][near], res["hot_c"][near])
                _merge(res, near, sub, np.ones(near.size, dtype=bool))
        return res
    mag = _take(ctx.mag0, ci)
    res = _eval_choke(ctx, ci, oi, mag, t0)
    if second_pass:
        near = np.flatnonzero(res["flags_slack"] == 0)
        if near.size:
            hot = res["hot_c"][near]
            sub = _eval_choke(ctx, ci[near], [o[near] for o in oi], choke_magnetics(ctx, ci[near], hot), hot)
            _merge(res, near, sub, np.ones(near.size, dtype=bool))
    return res


# ================================================================================================ draft spec

def _y(value, flow: bool = False) -> str:
    """A YAML scalar: plain where YAML reads it back as the same text, else quoted."""
    import yaml

    text = str(value)
    plain = text and text == text.strip() and not any(ch in text for ch in "#:'\"\n\t&*!|>%@`") \
        and text[0] not in "-?[]{},"
    if plain and flow and any(ch in text for ch in ",[]{}"):
        plain = False
    if plain:
        try:
            plain = yaml.safe_load(text) == text
        except yaml.YAMLError:
            plain = False
    return text if plain else json.dumps(text, ensure_ascii=False)


def _mm(x: float) -> str:
    return f"{x * 1e3:.10g} mm"


def _pins(req: Requirement, choice: CoreChoice) -> list:
    """(start, finish) per winding: the primary on the first row of pins, the loads on the other row."""
    count = len(req.windings) if req.kind == "transformer" else 1
    if choice.bobbin is None:
        if req.kind == "inductor":
            return [("A", "B")]
        letters = ["H"] + list("XYZUVW")
        return [(f"{letters[i]}1", f"{letters[i]}2") for i in range(count)]
    pins = list(choice.bobbin.pins)
    if choice.bobbin.pin_rows == 2 and len(pins) >= 4:
        half = len(pins) // 2
        side_a, side_b = pins[:half], pins[half:]
    else:
        side_a, side_b = pins, []
    rest = side_b + side_a[2:]
    out = [(side_a[0], side_a[1])]
    for i in range(1, count):
        out.append((rest[2 * i - 2], rest[2 * i - 1]))
    return out


def draft_spec_text(req: Requirement, cat: Catalog, choice: CoreChoice, options: list, part: str,
                    note: str = "") -> str:
    """The draft spec (status draft, revision A) for one candidate: explicit core, stack, bobbin, wires and
    strands; turns, layers and gap left to the design engine, which ``specgen design`` runs the same way."""
    plan = choice.plan
    lines = []
    if note:
        lines += [f"# {line}" for line in note.splitlines()]
    lines += [f"part: {_y(part)}", f"title: {_y(req.title or req.summary())}", "revision: A", "status: draft"]
    if req.customer:
        lines.append(f"customer: {_y(req.customer)}")
    lines += [f"kind: {req.kind}", "", "core:", f"  id: {_y(choice.core.id)}"]
    if choice.stack_m:
        lines.append(f"  stack: {_mm(choice.stack_m)}")
    if choice.bobbin is not None:
        lines.append(f"  bobbin: {_y(choice.bobbin.id)}")
    mat = cat.materials[choice.core.material]
    if req.kind == "inductor" and not mat.is_powder:
        if choice.core.gappable:
            lines += ["  gap: auto", f"  gap_arrangement: {'centre' if choice.core.shape != 'EI' else 'spacer'}"]
        else:
            lines += ["  gap: none", "  gap_arrangement: none"]
    t = req.text
    lines += ["", "operating:", f"  frequency: {_y(t['frequency'])}"]
    if req.kind == "transformer":
        lines.append(f"  waveform: {req.waveform}")
        if req.waveform == "unipolar":
            lines.append(f"  duty: {req.duty!r}")
    if t.get("ambient"):
        lines.append(f"  ambient: {_y(t['ambient'])}")
    lines += [f"  cooling: {req.cooling}", f"  insulation_class: {req.insulation_class_c}"]
    if t.get("flux_limit"):
        lines.append(f"  flux_limit: {_y(t['flux_limit'])}")
    if req.efficiency is not None:
        lines.append(f"  efficiency: {req.efficiency!r}")
    if req.kind == "inductor":
        lines += ["", "inductor:", f"  inductance: {_y(t['inductor.inductance'])}",
                  f"  current: {_y(t['inductor.current'])}"]
        if t.get("inductor.ripple"):
            lines.append(f"  ripple: {_y(t['inductor.ripple'])}")
        if t.get("inductor.current_peak"):
            lines.append(f"  current_peak: {_y(t['inductor.current_peak'])}")
        lines.append(f"  duty: {req.duty!r}")
    pins = _pins(req, choice)
    lines += ["", "windings:"]
    wl = req.windings if req.kind == "transformer" else [None]
    diam = 0.0
    for w, opt, (p1, p2) in zip(wl, options, pins):
        diam = max(diam, opt.wire.overall_diameter_m or opt.wire.overall_thickness_m or 0.0)
        if w is None:
            lines += ["  - name: L", "    role: main"]
        else:
            lines += [f"  - name: {_y(w.name)}", f"    role: {w.role}"]
            for key in ("voltage", "voltage_min", "voltage_max", "current", "va"):
                if w.text.get(key):
                    lines.append(f"    {key}: {_y(w.text[key])}")
            if w.match:
                lines.append(f"    match: {_y(w.match)}")
        lines += [f"    wire: {_y(opt.wire.id)}", f"    strands: {opt.strands}", f"    start: {json.dumps(p1)}",
                  f"    finish: {json.dumps(p2)}", "    direction: cw"]
        if (req.kind == "transformer" and req.rating == "reinforced" and w is not None and w.role != "primary"
                and opt.wire.kind == "tiw" and choice.bobbin is not None):
            lines.append("    margin: 0 mm   # triple-insulated wire carries the reinforced insulation")
    lines += ["", "insulation:", f"  layer_tape: {{tape: {plan['layer_tape']}, layers: 1}}"]
    if req.kind == "transformer":
        lines.append(f"  winding_tape: {{tape: {plan['winding_tape']}, layers: {plan['winding_tape_layers']}}}")
    lines.append(f"  outer_wrap: {{tape: {plan['outer_wrap']}, layers: {plan['outer_wrap_layers']}}}")
    if plan["margin_m"] > 0 and choice.bobbin is not None:
        lines.append(f"  margin: {_mm(plan['margin_m'])}")
        if plan["margin_tape"]:
            lines.append(f"  margin_tape: {plan['margin_tape']}")
    slv = _sleeving_for(cat, req.insulation_class_c, diam)
    if slv:
        lines.append(f"  sleeving: {slv}")
    if plan["varnish"]:
        lines.append(f"  varnish: {plan['varnish']}")
    wv = f"{req.working_voltage_v:.10g} V"
    barriers = []
    if req.kind == "transformer":
        p = req.primary
        others = "+".join(w.name for w in req.loads)
        barriers.append((f"[{_y(p.name, True)}, {_y(others, True)}]", req.rating))
        barriers.append(("[all, core]", req.to_core))
    elif req.to_core != "functional":
        barriers.append(("[all, core]", req.to_core))
    if barriers:
        lines.append("  barriers:")
        for between, rating in barriers:
            lines.append(f"    - {{between: {between}, rating: {rating}, working_voltage: {wv}}}")
    if req.notes:
        lines += ["", f"notes: {json.dumps(req.notes, ensure_ascii=False)}"]
    return "\n".join(lines) + "\n"


# ================================================================================================ results

@dataclass
class Candidate:
    """A candidate the design engine ran: its choices, the Design, and the numbers shown."""
    row: int
    choice: CoreChoice
    options: list                  # WireOption per winding
    spec_text: str
    design: object | None          # Design, None if the engine refused it (SpecError)
    failed: list                   # reasons (check messages, limits)
    cost: Decimal | None
    size_m3: float
    outline_m: tuple
    mass_kg: float
    vector: dict                   # the vector stage's numbers for the same row (for comparison)

    @property
    def feasible(self) -> bool:
        return self.design is not None and not self.failed

    def key(self, sort: str) -> tuple:
        d = self.design
        if sort == "cost":
            return (self.cost, d.losses.total_w)
        if sort == "loss":
            return (d.losses.total_w, self.cost)
        if sort == "size":
            return (self.size_m3, self.cost)
        return (d.temperature_rise_k, self.cost)

    def summary(self) -> dict:
        d = self.design
        out = {"core": self.choice.core.id, "family": self.choice.family,
               "stack_mm": self.choice.stack_m * 1e3 if self.choice.stack_m else None,
               "bobbin": self.choice.bobbin.id if self.choice.bobbin else None,
               "windings": [{"name": w.name, "turns": w.turns, "wire": w.wire, "strands": w.strands,
                             "layers": w.layers, "copper_loss_w": w.copper_loss_w} for w in d.windings],
               "loss_w": d.losses.total_w, "copper_w": d.losses.copper_w, "core_w": d.losses.core_w,
               "hot_spot_c": d.hot_spot_c, "rise_k": d.temperature_rise_k, "b_peak_max_t": d.b_peak_max_t,
               "fill": d.build.fill_fraction, "mass_kg": self.mass_kg, "cost": str(self.cost),
               "outline_mm": [round(x * 1e3, 2) for x in self.outline_m], "size_cm3": self.size_m3 * 1e6,
               "efficiency": d.efficiency, "warnings": [c.message for c in d.warnings]}
        if d.inductor is not None:
            out["inductance_uh"] = d.inductor.inductance_at_full_bias_h * 1e6
            out["gap_mm"] = d.inductor.gap_m * 1e3 if d.inductor.gap_m else None
        return out


@dataclass
class FamilyFailure:
    family: str
    cores: int
    candidates: int
    reasons: dict                  # reason -> how many core choices fail for it (their closest candidate's)
    detail: str


@dataclass
class SearchResult:
    requirement: Requirement
    sort: str
    top: list                      # Candidates, best first (engine numbers)
    pareto: list                   # Candidates on the loss-cost front, by cost
    families: list                 # FamilyFailure for families with no feasible member
    stats: dict


def material_cost(design, cat: Catalog) -> Decimal:
    """Material cost per unit (Decimal): the quote's material lines when the quote module is there,
    else wire mass x price x (1 + scrap) + core + bobbin from catalogue prices."""
    try:
        from . import quote

        return quote.material_total(quote.material_lines(design, cat))
    except (ImportError, AttributeError):
        pass
    total = Decimal(0)
    scrap = Decimal(1) + cat.shop.scrap_wire
    for m in design.materials:
        if m.kind == "wire":
            total += Decimal(repr(m.mass_kg)) * cat.wires[m.id].price_per_kg * scrap
        elif m.kind in ("core", "laminations"):
            c = cat.cores[m.id]
            total += Decimal(repr(m.mass_kg)) * c.price if c.price_unit == "kg" else Decimal(design.core.count) * c.price
        elif m.kind == "bobbin":
            total += cat.bobbins[m.id].price * Decimal(int(m.quantity))
    return total


def _limit_failures(req: Requirement, d, outline, mass) -> list:
    out = []
    if req.max_rise_k is not None and d.temperature_rise_k > req.max_rise_k:
        out.append(f"rise {d.temperature_rise_k:.0f} K exceeds the {req.max_rise_k:g} K allowed")
    if req.max_mass_kg is not None and mass > req.max_mass_kg:
        out.append(f"mass {mass * 1e3:.0f} g exceeds the {req.max_mass_kg * 1e3:g} g allowed")
    for lim, dim, what in ((req.max_length_m, outline[0], "length"), (req.max_width_m, outline[1], "width"),
                           (req.max_height_m, outline[2], "height")):
        if lim is not None and dim > lim + 1e-12:
            out.append(f"outline {what} {dim * 1e3:.1f} mm exceeds the {lim * 1e3:g} mm allowed")
    return out


def run_candidate(req: Requirement, cat: Catalog, choice: CoreChoice, options: list, part: str, row: int = -1,
                  vector: dict | None = None, note: str = "") -> Candidate:
    """Write the draft spec for one candidate and run the design engine on it (the scalar stage)."""
    from .api import run_design
    from .design.spec import load_spec_text

    text = draft_spec_text(req, cat, choice, options, part, note)
    try:
        d = run_design(load_spec_text(text, f"{part}.yaml"), cat)
    except SpecError as err:
        return Candidate(row, choice, options, text, None, [err.message], None, math.inf, (), math.inf, vector or {})
    mass = d.core.mass_kg + sum(w.mass_kg for w in d.windings)
    a, b, c = outline_m(choice.core, choice.stack_m, d.build.bulged_height_m)
    outline = (float(a), float(b), float(c))
    failed = [c.message for c in d.failed] + _limit_failures(req, d, outline, mass)
    return Candidate(row, choice, options, text, d, failed, material_cost(d, cat), outline[0] * outline[1] * outline[2],
                     outline, mass, vector or {})


# ================================================================================================ the search

class Progress:
    """A one-line progress bar on a stream, drawn only once the work has taken ``after_s``."""

    def __init__(self, enabled: bool, stream=None, after_s: float = PROGRESS_AFTER_S, clock=time.monotonic,
                 width: int = 30):
        self.enabled, self.stream, self.after_s, self.clock, self.width = enabled, stream or sys.stderr, after_s, clock, width
        self.t0 = clock()
        self.drawn = False

    def __call__(self, stage: str, done: int, total: int) -> None:
        if not self.enabled or self.clock() - self.t0 < self.after_s:
            return
        frac = 0.0 if total <= 0 else min(1.0, done / total)
        filled = int(round(frac * self.width))
        self.stream.write(f"\r[{'#' * filled}{'.' * (self.width - filled)}] {frac:4.0%} {stage:<24}")
        self.stream.flush()
        self.drawn = True

    def close(self) -> None:
        if self.drawn:
            self.stream.write("\r" + " " * (self.width + 32) + "\r")
            self.stream.flush()
            self.drawn = False


def _groups(req: Requirement) -> list:
    """Option group per winding in build order: matched windings share their wire."""
    if req.kind == "inductor":
        return [0]
    group, out = {}, []
    for w in req.windings:
        key = w.match or w.name
        if key not in group:
            group[key] = len(group)
        out.append(group[key])
    return out


def area_product_needed_m4(req: Requirement, cat: Catalog, choices: list) -> np.ndarray:
    """The area product each core choice would need (McLyman), at the generous screen figures: window
    utilisation ``AP_KU``, current density ``J_HIGH`` x the shop's, and the material's flux limit at the
    first-guess hot spot. Transformer: Ap = Pt / (Kf Ku B f J). Choke: McLyman's energy form
    Ap = L I_pk I_rms / (B Ku J), i.e. area_product_m4 with Pt / (Kf f) = L I_pk I_rms."""
    from .design.engine import _flux_limit, _Thermal

    shop = cat.shop
    density = shop.current_density_a_m2.get(req.cooling, shop.current_density_a_m2["natural"])
    t0 = _Thermal(req.ambient_c + 40.0, req.ambient_c + 40.0 + shop.hotspot_margin_k, 40.0)
    ns = _engine_ns(req)
    b0 = np.array([_flux_limit(ns, cat, cat.materials[c.core.material], t0.hot_c)[0] for c in choices])
    j = J_HIGH * density
    if req.kind == "transformer":
        pt = sizing.transformer_apparent_power_w([w.voltage_v * w.load_current_a for w in req.loads],
                                                 req.efficiency_guess)
        if req.waveform == "unipolar":
            # V t_on = N dB Ae: 1/duty takes the form factor's place, with B the usable swing B_limit - B_r
            br = np.array([cat.materials[c.core.material].b_r_t for c in choices])
            return np.asarray(sizing.area_product_m4(pt, 1.0 / req.duty, AP_KU, np.maximum(b0 - br, 0.05 * b0),
                                                     req.frequency_hz, j))
        return np.asarray(sizing.area_product_m4(pt, faraday.FORM_FACTORS[req.waveform], AP_KU, b0,
                                                 req.frequency_hz, j))
    i_ac = req.ripple_a / math.sqrt(12.0)
    i_pk = max(req.current_peak_a or 0.0, req.current_dc_a + req.ripple_a / 2.0)
    i_rms = math.hypot(req.current_dc_a, i_ac)
    return np.asarray(sizing.area_product_m4(req.inductance_h * i_pk * i_rms, 1.0, AP_KU, b0, 1.0, j))


def prepare(req: Requirement, cat: Catalog, screen: bool = True, prune: bool = True) -> tuple:
    """Core choices, the area-product screen and the wire options.

    Returns (ctx or None, screened [(choice, Wa Ae, Ap needed)], stats, every core choice)."""
    choices = core_choices(req, cat)
    shop = cat.shop
    density = shop.current_density_a_m2.get(req.cooling, shop.current_density_a_m2["natural"])
    heavy = _heavy_wire_m(cat)
    ap_core = np.array([c.parts.wa_m2 * c.parts.ae_m2 for c in choices])
    need = area_product_needed_m4(req, cat, choices) if choices else np.zeros(0)
    small = (ap_core < need) if screen else np.zeros(len(choices), dtype=bool)
    screened = [(choices[i], float(ap_core[i]), float(need[i])) for i in np.flatnonzero(small)]
    kept = [choices[i] for i in np.flatnonzero(~small)]
    groups = _groups(req)
    options = []
    if req.kind == "transformer":
        done = set()
        for w, g in zip(req.windings, groups):
            if g in done:
                continue
            done.add(g)
            current = (req.output_va / req.efficiency_guess / req.primary.voltage_v if w.role == "primary"
                       else w.load_current_a)
            options.append(wire_options(cat, current, density, req.frequency_hz, skin_limited=True,
                                        allow_tiw=req.rating == "reinforced" and w.role != "primary", heavy_m=heavy))
    else:
        from .design.inductor import RIPPLE_SKIN_FRACTION

        i_ac = req.ripple_a / math.sqrt(12.0)
        i_rms = math.hypot(req.current_dc_a, i_ac)
        skin = req.current_dc_a <= 0 or i_ac / req.current_dc_a > RIPPLE_SKIN_FRACTION
        options.append(wire_options(cat, i_rms, density, req.frequency_hz, skin_limited=skin, allow_tiw=False,
                                    heavy_m=heavy))
    stats = {"core_choices": len(choices), "screened_out": len(screened), "kept": len(kept),
             "wire_options": [len(o) for o in options]}
    if not kept or any(not o for o in options):
        return None, screened, stats, choices
    ctx = _Ctx(req, cat, kept, groups, options)
    if not ctx.blocks:
        return None, screened, stats, choices
    t = time.perf_counter()
    ctx.rows_ci, ctx.rows_oi = _enumerate_rows(ctx, prune and req.kind == "transformer")
    stats["full_product"] = int(sum(c.size * int(np.prod([o.size for o in opts])) for c, opts in ctx.blocks))
    stats["prune_s"] = time.perf_counter() - t
    stats["thinned_cores"] = ctx.thinned
    return ctx, screened, stats, choices


def nondominated(x: np.ndarray) -> np.ndarray:
    """Mask over x[..., points, criteria] (lower is better) of the points no other point dominates (no
    worse in every criterion and not equal in all). Batched over leading axes; one criterion at a time,
    so the work is points^2 booleans per criterion."""
    x = np.asarray(x, dtype=float)
    m = x.shape[-2]
    le = np.ones(x.shape[:-2] + (m, m), dtype=bool)     # le[..., j, i]: j no worse than i everywhere
    eq = np.ones_like(le)
    for k in range(x.shape[-1]):
        xj = x[..., :, None, k]
        xi = x[..., None, :, k]
        le &= xj <= xi
        eq &= xj == xi
    return ~(le & ~eq).any(axis=-2)


def _winding_alone(ctx: _Ctx, g: int, cores: np.ndarray, opt_idx: np.ndarray) -> dict:
    """Each (core, option) of option group g wound alone from the tube: height, copper loss, cost at the
    first-guess temperature (turns before the drop compensation). The pre-pass of ``prune_options``."""
    from .design.transformer import _magnetizing

    req, ct = ctx.req, ctx.ct
    ci = np.repeat(cores, opt_idx.size)
    oi = np.tile(opt_idx, cores.size)
    opt = _gather(ctx.opt_tables[g], oi)
    j = ctx.groups.index(g)
    count = ctx.groups.count(g)
    np_ = ctx.np0[ci]
    t0 = ctx.t0.hot_c
    if req.kind == "transformer":
        w = req.windings[j]
        if w.role == "primary":
            lm = faraday.magnetizing_inductance_h(np_, ct["ae"][ci], ct["le"][ci], ct["mu_w"][ci])
            imag = np.asarray(_magnetizing(ctx.ns, ctx.vp, lm)[0])
            cur = np.hypot(ctx.p_out / req.efficiency_guess / ctx.vp, imag)
            turns = np_
        else:
            cur = np.full(ci.size, w.load_current_a)
            turns = np.maximum(1.0, np.ceil(np_ * w.voltage_v / ctx.vp - 1e-9))
    else:
        cur = np.full(ci.size, ctx.i_rms)
        turns = ctx.mag0["turns"][ci]
    fm = {k: ct[k][ci] for k in ("kind", "tube_w", "tube_d", "breadth", "od", "id", "core_h")}
    margin = ct["margin"][ci]
    if req.kind == "transformer" and req.rating == "reinforced" and j > 0:
        margin = np.where(opt["kind"] == KIND_CODE["tiw"], 0.0, margin)
    avail = ct["avail"][ci]
    limit = (avail * (1.0 + FIT_SLACK) + 1e-12) / ctx.bulge
    sec = wind_section_vec(fm, turns, opt["pitch"], opt["lh"], np.zeros(ci.size), margin, ct["lt"][ci],
                           opt["foil"], limit)
    length = sec["length"] + 2.0 * ctx.lead
    delta = float(wiremod.skin_depth_m(req.frequency_hz, wiremod.resistivity_ohm_m(t0)))
    fr = section_fr_vec(opt, sec, delta, np.zeros(ci.size), turns * cur, ctx.harm)
    if req.kind == "inductor":
        r = _resistance(opt, length, t0)
        loss = ctx.i_dc ** 2 * r + ctx.i_ac ** 2 * r * fr
    else:
        loss = cur * cur * _resistance(opt, length, t0) * fr
    fits = sec["ok"] & (sec["end"] <= limit) & (turns <= MAX_TURNS)
    return {"ci": ci, "oi": oi, "height": np.where(sec["ok"], sec["end"], np.inf), "loss": loss * count,
            "cost": opt["mass_per_m"] * length * opt["price"] * count, "cls": opt["cls"], "fits": fits}


def prune_options(ctx: _Ctx) -> list:
    """Per core choice, per option group: the options no other option of the same winding dominates.

    A winding option that is no taller, no lossier, no dearer and of no lower thermal class than another
    on the same core can only make every design it enters worse (the windings outside it start lower,
    so their turns are shorter): dropping the dominated ones leaves every sort key's best and the
    loss-cost front unchanged (up to the vector model's coupling between windings through efficiency and
    the drop compensation). Options that cannot be wound on the core even alone are dropped too, unless
    none can: then the shortest is kept so the core's failure is still evaluated and reported."""
    per_core = [[None] * len(ctx.opt_tables) for _ in ctx.choices]
    crit = [[None] * len(ctx.opt_tables) for _ in ctx.choices]
    for cores, opts in ctx.blocks:
        for g, idx in enumerate(opts):
            a = _winding_alone(ctx, g, cores, idx)
            k = idx.size
            shape = (cores.size, k)
            fits = a["fits"].reshape(shape)
            x = np.stack([a["height"], a["loss"], a["cost"], -a["cls"]], axis=1).reshape(shape + (4,))
            x = np.where(fits[..., None], x, np.inf)
            step = max(1, int(2e7 // max(k * k, 1)))
            for c0 in range(0, cores.size, step):
                keep = nondominated(x[c0:c0 + step]) & fits[c0:c0 + step]
                for n in range(keep.shape[0]):
                    c = cores[c0 + n]
                    sel = np.flatnonzero(keep[n]) if keep[n].any() else \
                        np.array([int(np.argmin(a["height"].reshape(shape)[c0 + n]))])
                    per_core[c][g] = idx[sel]
                    crit[c][g] = x[c0 + n][sel]
    return per_core, crit


def _thin(lists: list, crit: list, cap: int) -> list:
    """Fewer options per winding when their product on one core exceeds ``cap`` (four or more windings):
    each winding keeps its (height, loss) and (height, cost) fronts; if that is still too many, an even
    spread of them by height. An approximation, used only where the full product would not be evaluated
    in seconds; the search's stats say when it was."""
    out = []
    for idx, x in zip(lists, crit):
        if idx.size > 1 and np.isfinite(x).all():
            keep = nondominated(x[:, [0, 1]]) | nondominated(x[:, [0, 2]])
            idx, x = idx[keep], x[keep]
        out.append((idx, x))
    total = int(np.prod([o[0].size for o in out]))
    if total > cap:
        per = max(2, int(cap ** (1.0 / len(out))))
        thinned = []
        for idx, x in out:
            if idx.size > per:
                order = np.argsort(x[:, 0], kind="stable")
                pick = np.unique(np.linspace(0, idx.size - 1, per).round().astype(int))
                idx = idx[order[pick]]
            thinned.append(idx)
        return thinned
    return [o[0] for o in out]


ROWS_PER_CORE_MAX = 2000


def _enumerate_rows(ctx: _Ctx, prune: bool) -> tuple:
    """Every row's core choice index and option index per group (materialised int arrays)."""
    cis, ois = [], [[] for _ in ctx.opt_tables]
    ctx.thinned = 0
    if prune:
        per_core, crit = prune_options(ctx)
        for c, lists in enumerate(per_core):
            if any(x is None for x in lists):
                continue
            if int(np.prod([x.size for x in lists])) > ROWS_PER_CORE_MAX:
                lists = _thin(lists, crit[c], ROWS_PER_CORE_MAX)
                ctx.thinned += 1
            grids = np.meshgrid(*lists, indexing="ij")
            n = grids[0].size
            cis.append(np.full(n, c, dtype=np.int64))
            for g, grid in enumerate(grids):
                ois[g].append(grid.ravel())
    else:
        for cores, opts in ctx.blocks:
            grids = np.meshgrid(cores, *opts, indexing="ij")
            cis.append(grids[0].ravel())
            for g, grid in enumerate(grids[1:]):
                ois[g].append(grid.ravel())
    if not cis:
        return np.zeros(0, dtype=np.int64), [np.zeros(0, dtype=np.int64) for _ in ois]
    return np.concatenate(cis), [np.concatenate(o) for o in ois]


def total_rows(ctx: _Ctx) -> int:
    return int(ctx.rows_ci.size)


def iter_chunks(ctx: _Ctx, chunk: int = CHUNK_ROWS):
    """(core choice index, [option index per group]) arrays over every row, in chunks."""
    for start in range(0, ctx.rows_ci.size, chunk):
        sl = slice(start, start + chunk)
        yield ctx.rows_ci[sl], [o[sl] for o in ctx.rows_oi]


def run_vector_stage(ctx: _Ctx, progress=None, chunk: int = CHUNK_ROWS) -> dict:
    """Evaluate every row of the candidate set; concatenated result arrays with ``ci`` and ``o<g>``."""
    total = total_rows(ctx)
    parts: list = []
    done = 0
    for ci, oi in iter_chunks(ctx, chunk):
        res = evaluate_rows(ctx, ci, oi)
        res["ci"] = ci
        for g, o in enumerate(oi):
            res[f"o{g}"] = o
        parts.append(res)
        done += ci.size
        if progress:
            progress("vector evaluation", done, total)
    if not parts:
        return {}
    return {k: np.concatenate([p[k] for p in parts]) for k in parts[0]}


def _pareto_indices(cost, loss) -> np.ndarray:
    """Indices of the non-dominated points (lower cost and lower loss are better), in order of cost."""
    cost, loss = np.asarray(cost, dtype=float), np.asarray(loss, dtype=float)
    if cost.size == 0:
        return np.zeros(0, dtype=np.int64)
    order = np.lexsort((loss, cost))
    best = np.minimum.accumulate(loss[order])
    prev = np.concatenate([[np.inf], best[:-1]])
    return order[loss[order] < prev - 1e-12]


_SORT_KEYS = {"cost": ("cost", "total_w"), "loss": ("total_w", "cost"), "size": ("size_m3", "cost"),
              "rise": ("rise_k", "cost")}


def _scalar_value(c: Candidate, what: str) -> float:
    d = c.design
    return {"cost": float(c.cost), "total_w": d.losses.total_w, "size_m3": c.size_m3,
            "rise_k": d.temperature_rise_k}[what]


def search(req: Requirement, cat: Catalog, *, top: int = 5, sort: str = "cost", per_core: int = 2,
           part: str | None = None, progress=None, screen: bool = True, prune: bool = True) -> SearchResult:
    """The whole search (see the module docstring): screen, vectorised evaluation, engine confirmation.

    The engine runs on the rows the vector stage ranks best, the ranking corrected core by core as engine
    results come in (the vector cost leaves out tapes, sleeving and varnish, and its loss is simplified):
    every row whose corrected key beats the N-th best engine result is run, rows that pass only with the
    vector stage's slack included, until none is left or ``SCALAR_BUDGET`` designs have run. Then the rows
    on the vector stage's loss-cost front are run too, and the front is taken again over engine results."""
    if sort not in SORTS:
        raise SpecError(f"unknown sort '{sort}'; one of {', '.join(SORTS)}", path="--sort")
    if top < 1:
        raise SpecError("--top must be at least 1", path="--top")
    if per_core < 1:
        raise SpecError("--per-core must be at least 1", path="--per-core")
    t_start = time.perf_counter()
    part = part or req.part or req.id
    ctx, screened, stats, all_choices = prepare(req, cat, screen, prune)
    t_prep = time.perf_counter()
    res = run_vector_stage(ctx, progress) if ctx is not None else {}
    t_vec = time.perf_counter()
    rows = len(res.get("flags", ()))
    stats.update(rows=rows, prepare_s=t_prep - t_start, vector_s=t_vec - t_prep,
                 vector_feasible=int(np.count_nonzero(res["flags"] == 0)) if rows else 0)
    evaluated: dict = {}
    note = (f"Draft from `specgen search {Path(req.file).name}` ({req.summary()}).\n"
            f"Core, stack, bobbin, wires and strands are fixed here; turns, layers and gap come from the design "
            f"engine.")

    def run_row(r: int) -> Candidate:
        if r not in evaluated:
            ci = int(res["ci"][r])
            opts = [ctx.options[g][int(res[f"o{g}"][r])] for g in ctx.groups]
            vec = {k: float(res[k][r]) for k in ("total_w", "copper_w", "core_w", "hot_c", "rise_k", "fill",
                                                "mass_kg", "cost", "np")}
            evaluated[r] = run_candidate(req, cat, ctx.choices[ci], opts, part, r, vec, note)
            if progress:
                progress("design engine", len(evaluated), SCALAR_BUDGET)
        return evaluated[r]

    if rows:
        k1, k2 = _SORT_KEYS[sort]
        strict = res["flags"] == 0
        maybe = np.flatnonzero(res["flags_slack"] == 0)
        kind_of = ctx.ct["kind"] == 2
        done = np.zeros(rows, dtype=bool)
        batch_size = max(top, 4)
        # strict rows first; rows that pass only with the slack queue behind them; a row is run only while
        # its corrected key could still put it in the list
        while len(evaluated) < SCALAR_BUDGET and maybe.size:
            offset = _offsets(ctx, res, evaluated, k1, kind_of)
            est = res[k1][maybe] + offset[res["ci"][maybe]]
            ranked = _cap_per_core(sorted((c for c in evaluated.values() if c.feasible), key=lambda c: c.key(sort)),
                                   per_core)
            want = ~done[maybe]
            if len(ranked) >= top:
                want &= est < _scalar_value(ranked[top - 1], k1)
            full = np.zeros(len(ctx.choices), dtype=bool)
            for c in ranked:
                if sum(1 for o in ranked if o.choice is c.choice) >= per_core:
                    full[ctx.choices.index(c.choice)] = True
            want &= ~full[res["ci"][maybe]]
            cand = maybe[want]
            if not cand.size:
                break
            order = cand[np.lexsort((res[k2][cand], est[want], ~strict[cand]))]
            for r in order[:batch_size]:
                if len(evaluated) >= SCALAR_BUDGET:
                    break
                run_row(int(r))
                done[r] = True
        # the loss-cost front of the vector stage (cost corrected as above), confirmed by the engine
        feas = np.flatnonzero(strict)
        if feas.size:
            offset = _offsets(ctx, res, evaluated, "cost", kind_of)
            front = feas[_pareto_indices(res["cost"][feas] + offset[res["ci"][feas]], res["total_w"][feas])]
            if front.size > PARETO_MAX:
                front = front[np.unique(np.linspace(0, front.size - 1, PARETO_MAX).round().astype(int))]
            for r in front:
                run_row(int(r))
    t_scalar = time.perf_counter()
    feasible = [c for c in evaluated.values() if c.feasible]
    ranked = _cap_per_core(sorted(feasible, key=lambda c: c.key(sort)), per_core)[:top]
    pareto = []
    if feasible:
        idx = _pareto_indices([float(c.cost) for c in feasible], [c.design.losses.total_w for c in feasible])
        pareto = [feasible[i] for i in idx]
    families = _family_failures(req, ctx, res, screened, all_choices, evaluated)
    stats.update(scalar_evaluated=len(evaluated), scalar_feasible=len(feasible), scalar_s=t_scalar - t_vec,
                 total_s=time.perf_counter() - t_start)
    return SearchResult(req, sort, ranked, pareto, families, stats)


def _cap_per_core(cands: list, per_core: int) -> list:
    out, count = [], {}
    for c in cands:
        k = id(c.choice)
        if count.get(k, 0) < per_core:
            count[k] = count.get(k, 0) + 1
            out.append(c)
    return out


def _offsets(ctx: _Ctx, res: dict, evaluated: dict, what: str, toroid: np.ndarray) -> np.ndarray:
    """Per core choice: engine value minus vector value of ``what`` (median over its engine runs); for a
    core not yet run, the median over the run cores of the same kind (bobbin or toroid), else 0."""
    n = len(ctx.choices)
    off = np.zeros(n)
    per: dict = {}
    for r, c in evaluated.items():
        if c.design is None:
            continue
        per.setdefault(int(res["ci"][r]), []).append(_scalar_value(c, what) - float(res[what][r]))
    if not per:
        return off
    meds = {i: float(np.median(v)) for i, v in per.items()}
    for kind in (False, True):
        vals = [m for i, m in meds.items() if toroid[i] == kind]
        if vals:
            off[toroid == kind] = float(np.median(vals))
    for i, m in meds.items():
        off[i] = m
    return off


def _family_failures(req, ctx, res, screened, all_choices, evaluated) -> list:
    """For every family (shape / material) with no feasible member: why, with the closest candidate."""
    fam_cores: dict = {}
    for c in all_choices:
        fam_cores.setdefault(c.family, set()).add(c.core.id)
    feasible_fams = {c.choice.family for c in evaluated.values() if c.feasible}
    rows_by_fam: dict = {}
    flags = None
    if res:
        flags = res["flags"].copy()
        for r, c in evaluated.items():
            if not c.feasible:
                flags[r] |= F_ENGINE
        fam_idx = {f: i for i, f in enumerate(sorted(fam_cores))}
        fam_of_choice = np.array([fam_idx[c.family] for c in ctx.choices])
        fams = fam_of_choice[res["ci"]]
        order = np.argsort(fams, kind="stable")
        bounds = np.searchsorted(fams[order], np.arange(len(fam_idx) + 1))
        names = sorted(fam_cores)
        for k, fam in enumerate(names):
            sel = order[bounds[k]:bounds[k + 1]]
            if not sel.size:
                continue
            rows_by_fam[fam] = sel
            if (flags[sel] == 0).any():
                feasible_fams.add(fam)
    out = []
    for fam in sorted(fam_cores):
        if fam in feasible_fams:
            continue
        reasons: dict = {}
        details = []
        scr = [s for s in screened if s[0].family == fam]
        if scr:
            reasons[REASONS[F_WINDOW]] = len(scr)
            big = max(scr, key=lambda s: s[1])
            details.append(f"{len(scr)} core choice{'s' if len(scr) != 1 else ''} below the area product needed; "
                           f"the largest, {big[0].label}, has Wa·Ae {big[1] * 1e8:.3g} cm⁴ against {big[2] * 1e8:.3g} "
                           f"cm⁴ (McLyman, at Ku {AP_KU:g} and {J_HIGH:g} x the shop's current density)")
        sel = rows_by_fam.get(fam)
        n_rows = 0 if sel is None else int(sel.size)
        if n_rows:
            fl = flags[sel]
            bad = _badness(req, res, sel, fl)
            # each core choice is counted under the reasons of its own closest candidate
            order = np.lexsort((bad, res["ci"][sel]))
            first = order[np.concatenate([[True], np.diff(res["ci"][sel][order]) != 0])]
            for text, bits in REASON_GROUPS:
                cnt = int(np.count_nonzero(fl[first] & bits))
                if cnt:
                    reasons[text] = reasons.get(text, 0) + cnt
            best = sel[int(np.argmin(bad))]
            details.append(_describe_row(req, ctx, res, int(best), flags[best], evaluated.get(int(best))))
        out.append(FamilyFailure(fam, len(fam_cores[fam]), n_rows, reasons, "; ".join(details)))
    return out


F_ENGINE = 1 << 20
REASONS[F_ENGINE] = "refused by the design engine"
# how the report groups the flags: the brief's words (too small a window, saturates, too hot)
REASON_GROUPS = (("too small a window", F_WINDOW), ("too few pins on the bobbin", F_PINS),
                 ("cannot reach the inductance", F_GAP | F_L), ("does not fit", F_FIT), ("saturates", F_SAT),
                 ("too hot", F_HOT | F_CLASS | F_RISE), ("too heavy", F_MASS), ("too large", F_SIZE),
                 ("refused by the design engine", F_ENGINE))


def _badness(req, res, sel, fl) -> np.ndarray:
    """How far each row is from feasible: failed criteria first, then by how much (relative)."""
    pop = np.zeros(sel.size)
    for _text, bits in REASON_GROUPS:
        pop += (fl & bits) != 0
    pop += np.where(np.isfinite(res["hot_c"][sel]), 0.0, 2.0)   # not fully evaluated: the rest is unknown
    by = np.zeros(sel.size)
    fill = res["fill"][sel]
    by += np.where(fl & F_FIT, np.where(np.isfinite(fill) & (fill > 1.0), fill - 1.0, 10.0), 0.0)
    by += np.where(fl & F_SAT, np.maximum(res["b_pk_max"][sel] / np.maximum(res["b_limit"][sel], 1e-9) - 1.0, 0.0), 0.0)
    by += np.where(fl & (F_HOT | F_CLASS), np.maximum(res["hot_c"][sel] - req.insulation_class_c, 0.0) / 100.0, 0.0)
    if req.max_rise_k:
        by += np.where(fl & F_RISE, np.maximum(res["rise_k"][sel] / req.max_rise_k - 1.0, 0.0), 0.0)
    if req.max_mass_kg:
        by += np.where(fl & F_MASS, np.maximum(res["mass_kg"][sel] / req.max_mass_kg - 1.0, 0.0), 0.0)
    return pop * 1e3 + np.minimum(by, 999.0)


def _describe_row(req, ctx, res, r: int, fl: int, cand=None) -> str:
    ci = int(res["ci"][r])
    choice = ctx.choices[ci]
    opts = [ctx.options[g][int(res[f"o{g}"][r])] for g in ctx.groups]
    names = [w.name for w in req.windings] if req.kind == "transformer" else ["L"]
    wires = ", ".join(f"{n} {o.label}" for n, o in zip(names, opts))
    fl = int(fl)
    bits = []
    if fl & F_FIT:
        fill = res["fill"][r]
        if math.isfinite(fill) and fill > 1.0:
            bits.append(f"the build needs {fill * 100:.{1 if fill < 1.01 else 0}f} % of the window height")
        elif choice.bobbin is None:
            bits.append("the hole closes before the turns are laid")
        else:
            bits.append("a wire is wider than the bobbin's usable breadth, or the turns exceed what the engine winds")
    if fl & F_SAT:
        bits.append(f"B_pk {res['b_pk_max'][r]:.3g} T against {res['b_limit'][r]:.3g} T")
    if fl & (F_HOT | F_CLASS | F_RISE):
        bits.append(f"hot spot {res['hot_c'][r]:.0f} °C, rise {res['rise_k'][r]:.0f} K (class "
                    f"{req.insulation_class_c}" + (f", {req.max_rise_k:g} K allowed)" if req.max_rise_k else ")"))
    if fl & F_MASS:
        bits.append(f"{res['mass_kg'][r] * 1e3:.0f} g against {req.max_mass_kg * 1e3:g} g")
    if fl & F_SIZE:
        bits.append("outside the size limits")
    if fl & F_GAP:
        bits.append("the powder rolls off faster than turns add")
    if fl & F_PINS:
        bits.append("its bobbin has too few pins")
    if fl & F_L:
        bits.append("inductance short")
    if cand is not None and cand.failed:
        bits.append("design engine: " + cand.failed[0])
    return f"closest: {choice.label} with {wires}: " + "; ".join(bits)



# ================================================================================================ output

def result_json(sr: SearchResult, currency: str = "") -> dict:
    """The stable JSON of ``specgen search --json``: every number from the design engine's Designs."""
    req = sr.requirement
    return {
        "requirement": req.id, "file": req.file, "kind": req.kind, "summary": req.summary(), "sort": sr.sort,
        "currency": currency or None,
        "stats": {k: (round(v, 4) if isinstance(v, float) else v) for k, v in sr.stats.items()},
        "results": [dict(rank=i + 1, **c.summary()) for i, c in enumerate(sr.top)],
        "pareto": [c.summary() for c in sr.pareto],
        "families_without_feasible": [{"family": f.family, "cores": f.cores, "candidates": f.candidates,
                                       "reasons": f.reasons, "detail": f.detail} for f in sr.families],
    }


def _wires_text(c: Candidate) -> str:
    parts = []
    for w in c.design.windings:
        parts.append(f"{w.name} {w.turns} t {w.wire}" + (f" x{w.strands}" if w.strands > 1 else ""))
    d = c.design
    if d.inductor is not None and d.inductor.gap_m:
        parts.append(f"gap {d.inductor.gap_m * 1e3:.2f} mm")
    return "; ".join(parts)


def _table(headers, rows) -> list:
    cells = [list(map(str, headers))] + [[str(x) for x in r] for r in rows]
    widths = [max(len(r[i]) for r in cells) for i in range(len(headers))]
    out = []
    for n, r in enumerate(cells):
        out.append("  " + "  ".join(x.ljust(w) if i in (1, 2, 3) else x.rjust(w)
                                    for i, (x, w) in enumerate(zip(r, widths))).rstrip())
        if n == 0:
            out.append("  " + "  ".join("-" * w for w in widths))
    return out


def result_text(sr: SearchResult, currency: str = "") -> str:
    req, st = sr.requirement, sr.stats
    lines = [f"{req.id}: {req.title or req.summary()}", f"  {req.summary()}, ambient {req.ambient_c:g} °C, class "
             f"{req.insulation_class_c}" + (f", rise at most {req.max_rise_k:g} K" if req.max_rise_k else "")]
    if st.get("rows"):
        combos = st.get("full_product", st["rows"])
        pruned = (f", {st['rows']:,} after dropping wire options another option of the same winding beats in "
                  f"height, loss, cost and class" if st["rows"] < combos else "")
        lines.append(f"  {st['kept']} of {st['core_choices']} core/stack/bobbin choices past the area-product screen; "
                     f"{' x '.join(str(n) for n in st['wire_options'])} wire options: {combos:,} combinations{pruned}")
        if st.get("thinned_cores"):
            lines.append(f"  ({st['thinned_cores']} core choice(s) with more than {ROWS_PER_CORE_MAX:,} combinations "
                         f"kept only each winding's height-loss and height-cost fronts)")
        lines.append(f"  {st['rows']:,} candidates evaluated in {st['vector_s'] * 1e3:.0f} ms "
                     f"({st['rows'] / max(st['vector_s'], 1e-9):,.0f}/s); {st['vector_feasible']:,} feasible by the "
                     f"vector model; {st['scalar_evaluated']} run through the design engine")
    else:
        lines.append(f"  none of the {st['core_choices']} core/stack/bobbin choices passes the area-product screen")
    lines.append("")
    if sr.top:
        lines.append(f"Best {len(sr.top)} by {sr.sort} (every number from the design engine)")
        rows = []
        for i, c in enumerate(sr.top, 1):
            d = c.design
            rows.append([i, c.choice.core.id, f"{c.choice.stack_m * 1e3:g}" if c.choice.stack_m else "-",
                         c.choice.bobbin.id if c.choice.bobbin else "-", f"{c.cost:.2f}", f"{d.losses.total_w:.2f}",
                         f"{d.hot_spot_c:.0f}", f"{d.temperature_rise_k:.0f}", f"{c.mass_kg * 1e3:.0f}",
                         f"{c.size_m3 * 1e6:.0f}", f"{d.build.fill_fraction:.0%}", len(d.warnings)])
        hdr = ["#", "core", "stack mm", "bobbin", f"cost {currency}".strip(), "loss W", "hot °C", "rise K", "mass g",
               "size cm³", "fill", "warn"]
        table = _table(hdr, rows)
        lines += table[:2]
        for i, c in enumerate(sr.top):
            lines.append(table[2 + i])
            lines.append(f"        {_wires_text(c)}")
        lines.append("")
        lines.append("Pareto front, loss against material cost")
        for c in sr.pareto:
            lines.append(f"  {c.cost:>8.2f}  {c.design.losses.total_w:7.2f} W  {c.choice.label:<20} {_wires_text(c)}")
        lines.append("")
    else:
        lines.append("No candidate in the catalogue meets the requirement.")
        lines.append("")
    if sr.families:
        lines.append("Families with no feasible member")
        for f in sr.families:
            why = ", ".join(f"{k} ({v:,})" for k, v in sorted(f.reasons.items(), key=lambda kv: -kv[1]))
            cores = f"{f.cores} core{'s' if f.cores != 1 else ''}"
            lines.append(f"  {f.family} ({cores}; core choices by reason of their closest candidate): {why}")
            if f.detail:
                lines.append(f"      {f.detail}")
    return "\n".join(lines).rstrip()
