"""Generalised (modal) along-wind force spectrum of a building, by quasi-steady theory.

The building face is cut into horizontal strips (the lateral coherence is
averaged over the breadth inside each pair of strips). Each strip carries the
quasi-steady fluctuating drag dF = rho C_d b dz U(z) u(z, t); the modal force
is the mode-shape-weighted sum of the strip forces, so its one-sided PSD is
the quadratic form

    S_F(f) = sum_i sum_j phi_i phi_j a_i a_j sqrt(S_u,i(f) S_u,j(f)) coh_ij(f),
    a_i = rho C_d b U_i dz_i,

computed once on a dense log-spaced grid and returned as a
:class:`tmd.spectra.TabulatedSpectrum`, cheap to evaluate anywhere.

The mode shape is normalised to 1 at the damper height, so the modal force
drives the modal coordinate = building displacement at the damper, with the
modal mass M* referred to that point.

References
----------
Davenport, A. G. (1962). The response of slender, line-like structures to a
gusty wind. Proc. ICE 23, 389-408 (quasi-steady strip loading, from memory).
EN 1991-1-4:2005, 4.5(1) (air density), 6.3 and Fig. 6.1 (reference height
z_s = 0.6 h), Annex F.5 eq. F.18 (aerodynamic damping), F.4 (equivalent mass).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from tmd.height_integral import integrate_over_height
from tmd.rules import Positive, require
from tmd.spectra import TabulatedSpectrum
from tmd.wind.coherence import (
    DECAY_LATERAL,
    DECAY_VERTICAL,
    area_admittance_sq,
    averaged_exponential,
)
from tmd.wind.turbulence import velocity_spectrum

COHERENCE_MODELS = ("exponential", "exponential-vertical", "admittance")
# Frequencies x strip pairs per block of the strip sums (temporaries of 16 times
# that many doubles, ~8 MB), so that memory stays bounded at any n_strips.
PAIR_BLOCK_ELEMENTS = 65536
DEFAULT_FREQUENCY_HZ = np.geomspace(1e-4, 10.0, 400)
# Above the default table the modal force continues as the power law of its
# last interval. Every turbulence spectrum here falls as f^-5/3 and the
# exponential coherence averaged over height and breadth as f^-2 (f^-1 each),
# so the table tends to f^-11/3 (its last slope is -3.65 on the demos): the
# acceleration's second moment, an integral of f^2 S_F / M*^2 at high
# frequency, then converges and no longer depends on a cut-off. Where the last
# slope is -3 or shallower (coherence over height alone: f^-8/3) that moment
# grows without bound, so the table keeps its range and the engine's
# upper-edge warning stands. Tabulating further instead is worse: above about
# 100 Hz the strips' averaged coherences lose accuracy (Kestrel Point's slope
# falls to -10 at 1 kHz), and the simulated records would need a step below
# 1/2000 s for a table reaching 1 kHz.
TAIL_SLOPE_LIMIT = -3.0
_GAUSS_NODES, _GAUSS_WEIGHTS = np.polynomial.legendre.leggauss(16)
_GAUSS_NODES = 0.5 * (_GAUSS_NODES + 1.0)  # on [0, 1]
_GAUSS_WEIGHTS = 0.5 * _GAUSS_WEIGHTS


def _positive(name, value):
    # The rule of the case file's [building] table (tmd.rules.Positive): same words.
    require(name, value, Positive)


@dataclass(frozen=True)
class Building:
    """The building as the wind sees it, plus its fundamental along-wind mode shape.

    Parameters
    ----------
    height_m : float
        h [m]; above 200 m (EN 1991-1-4 z_max) the site must be a profile
        table or a boundary-layer model.
    breadth_m : float
        b [m], the face normal to the wind.
    depth_m : float
        d [m], along the wind.
    drag_coefficient : float
        C_d (EN c_f) of the whole section [-].
    mode_shape_exponent : float
        zeta in phi(z) = (z/h)^zeta [-] (EN 1991-1-4 F.3), default 1.
    damper_height_m : float, optional
        z_d [m] where the mode shape is 1; default the top.
    evaluation_height_m : float, optional
        z_eval [m] where occupant acceleration is wanted; default the top.
    mass_per_length_kg_m : float, optional
        Equivalent mass per length m_e [kg/m] for aerodynamic damping and the
        code check; default M* / integral of phi^2.
    mode_shape_heights_m, mode_shape_values : tuple of float, optional
        A tabulated mode shape (linear between points, any normalisation) that
        replaces the power law; heights increasing in [0, h] and covering the
        damper and evaluation heights.
    """

    height_m: float
    breadth_m: float
    depth_m: float
    drag_coefficient: float
    mode_shape_exponent: float = 1.0
    damper_height_m: float | None = None
    evaluation_height_m: float | None = None
    mass_per_length_kg_m: float | None = None
    mode_shape_heights_m: tuple[float, ...] | None = None
    mode_shape_values: tuple[float, ...] | None = None

    def __post_init__(self):
        for name in ("height_m", "breadth_m", "depth_m", "drag_coefficient"):
            _positive(name, getattr(self, name))
        # The 200 m limit of the EN profile is the site's (tmd.wind.Site checks
        # heights); a profile table or a boundary-layer model reaches higher.
        _positive("mode_shape_exponent", self.mode_shape_exponent)
        for name in ("damper_height_m", "evaluation_height_m"):
            value = getattr(self, name)
            if value is None:
                object.__setattr__(self, name, float(self.height_m))
                continue
            if not (isinstance(value, int | float) and 0 < value <= self.height_m):
                raise ValueError(
                    f"{name} = {value!r} m; must lie in (0, height_m = {self.height_m:g}] m"
                )
        if self.mass_per_length_kg_m is not None:
            _positive("mass_per_length_kg_m", self.mass_per_length_kg_m)
        self._check_table()

    def _check_table(self):
        heights, values = self.mode_shape_heights_m, self.mode_shape_values
        if heights is None and values is None:
            return
        if heights is None or values is None:
            raise ValueError("give both mode_shape_heights_m and mode_shape_values, or neither")
        z, v = np.asarray(heights, dtype=float), np.asarray(values, dtype=float)
        if z.ndim != 1 or z.shape != v.shape or z.size < 2:
            raise ValueError(
                "mode_shape_heights_m and mode_shape_values must be equal-length lists (>= 2)"
            )
        if np.any(np.diff(z) <= 0) or z[0] < 0 or z[-1] > self.height_m:
            raise ValueError(
                f"mode_shape_heights_m = {list(heights)!r}; must increase within [0, height_m = "
                f"{self.height_m:g}] m"
            )
        for name in ("damper_height_m", "evaluation_height_m"):
            zz = getattr(self, name)
            if not z[0] <= zz <= z[-1]:
                raise ValueError(
                    f"{name} = {zz:g} m lies outside the tabulated mode shape "
                    f"[{z[0]:g}, {z[-1]:g}] m"
                )
        if np.interp(self.damper_height_m, z, v) == 0:
            raise ValueError(f"the tabulated mode shape is zero at damper_height_m = "
                             f"{self.damper_height_m:g} m; it cannot be normalised there")

    def _raw_shape(self, height_m):
        z = np.asarray(height_m, dtype=float)
        if self.mode_shape_heights_m is None:
            return (z / self.height_m) ** self.mode_shape_exponent
        return np.interp(z, self.mode_shape_heights_m, self.mode_shape_values, left=0.0)

    def mode_shape(self, height_m):
        """Return the mode shape phi(z) [-], normalised to 1 at the damper height.

        Parameters
        ----------
        height_m : float or array
            z, height above ground [m].

        Returns
        -------
        float or numpy.ndarray
            phi(z) [-], of the shape of ``height_m``.

        Notes
        -----
        Power law: phi(z) = (z / z_d)^zeta. Table: linear interpolation
        divided by its value at z_d (zero below the first tabulated height).
        """
        return self._raw_shape(height_m) / self._raw_shape(self.damper_height_m)

    @property
    def evaluation_mode_value(self) -> float:
        """phi(z_eval) [-]: occupant acceleration = phi(z_eval) x modal acceleration."""
        return float(self.mode_shape(self.evaluation_height_m))

    @property
    def mode_shape_square_integral_m(self) -> float:
        """Integral of phi(z)^2 over 0..h [m] (phi = 1 at the damper).

        Notes
        -----
        Power law: h^(2 zeta + 1) / ((2 zeta + 1) z_d^(2 zeta)). Table:
        :func:`tmd.height_integral.integrate_over_height` with the table
        heights as breakpoints (exact for the piecewise-linear shape).
        """
        if self.mode_shape_heights_m is None:
            zeta = self.mode_shape_exponent
            h, z_d = self.height_m, self.damper_height_m
            return h ** (2 * zeta + 1) / ((2 * zeta + 1) * z_d ** (2 * zeta))
        return integrate_over_height(lambda z: self.mode_shape(z) ** 2, self.height_m,
                                     self.mode_shape_breakpoints_m)

    @property
    def mode_shape_breakpoints_m(self) -> tuple[float, ...]:
        """Heights [m] where the mode shape may have a kink: a table's heights, else none."""
        return tuple(self.mode_shape_heights_m or ())

    def equivalent_mass_per_length(self, modal_mass_kg: float) -> float:
        """Return the equivalent mass per length m_e [kg/m] (EN 1991-1-4 F.4, uniform mass).

        Parameters
        ----------
        modal_mass_kg : float
            M*, modal mass with the mode shape = 1 at the damper [kg].

        Returns
        -------
        float
            m_e [kg/m]: ``mass_per_length_kg_m`` if given, otherwise
            M* / integral of phi(z)^2 dz over the height.

        References
        ----------
        EN 1991-1-4:2005+A1:2010, Annex F, F.4 (equivalent mass).
        """
        if self.mass_per_length_kg_m is not None:
            return float(self.mass_per_length_kg_m)
        _positive("modal_mass_kg", modal_mass_kg)
        return modal_mass_kg / self.mode_shape_square_integral_m


def reference_height(site, building) -> float:
    """Return the EN reference height z_s = 0.6 h, not below z_min [m] (EN 1991-1-4 Fig. 6.1).

    Parameters
    ----------
    site : tmd.wind.Site
        The wind climate and terrain at the building (its z_min).
    building : Building
        The building (its height h).

    Returns
    -------
    float
        z_s [m].

    References
    ----------
    EN 1991-1-4:2005+A1:2010, 6.3.1, Figure 6.1.
    """
    return max(0.6 * building.height_m, site.minimum_height_m)


def height_strips(height_m: float, n_strips: int):
    """Return the midpoints and lengths [m] of ``n_strips`` equal strips over 0..h.

    Parameters
    ----------
    height_m : float
        h, building height [m].
    n_strips : int
        Number of equal horizontal strips, >= 1.

    Returns
    -------
    midpoints : numpy.ndarray
        Height of each strip's midpoint [m].
    lengths : numpy.ndarray
        Each strip's height dz = h / n [m].

    Raises
    ------
    ValueError
        If ``n_strips`` is not an integer >= 1.
    """
    if not (isinstance(n_strips, int) and n_strips >= 1):
        raise ValueError(f"n_strips = {n_strips!r}; must be an integer >= 1")
    edges = np.linspace(0.0, height_m, n_strips + 1)
    return 0.5 * (edges[:-1] + edges[1:]), np.diff(edges)


def lateral_mean_coherence(vertical_decay, lateral_decay):
    """Root-coherence between two horizontal lines, averaged over the breadth [-].

    Parameters
    ----------
    vertical_decay : array
        A = f C_z dz / U for the two lines' vertical separation dz [-].
    lateral_decay : array
        Q = f C_y b / U for the breadth b [-].

    Returns
    -------
    numpy.ndarray
        L(A, Q) [-], in (0, 1], broadcast over the arguments.

    Notes
    -----
    L(A, Q) = int_0^1 2 (1 - t) exp(-sqrt(A^2 + Q^2 t^2)) dt, 2 (1 - t) being
    the density of the distance (over b) between two uniform points of the
    breadth. L(A, 0) = exp(-A). Computed with 16 Gauss-Legendre points after
    the substitution t = -ln(1 - s (1 - e^-Q)) / Q, which makes exp(-Q t) dt
    uniform in s, so large Q (short lateral correlation) costs no extra points.
    """
    a = np.asarray(vertical_decay, dtype=float)[..., None]
    q = np.maximum(np.asarray(lateral_decay, dtype=float), 1e-300)[..., None]
    c = -np.expm1(-q)
    t = -np.log1p(-_GAUSS_NODES * c) / q
    integrand = 2.0 * (1.0 - t) * np.exp(q * t - np.sqrt(a**2 + (q * t) ** 2)) * (c / q)
    return np.sum(_GAUSS_WEIGHTS * integrand, axis=-1)


def pair_mean_exponential(midpoint_decay, half_length_decay):
    """Mean of exp(-a |z1 - z2|) over two equal, non-overlapping strips [-].

    Parameters
    ----------
    midpoint_decay : array
        a d, d the distance between the strip midpoints (d >= strip length) [-].
    half_length_decay : array
        u = a dz / 2 [-].

    Returns
    -------
    numpy.ndarray
        The mean [-], in (0, 1], broadcast over the arguments.

    Notes
    -----
    Exact: exp(-a d) (sinh u / u)^2, written as
    exp(-(a d - 2u)) ((1 - exp(-2u)) / 2u)^2 so that it cannot overflow.
    """
    d = np.asarray(midpoint_decay, dtype=float)
    u = np.asarray(half_length_decay, dtype=float)
    u_safe = np.maximum(u, 1e-300)
    ratio = np.where(u > 1e-12, -np.expm1(-2.0 * u_safe) / (2.0 * u_safe), 1.0)
    return np.exp(-np.maximum(d - 2.0 * u, 0.0)) * ratio**2


def strip_self_coherence(vertical_decay, lateral_decay):
    """Mean root-coherence between two random points of one strip (dz x b) [-].

    Parameters
    ----------
    vertical_decay : array
        p = f C_z dz / U [-].
    lateral_decay : array
        Q = f C_y b / U [-].

    Returns
    -------
    numpy.ndarray
        The mean root-coherence [-], in (0, 1], broadcast over the arguments.

    Notes
    -----
    int_0^1 2 (1 - s) L(p s, Q) ds with L from :func:`lateral_mean_coherence`
    (16 Gauss-Legendre points in s). For Q = 0 this is exactly EN 1991-1-4
    eq. B.7 at eta = p / 2, which is used then.

    References
    ----------
    EN 1991-1-4:2005, Annex B, eq. B.7 (the case Q = 0).
    """
    p = np.asarray(vertical_decay, dtype=float)
    q = np.asarray(lateral_decay, dtype=float)
    inner = lateral_mean_coherence(p[..., None] * _GAUSS_NODES, q[..., None])
    mixed = np.sum(_GAUSS_WEIGHTS * 2.0 * (1.0 - _GAUSS_NODES) * inner, axis=-1)
    return np.where(q > 0, mixed, averaged_exponential(0.5 * p))


def generalized_force_psd(frequency_hz, strip_height_m, strip_length_m, mode_value, mean_speed,
                          velocity_psd, *, breadth_m, drag_coefficient, air_density_kg_m3,
                          coherence="exponential", decay_vertical=DECAY_VERTICAL,
                          decay_lateral=DECAY_LATERAL, admittance_speed=None, chunk_size=32):
    """One-sided PSD of the generalised along-wind force [N^2/Hz] from strips.

    Parameters
    ----------
    frequency_hz : array (K,)
        f [Hz].
    strip_height_m, strip_length_m : array (n,)
        Strip midpoints z_i and lengths dz_i [m].
    mode_value : array (n,)
        phi(z_i) [-].
    mean_speed : array (n,)
        U(z_i) [m/s].
    velocity_psd : array (K, n)
        One-sided along-wind PSD at each strip [(m/s)^2/Hz].
    breadth_m, drag_coefficient, air_density_kg_m3 : float
        b [m], C_d [-], rho [kg/m^3].
    coherence : str
        "exponential": Davenport's root-coherence over height and breadth;
        "exponential-vertical": the same over height only, each strip fully
        correlated across the breadth; "admittance": strips fully correlated,
        times the area admittance chi^2(f) of the face (b x sum dz) at
        ``admittance_speed``.
    decay_vertical, decay_lateral : float
        C_z, C_y [-].
    admittance_speed : float
        U [m/s] in chi^2 for "admittance".
    chunk_size : int
        Frequencies per block; strip pairs are taken in blocks of
        PAIR_BLOCK_ELEMENTS / chunk_size, so memory does not grow with n^2.

    Returns
    -------
    S_F : array (K,) [N^2/Hz].

    Notes
    -----
    S_F(f) = w^T C(f) w, w_i = phi_i rho C_d b U_i dz_i sqrt(S_u,i). A pair of
    strips takes the average of the two speeds; its coherence is the mean over
    all point pairs of the two strips: exactly (:func:`pair_mean_exponential`)
    for vertical coherence alone, otherwise averaged exactly over the breadth
    (:func:`lateral_mean_coherence`) and by a two-node rule over the height.
    A strip with itself takes the mean coherence over the whole strip
    (:func:`strip_self_coherence`). Averaging over the strips, not sampling
    at midpoints, keeps the sum right where a strip is longer than the
    correlation length (high frequencies). Equal strip lengths are assumed
    by the exact vertical average. C is symmetric, so S_F = sum_i w_i^2 C_ii +
    2 sum_{i<j} w_i w_j C_ij: each pair is formed once.
    """
    f = np.asarray(frequency_hz, dtype=float)
    z, dz = np.asarray(strip_height_m, float), np.asarray(strip_length_m, float)
    speed = np.asarray(mean_speed, float)
    w = (np.asarray(mode_value, float) * air_density_kg_m3 * drag_coefficient * breadth_m
         * speed * dz) * np.sqrt(np.asarray(velocity_psd, float))
    if coherence == "admittance":
        chi2 = area_admittance_sq(f, breadth_m * float(np.sum(dz)), admittance_speed)
        return np.sum(w, axis=1) ** 2 * chi2
    if coherence not in COHERENCE_MODELS:
        raise ValueError(f"coherence = {coherence!r}; allowed: {', '.join(COHERENCE_MODELS)}")
    lateral = decay_lateral * breadth_m if coherence == "exponential" else 0.0
    n = z.size
    # The coherence matrix is symmetric: only pairs i < j are formed (each counted twice),
    # in blocks of pairs so that memory stays bounded whatever n_strips is.
    i, j = np.triu_indices(n, k=2 if lateral else 1)
    inverse_speed = 2.0 / (speed[i] + speed[j])
    vertical = decay_vertical * np.abs(z[i] - z[j]) * inverse_speed
    # Half-width of the vertical separations between two strips, as a decay.
    spread = decay_vertical * 0.5 * (dz[i] + dz[j]) * inverse_speed
    near_i, near_j = np.arange(n - 1), np.arange(1, n)
    near_inverse = 2.0 / (speed[near_i] + speed[near_j])
    near_vertical = decay_vertical * np.abs(z[near_i] - z[near_j]) * near_inverse
    near_spread = decay_vertical * 0.5 * (dz[near_i] + dz[near_j]) * near_inverse
    s_nodes = np.concatenate([-_GAUSS_NODES, _GAUSS_NODES])
    s_weights = np.tile(_GAUSS_WEIGHTS * (1.0 - _GAUSS_NODES), 2)
    out = np.empty(f.size)
    for start in range(0, f.size, chunk_size):
        fc, wc = f[start:start + chunk_size, None], w[start:start + chunk_size]
        pairs = np.zeros(fc.shape[0])
        # A block size independent of this chunk's length: the same sums, bit for bit,
        # for a frequency whatever table it is computed in.
        block = max(1, PAIR_BLOCK_ELEMENTS // chunk_size)
        for lo in range(0, i.size, block):
            part = slice(lo, lo + block)
            product = wc[:, i[part]] * wc[:, j[part]]
            if lateral:
                # Separations between points of two strips spread triangularly about
                # the midpoint distance; two nodes at +-h/sqrt(6) match that
                # distribution's moments to third order.
                shift = fc * spread[part] / math.sqrt(6.0)
                c = _lateral_mean_coherence_pair(fc * vertical[part] - shift,
                                                 fc * vertical[part] + shift,
                                                 fc * lateral * inverse_speed[part])
            else:
                c = pair_mean_exponential(fc * vertical[part], 0.5 * fc * spread[part])
            pairs += np.einsum("kp,kp->k", product, c)
        if lateral:
            # Neighbours' separations reach zero, where the two nodes fall short
            # once a strip outgrows the correlation length: full Gauss rule there.
            a_nodes = fc[:, None, :] * (near_vertical + near_spread * s_nodes[:, None])[None]
            q = (fc * lateral * near_inverse)[:, None, :]
            near = np.einsum("s,ksp->kp", s_weights, lateral_mean_coherence(a_nodes, q))
            pairs += np.einsum("kp,kp->k", wc[:, near_i] * wc[:, near_j], near)
        diagonal = strip_self_coherence(fc * decay_vertical * dz / speed,
                                        fc * lateral / speed)
        out[start:start + chunk_size] = 2.0 * pairs + np.sum(wc**2 * diagonal, axis=1)
    return out


def _lateral_mean_coherence_pair(first_decay, second_decay, lateral_decay):
    """(L(A1, Q) + L(A2, Q)) / 2 of :func:`lateral_mean_coherence`, sharing its nodes in Q."""
    a1 = np.asarray(first_decay, dtype=float)[..., None]
    a2 = np.asarray(second_decay, dtype=float)[..., None]
    q = np.maximum(np.asarray(lateral_decay, dtype=float), 1e-300)[..., None]
    c = -np.expm1(-q)
    qt = -np.log1p(-_GAUSS_NODES * c)
    weight = _GAUSS_WEIGHTS * (1.0 - qt / q) * (c / q)
    qt2 = qt * qt
    pair = np.exp(qt - np.sqrt(a1 * a1 + qt2)) + np.exp(qt - np.sqrt(a2 * a2 + qt2))
    return np.sum(weight * pair, axis=-1)


def modal_force_spectrum(site, building, return_period_years=50.0, *, spectrum="eurocode",
                         coherence="exponential", n_strips=40,
                         decay_vertical=DECAY_VERTICAL, decay_lateral=DECAY_LATERAL,
                         frequency_hz=None) -> TabulatedSpectrum:
    """Generalised along-wind force spectrum of the building's mode [N^2/Hz], tabulated.

    Parameters
    ----------
    site : tmd.wind.Site
        The wind climate and terrain at the building.
    building : Building
        The building: height, breadth, mass and mode shape over height.
    return_period_years : float
        T [years] of the mean wind speed.
    spectrum : str
        Turbulence spectrum: "eurocode", "davenport", "kaimal", "von-karman", "harris".
    coherence : str
        "exponential", "exponential-vertical" or "admittance"
        (see :func:`generalized_force_psd`).
    n_strips : int
        Strips over the height.
    decay_vertical, decay_lateral : float
        Coherence decay constants C_z, C_y [-].
    frequency_hz : array, optional
        Table frequencies [Hz], increasing and > 0; default 400 log-spaced
        points from 1e-4 to 10 Hz, continued above 10 Hz by the power law of
        the last interval (:func:`tail_exponent`). Given frequencies get no
        continuation.

    Returns
    -------
    TabulatedSpectrum
        One-sided modal force PSD for the mode normalised to 1 at the damper.

    Notes
    -----
    See the module docstring. The admittance option uses the mean speed at
    the EN reference height z_s = 0.6 h.
    """
    f = DEFAULT_FREQUENCY_HZ if frequency_hz is None else np.asarray(frequency_hz, dtype=float)
    z, dz = height_strips(building.height_m, n_strips)
    speed = site.mean_speed(z, return_period_years)
    psd = velocity_spectrum(site, z[None, :], f[:, None], return_period_years, spectrum)
    s_f = generalized_force_psd(
        f, z, dz, building.mode_shape(z), speed, psd,
        breadth_m=building.breadth_m, drag_coefficient=building.drag_coefficient,
        air_density_kg_m3=site.air_density_kg_m3, coherence=coherence,
        decay_vertical=decay_vertical, decay_lateral=decay_lateral,
        admittance_speed=float(
            site.mean_speed(reference_height(site, building), return_period_years)
        ),
    )
    source = (f"along-wind modal force: {spectrum} spectrum, {coherence} coherence, "
              f"T = {return_period_years:g} yr, {n_strips} strips")
    tail = tail_exponent(f, s_f) if frequency_hz is None else None
    return TabulatedSpectrum(f, s_f, source=source, tail_exponent=tail)


def tail_exponent(frequency_hz, psd):
    """Return the power law that continues a modal force table above its last row [-].

    Parameters
    ----------
    frequency_hz, psd : array
        The table [Hz], [N^2/Hz].

    Returns
    -------
    float or None
        The log-log slope of the last interval, or None where it is not below
        TAIL_SLOPE_LIMIT = -3 (the acceleration's second moment would diverge).

    Notes
    -----
    The slope tends to -5/3 - 2 = -11/3 (turbulence spectrum times the
    coherence averaged over height and breadth, see DEFAULT_FREQUENCY_HZ's
    note) from above, so continuing the last interval's slope slightly
    overstates the tail: on Kestrel Point -3.652 at 10 Hz against -3.667.
    """
    f, s = np.asarray(frequency_hz, float), np.asarray(psd, float)
    slope = float(np.log(s[-1] / s[-2]) / np.log(f[-1] / f[-2]))
    return slope if np.isfinite(slope) and slope < TAIL_SLOPE_LIMIT else None


def modal_force_spectra(site, building, return_periods_years, *, reference_period_years=None,
                        spectrum="eurocode", coherence="exponential", n_strips=40,
                        decay_vertical=DECAY_VERTICAL, decay_lateral=DECAY_LATERAL):
    """Modal force spectra of several return periods from one strip computation [N^2/Hz].

    Parameters
    ----------
    site : tmd.wind.Site
        The wind climate and terrain at the building.
    building : Building
        The building: height, breadth, mass and mode shape over height.
    return_periods_years : sequence of float
        T [years] of each spectrum wanted.
    reference_period_years : float, optional
        T_ref [years] whose table is computed; its table is exactly the one
        of :func:`modal_force_spectrum` (default: the first period).
    spectrum, coherence, n_strips, decay_vertical, decay_lateral
        As for :func:`modal_force_spectrum`.

    Returns
    -------
    list of TabulatedSpectrum
        One per return period, in the given order.

    Notes
    -----
    Every mean speed and sigma_u scales with the return period by the same
    factor c = c_prob(T) / c_prob(T_ref) (EN 1991-1-4 eq. 4.2, :mod:`tmd.wind.profile`);
    the length scales do not. Every turbulence spectrum here has the form
    S_u(f) = sigma_u^2 R(f L / U) / f and every coherence depends on f dz / U,
    so the generalised force is self-similar:

        S_F(f; T) = c^3 S_F(f / c; T_ref)

    exactly (w_i ~ U_i sqrt(S_u,i) gives c^2 c, the argument f / c). So the
    strip sums are done once, on the default log grid extended by whole steps,
    and the table of T is that grid times c with values times c^3: exact at
    every node. What is not the same as computing T on its own is the table's
    grid: its nodes are shifted by the factor c, so the range is
    [1e-4, 10] Hz widened by less than one table step (2.9%) at each end, and
    the log-log interpolant between nodes differs from the one on the
    unshifted grid by its interpolation error. The reference period's table
    is exactly (bit for bit) the one :func:`modal_force_spectrum` gives.
    """
    periods = [float(t) for t in return_periods_years]
    reference = periods[0] if reference_period_years is None else float(reference_period_years)
    ratio = {t: float(site.speed_factor(t) / site.speed_factor(reference)) for t in periods}
    f = DEFAULT_FREQUENCY_HZ
    log_step = math.log(f[1] / f[0])
    below = max(0, math.ceil(math.log(max(ratio.values())) / log_step - 1e-9))
    above = max(0, math.ceil(-math.log(min(ratio.values())) / log_step - 1e-9))
    extended = np.concatenate([f[0] * np.exp(log_step * np.arange(-below, 0)), f,
                               f[-1] * np.exp(log_step * np.arange(1, above + 1))])
    table = modal_force_spectrum(site, building, reference, spectrum=spectrum,
                                 coherence=coherence, n_strips=n_strips,
                                 decay_vertical=decay_vertical, decay_lateral=decay_lateral,
                                 frequency_hz=extended)
    out = []
    for t in periods:
        c = ratio[t]
        nodes = c * extended
        # Keep one node at or beyond each end of the default range.
        first = int(np.searchsorted(nodes, f[0] * (1 + 1e-12), side="right")) - 1
        last = int(np.searchsorted(nodes, f[-1] * (1 - 1e-12), side="left"))
        keep = slice(max(first, 0), min(last, nodes.size - 1) + 1)
        source = (f"along-wind modal force: {spectrum} spectrum, {coherence} coherence, "
                  f"T = {t:g} yr, {n_strips} strips"
                  + ("" if t == reference else f" (scaled from T = {reference:g} yr)"))
        psd = c**3 * table.psd_n2_per_hz[keep]
        out.append(TabulatedSpectrum(nodes[keep], psd, source=source,
                                     tail_exponent=tail_exponent(nodes[keep], psd)))
    return out


def reference_wind_spectrum(site, building, return_period_years=50.0, *, spectrum="eurocode",
                            frequency_hz=None):
    """Return the turbulence PSD at the EN reference height z_s, for plotting.

    Parameters
    ----------
    site : tmd.wind.Site
        The wind climate and terrain at the building.
    building : Building
        The building (its height sets z_s).
    return_period_years : float
        T, return period of the mean wind [years].
    spectrum : str
        The turbulence model (:data:`tmd.wind.turbulence.SPECTRUM_MODELS`).
    frequency_hz : array, optional
        Where to evaluate [Hz]; a default log grid otherwise.

    Returns
    -------
    (frequency_hz, psd) : arrays [Hz], [(m/s)^2/Hz], one-sided.
    """
    f = DEFAULT_FREQUENCY_HZ if frequency_hz is None else np.asarray(frequency_hz, dtype=float)
    z_s = reference_height(site, building)
    return f, velocity_spectrum(site, z_s, f, return_period_years, spectrum)


def aerodynamic_log_decrement(force_coefficient, air_density_kg_m3, breadth_m, mean_speed,
                              frequency_hz, equivalent_mass_per_length):
    """Aerodynamic logarithmic decrement of the along-wind mode [-] (EN 1991-1-4 eq. F.18).

    Parameters
    ----------
    force_coefficient : float
        c_f [-].
    air_density_kg_m3 : float
        rho [kg/m^3].
    breadth_m : float
        b [m].
    mean_speed : array
        v_m(z_s) [m/s].
    frequency_hz : array
        n_1 [Hz].
    equivalent_mass_per_length : float
        m_e [kg/m].

    Notes
    -----
    delta_a = c_f rho b v_m(z_s) / (2 n_1 m_e).

    Returns
    -------
    numpy.ndarray
        delta_a [-], broadcast over ``mean_speed`` and ``frequency_hz``.

    References
    ----------
    EN 1991-1-4:2005+A1:2010, Annex F, F.5, eq. F.18.
    """
    return (force_coefficient * air_density_kg_m3 * breadth_m * np.asarray(mean_speed, float)
            / (2.0 * np.asarray(frequency_hz, float) * equivalent_mass_per_length))


def aerodynamic_damping_ratio(site, building, modal_mass_kg, frequency_hz,
                              return_period_years=50.0):
    """Aerodynamic damping ratio of the along-wind mode zeta_a = delta_a / (2 pi) [-].

    Parameters
    ----------
    site : tmd.wind.Site
        The wind climate and terrain at the building.
    building : Building
        The building: height, breadth, mass and mode shape over height.
    modal_mass_kg : float
        M* [kg], mode shape 1 at the damper (used for m_e unless the building
        gives ``mass_per_length_kg_m``).
    frequency_hz : float or array
        n_1 [Hz]; broadcast against ``return_period_years``.
    return_period_years : float or array
        T [years].

    Notes
    -----
    EN 1991-1-4 eq. F.18 with v_m at z_s = 0.6 h; scales as 1/n_1.

    Returns
    -------
    float or numpy.ndarray
        zeta_a [-], referred to the mode's frequency.

    References
    ----------
    EN 1991-1-4:2005+A1:2010, Annex F, F.5, eq. F.18.
    """
    m_e = building.equivalent_mass_per_length(modal_mass_kg)
    speed = site.mean_speed(reference_height(site, building), return_period_years)
    delta = aerodynamic_log_decrement(building.drag_coefficient, site.air_density_kg_m3,
                                      building.breadth_m, speed, frequency_hz, m_e)
    return delta / (2.0 * math.pi)
