"""Extreme-event checks and end-stop figures against Lyapunov covariances, Rice's
crossing law on simulated records, and the stroke constraint at a second load."""

import math
import warnings

import numpy as np
import pytest
from scipy import signal

from tests.reference import two_dof_state, white_force_covariance
from tmd.dampers.tuned_mass import TunedMassDamper
from tmd.design import LoadedMode, evaluate_tmd, least_mass
from tmd.endstops import (
    connection_force_estimate_n,
    contacts_per_hour,
    end_stop_block,
    mean_impact_velocity_m_s,
    rare_impact_velocity_m_s,
    stroke_limit_messages,
    stroke_statistics,
)
from tmd.peak import davenport_peak_factor
from tmd.spectra import TabulatedSpectrum, WhiteSpectrum
from tmd.structure import Mode

MODE = Mode(0.2, 1.0e7, 0.01)
DAMPER = TunedMassDamper(0.02, 0.975, 0.07)


def test_stroke_and_stroke_velocity_match_lyapunov():
    level = 1e8  # one-sided white force PSD [N^2/Hz]
    load = LoadedMode(MODE, WhiteSpectrum(level), 600.0)
    s = stroke_statistics(load, DAMPER)
    a, b = two_dof_state(0.2, 1.0e7, 0.01, 0.02, 0.975, 0.07)
    p = white_force_covariance(a, b, level)
    # State (x, r, x', r'): independent Lyapunov covariance (conventions.md).
    assert s.sigma_stroke_m == pytest.approx(math.sqrt(p[1, 1]), rel=1e-6)
    assert s.sigma_stroke_velocity_m_s == pytest.approx(math.sqrt(p[3, 3]), rel=1e-6)
    assert s.upcrossing_hz == pytest.approx(math.sqrt(p[3, 3] / p[1, 1]) / (2 * math.pi),
                                            rel=1e-6)
    # The connection-force estimate drops the spring-dashpot cross term: E[r r'] = 0 for a
    # stationary process (Lyapunov: |P13| ~ 0), so g sqrt(k^2 P11 + c^2 P33) is g times the
    # rms of k r + c r'.
    k, c = DAMPER.stiffness_n_per_m(MODE), DAMPER.damping_n_s_per_m(MODE)
    assert abs(p[1, 3]) < 1e-9 * math.sqrt(p[1, 1] * p[3, 3])
    rms_force = math.sqrt(k * k * p[1, 1] + c * c * p[3, 3] + 2 * k * c * p[1, 3])
    g = float(davenport_peak_factor(s.upcrossing_hz, 600.0))
    assert connection_force_estimate_n(g, k, c, s.sigma_stroke_m, s.sigma_stroke_velocity_m_s
                                       ) == pytest.approx(g * rms_force, rel=1e-6)


@pytest.fixture(scope="module")
def narrow_band_record():
    # Displacement and velocity of an oscillator under a zero-order-hold white force,
    # exact discretisation (scipy.signal.cont2discrete), 40 h at 10 Hz, seeded.
    f, zeta, dt = 0.5, 0.03, 0.1
    w = 2 * np.pi * f
    a = np.array([[0.0, 1.0], [-w * w, -2 * zeta * w]])
    sys_d = signal.cont2discrete((a, np.array([[0.0], [1.0]]), np.eye(2), np.zeros((2, 1))),
                                 dt, method="zoh")
    num, den = signal.ss2tf(*sys_d[:4])
    force = np.random.default_rng(11).standard_normal(int(40 * 3600 / dt) + 2000)
    x = signal.lfilter(num[0], den, force)[2000:]
    v = signal.lfilter(num[1], den, force)[2000:]
    return x, v, dt


def test_rice_contact_rate_and_rayleigh_velocity_on_a_simulated_record(narrow_band_record):
    x, v, dt = narrow_band_record
    sx, sv = x.std(), v.std()
    nu0 = sv / (2 * np.pi * sx)
    level = 2.0 * sx
    up = np.nonzero((x[:-1] < level) & (x[1:] >= level))[0]
    hours = x.size * dt / 3600
    # Rice (1944): crossings per hour 3600 nu0 exp(-a^2 / 2 sigma^2). About 7000 here;
    # clustering of a 3%-damped response widens the count's scatter: 6% allowed.
    assert up.size / hours == pytest.approx(float(contacts_per_hour(level, sx, nu0)), rel=0.06)
    # Rice: the velocity at up-crossings is Rayleigh with scale sigma_v (mean sigma_v
    # sqrt(pi/2)); the sample mean's standard error is ~0.5% here: 3% allowed.
    w = (level - x[up]) / (x[up + 1] - x[up])
    speed = v[up] + w * (v[up + 1] - v[up])
    assert speed.mean() == pytest.approx(float(mean_impact_velocity_m_s(sv)), rel=0.03)
    # Rayleigh quantile: share of crossings faster than sigma_v sqrt(-2 ln 0.05) is 5%.
    fast = np.mean(speed > float(rare_impact_velocity_m_s(sv, 0.05)))
    assert fast == pytest.approx(0.05, abs=0.01)


def _load(level, duration_s=600.0):
    f = np.geomspace(1e-3, 5.0, 60)
    return LoadedMode(MODE, TabulatedSpectrum(f, level / (1 + (f / 0.3) ** 2)), duration_s)


def test_block_travel_contacts_and_warning():
    loads = [(1.0, _load(1e8)), (50.0, _load(6e8))]
    d1 = evaluate_tmd(loads[0][1], DAMPER)
    d50 = evaluate_tmd(loads[1][1], DAMPER)
    limit = 0.5 * (d1.peak_stroke_m + d50.peak_stroke_m)  # met at 1 year, not at 50
    block = end_stop_block(loads, DAMPER, limit)
    assert block["travel_m"] == limit and block["extreme_return_period_years"] == 50.0
    rows = block["by_return_period"]
    # The engine's peak stroke (g sigma, Davenport) is the block's peak stroke.
    assert rows[1]["peak_stroke_m"] == pytest.approx(d50.peak_stroke_m, rel=1e-9)
    # At the level of the mean maximum a0 = g sigma, Rice gives nu0 exp(-g^2/2) per second;
    # beyond it contacts are rarer at 1 year than at 50.
    assert rows[0]["contact_rate_per_side_hz"] < rows[1]["contact_rate_per_side_hz"]
    s50 = stroke_statistics(loads[1][1], DAMPER)
    assert block["impact_velocity_mean_m_s"] == pytest.approx(
        s50.sigma_stroke_velocity_m_s * math.sqrt(math.pi / 2), rel=1e-12)
    by_period = [{"return_period_years": p, "design": {
        "peak_stroke_m": d.peak_stroke_m, "stroke_within_limit": d.peak_stroke_m <= limit}}
        for p, d in ((1.0, d1), (50.0, d50))]
    messages = stroke_limit_messages(by_period, block, limit, (1.0,))
    assert len(messages) == 1 and "50-year" in messages[0]
    assert "stroke_return_period_years = 50" in messages[0]
    # Without a limit the travel is the longest return period's peak stroke.
    free = end_stop_block(loads, DAMPER, None)
    assert free["travel_m"] == pytest.approx(d50.peak_stroke_m, rel=1e-9)


def test_stroke_limit_at_a_second_load_constrains_the_sizing():
    design_load, extreme = _load(1e8), _load(6e8)
    free = least_mass(design_load, 0.8 * evaluate_tmd(design_load, TunedMassDamper(
        1e-6, 1.0, 0.1)).peak_acceleration_m_s2, max_mass_ratio=0.05)
    target = free.design.peak_acceleration_m_s2
    stroke_free = evaluate_tmd(extreme, free.design.damper).peak_stroke_m
    limit = 0.8 * stroke_free
    held = least_mass(design_load, target, max_mass_ratio=0.05, max_stroke_m=limit,
                      stroke_loads=(extreme,))
    assert held.meets_target
    extreme_stroke = evaluate_tmd(extreme, held.design.damper).peak_stroke_m
    # The limit holds at the second load (SLSQP feasibility 1e-6, design.tune) ...
    assert extreme_stroke <= limit * (1 + 1e-6)
    # ... and it costs mass: the free least-mass design breaks it by 25%.
    assert held.design.mass_ratio > free.design.mass_ratio


WIND_CASE = """name = "stroke period test"
[mode]
frequency_hz = 0.2
modal_mass_kg = 1.5e7
damping_ratio = 0.015
[building]
height_m = 150.0
breadth_m = 30.0
depth_m = 30.0
drag_coefficient = 1.3
[wind]
terrain = "III"
basic_speed_m_s = 28.0
n_strips = 10
return_periods_years = [1.0, 50.0]
[target]
peak_acceleration_m_s2 = 0.05
return_period_years = 1.0
[damper]
max_stroke_m = 1.0
"""


@pytest.mark.parametrize("extra, message", [
    ("stroke_return_period_years = 10.0\n", "not a reported return period"),
    ("stroke_return_period_years = 50.0\n", None),
])
def test_stroke_return_period_key_is_validated(tmp_path, extra, message):
    from tmd.case import CaseError, read_case
    from tmd.jobs import stroke_cases_of

    path = tmp_path / "case.toml"
    path.write_text(WIND_CASE + extra, encoding="utf-8")
    if message is None:
        case = read_case(path)
        assert case.damper.stroke_return_period_years == 50.0
        assert len(stroke_cases_of(case)) == 1
        return
    with pytest.raises(CaseError, match=message):
        read_case(path)
    path.write_text(WIND_CASE.replace("max_stroke_m = 1.0\n", "") + extra, encoding="utf-8")
    with pytest.raises(CaseError, match="max_stroke_m"):
        read_case(path)


def _band_strokes(load, damper, factors):
    from tmd.robust.sweeps import assess_structure_factors

    a, _ = assess_structure_factors(load, damper, factors)
    return np.asarray(a.peak_stroke_m)[..., 0]


@pytest.mark.filterwarnings("ignore:.*top decade")  # the test load is cut at 5 Hz
def test_band_robust_design_holds_the_stroke_limit_at_the_stroke_load():
    from tmd.robust import robust_least_mass
    from tmd.robust.sweeps import factor_grid

    design_load, extreme = _load(1e8), _load(6e8)
    target = 0.7 * evaluate_tmd(design_load, TunedMassDamper(1e-6, 1.0, 0.1)
                                ).peak_acceleration_m_s2
    kw = dict(max_mass_ratio=0.05, optimiser_points=9, check_points=41)
    free = robust_least_mass(design_load, target, 0.1, **kw)
    grid = factor_grid(0.1, 9)
    limit = 0.8 * float(np.max(_band_strokes(extreme, free.design.damper, grid)))
    held = robust_least_mass(design_load, target, 0.1, max_stroke_m=limit,
                             stroke_loads=(extreme,), **kw)
    assert free.meets_target and held.meets_target
    # The design load's own strokes are far below the limit (the load is 6x weaker, so
    # sigma about sqrt(6)x smaller): only the second load can bind.
    assert np.max(_band_strokes(design_load, free.design.damper, grid)) < 0.6 * limit
    # The limit holds under the second load at every s of the optimiser's grid (SLSQP
    # feasibility 1e-6, tmd.robust.minimax), and costs mass.
    assert np.max(_band_strokes(extreme, held.design.damper, grid)) <= limit * (1 + 1e-6)
    assert held.design.mass_ratio > free.design.mass_ratio


@pytest.mark.filterwarnings("ignore:.*top decade")  # the test load is cut at 5 Hz
def test_bank_holds_the_stroke_limit_at_the_stroke_load():
    from tmd.sizing.bank import BankSettings, size_tmd_bank

    design_load, extreme = _load(1e8), _load(6e8)
    target = 0.7 * evaluate_tmd(design_load, TunedMassDamper(1e-6, 1.0, 0.1)
                                ).peak_acceleration_m_s2
    settings = BankSettings(frequency_ratios=(0.96, 1.0), damping_ratios=(0.08,))

    def strokes(bank, load):
        return np.asarray(load.assess(bank.absorbers).peak_stroke_m).ravel()

    free = size_tmd_bank(design_load, target, max_mass_ratio=0.05, settings=settings)
    limit = 0.8 * float(np.max(strokes(free, extreme)))
    held = size_tmd_bank(design_load, target, max_mass_ratio=0.05, max_stroke_m=limit,
                         settings=settings, stroke_loads=(extreme,))
    assert free.meets_target and held.meets_target
    assert np.max(strokes(free, design_load)) < 0.6 * limit
    # Every member's peak stroke under the second load within the limit (the engine's
    # re-check, tolerance 1e-9 in tmd.sizing.bank), at more mass than the free bank.
    assert np.max(strokes(held, extreme)) <= limit * (1 + 1e-9)
    assert held.mass_ratio > free.mass_ratio


class _Reached(Exception):
    """Raised by a stand-in once it has seen its arguments (the test needs no more)."""


@pytest.mark.parametrize("job, target", [
    ("design_job", "tmd.jobs.robustness.robustness_study"),
    ("compare_job", "tmd.compare.size_tmd_bank"),
])
def test_stroke_return_period_reaches_the_band_design_and_the_bank(tmp_path, monkeypatch, job,
                                                                   target):
    # The jobs hand the wind of [damper] stroke_return_period_years to the band-robust
    # design and to the bank (their constraint itself is tested above): the 50-year load.
    import tmd.jobs
    from tmd.case import read_case

    path = tmp_path / "case.toml"
    path.write_text(WIND_CASE + "stroke_return_period_years = 50.0\n[robustness]\n"
                    "[options]\nenabled = [\"tmd-bank\"]\n", encoding="utf-8")
    case = read_case(path)
    seen = {}

    def stand_in(*args, **kwargs):
        seen.update(kwargs)
        raise _Reached

    module, name = target.rsplit(".", 1)
    monkeypatch.setattr(module + "." + name, stand_in)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        with pytest.raises(_Reached):
            getattr(tmd.jobs, job)(case)
    (load,) = seen["stroke_loads"]
    fifty = next(w for w in case.wind_loads if w.return_period_years == 50.0)
    assert load.spectrum is fifty.spectrum
    assert load.mode.damping_ratio == case.mode.damping_ratio + fifty.aerodynamic_damping_ratio
