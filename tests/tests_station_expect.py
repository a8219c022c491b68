"""What a station's meter would show for a piece at a bench temperature, worked independently of the
station's code: a DCR at t degC is R20 (1 + 0.00393 (t - 20)) (IEC 60028, annealed copper)."""

from __future__ import annotations

ALPHA_CU = 0.00393    # IEC 60028


def reading_for(col, temp_c: float, *, fail: bool = False) -> str:
    """The text a tester types for a column: the nominal (or a safe value), failed on demand."""
    if col.kind == "check":
        return "fail" if fail else "ok"
    value = col.nominal if col.nominal is not None else (col.low or 1.0) * 50
    if col.kind == "dcr":
        value = value * (1 + ALPHA_CU * (temp_c - 20.0))
    if fail:
        value *= 1.5
    return f"{value * col.shown_factor:.5g}"
