"""The results schema: the records a design produces and how results.json holds them.

One low module, imported by the design search, the robustness and
probabilistic studies, the jobs and the report, so that each fact has one
source:

* :data:`SCHEMA_VERSION` - bumped on every change of results.json keys;
* :class:`BareResponse`, :class:`TmdDesign` - the records; the ``design``
  block of results.json holds exactly the fields of :class:`TmdDesign`
  (:data:`DESIGN_KEYS`), and the report lists them in
  :data:`DESIGN_REPORT_ORDER`;
* :data:`CAUTIONS` - the engineering cautions every output carries.

Keys end with their SI unit; dimensionless keys have none.
"""

from __future__ import annotations

from dataclasses import asdict, dataclass, fields

from tmd.dampers.tuned_mass import TunedMassDamper

SCHEMA_VERSION = 19

CAUTIONS = (
    "Preliminary sizing only: the results depend on the modal properties and the wind load "
    "given as inputs.",
    "Wind-tunnel data and the measured frequencies and damping of the completed structure "
    "govern final design.",
    "Along-wind results alone may be unconservative for slender towers where across-wind "
    "response governs; supply an across-wind modal force spectrum when one is available.",
    "A damper must be re-tuned to the as-built building's measured frequency and damping.",
    "Local codes and licensed professional practice take precedence over these results.",
)


@dataclass(frozen=True)
class BareResponse:
    """The building without a damper.

    Parameters
    ----------
    sigma_acceleration_m_s2 : float
        Rms acceleration at the evaluation height [m/s^2].
    peak_acceleration_m_s2 : float
        Expected peak acceleration, peak factor times rms [m/s^2].
    peak_factor : float
        Davenport's peak factor of the acceleration [-].
    upcrossing_hz : float
        Mean zero up-crossing rate of the acceleration [Hz].
    sigma_displacement_m : float
        Rms displacement at the evaluation height [m].
    """

    sigma_acceleration_m_s2: float
    peak_acceleration_m_s2: float
    peak_factor: float
    upcrossing_hz: float
    sigma_displacement_m: float


@dataclass(frozen=True)
class TmdDesign:
    """A TMD with every number its specification needs (SI units).

    Parameters
    ----------
    mass_ratio : float
        mu = m_d / M* [-].
    mass_kg : float
        Damper mass m_d [kg].
    frequency_ratio : float
        f_d / f_s [-].
    frequency_hz : float
        Damper frequency f_d [Hz].
    damping_ratio : float
        zeta_d, referred to f_d [-].
    stiffness_n_per_m : float
        Spring k_d [N/m].
    damping_n_s_per_m : float
        Dashpot c_d [N s/m].
    sigma_acceleration_m_s2 : float
        Rms structure acceleration at the evaluation height [m/s^2].
    peak_acceleration_m_s2 : float
        Peak structure acceleration at the evaluation height [m/s^2].
    peak_factor : float
        Peak factor of the acceleration [-].
    sigma_stroke_m : float
        Rms stroke (damper relative to structure) [m].
    peak_stroke_m : float
        Peak stroke, one-sided [m].
    peak_damper_force_n : float
        Peak force of spring and dashpot on the structure [N].
    sigma_displacement_m : float
        Rms structure displacement at the evaluation height [m].
    effective_damping_ratio : float
        Damping ratio of the bare mode giving the same rms acceleration [-].
    added_damping_ratio : float
        Effective minus inherent damping ratio [-].
    meets_target : bool or None
        Peak acceleration <= target (None when no target was given).
    """

    mass_ratio: float
    mass_kg: float
    frequency_ratio: float
    frequency_hz: float
    damping_ratio: float
    stiffness_n_per_m: float
    damping_n_s_per_m: float
    sigma_acceleration_m_s2: float
    peak_acceleration_m_s2: float
    peak_factor: float
    sigma_stroke_m: float
    peak_stroke_m: float
    peak_damper_force_n: float
    sigma_displacement_m: float
    effective_damping_ratio: float
    added_damping_ratio: float
    meets_target: bool | None

    @property
    def damper(self) -> TunedMassDamper:
        """The damper itself (mass, frequency and damping ratios)."""
        return TunedMassDamper(self.mass_ratio, self.frequency_ratio, self.damping_ratio)


DESIGN_KEYS = tuple(f.name for f in fields(TmdDesign))
"""The keys of every ``design``-like block of results.json, in record order."""

DESIGN_REPORT_ORDER = (
    "mass_kg", "mass_ratio", "frequency_hz", "frequency_ratio", "damping_ratio",
    "stiffness_n_per_m", "damping_n_s_per_m", "peak_stroke_m", "sigma_stroke_m",
    "peak_damper_force_n", "peak_acceleration_m_s2", "sigma_acceleration_m_s2", "peak_factor",
    "sigma_displacement_m", "effective_damping_ratio", "added_damping_ratio", "meets_target",
)
"""The same keys in the order of the report's specification table (what a maker needs first)."""

if sorted(DESIGN_REPORT_ORDER) != sorted(DESIGN_KEYS):  # one list of keys, two orders
    raise ImportError("DESIGN_REPORT_ORDER must be a permutation of TmdDesign's fields")


def design_block(design: TmdDesign | None) -> dict:
    """Return the ``design`` block of results.json for one TMD design.

    Parameters
    ----------
    design : TmdDesign or None
        The design; None (no damper needed) gives every key with the value None.

    Returns
    -------
    dict
        :data:`DESIGN_KEYS` mapped to the design's values.
    """
    if design is None:
        return dict.fromkeys(DESIGN_KEYS)
    return asdict(design)
