"""The case's loaded modes and the results blocks every job shares.

The blocks: header, target, bare response, per-return-period rows, end-stop
checks, warnings and cautions.
"""

from __future__ import annotations

import warnings
from collections.abc import Callable
from dataclasses import asdict
from pathlib import Path

from tmd._version import __version__
from tmd.case import Case
from tmd.design import LoadedMode, TmdDesign, bare_response, evaluate_tmd
from tmd.endstops import StrokeLimitWarning, end_stop_block, stroke_limit_messages
from tmd.notes import DEFAULT_LOAD, about, collect
from tmd.schema import CAUTIONS, SCHEMA_VERSION
from tmd.verdict import meets_target
from tmd.wind_loads import WindLoad
from tmd.wind_setup import along_spectra, spectra_block


def loaded_mode_of(case: Case, wind_load: WindLoad | None = None) -> LoadedMode:
    """Return the case's mode under its design load (or one return period's wind load).

    The mode's damping includes the aerodynamic damping of that load when
    the case asks for it; accelerations are at the evaluation height.

    Parameters
    ----------
    case : Case
        The validated case file (:func:`tmd.case.read_case`).
    wind_load : WindLoad, optional
        One return period's wind load (:mod:`tmd.wind_loads`); by default the
        case's design load.

    Returns
    -------
    LoadedMode
        The mode (damping structural plus aerodynamic), its one-sided modal
        force PSD [N^2/Hz], the peak duration [s], the mode-shape value at the
        evaluation height [-] and the spectral peak method.
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
    """Return the case's ``[target] peak_method``: davenport, vanmarcke or simulated.

    Parameters
    ----------
    case : Case
        The validated case file (:func:`tmd.case.read_case`).

    Returns
    -------
    str
        The method as written in the case ("davenport" when not given).
    """
    return case.tables.target.peak_method if case.tables is not None else "davenport"


def spectral_peak_method(case: Case) -> str:
    """Return the spectral peak estimate of the engine's load cases.

    ``"simulated"`` sizes with Davenport's peak, corrected by simulation in
    an outer loop (:mod:`tmd.simulated_sizing`).

    Parameters
    ----------
    case : Case
        The validated case file (:func:`tmd.case.read_case`).

    Returns
    -------
    str
        "davenport" or "vanmarcke".
    """
    method = peak_method(case)
    return "davenport" if method == "simulated" else method


def load_name(case: Case, wind_load: WindLoad | None = None) -> str:
    """Return the load in words, for warnings.

    Parameters
    ----------
    case : Case
        The validated case file (:func:`tmd.case.read_case`).
    wind_load : WindLoad, optional
        One return period's wind load (:mod:`tmd.wind_loads`); by default the
        case's design load.

    Returns
    -------
    str
        E.g. "1-year wind (design load)", or "design load (file.csv)" for a
        force-spectrum case.
    """
    if case.wind_loads:
        period = (wind_load.return_period_years if wind_load is not None
                  else case.target_return_period_years)
        design = " (design load)" if period == case.target_return_period_years else ""
        return f"{period:g}-year wind{design}"
    source = getattr(case.spectrum, "source", "") or "the force spectrum"
    return f"design load ({Path(source).name})"


def with_notes(build: Callable[[], dict], case: Case | None = None) -> dict:
    """Run a job's ``build``; add its warnings (one per cause and load) and the cautions.

    Warnings about the case's inputs come first; the computation's own are
    merged by :func:`tmd.notes.collect`, each naming its load.

    Parameters
    ----------
    build : callable
        The job's computation, taking no argument and returning its results
        dictionary.
    case : Case, optional
        The validated case, whose input warnings come first and whose design
        load names the computation's warnings.

    Returns
    -------
    dict
        ``build()``'s results with ``warnings`` (list of str) and ``cautions``
        added.
    """
    first = (*case.notes, *case.across_notes) if case is not None else ()
    with about(load_name(case) if case is not None else DEFAULT_LOAD):
        result, lines = collect(build, first)
    result["warnings"] = lines
    result["cautions"] = list(CAUTIONS)
    return result


def header_block(case: Case) -> dict:
    """Return the header of results.json: tool and schema versions and the case.

    Parameters
    ----------
    case : Case
        The validated case file (:func:`tmd.case.read_case`).

    Returns
    -------
    dict
        ``tool_version``, ``schema_version`` and ``case`` (name, path, inputs).
    """
    return {
        "tool_version": __version__,
        "schema_version": SCHEMA_VERSION,
        "case": {"name": case.name, "path": str(case.path), "inputs": case.inputs},
    }


def bare_block(load: LoadedMode) -> dict:
    """Return the ``bare`` block of results.json: the building without a damper.

    Parameters
    ----------
    load : LoadedMode
        The mode under its design load.

    Returns
    -------
    dict
        The fields of :class:`tmd.design.BareResponse` (rms and peak
        acceleration [m/s^2], peak factor [-], up-crossing rate [Hz], rms
        displacement [m]).
    """
    return asdict(bare_response(load))


def target_block(case: Case) -> dict:
    """Return the ``target`` block of results.json.

    Parameters
    ----------
    case : Case
        The validated case file (:func:`tmd.case.read_case`).

    Returns
    -------
    dict
        ``peak_acceleration_m_s2`` [m/s^2], ``duration_s`` [s],
        ``peak_method``, and ``peak_fractile`` [-] and
        ``return_period_years`` [years] where the case gives them.
    """
    block = {"peak_acceleration_m_s2": case.target_peak_m_s2, "duration_s": case.duration_s,
             "peak_method": peak_method(case)}
    if case.tables is not None and case.tables.target.peak_fractile is not None:
        block["peak_fractile"] = case.tables.target.peak_fractile
    if case.target_return_period_years is not None:
        block["return_period_years"] = case.target_return_period_years
    return block


def across_block(case: Case) -> dict:
    """Return ``direction_of_response`` and the ``across_wind`` block of a wind case.

    Parameters
    ----------
    case : Case
        The validated case file (:func:`tmd.case.read_case`).

    Returns
    -------
    dict
        Both keys, or empty when the case has no across-wind model.
    """
    if case.across_wind is None:
        return {}
    rho = case.site.air_density_kg_m3 if case.site is not None else \
        case.tables.load.air_density_kg_m3
    spectra = spectra_block(case.building, case.mode.frequency_hz, case.wind_loads,
                            along_spectra(case), rho)
    return {"direction_of_response": case.direction_of_response,
            "across_wind": case.across_wind | {"spectra": spectra}}


def vortex_keys(case: Case, period: float) -> dict:
    """Return the vortex-shedding keys of one return period.

    Parameters
    ----------
    case : Case
        The validated case file (:func:`tmd.case.read_case`).
    period : float
        Return period of the wind [years], one of the case's.

    Returns
    -------
    dict
        ``top_mean_speed_m_s`` [m/s], ``reduced_velocity`` [-],
        ``critical_speed_m_s`` [m/s], ``lock_in_possible`` and
        ``rms_lift_coefficient`` [-]; empty without an across-wind model.
    """
    block = case.across_wind
    if not block:
        return {}
    row = next(r for r in block["by_return_period"] if r["return_period_years"] == period)
    return {"top_mean_speed_m_s": row["top_mean_speed_m_s"],
            "reduced_velocity": row["reduced_velocity"],
            "critical_speed_m_s": row["critical_speed_m_s"],
            "lock_in_possible": row["lock_in_possible"],
            "rms_lift_coefficient": block["rms_lift_coefficient"]}


def by_return_period(case: Case, design: TmdDesign | None) -> list[dict]:
    """Return the bare and damped responses for every return period of a wind case.

    Parameters
    ----------
    case : Case
        The validated case file (:func:`tmd.case.read_case`).
    design : TmdDesign or None
        The design whose damper (fixed mass, frequency and damping) is
        evaluated at each return period; None for the bare building only.

    Returns
    -------
    list of dict
        One ``by_return_period`` row per wind load: mean speed [m/s],
        aerodynamic damping ratio [-], ``bare`` and ``design`` responses.
    """
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
           **vortex_keys(case, wind_load.return_period_years),
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


def stroke_cases_of(case: Case) -> tuple[LoadedMode, ...]:
    """Return the loads besides the design one under which the stroke limit constrains the tuning.

    Parameters
    ----------
    case : Case
        The validated case file (:func:`tmd.case.read_case`).

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
    """Return the ``end_stops`` block; warn per return period whose stroke exceeds the limit.

    Parameters
    ----------
    case : Case
        The validated case file (:func:`tmd.case.read_case`).
    design : TmdDesign
        The design whose damper is checked at every load.
    rows : list of dict or None
        The ``by_return_period`` rows (None for a force-spectrum case).
    subject : str
        Which design it is, in the warnings.

    Returns
    -------
    dict
        ``{"end_stops": {...}}`` (see :func:`tmd.endstops.end_stop_block`).
    """
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
