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
            out.append({"id": obj.id, "cores": ", ".join(obj.cores), "breadth_mm": _mm(obj.breadth_m),
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
    """Rows (dicts of one kind) as a plain-text table with a count line."""
    from ..present import table

    if not items:
        return "(none)"
    keys = list(items[0].keys())
    return table(keys, [[it[k] for k in keys] for it in items], indent=0) + f"\n({len(items)} items)"


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
                    "g_per_m": wire.mass_per_m_kg(obj.copper_area_m2, obj.conductor) * 1e3}
    info["computed"] = computed
    return info


#: Computed figures of ``show``: key -> (label, unit shown after the number).
_COMPUTED = {"ae_mm2": ("Ae", "mm²"), "le_mm": ("le", "mm"), "ve_mm3": ("Ve", "mm³"), "wa_mm2": ("window Wa", "mm²"),
             "at_stack_mm": ("at stack", "mm"), "method": ("method", ""), "bobbins": ("bobbins", ""),
             "override": ("measured (replace computed)", ""), "copper_mm2": ("copper area", "mm²"),
             "ohm_per_km_20c": ("resistance at 20 °C", "Ω/km"), "g_per_m": ("copper mass", "g/m"),
             "error": ("cannot compute", "")}


def _value_text(v) -> str:
    """A catalogue value as a person reads it: mappings as 'key value, ...', lists joined, yes/no."""
    from ..present import sig

    if v is None:
        return "-"
    if isinstance(v, bool):
        return "yes" if v else "no"
    if isinstance(v, dict):
        return ", ".join(f"{k} {_value_text(x)}" for k, x in v.items())
    if isinstance(v, (list, tuple)):
        return ", ".join(_value_text(x) for x in v) or "-"
    if isinstance(v, float):
        return sig(v, 4)
    return str(v)


def text_show(info: dict) -> str:
    """The item as two aligned columns: its catalogue entry, then what specgen computes from it."""
    from ..present import table

    head = f"{info['id']}  ({info['kind'][:-1] if info['kind'].endswith('s') else info['kind']})"
    lines = [head + (f"  {info['file']}" if info.get("file") else ""), ""]
    entry = [(k, _value_text(v)) for k, v in info["entry"].items() if k not in ("id", "source")]
    lines.append(table(["entry", ""], entry, rule=False))
    if info["computed"]:
        rows = []
        for k, v in info["computed"].items():
            label, unit = _COMPUTED.get(k, (k, ""))
            text = _value_text(v)
            rows.append((label, f"{text} {unit}".strip() if v is not None else "-"))
        lines += ["", table(["computed", ""], rows, rule=False)]
    if info["entry"].get("source"):
        lines += ["", f"  source: {info['entry']['source']}"]
    return "\n".join(lines)
