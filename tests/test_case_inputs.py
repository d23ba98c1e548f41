"""Case files refuse absurd, loosely typed, unbounded and badly encoded inputs, naming them.

Sources: the rules are the README's "Case files" and "Plausibility ranges"
sections. TOML 1.0.0 (toml.io) distinguishes strings, integers, floats and
booleans, so "0.17" is a string and true a boolean. The UTF-8 byte-order
mark is EF BB BF (The Unicode Standard, ch. 23.8; from memory). EN
1991-1-4:2005 eq. (F.18) gives the aerodynamic log decrement
c_f rho b v_m(z_s) / (2 n_1 m_e), hence zeta_a = that / (2 pi).
"""

import math
import shutil
from pathlib import Path

import pytest

from tmd.case import CaseError, read_case
from tmd.spectra import SpectrumFileError, read_force_psd_csv

CASES = Path(__file__).resolve().parents[1] / "cases"
KESTREL = (CASES / "kestrel_point.toml").read_text(encoding="utf-8")
HARBOUR = (CASES / "harbourline_residences.toml").read_text(encoding="utf-8")


def _wind_case(tmp_path, old, new):
    assert old in KESTREL
    path = tmp_path / "case.toml"
    path.write_text(KESTREL.replace(old, new), encoding="utf-8")
    return path


def _csv_case(tmp_path, text=HARBOUR, csv_bytes=None):
    target = tmp_path / "harbourline_force.csv"
    if csv_bytes is None:
        shutil.copy(CASES / "harbourline_force.csv", target)
    else:
        target.write_bytes(csv_bytes)
    path = tmp_path / "case.toml"
    path.write_text(text, encoding="utf-8")
    return path


@pytest.mark.parametrize("old, new, needle", [
    ("basic_speed_m_s = 30.0", "basic_speed_m_s = 500.0",
     "[wind] basic_speed_m_s = 500.0: must lie in [10, 80] m/s"),
    ("terrain = \"III\"", "terrain = \"III\"\norography_factor = 100.0",
     "[wind] orography_factor = 100.0: must lie in [0.5, 2]"),
    ("return_period_years = 1\n", "return_period_years = 1e300\n",
     "[target] return_period_years = 1e+300: must lie in [0.5, 10000] years"),
    ("frequency_hz = 0.18", "frequency_hz = 1e-300", "[mode] frequency_hz = 1e-300: must lie in"),
    ("damping_ratio = 0.012", "damping_ratio = 0.5", "[mode] damping_ratio = 0.5: must lie in"),
    # Strict types (TOML 1.0.0: a quoted value is a string, true is a boolean).
    ("frequency_hz = 0.18", "frequency_hz = \"0.18\"",
     "[mode] frequency_hz = '0.18': must be a number"),
    ("frequency_hz = 0.18", "frequency_hz = true", "[mode] frequency_hz = True: must be a number"),
    ("aerodynamic_damping = true", "aerodynamic_damping = \"yes\"",
     "[wind] aerodynamic_damping = 'yes': must be true or false"),
    ("aerodynamic_damping = true", "aerodynamic_damping = 1",
     "[wind] aerodynamic_damping = 1: must be true or false"),
    ("spectrum = \"eurocode\"", "spectrum = \"eurocode\"\nn_strips = 40.0",
     "[wind] n_strips = 40.0: must be a whole number"),
    # Bounded lists without repeats.
    ("return_periods_years = [1, 10, 50]", "return_periods_years = [1, 10, 10]",
     "[wind] return_periods_years = [1, 10, 10]: 10 is given twice"),
    ("return_periods_years = [1, 10, 50]",
     "return_periods_years = [" + ", ".join(str(1 + i) for i in range(51)) + "]",
     "must have at most 50 entries, got 51"),
    ("return_periods_years = [1, 10, 50]", "return_periods_years = [1, 10, -5]",
     "[wind] return_periods_years[2] = -5: must lie in [0.5, 10000] years"),
])
def test_absurd_or_loose_values_are_refused_with_the_rule(tmp_path, old, new, needle):
    path = _wind_case(tmp_path, old, new)
    with pytest.raises(CaseError) as err:
        read_case(path)
    message = str(err.value)
    assert str(path) in message and needle in message, message


def test_option_names_are_bounded_and_unique(tmp_path):
    text = HARBOUR + "\n[options]\nenabled = [\"tmd\", \"viscous\", \"tmd\"]\n"
    with pytest.raises(CaseError, match=r"\[options\] enabled = .*'tmd' is given twice"):
        read_case(_csv_case(tmp_path, text))
    text = HARBOUR + "\n[options]\nenabled = \"tmd\"\n"
    with pytest.raises(CaseError, match=r"\[options\] enabled = 'tmd': must be a list"):
        read_case(_csv_case(tmp_path, text))


def test_unusual_values_inside_the_range_warn(tmp_path):
    path = _wind_case(tmp_path, "basic_speed_m_s = 30.0", "basic_speed_m_s = 60.0")
    notes = read_case(path).notes
    assert any("[wind] basic_speed_m_s = 60 m/s is unusual" in n for n in notes), notes
    assert not read_case(CASES / "kestrel_point.toml").notes  # the demo is ordinary


def test_derived_damping_names_the_inputs_that_made_it(tmp_path):
    # Issue 13 item 5: m_e = 1 kg/m makes (F.18) aerodynamic damping absurd.
    path = _wind_case(tmp_path, "evaluation_height_m = 183.0",
                      "evaluation_height_m = 183.0\nmass_per_length_kg_m = 1.0")
    with pytest.raises(CaseError) as err:
        read_case(path)
    message = str(err.value)
    assert "derived total damping ratio" in message and "must lie in [0.0001, 0.3]" in message
    for needle in ("[mode] damping_ratio = 0.012", "[building] mass_per_length_kg_m = 1",
                   "drag_coefficient = 1.3", "breadth_m = 32", "frequency_hz = 0.18"):
        assert needle in message, needle
    # The value quoted is EN (F.18): c_f rho b v_m / (2 n_1 m_e) / (2 pi) at the 50-year
    # speed, with rho = 1.25 kg/m^3 (EN 1991-1-4 4.5 recommended value).
    speed = float(message.split("the mean speed ")[1].split(" m/s")[0])
    zeta_a = 1.3 * 1.25 * 32.0 * speed / (2 * 0.18 * 1.0) / (2 * math.pi)
    quoted = float(message.split("aerodynamic damping ")[1].split(" ")[0])
    assert quoted == pytest.approx(zeta_a, rel=5e-3)  # speed is quoted to 3 digits


def test_a_low_damper_level_is_named_too(tmp_path):
    path = _wind_case(tmp_path, "damper_height_m = 186.0", "damper_height_m = 1.0")
    with pytest.raises(CaseError, match=r"damper_height_m = 1\b.*Check"):
        read_case(path)


def test_utf8_bom_is_accepted_in_toml_and_csv(tmp_path):
    bom = b"\xef\xbb\xbf"
    csv = (CASES / "harbourline_force.csv").read_bytes()
    path = _csv_case(tmp_path, csv_bytes=bom + csv.replace(b"\n", b"\r\n"))
    path.write_bytes(bom + HARBOUR.encode("utf-8"))
    case = read_case(path)
    reference = read_case(CASES / "harbourline_residences.toml")
    assert case.spectrum.psd_n2_per_hz.tolist() == reference.spectrum.psd_n2_per_hz.tolist()


def test_non_utf8_files_are_named(tmp_path):
    path = tmp_path / "case.toml"
    path.write_bytes(HARBOUR.replace("Harbourline", "Harbourlin\u00e9").encode("latin-1"))
    with pytest.raises(CaseError, match=r"case\.toml: the case file is not UTF-8 text \(byte 0xe9"):
        read_case(path)
    csv = tmp_path / "f.csv"
    csv.write_bytes(b"frequency_hz,psd_n2_per_hz\n0.1,1\n0.2,\xb52\n")
    with pytest.raises(SpectrumFileError, match=r"f\.csv: the force spectrum is not UTF-8 text "
                                                 r"\(byte 0xb5 at line 3"):
        read_force_psd_csv(csv)


@pytest.mark.parametrize("value", ["1_000_000", "0x10", "inf", "1,5", " "])
def test_csv_numbers_are_plain_decimals(tmp_path, value):
    csv = tmp_path / "f.csv"
    csv.write_text(f"frequency_hz,psd_n2_per_hz\n0.1,1\n0.2,\"{value}\"\n")
    with pytest.raises(SpectrumFileError, match="line 3: psd_n2_per_hz = .*plain decimal number"):
        read_force_psd_csv(csv)


def test_csv_problems_name_the_files_own_line(tmp_path):
    csv = tmp_path / "f.csv"
    csv.write_text("frequency_hz,psd_n2_per_hz\n\n0.1,1\n\n0.1,2\n")
    with pytest.raises(SpectrumFileError, match="line 5: frequency_hz = 0.1 does not exceed"):
        read_force_psd_csv(csv)
