"""Inductors and chokes: gapped cores (energy method + fringing), powder cores under DC bias, AC reactors.

Gapped core (McLyman's method): turns from N = L I_pk / (B_max A_e); the gap from
L = mu0 N^2 A_e F / (l_g + l_e/mu_r) solved with the fringing factor F; the gap rounded down to the shop's
0.01 mm so the built part meets L; a spacer in all legs is half the gap (the flux crosses it twice).
Powder core: no discrete gap; the permeability falls with the DC magnetizing force H = N I / l_e along the
catalogue's roll-off curve, so the turns are iterated until L is met at full DC current.
AC reactor: L = V_drop / (2 pi f I) at rated current, then as a gapped core at I_pk = sqrt(2) I.
"""

from __future__ import annotations

import math

from ..catalog.models import Catalog
from ..physics import gap as gapmod
from ..physics import permeability
from .engine import (
    _core_loss_w_m3,
    _flux_limit,
    _lay_out,
    _Parts,
    _section_frs,
    _spec_error,
    _Thermal,
    _WState,
    choose_wire,
    finish,
    thermal_state,
    too_many_turns,
)
from .result import Check, Design, InductorResult
from .spec import MAX_TURNS, Spec

GAP_STEP_M = 1e-5          # gaps are ground or shimmed to 0.01 mm (common practice)
RIPPLE_SKIN_FRACTION = 0.2 # ripple rms below 20 % of DC: the DC current sets the wire, skin depth ignored (common practice)
ROLLOFF_WARN_PCT = 50.0    # more than half the permeability gone at full current: a poor use of powder (common practice)


def design_inductor(spec: Spec, cat: Catalog, parts: _Parts) -> Design:
    req = spec.inductor
    w = spec.windings[0]
    mat = parts.material
    f = spec.frequency_hz
    shop = cat.shop
    ac = req.voltage_drop_v is not None
    if ac:
        i_rms = req.current_dc_a
        target = req.voltage_drop_v / (2.0 * math.pi * f * i_rms)
        i_dc, i_ac = 0.0, i_rms
        i_pk = req.current_peak_a or math.sqrt(2.0) * i_rms
        i_op_pk = math.sqrt(2.0) * i_rms
        ripple = 2.0 * math.sqrt(2.0) * i_rms
    else:
        target = req.inductance_h
        i_dc = req.current_dc_a
        ripple = req.ripple_a
        i_ac = ripple / math.sqrt(12.0)           # rms of a triangular ripple
        i_op_pk = i_dc + ripple / 2.0
        i_pk = max(req.current_peak_a or 0.0, i_op_pk)
        i_rms = math.hypot(i_dc, i_ac)
    density = shop.current_density_a_m2.get(spec.cooling, shop.current_density_a_m2["natural"])
    if not w.wire.startswith("auto"):
        wire, strands, reason = cat.wires[w.wire], (w.strands or 1), "given"
    else:
        wire_f = f if (ac or (i_dc > 0 and i_ac / i_dc > RIPPLE_SKIN_FRACTION)) else 0.0
        wire, strands, reason = choose_wire(cat, i_rms, density, wire_f, 100.0, w.wire, w.strands)
    temp = _Thermal(spec.ambient_c + 40.0, spec.ambient_c + 40.0 + shop.hotspot_margin_k, 40.0)
    extra: list = []
    G = parts.window_breadth_m
    ae, le, mu = parts.ae_m2, parts.le_m, mat.mu_initial

    if mat.is_powder and req.gap == "fixed":
        raise _spec_error(spec, f"{parts.core.id} is a powder core: its gap is distributed in the material; "
                                f"remove core.gap", "core", "gap")

    def magnetics(temp: _Thermal) -> dict:
        b_limit = _flux_limit(spec, cat, mat, temp.hot_c)
        out = {"b_limit": b_limit, "arrangement": "none", "gap": None, "spacer": None, "grind": None, "F": 1.0,
               "notes": []}
        if mat.is_powder:
            a, b, c = mat.rolloff_a, mat.rolloff_b, mat.rolloff_c
            n = w.turns or permeability.turns_for_biased_inductance(target, i_dc if not ac else i_op_pk, ae, le,
                                                                    mu, a, b, c)
            if n is None:
                raise _spec_error(spec, f"{parts.core.id} cannot reach {target * 1e6:.4g} µH at "
                                        f"{i_dc:g} A: the permeability rolls off faster than turns add; use a "
                                        f"larger core or a lower-permeability powder", "core", "id")
            bias = i_dc if not ac else 0.0
            l0 = permeability.powder_inductance_h(n, ae, le, mu, 0.0, a, b, c)
            lfull = permeability.powder_inductance_h(n, ae, le, mu, bias, a, b, c)
            h_pk = n * i_pk / le
            b_pk_max = 4e-7 * math.pi * mu * permeability.rolloff_fraction(h_pk, a, b, c) * h_pk
            h_op = n * i_op_pk / le
            b_pk = 4e-7 * math.pi * mu * permeability.rolloff_fraction(h_op, a, b, c) * h_op
            frac = permeability.rolloff_fraction(n * bias / le, a, b, c)
            out.update(n=n, l_built=lfull, l0=l0, lfull=lfull, b_pk=b_pk, b_pk_max=b_pk_max,
                       rolloff=(1.0 - frac / permeability.rolloff_fraction(0.0, a, b, c)) * 100.0)
            return out
        limit = b_limit[0]
        if req.gap == "fixed":
            lg = req.gap_m
            n = w.turns or _turns_for_l(target, ae, le, mu, lg, G)
        elif req.gap == "none":
            lg = 0.0
            n = w.turns or _turns_for_l(target, ae, le, mu, 0.0, G)
        else:
            n_float = gapmod.turns_for_peak_b(target, i_pk, limit, ae)
            if not n_float < MAX_TURNS:
                raise too_many_turns(spec, n_float, f"{target * 1e6:.4g} µH at {i_pk:g} A", "inductor")
            n = w.turns or max(1, math.ceil(n_float - 1e-9))
            lg = gapmod.gap_for_inductance_m(target, n, ae, le, mu, G)
            if lg is None:          # even without a gap L is short: more turns, no gap
                if w.turns:
                    lg = 0.0
                else:
                    n = _turns_for_l(target, ae, le, mu, 0.0, G)
                    lg = gapmod.gap_for_inductance_m(target, n, ae, le, mu, G) or 0.0
            lg = math.floor(lg / GAP_STEP_M + 1e-6) * GAP_STEP_M
            # rounding the gap down raises L, and B_pk = L I / (N Ae) with it: one more turn if that
            # pushes B past the limit (the gap then re-solved)
            for _ in range(20):
                l_try = gapmod.inductance_gapped_h(n, ae, le, mu, lg, G if lg > 0 else None)
                if w.turns or gapmod.b_peak_from_inductance_t(l_try, i_pk, n, ae) <= limit:
                    break
                n += 1
                lg = gapmod.gap_for_inductance_m(target, n, ae, le, mu, G) or 0.0
                lg = math.floor(lg / GAP_STEP_M + 1e-6) * GAP_STEP_M
        l_built = gapmod.inductance_gapped_h(n, ae, le, mu, lg, G if lg > 0 else None)
        arrangement = req.gap_arrangement if lg > 0 else "none"
        if arrangement == "centre" and parts.core.shape == "EI":
            arrangement = "spacer"
            out["notes"].append(Check("warn", "gap", "laminations cannot be ground in the centre leg only: the gap "
                                                     "is made with a spacer (butt gap) in every leg"))
        if lg > 0 and not parts.core.gappable and req.gap == "auto":
            out["notes"].append(Check("warn", "gap", f"{parts.core.id} is not marked gappable in the catalogue: "
                                                     f"confirm the shop can grind or shim it"))
        if n > MAX_TURNS:
            raise too_many_turns(spec, n, f"{target * 1e6:.4g} µH at {i_pk:g} A", "inductor")
        out.update(n=n, l_built=l_built, l0=l_built, lfull=l_built, gap=lg if lg > 0 else 0.0,
                   arrangement=arrangement, F=gapmod.fringing_factor(lg, ae, G) if lg > 0 else 1.0,
                   spacer=lg / 2.0 if arrangement == "spacer" else None,
                   grind=lg if arrangement == "centre" else None,
                   b_pk=gapmod.b_peak_from_inductance_t(l_built, i_op_pk, n, ae),
                   b_pk_max=gapmod.b_peak_from_inductance_t(l_built, i_pk, n, ae), rolloff=0.0)
        return out

    def evaluate(temp: _Thermal):
        mg = magnetics(temp)
        st = _WState(w, 0, wire, strands, mg["n"], i_rms, reason)
        states = {w.name: st}
        built = _lay_out(spec, parts, states, cat)
        frs = _section_frs(built, f, temp.hot_c, "sine", {w.name: 1.0}) if built.ok else {}
        n = mg["n"]
        delta_b = mg["lfull"] * ripple / (n * ae)
        if ac:
            pv = _core_loss_w_m3(mat, "sine", f, mg["b_pk"], 0.5)
        else:
            from ..physics import coreloss

            pv = coreloss.triangular_ripple_loss_w_m3(f, delta_b / 1.0, req.duty, mat.steinmetz_k,
                                                      mat.steinmetz_alpha, mat.steinmetz_beta) if delta_b > 0 else 0.0
        from .engine import _dcr, _lengths

        length = _lengths(built, shop.lead_length_m).get(w.name, 0.0)
        r_hot = _dcr(st, length, temp.hot_c)
        secs = built.sections
        clen = sum(s[3].copper_length_m for s in secs) or 1.0
        fr = sum(frs.get((w.name, s[1]), 1.0) * s[3].copper_length_m for s in secs) / clen
        copper = i_dc ** 2 * r_hot + i_ac ** 2 * r_hot * fr
        return mg, states, built, frs, copper, pv, delta_b

    iterations = 0
    mg, states, built, frs, copper, pv, delta_b = evaluate(temp)
    for _ in range(60):
        iterations += 1
        new = thermal_state(copper + pv * parts.ve_m3, parts, spec, cat)
        settled = abs(new.hot_c - temp.hot_c) < 0.02
        temp = new
        mg, states, built, frs, copper, pv, delta_b = evaluate(temp)
        if settled:
            break

    n = mg["n"]
    l_built = mg["l_built"]
    extra += mg["notes"]          # from the last pass only: the loop re-runs magnetics() each iteration
    ind = InductorResult(
        inductance_h=l_built, inductance_zero_bias_h=mg["l0"], inductance_at_full_bias_h=mg["lfull"],
        target_h=target, gap_m=None if mat.is_powder else mg["gap"], gap_arrangement=mg["arrangement"],
        spacer_m=mg["spacer"], grind_m=mg["grind"], fringing_factor=mg["F"],
        al_nh=gapmod.al_nh(mg["l0"], n), energy_j=gapmod.energy_j(mg["lfull"], i_op_pk if ac else i_dc),
        h_dc_a_m=n * i_dc / le, rolloff_pct=mg["rolloff"], current_dc_a=i_dc if not ac else i_rms,
        current_peak_a=i_pk, ripple_a=ripple, delta_b_t=delta_b,
        b_dc_t=mg["lfull"] * i_dc / (n * ae) if i_dc else 0.0,
    )
    tol = shop.tolerances["inductance"]
    if mg["lfull"] < target * (1 - tol):
        extra.append(Check("fail", "inductance",
                           f"built inductance {mg['lfull'] * 1e6:.4g} µH is below the {target * 1e6:.4g} µH "
                           f"required: add turns or reduce the gap"))
    else:
        extra.append(Check("pass", "inductance", f"L {mg['lfull'] * 1e6:.4g} µH at "
                                                 f"{ind.current_dc_a:g} A against {target * 1e6:.4g} µH required"))
    if mat.is_powder and mg["rolloff"] > ROLLOFF_WARN_PCT:
        extra.append(Check("warn", "rolloff", f"{mg['rolloff']:.0f} % of the permeability is lost at "
                                              f"{i_dc:g} A (H = {ind.h_dc_a_m:.0f} A/m): a larger core or a lower-"
                                              f"permeability mix rolls off less (common practice: under 50 %)"))
    return finish(spec, cat, parts, states, built, frs, temp, b_peak=mg["b_pk"], b_peak_max=mg["b_pk_max"],
                  b_limit=mg["b_limit"], h_peak=n * i_pk / le, lm=None, imag=None, core_w=pv * parts.ve_m3,
                  core_w_m3=pv, voltages={}, open_circuit={}, efficiency=None, regulation=None, p_out=None,
                  inductor=ind, extra_checks=extra, iterations=iterations,
                  ripple_rms={w.name: (i_dc, i_ac)})


def _turns_for_l(target_h: float, ae: float, le: float, mu: float, lg: float, window_m: float) -> int:
    """Smallest N meeting L with a fixed gap: L grows as N^2 (fringing does not depend on N).

    Capped one above MAX_TURNS so the caller's turn check reports an impossible requirement."""
    l1 = gapmod.inductance_gapped_h(1, ae, le, mu, lg, window_m if lg > 0 else None)
    n = math.sqrt(target_h / l1)
    return MAX_TURNS + 1 if not n < MAX_TURNS else max(1, math.ceil(n - 1e-9))
