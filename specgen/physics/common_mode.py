"""Common-mode chokes: permeability at a frequency, the sector winding's leakage (differential-mode)
inductance, the common-mode current a line-to-ground voltage drives, and the flux each mode leaves in the core.

A common-mode choke carries every line of a supply on one high-permeability toroid, each line on its own
sector, all wound in the same sense. The line (differential-mode) currents' ampere-turns cancel in the core;
a current common to all lines (to ground) sees N^2 A_L. The part of each line's field that does not link the
others (the leakage) acts as a differential-mode inductance in series with each line; its flux closes
through the air beside the sector and passes, in the worst case, through the core's section under the winding.

The leakage estimate: each sector's differential-mode flux leaves the core at the sector's ends and closes in
air, so the wound sector behaves as an open magnetic rod, the idea of Nave's common-mode inductor model
(M. J. Nave, "On modeling the common mode inductor", IEEE International Symposium on EMC, 1991; from memory).
The rod is taken straight, as long as the sector's arc on the mean path and of the round section with the
core's A_e; its apparent permeability mu_app = mu / (1 + N_d (mu - 1)) uses the demagnetising factor N_d of
a prolate spheroid of that length-to-diameter ratio in closed form (J. A. Osborn, "Demagnetizing factors of
the general ellipsoid", Phys. Rev. 67, 351-357, 1945), and the leakage is L = mu0 mu_app N^2 A_e / l_arc (the
inductance of the winding on that rod). The curvature and the neighbour sectors are left out: an estimate,
typically within a factor of two of a measured leakage; it lands in the 0.5 to 4 % of L_CM that suppliers
quote for sector-wound chokes (common practice). The first article is measured (the test sheet says so).

SI units: henry, ampere, volt, hertz, tesla, metre. Floats or numpy arrays where stated.
"""

from __future__ import annotations

import math
from collections.abc import Sequence

import numpy as np

from ._types import Arr, ArrayLike, out
from .wire import MU0_H_M


def permeability_at_frequency(freq_hz: float, table_hz: Sequence[float], table_mu: Sequence[float]) -> float:
    """A material's small-signal relative permeability at ``freq_hz`` from its table (mu against frequency).

    Linear in log(f) between the table's points and held at the end values outside them (a permeability
    spectrum is smooth on a logarithmic frequency axis; the ends are not extrapolated).

    Parameters
    ----------
    freq_hz : the frequency [Hz]
    table_hz : the table's frequencies [Hz], ascending
    table_mu : the relative permeability at each

    References
    ----------
    Piecewise-linear interpolation on a log-frequency axis, as permeability spectra are plotted in ferrite
    handbooks (common practice).
    """
    if len(table_hz) != len(table_mu) or not table_hz:
        raise ValueError("a permeability table needs as many permeabilities as frequencies")
    return float(np.interp(math.log10(freq_hz), np.log10(np.asarray(table_hz, float)), np.asarray(table_mu, float)))


def prolate_demagnetizing_factor(aspect: ArrayLike) -> Arr:
    """Demagnetising factor along the long axis of a prolate spheroid of length/diameter ``aspect`` (m > 1).

    N_d = 1/(m^2 - 1) [ m / sqrt(m^2 - 1) ln(m + sqrt(m^2 - 1)) - 1 ]

    References
    ----------
    J. A. Osborn, "Demagnetizing factors of the general ellipsoid", Phys. Rev. 67 (1945) 351, eq. for the
    prolate spheroid.
    """
    m = np.maximum(np.asarray(aspect, dtype=float), 1.0 + 1e-9)
    s = np.sqrt(m * m - 1.0)
    return out((m / s * np.log(m + s) - 1.0) / (m * m - 1.0))


def rod_apparent_permeability(mu_r: ArrayLike, demag: ArrayLike) -> Arr:
    """Apparent permeability of an open rod of material ``mu_r``: mu_app = mu_r / (1 + N_d (mu_r - 1)).

    References
    ----------
    The demagnetising-field relation for an open magnetic body (R. M. Bozorth, Ferromagnetism, 1951, ch. on
    demagnetising factors; from memory).
    """
    mu = np.asarray(mu_r, dtype=float)
    return out(mu / (1.0 + np.asarray(demag, dtype=float) * (mu - 1.0)))


def sector_leakage_inductance_h(turns: ArrayLike, mu_r: ArrayLike, ae_m2: ArrayLike, le_m: ArrayLike,
                                sector_angle_rad: ArrayLike) -> Arr:
    """Leakage (differential-mode) inductance of one line's sector winding on a toroid [H].

    The sector as an open rod (module docstring): arc l_w = l_e theta / (2 pi), diameter
    D = sqrt(4 A_e / pi), N_d from Osborn's prolate spheroid at m = l_w / D, mu_app = mu / (1 + N_d (mu - 1)),
    L_leak = mu0 mu_app N^2 A_e / l_w.

    Parameters
    ----------
    turns : the line's turns
    mu_r : the core's relative permeability (the mode's frequency)
    ae_m2, le_m : effective area [m^2] and path length [m] (IEC 60205)
    sector_angle_rad : the angle the line's winding covers on the ring [rad]

    References
    ----------
    Nave 1991 (the sector as an open core, from memory); Osborn 1945 (N_d); Bozorth 1951 (mu_app).
    """
    n = np.asarray(turns, dtype=float)
    ae = np.asarray(ae_m2, dtype=float)
    arc = np.asarray(le_m, dtype=float) * np.asarray(sector_angle_rad, dtype=float) / (2.0 * np.pi)
    diameter = np.sqrt(4.0 * ae / np.pi)
    mu_app = rod_apparent_permeability(mu_r, prolate_demagnetizing_factor(arc / diameter))
    return out(MU0_H_M * np.asarray(mu_app) * n * n * ae / arc)


def common_mode_current_a(v_line_to_ground_v: ArrayLike, freq_hz: ArrayLike, capacitance_to_ground_f: ArrayLike) -> Arr:
    """Current to ground through the capacitance after the choke [A rms]: I = 2 pi f C V.

    References
    ----------
    Capacitive reactance X_C = 1 / (2 pi f C) (any circuit text).
    """
    return out(2.0 * np.pi * np.asarray(freq_hz, float) * np.asarray(capacitance_to_ground_f, float)
               * np.asarray(v_line_to_ground_v, float))

