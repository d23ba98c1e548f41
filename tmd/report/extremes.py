"""Report tables for extreme winds: end-stop figures per return period.

Every cell is a results.json value with its key path (``end_stops...``);
contact rates are stored per second (``contact_rate_per_side_hz``) and shown
per hour by a display scale of 3600.
"""

from __future__ import annotations

from tmd.report.tables import Cell, Table, key_value_table

PER_HOUR = 3600.0
END_STOP_KEYS = ("travel_m", "travel_basis", "extreme_return_period_years",
                 "impact_velocity_mean_m_s", "impact_velocity_rare_m_s",
                 "impact_velocity_rare_probability", "impact_energy_mean_j")


def end_stop_tables(block: dict) -> list[Table]:
    """The end-stop specification and its figures per return period.

    Parameters
    ----------
    block : dict
        The ``end_stops`` block of results.json.

    Returns
    -------
    list of Table
        A key/value table of the specification and one row per return
        period (peak stroke, rms stroke and stroke velocity, contacts per
        hour per side, connection-force estimate).
    """
    spec = key_value_table("end_stops", "End-stop specification", block, "end_stops",
                           keys=END_STOP_KEYS, note=block.get("note", ""), milli_g=False)
    header = [Cell("return period [years]"), Cell("peak stroke [m]"), Cell("rms stroke [m]"),
              Cell("rms stroke velocity [m/s]"), Cell("stop contacts per hour per side"),
              Cell("connection force, estimate [N]")]
    rows = []
    for i, row in enumerate(block["by_return_period"]):
        path = f"end_stops.by_return_period.{i}"
        rows.append([
            Cell(row["return_period_years"], f"{path}.return_period_years"),
            Cell(row["peak_stroke_m"], f"{path}.peak_stroke_m"),
            Cell(row["sigma_stroke_m"], f"{path}.sigma_stroke_m"),
            Cell(row["sigma_stroke_velocity_m_s"], f"{path}.sigma_stroke_velocity_m_s"),
            Cell(row["contact_rate_per_side_hz"], f"{path}.contact_rate_per_side_hz", PER_HOUR),
            Cell(row["connection_force_estimate_n"], f"{path}.connection_force_estimate_n"),
        ])
    note = (f"Stops at ±{block['travel_m']:.4g} m. Contacts by Rice's crossing rate on the "
            "stop-free response; the connection force g sqrt(k² σ_r² + c² σ_r'²) is an estimate "
            "of the spring and dashpot force, without the stops' impact force.")
    per_period = Table("end_stops_by_return_period", "End-stop figures per return period",
                       header, rows, note)
    return [spec, per_period]
