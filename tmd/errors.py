"""The library's own error classes.

:class:`NumericalFailure` is the base of every error raised because a
computation failed (a root search without a bracket, an optimiser or solver
that did not converge, a non-finite intermediate result), as distinct from
bad input, which raises ``ValueError`` subclasses with the file, field and
value. The command line maps a :class:`NumericalFailure` to exit code 1.
"""

from __future__ import annotations


class NumericalFailure(RuntimeError):
    """A computation failed numerically; the message says what and with which values."""


class BracketError(NumericalFailure):
    """A root search found no sign change over its bracket."""


class NonFiniteResult(NumericalFailure):
    """An intermediate result was NaN or infinite."""
