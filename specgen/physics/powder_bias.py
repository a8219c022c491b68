"""Powder cores under DC bias: flux density from the incremental-permeability roll-off, its inverse, inductances.

The catalogue's DC-bias curve gives the incremental permeability, mu_inc(H) = mu_i f(H), f(H) = 1 / (a + b |H|^c)
(H in A/m). The flux density is its integral, B(H) = mu0 mu_i int_0^H f(h) dh, which is monotonic in H; the
product mu0 mu_i f(H) H is not (it peaks and falls when c > 1) and is not the flux density.
The catalogue stores it as a half field and a steepness, f = 1 / (1 + (H / H_half)^s): the same curve with
a = 1, b = H_half^-s, c = s (``fit_b_from_half_field``).

SI units: H in A/m, B in T, lengths m, areas m^2, inductance H, flux linkage Wb-turns. Floats or numpy arrays.
"""

from __future__ import annotations

import math

import numpy as np
import numpy.typing as npt

from specgen.physics.wire import MU0_H_M

FloatArray = npt.NDArray[np.float64]
FloatLike = float | FloatArray
ArrayLike = npt.ArrayLike

__all__ = [
    "b_ceiling_t", "b_from_bias_t", "bias_integral_unit", "flux_linkage_wb", "h_from_b_a_m", "incremental_inductance_h",
    "fit_b_from_half_field", "secant_inductance_h",
]

# Series terms: both series below run at a ratio of at most 1/2, so 56 terms leave < 1e-16 relative.
_SERIES_TERMS = 56
# Gauss-Legendre nodes for the middle band 1/2 < x^c <= 2: in s = ln x the integrand's nearest poles sit at
# Im s = pi / c while the band is ln 2 / c wide, so the Bernstein ellipse ratio is >= 9 and 16 nodes are exact
# to far below 1e-16.
_GL_NODES, _GL_WEIGHTS = np.polynomial.legendre.leggauss(16)
_NEWTON_MAX = 80
_BRACKET_MAX = 200


def _out(x: FloatArray) -> FloatLike:
    return float(x) if x.ndim == 0 else x


def _head_series(x: FloatArray, c: FloatArray) -> FloatArray:
    """int_0^x dt/(1+t^c) = x sum_n (-x^c)^n / (n c + 1), for x^c <= 1/2 (Horner's scheme, highest term first)."""
    minus_z = -(x ** c)
    acc = np.zeros_like(x)
    for n in range(_SERIES_TERMS - 1, -1, -1):
        acc = acc * minus_z + 1.0 / (n * c + 1.0)
    return np.asarray(x * acc, dtype=float)


def _band_quadrature(s_lo: FloatArray, s_hi: FloatArray, c: FloatArray) -> FloatArray:
    """int_{s_lo}^{s_hi} e^s / (1 + e^{c s}) ds (that is, int dt/(1+t^c) over t = e^s) by Gauss-Legendre."""
    half = 0.5 * (s_hi - s_lo)
    mid = 0.5 * (s_hi + s_lo)
    total = np.zeros_like(half)
    for node, weight in zip(_GL_NODES, _GL_WEIGHTS):
        s = mid + half * node
        total = total + weight / (np.exp(-s) + np.exp((c - 1.0) * s))
    return np.asarray(half * total, dtype=float)


def _expm1_over_p(p: FloatArray, length: FloatArray) -> FloatArray:
    """(e^{p L} - 1) / p, tending to L (1 + p L / 2) as p -> 0, without cancellation."""
    small = np.abs(p * length) < 1e-8
    safe_p = np.where(small, 1.0, p)
    with np.errstate(over="ignore"):
        exact = np.expm1(safe_p * length) / safe_p
    return np.asarray(np.where(small, length * (1.0 + 0.5 * p * length), exact), dtype=float)


def _tail_series(x: FloatArray, c: FloatArray) -> FloatArray:
    """int_{x_b}^{x} dt/(1+t^c), x_b = 2^(1/c), x >= x_b: sum_n (-1)^n int t^{-c(n+1)} dt, each term exact.

    With p_n = 1 - c (n + 1) and L = ln(x / x_b) each term is x_b^{p_n} (e^{p_n L} - 1) / p_n, which stays finite
    and exact for every c (p_n = 0 gives the logarithm), so c <= 1 (unbounded B) needs no special case.
    Every term is at most 2^-n times the first (t^-c <= 1/2 on the range), so the sum is well conditioned.
    """
    ln_xb = math.log(2.0) / c
    length = np.log(x) - ln_xb
    total = np.zeros_like(x)
    for n in range(_SERIES_TERMS):
        p = 1.0 - c * (n + 1.0)
        term = np.exp(p * ln_xb) * _expm1_over_p(p, length)
        total = total - term if n % 2 else total + term
    return total


def bias_integral_unit(x: ArrayLike, c: ArrayLike) -> FloatLike:
    """The roll-off integral in scaled form, G_c(x) = int_0^x dt / (1 + t^c) = x 2F1(1, 1/c; 1 + 1/c; -x^c).

    Evaluated without special-function libraries in three bands of z = x^c, each to about 1e-15 relative:
    z <= 1/2 the power series x sum (-z)^n / (n c + 1); 1/2 < z <= 2 a 16-node Gauss-Legendre rule in ln t from
    the band's lower edge; z > 2 the band's upper value plus the termwise-integrated series of t^-c / (1 + t^-c).

    Parameters
    ----------
    x : scaled field, x >= 0 (negative x gives -G_c(|x|); G_c is odd)
    c : roll-off exponent, c > 0

    Returns
    -------
    G_c(x), dimensionless; tends to (pi / c) / sin(pi / c) for c > 1 as x -> infinity and grows without
    bound for c <= 1.

    References
    ----------
    Abramowitz and Stegun, Handbook of Mathematical Functions (1964), 15.3.1 (Euler's integral for 2F1) and
    15.1.1 (its series); Gauss-Legendre quadrature, ibid. 25.4.29 (from memory).
    """
    xa, ca = np.broadcast_arrays(np.asarray(x, dtype=float), np.asarray(c, dtype=float))
    if np.any(~np.isfinite(xa)) or np.any(~np.isfinite(ca)) or np.any(ca <= 0.0):
        raise ValueError("roll-off integral: x must be finite and c finite and > 0")
    sign = np.sign(xa)
    xs = np.abs(xa).ravel()
    cs = ca.ravel()
    out = np.zeros(xs.shape, dtype=float)
    with np.errstate(over="ignore"):
        log_z = cs * np.log(np.where(xs > 0.0, xs, 1.0))
    head = (xs > 0.0) & (log_z <= math.log(0.5))
    band = (xs > 0.0) & ~head & (log_z <= math.log(2.0))
    tail = (xs > 0.0) & ~head & ~band
    if np.any(head):
        out[head] = _head_series(xs[head], cs[head])
    if np.any(band | tail):
        m = band | tail
        c_m = cs[m]
        x_a = 0.5 ** (1.0 / c_m)
        g_a = _head_series(x_a, c_m)
        s_hi = np.where(band[m], np.log(xs[m]), math.log(2.0) / c_m)
        g_band = g_a + _band_quadrature(np.log(x_a), s_hi, c_m)
        tail_part = np.zeros_like(g_band)
        in_tail = tail[m]
        if np.any(in_tail):
            tail_part[in_tail] = _tail_series(xs[m][in_tail], c_m[in_tail])
        out[m] = g_band + tail_part
    return _out(np.asarray(sign * out.reshape(xa.shape), dtype=float))


def _check_fit(mu_i: FloatArray, a: FloatArray, b: FloatArray, c: FloatArray) -> None:
    if np.any(~(mu_i > 0.0)) or np.any(~(a > 0.0)) or np.any(~(b >= 0.0)) or np.any(~(c > 0.0)):
        raise ValueError("roll-off fit: need mu_i > 0, a > 0, b >= 0, c > 0 (finite)")
    if not (np.all(np.isfinite(mu_i)) and np.all(np.isfinite(a)) and np.all(np.isfinite(b)) and np.all(np.isfinite(c))):
        raise ValueError("roll-off fit: need mu_i > 0, a > 0, b >= 0, c > 0 (finite)")


def b_from_bias_t(h_a_m: ArrayLike, mu_i: ArrayLike, a: ArrayLike, b: ArrayLike, c: ArrayLike) -> FloatLike:
    """Flux density reached under a magnetizing force H on the roll-off curve, B = mu0 mu_i int_0^H f(h) dh [T].

    With f(h) = 1 / (a + b |h|^c) and k = (b / a)^(1/c):
        B(H) = mu0 mu_i G_c(k H) / (a k),   G_c(x) = x 2F1(1, 1/c; 1 + 1/c; -x^c)
    (``bias_integral_unit``), and B = mu0 mu_i H / a when b = 0. B is odd and strictly increasing in H; for c > 1
    it tends to mu0 mu_i (pi / c) / (a k sin(pi / c)).

    Parameters
    ----------
    h_a_m : magnetizing force H [A/m] (float or array)
    mu_i : initial relative permeability
    a, b, c : roll-off fit for H in A/m, f = 1 / (a + b |H|^c) (a > 0, b >= 0, c > 0)

    Returns
    -------
    B [T], the shape of the broadcast inputs.

    References
    ----------
    B = int mu dH with the incremental permeability mu0 mu_i f(H) (definition of incremental permeability,
    IEC 60050-221, from memory); the integral as a Gauss hypergeometric function: Abramowitz and Stegun 15.3.1.
    """
    h, mu, aa, bb, cc = np.broadcast_arrays(*(np.asarray(v, dtype=float) for v in (h_a_m, mu_i, a, b, c)))
    _check_fit(mu, aa, bb, cc)
    if np.any(~np.isfinite(h)):
        raise ValueError("magnetizing force must be finite")
    with np.errstate(divide="ignore", over="ignore", under="ignore"):
        k = (bb / aa) ** (1.0 / cc)
    linear = ~(k > 0.0) | ~np.isfinite(k)
    k_safe = np.where(linear, 1.0, k)
    scaled = np.asarray(bias_integral_unit(k_safe * h, cc), dtype=float) / (aa * k_safe)
    integral = np.where(linear, h / aa, scaled)
    return _out(np.asarray(MU0_H_M * mu * integral, dtype=float))


def _b_limit_t(mu: FloatArray, aa: FloatArray, bb: FloatArray, cc: FloatArray) -> FloatArray:
    with np.errstate(divide="ignore", over="ignore", under="ignore", invalid="ignore"):
        k = (bb / aa) ** (1.0 / cc)
        limit = MU0_H_M * mu * (np.pi / cc) / (np.sin(np.pi / cc) * aa * k)
    return np.asarray(np.where((cc > 1.0) & (k > 0.0) & np.isfinite(limit), limit, np.inf), dtype=float)


def b_ceiling_t(mu_i: ArrayLike, a: ArrayLike, b: ArrayLike, c: ArrayLike) -> FloatLike:
    """The flux density the roll-off curve tends to as H grows without bound [T]; infinite where it has none.

        B_inf = mu0 mu_i (pi / c) / (a k sin(pi / c)),   k = (b / a)^(1/c),   for c > 1 and b > 0

    the limit of ``b_from_bias_t`` (G_c(x) -> (pi / c) / sin(pi / c)); for c <= 1 or b = 0, B grows without bound.

    Parameters
    ----------
    mu_i : initial relative permeability
    a, b, c : roll-off fit for H in A/m (see ``b_from_bias_t``)

    References
    ----------
    int_0^inf dt / (1 + t^c) = (pi / c) / sin(pi / c), c > 1 (Gradshteyn and Ryzhik 3.241.2, from memory).
    """
    mu, aa, bb, cc = np.broadcast_arrays(*(np.asarray(v, dtype=float) for v in (mu_i, a, b, c)))
    _check_fit(mu, aa, bb, cc)
    return _out(_b_limit_t(mu, aa, bb, cc))


def h_from_b_a_m(b_t: ArrayLike, mu_i: ArrayLike, a: ArrayLike, b: ArrayLike, c: ArrayLike) -> FloatLike:
    """Magnetizing force that reaches a flux density on the roll-off curve: the inverse of ``b_from_bias_t`` [A/m].

    Solves mu0 mu_i int_0^H f(h) dh = |B| by Newton's method on the bracket [H_lo, H_hi], falling back to
    bisection whenever a step leaves the bracket (bounded: at most 200 bracket expansions and 80 steps).
    H_lo = |B| a / (mu0 mu_i) is a lower bound because f <= 1 / a. For c > 1 B is bounded; a flux density at or
    above that bound has no H and raises ValueError.

    Parameters
    ----------
    b_t : flux density B [T] (sign carried through)
    mu_i : initial relative permeability
    a, b, c : roll-off fit for H in A/m (see ``b_from_bias_t``)

    Returns
    -------
    H [A/m], the shape of the broadcast inputs, accurate to about 1e-13 relative.

    References
    ----------
    Safeguarded Newton iteration (e.g. Press et al., Numerical Recipes, rtsafe; from memory).
    """
    bt, mu, aa, bb, cc = np.broadcast_arrays(*(np.asarray(v, dtype=float) for v in (b_t, mu_i, a, b, c)))
    _check_fit(mu, aa, bb, cc)
    if np.any(~np.isfinite(bt)):
        raise ValueError("flux density must be finite")
    target = np.abs(bt)
    limit = _b_limit_t(mu, aa, bb, cc)
    if np.any(target >= limit * (1.0 - 1e-9)):
        worst = float(np.max(target / limit))
        raise ValueError(f"flux density beyond the roll-off curve's limit ({worst:.6g} of the limit B reaches as H "
                         "grows without bound)")
    lo = target * aa / (MU0_H_M * mu)
    hi = lo.copy()

    def b_of(hh: FloatArray) -> FloatArray:
        return np.asarray(b_from_bias_t(hh, mu, aa, bb, cc), dtype=float)

    short = b_of(hi) < target
    for _ in range(_BRACKET_MAX):
        if not np.any(short):
            break
        hi = np.where(short, hi * 16.0, hi)
        short = b_of(hi) < target
    h = lo.copy()
    for _ in range(_NEWTON_MAX):
        resid = b_of(h) - target
        lo = np.where(resid <= 0.0, h, lo)
        hi = np.where(resid >= 0.0, h, hi)
        slope = MU0_H_M * mu / (aa + bb * h ** cc)
        step = h - resid / slope
        bisect = np.where(lo > 0.0, np.sqrt(lo * np.maximum(hi, lo)), 0.5 * (lo + hi))
        new = np.where((step > lo) & (step < hi), step, bisect)
        done = np.abs(new - h) <= 1e-14 * np.maximum(np.abs(h), 1e-300)
        h = new
        if np.all(done | (target == 0.0)):
            break
    return _out(np.asarray(np.sign(bt) * np.where(target == 0.0, 0.0, h), dtype=float))


def fit_b_from_half_field(half_field_a_m: ArrayLike, steepness: ArrayLike) -> FloatLike:
    """The fit coefficient b for a DC-bias curve stored as half field and steepness: b = H_half^-s (with a = 1, c = s).

    f = 1 / (1 + (H / H_half)^s) is f = 1 / (a + b H^c) with a = 1, b = H_half^-s, c = s; f(H_half) = 1/2.

    Parameters
    ----------
    half_field_a_m : H at which the incremental permeability has fallen to half [A/m], > 0
    steepness : exponent s, > 0
    """
    hh = np.asarray(half_field_a_m, dtype=float)
    s = np.asarray(steepness, dtype=float)
    if np.any(~(hh > 0.0)) or np.any(~(s > 0.0)):
        raise ValueError("half field and steepness must be > 0")
    return _out(np.asarray(hh ** -s, dtype=float))


def flux_linkage_wb(turns: ArrayLike, ae_m2: ArrayLike, le_m: ArrayLike, mu_i: ArrayLike, current_a: ArrayLike,
                    a: ArrayLike, b: ArrayLike, c: ArrayLike) -> FloatLike:
    """Flux linkage of a powder-core winding at a DC current, lambda = N A_e B(N I / l_e) [Wb-turns].

    Parameters
    ----------
    turns : N
    ae_m2 : effective area A_e [m^2]
    le_m : effective path length l_e [m]
    mu_i : initial relative permeability
    current_a : current I [A]
    a, b, c : roll-off fit for H in A/m

    References
    ----------
    Faraday's law with the IEC 60205 effective parameters; B(H) from ``b_from_bias_t``.
    """
    n = np.asarray(turns, dtype=float)
    h = n * np.asarray(current_a, dtype=float) / np.asarray(le_m, dtype=float)
    return _out(np.asarray(n * np.asarray(ae_m2, dtype=float) * np.asarray(b_from_bias_t(h, mu_i, a, b, c)),
                           dtype=float))


def incremental_inductance_h(turns: ArrayLike, ae_m2: ArrayLike, le_m: ArrayLike, mu_i: ArrayLike,
                             current_a: ArrayLike, a: ArrayLike, b: ArrayLike, c: ArrayLike) -> FloatLike:
    """Inductance a small ripple sees at a DC current, L_inc = d lambda / dI = mu0 mu_i f(N I / l_e) N^2 A_e / l_e [H].

    The derivative of ``flux_linkage_wb``: the incremental permeability is what the catalogue's roll-off fit
    describes, so this is the inductance for ripple current about the DC operating point.

    Parameters
    ----------
    turns, ae_m2, le_m, mu_i, current_a, a, b, c : as ``flux_linkage_wb``

    References
    ----------
    Incremental permeability and inductance (IEC 60050-221; IEC 60205 effective parameters; from memory).
    """
    n = np.asarray(turns, dtype=float)
    le = np.asarray(le_m, dtype=float)
    h = np.abs(n * np.asarray(current_a, dtype=float) / le)
    mu, aa, bb, cc = (np.asarray(v, dtype=float) for v in (mu_i, a, b, c))
    _check_fit(*np.broadcast_arrays(mu, aa, bb, cc))
    return _out(np.asarray(MU0_H_M * mu / (aa + bb * h ** cc) * n * n * np.asarray(ae_m2, dtype=float) / le,
                           dtype=float))


def secant_inductance_h(turns: ArrayLike, ae_m2: ArrayLike, le_m: ArrayLike, mu_i: ArrayLike, current_a: ArrayLike,
                        a: ArrayLike, b: ArrayLike, c: ArrayLike) -> FloatLike:
    """Amplitude (secant) inductance at a current, L = lambda / I [H]; at I = 0 the initial inductance.

    Always at least the incremental inductance at the same current (B(H) is concave), and the one to use for
    the flux a current produces (peak flux density = L I / (N A_e)).

    Parameters
    ----------
    turns, ae_m2, le_m, mu_i, current_a, a, b, c : as ``flux_linkage_wb``

    References
    ----------
    L = N Phi / I (IEC 60050-131, from memory); Phi from ``b_from_bias_t``.
    """
    i = np.asarray(current_a, dtype=float)
    safe_i = np.where(i == 0.0, 1.0, i)
    lam = np.asarray(flux_linkage_wb(turns, ae_m2, le_m, mu_i, safe_i, a, b, c), dtype=float)
    initial = np.asarray(incremental_inductance_h(turns, ae_m2, le_m, mu_i, 0.0, a, b, c), dtype=float)
    return _out(np.asarray(np.where(i == 0.0, initial, lam / safe_i), dtype=float))
