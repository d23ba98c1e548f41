"""The docstring check of .ci/docstrings.py, run with the suite.

.ci/run runs the same check as its own step; running it here too means that
the landing routine (ruff, lint-imports, pytest) catches an undocumented
parameter before CI does. The rules are numpydoc's validation checks (source:
numpydoc's documented error codes GL08, PR01, PR02, PR03, PR07, RT01, YD01).
"""

import importlib.util
from pathlib import Path

import pytest

CHECK = Path(__file__).parent.parent / ".ci" / "docstrings.py"


def _load_check():
    spec = importlib.util.spec_from_file_location("ci_docstrings", CHECK)
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


def test_every_public_callable_passes_numpydoc_validation(capsys):
    pytest.importorskip("numpydoc")
    code = _load_check().main([])
    report = capsys.readouterr().out
    assert code == 0, "numpydoc validation of tmd's public callables failed:\n" + report


def test_the_check_fails_on_a_missing_parameter():
    # A function whose Parameters section misses an argument and names one it
    # does not have must give PR01 and PR02 (numpydoc's codes for those).
    pytest.importorskip("numpydoc")
    from numpydoc.validate import validate

    codes = {code for code, _ in validate(f"{__name__}._badly_documented")["errors"]}
    assert {"PR01", "PR02", "RT01"} <= codes


def _badly_documented(a, b):
    """Return nothing useful.

    Parameters
    ----------
    a : float
        An argument.
    c : float
        Not an argument.
    """
    return a + b
