"""Modal force spectra: the load side of the response computation.

Every spectrum here is a one-sided power spectral density per Hz of the modal
(generalised) force, in N^2/Hz, so that the force variance is the integral of
S_F(f) df from 0 to infinity. A spectrum is any object with

* ``__call__(frequency_hz) -> psd`` evaluating on an array of any shape and
  returning zero outside the support,
* ``f_min_hz`` and ``f_max_hz``, the support (0 and ``inf`` are allowed),
* ``breakpoints_hz``, frequencies where the spectrum is not smooth (may be
  empty); the response engine puts panel edges there when they fall near a
  resonance.

The wind model (:mod:`tmd.loads`) produces spectra of this kind too, so the
engine never needs to know where a spectrum came from.
"""

from __future__ import annotations

import csv
import re
from dataclasses import dataclass, field
from pathlib import Path
from typing import Protocol, runtime_checkable

import numpy as np

from tmd.text_input import read_text

CSV_HEADER = ("frequency_hz", "psd_n2_per_hz")


@runtime_checkable
class ForceSpectrum(Protocol):
    """What the engine needs of a modal force spectrum (one-sided, N^2/Hz)."""

    f_min_hz: float
    f_max_hz: float
    breakpoints_hz: tuple[float, ...]

    def __call__(self, frequency_hz: np.ndarray) -> np.ndarray:
        """Evaluate S_F(f) [N^2/Hz] on an array of frequencies [Hz], zero outside the support."""


@dataclass(frozen=True)
class WhiteSpectrum:
    """Band-limited (or unlimited) white modal force.

    Parameters
    ----------
    level : float
        One-sided PSD G [N^2/Hz]. A two-sided PSD S0 per rad/s is G = 4 pi S0.
    f_min_hz, f_max_hz : float
        Support [Hz]; defaults 0 and infinity.
    breakpoints_hz : tuple of float
        Frequencies where the spectrum is not smooth [Hz]; the engine puts
        panel edges there. Empty by default.
    """

    level: float
    f_min_hz: float = 0.0
    f_max_hz: float = np.inf
    breakpoints_hz: tuple[float, ...] = ()

    def __call__(self, frequency_hz):
        """Evaluate S_F(f) [N^2/Hz], zero outside the support.

        Parameters
        ----------
        frequency_hz : array
            f [Hz], any shape.

        Returns
        -------
        numpy.ndarray
            One-sided modal force PSD [N^2/Hz], of the shape of ``frequency_hz``.
        """
        f = np.asarray(frequency_hz, dtype=float)
        inside = (f >= self.f_min_hz) & (f <= self.f_max_hz)
        return np.where(inside, self.level, 0.0)


@dataclass(frozen=True)
class FirstOrderSpectrum:
    """White force passed through a first-order low-pass filter.

    S_F(f) = G / (1 + (f / f_c)^2), the spectrum of an Ornstein-Uhlenbeck
    force F' = -2 pi f_c F + w. It is the simplest coloured load for which the
    acceleration variance is finite, and it has an exact state-space form.

    Parameters
    ----------
    level : float
        One-sided PSD at zero frequency G [N^2/Hz].
    corner_hz : float
        Corner frequency f_c [Hz].
    f_min_hz, f_max_hz : float
        Support [Hz]; defaults 0 and infinity.
    breakpoints_hz : tuple of float
        Frequencies where the spectrum is not smooth [Hz]; the engine puts
        panel edges there. Empty by default.

    References
    ----------
    The first-order (Ornstein-Uhlenbeck) spectrum, common practice (any
    random vibration text).
    """

    level: float
    corner_hz: float
    f_min_hz: float = 0.0
    f_max_hz: float = np.inf
    breakpoints_hz: tuple[float, ...] = ()

    def __call__(self, frequency_hz):
        """Evaluate S_F(f) [N^2/Hz], zero outside the support.

        Parameters
        ----------
        frequency_hz : array
            f [Hz], any shape.

        Returns
        -------
        numpy.ndarray
            One-sided modal force PSD [N^2/Hz], of the shape of ``frequency_hz``.
        """
        f = np.asarray(frequency_hz, dtype=float)
        inside = (f >= self.f_min_hz) & (f <= self.f_max_hz)
        return np.where(inside, self.level / (1.0 + (f / self.corner_hz) ** 2), 0.0)


@dataclass(frozen=True)
class TabulatedSpectrum:
    """A spectrum given as a table, interpolated linearly in log-log.

    Between table points log S is linear in log f (a power law on each
    interval); outside the table the spectrum is zero, so the response is
    integrated over the table's range only, unless ``tail_exponent`` continues
    it above the last row.

    Parameters
    ----------
    frequency_hz : array
        Strictly increasing, strictly positive frequencies [Hz].
    psd_n2_per_hz : array
        Strictly positive one-sided PSD values [N^2/Hz].
    source : str
        Where the table came from (shown in reports).
    tail_exponent : float, optional
        p < -1 [-]: above the last row f_n the spectrum is the power law
        S(f) = S_n (f / f_n)^p up to infinity (``f_max_hz`` is then inf), for
        a model whose asymptote is known (:func:`tmd.loads.modal_force_spectrum`).
        Default None: zero above the table (a user's table ends where its
        author chose).
    edge_advice : str
        What the top-decade warning (:class:`tmd.performance.UpperEdgeWarning`)
        advises for this table; empty: extend the table. A model spectrum
        whose tail no table length can settle says so here instead.
    """

    frequency_hz: np.ndarray
    psd_n2_per_hz: np.ndarray
    source: str = ""
    tail_exponent: float | None = None
    edge_advice: str = field(default="", compare=False)
    _log_f: np.ndarray = field(init=False, repr=False, compare=False)
    _log_s: np.ndarray = field(init=False, repr=False, compare=False)

    def __post_init__(self):
        f = np.asarray(self.frequency_hz, dtype=float)
        s = np.asarray(self.psd_n2_per_hz, dtype=float)
        problem = table_problem(f, s)
        if problem:
            raise ValueError(problem)
        p = self.tail_exponent
        if p is not None and not (isinstance(p, int | float) and np.isfinite(p) and p < -1):
            raise ValueError(f"tail_exponent = {p!r}; must be a finite number < -1 (a finite "
                             "variance)")
        object.__setattr__(self, "frequency_hz", f)
        object.__setattr__(self, "psd_n2_per_hz", s)
        object.__setattr__(self, "_log_f", np.log(f))
        object.__setattr__(self, "_log_s", np.log(s))

    @property
    def f_min_hz(self) -> float:
        """Lowest tabulated frequency [Hz]; the spectrum is zero below it."""
        return float(self.frequency_hz[0])

    @property
    def f_max_hz(self) -> float:
        """Highest tabulated frequency [Hz]; the spectrum is zero above it, or inf with a tail."""
        return float(self.frequency_hz[-1]) if self.tail_exponent is None else np.inf

    @property
    def breakpoints_hz(self) -> tuple[float, ...]:
        """Every tabulated frequency [Hz]: the interpolant's slope changes there."""
        return tuple(self.frequency_hz.tolist())

    def __call__(self, frequency_hz):
        """Evaluate S_F(f) [N^2/Hz], zero outside the support.

        Parameters
        ----------
        frequency_hz : array
            f [Hz], any shape.

        Returns
        -------
        numpy.ndarray
            One-sided modal force PSD [N^2/Hz], of the shape of ``frequency_hz``.
        """
        f = np.asarray(frequency_hz, dtype=float)
        last = self.frequency_hz[-1]
        # The engine calls this once per chunk of designs on every grid node, so the
        # work outside the table (zero, or the power-law tail) is done on those nodes
        # only; np.interp clamps the rest, which are then overwritten.
        value = np.asarray(np.exp(np.interp(np.log(np.maximum(f, self.f_min_hz)),
                                            self._log_f, self._log_s)))
        outside = ~((f >= self.f_min_hz) & (f <= last))  # NaN counts as outside
        if outside.any():
            value[outside] = 0.0
            if self.tail_exponent is not None:
                above = f > last
                value[above] = self.psd_n2_per_hz[-1] * (f[above] / last) ** self.tail_exponent
        return value

    def variance(self) -> float:
        """Return the force variance [N^2], the exact integral of the log-log interpolant.

        Returns
        -------
        float
            sigma_F^2 = integral of S_F(f) df over the table's range, plus the
            tail's S_n f_n / (-p - 1) where it has one [N^2].

        Notes
        -----
        On each interval S = s0 (f / f0)^b, b = ln(s1/s0) / ln(f1/f0), whose
        integral is s0 f0 ((f1/f0)^(b+1) - 1) / (b + 1), or s0 f0 ln(f1/f0)
        for b = -1.
        """
        f, s = self.frequency_hz, self.psd_n2_per_hz
        slope = np.diff(np.log(s)) / np.diff(np.log(f))
        f0, f1, s0 = f[:-1], f[1:], s[:-1]
        power = slope + 1.0
        # Each interval is s0 (f/f0)^slope; integrate the power law exactly.
        with np.errstate(divide="ignore", invalid="ignore"):
            general = s0 * f0 / power * ((f1 / f0) ** power - 1.0)
        log_case = s0 * f0 * np.log(f1 / f0)
        tail = 0.0 if self.tail_exponent is None else s[-1] * f[-1] / -(self.tail_exponent + 1)
        return float(np.sum(np.where(np.abs(power) < 1e-12, log_case, general))) + tail


def table_problem(frequency_hz: np.ndarray, psd: np.ndarray, *, first_row: int = 1,
                  row_word: str = "row") -> str:
    """Describe what is wrong with a spectrum table, or return '' if nothing.

    Parameters
    ----------
    frequency_hz : numpy.ndarray
        Tabulated frequencies [Hz]; must be 1-D, finite, > 0 and strictly
        increasing.
    psd : numpy.ndarray
        One-sided PSD values of the same length [N^2/Hz, or the unit of the
        table]; must be finite and > 0.
    first_row : int
        Number of the table's first row in messages (a CSV's first data line
        is line 2).
    row_word : str
        What a row is called in messages ("row", "line").

    Returns
    -------
    str
        The first problem found, naming the row, the value and what is
        allowed; '' when the table is usable.
    """
    if frequency_hz.ndim != 1 or frequency_hz.shape != psd.shape:
        return "frequency and PSD columns must be 1-D and of equal length"
    if frequency_hz.size < 2:
        return "the table needs at least two rows"
    if not np.all(np.isfinite(frequency_hz)) or np.any(frequency_hz <= 0):
        bad = int(np.flatnonzero(~(np.isfinite(frequency_hz) & (frequency_hz > 0)))[0])
        return (f"{row_word} {bad + first_row}: frequency_hz = {float(frequency_hz[bad])!r}; "
                "must be finite and > 0")
    steps = np.diff(frequency_hz)
    if np.any(steps <= 0):
        bad = int(np.flatnonzero(steps <= 0)[0]) + 1
        return (
            f"{row_word} {bad + first_row}: frequency_hz = {float(frequency_hz[bad])!r} does not "
            f"exceed the {row_word} before ({float(frequency_hz[bad - 1])!r}); frequencies must "
            "be strictly increasing"
        )
    if not np.all(np.isfinite(psd)) or np.any(psd <= 0):
        bad = int(np.flatnonzero(~(np.isfinite(psd) & (psd > 0)))[0])
        return (f"{row_word} {bad + first_row}: psd_n2_per_hz = {float(psd[bad])!r}; "
                "must be finite and > 0")
    return ""


class SpectrumFileError(ValueError):
    """A force-spectrum CSV that cannot be used; the message names file and row."""


_NUMBER = re.compile(r"[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?")


def _number(path: Path, line: int, column: str, text: str) -> float:
    """Parse a plain decimal number: no underscores, hex, nan or inf, as a spreadsheet writes it."""
    text = text.strip()
    if not _NUMBER.fullmatch(text):
        raise SpectrumFileError(f"{path}: line {line}: {column} = {text!r}: must be a plain "
                                "decimal number such as 0.17 or 1.5e6")
    return float(text)


def read_number_table(path: str | Path, header: tuple[str, ...],
                      what: str) -> tuple[np.ndarray, list[int]]:
    """Read a CSV table of plain decimal numbers under an exact header.

    Parameters
    ----------
    path : str or Path
        The CSV file [path]: UTF-8 (a byte-order mark is allowed), any line
        endings, blank lines ignored.
    header : tuple of str
        The column names the first line must hold, in order.
    what : str
        What the file is, for messages ("force spectrum", "profile table").

    Returns
    -------
    table : numpy.ndarray
        Shape (rows, len(header)), the values.
    lines : list of int
        The file's line number of each row, for messages.

    Raises
    ------
    SpectrumFileError
        If the file cannot be read, is not UTF-8, has another header, a row
        with another number of columns, or a cell that is not a plain decimal
        number (no underscores, hex, nan or inf), naming the file, the line,
        the column and the value.
    """
    path = Path(path)
    text = read_text(path, what, SpectrumFileError)
    numbered = [(n, line) for n, line in enumerate(text.splitlines(), start=1) if line.strip()]
    rows = [(n, row) for n, row in zip((n for n, _ in numbered),
                                       csv.reader(line for _, line in numbered), strict=True)]
    if not rows or tuple(c.strip() for c in rows[0][1]) != header:
        got = ",".join(rows[0][1]) if rows else "(empty file)"
        raise SpectrumFileError(f"{path}: header is {got!r}; expected {','.join(header)!r}")
    values, lines = [], []
    for number, row in rows[1:]:
        if len(row) != len(header):
            raise SpectrumFileError(f"{path}: line {number} has {len(row)} columns; expected "
                                    f"{len(header)} ({','.join(header)})")
        values.append(tuple(_number(path, number, c, v) for c, v in zip(header, row, strict=True)))
        lines.append(number)
    return np.array(values, dtype=float).reshape(-1, len(header)), lines


def read_force_psd_csv(path: str | Path) -> TabulatedSpectrum:
    """Read a modal force PSD table with header ``frequency_hz,psd_n2_per_hz``.

    Parameters
    ----------
    path : str or Path
        The CSV file [path]: UTF-8 (a byte-order mark is allowed), any line
        endings, comma-separated plain decimal numbers.

    Returns
    -------
    TabulatedSpectrum
        The table, with ``source`` set to the path.

    Raises
    ------
    SpectrumFileError
        With the file, line, column, value and what is allowed.
    """
    path = Path(path)
    table, lines = read_number_table(path, CSV_HEADER, "force spectrum")
    problem = table_problem(table[:, 0], table[:, 1], first_row=2, row_word="line")
    if problem:
        raise SpectrumFileError(f"{path}: {_true_line(problem, lines)}")
    return TabulatedSpectrum(table[:, 0], table[:, 1], source=str(path))


def _true_line(problem: str, lines: list[int]) -> str:
    """Re-number "line N" (data rows counted from 2) to the file's own line numbers."""
    match = re.match(r"line (\d+)", problem)
    if not match:
        return problem
    row = int(match.group(1)) - 2
    return problem.replace(match.group(0), f"line {lines[row]}", 1) if 0 <= row < len(lines) \
        else problem


def write_force_psd_csv(path: str | Path, frequency_hz, psd_n2_per_hz) -> None:
    """Write a table in the format :func:`read_force_psd_csv` reads.

    Parameters
    ----------
    path : str or Path
        The CSV file to write [path]; it is created or replaced.
    frequency_hz : sequence of float
        Frequencies [Hz].
    psd_n2_per_hz : sequence of float
        One-sided modal force PSD at those frequencies [N^2/Hz].
    """
    with open(path, "w", newline="", encoding="utf-8") as handle:
        writer = csv.writer(handle)
        writer.writerow(CSV_HEADER)
        for f, s in zip(frequency_hz, psd_n2_per_hz, strict=True):
            writer.writerow([f"{f:.10g}", f"{s:.10g}"])
