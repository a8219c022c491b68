"""A design that leaves the physical range ends in a located one-line reason (exit 1), never an absurd figure.

The ranges (``specgen.design.bounds.RANGE``) rest on published limits: copper wire fuses within seconds well below
100 A/mm^2 (Onderdonk's fusing relation; from memory); IEC 60085's highest thermal class is 250 degC; no soft
magnetic material saturates above about 2.4 T (cobalt iron; from memory).
"""

from __future__ import annotations

import json
import subprocess
import sys

import pytest

from specgen.api import design_text
from specgen.catalog.loader import load_catalog
from specgen.design import bounds
from specgen.errors import DesignOutOfRange, SpecError

# a 1:100 current transformer with a 10 ohm burden written as a plain transformer: 2 A into 10 ohm is 20 V,
# the primary one turn at 0.2 V
CT_AS_TRANSFORMER = """
part: BH-T193
title: current-transformer-like 1:100 into 10 ohm
kind: transformer
core: {id: T-NANO-25X16X10}
operating: {frequency: 50 Hz, waveform: sine, ambient: 25 degC, insulation_class: 130}
windings:
  - {name: P, role: primary, voltage: 0.2 V, turns: 1, wire: CU-1.60-G2, start: "1", finish: "2"}
  - {name: S, role: secondary, voltage: 20 V, current: 2 A, wire: auto, start: "3", finish: "4"}
"""


@pytest.fixture(scope="module")
def cat():
    return load_catalog(None)


def test_ct_as_transformer_ends_in_a_located_reason_not_an_absurd_loss(cat):
    """Before: 3.65e4 A in the one-turn primary, 1.37e7 W of copper loss and a 1010 degC hot spot, printed
    as a failing design."""
    with pytest.raises(DesignOutOfRange) as err:
        design_text(CT_AS_TRANSFORMER, "ct.yaml", cat)
    msg = str(err.value)
    assert msg.startswith("ct.yaml:") and "windings[0]" in msg and "\n" not in msg
    assert "cannot be built" in msg
    assert err.value.exit_code == 1 and isinstance(err.value, SpecError)


def test_ct_as_transformer_exits_1_with_one_line_and_no_json(tmp_path):
    spec = tmp_path / "ct.yaml"
    spec.write_text(CT_AS_TRANSFORMER)
    for extra in ([], ["--json"]):
        run = subprocess.run([sys.executable, "-c", "from specgen.cli import main; main()", "design", str(spec), *extra],
                             capture_output=True, text=True, timeout=120)
        assert run.returncode == 1, run.stderr
        assert run.stdout == "" and run.stderr.count("\n") == 1 and "ct.yaml:" in run.stderr


def test_sanity_ranges_lie_beyond_every_demo_design(cat):
    """The ranges never refuse a design a shop could build: every golden part is well inside them."""
    from tests.golden_parts import golden_designs

    for name, data in golden_designs():
        assert data["hot_spot_c"] < bounds.HOTTEST_C, name
        assert data["b_peak_max_t"] < bounds.RANGE["flux_density"][1], name
        for w in data["windings"]:
            assert w["current_a"] < bounds.RANGE["current"][1], name
            assert w["current_density_a_mm2"] * 1e6 < bounds.RANGE["current_density"][1], name
        assert not list(bounds.outside_range(data)), name


def test_a_failing_but_physical_design_still_reports(cat):
    """The sanity gate is not the checks: a part that runs too hot for its class (but not absurdly) still
    reports its figures and fails its temperature check."""
    text = """
part: BH-T194
title: toroid run hot
kind: transformer
core: {id: T-GO-60X35X20}
operating: {frequency: 50 Hz, waveform: sine, ambient: 120 degC, insulation_class: 130}
windings:
  - {name: P, role: primary, voltage: 230 V, wire: auto, start: "1", finish: "2"}
  - {name: S, role: secondary, voltage: 24 V, current: 1 A, wire: auto, start: "3", finish: "4"}
"""
    d = design_text(text, "hot.yaml", cat)
    assert d.hot_spot_c > 130.0 and any(c.code == "temperature" and c.level == "fail" for c in d.checks)
    json.dumps(d.to_dict(), allow_nan=False)


def test_one_table_bounds_every_result_by_its_unit_suffix():
    """``bounds.RANGE`` is the one table: a result beyond it is named by its path, whatever its nesting or
    the unit its key is written in (A/mm², mm, kW/m³); values inside it, and zeros, pass."""
    data = {"hot_spot_c": 450.0, "ambient_c": 40.0, "b_peak_t": 6.0, "b_limit_t": 0.3, "core": {"le_mm": 2e8, "ae_mm2": 97.0},
            "windings": [{"current_density_a_mm2": 150.0, "current_a": 0.0}, {"current_density_a_mm2": 4.0}],
            "losses": {"core_loss_density_kw_m3": 2e9}, "inductor": {"delta_b_t": 9.0}, "flyback": {"delta_b_t": 11.0}}
    found = {path for path, *_ in bounds.outside_range(data)}
    assert found == {"hot_spot_c", "b_peak_t", "core.le_mm", "windings[0].current_density_a_mm2",
                     "losses.core_loss_density_kw_m3", "flyback.delta_b_t"}     # a swing: twice the range
