"""Design checks: pass / warn / fail, each one plain sentence a shop engineer acts on.

Thresholds marked 'common practice' are rules of thumb of the trade, not standards.
"""

from __future__ import annotations

import math

from ..physics import wire as wiremod
from ..standards.thermal_classes import LETTER_BY_LIMIT as IEC_60085
from .result import Check

KU_WARN_BOBBIN = 0.40        # window utilisation a bobbin winder reaches without trouble (common practice)
KU_WARN_TOROID = 0.35
MIN_TURNS_PER_LAYER = 3      # fewer turns per layer than this winds badly (common practice)
CLASS_WARN_K = 5.0           # hot spot within this of the class limit: warn
REINFORCED_TAPE_LAYERS = 3   # thin-sheet reinforced insulation: 3 layers, any two pass the test (common practice,
                             # from memory of IEC 61558-1 / IEC 62368-1; the applicable standard decides)


def _fmt_t(b: float) -> str:
    return f"{b:.3f} T" if b < 1.0 else f"{b:.2f} T"


def run_checks(*, spec, cat, parts, windings, build, built, temp, b_peak, b_peak_max, b_limit, losses, imag,
               states, inductor) -> list:
    out: list = []
    mat = parts.material
    from .engine import b_sat_at_t

    bsat = b_sat_at_t(mat, temp.hot_c)
    limit = b_limit[0]

    # -- saturation
    if spec.kind == "transformer":
        prim = next(w for w in windings if w.role == "primary")
        what = "ΔB" if spec.waveform == "unipolar" else "B_pk"
        if b_peak_max > limit * 1.0005:
            add = math.ceil(prim.turns * b_peak_max / limit) - prim.turns
            out.append(Check("fail", "saturation",
                             f"{what} {_fmt_t(b_peak_max)} at the top of the primary range exceeds the "
                             f"{_fmt_t(limit)} limit ({b_limit[1]}): add {add} primary turns or use a core with "
                             f"more Ae (the next stack)"))
        else:
            out.append(Check("pass", "saturation",
                             f"{what} {_fmt_t(b_peak_max)} at the top of the primary range, limit {_fmt_t(limit)} "
                             f"({b_limit[1]}); B_sat at {temp.hot_c:.0f} °C is {_fmt_t(bsat)}"))
        if spec.waveform == "unipolar" and b_peak_max + mat.b_r_t > bsat:
            out.append(Check("fail", "remanence",
                             f"a unipolar pulse starts from the residual flux: B_r {_fmt_t(mat.b_r_t)} + ΔB "
                             f"{_fmt_t(b_peak_max)} exceeds B_sat {_fmt_t(bsat)}: add turns, gap the core or add a "
                             f"reset winding"))
    else:
        ind = inductor
        if b_peak_max > bsat:
            # N = L I_pk / (B_limit Ae), plus one for the gap rounded down to the shop's step
            need = math.ceil(ind.inductance_h * ind.current_peak_a / (limit * parts.ae_m2) - 1e-9) + 1
            out.append(Check("fail", "saturation",
                             f"B_pk {_fmt_t(b_peak_max)} at the peak current {ind.current_peak_a:.3g} A exceeds "
                             f"B_sat {_fmt_t(bsat)} at {temp.hot_c:.0f} °C: use more turns with a larger gap, about "
                             f"{need} turns (or let specgen choose them), or a core with more Ae"))
        elif b_peak_max > limit * 1.0005:
            out.append(Check("warn", "saturation",
                             f"B_pk {_fmt_t(b_peak_max)} at the peak current is above the {_fmt_t(limit)} working "
                             f"limit ({b_limit[1]}) though below B_sat {_fmt_t(bsat)}"))
        else:
            out.append(Check("pass", "saturation",
                             f"B_pk {_fmt_t(b_peak_max)} at the peak current {ind.current_peak_a:.3g} A, limit "
                             f"{_fmt_t(limit)}; B_sat at {temp.hot_c:.0f} °C is {_fmt_t(bsat)}"))

    # -- inrush: switched on at a voltage zero, the flux swings 2 B_pk from wherever the residual flux left it
    #    (the doubling effect, common practice); a gapless tape-wound toroid keeps a high B_r, so it goes far
    #    into saturation and draws many times its rated current for a few cycles
    if spec.kind == "transformer" and spec.waveform == "sine" and parts.former.kind == "toroid":
        worst = mat.b_r_t + 2.0 * b_peak_max
        if worst > bsat:
            out.append(Check("warn", "inrush",
                             f"switched on at a voltage zero with residual flux, the core can reach B_r + 2 B_pk = "
                             f"{_fmt_t(worst)} against B_sat {_fmt_t(bsat)}: expect an inrush of many times the "
                             f"rated current; specify a soft-start or a slow-blow fuse on the label and test the "
                             f"first article"))

    # -- Steinmetz range
    f = spec.frequency_hz
    if mat.steinmetz_f_min_hz and not (mat.steinmetz_f_min_hz * 0.999 <= f <= mat.steinmetz_f_max_hz * 1.001):
        out.append(Check("warn", "loss-model",
                         f"{f:g} Hz is outside the {mat.steinmetz_f_min_hz:g}-{mat.steinmetz_f_max_hz:g} Hz range "
                         f"of the {mat.id} loss coefficients: the core loss is an extrapolation"))

    # -- fit
    if not built.ok:
        out.append(Check("fail", "fit", f"{built.fail_reason}: use a thinner wire, fewer strands in hand, "
                                        f"smaller margins or the next core"))
    elif not build.fits:
        over = build.bulged_height_m - build.available_m
        where = "the hole left for the shuttle" if parts.former.kind == "toroid" else "the bobbin's build height"
        out.append(Check("fail", "fit",
                         f"the build {build.height_m * 1e3:.2f} mm x {cat.shop.bulge_factor:g} bulge = "
                         f"{build.bulged_height_m * 1e3:.2f} mm exceeds {where} {build.available_m * 1e3:.2f} mm "
                         f"by {over * 1e3:.2f} mm: use a thinner wire or fewer tape layers, or the next core"))
    elif build.fill_fraction > 0.95:
        out.append(Check("warn", "fit", f"the build fills {build.fill_fraction:.0%} of the available height: "
                                        f"little room for bulge or an extra tape"))
    else:
        out.append(Check("pass", "fit", f"the build fills {build.fill_fraction:.0%} of the available height "
                                        f"({build.bulged_height_m * 1e3:.2f} of {build.available_m * 1e3:.2f} mm)"))
    ku_warn = KU_WARN_TOROID if parts.former.kind == "toroid" else KU_WARN_BOBBIN
    if build.ku > ku_warn:
        out.append(Check("warn", "window-fill",
                         f"window utilisation Ku {build.ku:.2f} is above the {ku_warn:.2f} a winder reaches "
                         f"comfortably (common practice)"))

    # -- temperature and classes
    cls = spec.insulation_class_c
    letter = IEC_60085.get(cls, "?")
    if temp.hot_c > cls:
        out.append(Check("fail", "temperature",
                         f"hot spot {temp.hot_c:.0f} °C exceeds the class {cls} ({letter}) limit "
                         f"(IEC 60085): reduce the loss ({losses.total_w:.2f} W) with a larger core or thicker "
                         f"wire, or use a higher class"))
    elif temp.hot_c > cls - CLASS_WARN_K:
        out.append(Check("warn", "temperature", f"hot spot {temp.hot_c:.0f} °C is within {CLASS_WARN_K:g} K of the "
                                                f"class {cls} ({letter}) limit"))
    else:
        out.append(Check("pass", "temperature", f"hot spot {temp.hot_c:.0f} °C (rise {temp.rise_k:.0f} K over "
                                                f"{spec.ambient_c:g} °C ambient), class {cls} ({letter}) limit"))
    for w in windings:
        if w.thermal_class_c < temp.hot_c:
            better = min((c for c in IEC_60085 if c >= temp.hot_c), default=None)
            out.append(Check("fail", "wire-class", f"winding {w.name}: wire {w.wire} is class {w.thermal_class_c}, "
                                                   f"below the {temp.hot_c:.0f} °C hot spot: use class "
                                                   f"{better or 'higher'} wire or lower the loss"))
        elif w.thermal_class_c < cls:
            out.append(Check("warn", "wire-class", f"winding {w.name}: wire {w.wire} is class {w.thermal_class_c}, "
                                                   f"below the insulation system class {cls}"))
    parts_classes = []
    if parts.bobbin is not None:
        parts_classes.append((f"bobbin {parts.bobbin.id}", parts.bobbin.thermal_class_c))
    for t in (spec.layer_tape, spec.winding_tape, spec.outer_wrap):
        if t is not None:
            parts_classes.append((f"tape {t.tape}", cat.tapes[t.tape].thermal_class_c))
    if spec.varnish:
        parts_classes.append((f"varnish {spec.varnish}", cat.varnishes[spec.varnish].thermal_class_c))
    for sid in {spec.sleeving, *[w.lead_sleeving for w in windings]} - {None}:
        parts_classes.append((f"sleeving {sid}", cat.sleevings[sid].thermal_class_c))
    for name, c in dict(parts_classes).items():     # a tape used twice is checked once
        if c < temp.hot_c:
            out.append(Check("fail", "material-class", f"{name} is class {c}, below the {temp.hot_c:.0f} °C hot spot"))
        elif c < cls:
            out.append(Check("warn", "material-class", f"{name} is class {c}, below the insulation system class {cls}"))

    # -- current density and strands vs skin depth
    shop_j = cat.shop.current_density_a_m2.get(spec.cooling, cat.shop.current_density_a_m2["natural"])
    delta = wiremod.skin_depth_m(f, wiremod.resistivity_ohm_m(temp.hot_c)) if f > 0 else float("inf")
    for w in windings:
        if w.role == "shield":
            continue
        if w.current_density_a_m2 > 1.25 * shop_j:
            out.append(Check("warn", "current-density",
                             f"winding {w.name}: {w.current_density_a_m2 / 1e6:.1f} A/mm² is above the shop's "
                             f"{shop_j / 1e6:.1f} A/mm² for {spec.cooling} cooling"))
        st = states[w.name]
        d = st.wire.strand_diameter_m if st.wire.is_round else st.wire.thickness_m
        # share of this winding's copper loss that is AC (a DC choke with small ripple barely has any)
        dc_part = (inductor.current_dc_a if inductor is not None and spec.inductor.voltage_drop_v is None
                   else 0.0) ** 2 * w.dcr_hot_ohm
        ac_share = 1.0 - dc_part / w.copper_loss_w if w.copper_loss_w > 0 else 0.0
        if d > 2.0 * delta and w.fr > 1.2 and ac_share > 0.2:
            out.append(Check("warn", "skin-depth",
                             f"winding {w.name}: strand {d * 1e3:.2f} mm is {d / delta:.1f} skin depths at "
                             f"{f / 1e3:g} kHz (Fr {w.fr:.2f}): use parallel strands or Litz"))
    # -- turns per layer
    for w in windings:
        for s in w.sections:
            if len(s.layers) > 1 and s.turns_per_layer < MIN_TURNS_PER_LAYER and w.wire_kind != "foil":
                out.append(Check("warn", "turns-per-layer",
                                 f"winding {w.name}: {s.turns_per_layer} turns per layer over {len(s.layers)} layers "
                                 f"winds badly (common practice): use strands in hand or foil"))
                break
            last = s.layers[-1]
            if len(s.layers) > 1 and last.turns < 0.3 * last.turns_capacity and w.wire_kind != "foil":
                out.append(Check("warn", "partial-layer",
                                 f"winding {w.name}: the last layer holds {last.turns} of {last.turns_capacity} turns; "
                                 f"spread it across the breadth so the next winding lies flat"))
                break
    # -- insulation barriers
    tape_layers = spec.winding_tape.layers if spec.winding_tape else 0
    for b in spec.barriers:
        if b.rating in ("reinforced", "double") and b.b != "core":
            # "S1+S2": windings tied for the test; triple-insulated wire on every winding of one side counts
            sides = [[n for n in side.split("+") if n in states] for side in (b.a, b.b)]
            tiw = any(side and all(states[n].wire.kind == "tiw" for n in side) for side in sides)
            if not tiw and tape_layers < REINFORCED_TAPE_LAYERS:
                out.append(Check("fail", "insulation",
                                 f"{b.rating} insulation between {b.a} and {b.b} needs triple-insulated wire or "
                                 f"at least {REINFORCED_TAPE_LAYERS} layers of tape between windings (common "
                                 f"practice); the spec has {tape_layers}"))
    return out
