"""The report's across-wind section: the spectra against reduced frequency and the lock-in check.

A renderer of results.json's ``across_wind`` block, nothing more: every
plotted point and every table cell is a value of that block (the spectra of
``across_wind.spectra``, computed by :func:`tmd.wind_setup.spectra_block`),
and the section decides nothing itself. Symbols are the trade's: EN 1991-1-4
Annex E (v_crit, St, v_m, b) and AIJ-RLB 2004 A6.4 (C'_L, D/B, n = f B / U_H).
"""

from __future__ import annotations

import numpy as np
from matplotlib.lines import Line2D

from tmd.report.html import Callout, Figure, Section
from tmd.report.plots import (
    DAMPED,
    FONT_PT,
    PERIOD_COLOURS,
    TARGET,
    _axes,
    _finish,
    _legend_below,
    _plain_log_axes,
)
from tmd.report.tables import Cell, Table, key_value_table
from tmd.wind.vortex import LOCK_IN_WARNING

TITLE = "Across-wind loading and vortex shedding"
# The across_wind block's scalars, in reading order, with the trade's symbols.
SUMMARY_KEYS = ("model", "verified_against_source", "side_ratio", "aspect_ratio",
                "rms_lift_coefficient", "strouhal_number",
                "strouhal_source", "critical_speed_m_s", "critical_speed_return_period_years",
                "lock_in_return_period_years", "normalised_rms_coefficient")
LABELS = {
    "model": "across-wind model",
    "verified_against_source": "verified against its source",
    "side_ratio": "side ratio D/B (depth along the wind / breadth)",
    "aspect_ratio": "aspect ratio H / sqrt(B D)",
    "rms_lift_coefficient": "rms across-wind base-moment coefficient C'_L",
    "strouhal_number": "Strouhal number St",
    "strouhal_source": "source of St",
    "critical_speed_m_s": "critical speed v_crit = b f_s / St",
    "critical_speed_return_period_years": "return period at which U_H reaches v_crit",
    "lock_in_return_period_years": "return period from which lock-in is possible",
    "normalised_rms_coefficient": "rms coefficient of the wind-tunnel table",
}
ROW_KEYS = (
    ("top_mean_speed_m_s", "mean speed at the top U_H = v_m", "m/s"),
    ("reduced_velocity", "reduced velocity U_H / (f_s b)", ""),
    ("critical_speed_m_s", "critical speed v_crit", "m/s"),
    ("lock_in_possible", "lock-in possible", ""),
    ("near_critical_speed", "U_H near v_crit", ""),
)
# Spectra below this share of their peak are off the plot (a log axis needs a floor).
PLOT_FLOOR_SHARE = 1e-4


def across_wind_section(results: dict, figure, table) -> Section | None:
    """Return the across-wind section, or None when the results hold no across-wind block.

    Parameters
    ----------
    results : dict
        results.json of a wind job.
    figure : callable(name, ax, caption) -> Figure
        The report's figure maker (it renders and keeps the figure).
    table : callable(Table) -> Table
        The report's table keeper (each table is also written as CSV).

    Returns
    -------
    Section or None
    """
    block = results.get("across_wind")
    if not block:
        return None
    blocks: list = [
        "The across-wind modal force and the vortex-shedding check of the mode "
        f"(direction of response: {results.get('direction_of_response', 'along')}). "
        "Reduced frequency n = f b / U_H and reduced velocity U_H / (f_s b), with b = B the "
        "breadth normal to the wind, H the height, U_H the 10-min mean speed at the top and "
        "f_s the mode's frequency."]
    if block.get("verified_against_source") is False:
        blocks.append(Callout("The across-wind model is not verified against its source: its "
                              "coefficients were recalled without the document at hand."))
    blocks.append(table(key_value_table("across_wind", "Across-wind model and vortex-shedding "
                                  "summary", block, "across_wind", keys=SUMMARY_KEYS,
                                  labels=LABELS, milli_g=False)))
    spectra = block.get("spectra")
    if spectra:
        blocks.append(spectra_figure(spectra, block.get("strouhal_number"), figure))
    rows = block.get("by_return_period") or []
    if rows:
        blocks.append(table(lock_in_table(rows)))
        flagged = [r for r in rows if r.get("lock_in_possible") or r.get("near_critical_speed")]
        if flagged:
            periods = ", ".join(f"{r['return_period_years']:g}" for r in flagged)
            blocks.append(Callout(f"Lock-in possible or U_H near v_crit at T = {periods} "
                                  f"years: {LOCK_IN_WARNING}."))
        else:
            blocks.append("At none of the listed return periods is lock-in possible "
                          "(v_crit > 1.25 v_m) or the top speed within 20% of v_crit.")
    return Section(TITLE, blocks)


def spectra_figure(spectra: dict, strouhal_number, figure) -> Figure:
    """Along- and across-wind normalised spectra against n, the mode's n_s marked.

    Parameters
    ----------
    spectra : dict
        ``across_wind.spectra`` of results.json.
    strouhal_number : float or None
        St of the across-wind model (its spectral peak), marked when given.
    figure : callable(name, ax, caption) -> Figure
        The report's figure maker: draws on ``ax`` and returns the Figure.

    Returns
    -------
    Figure
    """
    rows = spectra["by_return_period"]
    ax = plot_normalised_spectra(
        spectra["reduced_frequency"], spectra["across_normalised_psd"],
        [(r["return_period_years"], r.get("along_normalised_psd"), r["mode_reduced_frequency"])
         for r in rows], strouhal_number=strouhal_number)
    caption = ("Normalised generalised-force spectra f S_Q / (q_H b H)² against the reduced "
               "frequency n = f b / U_H: across the wind from the AIJ-RLB 2004 A6.4 model "
               "(one curve for every return period), along the wind from the strip model at "
               "each return period; the vertical lines mark the mode's n_s = f_s b / U_H at "
               "each return period and the model's Strouhal number St.")
    return figure("normalised_spectra", ax, caption)


def lock_in_table(rows: list[dict]) -> Table:
    """Return the vortex-shedding check per return period (quantities down, periods across).

    Parameters
    ----------
    rows : list of dict
        ``across_wind.by_return_period`` of results.json.

    Returns
    -------
    Table
    """
    header = [Cell("quantity")] + [
        Cell(r["return_period_years"], f"across_wind.by_return_period.{i}.return_period_years")
        for i, r in enumerate(rows)] + [Cell("unit")]
    body = []
    for key, label, unit in ROW_KEYS:
        body.append([Cell(label)] + [
            Cell(r[key], f"across_wind.by_return_period.{i}.{key}") if key in r else Cell("")
            for i, r in enumerate(rows)] + [Cell(unit)])
    return Table("lock_in_check", "Vortex-shedding check (EN 1991-1-4 Annex E) per return "
                 "period (return period [years] across)", header, body,
                 "v_crit = b f_s / St (EN 1991-1-4 eq. E.2). Lock-in possible: v_crit <= 1.25 v_m "
                 "at the top (EN 1991-1-4 E.1.2(2)). U_H near v_crit: within ±20% of it. The "
                 "spectral method does not capture lock-in; where it is possible a wind-tunnel "
                 "test is required.")


def plot_normalised_spectra(reduced_frequency, across_psd, periods, *, strouhal_number=None,
                            ax=None):
    """Across- and along-wind normalised spectra against reduced frequency (log-log).

    Parameters
    ----------
    reduced_frequency : array
        n = f b / U_H [-].
    across_psd : array
        f S_Q / (q_H b H)^2 of the across-wind model [-].
    periods : list of (float, array or None, float)
        Per return period: T [years], the along-wind f S_Q / (q_H b H)^2 [-]
        (None when there is none) and the mode's n_s = f_s b / U_H [-].
    strouhal_number : float, optional
        St [-], marked by a dotted line.
    ax : matplotlib.axes.Axes, optional
        Where to draw; a new figure (fixed layout, legend below) when omitted.

    Returns
    -------
    matplotlib.axes.Axes
    """
    n = np.asarray(reduced_frequency, float)
    across = np.asarray(across_psd, float)
    entries = 1 + sum(1 for _, along, _ in periods if along is not None) + len(periods) \
        + (strouhal_number is not None)
    ax = _axes(ax, legend_rows=-(-entries // 3))
    handles = ax.loglog(n, across, color=DAMPED, lw=1.6, label="across wind (AIJ-RLB 2004)")
    peak = float(across.max())
    for i, (period, along, n_s) in enumerate(periods):
        colour = PERIOD_COLOURS[(i + 1) % len(PERIOD_COLOURS)]  # [0] is the across curve's
        if along is not None:
            along = np.asarray(along, float)
            peak = max(peak, float(along.max()))
            handles += ax.loglog(n, along, color=colour, lw=1.1, ls="--",
                                 label=f"along wind, T = {period:g} yr")
        handles.append(ax.axvline(n_s, color=colour, lw=0.9, ls="-.",
                                  label=f"n_s at T = {period:g} yr"))
    if strouhal_number is not None:
        handles.append(Line2D([], [], color=TARGET, lw=1.0, ls=":",
                              label=f"St = {strouhal_number:.3g}"))
        ax.axvline(strouhal_number, color=TARGET, lw=1.0, ls=":")
    ax.set_xlim(float(n[0]), float(n[-1]))
    ax.set_ylim(PLOT_FLOOR_SHARE * peak, 2.0 * peak)
    _plain_log_axes(ax)
    _legend_below(ax, handles, columns=3)
    ax.tick_params(labelsize=FONT_PT)
    return _finish(ax, "reduced frequency n = f b / U_H", "f S_Q / (q_H b H)²",
                   "Normalised modal force spectra, along and across the wind")
