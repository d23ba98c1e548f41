"""Hostile case files and spectra through every command: a clean exit code, never a traceback.

Generated with hypothesis (fixed seed, bounded examples, no example database;
budget: under 30 s on 2 cores, stated in README and DEVELOPERS). Each example
mutates one of the shipped fictional demos (a case key or the force-spectrum
CSV) and runs it through the CLI runner. The contract checked is the
project's documented one (README "Exit codes"; issue 13, "A fuzz suite that
stays"):

* bad input exits 2 with a message naming the file, the field and the value;
* anything else exits 0 or 1, and never with a traceback;
* results.json is strict JSON (RFC 8259 has no NaN or Infinity) and agrees
  with itself (``tests/consistency.py``);
* the input files are byte-identical afterwards.

The hostile values are the classic ones of input testing (wrong types,
missing keys, NaN, inf, huge, zero and negative numbers, non-monotonic and
duplicate abscissae, byte-order marks, CRLF line ends, extra columns, empty
files; common practice).
"""

from __future__ import annotations

import hashlib
import json
import re
import shutil
import tomllib
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, seed, settings
from hypothesis import strategies as st
from typer.testing import CliRunner

from tmd.cli import app

from .consistency import assert_consistent_results

CASES = Path(__file__).resolve().parents[1] / "cases"
CSV_RAW = (CASES / "harbourline_force.csv").read_bytes()
CSV_TEXT = CSV_RAW.decode("utf-8").replace("\r\n", "\n")  # LF lines; mutations choose
HARBOUR = tomllib.loads((CASES / "harbourline_residences.toml").read_text(encoding="utf-8"))
KESTREL = tomllib.loads((CASES / "kestrel_point.toml").read_text(encoding="utf-8"))
DESIGN_OPTIONS = ["--mass-ratio", "0.02", "--frequency-ratio", "0.98", "--damping-ratio", "0.08"]
COMMANDS = ("evaluate", "sweep", "wind", "design", "compare")
FUZZ = settings(max_examples=30, deadline=None, database=None, derandomize=False,
                suppress_health_check=[HealthCheck.function_scoped_fixture,
                                       HealthCheck.too_slow])
runner = CliRunner()

# TOML spellings of hostile values (TOML 1.0.0 has nan and inf floats).
HOSTILE = {
    "a string of a number": '"0.17"', "true": "true", "nan": "nan", "inf": "inf",
    "-inf": "-inf", "1e300": "1e300", "zero": "0", "negative": "-1.0", "a list": "[1.0, 2.0]",
    "a table": "{ x = 1 }", "an empty string": '""', "a huge integer": "123456789012345678",
}


def _toml_value(value) -> str:
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, str):
        return json.dumps(value)
    if isinstance(value, list):
        return "[" + ", ".join(_toml_value(v) for v in value) + "]"
    if isinstance(value, dict):  # a sub-table, such as [robustness.probabilistic]
        return "{ " + ", ".join(f"{k} = {_toml_value(v)}" for k, v in value.items()) + " }"
    return repr(value)


def _toml(data: dict, overrides: dict) -> str:
    """TOML text of ``data`` with ``overrides`` ((table, key) -> raw TOML or None to drop)."""
    lines = []
    tables = {k: v for k, v in data.items() if isinstance(v, dict)}
    for key, value in data.items():
        if not isinstance(value, dict):
            lines.append(_pair(("", key), value, overrides))
    for (table, key), raw in overrides.items():
        if table == "" and key not in data and raw is not None:
            lines.append(f"{key} = {raw}")
    for name, body in tables.items():
        lines.append(f"[{name}]")
        for key, value in body.items():
            lines.append(_pair((name, key), value, overrides))
        for (table, key), raw in overrides.items():
            if table == name and key not in body and raw is not None:
                lines.append(f"{key} = {raw}")
    return "\n".join(line for line in lines if line) + "\n"


def _pair(where, value, overrides):
    if where in overrides:
        raw = overrides[where]
        return "" if raw is None else f"{where[1]} = {raw}"
    return f"{where[1]} = {_toml_value(value)}"


def _keys(data: dict) -> list[tuple[str, str]]:
    out = [("", k) for k, v in data.items() if not isinstance(v, dict)]
    for name, body in data.items():
        if isinstance(body, dict):
            out += [(name, k) for k, v in body.items() if not isinstance(v, dict)]
    return out


def _digest(paths) -> dict:
    return {p: hashlib.sha256(Path(p).read_bytes()).hexdigest() for p in paths}


def _strict_json(text: str):
    def refuse(token):
        raise AssertionError(f"results.json holds {token}, which strict JSON does not allow")

    return json.loads(text, parse_constant=refuse)


def _run(command: str, case: Path, out: Path):
    args = [command, str(case)]
    if command in ("design", "compare"):
        args += ["--out", str(out)]
    elif command in ("evaluate", "sweep"):
        args += DESIGN_OPTIONS + ["--json"]
    else:
        args += ["--json"]
    return runner.invoke(app, args, catch_exceptions=True)


def _check(result, command: str, files: list[Path], out: Path, named: tuple[str, ...] = ()):
    """The exit-code contract for one run; returns the exit code."""
    text = result.output
    assert "Traceback" not in text, text
    assert result.exit_code in (0, 1, 2), (command, result.exit_code, text, result.exception)
    if result.exception is not None:
        assert isinstance(result.exception, SystemExit), repr(result.exception)
    if result.exit_code == 2:
        flat = " ".join(text.split())
        # the message names the file it is about ...
        assert any(f.name in flat for f in files), flat
        # ... and the field (the key or the CSV column / line), where one was mutated
        if named and "'tmd wind' needs a case with [wind]" not in flat:  # command, not input
            assert any(n in flat for n in named) or "derived" in flat, (named, flat)
    elif result.exit_code == 0:
        if command in ("design", "compare"):
            assert_consistent_results(_strict_json((out / "results.json").read_text()))
        elif command != "wind":
            data = _strict_json(result.stdout)
            assert_consistent_results(data if "target" in data else {"design": data["design"]})
    return result.exit_code


def _write_case(tmp: Path, data: dict, overrides: dict, csv_bytes: bytes | None = None):
    tmp.mkdir(parents=True, exist_ok=True)
    case = tmp / "case.toml"
    case.write_text(_toml(data, overrides), encoding="utf-8")
    files = [case]
    if "load" in data:
        csv = tmp / "harbourline_force.csv"
        csv.write_bytes(CSV_RAW if csv_bytes is None else csv_bytes)
        files.append(csv)
    return case, files


def _all_commands(case: Path, files: list[Path], tmp: Path, named=(), cheap: int = 2):
    """evaluate first; when it refuses the input, every other command must refuse it too."""
    before = _digest(files)
    codes = {}
    first = _run("evaluate", case, tmp / "out-evaluate")
    codes["evaluate"] = _check(first, "evaluate", files, tmp / "out-evaluate", named)
    # A valid case runs the cheap commands only here; design and compare of valid
    # cases are exercised by test_valid_variants_run_cleanly below.
    others = COMMANDS[1:] if codes["evaluate"] == 2 else ("sweep", "wind")[:cheap]
    for command in others:
        out = tmp / f"out-{command}"
        codes[command] = _check(_run(command, case, out), command, files, out, named)
        if codes["evaluate"] == 2 and command != "wind":
            assert codes[command] == 2, (command, codes)
    assert _digest(files) == before  # inputs byte-identical afterwards
    return codes


@seed(20261202)
@FUZZ
@given(data=st.data())
def test_hostile_case_values(tmp_path_factory, data):
    base_name = data.draw(st.sampled_from(["harbourline", "kestrel"]), label="case")
    base = HARBOUR if base_name == "harbourline" else KESTREL
    where = data.draw(st.sampled_from(_keys(base)), label="key")
    kind = data.draw(st.sampled_from(["hostile", "missing", "unknown key"]), label="kind")
    if kind == "hostile":
        label = data.draw(st.sampled_from(sorted(HOSTILE)), label="value")
        overrides = {where: HOSTILE[label]}
    elif kind == "missing":
        overrides = {where: None}
    else:
        overrides = {(where[0], where[1] + "_typo"): "1.0"}
    tmp = tmp_path_factory.mktemp("fuzz")
    case, files = _write_case(tmp, base, overrides)
    named = tuple(k[1] for k in overrides) if where[1] not in ("name", "description") else ()
    # A valid wind case recomputes its spectra per command: evaluate only (cheap=0).
    codes = _all_commands(case, files, tmp, named if kind != "missing" else (),
                          cheap=2 if base_name == "harbourline" else 0)
    if kind == "unknown key":
        assert codes["evaluate"] == 2  # unknown keys are always refused


def _csv_mutation(name: str) -> bytes:
    lines = CSV_TEXT.splitlines()
    header, rows = lines[0], lines[1:]
    if name == "bom":
        return b"\xef\xbb\xbf" + CSV_TEXT.encode("utf-8")
    if name == "crlf":
        return CSV_TEXT.replace("\n", "\r\n").encode("utf-8")
    if name == "bom+crlf":
        return b"\xef\xbb\xbf" + CSV_TEXT.replace("\n", "\r\n").encode("utf-8")
    if name == "lf":
        return CSV_TEXT.encode("utf-8")
    if name == "empty":
        return b""
    if name == "header only":
        return (header + "\n").encode("utf-8")
    if name == "non-monotonic":
        rows[10], rows[11] = rows[11], rows[10]
    elif name == "duplicate frequency":
        rows[11] = rows[10].split(",")[0] + "," + rows[11].split(",")[1]
    elif name == "extra column":
        rows[5] += ",1.0"
    elif name == "nan":
        rows[7] = rows[7].split(",")[0] + ",nan"
    elif name == "inf":
        rows[7] = rows[7].split(",")[0] + ",inf"
    elif name == "underscored number":
        rows[7] = rows[7].split(",")[0] + ",1_000_000"
    elif name == "negative psd":
        rows[7] = rows[7].split(",")[0] + ",-5"
    elif name == "zero frequency":
        rows[0] = "0," + rows[0].split(",")[1]
    elif name == "1e300 psd":
        rows = [r.split(",")[0] + ",1e300" for r in rows]
    elif name == "latin-1 byte":
        text = (header + "\n" + "\n".join(rows)).encode("utf-8")
        return text.replace(b"0.001,", b"0.001\xe9,", 1)
    return (header + "\n" + "\n".join(rows) + "\n").encode("utf-8")


CSV_MUTATIONS = ("bom", "lf", "crlf", "bom+crlf", "empty", "header only", "non-monotonic",
                 "duplicate frequency", "extra column", "nan", "inf", "underscored number",
                 "negative psd", "zero frequency", "1e300 psd", "latin-1 byte")


@pytest.mark.parametrize("mutation", CSV_MUTATIONS)
def test_hostile_spectrum_files(tmp_path, mutation):
    case, files = _write_case(tmp_path, HARBOUR, {}, _csv_mutation(mutation))
    codes = _all_commands(case, files, tmp_path, ("harbourline_force.csv",))
    if mutation in ("bom", "lf", "crlf", "bom+crlf"):
        assert codes["evaluate"] == 0, codes  # a BOM and CRLF line ends are valid CSV
    elif mutation != "1e300 psd":
        assert codes["evaluate"] == 2, codes
    if codes["evaluate"] == 2:
        assert re.search(r"line \d+|header|empty|UTF-8|columns|rows", " ".join(
            _run("evaluate", case, tmp_path).output.split()))


@pytest.mark.parametrize("command, target", [("design", 0.05), ("compare", 0.10)])
def test_valid_variants_run_cleanly(tmp_path, command, target):
    # Valid cases through the two report-writing commands (the costly ones, so two cases).
    case, files = _write_case(tmp_path, HARBOUR,
                              {("target", "peak_acceleration_m_s2"): repr(target)})
    before = _digest(files)
    out = tmp_path / "out"
    assert _check(_run(command, case, out), command, files, out) == 0
    assert _digest(files) == before


def test_the_suite_copies_the_demo_csv_faithfully(tmp_path):
    # Guard of the generator itself: with no mutation, the case is the shipped demo.
    case, files = _write_case(tmp_path, HARBOUR, {})
    assert tomllib.loads(case.read_text()) == HARBOUR
    shutil.copy(CASES / "harbourline_force.csv", tmp_path / "ref.csv")
    assert files[1].read_bytes() == (tmp_path / "ref.csv").read_bytes()
