"""Look at a PDF the way a reader does: how full each page is, the smallest text, any local path.

    python tools/pagecheck.py FILE.pdf [FILE.pdf ...] [--json]

Per page it prints:
  fill     the share of the page's body height (between the top and the bottom margin bands, found as
           the running header and footer) down to the lowest ink: a page filled to 35 % has its last
           mark a third of the way down;
  ink      the share of body rows that carry any ink at all;
  min pt   the smallest text size on the page;
  paper    the page size in mm.
Ink is read from ``pdftoppm -gray`` output (a PGM, parsed here: no image library needed); text
sizes from the word boxes of ``pdftotext -bbox`` (so text inside the SVG drawings counts too).
A line of text that looks like a local absolute path (/home/..., /tmp/..., C:\\...) is flagged.
"""

from __future__ import annotations

import json
import re
import subprocess
import sys
import tempfile
from dataclasses import asdict, dataclass
from pathlib import Path

PATH_RE = re.compile(r"(?<![\w.])(/(home|tmp|usr|srv|work|var|Users|opt)/\S+|[A-Za-z]:\\\S+)")
DPI = 50
INK = 200            # a grey value below this is ink (0 black, 255 white)


@dataclass
class PageReport:
    page: int
    paper_mm: tuple
    fill: float
    ink: float
    min_pt: float | None
    paths: list


def _pgm_rows(path: Path) -> tuple[int, int, list[bytes]]:
    data = path.read_bytes()
    fields, pos = [], 0
    while len(fields) < 4:                          # magic, width, height, maxval
        while data[pos:pos + 1].isspace():
            pos += 1
        if data[pos:pos + 1] == b"#":
            pos = data.index(b"\n", pos) + 1
            continue
        end = pos
        while not data[end:end + 1].isspace():
            end += 1
        fields.append(data[pos:end])
        pos = end
    pos += 1
    w, h = int(fields[1]), int(fields[2])
    return w, h, [data[pos + y * w: pos + (y + 1) * w] for y in range(h)]


def _ink_rows(pdf: Path) -> list[list[bool]]:
    with tempfile.TemporaryDirectory() as tmp:
        subprocess.run(["pdftoppm", "-r", str(DPI), "-gray", str(pdf), f"{tmp}/p"], check=True)
        pages = sorted(Path(tmp).glob("p-*.pgm"), key=lambda p: int(p.stem.split("-")[-1]))
        out = []
        for p in pages:
            _w, _h, rows = _pgm_rows(p)
            # ignore a 2 % strip at each side: crop marks or a watermark's tail are not content
            out.append([min(r[len(r) // 50: -len(r) // 50] or b"\xff") < INK for r in rows])
        return out


def _bands(rows: list[bool]) -> list[tuple[int, int]]:
    bands, start = [], None
    for i, ink in enumerate(rows + [False]):
        if ink and start is None:
            start = i
        elif not ink and start is not None:
            bands.append((start, i))
            start = None
    return bands


def _body(rows: list[bool], top_mm: float, bottom_mm: float, height_mm: float) -> tuple[int, int]:
    px = len(rows) / height_mm
    return int(top_mm * px), len(rows) - int(bottom_mm * px)


#: Height of a word's box from ``pdftotext -bbox`` over the font size, for DejaVu Sans (ascender plus
#: descender: 0.928 + 0.236 em). It reads text drawn inside SVG figures as well, at its printed size.
BOX_PER_PT = 1.164


def _font_sizes(pdf: Path) -> list[float | None]:
    """The smallest text on each page in points, from the word boxes poppler reports."""
    out = subprocess.run(["pdftotext", "-bbox", str(pdf), "-"], check=True, capture_output=True,
                         text=True).stdout
    pages = []
    for page in out.split("<page ")[1:]:
        heights = [float(b) - float(a) for a, b in re.findall(r'yMin="([0-9.]+)"[^>]*yMax="([0-9.]+)"', page)]
        pages.append(round(min(heights) / BOX_PER_PT, 2) if heights else None)
    return pages


def check(pdf: Path, top_mm: float, bottom_mm: float) -> list[PageReport]:
    from pypdf import PdfReader

    reader = PdfReader(str(pdf))
    fonts = _font_sizes(pdf)
    reports = []
    for i, rows in enumerate(_ink_rows(pdf)):
        box = reader.pages[i].mediabox
        w_mm, h_mm = float(box.width) * 25.4 / 72, float(box.height) * 25.4 / 72
        lo, hi = _body(rows, top_mm, bottom_mm, h_mm)
        body = rows[lo:hi]
        last = max((j for j, ink in enumerate(body) if ink), default=-1)
        min_pt = fonts[i]
        text = reader.pages[i].extract_text()
        reports.append(PageReport(i + 1, (round(w_mm), round(h_mm)), round((last + 1) / max(len(body), 1), 3),
                                  round(sum(body) / max(len(body), 1), 3), min_pt,
                                  sorted({m.group(0) for m in PATH_RE.finditer(text)})))
    return reports


def main(argv: list[str]) -> int:
    as_json = "--json" in argv
    # (top, bottom) page margin in mm of each document kind, as its stylesheet sets them (the running
    # header and footer sit in these bands); --workorder=37,16 and the like override one kind
    margins = {"workorder": (39, 16), "quote": (12, 14), "change": (14, 16)}
    for a in argv:
        if a.startswith("--") and "=" in a and a[2:].split("=")[0] in margins:
            kind, value = a[2:].split("=", 1)
            margins[kind] = tuple(float(x) for x in value.split(","))
    out = {}
    for arg in (a for a in argv if not a.startswith("--")):
        pdf = Path(arg)
        kind = "workorder" if pdf.name.startswith("WO-") else "change" if ".change-" in pdf.name else "quote"
        top, bottom = margins[kind]
        out[str(pdf)] = [asdict(r) for r in check(pdf, top, bottom)]
    if as_json:
        print(json.dumps(out, indent=1))
        return 0
    for name, pages in out.items():
        print(name)
        for p in pages:
            flag = " <-- under half" if p["fill"] < 0.5 and p["page"] < len(pages) else ""
            small = " <-- small text" if p["min_pt"] is not None and p["min_pt"] < 8.45 else ""
            paths = f"  PATHS {p['paths']}" if p["paths"] else ""
            print(f"  page {p['page']:>2}  {p['paper_mm'][0]}x{p['paper_mm'][1]} mm  fill {p['fill']:5.0%}"
                  f"  ink rows {p['ink']:5.0%}  min {p['min_pt']} pt{flag}{small}{paths}")
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
