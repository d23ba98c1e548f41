"""A results dictionary with every optional section, built from real engine calls.

The wind (``by_return_period``, ``wind``), robustness (``sweep``,
``sweep_bare``, ``sweep_damper_frequency``, ``sweep_damper_damping``,
``peak_acceleration_band_max_m_s2``, ``band_design``, ``probabilistic``) and
options (``options``) parts use the keys documented in issues 3-5. Their
numbers come from the engine on the demo case (scaled spectra stand in for
other return periods), so the report is exercised on realistic values; they
are not a check of those helpers' libraries.
"""

from __future__ import annotations

from dataclasses import asdict
from pathlib import Path

import numpy as np

from tmd.dampers.absorber import Absorbers
from tmd.dampers.tuned_mass import TunedMassDamper
from tmd.design import LoadedMode, bare_response, evaluate_tmd, tune
from tmd.jobs import design_job, loaded_mode_of
from tmd.jobs.figure_series import detuned_sweep
from tmd.performance import assess, effective_damping_ratio
from tmd.schema import design_block
from tmd.spectra import TabulatedSpectrum

ROOT = Path(__file__).resolve().parents[2]
DEMO_CASE = ROOT / "cases" / "harbourline_residences.toml"
# Load scale per return period: stands in for the wind model's spectra (the
# modal force PSD grows roughly with U^4, U from the probability factor).
PERIOD_SCALE = {1.0: 1.0, 10.0: 2.1, 50.0: 3.2}
BAND = 0.15
FACTORS = np.round(np.linspace(0.8, 1.2, 17), 6)


def scaled(load: LoadedMode, factor: float) -> LoadedMode:
    spectrum = load.spectrum
    return LoadedMode(load.mode, TabulatedSpectrum(spectrum.frequency_hz,
                                                 spectrum.psd_n2_per_hz * factor),
                    load.duration_s, load.shape_factor)


def sweep_rows(load: LoadedMode, absorbers_of, factors, key):
    m = load.mode
    a = assess(m.frequency_hz * (factors if key == "structure_frequency_factor" else 1.0),
               m.modal_mass_kg, m.damping_ratio, absorbers_of(factors), load.spectrum,
               load.duration_s)
    zeta = effective_damping_ratio(m.frequency_hz, m.modal_mass_kg,
                                   np.asarray(a.sigma_acceleration_m_s2), load.spectrum)
    strokes = (a.peak_stroke_m[:, 0] if a.peak_stroke_m.shape[-1] else
               np.zeros_like(factors))
    return [{key: float(s), "peak_acceleration_m_s2": float(p), "peak_stroke_m": float(r),
             "effective_damping_ratio": float(z)}
            for s, p, r, z in zip(factors, a.peak_acceleration_m_s2, strokes,
                                  np.broadcast_to(zeta, factors.shape), strict=True)]


def fixed_damper(design: dict, mass=1.0, frequency=None, damping=None):
    def absorbers(factors):
        shape = factors.shape + (1,)
        f = design["frequency_hz"] * (frequency(factors) if frequency else 1.0)
        z = design["damping_ratio"] * (damping(factors) if damping else 1.0)
        return Absorbers.tuned_masses(np.full(shape, design["mass_kg"] * mass),
                                      np.broadcast_to(np.asarray(f)[..., None], shape),
                                      np.broadcast_to(np.asarray(z)[..., None], shape))
    return absorbers


def full_results(case, results=None) -> dict:
    """design_job's results (given, or computed) plus every optional section (documented keys)."""
    results = design_job(case) if results is None else results
    load = loaded_mode_of(case)
    design = results["design"]
    damper = TunedMassDamper(design["mass_ratio"], design["frequency_ratio"],
                             design["damping_ratio"])
    results["target"]["return_period_years"] = 1.0

    periods = []
    for period, factor in PERIOD_SCALE.items():
        lc = scaled(load, factor)
        d = evaluate_tmd(lc, damper, case.target_peak_m_s2)
        periods.append({"return_period_years": period, "bare": asdict(bare_response(lc)),
                        "design": {k: getattr(d, k) for k in (
                            "peak_acceleration_m_s2", "peak_stroke_m", "peak_damper_force_n")}})
    results["by_return_period"] = periods
    results["wind"] = {"return_periods": [
        {"return_period_years": p["return_period_years"],
         "peak_acceleration_m_s2": 1.1 * p["bare"]["peak_acceleration_m_s2"],
         "peak_factor": p["bare"]["peak_factor"],
         "upcrossing_hz": p["bare"]["upcrossing_hz"],
         "spectral_peak_acceleration_m_s2": p["bare"]["peak_acceleration_m_s2"],
         "spectral_sigma_acceleration_m_s2": p["bare"]["sigma_acceleration_m_s2"]}
        for p in periods]}

    results["sweep"] = sweep_rows(load, fixed_damper(design), FACTORS,
                                  "structure_frequency_factor")
    results["sweep_bare"] = sweep_rows(load, lambda s: Absorbers.none(s.shape), FACTORS,
                                       "structure_frequency_factor")
    results["sweep_damper_frequency"] = sweep_rows(
        load, fixed_damper(design, frequency=lambda s: s), np.array([0.9, 1.0, 1.1]),
        "damper_frequency_factor")
    results["sweep_damper_damping"] = sweep_rows(
        load, fixed_damper(design, damping=lambda s: s), np.array([0.7, 1.0, 1.3]),
        "damper_damping_factor")
    inside = [r for r in results["sweep"]
              if abs(r["structure_frequency_factor"] - 1) <= BAND + 1e-9]
    results["peak_acceleration_band_max_m_s2"] = max(r["peak_acceleration_m_s2"] for r in inside)

    mu = 1.4 * design["mass_ratio"]
    t = tune(load, mu, max_stroke_m=case.damper.max_stroke_m)
    robust = design_block(evaluate_tmd(load, TunedMassDamper(mu, t.frequency_ratio,
                                                             1.3 * t.damping_ratio),
                                       case.target_peak_m_s2))
    robust_rows = sweep_rows(load, fixed_damper(robust), FACTORS, "structure_frequency_factor")
    robust["frequency_band"] = BAND
    robust["peak_acceleration_band_max_m_s2"] = max(
        r["peak_acceleration_m_s2"] for r in robust_rows
        if abs(r["structure_frequency_factor"] - 1) <= BAND + 1e-9)
    results["band_design"] = robust
    results["figure_series"]["band_design_sweep"] = {
        "structure_frequency_factor": FACTORS.tolist(),
        "peak_acceleration_m_s2": detuned_sweep(load, robust, FACTORS).tolist()}
    results["probabilistic"] = {
        "inputs": {"frequency_cov": 0.07, "damping_cov": 0.3, "distribution": "lognormal",
                   "exceedance_probability": 0.05, "seed": 1},
        "exceedance_probability_nominal": 0.31, "exceedance_probability_robust": 0.02,
        "design": {"mass_ratio": 1.2 * design["mass_ratio"],
                   "mass_kg": 1.2 * design["mass_kg"]},
    }
    bank = [{"mass_kg": design["mass_kg"] * 0.55, "frequency_hz": design["frequency_hz"] * f,
             "damping_ratio": 0.06} for f in (0.97, 1.03)]
    results["options"] = [option_row("translational", load, case, [
        {k: design[k] for k in ("mass_kg", "frequency_hz", "damping_ratio")}]),
        option_row("bank-of-two", load, case, bank)]
    pendulum = option_row("pendulum", load, case, [
        {"mass_kg": 1.2 * design["mass_kg"], "frequency_hz": design["frequency_hz"],
         "damping_ratio": design["damping_ratio"]}])
    pendulum["pendulum_length_m"] = 9.80665 / (2 * np.pi * design["frequency_hz"]) ** 2
    results["options"].append(pendulum)
    return results


def option_row(name: str, load: LoadedMode, case, dampers: list[dict]) -> dict:
    """An ``options`` entry for TMD-like dampers, evaluated by the engine."""
    m = load.mode
    mass = np.array([[d["mass_kg"] for d in dampers]])
    absorbers = Absorbers.tuned_masses(mass, np.array([[d["frequency_hz"] for d in dampers]]),
                                       np.array([[d["damping_ratio"] for d in dampers]]))
    a = load.assess(absorbers)
    zeta = effective_damping_ratio(m.frequency_hz, m.modal_mass_kg,
                                   float(a.sigma_acceleration_m_s2[0]), load.spectrum)
    rows = sweep_rows(load, lambda s: Absorbers.tuned_masses(
        np.broadcast_to(mass, s.shape + mass.shape[-1:]),
        np.broadcast_to(absorbers.frequency_hz, s.shape + mass.shape[-1:]),
        np.broadcast_to(absorbers.damping_ratio, s.shape + mass.shape[-1:])),
        FACTORS[np.abs(FACTORS - 1) <= BAND + 1e-9], "structure_frequency_factor")
    peak = float(a.peak_acceleration_m_s2[0])
    return {"option": name, "mass_kg": float(mass.sum()),
            "mass_ratio": float(mass.sum()) / m.modal_mass_kg, "peak_acceleration_m_s2": peak,
            "peak_stroke_m": float(a.peak_stroke_m[0].max()),
            "peak_damper_force_n": float(a.peak_damper_force_n[0]),
            "effective_damping_ratio": float(zeta),
            "peak_acceleration_band_max_m_s2": max(r["peak_acceleration_m_s2"] for r in rows),
            "meets_target": peak <= case.target_peak_m_s2, "dampers": dampers}
