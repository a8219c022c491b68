"""Work-order timing for bench/run.py: the whole issue against WeasyPrint alone on the same HTML."""

from __future__ import annotations

import tempfile
import time
from pathlib import Path


def bench_one(spec_path, runs: int = 3) -> tuple[float, float]:
    """For bench/run.py: (whole issue, WeasyPrint alone on the same HTML) in seconds, best of ``runs``.

    Both in this process after a warm-up, so the one-off WeasyPrint import counts in neither. The whole
    issue is what `specgen workorder` does after start-up: load, design, register number, drawings,
    template, render and the atomic write of both files.
    """
    from specgen import api
    from specgen.catalog.loader import load_catalog
    from specgen.design.spec import load_spec
    from specgen.documents.render import html_to_pdf
    from specgen.documents.workorder import issue_from_design

    cat = load_catalog(None)
    whole, bare = [], []
    with tempfile.TemporaryDirectory() as tmp:
        for i in range(runs + 1):
            t = time.perf_counter()
            spec = load_spec(spec_path)
            design = api.run_design(spec, cat)
            issued = issue_from_design(spec_path, spec, design, cat, qty=10, out_dir=tmp,
                                       register_path=Path(tmp) / "reg.sqlite", warn=lambda m: None)
            t_whole = time.perf_counter() - t
            html = issued.html.read_text(encoding="utf-8")
            t = time.perf_counter()
            html_to_pdf(html)
            t_bare = time.perf_counter() - t
            if i:                       # the first round is the warm-up
                whole.append(t_whole)
                bare.append(t_bare)
    return min(whole), min(bare)
