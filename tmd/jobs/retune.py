"""The retune job: a built damper re-tuned to the measured structure."""

from __future__ import annotations

from tmd.case import Case
from tmd.defaults import FREQUENCY_BAND
from tmd.identify import DAMPING_NOTE
from tmd.jobs.shared import loaded_mode_of, with_notes
from tmd.retune import measured_structure, retune_damper


def retune_job(case: Case, installed, frequency_hz: float, *, damping_ratio: float | None = None,
               modal_mass_kg: float | None = None, adjustment_band: float | None = None) -> dict:
    """Re-tune a built damper (``tmd.retune.BuiltDamper``) to the measured structure.

    Parameters
    ----------
    case : Case
        The validated case file (:func:`tmd.case.read_case`).
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

    result = with_notes(build, case)  # warnings name the design load it is retuned under
    result["retuned"] |= {"warnings": result.pop("warnings"), "cautions": result.pop("cautions")}
    return result
