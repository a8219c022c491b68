"""specgen benchmarks: every figure is a ratio to a baseline measured in the same run.

    make bench

Wall times are the median of several runs of a fresh process (what a user waits for). Targets come from
the issues; a ratio above target is printed as such, not hidden.
"""

from __future__ import annotations

import os
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
PY = sys.executable
DEMO = ROOT / "specgen" / "demo"
RESULTS: list = []

sys.path.insert(0, str(ROOT / "bench"))
from timing import wall  # noqa: E402


def report(name: str, ratio: float, target: float | None, detail: str = "", higher_is_better=False) -> None:
    if target is None:
        verdict = ""
    elif higher_is_better:
        verdict = "ok" if ratio >= target else "BELOW TARGET"
    else:
        verdict = "ok" if ratio <= target else "ABOVE TARGET"
    tgt = "" if target is None else (f"(target >= {target:g})" if higher_is_better else f"(target <= {target:g})")
    line = f"{name:58} {ratio:8.2f}x {tgt:16} {verdict:12} {detail}"
    RESULTS.append(line)
    print(line, flush=True)


def imports_weasyprint(args: list) -> bool:
    code = (f"import sys, runpy; sys.argv=['specgen'] + {args!r}\n"
            "try:\n    runpy.run_module('specgen.cli', run_name='__main__')\n"
            "except SystemExit:\n    pass\n"
            "print('WEASY' if 'weasyprint' in sys.modules else 'CLEAN', file=sys.stderr)")
    out = subprocess.run([PY, "-c", code], capture_output=True, text=True)
    return "WEASY" in out.stderr


def quick_commands() -> None:
    base = wall([PY, "-c", "import yaml"])
    print(f"baseline: python -c 'import yaml' {base * 1e3:.0f} ms")
    subprocess.run([PY, "-m", "specgen.cli", "catalog", "list", "wires"], capture_output=True)  # warm the cache
    for args, target in ((["--help"], 2.5), (["catalog", "list", "wires"], 4.0),
                         (["design", str(DEMO / "BH-2210.yaml")], 4.0),
                         (["design", str(DEMO / "BH-1042.yaml"), "--json"], 4.0)):
        t = wall([PY, "-m", "specgen.cli", *args])
        weasy = imports_weasyprint(args)
        report(f"specgen {' '.join(a if '/' not in a else Path(a).name for a in args)} / import yaml", t / base,
               target, f"{t * 1e3:.0f} ms" + ("  IMPORTS WEASYPRINT" if weasy else ", no weasyprint"))


def in_process_design() -> None:
    from specgen.api import design_file
    from specgen.catalog.loader import load_catalog

    cat = load_catalog(None)
    for path in sorted(DEMO.glob("BH-*.yaml")):
        design_file(path, cat=cat)
        n = 20
        t = time.perf_counter()
        for _ in range(n):
            design_file(path, cat=cat)
        dt = (time.perf_counter() - t) / n
        print(f"  design {path.stem}: {dt * 1e3:.1f} ms in process")


def workorder_vs_weasyprint() -> None:
    try:
        from workorder_bench import bench_one
    except ImportError:
        print("work orders: not built yet")
        return
    whole, bare = bench_one(DEMO / "BH-2210.yaml")
    report("work order whole process / WeasyPrint alone on its HTML", whole / bare, 1.15,
           f"{whole * 1e3:.0f} ms vs {bare * 1e3:.0f} ms")


def search() -> None:
    try:
        import search_bench
    except ImportError:
        print("search: not built yet")
        return
    res = search_bench.bench()
    base = wall([PY, "-c", "import numpy"])
    rate = res["candidates_per_s"]
    report("search: candidates evaluated per second / 1,000,000", rate / 1e6, 1.0,
           f"{rate:,.0f} candidates/s", higher_is_better=True)
    report("search: whole demo search / python -c 'import numpy'", res["wall_s"] / base, 10.0,
           f"{res['wall_s'] * 1e3:.0f} ms vs {base * 1e3:.0f} ms")


def batch() -> None:
    try:
        from specgen.documents import batch as b
    except ImportError:
        print("batch: not built yet")
        return
    hook = getattr(b, "bench_batch", None)
    if hook is None:
        print("batch: no bench_batch() hook")
        return
    res = hook()
    report("batch: 40 work orders, 1 worker / 2 workers", res["speedup"], 1.7,
           f"{res['t1_s']:.1f} s vs {res['t2_s']:.1f} s", higher_is_better=True)
    report("batch: peak memory 200 orders / 20 orders", res["mem_ratio"], 1.3,
           f"{res['mem200_mb']:.0f} MB vs {res['mem20_mb']:.0f} MB")


def register() -> None:
    import register_bench

    results = register_bench.bench()
    for name, (rate, bare) in results.items():
        report(f"register: {name} numbers/s, 16 issuers / bare INSERT loop", rate / bare, 0.2,
               f"{rate:,.0f} numbers/s vs {bare:,.0f} inserts/s", higher_is_better=True)
    if "PostgreSQL" not in results:
        print("register: PostgreSQL not installed (tools/sysdeps.sh installs it); its figure is left out")


def station() -> None:
    import station_bench

    for name, (value, base) in station_bench.bench().items():
        report(f"station: {name} p95, 20 tablets / static file p95", value / base, 3.0,
               f"{value * 1e3:.1f} ms vs {base * 1e3:.1f} ms")


def main() -> None:
    print(f"specgen benchmarks on {os.cpu_count()} CPU(s), {sys.version.split()[0]}")
    quick_commands()
    in_process_design()
    workorder_vs_weasyprint()
    search()
    batch()
    register()
    station()
    print("\nsummary")
    for line in RESULTS:
        print(" ", line)


if __name__ == "__main__":
    main()
