"""Independent state-space reference for the n-mode engine's tests.

The building's modes and the absorbers are written in physical coordinates
(modal coordinates q and each absorber mass's absolute displacement v_a along
its axis), not in the engine's eliminated form, and the covariance comes from
the Lyapunov equation (``scipy.linalg.solve_continuous_lyapunov``):

    for x' = A x + B w with E[w(t) w(s)^T] = W delta(t - s),
    A P + P A^T + B W B^T = 0.

White noise of intensity W has the two-sided PSD W / (2 pi) per rad/s, so the
one-sided PSD per Hz is G = 2 W (conventions: G = 4 pi S0).
"""

import numpy as np
import scipy.linalg as sl


def building_matrices(frequency_hz, generalised_mass, damping_ratio, damper_mass_kg,
                      damper_frequency_hz, damper_damping_ratio, participation):
    """Mass, damping and stiffness in (q, v), and the modal-force input matrix.

    Kinetic energy 1/2 q'^T M q' + 1/2 sum m_a v_a'^2; the damper spring and
    dashpot act on the stroke v_a - phi_a^T q.
    """
    w = 2 * np.pi * np.asarray(frequency_hz, float)
    m = np.asarray(generalised_mass, float)
    n, count = m.size, len(damper_mass_kg)
    size = n + count
    mass = np.diag(np.concatenate([m, damper_mass_kg]))
    stiff = np.zeros((size, size))
    damp = np.zeros((size, size))
    stiff[:n, :n] = np.diag(m * w**2)
    damp[:n, :n] = np.diag(2 * np.asarray(damping_ratio) * m * w)
    for a in range(count):
        wa = 2 * np.pi * damper_frequency_hz[a]
        ka = damper_mass_kg[a] * wa**2
        ca = 2 * damper_damping_ratio[a] * damper_mass_kg[a] * wa
        lever = np.zeros(size)
        lever[:n] = -np.asarray(participation[a], float)
        lever[n + a] = 1.0
        stiff += ka * np.outer(lever, lever)
        damp += ca * np.outer(lever, lever)
    force_in = np.zeros((size, n))
    force_in[:n, :n] = np.eye(n)
    return mass, damp, stiff, force_in


def state_space(mass, damp, stiff, force_in):
    """x = (u, u'): A and B for the modal forces."""
    size = mass.shape[0]
    inv = np.linalg.inv(mass)
    a = np.block([[np.zeros((size, size)), np.eye(size)], [-inv @ stiff, -inv @ damp]])
    b = np.vstack([np.zeros((size, force_in.shape[1])), inv @ force_in])
    return a, b


def white_covariance(a, b, one_sided_matrix):
    """State covariance under white modal forces of one-sided cross-PSD G [N^2/Hz] (real)."""
    intensity = 0.5 * np.asarray(one_sided_matrix, float)
    return sl.solve_continuous_lyapunov(a, -b @ intensity @ b.T)


def filtered_covariance(a, b, filter_a, filter_b, filter_c, intensity):
    """Covariance with the forces F = C_f s, s' = A_f s + B_f w appended as states.

    Returns (P, A_aug); the last rows of the state are the filter's s.
    """
    n, ns = a.shape[0], filter_a.shape[0]
    aug = np.zeros((n + ns, n + ns))
    aug[:n, :n] = a
    aug[:n, n:] = b @ filter_c
    aug[n:, n:] = filter_a
    bw = np.vstack([np.zeros((n, filter_b.shape[1])), filter_b])
    return sl.solve_continuous_lyapunov(aug, -bw @ intensity @ bw.T), aug


def filter_cross_spectrum(frequency_hz, filter_a, filter_b, filter_c, intensity):
    """One-sided cross-PSD matrix 2 H W H^H of the filtered forces, H = C (i w - A)^-1 B."""
    f = np.asarray(frequency_hz, float)
    eye = np.eye(filter_a.shape[0])
    iw = (2j * np.pi * f)[..., None, None]
    h = filter_c @ np.linalg.solve(iw * eye - filter_a, np.broadcast_to(
        filter_b, f.shape + filter_b.shape))
    return 2.0 * h @ intensity @ np.conj(np.swapaxes(h, -1, -2))
