"""Progress display for long steps: a rich progress bar on a terminal, silence otherwise.

Library functions take an optional ``on_step(done, total, description)``
callback and never print; the CLI passes the callback this context manager
yields::

    with progress_bar("Writing the report") as on_step:
        files = render_report(results, on_step=on_step)
"""

from __future__ import annotations

from collections.abc import Callable, Iterator
from contextlib import contextmanager

from rich.console import Console
from rich.progress import BarColumn, Progress, TextColumn, TimeElapsedColumn

StepCallback = Callable[[int, int, str], None]


def quiet_step(done: int, total: int, description: str) -> None:
    """Do nothing: the callback of non-interactive runs and tests.

    Parameters
    ----------
    done : int
        Steps finished so far.
    total : int
        Steps in all.
    description : str
        What the current step does.
    """


@contextmanager
def progress_bar(title: str, *, console: Console | None = None,
                 enabled: bool | None = None) -> Iterator[StepCallback]:
    """Yield an ``on_step`` callback that drives a progress bar when interactive.

    Parameters
    ----------
    title : str
        Text shown before the bar.
    console : rich.console.Console, optional
        Where to draw; default standard error.
    enabled : bool, optional
        Force the bar on or off; default: on only when ``console`` is a terminal.

    Yields
    ------
    callable
        ``on_step(done, total, description)``; :func:`quiet_step` when the
        bar is off.
    """
    console = console or Console(stderr=True)
    if not (console.is_terminal if enabled is None else enabled):
        yield quiet_step
        return
    columns = (TextColumn("{task.description}"), BarColumn(), TextColumn("{task.fields[step]}"),
               TimeElapsedColumn())
    with Progress(*columns, console=console, transient=True) as progress:
        task = progress.add_task(title, total=None, step="")

        def on_step(done: int, total: int, description: str) -> None:
            progress.update(task, completed=done, total=total, step=description)

        yield on_step
