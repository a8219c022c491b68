"""Load and check the shop catalogue (a folder of YAML files).

``load_catalog(dir)`` returns a frozen ``Catalog`` or raises the first ``SpecError``;
``check_catalog(dir)`` returns every problem found (for ``specgen catalog check``).

Where the catalogue comes from: ``--catalog DIR`` > ``$SPECGEN_CATALOG`` > the copy shipped in the package.
"""

from __future__ import annotations

import os
import re
from collections.abc import Callable
from decimal import Decimal
from pathlib import Path
from typing import Any

from ..errors import SpecError
from ..loading import RENAMED_KEYS, Reader, load_yaml
from .chambers import chamber_breadths, check_chambers, core_ids
from .fits import check_bobbins
from .models import (
    CORE_SHAPES,
    MATERIAL_FAMILIES,
    PAPER_SIZES_M,
    WIRE_KINDS,
    Bobbin,
    BuyBreak,
    Catalog,
    Core,
    CurrentDensities,
    HipotFigures,
    InsulationBasis,
    InsulationResistanceFigures,
    LaborFigures,
    Material,
    Party,
    QuoteTerms,
    Shop,
    ShopDocuments,
    Sleeving,
    Tape,
    Tolerances,
    Varnish,
    Wire,
)
from .shop_cooling import read_cooling

TOP_KEYS = ("wires", "cores", "bobbins", "materials", "tapes", "sleevings", "varnishes", "customers", "shop")

CORE_DIMS = {
    "EI": (("tongue",), ("window_width", "window_height", "leg", "yoke")),
    "toroid": (("od", "id", "height"), ()),
    "E": (("width", "height", "depth", "window_width", "window_height", "centre_leg_width"), ("centre_leg_depth",)),
    "EFD": (("width", "height", "depth", "window_width", "window_height", "centre_leg_width"), ("centre_leg_depth",)),
    "ETD": (("width", "height", "depth", "window_width", "window_height", "centre_leg_diameter"), ()),
    "PQ": (("width", "height", "depth", "window_width", "window_height", "centre_leg_diameter"), ()),
    "POT": (("outer_diameter", "inner_diameter", "post_diameter", "height", "window_height"), ("post_hole",)),
    "RM": (("outer_diameter", "inner_diameter", "post_diameter", "height", "window_height"), ("post_hole",)),
}


def shipped_catalog_dir() -> Path:
    here = Path(__file__).resolve().parent.parent
    packaged = here / "data" / "catalog"
    if packaged.is_dir():
        return packaged
    return here.parent / "catalog"


def resolve_catalog_dir(explicit: str | os.PathLike | None = None) -> Path:
    if explicit:
        p = Path(explicit)
    elif os.environ.get("SPECGEN_CATALOG"):
        p = Path(os.environ["SPECGEN_CATALOG"])
    else:
        return shipped_catalog_dir()
    if not p.exists():
        raise SpecError("no such catalogue folder", file=str(p))
    if not p.is_dir():
        raise SpecError("is not a folder; a catalogue is a folder of YAML files", file=str(p))
    return p


# ----------------------------------------------------------------------------------------------

_NO_DEFAULT = object()


def _pct(r: Reader, key: str, default=None, maximum: Decimal = Decimal(10)) -> Decimal:
    """A fraction written '45 %' (or a plain number 0.45), kept as Decimal, from 0 to ``maximum``."""
    from decimal import InvalidOperation

    value = r.checked_raw(key, "percent") if default is None else r.checked_raw(key, "percent", default)
    if value is default and default is not None:
        return Decimal(str(default))
    text = str(value).strip()
    try:
        out = Decimal(text[:-1].strip()) / Decimal(100) if text.endswith("%") else Decimal(text)
    except InvalidOperation:
        raise r.error(f"expected a percentage like '45 %', got '{value}'", key) from None
    if not out.is_finite() or out < 0 or out > maximum:
        raise r.error(f"expected a percentage from 0 to {(maximum * 100).normalize():f} %, got '{value}'", key)
    return out


def _thermal_class(r: Reader, key: str = "thermal_class") -> int:
    from ..standards.thermal_classes import parse_thermal_class

    value = r.raw(key)
    try:
        return parse_thermal_class(value)
    except ValueError as err:
        raise r.error(str(err), key) from None


def _plain(data):
    """The entry's content as plain dicts/lists, for fingerprints."""
    if isinstance(data, dict):
        return {str(k): _plain(v) for k, v in data.items()}
    if isinstance(data, list):
        return [_plain(v) for v in data]
    if hasattr(data, "isoformat"):
        return data.isoformat()
    return data


def _wire(r: Reader) -> Wire:
    kind = r.choice("kind", WIRE_KINDS)
    common = dict(
        id=r.text("id"), kind=kind, label=r.text("label", "") or r.data.get("id", ""),
        conductor=r.choice("conductor", ("copper", "aluminium"), "copper"),
        thermal_class_c=_thermal_class(r), price_per_kg=r.decimal("price_per_kg"),
        source=r.text("source"), grade=r.text("grade", ""), raw=_plain(r.data),
    )
    if kind in ("round", "tiw"):
        bare = r.quantity("bare_diameter", "length")
        overall = r.quantity("overall_diameter", "length")
        if overall < bare:
            raise r.error("overall diameter is smaller than the bare diameter", "overall_diameter")
        w = Wire(**common, strands=1, strand_diameter_m=bare, strand_overall_m=overall,
                 overall_diameter_m=overall, awg=r.integer("awg", None, minimum=-3, maximum=56),
                 insulation_rating=r.choice("insulation_rating", ("functional", "basic", "supplementary",
                                                                   "double", "reinforced"), "functional"))
    elif kind == "litz":
        strands = r.integer("strands", minimum=2, maximum=100000)
        d = r.quantity("strand_diameter", "length")
        ds = r.quantity("strand_overall_diameter", "length")
        overall = r.quantity("overall_diameter", "length")
        if ds < d:
            raise r.error("strand overall diameter is smaller than the bare strand", "strand_overall_diameter")
        if overall < d * strands ** 0.5:
            raise r.error("bundle diameter is too small to hold its strands", "overall_diameter")
        w = Wire(**common, strands=strands, strand_diameter_m=d, strand_overall_m=ds, overall_diameter_m=overall)
    else:
        t = r.quantity("thickness", "length")
        wd = r.quantity("width", "length")
        if kind == "strip":
            ot = r.quantity("overall_thickness", "length")
            ow = r.quantity("overall_width", "length")
            if ot < t or ow < wd:
                raise r.error("overall size is smaller than the bare conductor", "overall_thickness")
        else:
            ot, ow = t, wd
        w = Wire(**common, thickness_m=t, width_m=wd, overall_thickness_m=ot, overall_width_m=ow)
    r.done()
    return w


def _material(r: Reader) -> Material:
    st = r.mapping("steinmetz")
    out = dict(
        id=r.text("id"), name=r.text("name"), family=r.choice("family", MATERIAL_FAMILIES),
        b_sat_25c_t=r.quantity("b_sat_25c", "flux_density"),
        b_sat_100c_t=r.quantity("b_sat_100c", "flux_density"),
        b_r_t=r.quantity("b_r", "flux_density", allow_zero=True),
        h_c_a_m=r.quantity("h_c", "field", allow_zero=True),
        mu_initial=r.number("mu_initial", minimum=1.0),
        mu_amplitude=r.number("mu_amplitude", None, minimum=1.0),
        density_kg_m3=r.quantity("density", "density"),
        curie_c=r.quantity("curie", "temperature"),
        price_per_kg=r.decimal("price_per_kg"), source=r.text("source"),
        steinmetz_k=st.number("k", minimum=0.0), steinmetz_alpha=st.number("alpha", minimum=0.5, maximum=3.0),
        steinmetz_beta=st.number("beta", minimum=1.0, maximum=4.0),
        steinmetz_f_min_hz=st.quantity("f_min", "frequency"),
        steinmetz_f_max_hz=st.quantity("f_max", "frequency"),
        steinmetz_b_max_t=st.quantity("b_max", "flux_density"),
        b_design_t=r.quantity("b_design", "flux_density", None),
        lamination_thickness_m=r.quantity("lamination_thickness", "length", 0.0),
        stacking_factor=r.number("stacking_factor", 1.0, minimum=0.3, maximum=1.0),
        raw=_plain(r.data),
    )
    st.done()
    if out["steinmetz_f_max_hz"] < out["steinmetz_f_min_hz"]:
        raise st.error("f_max is below f_min", "f_max")
    if out["b_r_t"] > out["b_sat_25c_t"]:
        raise r.error("remanence is above saturation", "b_r")
    if out["family"] == "ferrite" and out["curie_c"] < FERRITE_CURIE_MIN_C:
        # power ferrites lose their magnetism at the Curie point; below 100 degC a part would
        # fail in ordinary service, so such a figure is a slip (of unit or of digit)
        raise r.error(f"a ferrite's Curie point of {out['curie_c']:g} degC is below {FERRITE_CURIE_MIN_C:g} degC; "
                      "power ferrites lie far above (common practice: 150-300 degC)", "curie")
    lt = r.mapping("loss_temperature", None)
    if lt is not None:
        fit = (lt.number("ct0", minimum=0.0), lt.number("ct1"), lt.number("ct2", minimum=0.0))
        out.update(loss_temperature=fit, loss_temperature_source=lt.text("source"))
        lt.done()
        from ..physics.core_temperature import loss_temperature_factor
        try:
            loss_temperature_factor(25.0, *fit)
        except ValueError as exc:
            raise r.error(str(exc), "loss_temperature") from None
    bias = r.mapping("dc_bias", None)
    if bias is not None:
        out.update(dc_bias_half_field_a_m=bias.quantity("half_field", "field"),
                   dc_bias_steepness=bias.number("steepness", minimum=0.1, maximum=5.0))
        bias.done()
    if r.has("permeability_vs_frequency"):
        out["permeability_table"] = _permeability_table(r)
    r.done(renamed=RENAMED_KEYS["materials"])
    m = Material(**out)
    if m.is_powder and m.dc_bias_half_field_a_m is None:
        raise r.error("a powder material needs its permeability under DC bias (dc_bias: {half_field, steepness})",
                      "dc_bias")
    return m


def _permeability_table(r: Reader) -> tuple[tuple[float, float], ...]:
    """``permeability_vs_frequency: [{frequency: 10 kHz, mu: 10000}, ...]``: small-signal mu against frequency,
    frequencies rising (a common-mode choke's turns use it at the frequency its inductance is stated at)."""
    rows: list[tuple[float, float]] = []
    for item in r.items("permeability_vs_frequency", min_items=2):
        f = item.quantity("frequency", "frequency")
        mu = item.number("mu", minimum=1.0, maximum=1e6)
        item.done()
        if rows and f <= rows[-1][0]:
            raise item.error("the frequencies must rise from one row to the next", "frequency")
        rows.append((f, mu))
    return tuple(rows)


def _core(r: Reader) -> Core:
    shape = r.raw("shape")
    shape = str(shape).strip()
    if shape.lower() == "toroid":
        shape = "toroid"
    else:
        shape = shape.upper()
    if shape not in CORE_SHAPES:
        raise r.error(f"expected one of {', '.join(CORE_SHAPES)}; got '{r.data.get('shape')}'", "shape")
    d = r.mapping("dims")
    need, optional = CORE_DIMS[shape]
    dims = {k: d.quantity(k, "length", maximum=MAX_DIMENSION_M) for k in need}
    for k in optional:
        if d.has(k):
            dims[k] = d.quantity(k, "length", maximum=MAX_DIMENSION_M)
    if shape == "RM":
        dims["skirt_coverage"] = d.number("skirt_coverage", 0.6, minimum=0.1, maximum=1.0)
    elif shape == "POT":
        dims["skirt_coverage"] = d.number("skirt_coverage", 1.0, minimum=0.1, maximum=1.0)
    d.done(renamed=RENAMED_KEYS["cores.dims"])
    _check_core_dims(shape, dims, d)
    stacks: tuple[float, ...] = ()
    if shape == "EI" or r.has("stacks"):
        raw_stacks = r.list_of("stacks")
        if not raw_stacks:
            raise r.error("needs at least one stack height", "stacks")
        sr = Reader({f"stacks[{i}]": v for i, v in enumerate(raw_stacks)}, r.file, r.path, r.line_of("stacks"))
        stacks = tuple(sr.quantity(f"stacks[{i}]", "length", maximum=MAX_DIMENSION_M) for i in range(len(raw_stacks)))
    ov = r.mapping("override", None)
    override = {}
    if ov is not None:
        for key, dim in (("ae", "area"), ("le", "length"), ("ve", "volume")):
            if ov.has(key):
                override[key] = ov.quantity(key, dim)
        ov.done()
    core = Core(
        id=r.text("id"), shape=shape, material=r.text("material"), dims=dims,
        price=r.decimal("price"), price_unit=r.choice("price_unit", ("set", "kg"), "set"),
        source=r.text("source"), stacks_m=stacks,
        stacking_factor=r.number("stacking_factor", 1.0, minimum=0.3, maximum=1.0),
        pieces=r.integer("pieces", 1, minimum=1, maximum=4), gappable=r.boolean("gappable", False),
        coating_m=r.quantity("coating", "length", 0.0, allow_zero=True),
        coating_voltage_v=r.quantity("coating_voltage", "voltage", None),
        override=override, mass_kg=r.quantity("mass", "mass", None),
        thermal_resistance_k_w=r.quantity("thermal_resistance", "thermal_resistance", None), raw=_plain(r.data),
    )
    r.done()
    return core


def _check_core_dims(shape: str, dims: dict, d: Reader) -> None:
    def bad(key, why):
        raise d.error(why, key)

    if shape == "toroid":
        if dims["id"] >= dims["od"]:
            bad("id", "inner diameter must be smaller than the outer diameter")
    elif shape in ("E", "EFD", "ETD", "PQ"):
        centre = dims.get("centre_leg_width", dims.get("centre_leg_diameter"))
        if dims["window_width"] >= dims["width"]:
            bad("window_width", "window is as wide as the core: no outer legs left")
        if centre >= dims["window_width"]:
            bad("window_width", "centre leg fills the window")
        if dims["window_height"] >= dims["height"]:
            bad("window_height", "window is as high as the core: no yoke left")
    elif shape in ("POT", "RM"):
        if not dims["post_diameter"] < dims["inner_diameter"] < dims["outer_diameter"]:
            bad("inner_diameter", "needs post_diameter < inner_diameter < outer_diameter")
        if dims["window_height"] >= dims["height"]:
            bad("window_height", "window is as high as the core: no plates left")


def _bobbin(r: Reader) -> Bobbin:
    shape = r.choice("shape", ("rect", "round"))
    tube_w = r.quantity("tube_width", "length", maximum=MAX_DIMENSION_M)
    tube_d = r.quantity("tube_depth", "length", tube_w, maximum=MAX_DIMENSION_M) if shape == "rect" else tube_w
    if shape == "round":
        r.raw("tube_depth", None)
    pins_raw = r.raw("pins")
    if isinstance(pins_raw, list):
        pins = tuple(str(p).strip() for p in pins_raw)
        if not pins:
            raise r.error("a bobbin has at least one pin (the windings start and finish on pins)", "pins")
        if len(set(pins)) != len(pins):
            raise r.error("pin names repeat", "pins")
    else:
        n = r.integer("pins", minimum=1, maximum=200)
        pins = tuple(str(i) for i in range(1, n + 1))
    b = Bobbin(
        id=r.text("id"), cores=core_ids(r), shape=shape, tube_width_m=tube_w, tube_depth_m=tube_d,
        breadth_m=r.quantity("breadth", "length", maximum=MAX_DIMENSION_M),
        height_m=r.quantity("height", "length", maximum=MAX_DIMENSION_M),
        pins=pins, pin_pitch_m=r.quantity("pin_pitch", "length", 0.005),
        pin_rows=r.integer("pin_rows", 2 if len(pins) > 4 else 1, minimum=1, maximum=2),
        sections=r.integer("sections", 1, minimum=1, maximum=4), thermal_class_c=_thermal_class(r),
        price=r.decimal("price"), source=r.text("source"), stack_m=r.quantity("stack", "length", None, maximum=MAX_DIMENSION_M),
        clips=r.integer("clips", 0, minimum=0, maximum=8), raw=_plain(r.data),
        pin_row_spacing_m=r.quantity("pin_row_spacing", "length", None),
        pin_size_m=r.quantity("pin_size", "length", None),
        core_creepage_m=r.quantity("core_creepage", "length", None),
        wall_voltage_v=r.quantity("wall_voltage", "voltage", None),
        chamber_breadths_m=chamber_breadths(r),
        divider_thickness_m=r.quantity("divider_thickness", "length", None, maximum=MAX_DIMENSION_M),
        divider_height_m=r.quantity("divider_height", "length", None, maximum=MAX_DIMENSION_M),
    )
    r.done(renamed=RENAMED_KEYS["bobbins"])
    check_chambers(r, b)
    return b


def _tape(r: Reader) -> Tape:
    t = Tape(id=r.text("id"), name=r.text("name"), thickness_m=r.quantity("thickness", "length"),
             dielectric_strength_v_m=r.quantity("dielectric_strength", "electric_field"),
             thermal_class_c=_thermal_class(r), width_m=r.quantity("width", "length"),
             price_per_m2=r.decimal("price_per_m2"), source=r.text("source"), raw=_plain(r.data))
    r.done()
    return t


def _sleeving(r: Reader) -> Sleeving:
    s = Sleeving(id=r.text("id"), name=r.text("name"), bore_m=r.quantity("bore", "length"),
                 wall_m=r.quantity("wall", "length"), breakdown_v=r.quantity("breakdown_voltage", "voltage"),
                 thermal_class_c=_thermal_class(r), price_per_m=r.decimal("price_per_m"),
                 source=r.text("source"), raw=_plain(r.data))
    r.done()
    return s


def _varnish(r: Reader) -> Varnish:
    v = Varnish(id=r.text("id"), name=r.text("name"), thermal_class_c=_thermal_class(r),
                cure_temperature_c=r.quantity("cure_temperature", "temperature"),
                cure_time_s=r.quantity("cure_time", "time"),
                winding_volume_share=r.number("winding_volume_share", 0.15, minimum=0.0, maximum=1.0),
                price_per_litre=r.decimal("price_per_litre"), source=r.text("source"), raw=_plain(r.data))
    r.done(renamed=RENAMED_KEYS["varnishes"])
    return v


#: The largest dimension a catalogue core, bobbin or stack may have (a guard against a slip of the
#: unit such as 1e300 mm or 400 m; the shop's largest cores are a few hundred millimetres).
MAX_DIMENSION_M = 2.0
#: The lowest Curie point a ferrite may have (common practice: MnZn and NiZn power ferrites 150-300 degC).
FERRITE_CURIE_MIN_C = 100.0


def _current_densities(cd: Reader) -> CurrentDensities:
    def j(key: str, default=None):
        return cd.quantity(key, "current_density", default, minimum=0.1e6, maximum=50e6)

    out = CurrentDensities(natural=j("natural"), forced=j("forced", None), potted=j("potted", None))
    cd.done()
    return out


def _hipot(hp: Reader) -> HipotFigures:
    def volts(key: str, default=_NO_DEFAULT):
        args = () if default is _NO_DEFAULT else (default,)
        return hp.quantity(key, "voltage", *args, minimum=50.0, maximum=100e3)

    basic = volts("basic")
    supplementary = volts("supplementary", None)
    out = HipotFigures(
        functional_v=volts("functional", 500.0), basic_v=basic,
        supplementary_v=basic if supplementary is None else supplementary, reinforced_v=volts("reinforced"),
        type_duration_s=hp.quantity("type_duration", "time", 60.0, minimum=0.1, maximum=3600.0),
        routine_factor=hp.number("routine_factor", 1.2, minimum=1.0, maximum=2.0),
        routine_duration_s=hp.quantity("routine_duration", "time", 1.0, minimum=0.1, maximum=3600.0),
        trip_current_a=hp.quantity("trip_current", "current", 0.005, minimum=1e-5, maximum=1.0),
    )
    hp.done()
    if out.reinforced_v < out.basic_v:
        raise hp.error("reinforced insulation is tested at no less than basic", "reinforced")
    return out


def _labor(lb: Reader) -> LaborFigures:
    """The quote's time model, typed and range-checked here so `catalog check` sees every bad figure."""
    from decimal import Decimal as D

    def num(key: str, minimum: float, maximum: float) -> Decimal:
        return D(repr(lb.number(key, minimum=minimum, maximum=maximum)))

    def secs(key: str) -> Decimal:
        # one operation of one unit: up to a shift (8 h); anything longer is a slip of the unit
        return D(repr(lb.quantity(key, "time", allow_zero=True, maximum=8 * 3600.0)))

    out = LaborFigures(
        bobbin_turns_per_minute=num("bobbin_turns_per_minute", 1.0, 20000.0),
        toroid_turns_per_minute=num("toroid_turns_per_minute", 1.0, 5000.0),
        fine_wire_below_m=lb.quantity("fine_wire_below", "length", allow_zero=True, maximum=0.005),
        fine_wire_factor=num("fine_wire_factor", 1.0, 20.0),
        heavy_wire_above_m=lb.quantity("heavy_wire_above", "length", maximum=0.05),
        heavy_wire_factor=num("heavy_wire_factor", 1.0, 20.0),
        litz_factor=num("litz_factor", 1.0, 20.0),
        per_winding_s=secs("per_winding"), per_layer_tape_s=secs("per_layer_tape"),
        per_termination_s=secs("per_termination"), core_assembly_s=secs("core_assembly"),
        per_lamination_s=secs("per_lamination"), impregnation_s=secs("impregnation"), test_s=secs("test"),
    )
    lb.done()
    if out.fine_wire_below_m >= out.heavy_wire_above_m:
        raise lb.error("fine wire must be thinner than heavy wire", "fine_wire_below")
    return out


_FORMAT_LITERAL = re.compile(r"[A-Za-z0-9._-]*")


def _work_order_format(r: Reader) -> str:
    """The work-order number format: {year}, {seq} (required) and {part}; literal text file-name safe."""
    import string

    fmt = r.text("work_order_format", "WO-{year}-{seq:05d}", max_len=60)
    try:
        fields = [(lit, name) for lit, name, _spec, _conv in string.Formatter().parse(fmt)]
        fmt.format(year=2026, seq=1, part="X")
    except (KeyError, IndexError, ValueError, AttributeError):
        raise r.error("work-order format may use only {year}, {seq} and {part}", "work_order_format") from None
    names = {name for _lit, name in fields if name is not None}
    if "seq" not in names:
        raise r.error("work-order format needs the {seq} field (the register's running number)", "work_order_format")
    literal = "".join(lit for lit, _name in fields)
    if ".." in literal or not _FORMAT_LITERAL.fullmatch(literal):
        raise r.error("work-order format may hold letters, digits, '.', '_' and '-' around its fields (the number "
                      "names the work order's files)", "work_order_format")
    return fmt


def _shop(r: Reader) -> Shop:
    densities = _current_densities(r.mapping("current_density"))
    hipot = _hipot(r.mapping("hipot"))
    ir = r.mapping("insulation_resistance")
    insulation_resistance = InsulationResistanceFigures(
        voltage_v=ir.quantity("voltage", "voltage", minimum=10.0, maximum=20e3),
        minimum_ohm=ir.quantity("minimum", "resistance", minimum=1e3, maximum=1e15))
    ir.done()
    tol = r.mapping("tolerances")
    tolerances = Tolerances(**{k: float(_pct(tol, k, maximum=Decimal("0.5")))
                               for k in ("dcr", "ratio", "inductance", "open_circuit_voltage")})
    tol.done()
    fmt = _work_order_format(r)
    labor = _labor(r.mapping("labor"))
    documents = _shop_documents(r)
    if r.has("margin"):
        raise r.error(RENAMED_KEYS["shop"]["margin"], "margin")
    profit_margin = _pct(r, "profit_margin")
    if profit_margin >= 1:
        raise r.error(f"a profit margin of {(profit_margin * 100).normalize():f} % leaves no price "
                      "(cost / (1 - profit_margin)); it must be below 100 %", "profit_margin")
    insulation = _insulation_basis(r.mapping("insulation")) if r.has("insulation") else None
    shop = Shop(
        name=r.text("name"), currency=r.text("currency", "USD"), labor_rate=r.decimal("labor_rate"),
        overhead=_pct(r, "overhead"), profit_margin=profit_margin, scrap_wire=_pct(r, "scrap_wire", maximum=Decimal(1)),
        setup_time_s=r.quantity("setup_time", "time", allow_zero=True, maximum=7 * 24 * 3600.0),
        current_density_a_m2=densities, bulge_factor=r.number("bulge_factor", 1.12, minimum=1.0, maximum=1.6),
        lead_length_m=r.quantity("lead_length", "length", 0.1, allow_zero=True, maximum=MAX_DIMENSION_M),
        flux_limit_fraction=r.number("flux_limit_fraction", 0.8, minimum=0.3, maximum=1.0),
        powder_saturation_fraction=r.number("powder_saturation_fraction", 0.8, minimum=0.3, maximum=1.0),
        hotspot_margin_k=r.quantity("hotspot_margin", "temperature_difference", 10.0, allow_zero=True, maximum=100.0),
        work_order_format=fmt, hipot=hipot, insulation_resistance=insulation_resistance,
        voltage_tolerance=r.tolerance_pair("voltage_tolerance", (0.0, 0.03)) or (0.0, 0.03), tolerances=tolerances,
        labor=labor, cooling=read_cooling(r),
        source=r.text("source"), register_path=r.text("register", None), documents=documents,
        raw={k: v for k, v in _plain(r.data).items() if k not in DOCUMENT_KEYS}, insulation=insulation,
    )
    r.done()
    return shop


def _material_group(text: str) -> str:
    from ..standards.insulation import MaterialGroup

    for g in MaterialGroup:
        if text.strip().lower() == g.value.lower():
            return g.value
    raise ValueError(f"expected a material group I, II, IIIa or IIIb, got '{text}'")


def _insulation_basis(r: Reader | None) -> InsulationBasis | None:
    """shop.insulation: the defaults every part's barriers are coordinated with, checked against the tables."""
    if r is None:
        return None
    from ..standards import insulation as ins

    cat_raw = r.raw("overvoltage_category", "II")
    try:
        category = ins.rated_impulse_voltage_v(230.0, cat_raw).category
    except ValueError as err:
        raise r.error(str(err), "overvoltage_category") from None
    pd = r.integer("pollution_degree", 2, minimum=1, maximum=3)
    if r.has("cti") == r.has("material_group"):
        raise r.error("give the material group (I, II, IIIa, IIIb) or the CTI of the bobbins and tapes, not both")
    try:
        group = (ins.material_group_from_cti(r.number("cti")).group.value if r.has("cti")
                 else _material_group(r.text("material_group")))
    except ValueError as err:
        raise r.error(str(err), "cti" if r.has("cti") else "material_group") from None
    altitude = r.quantity("altitude", "altitude", 2000.0, allow_zero=True)
    mains = r.quantity("mains_voltage", "voltage", 230.0)
    try:
        ins.altitude_correction_factor(altitude)
        ins.rated_impulse_voltage_v(mains, category)
    except ValueError as err:
        raise r.error(str(err), "mains_voltage" if "mains" in str(err) else "altitude") from None
    basis = InsulationBasis(
        standard=r.text("standard", "IEC 60664-1:2007 tables (IEC 62368-1, IEC 61558-1 equivalent)", max_len=200),
        overvoltage_category=category, pollution_degree=pd, material_group=group, altitude_m=altitude,
        mains_v=mains, hipot_step_v=r.quantity("hipot_step", "voltage", 50.0))
    r.done()
    return basis


# ---------------------------------------------------------------------------------------------- documents
# shop.paper, shop.address, shop.quote_terms and customers.yaml: what the documents print and the
# quote's commercial terms. They shape no design, so they are left out of Shop.raw (the part of the
# shop file a release fingerprint covers): a new address or payment term does not void any release.

DOCUMENT_KEYS = ("paper", "address", "quote_terms")


def _party(r: Reader, name: str | None = None) -> Party:
    """An address block; ``name`` given (the shop's own) means the mapping carries no id or name."""
    lines = r.list_of("lines", [])
    for i, line in enumerate(lines):
        if isinstance(line, (dict, list)) or line is None:
            raise r.item_error("lines", i, "expected one line of the address as text")
    party = Party(id=r.text("id") if name is None else "", name=r.text("name") if name is None else name,
                  lines=tuple(str(x) for x in lines), attention=r.text("attention", ""),
                  phone=r.text("phone", ""), email=r.text("email", ""), raw=_plain(r.data))
    r.done()
    return party


def _customer(r: Reader) -> Party:
    return _party(r)


def _buy_breaks(r: Reader, key: str, dimension: str | None) -> tuple:
    out: list[BuyBreak] = []
    for item in r.items(key, []):
        threshold = item.quantity("from", dimension) if dimension else item.number("from", minimum=1)
        discount = _pct(item, "discount")
        if not Decimal(0) <= discount < Decimal(1):
            raise item.error("must be from 0 % to below 100 %", "discount")
        item.done()
        if out and threshold <= out[-1].threshold:
            raise item.error("price breaks go from the smallest quantity up", "from")
        out.append(BuyBreak(threshold=threshold, discount=discount))
    return tuple(out)


def _quote_terms(r: Reader | None) -> QuoteTerms:
    if r is None:
        return QuoteTerms()
    learning = r.mapping("learning", None)
    first, rate = 1.0, 1.0
    if learning is not None:
        first = learning.number("first_unit", minimum=1.0, maximum=4.0)
        rate = float(_pct(learning, "rate"))
        if not 0.7 <= rate <= 1.0:
            raise learning.error("a learning rate from 70 % to 100 % (each doubling of the count)", "rate")
        learning.done()
    breaks = r.mapping("price_breaks", None)
    by_mass = _buy_breaks(breaks, "by_mass", "mass") if breaks is not None else ()
    by_count = _buy_breaks(breaks, "by_count", None) if breaks is not None else ()
    if breaks is not None:
        breaks.done()
    terms = QuoteTerms(
        lead_time_s=r.quantity("lead_time", "time", None), repeat_lead_time_s=r.quantity("repeat_lead_time", "time", None),
        payment=r.text("payment", ""), delivery=r.text("delivery", ""), signatory=r.text("signatory", ""),
        signatory_title=r.text("signatory_title", ""), learning_first_unit=first, learning_rate=rate,
        breaks_by_mass=by_mass, breaks_by_count=by_count)
    r.done()
    return terms


def _shop_documents(r: Reader) -> ShopDocuments:
    paper = r.text("paper", "A4").strip()
    match = {k.casefold(): k for k in PAPER_SIZES_M}.get(paper.casefold())
    if match is None:
        raise r.error(f"expected one of {' | '.join(PAPER_SIZES_M)}, got '{paper}'", "paper")
    address = r.mapping("address", None)
    party = _party(address, name=r.text("name")) if address is not None else None
    return ShopDocuments(paper=match, address=party, terms=_quote_terms(r.mapping("quote_terms", None)))


_BUILDERS: dict[str, Callable[[Reader], Any]] = {"wires": _wire, "cores": _core, "bobbins": _bobbin, "materials": _material,
             "tapes": _tape, "sleevings": _sleeving, "varnishes": _varnish, "customers": _customer}


def _read_dir(root: Path, problems: list | None):
    """Parse every YAML file; with ``problems`` given, collect errors instead of raising."""

    def fail(err: SpecError):
        if problems is None:
            raise err
        problems.append(err)

    files = sorted(list(root.glob("*.yaml")) + list(root.glob("*.yml")))
    if not files:
        raise SpecError("holds no .yaml files; is this a catalogue folder?", file=str(root))
    tables: dict[str, dict[str, Any]] = {k: {} for k in _BUILDERS}
    locations: dict = {}
    shop = None
    for path in files:
        try:
            data = load_yaml(path, "catalogue file")
        except SpecError as err:
            fail(err)
            continue
        name = str(path)
        if data is None:
            continue
        try:
            top = Reader(data, name)
        except SpecError as err:
            fail(err)
            continue
        for key in data:
            if key not in TOP_KEYS:
                fail(top.error(f"unknown section '{key}'; a catalogue file holds {', '.join(TOP_KEYS)}", key))
                continue
            if key == "shop":
                try:
                    if shop is not None:
                        raise top.error("a second 'shop' section; there is one shop", key)
                    shop = _shop(top.mapping("shop"))
                except SpecError as err:
                    fail(err)
                continue
            try:
                entries = top.items(key)
            except SpecError as err:
                fail(err)
                continue
            for entry in entries:
                try:
                    obj = _BUILDERS[key](entry)
                except SpecError as err:
                    fail(err)
                    continue
                if obj.id in locations:
                    f, ln = locations[obj.id]
                    fail(entry.error(f"id '{obj.id}' is used twice (first at {f}:{ln})", "id"))
                    continue
                tables[key][obj.id] = obj
                locations[obj.id] = (name, entry.line_of("id"))
    if shop is None:
        fail(SpecError("no 'shop' section (labor rate, margins, test voltages) in any catalogue file",
                       file=str(root)))
    return tables, shop, locations


def _cross_check(tables: dict, locations: dict, problems: list | None) -> None:
    def fail(item_id, key, message):
        f, ln = locations.get(item_id, (None, None))
        err = SpecError(message, file=f, line=ln, path=f"{item_id}.{key}")
        if problems is None:
            raise err
        problems.append(err)

    for core in tables["cores"].values():
        if core.material not in tables["materials"]:
            fail(core.id, "material", f"unknown material '{core.material}'")
    check_bobbins(tables, fail)

def load_catalog(root: str | os.PathLike | None = None) -> Catalog:
    """Load the catalogue folder (see ``resolve_catalog_dir``) or raise the first SpecError.

    A successfully checked catalogue is cached (a pickle under the user's cache folder, keyed on every
    file's name, size and modification time and on specgen's own loader), so the quick commands skip
    the YAML parse and the geometry cross-check. ``SPECGEN_CACHE=0`` turns the cache off.
    """
    path = resolve_catalog_dir(root)
    key = _cache_key(path)
    cached = _cache_read(key)
    if cached is not None:
        return cached
    tables, shop, locations = _read_dir(path, None)
    _cross_check(tables, locations, None)
    cat = Catalog(root=str(path), shop=shop, locations=locations, **tables)
    _cache_write(key, cat)
    return cat


def _cache_dir() -> Path | None:
    if os.environ.get("SPECGEN_CACHE", "1") in ("0", "no", "off", "false"):
        return None
    base = os.environ.get("XDG_CACHE_HOME") or os.path.join(os.path.expanduser("~"), ".cache")
    return Path(base) / "specgen"


def _cache_key(path: Path) -> str | None:
    import hashlib

    if _cache_dir() is None:
        return None
    h = hashlib.sha256()
    from .. import __version__

    h.update(__version__.encode())
    for own in (Path(__file__), Path(__file__).with_name("models.py"), Path(__file__).parent.parent / "loading.py"):
        st = own.stat()
        h.update(f"{own.name}:{st.st_size}:{st.st_mtime_ns}".encode())
    h.update(str(path.resolve()).encode())
    for f in sorted(list(path.glob("*.yaml")) + list(path.glob("*.yml"))):
        st = f.stat()
        h.update(f"{f.name}:{st.st_size}:{st.st_mtime_ns}".encode())
    return h.hexdigest()[:32]


def _cache_read(key: str | None) -> Catalog | None:
    folder = _cache_dir()
    if key is None or folder is None:
        return None
    import pickle

    try:
        with open(folder / f"catalog-{key}.pickle", "rb") as fh:
            obj = pickle.load(fh)
        return obj if isinstance(obj, Catalog) else None
    except Exception:       # a missing, stale or unreadable cache is simply rebuilt
        return None


def _cache_write(key: str | None, cat: Catalog) -> None:
    folder = _cache_dir()
    if key is None or folder is None:
        return
    import pickle

    try:
        folder.mkdir(parents=True, exist_ok=True)
        for old in folder.glob("catalog-*.pickle"):
            if old.stat().st_mtime < __import__("time").time() - 7 * 86400:
                old.unlink(missing_ok=True)
        from ..atomic import write_atomic

        write_atomic(folder / f"catalog-{key}.pickle", pickle.dumps(cat, protocol=pickle.HIGHEST_PROTOCOL))
    except Exception:       # no cache folder (read-only home, say): run uncached
        pass


def check_catalog(root: str | os.PathLike | None = None) -> list:
    """Every problem in the catalogue, in file order, as SpecErrors (an empty list is a clean bill)."""
    problems: list = []
    try:
        path = resolve_catalog_dir(root)
        tables, shop, locations = _read_dir(path, problems)
        _cross_check(tables, locations, problems)
    except SpecError as err:
        problems.append(err)
    return problems
