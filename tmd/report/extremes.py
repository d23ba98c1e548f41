"""Report tables for the specification: the recommended design, end-stop figures.

Every cell is a results.json value with its key path (``end_stops...``);
contact rates are stored per second (``contact_rate_per_side_hz``) and shown
per hour by a display scale of 3600.
"""

from __future__ import annotations

from tmd.report.html import Callout
from tmd.report.tables import Cell, Table, key_value_table

PER_HOUR = 3600.0
END_STOP_KEYS = ("travel_m", "travel_basis", "extreme_return_period_years",
                 "impact_velocity_mean_m_s", "impact_velocity_rare_m_s",
                 "impact_velocity_rare_probability", "impact_energy_mean_j")


def end_stop_tables(block: dict, path: str = "end_stops", title: str = "") -> list[Table]:
    """Return the end-stop specification and its figures per return period.

    Parameters
    ----------
    block : dict
        An ``end_stops`` block of results.json.
    path : str
        Its key path in results.json.
    title : str
        Which design it belongs to, added to the table titles.

    Returns
    -------
    list of Table
        A key/value table of the specification and one row per return
        period (peak stroke, rms stroke and stroke velocity, contacts per
        hour per side, connection-force estimate).
    """
    name = path.replace(".", "_")
    spec = key_value_table(name, f"End-stop specification{title}", block, path,
                           keys=END_STOP_KEYS, note=block.get("note", ""), milli_g=False)
    header = [Cell("return period [years]"), Cell("peak stroke [m]"), Cell("rms stroke [m]"),
              Cell("rms stroke velocity [m/s]"), Cell("stop contacts per hour per side"),
              Cell("connection force, estimate [N]")]
    rows = []
    for i, row in enumerate(block["by_return_period"]):
        here = f"{path}.by_return_period.{i}"
        rows.append([
            Cell(row["return_period_years"], f"{here}.return_period_years"),
            Cell(row["peak_stroke_m"], f"{here}.peak_stroke_m"),
            Cell(row["sigma_stroke_m"], f"{here}.sigma_stroke_m"),
            Cell(row["sigma_stroke_velocity_m_s"], f"{here}.sigma_stroke_velocity_m_s"),
            Cell(row["contact_rate_per_side_hz"], f"{here}.contact_rate_per_side_hz", PER_HOUR),
            Cell(row["connection_force_estimate_n"], f"{here}.connection_force_estimate_n"),
        ])
    note = (f"Stops at ±{block['travel_m']:.4g} m. Contacts by Rice's crossing rate on the "
            "stop-free response; the connection force g sqrt(k² σ_r² + c² σ_r'²) is an estimate "
            "of the spring and dashpot force, without the stops' impact force.")
    per_period = Table(f"{name}_by_return_period", f"End-stop figures per return period{title}",
                       header, rows, note)
    return [spec, per_period]


RECOMMENDED_KEYS = ("design_key", "mass_kg", "mass_ratio", "frequency_hz", "frequency_ratio",
                    "damping_ratio", "stiffness_n_per_m", "damping_n_s_per_m",
                    "peak_stroke_m", "peak_damper_force_n", "peak_acceleration_m_s2",
                    "meets_target", "frequency_band", "peak_acceleration_band_max_m_s2",
                    "meets_target_across_band", "why", "rule")


def recommendation_blocks(block: dict, keep) -> list:
    """Return the report's first-section statement of the recommended specification.

    Parameters
    ----------
    block : dict
        The ``recommended`` block of results.json.
    keep : callable
        Registers a table with the report (its CSV) and returns it.

    Returns
    -------
    list
        A callout naming the choice and a key/value table of its numbers.
    """
    which = {"band_design": "the band-robust design (results key band_design)",
             "design": "the nominal design (results key design)",
             None: "no damper"}[block.get("design_key")]
    # Without a damper the damper section states the outcome in its own callout.
    why = block.get("why") or ""
    why = why[:1].upper() + why[1:]  # a clause; it starts a sentence here
    out = [Callout(f"Recommended: {which}. {why}")] if block.get("design_key") else []
    out += [keep(key_value_table("recommended", "Recommended specification", block,
                                "recommended", keys=RECOMMENDED_KEYS,
                                note=f"Rule: {block['rule']}."))]
    if block.get("end_stops"):
        out += [keep(t) for t in end_stop_tables(block["end_stops"], "recommended.end_stops",
                                                 " (recommended design)")]
    return out
