"""The change summary between two revisions of a part (``specgen diff --pdf``), for a reader.

Reads a ``specgen.diff.ChangeSummary`` only: every number on it was read from the two Designs,
so it shows the same figures as the work order of each revision. It is written for someone who
has the two paper revisions and nothing else: inputs by their plain names ("primary turns", not
the spec's key path), fingerprints to 12 hex digits, each revision by its letter and its release
(date, author, note) rather than a file path or a git ref, and the new revision's effectivity.
One column that flows over as many pages as it needs; nothing is cut.

Rendered through ``documents.render`` (autoescaped jinja2, the locked-down WeasyPrint fetcher);
WeasyPrint is imported only when a PDF is written.
The demo's example lives in ``specgen.demo.run``.
"""

from __future__ import annotations

import re
from pathlib import Path

#: The most shown of one input's old or new value (the rest is cut with an ellipsis; the JSON has it whole).
VALUE_MAX = 160

SAFETY_NOTE = ("Test voltages are the shop's defaults: the applicable product safety standard, the "
               "customer's drawing, local codes and licensed practice decide.")

#: Plain names of spec keys (the last part of a key path), as a reader of the two revisions says them.
KEY_NAMES = {
    "part": "part number", "title": "title", "customer": "customer", "kind": "kind of part", "notes": "notes",
    "id": "", "stack": "stack", "count": "number of core sets",
    "frequency": "frequency", "waveform": "waveform", "duty": "duty cycle", "ambient": "ambient temperature",
    "cooling": "cooling", "insulation_class": "insulation class",
    "name": "name", "role": "role", "turns": "turns", "voltage": "voltage", "voltage_max": "highest voltage",
    "current": "current", "va": "VA", "wire": "wire", "strands": "strands in hand", "sections": "sections",
    "section_pins": "tie pins between sections", "start": "start pin", "finish": "finish pin",
    "direction": "winding direction", "margin": "creepage margin", "same_turns_as": "same turns as",
    "build_order": "build order", "layer_tape": "tape between layers", "winding_tape": "tape between windings",
    "outer_wrap": "outer wrap", "margin_tape": "margin tape", "sleeving": "lead sleeving", "varnish": "varnish",
    "tape": "tape", "layers": "layers", "between": "between", "rating": "rating",
    "working_voltage": "working voltage", "inductance": "inductance", "ripple": "ripple current",
    "gap": "air gap", "core": "core", "operating": "", "insulation": "", "windings": "", "inductor": "",
}


def input_name(key: str, roles: dict) -> str:
    """``windings[P].turns`` -> 'primary turns'; ``insulation.barriers[0].rating`` -> 'insulation
    barrier 1 rating'; ``core.id`` -> 'core'. A winding is named by its role when it is the only one
    in that role, else by role and name ('secondary S1 voltage')."""
    by_role: dict = {}
    for name, role in roles.items():
        by_role.setdefault(role, []).append(name)
    words = []
    for part in key.split("."):
        m = re.fullmatch(r"([A-Za-z_]+)\[(.+)\]", part)
        if m and m.group(1) == "windings":
            name = m.group(2)
            role = roles.get(name)
            words.append(f"{role} {name}" if role is None or len(by_role.get(role, [])) > 1 else role)
            if role is None:
                words[-1] = f"winding {name}"
            continue
        if m:                                              # a list by position: barriers[0] -> barrier 1
            head, index = m.group(1), m.group(2)
            noun = "insulation barrier" if head == "barriers" else head.rstrip("s").replace("_", " ")
            words.append(f"{noun} {int(index) + 1}" if index.isdigit() else f"{noun} {index}")
            continue
        word = KEY_NAMES.get(part, part.replace("_", " "))
        if word:
            words.append(word)
    text = " ".join(words).strip() or key
    return text[0].upper() + text[1:]


def _effectivity(new) -> str:
    """What the new revision governs from when: as its release recorded it (``specgen.diff.Side.effectivity``)."""
    return str(new.effectivity)


def build_context(summary) -> dict:
    """Plain strings for the template; nothing is cut but an over-long input value."""
    from .. import __version__
    from ..revision import short

    roles = dict(summary.roles)

    def cut(text: str) -> str:
        return text if len(text) <= VALUE_MAX else text[:VALUE_MAX - 1].rstrip() + "\u2026"

    inputs = [{"name": input_name(c.key, roles), "old": cut(c.old_text), "new": cut(c.new_text)}
              for c in summary.inputs]
    groups = [{"name": g[0].upper() + g[1:], "rows": [{"quantity": r.quantity, "old": r.old_text, "new": r.new_text}
                                                     for r in rows]}
              for g, rows in summary.groups()]

    def side(s) -> dict:
        if s.status == "released":
            when = f"released {s.released_on}" if s.released_on else "released"
            label = f"revision {s.revision} as {when}" + (f" by {s.released_by}" if s.released_by else "")
        else:
            label = f"revision {s.revision}, {s.status} (not released)"
        return {"revision": s.revision, "status": s.status, "label": label, "short": short(s.fingerprint),
                "release": s.release_text, "release_ok": s.release_ok, "problems": list(s.release_problems),
                "released_on": s.released_on, "released_by": s.released_by, "note": s.release_note,
                "file": Path(str(s.name).split("@", 1)[0]).name}

    two_catalogues = " (old), " in (summary.catalog or "")
    hipot = any(r.quantity.startswith("hipot") for r in summary.results)
    return {
        "part": summary.part, "title": summary.new.title, "old": side(summary.old), "new": side(summary.new),
        "inputs": inputs, "groups": groups, "n_results": len(summary.results),
        "unchanged": summary.unchanged, "cost_note": summary.cost_note,
        "effectivity": _effectivity(summary.new),
        "catalogue": ("two different catalogues (one for each revision)" if two_catalogues
                      else "the same catalogue"),
        "version": __version__, "safety_note": SAFETY_NOTE if hipot else "",
    }


def change_html(summary, paper: str = "A4") -> str:
    """The summary's HTML on ``paper`` (the shop file's ``paper``: A4 or Letter)."""
    from .quote_doc import CSS_PAPER
    from .render import render_html

    return render_html("change.html", **{**build_context(summary), "paper": CSS_PAPER.get(paper, "A4")})


def write_change_pdf(summary, pdf_path, html_path=None, blocked: list | None = None, paper: str = "A4") -> list:
    """Render the change summary and write the PDF (and the HTML if asked), atomically."""
    from .render import write_pdf_and_html

    return write_pdf_and_html(change_html(summary, paper), pdf_path, html_path, blocked)
