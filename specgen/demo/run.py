"""The demo run: the whole job on the shipped demo shop (Brindle Hollow Coil Works), into one folder.

  designs/     every part's calculation as the terminal shows it, and as JSON
  workorders/  a work order per part (PDF + HTML), numbered by a register in that folder
  quotes/      a quote per part at 100 / 500 / 2500 pieces
  changes/     a change summary between two revisions of BH-2210 held in a scratch git repository
  search/      the design search on the demo requirements (ranked candidates)
  shop/        a demo shop to try the commands in (the README's tour): a git repository holding the
               parts (BH-2210 with a second revision), the catalogue, the requirements and an orders CSV

Demo code only: the document modules know nothing of it.
"""

from __future__ import annotations

import dataclasses
import json
import os
import re
import shutil
import subprocess
import tempfile
from decimal import ROUND_HALF_UP, Decimal
from pathlib import Path
from typing import Any

from ..api import demo_specs, run_design
from ..atomic import write_atomic
from ..catalog.loader import load_catalog
from ..design.spec import load_spec
from ..errors import DesignFailed
from ..quote import build_quote, money

#: The quantity breaks of the demo quotes.
DEMO_QUANTITIES = (100, 500, 2500)
#: The demo's work-order lot size (each part's printed test record has a row per piece).
DEMO_LOT_QTY = 50


def run_demo(out: Path, catalog=None, echo=print) -> dict:
    out = Path(out)
    out.mkdir(parents=True, exist_ok=True)
    cat = load_catalog(catalog)
    from ..report import design_report

    echo("== designs")
    (out / "designs").mkdir(exist_ok=True)
    designs = {}
    for path in demo_specs():
        spec = load_spec(path)
        d = run_design(spec, cat)
        designs[spec.part] = (path, spec, d)
        write_atomic(out / "designs" / f"{spec.part}.txt", design_report(d) + "\n")
        write_atomic(out / "designs" / f"{spec.part}.json", json.dumps(d.to_dict(), indent=2, ensure_ascii=False) + "\n")
        echo(f"{spec.part:8} {'FAIL' if d.failed else 'ok':4} hot spot {d.hot_spot_c:3.0f} °C  {d.title}")
        for w in d.warnings:             # every warning is shown, in full
            echo(f"{'':8} warning: {w.message}")

    echo("== work orders")
    (out / "workorders").mkdir(exist_ok=True)
    demo_workorders(designs, out / "workorders", out / "workorders" / "specgen-register.sqlite", echo, cat=cat)

    echo("== the bench and test station")
    from ..station.demo import DEMO_PASSWORD, demo_station

    users = demo_station(out / "workorders" / "specgen-register.sqlite", designs, cat, out, echo)
    echo(f"  try: specgen serve --register {out / 'workorders' / 'specgen-register.sqlite'} --users {users} "
         f"--parts {Path(demo_specs()[0]).parent}  (users wren, tamsin, ellis; password {DEMO_PASSWORD})")

    echo("== quotes")
    (out / "quotes").mkdir(exist_ok=True)
    demo_quotes(designs, cat, out / "quotes", echo)

    echo("== change summary")
    (out / "changes").mkdir(exist_ok=True)
    demo_change_summary(out / "changes", cat, echo)

    echo("== design search")
    from .. import search as lib

    (out / "search").mkdir(exist_ok=True)
    for req_path in sorted(Path(__file__).resolve().parent.glob("REQ-*.yaml")):
        req = lib.load_requirement(req_path)
        result = lib.search(req, cat, top=5, sort="cost", per_core=2, part=req.part)
        write_atomic(out / "search" / f"{req_path.stem}.txt", lib.result_text(result, cat.shop.currency) + "\n")
        write_atomic(out / "search" / f"{req_path.stem}.json",
                     json.dumps(lib.result_json(result, cat.shop.currency), indent=2, ensure_ascii=False,
                                default=str) + "\n")
        if result.top:
            best, cost = result.top[0].design, result.top[0].cost
            assert best is not None and cost is not None      # the top list holds confirmed candidates only
            echo(f"{req_path.stem:8} best of {len(result.top)}: {best.core.id}, {best.losses.total_w:.2f} W, "
                 f"hot spot {best.hot_spot_c:.0f} °C, material {cat.shop.currency} "
                 f"{cost.quantize(Decimal('0.01'), ROUND_HALF_UP)}")
        else:
            echo(f"{req_path.stem:8} nothing in the catalogue fits (reasons in search/{req_path.stem}.txt)")

    echo("== demo shop")
    shop = demo_shop(out / "shop", cat, designs, echo)
    echo(f"all of it in {out}/; try the commands in {shop}/ (the README's tour)")
    return designs


def demo_workorders(designs, out_dir, register_path=None, echo=print, *, cat=None) -> list:
    """One work order per demo part (``DEMO_LOT_QTY`` pieces, lot DEMO-<part>) into ``out_dir``.

    designs: part -> (spec_path, Spec, Design). The register is ``register_path`` or
    ``specgen-register.sqlite`` in ``out_dir``. ``cat``: the catalogue the designs used (default: the
    shipped one). Returns the Issued records; a part whose design fails is reported and skipped.
    """
    from ..catalog.loader import load_catalog
    from ..documents.workorder import issue_from_design

    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    cat = cat or load_catalog(None)
    reg = Path(register_path) if register_path else out / "specgen-register.sqlite"
    done = []
    notes = []
    for part, (spec_path, spec, design) in sorted(designs.items()):
        try:
            issued = issue_from_design(spec_path, spec, design, cat, qty=DEMO_LOT_QTY, lot=f"DEMO-{part}", out_dir=out,
                                       register_path=reg, draft=spec.status != "released",
                                       warn=lambda m, p=part: notes.append(f"{p}: {m}"))
        except DesignFailed as err:
            echo(f"{part:8} work order refused: {err}")
            continue
        done.append(issued)
        echo(f"{part:8} work order {issued.number}  {issued.pdf}  ({issued.seconds:.1f} s)")
    for n in notes:
        echo(f"  note {n}")
    return done


def demo_quotes(designs: dict, cat, out_dir, echo=print, quantities=DEMO_QUANTITIES) -> dict:
    """Quote every demo part at 100 / 500 / 2500 into ``out_dir``; failed designs are skipped (said so).

    designs: part -> (spec_path, Spec, Design), as ``specgen.demo.run_demo`` builds it.
    Returns part -> Quote for the parts quoted.
    """
    from ..documents.quote_doc import write_quote

    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    quotes = {}
    for part, (_path, spec, d) in designs.items():
        if d.failed:
            echo(f"{part:8} quote skipped: the design has failed checks ({', '.join(c.code for c in d.failed)})")
            continue
        q = build_quote(spec, d, cat, quantities)
        write_quote(q, out)
        quotes[part] = q
        prices = "  ".join(f"{b.quantity:,} pcs {money(b.unit_price)}" for b in q.breaks)
        echo(f"{part:8} quote {q.currency} each: {prices}{'  (budgetary)' if q.budgetary else ''}")
    if quotes:
        echo(f"quotes written to {out}/ (the customer's copy, and an -internal copy with the build-up)")
    return quotes


# ----------------------------------------------------------------------------------------------
# The demo's change summary

def _git(repo: Path, *args: str) -> None:
    env = {k: v for k, v in os.environ.items() if k not in ("GIT_DIR", "GIT_WORK_TREE", "GIT_INDEX_FILE")}
    env.update(LC_ALL="C", GIT_TERMINAL_PROMPT="0", GIT_CONFIG_NOSYSTEM="1",
               GIT_CONFIG_GLOBAL=os.devnull)
    # identity and settings for this throwaway repository only, never the user's config
    cmd = ["git", "-c", "user.name=Brindle Hollow Demo", "-c", "user.email=demo@brindle-hollow.invalid",
           "-c", "commit.gpgsign=false", "-c", "tag.gpgsign=false", "-c", "init.defaultBranch=main",
           *args]
    proc = subprocess.run(cmd, cwd=repo, capture_output=True, env=env, timeout=60)
    if proc.returncode != 0:
        raise RuntimeError(f"git {args[0]} failed in the demo repository: "
                           f"{proc.stderr.decode('utf-8', 'replace').strip()}")


def _add_turns(text: str, winding: str, turns: int) -> str:
    """Insert ``turns: N`` after the ``name:`` line of one winding (a text edit, like a person's)."""
    m = re.search(rf"^(\s*)- name: {re.escape(winding)}[ \t]*(#.*)?\r?\n", text, flags=re.M)
    if m is None:
        raise ValueError(f"winding {winding} not found")
    indent = m.group(1) + "  "
    line = f"{indent}turns: {turns}               # fixed: rev B calculated another count\n"
    return text[:m.end()] + line + text[m.end():]


def _other_turns_that_pass(text: str, winding: str, turns: int, cat: Any, name: str) -> int:
    """The nearest primary turns above ``turns`` whose design passes every check, else the nearest below (the
    outputs' voltages must stay in their bands and the build must fit, so one more turn is not always a part
    the shop can release: the loss scan may already sit at the top of what fits)."""
    from ..api import design_text

    for n in [*range(turns + 1, turns + 40), *range(turns - 1, max(0, turns - 40), -1)]:
        if not design_text(_add_turns(text, winding, n), name, cat).failed:
            return n
    raise ValueError(f"no primary turn count from {max(1, turns - 39)} to {turns + 39} passes")


def demo_change_summary(out_dir, cat, echo=print):
    """Write the demo's change summary of BH-2210 rev B -> rev C into ``out_dir``.

    A throwaway git repository gets BH-2210 as shipped (rev B), then rev C: the next draft, another
    primary turn count fixed with ``turns:``, released with ``specgen.lifecycle.release_spec``. The
    summary compares the two commits. Returns the PDF path,
    or None (with a message) when git is not installed.
    """
    from ..atomic import write_atomic
    from ..diff import compare_refs, load_ref, summary_text
    from ..documents.change_doc import write_change_pdf
    from ..lifecycle import release_spec
    from ..revision import start_next_draft_file

    if shutil.which("git") is None:
        echo("change summary skipped: git is not installed")
        return None
    if cat is None:
        from ..catalog.loader import load_catalog

        cat = load_catalog(None)
    source = next(p for p in demo_specs() if p.name == "BH-2210.yaml")
    out_dir = Path(out_dir)
    out_dir.mkdir(parents=True, exist_ok=True)
    repo = Path(tempfile.mkdtemp(prefix="specgen-demo-git-"))
    try:
        spec_path = repo / source.name
        shutil.copyfile(source, spec_path)
        _git(repo, "init", "-q")
        _git(repo, "add", "--", spec_path.name)
        _git(repo, "commit", "-q", "-m", "BH-2210 rev B as shipped")
        primary = next(w for w in load_ref(str(spec_path), cat).design.windings
                       if w.role == "primary")
        start_next_draft_file(spec_path)                        # revision C, draft
        text = spec_path.read_text(encoding="utf-8")
        turns = _other_turns_that_pass(text, primary.name, primary.turns, cat, str(spec_path))
        spec_path.write_text(_add_turns(text, primary.name, turns), encoding="utf-8")
        why = "lower flux at the top of the bus range" if turns > primary.turns else "less copper in the window"
        release_spec(spec_path, by="T. Vance", date="2026-12-07", cat=cat, note=f"{turns} primary turns: {why}")
        _git(repo, "commit", "-q", "-a", "-m", "BH-2210 rev C")
        summary = compare_refs(f"{spec_path}@HEAD~1", f"{spec_path}@HEAD", cat)
        # the throwaway repository is gone after this: the document names each side by its revision
        summary = dataclasses.replace(
            summary,
            old=dataclasses.replace(summary.old, name=source.name),
            new=dataclasses.replace(summary.new, name=source.name))
        stem = f"{summary.new.part}.change-{summary.old.revision}-{summary.new.revision}"
        pdf = out_dir / f"{stem}.pdf"
        write_change_pdf(summary, pdf, paper=cat.shop.documents.paper)
        write_atomic(out_dir / f"{stem}.txt", summary_text(summary) + "\n")
        echo(f"change summary {summary.new.part} rev {summary.old.revision} -> "
             f"{summary.new.revision}: {len(summary.inputs)} input(s), "
             f"{len(summary.results)} result(s) changed -> {pdf}")
        return pdf
    finally:
        shutil.rmtree(repo, ignore_errors=True)


# ----------------------------------------------------------------------------------------------
# The demo shop: a folder laid out as a shop keeps its parts, for the README's tour

SHOP_GITIGNORE = "orders/\nquotes/\nspecgen-register.sqlite*\n"


def demo_shop(shop_dir, cat, designs: dict, echo=print) -> Path | None:
    """Lay out ``shop_dir`` as a shop keeps its parts, for trying the commands by hand.

    ``catalog/`` (a copy of the catalogue in use), ``parts/`` (the demo parts, committed to git as
    shipped, then BH-2210 released again as revision C with another primary turn count, so that a diff has
    two revisions), ``requirements/`` (the search's requirement files) and ``orders.csv`` (a batch of
    work orders for the released parts, with its header row). The shop's register is created at its
    root by the first work order. An existing shop folder is replaced. Returns the folder, or None
    (with a message) when git is not installed.
    """
    from ..lifecycle import release_spec
    from ..revision import start_next_draft_file

    if shutil.which("git") is None:
        echo("demo shop skipped: git is not installed")
        return None
    shop = Path(shop_dir)
    if shop.exists():
        shutil.rmtree(shop)
    (shop / "parts").mkdir(parents=True)
    (shop / "requirements").mkdir()
    shutil.copytree(Path(cat.root), shop / "catalog",
                    ignore=shutil.ignore_patterns("*.sqlite*", "__pycache__"))
    for path in demo_specs():
        shutil.copyfile(path, shop / "parts" / path.name)
    for req in sorted(Path(__file__).resolve().parent.glob("REQ-*.yaml")):
        shutil.copyfile(req, shop / "requirements" / req.name)
    released = sorted(part for part, (_p, spec, d) in designs.items()
                      if spec.status == "released" and not d.failed and part != "BH-2210")
    rows = ["spec,qty,due,lot"] + [f"parts/{part}.yaml,{50 * (i + 1)},2027-02-{i + 1:02d},LOT-{part}"
                                   for i, part in enumerate(released)]
    write_atomic(shop / "orders.csv", "\n".join(rows) + "\n")
    write_atomic(shop / ".gitignore", SHOP_GITIGNORE)
    _git(shop, "init", "-q")
    _git(shop, "add", "-A")
    _git(shop, "commit", "-q", "-m", "Brindle Hollow parts as released")
    spec_path = shop / "parts" / "BH-2210.yaml"
    primary = next(w for w in designs["BH-2210"][2].windings if w.role == "primary")
    start_next_draft_file(spec_path)
    text = spec_path.read_text(encoding="utf-8")
    turns = _other_turns_that_pass(text, primary.name, primary.turns, cat, str(spec_path))
    spec_path.write_text(_add_turns(text, primary.name, turns), encoding="utf-8")
    why = "lower flux at the top of the bus range" if turns > primary.turns else "less copper in the window"
    release_spec(spec_path, by="T. Vance", date="2026-12-07", cat=cat, note=f"{turns} primary turns: {why}")
    _git(shop, "commit", "-q", "-a", "-m", "BH-2210 rev C")
    echo(f"demo shop in {shop}/: {len(designs)} parts in git, BH-2210 at revision C, "
         f"orders.csv for {len(released)} parts")
    return shop
