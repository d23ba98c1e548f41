"""The wind job: wind at the reference height, EN 1991-1-4 Annex B and the spectral route.

Both per return period.
"""

from __future__ import annotations

from tmd._version import __version__
from tmd.case import Case, CaseError
from tmd.codecheck import annex_b_check
from tmd.design import LoadedMode, bare_response
from tmd.jobs.shared import across_block, vortex_keys
from tmd.loads import aerodynamic_damping_ratio, reference_height
from tmd.schema import CAUTIONS, SCHEMA_VERSION
from tmd.wind import MAXIMUM_HEIGHT_M, Site, velocity_spectrum
from tmd.wind_loads import WindLoad
from tmd.wind_setup import across_wind_spectrum


def across_check(case: Case, wind_load: WindLoad) -> dict:
    """Return the bare peak acceleration under the across-wind model, for an along-wind case.

    The across-wind sway mode is taken with the case's [mode] properties and
    its structural damping only (no aerodynamic damping across the wind).

    Parameters
    ----------
    case : Case
        The validated case file (:func:`tmd.case.read_case`).
    wind_load : WindLoad
        One return period's wind load (its top mean speed sets the
        across-wind spectrum).

    Returns
    -------
    dict
        ``across_spectral_peak_acceleration_m_s2`` [m/s^2]; empty for an
        across-wind case or without a top speed.
    """
    if case.direction_of_response != "along" or wind_load.top_mean_speed_m_s is None:
        return {}
    spectrum = across_wind_spectrum(case.building, wind_load.top_mean_speed_m_s,
                                    case.site.air_density_kg_m3, wind_load.return_period_years)
    bare = bare_response(LoadedMode(case.mode, spectrum, case.duration_s, case.shape_factor))
    return {"across_spectral_peak_acceleration_m_s2": bare.peak_acceleration_m_s2}


def wind_job(case: Case) -> dict:
    """Run the wind job: the wind and the bare building's acceleration per return period.

    Wind at the reference height and the EN 1991-1-4 Annex B check per return
    period, beside the spectral route's bare-building acceleration at the
    evaluation height, and the vortex-shedding check of the across-wind model.

    Parameters
    ----------
    case : Case
        The validated case file (:func:`tmd.case.read_case`).

    Returns
    -------
    dict
        results.json of ``tmd wind``: one ``return_periods`` row each (Annex B
        quantities, S_u at the mode [m^2/s^2/Hz], aerodynamic damping ratio
        [-], spectral rms and peak acceleration [m/s^2]), warnings, cautions.

    Raises
    ------
    CaseError
        If the case has no [wind] and [building] tables.

    References
    ----------
    EN 1991-1-4:2005+A1:2010, Annex B (procedure 1) and Annex F (F.18).
    """
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
                     **vortex_keys(case, period), **across_check(case, wind_load),
                     "wind_spectrum_at_mode_m2_s2_per_hz": float(s_u),
                     "aerodynamic_damping_ratio": aero,
                     "spectral_sigma_acceleration_m_s2": spectral.sigma_acceleration_m_s2,
                     "spectral_peak_acceleration_m_s2": spectral.peak_acceleration_m_s2})
    return {"tool_version": __version__, "schema_version": SCHEMA_VERSION,
            "case": {"name": case.name, "path": str(case.path)}, "return_periods": rows,
            **across_block(case), "warnings": list(dict.fromkeys(notes)),
            "cautions": list(CAUTIONS)}
