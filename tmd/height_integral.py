"""Integrals over a building's height of piecewise-smooth functions, with numpy only.

The case reader integrates mode shapes over the height (the across-wind
mode-shape correction, the integral of phi^2). It does so here rather than
with scipy.integrate.quad, whose import costs more than the rest of reading
a case (issue "Speed"); tests compare the rule with quad at ``epsabs=0``.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence

import numpy as np
from numpy.polynomial.legendre import leggauss

GAUSS_POINTS = 20  # per panel: exact for polynomials of degree <= 39
GRADED_PANELS = 12  # geometric panels towards z = 0, ratio 2: the first is 2^-12 of its span
_NODES, _WEIGHTS = leggauss(GAUSS_POINTS)


def height_panels(height_m: float, breakpoints_m: Sequence[float] = ()) -> np.ndarray:
    """Return the panel edges [m] of :func:`integrate_over_height`.

    Parameters
    ----------
    height_m : float
        H [m], > 0.
    breakpoints_m : sequence of float
        Heights [m] where the integrand may have a kink (the heights of a
        tabulated mode shape); those outside (0, H) are ignored.

    Returns
    -------
    numpy.ndarray
        Increasing edges from 0 to H: the breakpoints, and between 0 and the
        first of them (or H) geometric edges a 2^-k, k = 1..12.
    """
    h = float(height_m)
    inside = sorted({float(z) for z in breakpoints_m if 0.0 < float(z) < h})
    first = inside[0] if inside else h
    graded = first * 2.0 ** -np.arange(GRADED_PANELS, 0, -1)
    return np.concatenate([[0.0], graded, inside, [h]])


def integrate_over_height(function: Callable, height_m: float,
                          breakpoints_m: Sequence[float] = ()) -> float:
    """Integral of ``function`` over 0..H by composite Gauss-Legendre quadrature.

    Parameters
    ----------
    function : callable
        f(z) of an array of heights z [m], returning an array of the same
        shape; smooth between the breakpoints.
    height_m : float
        H [m], > 0.
    breakpoints_m : sequence of float
        Heights [m] where f may have a kink (see :func:`height_panels`).

    Returns
    -------
    float
        The integral [units of f times m].

    Notes
    -----
    Gauss-Legendre with 20 nodes on each panel of :func:`height_panels`
    (Abramowitz and Stegun 25.4.29, from memory; nodes and weights from
    numpy.polynomial.legendre.leggauss). Between breakpoints a tabulated
    (piecewise-linear) shape makes z phi and phi^2 polynomials, integrated
    exactly. A power law z^b with a fractional b is smooth on each geometric
    panel towards z = 0, whose first panel holds about 2^(-12 (b + 1)) of
    the integral.
    """
    edges = height_panels(height_m, breakpoints_m)
    half = 0.5 * np.diff(edges)
    z = (0.5 * (edges[:-1] + edges[1:]))[:, None] + half[:, None] * _NODES[None, :]
    values = np.asarray(function(z), dtype=float)
    return float(np.sum(half * (values @ _WEIGHTS)))
