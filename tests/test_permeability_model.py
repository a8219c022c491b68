"""One permeability per material, the warning where the core sets the inductance, and a spacer's fringing per gap.

References: McLyman, Transformer and Inductor Design Handbook (gapped inductor L = mu0 N^2 A_e F / (l_g + l_e / mu_r)
and its fringing factor F = 1 + (l_g / sqrt(A_e)) ln(2 G / l_g), for one gap; written out again here with pint and
scipy.constants.mu_0); the reluctances of gaps in series add (any magnetic-circuit text), so a spacer under every
leg of an E-I set, which the flux crosses twice, is two gaps of half the total, each fringing on its own.

The defects these guard: the AC-reactor path took the steel's initial permeability (600) while the transformer
path took its amplitude permeability (2000), so the same core and gap gave inductances 126 % apart on the test
reactor; a reactor whose core held 80 % of the path's reluctance raised no warning; and a spacer's fringing was
taken on the total gap as if it were one.
"""

from __future__ import annotations

import math
from pathlib import Path

import pint
import pytest
from scipy import constants

from specgen.api import design_file
from specgen.catalog.loader import load_catalog
from specgen.design import kernel as K
from specgen.physics import faraday
from specgen.physics import gap as gapmod

U = pint.UnitRegistry()
MU0 = constants.mu_0 * U.H / U.m
REACTOR = Path(__file__).resolve().parent / "specs" / "reactor-ei100.yaml"


@pytest.fixture(scope="module")
def cat():
    return load_catalog(None)


def _mclyman_h(n, ae_m2, le_m, mu_r, gap_m, g_m, gaps=1):
    """McLyman's L with the fringing of each of ``gaps`` equal gaps (pint units), in henries."""
    ae, le, lg, g = ae_m2 * U.m ** 2, le_m * U.m, gap_m * U.m, g_m * U.m
    one = lg / gaps
    f = 1 + (one / ae ** 0.5).to("").magnitude * math.log((2 * g / one).to("").magnitude)
    return (MU0 * n ** 2 * ae * f / (lg + le / mu_r)).to(U.H).magnitude


def _variant(tmp_path, old, new):
    text = REACTOR.read_text(encoding="utf-8")
    assert old in text
    path = tmp_path / "reactor.yaml"
    path.write_text(text.replace(old, new, 1), encoding="utf-8")
    return path


def test_reactor_uses_the_amplitude_permeability_and_fringes_per_gap(cat):
    d = design_file(REACTOR, cat=cat)
    core = cat.cores[d.core.id]
    mat = cat.materials[core.material]
    ind = d.inductor
    assert mat.mu_amplitude and mat.mu_amplitude > 2 * mat.mu_initial       # a steel: the two differ
    assert ind.gap_arrangement == "spacer" and ind.spacer_m == pytest.approx(ind.gap_m / 2)
    ref = _mclyman_h(d.windings[0].turns, d.core.ae_m2, d.core.le_m, mat.mu_amplitude, ind.gap_m,
                     d.core.window_breadth_m, gaps=2)
    assert ind.inductance_h == pytest.approx(ref, rel=1e-9)
    # the reported fringing factor is one half gap's
    one = ind.gap_m / 2
    assert ind.fringing_factor == pytest.approx(1 + one / math.sqrt(d.core.ae_m2)
                                                * math.log(2 * d.core.window_breadth_m / one), rel=1e-12)
    assert not any(c.code == "permeability" for c in d.checks)        # the gap holds most of the reluctance


def test_ungapped_inductor_and_transformer_share_one_permeability(tmp_path, cat):
    """The same steel core and turns: the inductor's L equals the transformer's magnetizing inductance formula
    (Faraday: L_m = mu0 mu N^2 A_e / l_e) at the one design permeability; and the core sets it, so it warns."""
    path = _variant(tmp_path, "  gap: auto\n  gap_arrangement: spacer\n", "  gap: none\n")
    d = design_file(path, cat=cat)
    mat = cat.materials[cat.cores[d.core.id].material]
    n = d.windings[0].turns
    lm = faraday.magnetizing_inductance_h(n, d.core.ae_m2, d.core.le_m, mat.mu_working)
    assert d.inductor.inductance_h == pytest.approx(lm, rel=1e-12)
    assert d.inductor.inductance_h == pytest.approx(
        (MU0 * mat.mu_amplitude * n ** 2 * d.core.ae_m2 * U.m ** 2 / (d.core.le_m * U.m)).to(U.H).magnitude, rel=1e-8)
    warn = [c for c in d.checks if c.code == "permeability"]
    assert len(warn) == 1 and warn[0].level == "warn" and "all of the magnetic path's reluctance" in warn[0].message


@pytest.mark.parametrize("gap_mm, warns", [(0.02, True), (0.06, True), (0.5, False)])
def test_warns_when_the_core_holds_most_of_the_reluctance(tmp_path, cat, gap_mm, warns):
    path = _variant(tmp_path, "  gap: auto\n", f"  gap: {gap_mm} mm\n")
    d = design_file(path, cat=cat)
    mat = cat.materials[cat.cores[d.core.id].material]
    share = (d.core.le_m / mat.mu_working) / (gap_mm * 1e-3 + d.core.le_m / mat.mu_working)
    assert (share > 0.5) is warns
    got = [c for c in d.checks if c.code == "permeability"]
    assert bool(got) is warns
    if warns:
        assert f"{share * 100:.0f} %" in got[0].message and "gap" in got[0].message


def test_gaps_in_series_against_mclyman_per_gap():
    """Two half gaps in series: McLyman's L with F of one half gap; one gap: F of the whole (unchanged)."""
    n, ae, le, mu, lg, g = 60, 1.2e-4, 0.08, 2200, 0.8e-3, 22e-3
    assert gapmod.inductance_gapped_h(n, ae, le, mu, lg, g, 2) == pytest.approx(_mclyman_h(n, ae, le, mu, lg, g, 2),
                                                                                 rel=1e-9)
    assert gapmod.inductance_gapped_h(n, ae, le, mu, lg, g) == pytest.approx(_mclyman_h(n, ae, le, mu, lg, g), rel=1e-9)
    # less fringing per gap: two half gaps give a lower L than one gap of the same total
    assert gapmod.inductance_gapped_h(n, ae, le, mu, lg, g, 2) < gapmod.inductance_gapped_h(n, ae, le, mu, lg, g)
    # the solvers find the total gap that gives L with two gaps, scalar and rows alike
    target = gapmod.inductance_gapped_h(n, ae, le, mu, lg, g, 2)
    assert gapmod.gap_for_inductance_m(target, n, ae, le, mu, g, 2) == pytest.approx(lg, rel=1e-9)
    rows = K.gap_for_inductance_m([target, target], [n, n], ae, le, mu, g, [2, 2])
    assert rows == pytest.approx([lg, lg], rel=1e-9)


def test_gap_arrangement_rules():
    assert K.gap_arrangement_on("centre", "EI") == "spacer"
    assert K.gap_arrangement_on("centre", "ETD") == "centre"
    assert K.gaps_in_series("spacer") == 2 and K.gaps_in_series("centre") == 1
    assert K.iron_reluctance_share(0.0, 0.1, 1000) == 1.0
    assert K.iron_reluctance_share(1e-4, 0.1, 1000) == pytest.approx(0.5)
