"""tmd.height_integral against scipy.integrate.quad (the reference library)."""

import numpy as np
import pytest
from scipy.integrate import quad

from tmd.height_integral import height_panels, integrate_over_height
from tmd.loads import Building
from tmd.wind import acrosswind


def _quad(function, height_m, points=()):
    # epsabs=0: the relative tolerance alone decides (quad's default epsabs
    # 1.49e-8 would stop early on small integrands); breakpoints as quad's points.
    inside = [z for z in points if 0 < z < height_m]
    value, _ = quad(function, 0.0, height_m, points=inside or None, epsabs=0.0,
                    epsrel=1e-13, limit=500)
    return value


@pytest.mark.parametrize("exponent", [0.45, 0.6, 1.0, 1.5, 2.3])
def test_power_law_moments_match_quad_and_the_closed_form(exponent):
    # int_0^H z (z/H)^b dz = H^2 / (b + 2) (by hand) and quad; rtol 1e-12: the
    # graded panels leave 2^(-12 (b + 2)) of the integral in the first panel.
    h = 305.0
    got = integrate_over_height(lambda z: z * (z / h) ** exponent, h)
    assert got == pytest.approx(h**2 / (exponent + 2), rel=1e-12)
    assert got == pytest.approx(_quad(lambda z: z * (z / h) ** exponent, h), rel=1e-12)


def test_tabulated_shape_is_integrated_exactly_between_its_heights():
    # A piecewise-linear shape with kinks at the table heights (a fictional
    # tower): z phi and phi^2 are polynomials between them; quad with the same
    # breakpoints, rtol 1e-12.
    heights = (12.0, 60.0, 130.0, 201.0, 240.0)
    values = (0.0, 0.12, 0.45, 0.83, 1.0)
    building = Building(height_m=240.0, breadth_m=40.0, depth_m=40.0, drag_coefficient=1.3,
                        damper_height_m=240.0,
                        mode_shape_heights_m=heights, mode_shape_values=values)
    phi = building.mode_shape
    points = building.mode_shape_breakpoints_m
    want_eta = 3 * _quad(lambda z: z * float(phi(z)), 240.0, points) / 240.0**3
    got_eta = acrosswind.mode_shape_correction(240.0, phi, points)
    assert got_eta == pytest.approx(want_eta, rel=1e-12)
    assert building.mode_shape_square_integral_m == pytest.approx(
        _quad(lambda z: float(phi(z)) ** 2, 240.0, points), rel=1e-12)


def test_a_kink_without_its_breakpoint_is_still_close_and_with_it_exact():
    # The rule's claim of exactness rests on the breakpoints: a kink at 97 m
    # integrated without it errs, with it the rule is exact (quad, rtol 1e-12).
    def f(z):
        return np.maximum(z - 97.0, 0.0)

    want = 0.5 * (200.0 - 97.0) ** 2  # by hand
    assert integrate_over_height(f, 200.0, (97.0,)) == pytest.approx(want, rel=1e-13)
    assert integrate_over_height(f, 200.0) == pytest.approx(want, rel=1e-3)
    assert integrate_over_height(f, 200.0) != pytest.approx(want, rel=1e-12)


def test_panels_cover_the_height_in_order():
    edges = height_panels(150.0, (150.0, 40.0, -3.0, 90.0, 40.0))
    assert edges[0] == 0.0 and edges[-1] == 150.0
    assert np.all(np.diff(edges) > 0)
    assert {40.0, 90.0} <= set(edges.tolist())
