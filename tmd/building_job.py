"""The whole-building design job: least damper mass, then every response block.

Returns the plain dictionary written as results.json for a whole-building
case (:mod:`tmd.building_case`), and its CSV tables. Keys end with their SI
unit; dimensionless keys have none. The one-mode job (:mod:`tmd.jobs`) and
its keys are untouched.
"""

from __future__ import annotations

import csv
import io
import math
import warnings

import numpy as np

from tmd._version import __version__
from tmd.building_case import BuildingCase
from tmd.building_design import (
    BuildingSizing,
    assess_loads,
    least_building_mass,
    starting_tuning,
)
from tmd.building_response import BuildingAssessment, assess_base, axis_absorbers
from tmd.dampers.absorber import Absorbers
from tmd.schema import CAUTIONS, SCHEMA_VERSION

TWO_PI = 2.0 * math.pi
BUILDING_CAUTIONS = (
    "Resultant peaks come from the joint Gaussian process of the two components (Belyaev's "
    "out-crossing rate with a clumping correction); component peaks use Davenport's factor.",
    "Damper masses are point masses: their own rotational inertia is neglected.",
)


def _bare_absorbers(case: BuildingCase) -> Absorbers:
    if not case.model.dampers:
        return Absorbers.none()
    return axis_absorbers(case.model, 0.0, *starting_tuning(case.model, 1.0))


def building_design_job(case: BuildingCase) -> dict:
    """Size the dampers of a whole-building case and report every point and direction.

    Parameters
    ----------
    case : BuildingCase
        The validated case.

    Returns
    -------
    dict
        The results.json content (see the README, "Whole-building results").
    """
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        result = _build(case)
    result["warnings"] = list(dict.fromkeys(str(w.message) for w in caught))
    result["cautions"] = list(CAUTIONS) + list(BUILDING_CAUTIONS)
    return result


def _build(case: BuildingCase) -> dict:
    model = case.model
    sizing = _size(case)
    tuning = sizing.tuning
    designed = (axis_absorbers(model, tuning.total_mass_kg, tuning.frequency_hz,
                               tuning.damping_ratio) if tuning is not None else None)
    rows, axis_rows, damper_rows, governing_rows = [], [], [], []
    for period, loads in case.loads_by_period.items():
        bare = assess_loads(model, list(loads), case.duration_s, _bare_absorbers(case))
        damped = (assess_loads(model, list(loads), case.duration_s, designed)
                  if designed is not None else [None] * len(loads))
        governing = None
        for load, b, d in zip(loads, bare, damped, strict=True):
            for p, point in enumerate(model.plan.points):
                row = {"return_period_years": period, "wind_direction": load.name,
                       "point": point.name, "bare": _point_block(b, p)}
                if d is not None:
                    row["damped"] = _point_block(d, p)
                rows.append(row)
                final = row.get("damped", row["bare"])
                worst = max(final["peak_resultant_m_s2"], *final["peak_acceleration_m_s2"])
                if governing is None or worst > governing["peak_acceleration_m_s2"]:
                    component = ("resultant" if worst == final["peak_resultant_m_s2"] else
                                 "xy"[int(np.argmax(final["peak_acceleration_m_s2"]))])
                    governing = {"point": point.name, "wind_direction": load.name,
                                 "return_period_years": period, "component": component,
                                 "peak_acceleration_m_s2": worst}
        governing_rows.append(governing)
    base_rows = _base_blocks(case, designed)
    if designed is not None:
        damped = assess_loads(model, list(case.design_loads), case.duration_s, designed)
        axis_rows = _axis_blocks(case, tuning, damped)
        damper_rows = _damper_blocks(case, tuning, damped)
    modes = [{"name": m.name, "frequency_hz": m.frequency_hz, "damping_ratio": m.damping_ratio,
              ("generalised_mass_kg_m2" if m.is_torsional else "generalised_mass_kg"):
              m.generalised_mass} for m in model.modes]
    return {
        "tool_version": __version__,
        "schema_version": SCHEMA_VERSION,
        "case": {"name": case.name, "path": str(case.path), "inputs": case.inputs},
        "kind": "building",
        "target": {"peak_acceleration_m_s2": case.target_peak_m_s2,
                   "duration_s": case.duration_s,
                   "return_period_years": case.target_return_period_years,
                   "applies_to": "x, y and the resultant at every point, direction and load"},
        "building": {"modes": modes,
                     "plan_origin_m": [model.plan.origin_x_m, model.plan.origin_y_m],
                     "evaluation_height_m": model.plan.evaluation_height_m,
                     "points": [{"name": p.name, "x_m": p.x_m, "y_m": p.y_m}
                                for p in model.plan.points],
                     "wind_directions": list(case.directions),
                     "load_notes": list(case.notes)},
        "sizing": {"meets_target": sizing.met, "governed_by": sizing.governed_by,
                   "message": sizing.message,
                   "total_mass_kg": tuning.total_mass_kg if tuning is not None else 0.0},
        "damper_axes": axis_rows,
        "dampers": damper_rows,
        "points": rows,
        "governing": governing_rows,
    } | ({"base_moments": base_rows} if base_rows is not None else {})


def _base_blocks(case: BuildingCase, designed) -> list[dict] | None:
    """Return the base moments per return period and wind direction, bare and damped."""
    model = case.model
    if model.mass is None:
        return None
    rows = []
    for period, loads in case.loads_by_period.items():
        for load in loads:
            row = {"return_period_years": period, "wind_direction": load.name}
            for state, absorbers in (("bare", _bare_absorbers(case)), ("damped", designed)):
                if absorbers is None:
                    continue
                b = assess_base(model, load.spectrum, case.duration_s, absorbers,
                                damping_ratio=load.damping_ratio)
                row[state] = {"names": list(b.names),
                              "sigma_moment_n_m": [float(v) for v in b.sigma_n_m],
                              "peak_moment_n_m": [float(v) for v in b.peak_n_m]}
            rows.append(row)
    return rows


def _size(case: BuildingCase) -> BuildingSizing:
    return least_building_mass(case.model, list(case.design_loads), case.duration_s,
                               case.target_peak_m_s2, case.max_mass_kg or 0.0)


def _point_block(a: BuildingAssessment, p: int) -> dict:
    return {
        "sigma_acceleration_m_s2": [float(v) for v in a.sigma_acceleration_m_s2[p]],
        "peak_acceleration_m_s2": [float(v) for v in a.peak_acceleration_m_s2[p]],
        "sigma_resultant_m_s2": float(a.sigma_resultant_m_s2[p]),
        "peak_resultant_m_s2": float(a.peak_resultant_m_s2[p]),
        "torsional_share": float(a.torsional_share[p]),
    }


def _axis_blocks(case: BuildingCase, tuning, damped: list[BuildingAssessment]) -> list[dict]:
    model = case.model
    shares = [model.dampers[j].mass_share for j, _ in model.axes()]
    mu = model.effective_mass_ratios(tuning.total_mass_kg)
    rows = []
    for a, (j, direction) in enumerate(model.axes()):
        mass = tuning.total_mass_kg * shares[a]
        omega = TWO_PI * float(tuning.frequency_hz[a])
        zeta = float(tuning.damping_ratio[a])
        rows.append({
            "damper": model.dampers[j].name, "direction": direction, "mass_kg": mass,
            "frequency_hz": float(tuning.frequency_hz[a]), "damping_ratio": zeta,
            "stiffness_n_per_m": mass * omega**2, "damping_n_s_per_m": 2 * zeta * mass * omega,
            "sigma_stroke_m": max(float(d.sigma_stroke_m[a]) for d in damped),
            "peak_stroke_m": max(float(d.peak_stroke_m[a]) for d in damped),
            "peak_force_n": max(float(d.peak_force_n[a]) for d in damped),
            # In the order of building.modes (a list: mode names are not unit-suffixed keys).
            "effective_mass_ratio": [float(mu[a, i]) for i in range(len(model.modes))],
        })
    return rows


def _damper_blocks(case: BuildingCase, tuning, damped: list[BuildingAssessment]) -> list[dict]:
    out = []
    for j, d in enumerate(case.model.dampers):
        out.append({"name": d.name, "x_m": d.x_m, "y_m": d.y_m, "height_m": d.height_m,
                    "axes": d.axes, "mass_kg": tuning.total_mass_kg * d.mass_share,
                    "max_stroke_m": d.max_stroke_m,
                    "peak_plan_stroke_m": max(float(a.peak_plan_stroke_m[j]) for a in damped)})
    return out


def building_tables(result: dict) -> dict[str, str]:
    """CSV tables of a whole-building result: points and damper axes.

    Parameters
    ----------
    result : dict
        From :func:`building_design_job`.

    Returns
    -------
    dict
        File name -> CSV text.
    """
    points = io.StringIO()
    writer = csv.writer(points)
    writer.writerow(["return_period_years", "wind_direction", "point", "state",
                     "sigma_x_m_s2", "sigma_y_m_s2", "peak_x_m_s2", "peak_y_m_s2",
                     "sigma_resultant_m_s2", "peak_resultant_m_s2", "torsional_share"])
    for row in result["points"]:
        for state in ("bare", "damped"):
            if state not in row:
                continue
            b = row[state]
            writer.writerow([row["return_period_years"], row["wind_direction"], row["point"],
                             state, *(f"{v:.6g}" for v in b["sigma_acceleration_m_s2"]),
                             *(f"{v:.6g}" for v in b["peak_acceleration_m_s2"]),
                             f"{b['sigma_resultant_m_s2']:.6g}",
                             f"{b['peak_resultant_m_s2']:.6g}", f"{b['torsional_share']:.4f}"])
    axes = io.StringIO()
    writer = csv.writer(axes)
    keys = ["damper", "direction", "mass_kg", "frequency_hz", "damping_ratio",
            "stiffness_n_per_m", "damping_n_s_per_m", "sigma_stroke_m", "peak_stroke_m",
            "peak_force_n"]
    writer.writerow(keys)
    for row in result["damper_axes"]:
        writer.writerow([row[k] if isinstance(row[k], str) else f"{row[k]:.6g}" for k in keys])
    tables = {"tables/building_points.csv": points.getvalue(),
              "tables/damper_axes.csv": axes.getvalue()}
    if "base_moments" in result:
        base = io.StringIO()
        writer = csv.writer(base)
        writer.writerow(["return_period_years", "wind_direction", "state", "output",
                         "sigma_n_m", "peak_n_m"])
        for row in result["base_moments"]:
            for state in ("bare", "damped"):
                if state in row:
                    b = row[state]
                    for name, sigma, peak in zip(b["names"], b["sigma_moment_n_m"],
                                                 b["peak_moment_n_m"], strict=True):
                        writer.writerow([row["return_period_years"], row["wind_direction"],
                                         state, name, f"{sigma:.6g}", f"{peak:.6g}"])
        tables["tables/base_moments.csv"] = base.getvalue()
    return tables
