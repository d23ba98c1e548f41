"""One call per job: what the CLI runs, returning plain result dictionaries.

Each job takes a validated :class:`tmd.case.Case` and returns the dictionary
that is written as results.json (keys end with their SI unit; dimensionless
keys have none). Nothing here prints or writes files. The jobs are the
orchestrator: ``shared`` holds the loaded modes and the blocks every job
writes, and each job has its module (``design``, ``robustness``, ``options``,
``wind``, ``retune``, ``simulation``).
"""

import importlib

# Each job's module is imported when the job is first asked for (PEP 562), so
# that ``tmd wind`` does not load the sizing, comparison and robustness stack.
_HOMES = {"design_job": "design", "evaluate_job": "design", "peak_estimates": "design",
          "size_damper": "design", "compare_job": "options", "option_settings_of": "options",
          "retune_job": "retune", "robustness_block": "robustness",
          "robustness_settings": "robustness", "sweep_job": "robustness",
          "by_return_period": "shared", "loaded_mode_of": "shared",
          "stroke_cases_of": "shared", "simulation_job": "simulation", "wind_job": "wind"}


def __getattr__(name):
    home = _HOMES.get(name)
    if home is None:
        raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
    value = getattr(importlib.import_module(f"{__name__}.{home}"), name)
    globals()[name] = value
    return value


__all__ = ["by_return_period", "compare_job", "design_job", "evaluate_job", "loaded_mode_of",
           "option_settings_of", "peak_estimates", "retune_job", "robustness_block",
           "robustness_settings", "simulation_job", "size_damper", "stroke_cases_of",
           "sweep_job", "wind_job"]
