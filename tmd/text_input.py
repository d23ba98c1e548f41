"""Input files as text and TOML, with the standard library only.

The command line reads a case file here before it imports the case schema
(pydantic, numpy, the wind models), so that a missing, unreadable, non-UTF-8
or malformed file exits with code 2 at once. The messages are the ones the
case reader gives: the readers of :mod:`tmd.case` and :mod:`tmd.spectra` call
these functions.
"""

from __future__ import annotations

import tomllib
from pathlib import Path

from tmd.errors import CaseError, InputError


def read_text(path: str | Path, what: str, error: type[Exception] = InputError) -> str:
    """Return the text of an input file: UTF-8, with or without a byte-order mark.

    Parameters
    ----------
    path : str or Path
        The file [path].
    what : str
        What the file is, for messages ("case file", "force spectrum").
    error : type
        The exception class raised when the file cannot be used.

    Returns
    -------
    str
        The text without a BOM.

    Raises
    ------
    Exception
        Of class ``error``, if the file is missing, unreadable or not UTF-8
        (naming the file and the first bad byte's position).
    """
    path = Path(path)
    try:
        data = path.read_bytes()
    except FileNotFoundError:
        raise error(f"{path}: no such {what}") from None
    except OSError as exc:
        raise error(f"{path}: cannot read the {what} ({exc.strerror})") from None
    try:
        return data.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        line = data[:exc.start].count(b"\n") + 1
        raise error(
            f"{path}: the {what} is not UTF-8 text (byte {data[exc.start]:#04x} at line {line}, "
            f"byte offset {exc.start}); save it as UTF-8") from None


def read_case_toml(path: str | Path) -> dict:
    """Return the tables of a case file, parsed but not validated.

    Parameters
    ----------
    path : str or Path
        The case file (TOML, UTF-8).

    Returns
    -------
    dict
        The case file's tables and keys, as :func:`tomllib.loads` gives them.

    Raises
    ------
    CaseError
        If the file is missing, unreadable, not UTF-8 or not valid TOML.
    """
    text = read_text(path, "case file", CaseError)
    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise CaseError(f"{Path(path)}: not valid TOML: {exc}") from None


def is_building_case(path: str | Path) -> bool:
    """Tell whether the file is readable TOML with ``[[modes]]`` (a whole-building case).

    A file that cannot be read is not one; :func:`read_case_toml` then names
    the problem.

    Parameters
    ----------
    path : str or Path
        The case file.

    Returns
    -------
    bool
    """
    try:
        return "modes" in read_case_toml(path)
    except CaseError:
        return False
