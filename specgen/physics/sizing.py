"""First-cut core sizing: McLyman's area product and the apparent power it is based on."""

from __future__ import annotations

import numpy as np

from ._types import Arr, ArrayLike


def area_product_m4(power_t_w: ArrayLike, form_factor: ArrayLike, ku: ArrayLike, b_peak_t: ArrayLike, freq_hz: ArrayLike,
                    current_density_a_m2: ArrayLike) -> Arr:
    """Area product Ap = Wa Ae = Pt / (Kf Ku B f J) [m^4].

    Parameters
    ----------
    power_t_w : apparent power Pt of all windings [W] (see ``transformer_apparent_power_w``)
    form_factor : Kf (4.44 sine, 4.0 square)
    ku : window utilisation factor Ku (copper area / window area)
    b_peak_t : peak operating flux density [T]
    freq_hz : frequency [Hz]
    current_density_a_m2 : current density J [A/m^2]

    McLyman writes Ap[cm^4] = Pt 10^4 / (Kf Ku B f J) with B in T and J in A/cm^2; the 10^4 only
    converts those units. In SI (J in A/m^2, Ap in m^4) no factor is needed.

    References
    ----------
    McLyman, Transformer and Inductor Design Handbook (area product Ap).
    """
    ap = (np.asarray(power_t_w, dtype=float)
          / (np.asarray(form_factor, dtype=float) * np.asarray(ku, dtype=float)
             * np.asarray(b_peak_t, dtype=float) * np.asarray(freq_hz, dtype=float)
             * np.asarray(current_density_a_m2, dtype=float)))
    return float(ap) if ap.ndim == 0 else ap


# topology -> (factor on Po/eta for the primary, factor on Po for the secondaries)
_TOPOLOGIES = {
    "full-wave": (1.0, 1.0),             # full-wave bridge / plain two-winding transformer
    "centre-tapped": (1.0, np.sqrt(2)),  # centre-tapped secondary (McLyman, from memory)
    "push-pull": (np.sqrt(2), np.sqrt(2)),  # centre-tapped primary and secondary (McLyman, from memory)
}


def transformer_apparent_power_w(outputs_va: ArrayLike, efficiency: float, topology: str = "full-wave") -> float:
    """Apparent power Pt handled by the windings, Pt = Po (1/eta + 1) for a two-winding transformer.

    Parameters
    ----------
    outputs_va : output power Po [VA], a number or a sequence (summed over the secondaries)
    efficiency : eta, 0 < eta <= 1
    topology : "full-wave" (plain two-winding, bridge rectifier: Pt = Po/eta + Po);
        "centre-tapped" (centre-tapped secondary: Pt = Po/eta + sqrt(2) Po) and "push-pull"
        (centre-tapped primary and secondary: Pt = sqrt(2) Po/eta + sqrt(2) Po), the last two from
        memory of McLyman's tables, since a centre-tapped winding carries current half the time.

    References
    ----------
    McLyman, Transformer and Inductor Design Handbook (apparent power Pt; stated for the simple
    two-winding case here).
    """
    if topology not in _TOPOLOGIES:
        raise ValueError(f"unknown topology {topology!r}; expected one of {', '.join(_TOPOLOGIES)}")
    eta = float(efficiency)
    if not 0.0 < eta <= 1.0:
        raise ValueError("efficiency must lie in (0, 1]")
    po = float(np.sum(np.asarray(outputs_va, dtype=float)))
    primary, secondary = _TOPOLOGIES[topology]
    return float(po * (primary / eta + secondary))
