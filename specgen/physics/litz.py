"""Litz windings at low frequency: Sullivan's strand-level proximity-loss factor.

SI units: frequency Hz, lengths m, resistivity ohm m. Floats or numpy arrays (broadcast).
"""

from __future__ import annotations

import numpy as np
import numpy.typing as npt

from specgen.physics.wire import MU0_H_M

FloatArray = npt.NDArray[np.float64]
FloatLike = float | FloatArray
BoolLike = bool | npt.NDArray[np.bool_]

__all__ = ["ROUND_OVER_SQUARE_STRAND_LOSS", "SULLIVAN_MAX_STRAND_RATIO", "litz_fr_round_strands", "litz_fr_sullivan",
           "litz_sullivan_valid"]

# Strand diameter over skin depth up to which the low-frequency proximity loss of a round strand stays within
# about 0.1 % of the exact (Bessel-function) solution: 0.09 % at 0.6, 0.7 % at 1.0, 4.5 % at 1.6 (computed
# from the exact solution normalised to its low-frequency limit).
SULLIVAN_MAX_STRAND_RATIO = 0.6

# Low-frequency eddy loss of a round strand in a transverse field over that of Dowell's square of equal area:
# the loss goes as the conductor's second area moment, pi d^4 / 64 against s^4 / 12 with s = d sqrt(pi) / 2.
ROUND_OVER_SQUARE_STRAND_LOSS = 3.0 / np.pi


def _out(x: FloatArray) -> FloatLike:
    return float(x) if x.ndim == 0 else x


def litz_fr_sullivan(freq_hz: npt.ArrayLike, turns: npt.ArrayLike, strands: npt.ArrayLike,
                     strand_diameter_m: npt.ArrayLike, window_breadth_m: npt.ArrayLike,
                     resistivity_ohm_m: npt.ArrayLike, field_factor: npt.ArrayLike = 1.0) -> FloatLike:
    """AC-to-DC resistance ratio of a litz winding at low frequency (strand-level proximity effect).

        F_r = 1 + (pi omega)^2 mu0^2 N^2 n^2 d_c^6 k / (768 rho_c^2 b_c^2),   omega = 2 pi f

    equivalently 1 + pi^2 N^2 n^2 d_c^6 k / (192 delta^4 b_c^2) with the skin depth delta = sqrt(2 rho / (omega mu0)).
    Each of the N n strands sits in the window's transverse field, which rises linearly from zero to N I / b_c
    across the winding (mean square (N I / b_c)^2 / 3), and loses pi omega^2 mu0^2 H^2 d_c^4 / (128 rho) per metre
    at low frequency. The result does not depend on how the turns and bundles are arranged in layers: Ampere's
    law around the core gives H = N I / b_c across the window breadth b_c whatever share of it the bundles cover
    (a winding covering part of the breadth fringes, which this one-dimensional picture ignores).

    Assumes ideal twisting (equal strand currents, no bundle-level eddy currents) and strands small against the
    skin depth (``litz_sullivan_valid``); the strands' own skin effect (about (d_c/delta)^4 / 768 of DC at low
    frequency, from the Kelvin-function solution for a round wire; computed) is neglected as in the paper.

    Parameters
    ----------
    freq_hz : frequency f [Hz]
    turns : N, turns in the winding portion between zero and peak MMF
    strands : n, strands per bundle
    strand_diameter_m : bare strand diameter d_c [m]
    window_breadth_m : breadth of the winding window b_c [m], the length the window field crosses
        (along the layers, parallel to the core leg)
    resistivity_ohm_m : strand resistivity rho_c at the winding temperature [ohm m]
    field_factor : k, 1 for one winding portion from zero to peak MMF; a winding split into p equal interleaved
        portions, each from zero to peak, has k = 1 / p^2 (the same mean-square field argument)

    Returns
    -------
    F_r = R_ac / R_dc (dimensionless), the broadcast shape of the inputs.

    References
    ----------
    C. R. Sullivan, "Optimal choice for number of strands in a litz-wire transformer winding", IEEE Trans.
    Power Electronics 14(2), 283-291, 1999, eq. for F_r (from memory). Low-frequency eddy loss of a round
    conductor in a transverse field: e.g. Lammeraner and Stafl, Eddy Currents (1966) (from memory).
    """
    f, n_turns, n_strands, d, b, rho, k = np.broadcast_arrays(
        *(np.asarray(v, dtype=float) for v in (freq_hz, turns, strands, strand_diameter_m, window_breadth_m,
                                                resistivity_ohm_m, field_factor)))
    if np.any(~(d > 0.0)) or np.any(~(b > 0.0)) or np.any(~(rho > 0.0)):
        raise ValueError("litz factor: strand diameter, window breadth and resistivity must be > 0")
    if np.any(~(f >= 0.0)) or np.any(~(n_turns >= 0.0)) or np.any(~(n_strands >= 1.0)) or np.any(~(k >= 0.0)):
        raise ValueError("litz factor: need frequency >= 0, turns >= 0, strands >= 1, field factor >= 0")
    omega = 2.0 * np.pi * f
    prox = (np.pi * omega) ** 2 * MU0_H_M ** 2 * (n_turns * n_strands) ** 2 * d ** 6 * k / (768.0 * rho ** 2 * b ** 2)
    return _out(np.asarray(1.0 + prox, dtype=float))


def litz_sullivan_valid(strand_diameter_m: npt.ArrayLike, skin_depth_m: npt.ArrayLike) -> BoolLike:
    """Whether the strands are small enough for ``litz_fr_sullivan``: d_c / delta <= 0.6.

    Parameters
    ----------
    strand_diameter_m : bare strand diameter d_c [m]
    skin_depth_m : skin depth delta in the strand at the frequency and temperature [m]

    References
    ----------
    The low-frequency approximation's limit in Sullivan (IEEE Trans. PE 14(2), 1999); the 0.6 bound keeps the
    strand proximity loss within about 0.1 % of the exact round-conductor solution (computed).
    """
    ratio = np.asarray(strand_diameter_m, dtype=float) / np.asarray(skin_depth_m, dtype=float)
    ok = np.asarray(ratio <= SULLIVAN_MAX_STRAND_RATIO)
    return bool(ok) if ok.ndim == 0 else ok


def litz_fr_round_strands(fr_dowell_strands: npt.ArrayLike) -> FloatLike:
    """A Litz layer's AC factor from Dowell's strand-level factor, rescaled from square to round strands.

        F_r = 1 + (3 / pi) (F_Dowell - 1)

    ``fr_dowell_strands`` is Dowell's factor with each strand layer of the bundles taken as a layer of round
    conductors at the porosity of the strands it holds (strands across the breadth x d_c / b_c). Dowell
    replaces each round strand by the square of equal area, whose low-frequency eddy loss is pi / 3 times the
    round strand's (``ROUND_OVER_SQUARE_STRAND_LOSS``). So rescaled, a winding portion of m strand layers
    from zero to peak MMF has F_r - 1 = (Sullivan's F_r - 1)(1 - 1 / (5 m^2)) at low frequency (the 1/(5 m^2)
    is Dowell's discrete-layer term D^4 / 45 against the continuous field Sullivan averages): within 2 % of
    ``litz_fr_sullivan`` from 3 strand layers on. Above the low-frequency range (strands beyond about 0.6
    skin depths, as at a square wave's upper harmonics) it keeps Dowell's slower growth, where Sullivan's
    term, which grows as f^2 without end, no longer holds.

    Parameters
    ----------
    fr_dowell_strands : Dowell's factor of the layer at strand level (>= 1)

    Returns
    -------
    F_r (dimensionless), the shape of the input.

    References
    ----------
    Dowell, "Effects of eddy currents in transformer windings", Proc. IEE 113(8), 1966 (the equivalent square
    and the layer factor); C. R. Sullivan, IEEE Trans. Power Electronics 14(2), 1999 (the low-frequency strand
    result it then matches); second area moments of the circle and the square (any statics handbook).
    """
    fr = np.asarray(fr_dowell_strands, dtype=float)
    return _out(np.asarray(1.0 + ROUND_OVER_SQUARE_STRAND_LOSS * (fr - 1.0), dtype=float))
