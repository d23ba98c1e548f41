"""Force records and time integrators against Parseval, scipy.signal.lsim and the engine."""

import numpy as np
import pytest
from scipy import signal

from tests.reference import two_dof_state
from tmd.dampers.absorber import Absorbers, single_tmd
from tmd.response import spectral_response, transfer_functions
from tmd.spectra import FirstOrderSpectrum, WhiteSpectrum
from tmd.timehistory import (
    NonlinearAbsorber,
    StateSpace,
    first_order_hold,
    force_records,
    integrate_linear,
    integrate_nonlinear,
    periodic_steady_state,
    resolving_period_s,
)

FS, MASS = 0.2, 2.0e7
TMD = single_tmd(FS, MASS, 0.02, 0.98, 0.06)
LOAD = FirstOrderSpectrum(1.0e9, 0.35)
DT = 0.05


def _records(n=3, period=1200.0, seed=7, spectrum=LOAD, dt=DT):
    return force_records(spectrum, period_s=period, time_step_s=dt, n_periods=n,
                         rng=np.random.default_rng(seed))


def test_record_mean_square_is_the_line_sum():
    # Spectral representation (Shinozuka & Deodatis 1991): with amplitudes
    # sqrt(2 G(f_k) df) the mean square over one period is sum G(f_k) df
    # exactly (Parseval), for every record.
    period = 600.0
    force = _records(period=period)
    df = 1.0 / period
    k = np.arange(1, int(period / DT) // 2)
    expected = np.sum(LOAD(k * df) * df)
    assert np.mean(force[:, :-1] ** 2, axis=-1) == pytest.approx(np.full(3, expected), rel=1e-12)
    # ... and it approaches the integral of G, L f_c atan(f_max / f_c) here
    # (closed form), to the line spacing's resolution.
    f_top = k[-1] * df
    closed = LOAD.level * LOAD.corner_hz * np.arctan(f_top / LOAD.corner_hz)
    assert expected == pytest.approx(closed, rel=2e-3)


def test_records_are_periodic_and_seeded():
    a, b, c = _records(seed=1), _records(seed=1), _records(seed=2)
    np.testing.assert_array_equal(a, b)
    assert not np.allclose(a, c)
    np.testing.assert_allclose(a[:, -1], a[:, 0], rtol=0, atol=1e-9 * np.abs(a).max())


def test_state_space_matches_the_engines_transfer_functions():
    # Two descriptions of one system: (i omega - A)^-1 B against the engine's
    # closed-form transfer functions (tmd.response).
    sys_ = StateSpace.of(FS, MASS, 0.01, TMD)
    f = np.array([0.05, 0.19, 0.2, 0.21, 1.3])
    h = np.linalg.solve(2j * np.pi * f[:, None, None] * np.eye(4) - sys_.a,
                        np.broadcast_to(sys_.b[:, None], (5, 4, 1)))[..., 0]
    engine = transfer_functions(f, FS, MASS, 0.01, TMD)
    np.testing.assert_allclose(h[:, 0], engine["displacement"], rtol=1e-12)
    np.testing.assert_allclose(h[:, 1], engine["stroke"][:, 0], rtol=1e-12)


def test_state_space_matches_the_reference_two_dof_model():
    # tests/reference.py writes the same TMD in physical (x, r) coordinates.
    a, b = two_dof_state(FS, MASS, 0.01, 0.02, 0.98, 0.06)
    sys_ = StateSpace.of(FS, MASS, 0.01, TMD)
    np.testing.assert_allclose(sys_.a, a, rtol=1e-12, atol=1e-14)
    np.testing.assert_allclose(sys_.b, b[:, 0], rtol=1e-12, atol=1e-20)


def test_first_order_hold_integration_matches_lsim():
    # scipy.signal.lsim with interp=True is the same first-order hold; 1e-10
    # relative in the max norm over a 1200 s record (the bound).
    sys_ = StateSpace.of(FS, MASS, 0.01, TMD)
    force = _records(n=1)
    x0 = periodic_steady_state(sys_, force, DT)
    states = integrate_linear(sys_, force, DT, x0)
    t = np.arange(force.shape[1]) * DT
    _, _, ref = signal.lsim((sys_.a, sys_.b[:, None], np.eye(4), np.zeros((4, 1))), force[0],
                            t, X0=x0[0], interp=True)
    scale = np.abs(ref).max(axis=0)
    assert np.max(np.abs(states[0] - ref) / scale) < 1e-10


def test_first_order_hold_of_a_ramp_is_exact():
    # A single oscillator under F = t: the exact solution of x'' + 2 z w x'
    # + w^2 x = t / m from rest is t / k - 2 z / (w k) + transient; compare with
    # scipy.signal.lsim, which is exact for a ramp too, over 4 steps.
    a = np.array([[0.0, 1.0], [-(2 * np.pi) ** 2, -0.2 * np.pi]])
    b = np.array([0.0, 1.0])
    phi, g0, g1 = first_order_hold(a, b, 0.1)
    x = np.zeros(2)
    for k in range(4):
        x = phi @ x + g0 * (0.1 * k) + g1 * (0.1 * (k + 1))
    t = np.linspace(0, 0.4, 5)
    _, _, ref = signal.lsim((a, b[:, None], np.eye(2), np.zeros((2, 1))), t, t, interp=True)
    np.testing.assert_allclose(x, ref[-1], rtol=1e-12)


def test_steady_state_start_gives_stationary_variance():
    # Started from the periodic steady state, the exact integration is
    # stationary: the mean square over one period equals the line sum of
    # |H|^2 G df, which is the engine's m0 to the line spacing's resolution
    # (the engine itself is checked against Lyapunov in test_response.py).
    sys_ = StateSpace.of(FS, MASS, 0.01, TMD)
    period = resolving_period_s(600.0, 0.002)
    force = _records(n=2, period=period)
    states = integrate_linear(sys_, force, DT, periodic_steady_state(sys_, force, DT))
    r = spectral_response(FS, MASS, 0.01, TMD, LOAD)
    ms = np.mean(states[:, :-1, 0] ** 2, axis=-1)
    # 1e-3: the first-order hold attenuates the force at f_s by sinc^2(f_s dt)
    # (2e-4 in variance at f_s dt = 0.01) and the lines stop at 10 Hz.
    np.testing.assert_allclose(ms, r.displacement.m0, rtol=1e-3)
    np.testing.assert_allclose(np.mean(states[:, :-1, 1] ** 2, axis=-1), r.stroke.m0[0],
                               rtol=1e-3)


def test_nonlinear_integrator_without_nonlinearity_matches_the_exact_one():
    # The check: 1e-6 in the max norm over a 600 s record. The
    # exponential integrator is exact for the linear part at any sub-step
    # count; stated here at 1 sub-step per sample.
    sys_ = StateSpace.of(FS, MASS, 0.01, TMD)
    force = _records(n=1, period=600.0)
    x0 = periodic_steady_state(sys_, force, DT)
    exact = integrate_linear(sys_, force, DT, x0)
    off = NonlinearAbsorber(np.zeros(1), np.full(1, np.inf))
    states, rates = integrate_nonlinear(sys_, off, force, DT, x0, substeps=1)
    assert np.max(np.abs(states - exact) / np.abs(exact).max(axis=(0, 1))) < 1e-6
    np.testing.assert_allclose(rates, exact @ sys_.a.T + force[..., None] * sys_.b,
                               rtol=0, atol=1e-9 * np.abs(rates).max())


def test_head_loss_converges_when_the_step_is_halved():
    # Second-order scheme (Cox & Matthews 2002): halving the step cuts the
    # difference to the finest solution by about 4.
    sys_ = StateSpace.of(FS, MASS, 0.01, Absorbers(TMD.mass_kg, TMD.frequency_hz,
                                                   np.zeros(1), TMD.coupling))
    force = _records(n=1, period=300.0)
    x0 = periodic_steady_state(StateSpace.of(FS, MASS, 0.01, TMD), force, DT)
    loss = NonlinearAbsorber(np.full(1, 2.0), np.full(1, np.inf))
    runs = [integrate_nonlinear(sys_, loss, force, DT, x0, substeps=s)[0][0, :, 1]
            for s in (1, 2, 8)]
    e1, e2 = (np.max(np.abs(r - runs[-1])) for r in runs[:2])
    assert e2 < e1 / 3


def test_white_force_rms_of_an_oscillator_matches_crandall_mark():
    # Crandall & Mark (1963): sigma_x^2 = G / (8 zeta omega^3 m^2) under
    # one-sided white G; band-limited to 10 Hz here, which changes it by < 1e-6.
    zeta, mass, level = 0.02, 1.0e5, 1.0e6
    sys_ = StateSpace.of(FS, mass, zeta, Absorbers.none())
    period = resolving_period_s(600.0, zeta * FS)
    force = _records(n=2, period=period, spectrum=WhiteSpectrum(level, 0.0, 10.0))
    states = integrate_linear(sys_, force, DT, periodic_steady_state(sys_, force, DT))
    omega = 2 * np.pi * FS
    expected = level / (8 * zeta * omega**3 * mass**2)
    np.testing.assert_allclose(np.mean(states[:, :-1, 0] ** 2, axis=-1), expected, rtol=1e-3)
