"""The simulate job: a Monte Carlo check of a design in the time domain."""

from __future__ import annotations

import numpy as np

from tmd.case import Case
from tmd.dampers.absorber import Absorbers
from tmd.dampers.liquid_column import column_damping_gain
from tmd.design import LoadedMode
from tmd.jobs.shared import header_block, loaded_mode_of, target_block, with_notes
from tmd.simulation import simulate
from tmd.sizing.liquid_column import velocity_proportional_fixed_point
from tmd.timehistory import NonlinearAbsorber


def simulation_job(case: Case, device: dict, settings, *, end_stop_travel_m: float | None = None
                   ) -> tuple[dict, dict]:
    """Monte Carlo check of a design at every load of the case (time domain).

    Parameters
    ----------
    case : Case
        The case the design was made for.
    device : dict
        ``{"kind": "tmd", "damper": TunedMassDamper}`` or ``{"kind":
        "liquid-column", "row": <the option row of a compare results.json>}``.
    settings : tmd.simulation.SimulationSettings
        Records, duration, step and seed.
    end_stop_travel_m : float, optional
        Travel +-a of end-stops on the TMD's stroke [m]; none when omitted.

    Returns
    -------
    result : dict
        results.json with a ``simulation`` block: per load (each return
        period of a wind case, else the design load) the bare and damped
        statistics.
    history : dict
        One record's time history at the design load, for the CSV.
    """
    holder = {}

    def build():
        loads = [(w.return_period_years, w) for w in case.wind_loads] or [(None, None)]
        rows = []
        for years, wind_load in loads:
            load = loaded_mode_of(case, wind_load)
            m = load.mode
            absorbers, nonlinear, linear_zeta, freeboard = _simulated_device(
                load, device, end_stop_travel_m)
            common = (m.frequency_hz, m.modal_mass_kg, m.damping_ratio)
            limit = case.target_peak_m_s2 if years == case.target_return_period_years else None
            bare = simulate(*common, Absorbers.none(), load.spectrum, settings,
                            shape_factor=load.shape_factor)
            damped = simulate(*common, absorbers, load.spectrum, settings,
                              shape_factor=load.shape_factor, nonlinear=nonlinear,
                              linear_damping_ratio=linear_zeta)
            row = {"bare": {"acceleration": bare.acceleration.summary("m_s2", limit)},
                   "design": _simulated_design(damped, limit, case, freeboard),
                   "record_period_s": damped.period_s, "time_step_s": damped.time_step_s}
            if years is not None:
                row = {"return_period_years": years,
                       "mean_speed_m_s": wind_load.mean_speed_m_s} | row
            rows.append(row)
            if years == case.target_return_period_years:
                holder["history"] = damped.history
                holder["maxima"] = {"design": damped.acceleration.maxima_abs.tolist(),
                                    "bare": bare.acceleration.maxima_abs.tolist()}
        block = {"records": settings.records, "duration_s": settings.duration_s,
                 "seed": settings.seed, "device": device["kind"],
                 "method": "spectral representation (Shinozuka & Deodatis 1991), exact "
                           "first-order-hold integration from the periodic steady state",
                 "by_load": rows}
        return header_block(case) | {"target": target_block(case), "simulation": block}

    result = with_notes(build, case)
    return result, holder


def _simulated_device(load: LoadedMode, device: dict, end_stop_travel_m):
    """Absorbers, nonlinear elements, integrated damping and freeboard of a device."""
    m = load.mode
    if device["kind"] == "tmd":
        d = device["damper"]
        absorbers = d.absorbers(m)  # one design (batch shape ()), one absorber
        if end_stop_travel_m is None:
            return absorbers, None, None, None
        return absorbers, NonlinearAbsorber(np.zeros(1), np.full(1, end_stop_travel_m)), None, None
    row = device["row"]
    length = row["dimensions"]["liquid_length_m"]
    gain = float(column_damping_gain(row["head_loss_coefficient"], length, row["frequency_hz"]))
    zeta, _ = velocity_proportional_fixed_point(load, row["mass_kg"], row["frequency_hz"],
                                                row["length_ratio"], gain)
    absorbers = Absorbers(np.array([row["mass_kg"]]), np.array([row["frequency_hz"]]),
                          np.asarray(zeta, float).reshape(1), np.array([row["length_ratio"]]))
    travel = end_stop_travel_m if end_stop_travel_m is not None else np.inf
    nonlinear = NonlinearAbsorber(np.array([row["head_loss_coefficient"] / (2.0 * length)]),
                                  np.full(1, travel))
    freeboard = (row["dimensions"]["vertical_leg_height_m"]
                 - row["dimensions"]["vertical_liquid_height_m"])
    return absorbers, nonlinear, np.zeros(1), freeboard


def _simulated_design(sim, limit, case: Case, freeboard_m):
    """Return the damped statistics block of one load."""
    stroke_limit = case.damper.max_stroke_m
    block = {"acceleration": sim.acceleration.summary("m_s2", limit),
             "stroke": sim.stroke.summary("m", freeboard_m if freeboard_m is not None
                                          else stroke_limit),
             "damper_force": sim.force.summary("n")}
    if freeboard_m is not None:
        # The liquid rises in a leg by its displacement along the column.
        block["freeboard_m"] = freeboard_m
        block["overflow_record_fraction"] = float(np.mean(sim.stroke.maxima_abs > freeboard_m))
    if sim.stop_contacts_per_hour is not None:
        block["hourly_end_stop_contact_count"] = sim.stop_contacts_per_hour
        block["end_stop_contact_record_fraction"] = sim.records_with_stop_contact
    if sim.step_check_change is not None:
        block["step_halving_stroke_rms_change_fraction"] = sim.step_check_change
    return block
