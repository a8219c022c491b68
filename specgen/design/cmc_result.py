"""A common-mode choke's own figures on the Design (kind: common_mode_choke), and their JSON."""

from __future__ import annotations

from typing import Any

from ..records import record


@record
class CommonModeChokeResult:
    """What the common-mode choke kind found: turns from A_L, the leakage, both modes' flux, the sectors."""
    lines: int
    turns: int                         # each line
    line_current_a: float              # rms, each line
    line_frequency_hz: float           # the lowest line frequency
    line_voltage_v: float              # rms, line to line
    line_to_ground_v: float
    inductance_frequency_hz: float     # where L_CM is stated and tested
    mu_at_frequency: float             # the material's permeability there (its table, else mu_initial)
    mu_source: str                     # "table" | "mu_initial"
    mu_at_line_frequency: float
    al_h: float                        # A_L at inductance_frequency [H per turn^2]
    inductance_cm_h: float             # N^2 A_L, lines in parallel
    inductance_cm_min_h: float         # the spec's minimum
    leakage_inductance_h: float        # each line (the differential-mode inductance in series with it)
    inductance_dm_min_h: float | None  # the spec's least leakage per line, if any
    leakage_method: str                # the estimate's name, for the documents
    common_mode_current_a: float       # rms to ground at the line frequency
    common_mode_current_basis: str
    b_cm_peak_t: float                 # from the common-mode current at the line frequency
    b_dm_peak_t: float                 # from the leakage at the peak line current
    current_dm_peak_a: float
    winding_angle_deg: float           # each sector
    gap_angle_deg: float               # between neighbouring sectors
    sector_gap_m: float                # clear distance at the innermost copper, as built
    sector_gap_asked_m: float


def cmc_dict(c: CommonModeChokeResult) -> dict[str, Any]:
    """The JSON keys of a common-mode choke (issue 17's names kept: common_mode_inductance_h, lines, ...)."""
    return {
        "lines": c.lines, "turns_per_line": c.turns, "line_current_a": c.line_current_a,
        "common_mode_inductance_h": c.inductance_cm_h, "common_mode_inductance_min_h": c.inductance_cm_min_h,
        "inductance_frequency_hz": c.inductance_frequency_hz, "mu_at_inductance_frequency": c.mu_at_frequency,
        "al_nh": c.al_h * 1e9, "differential_inductance_h": c.leakage_inductance_h,
        "differential_inductance_min_h": c.inductance_dm_min_h, "leakage_method": c.leakage_method,
        "common_mode_current_a": c.common_mode_current_a, "b_cm_peak_t": c.b_cm_peak_t,
        "b_dm_peak_t": c.b_dm_peak_t, "differential_current_peak_a": c.current_dm_peak_a,
        "sector_angle_deg": c.winding_angle_deg, "sector_gap_angle_deg": c.gap_angle_deg,
        "sector_gap_mm": c.sector_gap_m * 1e3,
    }
