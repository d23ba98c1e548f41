"""Pole-clustered quadrature grids.

References: the closed-form integral of a Lorentzian (arctan) and the rule
that Gauss-Legendre weights are positive (Abramowitz & Stegun 25.4.29), so
that every mapped panel's weights are >= 0.
"""

import numpy as np
import pytest

from tmd.grid import pole_grid


@pytest.mark.parametrize("f_min, f_max", [(0.0, np.inf), (1e-4, 10.0), (0.05, 0.5)])
@pytest.mark.parametrize("half_width_hz", [2e-4, 5e-3])
def test_a_lorentzian_integrates_to_its_arctan_closed_form(f_min, f_max, half_width_hz):
    # integral of h / ((f - c)^2 + h^2) over [a, b] = atan((b - c)/h) - atan((a - c)/h)
    # (calculus): the pole panel's sinh map makes it smooth, the tails carry
    # its 1/f^2 decay. Measured 2e-10 or better; bound 1e-9.
    c, h = 0.17, half_width_hz
    f, w = pole_grid(np.array([[c]]), np.array([[h]]), f_min, f_max)
    exact = np.arctan((f_max - c) / h) - np.arctan((f_min - c) / h)
    assert np.sum(w * h / ((f - c) ** 2 + h**2)) == pytest.approx(exact, rel=1e-9)


def test_weights_are_never_negative_even_on_zero_width_panels():
    # A range that ends at the outermost pole panels' edges leaves tail
    # panels of zero width: their weights must be exactly 0, not -1e-17, as
    # the bank's convex step needs non-negative weights (positive
    # Gauss-Legendre weights times non-negative panel widths).
    centre = np.array([[0.2, 0.3]])
    width = np.array([[1e-3, 1e-3]])
    for f_min, f_max in [(0.1, 0.6), (0.1, np.inf), (0.0, 0.6), (0.15, 0.45)]:
        _, w = pole_grid(centre, width, f_min, f_max)
        assert np.all(w >= 0)
