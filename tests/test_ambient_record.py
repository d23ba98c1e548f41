"""Reading and checking ambient acceleration records: every bad record is exit 2 (README rules)."""

import numpy as np
import pytest
from typer.testing import CliRunner

from tmd.ambient_record import RecordError, record_from_samples
from tmd.cli import app

DT, F = 0.05, 0.2
runner = CliRunner()


def _write(path, t, a):
    rows = zip(t, a, strict=True)
    lines = ["time_s,acceleration_m_s2"] + [f"{float(x)!r},{float(y)!r}" for x, y in rows]
    path.write_text("\n".join(lines) + "\n")


@pytest.mark.parametrize("fault, message", [
    ("step", "time step"), ("nan", "finite"), ("short", "samples"), ("header", "header"),
    ("text", "not two numbers")])
def test_bad_records_exit_2(tmp_path, fault, message):
    n = 4000
    t = np.arange(n) * DT
    a = np.sin(2 * np.pi * F * t)
    if fault == "step":
        t[2000:] += 0.01  # one step of 0.06 s in a 0.05 s record
    if fault == "nan":
        a[17] = np.nan
    if fault == "short":
        t, a = t[:500], a[:500]
    path = tmp_path / "bad.csv"
    _write(path, t, a)
    if fault == "header":
        path.write_text(path.read_text().replace("time_s,", "t,", 1))
    if fault == "text":
        path.write_text(path.read_text().replace("\n0.05,", "\n0.05;", 1))
    result = runner.invoke(app, ["identify", str(path)])
    assert result.exit_code == 2, result.output
    assert message in result.output and "Traceback" not in result.output


def test_record_rules_directly():
    t = np.arange(2000) * DT
    with pytest.raises(RecordError, match="increase"):
        record_from_samples(t[::-1], np.zeros_like(t))
