"""The Deaves-Harris boundary-layer model: mean wind and turbulence up to gradient height.

EN 1991-1-4's logarithmic profile stops at z_max = 200 m. The Deaves and
Harris (1978) model keeps the log law near the ground and bends it to the
gradient wind at the gradient height h = u* / (6 f_c), so it covers towers
above 200 m. It is used only when a case asks for it
(``[wind] profile = "deaves-harris"``), always with a caution that the
standard's own profile stops at 200 m.

The friction velocity is tied to the EN route: u* / kappa = k_r c_o v_b
c_prob(T) (kappa = 0.4), so that near the ground the two profiles agree to
O(z / h). The turbulence length scale keeps EN 1991-1-4 eq. B.1 above 200 m
(an extrapolation the caution states).

References
----------
Deaves, D. M., Harris, R. I. (1978). A mathematical model of the structure of
strong winds. CIRIA Report 76, London (mean-speed and turbulence-intensity
formulas below, from memory).
EN 1991-1-4:2005+A1:2010, 4.2 Note 4 (c_prob), 4.3.2 (k_r, z0, z_min),
B.1 (length scale).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from tmd.wind.profile import (
    AIR_DENSITY_KG_M3,
    TERRAIN_CATEGORIES,
    probability_factor,
    terrain_factor,
    turbulence_length_scale,
)

VON_KARMAN = 0.4  # kappa of the log law (from memory, the value EN's k_r implies)
EARTH_ROTATION_RAD_S = 7.2921e-5  # Omega (common practice)
PROFILE_MODELS = ("deaves-harris",)
CAUTION = ("The EN 1991-1-4 wind profile stops at 200 m; above it the wind is from the "
           "Deaves-Harris (1978) boundary-layer model (from memory) tied to the EN terrain and "
           "basic speed, with EN's length scale extrapolated: confirm with a wind climate study.")


def coriolis_parameter(latitude_deg: float) -> float:
    """Coriolis parameter f_c = 2 Omega sin|phi| [1/s].

    Parameters
    ----------
    latitude_deg : float
        Site latitude phi [degrees].

    Returns
    -------
    float
        f_c [1/s].
    """
    return 2.0 * EARTH_ROTATION_RAD_S * math.sin(math.radians(abs(latitude_deg)))


def deaves_harris_speed(height_m, friction_velocity_m_s, roughness_length_m, gradient_height_m):
    """Deaves-Harris mean speed U(z) [m/s].

    Parameters
    ----------
    height_m : array
        z [m] (values below z0 are not meaningful; callers hold z_min).
    friction_velocity_m_s : float
        u* [m/s].
    roughness_length_m : float
        z0 [m].
    gradient_height_m : float
        h = u* / (6 f_c) [m].

    Returns
    -------
    array
        U(z) [m/s]; above h the gradient speed U(h).

    Notes
    -----
    U(z) = (u* / kappa) [ln(z/z0) + 5.75 zeta - 1.88 zeta^2 - 1.33 zeta^3
    + 0.25 zeta^4], zeta = z / h (Deaves and Harris 1978, from memory).
    """
    z = np.minimum(np.asarray(height_m, dtype=float), gradient_height_m)
    zeta = z / gradient_height_m
    return friction_velocity_m_s / VON_KARMAN * (
        np.log(z / roughness_length_m) + 5.75 * zeta - 1.88 * zeta**2 - 1.33 * zeta**3
        + 0.25 * zeta**4)


def deaves_harris_sigma_u(height_m, friction_velocity_m_s, roughness_length_m,
                          coriolis_parameter_1_s):
    """Deaves-Harris standard deviation of the along-wind turbulence sigma_u(z) [m/s].

    Parameters
    ----------
    height_m : array
        z [m].
    friction_velocity_m_s : float
        u* [m/s].
    roughness_length_m : float
        z0 [m].
    coriolis_parameter_1_s : float
        f_c [1/s].

    Returns
    -------
    array
        sigma_u [m/s]; zero at and above the gradient height.

    Notes
    -----
    sigma_u / u* = 7.5 eta [0.538 + 0.09 ln(z/z0)]^(eta^16) /
    (1 + 0.156 ln(u* / (f_c z0))), eta = 1 - 6 f_c z / u* (Deaves and
    Harris 1978, from memory).
    """
    z = np.asarray(height_m, dtype=float)
    eta = np.clip(1.0 - 6.0 * coriolis_parameter_1_s * z / friction_velocity_m_s, 0.0, 1.0)
    base = 0.538 + 0.09 * np.log(z / roughness_length_m)
    denominator = 1.0 + 0.156 * math.log(friction_velocity_m_s
                                         / (coriolis_parameter_1_s * roughness_length_m))
    return friction_velocity_m_s * 7.5 * eta * base ** (eta**16) / denominator


@dataclass(frozen=True)
class DeavesHarrisSite:
    """A site whose wind follows the Deaves-Harris model, tied to the EN terrain and speed.

    Parameters
    ----------
    terrain : str
        EN 1991-1-4 terrain category ("0" to "IV"), giving z0 and z_min.
    basic_speed_m_s : float
        v_b [m/s], EN basic wind velocity (10 m, category II, 50 years).
    latitude_deg : float
        Site latitude [degrees], 10 <= |phi| <= 70.
    orography_factor : float
        c_o [-], default 1.
    probability_shape_parameter, probability_exponent : float
        K and n of c_prob [-], defaults 0.2 and 0.5.
    air_density_kg_m3 : float
        rho [kg/m^3], default 1.25.

    Notes
    -----
    u*(T) = kappa k_r c_o v_b c_prob(T); h(T) = u* / (6 f_c). Below z_min the
    values at z_min hold (as in EN 4.3.2).
    """

    terrain: str
    basic_speed_m_s: float
    latitude_deg: float
    orography_factor: float = 1.0
    probability_shape_parameter: float = 0.2
    probability_exponent: float = 0.5
    air_density_kg_m3: float = AIR_DENSITY_KG_M3

    def __post_init__(self):
        if self.terrain not in TERRAIN_CATEGORIES:
            raise ValueError(f"terrain = {self.terrain!r} is not an EN category")
        if not (math.isfinite(self.latitude_deg) and 10.0 <= abs(self.latitude_deg) <= 70.0):
            raise ValueError(f"latitude_deg = {self.latitude_deg!r}; the Deaves-Harris profile "
                             "needs 10 <= |latitude| <= 70 degrees")
        for name in ("basic_speed_m_s", "orography_factor", "air_density_kg_m3"):
            value = getattr(self, name)
            if not (math.isfinite(value) and value > 0):
                raise ValueError(f"{name} = {value!r}; must be a finite number > 0")

    @property
    def roughness_length_m(self) -> float:
        """z0 [m] (EN 1991-1-4 Table 4.1)."""
        return TERRAIN_CATEGORIES[self.terrain][0]

    @property
    def minimum_height_m(self) -> float:
        """z_min [m] (EN 1991-1-4 Table 4.1)."""
        return TERRAIN_CATEGORIES[self.terrain][1]

    @property
    def coriolis_parameter_1_s(self) -> float:
        """f_c [1/s]."""
        return coriolis_parameter(self.latitude_deg)

    def friction_velocity(self, return_period_years=50.0):
        """u*(T) = kappa k_r c_o v_b c_prob(T) [m/s].

        Parameters
        ----------
        return_period_years : float or array
            T [years].

        Returns
        -------
        float or array [m/s]
        """
        c = probability_factor(return_period_years, self.probability_shape_parameter,
                               self.probability_exponent)
        return (VON_KARMAN * float(terrain_factor(self.roughness_length_m))
                * self.orography_factor * self.basic_speed_m_s * c)

    def gradient_height(self, return_period_years=50.0):
        """Gradient height h = u* / (6 f_c) [m].

        Parameters
        ----------
        return_period_years : float or array
            T [years].

        Returns
        -------
        float or array [m]
        """
        return self.friction_velocity(return_period_years) / (6.0 * self.coriolis_parameter_1_s)

    def _z(self, height_m):
        z = np.asarray(height_m, dtype=float)
        if np.any(~np.isfinite(z)) or np.any(z <= 0):
            raise ValueError(f"height_m = {height_m!r}; must be finite and > 0")
        return np.maximum(z, self.minimum_height_m)

    def mean_speed(self, height_m, return_period_years=50.0):
        """10-min mean speed U(z, T) [m/s] (Deaves-Harris).

        Parameters
        ----------
        height_m : float or array
            z [m].
        return_period_years : float
            T [years].

        Returns
        -------
        float or array [m/s]
        """
        u_star = self.friction_velocity(return_period_years)
        return deaves_harris_speed(self._z(height_m), u_star, self.roughness_length_m,
                                   self.gradient_height(return_period_years))

    def sigma_u_at(self, height_m, return_period_years=50.0):
        """sigma_u(z, T) [m/s] (Deaves-Harris).

        Parameters
        ----------
        height_m : float or array
            z [m].
        return_period_years : float
            T [years].

        Returns
        -------
        float or array [m/s]
        """
        return deaves_harris_sigma_u(self._z(height_m), self.friction_velocity(return_period_years),
                                     self.roughness_length_m, self.coriolis_parameter_1_s)

    def turbulence_intensity(self, height_m, return_period_years=50.0):
        """I_u(z) = sigma_u / U [-].

        Parameters
        ----------
        height_m : float or array
            z [m].
        return_period_years : float
            T [years] (I_u depends on it only weakly, through u*).

        Returns
        -------
        float or array [-]
        """
        return (self.sigma_u_at(height_m, return_period_years)
                / self.mean_speed(height_m, return_period_years))

    def length_scale(self, height_m):
        """Turbulence length scale L(z) [m]: EN 1991-1-4 eq. B.1, extrapolated above 200 m.

        Parameters
        ----------
        height_m : float or array
            z [m].

        Returns
        -------
        float or array [m]
        """
        return turbulence_length_scale(self._z(height_m), self.roughness_length_m,
                                       self.minimum_height_m)
