"""The building's mode as a single-degree-of-freedom modal oscillator.

Conventions (kept across the package):

* the mode shape is normalised to 1 at the damper level, so the modal
  coordinate is the building's displacement there and the modal (generalised)
  mass M* is referred to that point;
* frequency in Hz; rad/s appears only inside formulas;
* damping as a ratio of critical (a logarithmic decrement is 2 pi zeta).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace


@dataclass(frozen=True)
class Mode:
    """One vibration mode of the building.

    Parameters
    ----------
    frequency_hz : float
        Natural frequency f_s [Hz].
    modal_mass_kg : float
        Modal mass M* [kg], mode shape = 1 at the damper level.
    damping_ratio : float
        Structural damping ratio zeta_s [-]. Zero is allowed in the library
        (an undamped structure with a damped absorber still has a finite
        response); case files require 0 < zeta_s < 1.
    """

    frequency_hz: float
    modal_mass_kg: float
    damping_ratio: float

    def __post_init__(self):
        if not (self.frequency_hz > 0 and math.isfinite(self.frequency_hz)):
            raise ValueError(f"frequency_hz must be finite and > 0, got {self.frequency_hz!r}")
        if not (self.modal_mass_kg > 0 and math.isfinite(self.modal_mass_kg)):
            raise ValueError(f"modal_mass_kg must be finite and > 0, got {self.modal_mass_kg!r}")
        if not (0 <= self.damping_ratio < 1):
            raise ValueError(f"damping_ratio must lie in [0, 1), got {self.damping_ratio!r}")

    @property
    def angular_frequency(self) -> float:
        """omega_s = 2 pi f_s [rad/s]."""
        return 2.0 * math.pi * self.frequency_hz

    @property
    def stiffness_n_per_m(self) -> float:
        """Modal stiffness k_s = M* omega_s^2 [N/m]."""
        return self.modal_mass_kg * self.angular_frequency**2

    @property
    def damping_n_s_per_m(self) -> float:
        """Modal dashpot c_s = 2 zeta_s M* omega_s [N s/m]."""
        return 2.0 * self.damping_ratio * self.modal_mass_kg * self.angular_frequency

    def with_damping(self, damping_ratio: float) -> Mode:
        """Return the same mode with another damping ratio.

        Parameters
        ----------
        damping_ratio : float
            New structural damping ratio of the mode, referred to its natural
            frequency [-].

        Returns
        -------
        Mode
            A copy of this mode, its frequency and modal mass unchanged.
        """
        return replace(self, damping_ratio=damping_ratio)
