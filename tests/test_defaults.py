"""One source per default: tmd.defaults, the library's signatures, the case file and the README."""

import inspect
import re
from pathlib import Path

from tmd.case import RobustnessTable
from tmd.compare import compare_options
from tmd.defaults import FREQUENCY_BAND
from tmd.robust import design_sweeps, robustness_study

README = Path(__file__).resolve().parents[1] / "README.md"


def test_the_frequency_band_default_is_one_value_everywhere():
    # Issue 15: the band default was 0.15 in four places and 0.1 in two. Every
    # library function taking a band, the case file's table and the README's
    # case-key rows must state tmd.defaults.FREQUENCY_BAND.
    for function in (compare_options, robustness_study, design_sweeps):
        default = inspect.signature(function).parameters["frequency_band"].default
        assert default == FREQUENCY_BAND, function.__name__
    assert RobustnessTable().frequency_band == FREQUENCY_BAND
    rows = [line for line in README.read_text(encoding="utf-8").splitlines()
            if re.match(r"\| `\[(robustness|options)\]` \| `frequency_band` \|", line)]
    assert len(rows) == 2
    for row in rows:
        stated = re.findall(r"\d+\.\d+", row.rsplit("|", 2)[-2])
        assert stated == [f"{FREQUENCY_BAND:g}"], row
