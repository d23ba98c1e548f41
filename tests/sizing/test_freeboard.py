"""Liquid dampers against their freeboard at every return period (issue 11, item 1).

The compare job on a small wind case (1- and 50-year winds): every return period's rise
is checked with the one verdict rise <= freeboard, an exceedance is a warning, a red
OVERFLOWS in the terminal and a traced row of the report.
"""

import json
import math
import warnings

import pytest

from tests.consistency import assert_consistent_results
from tests.report.test_document import check_cells
from tests.test_endstops import WIND_CASE
from tmd.case import read_case
from tmd.jobs import compare_job
from tmd.outputs import to_json

OPTIONS = '\n[options]\nenabled = ["liquid-column", "sloshing-tank"]\n'


def _compare(tmp_path, name, extra=""):
    path = tmp_path / f"{name}.toml"
    path.write_text(WIND_CASE + OPTIONS + extra, encoding="utf-8")
    case = read_case(path)
    with warnings.catch_warnings(record=True):
        warnings.simplefilter("always")
        result = json.loads(to_json(compare_job(case)))
    assert_consistent_results(result)
    return case, result, {r["option"]: r for r in result["options"]}


@pytest.fixture(scope="module")
def default(tmp_path_factory):
    return _compare(tmp_path_factory.mktemp("freeboard"), "default")


@pytest.fixture(scope="module")
def tight(tmp_path_factory, default):
    # Freeboards between each option's 1-year and 50-year rise: met at the design
    # wind, exceeded at the 50-year one.
    _, _, rows = default
    col = [r["peak_excursion_m"] for r in rows["liquid-column"]["by_return_period"]]
    tank = [r["peak_free_surface_elevation_m"]
            for r in rows["sloshing-tank"]["by_return_period"]]
    col_fb, tank_fb = round(0.5 * sum(col), 4), round(0.5 * sum(tank), 4)
    extra = (f"[options.liquid_column]\nfreeboard_m = {col_fb}\n"
             f"[options.sloshing_tank]\nfreeboard_m = {tank_fb}\n")
    return (col_fb, tank_fb) + _compare(tmp_path_factory.mktemp("freeboard"), "tight", extra)


def test_default_column_legs_are_sized_for_the_longest_return_period(default):
    _, _, rows = default
    col = rows["liquid-column"]
    periods = col["by_return_period"]
    assert [r["return_period_years"] for r in periods] == [1.0, 50.0]
    # The design wind's row is the sized column itself (same fixed point, to its tolerance).
    assert periods[0]["peak_excursion_m"] == pytest.approx(col["peak_stroke_m"], rel=1e-6)
    assert periods[0]["peak_acceleration_m_s2"] == pytest.approx(col["peak_acceleration_m_s2"],
                                                                 rel=1e-6)
    # A stronger wind moves the liquid further, and the head loss damps it more: its
    # equivalent damping grows with the rms velocity (Gao, Kwok & Samali 1997).
    assert periods[1]["peak_excursion_m"] > periods[0]["peak_excursion_m"]
    assert periods[1]["equivalent_damping_ratio"] > periods[0]["equivalent_damping_ratio"]
    dims = col["dimensions"]
    assert dims["freeboard_m"] == periods[1]["peak_excursion_m"]
    assert dims["vertical_leg_height_m"] == pytest.approx(
        dims["vertical_liquid_height_m"] + dims["freeboard_m"], rel=1e-12)
    assert all(r["within_freeboard"] for r in periods)
    assert "longest reported return period" in col["freeboard_basis"]


def test_tank_wave_height_per_return_period(default):
    _, _, rows = default
    tank = rows["sloshing-tank"]
    periods = tank["by_return_period"]
    assert periods[0]["peak_free_surface_elevation_m"] == pytest.approx(
        tank["peak_free_surface_elevation_m"], rel=1e-6)
    # Linear first sloshing mode (derived in tmd.dampers.sloshing from the surface
    # eta = A cos(pi x / L)): A = (4 / pi) tanh(pi h / L) u at the wall, u the sloshing
    # mass's displacement (the row's peak stroke).
    L, h = tank["dimensions"]["tank_length_m"], tank["dimensions"]["water_depth_m"]
    assert periods[0]["peak_free_surface_elevation_m"] == pytest.approx(
        4 / math.pi * math.tanh(math.pi * h / L) * tank["peak_stroke_m"], rel=1e-6)
    assert tank["dimensions"]["freeboard_m"] == 1.0  # the default of [options.sloshing_tank]
    assert [r["within_freeboard"] for r in periods] == [
        r["peak_free_surface_elevation_m"] <= 1.0 for r in periods]


def test_exceedance_is_a_verdict_and_a_warning(tight):
    col_fb, tank_fb, _, result, rows = tight
    for name, key, freeboard in (("liquid-column", "peak_excursion_m", col_fb),
                                 ("sloshing-tank", "peak_free_surface_elevation_m", tank_fb)):
        row = rows[name]
        assert row["dimensions"]["freeboard_m"] == freeboard
        one, fifty = row["by_return_period"]
        # The sizing holds the rise within the freeboard at the design wind ...
        assert one[key] <= freeboard and one["within_freeboard"] is True
        # ... the 50-year wind overflows: the one comparison, and a warning naming it.
        assert fifty[key] > freeboard and fifty["within_freeboard"] is False
        assert any(w.startswith(f"{name}: at the 50-year wind") and "overflows" in w
                   for w in result["warnings"]), result["warnings"]
    col = rows["liquid-column"]
    assert col["peak_stroke_m"] <= col_fb * (1 + 1e-6)  # a constraint of the sizing
    assert "given" in col["freeboard_basis"]


def test_exceedance_in_the_terminal_and_report(tight):
    from rich.console import Console

    from tmd.report import render_report
    from tmd.terminal import freeboard_table

    _, _, case, result, rows = tight
    console = Console(width=100, record=True, color_system=None)
    console.print(freeboard_table(result))
    text = console.export_text()
    lines = [line for line in text.splitlines() if "50 y" in line]
    assert len(lines) == 2 and all("OVERFLOWS" in line for line in lines)
    assert sum("within" in line for line in text.splitlines() if "1 y" in line) == 2
    files = render_report(result, dpi=40)
    html = files["report.html"].decode("utf-8")
    # Every keyed cell equals its results.json value (the report tests' tracer), the
    # freeboard rows among them.
    assert check_cells(html, result) > 0
    assert 'data-key="options.0.by_return_period.1.within_freeboard"' in html
    assert 'data-key="options.1.by_return_period.1.peak_free_surface_elevation_m"' in html


def test_check_freeboard_warns_only_where_the_rise_exceeds_it():
    # The verdict is the one comparison rise <= freeboard (equality passes), and
    # each exceedance warns, naming the option, the return period and the excess.
    from tmd.sizing.freeboard import FreeboardWarning, check_freeboard

    rows = [{"return_period_years": 1.0, "peak_excursion_m": 0.8},
            {"return_period_years": 10.0, "peak_excursion_m": 1.0},
            {"return_period_years": 50.0, "peak_excursion_m": 1.25}]
    with pytest.warns(FreeboardWarning, match=r"^liquid column: at the 50-year wind the peak "
                      r"liquid rise 1\.250 m exceeds the freeboard 1\.000 m by 25\.0%") as caught:
        out = check_freeboard("liquid column", rows, "peak_excursion_m", 1.0, "raise the legs")
    assert [r["within_freeboard"] for r in out] == [True, True, False]
    assert len([w for w in caught if issubclass(w.category, FreeboardWarning)]) == 1
