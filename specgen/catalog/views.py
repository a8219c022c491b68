"""Catalogue listings and item views for the CLI (plain data out; the CLI prints it)."""

from __future__ import annotations

from ..errors import SpecError


def _mm(v):
    return round(v * 1e3, 4) if v else None


def rows(cat, table: str) -> list:
    out = []
    for obj in getattr(cat, table).values():
        if table == "wires":
            out.append({"id": obj.id, "kind": obj.kind, "label": obj.label,
                        "bare_mm": _mm(obj.strand_diameter_m or obj.thickness_m),
                        "overall_mm": _mm(obj.overall_diameter_m or obj.overall_thickness_m),
                        "strands": obj.strands, "copper_mm2": round(obj.copper_area_m2 * 1e6, 5),
                        "class": obj.thermal_class_c, "price_per_kg": str(obj.price_per_kg)})
        elif table == "cores":
            out.append({"id": obj.id, "shape": obj.shape, "material": obj.material,
                        "stacks_mm": [round(s * 1e3, 2) for s in obj.stacks_m] or None,
                        "gappable": obj.gappable, "price": str(obj.price), "per": obj.price_unit})
        elif table == "bobbins":
            out.append({"id": obj.id, "core": obj.core, "breadth_mm": _mm(obj.breadth_m),
                        "height_mm": _mm(obj.height_m), "pins": len(obj.pins), "sections": obj.sections,
                        "class": obj.thermal_class_c, "price": str(obj.price)})
        elif table == "materials":
            out.append({"id": obj.id, "family": obj.family, "name": obj.name, "b_sat_25c_t": obj.b_sat_25c_t,
                        "b_sat_100c_t": obj.b_sat_100c_t, "mu_initial": obj.mu_initial})
        elif table == "tapes":
            out.append({"id": obj.id, "name": obj.name, "thickness_mm": _mm(obj.thickness_m),
                        "width_mm": _mm(obj.width_m), "class": obj.thermal_class_c})
        elif table == "sleevings":
            out.append({"id": obj.id, "name": obj.name, "bore_mm": _mm(obj.bore_m),
                        "breakdown_v": obj.breakdown_v, "class": obj.thermal_class_c})
        else:
            out.append({"id": obj.id, "name": obj.name, "class": obj.thermal_class_c,
                        "cure_c": obj.cure_temperature_c})
    return out


def text_table(items: list) -> str:
    if not items:
        return "(none)"
    keys = list(items[0].keys())
    cells = [keys] + [["" if it[k] is None else (", ".join(map(str, it[k])) if isinstance(it[k], list)
                                                   else str(it[k])) for k in keys] for it in items]
    widths = [max(len(r[i]) for r in cells) for i in range(len(keys))]
    lines = ["  ".join(c.ljust(w) for c, w in zip(r, widths)).rstrip() for r in cells]
    lines.insert(1, "  ".join("-" * w for w in widths))
    lines.append(f"({len(items)} items)")
    return "\n".join(lines)


def show(cat, item_id: str) -> dict:
    found = cat.find(item_id)
    if found is None:
        import difflib

        every = [i for kind in cat.KINDS for i in getattr(cat, kind)]
        near = difflib.get_close_matches(item_id, every, n=3, cutoff=0.6)
        raise SpecError(f"no catalogue item '{item_id}'" + (f"; did you mean {', '.join(near)}?" if near else ""),
                        path="ID")
    kind, obj = found
    info = {"kind": kind, "id": item_id, "entry": obj.raw}
    file, line = cat.locations.get(item_id, (None, None))
    info["file"] = f"{file}:{line}" if file else None
    computed = {}
    if kind == "cores":
        from ..physics import geometry

        try:
            stack = obj.stacks_m[0] if obj.shape == "EI" else None
            ep = geometry.core_effective(obj.shape, obj.dims, stack_m=stack, stacking_factor=obj.stacking_factor)
            computed = {"ae_mm2": ep.ae_m2 * 1e6, "le_mm": ep.le_m * 1e3, "ve_mm3": ep.ve_m3 * 1e9,
                        "wa_mm2": geometry.window_area_m2(obj.shape, obj.dims) * 1e6,
                        "at_stack_mm": stack * 1e3 if stack else None, "method": "IEC 60205 from dimensions"}
            if obj.override:
                computed["override"] = {k: v for k, v in obj.override.items()}
        except ValueError as exc:
            computed = {"error": str(exc)}
        computed["bobbins"] = [b.id for b in cat.bobbins_for(obj.id)]
    elif kind == "wires":
        from ..physics import wire

        computed = {"copper_mm2": obj.copper_area_m2 * 1e6,
                    "ohm_per_km_20c": wire.resistance_per_m_ohm(obj.copper_area_m2, 20.0, obj.conductor) * 1e3,
                    "g_per_m": wire.mass_per_m_kg(obj.copper_area_m2, obj.conductor) * 1e6}
    info["computed"] = computed
    return info


def text_show(info: dict) -> str:
    lines = [f"{info['id']} ({info['kind']})" + (f"  at {info['file']}" if info.get("file") else "")]
    for k, v in info["entry"].items():
        lines.append(f"  {k}: {v}")
    if info["computed"]:
        lines.append("  computed:")
        for k, v in info["computed"].items():
            lines.append(f"    {k}: {v:.5g}" if isinstance(v, float) else f"    {k}: {v}")
    return "\n".join(lines)
