"""The internal consistency of any results dictionary (results.json of any job).

:func:`assert_consistent_results` is called by every job test and by the fuzz
suite. It never recomputes anything with the library: it checks a result
against its own numbers and against rules stated outside the project.

* Verdicts against values: a limit is met when the value does not exceed it
  (common practice for serviceability limits). Every ``meets_target`` beside
  a peak acceleration must equal ``peak <= target``, exactly, and the
  ``sizing`` verdict must equal the ``design`` verdict.
* A worst case over a band that contains the nominal point is at least the
  nominal value (a maximum over a set is at least any member's value).
* Peak and rms strokes, like every standard deviation and peak of a
  response magnitude, are >= 0 (a standard deviation is non-negative).
* The design block has every key the README documents.
* Every key with a numeric value ends with an SI unit suffix or names a
  dimensionless quantity (the project's convention, README "results.json";
  return periods in years are the one documented non-SI suffix).
* No NaN or infinity anywhere (strict JSON, RFC 8259, has no such numbers).
"""

from __future__ import annotations

import math
import re
from collections.abc import Iterator

# Documented in README.md "results.json" and tested by tests/test_cli.py.
DESIGN_KEYS = frozenset({
    "mass_ratio", "mass_kg", "frequency_ratio", "frequency_hz", "damping_ratio",
    "stiffness_n_per_m", "damping_n_s_per_m", "sigma_acceleration_m_s2",
    "peak_acceleration_m_s2", "peak_factor", "sigma_stroke_m", "peak_stroke_m",
    "peak_damper_force_n", "sigma_displacement_m", "effective_damping_ratio",
    "added_damping_ratio", "meets_target",
})
GOVERNED_BY = frozenset({"target", "stroke", "mass", "bare", "fixed mass ratio", "band",
                         "minimum"})

# SI unit suffixes of the project's keys (README "Case files" and
# "results.json"); `_years` is the documented unit of return periods, `_deg`
# of wind directions and bearings (degrees clockwise from north).
_UNIT = re.compile(
    r"_(hz|kg|m|s|n|rad|pa|m_s|m_s2|m2|m3|kg_m|kg_m2|kg_m3|n_per_m|n_s_per_m|s_per_m"
    r"|n2_per_hz|m2_s2_per_hz|m2_per_hz|m_s2_per_n|years|j|deg)$")
# Last words of dimensionless quantities (ratios, factors, counts, ...).
_DIMENSIONLESS_WORDS = frozenset({
    "ratio", "factor", "factors", "coefficient", "count", "steps", "stages", "columns",
    "probability", "fraction", "loss", "share", "exponent", "band", "intensity", "cov",
    "seed", "version", "range", "parameter", "strips", "positions", "error", "sampled",
    "index", "points", "target", "number", "sq", "records", "iteration", "bandwidth",
})
# Dimensionless keys whose last word names a dimensioned quantity: a ratio
# of like quantities written "x_per_modal_y".
_DIMENSIONLESS_KEYS = frozenset({
    "deformation_per_modal_displacement",
    # Whole-building cases (issue 9): a mode's sway components in x and y (unit
    # largest component) and EN 1991-1-4's directional factor c_dir.
    "shape_x", "shape_y", "c_dir",
    # EN 1991-1-4 Annex B quantities of the wind job (B.3, B.7, B.8, F.15).
    "size_reduction_height", "size_reduction_breadth", "log_decrement_total",
    "peak_factor_acceleration",
    # Reduced velocity U_H / (f_s b) of the vortex-shedding check (issue 10's key).
    "reduced_velocity",
    # Reduced frequency n = f b / U_H and the normalised spectra f S_Q / (q_H b H)^2
    # against it (issue 10; conventions.md "Normalised wind-tunnel spectra").
    "reduced_frequency", "mode_reduced_frequency", "across_normalised_psd",
    "along_normalised_psd",
})
# Relative slack for comparisons between two separate engine evaluations of
# the same design (one batched, one single): rounding differences only.
_SAME_DESIGN_RTOL = 1e-9


def assert_consistent_results(results: dict) -> None:
    """Assert that a results dictionary agrees with itself.

    Parameters
    ----------
    results : dict
        What a job returns, or results.json as read back (``json.load``).

    Raises
    ------
    AssertionError
        Naming the path of the first inconsistent entry and its values.
    """
    _assert_finite_and_united(results, "results")
    target = (results.get("target") or {}).get("peak_acceleration_m_s2")
    design = results.get("design")
    if design is not None:
        missing = DESIGN_KEYS - set(design)
        assert not missing, f"design block lacks the documented keys {sorted(missing)}"
        if target is not None:
            _assert_verdict(design, "peak_acceleration_m_s2", "meets_target", target, "design")
    sizing = results.get("sizing")
    if sizing is not None:
        _assert_sizing(results, sizing, design, target)
    for path, block in _blocks(results, "results"):
        _assert_non_negative(block, path)
    _assert_band(results, design, target)
    robust = results.get("band_design")
    if robust is not None and target is not None:
        if robust.get("mass_kg") is not None:
            _assert_verdict(robust, "peak_acceleration_m_s2", "meets_target", target,
                            "band_design")
        _assert_verdict(robust, "peak_acceleration_band_max_m_s2", "meets_target_across_band",
                        target, "band_design")
        _assert_at_least(robust, "peak_acceleration_band_max_m_s2", "peak_acceleration_m_s2",
                         "band_design")
    for i, row in enumerate(results.get("options") or []):
        where = f"options[{i}] ({row.get('option')})"
        if target is not None:
            _assert_verdict(row, "peak_acceleration_m_s2", "meets_target", target, where)
        _assert_at_least(row, "peak_acceleration_band_max_m_s2", "peak_acceleration_m_s2", where)
        freeboard = (row.get("dimensions") or {}).get("freeboard_m")
        for entry in row.get("by_return_period") or []:
            rise = entry.get("peak_excursion_m", entry.get("peak_free_surface_elevation_m"))
            if "within_freeboard" in entry:
                assert entry["within_freeboard"] == (rise <= freeboard), (
                    f"{where} by_return_period: within_freeboard = {entry['within_freeboard']} "
                    f"with rise {rise!r} and freeboard {freeboard!r}")
    _assert_probabilistic(results.get("probabilistic"))


def _assert_sizing(results, sizing, design, target):
    governed = sizing.get("governed_by")
    assert governed in GOVERNED_BY, f"sizing.governed_by = {governed!r}, not one of {GOVERNED_BY}"
    if design is not None:
        assert sizing["meets_target"] == design["meets_target"], (
            f"sizing.meets_target = {sizing['meets_target']} but design.meets_target = "
            f"{design['meets_target']} (peak {design['peak_acceleration_m_s2']!r}, "
            f"target {target!r})")
    elif target is not None and results.get("kind") != "building":
        # No damper: the verdict is the bare building's. (A whole-building result has no
        # design block; its verdict is over every point, direction and load.)
        assert governed == "bare", f"no design block, but sizing.governed_by = {governed!r}"
        bare = results["bare"]["peak_acceleration_m_s2"]
        assert sizing["meets_target"] == (bare <= target), (
            f"sizing.meets_target = {sizing['meets_target']} with bare peak {bare!r} and "
            f"target {target!r}")
        band = results["bare"].get("peak_acceleration_band_max_m_s2")
        if band is not None:
            assert band <= target, (f"'no damper is needed' but the bare building's worst peak in "
                                    f"the band is {band!r} > target {target!r}")


def _assert_band(results, design, target):
    """Band maximum of the nominal design (or the bare building) >= its nominal peak."""
    bare = results.get("bare")
    if bare is not None:
        _assert_at_least(bare, "peak_acceleration_band_max_m_s2", "peak_acceleration_m_s2",
                         "bare")
    band = results.get("peak_acceleration_band_max_m_s2")
    if band is None:
        return
    nominal = _spectral_nominal(results, design)
    if nominal is not None:
        _assert_at_least({"band": band, "peak": nominal["peak_acceleration_m_s2"]},
                         "band", "peak", "results (band maximum against the nominal peak)")
    for key, reference in (("sweep", nominal), ("sweep_bare", results.get("bare"))):
        # The sweep's s = 1 point is the nominal structure itself.
        for point in results.get(key) or []:
            if point.get("structure_frequency_factor") == 1.0 and reference is not None:
                _assert_close(point["peak_acceleration_m_s2"],
                              reference["peak_acceleration_m_s2"], f"{key} at s = 1")
    summary = results.get("robustness_summary") or {}
    ratio = summary.get("nominal_band_max_over_target")
    if ratio is not None and target is not None:
        _assert_close(ratio, band / target, "robustness_summary.nominal_band_max_over_target")


def _spectral_nominal(results, design):
    """The design's nominal peak on the same (spectral) footing as its sweeps.

    With ``peak_method = "simulated"`` the design block holds the simulated
    peak, while sweeps and band maxima use the spectral estimate, which the
    results give as ``peak_estimates.davenport_peak_acceleration_m_s2``.
    """
    if design is None:
        return None
    if (results.get("sizing") or {}).get("peak_method") == "simulated":
        spectral = (results.get("peak_estimates") or {}).get("davenport_peak_acceleration_m_s2")
        return None if spectral is None else {"peak_acceleration_m_s2": spectral}
    return design


def _assert_probabilistic(block):
    if not block or not block.get("least_mass_design"):
        return
    design = block["least_mass_design"]
    allowed = block.get("inputs", {}).get("exceedance_probability")
    if allowed is not None and design.get("exceedance_probability") is not None:
        _assert_verdict(design, "exceedance_probability", "meets_probability", allowed,
                        "probabilistic.least_mass_design")


def _assert_verdict(block, value_key, verdict_key, target, where):
    value, verdict = block.get(value_key), block.get(verdict_key)
    if verdict is None:
        return
    assert isinstance(verdict, bool), f"{where}.{verdict_key} = {verdict!r} is not a bool"
    assert value is not None, f"{where}.{verdict_key} = {verdict} without a {value_key}"
    assert verdict == (value <= target), (
        f"{where}.{verdict_key} = {verdict} but {value_key} = {value!r} against {target!r}")


def _assert_at_least(block, high_key, low_key, where):
    high, low = block.get(high_key), block.get(low_key)
    if high is None or low is None:
        return
    assert high >= low * (1 - _SAME_DESIGN_RTOL), (
        f"{where}: {high_key} = {high!r} is below {low_key} = {low!r}")


def _assert_close(a, b, where):
    assert math.isclose(a, b, rel_tol=_SAME_DESIGN_RTOL), f"{where}: {a!r} differs from {b!r}"


def _assert_non_negative(block, path):
    for key, value in block.items():
        if (isinstance(value, (int, float)) and not isinstance(value, bool)
                and (key.startswith(("sigma_", "peak_")) or key.endswith("stroke_m"))):
            assert value >= 0, f"{path}.{key} = {value!r} is negative"


def _blocks(value, path) -> Iterator[tuple[str, dict]]:
    if isinstance(value, dict):
        yield path, value
        for key, item in value.items():
            yield from _blocks(item, f"{path}.{key}")
    elif isinstance(value, (list, tuple)):
        for i, item in enumerate(value):
            yield from _blocks(item, f"{path}[{i}]")


def _is_number(value) -> bool:
    return isinstance(value, (int, float)) and not isinstance(value, bool)


def _assert_finite_and_united(results, root):
    for path, block in _blocks(results, root):
        for key, value in block.items():
            items = value if isinstance(value, (list, tuple)) else [value]
            numbers = [v for v in items if _is_number(v)]
            for v in numbers:
                assert math.isfinite(v), f"{path}.{key} = {v!r} is not finite"
            if numbers:
                _assert_unit(key, f"{path}.{key}")


def _assert_unit(key, where):
    if _UNIT.search(key) or key in _DIMENSIONLESS_KEYS:
        return
    last = key.rsplit("_", 1)[-1]
    assert last in _DIMENSIONLESS_WORDS, (
        f"{where}: the key has neither an SI unit suffix nor a dimensionless name")
