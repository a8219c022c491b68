"""The quick path: the plain forms of `specgen design` without typer or click (~100 ms saved a run).

``run_quick(args)`` answers ``design SPEC [--catalog DIR] [--json]`` (options in any order,
``--catalog=DIR`` too) and returns the exit code; anything else (help, another command, an option
it does not know) returns None and the Typer app takes it, so help and usage errors stay in one
place. ``design_output`` is what the design command prints, shared by both paths.
"""

from __future__ import annotations

import os
import sys
from typing import Any


def design_output(spec: Any, catalog: Any, as_json: bool) -> tuple[str, bool]:
    """(text to print, whether a check failed) for `specgen design`."""
    from .. import run_design

    d = run_design(spec, catalog)
    if as_json:
        import json

        return json.dumps(d.to_dict(), indent=2, ensure_ascii=False, default=str, allow_nan=False), bool(d.failed)
    from ..report import design_report

    return design_report(d), bool(d.failed)


def _design_args(args: list[str]) -> tuple[str, str | None, bool] | None:
    spec: str | None = None
    catalog = os.environ.get("SPECGEN_CATALOG") or None
    as_json = False
    i = 0
    while i < len(args):
        a = args[i]
        if a == "--json":
            as_json = True
        elif a == "--catalog" and i + 1 < len(args):
            catalog = args[i + 1]
            i += 1
        elif a.startswith("--catalog="):
            catalog = a.split("=", 1)[1]
        elif a.startswith("-") or spec is not None:
            return None             # help, a typo, a second SPEC: the full parser says what is wrong
        else:
            spec = a
        i += 1
    return None if spec is None else (spec, catalog, as_json)


def run_quick(args: list[str]) -> int | None:
    """The exit code of a quick command, or None when the full CLI must take the arguments."""
    if not args or args[0] != "design":
        return None
    parsed = _design_args(args[1:])
    if parsed is None:
        return None
    from ..errors import SpecError

    spec, catalog, as_json = parsed
    try:
        text, failed = design_output(spec, catalog, as_json)
    except SpecError as err:
        sys.stderr.write(f"{err}\n")
        return err.exit_code
    except KeyboardInterrupt:
        sys.stderr.write("interrupted\n")
        return 130
    try:
        sys.stdout.write(text + "\n")
        sys.stdout.flush()
    except BrokenPipeError:
        # the reader went away (`| head`): the rest goes to the null device so Python's exit flush cannot
        # fail, and the exit code stays what the design says (a failed check is 1 whoever reads it)
        try:
            devnull = os.open(os.devnull, os.O_WRONLY)
            os.dup2(devnull, sys.stdout.fileno())
            os.close(devnull)
        except (OSError, ValueError):
            pass
    return 1 if failed else 0
