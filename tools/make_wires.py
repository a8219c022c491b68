#!/usr/bin/env python3
"""Write catalog/wires.yaml: the shop's wire stock, the long regular tables computed, not typed.

Run from the project root:  python tools/make_wires.py [--out catalog/wires.yaml] [--check]

``--check`` writes nothing and exits 1 if the file on disk differs from what this script would
write (so a hand edit of a generated table is noticed).

The rules (every one is stated again in the file header it writes):

* Round magnet wire, AWG 8..44: bare diameter from the ASTM B258 formula
  d = 0.127 mm x 92 ** ((36 - n) / 39), rounded to 4 significant digits.
* Metric round wire: the R20 preferred-number series 0.050 .. 3.150 mm (IEC 60317 sizes).
* Enamel build (overall diameter = bare + increment), a fit made from memory of the maximum
  overall diameters in IEC 60317-0-1 and NEMA MW 1000 (verify before production use):
      grade 2 increment = 0.093 mm x (d/mm) ** 0.55   for d <= 1 mm
                        = 0.093 mm x (d/mm) ** 0.25   for d >  1 mm
      grade 1 increment = 0.65 x grade 2,  grade 3 increment = 1.45 x grade 2
  Grade 1/2/3 are single/heavy/triple build in NEMA terms.
* Prices (invented demo figures, base 14.50 per kg copper from the scenario):
      price = 14.50 x size factor x grade factor x class factor, to the cent
      size factor: d >= 0.50 mm 1.00; 0.20-0.50 mm 1.05; 0.10-0.20 mm 1.25;
                   0.063-0.10 mm 1.60; below 0.063 mm 2.20
      grade factor: grade 1 1.00, grade 2 1.04, grade 3 1.10
      class factor: 155 1.00, 180 1.15, 200 1.25
* Litz: strand overall = grade 1 build of the strand; bundle diameter
  D = d_strand_overall x sqrt(N / 0.75) + 2 x 0.03 mm serving (packing factor 0.75 for a
  twisted bundle, common practice, from memory); price = 2.6 x strand price x (1 + N/1000).
* Foil, rectangular strip and triple-insulated wire: short hand-chosen lists below.

The file is written atomically (temp file in the same folder, then os.replace).
"""

from __future__ import annotations

import argparse
import math
import os
import sys
import tempfile
from decimal import ROUND_HALF_UP, Decimal
from pathlib import Path

BASE_PRICE = Decimal("14.50")          # per kg copper magnet wire, invented demo figure

R20 = [0.050, 0.056, 0.063, 0.071, 0.080, 0.090, 0.100, 0.112, 0.125, 0.140, 0.160, 0.180,
       0.200, 0.224, 0.250, 0.280, 0.315, 0.355, 0.400, 0.450, 0.500, 0.560, 0.630, 0.710,
       0.800, 0.900, 1.000, 1.120, 1.250, 1.400, 1.600, 1.800, 2.000, 2.240, 2.500, 2.800, 3.150]

GRADE_FACTOR = {1: Decimal("1.00"), 2: Decimal("1.04"), 3: Decimal("1.10")}
CLASS_FACTOR = {155: Decimal("1.00"), 180: Decimal("1.15"), 200: Decimal("1.25")}

# higher-class variants the shop keeps (a polyamide-imide overcoat, class 200; a class 180 enamel)
AWG_CLASS_200 = [14, 16, 18, 20, 22, 24]          # grade 2
METRIC_CLASS_180 = [0.50, 0.71, 1.00, 1.40]       # grade 2

LITZ = [  # (strands, strand diameter mm)
    (20, 0.10), (40, 0.10), (60, 0.10), (105, 0.10), (150, 0.10), (30, 0.20), (50, 0.20),
    (100, 0.08), (270, 0.071), (420, 0.05),
]
LITZ_PACKING = 0.75
LITZ_SERVING_MM = 0.03

FOIL = {  # thickness mm -> widths mm
    0.05: [10, 20],
    0.10: [15, 20, 25],
    0.20: [20, 25, 30],
    0.30: [25, 30, 40],
    0.50: [30, 40, 50],
}
FOIL_PRICE = {0.05: "30.00", 0.10: "22.00", 0.20: "19.50", 0.30: "19.00", 0.50: "18.50"}

STRIP = [  # (thickness mm, width mm, thermal class)
    (0.80, 4.00, 155), (1.00, 3.00, 155), (1.00, 5.00, 155), (1.50, 6.00, 155),
    (2.00, 8.00, 200), (2.50, 10.00, 200),
]
STRIP_INCREMENT_MM = 0.12     # grade 2 enamel on each dimension (both sides together), from memory
STRIP_PRICE = Decimal("17.50")

TIW = [  # (bare mm, thermal class)
    (0.20, 130), (0.25, 130), (0.30, 130), (0.35, 130), (0.40, 130), (0.50, 130), (0.60, 130),
    (0.80, 130), (1.00, 130), (0.40, 155), (0.60, 155),
]
TIW_INCREMENT_MM = 0.20       # three extruded layers, ~0.033 mm wall each (from memory)


def awg_bare_mm(n: int) -> float:
    """ASTM B258: d = 0.127 mm x 92^((36 - n)/39)."""
    return 0.127 * 92.0 ** ((36 - n) / 39.0)


def sig4(x: float) -> float:
    return float(f"{x:.4g}")


def fmt_mm(x: float, sig: int = 4) -> str:
    """Format in mm to ``sig`` significant digits, keeping trailing zeros (0.5740, 3.150)."""
    digits = sig - 1 - int(math.floor(math.log10(abs(x))))
    return f"{x:.{max(digits, 0)}f} mm"


def grade2_increment_mm(d_mm: float) -> float:
    exponent = 0.55 if d_mm <= 1.0 else 0.25
    return 0.093 * d_mm ** exponent


def increment_mm(d_mm: float, grade: int) -> float:
    return grade2_increment_mm(d_mm) * {1: 0.65, 2: 1.0, 3: 1.45}[grade]


def size_factor(d_mm: float) -> Decimal:
    if d_mm >= 0.50:
        return Decimal("1.00")
    if d_mm >= 0.20:
        return Decimal("1.05")
    if d_mm >= 0.10:
        return Decimal("1.25")
    if d_mm >= 0.063:
        return Decimal("1.60")
    return Decimal("2.20")


def cents(x: Decimal) -> str:
    return str(x.quantize(Decimal("0.01"), rounding=ROUND_HALF_UP))


def round_price(d_mm: float, grade: int, thermal_class: int) -> str:
    return cents(BASE_PRICE * size_factor(d_mm) * GRADE_FACTOR[grade] * CLASS_FACTOR[thermal_class])


def metric_name(d_mm: float) -> str:
    """0.05, 0.056, 0.10, 0.112, 1.00, 3.15: at least two decimals, no padding beyond."""
    text = f"{d_mm:.3f}".rstrip("0")
    whole, _, frac = text.partition(".")
    return f"{whole}.{frac.ljust(2, '0')}"


SRC_ROUND = ("bare: ASTM B258 formula; overall: enamel increment formula in the file header, "
             "from memory of IEC 60317-0-1 / NEMA MW 1000 maxima (verify before production use); "
             "price: invented demo figure (rule in the header)")
SRC_METRIC = ("bare: IEC 60317 R20 nominal size; overall: enamel increment formula in the file "
              "header, from memory of IEC 60317-0-1 maxima (verify before production use); "
              "price: invented demo figure (rule in the header)")


def entry(fields: list[tuple[str, object]]) -> str:
    lines = []
    for i, (key, value) in enumerate(fields):
        prefix = "  - " if i == 0 else "    "
        lines.append(f"{prefix}{key}: {value}")
    return "\n".join(lines)


def q(text: str) -> str:
    return '"' + text.replace("\\", "\\\\").replace('"', '\\"') + '"'


def round_awg(n: int, grade: int, thermal_class: int = 155) -> str:
    d = sig4(awg_bare_mm(n))
    od = sig4(d + increment_mm(d, grade))
    suffix = "" if thermal_class == 155 else f"-T{thermal_class}"
    label = f"AWG {n} grade {grade}" + ("" if thermal_class == 155 else f", class {thermal_class}")
    return entry([
        ("id", f"AWG{n}-G{grade}{suffix}"), ("kind", "round"), ("label", label),
        ("conductor", "copper"), ("awg", n), ("bare_diameter", fmt_mm(d)),
        ("overall_diameter", fmt_mm(od)), ("grade", f"grade {grade}"),
        ("thermal_class", thermal_class), ("price_per_kg", q(round_price(d, grade, thermal_class))),
        ("source", q(SRC_ROUND)),
    ])


def round_metric(d: float, grade: int, thermal_class: int = 155) -> str:
    od = sig4(d + increment_mm(d, grade))
    name = metric_name(d)
    suffix = "" if thermal_class == 155 else f"-T{thermal_class}"
    label = f"{name} mm grade {grade}" + ("" if thermal_class == 155 else f", class {thermal_class}")
    return entry([
        ("id", f"CU-{name}-G{grade}{suffix}"), ("kind", "round"), ("label", label),
        ("conductor", "copper"), ("bare_diameter", f"{d:.3f} mm"),
        ("overall_diameter", fmt_mm(od)), ("grade", f"grade {grade}"),
        ("thermal_class", thermal_class), ("price_per_kg", q(round_price(d, grade, thermal_class))),
        ("source", q(SRC_METRIC)),
    ])


def litz(n: int, d: float) -> str:
    so = d + increment_mm(d, 1)
    bundle = so * math.sqrt(n / LITZ_PACKING) + 2 * LITZ_SERVING_MM
    strand_price = BASE_PRICE * size_factor(d)
    price = strand_price * Decimal("2.6") * (1 + Decimal(n) / 1000)
    name = metric_name(d)
    return entry([
        ("id", f"LITZ-{n}X{name}"), ("kind", "litz"), ("label", f"{n} x {name} mm Litz, served"),
        ("conductor", "copper"), ("strands", n), ("strand_diameter", f"{d:.3f} mm"),
        ("strand_overall_diameter", f"{so:.3f} mm"), ("overall_diameter", f"{bundle:.2f} mm"),
        ("thermal_class", 155), ("price_per_kg", q(cents(price))),
        ("source", q(f"strands: grade 1 build by the header formula; bundle = strand overall x "
                     f"sqrt(N/{LITZ_PACKING}) + 2 x {LITZ_SERVING_MM} mm serving (packing factor "
                     f"common practice, from memory: verify before production use); price: "
                     f"invented demo figure")),
    ])


def foil(t: float, w: int) -> str:
    name = metric_name(t)
    return entry([
        ("id", f"FOIL-{name}X{w}"), ("kind", "foil"), ("label", f"copper foil {name} x {w} mm"),
        ("conductor", "copper"), ("thickness", f"{name} mm"), ("width", f"{w} mm"),
        ("thermal_class", 155), ("price_per_kg", q(FOIL_PRICE[t])),
        ("source", q("common stock sizes of soft copper foil (common practice); insulated by "
                     "interleaved tape, so the class is the tape system's; price: invented demo "
                     "figure")),
    ])


def strip(t: float, w: float, thermal_class: int) -> str:
    tn, wn = f"{t:.2f}", f"{w:.2f}"
    price = STRIP_PRICE * CLASS_FACTOR[thermal_class]
    return entry([
        ("id", f"STRIP-{t:.1f}X{w:.1f}"), ("kind", "strip"),
        ("label", f"enamelled strip {t:.1f} x {w:.1f} mm, class {thermal_class}"),
        ("conductor", "copper"), ("thickness", f"{tn} mm"), ("width", f"{wn} mm"),
        ("overall_thickness", f"{t + STRIP_INCREMENT_MM:.2f} mm"),
        ("overall_width", f"{w + STRIP_INCREMENT_MM:.2f} mm"),
        ("thermal_class", thermal_class), ("price_per_kg", q(cents(price))),
        ("source", q(f"rectangular sizes from memory of IEC 60317-0-2; grade 2 enamel taken as "
                     f"+{STRIP_INCREMENT_MM} mm on each dimension (from memory: verify before "
                     f"production use); price: invented demo figure")),
    ])


def tiw(d: float, thermal_class: int) -> str:
    name = metric_name(d)
    suffix = "" if thermal_class == 130 else f"-T{thermal_class}"
    size = size_factor(d)
    price = Decimal("3.0") * BASE_PRICE * size * (Decimal("1.15") if thermal_class == 155 else 1)
    return entry([
        ("id", f"TIW-{name}{suffix}"), ("kind", "tiw"),
        ("label", f"triple-insulated {name} mm, class {thermal_class}"), ("conductor", "copper"),
        ("bare_diameter", f"{d:.2f} mm"), ("overall_diameter", f"{d + TIW_INCREMENT_MM:.2f} mm"),
        ("insulation_rating", "reinforced"), ("thermal_class", thermal_class),
        ("price_per_kg", q(cents(price))),
        ("source", q(f"three extruded layers, overall = bare + {TIW_INCREMENT_MM} mm (from memory "
                     f"of common triple-insulated wire: verify before production use); each "
                     f"layer alone passes the basic test so the wire counts as reinforced "
                     f"(common practice, from memory of IEC 62368-1 wound components); price: "
                     f"invented demo figure (3 x magnet wire)")),
    ])


HEADER = """\
# Brindle Hollow Coil Works: wire stock.
#
# GENERATED by tools/make_wires.py - do not edit by hand; change the script and run
#     python tools/make_wires.py
#
# Round magnet wire
#   AWG 8..44: bare diameter from the ASTM B258 formula d = 0.127 mm x 92^((36-n)/39),
#   rounded to 4 significant digits. Metric: R20 series 0.050 .. 3.150 mm.
#   Overall diameter = bare + enamel increment; a fit made from memory of the maximum overall
#   diameters of IEC 60317-0-1 and NEMA MW 1000 (verify before production use):
#     grade 2 (heavy build)  0.093 mm x d^0.55 for d <= 1 mm, 0.093 mm x d^0.25 above (d in mm)
#     grade 1 (single build) 0.65 x the grade 2 increment
#     grade 3 (triple build) 1.45 x the grade 2 increment
#   Thermal class 155 unless the id ends in -T180 / -T200.
# Prices (invented demo figures): 14.50 per kg copper x size factor x grade factor x class factor
#   size: >= 0.50 mm 1.00; 0.20-0.50 mm 1.05; 0.10-0.20 mm 1.25; 0.063-0.10 mm 1.60; < 0.063 mm 2.20
#   grade: 1 1.00, 2 1.04, 3 1.10;  class: 155 1.00, 180 1.15, 200 1.25
# Litz: strands in grade 1; bundle = strand overall x sqrt(N / 0.75) + 2 x 0.03 mm serving
#   (packing 0.75, common practice, from memory); price 2.6 x strand price x (1 + N/1000).
# Foil, strip and triple-insulated wire: hand-chosen stock lists in the script.

wires:
"""


def build() -> str:
    parts = [HEADER]

    def section(title: str, entries: list[str]) -> None:
        parts.append(f"\n  # ---- {title} ----\n")
        parts.append("\n\n".join(entries) + "\n")

    for grade in (1, 2, 3):
        section(f"AWG round, grade {grade}", [round_awg(n, grade) for n in range(8, 45)])
    section("AWG round, grade 2, class 200", [round_awg(n, 2, 200) for n in AWG_CLASS_200])
    for grade in (1, 2):
        section(f"metric round (R20), grade {grade}", [round_metric(d, grade) for d in R20])
    section("metric round, grade 2, class 180", [round_metric(d, 2, 180) for d in METRIC_CLASS_180])
    section("Litz", [litz(n, d) for n, d in LITZ])
    section("copper foil", [foil(t, w) for t, widths in FOIL.items() for w in widths])
    section("enamelled rectangular strip", [strip(t, w, c) for t, w, c in STRIP])
    section("triple-insulated wire", [tiw(d, c) for d, c in TIW])
    return "".join(parts)


def write_atomic(path: Path, text: str) -> None:
    path.parent.mkdir(parents=True, exist_ok=True)
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=path.parent)
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="\n") as fh:
            fh.write(text)
        os.replace(tmp, path)
    except BaseException:
        try:
            os.unlink(tmp)
        except FileNotFoundError:
            pass
        raise


def main(argv: list[str] | None = None) -> int:
    here = Path(__file__).resolve().parent.parent
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--out", type=Path, default=here / "catalog" / "wires.yaml")
    ap.add_argument("--check", action="store_true", help="exit 1 if the file is not up to date")
    args = ap.parse_args(argv)
    text = build()
    if args.check:
        current = args.out.read_text(encoding="utf-8") if args.out.exists() else ""
        if current != text:
            print(f"{args.out} is not what tools/make_wires.py writes; run it", file=sys.stderr)
            return 1
        return 0
    write_atomic(args.out, text)
    print(f"wrote {args.out} ({text.count('  - id:')} wires)")
    return 0


if __name__ == "__main__":
    sys.exit(main())
