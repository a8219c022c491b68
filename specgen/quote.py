"""The quote's cost model: pure functions over a Design and a ``PriceList`` (prices and shop figures).

Everything here reads the ``Design`` (lengths, masses, turns, layers) and the catalogue's prices as
``specgen.prices.price_list`` read them once; nothing here opens the catalogue (only ``build_quote``, the
entry point, hands it to ``price_list`` and the release gate) and nothing recomputes physics, so the
quote prices exactly what the work order builds. Money is ``Decimal``
throughout. Floats from the Design enter as ``Decimal(repr(x))`` (the shortest decimal that reads
back as the same float) and nothing is rounded until the unit price.

Material per unit (one line per ``Design.materials`` entry)
    wire          mass_kg x price_per_kg x (1 + shop.scrap_wire). The Design's mass is the
                  conductor's; the enamel or serving adds a percent or two that the catalogue price
                  per kg is taken to cover (common practice: magnet wire is sold by weight).
    laminations   price_unit "kg": mass_kg x price; price_unit "set": Design.core.count x price.
    core          price_unit "kg": mass_kg x price; else sets x price per set.
    bobbin        pieces x price.
    clip          the catalogue carries no price for clips: priced at 0 and flagged on the line
                  (add a price to the catalogue to charge for them). No price is invented here.
    tape          length_m x width_m x price_per_m2.
    sleeving      length_m x price_per_m.
    varnish       litres x price_per_litre.
    anything else priced at 0 and flagged, for the same reason as clips.

Labor per unit (seconds, from ``shop.labor``: typed and range-checked when the catalogue loads)
    winding       each section: turns x 60 / turns_per_minute x factor, where turns_per_minute is
                  toroid_turns_per_minute on a toroid (shuttle winder) else bobbin_turns_per_minute,
                  and factor multiplies fine_wire_factor (overall diameter below fine_wire_below),
                  heavy_wire_factor (overall diameter above heavy_wire_above; foil and strip when their
                  thickness is above it: a 0.05 mm foil screen is one easy turn, not heavy wire)
                  and litz_factor (Litz). Strands in hand are laid together: the same turns time.
    per winding   per_winding for each section (each section is a separate pass: lead in, lead out).
    taping        per_layer_tape per wrap: (layers - 1) x the section's layer-tape wraps (from the Design) inside each
                  section, plus the section's tape_after_layers (winding insulation or outer wrap).
    terminations  per_termination x (sections + 1) per winding: start, finish and each tie pin;
                  strands in hand on one pin count once.
    assembly      core_assembly x core sets, plus per_lamination x 2 x lamination pairs (E and I
                  are stacked piece by piece). A toroid is wound on its core: no assembly line.
    impregnation  impregnation, when the Design lists a varnish.
    test          test, every unit.
    setup         shop.setup_time per lot, divided by the lot quantity.
    learning      the run time above is the settled time per unit; a lot of N averages
                  learning_factor(N) times it (shop.quote_terms.learning; see that function).
    labor cost    seconds / 3600 x shop.labor_rate.

Lot size (shop.quote_terms.price_breaks)
    a material line whose lot buys at least a supplier's break of that stock item gets the break's
    discount: by mass for wire and per-kg laminations or cores (the lot's kg including the scrap
    allowance), by count for cores and bobbins priced per piece or set. Tape, sleeving and varnish
    are bought in bulk whatever the lot: no break.

Price (common practice in custom-magnetics quoting; the conventions chosen here)
    overhead      shop.overhead x direct labor (a labor burden: benches, oven, test station),
                  not applied to material.
    cost          material + labor + overhead, per unit at the lot quantity.
    unit price    cost / (1 - shop.profit_margin): the profit margin is a fraction of the selling price (gross
                  margin), so a 22 % profit margin means 22 % of what the customer pays is profit.
    rounding      the unit price to the cent, ROUND_HALF_UP, once; the extended price is that
                  rounded unit price x quantity (so the customer's arithmetic checks). NRE/tooling
                  is a separate one-time line, rounded the same way, never amortised into the unit.
    copper        sensitivity: the unit price with every copper wire's price per kg x 0.8 and
                  x 1.2 (only the wire lines whose conductor is copper move; Litz and
                  triple-insulated copper wire move with their whole price per kg).

Release
    a design with a failed check is not quoted (``DesignFailed``, exit 1), like a work order:
    sales must not promise a part the shop floor will refuse to build. An obsolete revision is a
    user's mistake (``SpecError``), and so is a revision marked released that the release gate
    (``specgen.lifecycle.release_gate``) refuses: edited after release, a catalogue entry changed
    under it, or no recorded fingerprint (release a new revision first). A draft is quoted as
    *budgetary* with the reason on the quote: a price to plan with, firm only once it is released.
"""

from __future__ import annotations

import datetime as _dt
import math
from collections.abc import Iterable
from dataclasses import dataclass, field
from decimal import ROUND_HALF_UP, Decimal, InvalidOperation
from typing import TYPE_CHECKING, Any

from .errors import DesignFailed, SpecError

if TYPE_CHECKING:
    from .catalog.models import LaborFigures
    from .lifecycle import ReleaseVerdict
    from .prices import PriceList

CENT = Decimal("0.01")
COPPER_LOW = Decimal("0.8")
COPPER_HIGH = Decimal("1.2")
MAX_BREAKS = 12
MAX_QUANTITY = 10_000_000
_SIXTY = Decimal(60)
_HOUR = Decimal(3600)


def dec(x: float | int | Decimal) -> Decimal:
    """A Design float as Decimal via its shortest round-trip text (never the binary expansion)."""
    if isinstance(x, Decimal):
        return x
    if isinstance(x, bool):
        raise TypeError("a boolean is not an amount")
    return Decimal(repr(x)) if isinstance(x, float) else Decimal(int(x))


def plain(x: Decimal) -> str:
    """A Decimal without trailing zeros or exponent: 90.0 -> '90', 0.80 -> '0.8'."""
    text = f"{x.normalize():f}"
    return text


def count(n: int, one: str, many: str | None = None) -> str:
    """'1 core set', '2 core sets', '3 winding passes': a count with its noun in the right number."""
    return f"{n:,} {one if n == 1 else (many or one + 's')}"


def cents(amount: Decimal) -> Decimal:
    """To the cent, half up (the quote's one rounding rule)."""
    return amount.quantize(CENT, rounding=ROUND_HALF_UP)


# ------------------------------------------------------------------------------------------------ time model

def time_model(shop) -> LaborFigures:
    """The quote's time model: ``shop.labor``, already parsed and checked by the catalogue loader."""
    return shop.labor


# ------------------------------------------------------------------------------------------------ materials

@dataclass(frozen=True)
class CostLine:
    """One material line per unit: quantity x rate = amount (unrounded)."""

    kind: str
    id: str
    description: str
    quantity: Decimal
    unit: str                 # what quantity counts: kg, m, m2, l, pcs, sets
    rate: Decimal             # price per `unit` (wire: per kg including the scrap allowance)
    amount: Decimal
    copper: bool = False      # a copper wire line (moves with the copper price)
    note: str = ""


def material_lines(design, prices: PriceList, copper_factor: Decimal = Decimal(1)) -> list[CostLine]:
    """Price every ``Design.materials`` line per unit (see the module docstring for each rule)."""
    shop = prices.shop
    scrap = Decimal(1) + shop.scrap_wire
    out: list[CostLine] = []
    for m in design.materials:
        kind = m.kind
        qty = dec(m.quantity)
        if kind == "wire":
            w = prices.price("wires", m.id, "wire")
            if m.mass_kg is None:
                raise SpecError(f"the design gives no mass for wire '{m.id}'", path="materials")
            copper = w.copper
            price = w.rate * (copper_factor if copper else Decimal(1))
            rate = price * scrap
            mass = dec(m.mass_kg)
            out.append(CostLine(kind, m.id, m.description, mass, "kg", rate, mass * rate, copper,
                                f"{qty.quantize(Decimal('0.01'))} m; {plain(shop.scrap_wire * 100)} % scrap allowance"))
        elif kind in ("laminations", "core"):
            c = prices.price("cores", m.id, "core")
            if c.per_kg:
                if m.mass_kg is None:
                    raise SpecError(f"core '{m.id}' is priced per kg but the design gives no mass",
                                    path="materials")
                mass = dec(m.mass_kg)
                out.append(CostLine(kind, m.id, m.description, mass, "kg", c.rate, mass * c.rate,
                                    note=f"{m.quantity:g} {m.unit}" if kind == "laminations" else ""))
            else:
                sets = Decimal(design.core.count) if kind == "laminations" else qty
                out.append(CostLine(kind, m.id, m.description, sets, "sets", c.rate, sets * c.rate))
        elif kind == "bobbin":
            b = prices.price("bobbins", m.id, "bobbin")
            out.append(CostLine(kind, m.id, m.description, qty, "pcs", b.rate, qty * b.rate))
        elif kind == "tape":
            t = prices.price("tapes", m.id, "tape")
            area = qty * dec(t.width_m)
            out.append(CostLine(kind, m.id, m.description, area, "m2", t.rate, area * t.rate,
                                note=f"{qty.quantize(Decimal('0.01'))} m x {t.width_m * 1e3:g} mm"))
        elif kind == "sleeving":
            s = prices.price("sleevings", m.id, "sleeving")
            out.append(CostLine(kind, m.id, m.description, qty, "m", s.rate, qty * s.rate))
        elif kind == "varnish":
            v = prices.price("varnishes", m.id, "varnish")
            out.append(CostLine(kind, m.id, m.description, qty, "l", v.rate, qty * v.rate))
        else:   # clips and any hardware the catalogue has no price for: shown, not invented
            out.append(CostLine(kind, m.id, m.description, qty, m.unit, Decimal(0), Decimal(0),
                                note="no catalogue price: not charged"))
    return out


def material_total(lines: Iterable[CostLine]) -> Decimal:
    return sum((line.amount for line in lines), Decimal(0))


def copper_total(lines: Iterable[CostLine]) -> Decimal:
    return sum((line.amount for line in lines if line.copper), Decimal(0))


# ------------------------------------------------------------------------------------------------ labor

@dataclass(frozen=True)
class TimeLine:
    """One labor operation per unit, in seconds (Decimal)."""

    operation: str            # winding | per winding | taping | terminations | assembly | impregnation | test
    item: str                 # winding name, core id, or ''
    detail: str
    seconds: Decimal


def wire_factor(wire_kind: str, overall_diameter_m: float, model: LaborFigures) -> tuple[Decimal, list[str]]:
    """Slow-down factor of one wire on the winder and the reasons (fine, heavy, Litz)."""
    factor = Decimal(1)
    why = []
    flat = wire_kind in ("foil", "strip")      # overall_diameter_m is then the thickness
    if overall_diameter_m > model.heavy_wire_above_m:
        factor *= model.heavy_wire_factor
        why.append("heavy")
    elif overall_diameter_m < model.fine_wire_below_m and not flat:
        factor *= model.fine_wire_factor
        why.append("fine")
    if wire_kind == "litz":
        factor *= model.litz_factor
        why.append("Litz")
    return factor, why


def labor_lines(design, model: LaborFigures) -> list[TimeLine]:
    """Run time per unit (no setup), one line per operation; see the module docstring."""
    toroid = design.core.shape == "toroid"
    tpm = model.toroid_turns_per_minute if toroid else model.bobbin_turns_per_minute
    machine = "toroid winder" if toroid else "bobbin winder"
    out: list[TimeLine] = []
    for w in design.windings:
        factor, why = wire_factor(w.wire_kind, w.overall_diameter_m, model)
        turns = sum(s.turns for s in w.sections)
        seconds = Decimal(turns) * _SIXTY / tpm * factor
        detail = f"{turns} turns at {plain(tpm)}/min ({machine})"
        if why:
            detail += f" x {plain(factor)} ({', '.join(why)})"
        out.append(TimeLine("winding", w.name, detail, seconds))
    passes = sum(len(w.sections) for w in design.windings)
    out.append(TimeLine("per winding", "", f"{count(passes, 'winding pass', 'winding passes')} x "
                        f"{plain(model.per_winding_s)} s", passes * model.per_winding_s))
    wraps = 0
    for w in design.windings:
        for s in w.sections:
            wraps += max(len(s.layers) - 1, 0) * s.layer_tape_layers + (s.tape_after_layers if s.tape_after else 0)
    out.append(TimeLine("taping", "", f"{count(wraps, 'tape wrap')} x {plain(model.per_layer_tape_s)} s",
                        wraps * model.per_layer_tape_s))
    terms = sum(len(w.sections) + 1 for w in design.windings)
    out.append(TimeLine("terminations", "", f"{count(terms, 'termination')} x {plain(model.per_termination_s)} s",
                        terms * model.per_termination_s))
    if not toroid:                      # a toroid is wound on its core: nothing to assemble
        sets = design.core.count
        pieces = 2 * (design.core.laminations or 0)
        assembly = sets * model.core_assembly_s + pieces * model.per_lamination_s
        detail = f"{count(sets, 'core set')} x {plain(model.core_assembly_s)} s"
        if pieces:
            detail += f" + {count(pieces, 'lamination piece')} x {plain(model.per_lamination_s)} s"
        out.append(TimeLine("assembly", design.core.id, detail, assembly))
    if any(m.kind == "varnish" for m in design.materials):
        out.append(TimeLine("impregnation", "", "dip and bake", model.impregnation_s))
    out.append(TimeLine("test", "", "final test", model.test_s))
    return out


def run_seconds(lines: Iterable[TimeLine]) -> Decimal:
    return sum((line.seconds for line in lines), Decimal(0))


# ------------------------------------------------------------------------------------------------ price

@dataclass(frozen=True)
class PriceBreak:
    quantity: int
    material: Decimal          # per unit, unrounded
    labor: Decimal             # per unit incl. the setup share, unrounded
    setup: Decimal             # the setup share within labor
    overhead: Decimal
    cost: Decimal
    unit_price: Decimal        # rounded to the cent
    extended: Decimal          # unit_price x quantity
    unit_price_copper_low: Decimal     # copper price x 0.8
    unit_price_copper_high: Decimal    # copper price x 1.2
    learning: Decimal = Decimal(1)     # the lot's mean run time / the settled run time
    material_discount: Decimal = Decimal(0)   # per unit, from the suppliers' breaks (within material)


def _check_profit_margin(shop) -> None:
    if shop.profit_margin >= 1:
        raise SpecError(f"a profit margin of {plain(shop.profit_margin * 100)} % leaves no price "
                        f"(cost / (1 - profit_margin)); it must be below 100 %", path="shop.profit_margin")


def unit_price(material: Decimal, run_s: Decimal, setup_s: Decimal, quantity: int, shop) -> dict:
    """Per-unit build-up at one lot size; the price rounded to the cent (half up)."""
    _check_profit_margin(shop)
    setup_share_s = setup_s / Decimal(quantity)
    labor = (run_s + setup_share_s) / _HOUR * shop.labor_rate
    setup = setup_share_s / _HOUR * shop.labor_rate
    overhead = labor * shop.overhead
    cost = material + labor + overhead
    price = cents(cost / (Decimal(1) - shop.profit_margin))
    return {"material": material, "labor": labor, "setup": setup, "overhead": overhead, "cost": cost,
            "unit_price": price}


# ------------------------------------------------------------------------------------------------ lot size
# What makes a larger lot cheaper besides the setup: the bench learns the part, and the stock suppliers
# give price breaks on larger buys. Both from shop.quote_terms; both absent means neither applies.

#: Units summed one by one before the tail of a long learning curve is taken as an integral.
_LEARNING_EXACT_UNITS = 100_000


def learning_factor(quantity: int, first_unit: float, rate: float) -> Decimal:
    """The mean run time of a lot of ``quantity`` units as a multiple of the settled time.

    Unit n takes ``T_n = max(1, F1 * n**b)`` times the settled time, with ``b = log2(rate)``: each
    doubling of the count multiplies the unit time by ``rate`` (the learning curve of T. P. Wright,
    "Factors affecting the cost of airplanes", Journal of the Aeronautical Sciences 3 (1936) 122-128,
    in its unit form; from memory), floored at the settled time the shop's labor figures describe,
    which is reached at ``n = F1 ** (-1 / b)``. The mean is ``sum(T_n, n = 1..N) / N``: summed term
    by term up to 100 000 units, beyond that by the midpoint integral ``((m + 1/2)**(b+1) -
    (k + 1/2)**(b+1)) / (b + 1)`` of the smooth tail (relative error below 1e-9 there).

    Parameters: quantity (units in the lot, >= 1); first_unit ``F1`` (>= 1); rate (0 < rate <= 1).
    Returns a Decimal to 6 decimals (a time factor; money stays Decimal downstream).
    """
    if quantity < 1:
        raise ValueError("a lot of at least one unit")
    if first_unit <= 1.0 or rate >= 1.0:
        return Decimal(1)
    b = math.log2(rate)
    settle = first_unit ** (-1.0 / b)                 # F1 n^b = 1 here
    learning_units = min(quantity, math.floor(settle))
    exact = min(learning_units, _LEARNING_EXACT_UNITS)
    total = math.fsum(first_unit * n ** b for n in range(1, exact + 1))
    if learning_units > exact:
        e = b + 1.0
        total += first_unit * ((learning_units + 0.5) ** e - (exact + 0.5) ** e) / e
    total += quantity - learning_units                # settled units at 1 x
    return Decimal(repr(round(total / quantity, 6)))


def buy_discount(amount: float | Decimal, breaks) -> Decimal:
    """The discount of the highest supplier's break that ``amount`` (kg or pieces in the lot) reaches."""
    best = Decimal(0)
    for brk in breaks:
        if float(amount) >= brk.threshold:
            best = brk.discount
    return best


def lot_material(lines: Iterable[CostLine], quantity: int, terms, scrap: Decimal) -> tuple[Decimal, Decimal]:
    """(material per unit at a lot of ``quantity``, the part of it the breaks took off)."""
    total = saved = Decimal(0)
    for line in lines:
        off = Decimal(0)
        if line.unit == "kg":                          # wire (with its scrap allowance) and per-kg cores
            bought = line.quantity * quantity * ((Decimal(1) + scrap) if line.kind == "wire" else Decimal(1))
            off = buy_discount(bought, terms.breaks_by_mass)
        elif line.unit in ("sets", "pcs") and line.kind in ("core", "laminations", "bobbin"):
            off = buy_discount(line.quantity * quantity, terms.breaks_by_count)
        total += line.amount * (Decimal(1) - off)
        saved += line.amount * off
    return total, saved


def price_breaks(design, prices: PriceList, quantities: Iterable[int],
                 model: LaborFigures | None = None) -> list[PriceBreak]:
    model = model or time_model(prices.shop)
    shop = prices.shop
    terms = prices.terms
    settled_s = run_seconds(labor_lines(design, model))
    setup_s = dec(shop.setup_time_s)
    lines = material_lines(design, prices)
    lines_low = material_lines(design, prices, COPPER_LOW)
    lines_high = material_lines(design, prices, COPPER_HIGH)
    out = []
    for q in quantities:
        learning = learning_factor(q, terms.learning_first_unit, terms.learning_rate)
        run_s = settled_s * learning
        mat, saved = lot_material(lines, q, terms, shop.scrap_wire)
        base = unit_price(mat, run_s, setup_s, q, shop)
        out.append(PriceBreak(
            quantity=q, material=base["material"], labor=base["labor"], setup=base["setup"],
            overhead=base["overhead"], cost=base["cost"], unit_price=base["unit_price"],
            extended=base["unit_price"] * q,
            unit_price_copper_low=unit_price(lot_material(lines_low, q, terms, shop.scrap_wire)[0],
                                             run_s, setup_s, q, shop)["unit_price"],
            unit_price_copper_high=unit_price(lot_material(lines_high, q, terms, shop.scrap_wire)[0],
                                              run_s, setup_s, q, shop)["unit_price"],
            learning=learning, material_discount=saved))
    return out


# ------------------------------------------------------------------------------------------------ inputs

def parse_quantities(text: str | None) -> tuple[int, ...]:
    """'100,500,2500' -> (100, 500, 2500), ascending; anything else is a one-line SpecError."""
    raw = "" if text is None else str(text).strip()
    if not raw:
        raise SpecError("give the quantity breaks, e.g. --qty 100,500,2500", path="--qty")
    out = []
    for part in raw.split(","):
        item = part.strip().replace("_", "")
        if not item:
            raise SpecError(f"an empty quantity in '{raw}'; write e.g. 100,500,2500", path="--qty")
        if item.startswith("-") and item[1:].isdigit():
            raise SpecError(f"a quantity must be at least 1, got {item}", path="--qty")
        if not item.isdigit():
            raise SpecError(f"'{part.strip()}' is not a whole number of units; write e.g. 100,500,2500",
                            path="--qty")
        q = int(item)
        if q < 1:
            raise SpecError(f"a quantity must be at least 1, got {part.strip()}", path="--qty")
        if q > MAX_QUANTITY:
            raise SpecError(f"{q:,} units is beyond what one quote covers (at most {MAX_QUANTITY:,})",
                            path="--qty")
        if q in out:
            raise SpecError(f"quantity {q} is given twice", path="--qty")
        out.append(q)
    if len(out) > MAX_BREAKS:
        raise SpecError(f"{len(out)} quantity breaks; at most {MAX_BREAKS}", path="--qty")
    return tuple(sorted(out))


def parse_amount(text: str | None, option: str = "--nre") -> Decimal | None:
    """A money amount from the command line ('1500', '1500.00'); None when not given."""
    if text is None:
        return None
    raw = str(text).strip().replace(",", "")
    try:
        value = Decimal(raw)
    except InvalidOperation:
        raise SpecError(f"expected an amount like 1500.00, got '{text}'", path=option) from None
    if not value.is_finite() or value < 0:
        raise SpecError(f"expected an amount of zero or more, got '{text}'", path=option)
    if value > Decimal("1e9"):
        raise SpecError(f"{text} is beyond any tooling charge this tool prints", path=option)
    return cents(value)


def parse_days(text: str | int | None, option: str = "--valid-days") -> int:
    raw = "30" if text is None else str(text).strip()
    if not raw.isdigit() or not 1 <= int(raw) <= 366:
        raise SpecError(f"expected a number of days from 1 to 366, got '{text}'", path=option)
    return int(raw)


# ------------------------------------------------------------------------------------------------ the quote

@dataclass(frozen=True)
class Quote:
    reference: str
    part: str
    title: str
    revision: str
    status: str
    customer: str
    fingerprint: str
    shop_name: str
    currency: str
    issued: _dt.date
    valid_until: _dt.date
    budgetary: str | None          # why the quote is budgetary, in the customer's words (None: firm)
    budgetary_detail: str | None   # the same for sales: what exactly differs from the release
    materials: tuple               # CostLines per unit
    labor: tuple                   # TimeLines per unit
    run_time_s: Decimal
    setup_time_s: Decimal
    breaks: tuple                  # PriceBreaks
    nre: Decimal | None
    copper_per_unit: Decimal       # the copper wire share of the material per unit
    labor_rate: Decimal
    overhead: Decimal
    profit_margin: Decimal
    scrap_wire: Decimal
    notes: tuple = ()
    design_summary: dict = field(default_factory=dict)
    # for the documents: the Design priced (its ratings go on the customer's copy), the shop's
    # letterhead, paper and terms, and the customer's address block when the catalogue has one
    design: Any = field(default=None, compare=False, repr=False)
    shop_documents: Any = field(default=None, compare=False, repr=False)
    customer_party: Any = field(default=None, compare=False, repr=False)

    @property
    def fingerprint_short(self) -> str:
        return self.fingerprint[:12]

    @property
    def material_per_unit(self) -> Decimal:
        return material_total(self.materials)

    @property
    def filename_stem(self) -> str:
        return f"{self.part}-rev{self.revision}-quote"

    def to_dict(self) -> dict[str, Any]:
        """JSON-ready: every amount a decimal string, never a JSON number (no float on the way).

        Prices (unit, extended, copper variants, NRE) are the quoted cents; the internal build-up
        (material lines, labor, overhead, cost per unit) is shown to 0.0001 for reading, while the
        price was computed from the unrounded sums. Times are seconds to 0.1 s.
        """
        q4 = Decimal("0.0001")

        def s(x: Decimal | None, places: Decimal = CENT) -> str | None:
            return None if x is None else str(x.quantize(places, rounding=ROUND_HALF_UP))

        return {
            "reference": self.reference, "part": self.part, "title": self.title, "revision": self.revision,
            "status": self.status, "customer": self.customer, "fingerprint": self.fingerprint,
            "fingerprint_short": self.fingerprint_short, "shop": self.shop_name, "currency": self.currency,
            "issued": self.issued.isoformat(), "valid_until": self.valid_until.isoformat(),
            "budgetary": self.budgetary, "budgetary_detail": self.budgetary_detail,
            "rules": {
                "labor_rate_per_hour": str(self.labor_rate), "overhead_on_labor": str(self.overhead),
                "profit_margin_on_price": str(self.profit_margin), "price": "cost / (1 - profit_margin)",
                "scrap_wire": str(self.scrap_wire), "rounding": "unit price to the cent, half up",
                "copper_sensitivity": [str(COPPER_LOW), str(COPPER_HIGH)],
            },
            "materials": [{
                "kind": m.kind, "id": m.id, "description": m.description, "quantity": s(m.quantity, Decimal("0.000001")),
                "unit": m.unit, "rate": str(m.rate), "amount": s(m.amount, q4), "copper": m.copper, "note": m.note,
            } for m in self.materials],
            "material_per_unit": s(self.material_per_unit, q4),
            "copper_per_unit": s(self.copper_per_unit, q4),
            "labor": [{"operation": t.operation, "item": t.item, "detail": t.detail,
                       "seconds": s(t.seconds, Decimal("0.1"))} for t in self.labor],
            "run_time_s": s(self.run_time_s, Decimal("0.1")),
            "setup_time_s": s(self.setup_time_s, Decimal("0.1")),
            "breaks": [{
                "quantity": b.quantity, "material": s(b.material, q4), "labor": s(b.labor, q4),
                "setup": s(b.setup, q4), "overhead": s(b.overhead, q4), "cost": s(b.cost, q4),
                "unit_price": s(b.unit_price), "extended": s(b.extended),
                "unit_price_copper_minus_20": s(b.unit_price_copper_low),
                "unit_price_copper_plus_20": s(b.unit_price_copper_high),
                "learning_factor": str(b.learning), "material_discount": s(b.material_discount, q4),
            } for b in self.breaks],
            "nre": s(self.nre),
            "notes": list(self.notes),
        }


def _summary(design) -> dict:
    """What the customer sees of the construction: read from the Design only."""
    c = design.core
    windings = [{"name": w.name, "turns": w.turns, "wire": w.wire_label,
                 "strands": w.strands} for w in design.windings]
    hipot = [{"between": h.between, "volts": h.routine_voltage_v, "seconds": h.routine_duration_s}
             for h in design.tests.hipot]
    t = design.tests
    tests = [name for name, present in (("DC resistance", t.dcr), ("turns ratio", t.ratio),
                                         ("open-circuit voltage", t.open_circuit), ("inductance", t.inductance),
                                         ("polarity", t.polarity)) if present]
    if t.insulation_resistance_v:
        tests.append(f"insulation resistance at {t.insulation_resistance_v:,.0f} V d.c.")
    return {"core": f"{c.id}, {c.material_name}", "insulation_class_c": design.insulation_class_c,
            "windings": windings, "hipot": hipot, "tests": tests,
            "varnish": any(m.kind == "varnish" for m in design.materials)}


def build_quote(spec, design, cat, quantities: Iterable[int], *, nre: Decimal | None = None,
                valid_days: int = 30, issued: _dt.date | None = None, allow_failed: bool = False) -> Quote:
    """The whole quote for one part: the catalogue's prices read once (``prices.price_list``), the one
    release gate run (``specgen.lifecycle``), then ``quote_design`` prices the Design against them."""
    from .lifecycle import release_gate
    from .prices import price_list

    return quote_design(spec, design, price_list(cat, design), release_gate(spec, design, cat), quantities,
                        nre=nre, valid_days=valid_days, issued=issued, allow_failed=allow_failed)


def quote_design(spec, design, prices: PriceList, verdict: ReleaseVerdict, quantities: Iterable[int], *,
                 nre: Decimal | None = None, valid_days: int = 30, issued: _dt.date | None = None,
                 allow_failed: bool = False) -> Quote:
    """The quote from the Design, its prices and its release verdict: refuses failed designs, obsolete
    revisions and broken releases (module docstring); reads no catalogue."""
    if design.failed and not allow_failed:
        raise DesignFailed(f"{design.part} rev {design.revision} has failed design checks: not quoted "
                           f"(fix the design first; a quote must not promise a part the shop will refuse)",
                           design.failed)
    if design.status == "obsolete":
        raise SpecError(f"revision {design.revision} is obsolete; quote the current revision",
                        file=spec.file, path="status")
    quantities = tuple(quantities)
    if not quantities:
        raise SpecError("no quantity breaks", path="--qty")
    shop = prices.shop
    _check_profit_margin(shop)
    model = time_model(shop)
    materials = material_lines(design, prices)
    labor = labor_lines(design, model)
    breaks = price_breaks(design, prices, quantities, model)
    issued = issued or _dt.date.today()
    # the one release gate's verdict: a broken release is refused as the work order refuses it; a
    # draft is quoted as budgetary; the change summary (allow_failed) prices whatever it is given
    budgetary = budgetary_detail = None
    if verdict.broken and not allow_failed:
        raise verdict.refusal("before quoting")
    if not verdict.firm:
        budgetary = (verdict.reason if not verdict.broken
                     else f"the design does not match the release record of revision {design.revision}")
        budgetary_detail = verdict.reason
    notes = []
    for m in materials:
        if m.note.startswith("no catalogue price"):
            notes.append(f"{m.description}: no catalogue price, not charged")
    return Quote(
        reference=f"Q-{design.part}-{design.revision}-{issued:%Y%m%d}", part=design.part, title=design.title,
        revision=design.revision, status=design.status, customer=design.customer,
        fingerprint=design.fingerprint, shop_name=shop.name, currency=shop.currency, issued=issued,
        valid_until=issued + _dt.timedelta(days=int(valid_days)), budgetary=budgetary,
        budgetary_detail=budgetary_detail,
        materials=tuple(materials), labor=tuple(labor), run_time_s=run_seconds(labor),
        setup_time_s=dec(shop.setup_time_s), breaks=tuple(breaks), nre=None if nre is None else cents(nre),
        copper_per_unit=copper_total(materials), labor_rate=shop.labor_rate, overhead=shop.overhead,
        profit_margin=shop.profit_margin, scrap_wire=shop.scrap_wire, notes=tuple(notes), design_summary=_summary(design),
        design=design, shop_documents=getattr(shop, "documents", None),
        customer_party=prices.customer)


# ------------------------------------------------------------------------------------------------ text

def money(amount: Decimal | None, currency: str = "") -> str:
    """'1,234.56' (or 'USD 1,234.56'): grouping for people; the value is exact."""
    if amount is None:
        return "-"
    text = f"{cents(amount):,.2f}"
    return f"{currency} {text}" if currency else text


def quote_table(q: Quote) -> str:
    """The terminal view: cost build-up per unit (internal) and the price per quantity break."""
    lines = [f"{q.part} rev {q.revision}  {q.title}",
             f"customer {q.customer}   fingerprint {q.fingerprint_short}   quote {q.reference}",
             f"issued {q.issued.isoformat()}, valid until {q.valid_until.isoformat()}   currency {q.currency}"]
    if q.budgetary:
        lines.append(f"BUDGETARY: {q.budgetary_detail}")
    lines.append("")
    lines.append("material per unit")
    for m in q.materials:
        lines.append(f"  {m.kind:<11} {m.id:<22} {m.quantity:>10.4f} {m.unit:<4} x {m.rate:>8.4f}"
                     f" = {m.amount:>9.4f}{'  copper' if m.copper else ''}")
    lines.append(f"  {'total':<11} {'':<22} {'':>10} {'':<4}   {'':>8}   {q.material_per_unit:>9.4f}"
                 f"  (copper wire {q.copper_per_unit:.4f})")
    lines.append("")
    lines.append(f"labor per unit at {money(q.labor_rate)}/h, overhead {plain(q.overhead * 100)} % on labor, "
                 f"profit margin {plain(q.profit_margin * 100)} % of price")
    for t in q.labor:
        lines.append(f"  {t.operation:<13} {t.seconds:>8.1f} s  {t.item + ': ' if t.item else ''}{t.detail}")
    lines.append(f"  {'run time':<13} {q.run_time_s:>8.1f} s  per unit; setup "
                 f"{plain(q.setup_time_s / 60)} min per lot")
    lines.append("")
    head = (f"  {'qty':>7}  {'material':>9}  {'labor':>9}  {'overhead':>9}  {'cost':>9}  {'unit price':>10}"
            f"  {'extended':>12}  {'Cu -20 %':>9}  {'Cu +20 %':>9}")
    lines.append(head)
    for b in q.breaks:
        lines.append(f"  {b.quantity:>7,}  {money(b.material):>9}  {money(b.labor):>9}  {money(b.overhead):>9}"
                     f"  {money(b.cost):>9}  {money(b.unit_price):>10}  {money(b.extended):>12}"
                     f"  {money(b.unit_price_copper_low):>9}  {money(b.unit_price_copper_high):>9}")
    if q.nre is not None:
        lines.append(f"  tooling / NRE, one time: {money(q.nre, q.currency)}")
    for n in q.notes:
        lines.append(f"  note: {n}")
    return "\n".join(lines)


CSV_FIELDS = ("part", "revision", "fingerprint", "currency", "quantity", "material", "labor", "overhead",
              "cost", "unit_price", "extended", "unit_price_copper_minus_20", "unit_price_copper_plus_20",
              "nre", "valid_until")


def quote_csv_rows(q: Quote) -> list[dict]:
    d = q.to_dict()
    return [{"part": q.part, "revision": q.revision, "fingerprint": q.fingerprint_short,
             "currency": q.currency, "quantity": b["quantity"], "material": b["material"], "labor": b["labor"],
             "overhead": b["overhead"], "cost": b["cost"], "unit_price": b["unit_price"],
             "extended": b["extended"], "unit_price_copper_minus_20": b["unit_price_copper_minus_20"],
             "unit_price_copper_plus_20": b["unit_price_copper_plus_20"], "nre": d["nre"] or "",
             "valid_until": d["valid_until"]} for b in d["breaks"]]
