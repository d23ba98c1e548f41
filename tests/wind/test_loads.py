"""Modal force spectrum from strips, mode shape, aerodynamic damping."""

import math

import numpy as np
import pytest
from scipy.integrate import dblquad, quad

from tmd.loads import (
    Building,
    aerodynamic_damping_ratio,
    generalized_force_psd,
    height_strips,
    modal_force_spectra,
    modal_force_spectrum,
    reference_wind_spectrum,
)
from tmd.spectra import TabulatedSpectrum
from tmd.wind import Site, velocity_spectrum

# Fictional site and tower ("Harbour Row tower", our own scenario).
SITE = Site("III", basic_speed_m_s=26.0)
TOWER = Building(height_m=150.0, breadth_m=40.0, depth_m=30.0, drag_coefficient=1.3)


def _en_size_reduction(eta):
    # EN 1991-1-4 eq. B.7, typed here independently of the library.
    return 1 / eta - (1 - np.exp(-2 * eta)) / (2 * eta**2)


def _uniform_force(f, n, coherence, decay_vertical, decay_lateral, h=100.0, b=30.0, u=25.0):
    z, dz = height_strips(h, n)
    ones = np.ones(n)
    psd = np.ones((f.size, n))
    s_f = generalized_force_psd(f, z, dz, ones, u * ones, psd, breadth_m=b,
                                drag_coefficient=1.0, air_density_kg_m3=1.0,
                                coherence=coherence, decay_vertical=decay_vertical,
                                decay_lateral=decay_lateral)
    return s_f / (b * h * u) ** 2  # normalised by the fully correlated force


@pytest.mark.parametrize("n", [7, 40])
def test_degenerate_case_equals_eurocode_size_reduction(n):
    # Uniform speed, phi = 1, unit point spectrum, C_z = 9.2: the strip double
    # sum is (1/h^2) int int exp(-9.2 f |z1 - z2| / U) = R_h(eta_h) with
    # eta_h = 4.6 h f / U (EN 1991-1-4 B.2(6), eq. B.7). Strip pairs are
    # averaged exactly for this kernel, so any n is exact; rtol 1e-10 is rounding.
    f = np.array([0.01, 0.1, 0.5, 2.0])
    eta = 4.6 * 100.0 * f / 25.0
    got = _uniform_force(f, n, "exponential-vertical", 9.2, 0.0)
    np.testing.assert_allclose(got, _en_size_reduction(eta), rtol=1e-10)


def test_lateral_coherence_converges_to_face_integral():
    # Uniform speed, phi = 1: the double sum over height and breadth must
    # converge to the mean root-coherence over the face,
    # int_0^1 int_0^1 4 (1-s)(1-t) exp(-sqrt((P s)^2 + (Q t)^2)) ds dt,
    # P = f C_z h / U, Q = f C_y b / U (reference: scipy dblquad). The largest
    # error must shrink from 20 to 40 to 80 strips and be below 1e-3 at 80;
    # what remains there (4e-4 at 0.4 Hz) is the 16-point breadth rule's floor.
    f = np.array([0.05, 0.4, 1.5])
    refs = []
    for fk in f:
        p, q = fk * 10 * 100 / 25, fk * 16 * 30 / 25
        refs.append(dblquad(lambda t, s, p=p, q=q: 4 * (1 - s) * (1 - t)
                            * np.exp(-np.hypot(p * s, q * t)), 0, 1, 0, 1,
                            epsabs=0, epsrel=1e-9)[0])
    errors = [np.max(np.abs(_uniform_force(f, n, "exponential", 10.0, 16.0) / refs - 1))
              for n in (20, 40, 80)]
    assert all(later < earlier for earlier, later in zip(errors, errors[1:], strict=False))
    assert errors[-1] < 1e-3


def test_strip_convergence_of_modal_force_spectrum():
    # Realistic tower: 20, 40, 80 strips differ by shrinking amounts (numerical
    # convergence, no external value); at the resonance band 0.1-1 Hz the
    # 40-strip table is within 0.5 % of the 80-strip one.
    f = np.array([0.003, 0.05, 0.3, 1.0])
    s20, s40, s80 = (modal_force_spectrum(SITE, TOWER, 1.0, n_strips=n, frequency_hz=f)(f)
                     for n in (20, 40, 80))
    assert np.all(np.abs(s80 - s40) < np.abs(s40 - s20))
    np.testing.assert_allclose(s40[1:], s80[1:], rtol=5e-3)


def test_quasi_static_limit_matches_quad():
    # At f -> 0 every coherence is 1, so S_F = (int phi rho C_d b U sqrt(S_u) dz)^2
    # (quasi-steady theory). Reference: scipy quad over height; rtol 1e-4 is
    # the midpoint-strip error with 200 strips (f = 1e-7 Hz leaves coherence
    # 1 - 1e-5).
    f0 = 1e-7
    got = modal_force_spectrum(SITE, TOWER, 10.0, n_strips=200, frequency_hz=[f0, 1e-6])(f0)

    def line_load(z):
        s_u = float(velocity_spectrum(SITE, z, f0, 10.0, "eurocode"))
        return float(TOWER.mode_shape(z)) * 1.25 * 1.3 * 40.0 * float(
            SITE.mean_speed(z, 10.0)) * math.sqrt(s_u)

    ref = quad(line_load, 0, 150.0, points=[5.0], epsrel=1e-10, limit=200)[0] ** 2
    assert float(got) == pytest.approx(ref, rel=1e-4)


def test_admittance_option_by_hand():
    # Uniform case with admittance: S_F / (rho C_d A U)^2 S_u = chi^2(f)
    # (Vickery-type form, evaluated by hand at 2 f sqrt(A)/U = 1 -> 0.25).
    a = 100.0 * 30.0
    f = np.array([25.0 / (2 * math.sqrt(a))])
    z, dz = height_strips(100.0, 10)
    got = generalized_force_psd(f, z, dz, np.ones(10), 25.0 * np.ones(10), np.ones((1, 10)),
                                breadth_m=30.0, drag_coefficient=1.0, air_density_kg_m3=1.0,
                                coherence="admittance", admittance_speed=25.0)
    assert float(got[0]) / (a * 25.0) ** 2 == pytest.approx(0.25, rel=1e-12)


def _continuous_strip_integral(f, decay_vertical=10.0, nodes=160):
    """S_F(f) = int int phi a sqrt(S_u) (z1) phi a sqrt(S_u) (z2) coh dz1 dz2 of the tower.

    The quasi-steady strip loading (Davenport 1962) as a continuous double
    integral over the height, a(z) = rho C_d b U(z), with vertical root-coherence
    exp(-f C_z |z1 - z2| / U_pair), U_pair the mean of the two speeds. It is
    evaluated here by a Gauss-Legendre product rule on the triangle z2 < z1
    (twice, by symmetry), so that the kink on the diagonal is an edge: no
    strips, independently of the library's strip sums.
    """
    h = TOWER.height_m
    x, w = np.polynomial.legendre.leggauss(nodes)
    z1, w1 = h * (x[:, None] + 1) / 2, w[:, None] * h / 2
    z2 = z1 * (x[None, :] + 1) / 2
    w2 = w[None, :] * z1 / 2

    def weight(z):
        u = SITE.mean_speed(z, 1.0)
        root_psd = np.sqrt(velocity_spectrum(SITE, z, f, 1.0, "eurocode"))
        return ((z / h) * SITE.air_density_kg_m3 * TOWER.drag_coefficient * TOWER.breadth_m
                * u * root_psd), u

    a1, u1 = weight(z1)
    a2, u2 = weight(z2)
    coherence = np.exp(-f * decay_vertical * np.abs(z1 - z2) / (0.5 * (u1 + u2)))
    return 2.0 * float(np.sum(w1 * w2 * a1 * a2 * coherence))


def test_modal_force_spectrum_is_a_cheap_table():
    # The table, evaluated anywhere, gives the strip loading's values: against
    # the continuous double integral (above) at frequencies between the table's
    # nodes, within 5e-4 at 40 strips (the strips' discretisation: measured
    # 2.2e-4, 1e-4 at 80 strips), and against the strip sum evaluated directly
    # at those frequencies within 1e-4 (log-log interpolation between nodes
    # 2.9 % apart: measured 6e-5).
    spectrum = modal_force_spectrum(SITE, TOWER, 1.0, coherence="exponential-vertical")
    assert isinstance(spectrum, TabulatedSpectrum)
    f = np.array([0.05, 0.2, 0.6, 1.5])
    reference = np.array([_continuous_strip_integral(fk) for fk in f])
    np.testing.assert_allclose(spectrum(f), reference, rtol=5e-4)
    direct = modal_force_spectrum(SITE, TOWER, 1.0, coherence="exponential-vertical",
                                  frequency_hz=f)
    np.testing.assert_allclose(spectrum(f), direct(f), rtol=1e-4)
    grid = np.geomspace(0.05, 2.0, 300)[:, None] * np.ones((1, 1000))  # 300k points at once
    np.testing.assert_array_equal(spectrum(grid)[:, 0], spectrum(grid[:, 0]))
    f_ref, s_ref = reference_wind_spectrum(SITE, TOWER, 1.0)
    z_s = 0.6 * TOWER.height_m  # EN 1991-1-4 Fig. 6.1: z_s = 0.6 h
    np.testing.assert_allclose(s_ref, velocity_spectrum(SITE, z_s, f_ref, 1.0, "eurocode"),
                               rtol=1e-12)


def test_default_table_continues_as_its_asymptotic_power_law():
    # Issue 13, defect 15: the wind model's table ends at 10 Hz, where 2-5% of
    # the acceleration's second moment came from its top decade. Theory (from
    # memory): every turbulence spectrum here falls as f^-5/3 (Kolmogorov's
    # inertial range) and the root coherence averaged over a strip falls as
    # f^-1 in each direction averaged, so the modal force tends to f^-11/3
    # with both and to f^-8/3 with height alone; the table's last slope
    # approaches that from above and continues it only where f^2 S_F is
    # integrable (slope < -3).
    both = modal_force_spectrum(SITE, TOWER, 1.0)
    assert both.f_max_hz == math.inf
    assert -11 / 3 < both.tail_exponent < -11 / 3 + 0.05
    height_only = modal_force_spectrum(SITE, TOWER, 1.0, coherence="exponential-vertical")
    assert height_only.tail_exponent is None and height_only.f_max_hz == 10.0
    assert -8 / 3 - 0.05 < math.log(height_only.psd_n2_per_hz[-1] / height_only.psd_n2_per_hz[-2]
                                    ) / math.log(height_only.frequency_hz[-1]
                                                 / height_only.frequency_hz[-2]) < -8 / 3 + 0.05
    # Given frequencies are the caller's range: no continuation.
    assert modal_force_spectrum(SITE, TOWER, 1.0, frequency_hz=[0.1, 1.0, 2.0]).f_max_hz == 2.0
    # The return periods' scaled tables (S_F(f; T) = c^3 S_F(f / c; T_ref)) continue with
    # their own last slope: the reference period's exactly, the 50-year one's from a
    # table ending at 10 Hz / c on the reference curve (0.004 shallower here).
    first, fifty = modal_force_spectra(SITE, TOWER, [1.0, 50.0])
    assert first.tail_exponent == both.tail_exponent
    assert fifty.tail_exponent == pytest.approx(both.tail_exponent, abs=0.01)


def test_mode_shape_normalised_at_damper():
    # Project convention (tmd/structure.py): phi = 1 at the damper height.
    b = Building(120.0, 30.0, 30.0, 1.2, mode_shape_exponent=1.5, damper_height_m=100.0,
                 evaluation_height_m=120.0)
    assert float(b.mode_shape(100.0)) == pytest.approx(1.0, rel=1e-15)
    assert b.evaluation_mode_value == pytest.approx(1.2**1.5, rel=1e-14)
    # int_0^h phi^2 dz against scipy quad; rtol 1e-10 is quadrature accuracy.
    ref = quad(lambda z: float(b.mode_shape(z)) ** 2, 0, 120.0, epsrel=1e-12)[0]
    assert b.mode_shape_square_integral_m == pytest.approx(ref, rel=1e-10)


def test_tabulated_mode_shape():
    b = Building(100.0, 30.0, 30.0, 1.2, mode_shape_heights_m=(0.0, 50.0, 100.0),
                 mode_shape_values=(0.0, 0.2, 0.8), damper_height_m=100.0)
    assert float(b.mode_shape(50.0)) == pytest.approx(0.25, rel=1e-14)
    # Piecewise linear by hand: int_0^50 (z/200)^2 dz + int_50^100 (0.25 + 0.75 (z-50)/50)^2 dz
    # = 50^3 / (3 * 200^2) + 50 * (0.25^2 + 0.25 * 0.75 + 0.75^2 / 3)
    # = 1.041667 + 50 * 0.4375 = 22.916667; rtol 1e-6 is the hand rounding.
    assert b.mode_shape_square_integral_m == pytest.approx(22.916667, rel=1e-6)


def test_aerodynamic_damping_by_hand():
    # EN 1991-1-4 eq. F.18: delta_a = c_f rho b v_m(z_s) / (2 n_1 m_e); with
    # M* = m h / 3 for phi = z/h, m_e = m = 2.4e5 kg/m. z_s = 90 m.
    m = 2.4e5
    v = float(SITE.mean_speed(90.0, 1.0))
    expected = 1.3 * 1.25 * 40.0 * v / (2 * 0.3 * m) / (2 * math.pi)
    got = aerodynamic_damping_ratio(SITE, TOWER, m * 150.0 / 3, np.array([0.3, 0.6]), 1.0)
    np.testing.assert_allclose(got, [expected, expected / 2], rtol=1e-12)


@pytest.mark.parametrize(
    ("kwargs", "words"),
    [
        ({"damper_height_m": 160.0}, ["damper_height_m", "160.0", "150"]),
        ({"evaluation_height_m": -1.0}, ["evaluation_height_m", "-1.0"]),
        ({"breadth_m": -4.0}, ["breadth_m", "-4.0", "> 0"]),
    ],
)
def test_bad_building_input(kwargs, words):
    base = {"height_m": 150.0, "breadth_m": 40.0, "depth_m": 30.0, "drag_coefficient": 1.3}
    with pytest.raises(ValueError) as err:
        Building(**{**base, **kwargs})
    for word in words:
        assert word in str(err.value)


def test_building_above_200_m_needs_a_profile_beyond_en():
    # EN 1991-1-4 4.3.2: the log profile is defined up to z_max = 200 m; the
    # building itself may be taller (profile tables reach higher), the EN site may not.
    tall = Building(height_m=250.0, breadth_m=40.0, depth_m=30.0, drag_coefficient=1.3)
    with pytest.raises(ValueError) as err:
        modal_force_spectrum(SITE, tall, frequency_hz=[0.1, 0.2])
    assert "z <= 200 m" in str(err.value) and "EN 1991-1-4" in str(err.value)


def test_bad_model_names():
    with pytest.raises(ValueError, match="coherence = 'full'"):
        modal_force_spectrum(SITE, TOWER, coherence="full", frequency_hz=[0.1, 0.2])


@pytest.mark.parametrize("model", ["eurocode", "davenport", "kaimal", "von-karman", "harris"])
@pytest.mark.parametrize("coherence", ["exponential", "exponential-vertical", "admittance"])
def test_return_periods_reuse_one_spectrum_shape_exactly(model, coherence):
    # EN 1991-1-4 eq. 4.2 scales the basic speed by c_prob, so every mean
    # speed and sigma_u (eq. 4.7) scale together while the length scales do
    # not; every spectrum here is sigma_u^2 R(f L / U) / f (EN Annex B eq. B.2
    # and its peers) and every coherence depends on f dz / U, so
    # S_F(c f; T) = c^3 S_F(f; T_ref). Reference: the strip sums computed
    # directly at T on the scaled nodes; agreement to rounding (1e-12).
    periods = [50.0, 1.0, 10.0, 1000.0]
    tables = modal_force_spectra(SITE, TOWER, periods, spectrum=model, coherence=coherence,
                                 n_strips=8)
    for period, table in zip(periods, tables, strict=True):
        direct = modal_force_spectrum(SITE, TOWER, period, spectrum=model, coherence=coherence,
                                      n_strips=8, frequency_hz=table.frequency_hz)
        np.testing.assert_allclose(table.psd_n2_per_hz, direct.psd_n2_per_hz, rtol=1e-12)
        # The range shifts with c but still covers the default 1e-4..10 Hz.
        assert table.f_min_hz <= 1e-4 and table.f_max_hz >= 10.0
    # The reference period's table is the direct one, bit for bit.
    first = modal_force_spectrum(SITE, TOWER, 50.0, spectrum=model, coherence=coherence,
                                 n_strips=8)
    np.testing.assert_array_equal(tables[0].frequency_hz, first.frequency_hz)
    np.testing.assert_array_equal(tables[0].psd_n2_per_hz, first.psd_n2_per_hz)
