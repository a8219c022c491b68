"""The station's commands: measured against predicted (table and --json), recall of a material lot, the
lot's CSV and PDF, and the CSV import; statistics checked against numpy, the PDF read back by pdftotext."""

from __future__ import annotations

import json
import random
import shutil
import subprocess

import numpy as np
import pytest
from station_helpers import make_lot
from typer.testing import CliRunner

from specgen.cli import app
from specgen.register import Register
from specgen.station.compare import Quantity, histogram_svg
from specgen.station.plan import judge, station_columns
from specgen.station.store import StationStore


def _fill(lot, offsets: dict[str, float], serials: range, seed: int = 7) -> dict[str, list[float]]:
    """Readings at 20 degC, each test at its nominal times (1 + offset + noise); returns what was stored."""
    rng = random.Random(seed)
    cols = [c for c in station_columns(lot.design) if c.kind in ("dcr", "value") and c.nominal]
    stored: dict[str, list[float]] = {c.key: [] for c in cols}
    with Register.open(lot.register) as reg:
        store = StationStore(reg)
        for serial in serials:
            verdicts = []
            for c in cols:
                value = c.nominal * (1 + offsets.get(c.key.split("/")[0], 0.0) + rng.gauss(0, 0.005))
                verdicts.append(judge(c, value, 20.0))
                stored[c.key].append(value)
            store.record_readings(lot.number, str(serial), verdicts, "tamsin")
    return stored


def _run(*args):
    return CliRunner().invoke(app, list(args))


@pytest.fixture
def lot(tmp_path):
    return make_lot(tmp_path, qty=30, users={"tamsin": "tester"})


def test_compare_json_agrees_with_numpy_and_flags_a_consistent_dcr_offset(lot):
    stored = _fill(lot, {"dcr": 0.08, "inductance": 0.02}, range(1, 21))
    r = _run("station", "compare", lot.design.part, "--json", "--register", lot.register, "--parts", str(lot.parts))
    assert r.exit_code == 0, r.output
    data = json.loads(r.output)
    by_key = {q["key"]: q for q in data["quantities"]}
    for key, values in stored.items():
        q = by_key[key]
        assert q["n"] == 20
        assert q["mean"] == pytest.approx(np.mean(values), rel=1e-12)
        assert q["spread"] == pytest.approx(np.std(values, ddof=1), rel=1e-9)     # sample standard deviation
        low, high = q["low"], q["high"]
        inside = sum(1 for v in values if (low is None or v >= low) and (high is None or v <= high))
        assert q["passed"] == inside
    dcr = [q for q in data["quantities"] if q["key"].startswith("dcr/")]
    assert all(q["consistent_offset"] and "bulge factor" in q["likely_input"] or "lead length" in q["likely_input"]
               for q in dcr)
    assert not any(q["consistent_offset"] for q in data["quantities"] if q["key"].startswith("inductance/"))
    assert len(data["flags"]) == len(dcr)


def test_compare_names_the_core_stock_for_an_inductance_offset(lot):
    _fill(lot, {"inductance": -0.09}, range(1, 11))
    r = _run("station", "compare", lot.design.part, "--register", lot.register, "--parts", str(lot.parts))
    assert r.exit_code == 0, r.output
    assert "open-circuit inductance P: the measured mean sits -9." in r.output
    assert "A_L of the core stock" in r.output


def test_histogram_marks_limits_prediction_and_mean_and_escapes_labels(lot):
    col = next(c for c in station_columns(lot.design) if c.kind == "dcr")
    q = Quantity(col.key, "<b>DCR</b>", col, (col.nominal,) * 3 + (col.nominal * 1.08,), 4, col.nominal * 1.02, 0.01,
                 col.nominal, col.low, col.high, 4, (), 0.005, False, None)
    svg = str(histogram_svg(q))
    assert svg.count("<rect") == 2 and "<b>" not in svg and "&lt;b&gt;" in svg
    for mark in ("low", "high", "predicted", "mean"):
        assert f">{mark}</text>" in svg


def test_where_used_answers_the_recall_question(lot, tmp_path):
    wire = next(m for m in lot.design.materials if m.kind == "wire")
    with Register.open(lot.register) as reg:
        StationStore(reg).record_material(lot.number, wire.id, "wire", "R-2291", "wren")
    _fill(lot, {}, range(1, 3))
    r = _run("station", "where-used", "R-2291", "--json", "--register", lot.register)
    assert r.exit_code == 0, r.output
    [order] = json.loads(r.output)["orders"]
    assert (order["number"], order["materials"], order["serials_tested"]) == (lot.number, [wire.id], ["1", "2"])
    r = _run("station", "where-used", "R-0000", "--register", lot.register)
    assert r.exit_code == 0 and "no work order recorded material lot R-0000" in r.output
    r = _run("orders", "where-used", "R-2291", "--material", "--register", lot.register)
    assert r.exit_code == 0 and r.output.startswith(lot.number) and "serials with records: 1, 2" in r.output


@pytest.mark.skipif(shutil.which("pdftotext") is None, reason="pdftotext (poppler-utils) not installed")
def test_pdf_report_has_a_row_per_piece(lot, tmp_path):
    _fill(lot, {}, range(1, 31))
    pdf = tmp_path / "report.pdf"
    r = _run("station", "export", lot.number, "--pdf", str(pdf), "--csv", str(tmp_path / "r.csv"),
             "--register", lot.register, "--parts", str(lot.parts))
    assert r.exit_code == 0, r.output
    text = subprocess.run(["pdftotext", "-layout", str(pdf), "-"], capture_output=True, text=True, check=True).stdout
    statuses = ("pass", "partial", "FAIL")
    rows = [line.split()[0] for line in text.splitlines() if line.strip() and line.split()[0].isdigit()
            and any(s in line for s in statuses)]
    assert rows == [str(i) for i in range(1, 31)]
    assert "partial" in text                  # the insulation and hipot columns were left empty
    assert "R20 = Rt / (1 + α (t − 20))" in text


def test_import_refuses_a_bad_file_with_its_line_and_stores_nothing(lot, tmp_path):
    dcr = next(c for c in station_columns(lot.design) if c.kind == "dcr")
    bad = tmp_path / "bench.csv"
    bad.write_text(f"serial,temp_c,{dcr.label}\n1,21,{dcr.nominal * dcr.shown_factor:.4g}\n99,21,1\n")
    r = _run("station", "import", lot.number, str(bad), "--by", "tamsin", "--register", lot.register,
             "--parts", str(lot.parts))
    assert r.exit_code == 2 and f"{bad}:3" in r.output and "serial '99'" in r.output
    with Register.open(lot.register) as reg:
        assert StationStore(reg).entries(lot.number) == []
    bad.write_text(f"serial,temp_c,{dcr.label}\n1,21,{dcr.nominal * dcr.shown_factor:.4g}\n")
    r = _run("station", "import", lot.number, str(bad), "--by", "tamsin", "--register", lot.register,
             "--parts", str(lot.parts))
    assert r.exit_code == 0 and "1 readings imported" in r.output
