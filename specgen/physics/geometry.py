"""Core geometry: IEC 60205 effective parameters, winding windows, surfaces, mean turn lengths.

Every length in metres, area in m^2, volume in m^3. Effective parameters follow IEC 60205
(Calculation of the effective parameters of magnetic piece parts): the core is split into segments of
length l_i and cross-section A_i along the mean flux path, C1 = sum(l/A), C2 = sum(l/A^2),
le = C1^2/C2, Ae = C1/C2, Ve = C1^3/C2^2. Branches that split the flux symmetrically (the two outer
legs of an E core) enter as one segment with the summed area, as IEC 60205 does.

Naming used throughout (bobbin-wound parts): the window *height* returned by ``window_height_m`` is
the build depth available across the window (from the centre leg out); the window *breadth*
(``window_breadth_m``) is the winding length along the leg. The ``dims`` key ``window_height`` is the
drawing dimension of the window measured along the leg, i.e. the breadth.
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from ._types import Arr, ArrayLike, FloatArray


class EffectiveParams(NamedTuple):
    """IEC 60205 effective parameters of a magnetic circuit (SI units)."""

    c1_per_m: float   # core constant C1 = sum l/A [1/m]
    c2_per_m3: float  # C2 = sum l/A^2 [1/m^3]
    le_m: float       # effective magnetic path length [m]
    ae_m2: float      # effective cross-section [m^2]
    ve_m3: float      # effective volume [m^3]
    amin_m2: float    # minimum cross-section along the path [m^2]


def _from_c1_c2(c1: float, c2: float, amin: float) -> EffectiveParams:
    return EffectiveParams(float(c1), float(c2), float(c1 * c1 / c2), float(c1 / c2),
                           float(c1 ** 3 / c2 ** 2), float(amin))


def _positive(**values: float) -> None:
    for name, value in values.items():
        if not value > 0.0:
            raise ValueError(f"{name} must be positive, got {value!r}")


def effective_params_from_segments(lengths_m: ArrayLike, areas_m2: ArrayLike) -> EffectiveParams:
    """Effective parameters from series segments of a magnetic circuit (IEC 60205 summation).

    Parameters
    ----------
    lengths_m : sequence of segment lengths along the mean flux path [m]
    areas_m2 : sequence of the segments' cross-sections [m^2] (parallel symmetric branches summed)

    Returns
    -------
    EffectiveParams with C1 = sum l/A, C2 = sum l/A^2, le = C1^2/C2, Ae = C1/C2, Ve = C1^3/C2^2,
    amin = min A.

    References
    ----------
    IEC 60205, Calculation of the effective parameters of magnetic piece parts.
    """
    l = np.asarray(lengths_m, dtype=float)
    a = np.asarray(areas_m2, dtype=float)
    if l.shape != a.shape or l.size == 0:
        raise ValueError("lengths_m and areas_m2 must be non-empty and of equal length")
    if np.any(l < 0.0) or np.any(a <= 0.0):
        raise ValueError("segment lengths must be >= 0 and areas > 0")
    return _from_c1_c2(np.sum(l / a), np.sum(l / a ** 2), np.min(a))


def toroid_effective(od_m: float, id_m: float, height_m: float, stacking_factor: float = 1.0) -> EffectiveParams:
    """Effective parameters of a toroid of rectangular cross-section (closed form).

    With r1 = id/2, r2 = od/2, h = height, k = stacking factor (1 for ferrite and powder, < 1 for
    tape-wound strip):
    le = 2 pi ln(r2/r1) / (1/r1 - 1/r2),  Ae = k h ln^2(r2/r1) / (1/r1 - 1/r2),  Ve = le Ae,
    C1 = le/Ae, C2 = le/Ae^2, amin = k h (r2 - r1).

    References
    ----------
    IEC 60205, toroidal cores of rectangular section.
    """
    r1 = float(id_m) / 2.0
    r2 = float(od_m) / 2.0
    h = float(height_m)
    k = float(stacking_factor)
    _positive(id_m=r1, height_m=h, stacking_factor=k)
    if not r2 > r1:
        raise ValueError("toroid od_m must exceed id_m")
    ln = np.log(r2 / r1)
    inv = 1.0 / r1 - 1.0 / r2
    le = 2.0 * np.pi * ln / inv
    ae = k * h * ln * ln / inv
    return _from_c1_c2(le / ae, le / ae ** 2, k * h * (r2 - r1))


def _e_loop(centre_area: float, centre_half_width: float, outer_area: float, outer_leg_width: float, yoke_area: float,
            yoke: float,
            span: float, window_height: float) -> EffectiveParams:
    """Segments of the E-type loop (centre leg, outer legs, yokes, 4 corners) -> EffectiveParams.

    Straight parts run face to face: centre and outer legs over the window height, the yokes over
    ``span`` (centre-leg face to outer-leg face) at top and bottom. Each 90-degree corner is a quarter
    ellipse through the middle of the two members it joins, length pi (w1 + w2) / 8 (w = member widths
    in the plane of the loop), with the mean of the two areas. The centre leg serves each side with
    half its width.
    """
    lengths = [
        window_height,                                     # centre leg
        window_height,                                     # outer legs (both, in parallel)
        2.0 * span,                                        # yokes, top and bottom
        2.0 * np.pi * (outer_leg_width + yoke) / 8.0,      # two outer corners
        2.0 * np.pi * (centre_half_width + yoke) / 8.0,    # two centre corners
    ]
    areas = [
        centre_area,
        outer_area,
        yoke_area,
        (outer_area + yoke_area) / 2.0,
        (centre_area + yoke_area) / 2.0,
    ]
    return effective_params_from_segments(lengths, areas)


def ei_effective(tongue_m: float, stack_m: float, stacking_factor: float, window_width_m: float, window_height_m: float,
                 leg_m: float,
                 yoke_m: float) -> EffectiveParams:
    """Effective parameters of a stack of EI laminations (segment method).

    Parameters
    ----------
    tongue_m : centre tongue width a [m]
    stack_m : stack height (lamination build) [m]
    stacking_factor : iron fraction of the stack (e.g. 0.95); multiplies every area
    window_width_m : window width between tongue and outer leg [m] (scrapless: a/2)
    window_height_m : window height along the tongue [m] (scrapless: 1.5 a)
    leg_m : outer leg width [m] (scrapless: a/2)
    yoke_m : yoke width of E back and I bar [m] (scrapless: a/2)

    The loop: tongue (length window height, area a s k), the two outer legs in parallel (2 leg s k),
    yokes top and bottom over the window width (2 yoke s k), and four corners modelled as quarter
    ellipses through the member centre lines, length pi (w1 + w2)/8 each, area the mean of the two
    members. Butt-joint gaps between E and I are not included.

    References
    ----------
    IEC 60205 (segment summation C1 = sum l/A, C2 = sum l/A^2); corner treatment in the IEC 60205
    manner, approximated as described above.
    """
    a = float(tongue_m)
    s = float(stack_m)
    k = float(stacking_factor)
    ww, wh, leg, yoke = float(window_width_m), float(window_height_m), float(leg_m), float(yoke_m)
    _positive(tongue_m=a, stack_m=s, stacking_factor=k, window_width_m=ww, window_height_m=wh,
              leg_m=leg, yoke_m=yoke)
    return _e_loop(a * s * k, a / 2.0, 2.0 * leg * s * k, leg, 2.0 * yoke * s * k, yoke, ww, wh)


def e_core_effective(width_m: float, height_m: float, depth_m: float, window_width_m: float, window_height_m: float,
                     centre_leg_width_m: float | None = None, centre_leg_depth_m: float | None = None,
                     centre_leg_diameter_m: float | None = None, outer_legs_area_m2: float | None = None) -> EffectiveParams:
    """Effective parameters of a mated pair of E-type halves (E, EFD, ETD, PQ).

    Parameters
    ----------
    width_m : overall width A [m]
    height_m : overall height of the mated pair, 2B [m]
    depth_m : depth C of the outer legs and yokes [m]
    window_width_m : inner span E between the outer legs [m]
    window_height_m : mated window height along the legs, 2D [m]
    centre_leg_width_m : rectangular centre leg width F [m] (E, EFD)
    centre_leg_depth_m : rectangular centre leg depth [m]; default ``depth_m`` (EFD: smaller)
    centre_leg_diameter_m : round centre leg diameter [m] (ETD, PQ); replaces the width
    outer_legs_area_m2 : cross-section of both outer legs together [m^2], when their shape is not the flat
        block (A - E)/2 x C (PQ: see core_effective)

    Outer leg width p = (A - E)/2, yoke thickness h = (2B - 2D)/2. Segments: centre leg (2D), the two
    outer legs in parallel (2D, area 2 p C), yokes over (E - F)/2 per side at top and bottom (area
    2 h C), two outer and two centre corners as quarter ellipses, length pi (w1 + w2)/8 each with the
    mean of the joined areas (the centre leg counted with half its width per side).
    Approximations: outer legs and yokes are rectangular blocks (the curved inner faces of ETD legs and
    the shaped outer legs of PQ cores are replaced by flat ones of width (A - E)/2 and depth C); a round
    centre leg enters with area pi d^2/4 and half-width d/2 in the corner term; no air gap.

    References
    ----------
    IEC 60205, Calculation of the effective parameters of magnetic piece parts (segment method,
    parallel legs as summed areas, corner segments).
    """
    a, b2, c = float(width_m), float(height_m), float(depth_m)
    e, d2 = float(window_width_m), float(window_height_m)
    if centre_leg_diameter_m is not None:
        f = float(centre_leg_diameter_m)
        _positive(centre_leg_diameter_m=f)
        centre_area = np.pi * f * f / 4.0
    else:
        if centre_leg_width_m is None:
            raise ValueError("give centre_leg_width_m or centre_leg_diameter_m")
        f = float(centre_leg_width_m)
        cd = c if centre_leg_depth_m is None else float(centre_leg_depth_m)
        _positive(centre_leg_width_m=f, centre_leg_depth_m=cd)
        centre_area = f * cd
    p = (a - e) / 2.0
    h = (b2 - d2) / 2.0
    span = (e - f) / 2.0
    _positive(depth_m=c, window_height_m=d2, outer_leg_width=p, yoke_thickness=h,
              window_build=span)
    outer = 2.0 * p * c if outer_legs_area_m2 is None else float(outer_legs_area_m2)
    return _e_loop(centre_area, f / 2.0, outer, p, 2.0 * h * c, h, span, d2)


_GAUSS_X, _GAUSS_W = np.polynomial.legendre.leggauss(64)


def pot_effective(outer_diameter_m: float, inner_diameter_m: float, post_diameter_m: float, height_m: float,
                  window_height_m: float,
                  post_hole_m: float = 0.0, skirt_coverage: float = 1.0) -> EffectiveParams:
    """Effective parameters of a mated pair of pot-core or RM-core halves.

    Parameters
    ----------
    outer_diameter_m : outer diameter of the wall d1 [m]
    inner_diameter_m : inner diameter of the wall d2 [m]
    post_diameter_m : centre post diameter d3 [m]
    height_m : overall height of the mated pair [m]
    window_height_m : mated window height along the post [m]
    post_hole_m : diameter of the hole through the post d4 [m] (0 for none)
    skirt_coverage : fraction of the full outer ring present (1 for a pot core, < 1 for RM cores whose
        wall is cut away); scales the wall area and the plate area towards the wall.

    Segments: the post (window height, pi (d3^2 - d4^2)/4), the outer wall (window height,
    skirt_coverage pi (d1^2 - d2^2)/4), the two end plates as radial paths of thickness
    t = (height - window height)/2 from r3 = d3/2 to r2 = d2/2 with area A(r) = 2 pi r t g(r), and
    four corners (quarter ellipses, length pi (w1 + w2)/8, mean area). The plate integrals
    int dr/A and int dr/A^2 are evaluated by Gauss-Legendre quadrature; g(r) = 1 for a pot core, and
    for an RM core falls linearly from 1 at the post to skirt_coverage at the wall (an approximation of
    the cut-away plate; IEC 60205's dedicated RM formulas are not reproduced). Slots for leads are
    ignored.

    References
    ----------
    IEC 60205 (segment summation; radial end-plate integral for pot cores).
    """
    d1, d2, d3 = float(outer_diameter_m), float(inner_diameter_m), float(post_diameter_m)
    d4, ht, hw = float(post_hole_m), float(height_m), float(window_height_m)
    rf = float(skirt_coverage)
    t = (ht - hw) / 2.0
    _positive(post_diameter_m=d3, window_height_m=hw, plate_thickness=t, skirt_coverage=rf,
              wall_thickness=d1 - d2, window_build=d2 - d3, post_wall=d3 - d4)
    if d4 < 0.0 or rf > 1.0:
        raise ValueError("post_hole_m must be >= 0 and skirt_coverage <= 1")
    r2, r3 = d2 / 2.0, d3 / 2.0
    a_post = np.pi * (d3 * d3 - d4 * d4) / 4.0
    a_ring = rf * np.pi * (d1 * d1 - d2 * d2) / 4.0

    def plate_area(r: FloatArray) -> FloatArray:
        g = 1.0 - (1.0 - rf) * (r - r3) / (r2 - r3)
        return 2.0 * np.pi * r * t * g

    r = r3 + (r2 - r3) * (_GAUSS_X + 1.0) / 2.0
    w = _GAUSS_W * (r2 - r3) / 2.0
    ap = plate_area(r)
    c1_plates = 2.0 * np.sum(w / ap)
    c2_plates = 2.0 * np.sum(w / ap ** 2)

    wall = (d1 - d2) / 2.0
    post_w = (d3 - d4) / 2.0
    a_plate_wall, a_plate_post = float(plate_area(np.asarray(r2))), float(plate_area(np.asarray(r3)))
    lengths = np.array([hw, hw, 2.0 * np.pi * (wall + t) / 8.0, 2.0 * np.pi * (post_w + t) / 8.0])
    areas = np.array([a_post, a_ring, (a_ring + a_plate_wall) / 2.0, (a_post + a_plate_post) / 2.0])
    c1 = np.sum(lengths / areas) + c1_plates
    c2 = np.sum(lengths / areas ** 2) + c2_plates
    amin = min(a_post, a_ring, a_plate_wall, a_plate_post)
    return _from_c1_c2(c1, c2, amin)


SHAPES = ("EI", "TOROID", "E", "ETD", "EFD", "PQ", "RM", "POT")


def _shape(shape: str) -> str:
    s = str(shape).strip().upper()
    if s not in SHAPES:
        raise ValueError(f"unknown core shape {shape!r}; expected one of {', '.join(SHAPES)}")
    return s


def _need(shape: str, dims: dict[str, float], key: str) -> float:
    try:
        return float(dims[key])
    except KeyError:
        raise ValueError(f"{shape} core needs dimension {key!r}") from None


def ei_dims(dims: dict[str, float]) -> dict[str, float]:
    """An EI lamination's tongue, window and leg sizes [m] from its catalogue ``dims`` (the ones not given
    follow the scrapless proportions: window a/2 x 1.5a, outer legs and yoke a/2, for a tongue a)."""
    a = _need("EI", dims, "tongue")
    return {
        "tongue": a,
        "window_width": float(dims.get("window_width", a / 2.0)),
        "window_height": float(dims.get("window_height", 1.5 * a)),
        "leg": float(dims.get("leg", a / 2.0)),
        "yoke": float(dims.get("yoke", a / 2.0)),
    }


def ei_lamination_area_m2(tongue_m: float, window_width_m: float, window_height_m: float, leg_m: float,
                          yoke_m: float) -> float:
    """Face area of one E and one I lamination together [m^2]: the E's outline less its two windows, plus the I.

        W = a + 2 w + 2 p,   A_E = W (y + h) - 2 w h,   A_I = W y,   A = W (2 y + h) - 2 w h

    with tongue a, window width w and height h, outer leg p and yoke y (E back and I bar). Scrapless proportions
    (w = p = y = a/2, h = 1.5 a) give A = 6 a^2. The iron of a stack is A x the iron height (the lamination
    count x thickness), its full corners included, which the effective volume V_e of the segment method
    (``ei_effective``, quarter-ellipse corners) leaves out.

    References
    ----------
    The scrapless EI lamination (two E and I pairs punched from one strip without waste): e.g. McLyman,
    Transformer and Inductor Design Handbook, the EI lamination tables (from memory); plane geometry.
    """
    a, w, h, p, y = (float(x) for x in (tongue_m, window_width_m, window_height_m, leg_m, yoke_m))
    _positive(tongue_m=a, window_width_m=w, window_height_m=h, leg_m=p, yoke_m=y)
    width = a + 2.0 * w + 2.0 * p
    return width * (2.0 * y + h) - 2.0 * w * h


def _centre_width(s: str, dims: dict[str, float]) -> float:
    """Width (or diameter) of an E-type centre leg in the plane of the window."""
    if s in ("ETD", "PQ"):
        return _need(s, dims, "centre_leg_diameter")
    return _need(s, dims, "centre_leg_width")


def core_effective(shape: str, dims: dict[str, float], stack_m: float | None = None,
                   stacking_factor: float = 1.0) -> EffectiveParams:
    """Effective parameters of a core from its shape name and dimensions (dispatcher).

    Parameters
    ----------
    shape : "EI", "toroid", "E", "ETD", "EFD", "PQ", "RM" or "POT" (case-insensitive)
    dims : dict of floats in metres:
        EI: tongue; optional window_width (tongue/2), window_height (1.5 tongue), leg (tongue/2),
            yoke (tongue/2). ``stack_m`` is required.
        toroid: od, id, height (``stack_m``, if given, replaces height: stacked toroids).
        E / EFD: width, height, depth, window_width, window_height, centre_leg_width,
            optional centre_leg_depth.
        ETD / PQ: width, height, depth, window_width, window_height, centre_leg_diameter.
        POT / RM: outer_diameter, inner_diameter, post_diameter, height, window_height,
            optional post_hole, skirt_coverage.
    stack_m : lamination stack height [m] (EI) or stacked toroid height [m]; not used otherwise
    stacking_factor : iron fraction of laminated or tape-wound cores (1 for ferrite/powder)

    References
    ----------
    IEC 60205; see ``ei_effective``, ``toroid_effective``, ``e_core_effective``, ``pot_effective``.
    """
    s = _shape(shape)
    k = float(stacking_factor)
    if s == "EI":
        if stack_m is None:
            raise ValueError("EI core needs stack_m")
        d = ei_dims(dims)
        return ei_effective(d["tongue"], stack_m, k, d["window_width"], d["window_height"],
                            d["leg"], d["yoke"])
    if stack_m is not None and s != "TOROID":
        raise ValueError(f"stack_m applies to EI and toroid cores, not {s}")
    if s == "TOROID":
        h = _need(s, dims, "height") if stack_m is None else float(stack_m)
        return toroid_effective(_need(s, dims, "od"), _need(s, dims, "id"), h, k)
    if s in ("E", "EFD", "ETD", "PQ"):
        width, height, depth, ww, wh = (_need(s, dims, key) for key in
                                        ("width", "height", "depth", "window_width", "window_height"))
        if s == "PQ":
            # a PQ core's outer legs are shaped (thick at the corners, a round inner face) so that together
            # they carry the centre post's cross-section (the shape's design rule, common practice, from
            # memory); the flat block (A - E)/2 x C of an E core would make them a bottleneck they are not
            dia = _need(s, dims, "centre_leg_diameter")
            ep = e_core_effective(width, height, depth, ww, wh, centre_leg_diameter_m=dia,
                                  outer_legs_area_m2=max(np.pi * dia * dia / 4.0, (width - ww) * depth))
        elif s == "ETD":
            ep = e_core_effective(width, height, depth, ww, wh, centre_leg_diameter_m=_need(s, dims, "centre_leg_diameter"))
        else:
            cdepth = dims.get("centre_leg_depth")
            ep = e_core_effective(width, height, depth, ww, wh, centre_leg_width_m=_need(s, dims, "centre_leg_width"),
                                  centre_leg_depth_m=None if cdepth is None else float(cdepth))
        return _scale_areas(ep, k)
    # POT / RM
    ep = pot_effective(_need(s, dims, "outer_diameter"), _need(s, dims, "inner_diameter"),
                       _need(s, dims, "post_diameter"), _need(s, dims, "height"),
                       _need(s, dims, "window_height"), float(dims.get("post_hole", 0.0)),
                       float(dims.get("skirt_coverage", 1.0)))
    return _scale_areas(ep, k)


def _scale_areas(ep: EffectiveParams, k: float) -> EffectiveParams:
    """Multiply every segment area by the stacking factor k (C1/k, C2/k^2)."""
    if k == 1.0:
        return ep
    _positive(stacking_factor=k)
    return _from_c1_c2(ep.c1_per_m / k, ep.c2_per_m3 / k ** 2, ep.amin_m2 * k)


def window_area_m2(shape: str, dims: dict[str, float]) -> float:
    """Winding window area Wa of one window [m^2] (the cross-section a winding passes through).

    EI: window_width * window_height; E-types: (window_width - centre leg width or diameter)/2 *
    window_height; POT/RM: (inner_diameter - post_diameter)/2 * window_height; toroid: pi (id/2)^2.

    References
    ----------
    McLyman, Transformer and Inductor Design Handbook (window area Wa of the area product).
    """
    s = _shape(shape)
    if s == "TOROID":
        return float(np.pi * (_need(s, dims, "id") / 2.0) ** 2)
    # build depth across the window times the length along the leg
    return float(window_height_m(s, dims) * window_breadth_m(s, dims))


def window_height_m(shape: str, dims: dict[str, float]) -> float:
    """Build depth available across the window, from the centre leg outwards [m].

    For a bobbin-wound part "height" here is the radial build direction (layers stack up across it):
    E-types (window_width - centre leg)/2, EI window_width, POT/RM (inner_diameter - post_diameter)/2,
    toroid id/2 (the hole radius). Bobbin walls are not deducted; the caller does that.

    References
    ----------
    Geometry of the core drawing (IEC 60205 dimension conventions).
    """
    s = _shape(shape)
    if s == "EI":
        return ei_dims(dims)["window_width"]
    if s == "TOROID":
        return _need(s, dims, "id") / 2.0
    if s in ("POT", "RM"):
        return (_need(s, dims, "inner_diameter") - _need(s, dims, "post_diameter")) / 2.0
    return (_need(s, dims, "window_width") - _centre_width(s, dims)) / 2.0


def window_breadth_m(shape: str, dims: dict[str, float]) -> float:
    """Winding length available along the leg (the traverse of a layer) [m].

    E-types, EI and POT/RM: the window height along the leg (dims ``window_height``; for EI default
    1.5 tongue). Toroid: the inner circumference pi id, the length a single layer can occupy on the
    inside of the hole. This is also the G of McLyman's fringing factor for E/EI/POT cores.

    References
    ----------
    Geometry of the core drawing (IEC 60205 dimension conventions).
    """
    s = _shape(shape)
    if s == "EI":
        return ei_dims(dims)["window_height"]
    if s == "TOROID":
        return float(np.pi * _need(s, dims, "id"))
    return _need(s, dims, "window_height")


def _box_area(w: float, h: float, d: float) -> float:
    return 2.0 * (w * h + w * d + h * d)


def outer_surface_area_m2(shape: str, dims: dict[str, float], stack_m: float | None = None) -> float:
    """Outside surface area At of the assembled, wound part [m^2] (for McLyman's temperature rise).

    Approximations: EI - the box of the lamination outline (tongue + 2 window_width + 2 leg) x
    (window_height + 2 yoke) x (stack + 2 window_width), the coil standing proud of the stack by one
    window width on each side. E-types - the box width x height x max(depth, centre-leg depth (or
    diameter) + 2 x window build). POT/RM - the cylinder outer_diameter x height. Toroid - the wound
    toroid as a solid cylinder of (od + id/2) x (height + id/2), i.e. a winding build of id/4 on every
    face with the hole treated as filled.

    References
    ----------
    McLyman, Transformer and Inductor Design Handbook (surface area At for the temperature rise).
    """
    s = _shape(shape)
    if s == "EI":
        d = ei_dims(dims)
        if stack_m is None:
            raise ValueError("EI core needs stack_m")
        w = d["tongue"] + 2.0 * d["window_width"] + 2.0 * d["leg"]
        h = d["window_height"] + 2.0 * d["yoke"]
        return _box_area(w, h, float(stack_m) + 2.0 * d["window_width"])
    if s == "TOROID":
        h = _need(s, dims, "height") if stack_m is None else float(stack_m)
        build = _need(s, dims, "id") / 4.0
        od_w = _need(s, dims, "od") + 2.0 * build
        h_w = h + 2.0 * build
        return float(np.pi * od_w * h_w + 2.0 * np.pi * od_w ** 2 / 4.0)
    if s in ("POT", "RM"):
        d1, ht = _need(s, dims, "outer_diameter"), _need(s, dims, "height")
        return float(np.pi * d1 * ht + 2.0 * np.pi * d1 ** 2 / 4.0)
    build = window_height_m(s, dims)
    if s in ("ETD", "PQ"):
        centre_depth = _need(s, dims, "centre_leg_diameter")
    else:
        centre_depth = float(dims.get("centre_leg_depth", _need(s, dims, "depth")))
    depth = max(_need(s, dims, "depth"), centre_depth + 2.0 * build)
    return _box_area(_need(s, dims, "width"), _need(s, dims, "height"), depth)


def core_mass_kg(ve_m3: ArrayLike, density_kg_m3: ArrayLike) -> Arr:
    """Core mass m = Ve * density [kg] from effective volume [m^3] and density [kg/m^3].

    References
    ----------
    IEC 60205 (Ve as the core volume for mass and loss).
    """
    return _out(np.asarray(ve_m3, dtype=float) * np.asarray(density_kg_m3, dtype=float))


def lamination_count(stack_m: ArrayLike, lamination_thickness_m: ArrayLike, stacking_factor: ArrayLike) -> Arr:
    """Number of laminations in a stack, n = round(stack * k / t).

    Parameters
    ----------
    stack_m : stack height [m]
    lamination_thickness_m : thickness of one lamination [m]
    stacking_factor : iron fraction k of the stack

    References
    ----------
    Definition of the stacking factor (IEC 60404-13 style: iron height over stack height).
    """
    n = np.rint(np.asarray(stack_m, dtype=float) * np.asarray(stacking_factor, dtype=float)
                / np.asarray(lamination_thickness_m, dtype=float))
    return int(n) if n.ndim == 0 else n.astype(int)


def mlt_rect_m(tube_width_m: ArrayLike, tube_depth_m: ArrayLike, build_to_layer_centre_m: ArrayLike) -> Arr:
    """Mean turn length of a layer on a rectangular former, MLT = 2 (w + d) + 2 pi h [m].

    Parameters
    ----------
    tube_width_m, tube_depth_m : outside dimensions of the former (bobbin tube) [m]
    build_to_layer_centre_m : radial build from the former surface to the layer's centre h [m]

    The turn is the rectangle offset outward by h, its corners rounded with radius h.

    References
    ----------
    Geometry of an offset rectangle (perimeter 2(w + d) + 2 pi h); McLyman, MLT of a winding.
    """
    w = np.asarray(tube_width_m, dtype=float)
    d = np.asarray(tube_depth_m, dtype=float)
    h = np.asarray(build_to_layer_centre_m, dtype=float)
    return _out(2.0 * (w + d) + 2.0 * np.pi * h)


def mlt_round_m(tube_diameter_m: ArrayLike, build_to_layer_centre_m: ArrayLike) -> Arr:
    """Mean turn length of a layer on a round former, MLT = pi (D + 2 h) [m].

    References
    ----------
    Circle circumference; McLyman, MLT of a winding.
    """
    d = np.asarray(tube_diameter_m, dtype=float)
    h = np.asarray(build_to_layer_centre_m, dtype=float)
    return _out(np.pi * (d + 2.0 * h))


def toroid_turn_length_m(od_m: ArrayLike, id_m: ArrayLike, height_m: ArrayLike, build_to_layer_centre_m: ArrayLike) -> Arr:
    """Length of one turn of a toroid layer [m].

    The turn encloses the core section ((od - id)/2 wide, height high) offset outward by the build h:
    length = 2 ((od - id)/2 + height) + 2 pi h. The same build is assumed on the inside, outside and
    both faces (in practice the outside build is thinner; this errs long).

    References
    ----------
    Geometry of an offset rectangle.
    """
    w = (np.asarray(od_m, dtype=float) - np.asarray(id_m, dtype=float)) / 2.0
    hgt = np.asarray(height_m, dtype=float)
    h = np.asarray(build_to_layer_centre_m, dtype=float)
    return _out(2.0 * (w + hgt) + 2.0 * np.pi * h)


def toroid_inner_circumference_m(id_m: ArrayLike, build_m: ArrayLike) -> Arr:
    """Inner circumference left for a layer as the hole fills, pi (id - 2 build) [m].

    Parameters
    ----------
    id_m : core inside diameter [m]
    build_m : radial build already on the inside of the hole at this layer [m]

    References
    ----------
    Circle circumference (the limit on turns per layer of a toroid).
    """
    return _out(np.pi * (np.asarray(id_m, dtype=float) - 2.0 * np.asarray(build_m, dtype=float)))


def _out(x: ArrayLike) -> Arr:
    """A Python float for a 0-d result, the array otherwise."""
    x = np.asarray(x, dtype=float)
    return float(x) if x.ndim == 0 else x


def part_outline_m(shape: str, dims: dict[str, float], coating_m: float, stack_m: float | None,
                   bulged_build_m: ArrayLike) -> tuple[FloatArray, FloatArray, FloatArray]:
    """Bounding box of an assembled part, sorted largest first (length, width, height) [m].

    The same conventions as ``outer_surface_area_m2``: EI - the lamination outline x (stack + 2 window
    widths, the coil standing proud of the stack); E-types - width x height x max(depth, centre leg + 2
    window builds); POT/RM - the cylinder's box; toroid - the core over its coating plus the bulged winding
    build on every face. ``bulged_build_m`` may be an array (toroids).

    References
    ----------
    Geometry of the assembled part (bounding box).
    """
    d = dims
    b = np.asarray(bulged_build_m, dtype=float)
    sides: tuple[float | FloatArray, ...]
    if shape == "EI":
        e = ei_dims(d)
        sides = (e["tongue"] + 2 * e["window_width"] + 2 * e["leg"], e["window_height"] + 2 * e["yoke"],
                 (stack_m or 0.0) + 2 * e["window_width"])
    elif shape == "toroid":
        o = d["od"] + 2 * coating_m + 2 * b
        sides = (o, o, d["height"] + 2 * coating_m + 2 * b)
    elif shape in ("POT", "RM"):
        sides = (d["outer_diameter"], d["outer_diameter"], d["height"])
    else:
        build = window_height_m(shape, d)
        centre = d["centre_leg_diameter"] if shape in ("ETD", "PQ") else d.get("centre_leg_depth", d["depth"])
        sides = (d["width"], d["height"], max(d["depth"], centre + 2 * build))
    arr = np.broadcast_arrays(*[np.asarray(x, dtype=float) for x in sides])
    stacked = -np.sort(-np.stack(arr), axis=0)
    return stacked[0], stacked[1], stacked[2]
