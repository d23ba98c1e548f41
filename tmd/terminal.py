"""Terminal output of the CLI: rich consoles and the tables that must stay legible at 80 columns.

Every statement printed here is read from a results dictionary: a verdict is
the results' own ``meets_target``, never decided again from the printed numbers.
"""

from __future__ import annotations

import os

from rich import box
from rich.console import Console
from rich.markup import escape
from rich.table import Table

NON_TERMINAL_WIDTH = 110  # output piped to a file or a pager, where no COLUMNS is stated
OPTION_COLUMNS = (  # header (units in brackets), results key, format, display scale
    ("option", "option", "{}", None),
    ("mass [t]", "mass_kg", "{:,.1f}", 1e-3),
    ("% of M*", "mass_ratio", "{:.2f}", 100.0),
    ("peak acc. [m/s²]", "peak_acceleration_m_s2", "{:.4f}", 1.0),
    ("peak stroke [m]", "peak_stroke_m", "{:.3f}", 1.0),
    ("peak force [kN]", "peak_damper_force_n", "{:,.1f}", 1e-3),
    ("eff. damp.", "effective_damping_ratio", "{:.4f}", 1.0),
    ("worst in band [m/s²]", "peak_acceleration_band_max_m_s2", "{:.4f}", 1.0),
)


def console(*, stderr: bool = False) -> Console:
    """A rich console as wide as the terminal, or as ``COLUMNS`` says when output is piped.

    Parameters
    ----------
    stderr : bool
        Write to standard error instead of standard output.

    Returns
    -------
    rich.console.Console
    """
    stated = os.environ.get("COLUMNS", "").strip().isdigit()
    terminal = Console(stderr=stderr).is_terminal
    return Console(stderr=stderr, width=None if terminal or stated else NON_TERMINAL_WIDTH)


def _cell(value, fmt: str, scale) -> str:
    if value is None:
        return "-"
    if isinstance(value, bool):
        return "yes" if value else "no"
    return fmt.format(value * scale if scale is not None else value)


def options_table(result: dict) -> Table:
    """The compare job's options, one row each, fitting 80 columns without truncation.

    Parameters
    ----------
    result : dict
        results.json of ``tmd compare`` (``options``, ``options_frequency_band``).

    Returns
    -------
    rich.table.Table
    """
    band = result.get("options_frequency_band")
    title = f"{result['case']['name']}: passive options"
    if band is not None:
        title += f" (band ±{100 * band:g}%)"
    table = Table(title=title, box=box.SIMPLE_HEAD, collapse_padding=True, pad_edge=False)
    names = [str(row["option"]) for row in result["options"]]
    table.add_column("option", no_wrap=True, min_width=max(map(len, names), default=6))
    rows = [[escape(name)] + [_cell(row.get(key), fmt, scale) for _, key, fmt, scale
                              in OPTION_COLUMNS[1:]] + [_cell(bool(row["meets_target"]), "", None)]
            for name, row in zip(names, result["options"], strict=True)]
    for header, *_ in OPTION_COLUMNS[1:]:
        table.add_column(escape(header), justify="right")  # "[t]" is a unit, not markup
    table.add_column("meets", justify="right", no_wrap=True)
    for cells in rows:
        table.add_row(*cells)
    table.caption = ("accelerations at the evaluation height; peak stroke: travel relative to "
                     "the structure (liquid column: the liquid's excursion); meets: the "
                     "option's own verdict in results.json")
    return table


def sweep_table(result: dict) -> Table:
    """The structure-frequency sweep of ``tmd sweep``, every column with its unit.

    Parameters
    ----------
    result : dict
        results.json of ``tmd sweep`` (``sweep`` and ``sweep_bare`` rows).

    Returns
    -------
    rich.table.Table
    """
    table = Table(title=f"{result['case']['name']}: structure frequency sweep",
                  box=box.SIMPLE_HEAD)
    for name in ("frequency factor s [-]", "bare peak acc. [m/s²]", "design peak acc. [m/s²]",
                 "peak stroke [m]", "eff. damping ratio [-]"):
        table.add_column(escape(name), justify="right")  # "[m]" is a unit, not markup
    for bare, row in zip(result["sweep_bare"], result["sweep"], strict=True):
        table.add_row(f"{row['structure_frequency_factor']:.3f}",
                      f"{bare['peak_acceleration_m_s2']:.4f}",
                      f"{row['peak_acceleration_m_s2']:.4f}", f"{row['peak_stroke_m']:.3f}",
                      _cell(row.get("effective_damping_ratio"), "{:.4f}", None))
    return table


def verdict_line(result: dict, subject: str = "the given damper") -> tuple[str, str]:
    """One line stating the design block's verdict against the target, and its colour.

    Parameters
    ----------
    result : dict
        A results dictionary with ``design`` and ``target`` blocks.
    subject : str
        What the verdict is about, as the line names it.

    Returns
    -------
    text, colour : str
        The line, and "green" when the target is met, "red" when not, "yellow"
        when the results hold no verdict.
    """
    design, target = result.get("design"), result["target"]["peak_acceleration_m_s2"]
    if not design or design.get("meets_target") is None:
        return f"{subject}: no verdict against the target in the results", "yellow"
    peak = design["peak_acceleration_m_s2"]
    digits = 4
    while f"{peak:.{digits}g}" == f"{target:.{digits}g}" and peak != target and digits < 17:
        digits += 1  # a peak just past the target must not print as equal to it
    numbers = f"peak acceleration {peak:.{digits}g} m/s² against {target:.{digits}g} m/s²"
    if design["meets_target"]:
        return f"{subject} meets the target: {numbers}", "green"
    return f"{subject} does not meet the target: {numbers}", "red"
