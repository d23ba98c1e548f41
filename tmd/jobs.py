"""One call per job: what the CLI runs, returning plain result dictionaries.

Each job takes a validated :class:`tmd.case.Case` and returns the dictionary
that is written as results.json (keys end with their SI unit; dimensionless
keys have none). Nothing here prints or writes files.
"""

from __future__ import annotations

import warnings
from collections.abc import Callable
from dataclasses import asdict
from pathlib import Path

from tmd._version import __version__
from tmd.case import Case, CaseError, RobustnessTable
from tmd.dampers.tuned_mass import TunedMassDamper
from tmd.defaults import FREQUENCY_BAND
from tmd.design import LoadedMode, Sizing, TmdDesign, bare_response, evaluate_tmd, least_mass, tune
from tmd.notes import DEFAULT_LOAD, about, collect
from tmd.schema import CAUTIONS, SCHEMA_VERSION, design_block
from tmd.verdict import meets_target
from tmd.wind_loads import WindLoad

# Records of the side-by-side simulated peak of the recommended design when the
# case has no [simulation] table: a check, about 1.5% sampling error on the mean.
CHECK_RECORDS = 40


def loaded_mode_of(case: Case, wind_load: WindLoad | None = None) -> LoadedMode:
    """The case's mode under its design load (or one return period's wind load).

    The mode's damping includes the aerodynamic damping of that load when
    the case asks for it; accelerations are at the evaluation height.
    """
    load = wind_load if wind_load is not None else case.design_wind_load
    method = spectral_peak_method(case)
    if load is None:
        return LoadedMode(case.mode, case.spectrum, case.duration_s, case.shape_factor, method)
    aero = load.aerodynamic_damping_ratio
    mode = case.mode.with_damping(case.mode.damping_ratio + aero)
    return LoadedMode(mode, load.spectrum, case.duration_s, case.shape_factor, method,
                      aerodynamic_damping_ratio=aero)


def peak_method(case: Case) -> str:
    """The case's ``[target] peak_method``: davenport, vanmarcke or simulated."""
    return case.tables.target.peak_method if case.tables is not None else "davenport"


def spectral_peak_method(case: Case) -> str:
    """The spectral peak estimate of the engine's load cases.

    ``"simulated"`` sizes with Davenport's peak, corrected by simulation in
    an outer loop (:mod:`tmd.simulated_sizing`).
    """
    method = peak_method(case)
    return "davenport" if method == "simulated" else method


def by_return_period(case: Case, design: TmdDesign | None) -> list[dict]:
    """Bare and damped responses for every return period of a wind case."""
    rows = []
    for wind_load in case.wind_loads:
        with about(load_name(case, wind_load)):
            rows.append(_return_period_row(case, design, wind_load))
    return rows


def _return_period_row(case: Case, design: TmdDesign | None, wind_load: WindLoad) -> dict:
    """One return period's bare and damped responses."""
    load = loaded_mode_of(case, wind_load)
    row = {"return_period_years": wind_load.return_period_years,
           "mean_speed_m_s": wind_load.mean_speed_m_s,
           "aerodynamic_damping_ratio": wind_load.aerodynamic_damping_ratio,
           **_vortex_keys(case, wind_load.return_period_years),
           "bare": asdict(bare_response(load))}
    if design is not None:
        d = evaluate_tmd(load, design.damper, case.target_peak_m_s2
                         if wind_load.return_period_years == case.target_return_period_years
                         else None)
        row["design"] = {key: getattr(d, key) for key in (
            "sigma_acceleration_m_s2", "peak_acceleration_m_s2", "sigma_stroke_m",
            "peak_stroke_m", "peak_damper_force_n", "effective_damping_ratio")}
        if case.damper.max_stroke_m is not None:  # checked at every return period
            row["design"]["stroke_within_limit"] = meets_target(d.peak_stroke_m,
                                                                case.damper.max_stroke_m)
    return row


def _vortex_keys(case: Case, period: float) -> dict:
    """Top speed, reduced velocity, v_crit, lock-in flag and C'_L of one return period."""
    block = case.across_wind
    if not block:
        return {}
    row = next(r for r in block["by_return_period"] if r["return_period_years"] == period)
    return {"top_mean_speed_m_s": row["top_mean_speed_m_s"],
            "reduced_velocity": row["reduced_velocity"],
            "critical_speed_m_s": row["critical_speed_m_s"],
            "lock_in_possible": row["lock_in_possible"],
            "rms_lift_coefficient": block["rms_lift_coefficient"]}


def _across_check(case: Case, wind_load: WindLoad) -> dict:
    """Bare peak acceleration under the across-wind model, for an along-wind case.

    The across-wind sway mode is taken with the case's [mode] properties and
    its structural damping only (no aerodynamic damping across the wind).
    """
    if case.direction_of_response != "along" or wind_load.top_mean_speed_m_s is None:
        return {}
    from tmd.wind_setup import across_wind_spectrum

    spectrum = across_wind_spectrum(case.building, wind_load.top_mean_speed_m_s,
                                    case.site.air_density_kg_m3, wind_load.return_period_years)
    bare = bare_response(LoadedMode(case.mode, spectrum, case.duration_s, case.shape_factor))
    return {"across_spectral_peak_acceleration_m_s2": bare.peak_acceleration_m_s2}


def _across_block(case: Case) -> dict:
    """``direction_of_response`` and the ``across_wind`` block of a wind case."""
    if case.across_wind is None:
        return {}
    return {"direction_of_response": case.direction_of_response,
            "across_wind": case.across_wind}


def _header(case: Case) -> dict:
    return {
        "tool_version": __version__,
        "schema_version": SCHEMA_VERSION,
        "case": {"name": case.name, "path": str(case.path), "inputs": case.inputs},
    }


def _bare_block(load: LoadedMode) -> dict:
    return asdict(bare_response(load))


def _target_block(case: Case) -> dict:
    block = {"peak_acceleration_m_s2": case.target_peak_m_s2, "duration_s": case.duration_s,
             "peak_method": peak_method(case)}
    if case.tables is not None and case.tables.target.peak_fractile is not None:
        block["peak_fractile"] = case.tables.target.peak_fractile
    if case.target_return_period_years is not None:
        block["return_period_years"] = case.target_return_period_years
    return block


def stroke_cases_of(case: Case) -> tuple[LoadedMode, ...]:
    """Loads besides the design one under which the stroke limit constrains the tuning.

    Parameters
    ----------
    case : Case

    Returns
    -------
    tuple of LoadedMode
        The wind load of ``[damper] stroke_return_period_years`` when it is
        given and differs from the target's return period; else empty.
    """
    period = case.damper.stroke_return_period_years
    if period is None or period == case.target_return_period_years:
        return ()
    return tuple(loaded_mode_of(case, w) for w in case.wind_loads
                 if w.return_period_years == period)


def extreme_checks(case: Case, design: TmdDesign, rows: list[dict] | None,
                   subject: str = "the design") -> dict:
    """The ``end_stops`` block, and a warning per return period whose stroke exceeds the limit.

    Parameters
    ----------
    case : Case
    design : TmdDesign
    rows : list of dict or None
        The ``by_return_period`` rows (None for a force-spectrum case).
    subject : str
        Which design it is, in the warnings.

    Returns
    -------
    dict
        ``{"end_stops": {...}}`` (see :func:`tmd.endstops.end_stop_block`).
    """
    from tmd.endstops import StrokeLimitWarning, end_stop_block, stroke_limit_messages

    if case.wind_loads:
        loads = [(w.return_period_years, loaded_mode_of(case, w)) for w in case.wind_loads]
    else:
        loads = [(None, loaded_mode_of(case))]
    block = end_stop_block(loads, design.damper, case.damper.max_stroke_m)
    if rows and case.damper.max_stroke_m is not None:
        constrained = tuple(p for p in (case.target_return_period_years,
                                        case.damper.stroke_return_period_years) if p is not None)
        for message in stroke_limit_messages(rows, block, case.damper.max_stroke_m, constrained,
                                             subject):
            warnings.warn(message, StrokeLimitWarning, stacklevel=2)
    return {"end_stops": block}


def size_damper(case: Case, target_m_s2: float | None = None) -> Sizing:
    """The TMD the case asks for: tuned at a fixed mass ratio, or the least mass.

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
    """The sizing by the case's peak method, with the simulated loop's record if it ran.

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
    from tmd.simulated_sizing import size_for_simulated_peak
    from tmd.simulation import SimulationSettings

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
    from dataclasses import replace

    from tmd.dampers.absorber import Absorbers

    absorbers = Absorbers.none() if design is None else design.damper.absorbers(load.mode)
    block = {f"{method}_peak_acceleration_m_s2": float(
        replace(load, peak_method=method).assess(absorbers).peak_acceleration_m_s2)
        for method in ("davenport", "vanmarcke")}
    if simulation is not None:
        from tmd.simulated_sizing import common_period_s, simulated_peak

        block["simulated_peak_acceleration_m_s2"] = simulated_peak(
            load, design, simulation, common_period_s(load, design, simulation.duration_s))
        block["simulated_records"] = simulation.records
    return block


def simulation_settings(case: Case, *, check_records: int = CHECK_RECORDS):
    """The case's Monte Carlo settings (``[simulation]``), or a light check's.

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
    from tmd.simulation import SimulationSettings

    table = case.tables.simulation if case.tables is not None else None
    if table is None:
        return SimulationSettings(records=check_records, duration_s=case.duration_s)
    return SimulationSettings(records=table.records, seed=table.seed,
                              time_step_s=table.time_step_s, duration_s=case.duration_s)


def load_name(case: Case, wind_load: WindLoad | None = None) -> str:
    """The load in words, for warnings: "1-year wind (design load)" or the force spectrum file."""
    if case.wind_loads:
        period = (wind_load.return_period_years if wind_load is not None
                  else case.target_return_period_years)
        design = " (design load)" if period == case.target_return_period_years else ""
        return f"{period:g}-year wind{design}"
    source = getattr(case.spectrum, "source", "") or "the force spectrum"
    return f"design load ({Path(source).name})"


def _with_notes(build: Callable[[], dict], case: Case | None = None) -> dict:
    """Run a job's ``build``; add its warnings (one per cause and load) and the cautions.

    Warnings about the case's inputs come first; the computation's own are
    merged by :func:`tmd.notes.collect`, each naming its load.
    """
    first = (*case.notes, *case.across_notes) if case is not None else ()
    with about(load_name(case) if case is not None else DEFAULT_LOAD):
        result, lines = collect(build, first)
    result["warnings"] = lines
    result["cautions"] = list(CAUTIONS)
    return result


def design_job(case: Case) -> dict:
    """Bare response, sized TMD and the numbers of its specification."""

    def build():
        load = loaded_mode_of(case)
        settings = robustness_settings(case)
        bare = _bare_block(load)
        sizing, correction = sized_for_peak_method(case)
        robust = None
        if sizing.design is None:
            # "No damper" must hold across the band too; otherwise size for it.
            worst = _bare_band_maximum(load, settings.frequency_band)
            bare |= {"peak_acceleration_band_max_m_s2": worst.peak_acceleration_m_s2,
                     "worst_structure_frequency_factor": worst.structure_frequency_factor}
            if not meets_target(worst.peak_acceleration_m_s2, case.target_peak_m_s2):
                sizing, robust = _size_for_band(case, load, settings.frequency_band, worst)
        result = _header(case) | {
            "target": _target_block(case),
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
            result |= _bare_sweeps(load, settings)
        result |= _across_block(case)
        result["recommended"] = _recommended(case, load, result)
        return result

    return _with_notes(build, case)


def _recommended(case: Case, load: LoadedMode, result: dict) -> dict:
    """The ``recommended`` block (:mod:`tmd.recommend`) on the band check, which always runs."""
    from tmd.recommend import recommendation

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
    """The nominal design of a results dict, evaluated again on its load."""
    d = result["design"]
    return evaluate_tmd(load, TunedMassDamper(d["mass_ratio"], d["frequency_ratio"],
                                              d["damping_ratio"]),
                        result["target"]["peak_acceleration_m_s2"])


def robustness_settings(case: Case) -> RobustnessTable:
    """The case's [robustness] table; without one, its defaults with the sweeps only.

    The detuning sweeps and the band maximum run for every design (an
    engineer always needs the sensitivity to detuning); the robust re-design
    and the probabilistic study, the heavier parts, only when the case's
    [robustness] table asks for them.
    """
    if case.tables.robustness is not None:
        return case.tables.robustness
    return RobustnessTable(robust_design=False)


def _bare_band_maximum(load: LoadedMode, band: float):
    from tmd.robust import peak_acceleration_band_max

    return peak_acceleration_band_max(load, None, band)


def _bare_sweeps(load: LoadedMode, settings: RobustnessTable) -> dict:
    from tmd.robust import sweep_structure_frequency

    return {"frequency_band": settings.frequency_band,
            "sweep_bare": sweep_structure_frequency(load, None,
                                                    sweep_range=settings.sweep_range)}


def _size_for_band(case: Case, load: LoadedMode, band: float, worst):
    """The least-mass TMD meeting the target across the band, when the bare building
    meets it only at the nominal frequency (returns the Sizing and the RobustSizing)."""
    from tmd.robust import robust_least_mass

    robust = robust_least_mass(load, case.target_peak_m_s2, band,
                               max_mass_ratio=case.damper.max_mass_ratio,
                               max_stroke_m=case.damper.max_stroke_m)
    design = robust.design
    reason = (f"the bare building meets the target {case.target_peak_m_s2:.4g} m/s^2 at the "
              f"nominal frequency but not across the band ±{band:g} (worst peak "
              f"{worst.peak_acceleration_m_s2:.4g} m/s^2 at s = "
              f"{worst.structure_frequency_factor:.4g}), so the damper is sized for the band: ")
    if design is None:
        return Sizing(None, True, "bare", reason + robust.message), robust
    return Sizing(design, design.meets_target, "band", reason + robust.message), robust


def robustness_block(case: Case, damper: TunedMassDamper, *, robust=None) -> dict:
    """Detuning sweeps, band maximum, robust and probabilistic designs of the case.

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
    from tmd.robust import robustness_study
    from tmd.robust.probabilistic import Distribution, Uncertainty

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
            robust_sizing=robust)
    study["robustness_summary"] = study.pop("summary")
    return study


def sweep_job(case: Case, damper: TunedMassDamper) -> dict:
    """Detuning sweeps of any given design (e.g. an as-built damper)."""
    from tmd.robust import design_sweeps

    r = robustness_settings(case)

    def build():
        load = loaded_mode_of(case)
        result = _header(case) | {
            "target": _target_block(case),
            "design": design_block(evaluate_tmd(load, damper, case.target_peak_m_s2)),
        }
        with about(f"detuning sweep on the {load_name(case)}"):
            return result | design_sweeps(load, damper, frequency_band=r.frequency_band,
                                          sweep_range=r.sweep_range)

    return _with_notes(build, case)


def option_settings_of(case: Case):
    """The options' settings from the case's [options.*] tables (their defaults otherwise).

    Parameters
    ----------
    case : Case

    Returns
    -------
    tmd.compare.OptionSettings
        The viscous installation (default deformation per modal displacement
        0.03, a storey-drift damper, not the idealised top-to-ground one) and
        the pendulum stages; the other options keep their dataclass defaults.
    """
    from tmd.compare import OptionSettings
    from tmd.dampers.pendulum import PendulumSettings
    from tmd.sizing.viscous import ViscousSettings

    opts = case.tables.options
    if opts is None:
        from tmd.case import OptionsTable

        opts = OptionsTable()
    return OptionSettings(
        pendulum=PendulumSettings(opts.pendulum.stages),
        viscous=ViscousSettings(opts.viscous.deformation, opts.viscous.damper_count,
                                opts.viscous.force_capacity_n, opts.viscous.stroke_capacity_m))


def compare_job(case: Case) -> dict:
    """Every enabled passive option sized on the case, side by side."""
    from tmd.compare import compare_options

    opts = case.tables.options
    band = None if opts is None else opts.frequency_band
    if band is None:
        band = case.tables.robustness.frequency_band if case.tables.robustness else FREQUENCY_BAND

    def build():
        load = loaded_mode_of(case)
        return _header(case) | {
            "target": _target_block(case),
            "bare": _bare_block(load),
            "options_frequency_band": band,
            "options": _options(load),
        }

    def _options(load):
        with about(f"options comparison on the {load_name(case)}"):
            return compare_options(
                load, case.target_peak_m_s2, enabled=None if opts is None else opts.enabled,
                max_mass_ratio=case.damper.max_mass_ratio,
                max_stroke_m=case.damper.max_stroke_m, frequency_band=band,
                tmd_sizing=size_damper(case), settings=option_settings_of(case))

    return _with_notes(build, case)


def evaluate_job(case: Case, damper: TunedMassDamper) -> dict:
    """Responses of one given TMD design on the case."""

    def build():
        load = loaded_mode_of(case)
        design = evaluate_tmd(load, damper, case.target_peak_m_s2)
        result = _header(case) | {
            "target": _target_block(case),
            "bare": _bare_block(load),
            "design": design_block(design),
        }
        if case.wind_loads:
            result["by_return_period"] = by_return_period(case, design)
        result |= _across_block(case)
        return result | extreme_checks(case, design, result.get("by_return_period"))

    return _with_notes(build, case)


def wind_job(case: Case) -> dict:
    """Wind at the reference height and the EN 1991-1-4 Annex B check per return period,
    beside the spectral route's bare-building acceleration at the evaluation height,
    and the vortex-shedding check of the across-wind model."""
    from tmd.codecheck import annex_b_check
    from tmd.loads import aerodynamic_damping_ratio, reference_height
    from tmd.wind import MAXIMUM_HEIGHT_M, Site, velocity_spectrum

    if case.site is None:
        raise CaseError(f"{case.path}: 'tmd wind' needs a case with [wind] and [building]")
    z_s = float(reference_height(case.site, case.building))
    across = case.direction_of_response == "across"
    # Annex B is EN's along-wind route on EN's profile: up to 200 m only.
    code_check = isinstance(case.site, Site) and case.building.height_m <= MAXIMUM_HEIGHT_M
    notes = [*case.notes, *case.across_notes]
    if not code_check:
        notes.append("EN 1991-1-4 Annex B check not given: the building is above 200 m or the "
                     "wind profile is not EN's")
    rows = []
    for wind_load in case.wind_loads:
        period = wind_load.return_period_years
        code = (annex_b_check(case.site, case.building, case.mode, period,
                              duration_s=case.duration_s).as_dict() if code_check else {})
        # EN's route always includes the aerodynamic damping (F.18); so does
        # the along-wind spectral route here, so that the two are compared like
        # for like. F.18 does not apply across the wind.
        aero = 0.0 if across else float(aerodynamic_damping_ratio(
            case.site, case.building, case.mode.modal_mass_kg, case.mode.frequency_hz, period))
        mode = case.mode.with_damping(case.mode.damping_ratio + aero)
        spectral = bare_response(LoadedMode(mode, wind_load.spectrum, case.duration_s,
                                            case.shape_factor))
        s_u = velocity_spectrum(case.site, z_s, case.mode.frequency_hz, period,
                                case.wind_settings["spectrum"])
        rows.append({"return_period_years": period, **code,
                     **_vortex_keys(case, period), **_across_check(case, wind_load),
                     "wind_spectrum_at_mode_m2_s2_per_hz": float(s_u),
                     "aerodynamic_damping_ratio": aero,
                     "spectral_sigma_acceleration_m_s2": spectral.sigma_acceleration_m_s2,
                     "spectral_peak_acceleration_m_s2": spectral.peak_acceleration_m_s2})
    return {"tool_version": __version__, "schema_version": SCHEMA_VERSION,
            "case": {"name": case.name, "path": str(case.path)}, "return_periods": rows,
            **_across_block(case), "warnings": list(dict.fromkeys(notes)),
            "cautions": list(CAUTIONS)}


def retune_job(case: Case, installed, frequency_hz: float, *, damping_ratio: float | None = None,
               modal_mass_kg: float | None = None, adjustment_band: float | None = None) -> dict:
    """Re-tune a built damper (``tmd.retune.BuiltDamper``) to the measured structure.

    Parameters
    ----------
    case : Case
    installed : tmd.retune.BuiltDamper
        The damper as built (from a results.json design block).
    frequency_hz : float
        Measured natural frequency [Hz].
    damping_ratio : float, optional
        Measured damping ratio [-]; replaces the case's structural damping.
    modal_mass_kg : float, optional
        Measured modal mass [kg]; M* keeps the case's value otherwise.
    adjustment_band : float, optional
        b of the specified adjustment range; the case's [robustness]
        frequency_band, else 0.15 (the report's re-tuning table).

    Returns
    -------
    dict
        ``{"retuned": {...}}`` with the damping note, warnings and cautions
        inside the block.
    """
    from tmd.identify import DAMPING_NOTE
    from tmd.retune import measured_structure, retune_damper

    if adjustment_band is None:
        r = case.tables.robustness
        adjustment_band = r.frequency_band if r is not None else FREQUENCY_BAND
    load = case.design_wind_load
    aero = load.aerodynamic_damping_ratio if load is not None else 0.0
    structure = measured_structure(case.mode, case.mode.damping_ratio, aero, frequency_hz,
                                   damping_ratio=damping_ratio, modal_mass_kg=modal_mass_kg)

    def build():
        r = retune_damper(loaded_mode_of(case), structure, installed,
                          adjustment_band=adjustment_band, objective=case.damper.objective,
                          max_stroke_m=case.damper.max_stroke_m,
                          target_peak_m_s2=case.target_peak_m_s2)
        return {"retuned": r.as_dict() | {"damping_note": DAMPING_NOTE}}

    result = _with_notes(build)
    result["retuned"] |= {"warnings": result.pop("warnings"), "cautions": result.pop("cautions")}
    return result




def simulation_job(case: Case, device: dict, settings, *, end_stop_travel_m: float | None = None
                   ) -> tuple[dict, dict]:
    """Monte Carlo check of a design at every load of the case (time domain).

    Parameters
    ----------
    case : Case
        The case the design was made for.
    device : dict
        ``{"kind": "tmd", "damper": TunedMassDamper}`` or ``{"kind":
        "liquid-column", "row": <the option row of a compare results.json>}``.
    settings : tmd.simulation.SimulationSettings
        Records, duration, step and seed.
    end_stop_travel_m : float, optional
        Travel +-a of end-stops on the TMD's stroke [m]; none when omitted.

    Returns
    -------
    result : dict
        results.json with a ``simulation`` block: per load (each return
        period of a wind case, else the design load) the bare and damped
        statistics.
    history : dict
        One record's time history at the design load, for the CSV.
    """
    from tmd.dampers.absorber import Absorbers
    from tmd.simulation import simulate

    holder = {}

    def build():
        loads = [(w.return_period_years, w) for w in case.wind_loads] or [(None, None)]
        rows = []
        for years, wind_load in loads:
            load = loaded_mode_of(case, wind_load)
            m = load.mode
            absorbers, nonlinear, linear_zeta, freeboard = _simulated_device(
                load, device, end_stop_travel_m)
            common = (m.frequency_hz, m.modal_mass_kg, m.damping_ratio)
            limit = case.target_peak_m_s2 if years == case.target_return_period_years else None
            bare = simulate(*common, Absorbers.none(), load.spectrum, settings,
                            shape_factor=load.shape_factor)
            damped = simulate(*common, absorbers, load.spectrum, settings,
                              shape_factor=load.shape_factor, nonlinear=nonlinear,
                              linear_damping_ratio=linear_zeta)
            row = {"bare": {"acceleration": bare.acceleration.summary("m_s2", limit)},
                   "design": _simulated_design(damped, limit, case, freeboard),
                   "record_period_s": damped.period_s, "time_step_s": damped.time_step_s}
            if years is not None:
                row = {"return_period_years": years,
                       "mean_speed_m_s": wind_load.mean_speed_m_s} | row
            rows.append(row)
            if years == case.target_return_period_years:
                holder["history"] = damped.history
                holder["maxima"] = {"design": damped.acceleration.maxima_abs.tolist(),
                                    "bare": bare.acceleration.maxima_abs.tolist()}
        block = {"records": settings.records, "duration_s": settings.duration_s,
                 "seed": settings.seed, "device": device["kind"],
                 "method": "spectral representation (Shinozuka & Deodatis 1991), exact "
                           "first-order-hold integration from the periodic steady state",
                 "by_load": rows}
        return _header(case) | {"target": _target_block(case), "simulation": block}

    result = _with_notes(build, case)
    return result, holder


def _simulated_device(load: LoadedMode, device: dict, end_stop_travel_m):
    """Absorbers, nonlinear elements, integrated damping and freeboard of a device."""
    import numpy as np

    from tmd.dampers.absorber import Absorbers
    from tmd.timehistory import NonlinearAbsorber

    m = load.mode
    if device["kind"] == "tmd":
        d = device["damper"]
        absorbers = d.absorbers(m)  # one design (batch shape ()), one absorber
        if end_stop_travel_m is None:
            return absorbers, None, None, None
        return absorbers, NonlinearAbsorber(np.zeros(1), np.full(1, end_stop_travel_m)), None, None
    from tmd.dampers.liquid_column import column_damping_gain
    from tmd.sizing.liquid_column import velocity_proportional_fixed_point

    row = device["row"]
    length = row["dimensions"]["liquid_length_m"]
    gain = float(column_damping_gain(row["head_loss_coefficient"], length, row["frequency_hz"]))
    zeta, _ = velocity_proportional_fixed_point(load, row["mass_kg"], row["frequency_hz"],
                                                row["length_ratio"], gain)
    absorbers = Absorbers(np.array([row["mass_kg"]]), np.array([row["frequency_hz"]]),
                          np.asarray(zeta, float).reshape(1), np.array([row["length_ratio"]]))
    travel = end_stop_travel_m if end_stop_travel_m is not None else np.inf
    nonlinear = NonlinearAbsorber(np.array([row["head_loss_coefficient"] / (2.0 * length)]),
                                  np.full(1, travel))
    freeboard = (row["dimensions"]["vertical_leg_height_m"]
                 - row["dimensions"]["vertical_liquid_height_m"])
    return absorbers, nonlinear, np.zeros(1), freeboard


def _simulated_design(sim, limit, case: Case, freeboard_m):
    """The damped statistics block of one load."""
    import numpy as np

    stroke_limit = case.damper.max_stroke_m
    block = {"acceleration": sim.acceleration.summary("m_s2", limit),
             "stroke": sim.stroke.summary("m", freeboard_m if freeboard_m is not None
                                          else stroke_limit),
             "damper_force": sim.force.summary("n")}
    if freeboard_m is not None:
        # The liquid rises in a leg by its displacement along the column.
        block["freeboard_m"] = freeboard_m
        block["overflow_record_fraction"] = float(np.mean(sim.stroke.maxima_abs > freeboard_m))
    if sim.stop_contacts_per_hour is not None:
        block["hourly_end_stop_contact_count"] = sim.stop_contacts_per_hour
        block["end_stop_contact_record_fraction"] = sim.records_with_stop_contact
    if sim.step_check_change is not None:
        block["step_halving_stroke_rms_change_fraction"] = sim.step_check_change
    return block
