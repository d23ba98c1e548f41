"""Tuned liquid column damper (TLCD): sizing on the universal absorber model.

The column itself (layout settings, geometry and damping formulas) is
:mod:`tmd.dampers.liquid_column`.

A U-shaped column of liquid, total length L along its centre line, horizontal
length B, uniform cross-section A, liquid mass m_l = rho A L, length ratio
alpha = B / L. The liquid displacement y along the column obeys (Sakai et al.
1989)

    rho A L y'' + 0.5 rho A xi |y'| y' + 2 rho A g y = -rho A B x'',

i.e. y'' + (xi / 2L) |y'| y' + omega_l^2 y = -alpha x'' with

    omega_l = sqrt(2 g / L),

and the structure carries (M* + m_l) x'' + alpha m_l y''. This is the
universal absorber of :mod:`tmd.dampers.absorber` with coupling beta = alpha
and coordinate r = y: a participating mass alpha^2 m_l plus a rigid mass
(1 - alpha^2) m_l.

The head loss is linearised. For a Gaussian liquid velocity of rms sigma_y'
(statistical linearisation, Gao, Kwok & Samali 1997; Yalla & Kareem 2000)

    zeta_eq = xi sigma_y' / (sqrt(2 pi) L omega_l),

which depends on the response and is iterated to its fixed point; for a
harmonic excursion of amplitude U at the column's frequency the energy
balance gives zeta_eq = 2 xi U / (3 pi L) instead.

Sizing: the equivalent-linear column is a TMD of mass alpha^2 m_l on a mode
whose mass is M* + (1 - alpha^2) m_l (same stiffness and dashpot), with its
TMD stroke u = y / alpha. :func:`least_coupled_mass` uses that exact split to
search the least liquid mass with the spine's tuning (:func:`tmd.design.tune`);
the optimal equivalent damping ratio is then turned into the head-loss
coefficient to specify, xi = zeta_eq sqrt(2 pi) L omega_l / sigma_y', at the
design response. :func:`velocity_proportional_fixed_point` evaluates a
specified column (xi fixed) at any load or structure frequency.

References
----------
Sakai, F., Takaeda, S. and Tamaki, T. (1989). Tuned liquid column damper - new
type device for suppression of building vibrations. Proc. Int. Conf. on
High-rise Buildings, Nanjing, 926-931.
Gao, H., Kwok, K. C. S. and Samali, B. (1997). Optimization of tuned liquid
column dampers. Engineering Structures 19(6), 476-486.
Yalla, S. K. and Kareem, A. (2000). Optimum absorber parameters for tuned
liquid column dampers. Journal of Structural Engineering 126(8), 906-915.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from scipy.optimize.elementwise import find_root

from tmd.dampers.absorber import Absorbers
from tmd.dampers.liquid_column import (
    TWO_PI,
    ColumnSettings,
    column_damping_gain,
    column_length_m,
    head_loss_for_damping,
    leg_height_m,
)
from tmd.design import LoadedMode, bare_response, smallest_meeting_mass_ratio, tune
from tmd.errors import NonFiniteResult
from tmd.performance import Assessment, assess
from tmd.response import spectral_response
from tmd.structure import Mode
from tmd.verdict import meets_target

_ZETA_BRACKET = (1e-5, 0.95)


@dataclass(frozen=True)
class CoupledSizing:
    """Least-mass equivalent-linear absorber of given coupling (a liquid damper).

    ``mass_ratio`` is the total liquid mass over M*; ``frequency_hz`` and
    ``damping_ratio`` are the absorber's own; ``governed_by`` as in
    :class:`tmd.design.Sizing` ("target", "stroke", "mass", "bare").

    Parameters
    ----------
    mass_ratio : float
        Total absorber (liquid) mass over the modal mass M* [-].
    frequency_hz : float
        The absorber's own natural frequency [Hz].
    damping_ratio : float
        Equivalent linear damping ratio, referred to the absorber's own
        frequency [-].
    coupling : float
        beta in (0, 1] [-]: alpha = B / L for a column, sqrt(m_1 / m_w) for a
        tank.
    meets_target : bool
        Whether the design's peak acceleration meets the target.
    governed_by : str
        What decided the mass, as in :class:`tmd.design.Sizing`.
    message : str
        The outcome in one plain sentence.
    """

    mass_ratio: float
    frequency_hz: float
    damping_ratio: float
    coupling: float
    meets_target: bool
    governed_by: str
    message: str

    def absorbers(self, mode: Mode) -> Absorbers:
        """Return the engine's description of this absorber on ``mode``.

        Parameters
        ----------
        mode : Mode
            The structural mode (modal mass M* [kg], mode shape = 1 at the
            absorber).

        Returns
        -------
        Absorbers
            One absorber of mass mu M* [kg] with this coupling.
        """
        return Absorbers([self.mass_ratio * mode.modal_mass_kg], [self.frequency_hz],
                         [self.damping_ratio], [self.coupling])


@dataclass(frozen=True)
class ColumnDesign:
    """A sized liquid column damper with what its specification needs (SI).

    Parameters
    ----------
    liquid_mass_kg : float
        Total liquid mass m_l of all columns [kg].
    mass_ratio : float
        m_l / M* [-].
    participating_mass_kg : float
        alpha^2 m_l [kg], the part that acts as a tuned mass.
    rigid_mass_kg : float
        (1 - alpha^2) m_l [kg], the part that moves with the structure.
    frequency_hz : float
        The column's natural frequency sqrt(2 g / L) / (2 pi) [Hz].
    length_ratio : float
        alpha = B / L [-].
    liquid_length_m : float
        L, total liquid length along the centre line [m].
    horizontal_length_m : float
        B = alpha L [m].
    vertical_liquid_height_m : float
        Still liquid height in each vertical leg, (1 - alpha) L / 2 [m].
    cross_section_area_m2 : float
        Cross-section A of each column [m^2].
    columns : int
        Number of identical columns.
    head_loss_coefficient : float
        xi [-] of the orifice that gives the equivalent damping at the design
        response.
    equivalent_damping_ratio : float
        Statistically linearised damping ratio at the design response [-],
        referred to the column's frequency.
    sigma_excursion_m, peak_excursion_m : float
        Rms and peak liquid displacement along the column [m].
    vertical_leg_height_m : float
        Still liquid height plus the peak excursion [m]: the least leg height.
    meets_target : bool
        Whether the design's peak acceleration meets the target.
    governed_by : str
        What decided the mass, as in :class:`tmd.design.Sizing`.
    message : str
        The outcome in one plain sentence.
    """

    liquid_mass_kg: float
    mass_ratio: float
    participating_mass_kg: float
    rigid_mass_kg: float
    frequency_hz: float
    length_ratio: float
    liquid_length_m: float
    horizontal_length_m: float
    vertical_liquid_height_m: float
    cross_section_area_m2: float
    columns: int
    head_loss_coefficient: float
    equivalent_damping_ratio: float
    sigma_excursion_m: float
    peak_excursion_m: float
    vertical_leg_height_m: float
    meets_target: bool
    governed_by: str
    message: str

    def absorbers(self, mode: Mode | None = None) -> Absorbers:
        """Return the equivalent-linear column at its design response.

        Parameters
        ----------
        mode : Mode, optional
            Unused: the column's mass is absolute. Accepted so that every
            option's design answers ``absorbers(mode)``.

        Returns
        -------
        Absorbers
            One absorber: mass m_l [kg], coupling alpha, the equivalent damping.
        """
        return Absorbers([self.liquid_mass_kg], [self.frequency_hz],
                         [self.equivalent_damping_ratio], [self.length_ratio])

    @property
    def damping_gain_s_per_m(self) -> float:
        """zeta_eq per unit rms liquid velocity, xi / (sqrt(2 pi) L omega_l) [s/m]."""
        return column_damping_gain(self.head_loss_coefficient, self.liquid_length_m,
                                   self.frequency_hz)


def size_liquid_column(loaded: LoadedMode, target_peak_m_s2: float, *, max_mass_ratio: float,
                       settings: ColumnSettings = ColumnSettings(),
                       iterations: int = 6) -> ColumnDesign:
    """Return the least liquid mass of a TLCD that meets a peak-acceleration target.

    Parameters
    ----------
    loaded : LoadedMode
        The mode under its design load, with the reporting conventions.
    target_peak_m_s2 : float
        Peak acceleration target at the evaluation height [m/s^2].
    max_mass_ratio : float
        Largest liquid mass over M* considered [-].
    settings : ColumnSettings
        Layout: alpha, number of columns, excursion limit, density.
    iterations : int
        The excursion limit depends on L and so on the tuning; the sizing is
        repeated with the limit of the previous tuning this many times at most.

    Returns
    -------
    ColumnDesign

    Notes
    -----
    L = 2 g / omega_l^2, B = alpha L, still height in each leg
    h = (1 - alpha) L / 2, cross-section per column A = m_l / (n rho L);
    peak excursion y_peak <= max_excursion_ratio * h (and <= the freeboard
    where one is given); the vertical legs are h + freeboard high, the
    freeboard being the given one or, here, y_peak (see
    :mod:`tmd.sizing.freeboard` for the longest return period's). The head-loss coefficient is
    xi = zeta_eq sqrt(2 pi) L omega_l / sigma_y' with zeta_eq the optimal
    equivalent damping (Gao, Kwok & Samali 1997 for the linearisation).
    """
    alpha = settings.length_ratio
    if not 0 < alpha < 1:
        raise ValueError(f"length_ratio must lie in (0, 1), got {alpha!r}")
    mode = loaded.mode
    frequency = mode.frequency_hz
    sizing = None
    for _ in range(iterations):
        limit = settings.max_excursion_ratio * leg_height_m(column_length_m(frequency), alpha)
        if settings.freeboard_m is not None:
            limit = min(limit, settings.freeboard_m)
        sizing = least_coupled_mass(loaded, target_peak_m_s2, alpha, max_mass_ratio=max_mass_ratio,
                                    max_coordinate_m=limit)
        if sizing.governed_by == "bare" or abs(sizing.frequency_hz / frequency - 1) < 1e-6:
            break
        frequency = sizing.frequency_hz
    return _column_design(loaded, sizing, settings)


def _column_design(loaded, sizing: CoupledSizing, settings: ColumnSettings) -> ColumnDesign:
    mode, alpha = loaded.mode, settings.length_ratio
    length = float(column_length_m(sizing.frequency_hz))
    if sizing.governed_by == "bare":
        # No column is needed: no liquid, so nothing moves and nothing is sized.
        return ColumnDesign(
            liquid_mass_kg=0.0, mass_ratio=0.0, participating_mass_kg=0.0, rigid_mass_kg=0.0,
            frequency_hz=sizing.frequency_hz, length_ratio=alpha, liquid_length_m=0.0,
            horizontal_length_m=0.0, vertical_liquid_height_m=0.0, cross_section_area_m2=0.0,
            columns=0, head_loss_coefficient=0.0, equivalent_damping_ratio=0.0,
            sigma_excursion_m=0.0, peak_excursion_m=0.0, vertical_leg_height_m=0.0,
            meets_target=sizing.meets_target, governed_by="bare", message=sizing.message)
    mass = sizing.mass_ratio * mode.modal_mass_kg
    a = loaded.assess(sizing.absorbers(mode))
    sigma_v = TWO_PI * float(np.sqrt(_stroke_m2(loaded, sizing.absorbers(mode))))
    xi = head_loss_for_damping(sizing.damping_ratio, sigma_v, length, sizing.frequency_hz)
    h = float(leg_height_m(length, alpha))
    peak = float(a.peak_stroke_m[0])
    return ColumnDesign(
        liquid_mass_kg=mass, mass_ratio=sizing.mass_ratio,
        participating_mass_kg=alpha**2 * mass, rigid_mass_kg=(1 - alpha**2) * mass,
        frequency_hz=sizing.frequency_hz, length_ratio=alpha, liquid_length_m=length,
        horizontal_length_m=alpha * length, vertical_liquid_height_m=h,
        cross_section_area_m2=float(mass) / (settings.columns * settings.density_kg_m3 * length),
        columns=settings.columns, head_loss_coefficient=xi,
        equivalent_damping_ratio=sizing.damping_ratio, sigma_excursion_m=float(a.sigma_stroke_m[0]),
        peak_excursion_m=peak,
        vertical_leg_height_m=h + (peak if settings.freeboard_m is None else settings.freeboard_m),
        meets_target=sizing.meets_target, governed_by=sizing.governed_by,
        message=sizing.message)


def least_coupled_mass(loaded: LoadedMode, target_peak_m_s2: float, coupling: float, *,
                       max_mass_ratio: float, max_coordinate_m: float | None = None,
                       min_mass_ratio: float = 1e-4) -> CoupledSizing:
    """Return the least total mass of one linear absorber of coupling beta meeting the target.

    Parameters
    ----------
    loaded : LoadedMode
        The mode under its design load, with the reporting conventions.
    target_peak_m_s2 : float
        Peak acceleration target [m/s^2].
    coupling : float
        beta in (0, 1] [-] (alpha for a column, sqrt(m1 / m_w) for a tank).
    max_mass_ratio : float
        Largest total absorber mass over M* [-].
    max_coordinate_m : float, optional
        Limit on the peak of the absorber coordinate r [m] (liquid excursion
        for a column).
    min_mass_ratio : float
        Smallest total absorber mass over M* searched [-].

    Returns
    -------
    CoupledSizing

    Notes
    -----
    m T = (1 - beta^2) m + beta^2 m (1 + omega^2 / D): the absorber is a TMD
    of mass beta^2 m on a mode of mass M' = M* + (1 - beta^2) m with the same
    stiffness and dashpot (f' = f_s sqrt(M*/M'), zeta' = zeta_s sqrt(M*/M')),
    its stroke u = r / beta. The best tuning at each mass comes from
    :func:`tmd.design.tune` on that mode; the least mass by Brent's method.
    """
    if not 0 < coupling <= 1:
        raise ValueError(f"coupling must lie in (0, 1], got {coupling!r}")
    bare = bare_response(loaded)
    if meets_target(bare.peak_acceleration_m_s2, target_peak_m_s2):
        return CoupledSizing(0.0, loaded.mode.frequency_hz, _ZETA_BRACKET[0], coupling, True,
                             "bare", "the bare building already meets the target: no damper is "
                             "needed")
    stroke = None if max_coordinate_m is None else max_coordinate_m / coupling
    tunings = {}

    def best(mu):
        # One tuning per mass ratio: the answer is the tuning the search saw.
        split, mu_tmd = _split_case(loaded, mu, coupling)
        if mu not in tunings:
            tunings[mu] = tune(split, mu_tmd, max_stroke_m=stroke)
        return split, tunings[mu]

    def sizing(mu, meets, governed, message):
        split, t = best(mu)
        return CoupledSizing(mu, t.frequency_ratio * split.mode.frequency_hz, t.damping_ratio,
                             coupling, meets, governed, message)

    def reported_meets(mu):
        # The verdict on the coupled absorber on the case's own mode, as reported.
        a = loaded.assess(sizing(mu, True, "", "").absorbers(loaded.mode))
        return meets_target(float(np.ravel(a.peak_acceleration_m_s2)[0]), target_peak_m_s2)

    _, top = best(max_mass_ratio)
    if not meets_target(top.value, target_peak_m_s2):
        limit = "stroke" if top.stroke_limited or not np.isfinite(top.value) else "mass"
        reason = "the excursion limit" if limit == "stroke" else "the largest mass ratio"
        return sizing(max_mass_ratio, False, limit, (
            f"the target {target_peak_m_s2:.4g} m/s^2 cannot be met within mass ratio "
            f"{max_mass_ratio:g} (limited by {reason})"))

    mu = smallest_meeting_mass_ratio(lambda x: best(x)[1].value, target_peak_m_s2,
                                     min_mass_ratio, max_mass_ratio, accept=reported_meets)
    _, t = best(mu)
    met = reported_meets(mu)
    verdict = "meets" if met else "does not meet"
    if mu == min_mass_ratio and t.value < target_peak_m_s2 * (1 - 1e-4):
        return sizing(mu, met, "minimum", f"the smallest mass ratio searched, {mu:g}, already "
                      f"{verdict} the target {target_peak_m_s2:.4g} m/s^2")
    governed = "target" if abs(t.value / target_peak_m_s2 - 1) < 1e-4 else "stroke"
    return sizing(mu, met, governed, f"least mass ratio {mu:.5g} {verdict} the target "
                  f"{target_peak_m_s2:.4g} m/s^2" + (" (set by the excursion limit)"
                                                      if governed == "stroke" else ""))


def _split_case(loaded: LoadedMode, mass_ratio: float, coupling: float):
    """Return the mode carrying the rigid part of the absorber, and the TMD mass ratio on it."""
    m = loaded.mode
    scale = 1.0 + (1.0 - coupling**2) * mass_ratio
    root = math.sqrt(scale)
    mode = Mode(m.frequency_hz / root, m.modal_mass_kg * scale, m.damping_ratio / root)
    split = LoadedMode(mode, loaded.spectrum, loaded.duration_s, loaded.shape_factor,
                       loaded.peak_method)
    return split, coupling**2 * mass_ratio / scale


def velocity_proportional_fixed_point(loaded: LoadedMode, mass_kg: float, frequency_hz: float,
                                      coupling: float, gain_s_per_m: float, *,
                                      damping_floor: float = 0.0, frequency_scale=1.0
                                      ) -> tuple[np.ndarray, Assessment]:
    """Equivalent damping of an absorber whose damping grows with its velocity rms.

    Parameters
    ----------
    loaded : LoadedMode
        The mode under its design load, with the reporting conventions.
    mass_kg, frequency_hz, coupling : float
        The absorber (total mass [kg], own frequency [Hz], beta [-]).
    gain_s_per_m : float
        zeta_eq = damping_floor + gain * sigma_r' with sigma_r' the rms
        velocity of the absorber coordinate [m/s]; for a column
        xi / (sqrt(2 pi) L omega_l) (:func:`column_damping_gain`).
    damping_floor : float
        Amplitude-independent part of the damping ratio [-].
    frequency_scale : float or array
        Structure frequency factor s (f_s -> s f_s, M* kept, zeta_s by the
        band definition :meth:`tmd.design.LoadedMode.structure_damping_ratio`),
        a batch of scenarios solved together.

    Returns
    -------
    zeta_eq : array
        Fixed point per scenario [-].
    Assessment
        The engine's responses at the fixed point.

    Notes
    -----
    sigma_r' = 2 pi sqrt(m2) with m2 the engine's second stroke moment
    [m^2 Hz^2]. sigma_r' falls as zeta rises, so
    log zeta - log(floor + gain sigma_r'(zeta)) increases monotonically and
    its root is found elementwise (Chandrupatla,
    ``scipy.optimize.elementwise.find_root``). Where the absorber is not
    excited (no liquid, or no gain) floor + gain sigma_r' is zero and the
    fixed point is the floor; it is held at the bracket's lower end
    (1e-5), so that a damper that is not needed gives finite numbers.

    Raises
    ------
    tmd.errors.NonFiniteResult
        If the fixed point cannot be found, with the scenario and values.
    """
    scale = np.atleast_1d(np.asarray(frequency_scale, float))
    m = loaded.mode
    fs = m.frequency_hz * scale
    zeta_s = np.broadcast_to(loaded.structure_damping_ratio(scale), scale.shape)

    def absorbers(zeta):
        return Absorbers(np.full(zeta.shape + (1,), mass_kg), np.full(zeta.shape + (1,),
                         frequency_hz), zeta[..., None], np.full(zeta.shape + (1,), coupling))

    def gap(log_zeta, fs_, zeta_s_):
        zeta = np.exp(log_zeta)
        sigma_v = TWO_PI * np.sqrt(_stroke_m2(loaded, absorbers(zeta), fs_, zeta_s_))
        return log_zeta - np.log(np.maximum(damping_floor + gain_s_per_m * sigma_v,
                                            _ZETA_BRACKET[0]))

    lo, hi = (np.full(scale.shape, math.log(b)) for b in _ZETA_BRACKET)
    result = find_root(gap, (lo, hi), args=(fs, zeta_s),
                       tolerances={"xatol": 1e-12, "xrtol": 1e-12})
    zeta = np.exp(result.x)
    if not np.all(np.isfinite(zeta)):
        bad = int(np.flatnonzero(~np.isfinite(zeta))[0])
        raise NonFiniteResult(
            f"the equivalent damping of the liquid absorber (mass {mass_kg:.6g} kg, "
            f"{frequency_hz:.6g} Hz, coupling {coupling:.6g}, gain {gain_s_per_m:.6g} s/m, "
            f"floor {damping_floor:.6g}) has no fixed point in {_ZETA_BRACKET} at structure "
            f"frequency factor {scale[bad]:.6g}")
    a = _assess(loaded, absorbers(zeta), fs, zeta_s)
    return zeta, a


def _assess(loaded: LoadedMode, absorbers: Absorbers, frequency_hz=None,
            damping_ratio=None) -> Assessment:
    m = loaded.mode
    fs = m.frequency_hz if frequency_hz is None else frequency_hz
    zeta = m.damping_ratio if damping_ratio is None else damping_ratio
    return assess(fs, m.modal_mass_kg, zeta, absorbers, loaded.spectrum,
                  loaded.duration_s, shape_factor=loaded.shape_factor,
                  peak_method=loaded.peak_method)


def _stroke_m2(loaded: LoadedMode, absorbers: Absorbers, frequency_hz=None,
               damping_ratio=None) -> np.ndarray:
    """Second spectral moment of the (single) absorber coordinate [m^2 Hz^2]."""
    m = loaded.mode
    fs = m.frequency_hz if frequency_hz is None else frequency_hz
    zeta = m.damping_ratio if damping_ratio is None else damping_ratio
    r = spectral_response(fs, m.modal_mass_kg, zeta, absorbers, loaded.spectrum)
    return r.stroke.m2[..., 0]
