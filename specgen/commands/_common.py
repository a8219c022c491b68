"""Shared by the command modules: the error guard and JSON printing (kept out of cli.py to avoid cycles)."""

from __future__ import annotations

import functools
import json

import typer

from ..errors import DesignFailed, SpecError


def guarded(fn):
    """Turn our error types into one line and an exit code (2 bad input, 1 failed check)."""

    @functools.wraps(fn)
    def wrapper(*args, **kwargs):
        try:
            return fn(*args, **kwargs)
        except SpecError as err:
            typer.echo(str(err), err=True)
            raise typer.Exit(2) from None
        except DesignFailed as err:
            typer.echo(f"refused: {err}", err=True)
            for ch in err.failed:
                typer.echo(f"  FAIL {ch.code}: {ch.message}", err=True)
            raise typer.Exit(1) from None
        except KeyboardInterrupt:
            typer.echo("interrupted", err=True)
            raise typer.Exit(130) from None
        except BrokenPipeError:
            raise typer.Exit(0) from None

    return wrapper


def print_json(obj) -> None:
    typer.echo(json.dumps(obj, indent=2, ensure_ascii=False, default=str))
