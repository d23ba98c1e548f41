"""Tuned sloshing damper (TSD): rectangular water tanks with damping screens.

A rectangular tank of length L in the direction of motion, width b and still
water depth h. Its first sloshing mode (linear potential flow) has

    f_1 = (1 / 2 pi) sqrt((pi g / L) tanh(pi h / L))

and, in the equivalent mechanical model, a sloshing mass

    m_1 / m_w = 8 tanh(pi h / L) / (pi^3 h / L)

of the water mass m_w = rho b L h; the rest moves rigidly with the tank
(Graham & Rodriguez 1952; Housner 1963; Abramson 1966). Mode n (odd
wavenumbers (2n - 1) pi / L) carries 8 tanh((2n-1) pi h/L) / ((2n-1)^3 pi^3 h/L);
the fractions of all modes sum to 1 in shallow water, the first alone tends to
8 / pi^2 = 0.81 there and to 0 as 8 / (pi^3 h / L) in deep water.

On the universal absorber (:mod:`tmd.dampers.absorber`) the tank is
m_j = m_w with beta^2 = m_1 / m_w; the engine's coordinate r = beta u with u
the sloshing mass's displacement relative to the tank.

Free surface: the first mode's surface is eta = A cos(pi x / L) (x from one
wall). The water's horizontal centre of mass shifts by
rho b int x eta dx / m_w = 2 rho b L^2 A / (pi^2 m_w), which the model carries as
m_1 u, hence (derived here, linear theory)

    A = (4 / pi) tanh(pi h / L) u,

the wave height at the wall compared with the freeboard.

Damping screens at x_s with loss coefficient C_l drop the pressure by
0.5 rho C_l |v| v, v the flow velocity through the screen. Following Tait
(2008), the energy they dissipate with the linear first mode's velocity field
v = (4/pi) u' sin(pi x / L) cosh(k (z + h)) / cosh(k h), k = pi / L, is matched to
a linear dashpot on u; for Gaussian response E|v|^3 = 2 sqrt(2/pi) sigma_v^3, so

    zeta_eq = C_l sqrt(2/pi) (4/pi)^3 sum_s |sin(pi x_s/L)|^3 I_z sigma_u'
              / (2 (m_1/m_w) L h omega_1),
    I_z = (sinh kh + sinh^3 kh / 3) / (k cosh^3 kh),

proportional to sigma_u' and iterated to its fixed point like the column's
head loss (the expression is this module's derivation along Tait's lines, not
copied from the paper). Without screens only boundary-layer damping remains,
zeta_w = (1 / 2h) sqrt(nu / (2 omega_1)) (1 + 2 h / b + S), S = 1 for a
contaminated surface (Miles 1967; Sun et al. 1992, from memory): well below
0.1% for building-size tanks, which is why screens are fitted.

References
----------
Graham, E. W. and Rodriguez, A. M. (1952). The characteristics of fuel motion
which affect airplane dynamics. Journal of Applied Mechanics 19, 381-388.
Housner, G. W. (1963). The dynamic behavior of water tanks. Bulletin of the
Seismological Society of America 53(2), 381-387.
Abramson, H. N. (ed.) (1966). The dynamic behavior of liquids in moving
containers. NASA SP-106.
Tait, M. J. (2008). Modelling and preliminary design of a structure-TLD system.
Engineering Structures 30, 2644-2655.
Miles, J. W. (1967). Surface-wave damping in closed basins. Proc. R. Soc. A 297,
459-475.
Sun, L. M., Fujino, Y., Pacheco, B. M. and Chaiseri, P. (1992). Modelling of
tuned liquid damper (TLD). J. Wind Eng. Ind. Aerodyn. 43, 1883-1894.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from tmd.constants import STANDARD_GRAVITY
from tmd.dampers.liquid_column import TWO_PI, WATER_DENSITY

WATER_KINEMATIC_VISCOSITY = 1.0e-6  # m^2/s, about 20 degC


@dataclass(frozen=True)
class TankSettings:
    """How the sloshing tanks are laid out (case keys under [options]).

    Parameters
    ----------
    depth_ratio : float
        h / L, still water depth over tank length [-].
    max_tank_width_m : float
        Largest width of one tank across the motion [m]; the water is split
        into as many equal tanks as this needs.
    freeboard_m : float or None
        Tank height above still water [m]; the peak wave height at the wall
        is held below it (None: no limit, only reported).
    screen_positions : tuple of float
        Screen positions x_s / L from one wall [-], each with the same loss
        coefficient.
    density_kg_m3, kinematic_viscosity_m2_s : float
        Water properties.
    """

    depth_ratio: float = 0.15
    max_tank_width_m: float = 10.0
    freeboard_m: float | None = 1.0
    screen_positions: tuple[float, ...] = (0.4, 0.6)
    density_kg_m3: float = WATER_DENSITY
    kinematic_viscosity_m2_s: float = WATER_KINEMATIC_VISCOSITY


def sloshing_frequency_hz(length_m, depth_m, gravity_m_s2: float = STANDARD_GRAVITY):
    """Return the first sloshing frequency of a rectangular tank [Hz].

    Parameters
    ----------
    length_m : float or array
        L, inside length of the tank in the direction of motion [m].
    depth_m : float or array
        h, still water depth [m].
    gravity_m_s2 : float
        Acceleration of gravity g [m/s^2].

    Returns
    -------
    float or numpy.ndarray
        f_1 [Hz].

    Notes
    -----
    f_1 = (1 / 2 pi) sqrt((pi g / L) tanh(pi h / L)) (linear wave theory; e.g.
    Abramson 1966).

    References
    ----------
    Abramson, H. N. (ed.) (1966). The dynamic behavior of liquids in moving
    containers. NASA SP-106.
    """
    L, h = np.asarray(length_m, float), np.asarray(depth_m, float)
    return np.sqrt(math.pi * gravity_m_s2 / L * np.tanh(math.pi * h / L)) / TWO_PI


def tank_length_m(frequency_hz, depth_ratio, gravity_m_s2: float = STANDARD_GRAVITY):
    """Return the tank length L [m] with first sloshing frequency f [Hz] at depth ratio h / L.

    Parameters
    ----------
    frequency_hz : float or array
        Target first sloshing frequency f_1 [Hz].
    depth_ratio : float or array
        h / L, still water depth over tank length [-].
    gravity_m_s2 : float
        Acceleration of gravity g [m/s^2].

    Returns
    -------
    float or numpy.ndarray
        L, tank length in the direction of motion [m].

    Notes
    -----
    L = pi g tanh(pi h / L) / (2 pi f)^2, the inverse of
    :func:`sloshing_frequency_hz` at fixed h / L.
    """
    omega = TWO_PI * np.asarray(frequency_hz, float)
    return math.pi * gravity_m_s2 * np.tanh(math.pi * np.asarray(depth_ratio, float)) / omega**2


def sloshing_mass_fraction(depth_ratio, mode: int = 1):
    """Sloshing mass of mode n over the water mass, m_n / m_w [-].

    Parameters
    ----------
    depth_ratio : float or array
        h / L [-].
    mode : int
        n = 1, 2, ...; wavenumber (2n - 1) pi / L.

    Returns
    -------
    float or numpy.ndarray
        m_n / m_w [-], the share of the water that sloshes in mode n in the
        equivalent mechanical model.

    Notes
    -----
    m_n / m_w = 8 tanh(q pi h/L) / (q^3 pi^3 h/L), q = 2n - 1 (Graham &
    Rodriguez 1952; Housner 1963 gives the first mode).

    References
    ----------
    Graham, E. W. and Rodriguez, A. M. (1952), Journal of Applied Mechanics 19,
    381-388. Housner, G. W. (1963), Bulletin of the Seismological Society of
    America 53(2), 381-387.
    """
    r = np.asarray(depth_ratio, float)
    q = 2 * mode - 1
    return 8.0 * np.tanh(q * math.pi * r) / (q**3 * math.pi**3 * r)


def wall_elevation_per_displacement(depth_ratio):
    """Return the wave height at the wall per unit sloshing-mass displacement, A / u [-].

    Parameters
    ----------
    depth_ratio : float or array
        h / L, still water depth over tank length [-].

    Returns
    -------
    float or numpy.ndarray
        A / u [-]: the first mode's free-surface amplitude at the wall per unit
        displacement of the sloshing mass relative to the tank.

    Notes
    -----
    A = (4 / pi) tanh(pi h / L) u, from the centre-of-mass equivalence of the
    linear first mode and the sloshing mass (module notes).
    """
    return 4.0 / math.pi * np.tanh(math.pi * np.asarray(depth_ratio, float))


def screen_depth_integral_m(length_m, depth_m):
    """Return the depth integral I_z of the cubed velocity profile at a screen [m].

    Parameters
    ----------
    length_m : float or array
        L, tank length in the direction of motion [m].
    depth_m : float or array
        h, still water depth [m].

    Returns
    -------
    float or numpy.ndarray
        I_z [m].

    Notes
    -----
    I_z = int_{-h}^{0} (cosh k(z+h) / cosh kh)^3 dz = (sinh kh + sinh^3 kh / 3)
    / (k cosh^3 kh), k = pi / L (the first mode's horizontal velocity profile
    over depth, linear theory; derived here).
    """
    k = math.pi / np.asarray(length_m, float)
    kh = k * np.asarray(depth_m, float)
    return (np.sinh(kh) + np.sinh(kh) ** 3 / 3.0) / (k * np.cosh(kh) ** 3)


def screen_damping_per_loss_coefficient(length_m, depth_m, frequency_hz, screen_positions):
    """Return zeta_eq per unit C_l and unit rms sloshing velocity sigma_u' [s/m].

    Parameters
    ----------
    length_m : float
        L, tank length in the direction of motion [m].
    depth_m : float
        h, still water depth [m].
    frequency_hz : float
        f_1, the tank's first sloshing frequency [Hz].
    screen_positions : sequence of float
        Screen positions x_s / L measured from one wall [-].

    Returns
    -------
    float
        zeta_eq / (C_l sigma_u') [s/m]: the statistically linearised damping
        ratio of the screens, referred to f_1, per unit loss coefficient and
        per unit rms velocity of the sloshing mass relative to the tank.

    Notes
    -----
    sqrt(2/pi) (4/pi)^3 sum_s |sin(pi x_s/L)|^3 I_z / (2 (m_1/m_w) L h omega_1);
    see the module notes (energy equivalence after Tait 2008).

    References
    ----------
    Tait, M. J. (2008). Modelling and preliminary design of a structure-TLD
    system. Engineering Structures 30, 2644-2655 (method; the expression is
    derived here).
    """
    L, h = float(length_m), float(depth_m)
    positions = np.asarray(screen_positions, float)
    shape = float(np.sum(np.abs(np.sin(math.pi * positions)) ** 3))
    fraction = float(sloshing_mass_fraction(h / L))
    omega = TWO_PI * float(frequency_hz)
    return (math.sqrt(2.0 / math.pi) * (4.0 / math.pi) ** 3 * shape
            * float(screen_depth_integral_m(L, h)) / (2.0 * fraction * L * h * omega))


def intrinsic_damping_ratio(depth_m, width_m, frequency_hz,
                            kinematic_viscosity_m2_s: float = WATER_KINEMATIC_VISCOSITY,
                            surface_contamination: float = 1.0):
    """Return the boundary-layer damping ratio of an unscreened rectangular tank [-].

    Parameters
    ----------
    depth_m : float or array
        h, still water depth [m].
    width_m : float or array
        b, tank width across the motion [m].
    frequency_hz : float or array
        f_1, the tank's first sloshing frequency [Hz].
    kinematic_viscosity_m2_s : float
        nu, kinematic viscosity of the water [m^2/s].
    surface_contamination : float
        S [-]: 1 for a contaminated free surface (the usual case), 0 for a
        clean one.

    Returns
    -------
    float or numpy.ndarray
        zeta_w [-], referred to f_1.

    Notes
    -----
    zeta_w = (1 / 2h) sqrt(nu / (2 omega_1)) (1 + 2 h / b + S), S = 1 for a
    contaminated surface (Miles 1967; Sun et al. 1992; from memory).

    References
    ----------
    Miles, J. W. (1967), Proc. R. Soc. A 297, 459-475. Sun, L. M., Fujino, Y.,
    Pacheco, B. M. and Chaiseri, P. (1992), J. Wind Eng. Ind. Aerodyn. 43,
    1883-1894.
    """
    omega = TWO_PI * np.asarray(frequency_hz, float)
    h, b = np.asarray(depth_m, float), np.asarray(width_m, float)
    return (np.sqrt(kinematic_viscosity_m2_s / (2.0 * omega)) / (2.0 * h)
            * (1.0 + 2.0 * h / b + surface_contamination))
