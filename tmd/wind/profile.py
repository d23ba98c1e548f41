"""Mean wind speed and turbulence over height, after EN 1991-1-4 section 4.

The profile is the standard's logarithmic law for five terrain categories,
scaled to a return period with the probability factor of 4.2 Note 4. A site
can instead be given by the mean speed and turbulence intensity measured (or
taken from a wind climate study) at one reference height; the terrain's log
law then carries them over height.

Pure numpy functions sit at the bottom and work on arrays of heights; the
:class:`Site` dataclass on top is what an engineer names.

References
----------
EN 1991-1-4:2005+A1:2010, Eurocode 1: Actions on structures - Part 1-4:
General actions - Wind actions. Section 4 (4.2, 4.3, 4.4, Table 4.1) and
Annex B (B.1, turbulence length scale).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from tmd.rules import NonNegativeRatio, Positive, Ratio, require

# EN 1991-1-4 Table 4.1: roughness length z0 [m] and minimum height z_min [m].
TERRAIN_CATEGORIES: dict[str, tuple[float, float]] = {
    "0": (0.003, 1.0),
    "I": (0.01, 1.0),
    "II": (0.05, 2.0),
    "III": (0.3, 5.0),
    "IV": (1.0, 10.0),
}
MAXIMUM_HEIGHT_M = 200.0  # z_max of EN 1991-1-4 4.3.2(1)
REFERENCE_ROUGHNESS_LENGTH_M = 0.05  # z0,II
AIR_DENSITY_KG_M3 = 1.25  # EN 1991-1-4 4.5(1) recommended value


def terrain_factor(roughness_length):
    """Terrain factor k_r [-] (EN 1991-1-4 eq. 4.5).

    Parameters
    ----------
    roughness_length : float or array
        z0 [m].

    Returns
    -------
    k_r : float or array [-]

    Notes
    -----
    k_r = 0.19 (z0 / z0,II)^0.07 with z0,II = 0.05 m.

    References
    ----------
    EN 1991-1-4:2005+A1:2010, 4.3.2, eq. 4.5.
    """
    return 0.19 * (np.asarray(roughness_length, dtype=float) / REFERENCE_ROUGHNESS_LENGTH_M) ** 0.07


def log_law(height, roughness_length, minimum_height):
    """ln(max(z, z_min) / z0) [-], the shape shared by c_r, I_v and the direct site.

    Parameters
    ----------
    height : array
        z, height above ground [m].
    roughness_length, minimum_height : float
        z0, the terrain's roughness length, and z_min, the height below which
        the profile is held constant [m] (EN 1991-1-4 Table 4.1).

    Returns
    -------
    numpy.ndarray
        ln(max(z, z_min) / z0) [-], of the shape of ``height``.
    """
    z = np.maximum(np.asarray(height, dtype=float), minimum_height)
    return np.log(z / roughness_length)


def roughness_factor(height, roughness_length, minimum_height):
    """Roughness factor c_r(z) [-] (EN 1991-1-4 eq. 4.4).

    Parameters
    ----------
    height : array
        z, height above ground [m], at most z_max = 200 m.
    roughness_length, minimum_height : float
        z0, the terrain's roughness length, and z_min, its minimum height [m]
        (Table 4.1).

    Returns
    -------
    numpy.ndarray
        c_r(z) [-], the ratio of the mean speed at z to the basic wind velocity
        before the orography and probability factors, of the shape of ``height``.

    Notes
    -----
    c_r(z) = k_r ln(max(z, z_min) / z0).

    References
    ----------
    EN 1991-1-4:2005+A1:2010, 4.3.2, eq. 4.4.
    """
    return terrain_factor(roughness_length) * log_law(height, roughness_length, minimum_height)


def turbulence_length_scale(height, roughness_length, minimum_height):
    """Turbulence length scale L(z) [m] (EN 1991-1-4 B.1(1), eq. B.1).

    Parameters
    ----------
    height : array
        z, height above ground [m].
    roughness_length, minimum_height : float
        z0, the terrain's roughness length, and z_min, its minimum height [m].

    Returns
    -------
    numpy.ndarray
        L(z) [m], the integral length scale of the along-wind gusts, of the
        shape of ``height``.

    Notes
    -----
    L(z) = L_t (max(z, z_min) / z_t)^alpha with L_t = 300 m, z_t = 200 m and
    alpha = 0.67 + 0.05 ln(z0), z0 in m.

    References
    ----------
    EN 1991-1-4:2005+A1:2010, Annex B, B.1(1), eq. B.1.
    """
    z = np.maximum(np.asarray(height, dtype=float), minimum_height)
    alpha = 0.67 + 0.05 * math.log(roughness_length)
    return 300.0 * (z / 200.0) ** alpha


def probability_factor(return_period_years, shape_parameter=0.2, exponent=0.5):
    """Probability factor c_prob [-] for a return period (EN 1991-1-4 4.2 Note 4, eq. 4.2).

    Parameters
    ----------
    return_period_years : float or array
        Mean return period T [years], > 0.
    shape_parameter : float
        K [-], recommended 0.2.
    exponent : float
        n [-], recommended 0.5.

    Returns
    -------
    c_prob : float or array [-]

    Notes
    -----
    c_prob = ((1 - K ln(-ln(1 - p))) / (1 - K ln(-ln 0.98)))^n with the annual
    probability of exceedance taken as p = 1 - exp(-1/T) (Poisson arrivals), so
    -ln(1 - p) = 1/T and T = 1 year is defined (p = 1/T would make it
    infinite). At T = 50 years this gives c_prob = 1.0006 rather than exactly 1,
    because the standard's denominator is written for p = 0.02 (T = 49.5 years
    in this convention).

    References
    ----------
    EN 1991-1-4:2005+A1:2010, 4.2(2)P Note 4, eq. 4.2.
    """
    t = np.asarray(return_period_years, dtype=float)
    if np.any(~np.isfinite(t)) or np.any(t <= 0):
        raise ValueError(f"return_period_years = {return_period_years!r}; must be finite and > 0")
    numerator = 1.0 + shape_parameter * np.log(t)  # -K ln(-ln(1-p)) = K ln T
    denominator = 1.0 - shape_parameter * math.log(-math.log(0.98))
    return (numerator / denominator) ** exponent


def _check_heights(height_m, minimum=0.0, maximum=MAXIMUM_HEIGHT_M, name="height_m"):
    z = np.asarray(height_m, dtype=float)
    if np.any(~np.isfinite(z)) or np.any(z <= minimum) or np.any(z > maximum):
        bad = z.flat[int(np.flatnonzero(~((z > minimum) & (z <= maximum)))[0])]
        raise ValueError(
            f"{name} = {float(bad)!r} m is outside the wind profile's range; allowed "
            f"{minimum:g} < z <= {maximum:g} m (EN 1991-1-4 z_max)"
        )
    return z


def _check_positive(name, value, *, allow_none=False):
    # The rule of the case file's [wind] table (tmd.rules.Positive): same words.
    if value is None and allow_none:
        return
    require(name, value, Positive)


@dataclass(frozen=True)
class Site:
    """The wind climate and terrain at the building.

    Give either ``basic_speed_m_s`` (the EN route) or the three ``reference_*``
    fields (the direct route), not both.

    Parameters
    ----------
    terrain : str
        EN 1991-1-4 terrain category: "0", "I", "II", "III" or "IV".
    basic_speed_m_s : float, optional
        Basic wind velocity v_b [m/s]: 10-min mean at 10 m in category II for a
        50-year return period.
    orography_factor : float
        c_o [-], default 1 (EN route only).
    turbulence_factor : float
        k_I [-], default 1 (EN route only).
    probability_shape_parameter, probability_exponent : float
        K and n of the probability factor [-], defaults 0.2 and 0.5.
    reference_height_m : float, optional
        Height z_ref [m] of the directly given speed and turbulence.
    reference_mean_speed_m_s : float, optional
        10-min mean speed at z_ref [m/s] for ``reference_return_period_years``.
    reference_turbulence_intensity : float, optional
        Turbulence intensity at z_ref [-].
    reference_return_period_years : float
        Return period [years] of the directly given speed, default 50.
    air_density_kg_m3 : float
        rho [kg/m^3], default 1.25 (EN 1991-1-4 4.5(1)).

    Raises
    ------
    ValueError
        If the terrain is not a category, both or neither route is given, or a
        value is out of range (the message names the field and what is allowed).

    Notes
    -----
    EN route: v_m(z) = c_prob(T) c_r(z) c_o v_b, I_v(z) = k_I / (c_o ln(z/z0)),
    sigma_u = k_r v_b k_I c_prob(T) (constant over height), all with z
    replaced by z_min below z_min.

    Direct route: the standard deviation sigma_u = I_ref v_ref is constant over
    height as in the EN route, and the mean speed follows the terrain's log
    law through the reference point, v_m(z) = v_ref ln(z/z0) / ln(z_ref/z0),
    so I_v(z) = I_ref ln(z_ref/z0) / ln(z/z0) (z below z_min taken as z_min).
    Other return periods scale the speed by c_prob(T) / c_prob(T_ref).

    References
    ----------
    EN 1991-1-4:2005+A1:2010, 4.2, 4.3 and 4.4, eq. 4.3 to 4.7.
    """

    terrain: str
    basic_speed_m_s: float | None = None
    orography_factor: float = 1.0
    turbulence_factor: float = 1.0
    probability_shape_parameter: float = 0.2
    probability_exponent: float = 0.5
    reference_height_m: float | None = None
    reference_mean_speed_m_s: float | None = None
    reference_turbulence_intensity: float | None = None
    reference_return_period_years: float = 50.0
    air_density_kg_m3: float = AIR_DENSITY_KG_M3

    def __post_init__(self):
        if self.terrain not in TERRAIN_CATEGORIES:
            allowed = ", ".join(repr(k) for k in TERRAIN_CATEGORIES)
            raise ValueError(f"terrain = {self.terrain!r} is not a category; allowed: {allowed}")
        direct = (
            self.reference_height_m,
            self.reference_mean_speed_m_s,
            self.reference_turbulence_intensity,
        )
        if self.basic_speed_m_s is not None:
            if any(v is not None for v in direct):
                raise ValueError(
                    "give either basic_speed_m_s or reference_height_m, reference_mean_speed_m_s "
                    "and reference_turbulence_intensity, not both"
                )
            _check_positive("basic_speed_m_s", self.basic_speed_m_s)
        else:
            if any(v is None for v in direct):
                raise ValueError(
                    "a site needs basic_speed_m_s, or all of reference_height_m, "
                    "reference_mean_speed_m_s and reference_turbulence_intensity"
                )
            _check_heights(self.reference_height_m, name="reference_height_m")
            _check_positive("reference_mean_speed_m_s", self.reference_mean_speed_m_s)
            require("reference_turbulence_intensity", self.reference_turbulence_intensity, Ratio)
            _check_positive("reference_return_period_years", self.reference_return_period_years)
            if self.orography_factor != 1.0 or self.turbulence_factor != 1.0:
                raise ValueError(
                    "orography_factor and turbulence_factor apply to the basic_speed_m_s route "
                    "only; a directly given reference speed already includes them (leave both 1)"
                )
        for name in ("orography_factor", "turbulence_factor", "air_density_kg_m3"):
            _check_positive(name, getattr(self, name))
        _check_positive("probability_exponent", self.probability_exponent)
        require("probability_shape_parameter", self.probability_shape_parameter,
                NonNegativeRatio)

    @property
    def is_direct(self) -> bool:
        """True when the site is given by a reference speed and turbulence intensity."""
        return self.basic_speed_m_s is None

    @property
    def roughness_length_m(self) -> float:
        """z0 [m] of the terrain category (EN 1991-1-4 Table 4.1)."""
        return TERRAIN_CATEGORIES[self.terrain][0]

    @property
    def minimum_height_m(self) -> float:
        """z_min [m] of the terrain category (EN 1991-1-4 Table 4.1)."""
        return TERRAIN_CATEGORIES[self.terrain][1]

    @property
    def terrain_factor(self) -> float:
        """k_r [-] (EN 1991-1-4 eq. 4.5)."""
        return float(terrain_factor(self.roughness_length_m))

    def speed_factor(self, return_period_years=50.0):
        """Ratio of the mean speed for return period T to the stated speed [-].

        Parameters
        ----------
        return_period_years : float or array
            T, return period of the mean wind speed [years].

        Returns
        -------
        float or numpy.ndarray
            v_m(z; T) / v_m(z; T_stated) [-], the same at every height.

        Notes
        -----
        c_prob(T) on the EN route; c_prob(T) / c_prob(T_ref) on the direct route,
        with c_prob of :func:`probability_factor`.

        References
        ----------
        EN 1991-1-4:2005+A1:2010, 4.2(2)P Note 4, eq. 4.2.
        """
        c = probability_factor(
            return_period_years, self.probability_shape_parameter, self.probability_exponent
        )
        if self.is_direct:
            c = c / probability_factor(
                self.reference_return_period_years,
                self.probability_shape_parameter,
                self.probability_exponent,
            )
        return c

    def _log(self, height_m):
        return log_law(height_m, self.roughness_length_m, self.minimum_height_m)

    def mean_speed(self, height_m, return_period_years=50.0):
        """10-min mean wind speed v_m(z) [m/s] (EN 1991-1-4 eq. 4.3 or the direct log law).

        Parameters
        ----------
        height_m : float or array
            z [m], 0 < z <= 200.
        return_period_years : float or array
            T, return period of the mean wind speed [years]; broadcast against
            ``height_m``.

        Returns
        -------
        float or numpy.ndarray
            v_m(z; T) [m/s], broadcast over ``height_m`` and ``return_period_years``.

        Raises
        ------
        ValueError
            If a height lies outside 0 < z <= 200 m.

        Notes
        -----
        EN route: v_m = c_prob(T) c_r(z) c_o v_b. Direct route:
        v_m = c_prob(T)/c_prob(T_ref) v_ref ln(z/z0) / ln(z_ref/z0).

        References
        ----------
        EN 1991-1-4:2005+A1:2010, 4.3.1, eq. 4.3.
        """
        z = _check_heights(height_m)
        factor = self.speed_factor(return_period_years)
        if self.is_direct:
            shape = self._log(z) / self._log(self.reference_height_m)
            return factor * self.reference_mean_speed_m_s * shape
        c_r = self.terrain_factor * self._log(z)
        return factor * c_r * self.orography_factor * self.basic_speed_m_s

    def turbulence_intensity(self, height_m):
        """Turbulence intensity I_v(z) = sigma_u / v_m(z) [-] (EN 1991-1-4 eq. 4.7).

        Independent of the return period.

        Parameters
        ----------
        height_m : float or array
            z, height above ground [m], 0 < z <= 200.

        Returns
        -------
        float or numpy.ndarray
            I_v(z) [-], of the shape of ``height_m``.

        Notes
        -----
        EN route: I_v = k_I / (c_o ln(max(z, z_min)/z0)). Direct route:
        I_v = I_ref ln(z_ref/z0) / ln(max(z, z_min)/z0).

        References
        ----------
        EN 1991-1-4:2005+A1:2010, 4.4, eq. 4.7.
        """
        z = _check_heights(height_m)
        if self.is_direct:
            ratio = self._log(self.reference_height_m) / self._log(z)
            return self.reference_turbulence_intensity * ratio
        return self.turbulence_factor / (self.orography_factor * self._log(z))

    def sigma_u(self, return_period_years=50.0):
        """Return the standard deviation of the along-wind turbulence sigma_u [m/s].

        Constant over height: sigma_u = k_r v_b k_I c_prob(T) (EN route) or
        I_ref v_ref c_prob(T)/c_prob(T_ref) (direct route).

        Parameters
        ----------
        return_period_years : float or array
            T, return period of the mean wind speed [years].

        Returns
        -------
        float or numpy.ndarray
            sigma_u [m/s], of the shape of ``return_period_years``.

        References
        ----------
        EN 1991-1-4:2005+A1:2010, 4.4, eq. 4.6.
        """
        factor = self.speed_factor(return_period_years)
        if self.is_direct:
            return factor * self.reference_turbulence_intensity * self.reference_mean_speed_m_s
        return factor * self.terrain_factor * self.basic_speed_m_s * self.turbulence_factor

    def length_scale(self, height_m):
        """Turbulence length scale L(z) [m] (EN 1991-1-4 eq. B.1).

        Parameters
        ----------
        height_m : float or array
            z, height above ground [m], 0 < z <= 200.

        Returns
        -------
        float or numpy.ndarray
            L(z) [m], of the shape of ``height_m``; see
            :func:`turbulence_length_scale`.
        """
        z = _check_heights(height_m)
        return turbulence_length_scale(z, self.roughness_length_m, self.minimum_height_m)
