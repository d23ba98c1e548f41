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

from dataclasses import dataclass

import numpy as np

from tmd.dampers.absorber import Absorbers
from tmd.grid import NODES_PER_POLE, pole_grid, sharp_breakpoints
from tmd.spectra import ForceSpectrum

TWO_PI = 2.0 * np.pi
# Below this the top-decade share of a response moment is not worth a warning.
TOP_DECADE_WARNING = 0.01


class NoFiniteResponse(ValueError):
    """The requested response is unbounded (an undamped bare structure)."""


@dataclass(frozen=True)
class Moments:
    """Spectral moments of one response.

    m0 [unit^2], m2 [unit^2 Hz^2] and m1 [unit^2 Hz], m_k = integral of
    f^k S(f) df. m1 feeds Vanmarcke's bandwidth parameter
    q = sqrt(1 - m1^2 / (m0 m2)) (:mod:`tmd.peak`); it is optional so that a
    caller that needs only sigma and the up-crossing rate may leave it out.
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

    Attributes
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
        of the load's frequency range (zero for an unbounded range).
    """

    displacement: Moments
    acceleration: Moments
    stroke: Moments
    force: Moments
    acceleration_top_decade: tuple[np.ndarray, np.ndarray]


def structure_arrays(frequency_hz, modal_mass_kg, damping_ratio):
    """Modal stiffness [N/m], dashpot [N s/m] and mass [kg] as arrays."""
    fs, mass, zeta = (np.asarray(v, dtype=float) for v in
                      (frequency_hz, modal_mass_kg, damping_ratio))
    omega = TWO_PI * fs
    return mass * omega**2, 2.0 * zeta * mass * omega, mass


def closed_loop_poles(frequency_hz, modal_mass_kg, damping_ratio, absorbers: Absorbers):
    """Eigenvalues of the state matrix of structure + absorbers [rad/s].

    Returns
    -------
    array, shape batch + (2 (N + 1),), complex
    """
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
    """Centre frequencies and half-widths [Hz] of the N + 1 resonant poles.

    Takes, per design, the N + 1 eigenvalues with the largest imaginary part
    (one of each conjugate pair; an overdamped pair contributes a pole at 0 Hz).
    """
    n = poles.shape[-1] // 2
    order = np.argsort(poles.imag, axis=-1)[..., n:]
    top = np.take_along_axis(poles, order, axis=-1)
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
                      spectrum: ForceSpectrum, *, nodes_per_pole: int = NODES_PER_POLE
                      ) -> SpectralResponse:
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

    Returns
    -------
    SpectralResponse

    Raises
    ------
    NoFiniteResponse
        For an undamped structure with no absorber.
    """
    zeta = np.asarray(damping_ratio, dtype=float)
    if absorbers.count == 0 and np.any(zeta <= 0):
        raise NoFiniteResponse(
            "the bare structure with zero damping has no finite response to a random load"
        )
    poles = closed_loop_poles(frequency_hz, modal_mass_kg, damping_ratio, absorbers)
    centre, width = resonances(poles)
    grid, weight = pole_grid(centre, width, spectrum.f_min_hz, spectrum.f_max_hz,
                             breakpoints_hz=load_breakpoints(spectrum),
                             nodes_per_pole=nodes_per_pole)
    batch = grid.shape[:-1]
    h = transfer_functions(grid, *(np.broadcast_to(v, batch) for v in
                                   (frequency_hz, modal_mass_kg, damping_ratio)),
                           _broadcast_absorbers(absorbers, batch))
    load = weight * spectrum(grid)
    load1 = load * grid
    load2 = load1 * grid

    def moments(transfer, axis_extra=False):
        power = np.abs(transfer) ** 2
        if axis_extra:
            return Moments(*(np.sum(power * w[..., None], axis=-2) for w in (load, load2, load1)))
        return Moments(*(np.sum(power * w, axis=-1) for w in (load, load2, load1)))

    acc = moments(h["acceleration"])
    return SpectralResponse(
        displacement=moments(h["displacement"]),
        acceleration=acc,
        stroke=moments(h["stroke"], axis_extra=True),
        force=moments(h["force"]),
        acceleration_top_decade=_top_decade(grid, load, h["acceleration"], acc,
                                            spectrum.f_max_hz),
    )


def load_breakpoints(spectrum: ForceSpectrum) -> np.ndarray:
    """The spectrum's breakpoints where it bends sharply: panel edges of the grid [Hz].

    Parameters
    ----------
    spectrum : ForceSpectrum
        One-sided modal force PSD [N^2/Hz] with its ``breakpoints_hz``.

    Returns
    -------
    array
        See :func:`tmd.grid.sharp_breakpoints`; empty for a smooth spectrum.
    """
    points = np.asarray(getattr(spectrum, "breakpoints_hz", ()), float)
    if points.size < 3:
        return np.empty(0)
    return sharp_breakpoints(points, spectrum(points))


def _broadcast_absorbers(absorbers: Absorbers, batch) -> Absorbers:
    shape = batch + (absorbers.count,)
    return Absorbers(*(np.broadcast_to(v, shape) for v in
                       (absorbers.mass_kg, absorbers.frequency_hz, absorbers.damping_ratio,
                        absorbers.coupling)))


def _top_decade(grid, load, transfer, total: Moments, f_max):
    if not np.isfinite(f_max):
        zero = np.zeros_like(total.m0)
        return zero, zero
    top = grid >= 0.1 * f_max
    power = np.abs(transfer) ** 2 * load * top
    return np.sum(power, axis=-1) / total.m0, np.sum(power * grid**2, axis=-1) / total.m2
