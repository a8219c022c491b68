"""Commands: filled in by the search work."""


def register(app) -> None:
    """Add this module's commands to the root Typer app."""
