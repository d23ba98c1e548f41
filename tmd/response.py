"""Random response of a modal oscillator with linear absorbers, by spectral integration.

The structure's dynamic stiffness with any number of absorbers attached
(see :mod:`tmd.dampers.absorber`) is

    Z(f) = k_s - omega^2 M* + i omega c_s - sum_j omega^2 m_j T_j(omega),

with omega = 2 pi f. Per unit modal force the responses are

* displacement x = 1 / Z (at the damper level, mode shape = 1),
* acceleration a = -omega^2 / Z,
* absorber coordinate r_j = beta_j omega^2 / D_j / Z (a TMD's stroke),
* force the absorbers put on the structure, omega^2 sum_j m_j T_j / Z.

Spectral moments m_n = integral of f^n |H(f)|^2 S_F(f) df over the load's
support, with S_F one-sided per Hz, give sigma = sqrt(m0) and the mean
up-crossing rate nu = sqrt(m2 / m0) [Hz]. The integral runs on a grid
clustered at the closed-loop poles (:mod:`tmd.grid`), built per design, so a
batch of designs is one vectorised call.
"""

from __future__ import annotations

import cmath
import math
from dataclasses import dataclass

import numpy as np

from tmd.dampers.absorber import Absorbers
from tmd.grid import NODES_PER_POLE, pole_grid, sharp_breakpoints
from tmd.spectra import ForceSpectrum

TWO_PI = 2.0 * np.pi
# Below this the top-decade share of a response moment is not worth a warning.
TOP_DECADE_WARNING = 0.01
# Designs per chunk of the kernel: temporaries of CHUNK_DESIGNS x nodes stay in cache.
CHUNK_DESIGNS = 128
# Below this many designs the quartic's roots come from a 4 x 4 eigenvalue
# problem (fixed cost ~13 us), above it from the radicals (~0.6 us per design).
SMALL_CHUNK = 32
RESPONSES = ("displacement", "acceleration", "stroke", "force")


class NoFiniteResponse(ValueError):
    """The requested response is unbounded (an undamped bare structure)."""


@dataclass(frozen=True)
class Moments:
    """Spectral moments of one response.

    m0 [unit^2], m2 [unit^2 Hz^2] and m1 [unit^2 Hz], m_k = integral of
    f^k S(f) df. m1 feeds Vanmarcke's bandwidth parameter
    q = sqrt(1 - m1^2 / (m0 m2)) (:mod:`tmd.peak`); it is optional so that a
    caller that needs only sigma and the up-crossing rate may leave it out.

    Parameters
    ----------
    m0 : numpy.ndarray
        Variance, integral of S(f) df [unit^2].
    m2 : numpy.ndarray
        Second moment, integral of f^2 S(f) df [unit^2 Hz^2].
    m1 : numpy.ndarray, optional
        First moment, integral of f S(f) df [unit^2 Hz].
    """

    m0: np.ndarray
    m2: np.ndarray
    m1: np.ndarray | None = None

    @property
    def sigma(self) -> np.ndarray:
        """Standard deviation sqrt(m0) [unit]."""
        return np.sqrt(self.m0)

    @property
    def upcrossing_hz(self) -> np.ndarray:
        """Mean zero up-crossing rate nu = sqrt(m2 / m0) [Hz]."""
        return np.sqrt(self.m2 / self.m0)

    @property
    def bandwidth(self) -> np.ndarray:
        """Vanmarcke's bandwidth parameter q = sqrt(1 - m1^2 / (m0 m2)) [-]."""
        if self.m1 is None:
            raise ValueError("these moments were computed without m1")
        return np.sqrt(np.clip(1.0 - self.m1**2 / (self.m0 * self.m2), 0.0, 1.0))


@dataclass(frozen=True)
class SpectralResponse:
    """Moments of every response for a batch of designs.

    A response the caller did not ask for (``responses`` of
    :func:`spectral_response`) is None.

    Parameters
    ----------
    displacement : Moments
        Structure displacement at the damper level [m].
    acceleration : Moments
        Structure acceleration at the damper level [m/s^2].
    stroke : Moments
        Absorber coordinate relative to the structure, shape (..., N) [m].
    force : Moments
        Total force the absorbers put on the structure [N].
    acceleration_top_decade : tuple of arrays
        Shares of the acceleration's m0 and m2 that come from the top decade
        of the load's frequency range (zero for an unbounded range) [-].
    """

    displacement: Moments | None
    acceleration: Moments | None
    stroke: Moments | None
    force: Moments | None
    acceleration_top_decade: tuple[np.ndarray, np.ndarray] | None


def structure_arrays(frequency_hz, modal_mass_kg, damping_ratio):
    """Return the modal stiffness [N/m], dashpot [N s/m] and mass [kg] as arrays.

    Parameters
    ----------
    frequency_hz : float or array
        Natural frequency f_s of the mode [Hz].
    modal_mass_kg : float or array
        Modal mass M* [kg], mode shape = 1 at the damper.
    damping_ratio : float or array
        Damping ratio zeta_s of the mode [-].

    Returns
    -------
    stiffness : numpy.ndarray
        k_s = M* (2 pi f_s)^2 [N/m].
    damping : numpy.ndarray
        c_s = 2 zeta_s M* (2 pi f_s) [N s/m].
    mass : numpy.ndarray
        M* [kg].
    """
    fs, mass, zeta = (np.asarray(v, dtype=float) for v in
                      (frequency_hz, modal_mass_kg, damping_ratio))
    omega = TWO_PI * fs
    return mass * omega**2, 2.0 * zeta * mass * omega, mass


def closed_loop_poles(frequency_hz, modal_mass_kg, damping_ratio, absorbers: Absorbers):
    """Eigenvalues of the state matrix of structure + absorbers [rad/s].

    Parameters
    ----------
    frequency_hz : float or array
        Structure frequency f_s [Hz].
    modal_mass_kg : float or array
        Modal mass M* [kg].
    damping_ratio : float or array
        Structural damping ratio zeta_s [-].
    absorbers : Absorbers
        The absorbers of each design.

    Returns
    -------
    array, shape batch + (2 (N + 1),), complex
        The poles [rad/s]; for no absorber and for one absorber in closed
        form (:func:`_one_absorber_roots`), otherwise by
        ``numpy.linalg.eigvals`` of the state matrix.
    """
    fs, mass, zeta = (np.asarray(v, dtype=float) for v in
                      (frequency_hz, modal_mass_kg, damping_ratio))
    batch = np.broadcast_shapes(fs.shape, mass.shape, zeta.shape, absorbers.batch_shape)
    if absorbers.count > 1:
        return _state_matrix_poles(frequency_hz, modal_mass_kg, damping_ratio, absorbers)
    omega = TWO_PI * np.broadcast_to(fs, batch)[..., None]
    if absorbers.count == 0:
        root = np.sqrt(np.broadcast_to(zeta, batch).astype(complex) ** 2 - 1.0)[..., None]
        z = np.broadcast_to(zeta, batch)[..., None]
        return omega * np.concatenate([-z - root, -z + root], axis=-1)
    flat = [np.broadcast_to(v, batch + (1,)) for v in
            (np.asarray(fs)[..., None], np.asarray(mass)[..., None],
             np.asarray(zeta)[..., None], absorbers.mass_kg, absorbers.frequency_hz,
             absorbers.damping_ratio, absorbers.coupling)]
    return omega * _one_absorber_roots(*flat)


def _one_absorber_roots(structure_hz, modal_mass_kg, damping_ratio, mass_kg, frequency_hz,
                        absorber_damping_ratio, coupling):
    """Poles / omega_s of structure + one absorber, arrays of shape (..., 1) -> (..., 4).

    Notes
    -----
    With lambda = omega_s x, mu = m_a / M*, rho = omega_a / omega_s, the
    determinant of lambda^2 M + lambda C + K (see :mod:`tmd.dampers.absorber`)
    divided by M* omega_s^4 is

        ((1 + mu) x^2 + 2 zeta_s x + 1)(x^2 + 2 zeta_a rho x + rho^2)
        - mu beta^2 x^4,

    a quartic with O(1) coefficients, solved by Ferrari's method and polished
    by two Newton steps (:func:`_quartic_roots`).
    """
    mu = mass_kg / modal_mass_kg
    rho = frequency_hz / structure_hz
    total = 1.0 + mu
    lead = total - mu * coupling**2
    b1 = 2.0 * absorber_damping_ratio * rho
    b0 = rho * rho
    zs2 = 2.0 * damping_ratio
    return _quartic_roots((total * b1 + zs2) / lead, (total * b0 + zs2 * b1 + 1.0) / lead,
                          (zs2 * b0 + b1) / lead, b0 / lead)


def _quartic_roots(a3, a2, a1, a0):
    """Roots of x^4 + a3 x^3 + a2 x^2 + a1 x + a0, real arrays (..., 1) -> complex (..., 4).

    Notes
    -----
    Ferrari's method: with x = y - a3 / 4 the depressed quartic
    y^4 + p y^2 + q y + r factors as
    (y^2 - s y + p/2 + m + q/(2s)) (y^2 + s y + p/2 + m - q/(2s)), s^2 = 2 m,
    where m is a root of the resolvent cubic m^3 + p m^2 + (p^2/4 - r) m - q^2/8,
    taken by Cardano's formula as the root of largest modulus. Two Newton
    steps on the original quartic then remove the rounding of the radicals.
    Where the radicals fail (a triple root of the resolvent: not a damped
    structure) the roots are those of the companion matrix.

    References
    ----------
    Abramowitz, M., Stegun, I. A. (1964). Handbook of Mathematical Functions,
    3.8.2 (cubic) and 3.8.3 (quartic).
    """
    if a3.size <= SMALL_CHUNK:
        return _companion_roots(a3, a2, a1, a0)
    with np.errstate(all="ignore"):
        shift = 0.25 * a3
        p = a2 - 6.0 * shift**2
        q = a1 - 2.0 * a2 * shift + 8.0 * shift**3
        r = a0 - a1 * shift + a2 * shift**2 - 3.0 * shift**4
        # Resolvent cubic, depressed by m = z - p/3: z^3 + P z + Q = 0.
        b = 0.25 * p * p - r
        big_p = b - p * p / 3.0
        big_q = p * (2.0 * p * p - 9.0 * b) / 27.0 - 0.125 * q * q
        root = np.sqrt((0.25 * big_q * big_q + big_p**3 / 27.0).astype(complex))
        # The sign that adds |Q/2| and the root (no cancellation).
        root *= np.copysign(1.0, -(big_q * root.real))
        u = (root - 0.5 * big_q) ** (1.0 / 3.0) * _CUBE_ROOTS_OF_UNITY
        m = (u - big_p / (3.0 * u) - p / 3.0).reshape(-1, 3)
        m = m[np.arange(m.shape[0]), np.argmax(np.abs(m), axis=-1)].reshape(shift.shape)
        s = np.sqrt(2.0 * m)
        tilt = 2.0 * q / s
        d1 = np.sqrt(-2.0 * (p + m) - tilt)
        d2 = np.sqrt(-2.0 * (p + m) + tilt)
        x = np.concatenate([s + d1, s - d1, d2 - s, -s - d2], axis=-1) * 0.5 - shift
        for _ in range(2):
            value = (((x + a3) * x + a2) * x + a1) * x + a0
            slope = ((4.0 * x + 3.0 * a3) * x + 2.0 * a2) * x + a1
            x -= value * slope.conjugate() / (slope.real**2 + slope.imag**2 + 1e-300)
    bad = ~np.isfinite(x).all(axis=-1)
    if bad.any():
        x[bad] = _companion_roots(*(np.broadcast_to(v, shift.shape)[bad] for v in
                                    (a3, a2, a1, a0)))
    return x


def _companion_roots(a3, a2, a1, a0):
    """Return the same roots as eigenvalues of the companion matrix (``numpy.linalg.eigvals``).

    Cheaper than the radicals below ``SMALL_CHUNK`` designs, where the cost
    is numpy's per-call overhead rather than arithmetic.
    """
    companion = np.zeros(a3.shape[:-1] + (4, 4))
    companion[..., 0, :] = np.concatenate([-a3, -a2, -a1, -a0], axis=-1)
    companion[..., 1:, :3] = _EYE3
    return np.linalg.eigvals(companion)


_EYE3 = np.eye(3)


_CUBE_ROOTS_OF_UNITY = np.exp(2j * np.pi * np.arange(3) / 3)
_CUBE_ROOTS_OF_UNITY_LIST = [complex(w) for w in _CUBE_ROOTS_OF_UNITY]


def _state_matrix_poles(frequency_hz, modal_mass_kg, damping_ratio, absorbers: Absorbers):
    """Poles [rad/s] as eigenvalues of the 2 (N + 1) state matrix (any N)."""
    k, c, m = structure_arrays(frequency_hz, modal_mass_kg, damping_ratio)
    batch = np.broadcast_shapes(k.shape, absorbers.batch_shape)
    n = absorbers.count + 1
    ma = np.broadcast_to(absorbers.mass_kg, batch + (n - 1,))
    beta = np.broadcast_to(absorbers.coupling, batch + (n - 1,))
    wa = TWO_PI * np.broadcast_to(absorbers.frequency_hz, batch + (n - 1,))
    za = np.broadcast_to(absorbers.damping_ratio, batch + (n - 1,))
    # Absorber rows divided by m_j so that a zero-mass candidate stays regular.
    mass = np.zeros(batch + (n, n))
    mass[..., 0, 0] = np.broadcast_to(m, batch) + ma.sum(axis=-1)
    mass[..., 0, 1:] = ma * beta
    mass[..., 1:, 0] = beta
    idx = np.arange(1, n)
    mass[..., idx, idx] = 1.0
    stiff = np.zeros_like(mass)
    damp = np.zeros_like(mass)
    stiff[..., 0, 0] = np.broadcast_to(k, batch)
    damp[..., 0, 0] = np.broadcast_to(c, batch)
    stiff[..., idx, idx] = wa**2
    damp[..., idx, idx] = 2.0 * za * wa
    a = np.zeros(batch + (2 * n, 2 * n))
    a[..., :n, n:] = np.eye(n)
    a[..., n:, :n] = -np.linalg.solve(mass, stiff)
    a[..., n:, n:] = -np.linalg.solve(mass, damp)
    return np.linalg.eigvals(a)


def resonances(poles):
    """Return the centre frequencies and half-widths [Hz] of the N + 1 resonant poles.

    Takes, per design, the N + 1 eigenvalues with the largest imaginary part
    (one of each conjugate pair; an overdamped pair contributes a pole at 0 Hz).

    Parameters
    ----------
    poles : numpy.ndarray, shape batch + (2 (N + 1),)
        Eigenvalues of the state matrix of structure + N absorbers [rad/s]
        (:func:`closed_loop_poles`).

    Returns
    -------
    centre : numpy.ndarray, shape batch + (N + 1,)
        Im(p) / (2 pi) of each resonant pole [Hz], floored at 1e-9 of the
        largest scale.
    half_width : numpy.ndarray, shape batch + (N + 1,)
        |Re(p)| / (2 pi) [Hz], the half-power half-width, floored at 1e-12 of
        the largest scale.
    """
    n = poles.shape[-1] // 2
    order = np.argsort(poles.imag, axis=-1)[..., n:]
    rows = np.arange(order.size // n).reshape(order.shape[:-1] + (1,))
    top = poles.reshape(-1, poles.shape[-1])[rows, order] if poles.ndim > 1 else poles[order]
    centre = np.maximum(top.imag, 0.0) / TWO_PI
    width = np.abs(top.real) / TWO_PI
    scale = np.maximum(centre, width).max(axis=-1, keepdims=True)
    # Floors keep the maps finite for an overdamped or (nearly) undamped pole.
    return np.maximum(centre, 1e-9 * scale), np.maximum(width, 1e-12 * scale)


def transfer_functions(frequency_hz, frequency_s_hz, modal_mass_kg, damping_ratio,
                       absorbers: Absorbers):
    """Complex responses per unit modal force on a grid of frequencies.

    Parameters
    ----------
    frequency_hz : array, shape batch + (F,)
        Where to evaluate [Hz].
    frequency_s_hz, modal_mass_kg, damping_ratio : float or array (batch)
        The structure's mode.
    absorbers : Absorbers
        Batch shape broadcastable to ``batch``.

    Returns
    -------
    dict of arrays
        ``displacement`` [m/N] and ``acceleration`` [m/s^2/N], shape batch + (F,);
        ``stroke`` [m/N], shape batch + (F, N); ``force`` [N/N], shape batch + (F,).
    """
    f = np.asarray(frequency_hz, dtype=float)
    omega = TWO_PI * f
    k, c, m = (v[..., None] for v in structure_arrays(frequency_s_hz, modal_mass_kg,
                                                        damping_ratio))
    ma, beta, za = (v[..., None, :] for v in
                    (absorbers.mass_kg, absorbers.coupling, absorbers.damping_ratio))
    wa = TWO_PI * absorbers.frequency_hz[..., None, :]
    w2 = (omega**2)[..., None]
    ratio = w2 / (wa**2 - w2 + 2j * za * wa * omega[..., None])
    inertia = ma * (1.0 + beta**2 * ratio)
    z = k - omega**2 * m + 1j * omega * c - omega**2 * inertia.sum(axis=-1)
    hx = 1.0 / z
    return {
        "displacement": hx,
        "acceleration": -(omega**2) * hx,
        "stroke": beta * ratio * hx[..., None],
        "force": omega**2 * inertia.sum(axis=-1) * hx,
    }


def spectral_response(frequency_hz, modal_mass_kg, damping_ratio, absorbers: Absorbers,
                      spectrum: ForceSpectrum, *, nodes_per_pole: int = NODES_PER_POLE,
                      responses=RESPONSES) -> SpectralResponse:
    """Response moments of a batch of designs under one modal force spectrum.

    Parameters
    ----------
    frequency_hz : float or array
        Structure frequency f_s [Hz]; an array sweeps it with the batch.
    modal_mass_kg : float or array
        Modal mass M* [kg], mode shape = 1 at the damper level.
    damping_ratio : float or array
        Structural damping ratio zeta_s [-]; zero only with absorbers attached.
    absorbers : Absorbers
        The absorbers of each design (see :mod:`tmd.dampers.absorber`).
    spectrum : ForceSpectrum
        One-sided modal force PSD [N^2/Hz] with its support.
    nodes_per_pole : int
        Gauss-Legendre nodes per pole panel.
    responses : collection of str
        Which of ``RESPONSES`` ("displacement", "acceleration", "stroke",
        "force") to compute; the others are None in the result (and so is
        ``acceleration_top_decade`` without "acceleration"). Default: all.

    Returns
    -------
    SpectralResponse

    Raises
    ------
    NoFiniteResponse
        For an undamped structure with no absorber.

    Notes
    -----
    The designs are flattened and taken in chunks of ``CHUNK_DESIGNS``; per
    chunk the poles (:func:`closed_loop_poles`), the grid
    (:func:`tmd.grid.pole_grid`) and the squared moduli of the transfer
    functions are formed in real arithmetic (:func:`_power_kernel`), so the
    temporaries stay of size CHUNK_DESIGNS x nodes whatever the batch.
    """
    wanted = frozenset(responses)
    unknown = wanted - set(RESPONSES)
    if unknown:
        raise ValueError(f"responses must be among {RESPONSES}, got {sorted(unknown)}")
    fs, mass, zeta = (np.asarray(v, dtype=float) for v in
                      (frequency_hz, modal_mass_kg, damping_ratio))
    if absorbers.count == 0 and np.any(zeta <= 0):
        raise NoFiniteResponse(
            "the bare structure with zero damping has no finite response to a random load"
        )
    batch = np.broadcast_shapes(fs.shape, mass.shape, zeta.shape, absorbers.batch_shape)
    total = math.prod(batch)
    n = absorbers.count
    fs, mass, zeta = (_flat(v, batch, (total,)) for v in (fs, mass, zeta))
    absorber_arrays = [_flat(v, batch + (n,), (total, n)) for v in
                       (absorbers.mass_kg, absorbers.frequency_hz, absorbers.damping_ratio,
                        absorbers.coupling)]
    sums = {name: np.empty((total, 3, n) if name == "stroke" else (total, 3))
            for name in wanted}
    top_decade = None
    finite_top = math.isfinite(spectrum.f_max_hz)
    if "acceleration" in wanted:
        top_decade = np.zeros((total, 3))
    breakpoints = load_breakpoints(spectrum)
    for start in range(0, total, CHUNK_DESIGNS):
        part = slice(start, start + CHUNK_DESIGNS)
        chunk = [v[part] for v in absorber_arrays]
        centre, width = _chunk_resonances(fs[part], mass[part], zeta[part], *chunk)
        grid, weight = pole_grid(centre, width, spectrum.f_min_hz, spectrum.f_max_hz,
                                 breakpoints_hz=breakpoints, nodes_per_pole=nodes_per_pole)
        # Rows m0, m2, m1 (the order of Moments' fields).
        loads = np.empty((grid.shape[0], 3, grid.shape[1]))
        load0 = np.multiply(weight, spectrum(grid), out=loads[:, 0])
        np.multiply(load0, grid, out=loads[:, 2])
        np.multiply(loads[:, 2], grid, out=loads[:, 1])
        powers = _power_kernel(grid, fs[part, None], mass[part, None], zeta[part, None],
                               *chunk, wanted)
        for name, power in powers.items():
            if name == "stroke":
                for j, pj in enumerate(power):
                    sums[name][part, :, j] = np.vecdot(pj[:, None, :], loads)
            else:
                sums[name][part] = np.vecdot(power[:, None, :], loads)
        if top_decade is not None and finite_top:
            top = powers["acceleration"] * (grid >= 0.1 * spectrum.f_max_hz)
            top_decade[part] = np.vecdot(top[:, None, :], loads)

    def moments(name):
        if name not in wanted:
            return None
        shape = batch + ((n,) if name == "stroke" else ())
        # (total, 3[, n]) -> three arrays of the batch's shape, by one transposed view.
        return Moments(*sums[name].swapaxes(0, 1).reshape((3,) + shape))

    acc = moments("acceleration")
    shares = None
    if acc is not None:
        with np.errstate(invalid="ignore", divide="ignore"):
            shares = (top_decade[:, 0].reshape(batch) / acc.m0,
                      top_decade[:, 1].reshape(batch) / acc.m2)
    return SpectralResponse(
        displacement=moments("displacement"),
        acceleration=acc,
        stroke=moments("stroke"),
        force=moments("force"),
        acceleration_top_decade=shares,
    )


def load_breakpoints(spectrum: ForceSpectrum) -> np.ndarray:
    """Return the spectrum's breakpoints where it bends sharply: panel edges of the grid [Hz].

    Parameters
    ----------
    spectrum : ForceSpectrum
        One-sided modal force PSD [N^2/Hz] with its ``breakpoints_hz``.

    Returns
    -------
    array
        See :func:`tmd.grid.sharp_breakpoints`; empty for a smooth spectrum.
    """
    cached = _BREAKPOINTS.get(id(spectrum))
    if cached is not None and cached[0] is spectrum:
        return cached[1]
    points = np.asarray(getattr(spectrum, "breakpoints_hz", ()), float)
    sharp = np.empty(0) if points.size < 3 else sharp_breakpoints(points, spectrum(points))
    # Spectra are immutable: remember the answer (the entry holds the spectrum,
    # so its id cannot be reused while cached); a per-call fixed cost otherwise.
    if len(_BREAKPOINTS) >= 64:
        _BREAKPOINTS.clear()
    _BREAKPOINTS[id(spectrum)] = (spectrum, sharp)
    return sharp


_BREAKPOINTS: dict[int, tuple[object, np.ndarray]] = {}


def _flat(value, shape, flat_shape):
    """``value`` broadcast to ``shape`` and reshaped to ``flat_shape`` (a view when it can be)."""
    if value.shape == shape:
        return value.reshape(flat_shape)
    out = np.empty(shape)
    out[...] = value
    return out.reshape(flat_shape)


def _chunk_resonances(structure_hz, modal_mass_kg, damping_ratio, absorber_mass_kg, absorber_hz,
                      absorber_damping_ratio, coupling):
    """Centre frequencies and half-widths [Hz] of a flat chunk of designs, shape (C, N + 1).

    The bare mode in closed form (the slower pole of an overdamped pair),
    one absorber by :func:`_one_absorber_roots`, more by the state matrix.
    """
    n = absorber_mass_kg.shape[-1]
    if n == 0:
        fs, zeta = structure_hz[:, None], damping_ratio[:, None]
        centre = fs * np.sqrt(np.maximum(1.0 - zeta * zeta, 0.0))
        width = fs * (zeta - np.sqrt(np.maximum(zeta * zeta - 1.0, 0.0)))
        scale = np.maximum(centre, width)
        return np.maximum(centre, 1e-9 * scale), np.maximum(width, 1e-12 * scale)
    if n == 1 and structure_hz.size == 1:
        return _single_design_resonances(
            float(structure_hz[0]), float(modal_mass_kg[0]), float(damping_ratio[0]),
            float(absorber_mass_kg[0, 0]), float(absorber_hz[0, 0]),
            float(absorber_damping_ratio[0, 0]), float(coupling[0, 0]))
    if n == 1:
        poles = (TWO_PI * structure_hz[:, None]) * _one_absorber_roots(
            structure_hz[:, None], modal_mass_kg[:, None], damping_ratio[:, None],
            absorber_mass_kg, absorber_hz, absorber_damping_ratio, coupling)
    else:
        poles = _state_matrix_poles(structure_hz, modal_mass_kg, damping_ratio, Absorbers(
            absorber_mass_kg, absorber_hz, absorber_damping_ratio, coupling))
    return resonances(poles)


def _single_design_resonances(structure_hz, modal_mass_kg, damping_ratio, mass_kg,
                              frequency_hz, absorber_damping_ratio, coupling):
    """:func:`_chunk_resonances` of one design with one absorber, in scalar arithmetic.

    The same quartic as :func:`_one_absorber_roots`, solved by the same
    Ferrari formulas and Newton polish (:func:`_scalar_quartic_roots`) on
    Python floats: for a single design numpy's per-call overhead, not the
    arithmetic, is the cost (an optimiser's line search calls the engine one
    design at a time). Returns arrays (1, 2) like :func:`resonances`.
    """
    mu = mass_kg / modal_mass_kg
    rho = frequency_hz / structure_hz
    total = 1.0 + mu
    lead = total - mu * coupling * coupling
    b1 = 2.0 * absorber_damping_ratio * rho
    b0 = rho * rho
    zs2 = 2.0 * damping_ratio
    roots = _scalar_quartic_roots((total * b1 + zs2) / lead, (total * b0 + zs2 * b1 + 1.0) / lead,
                                  (zs2 * b0 + b1) / lead, b0 / lead)
    if roots is None:  # the radicals failed: the vectorised path and its fallback
        poles = (TWO_PI * structure_hz) * _one_absorber_roots(*(
            np.array([[v]]) for v in (structure_hz, modal_mass_kg, damping_ratio, mass_kg,
                                      frequency_hz, absorber_damping_ratio, coupling)))
        return resonances(poles)
    # The two of largest imaginary part, one of each conjugate pair (as resonances()).
    top = sorted(roots, key=lambda x: x.imag)[2:]
    scale_hz = structure_hz
    centre = [max(x.imag, 0.0) * scale_hz for x in top]
    width = [abs(x.real) * scale_hz for x in top]
    scale = max(*centre, *width)
    return (np.array([[max(v, 1e-9 * scale) for v in centre]]),
            np.array([[max(v, 1e-12 * scale) for v in width]]))


def _scalar_quartic_roots(a3, a2, a1, a0):
    """:func:`_quartic_roots` for one quartic on Python floats; None where the radicals fail."""
    shift = 0.25 * a3
    p = a2 - 6.0 * shift * shift
    q = a1 - 2.0 * a2 * shift + 8.0 * shift**3
    r = a0 - a1 * shift + a2 * shift * shift - 3.0 * shift**4
    b = 0.25 * p * p - r
    big_p = b - p * p / 3.0
    big_q = p * (2.0 * p * p - 9.0 * b) / 27.0 - 0.125 * q * q
    try:
        root = cmath.sqrt(0.25 * big_q * big_q + big_p**3 / 27.0)
        root *= math.copysign(1.0, -(big_q * root.real))
        base = (root - 0.5 * big_q) ** (1.0 / 3.0)
        m = max((u - big_p / (3.0 * u) - p / 3.0 for u in
                 (base * w for w in _CUBE_ROOTS_OF_UNITY_LIST)), key=abs)
        s = cmath.sqrt(2.0 * m)
        tilt = 2.0 * q / s
        d1 = cmath.sqrt(-2.0 * (p + m) - tilt)
        d2 = cmath.sqrt(-2.0 * (p + m) + tilt)
    except (ZeroDivisionError, OverflowError, ValueError):
        return None
    roots = []
    for x in (0.5 * (s + d1), 0.5 * (s - d1), 0.5 * (d2 - s), -0.5 * (s + d2)):
        x -= shift
        for _ in range(2):
            value = (((x + a3) * x + a2) * x + a1) * x + a0
            slope = ((4.0 * x + 3.0 * a3) * x + 2.0 * a2) * x + a1
            x -= value * slope.conjugate() / (slope.real**2 + slope.imag**2 + 1e-300)
        if not cmath.isfinite(x):
            return None
        roots.append(x)
    return roots


def _power_kernel(frequency_hz, structure_hz, modal_mass_kg, damping_ratio, absorber_mass_kg,
                  absorber_hz, absorber_damping_ratio, coupling, wanted):
    """|H|^2 per unit modal force of the wanted responses on a chunk's grid.

    Parameters
    ----------
    frequency_hz : array, shape (C, F)
        The grid [Hz].
    structure_hz, modal_mass_kg, damping_ratio : arrays, shape (C, 1)
        f_s [Hz], M* [kg], zeta_s [-].
    absorber_mass_kg, absorber_hz, absorber_damping_ratio, coupling : arrays, shape (C, N)
        m_j [kg], f_j [Hz], zeta_j [-], beta_j [-].
    wanted : set of str
        Names among ``RESPONSES``.

    Returns
    -------
    dict
        Name -> array (C, F) [response^2 / N^2]; "stroke" -> a list of N such arrays.
    """
    if absorber_mass_kg.shape[-1] <= 1:
        return _polynomial_kernel(frequency_hz, structure_hz, modal_mass_kg, damping_ratio,
                                  absorber_mass_kg, absorber_hz, absorber_damping_ratio,
                                  coupling, wanted)
    return _general_kernel(frequency_hz, structure_hz, modal_mass_kg, damping_ratio,
                           absorber_mass_kg, absorber_hz, absorber_damping_ratio, coupling,
                           wanted)


def _polynomial_kernel(frequency_hz, structure_hz, modal_mass_kg, damping_ratio,
                       absorber_mass_kg, absorber_hz, absorber_damping_ratio, coupling, wanted):
    """|H|^2 for the bare mode or one absorber as ratios of polynomials in u = omega^2.

    Notes
    -----
    With D = omega_a^2 - u + i c_a omega (c_a = 2 zeta_a omega_a) the product
    Z D = (k - u (M* + m_a) + i omega c) D - m_a beta^2 u^2 is a quartic in
    i omega with real coefficients, Z D = Q(u) + i omega R(u) with

        Q = (k - (M* + m_a) u)(omega_a^2 - u) - u (c c_a + m_a beta^2 u),
        R = c_a (k - (M* + m_a) u) + c (omega_a^2 - u),

    so that, with |ZD|^2 = Q^2 + u R^2 and |D|^2 = (omega_a^2 - u)^2 + c_a^2 u,
    |x|^2 = |D|^2 / |ZD|^2, |a|^2 = u^2 |x|^2, |r|^2 = beta^2 u^2 / |ZD|^2 and
    |force|^2 = m_a^2 u^2 |D + beta^2 u|^2 / |ZD|^2. The bare mode is the
    same with m_a = 0 and D = 1. Every step is one in-place operation on a
    (C, F) array: the fused kernel of the engine.
    """
    w_s = TWO_PI * structure_hz
    k = modal_mass_kg * w_s * w_s
    c = 2.0 * damping_ratio * modal_mass_kg * w_s
    u = frequency_hz * frequency_hz
    u *= TWO_PI**2
    if absorber_mass_kg.shape[-1] == 0:
        q = u * (-modal_mass_kg)
        q += k
        den = q * q
        q = np.multiply(u, c * c, out=q)
        den += q
        inv = np.reciprocal(den, out=den)
        numerator = None
        ma = b2 = w_a2 = c_a = None
    else:
        ma = absorber_mass_kg
        b2 = coupling * coupling
        w_a = TWO_PI * absorber_hz
        w_a2 = w_a * w_a
        c_a = 2.0 * absorber_damping_ratio * w_a
        total = modal_mass_kg + ma
        # Factored, not expanded, so that nothing cancels near a light resonance.
        structure = u * (-total)
        structure += k
        absorber = w_a2 - u
        q = structure * absorber
        coupled = u * (ma * b2)
        coupled += c * c_a
        coupled *= u
        q -= coupled
        den = np.multiply(q, q, out=q)
        r = np.multiply(structure, c_a, out=structure)
        coupled = np.multiply(absorber, c, out=coupled)
        r += coupled
        r *= r
        r *= u
        den += r
        inv = np.reciprocal(den, out=den)
        numerator = absorber * absorber
        numerator += (c_a * c_a) * u
    out = {}
    x2 = inv if numerator is None else numerator * inv
    if "displacement" in wanted:
        out["displacement"] = x2
    u2 = u * u
    if "acceleration" in wanted:
        out["acceleration"] = u2 * x2
    if "stroke" in wanted:
        out["stroke"] = [] if ma is None else [(b2 * u2) * inv]
    if "force" in wanted:
        if ma is None:
            out["force"] = np.zeros_like(u)
        else:
            t = u * b2
            t += absorber
            t *= t
            t += (c_a * c_a) * u
            t *= u2
            t *= (ma * ma) * inv
            out["force"] = t
    return out


def _general_kernel(frequency_hz, structure_hz, modal_mass_kg, damping_ratio, absorber_mass_kg,
                    absorber_hz, absorber_damping_ratio, coupling, wanted):
    """|H|^2 per unit modal force for any number of absorbers, in real arithmetic.

    Notes
    -----
    With D_j = (omega_j^2 - omega^2) + i 2 zeta_j omega_j omega = d_r + i d_i
    and g_j = m_j beta_j^2 omega^2 / |D_j|^2, the absorbers' inertia is
    sum m_j + sum g_j (d_r - i d_i) and

        Z = k - omega^2 (M* + sum m_j + sum g_j d_r) + i (omega c + omega^2 sum g_j d_i),

    |x|^2 = 1 / |Z|^2, |a|^2 = omega^4 / |Z|^2,
    |r_j|^2 = beta_j^2 omega^4 / (|D_j|^2 |Z|^2) and
    |force|^2 = omega^4 |inertia|^2 / |Z|^2: the same quantities as
    :func:`transfer_functions` without complex temporaries.
    """
    omega = TWO_PI * frequency_hz
    w2 = omega * omega
    w_s = TWO_PI * structure_hz
    stiffness = modal_mass_kg * w_s**2
    dashpot = 2.0 * damping_ratio * modal_mass_kg * w_s
    absorber_mass = absorber_mass_kg.sum(axis=-1, keepdims=True)
    z_re = stiffness - w2 * (modal_mass_kg + absorber_mass)
    z_im = omega * dashpot
    inertia_re = inertia_im = None
    if "force" in wanted:
        inertia_re = np.broadcast_to(absorber_mass, w2.shape).copy()
        inertia_im = np.zeros_like(w2)
    stroke_factors = []
    for j in range(absorber_mass_kg.shape[-1]):
        w_a = TWO_PI * absorber_hz[:, j:j + 1]
        beta2 = coupling[:, j:j + 1] ** 2
        d_re = w_a**2 - w2
        d_im = (2.0 * absorber_damping_ratio[:, j:j + 1] * w_a) * omega
        inv_dd = 1.0 / (d_re * d_re + d_im * d_im)
        g = (absorber_mass_kg[:, j:j + 1] * beta2) * (w2 * inv_dd)
        g_re, g_im = g * d_re, g * d_im
        z_re -= w2 * g_re
        z_im += w2 * g_im
        if inertia_re is not None:
            inertia_re += g_re
            inertia_im -= g_im
        if "stroke" in wanted:
            stroke_factors.append(beta2 * inv_dd)
    hx2 = 1.0 / (z_re * z_re + z_im * z_im)
    out = {}
    if "displacement" in wanted:
        out["displacement"] = hx2
    w4hx2 = (w2 * w2) * hx2
    if "acceleration" in wanted:
        out["acceleration"] = w4hx2
    if "stroke" in wanted:
        out["stroke"] = [factor * w4hx2 for factor in stroke_factors]
    if "force" in wanted:
        out["force"] = w4hx2 * (inertia_re * inertia_re + inertia_im * inertia_im)
    return out
