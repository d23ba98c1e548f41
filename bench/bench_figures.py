"""Benchmark of the report's figures: render time of each, drawing and PNG at the report's dpi.

Run: python bench/bench_figures.py [--repeats N]

The arrays come from the fictional Harbourline demo (a design, a detuning
sweep of that design, and the comparison of every option), computed once
before timing. Each figure is then drawn and saved to PNG bytes at 150 dpi,
as the report does, in interleaved repeats (every figure once per round, so
a slow moment of the shared machine falls on all of them alike). The
reference, measured in the same rounds, is the same figure saved with
Matplotlib's constrained layout engine switched on (the layout the report
used before issue 14). Printed: the CPU model and core count, then per
figure the median CPU time of a render (its own cost; on a shared machine
the wall time adds the wait for a CPU, and is printed beside it), the
reference's median CPU time and their ratio. The goal of issue 14 is at
most 0.3 s a figure on this machine. The last line is
``slowest: <CPU seconds> s``.
"""

from __future__ import annotations

import argparse
import os
import platform
import statistics
import time
import warnings
from pathlib import Path

import numpy as np

from tmd.case import read_case
from tmd.dampers.absorber import Absorbers
from tmd.jobs import compare_job, design_job, figure_series, loaded_mode_of
from tmd.performance import assess
from tmd.report import plots, series
from tmd.report.comfort import comfort_limits

CASE = Path(__file__).resolve().parents[1] / "cases" / "harbourline_residences.toml"
DPI = 150  # the report's resolution
GOAL_S = 0.3
FACTORS = np.linspace(0.8, 1.2, 81)


def cpu_model() -> str:
    """The CPU model name from /proc/cpuinfo (or the platform's processor string)."""
    try:
        for line in Path("/proc/cpuinfo").read_text().splitlines():
            if line.lower().startswith("model name"):
                return line.split(":", 1)[1].strip()
    except OSError:
        pass
    return platform.processor() or "unknown CPU"


def figure_makers():
    """One function per figure, each returning a fresh Axes drawn from precomputed arrays."""
    case = read_case(CASE)
    design_results = design_job(case)
    compare_results = compare_job(case)
    load = loaded_mode_of(case)
    d = design_results["design"]
    target = design_results["target"]["peak_acceleration_m_s2"]
    f, s_f = figure_series.force_spectrum_curve(load)
    h = figure_series.acceleration_frequency_response(load, d)
    # S_a as the report derives it: from the stored |H_a| and force PSD.
    p = series.acceleration_psd(series.response_curves(
        design_results["figure_series"]["response"]))
    grid = figure_series.mass_ratio_grid(case.damper.max_mass_ratio, d["mass_ratio"])
    study = figure_series.mass_ratio_study(load, grid, objective=case.damper.objective,
                                    max_stroke_m=case.damper.max_stroke_m)
    nominal = figure_series.detuned_sweep(load, d, FACTORS)
    m = load.mode
    bare = assess(FACTORS * m.frequency_hz, m.modal_mass_kg, m.damping_ratio,
                  Absorbers.none(FACTORS.shape), load.spectrum, load.duration_s,
                  shape_factor=load.shape_factor).peak_acceleration_m_s2
    responses = series.comfort_responses(design_results, m.frequency_hz)
    shown, _ = series.matching_limits(comfort_limits(), responses)
    options = compare_results["options"]
    bare_block = design_results["bare"]
    return {
        "force_spectrum": lambda: plots.plot_force_spectrum(
            f, s_f, structure_frequency_hz=m.frequency_hz),
        "frequency_response": lambda: plots.plot_frequency_response(
            h.frequency_hz, h.bare, h.damped),
        "acceleration_psd": lambda: plots.plot_acceleration_psd(
            p.frequency_hz, p.bare, p.damped,
            bare_sigma_m_s2=bare_block["sigma_acceleration_m_s2"],
            bare_peak_m_s2=bare_block["peak_acceleration_m_s2"],
            damped_sigma_m_s2=d["sigma_acceleration_m_s2"],
            damped_peak_m_s2=d["peak_acceleration_m_s2"]),
        "mass_ratio": lambda: plots.plot_mass_ratio_study(
            study.mass_ratio, study.peak_acceleration_m_s2, study.peak_stroke_m,
            target_peak_m_s2=target, chosen_mass_ratio=d["mass_ratio"],
            chosen_peak_m_s2=d["peak_acceleration_m_s2"], chosen_stroke_m=d["peak_stroke_m"],
            max_stroke_m=case.damper.max_stroke_m),
        "detuning_sweep": lambda: plots.plot_detuning_sweep(
            FACTORS, bare, nominal, target_peak_m_s2=target,
            frequency_band=0.15),
        "comfort": lambda: plots.plot_comfort_chart(
            shown, responses, target_peak_m_s2=target, target_return_period_years=None),
        "options": lambda: plots.plot_option_comparison(
            [o["option"] for o in options], [o["mass_ratio"] for o in options],
            [o["peak_acceleration_m_s2"] for o in options],
            [o["peak_acceleration_band_max_m_s2"] for o in options], target_peak_m_s2=target),
    }


def render_time(make, constrained: bool) -> tuple[float, float]:
    """(CPU, wall) seconds to draw one figure and save it as PNG bytes at the report's dpi."""
    cpu, wall = time.process_time(), time.perf_counter()
    ax = make()
    if constrained:
        ax.figure.set_layout_engine("constrained")
    plots.png_bytes(ax, DPI)
    return time.process_time() - cpu, time.perf_counter() - wall


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeats", type=int, default=7, help="interleaved rounds (>= 5)")
    repeats = max(5, parser.parse_args().repeats)
    warnings.simplefilter("ignore")
    print(f"CPU: {cpu_model()}; cores: {os.cpu_count()}; Python {platform.python_version()}")
    print("preparing the demo's arrays (design and comparison jobs) ...", flush=True)
    makers = figure_makers()
    for make in makers.values():  # warm-up: font cache, first-use imports
        render_time(make, False)
    times = {name: ([], []) for name in makers}
    for _ in range(repeats):
        for name, make in makers.items():
            fixed, reference = times[name]
            fixed.append(render_time(make, False))
            reference.append(render_time(make, True))
    print(f"median of {repeats} interleaved rounds, {DPI} dpi PNG, draw + save; CPU time is "
          "the figure's own cost, wall time adds waiting for a shared CPU:")
    print(f"{'figure':<20}{'fixed CPU [s]':>15}{'fixed wall [s]':>16}"
          f"{'constrained CPU [s]':>21}{'ratio':>7}")
    slowest = 0.0
    for name, (fixed, reference) in times.items():
        cpu = statistics.median(t[0] for t in fixed)
        wall = statistics.median(t[1] for t in fixed)
        ref = statistics.median(t[0] for t in reference)
        slowest = max(slowest, cpu)
        print(f"{name:<20}{cpu:>15.3f}{wall:>16.3f}{ref:>21.3f}{ref / cpu:>7.2f}")
    print(f"goal: at most {GOAL_S} s of CPU a figure; "
          f"{'met' if slowest <= GOAL_S else 'NOT met'} on this machine")
    print(f"slowest: {slowest:.3f} s")


if __name__ == "__main__":
    main()
