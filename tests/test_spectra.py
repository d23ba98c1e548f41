"""Modal force spectrum tables: reading, validation, interpolation."""

import numpy as np
import pytest
from scipy.integrate import quad

from tmd.spectra import SpectrumFileError, TabulatedSpectrum, read_force_psd_csv


def _write(path, text):
    path.write_text(text, encoding="utf-8")
    return path


def test_log_log_interpolation_is_a_power_law_between_nodes(tmp_path):
    # Between (0.1, 100) and (1, 1) a log-log line is S = 100 (f/0.1)^-2:
    # at f = 0.3, S = 100 / 9 (hand computation).
    p = _write(tmp_path / "s.csv", "frequency_hz,psd_n2_per_hz\n0.1,100\n1.0,1\n")
    s = read_force_psd_csv(p)
    assert s(np.array([0.3]))[0] == pytest.approx(100 / 9, rel=1e-12)
    np.testing.assert_array_equal(s(np.array([0.05, 2.0])), [0.0, 0.0])  # zero outside
    assert (s.f_min_hz, s.f_max_hz) == (0.1, 1.0)


def test_table_variance_matches_quadrature():
    # Reference: scipy.integrate.quad of the interpolant with the nodes as breakpoints.
    f = np.geomspace(0.01, 3.0, 25)
    table = TabulatedSpectrum(f, 1.0 / (1 + (f / 0.1) ** 2))
    ref, _ = quad(lambda x: float(table(np.array([x]))[0]), f[0], f[-1], points=f[1:-1],
                  limit=200, epsrel=1e-12)
    assert table.variance() == pytest.approx(ref, rel=1e-9)


def test_power_law_tail_continues_the_table_and_its_variance():
    # Issue 13, defect 15: a wind-model table continues above its last row as
    # S_n (f / f_n)^p. Reference for the variance: scipy.integrate.quad over the
    # table (nodes as breakpoints) plus quad over [f_n, inf); by hand, the tail
    # alone is S_n f_n / (-p - 1).
    f = np.geomspace(0.01, 3.0, 25)
    s = 1.0 / (1 + (f / 0.1) ** 2) ** (11 / 6)
    table = TabulatedSpectrum(f, s, tail_exponent=-11 / 3)
    assert table.f_max_hz == np.inf and table.breakpoints_hz[-1] == f[-1]
    assert table(np.array([6.0]))[0] == pytest.approx(s[-1] * 2.0 ** (-11 / 3), rel=1e-13)
    np.testing.assert_array_equal(table(f), TabulatedSpectrum(f, s)(f))  # unchanged on the table

    def one(x):
        return float(table(np.array([x]))[0])

    ref = (quad(one, f[0], f[-1], points=f[1:-1], limit=200, epsrel=1e-12)[0]
           + quad(one, f[-1], np.inf, epsabs=0, epsrel=1e-12)[0])
    assert table.variance() == pytest.approx(ref, rel=1e-9)
    assert table.variance() - TabulatedSpectrum(f, s).variance() == pytest.approx(
        s[-1] * f[-1] / (11 / 3 - 1), rel=1e-12)
    for bad in (-1.0, 0.5, float("nan")):
        with pytest.raises(ValueError, match="tail_exponent"):
            TabulatedSpectrum(f, s, tail_exponent=bad)


@pytest.mark.parametrize("body, needle", [
    ("freq,psd\n0.1,1\n0.2,1\n", "expected 'frequency_hz,psd_n2_per_hz'"),
    ("frequency_hz,psd_n2_per_hz\n0.1,1\n0.1,2\n", "strictly increasing"),
    ("frequency_hz,psd_n2_per_hz\n0.1,1\n0.2,0\n", "psd_n2_per_hz = 0.0; must be finite and > 0"),
    ("frequency_hz,psd_n2_per_hz\n0.1,1\n0.2,-3\n", "must be finite and > 0"),
    ("frequency_hz,psd_n2_per_hz\n0.1,1\n0.2,nan\n",
     "psd_n2_per_hz = 'nan': must be a plain decimal"),
    ("frequency_hz,psd_n2_per_hz\n0.1,1\n0.2,abc\n", "line 3"),
    ("frequency_hz,psd_n2_per_hz\n0.1,1\n", "at least two rows"),
])
def test_bad_tables_name_file_row_and_rule(tmp_path, body, needle):
    p = _write(tmp_path / "bad.csv", body)
    with pytest.raises(SpectrumFileError) as err:
        read_force_psd_csv(p)
    assert needle in str(err.value)
    assert str(p) in str(err.value)
