"""Sloshing-water tanks (tuned liquid dampers): least-mass sizing on a mode under load.

The tanks' layout settings and their sloshing, screen and boundary-layer
formulas are :mod:`tmd.dampers.sloshing`; the tanks act as one linear
absorber of coupling beta = sqrt(m_1 / m_w) whose least mass comes from
:func:`tmd.sizing.liquid_column.least_coupled_mass`.

References
----------
See :mod:`tmd.dampers.sloshing`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from tmd.dampers.absorber import Absorbers
from tmd.dampers.liquid_column import TWO_PI
from tmd.dampers.sloshing import (
    TankSettings,
    intrinsic_damping_ratio,
    screen_damping_per_loss_coefficient,
    sloshing_mass_fraction,
    tank_length_m,
    wall_elevation_per_displacement,
)
from tmd.design import LoadedMode
from tmd.sizing.liquid_column import CoupledSizing, _stroke_m2, least_coupled_mass


@dataclass(frozen=True)
class TankDesign:
    """Sized sloshing tanks with what their specification needs (SI).

    All zero (and ``tank_count`` 0) when no tank is needed.

    Parameters
    ----------
    water_mass_kg : float
        Total water mass m_w of all tanks [kg].
    mass_ratio : float
        m_w / M* [-].
    participating_mass_kg : float
        The first mode's sloshing mass m_1 [kg].
    rigid_mass_kg : float
        m_w - m_1 [kg], the water that moves with the tank.
    coupling : float
        beta = sqrt(m_1 / m_w) [-].
    frequency_hz : float
        First sloshing frequency f_1 [Hz].
    tank_length_m : float
        L, inside length in the direction of motion [m].
    water_depth_m : float
        h, still water depth [m].
    tank_width_m : float
        b, inside width of each tank across the motion [m].
    tank_count : int
        Number of equal tanks side by side.
    screen_positions : tuple of float
        Screen positions x_s / L from one wall [-].
    screen_loss_coefficient : float
        C_l of each screen [-] giving the equivalent damping at the design
        response (0 without screens).
    equivalent_damping_ratio : float
        Statistically linearised damping ratio at the design response [-],
        referred to f_1, not below the intrinsic one.
    intrinsic_damping_ratio : float
        Boundary-layer damping ratio of the unscreened tank [-].
    damping_gain_s_per_m : float
        Screen damping ratio per unit rms velocity of the absorber coordinate
        r = beta u [s/m].
    peak_sloshing_displacement_m : float
        Peak displacement u of the sloshing mass relative to the tank [m].
    peak_free_surface_elevation_m : float
        Peak wave height at the wall A [m], to compare with the freeboard.
    freeboard_m : float or None
        Tank height above still water [m] (None: no limit).
    meets_target : bool
        Whether the design's peak acceleration meets the target.
    governed_by : str
        What decided the mass, as in :class:`tmd.design.Sizing`.
    message : str
        The outcome in one plain sentence.
    """

    water_mass_kg: float
    mass_ratio: float
    participating_mass_kg: float
    rigid_mass_kg: float
    coupling: float
    frequency_hz: float
    tank_length_m: float
    water_depth_m: float
    tank_width_m: float
    tank_count: int
    screen_positions: tuple[float, ...]
    screen_loss_coefficient: float
    equivalent_damping_ratio: float
    intrinsic_damping_ratio: float
    damping_gain_s_per_m: float
    peak_sloshing_displacement_m: float
    peak_free_surface_elevation_m: float
    freeboard_m: float | None
    meets_target: bool
    governed_by: str
    message: str

    def absorbers(self, mode=None) -> Absorbers:
        """Return the equivalent-linear tanks at their design response.

        Parameters
        ----------
        mode : Mode, optional
            Unused: the water mass is absolute. Accepted so that every
            option's design answers ``absorbers(mode)``.

        Returns
        -------
        Absorbers
            One absorber: mass m_w [kg], coupling beta, the equivalent damping.
        """
        return Absorbers([self.water_mass_kg], [self.frequency_hz],
                         [self.equivalent_damping_ratio], [self.coupling])


def size_sloshing_tanks(loaded: LoadedMode, target_peak_m_s2: float, *, max_mass_ratio: float,
                        settings: TankSettings = TankSettings()) -> TankDesign:
    """Return the least water mass of screened rectangular tanks meeting a peak target.

    Parameters
    ----------
    loaded : LoadedMode
        The mode under its design load, with the reporting conventions.
    target_peak_m_s2 : float
        Peak acceleration target [m/s^2].
    max_mass_ratio : float
        Largest water mass over M* [-].
    settings : TankSettings
        Layout: depth ratio h / L, largest tank width, freeboard, screen
        positions and the water's properties.

    Returns
    -------
    TankDesign

    Notes
    -----
    With h / L fixed, beta^2 = m_1/m_w is fixed and the least mass follows
    from :func:`tmd.sizing.liquid_column.least_coupled_mass`, with the wall
    wave height limit A <= freeboard turned into r <= freeboard beta pi /
    (4 tanh(pi h/L)). L follows from the tuned frequency:
    L = pi g tanh(pi h/L) / omega_1^2. The screens' loss coefficient is the
    one whose equivalent damping at the design response is the optimal one.
    """
    ratio = settings.depth_ratio
    fraction = float(sloshing_mass_fraction(ratio))
    beta = math.sqrt(fraction)
    limit = None
    if settings.freeboard_m is not None:
        limit = settings.freeboard_m * beta / wall_elevation_per_displacement(ratio)
    sizing = least_coupled_mass(loaded, target_peak_m_s2, beta, max_mass_ratio=max_mass_ratio,
                                max_coordinate_m=limit)
    return _tank_design(loaded, sizing, settings, fraction)


def _tank_design(loaded, sizing: CoupledSizing, settings: TankSettings, fraction) -> TankDesign:
    mode, ratio, beta = loaded.mode, settings.depth_ratio, sizing.coupling
    if sizing.governed_by == "bare":
        # No tank is needed: no water, so nothing sloshes and nothing is sized.
        return TankDesign(
            water_mass_kg=0.0, mass_ratio=0.0, participating_mass_kg=0.0, rigid_mass_kg=0.0,
            coupling=beta, frequency_hz=sizing.frequency_hz, tank_length_m=0.0,
            water_depth_m=0.0, tank_width_m=0.0, tank_count=0, screen_positions=(),
            screen_loss_coefficient=0.0, equivalent_damping_ratio=0.0,
            intrinsic_damping_ratio=0.0, damping_gain_s_per_m=0.0,
            peak_sloshing_displacement_m=0.0, peak_free_surface_elevation_m=0.0,
            freeboard_m=settings.freeboard_m, meets_target=sizing.meets_target,
            governed_by="bare", message=sizing.message)
    length = float(tank_length_m(sizing.frequency_hz, ratio))
    depth = ratio * length
    water = sizing.mass_ratio * mode.modal_mass_kg
    total_width = water / (settings.density_kg_m3 * length * depth)
    count = max(1, math.ceil(total_width / settings.max_tank_width_m - 1e-9))
    width = total_width / count
    floor = float(intrinsic_damping_ratio(depth, width, sizing.frequency_hz,
                                          settings.kinematic_viscosity_m2_s))
    a = loaded.assess(sizing.absorbers(mode))
    sigma_rv = TWO_PI * float(np.sqrt(_stroke_m2(loaded, sizing.absorbers(mode))))
    # zeta = floor + gain_r sigma_r'; the screens supply what the floor does not.
    screen_zeta = max(sizing.damping_ratio - floor, 0.0)
    gain_r = screen_zeta / sigma_rv
    per_cl = screen_damping_per_loss_coefficient(length, depth, sizing.frequency_hz,
                                                 settings.screen_positions)
    loss = gain_r * beta / per_cl if settings.screen_positions else 0.0
    peak_u = float(a.peak_stroke_m[0]) / beta
    return TankDesign(
        water_mass_kg=water, mass_ratio=sizing.mass_ratio, participating_mass_kg=fraction * water,
        rigid_mass_kg=(1 - fraction) * water, coupling=beta, frequency_hz=sizing.frequency_hz,
        tank_length_m=length, water_depth_m=depth, tank_width_m=width, tank_count=count,
        screen_positions=tuple(settings.screen_positions), screen_loss_coefficient=float(loss),
        equivalent_damping_ratio=max(sizing.damping_ratio, floor), intrinsic_damping_ratio=floor,
        damping_gain_s_per_m=gain_r,
        peak_sloshing_displacement_m=peak_u,
        peak_free_surface_elevation_m=float(wall_elevation_per_displacement(ratio)) * peak_u,
        freeboard_m=settings.freeboard_m, meets_target=sizing.meets_target,
        governed_by=sizing.governed_by, message=sizing.message)
