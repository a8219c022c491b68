"""Batch issue of work orders from a CSV file: `specgen workorder --batch ORDERS.csv`.

ORDERS.csv has a header row with the columns ``spec, qty, due, lot`` (due and lot may be empty); a spec
path is relative to the CSV file's folder. The run:

1. reads every row; a bad row (unknown spec, bad quantity, failed design, unreleased spec) is reported
   with its CSV line and skipped; the others go on;
2. takes the register numbers in row order, in this process, before any rendering (so the numbers follow
   the planner's list however the workers finish);
3. renders the PDFs in worker processes (WeasyPrint is the cost; each worker imports it once); the HTML is
   built here just before a job is handed out, so memory stays flat however long the list;
4. attaches the files to each number, or voids the number with the reason if its render failed;
5. prints a summary. Exit 0 when every row was issued, 1 when any row failed.

Workers are recycled after ``TASKS_PER_WORKER`` renders so a long batch does not grow.

A worker dies with the batch: on Linux each asks the kernel for SIGKILL when its parent ends
(``prctl(PR_SET_PDEATHSIG)``), and everywhere a watchdog thread in the worker exits when its parent is
gone, so killing the batch never leaves renders running. A worker that dies (out of memory, SIGKILL)
breaks the pool for every job in flight; those jobs are run again, one at a time, in a fresh worker, so
only the row whose render kills its worker again is voided, with the reason. The summary is printed
however the render phase ends.
"""

from __future__ import annotations

import contextlib
import csv
import io
import os
import resource
import signal
import sys
import threading
import time
from concurrent.futures import FIRST_COMPLETED, ProcessPoolExecutor, wait
from concurrent.futures.process import BrokenProcessPool
from dataclasses import dataclass, field
from pathlib import Path

from ..errors import DesignFailed, SpecError

TASKS_PER_WORKER = 25
COLUMNS = ("spec", "qty", "due", "lot")


@dataclass
class Row:
    line: int                      # line in the CSV file (the header is line 1)
    spec: str
    qty: str
    due: str
    lot: str
    number: str | None = None
    pdf: Path | None = None
    error: str | None = None


@dataclass
class BatchResult:
    rows: list
    seconds: float
    workers: int
    peak_rss_main_mb: float = 0.0
    peak_rss_worker_mb: float = 0.0
    issued: list = field(default_factory=list)

    @property
    def failed(self) -> list:
        return [r for r in self.rows if r.error]


def read_orders(csv_path: Path) -> list:
    """Rows of an orders file; a file that is not an orders CSV is a SpecError (nothing is issued)."""
    from ..loading import read_text

    text = read_text(csv_path, "orders CSV file")
    reader = csv.reader(io.StringIO(text))
    try:
        header = next(reader)
    except StopIteration:
        raise SpecError("is empty; an orders file starts with the header spec,qty,due,lot", file=str(csv_path)) from None
    names = [h.strip().lower() for h in header]
    if "spec" not in names or "qty" not in names:
        raise SpecError(f"header {','.join(header)!r} lacks spec and qty (columns: {', '.join(COLUMNS)})",
                        file=str(csv_path), line=1)
    unknown = [n for n in names if n not in COLUMNS]
    if unknown:
        raise SpecError(f"unknown column '{unknown[0]}' (columns: {', '.join(COLUMNS)})", file=str(csv_path), line=1)
    rows = []
    end_of_previous = reader.line_num
    for values in reader:
        # a quoted cell may span lines: the row is reported at the line it starts on
        line, end_of_previous = end_of_previous + 1, reader.line_num
        if not any(v.strip() for v in values):
            continue
        cell = dict(zip(names, (v.strip() for v in values)))
        row = Row(line=line, spec=cell.get("spec", ""), qty=cell.get("qty", ""), due=cell.get("due", ""),
                  lot=cell.get("lot", ""))
        if len(values) > len(names):
            row.error = f"{csv_path}:{line}: {len(values)} values for {len(names)} columns"
        elif not row.spec:
            row.error = f"{csv_path}:{line}: spec: is empty"
        rows.append(row)
    if not rows:
        raise SpecError("holds no orders below its header", file=str(csv_path))
    return rows


def _die_with_parent(parent_pid: int) -> None:
    """Worker initializer: this process ends when the batch process that started it ends."""
    if sys.platform.startswith("linux"):
        with contextlib.suppress(Exception):
            import ctypes

            pr_set_pdeathsig = 1
            ctypes.CDLL(None, use_errno=True).prctl(pr_set_pdeathsig, signal.SIGKILL, 0, 0, 0)
    if os.getppid() != parent_pid:        # the parent died before the request above was in place
        os._exit(1)

    def watch() -> None:                  # any platform; also covers a parent that is not the batch itself
        while True:
            time.sleep(0.5)
            if os.getppid() != parent_pid:
                os._exit(1)

    threading.Thread(target=watch, name="parent-watchdog", daemon=True).start()


def _render_job(html: str, pdf_path: str, html_path: str) -> list:
    """Worker: render one work order and write both files atomically. Returns refused URLs."""
    from .render import write_pdf_and_html

    blocked: list = []
    write_pdf_and_html(html, pdf_path, html_path, blocked)
    return blocked


class _Progress:
    """A one-line progress bar on stderr, only on a terminal (or when forced)."""

    def __init__(self, total: int, enabled: bool):
        self.total, self.done, self.enabled = total, 0, enabled
        self.t0 = time.perf_counter()

    def step(self) -> None:
        self.done += 1
        if self.enabled and self.total:
            width = 30
            fill = int(width * self.done / self.total)
            elapsed = time.perf_counter() - self.t0
            sys.stderr.write(f"\r[{'#' * fill}{'.' * (width - fill)}] {self.done}/{self.total}  {elapsed:.0f} s")
            sys.stderr.flush()

    def close(self) -> None:
        if self.enabled and self.total:
            sys.stderr.write("\n")


# long: the batch's steps in order (read, design, number, render, summary), each a few lines
def issue_batch(csv_path, *, out_dir=".", register_path=None, workers: int | None = None, catalog_dir=None,
                by=None, progress: bool | None = None, echo=print) -> BatchResult:
    from ..api import run_design
    from ..catalog.loader import load_catalog
    from ..design.spec import load_spec
    from ..freetext import check_name
    from ..register import Register, locate_register
    from .settings import DocumentSettings
    from .workorder import check_number, preflight, render_work_order_html

    t0 = time.perf_counter()
    by = check_name(by)                    # before the CSV is read: a bad --by refuses the whole batch
    csv_path = Path(csv_path)
    rows = read_orders(csv_path)
    cat = load_catalog(catalog_dir)
    settings = DocumentSettings.from_shop(cat.shop)    # the documents see these figures, not the catalogue
    out = Path(out_dir)
    if out.exists() and not out.is_dir():
        raise SpecError("is a file, expected the folder for the work orders", file=str(out), path="--out")
    if out.is_dir() and not os.access(out, os.W_OK):
        raise SpecError("cannot write into this folder", file=str(out))
    workers = max(1, min(workers or os.cpu_count() or 1, 32))

    # 1. every row checked before any number is taken; designs shared between rows of one spec
    designs: dict = {}
    ready = []
    for row in rows:
        if row.error:
            continue
        spec_path = (csv_path.parent / row.spec) if not Path(row.spec).is_absolute() else Path(row.spec)
        try:
            if spec_path not in designs:
                spec = load_spec(spec_path)
                designs[spec_path] = (spec, run_design(spec, cat))
            spec, design = designs[spec_path]
            qty, due, lot, _warnings = preflight(spec_path, spec, design, cat, qty=row.qty, due=row.due or None,
                                                 lot=row.lot or None)
        except SpecError as err:
            # in a CSV the option checks speak of its columns
            text = str(err)
            for opt in ("--qty", "--due", "--lot"):
                text = text.replace(f"{opt}:", f"{opt[2:]}:", 1) if text.startswith(f"{opt}:") else text
            row.error = f"{csv_path}:{row.line}: {text}"
            continue
        except DesignFailed as err:
            row.error = f"{csv_path}:{row.line}: {err} ({', '.join(c.code for c in err.failed)})"
            continue
        ready.append((row, spec_path, spec, design, qty, due, lot))

    where = locate_register(csv_path, register_path, shop_setting=settings.register_path,
                            catalog_dir=cat.root) if ready else None
    bar = _Progress(len(ready), sys.stderr.isatty() if progress is None else progress)
    result = BatchResult(rows=rows, seconds=0.0, workers=workers)
    try:
        if ready:
            # only now, with something to write: a batch refused as a whole leaves no empty folder
            try:
                out.mkdir(parents=True, exist_ok=True)
            except OSError as err:
                raise SpecError(f"cannot create the output folder: {err.strerror or err}", file=str(out)) from None
            assert where is not None
            with Register.open(where.target) as reg:
                # 2. numbers in row order (no row ready: the register is not even opened, so nothing is created)
                for row, _spec_path, _spec, design, qty, due, lot in ready:
                    fmt = settings.work_order_format.replace("{part}", design.part)
                    row.number = reg.allocate(design.part, design.revision, design.fingerprint or "-", qty, lot,
                                              due, issued_by=by, fmt=fmt)
                    check_number(row.number)
                try:
                    _render_all(ready, reg, settings, out, workers, bar, result, render_work_order_html)
                finally:
                    # whatever stopped the render phase, no row stays 'issued' without its files
                    for row, *_ in ready:
                        if row.number and row.pdf is None and row.error is None:
                            with contextlib.suppress(Exception):
                                _void(reg, row, "the batch stopped before this row was rendered")
    finally:
        bar.close()
        result.seconds = time.perf_counter() - t0
        result.peak_rss_main_mb = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0
        result.peak_rss_worker_mb = resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss / 1024.0
        _summary(rows, result, workers, where, echo)
    return result


def _summary(rows: list, result: BatchResult, workers: int, where, echo) -> None:
    """5. The summary: one line per row, then the totals (printed however the batch ended)."""
    for row in rows:
        if row.error:
            echo(f"FAILED  {row.error}")
        elif row.pdf is not None:
            echo(f"issued  {row.number}  {row.spec} x {row.qty}  {row.pdf}")
    echo(f"{len(result.issued)} issued, {len(result.failed)} failed, {result.seconds:.1f} s on {workers} worker(s)"
         + (f"; register {where.shown} ({where.found_by})" if where is not None else ""))


def _new_pool(workers: int) -> ProcessPoolExecutor:
    # workers are recycled from Python 3.11 (max_tasks_per_child); on 3.10 they live for the whole batch
    recycle: dict = {"max_tasks_per_child": TASKS_PER_WORKER} if sys.version_info >= (3, 11) else {}
    return ProcessPoolExecutor(max_workers=workers, initializer=_die_with_parent, initargs=(os.getpid(),), **recycle)


def _render_all(ready: list, reg, settings, out: Path, workers: int, bar: _Progress, result: BatchResult,
                render_html) -> None:
    """3-4. Render every ready row in worker processes, a bounded number of jobs in flight.

    A pool broken by a dying worker fails every job in flight; those rows are set aside and, once the
    rest is done, rendered again one at a time in a pool of one worker, where a death is the row's own.
    """
    queue, alone = list(ready), False
    suspects: list = []
    pool = _new_pool(workers)
    try:
        while queue or suspects:
            if not queue:
                pool.shutdown(wait=True, cancel_futures=True)
                pool = _new_pool(1)
                queue, suspects, alone = suspects, [], True
            pending: dict = {}
            broken = False
            while (queue or pending) and not broken:
                while queue and len(pending) < (1 if alone else 2 * workers):
                    item = queue.pop(0)
                    job = _submit(pool, item, reg, settings, out, render_html, bar)
                    if job is not None:
                        pending[job[0]] = (item, job[1], job[2])
                if not pending:
                    continue
                done, _ = wait(pending, return_when=FIRST_COMPLETED)
                for fut in done:
                    item, pdf, htm = pending.pop(fut)
                    if isinstance(fut.exception(), BrokenProcessPool):
                        broken = True
                        if alone:          # it died again with no other job beside it: the row's own failure
                            _void(reg, item[0], "render failed: the render worker died (out of memory or killed)")
                            bar.step()
                        else:
                            suspects.append(item)
                        continue
                    _finish(fut, item[0], pdf, htm, reg, result, bar)
            if broken:
                for fut, (item, pdf, htm) in pending.items():     # in flight when the pool broke
                    if fut.done() and fut.exception() is None:
                        _finish(fut, item[0], pdf, htm, reg, result, bar)
                    else:
                        suspects.append(item)
                pool.shutdown(wait=True, cancel_futures=True)
                pool = _new_pool(1 if alone else workers)
    finally:
        pool.shutdown(wait=True, cancel_futures=True)


def _submit(pool, item, reg, settings, out: Path, render_html, bar: _Progress):
    """Build one row's HTML here and hand the PDF render to a worker: (future, pdf, html) or None."""
    row, _spec_path, _spec, design, qty, due, lot = item
    order = reg.get(row.number)
    try:
        html = render_html(design, settings, number=row.number, qty=qty, due=due, lot=lot,
                           issued=order.issued_at[:10], issued_by=order.issued_by, draft=False)
    except Exception as exc:   # a template fault: this row only
        _void(reg, row, f"render failed: {exc}")
        bar.step()
        return None
    pdf, htm = out / f"{row.number}.pdf", out / f"{row.number}.html"
    return pool.submit(_render_job, html, str(pdf), str(htm)), pdf, htm


def _finish(fut, row: Row, pdf: Path, htm: Path, reg, result: BatchResult, bar: _Progress) -> None:
    exc = fut.exception()
    if exc is not None:     # the worker's failure is this row's failure, not the batch's
        first = str(exc).splitlines()[0] if str(exc) else type(exc).__name__
        _void(reg, row, f"render failed: {first}")
    else:
        reg.attach_files(row.number, [str(pdf.resolve()), str(htm.resolve())])   # the same from any folder
        row.pdf = pdf
        result.issued.append(row)
    bar.step()


def _void(reg, row: Row, reason: str) -> None:
    row.error = f"row {row.line}: {row.spec}: {reason} (number {row.number} voided)"
    reg.void(row.number, reason[:200])


def bench_batch(n_small: int = 20, n_big: int = 200, n_speed: int = 40) -> dict:
    """For bench/run.py: 40 orders on 1 and 2 workers, and peak memory of 200 vs 20 orders."""
    import subprocess
    import tempfile

    demo = Path(__file__).resolve().parent.parent / "demo"
    specs = sorted(demo.glob("BH-*.yaml"))

    def run(n: int, workers: int) -> tuple[float, float]:
        with tempfile.TemporaryDirectory() as tmp_name:
            tmp = Path(tmp_name)
            # lot sizes cycle through 10..29 pieces in every run: the printed test record has a row per piece,
            # so a lot size growing with i would measure bigger documents, not memory growing with the order count
            lines = ["spec,qty,due,lot"] + [f"{specs[i % len(specs)]},{10 + i % 20},,B{i:04d}" for i in range(n)]
            (tmp / "orders.csv").write_text("\n".join(lines) + "\n")
            code = ("import resource, sys, time\n"
                    "from specgen.documents.batch import issue_batch\n"
                    f"r = issue_batch({str(tmp / 'orders.csv')!r}, out_dir={str(tmp / 'out')!r}, "
                    f"register_path={str(tmp / 'reg.sqlite')!r}, workers={workers}, progress=False, echo=lambda *a: None)\n"
                    "print(r.seconds, r.peak_rss_main_mb + r.workers * r.peak_rss_worker_mb, len(r.failed))\n")
            env = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}
            out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, env=env, check=True)
            secs, mem, failed = out.stdout.split()
            if int(failed):
                raise RuntimeError(f"{failed} orders failed in the benchmark batch")
            return float(secs), float(mem)

    t1, _ = run(n_speed, 1)
    t2, _ = run(n_speed, 2)
    _, m20 = run(n_small, 2)
    _, m200 = run(n_big, 2)
    return {"speedup": t1 / t2, "t1_s": t1, "t2_s": t2, "mem20_mb": m20, "mem200_mb": m200, "mem_ratio": m200 / m20}
