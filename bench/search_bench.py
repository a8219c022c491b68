"""Benchmark of the design search, called by bench/run.py as ``bench()``.

Two figures:
- candidates per second of the vectorised stage over the full shipped catalogue: every core x stack x
  bobbin x wire x strands row of each demo requirement, with neither the area-product screen nor the
  dominated-option pruning (so every row the catalogue allows is evaluated), one core, median of 3;
- the wall time of the whole search of each demo requirement in a fresh process
  (``specgen search specgen/demo/REQ-*.yaml``, median of 7 after a warm-up), the slower one reported;
  bench/run.py divides it by ``python -c "import numpy"``.

Run alone: ``.venv/bin/python bench/search_bench.py``.
"""

from __future__ import annotations

import statistics
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
PY = sys.executable
from timing import wall as _wall  # noqa: E402


def _rate(prep, repeats: int = 3) -> tuple:
    from specgen.search import run_vector_stage, total_rows

    rows = total_rows(prep)
    times = []
    for _ in range(repeats):
        t = time.perf_counter()
        run_vector_stage(prep)
        times.append(time.perf_counter() - t)
    return rows, statistics.median(times)


def bench() -> dict:
    sys.path.insert(0, str(ROOT))
    from specgen.catalog.loader import load_catalog
    from specgen.search import load_requirement, prepare

    cat = load_catalog(None)
    demos = sorted((ROOT / "specgen" / "demo").glob("REQ-*.yaml"))
    detail = {}
    full_rows = full_time = 0.0
    for path in demos:
        req = load_requirement(path)
        rows, dt = _rate(prepare(req, cat, screen=False, prune=False))
        srows, sdt = _rate(prepare(req, cat))
        full_rows += rows
        full_time += dt
        wall = _wall([PY, "-m", "specgen.cli", "search", str(path)])
        detail[path.stem] = {"full_rows": rows, "full_s": dt, "full_per_s": rows / dt,
                             "search_rows": srows, "search_vector_s": sdt, "search_per_s": srows / sdt,
                             "wall_s": wall}
    slowest = max(detail.values(), key=lambda d: d["wall_s"])
    return {"candidates_per_s": full_rows / full_time, "wall_s": slowest["wall_s"], "demos": detail}


if __name__ == "__main__":
    res = bench()
    base = _wall([PY, "-c", "import numpy"])
    print(f"vectorised stage, full catalogue: {res['candidates_per_s']:,.0f} candidates/s (target >= 1,000,000)")
    for name, d in res["demos"].items():
        print(f"  {name}: full {d['full_rows']:,} rows in {d['full_s'] * 1e3:.0f} ms ({d['full_per_s']:,.0f}/s); "
              f"search set {d['search_rows']:,} rows in {d['search_vector_s'] * 1e3:.0f} ms "
              f"({d['search_per_s']:,.0f}/s); whole search {d['wall_s'] * 1e3:.0f} ms wall "
              f"= {d['wall_s'] / base:.1f}x python -c 'import numpy' ({base * 1e3:.0f} ms)")
    print(f"slowest whole search / import numpy: {res['wall_s'] / base:.1f}x (target <= 10)")
