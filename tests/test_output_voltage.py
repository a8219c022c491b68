"""Output voltage as asked: every secondary's full-load voltage within its tolerance band, or a failing check.

The band is the spec's (or the shop's) requirement; the delivered voltage is checked here from the Design's own
turns by the ideal-transformer relation V_s,open = V_p N_s / N_p (Faraday's law, any electrical machines text)
and the band arithmetic asked (1 - minus) <= V <= asked (1 + plus). The search for a turn pair is checked
against a brute-force enumeration of whole turn counts (numpy).
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from specgen.api import design_file, design_text
from specgen.catalog.loader import load_catalog
from specgen.design import kernel as K
from specgen.errors import SpecError

SPECS = Path(__file__).resolve().parent / "specs"
TRANSFORMER_SPECS = sorted(p for p in SPECS.glob("*.yaml") if "kind: transformer" in p.read_text())


@pytest.fixture(scope="module")
def cat():
    return load_catalog(None)


def _within(asked: float, got: float, tol: tuple[float, float]) -> bool:
    return asked * (1 - tol[0]) - 1e-9 <= got <= asked * (1 + tol[1]) + 1e-9


def _check(d, name):
    return next(c for c in d.checks if c.code == "output-voltage" and f"winding {name}:" in c.message)


# -- the two parts that drifted: 13 V asked gave 15.0 V (old), 6 V asked on foil gave 8.0 V (old)
@pytest.mark.parametrize("spec,asked", [("pq26-100k-13v.yaml", 13.0), ("etd34-100k-foil-6v.yaml", 6.0)])
def test_low_turn_secondaries_meet_their_band(cat, spec, asked):
    d = design_file(SPECS / spec, cat=cat)
    p = next(w for w in d.windings if w.role == "primary")
    s = next(w for w in d.windings if w.role == "secondary")
    # Faraday: the open-circuit voltage is the turns ratio of the nominal primary voltage
    assert s.open_circuit_v == pytest.approx(p.voltage_v * s.turns / p.turns, rel=1e-12)
    assert _within(asked, s.voltage_v, (0.0, 0.03)), (s.voltage_v, p.turns, s.turns)
    assert s.voltage_v <= s.open_circuit_v          # a load only ever drops the voltage
    assert _check(d, "S").level == "pass"
    data = d.to_dict()["windings"][1]
    assert data["voltage_full_load_v"] == s.voltage_v and data["voltage_open_circuit_v"] == s.open_circuit_v
    assert data["voltage_error_pct"] == pytest.approx((s.voltage_v - asked) / asked * 100.0, rel=1e-12)
    assert data["voltage_tolerance_pct"] == [0.0, 3.0]


@pytest.mark.parametrize("path", TRANSFORMER_SPECS, ids=lambda p: p.stem)
def test_every_output_check_agrees_with_the_band(cat, path):
    """Across 50 Hz .. 100 kHz and EI, toroid, ETD, PQ cores: the check passes exactly when the band is met."""
    d = design_file(path, cat=cat)
    for w in d.windings:
        if w.role not in ("secondary", "auxiliary"):
            continue
        assert w.voltage_tolerance is not None and w.voltage_asked_v is not None
        ok = _within(w.voltage_asked_v, w.voltage_v, w.voltage_tolerance)
        assert (_check(d, w.name).level == "pass") == ok
        assert np.isfinite(w.voltage_v) and w.voltage_v > 0


BASE = """
part: BH-T190
title: output band test
kind: transformer
core: {{id: PQ-26.25-F100}}
operating: {{frequency: 100 kHz, waveform: square, ambient: 40 degC, insulation_class: 130}}
windings:
  - {{name: P, role: primary, voltage: 150 V, wire: auto, start: "1", finish: "2"{pturns}}}
  - {{name: S, role: secondary, voltage: 13 V, current: 3 A, wire: auto, start: "5", finish: "6"{stol}}}
"""


def test_fixed_primary_that_cannot_hold_the_band_fails_and_says_what_it_delivers(cat):
    # 30 primary turns: 5 V per turn, so 3 turns give 15 V and 2 give 10 V; neither is within 13 V -0/+3 %
    d = design_text(BASE.format(pturns=", turns: 30", stol=""), "band.yaml", cat)
    c = _check(d, "S")
    assert c.level == "fail"
    s = d.windings[1]
    assert f"{s.voltage_v:.3f} V at full load" in c.message and "13 V -0/+3 %" in c.message


def test_a_winding_tolerance_overrides_the_shops(cat):
    # +20 % accepts the first pair the flux limit gives; the default +3 % does not (see the test above)
    wide = design_text(BASE.format(pturns="", stol=", voltage_tolerance: {minus: 0 %, plus: 20 %}"), "w.yaml", cat)
    s = wide.windings[1]
    assert s.voltage_tolerance == (0.0, 0.2)
    assert _within(13.0, s.voltage_v, (0.0, 0.2)) and _check(wide, "S").level == "pass"


@pytest.mark.parametrize("where,text,key", [
    ("primary", '"1", finish: "2", voltage_tolerance: {minus: 0 %, plus: 3 %}', "windings[0].voltage_tolerance"),
    ("secondary", '"5", finish: "6", voltage_tolerance: {minus: 0 %, plus: 80 %}', "windings[1].voltage_tolerance.plus"),
    ("secondary", '"5", finish: "6", voltage_tolerance: {minus: 0 %, over: 3 %}', "windings[1].voltage_tolerance"),
])
def test_bad_tolerances_are_located_errors(cat, where, text, key):
    old = '"1", finish: "2"' if where == "primary" else '"5", finish: "6"'
    src = BASE.format(pturns="", stol="").replace(old, text)
    with pytest.raises(SpecError) as err:
        design_text(src, "bad.yaml", cat)
    assert key in str(err.value) and "bad.yaml:" in str(err.value)


def test_turns_within_matches_brute_force():
    """kernel.secondary_turns_within against enumerating every whole N_s (numpy), over many primaries."""
    rng = np.random.default_rng(7)
    for _ in range(300):
        vp, vs = rng.uniform(5, 400), rng.uniform(1, 60)
        npt = int(rng.integers(2, 200))
        drop, minus, plus = rng.uniform(0, 0.2), rng.uniform(0, 0.03), rng.uniform(0, 0.05)
        e = vp / npt * (1 - drop)
        ns = np.arange(1, 5000)
        ok = (ns * e >= vs * (1 - minus) * (1 - 1e-12)) & (ns * e <= vs * (1 + plus) * (1 + 1e-12))
        want = int(ns[ok][0]) if ok.any() else 0
        got = int(K.secondary_turns_within(npt, vp, vs, drop, minus, plus))
        assert got == want, (vp, vs, npt, drop, minus, plus)
    # rows: the same answers for an array of primary turns
    n = np.arange(10, 60)
    rows = K.secondary_turns_within(n, 150.0, 13.0, 0.01, 0.0, 0.03)
    assert [int(x) for x in rows] == [int(K.secondary_turns_within(int(k), 150.0, 13.0, 0.01, 0.0, 0.03)) for k in n]


def test_output_voltage_ok_is_the_band():
    assert K.output_voltage_ok(13.0, 13.0, 0.0, 0.03) and K.output_voltage_ok(13.0, 13.39, 0.0, 0.03)
    assert not K.output_voltage_ok(13.0, 12.99, 0.0, 0.03) and not K.output_voltage_ok(13.0, 13.4, 0.0, 0.03)
    assert list(K.output_voltage_ok(np.array([6.0, 6.2]), np.array([6.1, 6.1]), 0.0, 0.03)) == [True, False]


# -- bounded iterations and sanity: a requirement outside what the core can do ends in a located line
CT_LIKE = """
part: BH-T191
title: current-transformer-like 1:100 into 1 ohm
kind: transformer
core: {id: T-NANO-25X16X10}
operating: {frequency: 50 Hz, waveform: sine, ambient: 25 degC, insulation_class: 130}
windings:
  - {name: P, role: primary, voltage: 0.01 V, turns: 1, wire: CU-1.60-G2, start: "1", finish: "2"}
  - {name: S, role: secondary, voltage: 1 V, current: 1 A, wire: auto, start: "3", finish: "4"}
"""

OVERFILLED = """
part: BH-T192
title: a toroid asked for far more than its hole holds
kind: transformer
core: {id: T-GO-60X35X20}
operating: {frequency: 50 Hz, waveform: sine, ambient: 25 degC, insulation_class: 130}
windings:
  - {name: P, role: primary, voltage: 230 V, wire: auto, start: "1", finish: "2"}
  - {name: S, role: secondary, voltage: 24 V, current: 8 A, wire: auto, start: "3", finish: "4"}
"""


def test_a_load_the_primary_cannot_carry_is_a_located_error_not_a_runaway(cat):
    # old: the secondary turns ran away to 8.5e16 A and the report printed 'inf W'
    with pytest.raises(SpecError) as err:
        design_text(CT_LIKE, "ct.yaml", cat)
    msg = str(err.value)
    assert msg.startswith("ct.yaml:") and "windings[0].voltage" in msg and "resistance drop" in msg


def test_an_overfilled_toroid_reports_only_finite_physical_numbers(cat):
    import json
    import math

    d = design_text(OVERFILLED, "over.yaml", cat)
    assert d.failed                                    # it does not fit: the fit check fails
    text = json.dumps(d.to_dict(), allow_nan=False)   # raises on NaN or inf
    assert d.build.hole_m is not None and d.build.hole_m >= 0.0
    assert math.isfinite(d.build.fill_fraction)
    c = _check(d, "S")
    assert c.level == "fail" and ("not known" in c.message or "V at full load" in c.message)
    assert "nan" not in text.lower() and "infinity" not in text.lower()
    from specgen.report import design_report

    report = design_report(d)                         # old: a traceback on the unknown full-load voltage
    assert "nan" not in report and "inf W" not in report
