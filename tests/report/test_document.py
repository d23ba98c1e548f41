"""The report files: built for every case, numbers traceable to results.json, self-contained."""

import csv
import io
import math
import re
from html import escape
from html.parser import HTMLParser
from pathlib import Path

import numpy as np
import pytest
from matplotlib.image import imread

from tests.report.conftest import TEST_DPI, as_written
from tmd.case import read_case
from tmd.jobs import design_job
from tmd.report import render_report, series
from tmd.report.assemble import comfort_caption
from tmd.report.comfort import comfort_limits
from tmd.report.tables import format_value
from tmd.schema import CAUTIONS

DIGIT = re.compile(r"[0-9]")
NUMBER = re.compile(r"^-?[0-9][0-9,]*(\.[0-9]+)?(e[+-][0-9]+)?$")
PNG_SIGNATURE = b"\x89PNG\r\n\x1a\n"


class Cells(HTMLParser):
    """Collects table cells (and spans) with their attributes and text."""

    def __init__(self):
        super().__init__()
        self.cells, self._open = [], []

    def handle_starttag(self, tag, attrs):
        if tag in ("td", "th"):
            self._open.append({"tag": tag, "attrs": dict(attrs), "text": ""})

    def handle_endtag(self, tag):
        if tag in ("td", "th") and self._open:
            self.cells.append(self._open.pop())

    def handle_data(self, data):
        if self._open:
            self._open[-1]["text"] += data


def cells_of(html: str):
    parser = Cells()
    parser.feed(html)
    return parser.cells


def lookup(results, path):
    value = results
    for part in path.split("."):
        value = value[int(part)] if isinstance(value, list) else value[part]
    return value


def printed_number(text: str) -> float:
    assert NUMBER.match(text), f"not a plain number: {text!r}"
    return float(text.replace(",", ""))


def check_cells(html: str, results: dict) -> int:
    """Every keyed cell equals its results.json value; no number without a key."""
    checked = 0
    for cell in cells_of(html):
        attrs, text = cell["attrs"], cell["text"].strip()
        if "data-key" not in attrs:
            assert not DIGIT.search(text), f"untraced number in a table cell: {text!r}"
            continue
        value = lookup(results, attrs["data-key"])
        if value is None:
            assert attrs["data-value"] == "null" and text == "—"
        elif isinstance(value, bool):
            assert attrs["data-value"] == ("true" if value else "false")
            assert text == ("yes" if value else "no")
        elif isinstance(value, str):
            assert attrs["data-value"] == value and text == value
        else:
            # data-value is repr(float): it must round-trip exactly
            assert float(attrs["data-value"]) == value, attrs["data-key"]
            expected = value * float(attrs.get("data-scale", "1"))
            shown = printed_number(text)
            if isinstance(value, int) and "data-scale" not in attrs:
                assert shown == value
            elif expected == 0:
                assert shown == 0
            else:
                # printed to 4 significant figures: half a unit in the 4th digit
                tol = 0.5 * 10 ** (math.floor(math.log10(abs(expected))) - 3)
                assert abs(shown - expected) <= tol * (1 + 1e-9), (attrs["data-key"], text)
        checked += 1
    return checked


def check_self_contained(html: str):
    lowered = html.lower()
    for forbidden in ("http:", "https:", "@import", "<link", "<script", "url(", "<iframe"):
        assert forbidden not in lowered, forbidden
    for src in re.findall(r'src="([^"]*)"', html):
        assert src.startswith("data:image/png;base64,")


def check_pngs(files: dict):
    pngs = {k: v for k, v in files.items() if k.startswith("figures/")}
    assert pngs
    for name, data in pngs.items():
        assert name.endswith(".png") and data.startswith(PNG_SIGNATURE)
        image = imread(io.BytesIO(data), format="png")
        assert image.shape[0] > 50 and image.shape[1] > 50
        assert np.ptp(image[..., :3]) > 0.1  # not a blank canvas
        assert files["report.html"].count(b"data:image/png;base64,") >= len(pngs)


def test_every_case_builds(case_report):
    case, results, files = case_report
    html = files["report.html"].decode("utf-8")
    for name in ("force_spectrum", "frequency_response", "acceleration_psd", "mass_ratio",
                 "comfort"):
        assert f"figures/{name}.png" in files
    assert "tables/design.csv" in files and "tables/bare.csv" in files
    assert check_cells(html, results) > 20
    check_self_contained(html)
    check_pngs(files)


def test_absent_sections_are_skipped(case_report):
    _, results, files = case_report
    html = files["report.html"].decode("utf-8")
    if "sweep" not in results:
        assert "figures/detuning_sweep.png" not in files and "Robustness" not in html
    if "options" not in results:
        assert "figures/options.png" not in files and "Options</h2>" not in html
    if "by_return_period" not in results:
        assert "tables/by_return_period_bare.csv" not in files


def test_full_results_render_every_section(full_report, compare_report):
    # Real job output: a design job with every optional section, and a comparison.
    _, results, files = full_report
    html = files["report.html"].decode("utf-8")
    for title in ("The job and the case", "Inputs and assumptions",
                  "Load and bare-building response", "Damper specification",
                  "Occupant comfort", "Robustness", "Warnings and cautions"):
        assert f". {title}" in html
    for name in ("detuning_sweep", "comfort"):
        assert f"figures/{name}.png" in files
    for name in ("by_return_period_bare", "by_return_period_damper", "sweep", "sweep_bare",
                 "sweep_damper_frequency", "sweep_damper_damping", "robust_design",
                 "probabilistic", "retuning"):
        assert f"tables/{name}.csv" in files, name
    # every key of every per-return-period entry reached a table cell
    keyed = {c["attrs"]["data-key"] for c in cells_of(html) if "data-key" in c["attrs"]}
    for i, entry in enumerate(results["by_return_period"]):
        for group in ("bare", "design"):
            for key in entry[group]:
                assert f"by_return_period.{i}.{group}.{key}" in keyed
    assert check_cells(html, results) > 300
    check_self_contained(html)
    check_pngs(files)
    _, compared, files = compare_report
    html = files["report.html"].decode("utf-8")
    assert ". Options" in html and "figures/options.png" in files
    assert "tables/options.csv" in files
    keyed = {c["attrs"]["data-key"] for c in cells_of(html) if "data-key" in c["attrs"]}
    for i, option in enumerate(compared["options"]):  # every number and verdict of each option
        for key, value in option.items():
            if isinstance(value, int | float) and not isinstance(value, str):
                assert f"options.{i}.{key}" in keyed, (option["option"], key)
    check_self_contained(html)
    check_pngs(files)


def test_csv_tables_hold_the_results_values(full_report):
    _, results, files = full_report
    rows = list(csv.reader(io.StringIO(files["tables/sweep.csv"].decode("utf-8"))))
    assert len(rows) == 1 + len(results["sweep"])
    for row, point in zip(rows[1:], results["sweep"], strict=True):
        # full precision: repr round-trips the float exactly
        assert [float(v) for v in row] == [point[k] for k in (
            "structure_frequency_factor", "peak_acceleration_m_s2", "peak_stroke_m",
            "effective_damping_ratio")]
    design = {r[0]: r[1] for r in csv.reader(io.StringIO(
        files["tables/design.csv"].decode("utf-8")))}
    assert float(design["spring stiffness"]) == results["design"]["stiffness_n_per_m"]


def test_retuning_range_spans_the_band(full_report):
    """The re-tuning range is f_d (1 +/- band) and k_d (1 +/- band)^2 at fixed mass.

    k = m (2 pi f)^2 (common practice: spring of a TMD of given mass and frequency).
    """
    _, results, files = full_report
    band = results["band_design"]["frequency_band"]
    rows = list(csv.reader(io.StringIO(files["tables/retuning.csv"].decode("utf-8"))))
    f_lo, f_mid, f_hi = (float(v) for v in rows[1][1:4])
    k_lo, k_mid, k_hi = (float(v) for v in rows[2][1:4])
    d = results["design"]
    # the stiffness follows from mass and frequency; rtol for float rounding only
    assert k_lo == pytest.approx(d["mass_kg"] * (2 * np.pi * f_lo) ** 2, rel=1e-12)
    assert k_hi == pytest.approx(d["mass_kg"] * (2 * np.pi * f_hi) ** 2, rel=1e-12)
    assert (f_lo, f_mid, f_hi) == pytest.approx(
        (d["frequency_hz"] * (1 - band), d["frequency_hz"], d["frequency_hz"] * (1 + band)),
        rel=1e-12)
    assert k_mid == d["stiffness_n_per_m"]


def test_cautions_section_carries_the_usual_cautions(case_report):
    _, results, files = case_report
    html = files["report.html"].decode("utf-8")
    # the report shows the cautions exactly as results.json holds them, in order
    # (one source per fact); their content is the project's rule (common practice)
    shown = re.findall(r"<p>Cautions:</p>\s*<ul[^>]*>(.*?)</ul>", html, re.S)
    assert shown and re.findall(r"<li>(.*?)</li>", shown[0]) == [
        escape(c) for c in results["cautions"]]
    assert results["cautions"] == list(CAUTIONS)  # the one copy, in tmd.schema
    for phrase in ("Preliminary", "re-tuned", "across-wind", "Local codes"):
        assert phrase in html


@pytest.mark.parametrize(("value", "text"), [
    (557621.2168953175, "557,600"),
    (0.09999167338046709, "0.09999"),
    (0.1664093783688059, "0.1664"),
    (1.23456e-5, "1.235e-05"),
    (3, "3"),
    (10.0, "10"),
    (True, "yes"),
    (None, "—"),
])
def test_number_format(value, text):
    """Four significant figures, thousands separated (the report's stated convention)."""
    assert format_value(value) == text


def test_compare_report_states_no_verdict_of_its_own(compare_report):
    """Defect 13.12: the comparison report never says the bare building meets the target.

    Its verdicts are the options' own ``meets_target`` from results.json (checked
    cell by cell by check_cells); the damper section states none of its own.
    """
    _, results, files = compare_report
    html = files["report.html"].decode("utf-8")
    assert results.get("design") is None and "sizing" not in results
    assert "bare building meets the target" not in html
    assert "specifies no single damper" in html
    assert "Response without a specified damper" in html
    assert check_cells(html, results) > 50
    keyed = {c["attrs"]["data-key"]: c["text"] for c in cells_of(html)
             if "data-key" in c["attrs"]}
    for i, option in enumerate(results["options"]):
        assert keyed[f"options.{i}.meets_target"] == ("yes" if option["meets_target"] else "no")


def test_no_damper_statement_is_the_sizing_message(tmp_path):
    """Where the design job needs no damper, the report repeats results.json's own message."""
    demo = Path(__file__).resolve().parents[2] / "cases"
    text = (demo / "harbourline_residences.toml").read_text(encoding="utf-8")
    text = text.replace("peak_acceleration_m_s2 = 0.10", "peak_acceleration_m_s2 = 0.30")
    (tmp_path / "case.toml").write_text(text, encoding="utf-8")
    (tmp_path / "harbourline_force.csv").write_bytes((demo / "harbourline_force.csv").read_bytes())
    case = read_case(tmp_path / "case.toml")
    results = as_written(design_job(case))
    assert results["design"] is None and results["sizing"]["governed_by"] == "bare"
    html = render_report(results, dpi=TEST_DPI)["report.html"].decode("utf-8")
    callout = re.findall(r'<p class="box">(.*?)</p>', html, re.S)
    assert callout == [escape(f"No damper is specified: {results['sizing']['message']}.")]


def test_comfort_caption_says_which_points_have_no_limit(full_report):
    """No 50-year limit is shipped: the caption says the 50-year points stand against none."""
    case, results, _ = full_report
    responses = series.comfort_responses(results, case.mode.frequency_hz)
    shown, hidden = series.matching_limits(comfort_limits(), responses)
    caption = comfort_caption(shown, hidden, responses)
    assert {c.return_period_years for c in comfort_limits()} == {1.0, 10.0}
    assert "of the same return period" not in caption
    assert "No shipped limit has the return period of the 50-year points" in caption
    for limit in shown:
        assert limit.label in caption


def test_labels_read_plainly(case_report):
    """No list key repeated in its own label; the damper's damping ratio says what it refers to."""
    _, results, files = case_report
    html = files["report.html"].decode("utf-8")
    assert "return periods years" not in html and "(of its own frequency)" not in html
    if "wind" in results["case"]["inputs"]:
        periods = results["case"]["inputs"]["wind"]["return_periods_years"]
        rows = re.findall(r"<tr><td>([^<]*)</td><td[^>]*data-key=\"case\.inputs\.wind\."
                          r"return_periods_years\.\d+\"", html)
        assert rows == ["wind · return periods"] + [""] * (len(periods) - 1)
    assert "damper damping ratio ζ_d (referred to the damper frequency f_d)" in html
