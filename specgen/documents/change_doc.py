"""The one-page change summary between two revisions of a part (``specgen diff --pdf``).

Reads a ``specgen.diff.ChangeSummary`` only: every number on it was read from the two Designs,
so it shows the same figures as the work order of each revision. Rendered through
``documents.render`` (autoescaped jinja2, the locked-down WeasyPrint fetcher); WeasyPrint is
imported only when a PDF is written.

``demo_change_summary`` is the demo's example: BH-2210 at revision B, then a revision C with one
more primary turn, committed in a throwaway git repository, compared as FILE@HEAD~1 vs FILE@HEAD.
"""

from __future__ import annotations

import dataclasses
import os
import re
import shutil
import subprocess
import tempfile
from pathlib import Path

#: Table lines that fit below the header of one A4 page at the template's type size. The
#: inputs take full-width lines; the results fill two columns side by side. What does not fit is
#: counted in one line and left to ``specgen diff --json``.
PAGE_LINES = 46
MAX_INPUT_LINES = 12
#: Characters of an input's old or new value that fit on one line (longer ones wrap), and the
#: most shown of one value (the rest is cut with an ellipsis; the JSON has it whole).
VALUE_CHARS = 30
VALUE_MAX = 90
#: Characters of a quantity label that fit on one line of a result column (longer ones wrap).
LABEL_CHARS = 26

SAFETY_NOTE = ("Test voltages are the shop's defaults: the applicable product safety standard, the "
               "customer's drawing, local codes and licensed practice decide.")


def _columns(groups: list, capacity: int, columns: int = 2) -> tuple[list, int]:
    """Lay the result groups into ``columns`` columns of ``capacity`` lines (a group heading is
    a line; a group cut by a column break repeats its heading). Returns (columns, left out)."""
    def lines(row) -> int:
        return 1 + (len(row["quantity"]) - 1) // LABEL_CHARS

    out = [[] for _ in range(columns)]
    col, used, left_out = 0, 0, 0
    for name, rows in groups:
        i = 0
        while i < len(rows):
            if col >= columns:
                left_out += len(rows) - i
                break
            take, need = [], 1                      # the group heading
            while i + len(take) < len(rows) and \
                    used + need + lines(rows[i + len(take)]) <= capacity:
                need += lines(rows[i + len(take)])
                take.append(rows[i + len(take)])
            if not take:
                col, used = col + 1, 0
                continue
            out[col].append({"name": name if i == 0 else f"{name} (continued)", "rows": take})
            used += need
            i += len(take)
    return [c for c in out if c], left_out


def build_context(summary, page_lines: int = PAGE_LINES) -> dict:
    """Plain strings for the template; a long summary is cut to one page with a note."""
    from .. import __version__
    from ..revision import short

    def cut(text: str) -> str:
        return text if len(text) <= VALUE_MAX else text[:VALUE_MAX - 1].rstrip() + "\u2026"

    inputs = [{"key": c.key, "old": cut(c.old_text), "new": cut(c.new_text)}
              for c in summary.inputs]
    shown_inputs, input_lines = [], 0
    for row in inputs:
        n = 1 + (max(len(row["old"]), len(row["new"]), 1) - 1) // VALUE_CHARS
        if input_lines + n > MAX_INPUT_LINES:
            break
        shown_inputs.append(row)
        input_lines += n
    # the two section headings, the column headings and the notes take about six lines
    capacity = max(8, page_lines - max(1, input_lines) - 6)
    groups = [(g, [{"quantity": r.quantity, "old": r.old_text, "new": r.new_text} for r in rows])
              for g, rows in summary.groups()]
    columns, left_out = _columns(groups, capacity)

    def side(s) -> dict:
        return {"name": s.name, "revision": s.revision, "status": s.status,
                "fingerprint": s.fingerprint, "short": short(s.fingerprint),
                "release": s.release_text, "release_ok": s.release_ok,
                "problems": list(s.release_problems)}

    hipot = any(r.quantity.startswith("hipot") for r in summary.results)
    return {
        "part": summary.part, "title": summary.new.title, "old": side(summary.old),
        "new": side(summary.new), "inputs": shown_inputs,
        "left_out_inputs": len(inputs) - len(shown_inputs),
        "columns": columns, "left_out_results": left_out, "n_results": len(summary.results),
        "unchanged": summary.unchanged, "cost_note": summary.cost_note,
        "catalog": summary.catalog, "version": __version__,
        "safety_note": SAFETY_NOTE if hipot else "",
    }


def change_html(summary) -> str:
    from .render import render_html

    return render_html("change.html", **build_context(summary))


def write_change_pdf(summary, pdf_path, html_path=None, blocked: list | None = None) -> list:
    """Render the change summary and write the PDF (and the HTML if asked), atomically."""
    from .render import write_pdf_and_html

    return write_pdf_and_html(change_html(summary), pdf_path, html_path, blocked)


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
    line = f"{indent}turns: {turns}               # fixed: one more turn than rev B calculated\n"
    return text[:m.end()] + line + text[m.end():]


def demo_change_summary(out_dir, cat, echo=print):
    """Write the demo's change summary of BH-2210 rev B -> rev C into ``out_dir``.

    A throwaway git repository gets BH-2210 as shipped (rev B), then rev C: the next draft, one
    more primary turn fixed with ``turns:``, released with ``specgen.lifecycle.release_spec``. The
    summary compares ``BH-2210.yaml@HEAD~1`` with ``BH-2210.yaml@HEAD``. Returns the PDF path,
    or None (with a message) when git is not installed.
    """
    from ..api import demo_specs
    from ..atomic import write_atomic
    from ..diff import compare_refs, load_ref, summary_text
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
        spec_path.write_text(_add_turns(spec_path.read_text(encoding="utf-8"), primary.name,
                                        primary.turns + 1), encoding="utf-8")
        release_spec(spec_path, by="T. Vance", date="2026-12-07", cat=cat,
                     note=f"{primary.turns + 1} primary turns: lower flux at the top of the bus range")
        _git(repo, "commit", "-q", "-a", "-m", "BH-2210 rev C")
        summary = compare_refs(f"{spec_path}@HEAD~1", f"{spec_path}@HEAD", cat)
        summary = dataclasses.replace(
            summary,
            old=dataclasses.replace(summary.old, name=f"{source.name}@HEAD~1"),
            new=dataclasses.replace(summary.new, name=f"{source.name}@HEAD"))
        stem = f"{summary.new.part}.change-{summary.old.revision}-{summary.new.revision}"
        pdf = out_dir / f"{stem}.pdf"
        write_change_pdf(summary, pdf)
        write_atomic(out_dir / f"{stem}.txt", summary_text(summary) + "\n")
        echo(f"change summary {summary.new.part} rev {summary.old.revision} -> "
             f"{summary.new.revision}: {len(summary.inputs)} input(s), "
             f"{len(summary.results)} result(s) changed -> {pdf}")
        return pdf
    finally:
        shutil.rmtree(repo, ignore_errors=True)
