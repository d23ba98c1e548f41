"""Robustness in the jobs: settings, detuning sweeps, band check, robust designs.

The [robustness] settings, the detuning sweeps, the band check, the
band-robust and probabilistic designs, and the sweep job.
"""

from __future__ import annotations

from tmd.case import Case, RobustnessTable
from tmd.dampers.tuned_mass import TunedMassDamper
from tmd.design import LoadedMode, Sizing, evaluate_tmd
from tmd.jobs.shared import (
    header_block,
    load_name,
    loaded_mode_of,
    stroke_cases_of,
    target_block,
    with_notes,
)
from tmd.notes import about
from tmd.robust import (
    design_sweeps,
    peak_acceleration_band_max,
    robust_least_mass,
    robustness_study,
    sweep_structure_frequency,
)
from tmd.robust.probabilistic import Distribution, Uncertainty
from tmd.schema import design_block


def robustness_settings(case: Case) -> RobustnessTable:
    """Return the case's [robustness] table; without one, its defaults with the sweeps only.

    The detuning sweeps and the band maximum run for every design (an
    engineer always needs the sensitivity to detuning); the robust re-design
    and the probabilistic study, the heavier parts, only when the case's
    [robustness] table asks for them.

    Parameters
    ----------
    case : Case
        The validated case file (:func:`tmd.case.read_case`).

    Returns
    -------
    RobustnessTable
        Frequency band and sweep range [-], whether to size a robust design,
        and the probabilistic study's settings.
    """
    if case.tables.robustness is not None:
        return case.tables.robustness
    return RobustnessTable(robust_design=False)


def bare_band_maximum(load: LoadedMode, band: float):
    """Return the bare building's worst peak acceleration over the detuning band.

    Parameters
    ----------
    load : LoadedMode
        The mode under its design load.
    band : float
        Half-width b of the band of structure frequency factors s in
        [1 - b, 1 + b] [-].

    Returns
    -------
    tmd.robust.BandMaximum
        The worst peak acceleration [m/s^2] and the factor s where it occurs.
    """
    return peak_acceleration_band_max(load, None, band)


def bare_sweeps(load: LoadedMode, settings: RobustnessTable) -> dict:
    """Return the bare building's structure-frequency sweep, for a case needing no damper.

    Parameters
    ----------
    load : LoadedMode
        The mode under its design load.
    settings : RobustnessTable
        The band and the sweep range [-].

    Returns
    -------
    dict
        ``frequency_band`` [-] and ``sweep_bare``, one row per factor s.
    """
    return {"frequency_band": settings.frequency_band,
            "sweep_bare": sweep_structure_frequency(load, None,
                                                    sweep_range=settings.sweep_range)}


def size_for_band(case: Case, load: LoadedMode, band: float, worst):
    """Return the least-mass TMD meeting the target across the band.

    Used when the bare building meets the target at the nominal frequency
    but not across the band.

    Parameters
    ----------
    case : Case
        The validated case file (:func:`tmd.case.read_case`).
    load : LoadedMode
        The mode under its design load.
    band : float
        Half-width b of the band s in [1 - b, 1 + b] [-].
    worst : tmd.robust.BandMaximum
        The bare building's worst peak over the band, quoted in the message.

    Returns
    -------
    sizing : Sizing
        The design (governed by "band"), or none ("bare") when the robust
        search needs no damper.
    robust : tmd.robust.RobustSizing
        The robust search's own outcome.
    """
    robust = robust_least_mass(load, case.target_peak_m_s2, band,
                               max_mass_ratio=case.damper.max_mass_ratio,
                               max_stroke_m=case.damper.max_stroke_m,
                               stroke_loads=stroke_cases_of(case))
    design = robust.design
    reason = (f"the bare building meets the target {case.target_peak_m_s2:.4g} m/s^2 at the "
              f"nominal frequency but not across the band ±{band:g} (worst peak "
              f"{worst.peak_acceleration_m_s2:.4g} m/s^2 at s = "
              f"{worst.structure_frequency_factor:.4g}), so the damper is sized for the band: ")
    if design is None:
        return Sizing(None, True, "bare", reason + robust.message), robust
    return Sizing(design, design.meets_target, "band", reason + robust.message), robust


def robustness_block(case: Case, damper: TunedMassDamper, *, robust=None) -> dict:
    """Return the detuning sweeps, band maximum, robust and probabilistic designs of the case.

    Parameters
    ----------
    case : Case
        The case; its [robustness] table, or the defaults of
        :func:`robustness_settings`.
    damper : TunedMassDamper
        The design to study.
    robust : tmd.robust.RobustSizing, optional
        A robust design already sized (then it is reported, not re-sized).

    Returns
    -------
    dict
        The sweeps, band maximum and summary, plus ``band_design`` and
        ``probabilistic`` when asked for.
    """
    r = robustness_settings(case)
    uncertainty = None
    if r.probabilistic is not None:
        p = r.probabilistic
        uncertainty = Uncertainty(p.frequency_cov, p.damping_cov, Distribution(p.distribution),
                                  p.exceedance_probability, p.seed, p.sample_count)
    with about(f"detuning sweep and band check on the {load_name(case)}"):
        study = robustness_study(
            loaded_mode_of(case), damper, case.target_peak_m_s2,
            frequency_band=r.frequency_band, sweep_range=r.sweep_range,
            robust_design=r.robust_design, max_mass_ratio=case.damper.max_mass_ratio,
            max_stroke_m=case.damper.max_stroke_m, probabilistic=uncertainty,
            stroke_loads=stroke_cases_of(case),
            robust_sizing=robust)
    study["robustness_summary"] = study.pop("summary")
    return study


def sweep_job(case: Case, damper: TunedMassDamper) -> dict:
    """Run the detuning sweeps of any given design (e.g. an as-built damper).

    Parameters
    ----------
    case : Case
        The validated case file (:func:`tmd.case.read_case`).
    damper : TunedMassDamper
        The TMD by mass ratio, frequency ratio and damping ratio.

    Returns
    -------
    dict
        results.json of ``tmd sweep``: header, target, the design and its
        sweeps over structure frequency, damper frequency and damper damping.
    """
    r = robustness_settings(case)

    def build():
        load = loaded_mode_of(case)
        result = header_block(case) | {
            "target": target_block(case),
            "design": design_block(evaluate_tmd(load, damper, case.target_peak_m_s2)),
        }
        with about(f"detuning sweep on the {load_name(case)}"):
            return result | design_sweeps(load, damper, frequency_band=r.frequency_band,
                                          sweep_range=r.sweep_range)

    return with_notes(build, case)
