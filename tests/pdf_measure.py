"""Read a PDF back as a reader sees it, with pypdf (independent of WeasyPrint, which wrote it).

- ``text_sizes_pt``: every run of text with its size in points, from the text matrix and the
  current transformation matrix (PDF 1.7, ISO 32000-1, 9.4.4: the rendered size is the font size
  scaled by both). SVG drawings are measured apart (their own unit is the millimetre).
- ``page_sizes_mm``: each page's media box in millimetres (1 pt = 1/72 in = 25.4/72 mm).
"""

from __future__ import annotations

from pathlib import Path

from pypdf import PdfReader


def text_sizes_pt(pdf: str | Path) -> list[list[tuple[float, str]]]:
    """Per page: (size in pt, text) of every non-blank text run."""
    out = []
    for page in PdfReader(str(pdf)).pages:
        runs: list[tuple[float, str]] = []

        def visit(text, cm, tm, _font, size, runs=runs):
            if text.strip():
                scale_tm = (tm[2] ** 2 + tm[3] ** 2) ** 0.5
                scale_cm = (cm[2] ** 2 + cm[3] ** 2) ** 0.5
                runs.append((round(size * scale_tm * scale_cm, 2), text.strip()))

        page.extract_text(visitor_text=visit)
        out.append(runs)
    return out


def smallest_text(pdf: str | Path) -> tuple[float, str]:
    runs = [r for page in text_sizes_pt(pdf) for r in page]
    return min(runs) if runs else (0.0, "")


def page_sizes_mm(pdf: str | Path) -> list[tuple[float, float]]:
    return [(float(p.mediabox.width) * 25.4 / 72, float(p.mediabox.height) * 25.4 / 72)
            for p in PdfReader(str(pdf)).pages]


#: Height of a word's box from poppler's ``pdftotext -bbox`` over the font size for DejaVu Sans, the
#: documents' font: ascender 0.928 em plus descender 0.236 em (the font's hhea metrics; from memory).
BOX_PER_PT = 1.164


def smallest_printed_pt(pdf: str | Path) -> list[float]:
    """Per page, the smallest text in points as poppler (a second, separate PDF reader) lays it out,
    text inside SVG figures included (pypdf reports their size in the figure's own units)."""
    import re
    import subprocess

    out = subprocess.run(["pdftotext", "-bbox", str(pdf), "-"], check=True, capture_output=True, text=True,
                         timeout=120).stdout
    pages = []
    for page in out.split("<page ")[1:]:
        heights = [float(b) - float(a) for a, b in re.findall(r'yMin="([0-9.]+)"[^>]*yMax="([0-9.]+)"', page)]
        pages.append(min(heights) / BOX_PER_PT if heights else 99.0)
    return pages


def ink_extent(pdf: str | Path, top_mm: float, bottom_mm: float, dpi: int = 40) -> list[float]:
    """Per page, how far down the body (between the top and bottom margin bands) the lowest ink
    reaches, as a fraction of the body's height. Rendered by poppler's ``pdftoppm -gray`` (a PGM,
    read here byte by byte: grey below 200 of 255 is ink; 2 % at each side ignored)."""
    import re
    import subprocess
    import tempfile

    out = []
    with tempfile.TemporaryDirectory() as tmp:
        subprocess.run(["pdftoppm", "-r", str(dpi), "-gray", str(pdf), f"{tmp}/p"], check=True, timeout=300)
        for path in sorted(Path(tmp).glob("p-*.pgm"), key=lambda q: int(q.stem.split("-")[-1])):
            data = path.read_bytes()
            m = re.match(rb"P5\s+(\d+)\s+(\d+)\s+(\d+)\s", data)   # binary greymap header (netpbm)
            w, h, pixels = int(m.group(1)), int(m.group(2)), data[m.end():]
            px_per_mm = h / (page_sizes_mm(pdf)[0][1])
            lo, hi = int(top_mm * px_per_mm), h - int(bottom_mm * px_per_mm)
            edge = w // 50
            last = max((y for y in range(lo, hi) if min(pixels[y * w + edge:(y + 1) * w - edge]) < 200),
                       default=lo)
            out.append((last - lo + 1) / (hi - lo))
    return out
