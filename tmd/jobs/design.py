"""The design and evaluate jobs.

The TMD sized by the case's peak method, its peak by each estimate, and the
recommendation.
"""

from __future__ import annotations

from dataclasses import replace

from tmd.case import Case
from tmd.dampers.absorber import Absorbers
from tmd.dampers.tuned_mass import TunedMassDamper
from tmd.design import LoadedMode, Sizing, TmdDesign, evaluate_tmd, least_mass, tune
from tmd.jobs.figure_series import figure_series_block
from tmd.jobs.robustness import (
    bare_band_maximum,
    bare_sweeps,
    robustness_block,
    robustness_settings,
    size_for_band,
)
from tmd.jobs.shared import (
    across_block,
    bare_block,
    by_return_period,
    extreme_checks,
    header_block,
    load_name,
    loaded_mode_of,
    peak_method,
    stroke_cases_of,
    target_block,
    with_notes,
)
from tmd.notes import about
from tmd.recommend import recommendation
from tmd.schema import design_block
from tmd.side_by_side import side_by_side
from tmd.simulated_sizing import common_period_s, simulated_peak, size_for_simulated_peak
from tmd.simulation import SimulationSettings
from tmd.verdict import meets_target

# Records of the side-by-side simulated peak of the recommended design when the
# case has no [simulation] table: a check, about 1.5% sampling error on the mean.
CHECK_RECORDS = 40


def size_damper(case: Case, target_m_s2: float | None = None) -> Sizing:
    """Return the TMD the case asks for: tuned at a fixed mass ratio, or the least mass.

    Parameters
    ----------
    case : Case
        The validated case.
    target_m_s2 : float, optional
        Peak target of the spectral sizing [m/s^2]; default the case's (the
        simulated-peak loop passes corrected targets).

    Returns
    -------
    Sizing
    """
    target = case.target_peak_m_s2 if target_m_s2 is None else target_m_s2
    load = loaded_mode_of(case)
    settings = case.damper
    extra = stroke_cases_of(case)
    if settings.mass_ratio is None:
        return least_mass(load, target, max_mass_ratio=settings.max_mass_ratio,
                          max_stroke_m=settings.max_stroke_m, stroke_loads=extra)
    tuning = tune(load, settings.mass_ratio, objective=settings.objective,
                  max_stroke_m=settings.max_stroke_m, stroke_loads=extra)
    design = evaluate_tmd(load, TunedMassDamper(settings.mass_ratio, tuning.frequency_ratio,
                                                tuning.damping_ratio), target)
    met = bool(design.meets_target)
    verdict = "meets" if met else "does not meet"
    return Sizing(design, met, "fixed mass ratio", (
        f"at the fixed mass ratio {settings.mass_ratio:g}, the {settings.objective}-optimal "
        f"tuning {verdict} the target {target:.4g} m/s^2 "
        f"(peak {design.peak_acceleration_m_s2:.4g} m/s^2)"))


def sized_for_peak_method(case: Case) -> tuple[Sizing, dict | None]:
    """Return the sizing by the case's peak method, with the simulated loop's record if it ran.

    Parameters
    ----------
    case : Case
        The validated case.

    Returns
    -------
    sizing : Sizing
        For ``"simulated"``, the design's peak and verdict are the simulated
        statistic's (:func:`tmd.simulated_sizing.size_for_simulated_peak`).
    correction : dict or None
        The ``peak_correction`` block: statistic, records, seed and every pass.
    """
    if peak_method(case) != "simulated":
        return size_damper(case), None
    settings = simulation_settings(case, check_records=SimulationSettings().records)
    fractile = case.tables.target.peak_fractile
    sizing, steps = size_for_simulated_peak(
        loaded_mode_of(case), case.target_peak_m_s2, lambda t: size_damper(case, t), settings,
        fractile=fractile)
    return sizing, {
        "scope": "the nominal design is sized against the simulated maxima; per-return-period, "
                 "band, robust and option figures use Davenport's spectral peak",
        "statistic": "mean" if fractile is None else "fractile",
        "records": settings.records, "seed": settings.seed, "duration_s": settings.duration_s,
        "passes": [{"iteration": p.iteration, "spectral_target_m_s2": p.spectral_target_m_s2,
                    "mass_ratio": p.mass_ratio, "spectral_peak_m_s2": p.spectral_peak_m_s2,
                    "simulated_peak_m_s2": p.simulated_peak_m_s2,
                    "simulated_to_spectral_ratio": p.ratio} for p in steps]}


def peak_estimates(load: LoadedMode, design: TmdDesign | None, *,
                   simulation=None) -> dict:
    """Davenport's, Vanmarcke's (and a simulated) peak acceleration of a design, side by side.

    Parameters
    ----------
    load : LoadedMode
        The design load.
    design : TmdDesign or None
        The TMD (None: the bare building).
    simulation : tmd.simulation.SimulationSettings, optional
        Given, the mean of the simulated records' largest |a| is added.

    Returns
    -------
    dict
        ``davenport_peak_acceleration_m_s2`` and
        ``vanmarcke_peak_acceleration_m_s2`` (two-sided, max |a|); with
        ``simulation``, ``simulated_peak_acceleration_m_s2`` and
        ``simulated_records``.
    """
    absorbers = Absorbers.none() if design is None else design.damper.absorbers(load.mode)
    block = {f"{method}_peak_acceleration_m_s2": float(
        replace(load, peak_method=method).assess(absorbers).peak_acceleration_m_s2)
        for method in ("davenport", "vanmarcke")}
    if simulation is not None:
        block["simulated_peak_acceleration_m_s2"] = simulated_peak(
            load, design, simulation, common_period_s(load, design, simulation.duration_s))
        block["simulated_records"] = simulation.records
    return block


def simulation_settings(case: Case, *, check_records: int = CHECK_RECORDS):
    """Return the case's Monte Carlo settings (``[simulation]``), or a light check's.

    Parameters
    ----------
    case : Case
        The validated case.
    check_records : int
        Records when the case gives no ``[simulation]`` table.

    Returns
    -------
    tmd.simulation.SimulationSettings
    """
    table = case.tables.simulation if case.tables is not None else None
    if table is None:
        return SimulationSettings(records=check_records, duration_s=case.duration_s)
    return SimulationSettings(records=table.records, seed=table.seed,
                              time_step_s=table.time_step_s, duration_s=case.duration_s)


def design_job(case: Case) -> dict:
    """Run the design job: bare response, sized TMD and the numbers of its specification.

    Parameters
    ----------
    case : Case
        The validated case file (:func:`tmd.case.read_case`).

    Returns
    -------
    dict
        results.json of ``tmd design``: header, target, bare, design, sizing,
        peak estimates, per-return-period rows, end-stops, robustness blocks,
        the recommendation, warnings and cautions (keys with their SI unit).
    """

    def build():
        load = loaded_mode_of(case)
        settings = robustness_settings(case)
        bare = bare_block(load)
        sizing, correction = sized_for_peak_method(case)
        robust = None
        if sizing.design is None:
            # "No damper" must hold across the band too; otherwise size for it.
            worst = bare_band_maximum(load, settings.frequency_band)
            bare |= {"peak_acceleration_band_max_m_s2": worst.peak_acceleration_m_s2,
                     "worst_structure_frequency_factor": worst.structure_frequency_factor}
            if not meets_target(worst.peak_acceleration_m_s2, case.target_peak_m_s2):
                sizing, robust = size_for_band(case, load, settings.frequency_band, worst)
        result = header_block(case) | {
            "target": target_block(case),
            "bare": bare,
            "design": design_block(sizing.design) if sizing.design else None,
            "sizing": {"meets_target": sizing.meets_target, "governed_by": sizing.governed_by,
                       "message": sizing.message, "peak_method": peak_method(case)},
            "peak_estimates": peak_estimates(load, sizing.design),
        }
        if correction is not None:
            result["peak_correction"] = correction
            result["peak_estimates"]["simulated_peak_acceleration_m_s2"] = \
                correction["passes"][-1]["simulated_peak_m_s2"]
        if case.wind_loads:
            result["by_return_period"] = by_return_period(case, sizing.design)
        if sizing.design is not None:
            result |= extreme_checks(case, sizing.design, result.get("by_return_period"))
            result |= robustness_block(case, sizing.design.damper, robust=robust)
        else:
            result |= bare_sweeps(load, settings)
        result |= across_block(case)
        # The report's curves draw the design, its sweep and band design, not the
        # recommendation: the two are computed side by side (tmd.side_by_side).
        result["recommended"], result["figure_series"] = side_by_side(
            lambda: _recommended(case, load, result),
            lambda: figure_series_of(case, load, dict(result)))
        return result

    return with_notes(build, case)


def figure_series_of(case: Case, load: LoadedMode, result: dict) -> dict:
    """Compute the report's curves of a design or compare job (:mod:`tmd.jobs.figure_series`).

    Parameters
    ----------
    case : Case
        The validated case (its damper objective, mass and stroke limits).
    load : LoadedMode
        The case's design load.
    result : dict
        The job's results so far.

    Returns
    -------
    dict
        The ``figure_series`` block (:func:`tmd.jobs.figure_series.figure_series_block`).
    """
    with about(f"report figures on the {load_name(case)}"):
        return figure_series_block(load, result, objective=case.damper.objective,
                                   max_mass_ratio=case.damper.max_mass_ratio,
                                   max_stroke_m=case.damper.max_stroke_m)


def _recommended(case: Case, load: LoadedMode, result: dict) -> dict:
    """Return the ``recommended`` block (:mod:`tmd.recommend`) on the band check (always run)."""
    band = result.get("frequency_band", robustness_settings(case).frequency_band)
    bare_band = (result["bare"].get("peak_acceleration_band_max_m_s2")
                 if result["design"] is None else None)
    block = recommendation(result, bare_band_max_m_s2=bare_band, frequency_band=band)
    if block["design_key"] not in (None, "design"):
        # The extreme-wind checks of the design actually recommended.
        chosen = result[block["design_key"]]
        damper = TunedMassDamper(chosen["mass_ratio"], chosen["frequency_ratio"],
                                 chosen["damping_ratio"])
        design = evaluate_tmd(load, damper, case.target_peak_m_s2)
        rows = None
        if case.wind_loads:
            rows = [{"return_period_years": row["return_period_years"], "design": row["design"]}
                    for row in by_return_period(case, design)]
            block["by_return_period"] = rows
        block |= extreme_checks(case, design, rows, subject="the recommended design")
        block["peak_estimates"] = peak_estimates(load, design,
                                                 simulation=simulation_settings(case))
    elif block["design_key"] == "design" and "peak_correction" not in result:
        block["peak_estimates"] = peak_estimates(load, _nominal_design(load, result),
                                                 simulation=simulation_settings(case))
    elif block["design_key"] == "design":
        block["peak_estimates"] = result["peak_estimates"]
    else:
        block["peak_estimates"] = peak_estimates(load, None, simulation=simulation_settings(case))
    return block


def _nominal_design(load: LoadedMode, result: dict) -> TmdDesign:
    """Return the nominal design of a results dict, evaluated again on its load."""
    d = result["design"]
    return evaluate_tmd(load, TunedMassDamper(d["mass_ratio"], d["frequency_ratio"],
                                              d["damping_ratio"]),
                        result["target"]["peak_acceleration_m_s2"])


def evaluate_job(case: Case, damper: TunedMassDamper) -> dict:
    """Run the evaluate job: the responses of one given TMD design on the case.

    Parameters
    ----------
    case : Case
        The validated case file (:func:`tmd.case.read_case`).
    damper : TunedMassDamper
        The TMD by mass ratio, frequency ratio and damping ratio (e.g. a
        proposed or as-built damper).

    Returns
    -------
    dict
        results.json of ``tmd evaluate``: header, target, bare, design,
        per-return-period rows, end-stops, warnings and cautions.
    """

    def build():
        load = loaded_mode_of(case)
        design = evaluate_tmd(load, damper, case.target_peak_m_s2)
        result = header_block(case) | {
            "target": target_block(case),
            "bare": bare_block(load),
            "design": design_block(design),
        }
        if case.wind_loads:
            result["by_return_period"] = by_return_period(case, design)
        result |= across_block(case)
        return result | extreme_checks(case, design, result.get("by_return_period"))

    return with_notes(build, case)
