"""Time histories: seeded wind-force records and the response of structure + absorbers.

Three pieces, each checkable on its own:

* :func:`force_records` - stationary Gaussian records of a modal force with a
  given one-sided PSD, by the spectral representation method (Shinozuka &
  Deodatis 1991), FFT-based and vectorised over records;
* :class:`StateSpace` - structure + linear absorbers as x' = A x + B F with
  output rows for displacement, acceleration, strokes and absorber force;
* :func:`integrate_linear` - the exact discrete response for a force that is
  piecewise linear between samples (first-order hold, by one matrix
  exponential), and :func:`integrate_nonlinear` - classical Runge-Kutta with
  sub-steps for absorbers with a nonlinear element (a liquid column's head
  loss, end-stops), whose step is checked by halving.

States are (x, r_1..r_N, x', r_1'..r_N'): x the structure's modal
displacement at the damper level (mode shape = 1 there), r_j the absorber
coordinate relative to the structure (a TMD's stroke), with the absorber
equations of :mod:`tmd.dampers.absorber`.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property

import numpy as np
from scipy.linalg import expm

from tmd.dampers.absorber import Absorbers

TWO_PI = 2.0 * np.pi
MIN_WINDOWS_PER_PERIOD = 4


def resolving_period_s(duration_s: float, half_width_hz: float) -> float:
    """Period of one periodic force record that resolves the narrowest resonance.

    Parameters
    ----------
    duration_s : float
        Length of one analysis record T [s].
    half_width_hz : float
        Smallest half-power half-width zeta f among the closed-loop poles [Hz].

    Returns
    -------
    float
        T_p = n T [s], n the smallest whole number >= 4 with
        1 / T_p <= half_width / 2.

    Notes
    -----
    The spectral representation puts lines df = 1 / T_p apart. The variance of
    a Lorentzian resonance of half-width w sampled at df differs from its
    integral by about 2 exp(-2 pi w / df) (a Poisson-sum estimate), 7e-6 at
    df = w / 2. A record of n T is cut into n consecutive windows, each one
    analysis record, so the finer line spacing costs nothing per record.
    With random phases and fixed amplitudes the mean square over a whole
    period is the same for every record; n >= 4 windows per period give each
    analysis record its own sampling scatter.
    """
    n = max(MIN_WINDOWS_PER_PERIOD, int(np.ceil(2.0 / (half_width_hz * duration_s))))
    return n * duration_s


def force_records(spectrum, *, period_s: float, time_step_s: float, n_periods: int,
                  rng: np.random.Generator) -> np.ndarray:
    """Periodic stationary Gaussian force records by the spectral representation method.

    Parameters
    ----------
    spectrum : ForceSpectrum
        One-sided modal force PSD G(f) [N^2/Hz] (see :mod:`tmd.spectra`).
    period_s : float
        Period of each record T_p [s]; lines lie at f_k = k / T_p.
    time_step_s : float
        Sample step dt [s]; T_p / dt must be a whole number.
    n_periods : int
        Number of independent records (each of one period).
    rng : numpy.random.Generator
        Source of the random phases.

    Returns
    -------
    array, shape (n_periods, n_samples + 1)
        F(t_i) [N] at t_i = i dt, i = 0..n_samples (the last sample equals
        the first: the record is periodic).

    Notes
    -----
    F(t) = sum_k sqrt(2 G(f_k) df) cos(2 pi f_k t + phi_k), phi_k uniform on
    [0, 2 pi), df = 1 / T_p, k = 1 .. n_samples / 2 - 1 (the mean and the
    Nyquist line are left out), evaluated by one inverse real FFT per record.

    References
    ----------
    Shinozuka, M., Deodatis, G. (1991). Simulation of stochastic processes by
    spectral representation. Appl. Mech. Rev. 44(4), 191-204.
    """
    n = int(round(period_s / time_step_s))
    if n < 4 or abs(n * time_step_s - period_s) > 1e-9 * period_s:
        raise ValueError(f"period_s = {period_s} must be a whole number (>= 4) of "
                         f"time_step_s = {time_step_s}")
    df = 1.0 / period_s
    k = np.arange(n // 2 + 1)
    amplitude = np.sqrt(2.0 * spectrum(k * df) * df)
    amplitude[0] = 0.0
    amplitude[-1] = 0.0
    phase = rng.uniform(0.0, TWO_PI, size=(n_periods, k.size))
    # irfft(X)[i] = (1/n) (X_0 + 2 sum_k Re(X_k e^{2 pi i k i / n}) + ...), so
    # X_k = (n / 2) A_k e^{i phi_k} gives sum_k A_k cos(2 pi f_k t_i + phi_k).
    record = np.fft.irfft(0.5 * n * amplitude * np.exp(1j * phase), n=n, axis=-1)
    return np.concatenate([record, record[:, :1]], axis=-1)


@dataclass(frozen=True)
class StateSpace:
    """Structure + linear absorbers of one design as x' = A x + B F.

    Parameters
    ----------
    a : array, shape (2n, 2n)
        State matrix [1/s, 1/s^2].
    b : array, shape (2n,)
        Force input [1/kg in the acceleration rows].
    n_absorbers : int
        N; n = N + 1 degrees of freedom.
    absorber_mass_kg, absorber_coupling : array, shape (N,)
        m_j [kg] and beta_j [-], for the absorber force output.
    mass : array, shape (n, n)
        Mass matrix of the equations in (x, r) [kg in the first row, 1 and
        beta_j in the absorber rows].
    """

    a: np.ndarray
    b: np.ndarray
    n_absorbers: int
    absorber_mass_kg: np.ndarray
    absorber_coupling: np.ndarray
    mass: np.ndarray

    @classmethod
    def of(cls, frequency_hz: float, modal_mass_kg: float, damping_ratio: float,
           absorbers: Absorbers) -> StateSpace:
        """Assemble the state equations of one design.

        Parameters
        ----------
        frequency_hz : float
            Structure frequency f_s [Hz].
        modal_mass_kg : float
            M* [kg], mode shape = 1 at the damper.
        damping_ratio : float
            Structural damping ratio zeta_s [-].
        absorbers : Absorbers
            One design (batch shape ()).

        Returns
        -------
        StateSpace

        Notes
        -----
        (M* + sum m_j) x'' + sum m_j beta_j r_j'' + c_s x' + k_s x = F and
        beta_j x'' + r_j'' + 2 zeta_j omega_j r_j' + omega_j^2 r_j = 0
        (:mod:`tmd.dampers.absorber`), solved for the accelerations.
        """
        if absorbers.batch_shape != ():
            raise ValueError("StateSpace.of takes one design (absorbers of batch shape ())")
        n_abs = absorbers.count
        n = n_abs + 1
        ws = TWO_PI * frequency_hz
        wa = TWO_PI * absorbers.frequency_hz
        mass = np.eye(n)
        mass[0, 0] = modal_mass_kg + absorbers.mass_kg.sum()
        mass[0, 1:] = absorbers.mass_kg * absorbers.coupling
        mass[1:, 0] = absorbers.coupling
        stiff = np.diag(np.concatenate([[modal_mass_kg * ws**2], wa**2]))
        damp = np.diag(np.concatenate([[2.0 * damping_ratio * modal_mass_kg * ws],
                                       2.0 * absorbers.damping_ratio * wa]))
        inv = np.linalg.inv(mass)
        a = np.zeros((2 * n, 2 * n))
        a[:n, n:] = np.eye(n)
        a[n:, :n] = -inv @ stiff
        a[n:, n:] = -inv @ damp
        b = np.concatenate([np.zeros(n), inv[:, 0]])
        return cls(a, b, n_abs, absorbers.mass_kg.copy(), absorbers.coupling.copy(), mass)

    @property
    def size(self) -> int:
        """Number of states 2 (N + 1)."""
        return self.a.shape[0]

    def outputs(self, state: np.ndarray, force: np.ndarray,
                state_rate: np.ndarray | None = None) -> dict[str, np.ndarray]:
        """Physical responses from states and force.

        Parameters
        ----------
        state : array, shape (..., 2n)
            States (x, r, x', r').
        force : array, shape (...)
            Modal force F [N] at the same instants.
        state_rate : array, shape (..., 2n), optional
            x' of the states when it is not A x + B F (a nonlinear absorber).

        Returns
        -------
        dict
            ``displacement`` [m], ``acceleration`` [m/s^2] of the structure at
            the damper level; ``stroke`` [m] and ``stroke_velocity`` [m/s],
            shape (..., N); ``force`` [N], the force the absorbers put on the
            structure, -sum m_j (x'' + beta_j r_j'').
        """
        n = self.n_absorbers + 1
        rate = state @ self.a.T + force[..., None] * self.b if state_rate is None else state_rate
        acc = rate[..., n]
        stroke_acc = rate[..., n + 1:]
        absorber_force = -np.sum(self.absorber_mass_kg * (acc[..., None] + self.absorber_coupling
                                                          * stroke_acc), axis=-1)
        return {"displacement": state[..., 0], "acceleration": acc,
                "stroke": state[..., 1:n], "stroke_velocity": state[..., n + 1:],
                "force": absorber_force}


def first_order_hold(a: np.ndarray, b: np.ndarray, time_step_s: float):
    """Exact discrete propagators for inputs linear between samples.

    Parameters
    ----------
    a : array, shape (m, m)
        State matrix [1/s].
    b : array, shape (m,) or (m, p)
        Input matrix.
    time_step_s : float
        Sample step h [s].

    Returns
    -------
    tuple of arrays
        (Phi, G0, G1) with x_{k+1} = Phi x_k + G0 u_k + G1 u_{k+1}; G0 and G1
        have the shape of ``b``.

    Notes
    -----
    With u(t) = u_k + (u_{k+1} - u_k) s / h on [t_k, t_k + h],
    x_{k+1} = e^{Ah} x_k + int_0^h e^{A(h-s)} B u ds. The exponential of the
    block matrix [[A h, B h, 0], [0, 0, I], [0, 0, 0]] holds e^{Ah},
    Q1 = int_0^h e^{A tau} d tau B and Q2 = int_0^h e^{A tau} (h - tau) / h
    d tau B in its first block row; then G0 = Q1 - Q2 and G1 = Q2.
    """
    b2 = b.reshape(b.shape[0], -1)
    m, p = b2.shape
    block = np.zeros((m + 2 * p, m + 2 * p))
    block[:m, :m] = a * time_step_s
    block[:m, m:m + p] = b2 * time_step_s
    block[m:m + p, m + p:] = np.eye(p)
    e = expm(block)
    phi, q1, q2 = e[:m, :m], e[:m, m:m + p], e[:m, m + p:]
    return phi, (q1 - q2).reshape(b.shape), q2.reshape(b.shape)


def periodic_steady_state(system: StateSpace, force: np.ndarray, time_step_s: float):
    """State at t = 0 of the periodic steady response to periodic force records.

    Parameters
    ----------
    system : StateSpace
        The linear system.
    force : array, shape (records, n + 1)
        Periodic force records (last sample = first) [N].
    time_step_s : float
        Sample step [s].

    Returns
    -------
    array, shape (records, 2n)
        x(0) such that the response over one period is exactly periodic.

    Notes
    -----
    Started there, every sample of the response is a sample of the
    stationary process whose spectrum is the line spectrum of the force, so
    no record starts from rest and no run-in is discarded. The state is the
    inverse FFT of H_x(f_k) F_k, H_x = (2 pi i f - A)^-1 B the state's
    transfer function at the record's lines; this equals a draw from the
    stationary covariance (for a white force, the Lyapunov solution) that is
    consistent with the force history.
    """
    n = force.shape[-1] - 1
    spectrum = np.fft.rfft(force[:, :n], axis=-1)
    f = np.fft.rfftfreq(n, time_step_s)
    eye = np.eye(system.size)
    # (s I - A)^-1 B per line: one solve per frequency, batched.
    rhs = np.broadcast_to(system.b[:, None], (f.size, system.size, 1))
    resolvent = np.linalg.solve(TWO_PI * 1j * f[:, None, None] * eye - system.a, rhs)[..., 0]
    lines = spectrum[:, :, None] * resolvent[None]
    lines[:, 0] = 0.0  # the records carry no mean
    return np.fft.irfft(lines, n=n, axis=1)[:, 0, :]


def integrate_linear(system: StateSpace, force: np.ndarray, time_step_s: float,
                     initial_state: np.ndarray) -> np.ndarray:
    """Exact response of the linear system to force records with a first-order hold.

    Parameters
    ----------
    system : StateSpace
        The linear system.
    force : array, shape (records, samples)
        Force records [N] at a uniform step.
    time_step_s : float
        Sample step [s].
    initial_state : array, shape (records, 2n)
        States at the first sample.

    Returns
    -------
    array, shape (records, samples, 2n)
        States at every sample.

    Notes
    -----
    x_{k+1} = Phi x_k + G0 F_k + G1 F_{k+1} (:func:`first_order_hold`), one
    vectorised step over all records per sample. (Decoupling it into
    first-order filters in the eigenvectors of Phi was measured slower here:
    complex arithmetic on the whole history costs more than the loop.)
    """
    phi, g0, g1 = first_order_hold(system.a, system.b, time_step_s)
    drive = force[:, :-1, None] * g0 + force[:, 1:, None] * g1
    states = np.empty(force.shape + (system.size,))
    states[:, 0] = initial_state
    x = initial_state
    for i in range(force.shape[1] - 1):
        x = x @ phi.T + drive[:, i]
        states[:, i + 1] = x
    return states


@dataclass(frozen=True)
class NonlinearAbsorber:
    """Nonlinear elements of each absorber, per unit of its mass.

    Parameters
    ----------
    head_loss_per_m : array, shape (N,)
        kappa_j [1/m] in r_j'' + kappa_j |r_j'| r_j' + ...: xi / (2 L) for a
        liquid column of length L and head-loss coefficient xi; 0 for none.
        The linear damping of such an absorber is set to zero by the caller.
    stop_travel_m : array, shape (N,)
        End-stop travel +-a_j [m]; inf for none.
    stop_frequency_hz : float
        Frequency of the stop's spring acting alone on the absorber mass
        (its stiffness per unit mass is (2 pi f_stop)^2) [Hz].
    stop_damping_ratio : float
        Damping ratio of the stop's dashpot at f_stop [-].
    """

    head_loss_per_m: np.ndarray
    stop_travel_m: np.ndarray
    stop_frequency_hz: float = 2.0
    stop_damping_ratio: float = 0.1

    def acceleration(self, stroke, stroke_velocity):
        """Extra acceleration of each absorber coordinate from the nonlinear elements.

        Parameters
        ----------
        stroke, stroke_velocity : array, shape (..., N)
            r [m] and r' [m/s].

        Returns
        -------
        array, shape (..., N)
            -kappa |r'| r' - stop force per unit mass [m/s^2].
        """
        head_loss, stops, low, stiffness, damping = self._terms
        g = np.zeros(np.shape(stroke))
        if head_loss:
            g -= self.head_loss_per_m * np.abs(stroke_velocity) * stroke_velocity
        if stops:
            # np.minimum/np.maximum rather than np.clip: the same values without
            # np.clip's Python-level checks, which cost more than the arithmetic at
            # the integrator's one call per sub-step.
            beyond = stroke - np.maximum(np.minimum(stroke, self.stop_travel_m), low)
            g -= stiffness * beyond + damping * stroke_velocity * (beyond != 0)
        return g

    @cached_property
    def _terms(self) -> tuple:
        """Return the terms decided once per absorber set.

        (any head loss, any finite end-stop, -a_j, the stop's stiffness and
        damping per unit mass).
        """
        w = TWO_PI * self.stop_frequency_hz
        return (bool(np.any(self.head_loss_per_m)), bool(np.any(np.isfinite(self.stop_travel_m))),
                -np.asarray(self.stop_travel_m, dtype=float), w * w,
                2.0 * self.stop_damping_ratio * w)


def integrate_nonlinear(system: StateSpace, nonlinear: NonlinearAbsorber, force: np.ndarray,
                        time_step_s: float, initial_state: np.ndarray, *,
                        substeps: int = 4) -> tuple[np.ndarray, np.ndarray]:
    """Response with nonlinear absorber elements, by an explicit exponential integrator.

    Parameters
    ----------
    system : StateSpace
        The linear part (the linear damping of a head-loss absorber set to 0).
    nonlinear : NonlinearAbsorber
        Head loss and end-stops.
    force : array, shape (records, samples)
        Force records [N]; linear between samples.
    time_step_s : float
        Sample step [s].
    initial_state : array, shape (records, 2n)
        States at the first sample.
    substeps : int
        Integration steps per sample.

    Returns
    -------
    states, rates : arrays, shape (records, samples, 2n)
        States and their time derivatives at every sample.

    Notes
    -----
    The state rate is A x + B F + E g(x), g the nonlinear absorber
    accelerations (:class:`NonlinearAbsorber`), entering through the inverse
    mass matrix since the absorber rows couple r_j'' to x'':
    E = [0; M^-1 [0; I]]. Each step h is the exponential time-differencing
    scheme of second order (ETD2RK): the linear part is propagated exactly
    (:func:`first_order_hold` with inputs (F, g)), g is held at g(x_k) for a
    predictor x*, then taken linear from g(x_k) to g(x*). With g = 0 it is
    the exact integrator of :func:`integrate_linear`. The step is checked by
    the caller by halving it (:func:`tmd.simulation.step_check`).

    References
    ----------
    Cox, S. M., Matthews, P. C. (2002). Exponential time differencing for
    stiff systems. J. Comput. Phys. 176(2), 430-455.
    """
    n = system.n_absorbers + 1
    m_inv = np.linalg.inv(system.mass)
    e = np.zeros((system.size, n - 1))
    e[n:, :] = m_inv[:, 1:]
    h = time_step_s / substeps
    phi, g0, g1 = first_order_hold(system.a, np.column_stack([system.b, e]), h)
    phi_t, b0, b1, e0, e1 = phi.T, g0[:, 0], g1[:, 0], g0[:, 1:].T, g1[:, 1:].T

    def accel(x):
        return nonlinear.acceleration(x[..., 1:n], x[..., n + 1:])

    states = np.empty(force.shape + (system.size,))
    states[:, 0] = initial_state
    x = initial_state.copy()
    g = accel(x)
    e01 = e0 + e1
    # The force at every sub-step, linear between samples, and its drive.
    fraction = np.arange(substeps + 1) / substeps
    f = force[:, :-1, None] + np.diff(force, axis=-1)[:, :, None] * fraction
    drive = f[..., :-1, None] * b0 + f[..., 1:, None] * b1
    for i in range(force.shape[1] - 1):
        for s in range(substeps):
            linear = x @ phi_t + drive[:, i, s]
            x = linear + g @ e0 + accel(linear + g @ e01) @ e1
            g = accel(x)
        states[:, i + 1] = x
    rates = (states @ system.a.T + force[..., None] * system.b
             + accel(states) @ e.T)
    return states, rates
