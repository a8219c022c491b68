"""`specgen design` through its console entry point: the stable --json keys (issues 3 and 4), exit codes
0 / 1 / 2 (design notes: conventions), and no WeasyPrint import on this path (design notes: imports)."""

from __future__ import annotations

import json
import math
import subprocess
import sys
from pathlib import Path

import pytest

from specgen.api import demo_specs

SPECS = Path(__file__).parent / "specs"
DEMOS = {p.stem: p for p in demo_specs()}

TOP = {"part", "revision", "kind", "frequency_hz", "waveform", "b_peak_t", "b_peak_max_t", "b_sat_hot_t",
       "core", "windings", "build", "losses", "hot_spot_c", "temperature_rise_k", "efficiency",
       "regulation_pct", "checks"}
CORE = {"id", "ae_mm2", "le_mm", "ve_mm3", "wa_mm2"}
WINDING = {"name", "role", "turns", "voltage_v", "current_a", "wire", "strands", "copper_area_mm2", "layers",
           "turns_per_layer", "length_m", "mass_g", "dcr_20c_ohm", "dcr_hot_ohm", "current_density_a_mm2"}
BUILD = {"height_mm", "available_mm", "ku", "fits"}
LOSSES = {"copper_w", "core_w", "total_w"}
CHECK = {"level", "code", "message"}
CURRENT_TRANSFORMER = {"ratio", "burden_ohm", "ratio_error_pct", "phase_error_deg", "knee_burden_ohm"}
COMMON_MODE_CHOKE = {"common_mode_inductance_h", "differential_inductance_h", "lines", "b_cm_peak_t", "b_dm_peak_t"}
FLYBACK = {"inductance_h", "gap_mm", "mode", "duty_max", "reflected_voltage_v", "delta_b_t", "leakage_inductance_h"}
INDUCTOR = {"inductance_h", "inductance_at_full_bias_h", "gap_mm", "gap_arrangement", "al_nh", "energy_j",
            "h_dc_a_m", "bias_drop_pct"}


def _specgen(*args, cwd=None):
    return subprocess.run([sys.executable, "-c", "from specgen.cli import main; main()", *args],
                          cwd=cwd, capture_output=True, text=True, timeout=120)


@pytest.fixture(scope="module")
def outputs():
    out = {}
    for name, path in DEMOS.items():
        r = _specgen("design", str(path), "--json")
        out[name] = r
    return out


def _number(x) -> bool:
    return isinstance(x, (int, float)) and not isinstance(x, bool) and math.isfinite(x)


@pytest.mark.parametrize("part", sorted(DEMOS))
def test_json_keys_are_stable(outputs, part):
    r = outputs[part]
    assert r.returncode in (0, 1), r.stderr
    data = json.loads(r.stdout)
    assert TOP <= data.keys(), TOP - data.keys()
    assert data["part"] == part
    assert data["kind"] in ("transformer", "inductor", "current_transformer", "flyback", "common_mode_choke")
    if data["kind"] == "common_mode_choke":     # issue 17's keys, one winding per line
        assert COMMON_MODE_CHOKE <= data.keys(), COMMON_MODE_CHOKE - data.keys()
        assert len(data["windings"]) == data["lines"]
    if data["kind"] == "flyback":
        assert FLYBACK <= data.keys(), FLYBACK - data.keys()
        assert all(_number(w["peak_current_a"]) and _number(w["rms_current_a"]) for w in data["windings"])
    if data["kind"] == "current_transformer":
        assert CURRENT_TRANSFORMER <= data.keys(), CURRENT_TRANSFORMER - data.keys()
    assert CORE <= data["core"].keys()
    assert all(_number(data["core"][k]) for k in CORE - {"id"})
    assert data["windings"]
    for w in data["windings"]:
        assert WINDING <= w.keys(), WINDING - w.keys()
        for k in ("turns", "strands", "copper_area_mm2", "layers", "turns_per_layer", "length_m", "mass_g",
                  "dcr_20c_ohm", "dcr_hot_ohm", "current_density_a_mm2", "current_a"):
            assert _number(w[k]), (w["name"], k, w[k])
        assert isinstance(w["turns"], int) and w["turns"] >= 1
    assert BUILD <= data["build"].keys() and isinstance(data["build"]["fits"], bool)
    assert LOSSES <= data["losses"].keys()
    assert data["losses"]["total_w"] == pytest.approx(data["losses"]["copper_w"] + data["losses"]["core_w"])
    for k in ("frequency_hz", "b_peak_t", "b_peak_max_t", "b_sat_hot_t", "hot_spot_c", "temperature_rise_k"):
        assert _number(data[k]), k
    assert data["checks"]
    for c in data["checks"]:
        assert CHECK <= c.keys() and c["level"] in ("pass", "warn", "fail") and c["message"]
    if data["kind"] == "inductor":
        assert INDUCTOR <= data.keys(), INDUCTOR - data.keys()
        assert data["efficiency"] is None and data["regulation_pct"] is None
    elif data["kind"] == "transformer":
        assert _number(data["efficiency"]) and 0 < data["efficiency"] < 1
        assert _number(data["regulation_pct"])
    # exit code follows the checks: 1 when any fails, else 0
    assert r.returncode == (1 if any(c["level"] == "fail" for c in data["checks"]) else 0)


def test_inductor_json_values(outputs):
    gapped = json.loads(outputs["BH-3305"].stdout)
    powder = json.loads(outputs["BH-5018"].stdout)
    assert gapped["gap_mm"] > 0 and gapped["gap_arrangement"] in ("centre", "spacer")
    assert powder["gap_mm"] is None and powder["gap_arrangement"] == "none"
    assert powder["bias_drop_pct"] > 0 and gapped["bias_drop_pct"] == 0
    # the JSON is in the units its key names: mm, mm^2, nH (A_L = L / N^2)
    n = gapped["windings"][0]["turns"]
    assert gapped["al_nh"] == pytest.approx(gapped["inductance_h"] / n ** 2 * 1e9, rel=1e-9)


@pytest.mark.parametrize("part", sorted(DEMOS))
def test_demo_parts_pass(outputs, part):
    # the shipped demo parts are meant to be good designs: exit 0
    assert outputs[part].returncode == 0, [c for c in json.loads(outputs[part].stdout)["checks"]
                                           if c["level"] == "fail"]


def test_failed_check_exits_1(tmp_path):
    text = DEMOS["BH-1042"].read_text(encoding="utf-8")
    assert "    voltage_max: 253 V" in text
    (tmp_path / "sat.yaml").write_text(text.replace("    voltage_max: 253 V", "    voltage_max: 253 V\n    turns: 300", 1),
                                       encoding="utf-8")
    r = _specgen("design", "sat.yaml", "--json", cwd=tmp_path)
    assert r.returncode == 1, r.stderr
    data = json.loads(r.stdout)                  # the whole result is still printed
    assert any(c["level"] == "fail" and c["code"] == "saturation" for c in data["checks"])
    text_run = _specgen("design", "sat.yaml", cwd=tmp_path)
    assert text_run.returncode == 1 and "saturation" in text_run.stdout and "Traceback" not in text_run.stderr


def test_bad_input_exits_2(tmp_path):
    text = (SPECS / "build-ei50.yaml").read_text(encoding="utf-8").replace("voltage: 18 V", "voltage: 50 Hz")
    (tmp_path / "bad.yaml").write_text(text, encoding="utf-8")
    for extra in ((), ("--json",)):
        r = _specgen("design", "bad.yaml", *extra, cwd=tmp_path)
        assert r.returncode == 2 and r.stdout == "" and "Traceback" not in r.stderr


def test_text_report_has_the_tables():
    r = _specgen("design", str(SPECS / "build-ei50.yaml"))
    assert r.returncode == 0, r.stderr
    for heading in ("turns", "wire", "layers", "DCR", "Checks"):
        assert heading in r.stdout


def test_design_does_not_import_weasyprint():
    script = (
        "import atexit, sys\n"
        "atexit.register(lambda: sys.__stderr__.write('WEASYPRINT=%s\\n' % ('weasyprint' in sys.modules)))\n"
        f"sys.argv = ['specgen', 'design', {str(DEMOS['BH-1042'])!r}, '--json']\n"
        "from specgen.cli import main\n"
        "main()\n"
    )
    r = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True, timeout=120)
    assert "WEASYPRINT=False" in r.stderr, r.stderr


# A unit slip (kV for V, H for uH, ...) makes a hopeless design, not a crash: it must end as failed checks
# (exit 1) or a located one-line error (exit 2), never a traceback (design notes: errors).
RUNAWAY = [
    ("18 kV on an 18 V part", SPECS / "build-ei50.yaml", "voltage: 18 V", "voltage: 18 kV"),
    ("1 MA secondary", SPECS / "build-ei50.yaml", "current: 0.5 A", "current: 1e6 A"),
    ("47 H choke", DEMOS["BH-3305"], "inductance: 47 uH", "inductance: 47 H"),
    ("100 A ripple", DEMOS["BH-3305"], "ripple: 2.4 A", "ripple: 100 A"),
    ("20000 turns on a choke", DEMOS["BH-3305"], "    strands: 2\n", "    strands: 2\n    turns: 20000\n"),
    ("powder choke at 50 MHz", DEMOS["BH-5018"], "frequency: 50 kHz", "frequency: 50 MHz"),
]


@pytest.mark.parametrize("what, spec, old, new", RUNAWAY, ids=[r[0] for r in RUNAWAY])
def test_runaway_design_fails_cleanly(tmp_path, what, spec, old, new):
    text = Path(spec).read_text(encoding="utf-8")
    assert old in text
    (tmp_path / "slip.yaml").write_text(text.replace(old, new, 1), encoding="utf-8")
    r = _specgen("design", "slip.yaml", cwd=tmp_path)
    assert "Traceback" not in r.stderr
    assert r.returncode in (1, 2)
    if r.returncode == 2:
        assert len(r.stderr.splitlines()) == 1
