"""Powder cores in the design: flux density from the DC-bias curve's integral, a saturation check that can fire,
and the inductance at the peak current against a minimum the spec may state.

References: the DC-bias curve is the incremental permeability, mu_inc(H) = mu0 mu_i f(H) with the powder makers'
common curve form f = 1 / (1 + (H / H_half)^n) (common practice), so B(H) = mu0 mu_i int_0^H f dh (definition of
incremental permeability, IEC 60050-221), here by scipy.integrate.quad, and the flux it tends to as H grows is the
same integral to infinity. The incremental inductance at a current is mu0 mu_i f(N I / l_e) N^2 A_e / l_e (IEC
60205 effective parameters).

The defects these guard: B was mu0 mu_i f(H) H, which peaks and falls, so the highest B a powder part could report
was 0.17 to 0.30 T against limits of 0.77 to 1.2 T (the saturation check could never fire) and an over-biased part
reported less flux at its peak current than at DC.
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest
from scipy import constants, integrate

from specgen.api import design_file
from specgen.catalog.loader import load_catalog
from specgen.present import si_set

DEMO = Path(__file__).resolve().parent.parent / "specgen" / "demo" / "BH-5018.yaml"


@pytest.fixture(scope="module")
def cat():
    return load_catalog(None)


def _variant(tmp_path, name, *edits):
    text = DEMO.read_text(encoding="utf-8")
    for old, new in edits:
        assert old in text, old
        text = text.replace(old, new, 1)
    path = tmp_path / f"{name}.yaml"
    path.write_text(text, encoding="utf-8")
    return path


OVER_BIASED = (("  inductance: 250 uH          # at full DC current", "  inductance: 30 uH"),
               ("  current: 3 A", "  current: 12 A\n  current_peak: 20 A"), ("    wire: auto", "    wire: auto\n    turns: 60"))


def _curve(cat, d):
    mat = cat.materials[cat.cores[d.core.id].material]
    half, n = mat.dc_bias_half_field_a_m, mat.dc_bias_steepness
    return mat, (lambda h: 1.0 / (1.0 + (h / half) ** n))


def _b(mat, f, h):
    return constants.mu_0 * mat.mu_initial * integrate.quad(f, 0.0, h, epsabs=0.0, epsrel=1e-12, limit=200)[0]


def test_over_biased_part_flux_rises_with_current_and_saturates(tmp_path, cat):
    d = design_file(_variant(tmp_path, "over", *OVER_BIASED), cat=cat)
    mat, f = _curve(cat, d)
    ind = d.inductor
    n, le = d.windings[0].turns, d.core.le_m
    assert ind.b_dc_t == pytest.approx(_b(mat, f, n * ind.current_dc_a / le), rel=1e-8)
    assert d.b_peak_max_t == pytest.approx(_b(mat, f, n * ind.current_peak_a / le), rel=1e-8)
    assert d.b_peak_max_t > d.b_peak_t > ind.b_dc_t          # more current, more flux (it was the other way)
    # the curve's ceiling, the integral to infinity; the part counts as saturated at the shop's 80 % of it
    ceiling = constants.mu_0 * mat.mu_initial * integrate.quad(f, 0.0, math.inf, epsrel=1e-12)[0]
    sat_at = 0.8 * min(ceiling, d.b_sat_hot_t)
    assert d.b_limit_t == pytest.approx(sat_at, rel=1e-8)
    assert d.b_peak_max_t > sat_at
    (sat,) = [c for c in d.checks if c.code == "saturation"]
    assert sat.level == "fail" and "saturated" in sat.message


def test_demo_part_is_below_its_saturation(cat):
    d = design_file(DEMO, cat=cat)
    mat, f = _curve(cat, d)
    n, le, ind = d.windings[0].turns, d.core.le_m, d.inductor
    assert d.b_peak_t == pytest.approx(_b(mat, f, n * (ind.current_dc_a + ind.ripple_a / 2) / le), rel=1e-8)
    (sat,) = [c for c in d.checks if c.code == "saturation"]
    assert sat.level == "pass" and d.b_peak_max_t < d.b_limit_t


@pytest.mark.parametrize("minimum_uh, level", [(40, "fail"), (25, "pass")])
def test_inductance_min_at_the_peak_current(tmp_path, cat, minimum_uh, level):
    path = _variant(tmp_path, f"min{minimum_uh}", *OVER_BIASED[:2],
                    ("  current_peak: 20 A", f"  current_peak: 20 A\n  inductance_min: {minimum_uh} uH"),
                    OVER_BIASED[2])
    d = design_file(path, cat=cat)
    mat, f = _curve(cat, d)
    n, ae, le = d.windings[0].turns, d.core.ae_m2, d.core.le_m
    want = constants.mu_0 * mat.mu_initial * f(n * 20.0 / le) * n * n * ae / le
    assert d.inductor.inductance_at_peak_h == pytest.approx(want, rel=1e-8)
    assert d.inductor.inductance_min_h == pytest.approx(minimum_uh * 1e-6)
    (chk,) = [c for c in d.checks if c.code == "inductance-at-peak"]
    assert chk.level == level
    got_text, need_text = si_set([d.inductor.inductance_at_peak_h, minimum_uh * 1e-6], "H")   # the one formatter
    assert chk.message.startswith(f"L {got_text} at the peak current 20.0 A") and need_text in chk.message
    (limit,) = [t for t in d.tests.inductance if t.name.startswith("inductance at 20 A")]
    assert limit.low == pytest.approx(minimum_uh * 1e-6) and limit.nominal == pytest.approx(want, rel=1e-8)
    data = json.loads(json.dumps(d.to_dict()))
    assert data["inductance_at_peak_h"] == pytest.approx(want, rel=1e-8)
    assert data["inductance_min_h"] == pytest.approx(minimum_uh * 1e-6)


def test_ac_reactor_on_powder_at_the_line_peak(tmp_path, cat):
    """An AC (or PFC) choke's worst point is the line peak, sqrt 2 x the rms current: the inductance there."""
    path = _variant(tmp_path, "ac", ("  inductance: 250 uH          # at full DC current\n", ""),
                    ("  current: 3 A\n  ripple: 0.6 A\n", "  voltage_drop: 2 V\n  current: 3 A\n"))
    d = design_file(path, cat=cat)
    mat, f = _curve(cat, d)
    n, ae, le = d.windings[0].turns, d.core.ae_m2, d.core.le_m
    assert d.inductor.current_peak_a == pytest.approx(math.sqrt(2) * 3.0)
    want = constants.mu_0 * mat.mu_initial * f(n * math.sqrt(2) * 3.0 / le) * n * n * ae / le
    assert d.inductor.inductance_at_peak_h == pytest.approx(want, rel=1e-8)
    assert d.b_peak_max_t == pytest.approx(_b(mat, f, n * math.sqrt(2) * 3.0 / le), rel=1e-8)


def test_gapped_core_peak_inductance_is_the_built_one(cat):
    d = design_file(DEMO.parent / "BH-3305.yaml", cat=cat)
    assert d.inductor.inductance_at_peak_h == d.inductor.inductance_h and d.inductor.inductance_min_h is None
    assert not any(c.code == "inductance-at-peak" for c in d.checks)


def test_saturation_fraction_is_the_shops_setting(tmp_path, cat):
    """The 80 % is the shop's choice (``powder_saturation_fraction`` in shop.yaml, common practice), not a constant:
    a shop that sets 0.6 gets 60 % of the curve's ceiling as its limit, in the design and its flux-limit basis."""
    import dataclasses

    from specgen.catalog.loader import load_catalog as load

    strict = dataclasses.replace(cat, shop=dataclasses.replace(cat.shop, powder_saturation_fraction=0.6))
    d = design_file(_variant(tmp_path, "over", *OVER_BIASED), cat=strict)
    mat, f = _curve(cat, d)
    ceiling = constants.mu_0 * mat.mu_initial * integrate.quad(f, 0.0, math.inf, epsrel=1e-12)[0]
    assert d.b_limit_t == pytest.approx(0.6 * min(ceiling, d.b_sat_hot_t), rel=1e-8)
    assert d.b_limit_basis.startswith("60% of the") and "powder_saturation_fraction" in d.b_limit_basis
    assert load(None).shop.powder_saturation_fraction == 0.8    # the demo shop's setting


def test_ac_reactor_that_cannot_be_reached_names_its_line_peak(tmp_path, cat):
    """An AC reactor's powder turns are sized at the line peak (sqrt 2 x rms, ``kernel.powder_sizing_currents_a``);
    the refusal names that current (it said '0 A', the reactor's DC bias)."""
    from specgen.errors import SpecError

    path = _variant(tmp_path, "ac-far", ("  inductance: 250 uH          # at full DC current\n", ""),
                    ("  current: 3 A\n  ripple: 0.6 A\n", "  voltage_drop: 20 kV\n  current: 3 A\n"))
    with pytest.raises(SpecError) as err:
        design_file(path, cat=cat)
    assert f"at {math.sqrt(2) * 3.0:g} A:" in str(err.value) and "at 0 A" not in str(err.value)
