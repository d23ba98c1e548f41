"""The arrays each report figure shows, recomputed from the library or read from results.

Every function returns plain numpy arrays in SI units (frequencies in Hz), so
that a figure can be checked against them. Responses are those of the case's
design load (:func:`tmd.jobs.loaded_mode_of`), with acceleration at the
evaluation height (the loaded mode's shape factor).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from tmd.dampers.absorber import Absorbers, single_tmd
from tmd.dampers.tuned_mass import TunedMassDamper
from tmd.design import LoadedMode, tune
from tmd.performance import assess
from tmd.report.comfort import ComfortLimit
from tmd.response import transfer_functions

RESPONSE_SPAN = 3.0  # response figures cover f_s / 3 .. 3 f_s
RESPONSE_POINTS = 2001  # log step 0.1 %: well below the half-power width at zeta = 0.5 %
SPECTRUM_SPAN = 100.0  # an unbounded spectrum is drawn over f_s / 100 .. 100 f_s
SPECTRUM_POINTS = 600
MASS_RATIO_POINTS = 15
MIN_MASS_RATIO = 0.002


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
    """

    frequency_hz: np.ndarray
    bare: np.ndarray
    damped: np.ndarray | None


@dataclass(frozen=True)
class MassRatioStudy:
    """Best-tuned TMDs over a range of mass ratios (same objective and stroke limit as the case).

    Parameters
    ----------
    mass_ratio : numpy.ndarray
        m_d / M* of each TMD [-].
    peak_acceleration_m_s2 : numpy.ndarray
        Its peak acceleration at the evaluation height [m/s^2].
    peak_stroke_m : numpy.ndarray
        Its peak stroke relative to the structure [m].
    """

    mass_ratio: np.ndarray
    peak_acceleration_m_s2: np.ndarray
    peak_stroke_m: np.ndarray


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


def damper_of(design: dict) -> TunedMassDamper:
    """Return the TMD of a results.json ``design`` block.

    Parameters
    ----------
    design : dict
        The block (``mass_ratio``, ``frequency_ratio``, ``damping_ratio``).

    Returns
    -------
    TunedMassDamper
        The damper relative to its mode.
    """
    return TunedMassDamper(design["mass_ratio"], design["frequency_ratio"],
                           design["damping_ratio"])


def response_frequencies(structure_frequency_hz: float) -> np.ndarray:
    """Return the log-spaced grid around the mode for the response figures [Hz].

    Parameters
    ----------
    structure_frequency_hz : float
        f_s, the mode's natural frequency [Hz].

    Returns
    -------
    numpy.ndarray
        2001 frequencies from f_s / 3 to 3 f_s [Hz].
    """
    return np.geomspace(structure_frequency_hz / RESPONSE_SPAN,
                        structure_frequency_hz * RESPONSE_SPAN, RESPONSE_POINTS)


def force_spectrum_curve(load: LoadedMode) -> tuple[np.ndarray, np.ndarray]:
    """Return the modal force PSD S_F(f) [N^2/Hz] over its table, or its support.

    The support stands in for f_s/100 .. 100 f_s where it is unbounded.

    Parameters
    ----------
    load : LoadedMode
        The case's mode under its design load (:func:`tmd.jobs.loaded_mode_of`).

    Returns
    -------
    frequency_hz, psd_n2_per_hz : ndarray
    """
    fs = load.mode.frequency_hz
    lo = load.spectrum.f_min_hz if load.spectrum.f_min_hz > 0 else fs / SPECTRUM_SPAN
    hi = load.spectrum.f_max_hz if np.isfinite(load.spectrum.f_max_hz) else fs * SPECTRUM_SPAN
    table = getattr(load.spectrum, "frequency_hz", None)
    if table is not None:  # a table continued by a power law (wind model): draw the table
        hi = float(table[-1])
    f = np.geomspace(lo, hi, SPECTRUM_POINTS)
    return f, np.asarray(load.spectrum(f), dtype=float)


def _acceleration_transfer(load: LoadedMode, design: dict | None, f: np.ndarray):
    m = load.mode
    h_bare = transfer_functions(f, m.frequency_hz, m.modal_mass_kg, m.damping_ratio,
                                Absorbers.none())["acceleration"]
    h_damped = None
    if design is not None:
        h_damped = transfer_functions(f, m.frequency_hz, m.modal_mass_kg, m.damping_ratio,
                                      damper_of(design).absorbers(m))["acceleration"]
    return load.shape_factor * h_bare, None if h_damped is None else load.shape_factor * h_damped


def acceleration_frequency_response(load: LoadedMode, design: dict | None) -> ResponseCurves:
    """Return |H_a(f)| [m/s^2 per N] at the evaluation height, bare and damped.

    Parameters
    ----------
    load : LoadedMode
        The case's mode under its design load (:func:`tmd.jobs.loaded_mode_of`).
    design : dict or None
        The results.json ``design`` block (mass ratio, frequency ratio, damping
        ratio); None for the bare building only.

    Returns
    -------
    ResponseCurves
        On :func:`response_frequencies` [Hz], the magnitudes [m/s^2 per N].

    Notes
    -----
    H_a = -(2 pi f)^2 H_x phi(z_eval), H_x the modal displacement per unit
    modal force from :func:`tmd.response.transfer_functions`.
    """
    f = response_frequencies(load.mode.frequency_hz)
    bare, damped = _acceleration_transfer(load, design, f)
    return ResponseCurves(f, np.abs(bare), None if damped is None else np.abs(damped))


def acceleration_psd(load: LoadedMode, design: dict | None) -> ResponseCurves:
    """Return the one-sided acceleration PSD S_a(f) [(m/s^2)^2/Hz], bare and damped.

    Parameters
    ----------
    load : LoadedMode
        The case's mode under its design load (:func:`tmd.jobs.loaded_mode_of`).
    design : dict or None
        The results.json ``design`` block (mass ratio, frequency ratio, damping
        ratio); None for the bare building only.

    Returns
    -------
    ResponseCurves
        On :func:`response_frequencies` [Hz], S_a [(m/s^2)^2/Hz] at the
        evaluation height.

    Notes
    -----
    S_a(f) = |H_a(f)|^2 S_F(f), one-sided per Hz (common practice: the
    input-output relation of linear random vibration).
    """
    f = response_frequencies(load.mode.frequency_hz)
    bare, damped = _acceleration_transfer(load, design, f)
    s_f = np.asarray(load.spectrum(f), dtype=float)
    return ResponseCurves(f, np.abs(bare) ** 2 * s_f,
                          None if damped is None else np.abs(damped) ** 2 * s_f)


def mass_ratio_grid(max_mass_ratio: float, design_mass_ratio: float | None) -> np.ndarray:
    """Return log-spaced mass ratios up to the case's maximum, the design's included.

    Parameters
    ----------
    max_mass_ratio : float
        The case's largest mass ratio [-].
    design_mass_ratio : float or None
        The chosen design's mass ratio [-], added to the grid.

    Returns
    -------
    numpy.ndarray
        15 mass ratios from min(0.002, max / 10) to the maximum [-], sorted.
    """
    grid = np.geomspace(min(MIN_MASS_RATIO, max_mass_ratio / 10), max_mass_ratio,
                        MASS_RATIO_POINTS)
    if design_mass_ratio is not None:
        grid = np.union1d(grid, [design_mass_ratio])
    return grid


def mass_ratio_study(load: LoadedMode, mass_ratio: np.ndarray, *, objective: str,
                     max_stroke_m: float | None) -> MassRatioStudy:
    """Return the peak acceleration and stroke of the best tuning at each mass ratio.

    Each mass ratio is tuned with :func:`tmd.design.tune` (the case's
    objective and stroke limit); the tuned designs are then assessed in one
    batched call of the engine.

    Parameters
    ----------
    load : LoadedMode
        The case's mode under its design load (:func:`tmd.jobs.loaded_mode_of`).
    mass_ratio : numpy.ndarray
        The mass ratios m_d / M* to tune [-].
    objective : str
        "acceleration" or "displacement", as the case's [damper].
    max_stroke_m : float or None
        Peak stroke limit inside each tuning [m].

    Returns
    -------
    MassRatioStudy
        The peaks at each mass ratio.
    """
    tunings = [tune(load, float(mu), objective=objective, max_stroke_m=max_stroke_m)
               for mu in mass_ratio]
    ratio = np.array([t.frequency_ratio for t in tunings])
    zeta = np.array([t.damping_ratio for t in tunings])
    m = load.mode
    a = load.assess(single_tmd(m.frequency_hz, m.modal_mass_kg, mass_ratio, ratio, zeta))
    return MassRatioStudy(np.asarray(mass_ratio, float), np.asarray(a.peak_acceleration_m_s2),
                          np.asarray(a.peak_stroke_m[:, 0]))


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


def detuned_sweep(load: LoadedMode, design: dict, factors: np.ndarray) -> Sweep:
    """Peak acceleration of a fixed damper as the structure frequency is scaled by s.

    The structure keeps its modal mass and damping ratio (its stiffness scales
    by s^2); the damper keeps its absolute mass, frequency and damping ratio,
    hence its spring and dashpot. One batched engine call over all s.

    Parameters
    ----------
    load : LoadedMode
        The case's mode under its design load (:func:`tmd.jobs.loaded_mode_of`).
    design : dict
        The results.json ``design`` block (``mass_kg``, ``frequency_hz``,
        ``damping_ratio``).
    factors : numpy.ndarray
        Structure frequency factors s [-].

    Returns
    -------
    Sweep
        The damped peak acceleration at each s [m/s^2].
    """
    s = np.asarray(factors, dtype=float)
    shape = s.shape + (1,)
    absorbers = Absorbers.tuned_masses(np.full(shape, design["mass_kg"]),
                                       np.full(shape, design["frequency_hz"]),
                                       np.full(shape, design["damping_ratio"]))
    m = load.mode
    a = assess(s * m.frequency_hz, m.modal_mass_kg, m.damping_ratio, absorbers, load.spectrum,
               load.duration_s, shape_factor=load.shape_factor,
               peak_method=load.peak_method)
    return Sweep(s, np.asarray(a.peak_acceleration_m_s2, dtype=float))


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
        ``target.return_period_years`` (or the case input's); None if absent.
    """
    stated = results.get("target", {}).get("return_period_years")
    if stated is None:
        stated = results.get("case", {}).get("inputs", {}).get("target", {}).get(
            "return_period_years")
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
