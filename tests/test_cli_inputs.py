"""The CLI's exit codes: 2 for input validation only, 1 for numerical failures, never a traceback.

The rule under test is the project's documented exit-code contract (README
"Exit codes"; BRIEF "Exit codes"): 0 the job ran, 1 numerical failure saying
what failed, 2 bad input naming file, field, value and what is allowed.
"""

import numpy as np
import pytest
from typer.testing import CliRunner

from tmd import cli
from tmd.cli import app
from tmd.design import DesignError
from tmd.outputs import MANIFEST

from .test_cli import CASES, DEMO

runner = CliRunner()


def _never(*args, **kwargs):
    raise AssertionError("the job ran although the output location is unusable")


def test_out_at_an_existing_file_exits_two_before_computing(tmp_path, monkeypatch):
    monkeypatch.setattr(cli, "design_job", _never)
    target = tmp_path / "results.json"
    target.write_text("keep me")
    result = runner.invoke(app, ["design", str(DEMO), "--out", str(target)])
    assert result.exit_code == 2, result.output
    assert "is an existing file, not a folder" in result.output
    assert "Traceback" not in result.output and target.read_text() == "keep me"


def test_out_holding_the_users_files_exits_two_before_computing(tmp_path, monkeypatch):
    monkeypatch.setattr(cli, "compare_job", _never)
    (tmp_path / "report.html").write_text("the user's own")
    result = runner.invoke(app, ["compare", str(DEMO), "--out", str(tmp_path)])
    assert result.exit_code == 2, result.output
    assert "did not write (report.html)" in result.output


def test_out_at_the_case_folder_is_refused(monkeypatch):
    monkeypatch.setattr(cli, "design_job", _never)
    result = runner.invoke(app, ["design", str(DEMO), "--out", str(CASES)])
    assert result.exit_code == 2, result.output
    assert "did not write" in result.output or "an input of this run" in result.output


@pytest.mark.parametrize("exc", [
    ValueError("f(a) and f(b) must have different signs"),
    np.linalg.LinAlgError("Singular matrix"),
    DesignError("SLSQP failed at mass ratio 0.01"),
    FloatingPointError("overflow"),
])
def test_numerical_failures_exit_one_saying_what_failed(tmp_path, monkeypatch, exc):
    def fail(case):
        raise exc

    monkeypatch.setattr(cli, "design_job", fail)
    result = runner.invoke(app, ["design", str(DEMO), "--out", str(tmp_path / "o")])
    assert result.exit_code == 1, result.output
    assert "numerical failure" in result.output and str(exc) in result.output
    assert type(exc).__name__ in result.output and "harbourline_residences.toml" in result.output
    assert "Traceback" not in result.output
    assert not (tmp_path / "o").exists()  # nothing written


@pytest.mark.parametrize("option, value, needle", [
    ("--mass-ratio", "20000", "--mass-ratio = 20000.0: must be < 1"),
    ("--mass-ratio", "inf", "--mass-ratio = inf: must be a finite number"),
    ("--mass-ratio", "-0.01", "--mass-ratio = -0.01: must be > 0"),
    ("--damping-ratio", "nan", "--damping-ratio = nan: must be a finite number"),
    ("--frequency-ratio", "0", "--frequency-ratio = 0.0: must be > 0"),
])
def test_cli_options_follow_the_case_file_rules(option, value, needle):
    args = {"--mass-ratio": "0.02", "--frequency-ratio": "0.98", "--damping-ratio": "0.08"}
    args[option] = value
    result = runner.invoke(app, ["evaluate", str(DEMO), *[x for kv in args.items() for x in kv]])
    assert result.exit_code == 2, result.output
    assert needle in result.output.replace("\n", " ")
    assert "Traceback" not in result.output


def test_design_from_a_file_is_judged_by_the_same_rules(tmp_path):
    path = tmp_path / "results.json"
    path.write_text('{"design": {"mass_ratio": "0.02", "frequency_ratio": 0.98, '
                    '"damping_ratio": 0.08}}')
    result = runner.invoke(app, ["sweep", str(DEMO), "--design-from", str(path)])
    assert result.exit_code == 2, result.output
    assert "design.mass_ratio = '0.02': must be a number" in result.output.replace("\n", " ")


def test_wind_on_a_spectrum_case_is_bad_input():
    result = runner.invoke(app, ["wind", str(DEMO)])
    assert result.exit_code == 2, result.output
    assert "needs a case with [wind] and [building]" in result.output


def test_a_written_folder_can_be_written_again(tmp_path, monkeypatch):
    """The tool's own earlier output is replaced (its manifest lists every file)."""
    out = tmp_path / "o"
    out.mkdir()
    (out / "results.json").write_text("{}")
    (out / MANIFEST).write_text('{"written_by": "tmd", "files": ["results.json"]}')

    def job(case):
        raise ValueError("stop after the checks")

    monkeypatch.setattr(cli, "design_job", job)
    result = runner.invoke(app, ["design", str(DEMO), "--out", str(out)])
    assert result.exit_code == 1 and "stop after the checks" in result.output
    assert (out / "results.json").read_text() == "{}"  # untouched by a failed run


def test_help_and_bad_input_do_not_load_the_numerical_stack():
    # Issue "Speed" item 5: --help and a bad-input exit must not pay for
    # numpy, the case schema, scipy, the jobs or the report (they cost most of
    # the start-up time; measured in bench/bench_jobs.py, never timed here). A
    # fresh interpreter runs --help and every case command on a missing case file.
    import subprocess
    import sys

    code = ("import sys\nfrom tmd.cli import app\n"
            "for args in (['--help'], ['design', 'no_such_case.toml'],\n"
            "             ['compare', 'no_such_case.toml'], ['wind', 'no_such_case.toml']):\n"
            "    try:\n        app(args)\n    except SystemExit:\n        pass\n"
            "print(sorted(m for m in ('numpy', 'tmd.case', 'scipy', 'tmd.jobs', 'tmd.design',"
            " 'matplotlib', 'cvxpy', 'tmd.building_case') if m in sys.modules))")
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                          check=True)
    assert done.stdout.strip().splitlines()[-1] == "[]"


def test_the_jobs_do_not_load_scipy_signal_until_identification_runs():
    # Issue "Speed": scipy.signal costs about 0.4 s of CPU to import
    # (measured on 2 shared cores; bench/bench_jobs.py times the commands)
    # and only tmd.identify's record analysis needs it, so importing the
    # jobs (every design, compare and wind run) must not pull it in.
    import subprocess
    import sys

    code = ("import sys\nfrom tmd.jobs import *  # noqa: F403 (every job's module)\n"
            "print('scipy.signal' in sys.modules)")
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                          check=True)
    assert done.stdout.strip() == "False"


def test_the_wind_job_does_not_load_the_sizing_stack():
    # Issue "Speed": tmd.jobs imports each job's module on first use, so that
    # `tmd wind` does not pay for the comparison, the sizing of every option
    # and the robustness study (about 0.1 s of CPU; bench/bench_jobs.py).
    import subprocess
    import sys

    code = ("import sys\nfrom tmd.jobs import wind_job\n"
            "print(sorted(m for m in ('tmd.compare', 'tmd.jobs.options', 'tmd.robust',"
            " 'tmd.identify') if m in sys.modules))")
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                          check=True)
    assert done.stdout.strip() == "[]"


def test_design_names_a_case_file_that_is_not_utf8(tmp_path, monkeypatch):
    # Issue 13, defect 16: design first asks whether the file is a whole-building
    # case; that probe read the file as UTF-8 itself and a Latin-1 case ended in
    # exit 1 "UnicodeDecodeError". Latin-1 encodes e-acute as the byte 0xE9
    # (ISO/IEC 8859-1; from memory), an invalid UTF-8 continuation here.
    monkeypatch.setattr(cli, "design_job", _never)
    case = tmp_path / "case.toml"
    case.write_bytes(DEMO.read_text(encoding="utf-8").replace("Harbourline", "Harbourlin\u00e9")
                     .encode("latin-1"))
    (tmp_path / "harbourline_force.csv").write_bytes((CASES / "harbourline_force.csv").read_bytes())
    result = runner.invoke(app, ["design", str(case), "--out", str(tmp_path / "out")])
    assert result.exit_code == 2, result.output
    assert "case.toml: the case file is not UTF-8 text (byte 0xe9" in result.output


def test_a_whole_building_case_with_a_byte_order_mark_is_recognised(tmp_path):
    # Issue 13, defect 16: a UTF-8 BOM (EF BB BF, The Unicode Standard ch. 23.8;
    # from memory) is accepted everywhere, so it must not hide [[modes]] either.
    from tmd.text_input import is_building_case

    text = (CASES / "building" / "corvid_spire.toml").read_text(encoding="utf-8")
    case = tmp_path / "case.toml"
    case.write_bytes(b"\xef\xbb\xbf" + text.encode("utf-8"))
    assert is_building_case(case)
    case.write_bytes(b"\xef\xbb\xbf" + DEMO.read_bytes())
    assert not is_building_case(case)


@pytest.mark.parametrize("command", [["compare"], ["wind"], ["evaluate", "--mass-ratio", "0.02",
                                     "--frequency-ratio", "0.98", "--damping-ratio", "0.07"]])
def test_a_whole_building_case_outside_design_is_named_as_such(command):
    # Issue 13 ("exit 2 naming the wrong field"): a valid whole-building case
    # given to a one-mode command read "mode: required key is missing; modes:
    # unknown key; did you mean 'mode'?".
    case = CASES / "building" / "corvid_spire.toml"
    result = runner.invoke(app, [command[0], str(case), *command[1:]])
    assert result.exit_code == 2, result.output
    assert "a whole-building case ([[modes]]) is run by 'tmd design' only" in result.output
    assert "unknown key" not in result.output


def test_a_whole_building_case_file_follows_the_one_mode_reading_rules(tmp_path):
    # The whole-building reader had its own TOML reading: a UTF-8 BOM (EF BB BF,
    # The Unicode Standard ch. 23.8; from memory) that `design` recognised as a
    # building case then failed as "not valid TOML", and a Latin-1 file ended in
    # exit 1. Both readers now share tmd.text_input: the BOM is read, the
    # Latin-1 byte 0xE9 (ISO/IEC 8859-1; from memory) is named, exit 2.
    from tmd.building_case import load_building_case
    from tmd.errors import CaseError

    text = (CASES / "building" / "corvid_spire.toml").read_text(encoding="utf-8")
    case = tmp_path / "case.toml"
    case.write_bytes(b"\xef\xbb\xbf" + text.encode("utf-8"))
    plain = load_building_case(CASES / "building" / "corvid_spire.toml")
    assert load_building_case(case).inputs == plain.inputs
    case.write_bytes(("# Tour \u00e9tude\n" + text).encode("latin-1"))
    with pytest.raises(CaseError, match=r"case.toml: the case file is not UTF-8 text \(byte 0xe9"):
        load_building_case(case)
    result = runner.invoke(app, ["design", str(case), "--out", str(tmp_path / "out")])
    assert result.exit_code == 2, result.output
