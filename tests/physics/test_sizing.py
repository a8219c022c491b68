"""Area product and apparent power (McLyman, Transformer and Inductor Design Handbook)."""

import pint
import pytest

from specgen.physics import sizing

U = pint.UnitRegistry()


def test_area_product_si_matches_mclyman_cm_form():
    # McLyman: Ap[cm^4] = Pt 1e4 / (Kf Ku B f J[A/cm^2]); pint converts J and the result
    pt, kf, ku, b, f = 120.0, 4.44, 0.4, 1.2, 50.0
    j = 300 * U.A / U.cm ** 2
    ap_cm4 = pt * 1e4 / (kf * ku * b * f * j.magnitude)
    got = sizing.area_product_m4(pt, kf, ku, b, f, j.to(U.A / U.m ** 2).magnitude)
    assert (got * U.m ** 4).to(U.cm ** 4).magnitude == pytest.approx(ap_cm4, rel=1e-12)


def test_area_product_dimension_with_pint():
    # W / (T Hz A/m^2) is m^4
    q = (1 * U.W) / (1 * U.T * 1 * U.Hz * 1 * U.A / U.m ** 2)
    assert q.to(U.m ** 4).magnitude == pytest.approx(1.0)


def test_apparent_power():
    # McLyman, two-winding transformer: Pt = Po (1/eta + 1)
    assert sizing.transformer_apparent_power_w(60.0, 0.9) == pytest.approx(60 / 0.9 + 60)
    assert sizing.transformer_apparent_power_w([30.0, 30.0], 0.9) == pytest.approx(60 / 0.9 + 60)
    assert sizing.transformer_apparent_power_w(60.0, 0.9, "centre-tapped") > \
        sizing.transformer_apparent_power_w(60.0, 0.9)
    with pytest.raises(ValueError):
        sizing.transformer_apparent_power_w(60.0, 1.5)
    with pytest.raises(ValueError):
        sizing.transformer_apparent_power_w(60.0, 0.9, "forward")
