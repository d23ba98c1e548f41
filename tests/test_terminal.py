"""Terminal tables and verdict lines: legible at 80 and 200 columns, read from the results."""

import io
import json
import re
from pathlib import Path

import pytest
from rich.console import Console
from typer.testing import CliRunner

from tests.consistency import assert_consistent_results
from tmd import terminal
from tmd.cli import app

DEMO = Path(__file__).resolve().parents[1] / "cases" / "harbourline_residences.toml"
runner = CliRunner()


def printed(renderable, width: int) -> str:
    console = Console(width=width, record=True, file=io.StringIO())
    console.print(renderable)
    return console.export_text()


@pytest.mark.parametrize("width", [80, 200])
def test_options_table_is_whole_at_80_and_200_columns(demo_compare, width):
    """Nothing truncated: every option name, header word and value printed in full.

    An ellipsis or a line longer than the terminal hides a number from the
    engineer (common practice: terminal tables fit their width).
    """
    _, results = demo_compare
    text = printed(terminal.options_table(results), width)
    assert "…" not in text
    assert max(len(line) for line in text.splitlines()) <= width
    rows = {line.split()[0]: line.split() for line in text.splitlines()
            if line.split() and line.split()[0] in {o["option"] for o in results["options"]}}
    assert set(rows) == {o["option"] for o in results["options"]}
    for option in results["options"]:
        cells = rows[option["option"]]
        # meets: the option's own verdict from results.json, not re-decided
        assert cells[-1] == ("yes" if option["meets_target"] else "no")
        # the printed peak is the results value to the 4 decimals shown
        assert float(cells[3]) == pytest.approx(option["peak_acceleration_m_s2"], abs=5e-5)
        if option["mass_kg"] is not None:
            assert float(cells[1].replace(",", "")) == pytest.approx(option["mass_kg"] / 1000,
                                                                     abs=0.05)
    for unit in ("[t]", "[m/s²]", "[m]", "[kN]"):
        assert unit in text


def test_console_width_follows_columns_when_piped(monkeypatch):
    monkeypatch.setenv("COLUMNS", "200")
    assert terminal.console().width == 200
    monkeypatch.delenv("COLUMNS")
    assert terminal.console().width == terminal.NON_TERMINAL_WIDTH


def _evaluate(*options):
    return runner.invoke(app, ["evaluate", str(DEMO), *options])


@pytest.mark.parametrize("mass_ratio", ["0.002", "0.05"])
def test_evaluate_prints_the_verdict_of_its_results(mass_ratio):
    """The verdict line states results.json's own meets_target, with the two numbers."""
    options = ("--mass-ratio", mass_ratio, "--frequency-ratio", "0.97", "--damping-ratio", "0.06")
    shown, as_json = _evaluate(*options), _evaluate(*options, "--json")
    assert shown.exit_code == 0 and as_json.exit_code == 0, shown.output
    results = json.loads(as_json.stdout)
    assert_consistent_results(results)
    design = results["design"]
    line = [t for t in shown.stdout.splitlines() if "the target" in t and "given damper" in t]
    assert len(line) == 1
    assert ("does not meet" not in line[0]) == design["meets_target"]
    peak = float(re.search(r"peak acceleration ([0-9.e-]+) m/s²", line[0]).group(1))
    assert peak == pytest.approx(design["peak_acceleration_m_s2"], rel=1e-3)  # 4 digits


def test_verdict_line_never_prints_a_failing_peak_equal_to_its_target():
    """Defect 13.3: a peak 1 ulp over the target must not print as equal to it."""
    results = {"design": {"meets_target": False, "peak_acceleration_m_s2": 0.09000000000000002},
               "target": {"peak_acceleration_m_s2": 0.09}}
    line, colour = terminal.verdict_line(results)
    assert colour == "red" and "does not meet" in line
    numbers = re.findall(r"([0-9.]+) m/s²", line)
    assert numbers[0] != numbers[1]


def test_sweep_columns_carry_units():
    result = runner.invoke(app, ["sweep", str(DEMO), "--mass-ratio", "0.03",
                                 "--frequency-ratio", "0.97", "--damping-ratio", "0.06"])
    assert result.exit_code == 0, result.output
    header = result.stdout.split("─")[0]
    assert header.count("[m/s²]") == 2 and "[m]" in header and "…" not in result.stdout
