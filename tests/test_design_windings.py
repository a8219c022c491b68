"""Several primaries with their connections, and the loads secondaries feed (centre-tapped, bridge).

References named beside each check: Faraday's law (B_pk = V / (4.44 f N Ae) for a sine), the alternate
conduction of centre-tapped halves (Mohan, Undeland, Robbins, "Power Electronics", 3rd ed., ch. 10, from
memory), Schade's capacitor-input rectifier (Proc. IRE 31(7) 1943).
"""

from __future__ import annotations

import math
from pathlib import Path

import pytest

from specgen.api import design_file
from specgen.design.spec import load_spec_text
from specgen.errors import SpecError

ROOT = Path(__file__).resolve().parent.parent
CATALOG = ROOT / "catalog"
DUAL = ROOT / "specgen" / "demo" / "BH-1240.yaml"
CENTRE = ROOT / "specgen" / "demo" / "BH-2260.yaml"


@pytest.fixture(scope="module")
def dual():
    return design_file(DUAL, CATALOG)


@pytest.fixture(scope="module")
def centre():
    return design_file(CENTRE, CATALOG)


def _w(d, name):
    return next(w for w in d.windings if w.name == name)


def test_dual_primary_designs_with_equal_halves(dual):
    # formerly refused ("a transformer needs exactly one primary winding"); the sections workaround gave
    # 367/366 halves on one tie pin
    p1, p2 = _w(dual, "P1"), _w(dual, "P2")
    assert p1.turns == p2.turns
    assert p1.current_a == pytest.approx(p2.current_a, rel=1e-12)
    assert not dual.failed


def test_flux_per_connection_by_faraday(dual):
    # Faraday, sine: B_pk = V_half / (4.44 f N Ae); parallel puts the mains across each half, series half of it
    p1 = _w(dual, "P1")
    by = {c.name: c for c in dual.connections}
    for name, half in (("120 V", 120.0), ("240 V", 120.0)):
        c = by[name]
        assert c.half_voltage_v == pytest.approx(half)
        want = half / (math.sqrt(2) * math.pi * 60.0 * p1.turns * dual.core.ae_m2)
        assert c.b_peak_t == pytest.approx(want, rel=1e-9)
        assert c.b_peak_max_t == pytest.approx(want * 132.0 / 120.0, rel=1e-9)
    assert sum(c.worst for c in dual.connections) == 1
    assert by["240 V"].links == (("2", "3"),)
    assert set(by["120 V"].links) == {("1", "3"), ("2", "4")}


def test_per_half_tests(dual):
    t = dual.tests
    assert {lim.item for lim in t.dcr} >= {"P1", "P2"}
    ratio = next(lim for lim in t.ratio if lim.item == "P1:P2")
    assert ratio.nominal == pytest.approx(1.0)
    assert any("P2 pin" in p for p in t.polarity)


def test_dual_primary_json_keys(dual):
    out = dual.to_dict()
    c = {x["name"]: x for x in out["connections"]}
    assert c["240 V"]["series"] == ["P1", "P2"] and c["120 V"]["parallel"] == ["P1", "P2"]
    assert c["120 V"]["mains_voltage_v"] == 120.0 and "b_peak_t" in c["120 V"]
    p1 = next(w for w in out["windings"] if w["name"] == "P1")
    assert p1["connection"] == ["120 V", "240 V"]


def test_centre_tapped_halves_have_equal_fr_and_alternate_rms(centre):
    # halves conduct alternately: each carries I_dc at duty 0.5, rms I_dc / sqrt 2 (Mohan et al., ch. 10)
    s1, s2 = _w(centre, "S1"), _w(centre, "S2")
    assert s1.current_a == pytest.approx(10.0 / math.sqrt(2.0), rel=1e-12)
    assert s1.fr == pytest.approx(s2.fr, rel=0.02)
    out = {w["name"]: w for w in centre.to_dict()["windings"]}
    assert out["S1"]["load"] == "centre_tapped"
    assert out["S1"]["form_factor"] == pytest.approx(1 / math.sqrt(2.0), rel=1e-12)
    assert "Mohan" in out["S1"]["form_factor_source"]


def test_centre_tapped_as_two_simultaneous_windings_was_unequal():
    # the regression: without the declared load both halves conduct at once and the outer half sees the
    # MMF of both: unequal Fr (12.7 against 2.8 on the reported part)
    text = CENTRE.read_text(encoding="utf-8")
    text = "\n".join(line for line in text.splitlines() if "load:" not in line)
    spec = load_spec_text(text, "ct-simultaneous.yaml")
    from specgen.catalog.loader import load_catalog
    from specgen.design.pipeline import design

    d = design(spec, load_catalog(CATALOG))
    frs = sorted(_w(d, n).fr for n in ("S1", "S2"))
    assert frs[1] / frs[0] > 2.0


def test_bridge_capacitor_load_raises_rms_by_its_form_factor():
    text = DUAL.read_text(encoding="utf-8").replace(
        "    current: 1.6 A\n    wire: auto\n    start: \"7\"",
        "    current: 1.6 A\n    load: {type: bridge_capacitor, capacitance: 4700 uF}\n    wire: auto\n    start: \"7\"", 1)
    spec = load_spec_text(text, "bridge.yaml")
    from specgen.catalog.loader import load_catalog
    from specgen.design.pipeline import design

    d = design(spec, load_catalog(CATALOG))
    s1 = _w(d, "S1")
    ld = next(x for x in d.loads if x.winding == "S1")
    # Schade: a capacitor-input bridge draws 1.6 to 2.5 times its DC current as rms (common practice range)
    assert 1.6 <= ld.form_factor <= 2.5
    assert s1.current_a == pytest.approx(1.6 * ld.form_factor, rel=1e-12)
    assert "Schade" in ld.source
    # the primary carries the reflected peaky current: more than the resistive part's
    resistive = design_file(DUAL, CATALOG)
    assert _w(d, "P1").current_a > _w(resistive, "P1").current_a


BAD = [
    ("links: [\"2-3\"]", "links: [\"2-5\"]", "2-5", "connections[1].links[0]", "no primary in this connection"),
    ("links: [\"2-3\"]", "links: [\"1-4\"]", "1-4", "connections[1].links", "does not close"),
    ("    mains_voltage: 240 V", "    mains_voltage: 230 V", "230 V", "connections[1].mains_voltage", "not the 230 V"),
]


@pytest.mark.parametrize("old,new,where,path,words", BAD)
def test_bad_connections_are_located(old, new, where, path, words):
    text = DUAL.read_text(encoding="utf-8")
    assert old in text
    text = text.replace(old, new, 1)
    with pytest.raises(SpecError) as err:
        load_spec_text(text, "bad.yaml")
    e = err.value
    line = next(i for i, t in enumerate(text.splitlines(), 1) if where in t)
    assert e.path == path and words in str(e)
    assert e.line == line or (e.line is not None and abs(e.line - line) <= 1)


def test_halves_with_different_turns_cannot_be_paralleled():
    text = DUAL.read_text(encoding="utf-8").replace("    start: \"3\"", "    turns: 300\n    start: \"3\"", 1)
    with pytest.raises(SpecError, match="different fixed turns") as err:
        load_spec_text(text, "bad.yaml")
    assert err.value.path == "connections[0].parallel"


def test_load_on_a_primary_is_refused():
    text = DUAL.read_text(encoding="utf-8").replace("    start: \"1\"", "    load: resistive\n    start: \"1\"", 1)
    with pytest.raises(SpecError, match="draws no load") as err:
        load_spec_text(text, "bad.yaml")
    assert err.value.path == "windings[0].load"
    assert err.value.line == next(i for i, t in enumerate(text.splitlines(), 1) if "load: resistive" in t)


def test_several_primaries_need_connections():
    text = DUAL.read_text(encoding="utf-8")
    text = text[:text.index("connections:")] + text[text.index("insulation:"):]
    with pytest.raises(SpecError, match="needs 'connections'"):
        load_spec_text(text, "bad.yaml")
