"""The shop's register of work orders and quotes: one interface, two back ends.

- :class:`Register` (``core.py``): numbering, files, states and corrections, stale numbers, queries.
- ``sqlite.py``: the embedded default (one file, nothing to install or run).
- ``postgres.py``: the same register on a PostgreSQL server (``postgresql://...``), for many seats.
- ``location.py``: where the shop's one register lives (:func:`locate_register`).
- ``schema.py``: the versioned schema both back ends migrate through.

Typical use::

    from specgen.register import Register, locate_register

    where = locate_register(spec_path, shop_setting=cat.shop.register_path, catalog_dir=cat.root)
    with Register.open(where.target) as reg:
        with reg.issuing(part, revision, fingerprint, qty, lot, due) as number:
            ...                                # render the documents under ``number``
        reg.attach_files(number, [pdf, html])

Reading commands open with ``Register.open(target, read_only=True)``: nothing is created or migrated.
"""

from __future__ import annotations

from .core import Register, orders_csv
from .location import (
    ENV_VAR,
    REGISTER_FILENAME,
    RegisterLocation,
    default_register_path,
    locate_register,
    shop_register_setting,
    shop_root,
)
from .model import (
    CSV_COLUMNS,
    DEFAULT_NUMBER_FORMAT,
    DEFAULT_QUOTE_FORMAT,
    QUOTE_STATES,
    QUOTE_TRANSITIONS,
    STALE_UNCHECKABLE_S,
    STATES,
    TRANSITIONS,
    Event,
    Order,
    QuoteEntry,
    StaleNumber,
)
from .schema import APP_NAME, APPLICATION_ID, SCHEMA_VERSION

__all__ = [
    "APPLICATION_ID", "APP_NAME", "CSV_COLUMNS", "DEFAULT_NUMBER_FORMAT", "DEFAULT_QUOTE_FORMAT", "ENV_VAR",
    "QUOTE_STATES", "QUOTE_TRANSITIONS", "REGISTER_FILENAME", "SCHEMA_VERSION", "STALE_UNCHECKABLE_S", "STATES",
    "TRANSITIONS", "Event", "Order", "QuoteEntry", "Register", "RegisterLocation", "StaleNumber",
    "default_register_path", "locate_register", "orders_csv", "shop_register_setting", "shop_root",
]
