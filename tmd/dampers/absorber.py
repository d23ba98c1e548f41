"""The one linear absorber model that every passive option reduces to.

An absorber j attached at the damper level (mode shape = 1 there) has a total
mass m_j that moves with the structure, an internal coordinate r_j with its own
frequency f_j and damping ratio zeta_j, and a coupling beta_j in (0, 1]:

    structure:  (M* + sum m_j) x'' + sum m_j beta_j r_j'' + c_s x' + k_s x = F
    absorber j: beta_j x'' + r_j'' + 2 zeta_j omega_j r_j' + omega_j^2 r_j = 0

Eliminating r_j in the frequency domain adds to the structure's dynamic
stiffness

    -omega^2 m_j T_j(omega),   T_j = 1 + beta_j^2 omega^2 / D_j(omega),
    D_j = omega_j^2 - omega^2 + 2 i zeta_j omega_j omega,

and r_j / x = beta_j omega^2 / D_j.

* A translational or pendulum TMD is beta = 1: T = (omega_j^2 + 2 i zeta_j
  omega_j omega) / D_j, and r is its stroke relative to the structure.
* A tuned liquid column damper is beta = alpha = B/L (horizontal over total
  liquid length) and r is the liquid displacement along the column: the
  participating mass is alpha^2 m_l and (1 - alpha^2) m_l moves rigidly.
* A sloshing tank represented by a sloshing mass m_1 of a total water mass m_w
  is beta^2 = m_1 / m_w.

The damping ratio zeta_j is referred to the absorber's own frequency omega_j
(c_j = 2 zeta_j m_j omega_j for a TMD), not to the structure's.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np


@dataclass(frozen=True)
class Absorbers:
    """A batch of absorber sets, one set per design, as broadcastable arrays.

    Every field has shape ``batch_shape + (n_absorbers,)``; ``n_absorbers`` may
    be zero (the bare structure).

    Parameters
    ----------
    mass_kg : array
        Total mass m_j of each absorber [kg] (zero is allowed: an unused
        candidate in a bank).
    frequency_hz : array
        Absorber's own natural frequency f_j [Hz].
    damping_ratio : array
        Damping ratio zeta_j referred to f_j [-].
    coupling : array
        beta_j in (0, 1] [-]; 1 for a TMD.
    """

    mass_kg: np.ndarray
    frequency_hz: np.ndarray
    damping_ratio: np.ndarray
    coupling: np.ndarray

    def __post_init__(self):
        arrays = [np.asarray(a, dtype=float) for a in
                  (self.mass_kg, self.frequency_hz, self.damping_ratio, self.coupling)]
        # Broadcast only when needed: this runs on every engine call of a search.
        if any(a.shape != arrays[0].shape for a in arrays[1:]):
            arrays = np.broadcast_arrays(*arrays)
        if arrays[0].ndim == 0:
            raise ValueError("absorber arrays need a last axis that counts the absorbers")
        for name, value in zip(("mass_kg", "frequency_hz", "damping_ratio", "coupling"),
                               arrays, strict=True):
            object.__setattr__(self, name, value)

    @property
    def batch_shape(self) -> tuple[int, ...]:
        """Shape of the batch of designs, the fields' shape less the absorber axis."""
        return self.mass_kg.shape[:-1]

    @property
    def count(self) -> int:
        """Number of absorbers in each design (length of the last axis)."""
        return self.mass_kg.shape[-1]

    @classmethod
    def none(cls, batch_shape: tuple[int, ...] = ()) -> Absorbers:
        """Return no absorber at all: the bare structure.

        Parameters
        ----------
        batch_shape : tuple of int
            Shape of the batch of (bare) designs; ``()`` for one.

        Returns
        -------
        Absorbers
            Every field of shape ``batch_shape + (0,)``.
        """
        empty = np.zeros(batch_shape + (0,))
        return cls(empty, empty, empty, empty)

    @classmethod
    def tuned_masses(cls, mass_kg, frequency_hz, damping_ratio) -> Absorbers:
        """Return translational TMDs (coupling 1).

        Parameters
        ----------
        mass_kg : array
            Mass of each TMD [kg], the last axis counting the absorbers.
        frequency_hz : array
            Each TMD's own natural frequency sqrt(k/m) / (2 pi) [Hz].
        damping_ratio : array
            Each TMD's damping ratio c / (2 m omega_d), referred to its own
            frequency [-].

        Returns
        -------
        Absorbers
            The TMDs with coupling beta = 1, the arrays broadcast together.
        """
        mass = np.asarray(mass_kg, dtype=float)
        return cls(mass, frequency_hz, damping_ratio, np.ones_like(mass))

    def take(self, index) -> Absorbers:
        """Return the designs selected by ``index`` along the batch axes.

        Parameters
        ----------
        index : int, slice, tuple or array
            A numpy index into the batch axes (the absorber axis is kept whole).

        Returns
        -------
        Absorbers
            The selected designs, each with all its absorbers.
        """
        return Absorbers(self.mass_kg[index], self.frequency_hz[index],
                         self.damping_ratio[index], self.coupling[index])


def single_tmd(structure_frequency_hz, modal_mass_kg, mass_ratio, frequency_ratio,
               damping_ratio) -> Absorbers:
    """One translational TMD per design from its non-dimensional parameters.

    Parameters
    ----------
    structure_frequency_hz : float or array
        f_s, natural frequency of the structural mode [Hz].
    modal_mass_kg : float or array
        M*, modal mass of that mode [kg], mode shape = 1 at the damper.
    mass_ratio : float or array
        mu = m_d / M* [-], the damper's mass over the modal mass.
    frequency_ratio : float or array
        f_d / f_s [-], the damper's own frequency over the structure's.
    damping_ratio : float or array
        zeta_d, referred to the damper's own frequency [-].

    Returns
    -------
    Absorbers
        Batch shape = the broadcast shape of the inputs, one absorber each.
    """
    mu, ratio, zeta, fs, mass = (np.asarray(v, dtype=float) for v in
                                 (mass_ratio, frequency_ratio, damping_ratio,
                                  structure_frequency_hz, modal_mass_kg))
    # Absorbers broadcasts the fields to one shape (only where they differ).
    return Absorbers.tuned_masses((mu * mass)[..., None], (ratio * fs)[..., None],
                                  zeta[..., None])
