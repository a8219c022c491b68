"""What the quote needs from the catalogue, read once: the price of each stock item a Design uses, the
shop's typed figures (labour, rates, overhead, margin, terms, letterhead) and the customer's address.

The quote's cost model (``specgen.quote``) prices a Design against a ``PriceList`` and never opens the
catalogue itself; ``price_list`` is the one place the catalogue's prices are read for it. An item the
catalogue does not carry is left out here and refused by the quote when it prices that line, with the
same located message as before.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import field
from decimal import Decimal
from typing import TYPE_CHECKING, Any

from .errors import SpecError
from .records import record

if TYPE_CHECKING:
    from .catalog.models import Catalog, Party, QuoteTerms, Shop

#: The catalogue table that prices each kind of ``Design.materials`` line (clips and other hardware: none).
TABLE_OF_KIND = {"wire": "wires", "core": "cores", "laminations": "cores", "bobbin": "bobbins", "tape": "tapes",
                 "sleeving": "sleevings", "varnish": "varnishes"}


@record(slots=True)
class StockPrice:
    """The catalogue's price of one stock item, with what pricing it needs besides the Design's quantity."""

    table: str                 # wires | cores | bobbins | tapes | sleevings | varnishes
    id: str
    rate: Decimal              # per kg (wire, a core priced by mass), set or piece, m2 (tape), m (sleeving), litre
    per_kg: bool = False       # priced by mass (a wire, or a core whose price unit is kg)
    copper: bool = False       # a wire with a copper conductor (moves with the copper price)
    width_m: float = 0.0       # a tape's width (tape is priced by area)


@record(slots=True)
class PriceList:
    """The prices of the stock items one Design uses, and the shop and customer the quote is made for."""

    shop: Shop                                       # the shop's figures, typed when the catalogue loaded
    terms: QuoteTerms                                # the shop's quote terms (learning, suppliers' breaks)
    items: Mapping[tuple[str, str], StockPrice] = field(default_factory=dict)   # (table, id) -> price
    customer: Party | None = None                    # the customer's address block, when on file

    def price(self, table: str, item_id: str, what: str) -> StockPrice:
        """The price of ``item_id`` in ``table``; a located error when the catalogue carries none."""
        found = self.items.get((table, item_id))
        if found is None:
            raise SpecError(f"the catalogue has no {what} '{item_id}' to price", path=f"{table}.{item_id}")
        return found


def _stock_price(table: str, entry: Any) -> StockPrice:
    if table == "wires":
        return StockPrice(table, entry.id, entry.price_per_kg, per_kg=True, copper=entry.conductor == "copper")
    if table == "cores":
        return StockPrice(table, entry.id, entry.price, per_kg=entry.price_unit == "kg")
    if table == "bobbins":
        return StockPrice(table, entry.id, entry.price)
    if table == "tapes":
        return StockPrice(table, entry.id, entry.price_per_m2, width_m=entry.width_m)
    if table == "sleevings":
        return StockPrice(table, entry.id, entry.price_per_m)
    return StockPrice(table, entry.id, entry.price_per_litre)          # varnishes


def price_list(cat: Catalog, design: Any) -> PriceList:
    """The prices of every stock item on ``design.materials``, the shop's figures and the customer."""
    from .catalog.models import QuoteTerms

    items: dict[tuple[str, str], StockPrice] = {}
    for m in design.materials:
        table = TABLE_OF_KIND.get(m.kind)
        entry = getattr(cat, table).get(m.id) if table else None
        if table and entry is not None:
            items[(table, m.id)] = _stock_price(table, entry)
    shop = cat.shop
    docs = getattr(shop, "documents", None)
    customer = cat.customer(design.customer) if hasattr(cat, "customer") else None
    return PriceList(shop=shop, terms=docs.terms if docs is not None else QuoteTerms(), items=items,
                     customer=customer)
