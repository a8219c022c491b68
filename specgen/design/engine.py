"""``design(spec, catalog) -> Design``: the library's entry to the calculation (``pipeline`` holds it).

The steps themselves are public in ``kernel``, ``resolve``, ``flux``, ``build`` and ``limits``.
"""

from __future__ import annotations

from .pipeline import design

__all__ = ["design"]
