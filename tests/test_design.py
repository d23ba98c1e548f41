"""TMD tuning and least-mass sizing against published optima and their own definitions."""

from pathlib import Path

import numpy as np
import pytest

from tmd.dampers.tuned_mass import TunedMassDamper, den_hartog_tuning, warburton_white_force_tuning
from tmd.design import LoadedMode, bare_response, evaluate_tmd, least_mass, tune
from tmd.performance import bare_sigma_acceleration, effective_damping_ratio
from tmd.spectra import TabulatedSpectrum, WhiteSpectrum
from tmd.structure import Mode


def along_wind_like_spectrum():
    """A smooth force spectrum with the f^-5/3 fall-off of turbulence and an
    admittance-like roll-off (shape only; levels chosen for a tall building)."""
    f = np.geomspace(1e-3, 10.0, 300)
    fl = f * 150.0 / 30.0
    s = 6.8 * fl / (1 + 10.2 * fl) ** (5 / 3) / f / (1 + (f / 0.3) ** (4 / 3)) ** 2
    return TabulatedSpectrum(f, 4e11 * s)


@pytest.fixture(scope="module")
def wind_case():
    return LoadedMode(Mode(0.18, 2.0e7, 0.012), along_wind_like_spectrum(), 600.0)


@pytest.mark.parametrize("mu", [0.01, 0.03, 0.05])
def test_white_force_displacement_optimum_matches_warburton(mu):
    # Warburton (1982), Table 1, undamped primary under white force on the
    # primary, minimum displacement variance:
    #   f = sqrt(1 + mu/2)/(1 + mu), zeta^2 = mu (1 + 3 mu/4) / (4 (1 + mu)(1 + mu/2)).
    # The optimiser starts away from the answer (10% off in f, a factor 2 off
    # in zeta, on either side), so an idle optimiser fails. It reaches the
    # closed form to 1.4e-7 relative at worst (measured over these starts; the
    # rms is flat to second order at the optimum): tolerance 1e-6.
    case = LoadedMode(Mode(1.0, 1.0, 0.0), WhiteSpectrum(1.0))
    f_ref = np.sqrt(1 + mu / 2) / (1 + mu)
    z_ref = np.sqrt(mu * (1 + 0.75 * mu) / (4 * (1 + mu) * (1 + mu / 2)))
    for start in ((0.9 * f_ref, 2.0 * z_ref), (1.1 * f_ref, 0.5 * z_ref)):
        t = tune(case, mu, objective="displacement", statistic="rms", start=start)
        assert t.frequency_ratio == pytest.approx(f_ref, rel=1e-6)
        assert t.damping_ratio == pytest.approx(z_ref, rel=1e-6)
    assert warburton_white_force_tuning(mu) == pytest.approx((f_ref, z_ref), rel=1e-15)


def test_den_hartog_closed_form():
    # Den Hartog (1956): f = 1/(1+mu), zeta = sqrt(3 mu / (8 (1+mu)^3)); at
    # mu = 0.02: 0.980392, sqrt(0.06 / 8.48966) = 0.084068 (hand computation).
    assert den_hartog_tuning(0.02) == pytest.approx((0.980392, 0.084068), abs=1e-6)


def test_tuning_improves_on_warburton_start_under_wind(wind_case):
    # The optimum under the actual spectrum is at least as good as the
    # closed-form start it refines (a property of the minimiser, checked here).
    mu = 0.02
    t = tune(wind_case, mu)
    start = TunedMassDamper(mu, *warburton_white_force_tuning(mu))
    assert t.value <= evaluate_tmd(wind_case, start).peak_acceleration_m_s2 * (1 + 1e-9)
    # and it is a local minimum: nudging either parameter makes it worse.
    for df, dz in [(0.01, 0), (-0.01, 0), (0, 0.01), (0, -0.01)]:
        nudged = TunedMassDamper(mu, t.frequency_ratio + df, t.damping_ratio + dz)
        assert evaluate_tmd(wind_case, nudged).peak_acceleration_m_s2 > t.value


def test_least_mass_meets_target_and_less_mass_fails(wind_case):
    bare = bare_response(wind_case).peak_acceleration_m_s2
    target = 0.6 * bare
    s = least_mass(wind_case, target, max_mass_ratio=0.08)
    assert s.meets_target and s.governed_by == "target"
    d = s.design
    # Issue acceptance: |peak/target - 1| < 1e-4 and 0.99 mu cannot meet the target.
    assert abs(d.peak_acceleration_m_s2 / target - 1) < 1e-4
    assert tune(wind_case, 0.99 * d.mass_ratio).value > target


def test_stroke_limit_is_a_constraint_of_the_tuning(wind_case):
    free = least_mass(wind_case, 0.6 * bare_response(wind_case).peak_acceleration_m_s2,
                      max_mass_ratio=0.08)
    limit = 0.8 * free.design.peak_stroke_m
    target = free.design.peak_acceleration_m_s2
    s = least_mass(wind_case, target, max_mass_ratio=0.08, max_stroke_m=limit)
    assert s.meets_target
    assert s.design.peak_stroke_m <= limit * (1 + 1e-6)
    # Holding the stroke down costs mass (common practice: more damping, more mass).
    assert s.design.mass_ratio > free.design.mass_ratio
    assert abs(s.design.peak_acceleration_m_s2 / target - 1) < 1e-4


def test_unreachable_target_is_reported_with_its_limit(wind_case):
    s = least_mass(wind_case, 1e-4, max_mass_ratio=0.02)
    assert not s.meets_target and s.governed_by == "mass"
    assert "cannot be met" in s.message and "0.02" in s.message
    assert s.design.peak_acceleration_m_s2 > 1e-4
    s = least_mass(wind_case, 1e-4, max_mass_ratio=0.02, max_stroke_m=0.01)
    assert not s.meets_target and s.governed_by == "stroke"
    assert "stroke" in s.message


def test_bare_building_meeting_target_needs_no_damper(wind_case):
    s = least_mass(wind_case, 10.0, max_mass_ratio=0.05)
    assert s.meets_target and s.design is None and s.governed_by == "bare"


def test_effective_damping_reproduces_the_damped_rms(wind_case):
    # By definition (root of sigma_bare(zeta) = sigma_damped): the bare mode
    # with zeta_eff has the damped structure's rms acceleration.
    d = evaluate_tmd(wind_case, TunedMassDamper(0.02, 0.985, 0.07))
    m = wind_case.mode
    sigma = bare_sigma_acceleration(m.frequency_hz, m.modal_mass_kg, d.effective_damping_ratio,
                                    wind_case.spectrum)
    assert sigma == pytest.approx(d.sigma_acceleration_m_s2, rel=1e-9)
    assert d.added_damping_ratio == pytest.approx(d.effective_damping_ratio - m.damping_ratio)
    assert d.added_damping_ratio > 0


def test_effective_damping_of_bare_structure_is_its_own():
    # Identity: the bare structure's effective damping is its damping ratio.
    spec = along_wind_like_spectrum()
    zeta = np.array([0.002, 0.01, 0.04])
    sigma = bare_sigma_acceleration(0.18, 2e7, zeta, spec)
    np.testing.assert_allclose(effective_damping_ratio(0.18, 2e7, sigma, spec), zeta, rtol=1e-8)


def test_design_numbers_are_consistent_with_their_definitions(wind_case):
    d = evaluate_tmd(wind_case, TunedMassDamper(0.02, 0.98, 0.08), 0.1)
    m = wind_case.mode
    wd = 2 * np.pi * d.frequency_hz
    assert d.mass_kg == pytest.approx(0.02 * m.modal_mass_kg)
    assert d.frequency_hz == pytest.approx(0.98 * m.frequency_hz)
    assert d.stiffness_n_per_m == pytest.approx(d.mass_kg * wd**2)
    assert d.damping_n_s_per_m == pytest.approx(2 * 0.08 * d.mass_kg * wd)
    assert d.peak_acceleration_m_s2 == pytest.approx(d.peak_factor * d.sigma_acceleration_m_s2)


# --- issue 13: verdicts at the answer and search brackets -----------------------

@pytest.fixture(scope="module")
def harbourline():
    from tmd.case import read_case
    from tmd.jobs import loaded_mode_of

    demo = Path(__file__).resolve().parent.parent / "cases" / "harbourline_residences.toml"
    return loaded_mode_of(read_case(demo))


def test_least_mass_verdicts_agree_at_the_answer(harbourline):
    # Issue 13, defect 3: target 0.09 gave sizing "meets" and a design peak
    # 0.09000000000000002 with meets_target false. A limit is met when the
    # value does not exceed it (common practice); every verdict is that one
    # comparison on the reported peak.
    s = least_mass(harbourline, 0.09, max_mass_ratio=0.05, max_stroke_m=1.0)
    assert s.governed_by == "target"
    assert s.design.peak_acceleration_m_s2 <= 0.09
    assert s.meets_target is s.design.meets_target is True


ROOT = 0.0123456789
FALLING = {  # value(mu) / target, falling through 1 at mu = ROOT
    "reciprocal": lambda m: ROOT / m,
    "linear": lambda m: 1 + 50 * (ROOT - m),
    "exponential": lambda m: np.exp(5 * (ROOT - m) / ROOT),
}


@pytest.mark.parametrize("form", FALLING)
def test_search_returns_the_bracket_end_that_meets(form):
    from tmd.design import smallest_meeting_mass_ratio

    # Brent's root may land either side of the target (measured: the
    # "linear" form lands above it for 1 of these 30 targets). The answer
    # must meet (value <= target), at 30 targets as in the scan.
    for target in np.linspace(0.05, 0.2, 30):
        def value(m, t=target):
            return t * FALLING[form](m)

        mu = smallest_meeting_mass_ratio(value, target, 1e-4, 0.05)
        assert value(mu) <= target
        assert mu == pytest.approx(ROOT, rel=1e-9)  # the least mass, to Brent's rtol


def test_search_start_that_meets_is_the_answer_and_no_bracket_is_an_error():
    from tmd.design import smallest_meeting_mass_ratio
    from tmd.errors import BracketError, NumericalFailure

    # Issue 13, defect 4: a start that already meets the target is an answer.
    assert smallest_meeting_mass_ratio(lambda m: 0.1 * 1e-5 / m, 0.1, 1e-4, 0.05) == 1e-4
    with pytest.raises(BracketError, match=r"best value at 0.05 is 0.2.*above the target 0.1"):
        smallest_meeting_mass_ratio(lambda m: 0.2, 0.1, 1e-4, 0.05)
    assert issubclass(BracketError, NumericalFailure)


@pytest.mark.parametrize(("target", "stroke"), [(0.2125, 1.0), (0.21, None)])
def test_valid_case_with_a_light_damper_is_sized(harbourline, target, stroke):
    # Issue 13, defect 4: Harbourline, bare peak 0.212505 m/s^2; at these
    # targets the smallest mass ratio searched (1e-4) already meets the
    # target, which gave "f(a) and f(b) must have different signs".
    s = least_mass(harbourline, target, max_mass_ratio=0.05, max_stroke_m=stroke)
    assert s.governed_by == "minimum" and s.design.mass_ratio == 1e-4
    assert s.meets_target is s.design.meets_target is True
    assert s.design.peak_acceleration_m_s2 <= target
