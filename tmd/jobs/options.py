"""The compare job: every enabled passive option sized on the case."""

from __future__ import annotations

from tmd.case import Case, OptionsTable
from tmd.compare import OptionSettings, compare_options
from tmd.defaults import FREQUENCY_BAND
from tmd.jobs.design import figure_series_of, size_damper
from tmd.jobs.shared import (
    bare_block,
    header_block,
    load_name,
    loaded_mode_of,
    stroke_cases_of,
    target_block,
    with_notes,
)
from tmd.notes import about
from tmd.side_by_side import side_by_side


def option_settings_of(case: Case):
    """Return the options' settings from the case's [options.*] tables (their defaults otherwise).

    Parameters
    ----------
    case : Case
        The validated case file (:func:`tmd.case.read_case`).

    Returns
    -------
    tmd.compare.OptionSettings
        Every option's settings dataclass (:mod:`tmd.case_options`); the
        viscous installation's default is a storey-drift damper (deformation
        per modal displacement 0.03), not the idealised top-to-ground one.
    """
    opts = case.tables.options if case.tables.options is not None else OptionsTable()
    return OptionSettings(pendulum=opts.pendulum.settings(), bank=opts.tmd_bank.settings(),
                          column=opts.liquid_column.settings(),
                          tank=opts.sloshing_tank.settings(), viscous=opts.viscous.settings())


def compare_job(case: Case) -> dict:
    """Run the compare job: every enabled passive option sized on the case, side by side.

    Parameters
    ----------
    case : Case
        The validated case file (:func:`tmd.case.read_case`).

    Returns
    -------
    dict
        results.json of ``tmd compare``: header, target, bare, the frequency
        band of the robustness check [-] and one ``options`` row per option
        (mass [kg], peak acceleration [m/s^2], stroke [m], force [N], verdict).
    """
    opts = case.tables.options
    band = None if opts is None else opts.frequency_band
    if band is None:
        band = case.tables.robustness.frequency_band if case.tables.robustness else FREQUENCY_BAND

    def build():
        load = loaded_mode_of(case)
        result = header_block(case) | {
            "target": target_block(case),
            "bare": bare_block(load),
            "options_frequency_band": band,
        }
        # The report's curves draw no option (no design, sweep or band design here), so
        # they are computed in a second process while the options are sized.
        result["options"], result["figure_series"] = side_by_side(
            lambda: _options(load), lambda: figure_series_of(case, load, dict(result)))
        return result

    def _options(load):
        with about(f"options comparison on the {load_name(case)}"):
            return compare_options(
                load, case.target_peak_m_s2, enabled=None if opts is None else opts.enabled,
                max_mass_ratio=case.damper.max_mass_ratio,
                max_stroke_m=case.damper.max_stroke_m, frequency_band=band,
                tmd_sizing=size_damper(case), settings=option_settings_of(case),
                stroke_loads=stroke_cases_of(case),
                return_period_loads=tuple((w.return_period_years, loaded_mode_of(case, w))
                                          for w in case.wind_loads))

    return with_notes(build, case)
