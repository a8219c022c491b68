"""The work order's block on several primaries (how the installer links them) and on the secondaries' loads.

Read from the Design only (``Design.connections``, ``Design.loads``): which pins to join for each mains
voltage, the flux each connection gives, and what current each secondary's load makes it carry.
"""

from __future__ import annotations

from typing import Any

from .. import present


def _tesla(b: float) -> str:
    return f"{b:.3f} T" if b < 1.0 else f"{b:.2f} T"


def connections_context(design: Any) -> dict[str, Any] | None:
    """Rows for the work order's connections and loads tables; None when the part has neither."""
    conns = getattr(design, "connections", ()) or ()
    loads = getattr(design, "loads", ()) or ()
    if not conns and not loads:
        return None
    rows = []
    for c in conns:
        joined = " and ".join(f"{a}-{b}" for a, b in c.links)
        how = f"{' + '.join(c.primaries)} in {c.mode}"
        rows.append({"name": c.name, "mains": f"{c.mains_voltage_v:g} V", "how": how,
                     "links": f"join pins {joined}", "half": f"{c.half_voltage_v:.4g} V",
                     "b": f"{_tesla(c.b_peak_t)} ({_tesla(c.b_peak_max_t)} at the top of the range)"
                          + ("; the highest" if c.worst and len(conns) > 1 else "")})
    halves = sorted({p for c in conns for p in c.primaries})
    note = (f"The links are made by the installer, not in the part. Test {', '.join(halves)} as separate "
            f"windings with no link fitted: the DCR of each half, the ratio between the halves and the "
            f"polarity of one half against the other (test sheet).") if conns else ""
    load_rows = [{"winding": ld.winding, "load": ld.load.replace("_", " "),
                  "dc": present.si(ld.dc_current_a, "A", 3), "rms": present.si(ld.rms_current_a, "A", 3),
                  "form": f"{ld.form_factor:.3f}", "va": present.si(ld.va, "VA", 3), "source": ld.source}
                 for ld in loads]
    return {"rows": rows, "note": note, "loads": load_rows}
