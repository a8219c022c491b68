"""specgen: one YAML spec per wound part + the shop's catalogue -> a trusted design -> shop documents.

The library face: what a script needs, each function a thin door into the module that does the
work. Nothing heavy is imported until a function is called, so ``import specgen`` stays cheap
(no numpy, no pint, no WeasyPrint)::

    import specgen

    cat = specgen.load_catalog()                        # the shipped demo shop, or a folder
    spec = specgen.load_spec("BH-1042.yaml")
    d = specgen.run_design(spec, cat)                   # every derived number and check
    q = specgen.build_quote(spec, d, cat, [100, 500])   # Decimal prices per quantity break
    s = specgen.compare_revisions("BH-1042.yaml@HEAD~1", "BH-1042.yaml", cat)

The names are verbs so that they never collide with the subpackages (``specgen.design``,
``specgen.search``, ``specgen.diff``, ...), which a later import would put in their place.

Errors: a user's mistake raises ``specgen.errors.SpecError`` (file, line, key path); a document
refused because a design check fails raises ``specgen.errors.DesignFailed``.
"""

from __future__ import annotations

import os
from collections.abc import Iterable
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:
    from .catalog.models import Catalog
    from .design.result import Design
    from .design.spec import Spec
    from .diff import ChangeSummary
    from .documents.workorder import Issued
    from .lifecycle import ReleaseResult, ReleaseVerdict, VerifyResult
    from .quote import Quote
    from .register import Register

__version__ = "0.1.0"

PathLike = str | os.PathLike


def load_spec(path: PathLike) -> Spec:
    """Read and parse one spec file (every mistake a located ``SpecError``)."""
    from .design.spec import load_spec as _load

    return _load(path)


def load_catalog(folder: PathLike | None = None) -> Catalog:
    """The catalogue in ``folder`` (default: ``$SPECGEN_CATALOG``, else the shipped demo shop)."""
    from .catalog.loader import load_catalog as _load

    return _load(folder)


def run_design(spec: Spec | PathLike, catalog: Catalog | PathLike | None = None) -> Design:
    """Run the whole calculation for one part and fingerprint it (``spec``: a Spec or a path)."""
    from .api import run_design as _run
    from .catalog.models import Catalog as _Catalog

    cat = catalog if isinstance(catalog, _Catalog) else load_catalog(catalog)
    return _run(spec if not isinstance(spec, (str, os.PathLike)) else load_spec(spec), cat)


def release_gate(spec: Spec, design: Design, catalog: Catalog) -> ReleaseVerdict:
    """Whether firm documents may be made from ``spec`` (``specgen.lifecycle.release_gate``)."""
    from .lifecycle import release_gate as _gate

    return _gate(spec, design, catalog)


def issue_work_order(spec_path: PathLike, *, qty: int, due: str | None = None, lot: str | None = None,
               out_dir: PathLike = ".", draft: bool = False, register_path: PathLike | None = None,
               catalog_dir: PathLike | None = None, by: str | None = None) -> Issued:
    """Issue one work order (PDF + HTML, numbered in the register); refused unless released."""
    from .documents.workorder import issue_work_order as _issue

    return _issue(spec_path, qty=qty, due=due, lot=lot, out_dir=out_dir, draft=draft,
                            register_path=register_path, catalog_dir=catalog_dir, by=by)


def build_quote(spec: Spec, design: Design, catalog: Catalog, quantities: Iterable[int], **options: Any) -> Quote:
    """The quote for one part at each quantity break (``specgen.quote.build_quote`` options)."""
    from .quote import build_quote as _build

    return _build(spec, design, catalog, quantities, **options)


def search_designs(requirement: Any, catalog: Catalog | None = None, **options: Any) -> Any:
    """Which stocked cores and wires can do a job: ``requirement`` is a requirement file or a
    parsed ``Requirement`` (``specgen.search.search`` options: top, sort, per_core, part)."""
    from . import search as _search

    req = _search.load_requirement(os.fspath(requirement)) if isinstance(requirement, (str, os.PathLike)) else requirement
    return _search.search(req, catalog if catalog is not None else load_catalog(), **options)


def compare_revisions(old: str, new: str, catalog: Catalog | None = None, *, lot: int = 100) -> ChangeSummary:
    """The change summary of two revisions, each a path or ``PATH@GITREV``."""
    from .diff import compare_refs

    return compare_refs(old, new, catalog if catalog is not None else load_catalog(), lot=lot)


def release_spec(path: PathLike, *, by: str, note: str, catalog: Catalog | None = None, date: Any = None,
                 commit: bool = False, accept: Any = None, accept_all: bool = False, reason: str | None = None,
                 effective: str | None = None, register_path: str | None = None) -> ReleaseResult:
    """Release a spec file (``specgen.lifecycle.release_spec``): design warnings accepted by check code
    (``accept``, or ``accept_all`` with a ``reason``), ``effective`` over the revision it supersedes."""
    from .lifecycle import release_spec as _release

    return _release(path, by=by, note=note, cat=catalog if catalog is not None else load_catalog(),
                    date=date, commit=commit, accept=accept, accept_all=accept_all, reason=reason,
                    effective=effective, register_path=register_path)


def verify_spec(path: PathLike, catalog: Catalog | None = None) -> VerifyResult:
    """Check one released spec against its recorded fingerprint (``specgen.lifecycle.verify_file``)."""
    from .lifecycle import verify_file

    return verify_file(path, catalog if catalog is not None else load_catalog())


def open_register(path: PathLike, *, create: bool = True) -> Register:
    """Open the work-order register at ``path`` (use it as a context manager)."""
    from .register import Register as _Register

    return _Register.open(path, create=create)


__all__ = ["__version__", "load_spec", "load_catalog", "run_design", "release_gate", "issue_work_order",
           "build_quote", "search_designs", "compare_revisions", "release_spec", "verify_spec", "open_register"]
