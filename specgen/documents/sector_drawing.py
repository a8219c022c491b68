"""The sector plan of a sector-wound toroid (a common-mode choke), seen from above, to scale.

Each line's sector is a coloured band on the ring with its start and finish marked and an arrow the way the
turns progress; the unwound gaps between the sectors are hatched and dimensioned. Every sector is drawn with
the same start side and the same arrow: the lines are wound in the same sense, so the line currents' flux
cancels. Pure drawing of figures the Design carries (``Design.common_mode_choke``): no physics here.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from markupsafe import Markup

from .drawings import COPPER, GREY, INK, LIGHT, choose_scale
from .drawings import coord as _n
from .drawings import svg_document as _svg
from .drawings import svg_text as _t


@dataclass(frozen=True)
class SectorLine:
    """One line on its sector, as the plan draws it."""
    name: str
    start: str             # start lead
    finish: str            # finish lead
    turns: int
    colour_index: int


def sector_marks_deg(lines: int, winding_deg: float, gap_deg: float) -> list[tuple[float, float]]:
    """(start, finish) of each sector in degrees clockwise from the 12 o'clock mark: the first gap is centred on
    12 o'clock, each sector follows clockwise."""
    out = []
    for k in range(lines):
        a = gap_deg / 2.0 + k * (winding_deg + gap_deg)
        out.append((a, a + winding_deg))
    return out


def sector_plan(od_m: float, id_m: float, lines: list[SectorLine], winding_deg: float, gap_deg: float,
                gap_mm: float, clockwise: bool, *, max_w_mm: float = 150.0, max_h_mm: float = 95.0
                ) -> tuple[Markup, float]:
    """The ring from above with every line's sector: (svg, scale)."""
    r_out, r_in = od_m * 1e3 / 2.0, id_m * 1e3 / 2.0
    band = max(2.0, (r_out - r_in) * 0.35)               # the copper band drawn over the ring, mm of the part
    real = 2.0 * (r_out + band) + 2.0
    s = choose_scale(real, real, max_h_mm - 20.0, max_h_mm - 20.0)
    size = real * s
    cx, cy = 12.0 + size / 2.0, 8.0 + size / 2.0
    width, height = min(max_w_mm, size + 95.0), size + 22.0

    def P(r_mm: float, deg: float) -> tuple[float, float]:
        th = math.radians(deg)
        return cx + r_mm * s * math.sin(th), cy - r_mm * s * math.cos(th)

    def annular(r0: float, r1: float, a0: float, a1: float, fill: str, extra: str = "") -> str:
        big = 1 if (a1 - a0) % 360.0 > 180.0 else 0
        p0, p1, q1, q0 = P(r1, a0), P(r1, a1), P(r0, a1), P(r0, a0)
        d = (f"M{_n(p0[0])} {_n(p0[1])} A{_n(r1 * s)} {_n(r1 * s)} 0 {big} 1 {_n(p1[0])} {_n(p1[1])} "
             f"L{_n(q1[0])} {_n(q1[1])} A{_n(r0 * s)} {_n(r0 * s)} 0 {big} 0 {_n(q0[0])} {_n(q0[1])} Z")
        return f'<path d="{d}" fill="{fill}" {extra}/>'

    body = [f'<circle cx="{_n(cx)}" cy="{_n(cy)}" r="{_n(r_out * s)}" fill="{LIGHT}" stroke="{GREY}" '
            f'stroke-width="0.3"/>',
            f'<circle cx="{_n(cx)}" cy="{_n(cy)}" r="{_n(r_in * s)}" fill="white" stroke="{GREY}" stroke-width="0.3"/>']
    marks = sector_marks_deg(len(lines), winding_deg, gap_deg)
    legend_y = 12.0
    for (a0, a1), line in zip(marks, lines):
        colour = COPPER[line.colour_index % len(COPPER)]
        body.append(annular(r_in - band * 0.6, r_out + band * 0.6, a0, a1, colour,
                            'fill-opacity="0.55" stroke="#333" stroke-width="0.3"'))
        first, last = (a0, a1) if clockwise else (a1, a0)
        sx, sy = P(r_out + band + 1.0, first)
        body.append(f'<circle cx="{_n(sx)}" cy="{_n(sy)}" r="1.3" fill="{INK}"/>')
        body.append(_label(P, r_out + band + 2.5, first, f"{line.start} ● start", "bold"))
        body.append(_label(P, r_out + band + 2.5, last, f"{line.finish} finish", "normal"))
        mid = (a0 + a1) / 2.0
        lx, ly = P((r_in + r_out) / 2.0, mid)
        body.append(_t(lx, ly + 1.2, line.name, 4.2, "middle", "bold"))
        body.append(_arrow(P, r_out + band + 4.5, a0 + (a1 - a0) * 0.25, a0 + (a1 - a0) * 0.75, clockwise, s))
        body.append(_t(cx + size / 2.0 + 8.0, legend_y, f"{line.name}: {line.turns} turns, "
                                                        f"{a0:.0f}° to {a1:.0f}°", 3.2, "start", "bold",
                       fill=colour))
        legend_y += 5.0
    top, low = P(r_out + 1.0, 0.0), P(r_in - 1.0, 0.0)
    body.append(f'<line x1="{_n(top[0])}" y1="{_n(top[1])}" x2="{_n(low[0])}" y2="{_n(low[1])}" '
                f'stroke="{INK}" stroke-width="0.5" stroke-dasharray="1 0.8"/>')
    body.append(_t(cx, cy, "0° mark ↑", 3.0, "middle"))
    tx = cx + size / 2.0 + 8.0
    for text in (f"gaps {gap_deg:.0f}°: {gap_mm:.1f} mm clear at the bore",
                 "every sector: the same start side,", "the same arrow (SAME SENSE)",
                 "seen from above"):
        body.append(_t(tx, legend_y + 2.0, text, 3.0))
        legend_y += 4.4
    return _svg(width, height, body, "sector plan of the ring", "sector-plan"), s


def _label(P, r: float, deg: float, text: str, weight: str) -> str:
    """A lead label just outside the ring at ``deg``, set away from the ring on its own side."""
    x, y = P(r, deg)
    side = math.sin(math.radians(deg))
    anchor = "start" if side > 0.15 else "end" if side < -0.15 else "middle"
    dy = -1.5 if math.cos(math.radians(deg)) > 0.5 else 3.5 if math.cos(math.radians(deg)) < -0.5 else 1.0
    return _t(x + (1.0 if anchor == "start" else -1.0 if anchor == "end" else 0.0), y + dy, text, 3.0, anchor,
              weight)


def _arrow(P, r: float, a0: float, a1: float, clockwise: bool, s: float) -> str:
    """An arc arrow at radius ``r`` [mm of the part] from a0 to a1 (degrees), its head the way turns progress."""
    if not clockwise:
        a0, a1 = a1, a0
    p0, p1 = P(r, a0), P(r, a1)
    sweep = 1 if clockwise else 0
    head_base = P(r, a1 - (4.0 if clockwise else -4.0) / max(r * s, 1e-6) * 57.3)
    hx, hy = p1
    bx, by = head_base
    nx, ny = -(hy - by), (hx - bx)
    norm = math.hypot(nx, ny) or 1.0
    nx, ny = nx / norm * 1.4, ny / norm * 1.4
    return (f'<path d="M{_n(p0[0])} {_n(p0[1])} A{_n(r * s)} {_n(r * s)} 0 0 {sweep} {_n(hx)} {_n(hy)}" '
            f'stroke="{INK}" stroke-width="0.5" fill="none"/>'
            f'<path d="M{_n(hx)} {_n(hy)} L{_n(bx + nx)} {_n(by + ny)} L{_n(bx - nx)} {_n(by - ny)} Z" fill="{INK}"/>')


SAME_SENSE = ("SAME SENSE", "Every line is wound in the same direction round the ring, starting at the same side "
              "of its own sector (rotate the core between lines, never turn it over). The line currents then cancel "
              "in the core; one line wound the other way makes the part a saturating choke.")


def _clockwise(design) -> bool:
    return design.windings[0].direction == "cw"


def sector_context(design, max_w_mm: float) -> dict | None:
    """The sector plan, the same-sense rule and each line's sector marks for the work order (None: no sectors)."""
    c = design.common_mode_choke
    if c is None:
        return None
    lines = [SectorLine(w.name, w.start, w.finish, w.turns, i) for i, w in enumerate(design.windings)]
    outline = design.floor.outline
    svg, scale = sector_plan(outline.outer_diameter_m or 0.0, outline.inner_diameter_m or 0.0, lines,
                             c.winding_angle_deg, c.gap_angle_deg, c.sector_gap_m * 1e3, _clockwise(design),
                             max_w_mm=max_w_mm)
    return {"svg": svg, "scale": scale, "rule_title": SAME_SENSE[0], "rule": SAME_SENSE[1],
            "caption": (f"The ring from above with its 0° mark: {c.lines} sectors of {c.winding_angle_deg:.0f}°, "
                        f"gaps of {c.gap_angle_deg:.0f}° ({c.sector_gap_m * 1e3:.1f} mm clear at the bore after "
                        f"winding). Mark the sector ends on the core wrap before winding.")}


def sector_row(design, winding_name: str) -> tuple[str, str, str] | None:
    """The work-order step row that places a line on its sector (None: no sectors)."""
    c = design.common_mode_choke
    if c is None:
        return None
    k = [w.name for w in design.windings].index(winding_name)
    a0, a1 = sector_marks_deg(c.lines, c.winding_angle_deg, c.gap_angle_deg)[k]
    first, last = (a0, a1) if _clockwise(design) else (a1, a0)
    way = "clockwise" if _clockwise(design) else "counter-clockwise"
    return ("Sector", f"{a0:.0f}° to {a1:.0f}° from the 0° mark: first turn at {first:.0f}°, progress {way} "
                      f"round the ring, last turn by {last:.0f}°; no turn in the gaps", "key")
