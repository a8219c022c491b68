"""Commands: filled in by the revision_cmds work."""


def register(app) -> None:
    """Add this module's commands to the root Typer app."""
