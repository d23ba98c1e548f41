"""Case files: bad input gets one clear line naming file, field, value and rule."""

import shutil
from pathlib import Path

import pytest

from tmd.case import CaseError, read_case

CASES = Path(__file__).resolve().parents[1] / "cases"
GOOD = """name = "test tower"
[mode]
frequency_hz = 0.18
modal_mass_kg = 2.1e7
damping_ratio = 0.012
[load]
force_psd_csv = "force.csv"
[target]
peak_acceleration_m_s2 = 0.15
duration_s = 600
[damper]
objective = "acceleration"
max_mass_ratio = 0.05
max_stroke_m = 1.2
"""


def _case(tmp_path, text):
    shutil.copy(CASES / "harbourline_force.csv", tmp_path / "force.csv")
    path = tmp_path / "case.toml"
    path.write_text(text, encoding="utf-8")
    return path


def test_good_case_loads(tmp_path):
    c = read_case(_case(tmp_path, GOOD))
    assert c.mode.frequency_hz == 0.18 and c.damper.max_stroke_m == 1.2
    assert c.damper.mass_ratio is None and c.target_peak_m_s2 == 0.15


@pytest.mark.parametrize("old, new, needles", [
    ("frequency_hz = 0.18", "frequency_hz = -0.18",
     ["[mode] frequency_hz = -0.18", "must lie in [0.01, 10] Hz"]),
    ("modal_mass_kg = 2.1e7", "modal_mass_kg = 0", ["[mode] modal_mass_kg = 0", "must be > 0"]),
    ("damping_ratio = 0.012", "damping_ratio = 1.5",
     ["[mode] damping_ratio = 1.5", "[0.0001, 0.3]"]),
    ("damping_ratio = 0.012", "damping_ratio = 0.0",
     ["[mode] damping_ratio = 0.0", "[0.0001, 0.3]"]),
    ("damping_ratio = 0.012", "damping_ratio = nan", ["[mode] damping_ratio = nan", "finite"]),
    ("damping_ratio = 0.012", "damping_ratoi = 0.012",
     ["[mode] damping_ratoi: unknown key", "did you mean 'damping_ratio'?"]),
    ("objective = \"acceleration\"", "objective = \"speed\"",
     ["[damper] objective = 'speed'", "'acceleration'", "'displacement'"]),
    ("max_stroke_m = 1.2", "max_stroke = 1.2",
     ["[damper] max_stroke: unknown key", "did you mean 'max_stroke_m'?"]),
    ("[target]\npeak_acceleration_m_s2 = 0.15", "[target]",
     ["[target] peak_acceleration_m_s2: required key is missing"]),
    ("force_psd_csv = \"force.csv\"", "force_psd_csv = \"missing.csv\"",
     ["[load] force_psd_csv = 'missing.csv'", "no such force spectrum"]),
])
def test_bad_values_are_named(tmp_path, old, new, needles):
    assert old in GOOD
    path = _case(tmp_path, GOOD.replace(old, new))
    with pytest.raises(CaseError) as err:
        read_case(path)
    message = str(err.value)
    assert str(path) in message
    for needle in needles:
        assert needle in message


def test_unknown_table_is_suggested(tmp_path):
    path = _case(tmp_path, GOOD.replace("[damper]", "[dampr]"))
    with pytest.raises(CaseError, match="dampr: unknown key; did you mean 'damper'"):
        read_case(path)


def test_fixed_mass_ratio_above_maximum_is_rejected(tmp_path):
    path = _case(tmp_path, GOOD.replace("max_mass_ratio = 0.05",
                                        "max_mass_ratio = 0.05\nmass_ratio = 0.08"))
    with pytest.raises(CaseError, match="mass_ratio = 0.08 exceeds max_mass_ratio"):
        read_case(path)


def test_not_toml_is_reported(tmp_path):
    path = _case(tmp_path, "name = \n")
    with pytest.raises(CaseError, match="not valid TOML"):
        read_case(path)


def test_bad_csv_row_is_named(tmp_path):
    path = _case(tmp_path, GOOD)
    (tmp_path / "force.csv").write_text("frequency_hz,psd_n2_per_hz\n0.1,1\n0.2,-1\n")
    with pytest.raises(CaseError, match=r"force\.csv: line 3: psd_n2_per_hz = -1\.0"):
        read_case(path)


def test_reading_a_wind_case_validates_and_leaves_the_spectra_to_the_job(monkeypatch):
    # Issue 15: case.py validates; the wind spectra are computed when a job first
    # asks for the case's loads (tmd.wind_loads), not while the file is read.
    import tmd.wind_loads

    calls = []
    real = tmd.wind_loads.compute_wind_loads

    def counted(*args, **kwargs):
        calls.append(args[3])
        return real(*args, **kwargs)

    monkeypatch.setattr(tmd.wind_loads, "compute_wind_loads", counted)
    case = read_case(CASES / "kestrel_point.toml")
    assert calls == [] and "3 return periods" in repr(case)
    loads = case.wind_loads
    assert calls == [(1.0, 10.0, 50.0)]
    assert [w.return_period_years for w in loads] == [1.0, 10.0, 50.0]
    assert case.spectrum is case.design_wind_load.spectrum and case.wind_loads is loads
    assert len(calls) == 1  # computed once per case


def test_a_wind_load_that_cannot_be_computed_is_bad_input_naming_the_case(monkeypatch):
    import tmd.wind_loads
    from tmd.errors import InputError

    def failing(*args, **kwargs):
        raise ValueError("the strip model cannot be evaluated")

    monkeypatch.setattr(tmd.wind_loads, "compute_wind_loads", failing)
    case = read_case(CASES / "kestrel_point.toml")
    with pytest.raises(InputError, match=r"kestrel_point\.toml: \[wind\]/\[building\]: the strip"):
        case.wind_loads  # noqa: B018 - the access computes the loads
