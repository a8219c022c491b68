"""A lot for the station's tests: a register holding one work order of a demo part, that part's spec in
a parts folder, and a users file (one user of each role). The order is recorded as issued with a file
(the work order's PDF is not rendered: the station never reads it)."""

from __future__ import annotations

import dataclasses
import shutil
from pathlib import Path

from specgen.api import demo_specs, run_design
from specgen.catalog.loader import load_catalog
from specgen.design.spec import load_spec
from specgen.register import Register
from specgen.station.users import add_user

PASSWORD = "correct horse battery"
USERS = {"wren": "winder", "tamsin": "tester", "ellis": "engineer"}


@dataclasses.dataclass
class LotFixture:
    register: str
    parts: Path
    users: Path
    number: str
    design: object


def make_lot(folder: Path, part: str = "BH-2210", qty: int = 5, register: str | None = None,
             users: dict[str, str] | None = None) -> LotFixture:
    cat = load_catalog(None)
    parts = folder / "parts"
    parts.mkdir(parents=True, exist_ok=True)
    source = next(p for p in demo_specs() if p.stem == part)
    shutil.copyfile(source, parts / source.name)
    design = run_design(load_spec(parts / source.name), cat)
    target = register or str(folder / "station-register.sqlite")
    with Register.open(target) as reg:
        number = reg.allocate(design.part, design.revision, design.fingerprint, qty, lot="T-1", issued_by="planner")
        reg.attach_files(number, [str(folder / f"{number}.pdf")])
    users_file = folder / "users.yaml"
    for name, role in (users or USERS).items():
        add_user(users_file, name, role, PASSWORD)
    return LotFixture(target, parts, users_file, number, design)
