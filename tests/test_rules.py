"""Library objects judge their arguments by the case file's rules, with the same messages.

Sources: the rules are the README's case-file keys and "Plausibility ranges"
(issue 13 item 18 asks that the library use them too). Physical facts behind
them (common practice): a duration, a mass ratio and a mode-shape value are
positive; a damping ratio of a damper below 1 (critical damping); a band of
+/-b around the nominal frequency needs b < 1, or the low end is a negative
frequency (the case file allows b < 0.5).
"""

import shutil
from pathlib import Path

import pytest

from tmd.case import CaseError, read_case
from tmd.compare import compare_options
from tmd.dampers.tuned_mass import TunedMassDamper
from tmd.design import LoadedMode, least_mass, tune
from tmd.errors import InputError
from tmd.loads import Building
from tmd.robust import design_sweeps
from tmd.robust.probabilistic import Uncertainty
from tmd.rules import PLAUSIBLE, Ratio, require
from tmd.spectra import WhiteSpectrum
from tmd.structure import Mode

CASES = Path(__file__).resolve().parents[1] / "cases"
MODE = Mode(0.2, 1e7, 0.01)
WHITE = WhiteSpectrum(1e9, 0.01, 2.0)
LOADED = LoadedMode(MODE, WHITE)


def _case_message(tmp_path, old, new):
    shutil.copy(CASES / "harbourline_force.csv", tmp_path)
    text = (CASES / "harbourline_residences.toml").read_text()
    assert old in text
    (tmp_path / "c.toml").write_text(text.replace(old, new))
    with pytest.raises(CaseError) as err:
        read_case(tmp_path / "c.toml")
    return str(err.value).split(": ", 1)[1]  # without the file name


@pytest.mark.parametrize("make, needle", [
    (lambda: LoadedMode(MODE, WHITE, duration_s=-1), "duration_s = -1: must be >= 1"),
    (lambda: LoadedMode(MODE, WHITE, shape_factor=-1), "shape_factor = -1: must be > 0"),
    (lambda: LoadedMode(MODE, WHITE, shape_factor=0), "shape_factor = 0: must be > 0"),
    (lambda: LoadedMode(MODE, "white"), "spectrum = 'white': must be a force spectrum"),
    (lambda: tune(LOADED, -0.01), "mass_ratio = -0.01: must be > 0"),
    (lambda: tune(LOADED, 0.02, objective="speed"), "objective = 'speed': must be one of"),
    (lambda: least_mass(LOADED, -0.1, max_mass_ratio=0.05),
     "peak_acceleration_m_s2 = -0.1: must be > 0"),
    (lambda: least_mass(LOADED, 0.1, max_mass_ratio=1.5), "max_mass_ratio = 1.5: must be < 1"),
    (lambda: design_sweeps(LOADED, TunedMassDamper(0.02, 0.98, 0.08), frequency_band=1.2),
     "frequency_band = 1.2: must be < 0.5"),
    (lambda: compare_options(LOADED, 0.1, enabled="tmd"), "enabled = 'tmd': must be a list"),
    (lambda: compare_options(LOADED, 0.1, enabled=["tmd", "tmd"]), "'tmd' is given twice"),
    (lambda: TunedMassDamper(0.02, 0.98, 1.5), "damping_ratio = 1.5: must be < 1"),
    (lambda: TunedMassDamper(float("nan"), 0.98, 0.1), "mass_ratio = nan: must be a finite"),
    (lambda: TunedMassDamper("0.02", 0.98, 0.1), "mass_ratio = '0.02': must be a number"),
])
def test_bad_library_arguments_are_refused_by_name_and_rule(make, needle):
    with pytest.raises(InputError) as err:
        make()
    assert needle in str(err.value)


def test_library_and_case_file_messages_agree(tmp_path):
    # The same rule for the same value gives the same words in both.
    case = _case_message(tmp_path, "max_mass_ratio = 0.05", "max_mass_ratio = 1.5")
    with pytest.raises(InputError) as err:
        least_mass(LOADED, 0.1, max_mass_ratio=1.5)
    assert case.endswith(str(err.value).split(" = 1.5", 1)[1])
    assert case == "[damper] max_mass_ratio = 1.5: must be < 1"


def test_require_accepts_numpy_scalars_and_returns_floats():
    import numpy as np

    assert require("x", np.float32(0.5), Ratio) == 0.5
    assert require("x", np.float64(0.25), Ratio) == 0.25
    with pytest.raises(InputError, match="x = True: must be a number"):
        require("x", True, Ratio)


def test_plausibility_ranges_are_the_documented_ones():
    # README "Plausibility ranges" (issue 13, Precisions).
    expected = {"speed": (10, 80), "orography": (0.5, 2), "return_period": (0.5, 10_000),
                "frequency": (0.01, 10), "damping": (1e-4, 0.3)}
    assert {k: (r.low, r.high) for k, r in PLAUSIBLE.items()} == expected
    readme = (CASES.parent / "README.md").read_text()
    for row in ("10 to 80 m/s", "0.5 to 2", "0.5 to 10,000 years", "0.01 to 10 Hz", "1e-4 to 0.3"):
        assert row in readme


@pytest.mark.parametrize("old, new, make", [
    ("frequency_cov = 0.07", "frequency_cov = 0.0", lambda: Uncertainty(0.0)),
    ("seed = 1\n", "seed = -1\n", lambda: Uncertainty(0.07, seed=-1)),
    ("damping_cov = 0.3", "damping_cov = 1.5", lambda: Uncertainty(0.07, 1.5)),
    ("height_m = 190.0", "height_m = -190.0", lambda: Building(-190.0, 32.0, 32.0, 1.3)),
])
def test_one_rule_for_the_case_table_and_the_library_object(tmp_path, old, new, make):
    # Issue 15: [robustness.probabilistic] and Uncertainty, [building] and Building
    # validate a field by the same rule of tmd.rules, so the words are the same.
    text = (CASES / "kestrel_point.toml").read_text()
    assert old in text
    (tmp_path / "c.toml").write_text(text.replace(old, new))
    with pytest.raises(CaseError) as case:
        read_case(tmp_path / "c.toml")
    with pytest.raises(InputError) as library:
        make()
    assert str(case.value).endswith(str(library.value)), (str(case.value), str(library.value))
