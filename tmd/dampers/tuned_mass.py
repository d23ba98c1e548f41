"""The translational tuned mass damper (TMD) and its classical tunings.

Parameters are non-dimensional: mass ratio mu = m_d / M* (M* the modal mass
with the mode shape = 1 at the damper), frequency ratio f_d / f_s, and the
damping ratio zeta_d referred to the damper's own frequency:
k_d = m_d omega_d^2, c_d = 2 zeta_d m_d omega_d.

References
----------
Den Hartog, J. P. (1956). Mechanical Vibrations, 4th ed. McGraw-Hill.
Warburton, G. B. (1982). Optimum absorber parameters for various combinations
of response and excitation parameters. Earthquake Engineering and Structural
Dynamics 10, 381-401.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from tmd.dampers.absorber import Absorbers, single_tmd
from tmd.rules import FrequencyRatio, MassRatio, Ratio, require
from tmd.structure import Mode


@dataclass(frozen=True)
class TunedMassDamper:
    """A TMD described relative to the mode it is attached to.

    Parameters
    ----------
    mass_ratio : float
        mu = m_d / M* [-].
    frequency_ratio : float
        f_d / f_s [-].
    damping_ratio : float
        zeta_d, referred to f_d [-].
    """

    mass_ratio: float
    frequency_ratio: float
    damping_ratio: float

    def __post_init__(self):
        # The case file's rules and messages (tmd.rules); InputError is a ValueError.
        require("mass_ratio", self.mass_ratio, MassRatio)
        require("frequency_ratio", self.frequency_ratio, FrequencyRatio)
        require("damping_ratio", self.damping_ratio, Ratio)

    def mass_kg(self, mode: Mode) -> float:
        """Return the damper mass m_d = mu M* [kg].

        Parameters
        ----------
        mode : tmd.structure.Mode
            The structural mode the damper is attached to (frequency f_s [Hz]
            and modal mass M* [kg] with mode shape = 1 at the damper).

        Returns
        -------
        float
            m_d [kg].
        """
        return self.mass_ratio * mode.modal_mass_kg

    def frequency_hz(self, mode: Mode) -> float:
        """Return the damper frequency f_d [Hz].

        Parameters
        ----------
        mode : tmd.structure.Mode
            The structural mode the damper is attached to (frequency f_s [Hz]
            and modal mass M* [kg] with mode shape = 1 at the damper).

        Returns
        -------
        float
            f_d = (f_d / f_s) f_s [Hz], the damper's own natural frequency.
        """
        return self.frequency_ratio * mode.frequency_hz

    def stiffness_n_per_m(self, mode: Mode) -> float:
        """Return the spring k_d = m_d (2 pi f_d)^2 [N/m].

        Parameters
        ----------
        mode : tmd.structure.Mode
            The structural mode the damper is attached to (frequency f_s [Hz]
            and modal mass M* [kg] with mode shape = 1 at the damper).

        Returns
        -------
        float
            k_d [N/m].
        """
        return self.mass_kg(mode) * (2.0 * math.pi * self.frequency_hz(mode)) ** 2

    def damping_n_s_per_m(self, mode: Mode) -> float:
        """Return the dashpot c_d = 2 zeta_d m_d (2 pi f_d) [N s/m].

        Parameters
        ----------
        mode : tmd.structure.Mode
            The structural mode the damper is attached to (frequency f_s [Hz]
            and modal mass M* [kg] with mode shape = 1 at the damper).

        Returns
        -------
        float
            c_d [N s/m], from the damping ratio referred to f_d.
        """
        omega_d = 2.0 * math.pi * self.frequency_hz(mode)
        return 2.0 * self.damping_ratio * self.mass_kg(mode) * omega_d

    def absorbers(self, mode: Mode) -> Absorbers:
        """Return the engine's description of this damper on ``mode``.

        Parameters
        ----------
        mode : tmd.structure.Mode
            The structural mode the damper is attached to (frequency f_s [Hz]
            and modal mass M* [kg] with mode shape = 1 at the damper).

        Returns
        -------
        tmd.dampers.absorber.Absorbers
            One absorber with coupling 1 (batch shape ``()``).
        """
        return single_tmd(mode.frequency_hz, mode.modal_mass_kg, self.mass_ratio,
                          self.frequency_ratio, self.damping_ratio)


def den_hartog_tuning(mass_ratio):
    """Return Den Hartog's tuning for a harmonic force on an undamped primary.

    Parameters
    ----------
    mass_ratio : float
        mu = m_d / M* [-], damper mass over the modal mass (mode shape = 1 at
        the damper).

    Returns
    -------
    frequency_ratio : float
        f_d / f_s [-].
    damping_ratio : float
        zeta_d [-], referred to the damper's own frequency.

    Notes
    -----
    f_d / f_s = 1 / (1 + mu); zeta_d = sqrt(3 mu / (8 (1 + mu)^3)), the
    fixed-points tuning that minimises the peak of the primary's displacement
    response to a harmonic force.

    References
    ----------
    Den Hartog, J. P. (1956). Mechanical Vibrations, 4th ed. McGraw-Hill.
    """
    mu = mass_ratio
    return 1.0 / (1.0 + mu), math.sqrt(3.0 * mu / (8.0 * (1.0 + mu) ** 3))


def warburton_white_force_tuning(mass_ratio):
    """Return Warburton's (1982) tuning for the displacement variance under white force.

    For an undamped primary under a white force, the variance of the primary's
    displacement is least at

        f_d / f_s = sqrt(1 + mu / 2) / (1 + mu),
        zeta_d^2 = mu (1 + 3 mu / 4) / (4 (1 + mu) (1 + mu / 2)).

    Parameters
    ----------
    mass_ratio : float
        mu = m_d / M* [-], damper mass over the modal mass (mode shape = 1 at
        the damper).

    Returns
    -------
    frequency_ratio : float
        f_d / f_s [-].
    damping_ratio : float
        zeta_d [-], referred to the damper's own frequency.

    References
    ----------
    Warburton, G. B. (1982). Optimum absorber parameters for various
    combinations of response and excitation parameters. Earthquake
    Engineering and Structural Dynamics 10, 381-401.
    """
    mu = mass_ratio
    ratio = math.sqrt(1.0 + mu / 2.0) / (1.0 + mu)
    zeta = math.sqrt(mu * (1.0 + 0.75 * mu) / (4.0 * (1.0 + mu) * (1.0 + mu / 2.0)))
    return ratio, zeta
