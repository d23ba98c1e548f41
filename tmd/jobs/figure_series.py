"""The figure data of the design and compare jobs, stored in results.json for the report.

The report renders results.json only. Every curve it draws that is not a
results row already (the sweeps, the options) is computed here by the job,
on the case's design load (:func:`tmd.jobs.shared.loaded_mode_of`), with
acceleration at the evaluation height (the loaded mode's shape factor).
Every function returns plain numpy arrays in SI units (frequencies in Hz);
:func:`figure_series_block` gathers them as lists under ``figure_series``.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from tmd.dampers.absorber import Absorbers, single_tmd
from tmd.dampers.tuned_mass import TunedMassDamper
from tmd.design import LoadedMode, tune
from tmd.performance import assess
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


def detuned_sweep(load: LoadedMode, design: dict, factors: np.ndarray) -> np.ndarray:
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
    numpy.ndarray
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
    return np.asarray(a.peak_acceleration_m_s2, dtype=float)


def figure_series_block(load: LoadedMode, result: dict, *, objective: str,
                        max_mass_ratio: float, max_stroke_m: float | None) -> dict:
    """Compute the ``figure_series`` block: every curve of the report, on the design load.

    Parameters
    ----------
    load : LoadedMode
        The case's design load.
    result : dict
        The job's results so far (its ``design``, ``sweep`` and ``band_design``
        blocks, where present, are drawn).
    objective : str
        Tuning objective of the mass-ratio study (the case's).
    max_mass_ratio : float
        Largest mass ratio of the study [-] (the case's).
    max_stroke_m : float or None
        Stroke limit of every tuning in the study [m] (the case's).

    Returns
    -------
    dict
        ``structure_frequency_hz``; ``force_spectrum`` (``frequency_hz``,
        ``force_psd_n2_per_hz``); ``response`` on the response grid
        (``frequency_hz``, the force PSD there, the bare and damped |H_a|
        as ``*_acceleration_gain_m_s2_per_n``); ``mass_ratio_study``; and,
        with a band design and a sweep, ``band_design_sweep`` on the
        sweep's factors.
    """
    design = result.get("design")
    f, s_f = force_spectrum_curve(load)
    gain = acceleration_frequency_response(load, design)
    response = {"frequency_hz": gain.frequency_hz.tolist(),
                "force_psd_n2_per_hz": np.asarray(load.spectrum(gain.frequency_hz),
                                                  dtype=float).tolist(),
                "bare_acceleration_gain_m_s2_per_n": gain.bare.tolist()}
    if gain.damped is not None:
        response["damped_acceleration_gain_m_s2_per_n"] = gain.damped.tolist()
    grid = mass_ratio_grid(max_mass_ratio, design and design["mass_ratio"])
    study = mass_ratio_study(load, grid, objective=objective, max_stroke_m=max_stroke_m)
    block = {
        "structure_frequency_hz": load.mode.frequency_hz,
        "force_spectrum": {"frequency_hz": f.tolist(), "force_psd_n2_per_hz": s_f.tolist()},
        "response": response,
        "mass_ratio_study": {"objective": objective, "mass_ratio": study.mass_ratio.tolist(),
                             "peak_acceleration_m_s2": study.peak_acceleration_m_s2.tolist(),
                             "peak_stroke_m": study.peak_stroke_m.tolist()}
                            | ({} if max_stroke_m is None else {"max_stroke_m": max_stroke_m}),
    }
    if result.get("band_design") and result.get("sweep"):
        factors = np.sort([row["structure_frequency_factor"] for row in result["sweep"]])
        block["band_design_sweep"] = {
            "structure_frequency_factor": factors.tolist(),
            "peak_acceleration_m_s2": detuned_sweep(load, result["band_design"], factors).tolist()}
    return block
