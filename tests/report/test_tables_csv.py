"""CSV tables open cleanly in spreadsheet programs: ASCII, units as the results.json suffixes.

Source: RFC 4180 defines CSV without an encoding; spreadsheet programs guess
one when a file has no byte-order mark, so non-ASCII text garbles (common
practice). The suffixes are the README's unit convention for keys.
"""

from tmd.report.tables import Cell, Table, csv_bytes

BOM = b"\xef\xbb\xbf"


def test_every_table_of_a_full_report_is_ascii(full_report):
    _, _, files = full_report
    tables = {name: data for name, data in files.items() if name.endswith(".csv")}
    assert len(tables) > 5
    for name, data in tables.items():
        assert data.isascii(), (name, [c for c in data.decode("utf-8") if not c.isascii()][:5])


def test_units_are_written_as_key_suffixes():
    table = Table("t", "t", [Cell("peak acceleration [m/s²]"), Cell("dashpot [N·s/m]")],
                  [[Cell(0.05, "design.peak_acceleration_m_s2"), Cell("m/s²")],
                   [Cell("±15 % · band"), Cell("N²/Hz")]])
    text = csv_bytes(table)
    assert text.decode("ascii").splitlines() == [
        "peak acceleration [m_s2],dashpot [n_s_per_m]", "0.05,m_s2", "+/-15 % - band,n2_per_hz"]


def test_non_ascii_case_text_gets_a_byte_order_mark():
    table = Table("t", "t", [Cell("name")], [[Cell("Tour Bellevue-Étoile")]])
    data = csv_bytes(table)
    assert data.startswith(BOM) and data[len(BOM):].decode("utf-8").endswith("Étoile\n")
