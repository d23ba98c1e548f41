"""The report's figures: one function per figure, each drawing given arrays on ``ax``.

Every function takes the arrays to draw (SI units, frequency in Hz) and an
optional Matplotlib ``Axes``; without one it makes a new
:class:`matplotlib.figure.Figure` (no pyplot state). It returns the Axes, so
a caller (or a test) can read the plotted data back. Secondary axes (stroke,
milli-g, wind spectrum) are twins of the returned Axes.
"""

from __future__ import annotations

import io

import numpy as np
from matplotlib.figure import Figure
from matplotlib.ticker import FuncFormatter

from tmd.constants import STANDARD_GRAVITY

FIGSIZE_IN = (6.4, 3.9)  # legible at print size on A4 / Letter
FONT_PT = 9
BARE = "#6b6b6b"
DAMPED = "#1d4e89"
ROBUST = "#b8572a"
TARGET = "#111111"
BAND = "#e3d8a8"
COMFORT_FREQUENCY_RANGE_HZ = (0.05, 1.2)
COMFORT_ACCELERATION_RANGE_M_S2 = (0.02, 0.5)
PERIOD_COLOURS = ("#1d4e89", "#b8572a", "#3a7d44", "#7b4f9d", "#8c6d1f")


def new_axes():
    """A fresh Axes on its own Figure (constrained layout, print size)."""
    fig = Figure(figsize=FIGSIZE_IN, layout="constrained")
    return fig.add_subplot()


def _axes(ax):
    ax = new_axes() if ax is None else ax
    ax.tick_params(labelsize=FONT_PT)
    return ax


def _finish(ax, xlabel, ylabel, title):
    ax.set_xlabel(xlabel, fontsize=FONT_PT)
    ax.set_ylabel(ylabel, fontsize=FONT_PT)
    ax.set_title(title, fontsize=FONT_PT + 1)
    ax.grid(True, which="major", alpha=0.35, linewidth=0.6)
    return ax


def _legend(ax, handles=None, **kw):
    if handles is None:
        ax.legend(fontsize=FONT_PT - 1, framealpha=0.9, **kw)
    else:
        ax.legend(handles=handles, fontsize=FONT_PT - 1, framealpha=0.9, **kw)


def _one_two_five(value, _position=None) -> str:
    if value <= 0:
        return ""
    leading = round(value / 10 ** np.floor(np.log10(value)), 6)
    return f"{value:g}" if leading in (1.0, 2.0, 5.0) else ""


def _plain_log_ticks(axis):
    """Log-axis tick labels as plain numbers at 1, 2, 5 x 10^k only."""
    axis.set_major_formatter(FuncFormatter(_one_two_five))
    axis.set_minor_formatter(FuncFormatter(_one_two_five))


def _milli_g_axis(ax):
    sec = ax.secondary_yaxis("right", functions=(lambda a: 1000 * a / STANDARD_GRAVITY,
                                                 lambda mg: mg * STANDARD_GRAVITY / 1000))
    sec.set_ylabel("peak acceleration [milli-g]", fontsize=FONT_PT)
    sec.tick_params(labelsize=FONT_PT)
    _plain_log_ticks(sec.yaxis)
    return sec


def plot_force_spectrum(frequency_hz, psd_n2_per_hz, *, structure_frequency_hz=None,
                        wind_frequency_hz=None, wind_psd_m2_s2_per_hz=None, wind_label="",
                        ax=None):
    """Figure 1: the one-sided modal force PSD [N^2/Hz] (and a wind speed PSD on a twin axis)."""
    ax = _axes(ax)
    ax.loglog(frequency_hz, psd_n2_per_hz, color=DAMPED, lw=1.4, label="modal force S_F")
    handles = list(ax.get_lines())
    if structure_frequency_hz is not None:
        handles.append(ax.axvline(structure_frequency_hz, color=TARGET, ls=":", lw=1,
                                  label=f"structure frequency {structure_frequency_hz:.4g} Hz"))
    if wind_frequency_hz is not None:
        twin = ax.twinx()
        twin.loglog(wind_frequency_hz, wind_psd_m2_s2_per_hz, color=ROBUST, lw=1.1, ls="--",
                    label=wind_label or "wind speed S_u")
        twin.set_ylabel("wind speed PSD [(m/s)²/Hz]", fontsize=FONT_PT)
        twin.tick_params(labelsize=FONT_PT)
        handles += twin.get_lines()
    _legend(ax, handles, loc="lower left")
    return _finish(ax, "frequency [Hz]", "modal force PSD [N²/Hz]",
                   "Modal force spectrum of the design load (one-sided)")


def plot_frequency_response(frequency_hz, bare_m_s2_per_n, damped_m_s2_per_n=None, *, ax=None):
    """Figure 2: |H_a(f)|, acceleration per unit modal force [m/s^2/N], bare and damped."""
    ax = _axes(ax)
    ax.loglog(frequency_hz, bare_m_s2_per_n, color=BARE, lw=1.3, label="bare building")
    if damped_m_s2_per_n is not None:
        ax.loglog(frequency_hz, damped_m_s2_per_n, color=DAMPED, lw=1.5, label="with damper")
    _legend(ax)
    return _finish(ax, "frequency [Hz]", "|acceleration / modal force| [m/s² per N]",
                   "Acceleration frequency response")


def plot_acceleration_psd(frequency_hz, bare_psd, damped_psd=None, *, bare_sigma_m_s2,
                          bare_peak_m_s2, damped_sigma_m_s2=None, damped_peak_m_s2=None,
                          ax=None):
    """Figure 3: acceleration PSD [(m/s^2)^2/Hz], bare vs damped; rms and peak in the legend."""
    ax = _axes(ax)
    ax.semilogy(frequency_hz, bare_psd, color=BARE, lw=1.3,
                label=f"bare: rms {bare_sigma_m_s2:.4g}, peak {bare_peak_m_s2:.4g} m/s²")
    if damped_psd is not None:
        ax.semilogy(frequency_hz, damped_psd, color=DAMPED, lw=1.5,
                    label=f"with damper: rms {damped_sigma_m_s2:.4g}, "
                          f"peak {damped_peak_m_s2:.4g} m/s²")
    top = np.nanmax(bare_psd)
    ax.set_ylim(top * 1e-5, top * 3)
    _legend(ax)
    return _finish(ax, "frequency [Hz]", "acceleration PSD [(m/s²)²/Hz]",
                   "Acceleration spectrum at the evaluation height")


def plot_mass_ratio_study(mass_ratio, peak_acceleration_m_s2, peak_stroke_m, *,
                          target_peak_m_s2, chosen_mass_ratio=None, chosen_peak_m_s2=None,
                          chosen_stroke_m=None, max_stroke_m=None, ax=None):
    """Figure 4: best-tuned peak acceleration and peak stroke against mass ratio.

    The acceleration is drawn on ``ax`` (lines[0]); the stroke on a twin axis.
    """
    ax = _axes(ax)
    ax.plot(mass_ratio, peak_acceleration_m_s2, color=DAMPED, lw=1.5, marker="o", ms=3,
            label="peak acceleration")
    handles = [ax.lines[0], ax.axhline(target_peak_m_s2, color=TARGET, ls="--", lw=1,
                                       label=f"target {target_peak_m_s2:.4g} m/s²")]
    twin = ax.twinx()
    twin.plot(mass_ratio, peak_stroke_m, color=ROBUST, lw=1.3, marker="s", ms=3,
              label="peak stroke")
    handles.append(twin.lines[0])
    if max_stroke_m is not None:
        handles.append(twin.axhline(max_stroke_m, color=ROBUST, ls=":", lw=1,
                                    label=f"stroke limit {max_stroke_m:.4g} m"))
    if chosen_mass_ratio is not None:
        handles.append(ax.plot([chosen_mass_ratio], [chosen_peak_m_s2], ls="none", marker="*",
                               ms=12, color=DAMPED, mec=TARGET,
                               label=f"chosen design, mass ratio {chosen_mass_ratio:.4g}")[0])
        twin.plot([chosen_mass_ratio], [chosen_stroke_m], ls="none", marker="*", ms=12,
                  color=ROBUST, mec=TARGET)
    twin.set_ylabel("peak stroke (one-sided) [m]", fontsize=FONT_PT)
    twin.tick_params(labelsize=FONT_PT)
    twin.set_ylim(bottom=0)
    ax.set_ylim(bottom=0)
    _legend(ax, handles, loc="upper right")
    return _finish(ax, "mass ratio m_d / M* [-]", "peak acceleration [m/s²]",
                   "Best-tuned TMD against mass ratio")


def plot_detuning_sweep(structure_frequency_factor, bare_m_s2, nominal_m_s2, *,
                        target_peak_m_s2, frequency_band=None, robust_factor=None,
                        robust_m_s2=None, ax=None):
    """Figure 5: peak acceleration against the structure frequency factor s.

    Lines: bare (lines[0]), nominal design (lines[1]), robust design (lines[2], if given);
    the band 1 +/- frequency_band is shaded.
    """
    ax = _axes(ax)
    s = np.asarray(structure_frequency_factor)
    ax.plot(s, bare_m_s2, color=BARE, lw=1.3, label="bare building")
    ax.plot(s, nominal_m_s2, color=DAMPED, lw=1.5, label="nominal design")
    if robust_m_s2 is not None:
        ax.plot(robust_factor, robust_m_s2, color=ROBUST, lw=1.5, ls="-.", label="robust design")
    ax.axhline(target_peak_m_s2, color=TARGET, ls="--", lw=1,
               label=f"target {target_peak_m_s2:.4g} m/s²")
    if frequency_band:
        ax.axvspan(1 - frequency_band, 1 + frequency_band, color=BAND, alpha=0.5, lw=0,
                   label=f"frequency band ±{100 * frequency_band:.3g} %")
    ax.set_ylim(bottom=0)
    _legend(ax, loc="upper right")
    return _finish(ax, "structure frequency factor s = f_actual / f_nominal [-]",
                   "peak acceleration [m/s²]", "Detuning: the structure's frequency off nominal")


def plot_comfort_chart(limits, responses, *, target_peak_m_s2, target_return_period_years=None,
                       ax=None):
    """Figure 6: peak acceleration against frequency on an occupant-comfort chart.

    Parameters
    ----------
    limits : list of ComfortLimit
        Drawn as lines (in order), coloured by return period.
    responses : list of ComfortResponse
        Bare (open) and damped (filled) markers at the building frequency,
        coloured by return period like the limits of the same return period.
    """
    ax = _axes(ax)
    periods = sorted({r.return_period_years for r in responses if r.return_period_years},
                     key=float)
    colour = {p: PERIOD_COLOURS[i % len(PERIOD_COLOURS)] for i, p in enumerate(periods)}
    styles = ("-", "--", "-.", ":")
    for i, c in enumerate(limits):
        ax.loglog(c.frequency_hz, c.peak_acceleration_m_s2, lw=1.3, ls=styles[i % len(styles)],
                  color=colour.get(c.return_period_years, BARE), label=c.label)
    for r in responses:
        tag = f"{r.return_period_years:g}-year" if r.return_period_years else \
            "design load (return period not stated)"
        col = colour.get(r.return_period_years, TARGET)
        ax.plot([r.frequency_hz], [r.bare_peak_m_s2], ls="none", marker="o", ms=7, mfc="white",
                mec=col, mew=1.5, label=f"bare, {tag}")
        if r.damped_peak_m_s2 is not None:
            ax.plot([r.frequency_hz], [r.damped_peak_m_s2], ls="none", marker="o", ms=7,
                    color=col, label=f"with damper, {tag}")
    when = (f"{target_return_period_years:g}-year" if target_return_period_years
            else "return period not stated")
    ax.axhline(target_peak_m_s2, color=TARGET, ls=(0, (4, 2)), lw=1,
               label=f"user target {target_peak_m_s2:.4g} m/s² ({when})")
    ax.set_xscale("log")
    ax.set_yscale("log")
    values = [target_peak_m_s2] + [v for r in responses
                                   for v in (r.bare_peak_m_s2, r.damped_peak_m_s2) if v]
    ax.set_xlim(*COMFORT_FREQUENCY_RANGE_HZ)
    _plain_log_ticks(ax.xaxis)
    _plain_log_ticks(ax.yaxis)
    ax.set_ylim(min(COMFORT_ACCELERATION_RANGE_M_S2[0], min(values) / 2),
                max(COMFORT_ACCELERATION_RANGE_M_S2[1], max(values) * 2))
    _milli_g_axis(ax)
    _legend(ax, loc="upper center", bbox_to_anchor=(0.5, -0.16), ncols=2)
    return _finish(ax, "building frequency [Hz]", "peak acceleration [m/s²]",
                   "Occupant comfort: responses against limits of the same return period")


def plot_option_comparison(names, mass_ratio, peak_acceleration_m_s2, band_max_m_s2=None, *,
                           target_peak_m_s2, ax=None):
    """Figure 7: each option's peak acceleration against its mass ratio.

    Filled markers (lines[0]) are the nominal peaks; open markers (lines[1])
    the worst peak across the detuning band, joined to the nominal by a stem.
    """
    ax = _axes(ax)
    mu = np.asarray(mass_ratio, dtype=float)
    peak = np.asarray(peak_acceleration_m_s2, dtype=float)
    ax.plot(mu, peak, ls="none", marker="o", ms=7, color=DAMPED, label="peak acceleration")
    if band_max_m_s2 is not None:
        worst = np.asarray(band_max_m_s2, dtype=float)
        ax.plot(mu, worst, ls="none", marker="v", ms=7, mfc="white", mec=ROBUST, mew=1.5,
                label="worst across the frequency band")
        ax.vlines(mu, peak, worst, color=ROBUST, lw=1)
    for x, y, name in zip(mu, peak, names, strict=True):
        ax.annotate(name, (x, y), textcoords="offset points", xytext=(6, 4),
                    fontsize=FONT_PT - 1)
    ax.axhline(target_peak_m_s2, color=TARGET, ls="--", lw=1,
               label=f"target {target_peak_m_s2:.4g} m/s²")
    ax.set_ylim(bottom=0)
    ax.set_xlim(left=0)
    _legend(ax, loc="upper right")
    return _finish(ax, "mass ratio (mass / M*) [-]", "peak acceleration [m/s²]",
                   "Damper options compared")


def png_bytes(ax, dpi: int = 150) -> bytes:
    """The Axes' figure as PNG bytes (no software tag, so no URL in the file)."""
    buffer = io.BytesIO()
    ax.figure.savefig(buffer, format="png", dpi=dpi, metadata={"Software": None})
    return buffer.getvalue()
