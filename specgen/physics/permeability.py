"""Powder cores: permeability roll-off with DC bias and the inductance it leaves.

H in A/m, inductance in henries, areas m^2, lengths m.
"""

from __future__ import annotations

import numpy as np

from specgen.physics.wire import MU0_H_M

from ._types import Arr, ArrayLike


def _out(x: ArrayLike) -> Arr:
    x = np.asarray(x, dtype=float)
    return float(x) if x.ndim == 0 else x


def bias_fit_fraction(h_a_m: ArrayLike, a: float, b: float, c: float) -> Arr:
    """Fraction of the initial permeability left under a DC magnetizing force, f = 1 / (a + b H^c).

    Parameters
    ----------
    h_a_m : DC magnetizing force H [A/m]
    a, b, c : curve-fit coefficients for H in A/m (a ~ 1 so that f(0) ~ 1; b > 0, c > 0).
        Fits published with H in oersted convert as b_A/m = b_Oe * (4 pi / 1000)^c.

    Returns
    -------
    mu(H) / mu_initial, dimensionless; monotonically decreasing for b, c > 0.

    References
    ----------
    The rational curve-fit form 1/(a + b H^c) used for DC-bias curves of powder cores in the
    magnetics literature (coefficients belong to each material; none are given here).
    """
    h = np.abs(np.asarray(h_a_m, dtype=float))
    return _out(1.0 / (a + b * h ** c))


def powder_inductance_h(turns: ArrayLike, ae_m2: ArrayLike, le_m: ArrayLike, mu_initial: ArrayLike, current_a: ArrayLike,
                        a: float, b: float, c: float) -> Arr:
    """Inductance of a powder core under DC bias, L = mu0 mu_i f(N I / le) N^2 Ae / le [H].

    Parameters
    ----------
    turns : N (float or array)
    ae_m2 : effective area [m^2]
    le_m : effective path length [m]
    mu_initial : initial relative permeability mu_i
    current_a : DC current [A]
    a, b, c : roll-off fit coefficients for H in A/m (see ``bias_fit_fraction``)

    References
    ----------
    L = mu0 mu N^2 Ae / le (IEC 60205 effective parameters) with mu = mu_i f(H), H = N I / le.
    """
    n = np.asarray(turns, dtype=float)
    le = np.asarray(le_m, dtype=float)
    h = n * np.asarray(current_a, dtype=float) / le
    mu = np.asarray(mu_initial, dtype=float) * np.asarray(bias_fit_fraction(h, a, b, c))
    return _out(MU0_H_M * mu * n * n * np.asarray(ae_m2, dtype=float) / le)


def turns_for_biased_inductance(inductance_h: float, current_a: float, ae_m2: float, le_m: float, mu_initial: float,
                                a: float, b: float, c: float, max_turns: int = 2000) -> int | None:
    """Smallest whole number of turns whose biased inductance reaches the target.

    L(N, I) = powder_inductance_h(N, ...). Because the bias grows with N, L(N) may peak and fall (when
    c >= 2 it always does eventually), so the search evaluates every N = 1..max_turns.

    Parameters
    ----------
    inductance_h : required inductance at the DC current [H]
    current_a : DC current [A]
    ae_m2, le_m, mu_initial : core effective area [m^2], path length [m], initial permeability
    a, b, c : roll-off fit coefficients for H in A/m
    max_turns : largest N considered

    Returns
    -------
    int N, or None when no N up to max_turns reaches the target.

    References
    ----------
    Powder-core inductor design by DC-bias roll-off (the curve-fit form of ``bias_fit_fraction``).
    """
    n = np.arange(1, int(max_turns) + 1, dtype=float)
    ell = np.asarray(powder_inductance_h(n, ae_m2, le_m, mu_initial, current_a, a, b, c))
    ok = np.flatnonzero(ell >= float(inductance_h))
    return int(n[ok[0]]) if ok.size else None
