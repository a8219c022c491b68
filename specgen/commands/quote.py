"""Commands: filled in by the quote work."""


def register(app) -> None:
    """Add this module's commands to the root Typer app."""
