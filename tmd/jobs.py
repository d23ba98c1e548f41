"""One call per job: what the CLI runs, returning plain result dictionaries.

Each job takes a validated :class:`tmd.case.Case` and returns the dictionary
that is written as results.json (keys end with their SI unit; dimensionless
keys have none). Nothing here prints or writes files.
"""

from __future__ import annotations

import warnings
from dataclasses import asdict

from tmd import __version__
from tmd.case import Case
from tmd.dampers.tmd import TunedMassDamper
from tmd.design import LoadCase, Sizing, TmdDesign, bare_response, evaluate_tmd, least_mass, tune

SCHEMA_VERSION = 1

CAUTIONS = (
    "Preliminary sizing only: the results depend on the modal properties and the wind load "
    "given as inputs.",
    "Wind-tunnel data and the measured properties of the completed structure govern final "
    "design.",
    "Along-wind results alone may be unconservative for slender towers where across-wind "
    "response governs; supply an across-wind modal force spectrum when one is available.",
    "A damper must be re-tuned to the as-built building's measured frequency and damping.",
    "Local codes and licensed professional practice take precedence over these results.",
)

DESIGN_KEYS = (
    "mass_ratio", "mass_kg", "frequency_ratio", "frequency_hz", "damping_ratio",
    "stiffness_n_per_m", "damping_n_s_per_m", "sigma_acceleration_m_s2",
    "peak_acceleration_m_s2", "peak_factor", "sigma_stroke_m", "peak_stroke_m",
    "peak_damper_force_n", "sigma_displacement_m", "effective_damping_ratio",
    "added_damping_ratio", "meets_target",
)


def load_case_of(case: Case) -> LoadCase:
    """The library's load case for the case's design load."""
    return LoadCase(case.mode, case.spectrum, case.duration_s)


def design_block(design: TmdDesign) -> dict:
    """The ``design`` block of results.json."""
    values = asdict(design)
    return {key: values[key] for key in DESIGN_KEYS}


def _header(case: Case) -> dict:
    return {
        "tool_version": __version__,
        "schema_version": SCHEMA_VERSION,
        "case": {"name": case.name, "path": str(case.path), "inputs": case.inputs},
    }


def _bare_block(load: LoadCase) -> dict:
    return asdict(bare_response(load))


def _target_block(case: Case) -> dict:
    return {"peak_acceleration_m_s2": case.target_peak_m_s2, "duration_s": case.duration_s}


def size_damper(case: Case) -> Sizing:
    """The TMD the case asks for: tuned at a fixed mass ratio, or the least mass."""
    load = load_case_of(case)
    settings = case.damper
    if settings.mass_ratio is None:
        return least_mass(load, case.target_peak_m_s2, max_mass_ratio=settings.max_mass_ratio,
                          max_stroke_m=settings.max_stroke_m)
    tuning = tune(load, settings.mass_ratio, objective=settings.objective,
                  max_stroke_m=settings.max_stroke_m)
    design = evaluate_tmd(load, TunedMassDamper(settings.mass_ratio, tuning.frequency_ratio,
                                                tuning.damping_ratio), case.target_peak_m_s2)
    met = bool(design.meets_target)
    verdict = "meets" if met else "does not meet"
    return Sizing(design, met, "fixed mass ratio", (
        f"at the fixed mass ratio {settings.mass_ratio:g}, the {settings.objective}-optimal "
        f"tuning {verdict} the target {case.target_peak_m_s2:.4g} m/s^2 "
        f"(peak {design.peak_acceleration_m_s2:.4g} m/s^2)"))


def design_job(case: Case) -> dict:
    """Bare response, sized TMD and the numbers of its specification."""
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        load = load_case_of(case)
        sizing = size_damper(case)
        result = _header(case) | {
            "target": _target_block(case),
            "bare": _bare_block(load),
            "design": design_block(sizing.design) if sizing.design else None,
            "sizing": {"meets_target": sizing.meets_target, "governed_by": sizing.governed_by,
                       "message": sizing.message},
        }
    result["warnings"] = _unique_messages(caught)
    result["cautions"] = list(CAUTIONS)
    return result


def evaluate_job(case: Case, damper: TunedMassDamper) -> dict:
    """Responses of one given TMD design on the case."""
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        load = load_case_of(case)
        design = evaluate_tmd(load, damper, case.target_peak_m_s2)
        result = _header(case) | {
            "target": _target_block(case),
            "bare": _bare_block(load),
            "design": design_block(design),
        }
    result["warnings"] = _unique_messages(caught)
    result["cautions"] = list(CAUTIONS)
    return result


def _unique_messages(caught) -> list[str]:
    return list(dict.fromkeys(str(w.message) for w in caught))
