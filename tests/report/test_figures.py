"""Each figure draws the computed arrays; the arrays agree with independent formulas."""

import csv
import io
import re
from types import SimpleNamespace

import numpy as np
import pytest
from matplotlib.text import Text
from rich.console import Console

from tests.report.conftest import TEST_DPI
from tmd.jobs import loaded_mode_of
from tmd.report import plots, series, simulation_plots
from tmd.report.assemble import render_report
from tmd.report.comfort import comfort_limits, melbourne_palmer_peak_acceleration
from tmd.report.progress import progress_bar, quiet_step

G = 9.80665
NUMBER_TICK = re.compile(r"^-?[0-9.]+(e-?[0-9]+)?$")


def xy(line):
    x, y = line.get_data()
    return np.asarray(x, float), np.asarray(y, float)


def two_dof_acceleration(f, mode, design):
    """|H_a| of structure + TMD from the 2-DOF equations of motion (Den Hartog 1956):
    (k + k_d - w^2 M + i w (c + c_d)) X - (k_d + i w c_d) Y = F,
    -(k_d + i w c_d) X + (k_d - w^2 m_d + i w c_d) Y = 0, Y the damper's absolute motion."""
    w = 2 * np.pi * f
    ws = 2 * np.pi * mode.frequency_hz
    k, c = mode.modal_mass_kg * ws**2, 2 * mode.damping_ratio * mode.modal_mass_kg * ws
    kd, cd, md = design["stiffness_n_per_m"], design["damping_n_s_per_m"], design["mass_kg"]
    coupling = kd + 1j * w * cd
    ds = k + kd - w**2 * mode.modal_mass_kg + 1j * w * (c + cd)
    dd = kd - w**2 * md + 1j * w * cd
    return np.abs(w**2 * dd / (ds * dd - coupling**2))


def force_spectrum_of(results):
    """The force spectrum curve the job stored for the report."""
    block = results["figure_series"]["force_spectrum"]
    return np.asarray(block["frequency_hz"]), np.asarray(block["force_psd_n2_per_hz"])


def test_force_spectrum_figure(case_report):
    case, results, _ = case_report
    load = loaded_mode_of(case)
    f, s = force_spectrum_of(results)
    ax = plots.plot_force_spectrum(f, s, structure_frequency_hz=case.mode.frequency_hz)
    x, y = xy(ax.lines[0])
    np.testing.assert_array_equal(x, f)
    np.testing.assert_array_equal(y, s)
    # The drawn curve passes through the case's own table points (log-log
    # interpolation is exact at the nodes); read the CSV independently, or
    # for a wind case take the computed table's nodes.
    if "load" in case.inputs:
        table = case.path.parent / case.inputs["load"]["force_psd_csv"]
        text = table.read_text(encoding="utf-8").splitlines()
        rows = np.array([[float(v) for v in r] for r in list(csv.reader(text))[1:]])
    else:
        rows = np.column_stack([load.spectrum.frequency_hz, load.spectrum.psd_n2_per_hz])
    assert x[0] == rows[0, 0] and x[-1] == rows[-1, 0]
    np.testing.assert_allclose(load.spectrum(rows[:, 0]), rows[:, 1], rtol=1e-12)
    assert "Hz" in ax.get_xlabel() and "N²/Hz" in ax.get_ylabel()


def test_frequency_response_figure(case_report):
    case, results, _ = case_report
    load = loaded_mode_of(case)
    h = series.response_curves(results["figure_series"]["response"])
    ax = plots.plot_frequency_response(h.frequency_hz, h.bare, h.damped)
    x, bare = xy(ax.lines[0])
    np.testing.assert_array_equal(x, h.frequency_hz)
    np.testing.assert_array_equal(bare, h.bare)
    # The loaded mode carries any aerodynamic damping; phi is the mode
    # shape at the evaluation height (1 for a CSV case).
    m, phi = load.mode, load.shape_factor
    # SDOF at resonance: |H_a(f_s)| = 1 / (2 zeta M*) (Clough & Penzien, dynamic
    # magnification 1/(2 zeta)); the grid's geometric midpoint is f_s.
    mid = len(x) // 2
    assert x[mid] == pytest.approx(m.frequency_hz, rel=1e-12)
    assert bare[mid] == pytest.approx(phi / (2 * m.damping_ratio * m.modal_mass_kg), rel=1e-9)
    # damped curve against the 2-DOF equations solved in closed form; rtol covers
    # float rounding of the stiffness / dashpot derived from the ratios
    _, damped = xy(ax.lines[1])
    np.testing.assert_allclose(damped, phi * two_dof_acceleration(x, m, results["design"]),
                               rtol=1e-9)
    assert "m/s²" in ax.get_ylabel()


def test_acceleration_psd_figure(case_report):
    case, results, _ = case_report
    load = loaded_mode_of(case)
    p = series.acceleration_psd(series.response_curves(results["figure_series"]["response"]))
    bare, design = results["bare"], results["design"]
    ax = plots.plot_acceleration_psd(
        p.frequency_hz, p.bare, p.damped, bare_sigma_m_s2=bare["sigma_acceleration_m_s2"],
        bare_peak_m_s2=bare["peak_acceleration_m_s2"],
        damped_sigma_m_s2=design["sigma_acceleration_m_s2"],
        damped_peak_m_s2=design["peak_acceleration_m_s2"])
    x, y_bare = xy(ax.lines[0])
    _, y_damped = xy(ax.lines[1])
    s_f = load.spectrum(x)
    m, phi2 = load.mode, load.shape_factor**2
    w, ws = 2 * np.pi * x, 2 * np.pi * m.frequency_hz
    sdof = w**2 / np.abs(m.modal_mass_kg * (ws**2 - w**2 + 2j * m.damping_ratio * ws * w))
    # S_a = |H_a|^2 S_F, with H_a of the SDOF / 2-DOF equations in closed form
    np.testing.assert_allclose(y_bare, phi2 * sdof**2 * s_f, rtol=1e-9)
    np.testing.assert_allclose(y_damped, phi2 * two_dof_acceleration(x, m, design) ** 2 * s_f,
                               rtol=1e-9)
    # The drawn bare PSD holds most of the variance the results report: the
    # grid spans f_s/3..3 f_s, so the trapezoid misses only the tails (<10 %).
    assert np.trapezoid(y_bare, x) == pytest.approx(bare["sigma_acceleration_m_s2"] ** 2,
                                                    rel=0.1)
    labels = [t.get_text() for t in ax.get_legend().get_texts()]
    assert f"{bare['peak_acceleration_m_s2']:.4g}" in labels[0]
    assert f"{design['sigma_acceleration_m_s2']:.4g}" in labels[1]


def test_mass_ratio_figure(case_report):
    case, results, _ = case_report
    d = results["design"]
    study = SimpleNamespace(**{k: np.asarray(v) for k, v in
                               results["figure_series"]["mass_ratio_study"].items()})
    grid = study.mass_ratio
    ax = plots.plot_mass_ratio_study(
        study.mass_ratio, study.peak_acceleration_m_s2, study.peak_stroke_m,
        target_peak_m_s2=results["target"]["peak_acceleration_m_s2"],
        chosen_mass_ratio=d["mass_ratio"], chosen_peak_m_s2=d["peak_acceleration_m_s2"],
        chosen_stroke_m=d["peak_stroke_m"], max_stroke_m=case.damper.max_stroke_m)
    x, y = xy(ax.lines[0])
    np.testing.assert_array_equal(x, study.mass_ratio)
    np.testing.assert_array_equal(y, study.peak_acceleration_m_s2)
    twin = [a for a in ax.figure.axes if a is not ax and a.lines][0]
    np.testing.assert_array_equal(xy(twin.lines[0])[1], study.peak_stroke_m)
    # A stroke held at its limit is drawn inside the frame, clear of its top edge
    # (a curve on the frame is hidden by it: common practice of chart making).
    stroke_top = max(study.peak_stroke_m.max(), case.damper.max_stroke_m or 0)
    assert twin.get_ylim()[1] >= 1.05 * stroke_top
    assert ax.get_ylim()[1] >= 1.05 * study.peak_acceleration_m_s2.max()
    # At the chosen mass ratio the study re-tunes to the design's optimum; tol
    # is the SLSQP tolerance of the optimum value
    at = np.flatnonzero(grid == d["mass_ratio"])[0]
    assert y[at] == pytest.approx(d["peak_acceleration_m_s2"], rel=1e-5)
    # More mass never hurts the best tuning (a fact of the trade: Warburton's
    # optimum response falls with mu), and the stroke limit holds everywhere.
    assert np.all(np.diff(y) <= 1e-6 * y[:-1])
    assert np.all(study.peak_stroke_m <= case.damper.max_stroke_m * (1 + 1e-5))


def test_detuning_figure(full_report):
    case, results, _ = full_report
    nominal = series.sweep_from_results(results["sweep"])
    bare = series.sweep_from_results(results["sweep_bare"])
    stored = results["figure_series"]["band_design_sweep"]
    robust = series.Sweep(np.asarray(stored["structure_frequency_factor"]),
                          np.asarray(stored["peak_acceleration_m_s2"]))
    ax = plots.plot_detuning_sweep(nominal.structure_frequency_factor,
                                   bare.peak_acceleration_m_s2, nominal.peak_acceleration_m_s2,
                                   target_peak_m_s2=0.1, frequency_band=0.15,
                                   robust_factor=robust.structure_frequency_factor,
                                   robust_m_s2=robust.peak_acceleration_m_s2)
    for line, expected in zip(ax.lines[:3], (bare, nominal, robust), strict=True):
        x, y = xy(line)
        np.testing.assert_array_equal(x, expected.structure_frequency_factor)
        np.testing.assert_array_equal(y, expected.peak_acceleration_m_s2)
    # At s = 1 the re-computed robust sweep is the robust design's own evaluation
    # (engine, two routes: absolute absorber vs ratios); rtol: quadrature rounding
    one = np.flatnonzero(robust.structure_frequency_factor == 1.0)[0]
    assert robust.peak_acceleration_m_s2[one] == pytest.approx(
        results["band_design"]["peak_acceleration_m_s2"], rel=1e-9)
    # a passive TMD only adds damping: the bare building is worse at every s
    assert np.all(bare.peak_acceleration_m_s2 > nominal.peak_acceleration_m_s2)
    band = ax.patches[0]  # the shaded 1 +/- 0.15
    assert (band.get_x(), band.get_x() + band.get_width()) == pytest.approx((0.85, 1.15))


def test_comfort_figure(full_report):
    case, results, _ = full_report
    responses = series.comfort_responses(results, case.mode.frequency_hz)
    shown, hidden = series.matching_limits(comfort_limits(), responses)
    # 1, 10 and 50-year responses: every shipped limit (1 and 10 years) is shown
    assert {r.return_period_years for r in responses} == {1.0, 10.0, 50.0}
    assert not hidden and len(shown) == len(comfort_limits())
    ax = plots.plot_comfort_chart(shown, responses, target_peak_m_s2=0.1,
                                  target_return_period_years=1.0)
    colour_of = {}
    for line, limit in zip(ax.lines, shown, strict=False):
        x, y = xy(line)
        np.testing.assert_array_equal(x, limit.frequency_hz)
        np.testing.assert_array_equal(y, limit.peak_acceleration_m_s2)
        colour_of.setdefault(limit.return_period_years, line.get_color())
    markers = ax.lines[len(shown):]
    for r in responses:
        bare = [m for m in markers if m.get_label() == f"bare, {r.return_period_years:g}-year"]
        assert xy(bare[0])[1][0] == r.bare_peak_m_s2
        assert xy(bare[0])[0][0] == case.mode.frequency_hz
        if r.return_period_years in colour_of:  # limit and response share the colour
            assert bare[0].get_markeredgecolor() == colour_of[r.return_period_years]
    entry = results["by_return_period"][1]
    assert any(xy(m)[1][0] == entry["design"]["peak_acceleration_m_s2"] for m in markers)


def test_comfort_limits_not_matched_are_left_out():
    only_fifty = [series.ComfortResponse(50.0, 0.2, 0.3, 0.1)]
    shown, hidden = series.matching_limits(comfort_limits(), only_fifty)
    assert not shown and len(hidden) == len(comfort_limits())


def test_comfort_data_against_published_formulas():
    limits = {c.name: c for c in comfort_limits()}
    # Melbourne & Palmer (1992), formula from memory, by hand at f = 0.2 Hz, R = 10:
    # sqrt(2 ln 120) = 3.09436, 0.68 + ln(10)/5 = 1.14052, exp(-3.65 + 0.41 ln 5) = 0.050284
    assert melbourne_palmer_peak_acceleration(0.2, 10.0) == pytest.approx(
        3.09436 * 1.14052 * 0.050284, rel=1e-4)  # 5-6 digit hand values
    for name, period in (("melbourne-palmer-1yr", 1.0), ("melbourne-palmer-10yr", 10.0)):
        c = limits[name]
        assert c.return_period_years == period and "from memory" in c.provenance
        # tabulated to 6 significant figures
        np.testing.assert_allclose(c.peak_acceleration_m_s2,
                                   melbourne_palmer_peak_acceleration(c.frequency_hz, period),
                                   rtol=1e-5)
    # NBCC commentary, 10-year: 15 / 25 milli-g (common practice, from memory)
    assert limits["nbcc-10yr-residential"].peak_acceleration_m_s2 == pytest.approx(
        0.015 * G, rel=1e-5)
    assert limits["nbcc-10yr-office"].peak_acceleration_m_s2 == pytest.approx(0.025 * G,
                                                                              rel=1e-5)
    assert all(c.return_period_years == 10.0 for n, c in limits.items() if "nbcc" in n)


def test_option_figure(compare_report):
    _, results, _ = compare_report
    options = results["options"] + [{  # an option without added mass (viscous dampers)
        "option": "viscous", "mass_ratio": None, "peak_acceleration_m_s2": 0.09,
        "peak_acceleration_band_max_m_s2": 0.095}]
    mu = [o["mass_ratio"] for o in options]
    peak = [o["peak_acceleration_m_s2"] for o in options]
    worst = [o["peak_acceleration_band_max_m_s2"] for o in options]
    names = [o["option"] for o in options]
    ax = plots.plot_option_comparison(names, mu, peak, worst, target_peak_m_s2=0.1)
    # one row per option, top to bottom in the given order, none left out
    rows = xy(ax.lines[0])[1]
    np.testing.assert_array_equal(xy(ax.lines[0])[0], peak)
    np.testing.assert_array_equal(xy(ax.lines[1])[0], worst)
    assert list(rows) == sorted(rows, reverse=True) and len(set(rows)) == len(options)
    ax.figure.draw_without_rendering()
    labels = [t.get_text() for t in ax.get_yticklabels()]
    assert [label.split("\n")[0] for label in labels] == names
    assert labels[-1].endswith("(no added mass)")
    # each label states the added mass as % of M* (3 significant figures)
    assert f"{100 * mu[0]:.3g} % of M*" in labels[0]
    # every marker lies inside the frame, clear of its edges (not clipped)
    x_lo, x_hi = ax.get_xlim()
    assert max(worst + peak + [0.1]) < x_hi and x_lo <= 0
    y_lo, y_hi = ax.get_ylim()
    assert y_lo < rows.min() - 0.3 and rows.max() + 0.3 < y_hi


@pytest.mark.parametrize("figure", ["force_spectrum", "frequency_response", "acceleration_psd",
                                    "detuning_sweep", "comfort", "options", "time_history"])
def test_figures_have_fixed_layouts_plain_ticks_and_nothing_cut_off(full_report, compare_report,
                                                                   figure):
    """No layout engine at save time, no mathtext, and every label inside the canvas.

    Whole labels inside the canvas and no '$' math in plain tick labels: common
    practice for legible printed figures.
    """
    case, results, _ = full_report
    h = series.response_curves(results["figure_series"]["response"])
    if figure == "force_spectrum":
        f, s = force_spectrum_of(results)
        ax = plots.plot_force_spectrum(f, s, structure_frequency_hz=case.mode.frequency_hz,
                                       wind_frequency_hz=f, wind_psd_m2_s2_per_hz=s / 1e6)
    elif figure == "frequency_response":
        ax = plots.plot_frequency_response(h.frequency_hz, h.bare, h.damped)
    elif figure == "acceleration_psd":
        p = series.acceleration_psd(h)
        ax = plots.plot_acceleration_psd(p.frequency_hz, p.bare, p.damped, bare_sigma_m_s2=0.1,
                                         bare_peak_m_s2=0.3, damped_sigma_m_s2=0.05,
                                         damped_peak_m_s2=0.15)
    elif figure == "detuning_sweep":
        sw = series.sweep_from_results(results["sweep"])
        ax = plots.plot_detuning_sweep(sw.structure_frequency_factor,
                                       1.5 * sw.peak_acceleration_m_s2, sw.peak_acceleration_m_s2,
                                       target_peak_m_s2=0.1, frequency_band=0.15)
    elif figure == "comfort":
        responses = series.comfort_responses(results, case.mode.frequency_hz)
        shown, _ = series.matching_limits(comfort_limits(), responses)
        ax = plots.plot_comfort_chart(shown, responses, target_peak_m_s2=0.1,
                                      target_return_period_years=1.0)
    elif figure == "time_history":
        # the layout does not depend on the record: a sampled sine stands in for one
        t = np.linspace(0.0, 600.0, 6001)
        ax = simulation_plots.time_history_excerpt(t, 0.05 * np.sin(t), 0.5 * np.cos(t))
    else:
        o = compare_report[1]["options"]
        ax = plots.plot_option_comparison(
            [r["option"] for r in o], [r["mass_ratio"] for r in o],
            [r["peak_acceleration_m_s2"] for r in o],
            [r["peak_acceleration_band_max_m_s2"] for r in o], target_peak_m_s2=0.1)
    fig = ax.figure
    assert fig.get_layout_engine() is None
    fig.draw_without_rendering()  # lays out text as savefig does
    for text in fig.findobj(Text):
        assert "$" not in text.get_text(), (figure, text)
    # everything drawn (ticks in view, labels, legend, title) lies on the canvas;
    # 0.01 in of slack for anti-aliasing at the edge
    drawn = fig.get_tightbbox()
    width, height = fig.get_size_inches()
    assert (drawn.x0 >= -0.01 and drawn.y0 >= -0.01 and drawn.x1 <= width + 0.01
            and drawn.y1 <= height + 0.01), (figure, drawn, (width, height))
    # log-axis labels are plain numbers, and some are shown on every log axis
    for a in fig.axes:
        for axis, scale in ((a.xaxis, a.get_xscale()), (a.yaxis, a.get_yscale())):
            if scale == "log" and axis.get_visible():
                shown = [t.get_text() for t in axis.get_ticklabels(which="both")
                         if t.get_text()]
                assert shown and all(
                    NUMBER_TICK.match(t.replace("\u2212", "-")) for t in shown), shown


def test_progress_is_quiet_off_terminal_and_reports_steps(case_report):
    case, results, _ = case_report
    buffer = io.StringIO()
    with progress_bar("report", console=Console(file=buffer)) as step:
        assert step is quiet_step
    assert buffer.getvalue() == ""
    calls = []
    render_report(results, dpi=20, on_step=lambda d, t, s: calls.append((d, t, s)))
    done = [c[0] for c in calls]
    assert done == sorted(done) and calls[-1][0] == calls[-1][1]
    loud = io.StringIO()
    with progress_bar("report", console=Console(file=loud, force_terminal=True)) as step:
        step(1, 2, "figure")
    assert step is not quiet_step


def test_figures_rendered_on_two_cores_are_the_serial_files_byte_for_byte(monkeypatch,
                                                                          compare_report):
    # The report renders alternate figures in a second process (tmd.side_by_side);
    # the reference is the same report rendered in one process (TMD_PROCESSES=1).
    from tmd.side_by_side import ENVIRONMENT_VARIABLE

    _, results, _ = compare_report
    parallel = render_report(results, dpi=TEST_DPI)
    monkeypatch.setenv(ENVIRONMENT_VARIABLE, "1")
    serial = render_report(results, dpi=TEST_DPI)
    assert parallel == serial
    pngs = [name for name in serial if name.endswith(".png")]
    assert len(pngs) >= 5 and all(serial[name].startswith(b"\x89PNG") for name in pngs)
