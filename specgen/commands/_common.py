"""Shared by the command modules: the error guard, pipe-safe output and JSON printing (kept out of
cli.py to avoid cycles).

A closed pipe (``specgen verify *.yaml | head -1``) must not change what a command reports: verify
that found a tampered spec exits 1 whatever happened to its output. So output to a closed stream is
discarded from then on (the stream is pointed at the null device, as the Python documentation on
SIGPIPE advises) and the command runs to its own exit code; a broken pipe is never mapped to one.
"""

from __future__ import annotations

import contextlib
import functools
import io
import json
import os
import re
import sys
from collections.abc import Iterator

import typer
from typer.core import TyperGroup

from ..errors import DesignFailed, SpecError


class WholeHelpGroup(TyperGroup):
    """A command group whose help lists each command with the whole first sentence of its description
    (click's own list cuts it at the terminal width and ends it with '...'); long lines wrap instead."""

    def format_commands(self, ctx, formatter) -> None:
        rows = []
        for name in self.list_commands(ctx):
            cmd = self.get_command(ctx, name)
            if cmd is not None and not cmd.hidden:
                rows.append((name, cmd.get_short_help_str(limit=10_000)))
        if rows:
            with formatter.section("Commands"):
                formatter.write_dl(rows)


class _PipeSafe(io.TextIOBase):
    """A text stream that swallows a broken pipe: later output goes nowhere, the program goes on."""

    def __init__(self, stream):
        super().__init__()
        self._stream = stream
        self.broken = False

    # what click and print() look at
    @property
    def encoding(self):
        return getattr(self._stream, "encoding", "utf-8")

    @property
    def errors(self):
        return getattr(self._stream, "errors", "strict")

    @property
    def buffer(self):
        return self._stream.buffer

    def isatty(self) -> bool:
        try:
            return self._stream.isatty()
        except (ValueError, OSError):
            return False

    def fileno(self) -> int:
        return self._stream.fileno()

    def writable(self) -> bool:
        return True

    def write(self, text: str) -> int:
        if not self.broken:
            try:
                self._stream.write(text)
            except BrokenPipeError:
                self._lose()
        return len(text)

    def flush(self) -> None:
        if not self.broken:
            try:
                self._stream.flush()
            except BrokenPipeError:
                self._lose()

    def _lose(self) -> None:
        self.broken = True
        with contextlib.suppress(OSError, ValueError, AttributeError, io.UnsupportedOperation):
            devnull = os.open(os.devnull, os.O_WRONLY)
            os.dup2(devnull, self._stream.fileno())   # the interpreter's final flush must not fail either
            os.close(devnull)


@contextlib.contextmanager
def pipe_safe_output() -> Iterator[None]:
    """Within the block, stdout and stderr never raise BrokenPipeError (nested use is harmless)."""
    saved = sys.stdout, sys.stderr
    if not isinstance(sys.stdout, _PipeSafe) and sys.stdout is not None:
        sys.stdout = _PipeSafe(sys.stdout)
    if not isinstance(sys.stderr, _PipeSafe) and sys.stderr is not None:
        sys.stderr = _PipeSafe(sys.stderr)
    try:
        yield
    finally:
        with contextlib.suppress(Exception):
            if sys.stdout is not None:
                sys.stdout.flush()
        sys.stdout, sys.stderr = saved


def guarded(fn):
    """Turn our error types into one line and an exit code (2 bad input, 1 failed check)."""

    @functools.wraps(fn)
    def wrapper(*args, **kwargs):
        with pipe_safe_output():
            try:
                return fn(*args, **kwargs)
            except SpecError as err:
                typer.echo(str(err), err=True)
                raise typer.Exit(err.exit_code) from None
            except DesignFailed as err:
                typer.echo(f"refused: {terminal_safe(str(err))}", err=True)
                for ch in err.failed:
                    typer.echo(f"  FAIL {ch.code}: {terminal_safe(ch.message)}", err=True)
                raise typer.Exit(1) from None
            except KeyboardInterrupt:
                typer.echo("interrupted", err=True)
                raise typer.Exit(130) from None

    return wrapper


def terminal_safe(text: str) -> str:
    """``text`` with every character a terminal would act on shown escaped (``\\x1b``) instead."""
    from ..errors import escape_controls

    return escape_controls(text, keep_newlines=True)


def print_json(obj) -> None:
    # json escapes C0 controls itself; C1 controls and bidi overrides are escaped here (still valid JSON)
    text = json.dumps(obj, indent=2, ensure_ascii=False, default=str, allow_nan=False)
    typer.echo(_JSON_UNSAFE.sub(lambda m: f"\\u{ord(m.group()):04x}", text))


_JSON_UNSAFE = re.compile("[\x7f-\x9f\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069]")
