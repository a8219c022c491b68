"""The Design's records of several primaries (their connections) and of the loads secondaries feed.

Kept beside ``result.py``; the JSON keys appear only on a part that has them (every other part's JSON is
unchanged): ``connections[]`` on the transformer, ``windings[].connection``, ``windings[].load``,
``windings[].rms_current_a``, ``windings[].form_factor``.
"""

from __future__ import annotations

from typing import Any

from ..records import record


@record
class ConnectionResult:
    """One way the primaries are joined, the voltage across each half and the flux it gives."""
    name: str
    primaries: tuple[str, ...]
    mode: str                        # series | parallel
    mains_voltage_v: float
    links: tuple[tuple[str, str], ...]
    half_voltage_v: float            # across each primary at the nominal mains voltage
    b_peak_t: float                  # at the nominal mains voltage
    b_peak_max_t: float              # at the top of the mains range (the primaries' voltage_max ratio)
    worst: bool                      # the connection with the highest flux


@record
class LoadResult:
    """A secondary's load and the current it draws."""
    winding: str
    load: str                        # resistive | bridge_capacitor | centre_tapped | converter
    dc_current_a: float              # the load current declared (DC for a rectifier, rms for a resistor)
    rms_current_a: float             # the winding's rms current
    form_factor: float               # rms_current_a / dc_current_a
    source: str                      # the published method of the form factor
    va: float                        # winding voltage x rms current
    power_w: float                   # real power delivered
    other_half: str | None = None    # centre_tapped: the half that conducts in the other half period
    vdc_over_vpk: float | None = None   # bridge_capacitor: the DC output over the peak winding voltage
    harmonics: tuple[tuple[int, float], ...] = ()   # (order, share of the mean square) where not the drive's


@record
class TapResult:
    """A tap as built: the turn it comes out at and where that turn lies."""
    winding: str
    voltage_v: float
    turn: int                        # counted from the winding's start
    pin: str
    section: int                     # 1-based section of the winding
    layer: int                       # 1-based layer within that section
    turn_in_layer: int               # 1-based
    actual_v: float                  # the voltage the whole turn gives (nominal)
    b_peak_max_t: float | None = None   # a primary fed at the tap: the flux at the top of its range
    range_v: tuple[float, float] | None = None   # the tap's voltage over the input range (full load, low to high)


@record
class ResetResult:
    """A forward converter's reset winding (``design.forward``): its turns, the duty it allows, the flux swing,
    its current and the switch's voltage, at the top of the input range."""
    winding: str
    turns: int
    turns_ratio: float               # N_p / N_reset as built
    duty: float                      # the largest duty the spec runs at
    duty_max: float                  # N_p / (N_p + N_reset)
    reset_fraction: float            # the share of the period the reset winding conducts, D N_r / N_p
    delta_b_t: float                 # the primary volt-seconds' flux swing at the top of the input
    b_r_t: float                     # where the swing starts (remanence)
    b_end_t: float                   # B_r + delta B
    b_sat_hot_t: float
    current_peak_a: float
    current_rms_a: float
    current_avg_a: float             # returned to the input
    switch_voltage_v: float          # V_in,max (1 + N_p / N_r)
    input_max_v: float
    wire: str


def reset_dict(r: ResetResult) -> dict[str, Any]:
    """The ``reset`` key of a forward transformer's JSON."""
    return {"winding": r.winding, "turns": r.turns, "turns_ratio": r.turns_ratio, "duty": r.duty,
            "duty_max": r.duty_max, "reset_fraction": r.reset_fraction, "delta_b_t": r.delta_b_t, "b_r_t": r.b_r_t,
            "b_end_t": r.b_end_t, "b_sat_hot_t": r.b_sat_hot_t, "current_peak_a": r.current_peak_a,
            "current_rms_a": r.current_rms_a, "current_avg_a": r.current_avg_a,
            "switch_voltage_v": r.switch_voltage_v, "input_max_v": r.input_max_v, "wire": r.wire}


def extend_dict(out: dict[str, Any], connections: tuple[ConnectionResult, ...],
                loads: tuple[LoadResult, ...], frequencies_hz: tuple[float, ...] = (),
                taps: tuple[TapResult, ...] = (), reset: ResetResult | None = None) -> None:
    """Add the connection, load and frequency keys to a Design's JSON (``Design.to_dict``) where the part has
    them."""
    if frequencies_hz:
        out["frequencies_hz"] = list(frequencies_hz)
    if reset is not None:
        out["reset"] = reset_dict(reset)
    for w in out["windings"]:
        mine = [t for t in taps if t.winding == w["name"]]
        if mine:
            w["taps"] = [{"voltage_v": t.voltage_v, "turn": t.turn, "pin": t.pin, "section": t.section,
                          "layer": t.layer, "turn_in_layer": t.turn_in_layer, "actual_v": t.actual_v,
                          "b_peak_max_t": t.b_peak_max_t,
                          "range_v": list(t.range_v) if t.range_v else None} for t in mine]
    if connections:
        out["connections"] = [{
            "name": c.name, "primaries": list(c.primaries), c.mode: list(c.primaries),
            "mains_voltage_v": c.mains_voltage_v, "links": [f"{a}-{b}" for a, b in c.links],
            "half_voltage_v": c.half_voltage_v, "b_peak_t": c.b_peak_t, "b_peak_max_t": c.b_peak_max_t,
            "worst": c.worst,
        } for c in connections]
        for w in out["windings"]:
            names = [c.name for c in connections if w["name"] in c.primaries]
            if names:
                w["connection"] = names
    for w in out["windings"]:
        mates = {s.get("wound_with") for s in w.get("sections", [])} - {None}
        for s in w.get("sections", []):
            s.pop("wound_with", None)
        if mates:
            w["wound_with"] = sorted(mates)[0]
    per = {ld.winding: ld for ld in loads}
    if per:
        for w in out["windings"]:
            ld = per.get(w["name"])
            if ld is not None:
                w.update({"load": ld.load, "rms_current_a": ld.rms_current_a, "form_factor": ld.form_factor,
                          "dc_current_a": ld.dc_current_a, "va": ld.va, "form_factor_source": ld.source})
