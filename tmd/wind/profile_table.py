"""A wind profile given as a table over height (for towers above EN's 200 m).

A wind climate study or a wind-tunnel report usually gives the mean speed,
turbulence intensity and length scale over height at one return period.
:class:`ProfileTable` carries such a table over height (linear interpolation,
the first row's values held below it, like EN's z_min) and over return
periods by the EN probability factor, and offers the same methods as
:class:`tmd.wind.Site`, so the strip model and the turbulence spectra use it
unchanged.

References
----------
EN 1991-1-4:2005+A1:2010, 4.2 Note 4 (probability factor c_prob, eq. 4.2),
4.4 (turbulence intensity I_v = sigma_u / v_m), 4.5(1) (air density).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from tmd.spectra import SpectrumFileError, read_number_table
from tmd.wind.profile import AIR_DENSITY_KG_M3, probability_factor

PROFILE_CSV_HEADER = ("height_m", "mean_speed_m_s", "turbulence_intensity", "length_scale_m")


class ProfileFileError(ValueError):
    """A profile table that cannot be used; the message names file, line and rule."""


def profile_table_problem(heights_m, mean_speed_m_s, turbulence_intensity, length_scale_m, *,
                          first_row=1, row_word="row", covering_height_m=None) -> str:
    """Describe what is wrong with a profile table, or return '' if nothing.

    Parameters
    ----------
    heights_m, mean_speed_m_s, turbulence_intensity, length_scale_m : array
        Columns [m], [m/s], [-], [m].
    first_row : int
        Number of the first data row in messages (a CSV's first data line is 2).
    row_word : str
        "row" or "line".
    covering_height_m : float, optional
        H [m]: the table must reach at least this height.

    Returns
    -------
    str
        '' when the table is usable.
    """
    columns = dict(zip(PROFILE_CSV_HEADER, (np.asarray(c, dtype=float) for c in (
        heights_m, mean_speed_m_s, turbulence_intensity, length_scale_m)), strict=True))
    z = columns["height_m"]
    if any(c.ndim != 1 or c.shape != z.shape for c in columns.values()):
        return "the four columns must be 1-D and of equal length"
    if z.size < 2:
        return "the table needs at least two rows"
    for name, c in columns.items():
        bad = ~(np.isfinite(c) & (c > 0))
        if name == "turbulence_intensity":
            bad |= ~(c < 1)
        if np.any(bad):
            i = int(np.flatnonzero(bad)[0])
            rule = "in (0, 1)" if name == "turbulence_intensity" else "finite and > 0"
            return f"{row_word} {i + first_row}: {name} = {float(c[i])!r}; must be {rule}"
    steps = np.diff(z)
    if np.any(steps <= 0):
        i = int(np.flatnonzero(steps <= 0)[0]) + 1
        return (f"{row_word} {i + first_row}: height_m = {float(z[i])!r} does not exceed the "
                f"{row_word} before ({float(z[i - 1])!r}); heights must be strictly increasing")
    if covering_height_m is not None and z[-1] < covering_height_m:
        return (f"the table ends at height_m = {float(z[-1]):g} m, below the building's top "
                f"([building] height_m = {covering_height_m:g} m); it must cover the building")
    return ""


@dataclass(frozen=True)
class ProfileTable:
    """Mean speed, turbulence intensity and length scale tabulated over height.

    Parameters
    ----------
    heights_m : array
        z [m], strictly increasing, > 0.
    mean_speeds_m_s : array
        10-min mean speed v_m(z) [m/s] at ``reference_return_period_years``.
    turbulence_intensities : array
        I_u(z) = sigma_u / v_m [-], in (0, 1), independent of the return period.
    length_scales_m : array
        Turbulence length scale L(z) [m] (used by the EN and von Karman spectra).
    reference_return_period_years : float
        T_ref [years] of the tabulated speeds, default 50 (EN's p = 0.02).
    probability_shape_parameter, probability_exponent : float
        K and n of c_prob [-], defaults 0.2 and 0.5.
    air_density_kg_m3 : float
        rho [kg/m^3], default 1.25.
    source : str
        Where the table came from (shown in reports).

    Notes
    -----
    v_m(z, T) = c_prob(T) / c_prob(T_ref) v_table(z); sigma_u(z, T) =
    I_u(z) v_m(z, T). Between rows every column is linear in z; below the
    first row the first row's values hold; above the last row the table is
    not defined (a ValueError names the height).
    """

    heights_m: np.ndarray
    mean_speeds_m_s: np.ndarray
    turbulence_intensities: np.ndarray
    length_scales_m: np.ndarray
    reference_return_period_years: float = 50.0
    probability_shape_parameter: float = 0.2
    probability_exponent: float = 0.5
    air_density_kg_m3: float = AIR_DENSITY_KG_M3
    source: str = ""
    _columns: tuple = field(init=False, repr=False, compare=False)

    def __post_init__(self):
        cols = tuple(np.asarray(getattr(self, name), dtype=float) for name in (
            "heights_m", "mean_speeds_m_s", "turbulence_intensities", "length_scales_m"))
        problem = profile_table_problem(*cols)
        if problem:
            raise ValueError(problem)
        for name, c in zip(("heights_m", "mean_speeds_m_s", "turbulence_intensities",
                            "length_scales_m"), cols, strict=True):
            object.__setattr__(self, name, c)
        object.__setattr__(self, "_columns", cols)

    @property
    def top_height_m(self) -> float:
        """Highest tabulated height [m]."""
        return float(self.heights_m[-1])

    @property
    def minimum_height_m(self) -> float:
        """Lowest tabulated height [m]; values below it are held (like EN z_min)."""
        return float(self.heights_m[0])

    def _interp(self, column, height_m):
        z = np.asarray(height_m, dtype=float)
        if np.any(~np.isfinite(z)) or np.any(z <= 0) or np.any(z > self.top_height_m):
            bad = z.flat[int(np.flatnonzero(~((z > 0) & (z <= self.top_height_m)))[0])]
            raise ValueError(f"height {float(bad)!r} m is outside the profile table "
                             f"(0 < z <= {self.top_height_m:g} m)")
        return np.interp(z, self.heights_m, column)

    def speed_factor(self, return_period_years=50.0):
        """c_prob(T) / c_prob(T_ref) [-] (EN 1991-1-4 eq. 4.2).

        Parameters
        ----------
        return_period_years : float or array
            T [years].

        Returns
        -------
        float or array [-]
        """
        k, n = self.probability_shape_parameter, self.probability_exponent
        return (probability_factor(return_period_years, k, n)
                / probability_factor(self.reference_return_period_years, k, n))

    def mean_speed(self, height_m, return_period_years=50.0):
        """10-min mean speed v_m(z, T) [m/s].

        Parameters
        ----------
        height_m : float or array
            z [m].
        return_period_years : float or array
            T [years]; broadcast against ``height_m``.

        Returns
        -------
        float or array [m/s]
        """
        return self.speed_factor(return_period_years) * self._interp(self.mean_speeds_m_s,
                                                                      height_m)

    def turbulence_intensity(self, height_m):
        """Turbulence intensity I_u(z) [-].

        Parameters
        ----------
        height_m : float or array
            z [m].

        Returns
        -------
        float or array [-]
        """
        return self._interp(self.turbulence_intensities, height_m)

    def sigma_u_at(self, height_m, return_period_years=50.0):
        """Return the along-wind turbulence standard deviation sigma_u(z, T) = I_u v_m [m/s].

        Parameters
        ----------
        height_m : float or array
            z [m].
        return_period_years : float or array
            T [years].

        Returns
        -------
        float or array [m/s]
        """
        return self.turbulence_intensity(height_m) * self.mean_speed(height_m,
                                                                        return_period_years)

    def length_scale(self, height_m):
        """Turbulence length scale L(z) [m].

        Parameters
        ----------
        height_m : float or array
            z [m].

        Returns
        -------
        float or array [m]
        """
        return self._interp(self.length_scales_m, height_m)


def read_profile_csv(path, *, covering_height_m=None, **settings) -> ProfileTable:
    """Read a profile table (header height_m,mean_speed_m_s,turbulence_intensity,length_scale_m).

    Parameters
    ----------
    path : str or Path
        The CSV file.
    covering_height_m : float, optional
        H [m] the table must reach.
    **settings
        Passed to :class:`ProfileTable` (return period, c_prob parameters, rho).

    Returns
    -------
    ProfileTable

    Raises
    ------
    ProfileFileError
        Naming the file, the line, the value and the rule.
    """
    path = Path(path)
    try:
        table, _ = read_number_table(path, PROFILE_CSV_HEADER, "profile table")
    except SpectrumFileError as exc:
        raise ProfileFileError(str(exc)) from None
    problem = profile_table_problem(*table.T, first_row=2, row_word="line",
                                    covering_height_m=covering_height_m)
    if problem:
        raise ProfileFileError(f"{path}: {problem}")
    return ProfileTable(*table.T, source=str(path), **settings)
