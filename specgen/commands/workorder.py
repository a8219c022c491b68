"""Commands: filled in by the workorder work."""


def register(app) -> None:
    """Add this module's commands to the root Typer app."""
