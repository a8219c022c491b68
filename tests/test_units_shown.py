"""Figures on the documents through the one formatter (``specgen.present``): engineering prefixes, one
prefix across a row of a nominal and its limits, a frequency as it is said, and an AC reactor's flux
swing not called a ripple. Each printed figure is read back with pint (a general-purpose units library)
and must equal the value to the significant figures shown."""

import re
from pathlib import Path

import pint
import pytest

from specgen import present
from specgen.api import design_file
from specgen.report import design_report

U = pint.UnitRegistry()
ROOT = Path(__file__).parent
DEMO = ROOT.parent / "specgen" / "demo"


def _back(text: str) -> float:
    """'0.9349 Ω' -> 0.9349 (in the SI unit), read by pint."""
    return U.Quantity(text.replace("Ω", "ohm").replace("µ", "u")).to_base_units().magnitude


@pytest.mark.parametrize("values, unit", [
    ([1.039, 0.9349, 1.143], "Ω"),            # the row that printed '934.9 mΩ' beside '1.143 Ω'
    ([0.1473, 0.1325, 0.1621], "Ω"),
    ([6.448e-3, 5.803e-3, 7.093e-3], "H"),
    ([230.0, None, 253.0], "V"),
])
def test_a_row_shares_one_prefix_and_reads_back(values, unit):
    shown = present.si_set(values, unit)
    prefixes = {s.split(" ", 1)[1] for s in shown if s != present.MISSING}
    assert len(prefixes) == 1, shown
    for v, s in zip(values, shown):
        if v is None:
            assert s == present.MISSING
        else:
            assert _back(s) == pytest.approx(v, rel=5e-4), s
            assert "e+" not in s and "e-" not in s


@pytest.mark.parametrize("hz, text", [(100e3, "100 kHz"), (50.0, "50 Hz"), (65e3, "65 kHz"), (400.0, "400 Hz"),
                                      (1.5e6, "1.5 MHz")])
def test_a_frequency_is_said_with_its_prefix(hz, text):
    assert present.frequency(hz) == text
    assert _back(text) == pytest.approx(hz)


def test_an_ac_reactors_flux_is_a_swing_not_a_ripple():
    """reactor-ei100 carries 5 A rms at 50 Hz and no DC: the flux goes from -B_pk to +B_pk each cycle, so
    the peak-to-peak swing is 2 B_pk (about 2.7 T on a 1.34 T peak), not a ripple on a DC flux."""
    d = design_file(ROOT / "specs" / "reactor-ei100.yaml")
    i = d.inductor
    assert i.b_dc_t == 0 and i.delta_b_t == pytest.approx(2 * d.b_peak_t, rel=1e-9)
    row = next(line for line in design_report(d).splitlines() if line.lstrip().startswith("current"))
    assert "ripple" not in row and "rms AC" in row
    peak, swing = re.findall(r"([0-9.]+ m?T)", row)
    assert _back(peak) == pytest.approx(d.b_peak_t, rel=1e-3) and _back(swing) == pytest.approx(i.delta_b_t, rel=1e-3)


def test_a_dc_chokes_ripple_swing_is_shown_in_millitesla():
    d = design_file(DEMO / "BH-3305.yaml")
    row = next(line for line in design_report(d).splitlines() if line.lstrip().startswith("current"))
    m = re.search(r"ΔB ([0-9.]+ mT) p-p", row)
    assert m and _back(m.group(1)) == pytest.approx(d.inductor.delta_b_t, rel=1e-3)


def test_inductance_in_a_check_message_has_a_prefix_not_an_exponent():
    d = design_file(ROOT / "specs" / "reactor-ei100.yaml")
    msg = next(c.message for c in d.checks if c.code == "inductance")
    assert "e+" not in msg and re.search(r"L [0-9.]+ mH at 5 A against [0-9.]+ mH required", msg), msg


def test_the_work_order_says_the_frequency_with_its_prefix():
    from specgen.catalog.loader import load_catalog
    from specgen.documents import workorder as wo
    from specgen.documents.settings import DocumentSettings

    d = design_file(DEMO / "BH-2210.yaml")
    ctx = wo.build_context(d, DocumentSettings.from_shop(load_catalog().shop), number="WO-T-1", qty=1)
    operating = dict(ctx["summary"])["Operating"]
    assert operating.startswith("100 kHz,"), operating


def test_a_change_summary_row_reads_old_and_new_with_one_prefix():
    """BH-2210 with the primary fixed at 40 turns instead of 31: the core loss falls from above 1 W to below
    it; the row reads both in one prefix (never '1.569 W -> 942.9 mW'), and both read back."""
    from specgen.api import design_text
    from specgen.catalog.loader import load_catalog
    from specgen.diff import result_changes

    cat = load_catalog()
    text = (DEMO / "BH-2210.yaml").read_text(encoding="utf-8")
    old = design_text(re.sub(r"(name: P\b.*\n)", r"\1    turns: 31\n", text, count=1), "BH-2210.yaml", cat)
    new = design_text(re.sub(r"(name: P\b.*\n)", r"\1    turns: 40\n", text, count=1), "BH-2210.yaml", cat)
    rows = [r for r in result_changes(old, new) if r.unit in ("W", "ohm", "Ω", "H", "A", "V")]
    assert rows
    for r in rows:
        assert r.old_text.split(" ", 1)[1] == r.new_text.split(" ", 1)[1], r
        assert _back(r.old_text) == pytest.approx(r.old, rel=5e-4) and _back(r.new_text) == pytest.approx(r.new, rel=5e-4)
    core = next(r for r in rows if r.quantity == "core loss")
    assert core.old > 1.0 > core.new
