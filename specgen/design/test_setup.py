"""How the test station sets its instruments for each test of the plan, and how a limit is rounded: one place.

Every kind builds its limits with a typed :class:`~specgen.design.result.TestSetting` (instrument,
frequency, level, DC bias, four-wire) and the pins; :func:`finish` then rounds the limits and writes the
one instruction the work order, the test record and the station show.

The settings are bench practice (common practice, from memory of bench LCR-meter and bridge use):

- a bench LCR meter offers a few fixed frequencies (:data:`LCR_FREQUENCIES_HZ`); a test is run at the
  highest of them not above the part's working frequency, so the core is measured in the frequency range
  the design's figure applies to;
- an inductance or A_L figure of a ferrite or powder core applies at low flux: the drive level is the
  highest of :data:`LCR_LEVELS_V` that keeps the a.c. flux density at or below :data:`SMALL_SIGNAL_B_T`
  (0.25 mT, the flux at which ferrite makers state the initial permeability, IEC 60401-3, from memory);
- a steel core's permeability at a low level is several times lower than at its working flux, so an LCR
  reading does not check the design's magnetizing inductance: a mains part is tested at its rated voltage
  and frequency from the station's adjustable AC supply instead (no-load current and loss, open-circuit
  voltage), and a reactor at its rated current;
- a resistance below :data:`FOUR_WIRE_BELOW_OHM` is read with four-wire (Kelvin) leads, since lead and
  contact resistance are tens of milliohms.
"""

from __future__ import annotations

import dataclasses
import math

from .. import present
from .result import Limit, TestSetting

#: The fixed test frequencies of a bench LCR meter (common practice).
LCR_FREQUENCIES_HZ = (100.0, 1e3, 10e3, 100e3)
#: Drive levels tried from the top down (V rms a.c.; common practice).
LCR_LEVELS_V = (1.0, 0.3, 0.1, 0.03, 0.01)
#: The small-signal flux density (T peak) at which initial permeability is stated (IEC 60401-3, from memory).
SMALL_SIGNAL_B_T = 0.25e-3
#: A gapped set's inductance is set by its gap and hardly moves with the level: ten times the flux allowed
#: (common practice).
GAPPED_SIGNAL_B_T = 2.5e-3
#: Resistances below this are read four-wire (Kelvin leads; common practice).
FOUR_WIRE_BELOW_OHM = 1.0
#: The station's adjustable AC supply covers the mains frequencies up to this (common practice: 400 Hz).
AC_SUPPLY_MAX_HZ = 400.0
#: A leakage inductance is read at least at this frequency, so the winding resistance does not swamp it.
LEAKAGE_MIN_HZ = 1e3
#: The a.c. drive of a turns-ratio test (V rms; common practice).
RATIO_LEVEL_V = 1.0
#: Open-circuit inductance floor: a material's permeability varies widely from lot to lot (common practice).
MAGNETIZING_L_LOW = 0.7
#: Leakage limits: the build's geometry varies less, but a missed interleave or an extra tape shows as a large
#: change (common practice, from memory).
LEAKAGE_BAND = (0.7, 1.3)
#: No-load current and loss upper limit against the prediction: a steel's excitation and loss vary with the lot
#: and the stacking, while a shorted turn multiplies both (common practice).
NO_LOAD_HIGH = 1.5
#: A limit is printed to a resolution of about this share of its tolerance, rounded inward (common practice).
LIMIT_RESOLUTION_SHARE = 0.2

BRIDGE = "DC resistance bridge"
LCR = "LCR meter"
RATIO = "turns-ratio tester"
AC_SUPPLY = "adjustable AC supply"


def lcr_frequency_hz(working_hz: float) -> float:
    """The highest bench LCR frequency not above the working frequency (the lowest one below it)."""
    below = [f for f in LCR_FREQUENCIES_HZ if f <= working_hz * (1 + 1e-9)]
    return below[-1] if below else LCR_FREQUENCIES_HZ[0]


def small_signal_level_v(turns: int, ae_m2: float, freq_hz: float, *, gapped: bool = False) -> float:
    """The highest drive level whose peak flux, B = sqrt(2) V / (2 pi f N Ae) (Faraday, sine), stays at or
    below the small-signal flux density (a gapped set's, if gapped); the lowest level if none does."""
    limit_t = GAPPED_SIGNAL_B_T if gapped else SMALL_SIGNAL_B_T
    for v in LCR_LEVELS_V:
        b_t = math.sqrt(2.0) * v / (2.0 * math.pi * freq_hz * max(turns, 1) * ae_m2)
        if b_t <= limit_t * (1 + 1e-9):
            return v
    return LCR_LEVELS_V[-1]


def dcr_setting(resistance_ohm: float) -> TestSetting:
    return TestSetting(instrument=BRIDGE, four_wire=resistance_ohm < FOUR_WIRE_BELOW_OHM)


def lcr_setting(turns: int, ae_m2: float, working_hz: float, *, bias_a: float | None = None,
                gapped: bool = False) -> TestSetting:
    """A small-signal inductance (or A_L) reading, with a DC bias current where the figure is under bias."""
    f = lcr_frequency_hz(working_hz)
    return TestSetting(instrument=LCR, frequency_hz=f, level_v=small_signal_level_v(turns, ae_m2, f, gapped=gapped),
                       bias_a=bias_a)


def leakage_setting(working_hz: float) -> TestSetting:
    """A leakage inductance reading (the other windings shorted: the core barely carries flux), at the LCR
    frequency nearest the working one and at least 1 kHz, where the reactance stands well above the resistance."""
    nearest = min(LCR_FREQUENCIES_HZ, key=lambda f: abs(math.log10(f / working_hz)))
    return TestSetting(instrument=LCR, frequency_hz=max(LEAKAGE_MIN_HZ, nearest), level_v=1.0)


def ratio_setting(working_hz: float) -> TestSetting:
    """A turns-ratio reading: at a mains part's own frequency, else at the LCR frequency below the working one."""
    f = working_hz if working_hz <= AC_SUPPLY_MAX_HZ else lcr_frequency_hz(working_hz)
    return TestSetting(instrument=RATIO, frequency_hz=f, level_v=RATIO_LEVEL_V)


def on_ac_supply(working_hz: float, waveform: str) -> bool:
    """True where the station's adjustable AC supply can run the part at its rated voltage or current."""
    return waveform == "sine" and working_hz <= AC_SUPPLY_MAX_HZ


def supply_setting(freq_hz: float, *, volts: float | None = None, amps: float | None = None) -> TestSetting:
    return TestSetting(instrument=AC_SUPPLY, frequency_hz=freq_hz, level_v=volts, level_a=amps)


def setting_text(s: TestSetting) -> str:
    """'LCR meter, 10 kHz, 0.1 V a.c., DC bias 8 A'; 'DC resistance bridge, four-wire (Kelvin) leads'."""
    parts = [s.instrument]
    if s.instrument == AC_SUPPLY:
        at = [_amount(s.level_v, "V") if s.level_v is not None else "",
              _amount(s.level_a, "A") + " rms" if s.level_a is not None else "",
              present.frequency(s.frequency_hz) if s.frequency_hz is not None else ""]
        return f"{s.instrument} at {', '.join(x for x in at if x)}, with voltmeter, ammeter and power meter"
    if s.frequency_hz is not None:
        parts.append(present.frequency(s.frequency_hz))
    if s.level_v is not None:
        parts.append(f"{_amount(s.level_v, 'V')} a.c.")
    if s.level_a is not None:
        parts.append(f"{_amount(s.level_a, 'A')} a.c.")
    if s.bias_a is not None:
        parts.append(f"DC bias {_amount(s.bias_a, 'A')}")
    if s.instrument == BRIDGE:
        parts.append("four-wire (Kelvin) leads" if s.four_wire else "two-wire")
    return ", ".join(parts)


def _amount(value: float, unit: str) -> str:
    """A setting as a dial shows it: '230 V', '8 A', '100 mV' (3 figures, trailing zeros dropped)."""
    return present.si(value, unit, 3, keep_zeros=False)


def resolution(nominal: float, low: float | None, high: float | None) -> float | None:
    """The step a limit is printed to: the power of ten at or below a fifth of the narrower side of the
    tolerance (common practice), so a 10 % band on 21.45 ohm reads 19.4 to 23.5 and a 0.5 % ratio band
    on 17.58 reads 17.50 to 17.67. None without a limit."""
    sides = [abs(nominal - x) for x in (low, high) if x is not None and abs(nominal - x) > 0]
    if not sides or not math.isfinite(min(sides)):
        return None
    return float(10.0 ** math.floor(math.log10(min(sides) * LIMIT_RESOLUTION_SHARE) + 1e-9))


def round_inward(low: float | None, high: float | None, step: float) -> tuple[float | None, float | None]:
    """Low limit rounded up, high limit rounded down to the step: the printed limit never passes a part the
    exact one fails (common practice)."""
    places = max(0, -int(math.floor(math.log10(step) + 1e-9)))
    lo = None if low is None else round(math.ceil(low / step - 1e-9) * step, places)
    hi = None if high is None else round(math.floor(high / step + 1e-9) * step, places)
    return lo, hi


def finish(lim: Limit) -> Limit:
    """A kind's limit made station-ready: limits rounded inward to a sensible resolution, and the condition
    the whole instruction (pins; instrument setting; the kind's note). A limit without a setting keeps its
    condition as written."""
    step = resolution(lim.nominal, lim.low, lim.high)
    low, high = round_inward(lim.low, lim.high, step) if step else (lim.low, lim.high)
    if lim.setting is None:
        return dataclasses.replace(lim, low=low, high=high)
    said = [lim.pins, setting_text(lim.setting), lim.condition]
    return dataclasses.replace(lim, low=low, high=high, condition="; ".join(x for x in said if x))
