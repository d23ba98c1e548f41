"""Whole-building cases: one mode through [[modes]], torsion and damper position, bad input."""

import json

import numpy as np
import pytest
from typer.testing import CliRunner

from tests.consistency import assert_consistent_results
from tests.reference import two_dof_state, white_force_covariance
from tmd.building_case import load_building_case
from tmd.building_modes import BuildingMode, BuildingModel, DamperPlacement, ModeShape, Plan
from tmd.building_response import assess_building, axis_absorbers
from tmd.case import read_case
from tmd.cli import app
from tmd.cross_spectra import UncorrelatedForces
from tmd.dampers.absorber import single_tmd
from tmd.jobs import loaded_mode_of
from tmd.modal_response import OutputRows, modal_response
from tmd.spectra import WhiteSpectrum, write_force_psd_csv

runner = CliRunner()
H = 150.0


def _force_table(path, level=2.0e8, corner=0.25):
    f = np.geomspace(0.005, 3.0, 120)
    write_force_psd_csv(path, f, level / (1 + (f / corner) ** 2) ** 2)


ONE_MODE = """
name = "one mode (fictional)"
{mode}
[target]
peak_acceleration_m_s2 = 0.05
"""


def test_one_mode_through_modes_equals_mode(tmp_path):
    # Issue 9: a single mode through [[modes]] equals [mode] to 1e-9, for the
    # same TMD, through both case readers.
    _force_table(tmp_path / "f.csv")
    (tmp_path / "a.toml").write_text(ONE_MODE.format(mode="""
[mode]
frequency_hz = 0.2
modal_mass_kg = 1.5e7
damping_ratio = 0.01
[load]
force_psd_csv = "f.csv"
"""))
    (tmp_path / "b.toml").write_text(ONE_MODE.format(mode=f"""
[[modes]]
frequency_hz = 0.2
generalised_mass_kg = 1.5e7
damping_ratio = 0.01
shape_exponent = 1.0
shape_x = 1.0
[plan]
height_m = {H}
x_min_m = -10.0
x_max_m = 10.0
y_min_m = -10.0
y_max_m = 10.0
[[points]]
name = "centre"
x_m = 0.0
y_m = 0.0
[[dampers]]
x_m = 0.0
y_m = 0.0
axes = "x"
[sizing]
max_mass_kg = 1e6
[modal_loads]
force_psd_csv = ["f.csv"]
"""))
    single = read_case(tmp_path / "a.toml")
    building = load_building_case(tmp_path / "b.toml")
    mu, ratio, zeta = 0.015, 0.98, 0.06
    a = loaded_mode_of(single).assess(single_tmd(0.2, 1.5e7, mu, ratio, zeta))
    b = assess_building(building.model, building.design_loads[0].spectrum, 600.0,
                        axis_absorbers(building.model, mu * 1.5e7, [0.2 * ratio], [zeta]))
    np.testing.assert_allclose(b.sigma_acceleration_m_s2[0, 0], a.sigma_acceleration_m_s2,
                               rtol=1e-9)
    np.testing.assert_allclose(b.peak_acceleration_m_s2[0, 0], a.peak_acceleration_m_s2,
                               rtol=1e-9)
    np.testing.assert_allclose(b.sigma_stroke_m[0], a.sigma_stroke_m[0], rtol=1e-9)
    np.testing.assert_allclose(b.peak_stroke_m[0], a.peak_stroke_m[0], rtol=1e-9)
    assert b.sigma_acceleration_m_s2[0, 1] == 0.0  # no y motion at all


def _torsion_model(damper_x_m):
    plan = Plan(-20, 20, -15, 15, 0, 0, H, H, Plan.corners(-20, 20, -15, 15))
    modes = (BuildingMode("x", 0.18, 0.01, 2.0e7, ModeShape.power_law(H, 1.0, 1, 0, 0)),
             BuildingMode("y", 0.2, 0.01, 2.0e7, ModeShape.power_law(H, 1.0, 0, 1, 0)),
             BuildingMode("t", 0.3, 0.01, 5.0e9, ModeShape.power_law(H, 1.0, 0, 0, 1)))
    damper = DamperPlacement("d", damper_x_m, 0.0, H, "y", 1.0)
    return BuildingModel(modes, plan, (damper,))


def _torsion_rms(model, absorbers):
    load = UncorrelatedForces((WhiteSpectrum(1e8), WhiteSpectrum(1e8), WhiteSpectrum(1e12)))
    rows = OutputRows(np.eye(3, 3 + 2 * absorbers.count), [0, 0, 0])
    r = modal_response(model.frequency_hz, model.generalised_mass, model.damping_ratio,
                       absorbers, model.participation(), load, rows)
    return r.sigma


def test_damper_at_the_centre_does_not_damp_torsion():
    # Common practice (and the lever-arm coupling u_y = phi_theta x): a damper
    # acting through the centre of rotation has no lever arm on torsion.
    model = _torsion_model(0.0)
    bare = _torsion_rms(model, axis_absorbers(model, 0.0, [0.3], [0.05]))
    damped = _torsion_rms(model, axis_absorbers(model, 2e5, [0.198], [0.05]))
    assert damped[2] == pytest.approx(bare[2], rel=1e-9)
    assert damped[1] < 0.8 * bare[1]  # it does damp the y-sway


def test_off_centre_damper_damps_torsion_like_a_tmd_on_the_equivalent_mode():
    # A y-acting damper at x = d sees the torsional mode as a one-mode
    # structure of modal mass I / d^2 (mode shape d at the damper, renormalised
    # to 1) and force M / d: its rotation variance is the 2-DOF Lyapunov
    # covariance (tests/reference.py) over d^2.
    d, inertia, f_t = 12.0, 5.0e9, 0.3
    model = _torsion_model(d)
    mass = 2.0e5
    mu = mass * d**2 / inertia
    assert model.effective_mass_ratios(mass)[0, 2] == pytest.approx(mu, rel=1e-12)
    ratio, zeta = 0.98, 0.06
    damped = _torsion_rms(model, axis_absorbers(model, mass, [ratio * f_t], [zeta]))
    bare = _torsion_rms(model, axis_absorbers(model, 0.0, [ratio * f_t], [zeta]))
    # The y-sway mode shares the damper, so isolate torsion: the y-sway mode
    # is far off (0.2 Hz vs 0.294 Hz) and has a white load too; compare a
    # torsion-only model instead.
    alone = BuildingModel(model.modes[2:], model.plan, model.dampers)
    load = UncorrelatedForces((WhiteSpectrum(1e12),))
    r = modal_response(alone.frequency_hz, alone.generalised_mass, alone.damping_ratio,
                       axis_absorbers(alone, mass, [ratio * f_t], [zeta]), alone.participation(),
                       load, OutputRows([[1.0, 0, 0]], [0]))
    p = white_force_covariance(*two_dof_state(f_t, inertia / d**2, 0.01, mu, ratio, zeta),
                               1e12 / d**2)
    assert r.variance[0] == pytest.approx(p[0, 0] / d**2, rel=1e-9)
    assert damped[2] < 0.8 * bare[2]


BASE = """
name = "bad input (fictional)"
[[modes]]
frequency_hz = 0.2
generalised_mass_kg = 1.5e7
damping_ratio = 0.01
{shape}
[[modes]]
frequency_hz = 0.3
generalised_mass_kg_m2 = 4e9
damping_ratio = 0.01
shape_exponent = 1.0
shape_theta_rad = 1.0
[plan]
height_m = 150.0
x_min_m = -10.0
x_max_m = 10.0
y_min_m = -10.0
y_max_m = 10.0
[[dampers]]
x_m = {damper_x}
y_m = 0.0
[sizing]
max_mass_kg = 1e6
[modal_loads]
force_psd_csv = {tables}
{cross}
[target]
peak_acceleration_m_s2 = 0.05
"""


def _bad(tmp_path, shape="shape_exponent = 1.0\nshape_x = 1.0", damper_x=0.0,
         tables='["f.csv", "f.csv"]', cross=""):
    _force_table(tmp_path / "f.csv")
    path = tmp_path / "c.toml"
    path.write_text(BASE.format(shape=shape, damper_x=damper_x, tables=tables, cross=cross))
    result = runner.invoke(app, ["design", str(path), "--out", str(tmp_path / "o")])
    return result, str(path)


def test_shape_table_not_increasing_is_exit_2(tmp_path):
    result, path = _bad(tmp_path, shape="shape_heights_m = [0.0, 80.0, 60.0, 150.0]\n"
                                          "shape_x = [0.0, 0.5, 0.4, 1.0]")
    assert result.exit_code == 2
    assert path in result.output and "shape_heights_m" in result.output
    assert "strictly increasing" in result.output and "60" in result.output


def test_damper_outside_the_plan_is_exit_2(tmp_path):
    result, path = _bad(tmp_path, damper_x=14.0)
    assert result.exit_code == 2
    assert "[[dampers]] 1" in result.output and "(14, 0)" in result.output
    assert "outside the plan" in result.output


def test_cross_spectrum_not_positive_semidefinite_names_the_frequency(tmp_path):
    # |S_12|^2 > S_11 S_22 at 0.2 Hz: a coherence above one (impossible).
    f = np.geomspace(0.005, 3.0, 120)
    auto = 2.0e8 / (1 + (f / 0.25) ** 2) ** 2
    co = 0.5 * auto
    co[np.argmin(np.abs(f - 0.2))] = 2.0 * auto[np.argmin(np.abs(f - 0.2))]
    bad_f = f[np.argmin(np.abs(f - 0.2))]
    lines = ["frequency_hz,co_n2_per_hz,quad_n2_per_hz"] + [
        f"{a:.10g},{b:.10g},0" for a, b in zip(f, co, strict=True)]
    (tmp_path / "x.csv").write_text("\n".join(lines) + "\n")
    result, path = _bad(tmp_path, cross='[[modal_loads.cross]]\nmodes = [1, 2]\ncsv = "x.csv"')
    assert result.exit_code == 2
    assert "not positive semi-definite" in result.output
    assert f"{bad_f:g} Hz" in result.output


def test_table_count_must_match_mode_count_is_exit_2(tmp_path):
    result, path = _bad(tmp_path, tables='["f.csv"]')
    assert result.exit_code == 2
    assert "force_psd_csv lists 1 tables but the case has 2 modes" in result.output


def test_generalised_mass_unit_follows_the_largest_component(tmp_path):
    result, _ = _bad(tmp_path, shape="shape_exponent = 1.0\nshape_theta_rad = 1.0")
    assert result.exit_code == 2
    assert "generalised_mass_kg_m2" in result.output


SMALL = """
name = "small building (fictional)"
[[modes]]
name = "x"
frequency_hz = 0.2
generalised_mass_kg = 1.5e7
damping_ratio = 0.01
shape_exponent = 1.0
shape_x = 1.0
[[modes]]
name = "torsion"
frequency_hz = 0.31
generalised_mass_kg_m2 = 3e9
damping_ratio = 0.012
shape_exponent = 1.0
shape_theta_rad = 1.0
[plan]
height_m = 150.0
x_min_m = -15.0
x_max_m = 15.0
y_min_m = -10.0
y_max_m = 10.0
[[dampers]]
name = "P"
x_m = 6.0
y_m = 4.0
axes = "both"
max_stroke_m = 1.5
[sizing]
max_mass_kg = 6e5
[modal_loads]
force_psd_csv = ["fx.csv", "ft.csv"]
[target]
peak_acceleration_m_s2 = {target}
"""


def test_small_building_design_job_writes_results_and_tables(tmp_path):
    _force_table(tmp_path / "fx.csv", 2.0e8)
    _force_table(tmp_path / "ft.csv", 4.0e10, 0.35)
    path = tmp_path / "c.toml"
    path.write_text(SMALL.format(target=0.009))
    result = runner.invoke(app, ["design", str(path), "--out", str(tmp_path / "o")])
    assert result.exit_code == 0, result.output
    data = json.loads((tmp_path / "o" / "results.json").read_text())
    assert data["kind"] == "building"
    assert_consistent_results(data)
    assert "uncorrelated" in data["building"]["load_notes"][0]
    assert any("Preliminary" in c for c in data["cautions"])
    gov = data["governing"][0]
    peak = gov["peak_acceleration_m_s2"]
    # One comparison gives the verdict: the governing peak against the target.
    assert data["sizing"]["meets_target"] == (peak <= 0.009)
    # A damper off the centre couples to torsion: both axes see the torsion mode.
    axes = data["damper_axes"]
    assert {a["direction"] for a in axes} == {"x", "y"}
    assert [m["name"] for m in data["building"]["modes"]] == ["x", "torsion"]
    assert all(a["effective_mass_ratio"][1] > 0 for a in axes)
    for a in axes:
        # Spring and dashpot follow from mass, frequency and damping ratio (definitions).
        omega = 2 * np.pi * a["frequency_hz"]
        assert a["stiffness_n_per_m"] == pytest.approx(a["mass_kg"] * omega**2, rel=1e-12)
    assert data["dampers"][0]["peak_plan_stroke_m"] >= max(a["peak_stroke_m"] for a in axes) \
        * 0.9
    table = (tmp_path / "o" / "tables" / "building_points.csv").read_text().splitlines()
    assert table[0].startswith("return_period_years,wind_direction,point")
    assert len(table) == 1 + 2 * 4  # bare and damped at four corners
    # The report's cells carry the results values they print (traceable by key path).
    html = (tmp_path / "o" / "report.html").read_text()
    assert f'data-key="damper_axes.0.mass_kg" data-value="{axes[0]["mass_kg"]!r}"' in html
    assert "Preliminary sizing only" in html


def test_lean_assessment_equals_the_full_one_on_what_tuning_uses(tmp_path):
    # The tuning search's lean assessment (accelerations and strokes only) must
    # give exactly the full assessment's values (tested against Lyapunov and
    # quad in tests/test_modal_response.py); it only skips the other outputs.
    _force_table(tmp_path / "fx.csv", 2.0e8)
    _force_table(tmp_path / "ft.csv", 4.0e10, 0.35)
    path = tmp_path / "c.toml"
    path.write_text(SMALL.format(target=0.009))
    case = load_building_case(path)
    absorbers = axis_absorbers(case.model, 2e5, [[0.195, 0.2], [0.19, 0.21]],
                               [[0.05, 0.06], [0.08, 0.04]])
    load = case.design_loads[0].spectrum
    full = assess_building(case.model, load, 600.0, absorbers)
    lean = assess_building(case.model, load, 600.0, absorbers, resultant_peaks=False, lean=True)
    for key in ("sigma_resultant_m_s2", "peak_acceleration_m_s2", "peak_stroke_m",
                "peak_plan_stroke_m"):
        np.testing.assert_allclose(getattr(lean, key), getattr(full, key), rtol=1e-13)
    assert np.all(np.isnan(lean.peak_force_n)) and np.all(np.isnan(lean.torsional_share))


def test_plan_stroke_limit_of_a_bidirectional_damper_holds_and_costs_mass(tmp_path):
    # Issue 9: the tuning holds the stroke limit on each axis and on the
    # resultant plan stroke of a bidirectional damper. A limit of 85% of the
    # unconstrained plan stroke must bind: the design keeps its plan stroke
    # (and each axis's stroke) under it, and needs more mass for the target.
    _force_table(tmp_path / "fx.csv", 2.0e8)
    _force_table(tmp_path / "ft.csv", 4.0e10, 0.35)

    def run(limit_m, name):
        path = tmp_path / f"{name}.toml"
        path.write_text(SMALL.format(target=0.009).replace("max_stroke_m = 1.5",
                                                           f"max_stroke_m = {limit_m!r}"))
        result = runner.invoke(app, ["design", str(path), "--out", str(tmp_path / name)])
        assert result.exit_code == 0, result.output
        return json.loads((tmp_path / name / "results.json").read_text())

    free = run(100.0, "free")
    free_plan = free["dampers"][0]["peak_plan_stroke_m"]
    limit = 0.85 * free_plan
    held = run(limit, "held")
    assert held["sizing"]["meets_target"]
    assert held["dampers"][0]["peak_plan_stroke_m"] <= limit * (1 + 1e-6)  # SLSQP feasibility
    assert all(a["peak_stroke_m"] <= limit * (1 + 1e-6) for a in held["damper_axes"])
    assert held["sizing"]["total_mass_kg"] > free["sizing"]["total_mass_kg"]
