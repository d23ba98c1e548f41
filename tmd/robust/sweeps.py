"""Detuning sweeps and the worst case over a band of structure frequencies.

The structure frequency factor s scales f_s with the modal mass held (k_s by
s^2); the damper keeps its absolute mass, spring and dashpot. Every sweep is
one batched engine call (:func:`tmd.performance.assess`).

References
----------
EN 1991-1-4:2005, Annex F.5 (aerodynamic damping proportional to 1/n_1).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
from scipy.optimize import minimize_scalar

from tmd.dampers.absorber import Absorbers
from tmd.dampers.tuned_mass import TunedMassDamper
from tmd.defaults import DASHPOT_RANGE, SPRING_RANGE, SWEEP_RANGE
from tmd.design import LoadedMode
from tmd.performance import assess, effective_damping_ratio
from tmd.rules import Band, require

SWEEP_POINTS = 41           # s step 0.01 over +/-20%
DAMPER_SWEEP_POINTS = 21
BAND_SEARCH_POINTS = 81     # grid of the band-maximum search before refinement

StructureDamping = Callable[[np.ndarray], np.ndarray]


@dataclass(frozen=True)
class AerodynamicDamping:
    """Structure damping that varies with the structure frequency factor.

    zeta_s(s) = structural_ratio + aerodynamic_ratio / s: the along-wind
    aerodynamic damping is inversely proportional to the natural frequency.

    Parameters
    ----------
    structural_ratio : float
        Structural damping ratio, independent of s [-].
    aerodynamic_ratio : float
        Aerodynamic damping ratio at the nominal frequency (s = 1) [-].

    References
    ----------
    EN 1991-1-4:2005, Annex F.5 (aerodynamic damping proportional to 1/n_1).
    """

    structural_ratio: float
    aerodynamic_ratio: float

    def __call__(self, frequency_factor):
        """Return zeta_s(s) = structural + aerodynamic / s [-].

        Parameters
        ----------
        frequency_factor : float or array
            s = f_s' / f_s [-], > 0.

        Returns
        -------
        float or numpy.ndarray
            The structure's damping ratio at each s [-].
        """
        s = np.asarray(frequency_factor, float)
        return self.structural_ratio + self.aerodynamic_ratio / s


@dataclass(frozen=True)
class BandMaximum:
    """The worst peak acceleration over a band of structure frequency factors.

    Parameters
    ----------
    peak_acceleration_m_s2 : float
        Largest peak acceleration at the evaluation height over the band [m/s^2].
    structure_frequency_factor : float
        s = f_s' / f_s [-] at which it occurs.
    """

    peak_acceleration_m_s2: float
    structure_frequency_factor: float


# --- sweeps -------------------------------------------------------------------

def sweep_structure_frequency(loaded: LoadedMode, damper: TunedMassDamper | None, *,
                              sweep_range: float = SWEEP_RANGE, points: int = SWEEP_POINTS,
                              structure_damping_ratio: StructureDamping | None = None
                              ) -> list[dict]:
    """Responses over structure frequency factors s in [1 - r, 1 + r], s = 1 included.

    Parameters
    ----------
    loaded : LoadedMode
        The mode under its design load, with the reporting conventions.
    damper : TunedMassDamper or None
        The design (absolute m_d, k_d, c_d kept as s varies); None for the
        bare building.
    sweep_range : float
        Half-width r [-].
    points : int
        Number of points (made odd so that s = 1 is one of them).
    structure_damping_ratio : callable, optional
        zeta_s(s) [-]; default the case's band definition
        (:meth:`tmd.design.LoadedMode.structure_damping_ratio`).

    Returns
    -------
    list of dict
        ``structure_frequency_factor`` [-], ``peak_acceleration_m_s2``,
        ``peak_stroke_m`` (None for the bare building),
        ``effective_damping_ratio`` [-].

    Notes
    -----
    The swept structure has f_s' = s f_s, M* unchanged, zeta_s' = zeta_s(s).
    The effective damping is that of the swept bare structure (same s and
    M*) with the same rms acceleration at the damper level
    (:func:`tmd.performance.effective_damping_ratio`); for the bare building
    it is zeta_s(s) by definition.
    """
    s = factor_grid(sweep_range, points)
    a, zeta_s = assess_structure_factors(loaded, damper, s, structure_damping_ratio)
    if damper is None:
        return _points("structure_frequency_factor", s, a.peak_acceleration_m_s2, None, zeta_s)
    zeta_eff = effective_damping_ratio(s * loaded.mode.frequency_hz, loaded.mode.modal_mass_kg,
                                       a.sigma_acceleration_m_s2 / loaded.shape_factor,
                                       loaded.spectrum)
    return _points("structure_frequency_factor", s, a.peak_acceleration_m_s2,
                   a.peak_stroke_m[..., 0], zeta_eff)


def sweep_damper_frequency(loaded: LoadedMode, damper: TunedMassDamper, *,
                           spring_range: float = SPRING_RANGE,
                           points: int = DAMPER_SWEEP_POINTS) -> list[dict]:
    """Responses of the nominal structure with the damper's spring off its design value.

    Parameters
    ----------
    loaded : LoadedMode
        The mode under its design load, with the reporting conventions.
    damper : TunedMassDamper
        The TMD by mass ratio, frequency ratio and damping ratio (relative to the mode).
    spring_range : float
        Half-width of the spring stiffness factor k_d'/k_d in
        [1 - r, 1 + r] [-] (default +/-10%, an as-built tolerance).
    points : int
        Number of points (made odd so that the design point is one of them).

    Returns
    -------
    list of dict
        ``damper_frequency_factor`` = f_d'/f_d [-], ``damper_stiffness_factor``
        = k_d'/k_d [-], ``peak_acceleration_m_s2``, ``peak_stroke_m``,
        ``effective_damping_ratio`` [-].

    Notes
    -----
    The damper keeps its mass and dashpot: f_d' = f_d sqrt(k_d'/k_d), so a
    +/-10% spring spans f_d'/f_d in [sqrt(0.9), sqrt(1.1)] = [0.949, 1.049],
    and zeta_d' = zeta_d f_d / f_d' (c_d = 2 zeta_d m_d omega_d fixed).
    """
    stiffness = factor_grid(spring_range, points)
    factor = np.sqrt(stiffness)
    m = loaded.mode
    absorbers = Absorbers.tuned_masses(
        np.full((factor.size, 1), damper.mass_kg(m)),
        (damper.frequency_hz(m) * factor)[:, None],
        (damper.damping_ratio / factor)[:, None])
    points_ = _damper_points(loaded, absorbers, "damper_frequency_factor", factor)
    for point, k in zip(points_, stiffness, strict=True):
        point["damper_stiffness_factor"] = float(k)
    return points_


def sweep_damper_damping(loaded: LoadedMode, damper: TunedMassDamper, *,
                         dashpot_range: float = DASHPOT_RANGE,
                         points: int = DAMPER_SWEEP_POINTS) -> list[dict]:
    """Responses of the nominal structure with the damper's dashpot off its design value.

    Parameters
    ----------
    loaded : LoadedMode
        The mode under its design load, with the reporting conventions.
    damper : TunedMassDamper
        The TMD by mass ratio, frequency ratio and damping ratio (relative to the mode).
    dashpot_range : float
        Half-width of the dashpot factor c_d'/c_d in [1 - r, 1 + r] [-]
        (default +/-30%).
    points : int
        Number of points (made odd so that the design point is one of them).

    Returns
    -------
    list of dict
        ``damper_damping_factor`` = c_d'/c_d = zeta_d'/zeta_d [-],
        ``peak_acceleration_m_s2``, ``peak_stroke_m``, ``effective_damping_ratio``.

    Notes
    -----
    At fixed m_d and f_d the damping ratio scales with the dashpot.
    """
    factor = factor_grid(dashpot_range, points)
    m = loaded.mode
    absorbers = Absorbers.tuned_masses(
        np.full((factor.size, 1), damper.mass_kg(m)),
        np.full((factor.size, 1), damper.frequency_hz(m)),
        (damper.damping_ratio * factor)[:, None])
    return _damper_points(loaded, absorbers, "damper_damping_factor", factor)


def peak_acceleration_band_max(loaded: LoadedMode, damper: TunedMassDamper | None,
                               frequency_band: float, *, points: int = BAND_SEARCH_POINTS,
                               structure_damping_ratio: StructureDamping | None = None
                               ) -> BandMaximum:
    """Largest peak acceleration for s in [1 - b, 1 + b].

    Parameters
    ----------
    loaded : LoadedMode
        The mode under its design load, with the reporting conventions.
    damper : TunedMassDamper or None
        None for the bare building.
    frequency_band : float
        Half-width b [-]; 0 gives the nominal value.
    points : int
        Grid points of the first search (one engine call).
    structure_damping_ratio : callable, optional
        zeta_s(s) [-].

    Returns
    -------
    BandMaximum

    Notes
    -----
    A grid locates the worst point; ``scipy.optimize.minimize_scalar``
    (bounded) refines it between its grid neighbours. The maximum may lie at
    a band edge or inside the band.
    """
    def peaks(factors):
        a = assess_structure_factors(loaded, damper, factors, structure_damping_ratio)[0]
        return a.peak_acceleration_m_s2

    return band_maximum(peaks, frequency_band, points=points)


def band_maximum(peak_of_factors: Callable[[np.ndarray], np.ndarray], frequency_band: float,
                 *, points: int = BAND_SEARCH_POINTS) -> BandMaximum:
    """Largest peak response of any design over structure frequency factors in [1 - b, 1 + b].

    Parameters
    ----------
    peak_of_factors : callable
        Array of factors s -> array of peak accelerations [m/s^2] (one
        batched engine call).
    frequency_band : float
        Half-width b [-]; 0 gives the nominal value.
    points : int
        Grid points of the first search.

    Returns
    -------
    BandMaximum

    Notes
    -----
    A grid locates the worst point; ``scipy.optimize.minimize_scalar``
    (bounded) refines it between its grid neighbours. The maximum may lie at
    a band edge or inside the band.
    """
    require("frequency_band", frequency_band, Band)
    s = factor_grid(frequency_band, points)
    peak = np.asarray(peak_of_factors(s), float)
    i = int(np.argmax(peak))
    best = BandMaximum(float(peak[i]), float(s[i]))
    if s.size == 1:
        return best
    lo, hi = s[max(i - 1, 0)], s[min(i + 1, s.size - 1)]

    def negative_peak(x):
        return -float(np.asarray(peak_of_factors(np.array([x])), float).ravel()[0])

    res = minimize_scalar(negative_peak, bounds=(lo, hi), method="bounded",
                          options={"xatol": 1e-7})
    if -res.fun > best.peak_acceleration_m_s2:
        return BandMaximum(float(-res.fun), float(res.x))
    return best


# --- pure numpy helpers -------------------------------------------------------

def factor_grid(half_range: float, points: int) -> np.ndarray:
    """Return the factors 1 + r linspace(-1, 1, n), n odd, with the centre exactly 1.

    Parameters
    ----------
    half_range : float
        r >= 0, half-width of the band of factors [-] (e.g. 0.15 for +-15%).
    points : int
        Number of factors; an even number is raised by one so that s = 1 is
        a grid point.

    Returns
    -------
    numpy.ndarray
        The factors s [-], increasing; ``[1.0]`` when ``half_range`` is 0.

    Raises
    ------
    ValueError
        If ``half_range`` is negative.
    """
    if half_range < 0:
        raise ValueError(f"a sweep range must be >= 0, got {half_range!r}")
    if half_range == 0:
        return np.array([1.0])
    n = points + (1 - points % 2)
    grid = 1.0 + half_range * np.linspace(-1.0, 1.0, n)
    grid[n // 2] = 1.0
    return grid


def structure_damping_ratios(loaded: LoadedMode, factors, structure_damping_ratio=None):
    """Return zeta_s at each structure frequency factor [-].

    Parameters
    ----------
    loaded : LoadedMode
        Its :meth:`~tmd.design.LoadedMode.structure_damping_ratio` is the band
        definition used when no other is given.
    factors : array
        Structure frequency factors s [-].
    structure_damping_ratio : callable, optional
        zeta_s(s) [-] replacing the loaded mode's own definition (e.g. a table).

    Returns
    -------
    array
        zeta_s at every factor [-], the shape of ``factors``.
    """
    s = np.asarray(factors, float)
    if structure_damping_ratio is None:
        return np.broadcast_to(loaded.structure_damping_ratio(s), s.shape)
    return np.broadcast_to(np.asarray(structure_damping_ratio(s), float), s.shape)


def assess_structure_factors(loaded: LoadedMode, damper: TunedMassDamper | None, factors,
                             structure_damping_ratio=None):
    """Assess one damper (or none) over structure frequency factors in one engine call.

    Parameters
    ----------
    loaded : LoadedMode
        The mode under its design load, with the reporting conventions.
    damper : TunedMassDamper or None
        The TMD, its absolute mass, frequency and damping fixed as s moves;
        None for the bare structure.
    factors : array
        Structure frequency factors s = f_s' / f_s [-].
    structure_damping_ratio : callable, optional
        zeta_s(s) [-] replacing the loaded mode's own band definition.

    Returns
    -------
    assessment : Assessment
        Responses at every factor (batch shape that of ``factors``).
    zeta_s : numpy.ndarray
        The structure's damping ratio used at each factor [-].
    """
    s = np.asarray(factors, float)
    zeta_s = structure_damping_ratios(loaded, s, structure_damping_ratio)
    m = loaded.mode
    absorbers = Absorbers.none(s.shape) if damper is None else damper.absorbers(m)
    a = assess(s * m.frequency_hz, m.modal_mass_kg, zeta_s, absorbers, loaded.spectrum,
               loaded.duration_s, shape_factor=loaded.shape_factor,
               peak_method=loaded.peak_method)
    return a, zeta_s


def _damper_points(loaded, absorbers, key, factors):
    a = loaded.assess(absorbers)
    m = loaded.mode
    zeta_eff = effective_damping_ratio(m.frequency_hz, m.modal_mass_kg,
                                       a.sigma_acceleration_m_s2 / loaded.shape_factor,
                                       loaded.spectrum)
    return _points(key, factors, a.peak_acceleration_m_s2, a.peak_stroke_m[..., 0], zeta_eff)


def _points(key, factors, peak, stroke, zeta_eff):
    strokes = [None] * len(factors) if stroke is None else [float(v) for v in stroke]
    return [{key: float(f), "peak_acceleration_m_s2": float(p), "peak_stroke_m": u,
             "effective_damping_ratio": float(z)}
            for f, p, u, z in zip(factors, peak, strokes, zeta_eff, strict=True)]
