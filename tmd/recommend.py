"""One recommended specification out of the designs a design job produces.

A design job can give three competing TMDs: the nominal least-mass design
(``design``), the least mass meeting the target across the frequency band
(``band_design``) and the least mass for an acceptable exceedance
probability (``probabilistic.least_mass_design``). The engineer needs one
line saying which to specify, by a rule stated in the output:

1. no damper: the bare building meets the target, and, where the band check
   runs, also across the band (else a damper is needed after all: the
   recommendation says so and names the band maximum);
2. with ``[robustness]`` (the band check runs): the nominal design when its
   own worst peak across the band meets the target, otherwise the band-robust
   design (the least mass that meets the target across the band; if even
   that cannot, the best it reaches, flagged);
3. without ``[robustness]``: the nominal least-mass design, with a caution
   that it is not checked against detuning.

Every other design stays in results.json under its own key. Each verdict
in the block is copied from the chosen design's own comparison, never
re-derived.
"""

from __future__ import annotations

from tmd.verdict import meets_target

SPEC_KEYS = ("mass_kg", "mass_ratio", "frequency_hz", "frequency_ratio", "damping_ratio",
             "stiffness_n_per_m", "damping_n_s_per_m", "peak_acceleration_m_s2",
             "peak_stroke_m", "peak_damper_force_n", "meets_target")
RULE = ("the least mass that meets the target across the frequency band where [robustness] "
        "runs the band check (the nominal design when it already does); otherwise the "
        "nominal least mass, with a caution about detuning")


def recommendation(result: dict, *, bare_band_max_m_s2: float | None = None,
                   frequency_band: float | None = None) -> dict:
    """Return the ``recommended`` block of a design job's results.

    Parameters
    ----------
    result : dict
        The design job's results so far (``target``, ``bare``, ``design``,
        and, with ``[robustness]``, ``peak_acceleration_band_max_m_s2``,
        ``band_design``).
    bare_band_max_m_s2 : float, optional
        The bare building's worst peak across the band [m/s^2], when no
        damper was sized and the band check ran.
    frequency_band : float, optional
        The band's half-width b [-], when the band check ran.

    Returns
    -------
    dict
        ``design_key`` (the results key of the chosen design, or None for no
        damper), ``rule``, ``why``, ``band_checked`` and the chosen design's
        specification keys (:data:`SPEC_KEYS`), ``peak_acceleration_band_max_m_s2``
        and ``meets_target_across_band`` where the band check ran.
    """
    target = result["target"]["peak_acceleration_m_s2"]
    design = result.get("design")
    banded = frequency_band is not None
    block = {"rule": RULE, "band_checked": banded}
    if banded:
        block["frequency_band"] = frequency_band
    if design is None:
        block["design_key"] = None
        if banded and bare_band_max_m_s2 is not None:
            met = meets_target(bare_band_max_m_s2, target)
            block |= {"peak_acceleration_band_max_m_s2": bare_band_max_m_s2,
                      "meets_target_across_band": met}
            block["why"] = (
                f"no damper: the bare building meets the target {target:.4g} m/s^2 at nominal "
                f"and across +/-{100 * frequency_band:g}% (worst {bare_band_max_m_s2:.4g} m/s^2)"
                if met else
                f"the bare building meets the target {target:.4g} m/s^2 at nominal but not "
                f"across +/-{100 * frequency_band:g}% (worst {bare_band_max_m_s2:.4g} m/s^2): a "
                "damper is needed if the built frequency may lie there; size one with a fixed "
                "mass_ratio or a tighter target")
        else:
            block["why"] = (f"no damper: the bare building meets the target {target:.4g} m/s^2 "
                            "(not checked across a frequency band: give [robustness])")
        return block
    if not banded:
        chosen, key = design, "design"
        why = ("the nominal least-mass design; it is not checked against detuning (give "
               "[robustness] for the band check): re-tune it to the measured building")
    else:
        nominal_band = result["peak_acceleration_band_max_m_s2"]
        robust = result.get("band_design")
        nominal_met = meets_target(nominal_band, target)
        if nominal_met or not robust:
            chosen, key = design | {"peak_acceleration_band_max_m_s2": nominal_band,
                                    "meets_target_across_band": nominal_met}, "design"
            why = (f"the nominal design already meets the target across +/-"
                   f"{100 * frequency_band:g}% (worst {nominal_band:.4g} m/s^2)"
                   if nominal_met else
                   f"the nominal design exceeds the target across +/-{100 * frequency_band:g}% "
                   f"(worst {nominal_band:.4g} m/s^2) and no band-robust design was sized "
                   "([robustness] robust_design = false)")
        else:
            chosen, key = robust, "band_design"
            why = (f"the nominal design's worst peak across +/-{100 * frequency_band:g}% is "
                   f"{nominal_band:.4g} m/s^2, above the target {target:.4g} m/s^2; the "
                   f"band-robust design ({robust['mass_kg'] / 1000:,.1f} t against "
                   f"{design['mass_kg'] / 1000:,.1f} t) "
                   + ("meets it across the band" if robust["meets_target_across_band"] else
                      f"is the best reachable across the band (worst "
                      f"{robust['peak_acceleration_band_max_m_s2']:.4g} m/s^2, still above)"))
    block |= {"design_key": key, "why": why}
    block |= {k: chosen[k] for k in SPEC_KEYS if k in chosen}
    for k in ("peak_acceleration_band_max_m_s2", "meets_target_across_band"):
        if k in chosen:
            block[k] = chosen[k]
    return block
