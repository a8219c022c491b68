"""The library's front door: load a spec and the catalogue, run the design, fingerprint it.

The CLI and every document call these; nothing here formats or prints.
"""

from __future__ import annotations

import os
from dataclasses import replace
from pathlib import Path
from typing import Any

from .catalog.loader import load_catalog
from .catalog.models import Catalog
from .design.result import Design
from .design.spec import Spec, load_spec, load_spec_text
from .errors import SpecError

#: The shop figures the design reads: they change the part (turns, wire, build, test limits and
#: voltages). Everything else in shop.yaml (name, currency, rates, profit margin, labor times, number
#: format, the register's location, ``source``) changes the paperwork or the price, not the part.
#: A shop figure the design starts reading must be added here (tests/test_register_location.py
#: checks every ``shop.<figure>`` the design package reads against this list).
DESIGN_SHOP_KEYS = ("current_density", "bulge_factor", "lead_length", "flux_limit_fraction", "powder_saturation_fraction",
                    "cooling", "hotspot_margin",
                    "hipot", "insulation_resistance", "tolerances", "insulation", "voltage_tolerance")


def _is_paperwork_key(key: object) -> bool:
    """Catalogue keys that describe where a figure came from or what it costs, not the part."""
    name = str(key).strip()
    return name == "source" or name == "price" or name.startswith("price_")


def _part_content(value: Any) -> Any:
    """``value`` without paperwork keys, at any depth (a material's loss figures carry their own ``source``)."""
    if isinstance(value, dict):
        return {k: _part_content(v) for k, v in value.items() if not _is_paperwork_key(k)}
    if isinstance(value, list):
        return [_part_content(v) for v in value]
    return value


def catalog_entries(design_ids, cat: Catalog) -> dict:
    """What of the catalogue a design's fingerprint covers: each catalogue entry the design read,
    without its ``source`` text and prices, and the shop figures in ``DESIGN_SHOP_KEYS``.

    So a price change, a re-worded source, renaming the shop or naming its register changes no
    released part's fingerprint; a changed wire diameter, core dimension, current density,
    tolerance or hipot rule does (see ``specgen.revision.fingerprint``).
    """
    out = {}
    for item_id in design_ids:
        found = cat.find(item_id)
        if found is not None:
            out[item_id] = _part_content(found[1].raw)
    raw_shop = cat.shop.raw if isinstance(cat.shop.raw, dict) else {}
    out["shop"] = _part_content({k: v for k, v in raw_shop.items() if k in DESIGN_SHOP_KEYS})
    return out


def run_design(spec: Spec, cat: Catalog) -> Design:
    """design() plus the content fingerprint of the spec and the catalogue entries it used."""
    from .design.engine import design
    from .revision import fingerprint

    d = design(spec, cat)
    try:
        fp = fingerprint(spec.data, catalog_entries(d.catalog_ids, cat))
    except SpecError as err:      # name the file: the fingerprint rules see only the parsed data
        if err.file:
            raise
        raise SpecError(err.message, file=str(spec.file), line=err.line, path=err.path) from None
    return replace(d, fingerprint=fp)


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
