"""The compare job: every enabled passive option sized on the case.
"""

from __future__ import annotations

from tmd.case import Case, OptionsTable
from tmd.compare import OptionSettings, compare_options
from tmd.dampers.pendulum import PendulumSettings
from tmd.defaults import FREQUENCY_BAND
from tmd.jobs.design import size_damper
from tmd.jobs.shared import (
    bare_block,
    header_block,
    load_name,
    loaded_mode_of,
    target_block,
    with_notes,
)
from tmd.notes import about
from tmd.sizing.viscous import ViscousSettings


def option_settings_of(case: Case):
    """The options' settings from the case's [options.*] tables (their defaults otherwise).

    Parameters
    ----------
    case : Case

    Returns
    -------
    tmd.compare.OptionSettings
        The viscous installation (default deformation per modal displacement
        0.03, a storey-drift damper, not the idealised top-to-ground one) and
        the pendulum stages; the other options keep their dataclass defaults.
    """
    opts = case.tables.options
    if opts is None:
        opts = OptionsTable()
    return OptionSettings(
        pendulum=PendulumSettings(opts.pendulum.stages),
        viscous=ViscousSettings(opts.viscous.deformation, opts.viscous.damper_count,
                                opts.viscous.force_capacity_n, opts.viscous.stroke_capacity_m))


def compare_job(case: Case) -> dict:
    """Every enabled passive option sized on the case, side by side."""
    opts = case.tables.options
    band = None if opts is None else opts.frequency_band
    if band is None:
        band = case.tables.robustness.frequency_band if case.tables.robustness else FREQUENCY_BAND

    def build():
        load = loaded_mode_of(case)
        return header_block(case) | {
            "target": target_block(case),
            "bare": bare_block(load),
            "options_frequency_band": band,
            "options": _options(load),
        }

    def _options(load):
        with about(f"options comparison on the {load_name(case)}"):
            return compare_options(
                load, case.target_peak_m_s2, enabled=None if opts is None else opts.enabled,
                max_mass_ratio=case.damper.max_mass_ratio,
                max_stroke_m=case.damper.max_stroke_m, frequency_band=band,
                tmd_sizing=size_damper(case), settings=option_settings_of(case))

    return with_notes(build, case)
