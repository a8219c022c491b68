"""The few shop figures a document prints, handed to the documents instead of the catalogue."""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any


@dataclass(frozen=True, slots=True)
class DocumentSettings:
    """Shop figures the documents show or obey: the shop's name, the paper, the lead length and wire
    scrap printed on the floor, and where work-order numbers come from."""

    shop_name: str
    paper: str                       # 'A4' | 'Letter' (a key of the catalogue's paper sizes)
    paper_width_m: float
    scrap_wire: float                # fraction of wire added per lot
    lead_length_m: float             # each lead, beyond the pin
    work_order_format: str           # e.g. 'WO-{part}-{seq:04d}'
    register_path: str | None = None
    paper_height_m: float = 0.297    # portrait height (the test record's landscape pages turn it)

    @classmethod
    def from_shop(cls, shop: Any) -> DocumentSettings:
        """From the catalogue's typed ``shop`` record (the only place these are read)."""
        return cls(shop_name=shop.name, paper=shop.documents.paper, paper_width_m=shop.documents.paper_m[0],
                   scrap_wire=float(shop.scrap_wire), lead_length_m=shop.lead_length_m,
                   work_order_format=shop.work_order_format, register_path=shop.register_path,
                   paper_height_m=shop.documents.paper_m[1])
