"""The library's front door: load a spec and the catalogue, run the design, fingerprint it.

The CLI and every document call these; nothing here formats or prints.
"""

from __future__ import annotations

import os
from dataclasses import replace
from pathlib import Path

from .catalog.loader import load_catalog
from .catalog.models import Catalog
from .design.result import Design
from .design.spec import Spec, load_spec, load_spec_text


def catalog_entries(design_ids, cat: Catalog) -> dict:
    """Raw YAML content of every catalogue entry a design read, plus the shop figures."""
    out = {}
    for item_id in design_ids:
        found = cat.find(item_id)
        if found is not None:
            out[item_id] = found[1].raw
    out["shop"] = cat.shop.raw
    return out


def run_design(spec: Spec, cat: Catalog) -> Design:
    """design() plus the content fingerprint of the spec and the catalogue entries it used."""
    from .design.engine import design
    from .revision import fingerprint

    d = design(spec, cat)
    return replace(d, fingerprint=fingerprint(spec.data, catalog_entries(d.catalog_ids, cat)))


def design_file(path: str | os.PathLike, catalog_dir: str | os.PathLike | None = None,
                cat: Catalog | None = None) -> Design:
    cat = cat or load_catalog(catalog_dir)
    return run_design(load_spec(path), cat)


def design_text(text: str, name: str, cat: Catalog) -> Design:
    return run_design(load_spec_text(text, name), cat)


def demo_specs() -> list[Path]:
    """The shipped demo parts, in part-number order."""
    here = Path(__file__).resolve().parent / "demo"
    return sorted(here.glob("BH-*.yaml"))
