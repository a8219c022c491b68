"""The demo's lots at the station: invented readings for the demo shop (Brindle Hollow Coil Works).

Demo only. Readings are drawn (seeded, so every run is the same) around the Design's predictions with
an invented offset per quantity (the DCR sits 7 % high, as if the builds were bulkier than the shop's
bulge factor says), so the measured-against-predicted report has a consistent offset to flag. One
piece of the first lot fails its DCR and is given a disposition.
"""

from __future__ import annotations

import random
from pathlib import Path
from typing import Any

from specgen.physics.wire import resistance_at_temp_ohm
from specgen.register import Order, Register

from .lots import floor_steps
from .model import Column, Verdict
from .plan import judge, station_columns
from .store import StationStore
from .users import add_user

DEMO_USERS = (("wren", "winder"), ("tamsin", "tester"), ("ellis", "engineer"))
DEMO_PASSWORD = "bench-demo-2026"    # invented, for the demo shop only
#: Invented offsets of the demo readings from the prediction, by test field (a fraction).
DEMO_OFFSETS = {"dcr": 0.07, "inductance": -0.02, "ratio": 0.0, "open_circuit": 0.004}
#: Invented relative spread of a reading, by test field (a ratio follows whole turns: tight).
DEMO_SPREADS = {"dcr": 0.012, "inductance": 0.012, "ratio": 0.0008, "open_circuit": 0.004}
#: Invented material lots of the demo lots, by pull-list kind (wire reels, core batches, tape rolls).
DEMO_LOTS = {"wire": ("R-2291", "R-2305", "R-2310"), "core": ("CB-0417",), "laminations": ("CB-0417",),
             "tape": ("TR-1183", "TR-1190")}
DEMO_SECOND_LOT = "BH-1042"


def demo_users(path: Path) -> None:
    for name, role in DEMO_USERS:
        add_user(path, name, role, DEMO_PASSWORD)


def _reading(col: Column, rng: random.Random, temp_c: float) -> float:
    if col.kind == "check":
        return 1.0
    if col.nominal is None:                     # insulation resistance: log-uniform, well above the minimum
        return (col.low or 1e8) * 10 ** rng.uniform(1.0, 3.0)
    field = col.key.split("/", 1)[0]
    value = col.nominal * (1.0 + DEMO_OFFSETS.get(field, 0.0) + rng.gauss(0.0, DEMO_SPREADS.get(field, 0.01)))
    if col.kind == "dcr":                       # what the meter shows at the bench temperature
        return float(resistance_at_temp_ohm(value, 20.0, temp_c))
    return value


def fill_lot(store: StationStore, order: Order, design: Any, cat: Any, *, seed: int, tested: int,
             fail_serial: str | None = None) -> int:
    """Sign every step off, record the material lots and ``tested`` serials' readings."""
    rng = random.Random(seed)
    for step in floor_steps(design, cat, order):
        store.sign_off(order.number, step.n, step.heading, "wren")
    taken: dict[str, int] = {}
    for m in design.materials:
        if m.kind in DEMO_LOTS:
            lots = DEMO_LOTS[m.kind]
            store.record_material(order.number, m.id, m.kind, lots[taken.get(m.kind, 0) % len(lots)], "wren")
            taken[m.kind] = taken.get(m.kind, 0) + 1
    columns = station_columns(design)
    pieces = []
    for serial in (str(i) for i in range(1, min(tested, order.qty) + 1)):
        temp = round(rng.uniform(21.0, 26.0), 1)
        verdicts: list[Verdict] = []
        for col in columns:
            value = _reading(col, rng, temp)
            if serial == fail_serial and col.kind == "dcr" and not any(v.column.kind == "dcr" for v in verdicts):
                value *= 1.25                    # an invented bad joint
            verdicts.append(judge(col, value, temp if col.kind == "dcr" else None))
        pieces.append((serial, verdicts))
    stored = store.record_many(order.number, pieces, "tamsin", source="demo")
    if fail_serial is not None and store.piece(order.number, fail_serial).status == "needs-disposition":
        store.dispose(order.number, fail_serial, "rework", "DCR high: re-solder the start lead and retest", "tamsin")
    return len(stored)


def demo_station(register_path: Path, designs: dict[str, tuple[Any, Any, Any]], cat: Any, out: Path,
                 echo: Any = print) -> Path:
    """Fill the demo lots in the demo register and write the demo users file; returns that file."""
    from specgen.documents.workorder import issue_from_design

    users = out / "station-users.yaml"
    demo_users(users)
    for part in (DEMO_SECOND_LOT,):              # a second lot, so the comparison runs across lots
        if part in designs and not designs[part][2].failed:
            path, spec, design = designs[part]
            issued = issue_from_design(path, spec, design, cat, qty=20, lot=f"DEMO-{part}-2", out_dir=out / "workorders",
                                       register_path=register_path, draft=spec.status != "released")
            echo(f"{part:8} second lot {issued.number}")
    with Register.open(register_path, create=False) as reg:
        store = StationStore(reg)
        for seed, order in enumerate(o for o in reg.list() if o.state != "void" and o.part in designs):
            design = designs[order.part][2]
            if design.fingerprint != order.fingerprint or store.entries(order.number):
                continue
            first = seed == 0
            count = fill_lot(store, order, design, cat, seed=1000 + seed, tested=order.qty if first else 12,
                             fail_serial="3" if first else None)
            echo(f"{order.part:8} {order.number}: {count} readings, every step signed off")
    return users
