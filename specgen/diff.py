"""Compare two revisions of a spec by what they build: the change summary's data.

``compare`` gives the changed inputs (spec keys, flattened) and the changed shop-floor results
(turns, wire, layers, lengths, DCR limits, hipot, materials per unit, ...) of two revisions, each
old -> new, as a ``ChangeSummary``. Release and verify live in ``specgen.lifecycle``.

Nothing here computes physics: every result is read from the two ``Design`` objects, so the
change summary shows the same numbers as the work order of each revision. Two results count as
changed when they differ at the precision shown (four significant figures for most quantities),
so float noise in the last digit is not reported as a change.
"""

from __future__ import annotations

from collections.abc import Callable, Iterable, Mapping
from dataclasses import dataclass
from decimal import Decimal
from typing import Any

from . import present, revision
from .errors import DesignFailed, SpecError
from .lifecycle import Loaded, load_design

# ----------------------------------------------------------------------------------------------
# Loading a revision


def load_ref(ref: str, cat) -> Loaded:
    """A spec given as a path or as ``PATH@GITREV`` (read with git), designed with ``cat``."""
    from .design.spec import load_spec_text

    name, text = revision.read_rev(str(ref))
    return load_design(load_spec_text(text, name), cat, name)


# ----------------------------------------------------------------------------------------------
# Compare two revisions


#: How a spec key that is absent on one side is shown (the design then uses its default or
#: calculates the value, e.g. a turn count).
NOT_SET = "(not set)"


@dataclass(frozen=True)
class InputChange:
    """One spec key (flattened path such as ``windings[P].turns``), old -> new; None = absent."""

    key: str
    old: Any
    new: Any

    @property
    def old_text(self) -> str:
        return NOT_SET if self.old is None else _value_text(self.old)

    @property
    def new_text(self) -> str:
        return NOT_SET if self.new is None else _value_text(self.new)


@dataclass(frozen=True)
class ResultChange:
    """One shop-floor result, old -> new. Values in SI (``unit``); None = absent on that side."""

    group: str                        # 'winding P', 'test station', 'materials', 'core', ...
    quantity: str                     # 'turns', 'DCR 20 °C high limit', 'LITZ-60X0.10 (wire)'
    old: Any
    new: Any
    unit: str
    old_text: str
    new_text: str


@dataclass(frozen=True)
class Side:
    name: str
    part: str
    title: str
    revision: str
    status: str
    fingerprint: str
    release_ok: bool | None           # None for drafts/obsolete (nothing recorded to check)
    release_problems: tuple = ()
    recorded: str | None = None       # the fingerprint its history entry recorded
    # this revision's history entry, for a reader: when, by whom and why it was released
    released_on: str = ""
    released_by: str = ""
    release_note: str = ""
    # what its release recorded about the revision it superseded (``specgen release --effective``)
    supersedes: str = ""
    effective: str = ""               # next-order | now | lot <reference>; '' when none was recorded
    open_orders: tuple[str, ...] | None = None   # that revision's open work orders at the release (None: not looked)

    @classmethod
    def of(cls, loaded: Loaded) -> Side:
        d = loaded.design
        status = loaded.release.status
        ok = loaded.release.ok if status == "released" else None
        # the last history entry of this revision, as the Design carries it (typed)
        entry = next((e for e in reversed(d.history) if e.revision == d.revision), None) \
            if status == "released" else None
        return cls(name=loaded.name, part=d.part, title=d.title, revision=d.revision or "-", status=status,
                   fingerprint=d.fingerprint, release_ok=ok,
                   release_problems=tuple(loaded.release.problems),
                   recorded=loaded.release.recorded, released_on=entry.date if entry else "",
                   released_by=entry.by if entry else "", release_note=entry.note.strip() if entry else "",
                   supersedes=entry.supersedes if entry else "", effective=entry.effective if entry else "",
                   open_orders=entry.open_orders if entry else None)

    @property
    def effectivity(self) -> str:
        """When this revision governs the shop's work, as its release recorded it (or the shop's rule:
        work orders are issued from released revisions only)."""
        if self.status != "released":
            return f"None yet: revision {self.revision} is a {self.status}. It governs no work order until it is released."
        since = f"from {self.released_on}" if self.released_on else "from its release"
        old = f"revision {self.supersedes}" if self.supersedes else "an earlier revision"
        orders = ""
        if self.open_orders:
            orders = f" Open work orders of {old} at the release: {', '.join(self.open_orders)}."
        elif self.open_orders is not None and self.supersedes:
            orders = f" No work order of {old} was open at the release."
        word = self.effective.split(" ", 1)
        if word[0] == "now":
            return (f"At once: revision {self.revision} takes effect for every work order, including those "
                    f"still open to {old}, which are brought to revision {self.revision} before they are finished."
                    + orders)
        if word[0] == "lot" and len(word) == 2:
            return (f"From lot {word[1]}: that lot and every later one is built to revision {self.revision}; "
                    f"earlier lots finish to {old}." + orders)
        text = (f"Work orders issued {since} are built to revision {self.revision}; orders already issued to "
                f"{old} finish to the revision printed on them.")
        if not self.effective and self.supersedes == "":
            return text if self.open_orders is None else text + orders
        return text + orders + ("" if self.effective else " (No effectivity was recorded at the release.)")

    @property
    def release_text(self) -> str:
        if self.release_ok is None:
            return f"{self.status}, not released"
        if self.release_ok:
            return "release record matches"
        if not self.recorded:
            return "released without a recorded fingerprint"
        return "does NOT match its release record"


@dataclass(frozen=True)
class ChangeSummary:
    old: Side
    new: Side
    inputs: tuple                     # of InputChange
    results: tuple                    # of ResultChange
    cost_note: str = ""               # why unit cost is not compared (empty when it is)
    catalog: str = ""                 # the catalogue folder both sides were designed with
    roles: tuple = ()                 # (winding name, role) of both sides, for naming inputs to a reader

    @property
    def part(self) -> str:
        return self.new.part if self.new.part == self.old.part else f"{self.old.part} / {self.new.part}"

    @property
    def unchanged(self) -> bool:
        return not self.inputs and not self.results

    def groups(self) -> list[tuple[str, list]]:
        """Result changes grouped in the order they first appear."""
        out: dict[str, list] = {}
        for r in self.results:
            out.setdefault(r.group, []).append(r)
        return list(out.items())

    def to_dict(self) -> dict:
        def side(s: Side) -> dict:
            return {"name": s.name, "part": s.part, "title": s.title, "revision": s.revision, "status": s.status,
                    "fingerprint": s.fingerprint, "recorded_fingerprint": s.recorded,
                    "release_ok": s.release_ok, "release_problems": list(s.release_problems)}

        return {
            "part": self.part, "old": side(self.old), "new": side(self.new),
            "catalog": self.catalog,
            "inputs": [{"key": c.key, "old": c.old, "new": c.new} for c in self.inputs],
            "results": [{"group": r.group, "quantity": r.quantity, "old": _jsonable(r.old),
                         "new": _jsonable(r.new), "unit": r.unit, "old_text": r.old_text,
                         "new_text": r.new_text} for r in self.results],
            "cost_note": self.cost_note,
        }


def _jsonable(v: Any) -> Any:
    return str(v) if isinstance(v, Decimal) else v


# -- inputs --

def _value_text(v: Any) -> str:
    import json

    if v is None:
        return "-"
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, str):
        return v
    if isinstance(v, (int, float)):
        return f"{v:g}" if isinstance(v, float) else str(v)
    if isinstance(v, list) and all(not isinstance(x, (dict, list)) for x in v):
        return "[" + ", ".join(_value_text(x) for x in v) + "]"
    return json.dumps(v, ensure_ascii=False, sort_keys=True)


def flatten_inputs(data: Mapping) -> dict[str, Any]:
    """The spec's content as ``{key path: normalised leaf value}``.

    Mappings become ``a.b``; a list of mappings that all carry distinct ``name`` keys (the
    windings) is indexed by name, ``windings[P].turns``, so inserting a winding does not shift
    every other one; other lists of mappings by position, ``insulation.barriers[0].rating``; a
    list of plain values (``build_order``, ``between``) is one leaf. ``history``, ``revision``
    and ``status`` are left out (the summary's header shows the revisions). Values go through
    ``revision.normalise``, so a change the fingerprint ignores (``"230  V"`` -> ``"230 V"``)
    is not listed either.
    """
    out: dict[str, Any] = {}

    def walk(prefix: str, value: Any) -> None:
        if isinstance(value, Mapping) and value:
            for k, v in value.items():
                walk(f"{prefix}.{k}" if prefix else str(k), v)
        elif isinstance(value, list) and value and all(isinstance(i, Mapping) for i in value):
            names = [i.get("name") for i in value]
            by_name = all(isinstance(n, str) and n for n in names) and len(set(names)) == len(names)
            for i, item in enumerate(value):
                walk(f"{prefix}[{names[i] if by_name else i}]", item)
        else:
            out[prefix] = value

    for key, value in revision.normalise(revision.spec_content(data)).items():
        walk(str(key), value)
    return out


def merged_order(old_keys: Iterable, new_keys: Iterable) -> list:
    """The old keys in order, each key only the new side has placed after its predecessor on
    the new side (so an added winding's rows sit with the other windings, not at the end)."""
    out = list(old_keys)
    where = {k: i for i, k in enumerate(out)}
    anchor = -1
    for k in new_keys:
        if k in where:
            anchor = where[k]
            continue
        anchor += 1
        out.insert(anchor, k)
        where = {key: i for i, key in enumerate(out)}
    return out


def input_changes(old_data: Mapping, new_data: Mapping) -> list[InputChange]:
    old, new = flatten_inputs(old_data), flatten_inputs(new_data)
    keys = merged_order(old, new)
    return [InputChange(k, old.get(k), new.get(k)) for k in keys if old.get(k) != new.get(k)]


# -- shop-floor results --

#: Units shown with an engineering prefix (``present.si``), by the unit key ``present.quantity`` takes.
_PREFIXED = {"ohm": "Ω", "Ω": "Ω", "H": "H", "A": "A", "V": "V", "W": "W", "Hz": "Hz", "F": "F"}


def fmt(v: Any, unit: str) -> str:
    """A result in shop units (``specgen.present.quantity``): ohm -> mΩ/Ω, H -> µH/mH, m -> mm, ..."""
    return present.quantity(v, unit)


def _limit_rows(prefix: str, lim) -> list:
    unit = lim.unit
    if unit == "H" and str(lim.name).startswith("AL"):
        unit = "H/turn2"                       # an inductance factor: shown in nH per turn²
    return [(f"{prefix} nominal", lim.nominal, unit),
            (f"{prefix} low limit", lim.low, unit),
            (f"{prefix} high limit", lim.high, unit)]


# long: one flat list of every compared figure, in the order the change summary prints them
def shop_results(d, costs: Mapping[str, tuple] | None = None) -> dict[tuple[str, str], tuple[Any, str]]:
    """``{(group, quantity): (value, unit)}`` of everything a change summary compares."""
    out: dict[tuple[str, str], tuple[Any, str]] = {}

    def put(group: str, quantity: str, value: Any, unit: str) -> None:
        out[(group, quantity)] = (value, unit)

    dcr = {lim.item: lim for lim in d.tests.dcr}
    for w in d.windings:
        g = f"winding {w.name}"
        put(g, "turns", w.turns, "count")
        put(g, "wire", w.wire, "text")
        put(g, "strands in hand", w.strands, "count")
        put(g, "layers", w.layers, "count")
        put(g, "turns per layer", w.turns_per_layer, "count")
        if len(w.sections) > 1:
            for s in w.sections:
                put(g, f"section {w.name}.{s.index} turns / layers",
                    f"{s.turns} / {len(s.layers)}", "text")
        put(g, "wire length (with leads)", w.length_m, "m")
        put(g, "pins start-finish", f"{w.start}-{w.finish}", "text")
        put(g, "direction", w.direction, "text")
        put(g, "margin each side", w.margin_m, "mm")
        if w.name in dcr:
            for q, v, u in _limit_rows("DCR 20 °C", dcr[w.name]):
                put(g, q, v, u)
    t = d.tests
    g = "test station"
    for lim in t.ratio:
        for q, v, u in _limit_rows(f"ratio {lim.item}", lim):
            put(g, q, v, u)
    for lim in t.open_circuit:
        for q, v, u in _limit_rows(f"open-circuit {lim.item}", lim):
            put(g, q, v, u)
    for lim in t.inductance:
        for q, v, u in _limit_rows(f"{lim.name} {lim.item}", lim):
            put(g, q, v, u)
    for h in t.hipot:
        put(g, f"hipot {h.between} ({h.rating}) type test, a.c.",
            f"{h.type_voltage_v:.0f} V / {h.type_duration_s:g} s", "text")
        put(g, f"hipot {h.between} routine test, a.c.",
            f"{h.routine_voltage_v:.0f} V / {h.routine_duration_s:g} s", "text")
    put(g, "insulation resistance", f"min {fmt(t.insulation_resistance_min_ohm, 'ohm')} at "
        f"{t.insulation_resistance_v:.0f} V d.c.", "text")
    for m in d.materials:
        put("materials per unit", f"{m.id} ({m.kind})", m.quantity, m.unit)
    c = d.core
    put("core", "core", c.id, "text")
    put("core", "bobbin", c.bobbin or "none", "text")
    put("core", "stack", c.stack_m, "mm")
    put("core", "cores per unit", c.count, "count")
    put("core", "lamination pairs", c.laminations, "count")
    g = "magnetics and heat"
    put(g, "B_pk nominal", d.b_peak_t, "T")
    put(g, "B_pk at top of range", d.b_peak_max_t, "T")
    put(g, "magnetizing current", d.magnetizing_current_a, "A")
    put(g, "copper loss", d.losses.copper_w, "W")
    put(g, "core loss", d.losses.core_w, "W")
    put(g, "total loss", d.losses.total_w, "W")
    put(g, "hot spot", d.hot_spot_c, "degC")
    put(g, "temperature rise", d.temperature_rise_k, "K")
    put(g, "efficiency", d.efficiency, "frac")
    put(g, "regulation", d.regulation_pct, "pct")
    put(g, "build fill", d.build.fill_fraction, "frac")
    if d.inductor is not None:
        i = d.inductor
        g = "inductance and gap"
        put(g, "inductance as built", i.inductance_h, "H")
        put(g, "inductance at zero bias", i.inductance_zero_bias_h, "H")
        put(g, "gap", i.gap_m, "mm")
        put(g, "gap arrangement", i.gap_arrangement, "text")
        put(g, "spacer", i.spacer_m, "mm")
        put(g, "centre-leg grind", i.grind_m, "mm")
        put(g, "AL", i.al_nh, "nH")
        put(g, "permeability roll-off at full current", i.bias_drop_pct, "pct")
        put(g, "B_dc", i.b_dc_t, "T")
    if getattr(d, "current_transformer", None) is not None:
        ct = d.current_transformer
        g = "current transformer"
        put(g, "secondary turns", ct.secondary_turns, "count")
        put(g, "burden", ct.burden_ohm, "ohm")
        put(g, "ratio error", ct.ratio_error_pct, "pct")
        put(g, "phase displacement", ct.phase_error_deg, "deg")
        put(g, "knee burden", ct.knee_burden_ohm, "ohm")
    for ch in d.checks:
        put("checks", ch.code, ch.level, "text")
    for quantity, (value, unit) in (costs or {}).items():
        put("cost", quantity, value, unit)
    return out


def result_changes(old_d, new_d, old_cost: Any = None, new_cost: Any = None) -> list[ResultChange]:
    old, new = shop_results(old_d, old_cost), shop_results(new_d, new_cost)
    # merge the groups first (an added winding sits with the windings), then each group's rows
    groups = merged_order(dict.fromkeys(k[0] for k in old), dict.fromkeys(k[0] for k in new))
    keys = [k for g in groups
            for k in merged_order([k for k in old if k[0] == g], [k for k in new if k[0] == g])]
    out = []
    for key in keys:
        ov, ou = old.get(key, (None, None))
        nv, nu = new.get(key, (None, None))
        unit = nu or ou or "text"
        ot, nt = fmt(ov, ou or unit), fmt(nv, nu or unit)
        if ou == nu and unit in _PREFIXED and all(isinstance(v, (int, float)) for v in (ov, nv)):
            ot, nt = present.si_set([ov, nv], _PREFIXED[unit])     # old and new read with one prefix
        if ot != nt:
            out.append(ResultChange(group=key[0], quantity=key[1], old=ov, new=nv, unit=unit,
                                    old_text=ot, new_text=nt))
    return out


#: Cost figures of one revision: ``(loaded) -> {quantity: (value, unit)}``, priced with the
#: catalogue that revision was designed with (``loaded.cat``).
CostFunction = Callable[[Any], Mapping[str, tuple]]

#: The lot size the change summary prices a unit at (``specgen diff --qty``).
DEFAULT_LOT = 100


def quote_costs(lot: int = DEFAULT_LOT) -> CostFunction:
    """Cost figures from the quote module (``specgen.quote.build_quote``), read not recomputed:
    material per unit, labor time per unit (without the lot's setup) and the unit price at a
    lot of ``lot``. Raises ImportError/AttributeError when the quote module is not there."""
    from . import quote as q  # ImportError when this version has no quote module

    build = q.build_quote

    def costs(loaded) -> dict:
        qt = build(loaded.spec, loaded.design, loaded.cat, (int(lot),), allow_failed=True)
        total = sum((m.amount for m in qt.materials), Decimal(0))
        price = qt.breaks[0].unit_price
        cur = qt.currency
        return {"material per unit": (total, f"money {cur}"),
                "labor time per unit (without setup)": (qt.run_time_s, "s"),
                f"unit price at a lot of {int(lot)}": (price, f"money {cur}")}

    return costs


def compare(old: Loaded, new: Loaded, costs: CostFunction | None | str = "default",
            lot: int = DEFAULT_LOT) -> ChangeSummary:
    """The change summary of two loaded revisions (inputs and shop-floor results, old -> new).

    ``costs``: a ``CostFunction``, None to leave cost out, or "default" for ``quote_costs(lot)``
    when the quote module is present. Cost that cannot be worked out (no quote module, a price
    missing from the catalogue, an obsolete revision) is left out with a note saying why; it
    never stops the summary and no figure is made up in its place.
    """
    note = ""
    pricing: CostFunction | None = None
    if isinstance(costs, str):          # "default"
        try:
            pricing = quote_costs(lot)
        except (ImportError, AttributeError):
            note = "unit cost not compared: this version has no quote module"
    else:
        pricing = costs
    old_cost = new_cost = None
    if pricing is not None:
        try:
            old_cost, new_cost = pricing(old), pricing(new)
        except (SpecError, DesignFailed) as err:
            old_cost = new_cost = None
            note = f"unit cost not compared: {err}"
        except (TypeError, AttributeError) as err:     # the quote module's interface moved on
            old_cost = new_cost = None
            note = f"unit cost not compared: the quote module did not answer as expected ({err})"
    return ChangeSummary(
        old=Side.of(old), new=Side.of(new),
        inputs=tuple(input_changes(old.data, new.data)),
        results=tuple(result_changes(old.design, new.design, old_cost, new_cost)),
        cost_note=note, catalog=_catalog_text(old, new),
        roles=tuple(dict.fromkeys((w.name, w.role) for w in (*old.design.windings, *new.design.windings))))


def _catalog_text(old: Loaded, new: Loaded) -> str:
    roots = [str(getattr(x.cat, "root", "") or "") for x in (old, new)]
    return roots[1] if roots[0] == roots[1] else f"{roots[0]} (old), {roots[1]} (new)"


def compare_refs(old_ref: str, new_ref: str, cat, costs: CostFunction | None | str = "default",
                 lot: int = DEFAULT_LOT) -> ChangeSummary:
    """``compare`` of two specs given as paths or ``PATH@GITREV``, both designed with ``cat``."""
    return compare(load_ref(old_ref, cat), load_ref(new_ref, cat), costs, lot)


# -- text --

def _table(headers: list[str], rows: list[list[str]]) -> list[str]:
    return present.table(headers, rows).split("\n")


def _cut(text: str, width: int = 48) -> str:
    return text if len(text) <= width else text[:width - 1].rstrip() + "\u2026"


def summary_text(s: ChangeSummary) -> str:
    """The change summary as plain text tables (what ``specgen diff`` prints)."""
    out = [f"{s.part}: rev {s.old.revision} ({s.old.status}) -> rev {s.new.revision} ({s.new.status})"]
    for label, side in (("old", s.old), ("new", s.new)):
        out.append(f"  {label}  {side.name}  fingerprint {revision.short(side.fingerprint)}  "
                   f"({side.release_text})")
    out.append(f"  effective: {s.new.effectivity}")
    if s.unchanged:
        out.append("")
        out.append("no changes in the spec or in the shop-floor results")
        return "\n".join(out)
    out.append("")
    out.append(f"Changed inputs ({len(s.inputs)})")
    if s.inputs:
        out += _table(["spec key", "old", "new"], [[c.key, _cut(c.old_text), _cut(c.new_text)] for c in s.inputs])
    else:
        out.append("  none (the results changed through the catalogue)")
    out.append("")
    out.append(f"Changed shop-floor results ({len(s.results)})")
    if s.results:
        rows = []
        for group, changes in s.groups():
            for i, r in enumerate(changes):
                rows.append([group if i == 0 else "", r.quantity, r.old_text, "->", r.new_text])
        out += _table(["", "quantity", "old", "", "new"], rows)
    else:
        out.append("  none")
    if s.cost_note:
        out.append("")
        out.append(f"({s.cost_note})")
    return "\n".join(out)


__all__ = [
    "load_ref",
    "InputChange", "ResultChange", "Side", "ChangeSummary", "flatten_inputs", "input_changes",
    "shop_results", "result_changes", "fmt", "quote_costs", "compare", "compare_refs",
    "summary_text",
]
