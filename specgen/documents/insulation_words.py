"""The work order's insulation words: a split bobbin's chambers, tapes laid in two widths, a toroid's lead exits.

Read from the Design only (its floor records and barrier results); nothing here measures or decides.
"""

from __future__ import annotations

from .. import present


def chamber_row(d, s) -> tuple[str, str, str]:
    """Which chamber of a split bobbin a section is wound in, as the winder finds it on the bobbin."""
    outline = d.floor.outline
    n = len(outline.chambers)
    side = "at the start flange" if s.chamber == 1 else ("at the finish flange" if s.chamber == n else "between dividers")
    return ("Chamber", f"{s.chamber} of {n}, {side}: {outline.chambers[s.chamber - 1] * 1e3:.1f} mm between the "
                       f"{'start flange' if s.chamber == 1 else 'divider'} and the "
                       f"{'finish flange' if s.chamber == n else 'divider'}; keep every turn on this side of the "
                       f"divider", "key")


def lead_exit_lines(d, w, s) -> list[str]:
    """A toroid's leads across a barrier: where this winding's leads leave, against the other side's."""
    if d.insulation is None or s.index != 1:
        return []
    return [f"LEAD EXIT: bring the leads of {w.name} out of the ring "
            + (f"on the opposite side from the leads of {b.between[0]} ({b.lead_exit_mm:.0f} mm round the core's "
               f"outside)" if b.lead_exit_opposite else
               f"at least {b.lead_exit_mm:.0f} mm round the core's outside from the leads of {b.between[0]}")
            + f": the {b.grade} barrier's creepage where the leads leave. Keep each winding's leads together, "
              f"sleeved into the winding."
            for b in d.insulation.barriers
            if b.lead_exit_mm is not None and w.name in [n.strip() for n in b.between[1].split("+")]]


def chambers_text(outline) -> str:
    """A split bobbin's chambers as the summary names them: their breadths and the divider between them."""
    if not outline.chambers:
        return ""
    wall = f", {outline.divider_m * 1e3:g} mm divider" if outline.divider_m else ""
    return (f", split: {len(outline.chambers)} chambers of "
            + " + ".join(f"{c * 1e3:.1f}" for c in outline.chambers) + f" mm{wall}")


def two_widths_note(t) -> str:
    return ", two widths a layer (see below)" if t is not None and t.widths > 1 else ""


def two_widths_line(t, where: str) -> str:
    """How the winder lays a tape in two widths so that it covers from flange to flange."""
    return (f"TWO WIDTHS {where.upper()}: lay each layer of {t.id} as two widths of {present.mm(t.width_m)}: the "
            f"first against the start flange, the second against the finish flange, lying over the first by "
            f"{t.overlap_m * 1e3:.1f} mm in the middle. Every layer the same way, each width pulled flat and tight "
            f"to its flange: no gap at a flange and no gap at the overlap (the inspector checks both).")


def laid_widths(t, breadth_m: float) -> tuple[tuple[float, float], ...]:
    """Where a tape lies along the breadth, width by width, for the drawing: two widths each against its
    flange; one width narrower than the breadth centred over the copper; else flange to flange."""
    if t is None:
        return ()
    w = t.width_m
    if t.widths > 1:
        return ((0.0, min(w, breadth_m)), (max(0.0, breadth_m - w), breadth_m))
    if w >= breadth_m:
        return ((0.0, breadth_m),)
    centre = breadth_m / 2.0
    return ((centre - w / 2.0, centre + w / 2.0),)


def barrier_note(grade: str, toroid: bool, margin_tape: bool) -> str:
    """What the winder must see on a tape that is a safety barrier: it covers without a gap."""
    if not grade:
        return ""
    if toroid:
        return f": the {grade} barrier, half-lapped all round the ring, no gap at the bore or the outside edge"
    return (f": the {grade} barrier, flange to flange" + (" over the margin tapes" if margin_tape else "")
            + ", no gap at either flange")


def coating_step(d, n: int) -> dict:
    """A toroid wound straight onto its coated core: the coating is the barrier to the core, inspected first."""
    outline = d.floor.outline
    return {"n": n, "kind": "core", "heading": "Inspect the core's coating before winding",
            "lines": [f"The core's coating (rated {outline.coating_voltage_v / 1e3:g} kV in the catalogue) is the "
                      f"insulation between the winding and the core: nothing else is wound under the first turn.",
                      "Before the first turn look over the whole core, the bore and both edges: set aside a core "
                      "with a chip, a crack or bare metal showing; never file or sand a coated core."],
            "rows": [], "layers": [], "dot": ""}
