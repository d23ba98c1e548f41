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
from matplotlib.ticker import Formatter

from tmd.constants import STANDARD_GRAVITY

FIGURE_WIDTH_IN = 6.4  # legible at print size on A4 / Letter
PLOT_HEIGHT_IN = 2.9  # height of the data area
# Fixed margins [in]: room for tick labels and axis labels at FONT_PT, so no
# layout engine has to measure text at save time (issue 14: <= 0.3 s a figure).
LEFT_IN, RIGHT_IN, TWIN_RIGHT_IN, TOP_IN, BOTTOM_IN = 0.78, 0.22, 0.82, 0.32, 0.52
OPTION_LEFT_IN = 1.3  # the options chart's row labels: name and added mass, two lines
LEGEND_ROW_IN = 0.19  # one legend row at FONT_PT - 1, with its spacing
LEGEND_PAD_IN = 0.12
FONT_PT = 9
BARE = "#6b6b6b"
DAMPED = "#1d4e89"
ROBUST = "#b8572a"
TARGET = "#111111"
BAND = "#e3d8a8"
COMFORT_FREQUENCY_RANGE_HZ = (0.05, 1.2)
COMFORT_ACCELERATION_RANGE_M_S2 = (0.02, 0.5)
PERIOD_COLOURS = ("#1d4e89", "#b8572a", "#3a7d44", "#7b4f9d", "#8c6d1f")
HEADROOM = 1.12  # data tops sit below the frame, so markers are not cut by it


def new_axes(*, twin: bool = False, legend_rows: int = 0, plot_height_in: float = PLOT_HEIGHT_IN,
             left_in: float = LEFT_IN):
    """Return a fresh Axes on its own Figure, placed by fixed margins (no layout engine).

    Parameters
    ----------
    twin : bool
        Leave room on the right for a second y axis and its label.
    legend_rows : int
        Rows of a legend drawn below the axes (see :func:`_legend_below`).
    plot_height_in : float
        Height of the data area [in].
    left_in : float
        Left margin, for the tick and axis labels [in].

    Returns
    -------
    matplotlib.axes.Axes
    """
    right = TWIN_RIGHT_IN if twin else RIGHT_IN
    legend = legend_rows * LEGEND_ROW_IN + (LEGEND_PAD_IN if legend_rows else 0.0)
    height = TOP_IN + plot_height_in + BOTTOM_IN + legend
    fig = Figure(figsize=(FIGURE_WIDTH_IN, height), layout="none")
    return fig.add_axes((left_in / FIGURE_WIDTH_IN, (BOTTOM_IN + legend) / height,
                         (FIGURE_WIDTH_IN - left_in - right) / FIGURE_WIDTH_IN,
                         plot_height_in / height))


def _axes(ax, **layout):
    ax = new_axes(**layout) if ax is None else ax
    ax.tick_params(labelsize=FONT_PT)
    return ax


def _finish(ax, xlabel, ylabel, title):
    ax.set_xlabel(xlabel, fontsize=FONT_PT)
    ax.set_ylabel(ylabel, fontsize=FONT_PT)
    # a stated y turns off Matplotlib's title placement, which measures every tick at save
    # time (a third of a figure's drawing); the fixed top margin leaves room for it
    ax.set_title(title, fontsize=FONT_PT + 1, y=1.0, pad=6)
    ax.grid(True, which="major", alpha=0.35, linewidth=0.6)
    return ax


def _legend(ax, handles=None, **kw):
    if handles is None:
        ax.legend(fontsize=FONT_PT - 1, framealpha=0.9, **kw)
    else:
        ax.legend(handles=handles, fontsize=FONT_PT - 1, framealpha=0.9, **kw)


def _rows(entries: int, columns: int) -> int:
    return -(-entries // columns)


def _legend_below(ax, handles, columns: int = 2) -> None:
    """Return the legend in the band reserved under the x-axis label (see :func:`new_axes`)."""
    height_in = ax.get_position().height * ax.figure.get_figheight()
    ax.legend(handles=handles, fontsize=FONT_PT - 1, frameon=False, ncols=columns,
              loc="upper center", bbox_to_anchor=(0.5, -(BOTTOM_IN - 0.04) / height_in),
              borderaxespad=0.0, handlelength=2.2, columnspacing=1.2)


def plain_number(value: float) -> str:
    """Return a tick label as plain text (no mathtext): 0.05, 2, 300, 1e5, 2e-6.

    Parameters
    ----------
    value : float
        Tick value (> 0).

    Returns
    -------
    str
    """
    if 1e-3 <= value < 1e4:
        return f"{value:g}"
    exponent = int(np.floor(np.log10(value)))
    mantissa = round(value / 10.0 ** exponent, 6)
    return f"1e{exponent}" if mantissa == 1 else f"{mantissa:g}e{exponent}"


class PlainLogFormatter(Formatter):
    """Log-axis tick labels in plain text: decades, plus 2 and 5 x 10^k on short axes.

    An axis spanning more than two decades labels its decades only, so labels
    never crowd; a shorter one also labels 2 and 5 times each power of ten.
    """

    def __call__(self, x, pos=None):
        """Return the label of the tick at ``x`` ('' for a tick left unlabelled)."""
        if not x > 0:
            return ""
        leading = round(x / 10.0 ** np.floor(np.log10(x)), 6)
        if leading != 1.0:
            lo, hi = sorted(abs(v) for v in self.axis.get_view_interval())
            short = lo > 0 and np.log10(hi / lo) <= 2.0
            if not (short and leading in (2.0, 5.0)):
                return ""
        return plain_number(x)


def _plain_log_ticks(axis):
    """Plain-text labels on a log axis (major and minor ticks)."""
    axis.set_major_formatter(PlainLogFormatter())
    axis.set_minor_formatter(PlainLogFormatter())


def _plain_log_axes(ax):
    for axis, scale in ((ax.xaxis, ax.get_xscale()), (ax.yaxis, ax.get_yscale())):
        if scale == "log":
            _plain_log_ticks(axis)


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
    """Figure 1: the one-sided modal force PSD [N^2/Hz] (and a wind speed PSD on a twin axis).

    Parameters
    ----------
    frequency_hz, psd_n2_per_hz : array
        Frequency [Hz] and modal force PSD [N^2/Hz].
    structure_frequency_hz : float, optional
        Marked by a dotted line [Hz].
    wind_frequency_hz, wind_psd_m2_s2_per_hz : array, optional
        A wind-speed PSD [(m/s)^2/Hz] against frequency [Hz], drawn on a twin axis.
    wind_label : str
        Legend text of the wind-speed PSD.
    ax : matplotlib.axes.Axes, optional
        Where to draw; a new figure when omitted.

    Returns
    -------
    matplotlib.axes.Axes
    """
    twin_needed = wind_frequency_hz is not None
    ax = _axes(ax, twin=twin_needed)
    ax.loglog(frequency_hz, psd_n2_per_hz, color=DAMPED, lw=1.4, label="modal force S_F")
    handles = list(ax.get_lines())
    if structure_frequency_hz is not None:
        handles.append(ax.axvline(structure_frequency_hz, color=TARGET, ls=":", lw=1,
                                  label=f"structure frequency {structure_frequency_hz:.4g} Hz"))
    if twin_needed:
        twin = ax.twinx()
        twin.loglog(wind_frequency_hz, wind_psd_m2_s2_per_hz, color=ROBUST, lw=1.1, ls="--",
                    label=wind_label or "wind speed S_u")
        twin.set_ylabel("wind speed PSD [(m/s)²/Hz]", fontsize=FONT_PT)
        twin.tick_params(labelsize=FONT_PT)
        _plain_log_axes(twin)
        handles += twin.get_lines()
    _plain_log_axes(ax)
    _legend(ax, handles, loc="lower left")
    return _finish(ax, "frequency [Hz]", "modal force PSD [N²/Hz]",
                   "Modal force spectrum of the design load (one-sided)")


def plot_frequency_response(frequency_hz, bare_m_s2_per_n, damped_m_s2_per_n=None, *, ax=None):
    """Figure 2: |H_a(f)|, acceleration per unit modal force [m/s^2/N], bare and damped.

    Parameters
    ----------
    frequency_hz : array
        Frequency [Hz].
    bare_m_s2_per_n, damped_m_s2_per_n : array
        |H_a| of the bare and the damped building [m/s^2 per N]; damped optional.
    ax : matplotlib.axes.Axes, optional
        Where to draw; a new figure when omitted.

    Returns
    -------
    matplotlib.axes.Axes
    """
    ax = _axes(ax)
    ax.loglog(frequency_hz, bare_m_s2_per_n, color=BARE, lw=1.3, label="bare building")
    if damped_m_s2_per_n is not None:
        ax.loglog(frequency_hz, damped_m_s2_per_n, color=DAMPED, lw=1.5, label="with damper")
    _plain_log_axes(ax)
    _legend(ax, loc="lower center")
    return _finish(ax, "frequency [Hz]", "|acceleration / modal force| [m/s² per N]",
                   "Acceleration frequency response")


def plot_acceleration_psd(frequency_hz, bare_psd, damped_psd=None, *, bare_sigma_m_s2,
                          bare_peak_m_s2, damped_sigma_m_s2=None, damped_peak_m_s2=None,
                          ax=None):
    """Figure 3: acceleration PSD [(m/s^2)^2/Hz], bare vs damped; rms and peak in the legend.

    Parameters
    ----------
    frequency_hz : array
        Frequency [Hz].
    bare_psd, damped_psd : array
        One-sided acceleration PSDs [(m/s^2)^2/Hz]; damped optional.
    bare_sigma_m_s2, bare_peak_m_s2 : float
        rms and peak acceleration of the bare building [m/s^2], for the legend.
    damped_sigma_m_s2, damped_peak_m_s2 : float, optional
        The same with the damper [m/s^2].
    ax : matplotlib.axes.Axes, optional
        Where to draw; a new figure when omitted.

    Returns
    -------
    matplotlib.axes.Axes
    """
    ax = _axes(ax, legend_rows=1 if damped_psd is None else 2)
    handles = ax.semilogy(frequency_hz, bare_psd, color=BARE, lw=1.3,
                          label=f"bare: rms {bare_sigma_m_s2:.4g}, "
                                f"peak {bare_peak_m_s2:.4g} m/s²")
    if damped_psd is not None:
        handles += ax.semilogy(frequency_hz, damped_psd, color=DAMPED, lw=1.5,
                               label=f"with damper: rms {damped_sigma_m_s2:.4g}, "
                                     f"peak {damped_peak_m_s2:.4g} m/s²")
    top = np.nanmax(bare_psd)
    ax.set_ylim(top * 1e-5, top * 3)
    _plain_log_axes(ax)
    _legend_below(ax, handles, columns=1)
    return _finish(ax, "frequency [Hz]", "acceleration PSD [(m/s²)²/Hz]",
                   "Acceleration spectrum at the evaluation height")


def plot_mass_ratio_study(mass_ratio, peak_acceleration_m_s2, peak_stroke_m, *,
                          target_peak_m_s2, chosen_mass_ratio=None, chosen_peak_m_s2=None,
                          chosen_stroke_m=None, max_stroke_m=None, ax=None):
    """Figure 4: best-tuned peak acceleration and peak stroke against mass ratio.

    The acceleration is drawn on ``ax`` (lines[0]); the stroke on a twin axis.
    Both axes leave headroom above their highest value and the stroke limit,
    so a stroke held at its limit is drawn inside the frame, not on it.

    Parameters
    ----------
    mass_ratio : array
        Mass ratios m_d / M* [-].
    peak_acceleration_m_s2, peak_stroke_m : array
        Peak acceleration [m/s^2] and one-sided peak stroke [m] of each best tuning.
    target_peak_m_s2 : float
        Peak acceleration target [m/s^2].
    chosen_mass_ratio, chosen_peak_m_s2, chosen_stroke_m : float, optional
        The chosen design [-, m/s^2, m], marked by stars.
    max_stroke_m : float, optional
        Stroke limit [m].
    ax : matplotlib.axes.Axes, optional
        Where to draw; a new figure when omitted.

    Returns
    -------
    matplotlib.axes.Axes
    """
    entries = 3 + (max_stroke_m is not None) + (chosen_mass_ratio is not None)
    ax = _axes(ax, twin=True, legend_rows=_rows(entries, 2))
    ax.plot(mass_ratio, peak_acceleration_m_s2, color=DAMPED, lw=1.5, marker="o", ms=3,
            label="peak acceleration")
    handles = [ax.lines[0], ax.axhline(target_peak_m_s2, color=TARGET, ls="--", lw=1,
                                       label=f"target {target_peak_m_s2:.4g} m/s²")]
    twin = ax.twinx()
    twin.plot(mass_ratio, peak_stroke_m, color=ROBUST, lw=1.3, marker="s", ms=3,
              label="peak stroke")
    handles.append(twin.lines[0])
    stroke_top = float(np.nanmax(peak_stroke_m))
    if max_stroke_m is not None:
        handles.append(twin.axhline(max_stroke_m, color=ROBUST, ls=":", lw=1.2,
                                    label=f"stroke limit {max_stroke_m:.4g} m"))
        stroke_top = max(stroke_top, max_stroke_m)
    if chosen_mass_ratio is not None:
        handles.append(ax.plot([chosen_mass_ratio], [chosen_peak_m_s2], ls="none", marker="*",
                               ms=12, color=DAMPED, mec=TARGET,
                               label=f"chosen design, mass ratio {chosen_mass_ratio:.4g}")[0])
        twin.plot([chosen_mass_ratio], [chosen_stroke_m], ls="none", marker="*", ms=12,
                  color=ROBUST, mec=TARGET)
    twin.set_ylabel("peak stroke (one-sided) [m]", fontsize=FONT_PT)
    twin.tick_params(labelsize=FONT_PT)
    twin.set_ylim(0, HEADROOM * stroke_top)
    ax.set_ylim(0, HEADROOM * max(float(np.nanmax(peak_acceleration_m_s2)), target_peak_m_s2))
    _legend_below(ax, handles)
    return _finish(ax, "mass ratio m_d / M* [-]", "peak acceleration [m/s²]",
                   "Best-tuned TMD against mass ratio")


def plot_detuning_sweep(structure_frequency_factor, bare_m_s2, nominal_m_s2, *,
                        target_peak_m_s2, frequency_band=None, robust_factor=None,
                        robust_m_s2=None, ax=None):
    """Figure 5: peak acceleration against the structure frequency factor s.

    Lines: bare (lines[0]), nominal design (lines[1]), robust design (lines[2], if given);
    the band 1 +/- frequency_band is shaded.

    Parameters
    ----------
    structure_frequency_factor : array
        s = f_actual / f_nominal [-].
    bare_m_s2, nominal_m_s2 : array
        Peak acceleration of the bare building and with the nominal design [m/s^2].
    target_peak_m_s2 : float
        Peak acceleration target [m/s^2].
    frequency_band : float, optional
        Half-width of the shaded band of s [-].
    robust_factor, robust_m_s2 : array, optional
        s [-] and peak acceleration [m/s^2] of the robust design.
    ax : matplotlib.axes.Axes, optional
        Where to draw; a new figure when omitted.

    Returns
    -------
    matplotlib.axes.Axes
    """
    entries = 3 + (robust_m_s2 is not None) + bool(frequency_band)
    ax = _axes(ax, legend_rows=_rows(entries, 2))
    s = np.asarray(structure_frequency_factor)
    ax.plot(s, bare_m_s2, color=BARE, lw=1.3, label="bare building")
    ax.plot(s, nominal_m_s2, color=DAMPED, lw=1.5, label="nominal design")
    tops = [float(np.nanmax(bare_m_s2)), float(np.nanmax(nominal_m_s2)), target_peak_m_s2]
    if robust_m_s2 is not None:
        ax.plot(robust_factor, robust_m_s2, color=ROBUST, lw=1.5, ls="-.", label="robust design")
        tops.append(float(np.nanmax(robust_m_s2)))
    ax.axhline(target_peak_m_s2, color=TARGET, ls="--", lw=1,
               label=f"target {target_peak_m_s2:.4g} m/s²")
    if frequency_band:
        ax.axvspan(1 - frequency_band, 1 + frequency_band, color=BAND, alpha=0.5, lw=0,
                   label=f"frequency band ±{100 * frequency_band:.3g} %")
    ax.set_ylim(0, HEADROOM * max(tops))
    ax.set_xlim(float(s.min()), float(s.max()))
    handles, _ = ax.get_legend_handles_labels()
    _legend_below(ax, handles)
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
    target_peak_m_s2 : float
        The user's peak acceleration target [m/s^2].
    target_return_period_years : float, optional
        Return period the target applies to [years].
    ax : matplotlib.axes.Axes, optional
        Where to draw; a new figure when omitted.

    Returns
    -------
    matplotlib.axes.Axes
    """
    entries = len(limits) + 1 + sum(1 + (r.damped_peak_m_s2 is not None) for r in responses)
    ax = _axes(ax, twin=True, legend_rows=_rows(entries, 2))
    periods = sorted({r.return_period_years for r in responses if r.return_period_years},
                     key=float)
    colour = {p: PERIOD_COLOURS[i % len(PERIOD_COLOURS)] for i, p in enumerate(periods)}
    styles = ("-", "--", "-.", ":")
    for i, c in enumerate(limits):
        ax.loglog(c.frequency_hz, c.peak_acceleration_m_s2, lw=1.3, ls=styles[i % len(styles)],
                  color=colour.get(c.return_period_years, BARE), label=f"limit: {c.label}")
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
    handles, _ = ax.get_legend_handles_labels()
    _legend_below(ax, handles)
    return _finish(ax, "building frequency [Hz]", "peak acceleration [m/s²]",
                   "Occupant comfort: peak accelerations and shipped comfort limits")


def plot_option_comparison(names, mass_ratio, peak_acceleration_m_s2, band_max_m_s2=None, *,
                           target_peak_m_s2, ax=None):
    """Figure 7: each option's peak acceleration, one row per option.

    Filled markers (lines[0]) are the nominal peaks, open markers (lines[1])
    the worst peak across the detuning band, joined to the nominal by a bar.
    Each row is labelled by the option and its added mass as a share of M*
    (an option without added mass, such as viscous dampers, says so), so
    options of equal mass or equal peak never hide one another.

    Parameters
    ----------
    names : list of str
        Option names, one row each (top to bottom).
    mass_ratio : list of float or None
        Total added mass / M* [-]; None for an option without added mass.
    peak_acceleration_m_s2 : list of float
        Nominal peak acceleration of each option [m/s^2].
    band_max_m_s2 : list of float, optional
        Worst peak acceleration across the frequency band [m/s^2].
    target_peak_m_s2 : float
        Peak acceleration target [m/s^2].
    ax : matplotlib.axes.Axes, optional
        Where to draw; a new figure when omitted.

    Returns
    -------
    matplotlib.axes.Axes
    """
    rows = len(names)
    entries = 2 + (band_max_m_s2 is not None)
    ax = _axes(ax, legend_rows=_rows(entries, 3),
               plot_height_in=max(1.2, 0.36 * rows + 0.3), left_in=OPTION_LEFT_IN)
    y = np.arange(rows)[::-1].astype(float)
    peak = np.asarray(peak_acceleration_m_s2, dtype=float)
    tops = [float(np.nanmax(peak)), target_peak_m_s2]
    if band_max_m_s2 is not None:
        worst = np.asarray(band_max_m_s2, dtype=float)
        ax.hlines(y, peak, worst, color=ROBUST, lw=1.2)
    ax.plot(peak, y, ls="none", marker="o", ms=7, color=DAMPED, label="peak acceleration")
    if band_max_m_s2 is not None:
        ax.plot(worst, y, ls="none", marker="v", ms=7, mfc="white", mec=ROBUST, mew=1.5,
                label="worst across the frequency band")
        tops.append(float(np.nanmax(worst)))
    ax.axvline(target_peak_m_s2, color=TARGET, ls="--", lw=1,
               label=f"target {target_peak_m_s2:.4g} m/s²")
    ax.set_yticks(y, [_option_label(n, mu) for n, mu in zip(names, mass_ratio, strict=True)])
    ax.set_ylim(-0.6, rows - 0.4)
    ax.set_xlim(0, HEADROOM * max(tops))
    handles, _ = ax.get_legend_handles_labels()
    _legend_below(ax, handles, columns=3)
    ax.set_xlabel("peak acceleration [m/s²]", fontsize=FONT_PT)
    ax.set_title("Damper options compared (added mass as % of M*)", fontsize=FONT_PT + 1,
                 y=1.0, pad=6)
    ax.grid(True, axis="x", which="major", alpha=0.35, linewidth=0.6)
    return ax


def _option_label(name: str, mass_ratio) -> str:
    if mass_ratio is None:
        return f"{name}\n(no added mass)"
    return f"{name}\n({100 * mass_ratio:.3g} % of M*)"


def png_bytes(ax, dpi: int = 150) -> bytes:
    """Return the Axes' figure as PNG bytes (no software tag, so no URL in the file).

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        Any Axes of the figure.
    dpi : int
        Resolution [dots per inch].

    Returns
    -------
    bytes
    """
    buffer = io.BytesIO()
    ax.figure.savefig(buffer, format="png", dpi=dpi, metadata={"Software": None})
    return buffer.getvalue()
