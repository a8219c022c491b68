"""Look at a PDF the way a reader does: how full each page is, the smallest text, any local path.

    python tools/pagecheck.py FILE.pdf [FILE.pdf ...] [--json]

Per page it prints:
  fill     the share of the page's body height (between the top and the bottom margin, the running header
           and footer sitting in those bands) down to the lowest ink: a page filled to 35 % has its last
           mark a third of the way down;
  ink      the share of body rows that carry any ink at all;
  min pt   the smallest text size on the page;
  paper    the page size in mm;
and under each file the problems ``problems`` finds (the rules ``tests/test_demo_pages.py`` holds every
PDF of ``specgen demo`` to): a page under half full that is neither the document's last nor followed by a
page that must start fresh (``FRESH_STARTS``, each with its reason), text under 8.5 pt, a local path.
Exit status 1 when any file has a problem.

Ink is read from ``pdftoppm -gray`` output (a PGM, parsed here: no image library needed); text sizes from
the word boxes of ``pdftotext -bbox`` (so text inside the SVG drawings counts too); the page text for
paths and headings from pypdf. Poppler and pypdf are PDF readers apart from WeasyPrint, which wrote the
files. The body's margins are read from the document's own stylesheet (``templates/*.css``).
"""

from __future__ import annotations

import json
import re
import subprocess
import sys
import tempfile
from dataclasses import asdict, dataclass
from pathlib import Path

PATH_RE = re.compile(r"(?<![\w.])(/(home|tmp|usr|srv|work|var|Users|opt|root|mnt)/\S+|[A-Za-z]:\\\S+)")
DPI = 50
INK = 200            # a grey value below this is ink (0 black, 255 white)
MIN_FILL = 0.5       # every page but the last (or one before a fresh start) reaches half way down its body
MIN_PT = 8.5         # the smallest text on a shop document read at arm's length (common practice)
PT_TOLERANCE = 0.05  # the word-box estimate of a size rounds: 8.5 pt text reads 8.46 to 8.54

TEMPLATES = Path(__file__).resolve().parent.parent / "templates"

#: Each document kind's stylesheet, whose first @page rule sets the margins the running header and footer
#: sit in.
STYLESHEETS = {"workorder": "specgen.css", "quote": "quote.css", "change": "change.css"}

#: The footer's first ink sits on the bottom margin's line itself: the body ends this far above it.
FOOTER_SLACK_MM = 1.0

#: Pages that must start fresh, by document kind: a heading (a regular expression) that begins such a page,
#: and the reason. The page before one may stay under half full.
FRESH_STARTS: dict[str, dict[str, str]] = {
    "workorder": {
        r"Test record \S+ rev \S+, lot": "the test record is printed landscape (a column for every test, wide "
                                           "enough to write in): its pages turn the paper and start fresh",
    },
}


@dataclass
class PageReport:
    page: int
    paper_mm: tuple
    fill: float
    ink: float
    min_pt: float | None
    paths: list
    text: str


def kind_of(pdf: Path) -> str:
    """The document kind from the file name ``specgen`` gives it."""
    if pdf.name.startswith("WO-"):
        return "workorder"
    if ".change-" in pdf.name:
        return "change"
    if "quote" in pdf.name:
        return "quote"
    raise ValueError(f"{pdf.name}: not a work order (WO-...), change summary (.change-) or quote (...quote...)")


def margins_mm(kind: str) -> tuple[float, float]:
    """(top, bottom) margin in mm from the first ``@page { margin: ... }`` of the kind's stylesheet."""
    css = (TEMPLATES / STYLESHEETS[kind]).read_text(encoding="utf-8")
    page = css[css.index("@page"):]
    values = [float(v) for v in re.findall(r"([0-9.]+)mm", re.search(r"margin:\s*([^;]+);", page).group(1))]
    top, bottom = values[0], values[2] if len(values) > 2 else values[0]
    return top, bottom + FOOTER_SLACK_MM


def _pgm_rows(path: Path) -> list[bytes]:
    data = path.read_bytes()
    m = re.match(rb"P5\s+(\d+)\s+(\d+)\s+(\d+)\s", data)     # binary greymap header (netpbm), no comments
    w, h, pixels = int(m.group(1)), int(m.group(2)), data[m.end():]
    return [pixels[y * w: (y + 1) * w] for y in range(h)]


def _ink_rows(pdf: Path) -> list[list[bool]]:
    with tempfile.TemporaryDirectory() as tmp:
        subprocess.run(["pdftoppm", "-r", str(DPI), "-gray", str(pdf), f"{tmp}/p"], check=True, timeout=300)
        pages = sorted(Path(tmp).glob("p-*.pgm"), key=lambda p: int(p.stem.split("-")[-1]))
        out = []
        for p in pages:
            rows = _pgm_rows(p)
            # ignore a 2 % strip at each side: crop marks or a watermark's tail are not content
            out.append([min(r[len(r) // 50: -len(r) // 50] or b"\xff") < INK for r in rows])
        return out


#: Height of a word's box from ``pdftotext -bbox`` over the font size, for DejaVu Sans (ascender plus
#: descender: 0.928 + 0.236 em; the font's hhea metrics, from memory). It reads text drawn inside SVG
#: figures as well, at its printed size.
BOX_PER_PT = 1.164


def font_sizes(pdf: Path) -> list[float | None]:
    """The smallest text on each page in points, from the word boxes poppler reports."""
    out = subprocess.run(["pdftotext", "-bbox", str(pdf), "-"], check=True, capture_output=True,
                         text=True, timeout=120).stdout
    pages = []
    for page in out.split("<page ")[1:]:
        heights = [float(b) - float(a) for a, b in re.findall(r'yMin="([0-9.]+)"[^>]*yMax="([0-9.]+)"', page)]
        pages.append(round(min(heights) / BOX_PER_PT, 2) if heights else None)
    return pages


def check(pdf: Path, top_mm: float | None = None, bottom_mm: float | None = None) -> list[PageReport]:
    """Each page of ``pdf`` measured; the margins default to those of its kind's stylesheet."""
    from pypdf import PdfReader

    if top_mm is None or bottom_mm is None:
        top_mm, bottom_mm = margins_mm(kind_of(pdf))
    reader = PdfReader(str(pdf))
    fonts = font_sizes(pdf)
    reports = []
    for i, rows in enumerate(_ink_rows(pdf)):
        box = reader.pages[i].mediabox
        w_mm, h_mm = float(box.width) * 25.4 / 72, float(box.height) * 25.4 / 72
        px = len(rows) / h_mm
        body = rows[int(top_mm * px): len(rows) - int(bottom_mm * px)]
        last = max((j for j, ink in enumerate(body) if ink), default=-1)
        text = reader.pages[i].extract_text()
        reports.append(PageReport(i + 1, (round(w_mm), round(h_mm)), round((last + 1) / max(len(body), 1), 3),
                                  round(sum(body) / max(len(body), 1), 3), fonts[i],
                                  sorted({m.group(0) for m in PATH_RE.finditer(text)}), text))
    return reports


def fresh_start(kind: str, text: str) -> str | None:
    """The reason a page with this text must start fresh, or None."""
    return next((why for pattern, why in FRESH_STARTS.get(kind, {}).items() if re.search(pattern, text)), None)


def problems(pdf: Path, pages: list[PageReport]) -> list[str]:
    """What a reader would object to, one line each (empty: the document passes)."""
    kind, out = kind_of(pdf), []
    for p in pages:
        where = f"{pdf.name} page {p.page} of {len(pages)}"
        if p.fill < MIN_FILL and p.page < len(pages) and fresh_start(kind, pages[p.page].text) is None:
            out.append(f"{where}: filled to {p.fill:.0%} of its body, and the next page need not start fresh")
        if p.min_pt is not None and p.min_pt < MIN_PT - PT_TOLERANCE:
            out.append(f"{where}: text at {p.min_pt} pt, under {MIN_PT} pt")
        if p.paths:
            out.append(f"{where}: local path(s) {p.paths}")
    return out


def main(argv: list[str]) -> int:
    as_json = "--json" in argv
    found: dict[str, list[PageReport]] = {a: check(Path(a)) for a in argv if not a.startswith("--")}
    issues = {name: problems(Path(name), pages) for name, pages in found.items()}
    if as_json:
        print(json.dumps({name: {"pages": [{k: v for k, v in asdict(p).items() if k != "text"} for p in pages],
                                 "problems": issues[name]} for name, pages in found.items()}, indent=1))
        return 1 if any(issues.values()) else 0
    for name, pages in found.items():
        print(name)
        for p in pages:
            print(f"  page {p.page:>2}  {p.paper_mm[0]}x{p.paper_mm[1]} mm  fill {p.fill:5.0%}"
                  f"  ink rows {p.ink:5.0%}  min {p.min_pt} pt")
        for line in issues[name]:
            print(f"  PROBLEM {line}")
    return 1 if any(issues.values()) else 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
