"""Base overturning moments and torque of the whole building (cases with [mass])."""

import json

import numpy as np
import pytest
from typer.testing import CliRunner

from tests.test_building import SMALL, _force_table
from tmd.building_modes import (
    BuildingMode,
    BuildingModel,
    MassDistribution,
    ModeShape,
    Plan,
    PlanPoint,
)
from tmd.building_response import assess_base
from tmd.cli import app
from tmd.cross_spectra import UncorrelatedForces
from tmd.dampers.absorber import Absorbers
from tmd.spectra import WhiteSpectrum

runner = CliRunner()
H = 150.0
MASS_PER_LENGTH = 2.0e5  # kg/m, uniform
INERTIA_PER_LENGTH = 3.0e7  # kg m^2/m, uniform


def test_quasi_static_base_moment_and_torque_of_a_uniform_shear_cantilever():
    # A uniform shear cantilever (and a uniform shaft in torsion) has the modes
    # phi_k = sin((2k - 1) pi z / (2 H)), so its first mode is a true eigenmode
    # with M* = m H / 2 and I* = I H / 2. A modal force far below resonance is
    # a static tip load P (phi(H) = 1): the first mode's share of the base
    # moment is P / M* int m phi z dz = 8 P H / pi^2, and of the base torque
    # T / I* int I phi dz = 4 T / pi (the modal expansion of the static tip
    # load, whose terms 4/pi (1 - 1/3 + 1/5 - ...) add up to the statics' T;
    # derived, from memory). White forces on [0, 1e-3] Hz against modes at 0.2
    # and 0.3 Hz: the dynamic amplification departs from 1 by at most 2.5e-5,
    # and the 801-row shape table's linear interpolation changes the integrals
    # by ~1e-7, hence rtol 1e-4.
    z = np.linspace(0.0, H, 801)
    sine = tuple(np.sin(np.pi * z / (2 * H)))
    zero = (0.0,) * z.size
    modes = (BuildingMode("x", 0.2, 0.01, MASS_PER_LENGTH * H / 2,
                          ModeShape(tuple(z), sine, zero, zero)),
             BuildingMode("t", 0.3, 0.01, INERTIA_PER_LENGTH * H / 2,
                          ModeShape(tuple(z), zero, zero, sine)))
    plan = Plan(-10, 10, -10, 10, 0, 0, H, H, (PlanPoint("c", 0, 0),))
    mass = MassDistribution((0.0, H), (MASS_PER_LENGTH,) * 2, (INERTIA_PER_LENGTH,) * 2)
    model = BuildingModel(modes, plan, (), mass)
    force, torque = 1.0e10, 4.0e12  # one-sided PSDs [N^2/Hz], [(N m)^2/Hz]
    band = 1e-3
    load = UncorrelatedForces((WhiteSpectrum(force, 0.0, band),
                               WhiteSpectrum(torque, 0.0, band)))
    b = assess_base(model, load, 600.0, Absorbers.none())
    assert b.names == ("base moment about x", "base moment about y", "base torque")
    assert b.sigma_n_m[0] == pytest.approx(0.0, abs=1e-12 * b.sigma_n_m[1])
    assert b.sigma_n_m[1] == pytest.approx(8 / np.pi**2 * H * np.sqrt(force * band), rel=1e-4)
    assert b.sigma_n_m[2] == pytest.approx(4 / np.pi * np.sqrt(torque * band), rel=1e-4)


MASS = """
[mass]
heights_m = [0.0, 150.0]
mass_per_length_kg_m = [3.0e5, 1.5e5]
"""


def test_case_with_mass_reports_base_moments_bare_and_damped(tmp_path):
    _force_table(tmp_path / "fx.csv", 2.0e8)
    _force_table(tmp_path / "ft.csv", 4.0e10, 0.35)
    path = tmp_path / "c.toml"
    path.write_text(SMALL.format(target=0.009) + MASS)
    result = runner.invoke(app, ["design", str(path), "--out", str(tmp_path / "o")])
    assert result.exit_code == 0, result.output
    data = json.loads((tmp_path / "o" / "results.json").read_text())
    row = data["base_moments"][0]
    assert row["bare"]["names"] == ["base moment about x", "base moment about y"]
    # The damper reduces the x-sway base moment it damps (the case has no y load).
    assert 0 < row["damped"]["sigma_moment_n_m"][1] < row["bare"]["sigma_moment_n_m"][1]
    assert row["bare"]["sigma_moment_n_m"][0] == 0.0
    table = (tmp_path / "o" / "tables" / "base_moments.csv").read_text().splitlines()
    assert table[0] == "return_period_years,wind_direction,state,output,sigma_n_m,peak_n_m"
    assert len(table) == 1 + 2 * 2
    html = (tmp_path / "o" / "report.html").read_text()
    value = row["bare"]["sigma_moment_n_m"][1]
    assert f'data-key="base_moments.0.bare.sigma_moment_n_m.1" data-value="{value!r}"' in html


def test_mass_table_must_span_the_height_is_exit_2(tmp_path):
    _force_table(tmp_path / "fx.csv", 2.0e8)
    _force_table(tmp_path / "ft.csv", 4.0e10, 0.35)
    path = tmp_path / "c.toml"
    path.write_text(SMALL.format(target=0.009) + MASS.replace("150.0]", "120.0]"))
    result = runner.invoke(app, ["design", str(path), "--out", str(tmp_path / "o")])
    assert result.exit_code == 2
    assert "[mass] heights_m = [0.0, 120.0]" in result.output
    assert "from 0 to the plan's height_m = 150" in " ".join(result.output.split())
