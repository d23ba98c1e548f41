"""Coherence, admittance and strip-averaged kernels against hand values and scipy."""

import numpy as np
import pytest
from scipy.integrate import dblquad, quad

from tmd.loads import lateral_mean_coherence, pair_mean_exponential, strip_self_coherence
from tmd.wind import area_admittance_sq, averaged_exponential, cross_spectrum, root_coherence


def test_root_coherence_by_hand():
    # Davenport exponential: f = 0.1, C_z dz = 10 * 10 = 100, U = 10 -> exp(-1);
    # with C_z dz = 30, C_y dy = 40 the distance is 50, at f = 0.2, U = 10 -> exp(-1).
    assert float(root_coherence(0.1, 10.0, 0.0, 10.0)) == pytest.approx(np.exp(-1), rel=1e-14)
    assert float(root_coherence(0.2, 3.0, 2.5, 10.0)) == pytest.approx(np.exp(-1), rel=1e-14)
    assert float(cross_spectrum(4.0, 9.0, 0.5)) == pytest.approx(3.0, rel=1e-14)


def test_area_admittance_by_hand():
    # Vickery-type form: chi^2 = 1 at f = 0; at 2 f sqrt(A)/U = 1, chi^2 = 1/(1+1)^2 = 0.25.
    assert float(area_admittance_sq(0.0, 400.0, 20.0)) == 1.0
    assert float(area_admittance_sq(0.5, 400.0, 20.0)) == pytest.approx(0.25, rel=1e-14)


@pytest.mark.parametrize("eta", [1e-4, 0.3, 2.0, 25.0])
def test_averaged_exponential_is_mean_coherence(eta):
    # EN 1991-1-4 eq. B.7 equals the mean of exp(-2 eta |s - t|) over the unit
    # square = int_0^1 2 (1 - x) exp(-2 eta x) dx (density of |s - t|);
    # reference scipy quad, tolerance 1e-9 relative.
    ref = quad(lambda x: 2 * (1 - x) * np.exp(-2 * eta * x), 0, 1, epsabs=0, epsrel=1e-12)[0]
    assert float(averaged_exponential(eta)) == pytest.approx(ref, rel=1e-9)


@pytest.mark.parametrize(("a", "q"), [(0.0, 0.0), (0.3, 2.0), (2.0, 0.5), (0.05, 80.0)])
def test_lateral_mean_coherence_against_quad(a, q):
    # Reference scipy quad of the breadth average. rtol 1e-4: the 16-point rule
    # is worst (3e-5) when A << 1 << Q, where the integrand bends sharply near t = A/Q.
    ref = quad(lambda t: 2 * (1 - t) * np.exp(-np.hypot(a, q * t)), 0, 1,
               epsabs=0, epsrel=1e-12, points=[min(1.0, a / max(q, 1e-9))], limit=200)[0]
    assert float(lateral_mean_coherence(a, q)) == pytest.approx(ref, rel=1e-4)


@pytest.mark.parametrize(("p", "q"), [(0.2, 0.0), (1.5, 3.0), (0.1, 40.0), (6.0, 1.0)])
def test_strip_self_coherence_against_dblquad(p, q):
    # Reference scipy dblquad; 1e-4 relative covers the 16 x 16 Gauss rule
    # around the cone at zero separation.
    ref = dblquad(lambda t, s: 4 * (1 - s) * (1 - t) * np.exp(-np.hypot(p * s, q * t)),
                  0, 1, 0, 1, epsabs=0, epsrel=1e-10)[0]
    assert float(strip_self_coherence(p, q)) == pytest.approx(ref, rel=1e-4)


@pytest.mark.parametrize(("d", "u"), [(1.0, 0.5), (3.0, 0.5), (12.0, 3.0)])
def test_pair_mean_exponential_against_dblquad(d, u):
    # Two unit strips, midpoints d apart, decay a = 2u: reference scipy dblquad.
    a = 2 * u
    ref = dblquad(lambda y, x: np.exp(-a * abs(d + x - y)), -0.5, 0.5, -0.5, 0.5,
                  epsabs=0, epsrel=1e-11)[0]
    assert float(pair_mean_exponential(a * d, u)) == pytest.approx(ref, rel=1e-9)
