"""One call per job: sweeps, band maximum, robust design and probabilities as dicts."""

from __future__ import annotations

from tmd.dampers.tuned_mass import TunedMassDamper
from tmd.defaults import FREQUENCY_BAND, MAX_MASS_RATIO
from tmd.design import LoadedMode
from tmd.robust.minimax import RobustSizing, robust_least_mass
from tmd.robust.probabilistic import probabilistic_study, probability_block
from tmd.robust.sweeps import (
    DASHPOT_RANGE,
    SPRING_RANGE,
    SWEEP_RANGE,
    BandMaximum,
    StructureDamping,
    peak_acceleration_band_max,
    sweep_damper_damping,
    sweep_damper_frequency,
    sweep_structure_frequency,
)
from tmd.rules import Band, SweepRange, require
from tmd.schema import design_block
from tmd.side_by_side import side_by_side

# --- one call per job -------------------------------------------------------

def robustness_study(loaded: LoadedMode, nominal: TunedMassDamper, target_peak_m_s2: float, *,
                     frequency_band: float = FREQUENCY_BAND, sweep_range: float = SWEEP_RANGE,
                     robust_design: bool = True, max_mass_ratio: float = MAX_MASS_RATIO,
                     max_stroke_m: float | None = None,
                     structure_damping_ratio: StructureDamping | None = None,
                     probabilistic=None, robust_sizing: RobustSizing | None = None,
                     stroke_loads: tuple[LoadedMode, ...] = ()) -> dict:
    """Sweeps, band maximum, robust design and (optionally) exceedance probabilities.

    Parameters
    ----------
    loaded : LoadedMode
        The mode under its design load, with the reporting conventions.
    nominal : TunedMassDamper
        The design sized for the nominal structure (e.g. from
        :func:`tmd.design.least_mass`).
    target_peak_m_s2 : float
        Peak acceleration target at the evaluation height [m/s^2].
    frequency_band : float
        Half-width b of the band of structure frequency factors [-]
        (s in [1 - b, 1 + b]).
    sweep_range : float
        Half-width of the structure-frequency sweep [-].
    robust_design : bool
        Also size the least-mass TMD that meets the target across the band.
    max_mass_ratio : float
        Largest mass ratio of the robust and probabilistic searches [-].
    max_stroke_m : float, optional
        Peak stroke limit [m], held across the band by the robust design.
    structure_damping_ratio : callable, optional
        zeta_s(s) [-], vectorised; default the mode's constant damping. See
        :class:`AerodynamicDamping`; a table can be passed as
        ``functools.partial(numpy.interp, xp=s_values, fp=zeta_values)``.
    probabilistic : tmd.robust.probabilistic.Uncertainty, optional
        Random structure frequency (and damping): adds ``probabilistic``.
    robust_sizing : RobustSizing, optional
        A robust design sized already (e.g. the design itself, when it was
        sized for the band): reported as ``band_design`` instead of a new
        search.
    stroke_loads : tuple of LoadedMode
        Further loads under which the robust design and the probabilistic
        least-mass design hold the stroke limit too
        (:func:`tmd.robust.minimax.robust_least_mass`,
        :func:`tmd.robust.probabilistic.least_mass_for_probability`).

    Returns
    -------
    dict
        ``frequency_band``, ``sweep``, ``sweep_bare``, ``sweep_damper_frequency``,
        ``sweep_damper_damping``, ``peak_acceleration_band_max_m_s2`` and
        ``worst_structure_frequency_factor`` (of the nominal design),
        ``band_design`` (when asked; see
        :func:`robust_design_block`), ``probabilistic`` (when asked; see
        :func:`tmd.robust.probabilistic.probabilistic_study`) and ``summary``:
        ``nominal_band_loss`` (band maximum / peak at s = 1, minus 1 [-]),
        ``nominal_band_max_over_target`` [-], ``robust_extra_mass_kg`` and
        ``robust_extra_mass_fraction`` (robust minus nominal mass, and that
        over the nominal mass; None without a robust design).

    Notes
    -----
    The extra mass is measured against the ``nominal`` damper given, so with
    a fixed-mass nominal design it can be negative.
    """
    _check_band(frequency_band, sweep_range)
    result = design_sweeps(loaded, nominal, frequency_band=frequency_band,
                           sweep_range=sweep_range,
                           structure_damping_ratio=structure_damping_ratio)
    worst = BandMaximum(result["peak_acceleration_band_max_m_s2"],
                        result["worst_structure_frequency_factor"])
    at_nominal = float(loaded.assess(nominal.absorbers(loaded.mode)).peak_acceleration_m_s2)
    robust = robust_sizing

    searching = robust is None and robust_design

    def robust_search():
        return robust_least_mass(loaded, target_peak_m_s2, frequency_band,
                                 max_mass_ratio=max_mass_ratio, max_stroke_m=max_stroke_m,
                                 structure_damping_ratio=structure_damping_ratio,
                                 stroke_loads=stroke_loads)

    def probability_search():
        # Everything of the probabilistic block but the robust design's entry, which
        # needs the robust search: so the two searches can run side by side.
        return probabilistic_study(
            loaded, nominal, target_peak_m_s2, probabilistic, robust=None,
            max_mass_ratio=max_mass_ratio, max_stroke_m=max_stroke_m,
            structure_damping_ratio=structure_damping_ratio, stroke_loads=stroke_loads)

    if searching and probabilistic is not None:
        robust, chances = side_by_side(robust_search, probability_search)
    else:
        robust = robust_search() if searching else robust
        chances = probability_search() if probabilistic is not None else None
    if robust is not None:
        result["band_design"] = robust_design_block(robust)
    if chances is not None:
        chances["robust"] = probability_block(
            loaded, robust.design.damper if robust and robust.design else None,
            target_peak_m_s2, probabilistic, structure_damping_ratio=structure_damping_ratio)
        result["probabilistic"] = chances
    extra = None
    if robust is not None and robust.design is not None:
        extra = robust.design.mass_kg - nominal.mass_kg(loaded.mode)
    result["summary"] = {
        "nominal_band_loss": worst.peak_acceleration_m_s2 / at_nominal - 1.0,
        "nominal_band_max_over_target": worst.peak_acceleration_m_s2 / target_peak_m_s2,
        "robust_extra_mass_kg": extra,
        "robust_extra_mass_fraction": (None if extra is None
                                       else extra / nominal.mass_kg(loaded.mode)),
    }
    return result


def design_sweeps(loaded: LoadedMode, damper: TunedMassDamper, *,
                  frequency_band: float = FREQUENCY_BAND, sweep_range: float = SWEEP_RANGE,
                  spring_range: float = SPRING_RANGE,
                  dashpot_range: float = DASHPOT_RANGE,
                  structure_damping_ratio: StructureDamping | None = None) -> dict:
    """Every sweep of one given design, e.g. an as-built damper (``tmd sweep``).

    Parameters
    ----------
    loaded : LoadedMode
        The mode under its design load, with the reporting conventions.
    damper : TunedMassDamper
        The design, relative to the nominal mode.
    frequency_band : float
        Half-width of the band for ``peak_acceleration_band_max_m_s2`` [-].
    sweep_range, spring_range, dashpot_range : float
        Half-widths of the structure-frequency, spring and dashpot sweeps [-].
    structure_damping_ratio : callable, optional
        zeta_s(s) [-]; default the case's band definition
        (:meth:`tmd.design.LoadedMode.structure_damping_ratio`).

    Returns
    -------
    dict
        ``frequency_band``, ``sweep``, ``sweep_bare``, ``sweep_damper_frequency``,
        ``sweep_damper_damping`` (see the sweep functions for the point
        keys), ``peak_acceleration_band_max_m_s2`` and the s where it occurs,
        ``worst_structure_frequency_factor`` [-].
    """
    _check_band(frequency_band, sweep_range)
    worst = peak_acceleration_band_max(loaded, damper, frequency_band,
                                       structure_damping_ratio=structure_damping_ratio)
    return {
        "frequency_band": frequency_band,
        "sweep": sweep_structure_frequency(loaded, damper, sweep_range=sweep_range,
                                           structure_damping_ratio=structure_damping_ratio),
        "sweep_bare": sweep_structure_frequency(loaded, None, sweep_range=sweep_range,
                                                structure_damping_ratio=structure_damping_ratio),
        "sweep_damper_frequency": sweep_damper_frequency(loaded, damper,
                                                         spring_range=spring_range),
        "sweep_damper_damping": sweep_damper_damping(loaded, damper, dashpot_range=dashpot_range),
        "peak_acceleration_band_max_m_s2": worst.peak_acceleration_m_s2,
        "worst_structure_frequency_factor": worst.structure_frequency_factor,
    }


def robust_design_block(sizing: RobustSizing) -> dict:
    """Return the ``band_design`` block of results.json.

    The fields of the ``design`` block (the design evaluated on the nominal
    structure, s = 1; all None when no damper is needed) plus
    ``frequency_band`` [-], ``peak_acceleration_band_max_m_s2``,
    ``worst_structure_frequency_factor`` [-], ``meets_target_across_band``,
    ``governed_by`` and ``message``.

    Parameters
    ----------
    sizing : RobustSizing
        Outcome of :func:`tmd.robust.minimax.robust_least_mass`.

    Returns
    -------
    dict
        The block, keys with their SI unit as in the ``design`` block.
    """
    block = design_block(sizing.design)
    worst = sizing.band_maximum
    return block | {
        "frequency_band": sizing.frequency_band,
        "peak_acceleration_band_max_m_s2": None if worst is None else worst.peak_acceleration_m_s2,
        "worst_structure_frequency_factor": (None if worst is None
                                             else worst.structure_frequency_factor),
        "meets_target_across_band": sizing.meets_target,
        "governed_by": sizing.governed_by,
        "message": sizing.message,
    }


def _check_band(frequency_band, sweep_range) -> None:
    """Check the band and the sweep range by the case file's rules (tmd.rules)."""
    require("frequency_band", frequency_band, Band)
    require("sweep_range", sweep_range, SweepRange)
