"""Whole-building wind cases: sector probabilities, c_dir, and the rule that joins them."""

import numpy as np
import pytest
from typer.testing import CliRunner

from tmd.building_case import load_building_case
from tmd.cli import app

runner = CliRunner()

WIND = """
name = "sector test (fictional)"
[[modes]]
name = "x"
frequency_hz = 0.2
generalised_mass_kg = 1.5e7
damping_ratio = 0.01
shape_exponent = 1.0
shape_x = 1.0
[[modes]]
name = "y"
frequency_hz = 0.22
generalised_mass_kg = 1.6e7
damping_ratio = 0.01
shape_exponent = 1.0
shape_y = 1.0
[plan]
height_m = 120.0
x_min_m = -15.0
x_max_m = 15.0
y_min_m = -10.0
y_max_m = 10.0
[wind]
terrain = "III"
basic_speed_m_s = 28.0
n_strips = 6
return_periods_years = [{period}]
[[wind_directions]]
name = "north"
direction_deg = 0.0
breadth_m = 30.0
depth_m = 20.0
drag_coefficient = 1.3
{north}
[[wind_directions]]
name = "west"
direction_deg = 270.0
breadth_m = 20.0
depth_m = 30.0
drag_coefficient = 1.2
{west}
[target]
peak_acceleration_m_s2 = 0.1
return_period_years = {period}
"""


def _case(tmp_path, period=10, north="", west="", name="c.toml"):
    path = tmp_path / name
    path.write_text(WIND.format(period=period, north=north, west=west))
    return path


def test_sector_probability_sets_the_sector_speed_at_return_period_p_times_t(tmp_path):
    # Poisson arrivals (the convention of tmd.wind.profile.probability_factor):
    # when a share p of the site's extreme winds comes from a sector, the rate
    # at which a speed is exceeded from that sector is p times the site's, so
    # the sector's T-year speed is the site's (p T)-year speed (common
    # practice; the sector-by-sector directional method, from memory).
    sector = load_building_case(_case(tmp_path, 10, "probability = 0.5", "probability = 0.3"))
    site5 = load_building_case(_case(tmp_path, 5, name="t5.toml"))
    site3 = load_building_case(_case(tmp_path, 3, name="t3.toml"))
    north, west = sector.loads_by_period[10]
    np.testing.assert_allclose(north.spectrum.matrix, site5.loads_by_period[5][0].spectrum.matrix,
                               rtol=1e-12)
    np.testing.assert_allclose(west.spectrum.matrix, site3.loads_by_period[3][1].spectrum.matrix,
                               rtol=1e-12)
    assert [d["speed_rule"] for d in sector.directions] == ["sector probability"] * 2
    assert any("never multiplied" in note for note in sector.notes)


def test_c_dir_alone_scales_the_sector_speed(tmp_path):
    # EN 1991-1-4 4.2 (4.1): v_b = c_dir c_season v_b,0. The strip force PSD
    # grows with the speed, so c_dir = 0.9 lowers every auto-spectrum of its
    # sector and leaves the other sector (c_dir = 1) at the site's speed.
    plain = load_building_case(_case(tmp_path, 10))
    reduced = load_building_case(_case(tmp_path, 10, west="c_dir = 0.9", name="d.toml"))
    assert [d["speed_rule"] for d in reduced.directions] == ["c_dir"] * 2
    a = plain.loads_by_period[10][1].spectrum.matrix[:, 0, 0].real
    b = reduced.loads_by_period[10][1].spectrum.matrix[:, 0, 0].real
    assert np.all(b[a > 0] < a[a > 0])
    np.testing.assert_array_equal(plain.loads_by_period[10][0].spectrum.matrix,
                                  reduced.loads_by_period[10][0].spectrum.matrix)


@pytest.mark.parametrize(("north", "west", "expected"), [
    ("probability = 0.5\nc_dir = 0.9", "probability = 0.5",
     "[[wind_directions]] 1 c_dir = 0.9: with a sector probability, c_dir must be left at 1"),
    ("probability = 0.5", "", "[[wind_directions]] 2 probability: give a sector probability "
                              "for every wind direction or for none"),
    ("probability = 0.7", "probability = 0.6", "the sector probabilities add up to 1.3"),
])
def test_sector_probability_rules_are_exit_2(tmp_path, north, west, expected):
    path = _case(tmp_path, 10, north, west)
    result = runner.invoke(app, ["design", str(path), "--out", str(tmp_path / "o")])
    assert result.exit_code == 2
    assert str(path) in result.output and expected in " ".join(result.output.split())


ACROSS = WIND.replace('name = "west"', 'name = "west"\nacross_wind = true')


def test_across_wind_sector_adds_the_published_model_on_the_cross_wind_mode(tmp_path):
    # Wind from the west travels along +x: the x mode is along the wind, the y
    # mode across it. The y mode's force is then the across-wind generalised
    # force of the AIJ-RLB 2004 model (tmd.wind.acrosswind's stable interface,
    # phi = z / H: eta = 1 / H), the x mode's force is the along-wind strip
    # force unchanged, and the two are uncorrelated (the stated assumption).
    from tmd.wind import Site
    from tmd.wind.acrosswind import generalised_force_psd

    path = tmp_path / "a.toml"
    path.write_text(ACROSS.format(period=10, north="", west=""))
    across = load_building_case(path)
    plain = load_building_case(_case(tmp_path, 10))
    west = across.loads_by_period[10][1].spectrum
    f = west.frequency_hz
    top = float(Site(terrain="III", basic_speed_m_s=28.0).mean_speed(120.0, 10.0))
    expected = generalised_force_psd(f, breadth_m=20.0, depth_m=30.0, height_m=120.0,
                                     top_mean_speed_m_s=top, mode_shape=lambda z: z / 120.0)
    np.testing.assert_allclose(west.matrix[:, 1, 1].real, expected, rtol=1e-9)
    np.testing.assert_allclose(west.matrix[:, 0, 0], plain.loads_by_period[10][1].spectrum
                               .matrix[:, 0, 0], rtol=1e-12)
    assert np.all(west.matrix[:, 0, 1] == 0)
    # The north sector did not ask for it: unchanged.
    np.testing.assert_array_equal(across.loads_by_period[10][0].spectrum.matrix,
                                  plain.loads_by_period[10][0].spectrum.matrix)
    note = next(n for n in across.notes if "Across-wind forces" in n)
    assert "uncorrelated with the along-wind" in note and "often correlated" in note
    assert "not verified" in note
