"""Detuning: how a TMD holds up when the building or the damper is not as designed.

A building's real frequency is only known once it stands (finite-element
predictions are commonly 10-20% off), and an as-built damper's spring and
dashpot differ from their specification. This module

* sweeps the structure frequency factor s (f_s -> s f_s with the modal mass
  M* held, so k_s scales by s^2; the damper keeps its absolute mass, spring
  and dashpot, hence its absolute f_d and zeta_d), for the bare building and
  for a design, and sweeps the damper's own spring and dashpot;
* finds the worst peak acceleration over a band s in [1 - b, 1 + b] by a
  grid plus local refinement (the worst case can lie inside the band);
* sizes the least-mass TMD whose peak acceleration meets the target for
  every s in the band (a minimax tuning inside a least-mass search);
* puts it all in one call, :func:`robustness_study`, returning plain dicts.

Modules: :mod:`tmd.robust.sweeps` (sweeps, band maximum),
:mod:`tmd.robust.minimax` (robust design), :mod:`tmd.robust.study` (one call
per job). Their public names are re-exported here.

Every sweep is one batched engine call (:func:`tmd.performance.assess` with
arrays of structure frequency or absorber parameters). The probabilistic
counterpart (random s and zeta_s) is :mod:`tmd.robust.probabilistic`.

References
----------
Hoang, N., Warnitchai, P. (2005). Design of multiple tuned mass dampers by
using a numerical optimizer. Earthquake Engineering and Structural Dynamics
34, 125-144. (With uncertain structural properties, larger TMD damping makes
the system more robust.)
Warburton, G. B. (1982). Optimum absorber parameters for various combinations
of response and excitation parameters. Earthquake Engineering and Structural
Dynamics 10, 381-401.
"""

from tmd.robust.minimax import (
    CHECK_BAND_POINTS,
    OPTIMISER_BAND_POINTS,
    BandTuning,
    RobustSizing,
    robust_least_mass,
    tune_for_band,
)
from tmd.robust.study import design_sweeps, robust_design_block, robustness_study
from tmd.robust.sweeps import (
    DASHPOT_RANGE,
    SPRING_RANGE,
    SWEEP_RANGE,
    AerodynamicDamping,
    BandMaximum,
    StructureDamping,
    assess_structure_factors,
    band_maximum,
    factor_grid,
    peak_acceleration_band_max,
    structure_damping_ratios,
    sweep_damper_damping,
    sweep_damper_frequency,
    sweep_structure_frequency,
)

__all__ = [
    "CHECK_BAND_POINTS", "DASHPOT_RANGE", "OPTIMISER_BAND_POINTS", "SPRING_RANGE",
    "SWEEP_RANGE", "AerodynamicDamping", "BandMaximum", "BandTuning", "RobustSizing",
    "StructureDamping", "assess_structure_factors", "band_maximum", "design_sweeps",
    "factor_grid",
    "peak_acceleration_band_max", "robust_design_block", "robust_least_mass",
    "robustness_study", "structure_damping_ratios", "sweep_damper_damping",
    "sweep_damper_frequency", "sweep_structure_frequency", "tune_for_band",
]
