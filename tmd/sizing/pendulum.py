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

from dataclasses import dataclass

from tmd.dampers.pendulum import PendulumSettings, pendulum_length_m, swing_angle_rad
from tmd.design import LoadedMode, Sizing, TmdDesign, least_mass


@dataclass(frozen=True)
class PendulumDesign:
    """A sized pendulum damper: the TMD design plus its geometry (SI)."""

    tmd: TmdDesign
    length_m: float
    stages: int
    stage_length_m: float
    peak_swing_angle_rad: float


def size_pendulum(loaded: LoadedMode, target_peak_m_s2: float, *, max_mass_ratio: float,
                  max_stroke_m: float | None = None,
                  settings: PendulumSettings = PendulumSettings()) -> tuple[Sizing,
                                                                             PendulumDesign | None]:
    """Least-mass pendulum damper meeting a peak-acceleration target.

    Parameters
    ----------
    loaded : LoadedMode
    target_peak_m_s2 : float
        Peak acceleration target [m/s^2].
    max_mass_ratio : float
        Largest mass ratio [-].
    max_stroke_m : float, optional
        Peak stroke (horizontal swing of the mass) limit [m].
    settings : PendulumSettings

    Returns
    -------
    (Sizing, PendulumDesign or None)
        The TMD sizing (:func:`tmd.design.least_mass`) and the pendulum's
        geometry (None when no damper is needed).

    Notes
    -----
    L = g / (2 pi f_d)^2, stage length L / n, theta = asin(u_peak / L).
    """
    sizing = least_mass(loaded, target_peak_m_s2, max_mass_ratio=max_mass_ratio,
                        max_stroke_m=max_stroke_m)
    if sizing.design is None:
        return sizing, None
    return sizing, pendulum_design(sizing.design, settings)


def pendulum_design(design: TmdDesign, settings: PendulumSettings = PendulumSettings()
                    ) -> PendulumDesign:
    """The pendulum geometry of a TMD design."""
    length = float(pendulum_length_m(design.frequency_hz))
    return PendulumDesign(design, length, settings.stages, length / settings.stages,
                          float(swing_angle_rad(design.peak_stroke_m, length)))
