"""The Python interface (tmd.api): the README's example runs, and results are results.json."""

import contextlib
import io
import json
import re
from pathlib import Path

import numpy as np
import pytest

import tmd
from tests.consistency import assert_consistent_results
from tmd.case import CaseError

ROOT = Path(__file__).resolve().parents[1]
README = ROOT / "README.md"
PNG = b"\x89PNG\r\n\x1a\n"  # the PNG signature (ISO/IEC 15948)


@pytest.fixture(scope="module")
def readme_example():
    """The README's Python example, run from the repository's root as it says."""
    code = re.search(r"## Python\n.*?```python\n(.*?)```", README.read_text(encoding="utf-8"),
                     re.S).group(1)
    out, namespace = io.StringIO(), {}
    with pytest.MonkeyPatch.context() as mp, contextlib.redirect_stdout(out):
        mp.chdir(ROOT)
        exec(compile(code, str(README), "exec"), namespace)  # noqa: S102 - our own README
    return out.getvalue().splitlines(), namespace


def test_readme_example_runs_a_parametric_study(readme_example):
    lines, namespace = readme_example
    masses = [float(m) for m in re.findall(r"^damping [0-9.]+: ([0-9.]+) t$", "\n".join(lines),
                                           re.M)]
    assert len(masses) == 2
    # More structural damping needs less added damping, hence a lighter TMD for
    # the same target (common practice).
    assert masses[1] < masses[0]
    result = namespace["result"]
    assert masses[1] == pytest.approx(result["design"]["mass_kg"] / 1000, abs=0.05)
    # The printed repr is one short line holding the results' own verdict.
    assert lines[2] == repr(result) and len(lines[2]) < 200 and "\n" not in lines[2]
    assert lines[2].endswith(": meets>") == result["design"]["meets_target"]
    figures = namespace["figures"]
    assert {"force_spectrum", "frequency_response", "acceleration_psd", "mass_ratio",
            "comfort"} <= set(figures)
    assert all(png.startswith(PNG) for png in figures.values())
    assert lines[3] == repr(namespace["sweep"]) and lines[3].startswith("<sweep 'white'")


def test_to_dict_is_results_json_and_write_writes_it(readme_example, tmp_path):
    _, namespace = readme_example
    for result in (namespace["result"], namespace["sweep"]):
        data = result.to_dict()
        assert_consistent_results(data)
        assert data == json.loads(json.dumps(data))  # plain, strict JSON data
        assert data["schema_version"] == result["schema_version"]
    written = namespace["sweep"].write(tmp_path / "sweep")
    assert [p.name for p in written] == ["results.json"]
    stored = json.loads((tmp_path / "sweep" / "results.json").read_text(encoding="utf-8"))
    assert stored == namespace["sweep"].to_dict()


def test_a_case_from_a_dict_is_the_case_from_its_file():
    import tomllib

    path = ROOT / "cases" / "harbourline_residences.toml"
    from_file = tmd.read_case(path)
    from_dict = tmd.case_from_dict(tomllib.loads(path.read_text(encoding="utf-8")),
                                   folder=path.parent)
    assert from_dict.mode == from_file.mode and from_dict.damper == from_file.damper
    assert from_dict.tables == from_file.tables
    np.testing.assert_array_equal(from_dict.spectrum.psd_n2_per_hz,
                                  from_file.spectrum.psd_n2_per_hz)
    # repr is one line, not the whole spectrum table
    assert len(repr(from_file)) < 200 and repr(from_file).startswith("Case('Harbourline")


def test_bad_input_from_python_is_named_as_from_a_file():
    with pytest.raises(CaseError, match=r"<keywords>.*\[mode\] damping_ratio"):
        tmd.case_of(tmd.Mode(0.2, 2.0e7, 0.0), tmd.WhiteSpectrum(2e6), 0.15)
    with pytest.raises(CaseError, match=r"<dict>: target: required key is missing"):
        tmd.case_from_dict({"name": "x", "mode": {"frequency_hz": 0.2, "modal_mass_kg": 2e7,
                                                  "damping_ratio": 0.01},
                            "load": {"force_psd_csv": "harbourline_force.csv"}},
                           folder=ROOT / "cases")


def test_the_public_names_resolve():
    for name in tmd.__all__:
        assert getattr(tmd, name) is not None, name
    with pytest.raises(AttributeError):
        tmd.no_such_name  # noqa: B018 - the attribute access is the test


def test_a_comparison_result_says_how_many_options_meet_the_target(demo_compare):
    _, results = demo_compare  # the session's compare job on the force-spectrum demo
    result = tmd.Result("compare", results)
    met = sum(bool(row["meets_target"]) for row in results["options"])
    assert repr(result) == (f"<compare {results['case']['name']!r}: {len(results['options'])} "
                            f"options, {met} meet the target "
                            f"{results['target']['peak_acceleration_m_s2']:g} m/s²>")
    assert result.to_dict()["options"] == json.loads(json.dumps(results["options"]))
