"""Terminal output of the CLI: rich consoles and the tables that must stay legible at 80 columns.

Every statement printed here is read from a results dictionary: a verdict is
the results' own ``meets_target``, never decided again from the printed numbers.
"""

from __future__ import annotations

import os

from rich import box
from rich.console import Console
from rich.markup import escape
from rich.table import Table

from tmd.constants import STANDARD_GRAVITY

NON_TERMINAL_WIDTH = 110  # output piped to a file or a pager, where no COLUMNS is stated
OPTION_COLUMNS = (  # header (units in brackets), results key, format, display scale
    ("option", "option", "{}", None),
    ("mass [t]", "mass_kg", "{:,.1f}", 1e-3),
    ("% of M*", "mass_ratio", "{:.2f}", 100.0),
    ("peak acc. [m/s²]", "peak_acceleration_m_s2", "{:.4f}", 1.0),
    ("peak stroke [m]", "peak_stroke_m", "{:.3f}", 1.0),
    ("peak force [kN]", "peak_damper_force_n", "{:,.1f}", 1e-3),
    ("eff. damp.", "effective_damping_ratio", "{:.4f}", 1.0),
    ("worst in band [m/s²]", "peak_acceleration_band_max_m_s2", "{:.4f}", 1.0),
)


def console(*, stderr: bool = False) -> Console:
    """Return a rich console as wide as the terminal, or as ``COLUMNS`` says when output is piped.

    Parameters
    ----------
    stderr : bool
        Write to standard error instead of standard output.

    Returns
    -------
    rich.console.Console
    """
    stated = os.environ.get("COLUMNS", "").strip().isdigit()
    terminal = Console(stderr=stderr).is_terminal
    return Console(stderr=stderr, width=None if terminal or stated else NON_TERMINAL_WIDTH)


out_console = console()
err_console = console(stderr=True)


def _cell(value, fmt: str, scale) -> str:
    if value is None:
        return "-"
    if isinstance(value, bool):
        return "yes" if value else "no"
    return fmt.format(value * scale if scale is not None else value)


def options_table(result: dict) -> Table:
    """Return the compare job's options, one row each, fitting 80 columns without truncation.

    Parameters
    ----------
    result : dict
        results.json of ``tmd compare`` (``options``, ``options_frequency_band``).

    Returns
    -------
    rich.table.Table
    """
    band = result.get("options_frequency_band")
    title = f"{result['case']['name']}: passive options"
    if band is not None:
        title += f" (band ±{100 * band:g}%)"
    table = Table(title=title, box=box.SIMPLE_HEAD, collapse_padding=True, pad_edge=False)
    names = [str(row["option"]) for row in result["options"]]
    table.add_column("option", no_wrap=True, min_width=max(map(len, names), default=6))
    rows = [[escape(name)] + [_cell(row.get(key), fmt, scale) for _, key, fmt, scale
                              in OPTION_COLUMNS[1:]] + [_cell(bool(row["meets_target"]), "", None)]
            for name, row in zip(names, result["options"], strict=True)]
    for header, *_ in OPTION_COLUMNS[1:]:
        table.add_column(escape(header), justify="right")  # "[t]" is a unit, not markup
    table.add_column("meets", justify="right", no_wrap=True)
    for cells in rows:
        table.add_row(*cells)
    table.caption = ("accelerations at the evaluation height; peak stroke: travel relative to "
                     "the structure (liquid column: the liquid's excursion); meets: the "
                     "option's own verdict in results.json")
    return table


# The rise each liquid option compares with its freeboard (tmd.sizing.freeboard).
LIQUID_RISE_KEYS = {"liquid-column": "peak_excursion_m",
                    "sloshing-tank": "peak_free_surface_elevation_m"}


def freeboard_table(result: dict) -> Table | None:
    """Return the liquid options' rise against their freeboard per return period, or None.

    Parameters
    ----------
    result : dict
        results.json of ``tmd compare``; rows with ``by_return_period``.

    Returns
    -------
    rich.table.Table or None
        None when no option carries per-return-period rows.
    """
    rows = [r for r in result["options"] if r.get("by_return_period")]
    if not rows:
        return None
    table = Table(title="liquid dampers: peak rise against the freeboard",
                  box=box.SIMPLE_HEAD, collapse_padding=True, pad_edge=False)
    for header in ("option", "return period", "peak rise [m]", "freeboard [m]", "freeboard"):
        table.add_column(header, justify="left" if header == "option" else "right")
    for row in rows:
        freeboard = row["dimensions"].get("freeboard_m")
        for entry in row["by_return_period"]:
            ok = entry.get("within_freeboard")
            table.add_row(escape(str(row["option"])), f"{entry['return_period_years']:g} y",
                          f"{entry[LIQUID_RISE_KEYS[row['option']]]:.3f}",
                          "-" if freeboard is None else f"{freeboard:.3f}",
                          "-" if ok is None else "within" if ok else "[red]OVERFLOWS[/]")
    table.caption = ("liquid column: excursion along the column (rise in a leg); sloshing tank: "
                     "wave height at the wall; the device as specified, its damping re-solved "
                     "at each wind (spectral estimate)")
    return table


def sweep_table(result: dict) -> Table:
    """Return the structure-frequency sweep of ``tmd sweep``, every column with its unit.

    Parameters
    ----------
    result : dict
        results.json of ``tmd sweep`` (``sweep`` and ``sweep_bare`` rows).

    Returns
    -------
    rich.table.Table
    """
    table = Table(title=f"{result['case']['name']}: structure frequency sweep",
                  box=box.SIMPLE_HEAD)
    for name in ("frequency factor s [-]", "bare peak acc. [m/s²]", "design peak acc. [m/s²]",
                 "peak stroke [m]", "eff. damping ratio [-]"):
        table.add_column(escape(name), justify="right")  # "[m]" is a unit, not markup
    for bare, row in zip(result["sweep_bare"], result["sweep"], strict=True):
        table.add_row(f"{row['structure_frequency_factor']:.3f}",
                      f"{bare['peak_acceleration_m_s2']:.4f}",
                      f"{row['peak_acceleration_m_s2']:.4f}", f"{row['peak_stroke_m']:.3f}",
                      _cell(row.get("effective_damping_ratio"), "{:.4f}", None))
    return table


def verdict_line(result: dict, subject: str = "the given damper") -> tuple[str, str]:
    """Return one line stating the design block's verdict against the target, and its colour.

    Parameters
    ----------
    result : dict
        A results dictionary with ``design`` and ``target`` blocks.
    subject : str
        What the verdict is about, as the line names it.

    Returns
    -------
    text, colour : str
        The line, and "green" when the target is met, "red" when not, "yellow"
        when the results hold no verdict.
    """
    design, target = result.get("design"), result["target"]["peak_acceleration_m_s2"]
    if not design or design.get("meets_target") is None:
        return f"{subject}: no verdict against the target in the results", "yellow"
    peak = design["peak_acceleration_m_s2"]
    digits = 4
    while f"{peak:.{digits}g}" == f"{target:.{digits}g}" and peak != target and digits < 17:
        digits += 1  # a peak just past the target must not print as equal to it
    numbers = f"peak acceleration {peak:.{digits}g} m/s² against {target:.{digits}g} m/s²"
    if design["meets_target"]:
        return f"{subject} meets the target: {numbers}", "green"
    return f"{subject} does not meet the target: {numbers}", "red"


def accel(value: float) -> str:
    """Return an acceleration as printed: m/s^2 and milli-g.

    Parameters
    ----------
    value : float
        Acceleration [m/s^2].

    Returns
    -------
    str
        E.g. "0.1234 m/s² (12.6 milli-g)", with g the standard gravity.
    """
    return f"{value:.4f} m/s² ({1000 * value / STANDARD_GRAVITY:.1f} milli-g)"


def summary_table(result: dict) -> Table:
    """Return the design job's summary: the bare building against the recommended design.

    Parameters
    ----------
    result : dict
        results.json of ``tmd design`` (``bare``, ``target``, ``design`` and,
        where made, ``recommended`` and ``band_design``).

    Returns
    -------
    rich.table.Table
        Peak and rms acceleration and peak factor of both, then the damper's
        mass, tuning, spring, dashpot, stroke, force and effective damping.
    """
    table = Table(title=f"{result['case']['name']}", show_lines=False)
    table.add_column("quantity")
    table.add_column("bare building", justify="right")
    rec = result.get("recommended") or {}
    key = rec.get("design_key") or "design"
    label = {"band_design": "recommended: band-robust",
             "design": "recommended: nominal"}.get(key) if rec else "with damper"
    table.add_column(label, justify="right")
    bare, design = result["bare"], result.get(key)
    target = result["target"]["peak_acceleration_m_s2"]
    table.add_row("target peak acceleration", accel(target), "")
    table.add_row("peak acceleration", accel(bare["peak_acceleration_m_s2"]),
                  accel(design["peak_acceleration_m_s2"]) if design else "-")
    table.add_row("rms acceleration", f"{bare['sigma_acceleration_m_s2']:.4f} m/s²",
                  f"{design['sigma_acceleration_m_s2']:.4f} m/s²" if design else "-")
    table.add_row("peak factor", f"{bare['peak_factor']:.3f}",
                  f"{design['peak_factor']:.3f}" if design else "-")
    if design:
        rows = [
            ("mass ratio", f"{design['mass_ratio']:.5f}"),
            ("damper mass", f"{design['mass_kg'] / 1000:,.1f} t"),
            ("frequency ratio", f"{design['frequency_ratio']:.4f}"),
            ("damper frequency", f"{design['frequency_hz']:.4f} Hz"),
            ("damper damping ratio", f"{design['damping_ratio']:.4f}"),
            ("spring stiffness", f"{design['stiffness_n_per_m'] / 1000:,.1f} kN/m"),
            ("dashpot coefficient", f"{design['damping_n_s_per_m'] / 1000:,.2f} kN·s/m"),
            ("rms / peak stroke", f"{design['sigma_stroke_m']:.3f} / "
                                  f"{design['peak_stroke_m']:.3f} m (travel ±)"),
            ("peak damper force", f"{design['peak_damper_force_n'] / 1000:,.1f} kN"),
            ("effective damping (added)", f"{design['effective_damping_ratio']:.4f} "
                                          f"({design['added_damping_ratio']:.4f})"),
        ]
        for name, value in rows:
            table.add_row(name, "", value)
    return table


def return_period_table(result: dict) -> Table | None:
    """Return the design's peaks at each return period, with the stroke limit where set.

    Parameters
    ----------
    result : dict
        results.json of ``tmd design`` (``by_return_period``).

    Returns
    -------
    rich.table.Table or None
        One row per return period; None when the results have no such rows.
    """
    rows = result.get("by_return_period")
    if not rows:
        return None
    table = Table(title="per return period (design at the target's)")
    limited = any("stroke_within_limit" in (row.get("design") or {}) for row in rows)
    for name in ("return period", "bare peak acc.", "damped peak acc.", "peak stroke",
                 "peak damper force") + (("stroke limit",) if limited else ()):
        table.add_column(name, justify="right")
    for row in rows:
        d = row.get("design") or {}
        cells = [
            f"{row['return_period_years']:g} y", accel(row["bare"]["peak_acceleration_m_s2"]),
            accel(d["peak_acceleration_m_s2"]) if d else "-",
            f"{d['peak_stroke_m']:.3f} m" if d else "-",
            f"{d['peak_damper_force_n'] / 1000:,.1f} kN" if d else "-"]
        if limited:
            ok = d.get("stroke_within_limit")
            cells.append("-" if ok is None else "within" if ok else "[red]EXCEEDED[/]")
        table.add_row(*cells)
    return table


def end_stop_table(result: dict) -> Table | None:
    """Return the end-stop table: travel, stop contacts and connection-force estimate.

    Parameters
    ----------
    result : dict
        A results dictionary with an ``end_stops`` block.

    Returns
    -------
    rich.table.Table or None
        One row per return period; None when there is no ``end_stops`` block.
    """
    e = result.get("end_stops")
    if not e:
        return None
    table = Table(title=f"end-stops: travel ±{e['travel_m']:.3f} m ({e['travel_basis']})")
    for name in ("return period", "peak stroke", "contacts / hour / side",
                 "connection force (estimate)"):
        table.add_column(name, justify="right")
    for row in e["by_return_period"]:
        period = row["return_period_years"]
        table.add_row("design load" if period is None else f"{period:g} y",
                      f"{row['peak_stroke_m']:.3f} m",
                      f"{3600 * row['contact_rate_per_side_hz']:.3g}",
                      f"{row['connection_force_estimate_n'] / 1000:,.1f} kN")
    return table


def print_recommendation(result: dict) -> None:
    """Print which design is recommended, why, by which rule, and its end-stops.

    Parameters
    ----------
    result : dict
        results.json of ``tmd design``; nothing is printed without a
        ``recommended`` block.
    """
    rec = result.get("recommended")
    if not rec:
        return
    which = {"band_design": "the band-robust design", "design": "the nominal design",
             None: "no damper"}[rec["design_key"]]
    why = rec["why"]  # a clause; it starts a sentence here
    out_console.print(f"[bold]Recommended: {which}.[/] " + escape(why[:1].upper() + why[1:]),
                      highlight=False)
    out_console.print("[dim]Rule: " + escape(rec["rule"]) + ".[/]", highlight=False)
    if rec.get("end_stops") and (table := end_stop_table({"end_stops": rec["end_stops"]})):
        table.title = f"recommended design, {table.title}"
        out_console.print(table)


def print_end_stops(result: dict) -> None:
    """Print the end-stop table, the impact velocity and energy at the stops.

    Parameters
    ----------
    result : dict
        A results dictionary; nothing is printed without an ``end_stops`` block.
    """
    if (table := end_stop_table(result)) is None:
        return
    e = result["end_stops"]
    out_console.print(table)
    where = ("" if e["extreme_return_period_years"] is None
             else f" at {e['extreme_return_period_years']:g} years")
    out_console.print(
        f"impact velocity at the stops{where}: mean {e['impact_velocity_mean_m_s']:.2f} m/s, "
        f"{e['impact_velocity_rare_m_s']:.2f} m/s at 1 contact in "
        f"{1 / e['impact_velocity_rare_probability']:.0f} (Rayleigh); kinetic energy at the "
        f"mean {e['impact_energy_mean_j'] / 1000:,.1f} kJ", highlight=False)
    out_console.print("[dim]" + escape(e["note"]) + "[/]", highlight=False)


def print_notes(result: dict) -> None:
    """Print the results' warnings (to standard error) and cautions.

    Parameters
    ----------
    result : dict
        A results dictionary with ``cautions`` and, optionally, ``warnings``.
    """
    for message in result.get("warnings", []):
        err_console.print(f"[yellow]warning:[/] {escape(message)}", highlight=False)
    out_console.print("[dim]Cautions: " + escape(" ".join(result["cautions"])) + "[/]",
                      highlight=False)


def print_robustness(result: dict) -> None:
    """Print the nominal and robust designs across the band, and what robustness costs.

    Parameters
    ----------
    result : dict
        results.json of ``tmd design``; nothing is printed without a
        ``robustness_summary`` block.
    """
    summary = result.get("robustness_summary")
    if summary is None:
        return
    band = result["frequency_band"]
    table = Table(title=f"robustness: structure frequency within ±{100 * band:g}%")
    table.add_column("design")
    table.add_column("mass", justify="right")
    table.add_column("peak acc. at nominal", justify="right")
    table.add_column("worst peak acc. in band", justify="right")
    d = result["design"]
    table.add_row("nominal optimum", f"{d['mass_kg'] / 1000:,.1f} t",
                  accel(d["peak_acceleration_m_s2"]),
                  accel(result["peak_acceleration_band_max_m_s2"]))
    r = result.get("band_design")
    if r:
        label = ("robust (meets target across band)" if r["meets_target_across_band"]
                 else "robust (best across band; target NOT met)")
        table.add_row(label, f"{r['mass_kg'] / 1000:,.1f} t",
                      accel(r["peak_acceleration_m_s2"]),
                      accel(r["peak_acceleration_band_max_m_s2"]))
    out_console.print(table)
    notes = [f"the nominal design's worst peak in the band is "
             f"{100 * summary['nominal_band_loss']:.1f}% above its nominal peak"]
    if summary.get("robust_extra_mass_kg") is not None:
        notes.append(f"the robust design costs {summary['robust_extra_mass_kg'] / 1000:,.1f} t "
                     f"({100 * summary['robust_extra_mass_fraction']:.0f}%) more mass")
    p = result.get("probabilistic")
    if p:
        notes.append(f"probability of exceeding the target: nominal "
                     f"{p['nominal']['exceedance_probability']:.3f}"
                     + (f", robust {p['robust']['exceedance_probability']:.3f}"
                        if p.get("robust") else ""))
    out_console.print("; ".join(notes), highlight=False)


WIND_ROWS = (
    ("reference height z_s", "reference_height_m", "{:.1f} m"),
    ("mean speed v_m(z_s)", "mean_speed_m_s", "{:.2f} m/s"),
    ("turbulence intensity", "turbulence_intensity", "{:.3f}"),
    ("length scale L(z_s)", "length_scale_m", "{:.1f} m"),
    ("S_u at the mode's frequency", "wind_spectrum_at_mode_m2_s2_per_hz", "{:.4g} m²/s²/Hz"),
    ("aerodynamic damping ratio", "aerodynamic_damping_ratio", "{:.4f}"),
    ("background factor B²", "background_factor_sq", "{:.4f}"),
    ("resonance factor R²", "resonance_factor_sq", "{:.4f}"),
    ("size reduction R_h", "size_reduction_height", "{:.4f}"),
    ("size reduction R_b", "size_reduction_breadth", "{:.4f}"),
    ("total log decrement", "log_decrement_total", "{:.4f}"),
    ("up-crossing frequency", "upcrossing_hz", "{:.4f} Hz"),
    ("peak factor k_p", "peak_factor", "{:.3f}"),
    ("structural factor c_s c_d", "structural_factor", "{:.3f}"),
    ("acceleration peak factor", "peak_factor_acceleration", "{:.3f}"),
    ("EN Annex B rms acceleration", "sigma_acceleration_m_s2", "{:.4f} m/s²"),
    ("EN Annex B peak acceleration", "peak_acceleration_m_s2", "{:.4f} m/s²"),
    ("spectral rms acceleration", "spectral_sigma_acceleration_m_s2", "{:.4f} m/s²"),
    ("spectral peak acceleration", "spectral_peak_acceleration_m_s2", "{:.4f} m/s²"),
    ("across-wind spectral peak acceleration", "across_spectral_peak_acceleration_m_s2",
     "{:.4f} m/s²"),
    ("top speed U_H", "top_mean_speed_m_s", "{:.2f} m/s"),
    ("reduced velocity U_H/(f_s b)", "reduced_velocity", "{:.2f}"),
    ("critical speed v_crit = b f_s/St", "critical_speed_m_s", "{:.2f} m/s"),
    ("lock-in possible (v_crit <= 1.25 v_m)", "lock_in_possible", "{}"),
    ("rms lift coefficient C'_L", "rms_lift_coefficient", "{:.4f}"),
)


def print_simulation(result: dict) -> None:
    """Print one table per load: simulated maxima against the spectral peaks.

    Parameters
    ----------
    result : dict
        results.json of ``tmd simulate`` (its ``simulation`` block).
    """
    block = result["simulation"]
    for row in block["by_load"]:
        years = row.get("return_period_years")
        title = (f"{result['case']['name']}: {block['records']} simulated records of "
                 f"{block['duration_s']:g} s" + (f", {years:g}-year wind" if years else ""))
        table = Table(title=title)
        for name in ("response", "rms sim. / spectral", "mean max |x|", "Davenport",
                     "Vanmarcke", "sim. / Davenport"):
            table.add_column(name, justify="right")
        entries = [("bare acc. (m/s²)", row["bare"]["acceleration"], "m_s2"),
                   ("design acc. (m/s²)", row["design"]["acceleration"], "m_s2"),
                   ("stroke (m)", row["design"]["stroke"], "m")]
        for label, s, u in entries:
            table.add_row(label, f"{s[f'sigma_{u}'] / s[f'sigma_spectral_{u}']:.4f}",
                          f"{s[f'max_abs_mean_{u}']:.4g}", f"{s[f'davenport_peak_{u}']:.4g}",
                          f"{s[f'vanmarcke_peak_two_sided_{u}']:.4g}",
                          f"{s['max_abs_mean_to_davenport_ratio']:.3f}")
        out_console.print(table)
        acc = row["design"]["acceleration"]
        if "records_over_limit_fraction" in acc:
            out_console.print(f"records whose largest |a| exceeds the target: "
                              f"{100 * acc['records_over_limit_fraction']:.1f}%",
                              highlight=False)
        if "hourly_end_stop_contact_count" in row["design"]:
            contacts = row["design"]["hourly_end_stop_contact_count"]
            out_console.print(f"end-stop contacts: {contacts:.2f} per hour", highlight=False)


def print_building(result: dict) -> None:
    """Print a building's peaks per wind and point, its damper axes and governing cases.

    Parameters
    ----------
    result : dict
        results.json of the whole-building job (``points``, ``damper_axes``,
        ``governing``, ``sizing``).
    """
    table = Table(title=escape(f"{result['case']['name']}: peak accelerations [m/s²], design "
                               "return period"))
    for column in ("wind", "point", "bare resultant", "damped x", "damped y",
                   "damped resultant", "torsional share"):
        table.add_column(column, justify="left" if column in ("wind", "point") else "right")
    period = result["target"]["return_period_years"]
    for row in result["points"]:
        if row["return_period_years"] not in (period, None):
            continue
        d = row.get("damped", row["bare"])
        table.add_row(row["wind_direction"], row["point"],
                      f"{row['bare']['peak_resultant_m_s2']:.4f}",
                      *(f"{v:.4f}" for v in d["peak_acceleration_m_s2"]),
                      f"{d['peak_resultant_m_s2']:.4f}", f"{100 * d['torsional_share']:.0f}%")
    out_console.print(table)
    for axis in result["damper_axes"]:
        out_console.print(escape(
            f"{axis['damper']} {axis['direction']}: {axis['mass_kg'] / 1000:,.1f} t, "
            f"{axis['frequency_hz']:.4f} Hz, damping ratio {axis['damping_ratio']:.3f}, "
            f"peak stroke {axis['peak_stroke_m']:.3f} m, peak force "
            f"{axis['peak_force_n'] / 1000:,.0f} kN"), highlight=False)
    sizing = result["sizing"]
    for g in result["governing"]:
        period = g["return_period_years"]
        when = f"{period:g}-year" if period is not None else "design load"
        out_console.print(escape(f"governing, {when}: {g['point']}, wind {g['wind_direction']}, "
                                 f"{g['component']}, {accel(g['peak_acceleration_m_s2'])}"),
                          highlight=False)
    colour = "green" if sizing["meets_target"] else "red"
    out_console.print(f"[{colour}]{escape(sizing['message'])}[/]", highlight=False)
    print_notes(result)


def print_wind(result: dict) -> None:
    """Print the wind job's rows per return period and which route has aerodynamic damping.

    Parameters
    ----------
    result : dict
        results.json of ``tmd wind`` (its ``return_periods`` rows).
    """
    table = Table(title=f"{result['case']['name']}: bare building, code route and spectral route")
    table.add_column("quantity")
    for row in result["return_periods"]:
        table.add_column(f"{row['return_period_years']:g}-year", justify="right")
    rows = result["return_periods"]
    for label, key, fmt in WIND_ROWS:
        if all(key in row for row in rows):  # Annex B rows only where EN applies
            table.add_row(label, *(fmt.format(row[key]) for row in rows))
    out_console.print(table)
    if result.get("direction_of_response") == "across":
        out_console.print("The spectral route is across-wind (no aerodynamic damping).")
    else:
        out_console.print("[dim]Both along-wind routes include the aerodynamic damping of "
                          "EN 1991-1-4 (F.18); the across-wind row has none.[/]")


def print_retuned(result: dict, case_name: str) -> None:
    """Print the retune job's damper as installed and re-tuned, against the specified range.

    Parameters
    ----------
    result : dict
        Output of the retune job (its ``retuned`` block).
    case_name : str
        Name of the case, for the table's title.
    """
    r = result["retuned"]
    s = r["structure"]
    table = Table(title=f"{case_name}: re-tuning to the measured structure")
    for name in ("quantity", "as installed", "re-tuned", "specified range"):
        table.add_column(name, justify="right")
    inst = r["installed"]
    table.add_row("damper frequency", f"{inst['frequency_hz']:.4f} Hz",
                  f"{r['frequency_hz']:.4f} Hz",
                  f"{r['adjustment_frequency_min_hz']:.4f} .. "
                  f"{r['adjustment_frequency_max_hz']:.4f} Hz")
    table.add_row("spring stiffness", f"{inst['stiffness_n_per_m'] / 1000:,.1f} kN/m",
                  f"{r['stiffness_n_per_m'] / 1000:,.1f} kN/m",
                  f"{r['adjustment_stiffness_min_n_per_m'] / 1000:,.1f} .. "
                  f"{r['adjustment_stiffness_max_n_per_m'] / 1000:,.1f} kN/m")
    table.add_row("damper damping ratio", f"{inst['damping_ratio']:.4f}",
                  f"{r['damping_ratio']:.4f}", "")
    table.add_row("dashpot coefficient", f"{inst['damping_n_s_per_m'] / 1000:,.2f} kN·s/m",
                  f"{r['damping_n_s_per_m'] / 1000:,.2f} kN·s/m", "")
    table.add_row("peak acceleration", accel(r["peak_acceleration_before_m_s2"]),
                  accel(r["peak_acceleration_after_m_s2"]), "")
    table.add_row("peak stroke", f"{r['peak_stroke_before_m']:.3f} m",
                  f"{r['peak_stroke_after_m']:.3f} m", "")
    out_console.print(table)
    verdict = ("within" if r["within_adjustment_range"] else "OUTSIDE")
    out_console.print(
        f"measured structure: f = {s['frequency_hz']:.4f} Hz, M* = {s['modal_mass_kg']:,.0f} kg, "
        f"damping {s['structural_damping_ratio']:.4f} ({s['damping_source']}) + aerodynamic "
        f"{s['aerodynamic_damping_ratio']:.4f} at the design wind; the re-tuned damper is "
        f"{verdict} the specified adjustment range (±{100 * r['adjustment_band']:g}%)",
        highlight=False)
    out_console.print("[dim]" + escape(r["damping_note"]) + "[/]", highlight=False)
    for message in r["warnings"]:
        err_console.print(f"[yellow]warning:[/] {escape(message)}", highlight=False)
    out_console.print("[dim]Cautions: " + escape(" ".join(r["cautions"])) + "[/]",
                      highlight=False)


def print_identified(result: dict, record_name: str) -> None:
    """Print the identified mode by each method, the spread, and the retune command to use.

    Parameters
    ----------
    result : dict
        Output of the identify job (``tmd identify --json``).
    record_name : str
        Name of the acceleration record, for the table's title.
    """
    table = Table(title=f"{record_name}: identified mode ({result['duration_s']:.0f} s record)")
    for name in ("method", "frequency", "damping ratio"):
        table.add_column(name, justify="right")
    for m in result["methods"]:
        table.add_row(m["method"], f"{m['frequency_hz']:.5f} Hz", f"{m['damping_ratio']:.5f}")
    table.add_row("reported", f"{result['frequency_hz']:.5f} Hz", f"{result['damping_ratio']:.5f}")
    out_console.print(table)
    out_console.print(
        f"spread between the methods: frequency {100 * result['frequency_spread']:.2f}%, damping "
        f"{100 * result['damping_spread']:.1f}%; expected random error for this record (Au's "
        f"law): frequency {100 * result['predicted_frequency_cov']:.2f}%, damping "
        f"{100 * result['predicted_damping_cov']:.0f}%", highlight=False)
    out_console.print(escape(f"use: tmd retune CASE --design-from results.json "
                             f"--measured-frequency-hz {result['frequency_hz']:.6g} "
                             f"--measured-damping-ratio {result['damping_ratio']:.6g}"),
                      highlight=False, soft_wrap=True)
    out_console.print("[dim]" + escape(result["damping_note"]) + "[/]", highlight=False)
    for message in result["warnings"]:
        err_console.print(f"[yellow]warning:[/] {escape(message)}", highlight=False)
    # Imported here: tmd.schema pulls the damper models (numpy), which --help does not need.
    from tmd.schema import CAUTIONS

    out_console.print("[dim]Cautions: " + escape(" ".join(CAUTIONS)) + "[/]", highlight=False)
