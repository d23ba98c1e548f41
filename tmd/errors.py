"""The library's own error classes, in a module with no dependencies.

They decide the command line's exit codes:

* :class:`InputError` (and its subclasses for case files, spectra and output
  folders): the user's input breaks a documented rule; the message names the
  file, field, value and what is allowed. Exit code 2.
* :class:`NumericalFailure`: the base of every error raised because a
  computation failed (a root search without a bracket, an optimiser or solver
  that did not converge, a non-finite intermediate result). Exit code 1, and
  so is any other exception that escapes the library.
"""

from __future__ import annotations


class InputError(ValueError):
    """An input that breaks its documented rule; the message says which and why (exit code 2)."""


class CaseError(InputError):
    """A case that cannot be used; the message says where and why (exit code 2)."""


class NumericalFailure(RuntimeError):
    """A computation failed numerically; the message says what and with which values."""


class BracketError(NumericalFailure):
    """A root search found no sign change over its bracket."""


class NonFiniteResult(NumericalFailure):
    """An intermediate result was NaN or infinite."""
