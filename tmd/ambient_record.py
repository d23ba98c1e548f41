"""Ambient acceleration records: reading and checking them for identification.

A record is a CSV file with the header ``time_s,acceleration_m_s2``: sample
times with a uniform step and the measured acceleration of the structure
(damper locked). Every rule that fails is one :class:`RecordError` naming the
file, the line and what is allowed (exit code 2).
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

import numpy as np

from tmd.errors import InputError

HEADER = ("time_s", "acceleration_m_s2")
MIN_SAMPLES = 1024  # fewer cannot hold a Welch estimate of several segments (our rule)
TIME_STEP_TOLERANCE = 1e-3  # allowed jitter of the time step, relative to its median


class RecordError(InputError):
    """A record that cannot be used (exit code 2); the message says where and why."""


@dataclass(frozen=True)
class AccelerationRecord:
    """A uniformly sampled acceleration record.

    Parameters
    ----------
    time_step_s : float
        Sampling interval dt [s].
    acceleration_m_s2 : numpy.ndarray
        Samples [m/s^2].
    source : str
        Where the record came from (a file name), for messages.
    """

    time_step_s: float
    acceleration_m_s2: np.ndarray
    source: str = "record"

    @property
    def duration_s(self) -> float:
        """Record length T = N dt [s]."""
        return self.acceleration_m_s2.size * self.time_step_s


def read_acceleration_record(path: str | Path) -> AccelerationRecord:
    """Read and check a CSV record with the header ``time_s,acceleration_m_s2``.

    Parameters
    ----------
    path : str or Path
        The CSV file.

    Returns
    -------
    AccelerationRecord

    Raises
    ------
    RecordError
        Unreadable file, wrong header, non-numeric or non-finite values, a
        time step that is not uniform, or too few samples.
    """
    path = Path(path)
    try:
        text = path.read_text(encoding="utf-8")
    except FileNotFoundError:
        raise RecordError(f"{path}: no such record file") from None
    except (OSError, UnicodeDecodeError) as exc:
        raise RecordError(f"{path}: cannot read the record ({exc})") from None
    lines = [line for line in text.splitlines() if line.strip()]
    if not lines:
        raise RecordError(f"{path}: the record is empty")
    header = tuple(h.strip() for h in lines[0].split(","))
    if header != HEADER:
        raise RecordError(f"{path}: line 1: header {','.join(header)!r}; expected "
                          f"{','.join(HEADER)!r}")
    values = np.empty((len(lines) - 1, 2))
    for row, line in enumerate(lines[1:]):
        parts = line.split(",")
        try:
            if len(parts) != 2:
                raise ValueError
            values[row] = [float(parts[0]), float(parts[1])]
        except ValueError:
            raise RecordError(f"{path}: line {row + 2}: {line.strip()!r} is not two numbers "
                              "(time_s, acceleration_m_s2)") from None
    return record_from_samples(values[:, 0], values[:, 1], source=str(path))


def record_from_samples(time_s, acceleration_m_s2, *, source: str = "record"
                        ) -> AccelerationRecord:
    """Check sampled values and make a record of them.

    Parameters
    ----------
    time_s : array_like
        Sample times [s], strictly increasing with a uniform step (jitter up
        to :data:`TIME_STEP_TOLERANCE` of the step).
    acceleration_m_s2 : array_like
        Samples [m/s^2], finite.
    source : str
        Name used in messages.

    Returns
    -------
    AccelerationRecord

    Raises
    ------
    RecordError
        Which rule failed, with the first offending line (header = line 1).
    """
    t = np.asarray(time_s, float)
    a = np.asarray(acceleration_m_s2, float)
    if t.size < MIN_SAMPLES:
        raise RecordError(f"{source}: {t.size} samples; at least {MIN_SAMPLES} are needed")
    for name, v in (("time_s", t), ("acceleration_m_s2", a)):
        bad = np.nonzero(~np.isfinite(v))[0]
        if bad.size:
            raise RecordError(f"{source}: line {bad[0] + 2}: {name} = {v[bad[0]]}: must be a "
                              "finite number")
    steps = np.diff(t)
    dt = float(np.median(steps))
    if not dt > 0:
        raise RecordError(f"{source}: time_s must increase (median step {dt:g} s)")
    off = np.nonzero(np.abs(steps - dt) > TIME_STEP_TOLERANCE * dt)[0]
    if off.size:
        i = off[0]
        raise RecordError(f"{source}: line {i + 3}: time step {steps[i]:.6g} s differs from the "
                          f"record's step {dt:.6g} s by more than {TIME_STEP_TOLERANCE:g} of it; "
                          "the methods need uniform sampling (resample the record first)")
    return AccelerationRecord(dt, a, source)
