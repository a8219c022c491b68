"""A deliberately uneven split of a winding into sections, and each tap's voltage over the input range.

Sources: Hamilton's largest-remainder apportionment (whole turns in proportion to the shares, the leftover
turns to the largest fractions), checked against an independent numpy apportionment; Faraday's law (the
voltage per turn is the same along a winding and follows the input voltage).
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from specgen.api import design_text
from specgen.catalog.loader import load_catalog
from specgen.design import kernel as K
from specgen.design.spec import load_spec_text
from specgen.errors import SpecError
from tests.test_design_windings import TAPPED

ROOT = Path(__file__).resolve().parent.parent
CATALOG = ROOT / "catalog"
BH2210 = (ROOT / "specgen" / "demo" / "BH-2210.yaml").read_text(encoding="utf-8")
SPLIT = "    section_pins: [\"2\"]     # P.1 finishes and P.2 starts on pin 2\n"


def _hamilton(total: int, shares: list[float]) -> list[int]:
    q = np.asarray(shares, dtype=float) / np.sum(shares) * total
    base = np.floor(q).astype(int)
    for k in np.argsort(-(q - base), kind="stable")[: total - int(base.sum())]:
        base[k] += 1
    return base.tolist()


@pytest.mark.parametrize("total, shares", [(73, [2, 1]), (31, [1, 1]), (7, [1, 1, 1]), (100, [3, 2, 1]),
                                           (41, [1.5, 1, 1]), (9, [5, 3, 1, 1])])
def test_section_turns_by_largest_remainder(total, shares):
    got = K.section_turns(total, shares)
    assert sum(got) == total
    assert list(got) == _hamilton(total, shares)


def test_equal_shares_keep_the_old_split():
    # N // n each, sections 1 .. N mod n one turn more
    for total in range(3, 40):
        for n in (2, 3, 4):
            assert K.section_turns(total, [1] * n) == tuple(total // n + (1 if k < total % n else 0) for k in range(n))


def test_an_uneven_split_is_wound_and_said():
    text = BH2210.replace(SPLIT, SPLIT + "    section_shares: [2, 1]\n", 1)
    d = design_text(text, "BH-2210.yaml", load_catalog(CATALOG))
    p = next(w for w in d.windings if w.name == "P")
    a, b = (s.turns for s in p.sections)
    assert (a, b) == K.section_turns(p.turns, (2, 1))
    assert abs(a - 2 * p.turns / 3) < 1.0 and a > b
    note = next(c for c in d.checks if c.code == "sections")
    assert f"{a} + {b}" in note.message and "2:1" in note.message


@pytest.mark.parametrize("new, words, path", [
    ("    section_shares: [2, 1, 1]\n", "one share per section", "windings[0].section_shares"),
    ("    section_shares: [2, -1]\n", "positive number", "windings[0].section_shares[1]"),
])
def test_bad_section_shares_are_located(new, words, path):
    assert SPLIT in BH2210
    with pytest.raises(SpecError, match=words) as err:
        load_spec_text(BH2210.replace(SPLIT, SPLIT + new, 1), "x.yaml")
    assert err.value.path == path and err.value.line


def test_shares_on_a_winding_of_one_section_are_refused():
    text = BH2210.replace("    wire: auto-litz\n    start: \"11\"", "    section_shares: [1, 1]\n    wire: auto-litz\n"
                          "    start: \"11\"", 1)
    with pytest.raises(SpecError, match="one share per section") as err:
        load_spec_text(text, "x.yaml")
    assert err.value.path == "windings[1].section_shares"


def test_tap_voltage_over_the_input_range():
    # Faraday: a tap at turn k of N gives k / N of the winding's voltage, which follows the input from the
    # primary's nominal 240 V to its voltage_max 254 V; a secondary's at full load
    text = TAPPED.replace(
        "  - {name: S, role: secondary, voltage: 24 V, current: 2 A, wire: auto, start: \"7\", finish: \"8\"}",
        "  - {name: S, role: secondary, voltage: 24 V, current: 2 A, wire: auto, start: \"7\", finish: \"8\",\n"
        "     taps: [{voltage: 12 V, pin: \"9\"}]}", 1)
    assert "taps: [{voltage: 12 V" in text
    d = design_text(text, "tapped.yaml", load_catalog(CATALOG))
    w = {x.name: x for x in d.windings}
    for t in d.taps:
        at = w[t.winding].voltage_v * t.turn / w[t.winding].turns
        assert t.range_v == pytest.approx((at, at * 254.0 / 240.0), rel=1e-12)
    s_tap = next(t for t in d.taps if t.winding == "S")
    assert s_tap.range_v[1] > s_tap.range_v[0] > 11.5
    assert d.to_dict()["windings"][1]["taps"][0]["range_v"] == pytest.approx(list(s_tap.range_v))
    from specgen.report import design_report

    assert "over the input range" in design_report(d)
