"""Design checks: pass / warn / fail, each one plain sentence a shop engineer acts on.

Thresholds marked 'common practice' are rules of thumb of the trade, not standards.
"""

from __future__ import annotations

from ..standards.thermal_classes import LETTER_BY_LIMIT as IEC_60085
from . import kernel as K
from .result import Check
from .state import DesignState

KU_WARN_BOBBIN = 0.40        # window utilisation a bobbin winder reaches without trouble (common practice)
KU_WARN_TOROID = 0.35
MIN_TURNS_PER_LAYER = 3      # fewer turns per layer than this winds badly (common practice)
CLASS_WARN_K = 5.0           # hot spot within this of the class limit: warn


def run_checks(state: DesignState) -> list[Check]:
    """The checks every kind shares, in this order: loss-model range, fit and window fill, temperatures and
    classes, current density and skin depth, turns per layer (the kind's flux checks come before
    them, the insulation coordination and the kind's own after)."""
    return _loss_model(state) + _fit(state) + _temperature(state) + _current(state) + _layers(state)


def _loss_model(state: DesignState) -> list[Check]:
    mat, f = state.parts.material, state.spec.frequency_hz
    if mat.steinmetz_f_min_hz and not (mat.steinmetz_f_min_hz * 0.999 <= f <= mat.steinmetz_f_max_hz * 1.001):
        return [Check("warn", "loss-model",
                      f"{f:g} Hz is outside the {mat.steinmetz_f_min_hz:g}-{mat.steinmetz_f_max_hz:g} Hz range "
                      f"of the {mat.id} loss coefficients: the core loss is an extrapolation")]
    return []


def _fit(state: DesignState) -> list[Check]:
    built, build, parts, cat = state.built, state.build, state.parts, state.cat
    out: list[Check] = []
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
    return out


def _temperature(state: DesignState) -> list[Check]:
    """The hot spot against the insulation class (IEC 60085), and every wire and material against both."""
    spec, cat, parts, windings, temp, losses = (state.spec, state.cat, state.parts, state.windings, state.temp,
                                                state.losses)
    out: list[Check] = []
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
    parts_classes: list[tuple[str, int]] = []
    if parts.bobbin is not None:
        parts_classes.append((f"bobbin {parts.bobbin.id}", parts.bobbin.thermal_class_c))
    for t in (spec.layer_tape, spec.winding_tape, spec.outer_wrap):
        if t is not None:
            parts_classes.append((f"tape {t.tape}", cat.tapes[t.tape].thermal_class_c))
    if spec.varnish:
        parts_classes.append((f"varnish {spec.varnish}", cat.varnishes[spec.varnish].thermal_class_c))
    for sid in {spec.sleeving, *[w.lead_sleeving for w in windings]} - {None, ""}:
        parts_classes.append((f"sleeving {sid}", cat.sleevings[sid].thermal_class_c))
    for name, c in dict(parts_classes).items():     # a tape used twice is checked once
        if c < temp.hot_c:
            out.append(Check("fail", "material-class", f"{name} is class {c}, below the {temp.hot_c:.0f} °C hot spot"))
        elif c < cls:
            out.append(Check("warn", "material-class", f"{name} is class {c}, below the insulation system class {cls}"))
    return out


def _current(state: DesignState) -> list[Check]:
    """Current density against the shop's figure for the cooling; strands against the skin depth."""
    spec, cat, windings, states, temp = state.spec, state.cat, state.windings, state.states, state.temp
    f = spec.frequency_hz
    out: list[Check] = []
    shop_j = K.current_density_a_m2(cat.shop.current_density_a_m2, spec.cooling)
    delta = float(K.skin_depth_m(f, temp.hot_c)) if f > 0 else float("inf")
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
        dc_part = state.summary.dc_current_a ** 2 * w.dcr_hot_ohm
        ac_share = 1.0 - dc_part / w.copper_loss_w if w.copper_loss_w > 0 else 0.0
        if d > 2.0 * delta and w.fr > 1.2 and ac_share > 0.2:
            out.append(Check("warn", "skin-depth",
                             f"winding {w.name}: strand {d * 1e3:.2f} mm is {d / delta:.1f} skin depths at "
                             f"{f / 1e3:g} kHz (Fr {w.fr:.2f}): use parallel strands or Litz"))
    return out


def _layers(state: DesignState) -> list[Check]:
    out: list[Check] = []
    for w in state.windings:
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
    return out
