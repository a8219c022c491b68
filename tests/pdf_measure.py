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
