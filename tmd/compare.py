"""Passive options side by side: each sized for the same mode, load and target.

One call, :func:`compare_options`, sizes every enabled option for the least
mass that meets the peak-acceleration target (for added viscous damping: the
damping required) and returns one plain dict per option, ready for
results.json. Options (names of our own):

=================  ==========================================================
``tmd``            translational TMD (:func:`tmd.design.least_mass`)
``pendulum``       pendulum TMD (:mod:`tmd.sizing.pendulum`)
``tmd-bank``       bank of TMDs, convex sizing (:mod:`tmd.sizing.bank`)
``liquid-column``  tuned liquid column damper (:mod:`tmd.sizing.liquid_column`)
``sloshing-tank``  screened rectangular sloshing tanks (:mod:`tmd.sizing.sloshing`)
``viscous``        added viscous damping (:mod:`tmd.sizing.viscous`)
=================  ==========================================================

Every row also carries the worst peak acceleration over the detuning band
s in [1 - b, 1 + b] (structure frequency f_s -> s f_s with M* and zeta_s
kept; the dampers keep their absolute mass, spring and dashpot, liquid
dampers their head-loss or screen coefficient, whose equivalent damping is
re-solved at every s; added dashpots their constant).

References
----------
See the option modules. Results are preliminary: wind-tunnel data and the
measured properties of the building govern, and every damper must be
re-tuned to the as-built structure.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field
from typing import Literal

import numpy as np

from tmd.dampers.liquid_column import ColumnSettings
from tmd.dampers.pendulum import PendulumSettings
from tmd.dampers.sloshing import TankSettings
from tmd.defaults import FREQUENCY_BAND, MAX_MASS_RATIO
from tmd.design import LoadedMode, Sizing, TmdDesign, least_mass
from tmd.performance import assess, effective_damping_ratio
from tmd.registry import OPTION_NAMES
from tmd.robust import band_maximum, peak_acceleration_band_max, structure_damping_ratios
from tmd.rules import MAX_OPTION_NAMES, Band, Positive, Ratio, require, unique_list
from tmd.side_by_side import side_by_side
from tmd.sizing.bank import BankSettings, size_tmd_bank
from tmd.sizing.freeboard import (
    FREEBOARD_NOTE,
    check_freeboard,
    column_by_return_period,
    tank_by_return_period,
)
from tmd.sizing.liquid_column import size_liquid_column, velocity_proportional_fixed_point
from tmd.sizing.pendulum import pendulum_design
from tmd.sizing.sloshing import size_sloshing_tanks
from tmd.sizing.viscous import ViscousSettings, peak_acceleration_with_dashpot, size_added_damping
from tmd.verdict import meets_target

BAND_POINTS = 41


@dataclass(frozen=True)
class OptionSettings:
    """Settings of every option (defaults are ours; see each settings class).

    Parameters
    ----------
    pendulum : PendulumSettings
        Number of pendulum stages.
    bank : BankSettings
        The bank's candidate frequency and damping ratios, scenarios and
        iteration limits.
    column : ColumnSettings
        The liquid column's length ratio, column count, excursion limit and
        liquid density.
    tank : TankSettings
        The sloshing tanks' depth ratio, width limit, freeboard, screens and
        water properties.
    viscous : ViscousSettings
        The viscous dampers' deformation per modal displacement, count and
        capacities.
    """

    pendulum: PendulumSettings = field(default_factory=PendulumSettings)
    bank: BankSettings = field(default_factory=BankSettings)
    column: ColumnSettings = field(default_factory=ColumnSettings)
    tank: TankSettings = field(default_factory=TankSettings)
    viscous: ViscousSettings = field(default_factory=ViscousSettings)


@dataclass
class _Job:
    loaded: LoadedMode
    target: float
    max_mass_ratio: float
    max_stroke_m: float | None
    band: float
    settings: OptionSettings
    _tmd: Sizing | None = None
    stroke_loads: tuple[LoadedMode, ...] = ()
    return_period_loads: tuple[tuple[float, LoadedMode], ...] = ()

    def tmd_sizing(self) -> Sizing:
        if self._tmd is None:
            self._tmd = least_mass(self.loaded, self.target, max_mass_ratio=self.max_mass_ratio,
                                   max_stroke_m=self.max_stroke_m)
        return self._tmd


_ENABLED = unique_list(Literal[OPTION_NAMES], MAX_OPTION_NAMES)  # type: ignore[valid-type]


def compare_options(loaded: LoadedMode, target_peak_m_s2: float, *, enabled=None,
                    max_mass_ratio: float = MAX_MASS_RATIO, max_stroke_m: float | None = None,
                    frequency_band: float = FREQUENCY_BAND,
                    settings: OptionSettings | None = None,
                    tmd_sizing: Sizing | None = None,
                    stroke_loads: tuple[LoadedMode, ...] = (),
                    return_period_loads: tuple[tuple[float, LoadedMode], ...] = ()
                    ) -> list[dict]:
    """Size every enabled passive option and describe each in one dict.

    Parameters
    ----------
    loaded : LoadedMode
        The mode under its design load, with the reporting conventions.
    target_peak_m_s2 : float
        Peak acceleration target at the evaluation height [m/s^2].
    enabled : sequence of str, optional
        Option names (keys of :data:`OPTIONS`), in the order wanted; all by
        default.
    max_mass_ratio : float
        Largest mass (liquid mass for liquid dampers) over M* [-].
    max_stroke_m : float, optional
        Peak stroke limit of TMD-like options [m] (liquid dampers have their
        own geometric limits in their settings).
    frequency_band : float
        Half-width b of the structure-frequency band for the worst-case
        peak [-].
    settings : OptionSettings, optional
        Each option's layout settings; their defaults otherwise.
    tmd_sizing : tmd.design.Sizing, optional
        The case's own TMD sizing (fixed mass ratio and objective, or least
        mass), so that the TMD and pendulum rows are the design job's TMD;
        by default the least mass with ``max_stroke_m``.
    stroke_loads : tuple of LoadedMode
        Further loads under which the bank holds ``max_stroke_m`` too (the
        wind of ``[damper] stroke_return_period_years``); ``tmd_sizing``
        carries the TMD's own.
    return_period_loads : tuple of (return period [years], LoadedMode)
        Every reported load of a wind case, in increasing return period: the
        liquid options are checked against their freeboard at each
        (:mod:`tmd.sizing.freeboard`; rows gain ``by_return_period``).

    Returns
    -------
    list of dict
        Keys: ``option``, ``mass_kg``, ``mass_ratio``, ``peak_acceleration_m_s2``,
        ``peak_stroke_m``, ``peak_damper_force_n``, ``effective_damping_ratio``,
        ``peak_acceleration_band_max_m_s2``, ``meets_target``, ``message``,
        ``dimensions`` (dict, keys with units); TMD-like options add
        ``dampers`` [{mass_kg, frequency_hz, damping_ratio}]; liquid options
        add ``participating_mass_kg``, ``rigid_mass_kg``, ``frequency_hz``,
        ``equivalent_damping_ratio``; each adds its own specification keys.

    Raises
    ------
    ValueError
        For an unknown option name.
    tmd.design.DesignError
        If an optimiser fails (the bank's convex solver included).
    """
    # The case file's rules and messages (tmd.rules): a list (not a string, which would
    # split into letters) of at most MAX_OPTION_NAMES known, distinct names.
    if isinstance(enabled, tuple):
        enabled = list(enabled)
    names = list(OPTIONS) if enabled is None else require("enabled", enabled, _ENABLED)
    require("peak_acceleration_m_s2", target_peak_m_s2, Positive)
    require("max_mass_ratio", max_mass_ratio, Ratio)
    if max_stroke_m is not None:
        require("max_stroke_m", max_stroke_m, Positive)
    require("frequency_band", frequency_band, Band)
    job = _Job(loaded, target_peak_m_s2, max_mass_ratio, max_stroke_m, frequency_band,
               settings or OptionSettings(), tmd_sizing, tuple(stroke_loads),
               tuple(return_period_loads))
    # The bank (its convex solver and cvxpy's import take about as long as every other
    # row together) is sized in a second process while this one sizes the rest.
    beside = "tmd-bank" if len(names) > 1 and "tmd-bank" in names else None
    here = [name for name in names if name != beside]

    def size_here():
        return {name: OPTIONS[name](job) for name in here}

    if beside is None:
        sized = size_here()
    else:
        sized, bank = side_by_side(size_here, lambda: OPTIONS[beside](job))
        sized[beside] = bank
    rows = [{"option": name} | sized[name] for name in names]
    for row in rows:
        # Every verdict is the one comparison on the number the row reports.
        row["meets_target"] = meets_target(row["peak_acceleration_m_s2"], target_peak_m_s2)
    return rows


# --- rows ---------------------------------------------------------------------

def _tmd_row(job: _Job) -> dict:
    sizing = job.tmd_sizing()
    return _tmd_like(job, sizing, sizing.design)


def _pendulum_row(job: _Job) -> dict:
    sizing = job.tmd_sizing()
    row = _tmd_like(job, sizing, sizing.design)
    if sizing.design is None:
        return row | {"stages": job.settings.pendulum.stages, "peak_swing_angle_rad": 0.0}
    p = pendulum_design(sizing.design, job.settings.pendulum)
    row["dimensions"] = {"pendulum_length_m": p.length_m, "stage_length_m": p.stage_length_m}
    return row | {"stages": p.stages, "peak_swing_angle_rad": p.peak_swing_angle_rad}


def _tmd_like(job: _Job, sizing: Sizing, design: TmdDesign | None) -> dict:
    if design is None:
        return _empty_row(job, sizing.message) | {"dampers": []}
    band = peak_acceleration_band_max(job.loaded, design.damper, job.band).peak_acceleration_m_s2
    return {
        "mass_kg": design.mass_kg, "mass_ratio": design.mass_ratio,
        "peak_acceleration_m_s2": design.peak_acceleration_m_s2,
        "peak_stroke_m": design.peak_stroke_m, "peak_damper_force_n": design.peak_damper_force_n,
        "effective_damping_ratio": design.effective_damping_ratio,
        "peak_acceleration_band_max_m_s2": float(band), "meets_target": bool(sizing.meets_target),
        "message": sizing.message, "dimensions": {},
        "dampers": [{"mass_kg": design.mass_kg, "frequency_hz": design.frequency_hz,
                     "damping_ratio": design.damping_ratio}],
    }


def _bank_row(job: _Job) -> dict:
    bank = size_tmd_bank(job.loaded, job.target, max_mass_ratio=job.max_mass_ratio,
                         max_stroke_m=job.max_stroke_m, settings=job.settings.bank,
                         stroke_loads=job.stroke_loads)
    if bank.governed_by == "bare":
        return _empty_row(job, bank.message) | {"dampers": [], "pruned_dampers": [],
                                                 "convex_steps": 0}
    absorbers = bank.absorbers
    a = job.loaded.assess(absorbers)
    m = job.loaded.mode

    def peaks(s):
        return assess(s * m.frequency_hz, m.modal_mass_kg,
                      structure_damping_ratios(job.loaded, s), absorbers,
                      job.loaded.spectrum, job.loaded.duration_s,
                      shape_factor=job.loaded.shape_factor, responses=("acceleration",),
                      peak_method=job.loaded.peak_method).peak_acceleration_m_s2

    stroke = float(np.max(a.peak_stroke_m)) if bank.mass_kg.size else 0.0
    return _measured(job, a, bank.mass_ratio, peaks) | {
        "peak_stroke_m": stroke, "meets_target": bank.meets_target, "message": bank.message,
        "dimensions": {}, "dampers": bank.dampers, "pruned_dampers": list(bank.pruned),
        "convex_steps": max(len(bank.history) - 1, 0)}


def _column_row(job: _Job) -> dict:
    d = size_liquid_column(job.loaded, job.target, max_mass_ratio=job.max_mass_ratio,
                           settings=job.settings.column)
    if d.governed_by == "bare":
        return _empty_row(job, d.message) | _NO_LIQUID
    a = job.loaded.assess(d.absorbers())

    def peaks(s):
        return velocity_proportional_fixed_point(
            job.loaded, d.liquid_mass_kg, d.frequency_hz, d.length_ratio, d.damping_gain_s_per_m,
            frequency_scale=s)[1].peak_acceleration_m_s2

    freeboard, basis, by_period = _column_freeboard(job, d)
    return _measured(job, a, d.mass_ratio, peaks) | {
        "peak_stroke_m": d.peak_excursion_m, "meets_target": d.meets_target,
        "message": d.message,
        "dimensions": {"liquid_length_m": d.liquid_length_m,
                       "horizontal_length_m": d.horizontal_length_m,
                       "vertical_liquid_height_m": d.vertical_liquid_height_m,
                       "vertical_leg_height_m": d.vertical_liquid_height_m + freeboard,
                       "freeboard_m": freeboard,
                       "cross_section_area_m2": d.cross_section_area_m2},
        "freeboard_basis": basis, **by_period,
        "participating_mass_kg": d.participating_mass_kg, "rigid_mass_kg": d.rigid_mass_kg,
        "frequency_hz": d.frequency_hz, "equivalent_damping_ratio": d.equivalent_damping_ratio,
        "length_ratio": d.length_ratio, "columns": d.columns,
        "head_loss_coefficient": d.head_loss_coefficient,
        "peak_excursion_ratio": d.peak_excursion_m / d.vertical_liquid_height_m}


def _tank_row(job: _Job) -> dict:
    d = size_sloshing_tanks(job.loaded, job.target, max_mass_ratio=job.max_mass_ratio,
                            settings=job.settings.tank)
    if d.governed_by == "bare":
        return _empty_row(job, d.message) | _NO_LIQUID
    a = job.loaded.assess(d.absorbers())

    def peaks(s):
        return velocity_proportional_fixed_point(
            job.loaded, d.water_mass_kg, d.frequency_hz, d.coupling, d.damping_gain_s_per_m,
            damping_floor=d.intrinsic_damping_ratio, frequency_scale=s)[1].peak_acceleration_m_s2

    dims = {"tank_length_m": d.tank_length_m, "water_depth_m": d.water_depth_m,
            "tank_width_m": d.tank_width_m}
    if d.freeboard_m is not None:
        dims["freeboard_m"] = d.freeboard_m
    by_period = {}
    if job.return_period_loads:
        rows = tank_by_return_period(job.return_period_loads, d, job.settings.tank.depth_ratio)
        if d.freeboard_m is not None:
            rows = check_freeboard("sloshing-tank", rows, "peak_free_surface_elevation_m",
                                   d.freeboard_m, "give a larger [options.sloshing_tank] "
                                   "freeboard_m, or a higher tank")
        by_period = {"by_return_period": rows, "freeboard_note": FREEBOARD_NOTE}
    return _measured(job, a, d.mass_ratio, peaks) | by_period | {
        "peak_stroke_m": d.peak_sloshing_displacement_m, "meets_target": d.meets_target,
        "message": d.message, "dimensions": dims,
        "participating_mass_kg": d.participating_mass_kg, "rigid_mass_kg": d.rigid_mass_kg,
        "frequency_hz": d.frequency_hz, "equivalent_damping_ratio": d.equivalent_damping_ratio,
        "tank_count": d.tank_count, "screen_positions": list(d.screen_positions),
        "screen_loss_coefficient": d.screen_loss_coefficient,
        "intrinsic_damping_ratio": d.intrinsic_damping_ratio,
        "peak_free_surface_elevation_m": d.peak_free_surface_elevation_m}


def _column_freeboard(job: _Job, d) -> tuple[float, str, dict]:
    """Return the column's freeboard, how it was chosen, and its check at every return period."""
    given = job.settings.column.freeboard_m
    if not job.return_period_loads:
        if given is not None:
            return given, "given ([options.liquid_column] freeboard_m)", {}
        return d.peak_excursion_m, "the peak excursion at the design load", {}
    rows = column_by_return_period(job.return_period_loads, d)
    if given is None:
        freeboard = max([d.peak_excursion_m] + [r["peak_excursion_m"] for r in rows])
        basis = ("the peak excursion at the longest reported return period (no "
                 "[options.liquid_column] freeboard_m given)")
    else:
        freeboard, basis = given, "given ([options.liquid_column] freeboard_m)"
    rows = check_freeboard("liquid-column", rows, "peak_excursion_m", freeboard,
                           "give a larger [options.liquid_column] freeboard_m, or leave it "
                           "out to size the legs for the longest return period")
    return freeboard, basis, {"by_return_period": rows, "freeboard_note": FREEBOARD_NOTE}


def _viscous_row(job: _Job) -> dict:
    d = size_added_damping(job.loaded, job.target, settings=job.settings.viscous)

    def peaks(s):
        return peak_acceleration_with_dashpot(job.loaded, d.added_damping_ratio, s)

    return {
        "mass_kg": None, "mass_ratio": None, "peak_acceleration_m_s2": d.peak_acceleration_m_s2,
        "peak_stroke_m": d.peak_damper_deformation_m,
        "peak_damper_force_n": d.peak_modal_damping_force_n,
        "effective_damping_ratio": d.total_damping_ratio,
        "peak_acceleration_band_max_m_s2": band_maximum(
            peaks, job.band, points=BAND_POINTS).peak_acceleration_m_s2,
        "meets_target": d.meets_target, "message": d.message, "dimensions": {},
        "added_damping_ratio": d.added_damping_ratio,
        "damper_constant_n_s_per_m": d.damper_constant_n_s_per_m,
        "damper_count": d.damper_count,
        "deformation_per_modal_displacement": d.deformation_per_modal_displacement,
        "peak_force_per_damper_n": d.peak_force_per_damper_n} | _capacity_checks(
            d, job.settings.viscous)


def _capacity_checks(d, settings: ViscousSettings) -> dict:
    """Each device's peak force and deformation against its capacity, one comparison each."""
    out = {}
    if settings.force_capacity_n is not None:
        out |= {"force_capacity_n": settings.force_capacity_n,
                "force_within_capacity": meets_target(d.peak_force_per_damper_n,
                                                      settings.force_capacity_n)}
    if settings.stroke_capacity_m is not None:
        out |= {"stroke_capacity_m": settings.stroke_capacity_m,
                "stroke_within_capacity": meets_target(d.peak_damper_deformation_m,
                                                       settings.stroke_capacity_m)}
    return out


OPTIONS: dict[str, Callable[[_Job], dict]] = {
    "tmd": _tmd_row,
    "pendulum": _pendulum_row,
    "tmd-bank": _bank_row,
    "liquid-column": _column_row,
    "sloshing-tank": _tank_row,
    "viscous": _viscous_row,
}
if tuple(OPTIONS) != OPTION_NAMES:  # the registry the case file validates against
    raise ImportError("tmd.compare.OPTIONS must implement exactly tmd.registry.OPTION_NAMES")


def _measured(job: _Job, a, mass_ratio, peaks) -> dict:
    """Return the common keys of a row from an engine assessment of the design."""
    m = job.loaded.mode
    sigma = float(np.asarray(a.sigma_acceleration_m_s2).ravel()[0])
    zeta_eff = float(effective_damping_ratio(m.frequency_hz, m.modal_mass_kg,
                                             sigma / job.loaded.shape_factor, job.loaded.spectrum))
    return {
        "mass_kg": mass_ratio * m.modal_mass_kg, "mass_ratio": mass_ratio,
        "peak_acceleration_m_s2": float(np.asarray(a.peak_acceleration_m_s2).ravel()[0]),
        "peak_damper_force_n": float(np.asarray(a.peak_damper_force_n).ravel()[0]),
        "effective_damping_ratio": zeta_eff,
        "peak_acceleration_band_max_m_s2": band_maximum(
            peaks, job.band, points=BAND_POINTS).peak_acceleration_m_s2,
    }


# A liquid option that is not needed: no liquid, so no geometry or tuning.
_NO_LIQUID = {"participating_mass_kg": 0.0, "rigid_mass_kg": 0.0, "frequency_hz": None,
              "equivalent_damping_ratio": None}


def _empty_row(job: _Job, message: str) -> dict:
    bare = peak_acceleration_band_max(job.loaded, None, 0.0).peak_acceleration_m_s2
    return {"mass_kg": 0.0, "mass_ratio": 0.0, "peak_acceleration_m_s2": float(bare),
            "peak_stroke_m": 0.0, "peak_damper_force_n": 0.0,
            "effective_damping_ratio": job.loaded.mode.damping_ratio,
            "peak_acceleration_band_max_m_s2": float(peak_acceleration_band_max(
                job.loaded, None, job.band).peak_acceleration_m_s2),
            "meets_target": meets_target(bare, job.target), "message": message,
            "dimensions": {}}
