"""Pendulum TMD: least-mass sizing on a mode under load, then the pendulum's geometry.

The pendulum is sized exactly as a translational TMD (:func:`tmd.design.least_mass`)
and its length follows from the tuned frequency; the model and its formulas are
:mod:`tmd.dampers.pendulum`.

References
----------
Den Hartog, J. P. (1956). Mechanical Vibrations, 4th ed. McGraw-Hill
(absorber theory; the pendulum as an absorber).
"""

from __future__ import annotations

import math
import warnings
from dataclasses import dataclass

from tmd.dampers.pendulum import PendulumSettings, pendulum_length_m, swing_angle_rad
from tmd.design import LoadedMode, Sizing, TmdDesign, least_mass


class SwingAngleWarning(UserWarning):
    """A pendulum's peak stroke exceeds its length: no swing angle reaches it."""


@dataclass(frozen=True)
class PendulumDesign:
    """A sized pendulum damper: the TMD design plus its geometry (SI).

    Parameters
    ----------
    tmd : TmdDesign
        The translational TMD the pendulum realises (mass, tuning, responses).
    length_m : float
        Total pendulum length L = g / (2 pi f_d)^2 [m].
    stages : int
        Number of equal nested stages.
    stage_length_m : float
        Length of each stage, L / n [m].
    peak_swing_angle_rad : float
        Swing angle at the peak stroke, asin(u_peak / L) [rad]; NaN when the
        stroke exceeds the length.
    """

    tmd: TmdDesign
    length_m: float
    stages: int
    stage_length_m: float
    peak_swing_angle_rad: float


def size_pendulum(loaded: LoadedMode, target_peak_m_s2: float, *, max_mass_ratio: float,
                  max_stroke_m: float | None = None,
                  settings: PendulumSettings = PendulumSettings()) -> tuple[Sizing,
                                                                             PendulumDesign | None]:
    """Return the least-mass pendulum damper meeting a peak-acceleration target.

    Parameters
    ----------
    loaded : LoadedMode
        The mode under its design load, with the reporting conventions.
    target_peak_m_s2 : float
        Peak acceleration target [m/s^2].
    max_mass_ratio : float
        Largest mass ratio [-].
    max_stroke_m : float, optional
        Peak stroke (horizontal swing of the mass) limit [m].
    settings : PendulumSettings
        How the pendulum is built (number of stages).

    Returns
    -------
    (Sizing, PendulumDesign or None)
        The TMD sizing (:func:`tmd.design.least_mass`) and the pendulum's
        geometry (None when no damper is needed).

    Notes
    -----
    L = g / (2 pi f_d)^2, stage length L / n, theta = asin(u_peak / L).

    References
    ----------
    Small-swing pendulum, common practice; see :mod:`tmd.dampers.pendulum`.
    """
    sizing = least_mass(loaded, target_peak_m_s2, max_mass_ratio=max_mass_ratio,
                        max_stroke_m=max_stroke_m)
    if sizing.design is None:
        return sizing, None
    return sizing, pendulum_design(sizing.design, settings)


def pendulum_design(design: TmdDesign, settings: PendulumSettings = PendulumSettings()
                    ) -> PendulumDesign:
    """Return the pendulum geometry of a TMD design.

    Parameters
    ----------
    design : TmdDesign
        The TMD the pendulum realises (its frequency sets the length).
    settings : PendulumSettings
        Number of stages.

    Returns
    -------
    PendulumDesign
        ``peak_swing_angle_rad`` is NaN (null in results.json) where the peak
        stroke exceeds the pendulum's length, with a
        :class:`SwingAngleWarning` saying so.

    Notes
    -----
    L = g / (2 pi f_d)^2; theta = asin(u_peak / L), which has no value for
    u_peak > L: no pendulum of that length swings that far, and the
    small-swing linear model behind the sizing no longer holds.
    """
    length = float(pendulum_length_m(design.frequency_hz))
    angle = float(swing_angle_rad(design.peak_stroke_m, length))
    if math.isnan(angle):
        warnings.warn(
            f"the pendulum's peak swing angle has no value (null): its peak stroke "
            f"{design.peak_stroke_m:.4g} m exceeds its length {length:.4g} m (at "
            f"{design.frequency_hz:.4g} Hz), so no swing reaches it and the small-swing model "
            "does not hold; limit the stroke ([damper] max_stroke_m) or choose another option",
            SwingAngleWarning, stacklevel=2)
    return PendulumDesign(design, length, settings.stages, length / settings.stages, angle)
