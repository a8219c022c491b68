"""Inductors and chokes: the gapped ferrite choke BH-3305 and the powder toroid BH-5018 against
McLyman's gapped-inductor relations and the powder roll-off formula, recomputed here with pint
(the reference library) and scipy; plus a textbook magnetic-circuit example.
"""

from __future__ import annotations

import math

import numpy as np
import pint
import pytest
from scipy import constants, integrate, optimize

from specgen.api import demo_specs, design_file, design_text
from specgen.catalog.loader import load_catalog
from specgen.physics import faraday, permeability
from specgen.physics import gap as gapmod

U = pint.UnitRegistry()
MU0 = constants.mu_0 * U.H / U.m          # scipy's CODATA mu0 (differs from 4e-7 pi by 5.5e-10)
DEMOS = {p.stem: p for p in demo_specs()}


@pytest.fixture(scope="module")
def cat():
    return load_catalog(None)


@pytest.fixture(scope="module")
def choke(cat):
    return design_file(DEMOS["BH-3305"], cat=cat)


@pytest.fixture(scope="module")
def powder(cat):
    return design_file(DEMOS["BH-5018"], cat=cat)


def _variant(part: str, old: str, new: str) -> str:
    text = DEMOS[part].read_text(encoding="utf-8")
    assert old in text, f"{part}.yaml no longer contains {old!r}"
    return text.replace(old, new, 1)


def _mclyman_l(n, ae_m2, le_m, mu_r, gap_m, g_m):
    """McLyman (Transformer and Inductor Design Handbook): L = mu0 N^2 A_e F / (l_g + l_e/mu_r),
    F = 1 + (l_g / sqrt(A_e)) ln(2 G / l_g), in pint units; returns henries."""
    ae, le, lg, g = ae_m2 * U.m ** 2, le_m * U.m, gap_m * U.m, g_m * U.m
    f = 1 + (lg / ae ** 0.5).to("").magnitude * math.log((2 * g / lg).to("").magnitude)
    return (MU0 * n ** 2 * ae * f / (lg + le / mu_r)).to(U.H).magnitude


# ------------------------------------------------------------------------------------------ gapped ferrite

def test_gapped_choke_inductance_mclyman(choke, cat):
    """BH-3305: the built L equals McLyman's gapped-core formula with fringing within 0.5 %, using G =
    the catalogue window height (the window length along the leg) and mu_r of the material."""
    core = cat.cores[choke.core.id]
    mu_r = cat.materials[core.material].mu_initial
    n = choke.windings[0].turns
    lg = choke.inductor.gap_m
    assert lg and lg > 0
    ref = _mclyman_l(n, choke.core.ae_m2, choke.core.le_m, mu_r, lg, core.dims["window_height"])
    assert choke.inductor.inductance_h == pytest.approx(ref, rel=5e-3)
    f = 1 + lg / math.sqrt(choke.core.ae_m2) * math.log(2 * core.dims["window_height"] / lg)
    assert choke.inductor.fringing_factor == pytest.approx(f, rel=1e-6)


def test_gapped_choke_meets_l_and_the_gap_is_the_shops_step(choke, cat):
    """The gap is ground to 0.01 mm (common practice) and rounded so the part meets L: the built L is at
    least the target, and one more 0.01 mm step of gap would fall below it (McLyman's formula, pint)."""
    core = cat.cores[choke.core.id]
    mu_r = cat.materials[core.material].mu_initial
    ind = choke.inductor
    n = choke.windings[0].turns
    assert ind.gap_m * 1e5 == pytest.approx(round(ind.gap_m * 1e5), abs=1e-6)
    assert ind.inductance_h >= 47e-6
    wider = _mclyman_l(n, choke.core.ae_m2, choke.core.le_m, mu_r, ind.gap_m + 1e-5, core.dims["window_height"])
    assert wider < 47e-6
    # centre-leg grind: the grind depth is the whole gap (one half ground)
    assert ind.gap_arrangement == "centre"
    assert ind.grind_m == pytest.approx(ind.gap_m)


def test_gapped_choke_turns_are_the_fewest_that_stay_below_b_max(choke, cat):
    """McLyman's procedure, re-done here with scipy's root finder: for each N, solve the gap for L
    (fringing included), floor it to 0.01 mm, and keep the first N whose B_pk = L I_pk / (N A_e) at the
    peak current stays at the working limit. The design's turns must be that N."""
    core = cat.cores[choke.core.id]
    mu_r = cat.materials[core.material].mu_initial
    ae, le, g = choke.core.ae_m2, choke.core.le_m, core.dims["window_height"]
    i_pk = choke.inductor.current_peak_a
    assert i_pk == 10.0
    limit = choke.b_limit_t

    def built_l(n):
        fn = lambda lg: _mclyman_l(n, ae, le, mu_r, lg, g) - 47e-6
        if fn(1e-7) < 0:
            return None                   # even (nearly) no gap is short of L
        lg = optimize.brentq(fn, 1e-7, 2 * g, xtol=1e-13)
        lg = math.floor(lg / 1e-5 + 1e-6) * 1e-5
        if lg == 0:                       # floored to no gap: the ungapped core, F = 1
            return (MU0 * mu_r * n ** 2 * ae * U.m ** 2 / (le * U.m)).to(U.H).magnitude
        return _mclyman_l(n, ae, le, mu_r, lg, g)

    fewest = next(n for n in range(1, 200)
                  if built_l(n) is not None and built_l(n) * i_pk / (n * ae) <= limit)
    assert choke.windings[0].turns == fewest
    assert choke.b_peak_max_t <= limit * 1.0005


def test_gapped_choke_flux_linkage(choke):
    """Faraday integrated: N Phi = L I, so B = L I / (N A_e) at the operating peak (I_dc + ripple/2)
    and at the over-current (McLyman)."""
    ind = choke.inductor
    n, ae = choke.windings[0].turns, choke.core.ae_m2
    i_op = ind.current_dc_a + ind.ripple_a / 2
    assert n * choke.b_peak_t * ae == pytest.approx(ind.inductance_h * i_op, rel=5e-3)
    assert n * choke.b_peak_max_t * ae == pytest.approx(ind.inductance_h * ind.current_peak_a, rel=5e-3)
    # ripple flux swing: delta_B = L delta_I / (N A_e)
    assert ind.delta_b_t == pytest.approx(ind.inductance_h * ind.ripple_a / (n * ae), rel=1e-9)


def test_gapped_choke_al_and_energy(choke):
    """A_L = L / N^2 (IEC 60205 inductance factor) in nH; stored energy W = L I^2 / 2 at the DC current."""
    ind = choke.inductor
    n = choke.windings[0].turns
    assert ind.al_nh * 1e-9 * n ** 2 == pytest.approx(ind.inductance_zero_bias_h, rel=1e-9)
    assert ind.al_nh == pytest.approx(ind.inductance_h / n ** 2 * 1e9, rel=1e-9)
    energy = (0.5 * ind.inductance_h * U.H * (ind.current_dc_a * U.A) ** 2).to(U.J).magnitude
    assert ind.energy_j == pytest.approx(energy, rel=1e-9)


def test_saturating_choke_fails_and_says_what_to_change(cat):
    """BH-3305 with `turns: 6` and the gap auto: B_pk = L I_pk / (N A_e) is about twice B_sat of the ferrite
    at the hot spot, so the saturation check fails and names the remedy with a turn count that
    (at the same L) would bring B_pk below B_sat."""
    d = design_text(_variant("BH-3305", "    strands: 2\n", "    strands: 2\n    turns: 6\n"), "BH-3305-6t.yaml", cat)
    assert d.windings[0].turns == 6
    b = d.inductor.inductance_h * 10.0 / (6 * d.core.ae_m2)
    assert d.b_peak_max_t == pytest.approx(b, rel=1e-6)
    assert b > d.b_sat_hot_t
    [sat] = [c for c in d.checks if c.code == "saturation"]
    assert sat.level == "fail"
    assert "more turns" in sat.message and "more Ae" in sat.message
    suggested = int(sat.message.rsplit("about ", 1)[1].split()[0])
    assert suggested > 6
    assert 47e-6 * 10.0 / (suggested * d.core.ae_m2) < d.b_sat_hot_t
    # acting on the advice removes the failure
    again = design_text(_variant("BH-3305", "    strands: 2\n", f"    strands: 2\n    turns: {suggested}\n"),
                        "BH-3305-again.yaml", cat)
    assert [c.level for c in again.checks if c.code == "saturation"] != ["fail"]


def test_saturating_choke_advice_leads_to_a_pass(cat):
    d = design_text(_variant("BH-3305", "    strands: 2\n", "    strands: 2\n    turns: 6\n"), "BH-3305-6t.yaml", cat)
    [sat] = [c for c in d.checks if c.code == "saturation"]
    suggested = int(sat.message.rsplit("about ", 1)[1].split()[0])
    again = design_text(_variant("BH-3305", "    strands: 2\n", f"    strands: 2\n    turns: {suggested}\n"),
                        "BH-3305-again.yaml", cat)
    assert [c.level for c in again.checks if c.code == "saturation"] == ["pass"]


# ------------------------------------------------------------------------------------------ powder toroid

def _powder_l(n, ae_m2, le_m, mu_i, i_a, a, b, c):
    """L = mu0 mu_i f(H) N^2 A_e / l_e with H = N I / l_e and f = 1 / (a + b H^c), pint units [H]."""
    h = (n * i_a * U.A / (le_m * U.m)).to(U.A / U.m).magnitude
    frac = 1.0 / (a + b * h ** c)
    return (MU0 * mu_i * frac * n ** 2 * ae_m2 * U.m ** 2 / (le_m * U.m)).to(U.H).magnitude


def test_dc_bias_curve_monotonic_and_equal_to_its_formula(powder, cat):
    """The catalogue DC-bias curve of BH-5018's iron powder, dc_bias: {half_field, steepness}, is
    mu/mu_i = 1 / (1 + (H / half_field)^steepness) (the rational curve-fit form of the magnetics literature
    with a = 1): the fit coefficients the physics takes give that formula at three points, fall strictly with
    H, and reach exactly 50 % at the half field, which is about the 3500 A/m the entry names."""
    mat = cat.materials[cat.cores[powder.core.id].material]
    a, b, c = mat.bias_fit()
    half, steep = mat.dc_bias_half_field_a_m, mat.dc_bias_steepness
    h = np.geomspace(1.0, 1e6, 400)
    curve = np.asarray(permeability.bias_fit_fraction(h, a, b, c))
    assert np.all(np.diff(curve) < 0)
    for point in (0.0, powder.inductor.h_dc_a_m, 3500.0):
        assert permeability.bias_fit_fraction(point, a, b, c) == pytest.approx(1.0 / (1.0 + (point / half) ** steep),
                                                                              rel=1e-12)
    assert permeability.bias_fit_fraction(half, a, b, c) == pytest.approx(0.5, rel=1e-12)
    assert half == pytest.approx(3500.0, rel=1e-3)


def test_powder_choke_meets_l_at_full_bias(powder, cat):
    """BH-5018: L at 3 A DC from the roll-off formula (pint) equals the design's within 0.5 % and meets
    250 uH; H_dc = N I / l_e (Ampere's law); the roll-off percent is (1 - f(H)/f(0)) x 100; and the turns
    are the fewest that meet L at full current (one turn fewer falls short)."""
    core = cat.cores[powder.core.id]
    mat = cat.materials[core.material]
    a, b, c = mat.bias_fit()
    n = powder.windings[0].turns
    ae, le, i = powder.core.ae_m2, powder.core.le_m, 3.0
    ind = powder.inductor
    assert ind.gap_m is None
    full = _powder_l(n, ae, le, mat.mu_initial, i, a, b, c)
    assert ind.inductance_at_full_bias_h == pytest.approx(full, rel=5e-3)
    assert ind.inductance_at_full_bias_h >= 250e-6
    assert ind.inductance_zero_bias_h == pytest.approx(_powder_l(n, ae, le, mat.mu_initial, 0.0, a, b, c), rel=5e-3)
    h = (n * i * U.A / (le * U.m)).to(U.A / U.m).magnitude
    assert ind.h_dc_a_m == pytest.approx(h, rel=1e-9)
    pct = (1 - (1 / (a + b * h ** c)) / (1 / a)) * 100
    assert ind.bias_drop_pct == pytest.approx(pct, rel=1e-6)
    assert _powder_l(n - 1, ae, le, mat.mu_initial, i, a, b, c) < 250e-6
    # AL of the powder core at zero bias, L0 / N^2
    assert ind.al_nh == pytest.approx(ind.inductance_zero_bias_h / n ** 2 * 1e9, rel=1e-9)


def test_powder_choke_flux_linkage(powder, cat):
    """The flux density is the integral of the incremental permeability the DC-bias curve describes,
    B(H) = mu0 mu_i int_0^H f(h) dh (definition of incremental permeability, IEC 60050-221), here by
    scipy.integrate.quad, at the operating peak I_dc + ripple/2, at the over-current peak and at DC; not the
    product mu0 mu_i f(H) H (L(I) I / (N A_e)), which this part's figures were before."""
    mat = cat.materials[cat.cores[powder.core.id].material]
    a, b, c = mat.bias_fit()
    ind = powder.inductor
    n, ae, le = powder.windings[0].turns, powder.core.ae_m2, powder.core.le_m

    def b_of(i_a):
        h = n * i_a / le
        return constants.mu_0 * mat.mu_initial * integrate.quad(lambda x: 1.0 / (a + b * x ** c), 0.0, h,
                                                                epsabs=0.0, epsrel=1e-12)[0]

    i_op = ind.current_dc_a + ind.ripple_a / 2
    assert powder.b_peak_t == pytest.approx(b_of(i_op), rel=1e-8)
    assert powder.b_peak_max_t == pytest.approx(b_of(ind.current_peak_a), rel=1e-8)
    assert ind.b_dc_t == pytest.approx(b_of(ind.current_dc_a), rel=1e-8)
    # the secant L(I) I / (N A_e) is above the incremental product (B is concave in H)
    l_op = _powder_l(n, ae, le, mat.mu_initial, i_op, a, b, c)
    assert n * powder.b_peak_t * ae > l_op * i_op


# ------------------------------------------------------------------------------------------ worked example

def test_fitzgerald_example_1_1_and_1_3_magnetic_circuit():
    """Fitzgerald, Kingsley & Umans, Electric Machinery, Examples 1.1 and 1.3 (from memory):
    A_c = A_g = 9 cm^2, g = 0.050 cm, l_c = 30 cm, N = 500, mu_r = 70 000, B_c = 1.0 T, fringing neglected.
    Stated: R_c = 3.79e3 and R_g = 4.42e5 A-turns/Wb, phi = 9e-4 Wb, i = 0.80 A, L = 0.56 H.
    Reproduced with the physics functions the engine uses (gap.py, faraday.py), fringing off as in the book;
    a full spec cannot match (no catalogue material has mu_r 70 000 and the engine always applies
    McLyman's fringing to a gap)."""
    ae, lg, le, n, mu_r = 9e-4, 0.050e-2, 0.30, 500, 70000.0
    rc = le / (mu_r * constants.mu_0 * ae)
    rg = lg / (constants.mu_0 * ae)
    assert f"{rc:.3g}" == "3.79e+03" and f"{rg:.3g}" == "4.42e+05"
    ell = gapmod.inductance_gapped_h(n, ae, le, mu_r, lg)
    assert f"{ell:.2f}" == "0.56"                                 # L = N^2 / (R_c + R_g)
    assert ell == pytest.approx(n ** 2 / (rc + rg), rel=1e-6)
    assert faraday.magnetizing_inductance_h(n, ae, le, mu_r, gap_m=lg) == pytest.approx(ell, rel=1e-12)
    # the current for B_c = 1.0 T: from N Phi = L i with Phi = B A_c
    i = 1.0 * ae * n / ell
    assert f"{i:.2f}" == "0.80"
    assert gapmod.b_peak_from_inductance_t(ell, i, n, ae) == pytest.approx(1.0, rel=1e-12)
    assert gapmod.turns_for_peak_b(ell, i, 1.0, ae) == pytest.approx(500, rel=1e-9)
    # and the gap back from L: the book's 0.050 cm
    assert gapmod.gap_for_inductance_m(ell, n, ae, le, mu_r) == pytest.approx(lg, rel=1e-9)


# ------------------------------------------------------------------------------------------ AC reactor

@pytest.fixture(scope="module")
def reactor(cat):
    from pathlib import Path

    return design_file(Path(__file__).parent / "specs" / "reactor-ei100.yaml", cat=cat)


def test_ac_reactor_meets_its_voltage_drop(reactor, cat):
    """tests/specs/reactor-ei100.yaml: 10 V drop at 5 A, 50 Hz. Inductive reactance X = 2 pi f L (any
    circuits text): L = V / (2 pi f I) = 6.366 mH; the built part drops at least 10 V (and no more than
    the shop's inductance tolerance above it); B_pk = L sqrt(2) I / (N A_e) (flux linkage, sine current);
    the spacer in every leg is half the gap, because the flux crosses the centre and an outer leg
    (common practice)."""
    ind = reactor.inductor
    target = 10.0 / (2 * math.pi * 50.0 * 5.0)
    assert ind.target_h == pytest.approx(target, rel=1e-9)
    drop = (2 * math.pi * 50.0 * U.Hz * ind.inductance_h * U.H * 5.0 * U.A).to(U.V).magnitude
    assert 10.0 <= drop <= 10.0 * (1 + cat.shop.tolerances["inductance"])
    n, ae = reactor.windings[0].turns, reactor.core.ae_m2
    assert reactor.b_peak_t == pytest.approx(ind.inductance_h * math.sqrt(2) * 5.0 / (n * ae), rel=5e-3)
    assert ind.gap_arrangement == "spacer"
    assert ind.spacer_m == pytest.approx(ind.gap_m / 2)


def test_reactor_checks_are_not_repeated(reactor):
    seen = [(c.level, c.code, c.message) for c in reactor.checks]
    assert len(seen) == len(set(seen))
