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

A load spectrum may have sharp features of its own: a tabulated spectrum
is a power law between its rows, and a narrow peak in the table (a vortex
shedding or wind-tunnel artefact a few 1e-4 Hz wide) falls between the
nodes of panels sized for the poles. :func:`sharp_breakpoints` picks the
table rows where the log-log slope changes sharply; :func:`pole_grid` then
splits its panels there, so that every panel sees a smooth load.

Every design in a batch gets the same number of nodes, so that the engine
evaluates all of them in one vectorised call.
"""

from __future__ import annotations

import math
from functools import lru_cache

import numpy as np
from numpy.polynomial.legendre import leggauss

NODES_PER_POLE = 48
# The tails carry the smooth part of the integrand away from the poles: 12
# nodes a panel give 1.4e-11 against the Lyapunov reference of
# bench/bench_engine.py (16 gave 2.5e-12, 10 gave 7e-10) at a fifth fewer
# nodes per design than 16.
NODES_PER_TAIL_PANEL = 12
TAIL_PANELS = 3
# The log tails reach this factor beyond the outermost pole panels; beyond it
# a linear (below) or reciprocal (above) panel closes the range.
TAIL_REACH = 1e3
# A change of the log-log slope larger than this at a table row makes it a
# panel edge (a smooth spectrum tabulated at 100 rows per decade changes its
# slope by about 0.01 per row; a narrow peak by hundreds).
SHARP_SLOPE_CHANGE = 1.0
# At most this many sharp rows become edges (the sharpest first), which
# bounds the cost of a noisy table at MAX_SHARP_BREAKPOINTS panels.
MAX_SHARP_BREAKPOINTS = 64


@lru_cache(maxsize=16)
def _legendre(n: int) -> tuple[np.ndarray, np.ndarray]:
    return leggauss(n)


@lru_cache(maxsize=16)
def _unit_nodes(n: int) -> tuple[np.ndarray, np.ndarray]:
    """Gauss-Legendre nodes t in (0, 1) and weights summing to 1."""
    x, wx = _legendre(n)
    return 0.5 * (x + 1.0), 0.5 * wx


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


def sharp_breakpoints(frequency_hz, psd):
    """Table rows where a log-log interpolated spectrum bends sharply [Hz].

    Parameters
    ----------
    frequency_hz : array, shape (N,)
        The spectrum's breakpoints (e.g. a table's frequencies), strictly
        increasing [Hz].
    psd : array, shape (N,)
        The spectrum there [N^2/Hz]; zero or negative values are skipped.

    Returns
    -------
    array
        The breakpoints where the log-log slope changes by more than
        :data:`SHARP_SLOPE_CHANGE`, sorted; at most
        :data:`MAX_SHARP_BREAKPOINTS` of them (the sharpest).

    Notes
    -----
    On [f_i, f_{i+1}] the interpolant is a power law of slope
    p_i = ln(S_{i+1} / S_i) / ln(f_{i+1} / f_i). Row i is sharp when
    |p_i - p_{i-1}| > SHARP_SLOPE_CHANGE. The first and last rows are the
    support's ends, which are panel edges already.
    """
    f = np.asarray(frequency_hz, float)
    s = np.asarray(psd, float)
    keep = (f > 0) & (s > 0) & np.isfinite(f) & np.isfinite(s)
    f, s = f[keep], s[keep]
    if f.size < 3:
        return np.empty(0)
    slope = np.diff(np.log(s)) / np.diff(np.log(f))
    change = np.abs(np.diff(slope))
    sharp = np.flatnonzero(change > SHARP_SLOPE_CHANGE)
    if sharp.size > MAX_SHARP_BREAKPOINTS:
        sharp = sharp[np.argsort(change[sharp])[-MAX_SHARP_BREAKPOINTS:]]
    return np.sort(f[sharp + 1])


def pole_grid(centre_hz, half_width_hz, f_min_hz=0.0, f_max_hz=np.inf, *, breakpoints_hz=(),
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
    breakpoints_hz : sequence of float
        Frequencies where the load is not smooth (see
        :func:`sharp_breakpoints`) [Hz]; every panel is split there.
    nodes_per_pole : int
        Gauss-Legendre nodes per pole panel.
    nodes_per_tail_panel : int
        Gauss-Legendre nodes per tail panel.

    Returns
    -------
    frequency_hz, weight_hz : arrays, shape (..., F)
        sum(weight * g(frequency)) approximates the integral of g over the
        range, F = P nodes_per_pole + 8 nodes_per_tail_panel. Nodes outside
        a clipped range carry zero weight.

    Notes
    -----
    Pole panel k spans from the boundary with pole k-1 to that with pole k+1,
    each boundary placed where the two Lorentzians are equal,
    f = (f_k h_{k+1} + f_{k+1} h_k) / (h_k + h_{k+1}). The lowest panel starts
    at f_1 / 2 and the highest ends at 2 f_P; the tails take over there.
    Every panel of one kind is built by one broadcast operation over
    (designs, panels, nodes), so the cost does not grow with a Python loop
    over the poles.

    With breakpoints, every panel that holds one is cut there; each piece
    keeps its panel's map (the sinh map of its pole, or the log or
    reciprocal map of its tail) and gets ``nodes_per_pole`` nodes, so that
    a feature narrower than the node spacing is integrated on panels of
    its own.
    """
    c = np.asarray(centre_hz, float)
    h = np.asarray(half_width_hz, float)
    if c.shape != h.shape:
        c, h = np.broadcast_arrays(c, h)
    # The engine's resonances come in increasing order: sort only when needed.
    if c.shape[-1] > 1 and not np.all(c[..., 1:] >= c[..., :-1]):
        order = np.argsort(c, axis=-1)
        flat = order.reshape(-1, order.shape[-1])
        rows = np.arange(flat.shape[0])[:, None]
        c = c.reshape(flat.shape)[rows, flat].reshape(order.shape)
        h = h.reshape(flat.shape)[rows, flat].reshape(order.shape)
    inner = (c[..., :-1] * h[..., 1:] + c[..., 1:] * h[..., :-1]) / (h[..., :-1] + h[..., 1:])
    edges = np.concatenate([0.5 * c[..., :1], inner, 2.0 * c[..., -1:]], axis=-1)
    edges = np.minimum(np.maximum(edges, f_min_hz), f_max_hz)
    if len(breakpoints_hz):
        cuts = np.asarray(breakpoints_hz, float).ravel()
        cuts = np.unique(cuts[(cuts > f_min_hz) & (cuts < f_max_hz)])
        if cuts.size:
            return _split_grid(c, h, edges, f_min_hz, f_max_hz, cuts, nodes_per_pole)
    n_pole, n_tail = nodes_per_pole, nodes_per_tail_panel
    finite = math.isfinite(f_max_hz)
    poles = c.shape[-1] * n_pole
    logs = (2 * TAIL_PANELS + finite) * n_tail
    total = poles + logs + n_tail * (1 if finite else 2)
    frequency = np.empty(c.shape[:-1] + (total,))
    weight = np.empty_like(frequency)
    _pole_panels(c, h, edges, n_pole, frequency[..., :poles], weight[..., :poles])
    _tail_panels(edges[..., 0], edges[..., -1], f_min_hz, f_max_hz, n_tail,
                 frequency[..., poles:], weight[..., poles:])
    return frequency, weight


def _panels(out, panels, n):
    """``out`` (..., panels * n) seen as (..., panels, n), a view."""
    return out.reshape(out.shape[:-1] + (panels, n))


def _pole_panels(centre, half_width, edges, n, f_out, w_out):
    """Gauss-Legendre in u on each pole's panel with f = centre + half_width sinh(u).

    Writes the nodes and weights into ``f_out`` and ``w_out`` (..., P n).
    """
    t, wt = _unit_nodes(n)
    u_lo = np.arcsinh((edges[..., :-1] - centre) / half_width)
    u_hi = np.arcsinh((edges[..., 1:] - centre) / half_width)
    span = (u_hi - u_lo)[..., None]
    u = span * t
    u += u_lo[..., None]
    # sinh and cosh from one exponential (u is bounded by the panel ends).
    grow = np.exp(u, out=u)
    shrink = np.reciprocal(grow)
    f = _panels(f_out, centre.shape[-1], n)
    np.subtract(grow, shrink, out=f)
    f *= 0.5 * half_width[..., None]
    f += centre[..., None]
    grow += shrink
    np.multiply(grow, (0.5 * half_width[..., None] * span) * wt, out=_panels(w_out, *f.shape[-2:]))


@lru_cache(maxsize=8)
def _tail_maps(n: int, finite: bool) -> tuple[np.ndarray, np.ndarray]:
    """Return the fixed matrices taking the logs of the tail ends to log f and to d(log f) x weight.

    The ends are (far_lo, low_edge, high_edge, far_hi[, f_max]); on the k-th of
    TAIL_PANELS equal steps from log a to log b the node at t has
    log f = log a + (k + t)(log b - log a) / TAIL_PANELS, linear in the ends'
    logs, and its weight is f times the step times the Gauss weight, linear
    in the differences of consecutive ends' logs. So every log node of every
    design is one matrix product: log f = ends @ nodes and
    weight = f (diff(ends) @ weights), the weights' matrix and the
    differences both >= 0, so that no weight comes out negative by rounding
    (a zero-width panel has weight exactly 0; a convex caller relies on it).
    """
    t, wt = _unit_nodes(n)
    pairs = [(0, 1, k) for k in range(TAIL_PANELS)] + [(2, 3, k) for k in range(TAIL_PANELS)]
    ends = 4 + finite
    nodes = np.zeros((ends, len(pairs) + finite, n))
    weights = np.zeros((ends - 1,) + nodes.shape[1:])
    for panel, (a, b, k) in enumerate(pairs):
        share = (k + t) / TAIL_PANELS
        nodes[a, panel], nodes[b, panel] = 1.0 - share, share
        weights[a, panel] = wt / TAIL_PANELS  # row a: log(end b) - log(end a)
    if finite:
        nodes[3, -1], nodes[4, -1] = 1.0 - t, t
        weights[3, -1] = wt
    return nodes.reshape(ends, -1), weights.reshape(ends - 1, -1)


def _tail_panels(low_edge, high_edge, f_min, f_max, n, f_out, w_out):
    """Both tails: log panels, then a closing panel at each end, into ``f_out`` and ``w_out``.

    Below the lowest pole panel: TAIL_PANELS log panels down to
    edge / TAIL_REACH (or f_min), then one linear panel to f_min. Above the
    highest: TAIL_PANELS log panels up to edge * TAIL_REACH (or f_max), then
    the remainder, by the reciprocal map f = f_0 / t for an unbounded range
    (its nodes never reach t = 0) or one more log panel. Order in the output:
    the lower and upper log panels (and the closing log panel), the linear
    panel, the reciprocal panel. The log panels of all designs are one
    matrix product (:func:`_tail_maps`).
    """
    t, wt = _unit_nodes(n)
    finite = math.isfinite(f_max)
    ends = np.empty(low_edge.shape + (4 + finite,))
    far_lo = np.maximum(np.divide(low_edge, TAIL_REACH, out=ends[..., 0]), f_min,
                        out=ends[..., 0])
    ends[..., 1] = low_edge
    ends[..., 2] = high_edge
    np.minimum(np.multiply(high_edge, TAIL_REACH, out=ends[..., 3]), f_max, out=ends[..., 3])
    far_hi = ends[..., 3]
    if finite:
        ends[..., 4] = f_max
    node_map, weight_map = _tail_maps(n, finite)
    logs = (2 * TAIL_PANELS + finite) * n
    log_ends = np.log(ends)
    f_log = np.matmul(log_ends, node_map, out=f_out[..., :logs])
    np.exp(f_log, out=f_log)
    steps = log_ends[..., 1:] - log_ends[..., :-1]  # >= 0: the ends are in increasing order
    w_log = np.matmul(steps, weight_map, out=w_out[..., :logs])
    w_log *= f_log
    # Linear panel [f_min, far_lo].
    linear = slice(logs, logs + n)
    width = (far_lo - f_min)[..., None]
    np.multiply(width, t, out=f_out[..., linear])
    f_out[..., linear] += f_min
    np.multiply(width, wt, out=w_out[..., linear])
    if not finite:
        last = slice(logs + n, logs + 2 * n)
        np.divide(far_hi[..., None], t, out=f_out[..., last])
        np.multiply(f_out[..., last], wt / t, out=w_out[..., last])


def _tail_edges(edge, f_min, f_max):
    """Edges of the lower and upper tail panels, in increasing order."""
    steps = np.arange(TAIL_PANELS + 1) / TAIL_PANELS
    far_lo = np.maximum(edge[..., :1] / TAIL_REACH, f_min)
    far_hi = np.minimum(edge[..., -1:] * TAIL_REACH, f_max)
    lower = far_lo * (edge[..., :1] / far_lo) ** steps
    upper = edge[..., -1:] * (far_hi / edge[..., -1:]) ** steps
    return lower, upper


def _split_grid(c, h, edges, f_min, f_max, cuts, n):
    """Return the panels of :func:`pole_grid`, cut at ``cuts``, n nodes on every piece.

    Panels in increasing order: one linear [f_min, far], the lower log
    panels, the pole panels, the upper log panels, then [far, f_max] (log,
    or reciprocal when f_max is infinite). A piece keeps its panel's map.
    """
    lower, upper = _tail_edges(edges, f_min, f_max)
    batch = edges.shape[:-1]
    start = np.full(batch + (1,), float(f_min))
    end = np.full(batch + (1,), float(f_max))
    panel_edges = np.concatenate([start, lower, edges[..., 1:], upper[..., 1:], end], axis=-1)
    pole_slots = np.arange(1 + TAIL_PANELS, 1 + TAIL_PANELS + c.shape[-1])
    kinds = np.full(panel_edges.shape[-1] - 1, _LOG)
    kinds[0] = _LINEAR
    kinds[pole_slots] = _POLE
    # Every design is cut at the same frequencies, so all get the same count.
    all_edges = np.sort(np.concatenate(
        [panel_edges, np.broadcast_to(cuts, batch + cuts.shape)], axis=-1), axis=-1)
    lo, hi = all_edges[..., :-1], all_edges[..., 1:]
    mid = np.where(np.isinf(hi), lo + 1.0, 0.5 * (lo + hi))
    parent = np.sum(panel_edges[..., None, 1:] <= mid[..., None], axis=-1)
    parent = np.minimum(parent, kinds.size - 1)
    kind = kinds[parent]
    pole = np.clip(parent - pole_slots[0], 0, c.shape[-1] - 1)
    centre = np.take_along_axis(c, pole, axis=-1)
    width = np.take_along_axis(h, pole, axis=-1)
    kind = np.where(np.isinf(hi), _RECIPROCAL, kind)

    # Evaluate every map on safe stand-ins and keep the piece's own.
    safe_lo = np.where(lo > 0, lo, 1.0)
    safe_hi = np.where(np.isfinite(hi), hi, safe_lo)
    f_lin, w_lin = _linear_panel(lo, safe_hi, n)
    f_log, w_log = _log_panel(safe_lo, np.maximum(safe_hi, safe_lo), n)
    f_rec, w_rec = _reciprocal_panel(safe_lo, n)
    f_pole, w_pole = _pole_panel(centre, width, lo, safe_hi, n)
    choice = kind[..., None]
    frequency = np.select([choice == _LINEAR, choice == _LOG, choice == _RECIPROCAL],
                          [f_lin, f_log, f_rec], f_pole)
    weight = np.select([choice == _LINEAR, choice == _LOG, choice == _RECIPROCAL],
                       [w_lin, w_log, w_rec], w_pole)
    shape = batch + (-1,)
    return frequency.reshape(shape), weight.reshape(shape)


_LINEAR, _LOG, _POLE, _RECIPROCAL = range(4)
