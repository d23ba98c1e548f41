"""The arrays each report figure shows, read from results.json.

Every function returns plain numpy arrays in SI units (frequencies in Hz), so
that a figure can be checked against them. The curves come from the job's
``figure_series`` block (:mod:`tmd.jobs.figure_series`), computed on the
case's design load; the report computes nothing with the library.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from tmd.report.comfort import ComfortLimit


@dataclass(frozen=True)
class ResponseCurves:
    """Bare and damped curves on one frequency grid (damped is None without a damper).

    Parameters
    ----------
    frequency_hz : numpy.ndarray
        The grid [Hz].
    bare : numpy.ndarray
        The bare building's curve on it [unit of the figure].
    damped : numpy.ndarray or None
        The damped building's curve [same unit]; None without a damper.
    force_psd_n2_per_hz : numpy.ndarray
        The modal force PSD on the grid [N^2/Hz].
    """

    frequency_hz: np.ndarray
    bare: np.ndarray
    damped: np.ndarray | None
    force_psd_n2_per_hz: np.ndarray


@dataclass(frozen=True)
class Sweep:
    """Peak acceleration against the structure frequency factor s (f_s -> s f_s).

    Parameters
    ----------
    structure_frequency_factor : numpy.ndarray
        s [-], increasing.
    peak_acceleration_m_s2 : numpy.ndarray
        Peak acceleration at the evaluation height at each s [m/s^2].
    """

    structure_frequency_factor: np.ndarray
    peak_acceleration_m_s2: np.ndarray


@dataclass(frozen=True)
class ComfortResponse:
    """Peak accelerations of one return period at the building frequency.

    Parameters
    ----------
    return_period_years : float or None
        Return period of the wind [years]; None when the case states none.
    frequency_hz : float
        The building's natural frequency [Hz], where comfort limits are read.
    bare_peak_m_s2 : float
        Peak acceleration of the bare building [m/s^2].
    damped_peak_m_s2 : float or None
        Peak acceleration with the damper [m/s^2]; None without one.
    """

    return_period_years: float | None
    frequency_hz: float
    bare_peak_m_s2: float
    damped_peak_m_s2: float | None


def response_curves(block: dict) -> ResponseCurves:
    """Read the ``figure_series.response`` block as |H_a| curves, bare and damped.

    Parameters
    ----------
    block : dict
        ``figure_series.response`` of results.json.

    Returns
    -------
    ResponseCurves
        |H_a(f)| at the evaluation height [m/s^2 per N], with the force PSD.
    """
    damped = block.get("damped_acceleration_gain_m_s2_per_n")
    return ResponseCurves(np.asarray(block["frequency_hz"], dtype=float),
                          np.asarray(block["bare_acceleration_gain_m_s2_per_n"], dtype=float),
                          None if damped is None else np.asarray(damped, dtype=float),
                          np.asarray(block["force_psd_n2_per_hz"], dtype=float))


def acceleration_psd(gain: ResponseCurves) -> ResponseCurves:
    """Return the one-sided acceleration PSD S_a(f) = |H_a(f)|^2 S_F(f), bare and damped.

    Parameters
    ----------
    gain : ResponseCurves
        |H_a| curves and the force PSD (:func:`response_curves`).

    Returns
    -------
    ResponseCurves
        S_a [(m/s^2)^2/Hz] on the same grid.
    """
    s_f = gain.force_psd_n2_per_hz
    return ResponseCurves(gain.frequency_hz, gain.bare ** 2 * s_f,
                          None if gain.damped is None else gain.damped ** 2 * s_f, s_f)


def sweep_from_results(rows: list[dict]) -> Sweep:
    """Return a results.json ``sweep`` / ``sweep_bare`` list as arrays, sorted by factor.

    Parameters
    ----------
    rows : list of dict
        Rows with ``structure_frequency_factor`` [-] and
        ``peak_acceleration_m_s2`` [m/s^2].

    Returns
    -------
    Sweep
        The rows as arrays, by increasing factor.
    """
    s = np.array([r["structure_frequency_factor"] for r in rows], dtype=float)
    a = np.array([r["peak_acceleration_m_s2"] for r in rows], dtype=float)
    order = np.argsort(s)
    return Sweep(s[order], a[order])


def entry_peak(entry: dict, group: str) -> float | None:
    """Return the peak acceleration of ``group`` in a ``by_return_period`` entry.

    Accepts the nested form ``entry[group]["peak_acceleration_m_s2"]`` and the
    flat form ``entry[group + "_peak_acceleration_m_s2"]``.

    Parameters
    ----------
    entry : dict
        One ``by_return_period`` row of results.json.
    group : str
        "bare" or "design".

    Returns
    -------
    float or None
        The peak [m/s^2]; None when the entry has none.
    """
    nested = entry.get(group)
    if isinstance(nested, dict) and nested.get("peak_acceleration_m_s2") is not None:
        return float(nested["peak_acceleration_m_s2"])
    flat = entry.get(f"{group}_peak_acceleration_m_s2")
    return None if flat is None else float(flat)


def design_return_period(results: dict) -> float | None:
    """Return the return period [years] of the design load, when the case states it.

    Parameters
    ----------
    results : dict
        results.json of a design job.

    Returns
    -------
    float or None
        ``target.return_period_years``; None if absent.
    """
    stated = results.get("target", {}).get("return_period_years")
    return None if stated is None else float(stated)


def comfort_responses(results: dict, structure_frequency_hz: float) -> list[ComfortResponse]:
    """Bare and damped peak accelerations per return period, for the comfort chart.

    One entry per ``by_return_period`` entry, plus the design load itself
    when its return period is not among them (or not stated).

    Parameters
    ----------
    results : dict
        results.json of a design job.
    structure_frequency_hz : float
        The building's natural frequency [Hz].

    Returns
    -------
    list of ComfortResponse
        The bare and damped peaks [m/s^2] per return period.
    """
    out = []
    for entry in results.get("by_return_period") or []:
        bare = entry_peak(entry, "bare")
        if bare is not None:
            out.append(ComfortResponse(float(entry["return_period_years"]),
                                       structure_frequency_hz, bare, entry_peak(entry, "design")))
    period = design_return_period(results)
    if all(r.return_period_years != period for r in out) or period is None:
        design = results.get("design")
        out.append(ComfortResponse(period, structure_frequency_hz,
                                   float(results["bare"]["peak_acceleration_m_s2"]),
                                   None if design is None else
                                   float(design["peak_acceleration_m_s2"])))
    return out


def matching_limits(limits, responses: list[ComfortResponse]) -> tuple[list[ComfortLimit],
                                                                       list[ComfortLimit]]:
    """Split comfort limits into those with a response of the same return period and the rest.

    Parameters
    ----------
    limits : iterable of ComfortLimit
        The comfort limits to draw.
    responses : list of ComfortResponse
        The responses per return period.

    Returns
    -------
    shown : list of ComfortLimit
        Limits whose return period has a response.
    other : list of ComfortLimit
        The rest.
    """
    periods = {r.return_period_years for r in responses if r.return_period_years is not None}
    shown = [c for c in limits if c.return_period_years in periods]
    return shown, [c for c in limits if c.return_period_years not in periods]
