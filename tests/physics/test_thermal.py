"""Temperature rise (McLyman) and IEC 60085 thermal classes."""

import math

import pint
import pytest

from specgen.physics import thermal

U = pint.UnitRegistry()


def test_mclyman_relation_points():
    # McLyman: dT = 450 psi^0.826, psi in W/cm^2; psi = 0.03 W/cm^2 -> about 25 K (computed).
    # pint converts the SI surface to cm^2 independently.
    p, area = 3.0 * U.W, 0.01 * U.m ** 2
    psi = (p / area).to(U.W / U.cm ** 2).magnitude
    assert psi == pytest.approx(0.03)
    assert thermal.temperature_rise_k(3.0, 0.01) == pytest.approx(450 * psi ** 0.826, rel=1e-12)
    assert thermal.temperature_rise_k(3.0, 0.01) == pytest.approx(24.85, abs=0.01)
    # doubling the loss density multiplies the rise by 2^0.826 = 1.773
    ratio = thermal.temperature_rise_k(6.0, 0.01) / thermal.temperature_rise_k(3.0, 0.01)
    assert ratio == pytest.approx(2 ** 0.826, rel=1e-12)
    assert math.isclose(thermal.temperature_rise_k(0.0, 0.01), 0.0)


def test_iec_60085_table():
    # IEC 60085 thermal classes
    assert thermal.IEC_60085_CLASSES == {90: "Y", 105: "A", 120: "E", 130: "B", 155: "F",
                                         180: "H", 200: "N", 220: "R"}


@pytest.mark.parametrize("given, limit", [(130, 130), ("130", 130), ("B", 130), ("130 (B)", 130),
                                          ("class F", 155), ("h", 180), (105.0, 105), ("220(R)", 220)])
def test_class_limit_forms(given, limit):
    assert thermal.class_limit_c(given) == limit


@pytest.mark.parametrize("bad", [125, "Q", "130 (F)", "", "hot", True, None])
def test_class_limit_rejects(bad):
    with pytest.raises(ValueError):
        thermal.class_limit_c(bad)


def test_class_letter():
    assert thermal.class_letter(155) == "F"
    assert thermal.class_letter("200") == "N"
    with pytest.raises(ValueError):
        thermal.class_letter(150)
