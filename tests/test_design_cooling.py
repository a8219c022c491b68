"""Forced air and potting in the design: the rise follows the air speed the spec states (or the shop's default)
through the laminar flat-plate forced-convection correlation combined with still air (Incropera and DeWitt,
Fundamentals of Heat and Mass Transfer, from memory; ``tests/test_design_kernel.py`` checks the numbers against the
correlation by hand), and potting by the shop's stated factor with its source; every one named in the report.

The defect these guard: forced air was 0.6 x the still-air rise and potting 0.85, bare constants whatever the air.
"""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import pytest

from specgen.api import design_file
from specgen.catalog.loader import load_catalog
from specgen.design import kernel as K
from specgen.errors import SpecError

DEMO = Path(__file__).resolve().parent.parent / "specgen" / "demo"


@pytest.fixture(scope="module")
def cat():
    return load_catalog(None)


def _variant(tmp_path, base, name, cooling):
    text = (DEMO / base).read_text(encoding="utf-8")
    assert "  cooling: natural\n" in text
    text = text.replace("  cooling: natural\n", cooling, 1)
    path = tmp_path / f"{name}.yaml"
    path.write_text(text, encoding="utf-8")
    return path, text


def test_more_air_less_rise_and_the_rise_is_the_kernels(tmp_path, cat):
    rises = []
    for v in (0.5, 1.0, 3.0):
        path, _ = _variant(tmp_path, "BH-2210.yaml", f"v{v}", f"  cooling: forced\n  air_speed: {v} m/s\n")
        d = design_file(path, cat=cat)
        assert d.air_speed_m_s == pytest.approx(v) and f"{v:g} m/s (spec)" in d.rise_basis
        model = K.cooling_model("forced", v, cat.shop.cooling)
        surface = d.core.surface_area_m2
        assert d.temperature_rise_k == pytest.approx(
            float(K.temperature_rise_k(d.losses.total_w, surface, model, d.ambient_c)), abs=0.05)
        rises.append(d.temperature_rise_k)
    assert rises[0] > rises[1] > rises[2]
    still = design_file(DEMO / "BH-2210.yaml", cat=cat)
    assert still.air_speed_m_s is None and "still air" in still.rise_basis and "forced" not in still.rise_basis
    assert rises[0] < still.temperature_rise_k


def test_forced_air_without_a_speed_takes_the_shops(tmp_path, cat):
    path, _ = _variant(tmp_path, "BH-2210.yaml", "shop", "  cooling: forced\n")
    d = design_file(path, cat=cat)
    assert d.air_speed_m_s == cat.shop.cooling.air_speed_m_s and "(shop default)" in d.rise_basis
    data = json.loads(json.dumps(d.to_dict(), allow_nan=False))
    assert data["air_speed_m_s"] == cat.shop.cooling.air_speed_m_s and "flat-plate" in data["rise_basis"]


def test_potting_names_its_factor_and_source(tmp_path, cat):
    path, _ = _variant(tmp_path, "BH-2210.yaml", "potted", "  cooling: potted\n")
    d = design_file(path, cat=cat)
    f = cat.shop.cooling
    assert f"x {f.potted_rise_factor:g} potted" in d.rise_basis and f.potted_source in d.rise_basis
    assert d.air_speed_m_s is None


def test_air_speed_without_forced_air_is_a_located_error(tmp_path, cat):
    path, text = _variant(tmp_path, "BH-2210.yaml", "still", "  cooling: natural\n  air_speed: 2 m/s\n")
    with pytest.raises(SpecError) as err:
        design_file(path, cat=cat)
    line = next(i for i, t in enumerate(text.splitlines(), 1) if "air_speed" in t)
    assert f"still.yaml:{line}: operating.air_speed: " in str(err.value) and "cooling: forced" in str(err.value)


@pytest.mark.slow
def test_cli_reports_the_rise_basis_and_refuses_a_bad_speed(tmp_path):
    path, _ = _variant(tmp_path, "BH-2210.yaml", "fan", "  cooling: forced\n  air_speed: 2 m/s\n")
    run = subprocess.run([sys.executable, "-c", "from specgen.cli import main; main()", "design", str(path)],
                         capture_output=True, text=True, timeout=120)
    assert run.returncode in (0, 1) and "rise from" in run.stdout and "forced air at 2 m/s (spec)" in run.stdout
    bad, _ = _variant(tmp_path, "BH-2210.yaml", "gale", "  cooling: forced\n  air_speed: 90 m/s\n")
    run = subprocess.run([sys.executable, "-c", "from specgen.cli import main; main()", "design", str(bad)],
                         capture_output=True, text=True, timeout=120)
    assert run.returncode == 2 and "operating.air_speed" in run.stderr and "Traceback" not in run.stderr
