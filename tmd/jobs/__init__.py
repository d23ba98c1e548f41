"""One call per job: what the CLI runs, returning plain result dictionaries.

Each job takes a validated :class:`tmd.case.Case` and returns the dictionary
that is written as results.json (keys end with their SI unit; dimensionless
keys have none). Nothing here prints or writes files. The jobs are the
orchestrator: ``shared`` holds the loaded modes and the blocks every job
writes, and each job has its module (``design``, ``robustness``, ``options``,
``wind``, ``retune``, ``simulation``).
"""

from tmd.jobs.design import design_job, evaluate_job, peak_estimates, size_damper
from tmd.jobs.options import compare_job, option_settings_of
from tmd.jobs.retune import retune_job
from tmd.jobs.robustness import robustness_block, robustness_settings, sweep_job
from tmd.jobs.shared import by_return_period, loaded_mode_of, stroke_cases_of
from tmd.jobs.simulation import simulation_job
from tmd.jobs.wind import wind_job

__all__ = ["by_return_period", "compare_job", "design_job", "evaluate_job", "loaded_mode_of",
           "option_settings_of", "peak_estimates", "retune_job", "robustness_block",
           "robustness_settings", "simulation_job", "size_damper", "stroke_cases_of",
           "sweep_job", "wind_job"]
