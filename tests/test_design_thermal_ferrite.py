"""Thermal realism for ferrite: core loss with temperature, thermal runaway, the Curie point, a measured R_th.

References:
- S. A. Mulder, "Fit formulae for power loss in ferrites and their use in transformer design", Proc. PCIM
  1993: P_v = k f^alpha B^beta (ct0 - ct1 T + ct2 T^2), a loss minimum near the material's design
  temperature (from memory). The factor is checked here by hand from the catalogue's coefficients.
- The fixed point T = T_a + R_th P(T) and its stability R_th dP/dT < 1 (E. C. Snelling, Soft Ferrites, 2nd ed.,
  1988, thermal runaway of ferrite cores; from memory).
- R_th = dT / P, the definition of thermal resistance (Incropera and DeWitt, Fundamentals of Heat and Mass
  Transfer, ch. 3).
"""

from __future__ import annotations

import shutil
from dataclasses import replace
from pathlib import Path

import pytest

from specgen.api import design_file, design_text
from specgen.catalog.loader import load_catalog
from specgen.design import kernel as K
from specgen.errors import DesignOutOfRange, SpecError

DEMO = Path(__file__).resolve().parent.parent / "specgen" / "demo"
CATALOG = Path(__file__).resolve().parent.parent / "catalog"


@pytest.fixture(scope="module")
def cat():
    return load_catalog(None)


def _by_hand(t, ct0, ct1, ct2):
    """Mulder's quadratic normalised to its minimum ct0 - ct1^2 / (4 ct2), written out."""
    return (ct0 - ct1 * t + ct2 * t * t) / (ct0 - ct1 * ct1 / (4.0 * ct2))


def _with_turns(text: str, turns: int) -> str:
    return text.replace("    voltage: 200 V ", f"    turns: {turns}\n    voltage: 200 V ", 1)


def test_power_ferrites_carry_a_named_loss_temperature_fit(cat):
    for mid in ("FER-100K", "FER-300K", "FER-1M"):
        m = cat.materials[mid]
        assert m.loss_temperature is not None and "Mulder" in m.loss_temperature_source
        ct0, ct1, ct2 = m.loss_temperature
        # the minimum sits at the temperature the Steinmetz k was fitted at (100 degC in the catalogue)
        assert ct1 / (2 * ct2) == pytest.approx(100.0)
        assert _by_hand(25.0, *m.loss_temperature) > 1.5 and _by_hand(160.0, *m.loss_temperature) > 1.3


def test_the_core_loss_is_taken_at_the_core_temperature(cat):
    """BH-2210's core loss density is the iGSE value at its flux times F(T) at the settled winding temperature
    (before: F = 1 at every temperature)."""
    d = design_file(DEMO / "BH-2210.yaml", cat=cat)
    m = cat.materials["FER-100K"]
    base = K.core_loss_w_m3("square", d.frequency_hz, d.b_peak_t, d.duty, m.steinmetz_k, m.steinmetz_alpha,
                            m.steinmetz_beta)
    factor = _by_hand(d.winding_temp_c, *m.loss_temperature)
    assert factor > 1.01
    assert d.losses.core_loss_density_w_m3 == pytest.approx(base * factor, rel=1e-9)
    [c] = [c for c in d.checks if c.code == "thermal-runaway"]
    assert c.level == "pass" and "stability margin" in c.message


def test_thermal_runaway_ends_the_design_in_a_located_line(cat):
    """Fifteen primary turns on BH-2210 drive the ferrite so hard that its loss outgrows the cooling: no balance
    below the sanity range, a located one-line reason with exit 1 (before: a figure from the loop's clamp)."""
    text = (DEMO / "BH-2210.yaml").read_text()
    with pytest.raises(DesignOutOfRange) as err:
        design_text(_with_turns(text, 15), "hot.yaml", cat)
    assert "thermal runaway" in str(err.value) and str(err.value).startswith("hot.yaml:")
    assert err.value.exit_code == 1
    # one more turn settles, with a positive stability margin (R_th dP/dT < 1)
    d = design_text(_with_turns(text, 16), "ok.yaml", cat)
    temp_checks = [c for c in d.checks if c.code == "thermal-runaway"]
    assert temp_checks and float(temp_checks[0].message.rsplit("= ", 1)[1].split(":")[0]) > 0.0


def test_hot_spot_against_the_curie_point(cat):
    """The high-permeability ferrite of BH-6100 has its Curie point at 130 degC: a hot spot within 30 K of it
    warns, one beyond it fails (the catalogue's figure is read at last)."""
    text = (DEMO / "BH-6100.yaml").read_text()
    warm = design_text(text.replace("ambient: 55 degC", "ambient: 100 degC"), "warm.yaml", cat)
    assert 100.0 < warm.hot_spot_c < 130.0
    assert [c.level for c in warm.checks if c.code == "curie"] == ["warn"]
    hot = design_text(text.replace("ambient: 55 degC", "ambient: 125 degC"), "hot.yaml", cat)
    assert hot.hot_spot_c >= 130.0
    assert [c.level for c in hot.checks if c.code == "curie"] == ["fail"] and hot.failed
    cool = design_file(DEMO / "BH-6100.yaml", cat=cat)
    assert not [c for c in cool.checks if c.code == "curie"]


def test_a_measured_thermal_resistance_overrides_the_surface_rule(cat):
    """With the core's measured R_th in the catalogue the rise is P x R_th (natural convection)."""
    core = cat.cores["ETD-39-F100"]
    measured = replace(cat, cores={**cat.cores, core.id: replace(core, thermal_resistance_k_w=20.0)})
    d = design_file(DEMO / "BH-2210.yaml", cat=measured)
    assert d.temperature_rise_k == pytest.approx(d.losses.total_w * 20.0, rel=1e-3)
    plain = design_file(DEMO / "BH-2210.yaml", cat=cat)
    assert abs(plain.temperature_rise_k - plain.losses.total_w * 20.0) > 1.0


def test_catalogue_refuses_a_loss_fit_without_a_minimum(tmp_path):
    folder = tmp_path / "catalog"
    shutil.copytree(CATALOG, folder)
    path = folder / "materials.yaml"
    path.write_text(path.read_text().replace("      ct2: 1.6e-4\n", "      ct2: 0.0\n", 1))
    with pytest.raises(SpecError) as err:
        load_catalog(str(folder))
    assert "materials.yaml:" in str(err.value) and "loss_temperature" in str(err.value)
