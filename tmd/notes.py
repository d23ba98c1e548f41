"""Warnings an engineer can act on: one per distinct cause, naming the load it concerns.

A job evaluates hundreds of designs under several loads (each return
period's wind, the design load, the detuning sweep). A warning raised deep in
the engine would otherwise repeat once per evaluation, with numbers that
differ only in the last digit, and without saying which load it is about.

* :func:`about` names the load that the code inside it computes (the
  innermost name counts);
* engine warnings (:class:`LoadWarning` subclasses) record that name and
  their numbers when raised;
* :func:`collect` runs a job and turns what it raised into one line per
  (kind, load), keeping the worst numbers and the count of evaluations.

Floating-point warnings of numpy (``RuntimeWarning``) are summarised in the
same way, once per message and load, in words rather than as raw text.
"""

from __future__ import annotations

import contextlib
import contextvars
import warnings
from collections.abc import Callable, Iterator

_LOAD: contextvars.ContextVar[tuple[str, ...]] = contextvars.ContextVar("tmd_load", default=())
DEFAULT_LOAD = "the job's load"


@contextlib.contextmanager
def about(load: str) -> Iterator[None]:
    """Name the load that the code inside computes, for the warnings it raises.

    Parameters
    ----------
    load : str
        The load in words, e.g. "1-year wind (design load)" or "detuning sweep".

    Yields
    ------
    None
    """
    token = _LOAD.set(_LOAD.get() + (load,))
    try:
        yield
    finally:
        _LOAD.reset(token)


def current_load() -> str:
    """Return the load named by the innermost :func:`about` block.

    Returns
    -------
    str
        Its name, or :data:`DEFAULT_LOAD` outside any block.
    """
    names = _LOAD.get()
    return names[-1] if names else DEFAULT_LOAD


class LoadWarning(UserWarning):
    """A warning about one load, merged with others of the same kind and load by :func:`collect`.

    Parameters
    ----------
    load : str
        The load it concerns (:func:`current_load` at the time it was raised).
    values : dict of str to float
        The numbers it reports; merged by taking the largest.
    """

    def __init__(self, load: str, values: dict[str, float]):
        super().__init__(self.text(load, values, 1))
        self.load = load
        self.values = dict(values)

    def __reduce__(self):
        # Pickled by its own arguments (an exception pickles its message only), so that
        # a warning raised in a child process (tmd.side_by_side) arrives whole.
        return type(self), (self.load, self.values)

    @classmethod
    def text(cls, load: str, values: dict[str, float], count: int) -> str:
        """Return the warning in words.

        Parameters
        ----------
        load : str
            The load it concerns.
        values : dict of str to float
            Its (worst) numbers.
        count : int
            How many evaluations raised it [-].

        Returns
        -------
        str
            One line.
        """
        return f"{load}: {cls.__name__}"

    def key(self) -> tuple:
        """Return what makes two warnings the same cause: kind, load and any non-numeric detail.

        Returns
        -------
        tuple
            A hashable key.
        """
        return (type(self), self.load)


def collect(build: Callable[[], dict], first: tuple[str, ...] = ()) -> tuple[dict, list[str]]:
    """Run ``build`` and gather what it warned, one line per distinct cause.

    Parameters
    ----------
    build : callable
        The job's computation, returning its result dictionary.
    first : tuple of str
        Lines to put first (warnings about the inputs, from the case file).

    Returns
    -------
    result : dict
        What ``build`` returned.
    lines : list of str
        The warnings, in the order their causes first appeared.
    """
    caught: list[tuple[Warning, type, str, str]] = []

    def keep(message, category, filename, lineno, file=None, line=None):
        caught.append((message, category, filename, current_load()))

    with warnings.catch_warnings():
        warnings.simplefilter("always")
        warnings.showwarning = keep
        result = build()
    merged: dict[tuple, list] = {}
    for message, category, filename, load in caught:
        if isinstance(message, LoadWarning):
            key = message.key()
            if key in merged:
                entry = merged[key]
                entry[2] = {k: max(v, message.values.get(k, v)) for k, v in entry[2].items()}
                entry[3] += 1
            else:
                merged[key] = [type(message), message.load, dict(message.values), 1]
        elif issubclass(category, RuntimeWarning):
            key = (RuntimeWarning, load, str(message))
            where = filename.replace("\\", "/").rsplit("/", 1)[-1]
            if key not in merged:
                merged[key] = [_FloatingPoint, load, {"text": str(message), "file": where}, 1]
            else:
                merged[key][3] += 1
        else:
            merged.setdefault(("text", str(message)), [None, str(message), None, 1])
    lines = list(first)
    for kind, load, values, count in merged.values():
        lines.append(load if kind is None else kind.text(load, values, count))
    return result, list(dict.fromkeys(lines))


class _FloatingPoint:
    """The summary line of numpy's floating-point warnings (not raised, only formatted)."""

    @staticmethod
    def text(load: str, values: dict, count: int) -> str:
        times = "once" if count == 1 else f"{count} times"
        return (f"{load}: numpy reported '{values['text']}' ({values['file']}, {times}); values "
                "that are not finite are written as null in results.json")
