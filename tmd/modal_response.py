"""Random response of a building's n modes with absorbers, by spectral integration.

The structure is n modes with generalised coordinates q_i and diagonal modal
mass, damping and stiffness matrices. Each absorber axis a (a TMD acting along
one plan direction; a bidirectional damper is two axes with the same mass) has
a total mass m_a, an internal coordinate r_a with its own frequency omega_a
and damping ratio zeta_a, a coupling beta_a (1 for a TMD, see
:mod:`tmd.dampers.absorber`) and a participation vector phi_a: the mode-shape
values of every mode at the absorber's point, along its direction. The
equations of motion are

    M q'' + C q' + K q + sum_a m_a phi_a (phi_a^T q'' + beta_a r_a'') = F,
    beta_a phi_a^T q'' + r_a'' + 2 zeta_a omega_a r_a' + omega_a^2 r_a = 0.

In the frequency domain (omega = 2 pi f, time factor exp(i omega t)) the
absorber coordinates are r_a = beta_a omega^2 / D_a phi_a^T q, with
D_a = omega_a^2 - omega^2 + 2 i zeta_a omega_a omega, and the modes see the
n x n dynamic stiffness

    Z(omega) = K - omega^2 M + i omega C - omega^2 sum_a m_a T_a phi_a phi_a^T,
    T_a = 1 + beta_a^2 omega^2 / D_a,

so q = Z^-1 F (the "equivalent reduced n x n system"). With one mode and
phi_a = 1 this is the dynamic stiffness of :mod:`tmd.response`.

Outputs are rows over the extended coordinates u = (q, r, p) with p_a the
absorber's internal spring-and-dashpot force m_a (omega_a^2 + 2 i zeta_a
omega_a omega) r_a, times (i omega)^d for a derivative of order d (0
displacement, 1 velocity, 2 acceleration). An output y has the transfer row
h over the modal forces, and for a group of outputs the spectral moments

    m_k = integral of f^k h S_F(f) h^H df     (a matrix over the outputs)

with S_F the one-sided cross-spectral matrix (:mod:`tmd.cross_spectra`), so
sigma^2 = integral of h^T S_F conj(h) df on the diagonal, the covariance of
outputs i and j is Re(m0_ij), and E[y_i y_j'] = 2 pi Im(m1_ij). The integral
runs on a grid clustered at all closed-loop poles (:mod:`tmd.grid`), built
per design, so a batch of designs is one vectorised call.

References
----------
Lin, Y. K. (1967). Probabilistic Theory of Structural Dynamics. McGraw-Hill,
ch. 5 (response of multi-degree-of-freedom systems to correlated random
excitations; output spectral matrix H S H^*).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from tmd.cross_spectra import CrossSpectrum, UncorrelatedForces
from tmd.dampers.absorber import Absorbers
from tmd.grid import NODES_PER_POLE, pole_grid, sharp_breakpoints
from tmd.response import NoFiniteResponse
from tmd.response import load_breakpoints as one_mode_breakpoints

TWO_PI = 2.0 * np.pi
_BREAKPOINTS: dict[int, tuple[object, np.ndarray]] = {}


@dataclass(frozen=True)
class OutputRows:
    """Which outputs to compute, as rows over the extended coordinates.

    Parameters
    ----------
    rows : array, shape (o, n + 2 N)
        Coefficients on (q_1..q_n, r_1..r_N, p_1..p_N): modal coordinates
        [m or rad per unit coordinate], absorber coordinates [-], absorber
        internal forces [-].
    order : array of int, shape (o,)
        Time derivative of each output: 0 displacement, 1 velocity,
        2 acceleration.
    names : tuple of str
        One name per output (for messages and results).
    """

    rows: np.ndarray
    order: np.ndarray
    names: tuple[str, ...] = ()

    def __post_init__(self):
        rows = np.atleast_2d(np.asarray(self.rows, dtype=float))
        order = np.asarray(self.order, dtype=int).reshape(-1)
        if order.size != rows.shape[0]:
            raise ValueError(f"{rows.shape[0]} output rows but {order.size} derivative orders")
        if np.any((order < 0) | (order > 2)):
            raise ValueError("derivative orders must be 0, 1 or 2")
        names = tuple(self.names) or tuple(f"output {i + 1}" for i in range(order.size))
        if len(names) != order.size:
            raise ValueError(f"{order.size} outputs but {len(names)} names")
        object.__setattr__(self, "rows", rows)
        object.__setattr__(self, "order", order)
        object.__setattr__(self, "names", names)

    @property
    def count(self) -> int:
        """Number of outputs o."""
        return self.order.size

    @classmethod
    def stack(cls, *groups: OutputRows) -> OutputRows:
        """Several groups of outputs as one (same extended coordinates).

        Parameters
        ----------
        *groups : OutputRows
            Groups with the same number of columns.

        Returns
        -------
        OutputRows
        """
        return cls(np.concatenate([g.rows for g in groups], axis=0),
                   np.concatenate([g.order for g in groups]),
                   tuple(name for g in groups for name in g.names))


@dataclass(frozen=True)
class OutputMoments:
    """Spectral moment matrices of a group of outputs, for a batch of designs.

    Parameters
    ----------
    m0, m1, m2 : arrays, shape batch + (o, o), complex
        integral of f^k h S_F h^H df [unit_i unit_j Hz^k]; Hermitian.
    top_decade_m0, top_decade_m2 : arrays, shape batch + (o,)
        Shares of each output's m0 and m2 from the top decade of the load's
        frequency range (zero for an unbounded range) [-].
    names : tuple of str
        The outputs' names.
    """

    m0: np.ndarray
    m1: np.ndarray
    m2: np.ndarray
    top_decade_m0: np.ndarray
    top_decade_m2: np.ndarray
    names: tuple[str, ...]

    @property
    def variance(self) -> np.ndarray:
        """Variances sigma^2 = Re(m0_ii), shape batch + (o,) [unit^2]."""
        return np.real(np.diagonal(self.m0, axis1=-2, axis2=-1))

    @property
    def sigma(self) -> np.ndarray:
        """Standard deviations, shape batch + (o,) [unit]."""
        return np.sqrt(self.variance)

    @property
    def second_moment(self) -> np.ndarray:
        """m2_ii, shape batch + (o,) [unit^2 Hz^2]."""
        return np.real(np.diagonal(self.m2, axis1=-2, axis2=-1))

    @property
    def upcrossing_hz(self) -> np.ndarray:
        """Mean zero up-crossing rates nu = sqrt(m2 / m0), shape batch + (o,) [Hz]."""
        with np.errstate(invalid="ignore", divide="ignore"):
            return np.sqrt(self.second_moment / self.variance)

    def covariance(self) -> np.ndarray:
        """Return the covariance matrix E[y_i y_j] = Re(m0_ij) [unit_i unit_j].

        Returns
        -------
        numpy.ndarray, shape batch + (o, o)
            Real, symmetric; its diagonal is :attr:`variance`.
        """
        return np.real(self.m0)


def closed_loop_poles(frequency_hz, generalised_mass, damping_ratio, absorbers: Absorbers,
                      participation):
    """Eigenvalues of the state matrix of the n modes with their absorbers [rad/s].

    Parameters
    ----------
    frequency_hz : array, shape batch + (n,)
        Modal frequencies [Hz].
    generalised_mass : array, shape batch + (n,)
        Generalised masses [kg, or kg m^2 for torsion].
    damping_ratio : array, shape batch + (n,)
        Modal damping ratios [-].
    absorbers : Absorbers
        Absorber axes, shape batch + (N,).
    participation : array, shape batch + (N, n)
        Mode-shape values phi_a,i at each absorber's point and direction [-].

    Returns
    -------
    array, shape batch + (2 (n + N),), complex
    """
    k, c, m = _structure(frequency_hz, generalised_mass, damping_ratio)
    phi = np.asarray(participation, dtype=float)
    n, count = k.shape[-1], absorbers.count
    batch = np.broadcast_shapes(k.shape[:-1], absorbers.batch_shape, phi.shape[:-2])
    size = n + count
    ma, beta, wa, za = (np.broadcast_to(v, batch + (count,)) for v in (
        absorbers.mass_kg, absorbers.coupling, TWO_PI * absorbers.frequency_hz,
        absorbers.damping_ratio))
    phi = np.broadcast_to(phi, batch + (count, n))
    # Absorber rows divided by m_a, so that a zero-mass axis stays regular.
    mass = np.zeros(batch + (size, size))
    mass[..., :n, :n] = np.einsum("...a,...ai,...aj->...ij", ma, phi, phi)
    idx, adx = np.arange(n), np.arange(n, size)
    mass[..., idx, idx] += np.broadcast_to(m, batch + (n,))
    mass[..., :n, n:] = np.swapaxes(phi * (ma * beta)[..., None], -1, -2)
    mass[..., n:, :n] = phi * beta[..., None]
    mass[..., adx, adx] = 1.0
    stiff = np.zeros_like(mass)
    damp = np.zeros_like(mass)
    stiff[..., idx, idx] = np.broadcast_to(k, batch + (n,))
    damp[..., idx, idx] = np.broadcast_to(c, batch + (n,))
    stiff[..., adx, adx] = wa**2
    damp[..., adx, adx] = 2.0 * za * wa
    a = np.zeros(batch + (2 * size, 2 * size))
    a[..., :size, size:] = np.eye(size)
    a[..., size:, :size] = -np.linalg.solve(mass, stiff)
    a[..., size:, size:] = -np.linalg.solve(mass, damp)
    return np.linalg.eigvals(a)


def _resonances(poles):
    """Centre frequencies and half-widths [Hz] of the resonant poles (one per pair)."""
    half = poles.shape[-1] // 2
    order = np.argsort(poles.imag, axis=-1)[..., half:]
    top = np.take_along_axis(poles, order, axis=-1)
    centre = np.maximum(top.imag, 0.0) / TWO_PI
    width = np.abs(top.real) / TWO_PI
    scale = np.maximum(centre, width).max(axis=-1, keepdims=True)
    # Floors keep the maps finite for an overdamped or (nearly) undamped pole.
    return np.maximum(centre, 1e-9 * scale), np.maximum(width, 1e-12 * scale)


def _structure(frequency_hz, generalised_mass, damping_ratio):
    fs, mass, zeta = np.broadcast_arrays(*(np.atleast_1d(np.asarray(v, dtype=float)) for v in
                                           (frequency_hz, generalised_mass, damping_ratio)))
    omega = TWO_PI * fs
    return mass * omega**2, 2.0 * zeta * mass * omega, mass


def extended_transfer(frequency_hz, frequency_s_hz, generalised_mass, damping_ratio,
                      absorbers: Absorbers, participation):
    """Return the extended coordinates (q, r, p) per unit modal force on a frequency grid.

    Parameters
    ----------
    frequency_hz : array, shape batch + (F,)
        Where to evaluate [Hz].
    frequency_s_hz, generalised_mass, damping_ratio : arrays, shape batch + (n,)
        The modes [Hz], [kg or kg m^2], [-].
    absorbers : Absorbers
        Absorber axes, shape batch + (N,).
    participation : array, shape batch + (N, n)
        phi_a,i [-].

    Returns
    -------
    array, shape batch + (F, n + 2 N, n), complex
        Column j is the response to a unit force on mode j: modal coordinates
        [m/N], absorber coordinates [m/N], absorber internal forces [N/N].
    """
    f = np.asarray(frequency_hz, dtype=float)
    omega = TWO_PI * f
    w2 = omega**2
    k, c, m = (v[..., None, :] for v in _structure(frequency_s_hz, generalised_mass,
                                                     damping_ratio))
    n = k.shape[-1]
    ma, beta, za = (v[..., None, :] for v in
                    (absorbers.mass_kg, absorbers.coupling, absorbers.damping_ratio))
    wa = TWO_PI * absorbers.frequency_hz[..., None, :]
    phi = np.asarray(participation, dtype=float)[..., None, :, :]
    denominator = wa**2 - w2[..., None] + 2j * za * wa * omega[..., None]
    ratio = w2[..., None] / denominator
    inertia = ma * (1.0 + beta**2 * ratio)
    z = np.einsum("...a,...ai,...aj->...ij", -w2[..., None] * inertia, phi, phi)
    diag = k - w2[..., None] * m + 1j * omega[..., None] * c
    idx = np.arange(n)
    z[..., idx, idx] += diag
    g = np.linalg.inv(z)
    r = np.einsum("...a,...ai,...ij->...aj", beta * ratio, phi, g)
    p = (ma * (wa**2 + 2j * za * wa * omega[..., None]))[..., None] * r
    return np.concatenate([g, r, p], axis=-2)


def modal_response(frequency_hz, generalised_mass, damping_ratio, absorbers: Absorbers,
                   participation, load: CrossSpectrum, outputs: OutputRows, *,
                   pairs=None, nodes_per_pole: int = NODES_PER_POLE,
                   top_decade: bool = True) -> OutputMoments:
    """Spectral moment matrices of a group of outputs for a batch of designs.

    Parameters
    ----------
    frequency_hz : array, shape batch + (n,)
        Modal frequencies f_i [Hz].
    generalised_mass : array, shape batch + (n,)
        Generalised masses M*_i [kg; kg m^2 for a torsional mode], in the
        normalisation of the participation vectors.
    damping_ratio : array, shape batch + (n,)
        Modal damping ratios zeta_i [-]; zero only where an absorber damps
        the mode.
    absorbers : Absorbers
        Absorber axes of each design, shape batch + (N,) (N may be 0).
    participation : array, shape batch + (N, n)
        phi_a,i: mode i's shape value at absorber axis a's point, along its
        direction [-].
    load : CrossSpectrum
        One-sided cross-spectral matrix of the modal forces [N^2/Hz].
    outputs : OutputRows
        Rows over (q, r, p) with their derivative orders; n + 2 N columns.
    pairs : array of int, shape (K, 2), optional
        Compute only the diagonal and these (i, j) entries of the moment
        matrices (the others are NaN); default the full matrices.
    nodes_per_pole : int
        Gauss-Legendre nodes per pole panel.
    top_decade : bool
        Compute the top-decade shares (False leaves them NaN: cheaper, for
        a search that only needs the moments).

    Returns
    -------
    OutputMoments

    Raises
    ------
    NoFiniteResponse
        For an undamped mode with no absorber.
    ValueError
        When the load, the modes and the output rows disagree in size.

    Notes
    -----
    h(f) = (i 2 pi f)^d rows E(f), E from :func:`extended_transfer`;
    m_k = sum over grid nodes of w f^k h S_F h^H.
    """
    k, _, _ = _structure(frequency_hz, generalised_mass, damping_ratio)
    n, count = k.shape[-1], absorbers.count
    if load.size != n:
        raise ValueError(f"the load has {load.size} modes but the structure has {n}")
    if outputs.rows.shape[-1] != n + 2 * count:
        raise ValueError(f"output rows have {outputs.rows.shape[-1]} columns; expected "
                         f"n + 2 N = {n + 2 * count}")
    if count == 0 and np.any(np.asarray(damping_ratio) <= 0):
        raise NoFiniteResponse("an undamped mode with no absorber has no finite response to "
                               "a random load")
    phi = np.asarray(participation, dtype=float).reshape(
        np.shape(participation)[:-2] + (count, n))
    poles = closed_loop_poles(frequency_hz, generalised_mass, damping_ratio, absorbers, phi)
    centre, width = _resonances(poles)
    grid, weight = pole_grid(centre, width, load.f_min_hz, load.f_max_hz,
                             breakpoints_hz=load_breakpoints(load),
                             nodes_per_pole=nodes_per_pole)
    batch = grid.shape[:-1]
    ext = extended_transfer(
        grid, *(np.broadcast_to(np.atleast_1d(np.asarray(v, float)), batch + (n,))
                for v in (frequency_hz, generalised_mass, damping_ratio)),
        _broadcast(absorbers, batch), np.broadcast_to(phi, batch + (count, n)))
    h = np.matmul(outputs.rows, ext)  # (..., F, o, n)
    h = h * ((1j * TWO_PI * grid)[..., None] ** outputs.order)[..., None]
    if isinstance(load, UncorrelatedForces):
        hs = h * load.diagonal(grid)[..., None, :]
    else:
        hs = np.matmul(h, load(grid))
    hc = np.conj(h)
    powers = np.stack([weight * grid**k for k in (0, 1, 2)], axis=-2)  # (..., 3, F)
    if pairs is None:
        moments = list(np.moveaxis(np.einsum("...kf,...foj,...fpj->...kop", powers, hs, hc),
                                   -3, 0))
    else:
        # Only the diagonal and the requested pairs: (F, o + K) products, not (F, o, o).
        # (einsum: several times faster than summing the product array.)
        pick = np.asarray(pairs, dtype=int).reshape(-1, 2)
        products = np.concatenate([np.einsum("...oj,...oj->...o", hs, hc),
                                   np.einsum("...oj,...oj->...o", hs[..., pick[:, 0], :],
                                             hc[..., pick[:, 1], :])], axis=-1)
        values = np.matmul(powers, products)  # (..., 3, o + K)
        o = outputs.count
        moments = []
        for k in range(3):
            m = np.full(batch + (o, o), np.nan, dtype=complex)
            idx = np.arange(o)
            m[..., idx, idx] = values[..., k, :o]
            m[..., pick[:, 0], pick[:, 1]] = values[..., k, o:]
            m[..., pick[:, 1], pick[:, 0]] = np.conj(values[..., k, o:])
            moments.append(m)
    if top_decade:
        share0, share2 = _top_decade(grid, weight, hs, hc, moments, load.f_max_hz)
    else:
        share0 = share2 = np.full(batch + (outputs.count,), np.nan)
    return OutputMoments(*moments, share0, share2, outputs.names)


def load_breakpoints(load: CrossSpectrum) -> np.ndarray:
    """Where the load bends sharply: panel edges of the grid [Hz].

    Parameters
    ----------
    load : CrossSpectrum
        Modal force cross-spectral matrix, with optional ``breakpoints_hz``.

    Returns
    -------
    array
        Sorted. For uncorrelated forces, every spectrum's sharp rows
        (:func:`tmd.response.load_breakpoints`, as in the one-mode engine);
        otherwise the rows where any auto-spectrum's log-log slope changes
        sharply (:func:`tmd.grid.sharp_breakpoints`). The cross-spectra are
        interpolated as fractions of the auto-spectra
        (:class:`tmd.cross_spectra.TabulatedCrossSpectrum`), so they bend
        there too. Empty for a smooth load.
    """
    cached = _BREAKPOINTS.get(id(load))
    if cached is not None and cached[0] is load:
        return cached[1]
    if isinstance(load, UncorrelatedForces):
        cuts = [one_mode_breakpoints(s) for s in load.spectra]
    else:
        points = np.asarray(getattr(load, "breakpoints_hz", ()), float)
        cuts = []
        if points.size >= 3:
            diagonal = np.real(np.diagonal(load(points), axis1=-2, axis2=-1))
            cuts = [sharp_breakpoints(points, diagonal[:, i]) for i in range(load.size)]
    sharp = np.unique(np.concatenate(cuts)) if cuts else np.empty(0)
    # Loads are immutable: remember the answer (the entry holds the load, so
    # its id cannot be reused while cached).
    if len(_BREAKPOINTS) >= 64:
        _BREAKPOINTS.clear()
    _BREAKPOINTS[id(load)] = (load, sharp)
    return sharp


def _broadcast(absorbers: Absorbers, batch) -> Absorbers:
    shape = batch + (absorbers.count,)
    return Absorbers(*(np.broadcast_to(v, shape) for v in
                       (absorbers.mass_kg, absorbers.frequency_hz, absorbers.damping_ratio,
                        absorbers.coupling)))


def _top_decade(grid, weight, hs, hc, moments, f_max):
    diag0 = np.real(np.diagonal(moments[0], axis1=-2, axis2=-1))
    if not np.isfinite(f_max):
        zero = np.zeros_like(diag0)
        return zero, zero
    power = np.real(np.einsum("...foj,...foj->...fo", hs, hc))
    top = (weight * (grid >= 0.1 * f_max))[..., None] * power
    diag2 = np.real(np.diagonal(moments[2], axis1=-2, axis2=-1))
    with np.errstate(invalid="ignore", divide="ignore"):
        return (np.nan_to_num(np.sum(top, axis=-2) / diag0),
                np.nan_to_num(np.sum(top * (grid**2)[..., None], axis=-2) / diag2))
