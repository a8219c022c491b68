"""One way to show numbers, units and tables: every screen and document formats through here.

- ``sig(x, digits)``: significant figures without an exponent (21.42, 0.07018, 12000).
- ``si(value, unit, digits)``: engineering prefixes on an SI value (100 kHz, 3.628 mH, 12 kΩ,
  70.18 mΩ, 1.5 Ω); never ``100000 Hz`` or ``0.003628 H``.
- shop units where the trade does not prefix: ``mm`` (lengths on the bench), ``metres`` (wire
  runs), ``mass``, ``litres``, ``seconds``, ``temp_c``, ``kelvin``, ``percent``, ``fraction_pct``,
  ``ratio``, ``count``, ``test_volts``, ``milliamps``, ``tesla`` (a flux density as the checks write it);
- ``rating(value, unit)``: a rated figure as people write it (230 V, 2.5 A, 60 VA), the quote's ratings;
- ``quantity(value, unit)``: one of the above chosen by a unit key (what the change summary uses);
- ``table(headers, rows, align)``: a plain-text table (the terminal, the change summary, the catalogue).

Nothing here knows the Design or the catalogue; callers pass floats in SI units.

References
----------
BIPM, The International System of Units (SI brochure, 9th ed., 2019), section 3 (SI prefixes) and
5.4 (writing a value: a space between number and unit).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from decimal import ROUND_HALF_UP, Decimal
from typing import Any

#: What an absent value prints as.
MISSING = "—"

_PREFIXES = {-12: "p", -9: "n", -6: "µ", -3: "m", 0: "", 3: "k", 6: "M", 9: "G", 12: "T"}


def sig(x: float, digits: int = 4) -> str:
    """``x`` to ``digits`` significant figures, trailing zeros kept, never an exponent
    (21.42, 0.07018, 7.500, 843.0); whole numbers longer than ``digits`` keep every digit (12346)."""
    if x == 0 or not math.isfinite(x):
        return "0" if x == 0 else str(x)
    decimals = max(0, digits - 1 - int(math.floor(math.log10(abs(x)))))
    text = f"{x:.{decimals}f}"
    # rounding may carry into a new digit (9.9996 -> 10.000): drop the extra decimal
    if decimals > 0 and len(text.replace("-", "").replace(".", "").lstrip("0")) > digits:
        text = f"{x:.{decimals - 1}f}"
    return text


def sig_trimmed(x: float, digits: int = 4) -> str:
    """A rounded limit at the figures it was rounded to: ``sig`` without padding zeros (19.4, 0.995, 100)."""
    return _trim(sig(x, digits))


def _trim(text: str) -> str:
    """'3.600' -> '3.6', '12.00' -> '12' (prefixed values read better without padding zeros)."""
    return text.rstrip("0").rstrip(".") if "." in text else text


def si(value: float | None, unit: str, digits: int = 4, *, keep_zeros: bool = True) -> str:
    """An SI value with an engineering prefix: 0.07018 Ω -> '70.18 mΩ', 1e5 Hz -> '100.0 kHz'.

    ``digits`` significant figures (trailing zeros kept unless ``keep_zeros`` is False); prefixes
    from p to T in steps of 1000; None -> '—'; zero -> '0 <unit>'.
    """
    if value is None:
        return MISSING
    if value == 0:
        return f"0 {unit}"
    if not math.isfinite(value):
        return f"{value} {unit}"
    exp = max(-12, min(12, int(math.floor(math.log10(abs(value)) / 3.0)) * 3))
    text = sig(value / 10.0 ** exp, digits)
    if abs(float(text)) >= 1000 and exp < 12:     # 999.96 rounds up to the next prefix
        exp += 3
        text = sig(value / 10.0 ** exp, digits)
    if not keep_zeros:
        text = _trim(text)
    return f"{text} {_PREFIXES[exp]}{unit}"


def si_set(values: Sequence[float | None], unit: str, digits: int = 4, *, keep_zeros: bool = True) -> list[str]:
    """Figures read side by side (a nominal and its limits) with one prefix, that of the largest:
    [1.039, 0.9349, 1.143] Ω -> '1.039 Ω', '0.9349 Ω', '1.143 Ω' (never '934.9 mΩ' beside '1.143 Ω').

    ``digits`` significant figures each (padding zeros dropped if not ``keep_zeros``: rounded limits); None -> '—'.
    """
    present_values = [abs(v) for v in values if v is not None and v != 0 and math.isfinite(v)]
    if not present_values:
        return [si(v, unit, digits) for v in values]
    head = si(max(present_values), unit, digits)
    prefix = head.split(" ", 1)[1][: -len(unit)] if unit else ""
    exp = next((e for e, p in _PREFIXES.items() if p == prefix), 0)
    fig = sig if keep_zeros else sig_trimmed
    return [MISSING if v is None else f"{fig(v / 10.0 ** exp, digits)} {prefix}{unit}" for v in values]


def frequency(hz: float) -> str:
    """'50 Hz', '100 kHz', '65 kHz' (``si`` with the trailing zeros dropped: a frequency is stated, not measured)."""
    return si(hz, "Hz", keep_zeros=False)


def mm(value_m: float | None) -> str:
    """A bench length in millimetres, to a tenth or a hundredth as the size needs: '0.35 mm', '4.2 mm', '120 mm'."""
    if value_m is None:
        return MISSING
    v = value_m * 1e3
    if abs(v) < 1:
        return f"{v:.2f} mm"
    if abs(v) < 10:
        return f"{v:.1f} mm"
    return f"{v:.0f} mm"


def metres(value_m: float) -> str:
    """A wire run: '3.42 m', '41.7 m', '1,204 m'."""
    if value_m < 10:
        return f"{value_m:.2f} m"
    if value_m < 1000:
        return f"{value_m:.1f} m"
    return f"{value_m:,.0f} m"


def mass(value_kg: float | None) -> str:
    if value_kg is None:
        return ""
    return f"{sig(value_kg * 1e3, 4)} g" if value_kg < 1.0 else f"{sig(value_kg, 4)} kg"


def litres(value_l: float) -> str:
    return f"{sig(value_l * 1e3, 3)} ml" if value_l < 1.0 else f"{sig(value_l, 3)} l"


def seconds(value_s: float) -> str:
    """'150 s', '15 min' (whole minutes from 10 min), '2 h' (whole hours)."""
    if value_s >= 3600 and abs(value_s / 3600 - round(value_s / 3600)) < 1e-9:
        return f"{value_s / 3600:g} h"
    if value_s >= 600 and abs(value_s / 60 - round(value_s / 60)) < 1e-9:
        return f"{value_s / 60:g} min"
    return f"{value_s:g} s"


def temp_c(value_c: float, places: int | None = None) -> str:
    return f"{value_c:g} °C" if places is None else f"{value_c:.{places}f} °C"


def kelvin(value_k: float, places: int = 1) -> str:
    return f"{value_k:.{places}f} K"


def percent(value_pct: float, places: int = 2) -> str:
    return f"{value_pct:.{places}f} %"


def fraction_pct(value: float, places: int = 2) -> str:
    """A 0..1 fraction shown in percent."""
    return f"{value * 100:.{places}f} %"


def ratio(value: float) -> str:
    return f"{sig(value, 4)} : 1"


def count(n: float, unit: str) -> str:
    """'1 piece', '250 pieces', '2 sets'."""
    n = int(round(n))
    names = {"pcs": ("piece", "pieces"), "sets": ("set", "sets"), "pairs": ("pair", "pairs")}
    one, many = names.get(unit, (unit, unit))
    return f"{n:,} {one if n == 1 else many}"


def tesla(b_t: float) -> str:
    """A flux density as the checks write it: '0.312 T', '1.55 T'."""
    return f"{b_t:.3f} T" if b_t < 1.0 else f"{b_t:.2f} T"


def rating(value: float, unit: str) -> str:
    """A rating as people write it: 230 V, 25.6 V, 2.5 A, 60 VA (four significant figures at most, never an
    exponent: 12000 A, not 1.2e+04 A)."""
    return f"{sig_trimmed(value, 4)} {unit}"


def test_volts(value_v: float) -> str:
    """A test voltage as the test station's dial reads it: '3600 V' (no prefix on a dial setting)."""
    return f"{value_v:.0f} V"


def milliamps(value_a: float) -> str:
    return f"{value_a * 1e3:g} mA"


def money(amount: Any, currency: str = "") -> str:
    """'1,234.56' (or 'USD 1,234.56'), to the cent half up; the value stays exact."""
    if amount is None:
        return "-"
    text = f"{Decimal(amount).quantize(Decimal('0.01'), ROUND_HALF_UP):,}"
    return f"{currency} {text}" if currency else text


def quantity(v: Any, unit: str, digits: int = 4) -> str:
    """A value by unit key, in the units the shop reads: the one entry point for mixed rows.

    ``unit`` is an SI unit (ohm, H, A, V, W, Hz, m, T, kg, l, m2, s) or one of: 'count', 'text',
    'mm' (v in m, shown in mm to a micrometre), 'pct' (v in %), 'frac' (a 0..1 fraction shown in %),
    'degC', 'K', 'nH', 'H/turn2' (an inductance factor, shown in nH), 'money <CUR>', 'pcs', 'sets', ':1'.
    """
    if v is None:
        return "-"
    if unit in ("text", "count") or isinstance(v, str):
        return str(v)
    if unit in ("ohm", "Ω"):
        return si(v, "Ω", digits)
    if unit in ("H", "A", "V", "W", "Hz", "F"):
        return si(v, unit, digits)
    if unit == "mm":
        return f"{v * 1e3:.3f} mm"
    if unit == "m":
        return f"{sig(v, digits)} m"
    if unit == "T":
        return f"{v:.3f} T"
    if unit == "degC":
        return f"{v:.1f} °C"
    if unit == "K":
        return kelvin(v)
    if unit == "s":
        return f"{sig(float(v), digits)} s"
    if unit == "pct":
        return percent(v)
    if unit == "frac":
        return fraction_pct(v)
    if unit == "deg":                      # an angle in degrees, shown in minutes of arc (CT phase displacement)
        return f"{v * 60:.2f} min"
    if unit == "kg":
        return f"{sig(v * 1e3, digits)} g" if abs(v) < 1 else f"{sig(v, digits)} kg"
    if unit == "l":
        return f"{sig(v * 1e3, 3)} ml" if abs(v) < 1 else f"{sig(v, 3)} l"
    if unit == "m2":
        return f"{sig(v * 1e4, 3)} cm²"
    if unit == "nH":
        return f"{sig(v, digits)} nH"
    if unit == "H/turn2":
        return f"{sig(v * 1e9, digits)} nH"
    if unit.startswith("money"):
        return money(v, unit[len("money"):].strip())
    if unit in ("pcs", "sets"):
        return f"{v:g} {unit}"
    if unit == ":1":
        return f"{sig(v, digits)} : 1"
    return f"{sig(v, digits)} {unit}"


def table(headers: Sequence[Any], rows: Sequence[Sequence[Any]], align: str | None = None, *,
          indent: int = 2, rule: bool = True) -> str:
    """A plain-text table: columns padded to their widest cell, two spaces apart.

    ``align``: one letter per column, 'l' or 'r' (default: every column left). Headers that are all
    empty print no header row. None prints as an empty cell, a list as 'a, b'. ``rule`` draws a
    dashed line under the header.
    """
    def cell(c: Any) -> str:
        if c is None:
            return ""
        if isinstance(c, (list, tuple)):
            return ", ".join(map(str, c))
        return str(c)

    has_header = any(str(h) for h in headers)
    cells = ([[cell(h) for h in headers]] if has_header else []) + [[cell(c) for c in r] for r in rows]
    if not cells:
        return ""
    n = len(headers)
    widths = [max(len(row[i]) for row in cells) for i in range(n)]
    align = align or "l" * n
    pad = " " * indent
    lines = []
    for k, row in enumerate(cells):
        parts = [c.ljust(w) if a == "l" else c.rjust(w) for c, w, a in zip(row, widths, align)]
        lines.append(pad + "  ".join(parts).rstrip())
        if k == 0 and has_header and rule:
            lines.append(pad + "  ".join("-" * w for w in widths))
    return "\n".join(lines)
