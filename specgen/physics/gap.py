"""Gapped inductors: inductance with a series air gap, McLyman's fringing factor, gap solving.

SI units throughout: henries, metres, m^2, amperes, tesla.
"""

from __future__ import annotations

import numpy as np

from specgen.physics.wire import MU0_H_M

from ._types import Arr, ArrayLike


def _out(x: ArrayLike) -> Arr:
    x = np.asarray(x, dtype=float)
    return float(x) if x.ndim == 0 else x


def fringing_factor(gap_m: ArrayLike, ae_m2: ArrayLike, window_height_m: ArrayLike) -> Arr:
    """McLyman's fringing-flux factor F = 1 + (lg / sqrt(Ae)) ln(2 G / lg).

    Parameters
    ----------
    gap_m : air gap lg [m] (one gap; a total gap split into k equal gaps in series, as a spacer under every
        leg of an E-I or E-E set, fringes at each of them: take F at lg / k, ``inductance_gapped_h``)
    ae_m2 : effective area Ae of the gapped leg [m^2]
    window_height_m : G, the winding-window length measured *along the leg* [m] (for an E, EI or pot
        core the window dimension ``window_height`` in the core drawing, i.e.
        ``geometry.window_breadth_m``)

    Returns
    -------
    F >= 1; F = 1 at zero gap (the limit of x ln(1/x)). The formula is meant for lg much smaller than
    G; where 2G/lg <= 1 it would fall below 1, and the result is floored at 1.

    References
    ----------
    McLyman, Transformer and Inductor Design Handbook, chapter on DC inductor design (fringing flux).
    """
    lg = np.asarray(gap_m, dtype=float)
    ae = np.asarray(ae_m2, dtype=float)
    g = np.asarray(window_height_m, dtype=float)
    safe = np.where(lg > 0.0, lg, 1.0)
    f = 1.0 + (safe / np.sqrt(ae)) * np.log(2.0 * g / safe)
    return _out(np.where(lg > 0.0, np.maximum(f, 1.0), 1.0))


def inductance_gapped_h(turns: ArrayLike, ae_m2: ArrayLike, le_m: ArrayLike, mu_r: ArrayLike, gap_m: ArrayLike,
                        window_height_m: ArrayLike | None = None, gaps: ArrayLike = 1) -> Arr:
    """Inductance of a gapped core, L = mu0 N^2 Ae F / (lg + le / mu_r) [H].

    The total gap lg may be k equal gaps in series (``gaps``; a spacer under every leg puts the flux across
    two: lg = 2 x the spacer). Each fringes on its own, F = F(lg / k) (McLyman's factor of one gap): the
    reluctance of k gaps of lg / k, each lowered by F(lg / k), is lg / (mu0 Ae F(lg / k)).

    Parameters
    ----------
    turns : N
    ae_m2 : effective area [m^2]
    le_m : effective magnetic path length of the core [m]
    mu_r : relative permeability of the core material
    gap_m : total air gap lg [m]
    window_height_m : G for the fringing factor (window length along the leg) [m]; None: F = 1
    gaps : k, the equal gaps in series that make up lg (1: one gap, e.g. a ground centre leg; 2: a spacer)

    References
    ----------
    McLyman, Transformer and Inductor Design Handbook (gapped inductor; fringing raises L by F).
    """
    n = np.asarray(turns, dtype=float)
    lg = np.asarray(gap_m, dtype=float)
    f = 1.0 if window_height_m is None else np.asarray(fringing_factor(lg / np.asarray(gaps, dtype=float), ae_m2,
                                                                       window_height_m))
    return _out(MU0_H_M * n * n * np.asarray(ae_m2, dtype=float) * f
                / (lg + np.asarray(le_m, dtype=float) / np.asarray(mu_r, dtype=float)))


def gap_for_inductance_m(inductance_h: float, turns: float, ae_m2: float, le_m: float, mu_r: float,
                         window_height_m: float | None = None, gaps: int = 1) -> float | None:
    """Air gap lg that gives an inductance with N turns, fringing included (scalar solver).

    Solves mu0 N^2 Ae F(lg) / (lg + le/mu_r) = L for lg. Returns None when even no gap cannot reach
    L (L > mu0 N^2 Ae mu_r / le). McLyman's F has an infinite slope at lg -> 0, so L(lg) may rise a
    little at microscopic gaps before it falls; the solver returns the smallest gap at which L has
    fallen to the target (scan on a geometric grid, then bisection to 1e-13 relative). With
    ``window_height_m`` None the closed form lg = mu0 N^2 Ae / L - le/mu_r is used.

    Parameters
    ----------
    inductance_h : target inductance [H]
    turns : N
    ae_m2, le_m, mu_r : core effective area [m^2], path length [m], relative permeability
    window_height_m : G for the fringing factor (window length along the leg) [m], or None
    gaps : the equal gaps in series that make up the total (``inductance_gapped_h``)

    Returns
    -------
    Total gap [m] (0.0 when the ungapped core gives exactly L), or None.

    References
    ----------
    McLyman, Transformer and Inductor Design Handbook (gapped inductor, fringing factor).
    """
    target = float(inductance_h)
    n, ae, le, mu = float(turns), float(ae_m2), float(le_m), float(mu_r)
    if not (target > 0 and n > 0 and ae > 0 and le > 0 and mu > 0):
        raise ValueError("inductance, turns, area, length and permeability must be positive")
    k = MU0_H_M * n * n * ae
    if target > k * mu / le:
        return None
    if window_height_m is None:
        return max(k / target - le / mu, 0.0)
    g = float(window_height_m)

    def excess(lg: float) -> float:
        return float(inductance_gapped_h(n, ae, le, mu, lg, g, gaps)) - target

    upper = 2.0 * g * gaps  # beyond this F is floored at 1 and L(lg) = k / (lg + le/mu)
    if excess(upper) > 0.0:
        return k / target - le / mu
    grid = np.geomspace(1e-12 * upper, upper, 4000)
    values = np.asarray(inductance_gapped_h(n, ae, le, mu, grid, g, gaps)) - target
    below = np.flatnonzero(values < 0.0)
    i = int(below[0])
    lo = 0.0 if i == 0 else float(grid[i - 1])
    hi = float(grid[i])
    for _ in range(200):
        mid = 0.5 * (lo + hi)
        if excess(mid) >= 0.0:
            lo = mid
        else:
            hi = mid
        if hi - lo <= 1e-13 * hi:
            break
    return 0.5 * (lo + hi)


def turns_for_peak_b(inductance_h: ArrayLike, i_peak_a: ArrayLike, b_max_t: ArrayLike, ae_m2: ArrayLike) -> Arr:
    """Turns so the peak current stays at a flux density, N = L I_pk / (B_max Ae) (not rounded).

    References
    ----------
    Faraday's law integrated: N Phi = L I; McLyman, Transformer and Inductor Design Handbook.
    """
    return _out(np.asarray(inductance_h, dtype=float) * np.asarray(i_peak_a, dtype=float)
                / (np.asarray(b_max_t, dtype=float) * np.asarray(ae_m2, dtype=float)))


def b_peak_from_inductance_t(inductance_h: ArrayLike, i_peak_a: ArrayLike, turns: ArrayLike, ae_m2: ArrayLike) -> Arr:
    """Peak flux density of an inductor, B = L I_pk / (N Ae) [T].

    References
    ----------
    Flux linkage N Phi = L I; McLyman, Transformer and Inductor Design Handbook.
    """
    return _out(np.asarray(inductance_h, dtype=float) * np.asarray(i_peak_a, dtype=float)
                / (np.asarray(turns, dtype=float) * np.asarray(ae_m2, dtype=float)))


def al_nh(inductance_h: ArrayLike, turns: ArrayLike) -> Arr:
    """Inductance factor AL = L / N^2, in nH per turn^2.

    References
    ----------
    IEC 60205 / IEC 62044 (inductance factor AL).
    """
    n = np.asarray(turns, dtype=float)
    return _out(np.asarray(inductance_h, dtype=float) / (n * n) * 1e9)


def energy_j(inductance_h: ArrayLike, current_a: ArrayLike) -> Arr:
    """Stored energy W = L I^2 / 2 [J].

    References
    ----------
    Energy of an inductor, any circuits text.
    """
    i = np.asarray(current_a, dtype=float)
    return _out(0.5 * np.asarray(inductance_h, dtype=float) * i * i)

