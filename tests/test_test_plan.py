"""The test plan a station can run: every test states its instrument setting, its pins and limits a station
can read, for every demo part and the test specs.

Outside references: Python's ``decimal`` module (ROUND_CEILING / ROUND_FLOOR quantize) for the inward rounding
of limits; Faraday's law B = sqrt(2) V / (2 pi f N Ae) recomputed with pint for the small-signal drive level;
the transformer equivalent circuit (no-load current = magnetizing and core-loss currents in quadrature, any
textbook, e.g. Say, The Performance and Design of Alternating Current Machines, from memory) with numpy.
Bench settings (LCR frequencies, 0.25 mT small signal per IEC 60401-3, four-wire below 1 ohm, 400 Hz AC
supply) are common practice.
"""

from __future__ import annotations

import dataclasses
import math
from decimal import ROUND_CEILING, ROUND_FLOOR, Decimal
from pathlib import Path

import numpy as np
import pint
import pytest

from specgen.api import demo_specs, design_file
from specgen.catalog.loader import load_catalog
from specgen.design import test_setup as ts
from specgen.design.result import Limit

U = pint.UnitRegistry()
DEMOS = {p.stem: p for p in demo_specs()}
SPECS = sorted((Path(__file__).resolve().parent / "specs").glob("*.yaml"))
LIMIT_GROUPS = ("dcr", "ratio", "open_circuit", "inductance", "no_load")


@pytest.fixture(scope="module")
def cat():
    return load_catalog(None)


@pytest.fixture(scope="module")
def designs(demo_designs):
    return demo_designs


def _limits(d):
    return [lim for g in LIMIT_GROUPS for lim in getattr(d.tests, g)]


@pytest.mark.parametrize("path", [*DEMOS.values(), *SPECS], ids=lambda p: p.stem)
def test_every_test_states_its_pins_setting_and_limits(path, cat):
    d = design_file(path, cat=cat)
    assert _limits(d)
    for lim in _limits(d):
        s = lim.setting
        assert s is not None and lim.pins, f"{d.part} {lim.name} {lim.item}: no setting or pins"
        assert lim.low is not None or lim.high is not None
        assert lim.condition.startswith(lim.pins) and s.instrument in lim.condition
        if s.instrument == ts.LCR:
            # a bench LCR meter's frequency (a common-mode choke's stated one) and a level it offers
            assert s.level_v in ts.LCR_LEVELS_V and s.frequency_hz is not None
            assert s.frequency_hz in ts.LCR_FREQUENCIES_HZ or d.kind == "common_mode_choke"
        if s.instrument == ts.AC_SUPPLY:
            assert s.frequency_hz is not None and s.frequency_hz <= 400.0
            assert d.waveform == "sine"
        if s.instrument == ts.BRIDGE:
            assert s.four_wire == (lim.nominal < 1.0), f"{d.part} {lim.item}: four-wire below 1 ohm"
            assert ("four-wire" in lim.condition) == s.four_wire
    for line in d.tests.polarity:                  # "pin 7 ... positive against pin 8": the reference is named
        assert "reads positive" not in line or "reads positive against" in line


def test_no_station_is_asked_for_the_working_voltage_of_a_ferrite_part(designs):
    """BH-2210 and BH-2260 (100 kHz, 200 V square wave): no open-circuit voltage test at 200 V, 100 kHz; the
    turns ratio is read at 1 V, and the open-circuit inductance small-signal on the LCR meter."""
    for part in ("BH-2210", "BH-2260", "BH-7065"):
        d = designs[part]
        assert d.tests.open_circuit == () and d.tests.no_load == ()
        for lim in _limits(d):
            assert lim.setting is not None and lim.setting.instrument != ts.AC_SUPPLY
            assert (lim.setting.level_v or 0.0) <= 1.0
        assert all(lim.setting.level_v == 1.0 for lim in d.tests.ratio)


@pytest.mark.parametrize("part", ["BH-1042", "BH-1240", "BH-4120"])
def test_mains_transformers_get_no_load_current_and_loss_at_rated_voltage(designs, part):
    d = designs[part]
    prim = next(w for w in d.windings if w.role == "primary")
    by_name = {lim.name: lim for lim in d.tests.no_load}
    current, loss = by_name["no-load current"], by_name["no-load loss"]
    for lim in (current, loss):
        assert lim.setting.instrument == ts.AC_SUPPLY
        assert lim.setting.level_v == pytest.approx(prim.voltage_v)       # rated, not the +10 % top
        assert lim.setting.frequency_hz == d.frequency_hz
        assert lim.low is None and lim.high > lim.nominal
    # the equivalent circuit: I0 = sqrt(Im^2 + (P_core / V)^2)
    i0 = np.hypot(d.magnetizing_current_a, d.losses.core_w / prim.voltage_v)
    assert current.nominal == pytest.approx(float(i0), rel=1e-12)
    assert loss.nominal == pytest.approx(d.losses.core_w, rel=1e-12)
    # the steel's design inductance applies at the working flux: no small-signal reading of it is asked for
    assert not any(lim.name == "open-circuit inductance" for lim in d.tests.inductance)
    assert d.tests.open_circuit and all(lim.setting.level_v == pytest.approx(prim.voltage_v)
                                        for lim in d.tests.open_circuit)


def test_the_gapped_choke_is_tested_at_its_rated_current(designs):
    """BH-3305's defining figure: 47 uH at 8 A DC, read with the DC bias source."""
    d = designs["BH-3305"]
    [at8] = [lim for lim in d.tests.inductance if lim.setting.bias_a == 8.0]
    assert at8.name == "inductance at 8 A DC" and "DC bias 8 A" in at8.condition
    assert at8.nominal == pytest.approx(47e-6, rel=0.05) and at8.low <= 47e-6 * 0.95
    assert at8.setting.frequency_hz == 100e3


def test_a_reactor_is_tested_at_its_rated_current(cat):
    d = design_file(Path(__file__).resolve().parent / "specs" / "reactor-ei100.yaml", cat=cat)
    [lim] = d.tests.inductance
    assert lim.setting.instrument == ts.AC_SUPPLY and lim.setting.level_a == pytest.approx(5.0)
    # V = 2 pi f L I at rated current, with pint
    v = (2 * math.pi * d.frequency_hz * U.Hz * d.inductor.inductance_h * U.H * 5.0 * U.A).to(U.V).magnitude
    assert lim.nominal == pytest.approx(v, rel=1e-12) and lim.unit == "V"


@pytest.mark.parametrize("turns,ae_mm2,freq_hz", [(15, 97.1, 100e3), (19, 125.0, 10e3), (844, 1120.0, 100.0),
                                                   (1, 20.0, 1e3)])
def test_the_small_signal_level_keeps_the_flux_below_a_quarter_millitesla(turns, ae_mm2, freq_hz):
    level = ts.small_signal_level_v(turns, ae_mm2 * 1e-6, freq_hz)

    def b_mt(v):
        return (math.sqrt(2) * v * U.V / (2 * math.pi * freq_hz * U.Hz * turns * ae_mm2 * U.mm ** 2)).to(U.mT).magnitude

    higher = [v for v in ts.LCR_LEVELS_V if v > level]
    if level != ts.LCR_LEVELS_V[-1]:
        assert b_mt(level) <= 0.25 + 1e-9
    if higher:
        assert b_mt(min(higher)) > 0.25                # the highest level that does


def _decimal_round(value: float, step: float, rounding: str) -> float:
    return float(Decimal(repr(value)).quantize(Decimal(repr(step)), rounding=rounding))


@pytest.mark.parametrize("nominal,tol", [(21.449, 0.10), (17.58333, 0.005), (0.0035129, 0.10), (1.0, 0.005),
                                         (9.7697e-6, 0.30), (127.67, 0.03)])
def test_limits_are_rounded_inward_to_a_fifth_of_the_tolerance(nominal, tol):
    lim = Limit(name="x", item="P", nominal=nominal, low=nominal * (1 - tol), high=nominal * (1 + tol), unit="ohm",
                condition="")
    done = ts.finish(lim)
    step = ts.resolution(nominal, lim.low, lim.high)
    assert step is not None and nominal * tol * 0.02 < step <= nominal * tol * 0.2
    assert math.log10(step) == pytest.approx(round(math.log10(step)))         # a power of ten
    assert done.low == pytest.approx(_decimal_round(lim.low, step, ROUND_CEILING), rel=1e-12)
    assert done.high == pytest.approx(_decimal_round(lim.high, step, ROUND_FLOOR), rel=1e-12)
    assert lim.low <= done.low < done.high <= lim.high                        # never looser than the exact limit


def test_printed_examples_of_the_rounding():
    lim = Limit(name="DCR", item="P", nominal=21.449, low=21.449 * 0.9, high=21.449 * 1.1, unit="ohm", condition="")
    assert (ts.finish(lim).low, ts.finish(lim).high) == (19.4, 23.5)
    ratio = dataclasses.replace(lim, nominal=17.58333, low=17.58333 * 0.995, high=17.58333 * 1.005)
    assert (ts.finish(ratio).low, ts.finish(ratio).high) == (17.5, 17.67)


def test_hipot_voltages_are_round_figures(designs):
    """The routine and type voltages are rounded up to the test set's 50 V step (shop.yaml, common practice):
    never a figure such as 1506 V."""
    for d in designs.values():
        for h in d.tests.hipot:
            assert h.type_voltage_v % 50 == 0 and h.routine_voltage_v % 50 == 0
            assert "rounded up" in h.basis or h.rating == "functional"      # functional: the shop's own figure
