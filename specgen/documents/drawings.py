"""SVG drawings for the work order: the pin and polarity diagram and the window cross-section to scale.

Pure functions of plain data taken from the Design (its ``floor``: tapes, core outline, pins): they
draw, they compute no physics and read no catalogue. Every length in the SVG is in millimetres of the printed page (the
``width``/``height`` attributes are in mm and the viewBox matches), so a drawing "at 4:1" measures four
times the real part when printed at 100 %. All text put into the SVG is XML-escaped here.

Conventions drawn (common practice, every circuits text): terminals marked with a dot have the same
instantaneous polarity; current entering the dotted terminals produces aiding flux.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from html import escape

from markupsafe import Markup

#: The dot-convention legend printed under the pin diagram (common practice, every circuits text).
DOT_LEGEND = ("Dotted terminals have the same instantaneous polarity: "
              "current into the dots gives aiding flux.")

#: Scales tried for the cross-section, largest first (drawing : real).
SCALES = (20, 10, 8, 6, 5, 4, 3, 2.5, 2, 1.5, 1, 0.75, 0.5)

FONT = "DejaVu Sans, sans-serif"
INK = "#111"
GREY = "#888"
LIGHT = "#ddd"
TAPE = "#c77700"
COPPER = ("#b4561e", "#2a62b8", "#2f8a3a", "#8a3a9a", "#a0871a", "#1f8a8a")   # one colour per winding


def _n(x: float) -> str:
    """A coordinate for SVG text: 2 decimals, no trailing zeros."""
    s = f"{x:.2f}".rstrip("0").rstrip(".")
    return "0" if s in ("-0", "") else s


def _t(x: float, y: float, text: str, size: float = 3.5, anchor: str = "start", weight: str = "normal",
       fill: str = INK, cls: str = "") -> str:
    c = f' class="{cls}"' if cls else ""
    return (f'<text x="{_n(x)}" y="{_n(y)}" font-size="{_n(size)}" font-family="{FONT}" '
            f'text-anchor="{anchor}" font-weight="{weight}" fill="{fill}"{c}>{escape(str(text))}</text>')


def _svg(width_mm: float, height_mm: float, body: list, label: str, cls: str) -> Markup:
    head = (f'<svg xmlns="http://www.w3.org/2000/svg" class="{cls}" width="{_n(width_mm)}mm" '
            f'height="{_n(height_mm)}mm" viewBox="0 0 {_n(width_mm)} {_n(height_mm)}" role="img" '
            f'aria-label="{escape(label)}">')
    return Markup(head + "".join(body) + "</svg>")


# ------------------------------------------------------------------------------------------------ pins


@dataclass(frozen=True)
class Coil:
    """One section of a winding as it appears on the pin diagram."""
    winding: str
    label: str            # "P.1" or "P"
    start: str
    finish: str
    turns: int
    colour_index: int = 0


@dataclass
class _Placed:
    coil: Coil
    a: tuple
    b: tuple
    level: int = 0
    row_a: int = 0
    row_b: int = 0
    lo: float = 0.0
    hi: float = 0.0


def pin_layout(pins: list, rows: int) -> dict:
    """Pin name -> (row, column). Row 0 reads left to right, row 1 right to left (pins numbered round
    the former, as seen from the pin side)."""
    rows = 2 if rows >= 2 and len(pins) > 1 else 1
    per_row = math.ceil(len(pins) / rows)
    out = {}
    for i, p in enumerate(pins):
        row = i // per_row
        col = i % per_row
        if row == 1:
            col = per_row - 1 - col
        out[p] = (row, col)
    return out


# long: one SVG drawn top to bottom, a block per visible element
def pin_diagram(pins: list, rows: int, coils: list, dots: dict, *, leads: bool = False,
                width_mm: float = 170.0) -> Markup:
    """The pin and polarity diagram.

    pins: pin names in order (toroids: the lead labels); rows: 1 or 2 pin rows;
    coils: one Coil per section; dots: winding name -> the pin carrying its polarity dot;
    leads: True for flying leads (toroids), drawn as tags instead of bobbin pins.
    """
    rows = 2 if rows >= 2 and len(pins) > 1 else 1
    layout = pin_layout(pins, rows)
    per_row = max(1, math.ceil(len(pins) / rows))
    margin_x = 12.0
    pitch = min(24.0, (width_mm - 2 * margin_x) / max(1, per_row - 1)) if per_row > 1 else 0.0
    row_w = pitch * (per_row - 1)
    x0 = (width_mm - row_w) / 2.0

    def pin_x(p: str) -> float:
        return x0 + layout[p][1] * pitch

    # levels: coils whose pin spans overlap (more than touching at a shared tie pin) go deeper
    placed: list[_Placed] = []
    for c in coils:
        if c.start not in layout or c.finish not in layout:
            continue
        pl = _Placed(c, (pin_x(c.start), 0), (pin_x(c.finish), 0), row_a=layout[c.start][0],
                     row_b=layout[c.finish][0])
        pl.lo, pl.hi = sorted((pl.a[0], pl.b[0]))
        placed.append(pl)
    level_h = 17.0
    levels_used = {0: 0, 1: 0}
    for row in (0, 1):
        same = sorted((p for p in placed if p.row_a == p.row_b == row), key=lambda p: (p.hi - p.lo, p.lo))
        taken: list[list] = []
        for p in same:
            lvl = 0
            while any(max(p.lo, q.lo) < min(p.hi, q.hi) - 1e-6 or
                      (abs(p.hi - p.lo) < 1e-6 and q.lo - 1e-6 <= p.lo <= q.hi + 1e-6)
                      for q in (taken[lvl] if lvl < len(taken) else [])):
                lvl += 1
            while len(taken) <= lvl:
                taken.append([])
            taken[lvl].append(p)
            p.level = lvl
        levels_used[row] = len(taken)

    top_y = 16.0
    top_band = max(1, levels_used[0]) * level_h + 8.0
    bottom_band = max(1, levels_used[1]) * level_h + 8.0 if rows == 2 else 0.0
    cross = any(p.row_a != p.row_b for p in placed)
    mid = 14.0 if cross else 4.0
    bottom_y = top_y + top_band + mid + bottom_band if rows == 2 else None
    legend_y = (bottom_y + 14.0) if bottom_y is not None else top_y + top_band + 6.0
    # pins of the second row exist only when there are two rows: the second row's y is then set
    second_y = bottom_y if bottom_y is not None else top_y
    height = legend_y + 14.0

    body = []
    # the former (bobbin outline) or the core for flying leads
    if not leads:
        body.append(f'<rect x="{_n(x0 - 8)}" y="{_n(top_y - 4)}" width="{_n(row_w + 16)}" '
                    f'height="{_n((bottom_y if bottom_y else top_y + top_band) - top_y + 8)}" rx="2" '
                    f'fill="none" stroke="{GREY}" stroke-width="0.4" stroke-dasharray="2 1.2"/>')
    used = {c.start for c in coils} | {c.finish for c in coils}
    for p in pins:
        row, _col = layout[p]
        x = pin_x(p)
        y = top_y if row == 0 else second_y
        on = p in used
        if leads:
            body.append(f'<rect x="{_n(x - 5)}" y="{_n(y - 3)}" width="10" height="6" rx="1" fill="#fff" '
                        f'stroke="{INK}" stroke-width="0.4"/>')
            body.append(_t(x, y + 1.3, p, 3.5, "middle", "bold", cls="pin-label"))
        else:
            body.append(f'<rect x="{_n(x - 1.6)}" y="{_n(y - 1.6)}" width="3.2" height="3.2" '
                        f'fill="{INK if on else "#fff"}" stroke="{INK if on else GREY}" stroke-width="0.4"/>')
            ly = y - 4.2 if row == 0 else y + 6.8
            body.append(_t(x, ly, p, 3.6 if on else 3.0, "middle", "bold" if on else "normal",
                           INK if on else GREY, cls="pin-label"))

    dot_done = set()
    for p in placed:
        c = p.coil
        colour = COPPER[c.colour_index % len(COPPER)]
        if p.row_a == p.row_b:
            row = p.row_a
            y_pin = top_y if row == 0 else second_y
            sign = 1 if row == 0 else -1
            yc = y_pin + sign * (8.0 + p.level * level_h)
            xa, xb = p.a[0], p.b[0]
            # leads down from the pins, then the coil between them
            body.append(f'<path d="M{_n(xa)} {_n(y_pin + sign * 1.6)} V{_n(yc)} M{_n(xb)} '
                        f'{_n(y_pin + sign * 1.6)} V{_n(yc)}" stroke="{colour}" stroke-width="0.6" fill="none"/>')
            if abs(xb - xa) < 1e-6:
                xa, xb = xa - pitch * 0.4, xa + pitch * 0.4
            body.append(_coil_path((xa, yc), (xb, yc), colour, bumps_per_mm=0.28, up=sign > 0))
            label_y = yc + (6.4 if sign > 0 else -7.0)
            body.append(_t((xa + xb) / 2, label_y, c.label, 3.5, "middle", "bold", colour, cls="coil-label"))
            body.append(_t((xa + xb) / 2, label_y + 3.8, f"{c.turns} t", 3.2, "middle", "normal", colour,
                           cls="coil-turns"))
            end_points = {c.start: (p.a[0], yc), c.finish: (p.b[0], yc)}
        else:
            ya = top_y + 4 if p.row_a == 0 else second_y - 4
            yb = top_y + 4 if p.row_b == 0 else second_y - 4
            a, b = (p.a[0], ya), (p.b[0], yb)
            body.append(_coil_path(a, b, colour, bumps_per_mm=0.28, up=True))
            body.append(_t((a[0] + b[0]) / 2 + 4, (a[1] + b[1]) / 2, f"{c.label}  {c.turns} t", 3.4, "start",
                           "bold", colour, cls="coil-label"))
            end_points = {c.start: a, c.finish: b}
        dot_pin = dots.get(c.winding)
        if dot_pin in end_points and (c.winding, dot_pin) not in dot_done:
            dot_done.add((c.winding, dot_pin))
            ex, ey = end_points[dot_pin]
            other = end_points[c.finish if dot_pin == c.start else c.start]
            dx = 4.0 if other[0] >= ex else -4.0
            dy = -3.4 if (p.row_a == 0) else 3.4
            body.append(f'<circle class="polarity-dot" data-winding="{escape(c.winding)}" '
                        f'data-pin="{escape(dot_pin)}" cx="{_n(ex + dx)}" cy="{_n(ey + dy)}" r="1.5" '
                        f'fill="{INK}"/>')
    # legend
    lx = 10.0
    body.append(f'<circle cx="{_n(lx - 4)}" cy="{_n(legend_y - 1.2)}" r="1.5" fill="{INK}"/>')
    first, _, second = DOT_LEGEND.partition(": ")
    body.append(_t(lx, legend_y, first + ":", 3.4, cls="legend"))
    body.append(_t(lx, legend_y + 4.4, second, 3.4, cls="legend"))
    view = ("Flying leads: tag every lead with its name." if leads else
            "Seen from the pin side; pins numbered round the bobbin. Check against the numbers moulded on it.")
    body.append(_t(lx - 6, legend_y + 10.5, view, 3.1, fill="#333", cls="legend"))
    return _svg(width_mm, height, body, "pin and polarity diagram", "pin-diagram")


def _coil_path(a: tuple, b: tuple, colour: str, bumps_per_mm: float = 0.3, up: bool = True,
               max_coil_mm: float = 30.0) -> str:
    """A winding symbol from a to b: straight wire, a row of half-circle bumps (at most ``max_coil_mm``
    long, centred), straight wire."""
    ax, ay = a
    bx, by = b
    length = math.hypot(bx - ax, by - ay)
    if length < 1e-6:
        return ""
    ux, uy = (bx - ax) / length, (by - ay) / length
    coil = min(length, max_coil_mm)
    lead = (length - coil) / 2.0
    n = max(3, min(8, int(round(coil * bumps_per_mm))))
    step = coil / n
    r = step / 2.0
    sweep = 1 if up else 0
    sx, sy = ax + ux * lead, ay + uy * lead
    d = [f"M{_n(ax)} {_n(ay)} L{_n(sx)} {_n(sy)}"]
    for i in range(1, n + 1):
        px, py = sx + ux * step * i, sy + uy * step * i
        d.append(f"A{_n(r)} {_n(r)} 0 0 {sweep} {_n(px)} {_n(py)}")
    d.append(f"L{_n(bx)} {_n(by)}")
    return f'<path d="{" ".join(d)}" stroke="{colour}" stroke-width="0.8" fill="none"/>'


# ------------------------------------------------------------------------------------------------ window


@dataclass(frozen=True)
class LayerBand:
    turns: int
    capacity: int
    centre_m: float           # build from the former to the layer's centre line


@dataclass(frozen=True)
class SectionDraw:
    order: int
    label: str                # "P.1"
    winding: str
    turns: int
    start_m: float            # build at the bottom of the first layer
    end_m: float              # build at the top of the last layer
    layer_height_m: float
    layers: tuple             # of LayerBand
    margin_m: float
    wire_diameter_m: float    # one strand (overall)
    strands: int
    round_wire: bool          # False for foil/strip: drawn as a band
    tape_after: str | None
    tape_after_m: float       # radial thickness of the tape after this section
    layer_tape_m: float       # between layers (0: none)
    colour_index: int = 0
    slot: tuple[int, int] = (0, 1)   # (place, of) among windings wound together in one layer (bifilar: of 2)
    x0_m: float = 0.0         # split bobbin: where its chamber starts, from the start flange
    breadth_m: float = 0.0    # split bobbin: its chamber's breadth (0: the whole breadth)
    tape_widths_m: tuple = ()         # the tape after: each width as laid, (from, to) along the breadth
    layer_tape_widths_m: tuple = ()   # the layer tape: the same (empty: drawn across the whole breadth)


def _tape_lines(widths: tuple, xs, y: float, stroke: float) -> list[str]:
    """A tape across the breadth at its true width: one line per width as laid (two widths overlap, the
    second drawn a stroke higher so the overlap shows)."""
    return [f'<line class="tape" x1="{_n(xs(a))}" y1="{_n(y - k * stroke)}" x2="{_n(xs(b))}" y2="{_n(y - k * stroke)}" '
            f'stroke="{TAPE}" stroke-width="{_n(stroke)}"/>' for k, (a, b) in enumerate(widths)]


def choose_scale(real_w_mm: float, real_h_mm: float, max_w_mm: float, max_h_mm: float) -> float:
    """The largest scale from SCALES that fits the drawing box."""
    for s in SCALES:
        if real_w_mm * s <= max_w_mm + 1e-9 and real_h_mm * s <= max_h_mm + 1e-9:
            return s
    return SCALES[-1]


def scale_text(scale: float) -> str:
    if scale >= 1:
        return f"{scale:g}:1"
    return f"1:{1 / scale:g}"


# long: one SVG drawn top to bottom, a block per visible element
def window_section(breadth_m: float, available_m: float, bulged_m: float, sections: list, *,
                   max_w_mm: float = 112.0, max_h_mm: float = 95.0,
                   dividers: tuple[tuple[float, float, float], ...] = ()) -> tuple:
    """Cross-section of a bobbin window to scale: (svg, scale).

    Horizontal: the winding breadth between the flanges; vertical: the build from the tube outwards.
    Each section's layers are rows of wire circles (or bands where a circle would be too small to see),
    its margins hatched, tapes drawn as lines at their true positions (the line is drawn at least 0.35 mm
    wide so that a 25 um tape can be seen), the available build height dashed.
    A split bobbin's dividers (x from the start flange, thickness, height) are drawn as walls, each section
    in its own chamber.
    """
    bw, ah = breadth_m * 1e3, available_m * 1e3
    s = choose_scale(bw, ah * 1.08, max_w_mm, max_h_mm)
    W, H = bw * s, ah * s
    left, top = 12.0, 12.0
    base = top + H * 1.06      # y of the tube surface (build 0)
    flange = 2.2
    height = base + 26.0
    width_mm = left + W + flange + 8 + 60.0

    def X(m: float) -> float:
        return left + m * 1e3 * s

    def Y(m: float) -> float:
        return base - m * 1e3 * s

    body = ['<defs><pattern id="hatch" width="1.6" height="1.6" patternUnits="userSpaceOnUse" '
            'patternTransform="rotate(45)"><line x1="0" y1="0" x2="0" y2="1.6" stroke="#777" '
            'stroke-width="0.5"/></pattern></defs>']
    # tube and flanges
    body.append(f'<rect x="{_n(left - flange)}" y="{_n(base)}" width="{_n(W + 2 * flange)}" height="3" '
                f'fill="{LIGHT}" stroke="{GREY}" stroke-width="0.3"/>')
    for fx in (left - flange, left + W):
        body.append(f'<rect x="{_n(fx)}" y="{_n(Y(available_m) - 2)}" width="{_n(flange)}" '
                    f'height="{_n(base - Y(available_m) + 2)}" fill="{LIGHT}" stroke="{GREY}" stroke-width="0.3"/>')
    for dx, dt, dh in dividers:
        body.append(f'<rect class="divider" x="{_n(X(dx))}" y="{_n(Y(dh))}" width="{_n(max(0.4, dt * 1e3 * s))}" '
                    f'height="{_n(base - Y(dh))}" fill="{LIGHT}" stroke="{GREY}" stroke-width="0.3"/>')
    body.append(_t(left + W / 2, base + 7.5, "bobbin tube (core centre leg below)", 3.2, "middle", fill="#333"))
    # available build
    body.append(f'<line class="available" x1="{_n(left - flange - 3)}" y1="{_n(Y(available_m))}" '
                f'x2="{_n(left + W + flange + 3)}" y2="{_n(Y(available_m))}" stroke="{INK}" stroke-width="0.4" '
                f'stroke-dasharray="2 1"/>')
    body.append(_t(left - flange - 1, Y(available_m) - 2.2, f"available build {ah:.2f} mm", 3.2, "start"))
    if bulged_m > 0:
        body.append(f'<line class="expected" x1="{_n(left)}" y1="{_n(Y(bulged_m))}" x2="{_n(left + W)}" '
                    f'y2="{_n(Y(bulged_m))}" stroke="{GREY}" stroke-width="0.3" stroke-dasharray="0.8 0.8"/>')

    labels = []
    whole = breadth_m
    for sec in sections:
        colour = COPPER[sec.colour_index % len(COPPER)]
        lh = sec.layer_height_m
        m = sec.margin_m
        breadth_m = sec.breadth_m or whole
        x0 = sec.x0_m

        def xs(m: float, x0: float = x0) -> float:      # along the breadth of the section's chamber
            return left + (x0 + m) * 1e3 * s

        if m > 0:
            for mx in (0.0, breadth_m - m):
                body.append(f'<rect class="margin" x="{_n(xs(mx))}" y="{_n(Y(sec.end_m))}" '
                            f'width="{_n(m * 1e3 * s)}" height="{_n((sec.end_m - sec.start_m) * 1e3 * s)}" '
                            f'fill="url(#hatch)" stroke="#777" stroke-width="0.25"/>')
        usable = breadth_m - 2 * m
        d = sec.wire_diameter_m
        circles_ok = sec.round_wire and d * 1e3 * s >= 0.45 and sum(l.turns for l in sec.layers) * sec.strands <= 4000
        for i, layer in enumerate(sec.layers):
            y1 = layer.centre_m + lh / 2
            frac = min(1.0, layer.turns / layer.capacity) if layer.capacity else 1.0
            width = usable * frac
            # layers run back and forth: odd layers from the left, even layers from the right
            x_start = m if i % 2 == 0 else m + usable - width
            if circles_ok:
                n = layer.turns * sec.strands
                place, of = sec.slot        # bifilar: the two wires alternate along the layer
                pitch = usable / (layer.capacity * sec.strands * of) if layer.capacity else d
                r = d * 1e3 * s / 2
                cy = Y(layer.centre_m)
                parts = []
                for k in range(n):
                    cx = xs(x_start + pitch * (k * of + place + 0.5))
                    parts.append(f'<circle cx="{_n(cx)}" cy="{_n(cy)}" r="{_n(r * 0.92)}"/>')
                body.append(f'<g class="layer" data-section="{escape(sec.label)}" data-turns="{layer.turns}" '
                            f'fill="{colour}" fill-opacity="0.85" stroke="none">' + "".join(parts) + "</g>")
            else:
                body.append(f'<rect class="layer" data-section="{escape(sec.label)}" data-turns="{layer.turns}" '
                            f'x="{_n(xs(x_start))}" y="{_n(Y(y1))}" width="{_n(width * 1e3 * s)}" '
                            f'height="{_n(lh * 1e3 * s)}" fill="{colour}" fill-opacity="0.75"/>')
            if sec.layer_tape_m > 0 and i < len(sec.layers) - 1:
                body += _tape_lines(sec.layer_tape_widths_m or ((0.0, breadth_m),), xs, Y(y1 + sec.layer_tape_m / 2),
                                    max(0.35, sec.layer_tape_m * 1e3 * s))
        if sec.tape_after and sec.tape_after_m > 0:
            body += _tape_lines(sec.tape_widths_m or ((0.0, breadth_m),), xs, Y(sec.end_m + sec.tape_after_m / 2),
                                max(0.5, sec.tape_after_m * 1e3 * s))
        labels.append((sec, colour, xs(breadth_m), Y((sec.start_m + sec.end_m) / 2)))

    # labels in a column to the right, leader lines to each section's middle
    lx = left + W + flange + 8
    # the outermost section is drawn highest: stack its label first, the rest below it
    _section_labels(body, labels, lx, upward=True)
    # scale bar: 5 mm
    bar = 5.0 * s if 5.0 * s <= 60 else 1.0 * s
    bar_mm = 5 if 5.0 * s <= 60 else 1
    by = base + 15
    body.append(f'<path d="M{_n(left)} {_n(by)} h{_n(bar)} M{_n(left)} {_n(by - 1.2)} v2.4 M{_n(left + bar)} '
                f'{_n(by - 1.2)} v2.4" stroke="{INK}" stroke-width="0.4" fill="none"/>')
    body.append(_t(left + bar + 2, by + 1.2, f"{bar_mm} mm   (scale {scale_text(s)} when printed at 100 %)", 3.0))
    body.append(_t(left, by + 6.0, "Tapes at their true width (two widths one above the other), at least "
                                   "0.35 mm thick so thin tape shows.", 3.0,
                   fill="#444"))
    return _svg(width_mm, height, body, "window cross-section to scale", "window-section"), s


# long: one SVG drawn top to bottom, a block per visible element
def toroid_sector(core_id_m: float, core_od_m: float, coating_m: float, available_m: float, bulged_m: float,
                  sections: list, *, angle_deg: float = 22.0, max_w_mm: float = 105.0,
                  max_h_mm: float = 88.0) -> tuple:
    """A sector of a toroid seen from above, centred on the bore axis, to scale: (svg, scale).

    The build grows inwards from the core's inner face (after its coating); each layer is a ring of
    wires (or a band), tapes are arcs, the smallest hole the shuttle needs is dashed.
    """
    r_face = core_id_m / 2.0 - coating_m                    # winding surface inside the bore
    r_core_in = core_id_m / 2.0
    r_show_out = min(core_od_m / 2.0, r_core_in + 0.006)
    r_hole_min = r_face - available_m
    r_show_in = max(0.0, r_hole_min - 0.003)
    half = math.radians(angle_deg)
    real_h = (r_show_out - r_show_in * math.cos(half)) * 1e3
    real_w = 2 * r_show_out * math.sin(half) * 1e3
    s = choose_scale(real_w, real_h, max_w_mm, max_h_mm)
    left, top = 10.0, 10.0
    cx = left + real_w * s / 2
    cy = top + r_show_out * 1e3 * s        # bore axis (may lie below the drawing)
    height = top + real_h * s + 20.0
    width_mm = left + real_w * s + 10 + 60.0

    def P(r_m: float, th: float) -> tuple:
        return cx + r_m * 1e3 * s * math.sin(th), cy - r_m * 1e3 * s * math.cos(th)

    def annulus(r0: float, r1: float, fill: str, extra: str = "") -> str:
        a0, a1 = P(r1, -half), P(r1, half)
        b1, b0 = P(r0, half), P(r0, -half)
        R1, R0 = r1 * 1e3 * s, r0 * 1e3 * s
        d = (f"M{_n(a0[0])} {_n(a0[1])} A{_n(R1)} {_n(R1)} 0 0 1 {_n(a1[0])} {_n(a1[1])} "
             f"L{_n(b1[0])} {_n(b1[1])} A{_n(R0)} {_n(R0)} 0 0 0 {_n(b0[0])} {_n(b0[1])} Z")
        return f'<path d="{d}" fill="{fill}" {extra}/>'

    def arc(r: float, stroke: str, width: float, dash: str = "", cls: str = "") -> str:
        a0, a1 = P(r, -half), P(r, half)
        R = r * 1e3 * s
        da = f' stroke-dasharray="{dash}"' if dash else ""
        c = f' class="{cls}"' if cls else ""
        return (f'<path{c} d="M{_n(a0[0])} {_n(a0[1])} A{_n(R)} {_n(R)} 0 0 1 {_n(a1[0])} {_n(a1[1])}" '
                f'stroke="{stroke}" stroke-width="{_n(width)}" fill="none"{da}/>')

    body = [annulus(r_core_in, r_show_out, LIGHT, f'stroke="{GREY}" stroke-width="0.3"'),
            annulus(r_face, r_core_in, "#bbb")]
    mid_core = P((r_core_in + r_show_out) / 2, 0)
    body.append(_t(mid_core[0], mid_core[1] + 1.2, "core", 3.4, "middle", fill="#333"))
    labels = []
    for sec in sections:
        colour = COPPER[sec.colour_index % len(COPPER)]
        lh = sec.layer_height_m
        d = sec.wire_diameter_m
        for i, layer in enumerate(sec.layers):
            r_c = r_face - layer.centre_m
            n_total = layer.turns * sec.strands
            if sec.round_wire and d * 1e3 * s >= 0.45 and n_total > 0:
                step = 2 * math.pi / n_total
                k0 = -int(half / step)
                parts = []
                k = k0
                while k * step <= half:
                    th = k * step
                    if abs(th) <= half - (d / 2) / max(r_c, 1e-9):
                        x, y = P(r_c, th)
                        parts.append(f'<circle cx="{_n(x)}" cy="{_n(y)}" r="{_n(d * 1e3 * s / 2 * 0.92)}"/>')
                    k += 1
                body.append(f'<g class="layer" data-section="{escape(sec.label)}" data-turns="{layer.turns}" '
                            f'fill="{colour}" fill-opacity="0.85">' + "".join(parts) + "</g>")
            else:
                body.append(annulus(r_c - lh / 2, r_c + lh / 2, colour,
                                    f'class="layer" data-section="{escape(sec.label)}" data-turns="{layer.turns}" '
                                    'fill-opacity="0.75"'))
            if sec.layer_tape_m > 0 and i < len(sec.layers) - 1:
                body.append(arc(r_c - lh / 2 - sec.layer_tape_m / 2, TAPE, max(0.35, sec.layer_tape_m * 1e3 * s),
                                cls="tape"))
        if sec.tape_after and sec.tape_after_m > 0:
            body.append(arc(r_face - sec.end_m - sec.tape_after_m / 2, TAPE,
                            max(0.5, sec.tape_after_m * 1e3 * s), cls="tape"))
        labels.append((sec, colour, P(r_face - (sec.start_m + sec.end_m) / 2, half)))
    body.append(arc(r_hole_min, INK, 0.4, "2 1", cls="available"))
    hp = P(r_hole_min, -half)
    body.append(_t(hp[0] - 1, hp[1] + 5.0, f"smallest hole for the shuttle (available build {available_m * 1e3:.2f} mm)",
                   3.1, "start"))
    if bulged_m > 0:
        body.append(arc(r_face - bulged_m, GREY, 0.3, "0.8 0.8", cls="expected"))
        ep = P(r_face - bulged_m, half)
        body.append(_t(ep[0] + 2, ep[1] + 3.5, f"expected build {bulged_m * 1e3:.2f} mm", 3.0, fill="#444"))
    lx = left + real_w * s + 10
    _section_labels(body, [(sec, colour, x, y) for sec, colour, (x, y) in labels], lx, upward=False)
    by = top + real_h * s + 10
    bar = 5.0 * s
    body.append(f'<path d="M{_n(left)} {_n(by)} h{_n(bar)} M{_n(left)} {_n(by - 1.2)} v2.4 M{_n(left + bar)} '
                f'{_n(by - 1.2)} v2.4" stroke="{INK}" stroke-width="0.4" fill="none"/>')
    body.append(_t(left + bar + 2, by + 1.2, f"5 mm   (scale {scale_text(s)} when printed at 100 %)", 3.0))
    body.append(_t(left, by + 6.0, "The bore centre is below; the build grows inwards from the core.", 3.0,
                   fill="#444"))
    return _svg(width_mm, height, body, "toroid build, sector seen from above", "window-section"), s


LABEL_GAP_MM = 8.0   # labels closer than this are pushed apart so their two lines never overlap


def _section_labels(body: list, labels: list, lx: float, upward: bool) -> None:
    """A column of section labels at x = lx, each with a leader line to (x, y) on its section.

    labels: (section, colour, x, y). upward: labels stack from the bottom up (the bobbin window, outermost
    section highest); else from the top down (the toroid sector).
    """
    sign = -1.0 if upward else 1.0
    placed: list = []
    for sec, colour, x, y in sorted(labels, key=lambda t: sign * t[3]):
        y_label = y
        if placed and sign * (y_label - placed[-1]) < LABEL_GAP_MM:
            y_label = placed[-1] + sign * LABEL_GAP_MM
        placed.append(y_label)
        body.append(f'<path d="M{_n(x + 0.5)} {_n(y)} L{_n(lx - 1)} {_n(y_label - 1)}" stroke="{colour}" '
                    f'stroke-width="0.3" fill="none"/>')
        nl = len(sec.layers)
        body.append(_t(lx, y_label, f"{sec.order}. {sec.label}: {sec.turns} t, {nl} layer{'s' if nl != 1 else ''}"
                       + (", bifilar" if sec.slot[1] > 1 else ""),
                       3.5, weight="bold", fill=colour, cls="section-label"))
        if sec.tape_after:
            body.append(_t(lx, y_label + 4.0, f"then {sec.tape_after}", 3.0, fill="#444"))


# the helpers the sector plan (``sector_drawing``) draws with, under public names
coord = _n
svg_text = _t
svg_document = _svg
