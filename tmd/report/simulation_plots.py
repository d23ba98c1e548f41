"""Figures of a Monte Carlo check: maxima against peak formulas, a time-history excerpt.

Same habits as :mod:`tmd.report.plots`: arrays in (SI units), an optional
``ax`` in, the Axes out.
"""

from __future__ import annotations

import numpy as np

from tmd.peak import vanmarcke_distribution
from tmd.report.plots import BARE, DAMPED, FONT_PT, TARGET, _axes, _finish, _legend

EXCERPT_S = 120.0


def maxima_distribution(maxima_m_s2, *, sigma_m_s2: float, upcrossing_hz: float,
                        bandwidth: float, duration_s: float, davenport_peak_m_s2: float,
                        target_m_s2: float | None = None, label: str = "damped", ax=None):
    """Empirical distribution of the records' largest |a| against Vanmarcke's law.

    Parameters
    ----------
    maxima_m_s2 : array
        max |a| of each simulated record [m/s^2].
    sigma_m_s2 : float
        Spectral rms of the same response [m/s^2].
    upcrossing_hz : float
        nu = sqrt(m2 / m0) [Hz].
    bandwidth : float
        Vanmarcke's q [-].
    duration_s : float
        Record duration T [s].
    davenport_peak_m_s2 : float
        Davenport's g sigma [m/s^2], drawn as a vertical line.
    target_m_s2 : float, optional
        The comfort target [m/s^2].
    label : str
        Legend name of the simulated maxima.
    ax : matplotlib Axes, optional
        Where to draw.

    Returns
    -------
    matplotlib Axes
    """
    ax = _axes(ax)
    x = np.sort(np.asarray(maxima_m_s2, float))
    p = (np.arange(1, x.size + 1) - 0.5) / x.size
    ax.step(x, p, where="mid", color=DAMPED, linewidth=1.2, label=f"simulated, {label}")
    level = np.linspace(0.5 * x.min(), 1.3 * x.max(), 400)
    ax.plot(level, vanmarcke_distribution(level / sigma_m_s2, upcrossing_hz, bandwidth,
                                          duration_s), color=BARE, linewidth=1.0,
            label="Vanmarcke (1975), two-sided")
    ax.axvline(davenport_peak_m_s2, color=BARE, linestyle="--", linewidth=0.9,
               label="Davenport g sigma")
    if target_m_s2 is not None:
        ax.axvline(target_m_s2, color=TARGET, linestyle=":", linewidth=1.0, label="target")
    ax.set_ylim(0.0, 1.0)
    _legend(ax, loc="lower right")
    return _finish(ax, "largest |acceleration| in a record [m/s²]",
                   "share of records at or below", f"maxima of {x.size} records of "
                   f"{duration_s:g} s")


def time_history_excerpt(time_s, acceleration_m_s2, stroke_m=None, *, ax=None):
    """Return the first two minutes of one simulated record.

    Parameters
    ----------
    time_s : array
        Sample times [s].
    acceleration_m_s2 : array
        Acceleration at the evaluation height [m/s^2].
    stroke_m : array, optional
        Damper stroke [m], on a second axis.
    ax : matplotlib Axes, optional
        Where to draw.

    Returns
    -------
    matplotlib Axes
    """
    ax = _axes(ax, twin=stroke_m is not None)  # room on the right for the stroke axis
    t = np.asarray(time_s, float)
    keep = t <= t[0] + EXCERPT_S
    ax.plot(t[keep], np.asarray(acceleration_m_s2)[keep], color=DAMPED, linewidth=0.8,
            label="acceleration")
    if stroke_m is not None:
        twin = ax.twinx()
        twin.plot(t[keep], np.asarray(stroke_m)[keep], color=BARE, linewidth=0.8)
        twin.set_ylabel("stroke [m]", fontsize=FONT_PT, color=BARE)
        twin.tick_params(labelsize=FONT_PT)
    return _finish(ax, "time [s]", "acceleration [m/s²]", "simulated record (excerpt)")


def simulation_files(result: dict, history: dict, maxima: dict) -> dict[str, bytes | str]:
    """Files of a Monte Carlo check beside results.json: a time-history CSV and two figures.

    Parameters
    ----------
    result : dict
        The results.json of :func:`tmd.jobs.simulation_job`.
    history : dict
        One record's time history (arrays keyed with SI suffixes).
    maxima : dict
        ``{"design": [...], "bare": [...]}``, max |a| per record at the
        design load [m/s^2].

    Returns
    -------
    dict
        File name -> content: ``time_history.csv`` (ASCII header with SI
        suffixes, for the damper's maker), ``figures/maxima.png``,
        ``figures/time_history.png``.
    """
    from tmd.report.plots import png_bytes

    names = list(history)
    rows = np.column_stack([np.asarray(history[n], float) for n in names])
    lines = [",".join(names)] + [",".join(f"{v:.9g}" for v in row) for row in rows]
    files: dict[str, bytes | str] = {"time_history.csv": "\n".join(lines) + "\n"}
    design_rows = [r for r in result["simulation"]["by_load"]
                   if r.get("return_period_years") == result["target"].get("return_period_years")]
    a = (design_rows or result["simulation"]["by_load"])[0]["design"]["acceleration"]
    ax = maxima_distribution(maxima["design"], sigma_m_s2=a["sigma_spectral_m_s2"],
                             upcrossing_hz=a["upcrossing_hz"], bandwidth=a["bandwidth"],
                             duration_s=result["simulation"]["duration_s"],
                             davenport_peak_m_s2=a["davenport_peak_m_s2"],
                             target_m_s2=result["target"]["peak_acceleration_m_s2"])
    files["figures/maxima.png"] = png_bytes(ax)
    ax = time_history_excerpt(history["time_s"], history["acceleration_m_s2"],
                              history.get("stroke_m"))
    files["figures/time_history.png"] = png_bytes(ax)
    return files
