"""Frequency grids for spectral integration, clustered at the closed-loop poles.

A lightly damped resonance at f_k has half-power half-width h_k = zeta_k f_k
(0.0002 Hz at zeta = 0.001 and 0.2 Hz), so a uniform grid would need tens of
thousands of points. Here each pole gets a panel mapped by

    f = f_k + h_k sinh(u),

with Gauss-Legendre nodes in u: the Lorentzian h / ((f - f_k)^2 + h^2) becomes
the smooth 1 / cosh(u), so a few tens of nodes per pole integrate it to
machine precision while the panel still reaches far from the pole. Below the
lowest and above the highest pole, log-spaced Gauss-Legendre panels (and a
reciprocal map f = f_0 / t for an unbounded upper end) cover the tails.

Every design in a batch gets the same number of nodes, so that the engine
evaluates all of them in one vectorised call.
"""

from __future__ import annotations

from functools import lru_cache

import numpy as np
from numpy.polynomial.legendre import leggauss

NODES_PER_POLE = 48
NODES_PER_TAIL_PANEL = 16
TAIL_PANELS = 3
# The log tails reach this factor beyond the outermost pole panels; beyond it
# a linear (below) or reciprocal (above) panel closes the range.
TAIL_REACH = 1e3


@lru_cache(maxsize=16)
def _legendre(n: int) -> tuple[np.ndarray, np.ndarray]:
    return leggauss(n)


def _linear_panel(lo, hi, n):
    x, wx = _legendre(n)
    half = 0.5 * (hi - lo)[..., None]
    return 0.5 * (lo + hi)[..., None] + half * x, half * wx


def _log_panel(lo, hi, n):
    """Gauss-Legendre in log f on [lo, hi]; lo > 0."""
    x, wx = _legendre(n)
    span = np.log(hi / lo)[..., None]
    f = lo[..., None] * np.exp(0.5 * (x + 1.0) * span)
    return f, f * 0.5 * span * wx


def _reciprocal_panel(lo, n):
    """[lo, inf) by f = lo / t, t in (0, 1]; the nodes never reach t = 0."""
    x, wx = _legendre(n)
    t = 0.5 * (x + 1.0)
    f = lo[..., None] / t
    return f, lo[..., None] / t**2 * 0.5 * wx


def _pole_panel(centre, half_width, lo, hi, n):
    """Gauss-Legendre in u on [lo, hi] with f = centre + half_width sinh(u)."""
    x, wx = _legendre(n)
    u_lo = np.arcsinh((lo - centre) / half_width)[..., None]
    u_hi = np.arcsinh((hi - centre) / half_width)[..., None]
    u = 0.5 * (u_lo + u_hi) + 0.5 * (u_hi - u_lo) * x
    f = centre[..., None] + half_width[..., None] * np.sinh(u)
    w = half_width[..., None] * np.cosh(u) * 0.5 * (u_hi - u_lo) * wx
    return f, w


def pole_grid(centre_hz, half_width_hz, f_min_hz=0.0, f_max_hz=np.inf, *,
              nodes_per_pole=NODES_PER_POLE, nodes_per_tail_panel=NODES_PER_TAIL_PANEL):
    """Quadrature nodes and weights on [f_min, f_max] clustered at the poles.

    Parameters
    ----------
    centre_hz : array, shape (..., P)
        Resonance frequencies |Im(lambda)| / (2 pi) of the closed-loop poles
        [Hz], any order.
    half_width_hz : array, shape (..., P)
        Half-power half-widths |Re(lambda)| / (2 pi) [Hz], > 0.
    f_min_hz, f_max_hz : float
        Integration range [Hz]; 0 and inf are allowed.

    Returns
    -------
    frequency_hz, weight_hz : arrays, shape (..., F)
        sum(weight * g(frequency)) approximates the integral of g over the
        range. Nodes outside a clipped range carry zero weight.

    Notes
    -----
    Pole panel k spans from the boundary with pole k-1 to that with pole k+1,
    each boundary placed where the two Lorentzians are equal,
    f = (f_k h_{k+1} + f_{k+1} h_k) / (h_k + h_{k+1}). The lowest panel starts
    at f_1 / 2 and the highest ends at 2 f_P; the tails take over there.
    """
    order = np.argsort(centre_hz, axis=-1)
    c = np.take_along_axis(np.asarray(centre_hz, float), order, axis=-1)
    h = np.take_along_axis(np.asarray(half_width_hz, float), order, axis=-1)
    inner = (c[..., :-1] * h[..., 1:] + c[..., 1:] * h[..., :-1]) / (h[..., :-1] + h[..., 1:])
    edges = np.concatenate([0.5 * c[..., :1], inner, 2.0 * c[..., -1:]], axis=-1)
    edges = np.clip(edges, f_min_hz, f_max_hz)

    parts = []
    for k in range(c.shape[-1]):
        parts.append(_pole_panel(c[..., k], h[..., k], edges[..., k], edges[..., k + 1],
                                 nodes_per_pole))
    parts += _lower_tail(edges[..., 0], f_min_hz, nodes_per_tail_panel)
    parts += _upper_tail(edges[..., -1], f_max_hz, nodes_per_tail_panel)
    frequency = np.concatenate([p[0] for p in parts], axis=-1)
    weight = np.concatenate([p[1] for p in parts], axis=-1)
    return frequency, weight


def _lower_tail(edge, f_min, n):
    """[f_min, edge]: log panels down to edge / TAIL_REACH, then one linear panel."""
    far = np.maximum(edge / TAIL_REACH, f_min)
    cuts = far[..., None] * (edge / far)[..., None] ** (np.arange(TAIL_PANELS + 1) / TAIL_PANELS)
    parts = [_log_panel(cuts[..., i], cuts[..., i + 1], n) for i in range(TAIL_PANELS)]
    parts.append(_linear_panel(np.full_like(far, f_min), far, n))
    return parts


def _upper_tail(edge, f_max, n):
    """[edge, f_max]: log panels up to edge * TAIL_REACH, then the remainder."""
    far = np.minimum(edge * TAIL_REACH, f_max)
    cuts = edge[..., None] * (far / edge)[..., None] ** (np.arange(TAIL_PANELS + 1) / TAIL_PANELS)
    parts = [_log_panel(cuts[..., i], cuts[..., i + 1], n) for i in range(TAIL_PANELS)]
    if np.isinf(f_max):
        parts.append(_reciprocal_panel(far, n))
    else:
        parts.append(_log_panel(far, np.full_like(far, f_max), n))
    return parts
