"""AC resistance factor of layered windings: Dowell's one-dimensional model and its helpers.

Delta is the conductor thickness over the skin depth (for round wire, of the equivalent foil).
Functions are vectorised; ``layers`` may be non-integer (effective layers).
"""

from __future__ import annotations

import numpy as np

from ._types import Arr, ArrayLike

# Below this Delta the cancellation in cosh 2D - cos 2D costs more digits than the truncated series
# (next term ~ 2.6e-3 m^2 D^8 relative) loses, for any practical m; use the series there.
_SERIES_BELOW = 1e-2


def _out(x: ArrayLike) -> Arr:
    x = np.asarray(x, dtype=float)
    return float(x) if x.ndim == 0 else x


def dowell_fr_low_freq(delta: ArrayLike, layers: ArrayLike) -> Arr:
    """Low-frequency expansion of Dowell's factor, Fr = 1 + (5 m^2 - 1) Delta^4 / 45.

    Parameters
    ----------
    delta : Delta = conductor thickness / skin depth (equivalent foil for round wire)
    layers : number of layers m in the winding portion (from zero MMF to the peak)

    References
    ----------
    Dowell, "Effects of eddy currents in transformer windings", Proc. IEE 113(8), 1966 (series of
    its Fr in Delta; the next term is O(Delta^8)).
    """
    d = np.asarray(delta, dtype=float)
    m = np.asarray(layers, dtype=float)
    return _out(1.0 + (5.0 * m * m - 1.0) * d ** 4 / 45.0)


def dowell_fr(delta: ArrayLike, layers: ArrayLike) -> Arr:
    """Dowell's AC-to-DC resistance ratio of an m-layer winding portion.

    Fr = D [ (sinh 2D + sin 2D)/(cosh 2D - cos 2D) + (2 (m^2 - 1)/3) (sinh D - sin D)/(cosh D + cos D) ]

    Parameters
    ----------
    delta : D = h / skin depth (foil thickness, or equivalent-foil value for round wire), >= 0
    layers : m, the layers between zero and peak MMF (the whole winding if not interleaved), >= 1

    Evaluation: the series 1 + (5 m^2 - 1) D^4 / 45 below D = 1e-2; the hyperbolic form up to D = 1;
    above that the same ratios multiplied through by exp(-2D) or exp(-D), which never overflow
    (for large D, Fr -> D (2 m^2 + 1) / 3).

    References
    ----------
    Dowell, "Effects of eddy currents in transformer windings", Proc. IEE 113(8), 1966.
    """
    d, m = np.broadcast_arrays(np.asarray(delta, dtype=float), np.asarray(layers, dtype=float))
    if np.any(d < 0.0):
        raise ValueError("delta must be >= 0")
    k = 2.0 * (m * m - 1.0) / 3.0
    small = d < _SERIES_BELOW
    mid = (~small) & (d < 1.0)
    big = d >= 1.0
    out = np.empty(d.shape, dtype=float)

    ds = d[small]
    out[small] = 1.0 + (5.0 * m[small] ** 2 - 1.0) * ds ** 4 / 45.0

    x = d[mid]
    skin = (np.sinh(2 * x) + np.sin(2 * x)) / (np.cosh(2 * x) - np.cos(2 * x))
    prox = (np.sinh(x) - np.sin(x)) / (np.cosh(x) + np.cos(x))
    out[mid] = x * (skin + k[mid] * prox)

    x = d[big]
    e1, e2, e4 = np.exp(-x), np.exp(-2 * x), np.exp(-4 * x)
    skin = (1.0 - e4 + 2.0 * e2 * np.sin(2 * x)) / (1.0 + e4 - 2.0 * e2 * np.cos(2 * x))
    prox = (1.0 - e2 - 2.0 * e1 * np.sin(x)) / (1.0 + e2 + 2.0 * e1 * np.cos(x))
    out[big] = x * (skin + k[big] * prox)
    return _out(out)


def porosity(diameter_m: ArrayLike, pitch_m: ArrayLike) -> Arr:
    """Layer porosity (copper fraction across the layer) eta = d / pitch, clipped to <= 1.

    Parameters
    ----------
    diameter_m : bare conductor diameter [m]
    pitch_m : centre-to-centre spacing of adjacent turns in the layer [m]

    References
    ----------
    Dowell 1966 (the layer copper factor); Snelling, Soft Ferrites (porosity factor).
    """
    return _out(np.minimum(np.asarray(diameter_m, dtype=float) / np.asarray(pitch_m, dtype=float), 1.0))


def round_wire_delta(diameter_m: ArrayLike, skin_depth_m: ArrayLike, porosity: ArrayLike) -> Arr:
    """Dowell's Delta for a layer of round wire, Delta = (pi/4)^0.75 (d / delta) sqrt(eta).

    The round wire is replaced by a square conductor of equal area (side d sqrt(pi)/2), and the layer
    of squares by a foil of the same copper, with the conductivity scaled by the porosity eta.

    Parameters
    ----------
    diameter_m : bare wire diameter d [m]
    skin_depth_m : skin depth in the conductor [m]
    porosity : eta = d / pitch (0 < eta <= 1)

    References
    ----------
    Dowell, "Effects of eddy currents in transformer windings", Proc. IEE 113(8), 1966.
    """
    return _out((np.pi / 4.0) ** 0.75 * np.asarray(diameter_m, dtype=float)
                / np.asarray(skin_depth_m, dtype=float) * np.sqrt(np.asarray(porosity, dtype=float)))


def foil_delta(thickness_m: ArrayLike, skin_depth_m: ArrayLike, porosity: ArrayLike = 1.0) -> Arr:
    """Dowell's Delta for a foil layer, Delta = (t / delta) sqrt(eta) (eta: foil width / window).

    References
    ----------
    Dowell, "Effects of eddy currents in transformer windings", Proc. IEE 113(8), 1966.
    """
    return _out(np.asarray(thickness_m, dtype=float) / np.asarray(skin_depth_m, dtype=float)
                * np.sqrt(np.asarray(porosity, dtype=float)))


def litz_fr(strand_diameter_m: ArrayLike, skin_depth_m: ArrayLike, strands: ArrayLike, layers: ArrayLike,
            porosity: ArrayLike) -> Arr:
    """Approximate AC resistance factor of a Litz winding by Dowell's model at strand level.

    Fr = dowell_fr(Delta_s, m_eff), Delta_s = round_wire_delta(strand d, delta, eta),
    m_eff = layers * sqrt(strands): a bundle of n strands is counted as sqrt(n) strand layers, so
    the proximity term sees every strand layer of the winding portion.

    Approximation, common practice (e.g. in the manner of Sullivan's and Bartoli's treatments of
    stranded windings; from memory). Limits: assumes ideal twisting (every strand takes every
    position, so no bundle-level eddy currents and equal strand currents), a square-packed bundle,
    strand diameter well below the skin depth, and one porosity for the strands in the layer
    (``porosity`` should be the strand-level copper fraction across the layer). It ignores the
    field inside the bundle from its own current beyond the 1-D layer picture, so it can err
    either way by tens of percent at high Fr; use it to choose strand size and count, not to
    guarantee a loss.

    Parameters
    ----------
    strand_diameter_m : bare strand diameter [m]
    skin_depth_m : skin depth [m]
    strands : strands per bundle n
    layers : bundle layers in the winding portion m
    porosity : strand-level porosity eta (0 < eta <= 1)

    References
    ----------
    Dowell, Proc. IEE 113(8), 1966; C. R. Sullivan, "Optimal choice for number of strands in a
    litz-wire transformer winding", IEEE Trans. Power Electronics, 1999; M. Bartoli et al., on the
    modelling of litz-wire winding losses (both from memory).
    """
    delta = round_wire_delta(strand_diameter_m, skin_depth_m, porosity)
    m_eff = np.asarray(layers, dtype=float) * np.sqrt(np.asarray(strands, dtype=float))
    return dowell_fr(delta, m_eff)
