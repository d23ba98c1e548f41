"""Independent reference computations for the engine's tests.

These solve the same problems by other means: the covariance of a linear
state-space system from the Lyapunov equation (``scipy.linalg``), and
adaptive quadrature (``scipy.integrate.quad``) with the resonances as
breakpoints. Conventions: a white force of one-sided PSD G per Hz has the
two-sided PSD S0 = G / (4 pi) per rad/s, and the covariance P of
x' = A x + B w solves A P + P A^T + 2 pi S0 B B^T = 0.
"""

import numpy as np
import scipy.linalg as sl


def two_dof_state(frequency_hz, modal_mass_kg, damping_ratio, mass_ratio, frequency_ratio,
                  damper_damping_ratio):
    """State matrix of structure + one TMD in (x, r, x', r'), r the stroke, and B for F."""
    ws = 2 * np.pi * frequency_hz
    wd = frequency_ratio * ws
    md = mass_ratio * modal_mass_kg
    # Physical equations: M x'' + md (x'' + r'') + c x' + k x = F;
    # md (x'' + r'') + cd r' + kd r = 0.
    mass = np.array([[modal_mass_kg + md, md], [md, md]])
    stiff = np.diag([modal_mass_kg * ws**2, md * wd**2])
    damp = np.diag([2 * damping_ratio * modal_mass_kg * ws, 2 * damper_damping_ratio * md * wd])
    inv = np.linalg.inv(mass)
    a = np.block([[np.zeros((2, 2)), np.eye(2)], [-inv @ stiff, -inv @ damp]])
    b = np.concatenate([[0.0, 0.0], inv[:, 0]])[:, None]
    return a, b


def white_force_covariance(a, b, level):
    """Covariance of the state under white force of one-sided PSD ``level`` [N^2/Hz]."""
    s0 = level / (4 * np.pi)
    return sl.solve_continuous_lyapunov(a, -2 * np.pi * s0 * b @ b.T)


def filtered_force_covariance(a, b, level, corner_hz):
    """Covariance with the force F' = -2 pi f_c F + w appended as a state.

    Its one-sided PSD is level / (1 + (f / f_c)^2): w has two-sided PSD
    level (2 pi f_c)^2 / (4 pi) per rad/s. Returns (P, A_aug).
    """
    n = a.shape[0]
    alpha = 2 * np.pi * corner_hz
    aug = np.zeros((n + 1, n + 1))
    aug[:n, :n] = a
    aug[:n, n:] = b
    aug[n, n] = -alpha
    bw = np.zeros((n + 1, 1))
    bw[n, 0] = 1.0
    sw = level * alpha**2 / (4 * np.pi)
    return sl.solve_continuous_lyapunov(aug, -2 * np.pi * sw * bw @ bw.T), aug
