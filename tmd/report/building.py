"""The whole-building report: points, directions, damper axes, governing case.

Renders a whole-building results dictionary (:mod:`tmd.building_job`) as a
self-contained HTML document with the shared helpers of :mod:`tmd.report.html`.
Every number in a table is a results value with its key path, as in the
one-mode report. It adds one figure: the corner resultants, bare and damped,
per wind direction.
"""

from __future__ import annotations

from tmd.report.html import Callout, Figure, Section, document
from tmd.report.plots import new_axes, png_bytes
from tmd.report.tables import MILLI_G, Cell, Table


def building_report(results: dict, *, dpi: int = 150) -> dict[str, bytes]:
    """report.html for a whole-building result.

    Parameters
    ----------
    results : dict
        From :func:`tmd.building_job.building_design_job`.
    dpi : int
        Figure resolution [dots per inch].

    Returns
    -------
    dict
        ``{"report.html": bytes}``.
    """
    sizing = results["sizing"]
    target = results["target"]
    lead = (f"Whole-building damper sizing: {len(results['building']['modes'])} modes, "
            f"{len(results['building']['points'])} evaluation points at "
            f"{results['building']['evaluation_height_m']:g} m. Preliminary sizing only.")
    sections = [
        Section("Outcome", [Callout(sizing["message"]), _governing_table(results)]),
        Section("Building and loads", [_modes_table(results)]
                + list(results["building"]["load_notes"])),
        Section("Damper axes", [_axes_table(results), _dampers_table(results)]),
        Section("Accelerations at the evaluation points", [
            f"Target: peak {target['peak_acceleration_m_s2']:g} m/s² over "
            f"{target['duration_s']:g} s for x, y and the resultant at every point and wind "
            "direction.", _points_table(results), _figure(results, dpi)]),
        Section("Cautions", [list(results["cautions"]) + list(results.get("warnings", []))]),
    ]
    if "base_moments" in results:
        sections.insert(-1, Section("Base moments", [_base_table(results)]))
    html = document(results["case"]["name"], lead, sections)
    return {"report.html": html.encode("utf-8")}


def _governing_table(results):
    rows = []
    for k, g in enumerate(results["governing"]):
        key = f"governing.{k}"
        rows.append([Cell(g["return_period_years"], f"{key}.return_period_years"),
                     Cell(g["point"], f"{key}.point"),
                     Cell(g["wind_direction"], f"{key}.wind_direction"),
                     Cell(g["component"], f"{key}.component"),
                     Cell(g["peak_acceleration_m_s2"], f"{key}.peak_acceleration_m_s2"),
                     Cell(g["peak_acceleration_m_s2"], f"{key}.peak_acceleration_m_s2",
                          MILLI_G)])
    return Table("governing", "Governing point, direction and component",
                 [Cell(h) for h in ("return period [years]", "point", "wind", "component",
                                    "peak [m/s²]", "peak [milli-g]")], rows)


def _modes_table(results):
    rows = []
    for k, m in enumerate(results["building"]["modes"]):
        mass_key = "generalised_mass_kg_m2" if "generalised_mass_kg_m2" in m else \
            "generalised_mass_kg"
        rows.append([Cell(m["name"], f"building.modes.{k}.name"),
                     Cell(m["frequency_hz"], f"building.modes.{k}.frequency_hz"),
                     Cell(m["damping_ratio"], f"building.modes.{k}.damping_ratio"),
                     Cell(m[mass_key], f"building.modes.{k}.{mass_key}"),
                     Cell("kg m²" if mass_key.endswith("m2") else "kg")])
    return Table("modes", "Modes", [Cell(h) for h in (
        "mode", "frequency [Hz]", "damping ratio", "generalised mass", "unit")], rows)


def _axes_table(results):
    keys = ("mass_kg", "frequency_hz", "damping_ratio", "stiffness_n_per_m",
            "damping_n_s_per_m", "sigma_stroke_m", "peak_stroke_m", "peak_force_n")
    rows = []
    for k, a in enumerate(results["damper_axes"]):
        rows.append([Cell(f"{a['damper']} {a['direction']}")]
                    + [Cell(a[key], f"damper_axes.{k}.{key}") for key in keys])
    return Table("damper-axes", "Per damper axis (worst wind direction for strokes and forces)",
                 [Cell(h) for h in ("axis", "mass [kg]", "frequency [Hz]", "damping ratio",
                                    "spring [N/m]", "dashpot [N·s/m]", "rms stroke [m]",
                                    "peak stroke [m]", "peak force [N]")], rows,
                 note="Damping ratio referred to the axis's own frequency; strokes are "
                      "one-sided peaks relative to the structure.")


def _dampers_table(results):
    rows = []
    for k, d in enumerate(results["dampers"]):
        rows.append([Cell(d["name"], f"dampers.{k}.name"), Cell(d["axes"], f"dampers.{k}.axes"),
                     Cell(d["x_m"], f"dampers.{k}.x_m"), Cell(d["y_m"], f"dampers.{k}.y_m"),
                     Cell(d["height_m"], f"dampers.{k}.height_m"),
                     Cell(d["mass_kg"], f"dampers.{k}.mass_kg"),
                     Cell(d["peak_plan_stroke_m"], f"dampers.{k}.peak_plan_stroke_m"),
                     Cell(d["max_stroke_m"], f"dampers.{k}.max_stroke_m")])
    return Table("dampers", "Dampers", [Cell(h) for h in (
        "damper", "axes", "x [m]", "y [m]", "height [m]", "mass [kg]",
        "peak plan stroke [m]", "stroke limit [m]")], rows)


def _points_table(results):
    rows = []
    for k, row in enumerate(results["points"]):
        state = "damped" if "damped" in row else "bare"
        b, d = row["bare"], row[state]
        key = f"points.{k}"
        peak = f"{key}.{state}.peak_acceleration_m_s2"
        rows.append([Cell(row["return_period_years"], f"{key}.return_period_years"),
                     Cell(row["wind_direction"], f"{key}.wind_direction"),
                     Cell(row["point"], f"{key}.point"),
                     Cell(b["peak_resultant_m_s2"], f"{key}.bare.peak_resultant_m_s2"),
                     Cell(d["peak_acceleration_m_s2"][0], f"{peak}.0"),
                     Cell(d["peak_acceleration_m_s2"][1], f"{peak}.1"),
                     Cell(d["sigma_resultant_m_s2"], f"{key}.{state}.sigma_resultant_m_s2"),
                     Cell(d["peak_resultant_m_s2"], f"{key}.{state}.peak_resultant_m_s2"),
                     Cell(d["torsional_share"], f"{key}.{state}.torsional_share")])
    return Table("points", "Peak accelerations per return period, wind direction and point",
                 [Cell(h) for h in ("return period [years]", "wind", "point",
                                    "bare resultant peak [m/s²]", "peak x [m/s²]",
                                    "peak y [m/s²]", "rms resultant [m/s²]",
                                    "resultant peak [m/s²]", "torsional share")], rows,
                 note="x, y and resultant columns are with the dampers (bare when none are "
                      "sized). Torsional share: rms of the rotation's part of the resultant "
                      "over the rms resultant.")


def _base_table(results):
    rows = []
    for k, row in enumerate(results["base_moments"]):
        for state in ("bare", "damped"):
            if state not in row:
                continue
            b = row[state]
            for i, name in enumerate(b["names"]):
                key = f"base_moments.{k}.{state}"
                rows.append([Cell(row["return_period_years"], f"base_moments.{k}."
                                  "return_period_years"),
                             Cell(row["wind_direction"], f"base_moments.{k}.wind_direction"),
                             Cell(state), Cell(name, f"{key}.names.{i}"),
                             Cell(b["sigma_moment_n_m"][i], f"{key}.sigma_moment_n_m.{i}"),
                             Cell(b["peak_moment_n_m"][i], f"{key}.peak_moment_n_m.{i}")])
    return Table("base-moments", "Base overturning moments and torque", [Cell(h) for h in (
        "return period [years]", "wind", "state", "output", "rms [N·m]", "peak [N·m]")], rows,
        note="Fluctuating part (no mean), from the modes' elastic forces: omega_i^2 q_i times "
             "the first moment of the mass per height in the mode shape, mass centres at the "
             "plan origin. Modes not given carry nothing here.")


def _figure(results, dpi):
    ax = new_axes()
    labels, bare, damped = [], [], []
    period = results["target"]["return_period_years"]
    for row in results["points"]:
        if row["return_period_years"] not in (period, None):
            continue
        labels.append(f"{row['wind_direction']}\n{row['point']}")
        bare.append(row["bare"]["peak_resultant_m_s2"])
        damped.append(row.get("damped", row["bare"])["peak_resultant_m_s2"])
    x = range(len(labels))
    ax.bar([i - 0.2 for i in x], bare, width=0.4, label="bare")
    ax.bar([i + 0.2 for i in x], damped, width=0.4, label="with dampers")
    ax.axhline(results["target"]["peak_acceleration_m_s2"], color="k", ls="--", label="target")
    ax.set_xticks(list(x))
    ax.set_xticklabels(labels, fontsize=6, rotation=60)
    ax.set_ylabel("peak resultant acceleration [m/s²]")
    ax.legend()
    return Figure("resultants", png_bytes(ax, dpi=dpi),
                  "Peak resultant acceleration at each point and wind direction, design "
                  "return period.")
