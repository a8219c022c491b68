"""The ``flyback`` section of a spec (kind: flyback)::

    flyback:
      input_voltage_min: 90 V        # DC bus at the lowest line, bulk-capacitor ripple included
      input_voltage_max: 375 V       # DC bus at the highest line
      mode: dcm                      # dcm | boundary | ccm (with ripple_ratio) ... or inductance: 600 uH
      ripple_ratio: 0.6              # ccm: primary current swing / peak at the lowest input
      duty_max: 0.45                 # ... or reflected_voltage: 100 V
      efficiency: 0.85               # output / input power, for the primary's currents
      diode_drop: 0.7 V              # each output rectifier's forward drop
      output_tolerance: 5            # percent: each output's voltage from whole turns within this

Windings: one primary (no voltage or current: they follow from the section), secondaries and auxiliaries each
with the voltage at its output and its DC load current. The core's gap is found from L_p (core.gap is refused;
core.gap_arrangement is used).
"""

from __future__ import annotations

from ..loading import Reader
from ..records import record
from .spec import Winding

MODES = ("dcm", "boundary", "ccm")
SECTION_KEYS = ("input_voltage_min", "input_voltage_max", "mode", "ripple_ratio", "inductance", "duty_max",
                "reflected_voltage", "efficiency", "diode_drop", "output_tolerance")
UNUSED_OPERATING_KEYS = ("waveform", "duty", "efficiency")   # the drive is the flyback's own; efficiency here
_UNUSED_WINDING_KEYS = ("voltage_min", "voltage_max", "va", "turns", "same_turns_as")


@record
class FlybackReq:
    """A flyback's requirement (kind: flyback)."""
    v_in_min_v: float
    v_in_max_v: float
    mode: str | None                 # None when the inductance is given
    ripple_ratio: float              # ccm only
    inductance_h: float | None
    duty_max: float | None
    reflected_voltage_v: float | None
    efficiency: float
    diode_drop_v: float
    output_tolerance_pct: float
    gap_arrangement: str             # centre | spacer (core.gap_arrangement)


def refuse_unused(r: Reader, keys: tuple[str, ...], allowed: bool = False) -> None:
    """A key kind flyback does not use is an error naming the key and the kind."""
    for key in list(r.data) if allowed else keys:
        if (key not in keys) if allowed else r.has(key):
            raise r.error(f"'{key}' is not used by kind flyback", str(key))


def parse_flyback(r: Reader, core: Reader, windings: tuple[Winding, ...], wreaders: list[Reader]) -> FlybackReq:
    refuse_unused(r, SECTION_KEYS, allowed=True)
    v_min = r.quantity("input_voltage_min", "voltage")
    v_max = r.quantity("input_voltage_max", "voltage")
    if v_max < v_min:
        raise r.error("input_voltage_max is below input_voltage_min", "input_voltage_max")
    inductance = r.quantity("inductance", "inductance", None)
    mode = r.choice("mode", MODES, None)
    if (mode is None) == (inductance is None):
        raise r.error("give either mode (dcm, boundary or ccm) or the primary inductance", "mode")
    ripple = r.number("ripple_ratio", None, minimum=0.05, maximum=1.0)
    if mode == "ccm" and ripple is None:
        raise r.error("mode ccm needs ripple_ratio (primary current swing / peak at the lowest input)", "ripple_ratio")
    if mode != "ccm" and ripple is not None:
        raise r.error(f"'ripple_ratio' is not used by kind flyback in mode {mode or 'given inductance'}", "ripple_ratio")
    duty = r.number("duty_max", None, minimum=0.05, maximum=0.8)
    vr = r.quantity("reflected_voltage", "voltage", None)
    if duty is not None and vr is not None:
        raise r.error("give either duty_max or reflected_voltage, not both", "reflected_voltage")
    req = FlybackReq(v_in_min_v=v_min, v_in_max_v=v_max, mode=mode, ripple_ratio=float(ripple or 1.0),
                     inductance_h=inductance, duty_max=duty if vr is None else None, reflected_voltage_v=vr,
                     efficiency=r.number("efficiency", 0.85, minimum=0.3, maximum=0.99),
                     diode_drop_v=r.quantity("diode_drop", "voltage", 0.7, allow_zero=True),
                     output_tolerance_pct=r.number("output_tolerance", 5.0, minimum=0.1, maximum=30.0),
                     gap_arrangement=core.choice("gap_arrangement", ("centre", "spacer"), "centre"))
    if req.duty_max is None and req.reflected_voltage_v is None:
        req = FlybackReq(**{**req.__dict__, "duty_max": 0.45})     # common practice: under 50 % at the lowest line
    r.done()
    _check_windings(r, windings, wreaders)
    return req


def _check_windings(r: Reader, windings: tuple[Winding, ...], wreaders: list[Reader]) -> None:
    prims = [w for w in windings if w.role == "primary"]
    if len(prims) != 1:
        raise r.error(f"a flyback needs exactly one primary winding, found {len(prims)}", "windings")
    if not any(w.role == "secondary" for w in windings):
        raise r.error("a flyback needs at least one secondary winding", "windings")
    for w, wr in zip(windings, wreaders):
        refuse_unused(wr, _UNUSED_WINDING_KEYS)
        if w.role == "primary":
            refuse_unused(wr, ("voltage", "current"))
        elif w.role in ("secondary", "auxiliary"):
            if w.voltage_v is None or w.current_a is None:
                raise wr.error(f"a flyback {w.role} needs its output voltage and its DC load current",
                               "voltage" if w.voltage_v is None else "current")
        else:
            raise wr.error(f"role '{w.role}' is not used by kind flyback (primary, secondary, auxiliary)", "role")
