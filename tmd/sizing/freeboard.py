"""Liquid dampers at every return period: the liquid's rise against the freeboard.

A liquid damper sized at the serviceability wind must keep its liquid inside
the container at the extreme one. At every reported load this module
evaluates the specified device (its head-loss or screen coefficient fixed,
the equivalent damping re-solved at that load's response, as in
:func:`tmd.sizing.liquid_column.velocity_proportional_fixed_point`) and
compares, by the one verdict ``value <= limit``:

* liquid column: the peak excursion y_peak along the column (the rise of the
  surface in a vertical leg) with the freeboard, the legs' height above the
  still liquid;
* sloshing tank: the peak wave height at the wall,
  A = (4 / pi) tanh(pi h / L) u_peak (:mod:`tmd.dampers.sloshing`), with the
  tank's freeboard.

Peaks are Davenport's g sigma of the statistically linearised (Gaussian)
response: a spectral estimate. ``tmd simulate`` gives the time-domain share
of records that overflow.

References
----------
Gao, H., Kwok, K. C. S. and Samali, B. (1997). Optimization of tuned liquid
column dampers. Engineering Structures 19(6), 476-486 (statistical
linearisation of the head loss).
Tait, M. J. (2008). Modelling and preliminary design of a structure-TLD system.
Engineering Structures 30, 2644-2655 (equivalent linear sloshing damper).
"""

from __future__ import annotations

import numpy as np

from tmd.dampers.sloshing import wall_elevation_per_displacement
from tmd.sizing.liquid_column import ColumnDesign, velocity_proportional_fixed_point
from tmd.sizing.sloshing import TankDesign
from tmd.verdict import meets_target

FREEBOARD_NOTE = (
    "Liquid rise against the freeboard at every return period: the device as specified (head-loss "
    "or screen coefficient fixed, equivalent damping re-solved at each wind), peaks g sigma of "
    "the linearised Gaussian response (a spectral estimate; tmd simulate gives the time-domain "
    "overflow share).")


class FreeboardWarning(UserWarning):
    """A liquid damper's peak rise exceeds its freeboard at some return period."""


def column_by_return_period(loads, design: ColumnDesign) -> list[dict]:
    """Return the specified liquid column at every load: peak excursion and damping.

    Parameters
    ----------
    loads : sequence of (return period [years], LoadedMode)
        Every reported load, in increasing return period.
    design : ColumnDesign
        The sized column (liquid mass, frequency, alpha, head-loss coefficient).

    Returns
    -------
    list of dict
        ``return_period_years``, ``peak_acceleration_m_s2``,
        ``equivalent_damping_ratio`` [-], ``peak_excursion_m`` and
        ``peak_excursion_ratio`` (over the still liquid height in a leg) [-].

    Notes
    -----
    zeta_eq = xi sigma_y' / (sqrt(2 pi) L omega_l) at each load's own
    response (Gao, Kwok & Samali 1997).
    """
    rows = []
    for period, load in loads:
        zeta, a = velocity_proportional_fixed_point(
            load, design.liquid_mass_kg, design.frequency_hz, design.length_ratio,
            design.damping_gain_s_per_m)
        peak = float(np.ravel(a.peak_stroke_m)[0])
        rows.append({"return_period_years": period,
                     "peak_acceleration_m_s2": float(np.ravel(a.peak_acceleration_m_s2)[0]),
                     "equivalent_damping_ratio": float(np.ravel(zeta)[0]),
                     "peak_excursion_m": peak,
                     "peak_excursion_ratio": peak / design.vertical_liquid_height_m})
    return rows


def tank_by_return_period(loads, design: TankDesign, depth_ratio: float) -> list[dict]:
    """Return the specified sloshing tanks at every load: peak wave height at the wall and damping.

    Parameters
    ----------
    loads : sequence of (return period [years], LoadedMode)
        Every reported load, in increasing return period.
    design : TankDesign
        The sized tanks.
    depth_ratio : float
        h / L of the tanks [-].

    Returns
    -------
    list of dict
        ``return_period_years``, ``peak_acceleration_m_s2``,
        ``equivalent_damping_ratio`` [-], ``peak_free_surface_elevation_m``.

    Notes
    -----
    zeta_eq = zeta_w + gain sigma_r' (boundary layer plus screens, Tait 2008,
    linearised); the sloshing mass moves u = r / beta and the wall wave
    height is A = (4 / pi) tanh(pi h / L) u.
    """
    per_u = float(wall_elevation_per_displacement(depth_ratio))
    rows = []
    for period, load in loads:
        zeta, a = velocity_proportional_fixed_point(
            load, design.water_mass_kg, design.frequency_hz, design.coupling,
            design.damping_gain_s_per_m, damping_floor=design.intrinsic_damping_ratio)
        u = float(np.ravel(a.peak_stroke_m)[0]) / design.coupling
        rows.append({"return_period_years": period,
                     "peak_acceleration_m_s2": float(np.ravel(a.peak_acceleration_m_s2)[0]),
                     "equivalent_damping_ratio": float(np.ravel(zeta)[0]),
                     "peak_free_surface_elevation_m": per_u * u})
    return rows


def check_freeboard(option: str, rows: list[dict], key: str, freeboard_m: float,
                    fix: str) -> list[dict]:
    """Add ``within_freeboard`` to each row and warn where the rise exceeds the freeboard.

    Parameters
    ----------
    option : str
        The option's name, for the warning.
    rows : list of dict
        :func:`column_by_return_period` or :func:`tank_by_return_period` rows.
    key : str
        The row's rise [m]: ``peak_excursion_m`` or ``peak_free_surface_elevation_m``.
    freeboard_m : float
        The freeboard [m].
    fix : str
        What the user can change, for the warning.

    Returns
    -------
    list of dict
        The rows, each with ``within_freeboard`` (the one comparison rise <= freeboard).
    """
    import warnings

    out = []
    for row in rows:
        within = meets_target(row[key], freeboard_m)
        out.append(row | {"within_freeboard": within})
        if not within:
            warnings.warn(
                f"{option}: at the {row['return_period_years']:g}-year wind the peak liquid "
                f"rise {row[key]:.3f} m exceeds the freeboard {freeboard_m:.3f} m by "
                f"{100 * (row[key] / freeboard_m - 1):.1f}%: the liquid overflows (spectral "
                f"estimate); {fix}", FreeboardWarning, stacklevel=2)
    return out
