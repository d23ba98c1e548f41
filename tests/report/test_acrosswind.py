"""The report's across-wind section renders results.json's ``across_wind`` block, nothing else.

Checks: every table cell of the section carries its results key and that key's
value; the figure draws exactly the stored series; the lock-in warning appears
when the results flag lock-in (EN 1991-1-4 E.1.2(2): v_crit <= 1.25 v_m) and
says a wind-tunnel test is required; the figure has a fixed layout and plain
tick labels (common practice for legible printed figures, as the other figures).
The stored across-wind series peaks at the model's Strouhal number (issue 10:
the spectrum's peak lies at St for the side ratio; AIJ-RLB 2004 A6.4, from memory).
"""

import copy
import math
import re
from pathlib import Path

import numpy as np
import pytest
from matplotlib.text import Text

from tmd.report.acrosswind import across_wind_section, plot_normalised_spectra
from tmd.report.html import Callout, Figure, Section
from tmd.wind.vortex import LOCK_IN_WARNING

CASES = Path(__file__).resolve().parents[2] / "cases"
NUMBER_TICK = re.compile(r"^-?[0-9.]+(e-?[0-9]+)?$")


def _lookup(results, dotted):
    node = results
    for part in dotted.split("."):
        node = node[int(part)] if isinstance(node, list) else node[part]
    return node


def _section(results):
    figures, tables = [], []

    def figure(name, ax, caption):
        figures.append((name, ax, caption))
        return Figure(name, b"", caption)

    def table(t):
        tables.append(t)
        return t

    return across_wind_section(results, figure, table), figures, tables


@pytest.mark.parametrize("stem", ["saltmarsh_spire", "kestrel_point"])
def test_section_cells_trace_to_results(design_results, stem):
    results = design_results(CASES / f"{stem}.toml")
    section, figures, tables = _section(results)
    assert isinstance(section, Section) and len(tables) == 2 and len(figures) == 1
    cells = [c for t in tables for row in t.rows for c in row if c.key] + [
        c for t in tables for c in t.header if c.key]
    assert cells
    for cell in cells:
        assert _lookup(results, cell.key) == cell.value, cell.key
    # one column per return period of the results, every flag shown
    lock_in = next(t for t in tables if t.name == "lock_in_check")
    periods = [r["return_period_years"] for r in results["across_wind"]["by_return_period"]]
    assert [c.value for c in lock_in.header[1:-1]] == periods
    # the unverified model is said so (issue 10, Precisions)
    assert any(isinstance(b, Callout) and "not verified" in b.text for b in section.blocks)


def test_no_section_without_an_across_wind_block(design_results):
    results = design_results(CASES / "harbourline_residences.toml")
    assert "across_wind" not in results
    assert _section(results)[0] is None


def test_figure_draws_the_stored_series(design_results):
    results = design_results(CASES / "saltmarsh_spire.toml")
    spectra = results["across_wind"]["spectra"]
    _, figures, _ = _section(results)
    (_, ax, _), = figures
    curves = [line for line in ax.get_lines() if len(line.get_xdata()) > 2]
    n = spectra["reduced_frequency"]
    stored = [spectra["across_normalised_psd"]] + [
        r["along_normalised_psd"] for r in spectra["by_return_period"]]
    assert len(curves) == len(stored)
    for line, values in zip(curves, stored, strict=True):
        assert list(line.get_xdata()) == n and list(line.get_ydata()) == values
    marks = sorted(float(line.get_xdata()[0]) for line in ax.get_lines()
                   if len(line.get_xdata()) == 2)
    expected = sorted([r["mode_reduced_frequency"] for r in spectra["by_return_period"]]
                      + [results["across_wind"]["strouhal_number"]])
    assert marks == expected


@pytest.mark.parametrize("stem", ["saltmarsh_spire", "kestrel_point"])
def test_stored_across_spectrum_peaks_at_the_strouhal_number(design_results, stem):
    # Peak of f S over ln n at St_1 (D/B < 3 here: one term); the stored grid has
    # 91 points over 2.6 decades, so the peak is within one grid step (ratio 1.07).
    block = design_results(CASES / f"{stem}.toml")["across_wind"]
    n = np.array(block["spectra"]["reduced_frequency"])
    phi = np.array(block["spectra"]["across_normalised_psd"])
    step = n[1] / n[0]
    assert abs(math.log(n[phi.argmax()] / block["strouhal_number"])) <= math.log(step)


def test_lock_in_warning_when_the_results_flag_it(design_results):
    results = copy.deepcopy(design_results(CASES / "saltmarsh_spire.toml"))
    results["across_wind"]["by_return_period"][-1]["lock_in_possible"] = True
    section, _, _ = _section(results)
    callouts = [b.text for b in section.blocks if isinstance(b, Callout)]
    assert any(LOCK_IN_WARNING in text and "T = 50 years" in text for text in callouts)
    assert "wind-tunnel test is required" in LOCK_IN_WARNING
    clear, _, _ = _section(design_results(CASES / "saltmarsh_spire.toml"))
    assert not any(isinstance(b, Callout) and LOCK_IN_WARNING in b.text for b in clear.blocks)


def test_figure_has_a_fixed_layout_and_plain_ticks(design_results):
    spectra = design_results(CASES / "saltmarsh_spire.toml")["across_wind"]["spectra"]
    ax = plot_normalised_spectra(
        spectra["reduced_frequency"], spectra["across_normalised_psd"],
        [(r["return_period_years"], r["along_normalised_psd"], r["mode_reduced_frequency"])
         for r in spectra["by_return_period"]], strouhal_number=0.08)
    fig = ax.figure
    assert fig.get_layout_engine() is None
    fig.draw_without_rendering()
    assert not any("$" in t.get_text() for t in fig.findobj(Text))
    drawn = fig.get_tightbbox()
    width, height = fig.get_size_inches()
    # 0.01 in of slack for anti-aliasing at the edge
    assert (drawn.x0 >= -0.01 and drawn.y0 >= -0.01 and drawn.x1 <= width + 0.01
            and drawn.y1 <= height + 0.01)
    for axis in (ax.xaxis, ax.yaxis):
        shown = [t.get_text() for t in axis.get_ticklabels(which="both") if t.get_text()]
        assert shown and all(NUMBER_TICK.match(t.replace("\u2212", "-")) for t in shown)

