"""The command line: thin wrappers over the library (``import specgen`` and the modules it names).

Exit codes: 0 success, 1 a design check failed (or verify found a mismatch), 2 bad input.
A user's mistake is one line on stderr, never a traceback.

``main`` first offers the arguments to the typer-free quick path (``specgen.commands.quick``: the
plain forms of `specgen design`); everything else, help included, goes to the Typer app in
``specgen.commands.root``, imported only then.
"""

from __future__ import annotations

import sys
from typing import Any


def __getattr__(name: str) -> Any:
    """``specgen.cli.app``: the Typer app, built on first use (tests and plugins import it)."""
    if name == "app":
        from .commands.root import app

        return app
    raise AttributeError(name)


def main(argv: list | None = None) -> None:
    """Run the CLI; a usage mistake is one line too (click's own report spans three)."""
    from .commands.quick import run_quick

    args = list(sys.argv[1:] if argv is None else argv)
    code = run_quick(args)
    if code is not None:
        sys.exit(code)
    import click
    import typer

    from .commands._common import pipe_safe_output
    from .commands.root import app
    from .errors import SpecError

    with pipe_safe_output():     # a closed pipe never changes the exit code (see commands/_common.py)
        try:
            code = app(args=argv, standalone_mode=False)
        except click.UsageError as err:
            where = err.ctx.command_path if err.ctx is not None else "specgen"
            typer.echo(f"{where}: {err.format_message()} (see `{where} --help`)", err=True)
            sys.exit(2)
        except click.Abort:
            typer.echo("interrupted", err=True)
            sys.exit(130)
        except click.exceptions.Exit as ex:
            sys.exit(ex.exit_code)
        except SpecError as err:      # raised while parsing options, before a command's guard
            typer.echo(str(err), err=True)
            sys.exit(err.exit_code)
        sys.exit(code if isinstance(code, int) else 0)


if __name__ == "__main__":
    main()
