"""The documents are built from the Design (and a few shop figures) alone, never from the catalogue.

Architecture checks, not engineering ones: an AST walk of every documents module and of the quote's cost
model for an import of ``specgen.catalog`` or a read of a ``cat`` object; a work order rendered in a fresh
interpreter where ``specgen.catalog`` cannot be imported at all, byte-equal to the one rendered with the
catalogue loaded; and the quotes and a change summary priced and rendered where the catalogue cannot be
loaded, byte-equal too.
"""

from __future__ import annotations

import ast
import pickle
import subprocess
import sys
from pathlib import Path

import pytest

import specgen
from specgen import api
from specgen.catalog.loader import load_catalog
from specgen.design.spec import load_spec
from specgen.documents import workorder as wo
from specgen.documents.settings import DocumentSettings

PACKAGE = Path(specgen.__file__).parent
DOCUMENTS = PACKAGE / "documents"
#: Every documents module, and the quote's cost model (the quote and the change summary's costs).
MODULES = [*sorted(DOCUMENTS.glob("*.py")), PACKAGE / "quote.py"]

#: The entry points, which load the catalogue to run the design and the release gate (and, for the
#: quote, read the prices once) before a document is made; these functions (and only these) may read it.
ISSUE_FLOW = {
    "documents/workorder.py": {"preflight", "issue_from_design", "issue_work_order"},
    "documents/batch.py": {"issue_batch"},
    "quote.py": {"build_quote"},
}


def _catalogue_reads(tree: ast.AST, module: str) -> list[str]:
    """'line: what' for every import of specgen.catalog and every use of a name ``cat``."""
    found = []
    for node in ast.walk(tree):
        if isinstance(node, ast.ImportFrom):
            mod = node.module or ""
            if mod == "catalog" or mod.startswith("catalog.") or mod.startswith("specgen.catalog") \
                    or (node.level and mod == "" and any(a.name == "catalog" for a in node.names)):
                found.append(f"{module}:{node.lineno}: from {'.' * node.level}{mod} import ...")
        elif isinstance(node, ast.Import):
            found += [f"{module}:{node.lineno}: import {a.name}" for a in node.names if a.name.startswith("specgen.catalog")]
        elif isinstance(node, ast.Name) and node.id == "cat":
            found.append(f"{module}:{node.lineno}: cat")
        elif isinstance(node, ast.arg) and node.arg == "cat":
            found.append(f"{module}:{node.lineno}: parameter cat")
    return found


def _type_checking_only(node: ast.stmt) -> bool:
    """``if TYPE_CHECKING:``: imports for annotations only, never run, so they read nothing."""
    return isinstance(node, ast.If) and isinstance(node.test, ast.Name) and node.test.id == "TYPE_CHECKING" \
        and not node.orelse


def _without_issue_flow(tree: ast.Module, allowed: set[str]) -> ast.Module:
    body = [n for n in tree.body if not (isinstance(n, ast.FunctionDef) and n.name in allowed)
            and not _type_checking_only(n)]
    return ast.Module(body=body, type_ignores=[])


def _name(path: Path) -> str:
    return path.relative_to(PACKAGE).as_posix()


@pytest.mark.parametrize("path", MODULES, ids=_name)
def test_documents_modules_do_not_read_the_catalogue(path):
    tree = ast.parse(path.read_text(encoding="utf-8"))
    allowed = ISSUE_FLOW.get(_name(path), set())
    assert {n.name for n in tree.body if isinstance(n, ast.FunctionDef)} >= allowed    # the list stays true
    assert _catalogue_reads(_without_issue_flow(tree, allowed), _name(path)) == []


def test_the_walk_finds_a_catalogue_read():
    # the check itself can fail: a document function that looks a tape up is caught
    bad = ast.parse("from ..catalog.loader import load_catalog\ndef f(design, cat):\n    return cat.tapes\n")
    assert len(_catalogue_reads(bad, "x.py")) == 3
    # an annotation-only import is left out, the same import at run time is not
    typed = ast.parse("if TYPE_CHECKING:\n    from .catalog.models import Shop\n"
                      "if RUNTIME:\n    from .catalog.models import Shop\n")
    assert len(_catalogue_reads(_without_issue_flow(typed, set()), "x.py")) == 1


@pytest.fixture(scope="module")
def demo():
    cat = load_catalog(None)
    settings = DocumentSettings.from_shop(cat.shop)
    return [(api.run_design(load_spec(p), cat), settings) for p in api.demo_specs()]


def test_work_orders_render_from_the_design_alone(demo, tmp_path):
    # every demo part's work order, rendered where specgen.catalog cannot be imported, is the same HTML
    kwargs = {"number": "WO-T-1", "qty": 25, "due": "2026-12-24", "lot": "L7", "issued": "2026-12-02"}
    blob = tmp_path / "designs.pickle"
    blob.write_bytes(pickle.dumps(demo))
    script = (
        "import pickle, sys\n"
        "sys.modules['specgen.catalog'] = None          # any import of the catalogue now fails\n"
        "from specgen.documents.workorder import render_work_order_html\n"
        f"items = pickle.loads(open({str(blob)!r}, 'rb').read())\n"
        f"out = [render_work_order_html(d, s, **{kwargs!r}) for d, s in items]\n"
        "assert 'specgen.catalog.loader' not in sys.modules\n"
        f"open({str(tmp_path / 'out.pickle')!r}, 'wb').write(pickle.dumps(out))\n"
    )
    run = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True, timeout=300)
    assert run.returncode == 0, run.stderr[-2000:]
    alone = pickle.loads((tmp_path / "out.pickle").read_bytes())
    assert alone == [wo.render_work_order_html(d, s, **kwargs) for d, s in demo]


def test_the_floor_records_carry_what_the_drawings_need(demo):
    cat = load_catalog(None)
    for d, _settings in demo:
        f = d.floor
        assert [(s.winding, s.index) for s in f.sections] == [(w.name, s.index) for w, s in wo._sections_in_order(d)]
        if d.core.shape == "toroid":
            core = cat.cores[d.core.id]
            assert (f.outline.inner_diameter_m, f.outline.outer_diameter_m) == (core.dims["id"], core.dims["od"])
            assert f.pins.free_leads and f.pins.pitch_m is None
        else:
            b = cat.bobbins[d.core.bobbin]
            assert f.pins.pins == tuple(b.pins) and f.pins.rows == b.pin_rows and not f.pins.free_leads
        for s in f.sections:
            for wrap in (s.between_layers, s.after):
                if wrap is not None:
                    # the build's own rule: a toroid's tape is half-lapped (twice its thickness per wrap)
                    assert wrap.build_m == pytest.approx(cat.tapes[wrap.id].thickness_m * wrap.layers
                                                         * (2.0 if d.core.shape == "toroid" else 1.0), rel=1e-12)


def test_quotes_and_change_summary_render_where_the_catalogue_cannot_be_loaded(tmp_path):
    # the quote priced from the Design, its PriceList and its release verdict, and a change summary,
    # in an interpreter where the catalogue loader cannot be imported: the same HTML as here
    import datetime as dt

    from specgen import diff, quote
    from specgen.documents.change_doc import change_html
    from specgen.documents.quote_doc import render_quote_html
    from specgen.lifecycle import release_gate
    from specgen.prices import price_list

    cat = load_catalog(None)
    issued = dt.date(2026, 12, 2)
    items = []
    for p in api.demo_specs():
        spec = load_spec(p)
        d = api.run_design(spec, cat)
        items.append((spec, d, price_list(cat, d), release_gate(spec, d, cat)))
    demo = Path(specgen.__file__).parent / "demo"
    summary = diff.compare_refs(str(demo / "BH-2210.yaml"), str(demo / "BH-1042.yaml"), cat)
    blob = tmp_path / "inputs.pickle"
    blob.write_bytes(pickle.dumps((items, summary)))
    script = (
        "import datetime, pickle, sys\n"
        "sys.modules['specgen.catalog.loader'] = None   # the catalogue cannot be loaded\n"
        "from specgen.quote import quote_design\n"
        "from specgen.documents.quote_doc import render_quote_html\n"
        "from specgen.documents.change_doc import change_html\n"
        f"items, summary = pickle.loads(open({str(blob)!r}, 'rb').read())\n"
        "out = []\n"
        "for spec, d, prices, verdict in items:\n"
        "    q = quote_design(spec, d, prices, verdict, (10, 500), issued=datetime.date(2026, 12, 2),\n"
        "                     allow_failed=True)\n"
        "    out += [render_quote_html(q), render_quote_html(q, True)]\n"
        "out.append(change_html(summary))\n"
        "assert 'specgen.api' not in sys.modules         # (it imports the loader)\n"
        f"open({str(tmp_path / 'out.pickle')!r}, 'wb').write(pickle.dumps(out))\n"
    )
    run = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True, timeout=300)
    assert run.returncode == 0, run.stderr[-2000:]
    alone = pickle.loads((tmp_path / "out.pickle").read_bytes())
    here = []
    for spec, _d, _prices, _verdict in items:
        q = quote.build_quote(spec, _d, cat, (10, 500), issued=issued, allow_failed=True)
        here += [render_quote_html(q), render_quote_html(q, True)]
    here.append(change_html(summary))
    assert alone == here
    # the summary did compare the costs, priced through the quote's PriceList
    assert summary.cost_note == "" and "unit price at a lot of 100" in alone[-1]
