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


def test_every_number_table_reader_shares_the_plain_decimal_rules(tmp_path):
    # Issue 13 (defects 10 and 16): a byte-order mark is accepted, and a cell such as
    # 1_000_000 (which Python's float() would take) is refused with its line and
    # column, in every input table: force spectra, profile tables, normalised
    # spectra and cross-spectra all read through read_number_table.
    from tmd.normalised_spectra import NormalisedFileError, read_normalised_psd_csv
    from tmd.spectra import read_number_table
    from tmd.wind.profile_table import ProfileFileError, read_profile_csv

    bom = tmp_path / "bom.csv"
    bom.write_bytes("\ufeffa_m,b_m\n\n1,2\n3,4\n".encode())
    table, lines = read_number_table(bom, ("a_m", "b_m"), "test table")
    np.testing.assert_array_equal(table, [[1.0, 2.0], [3.0, 4.0]])
    assert lines == [3, 4]  # the file's own line numbers, blank lines counted
    profile = tmp_path / "p.csv"
    profile.write_text("height_m,mean_speed_m_s,turbulence_intensity,length_scale_m\n"
                       "10,20,0.2,100\n300,1_000,0.1,400\n", encoding="utf-8")
    with pytest.raises(ProfileFileError, match=r"line 3: mean_speed_m_s = '1_000': must be a "
                       r"plain decimal number"):
        read_profile_csv(profile)
    normalised = tmp_path / "n.csv"
    normalised.write_text("reduced_frequency,normalised_psd\n0.1,nan\n", encoding="utf-8")
    with pytest.raises(NormalisedFileError, match=r"line 2: normalised_psd = 'nan'"):
        read_normalised_psd_csv(normalised)
