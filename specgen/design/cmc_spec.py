"""The ``common_mode_choke`` section of a spec (kind: common_mode_choke)::

    operating:
      frequency: [50 Hz, 60 Hz]      # the line frequency (one, or a list)
    common_mode_choke:
      line_current: 6 A              # rms, in each line
      line_voltage: 250 V            # rms, line to line (the working voltage between sectors)
      line_to_ground_voltage: 250 V  # rms (default: line_voltage for 2 lines, line_voltage / sqrt 3 for 3)
      common_mode_inductance: 10 mH  # the minimum, at inductance_frequency
      inductance_frequency: 10 kHz   # where the common-mode inductance is stated (and tested)
      differential_inductance: 20 uH # optional: the least leakage (differential-mode) inductance per line
      differential_current_peak: 12 A   # optional: the peak line current for the DM flux (default sqrt 2 x line_current)
      ground_capacitance: 9.4 nF     # optional: the Y capacitance after the choke ... or leakage_current: 3.5 mA
      sector_gap: 6 mm               # the clear distance between neighbouring sectors at the bore

Windings: one per line (role: line), each with its start and finish lead; all wound in the same direction (the
line currents' ampere-turns then cancel in the core). Their turns, wire and currents come from this section.
"""

from __future__ import annotations

import math

from ..loading import Reader
from ..records import record
from .spec import Winding

SECTION_KEYS = ("line_current", "line_voltage", "line_to_ground_voltage", "common_mode_inductance",
                "inductance_frequency", "differential_inductance", "differential_current_peak",
                "ground_capacitance", "leakage_current", "sector_gap")
# operating keys a common-mode choke does not read: its currents are the line's 50/60 Hz sines
UNUSED_OPERATING_KEYS = ("waveform", "duty", "efficiency", "flux_limit")
_UNUSED_WINDING_KEYS = ("voltage", "voltage_min", "voltage_max", "current", "va", "turns", "same_turns_as",
                        "sections", "section_pins", "wound_with", "taps", "load", "voltage_tolerance", "margin")
# when neither the ground capacitance nor the leakage current is given: the protective-conductor current
# ceiling of class I equipment in the appliance and IT equipment standards (IEC 60335-1, IEC 62368-1;
# from memory): the most current to ground a choke in such equipment carries in service
DEFAULT_LEAKAGE_CURRENT_A = 3.5e-3


@record
class CommonModeChokeReq:
    """A common-mode choke's requirement (kind: common_mode_choke)."""
    line_current_a: float            # rms, each line
    line_voltage_v: float            # rms, line to line
    line_to_ground_v: float          # rms
    lines: int                       # 2 or 3 (the windings)
    inductance_cm_h: float           # minimum, at inductance_frequency_hz
    inductance_frequency_hz: float
    inductance_dm_min_h: float | None
    current_dm_peak_a: float         # the peak line current whose leakage flux is checked
    ground_capacitance_f: float | None
    leakage_current_a: float | None  # given, or None (from the capacitance or the default ceiling)
    sector_gap_m: float              # clear distance between sectors at the bore


def refuse_unused(r: Reader, keys: tuple[str, ...], allowed: bool = False) -> None:
    """A key kind common_mode_choke does not use is an error naming the key and the kind.

    ``allowed``: ``keys`` are the only keys allowed; otherwise they are the keys refused."""
    for key in list(r.data) if allowed else keys:
        if (key not in keys) if allowed else r.has(key):
            raise r.error(f"'{key}' is not used by kind common_mode_choke", str(key))


def parse_common_mode_choke(r: Reader, windings: tuple[Winding, ...], wreaders: list[Reader]) -> CommonModeChokeReq:
    refuse_unused(r, SECTION_KEYS, allowed=True)
    _check_windings(r, windings, wreaders)
    lines = len(windings)
    i_line = r.quantity("line_current", "current")
    v_ll = r.quantity("line_voltage", "voltage")
    v_lg = r.quantity("line_to_ground_voltage", "voltage", v_ll if lines == 2 else v_ll / math.sqrt(3.0))
    if v_lg > v_ll * 1.0001:
        raise r.error("line_to_ground_voltage is above the line voltage", "line_to_ground_voltage")
    l_cm = r.quantity("common_mode_inductance", "inductance")
    f_l = r.quantity("inductance_frequency", "frequency")
    if not 100.0 <= f_l <= 10e6:
        raise r.error("inductance_frequency is outside 100 Hz..10 MHz (the common-mode inductance is stated and "
                      "tested at a noise frequency, usually 10 kHz or 100 kHz)", "inductance_frequency")
    l_dm = r.quantity("differential_inductance", "inductance", None)
    if l_dm is not None and l_dm >= l_cm:
        raise r.error("differential_inductance must be well below the common-mode inductance (it is the "
                      "leakage between the lines)", "differential_inductance")
    i_pk = r.quantity("differential_current_peak", "current", math.sqrt(2.0) * i_line)
    if i_pk < i_line:
        raise r.error("differential_current_peak is below the rms line current", "differential_current_peak")
    c_g = r.quantity("ground_capacitance", "capacitance", None)
    i_leak = r.quantity("leakage_current", "current", None)
    if c_g is not None and i_leak is not None:
        raise r.error("give either ground_capacitance or leakage_current, not both", "leakage_current")
    gap = r.quantity("sector_gap", "length")
    r.done()
    return CommonModeChokeReq(line_current_a=i_line, line_voltage_v=v_ll, line_to_ground_v=v_lg, lines=lines,
                              inductance_cm_h=l_cm, inductance_frequency_hz=f_l, inductance_dm_min_h=l_dm,
                              current_dm_peak_a=i_pk, ground_capacitance_f=c_g, leakage_current_a=i_leak,
                              sector_gap_m=gap)


def _check_windings(r: Reader, windings: tuple[Winding, ...], wreaders: list[Reader]) -> None:
    """Two or three line windings, wound the same way, one section each; the section gives the rest."""
    if len(windings) not in (2, 3):
        raise r.error(f"a common-mode choke has one winding per line, 2 or 3 lines; found {len(windings)}",
                      "windings")
    for w, wr in zip(windings, wreaders):
        if w.role != "line":
            raise wr.error(f"role '{w.role}' is not used by kind common_mode_choke: each winding is a line "
                           f"(role: line)", "role")
        refuse_unused(wr, _UNUSED_WINDING_KEYS)
        if w.wire != windings[0].wire:
            raise wr.error(f"every line is wound with one wire: {w.name} gives {w.wire}, {windings[0].name} "
                           f"{windings[0].wire}", "wire")
    first = windings[0]
    for w, wr in zip(windings[1:], wreaders[1:]):
        if w.direction != first.direction:
            raise wr.error(f"every line of a common-mode choke is wound in the same direction ({first.name} is "
                           f"{first.direction}): wound the other way its line current would add to the core's "
                           f"flux instead of cancelling", "direction")
