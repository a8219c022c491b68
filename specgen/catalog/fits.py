"""Catalogue cross-check: every bobbin fits the window of each core it lists, one bobbin per core, stack and sections."""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from .models import Bobbin, Core

Fail = Callable[[str, str, str], None]


def check_bobbins(tables: dict[str, dict[str, Any]], fail: Fail) -> None:
    """Report (through ``fail(item_id, key, message)``) a bobbin for an unknown core or a toroid, a second
    bobbin for one core, stack and sections, and a bobbin too big for the window of a core it lists."""
    seen: dict = {}
    for bob in tables["bobbins"].values():
        for core_id in bob.cores:
            key = (core_id, None if bob.stack_m is None else round(bob.stack_m, 6), bob.sections)
            if key in seen:
                stack = "" if bob.stack_m is None else f" at stack {bob.stack_m * 1e3:g} mm"
                fail(bob.id, "cores", f"a second {bob.sections}-section bobbin for core '{core_id}'{stack} (first: "
                                      f"'{seen[key]}'); the design picks one bobbin per core, stack and sections")
                continue
            seen[key] = bob.id
            core = tables["cores"].get(core_id)
            if core is None:
                fail(bob.id, "cores", f"unknown core '{core_id}'")
                continue
            _check_bobbin_fits(bob, core, fail)


def _check_bobbin_fits(bob: Bobbin, core: Core, fail: Fail) -> None:
    """The bobbin fits the window of one of the cores it lists (and, on an EI core, a stocked stack)."""
    from ..physics import geometry

    if core.is_toroid:
        fail(bob.id, "cores", f"'{core.id}' is a toroid; toroids are wound without a bobbin")
        return
    try:
        breadth = geometry.window_breadth_m(core.shape, core.dims)
        height = geometry.window_height_m(core.shape, core.dims)
    except (ValueError, ZeroDivisionError, KeyError) as exc:   # a shape the geometry cannot size
        fail(core.id, "dims", f"cannot size the window: {exc}")
        return
    if bob.breadth_m > breadth + 1e-9:
        fail(bob.id, "breadth", f"winding breadth {bob.breadth_m * 1e3:.2f} mm does not fit the window length "
                                f"{breadth * 1e3:.2f} mm of '{core.id}'")
    if bob.height_m > height + 1e-9:
        fail(bob.id, "height", f"build height {bob.height_m * 1e3:.2f} mm is more than the window depth "
                               f"{height * 1e3:.2f} mm of '{core.id}'")
    if core.shape == "EI" and bob.stack_m is not None and core.stacks_m and \
            not any(abs(bob.stack_m - s) < 1e-6 for s in core.stacks_m):
        fail(bob.id, "stack", f"stack {bob.stack_m * 1e3:g} mm is not one of the stacks stocked for '{core.id}'")
