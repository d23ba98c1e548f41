"""The one comparison every "meets the target" verdict comes from.

A design, an option, a band check or the bare building meets a
peak-acceleration target when its value does not exceed the target. Every
verdict in results.json, the tables, the terminal and the report is made by
:func:`meets_target`, so that two verdicts on the same number can never
disagree (a root search may land a few ulps either side of the target; the
searches return the bracket end for which this comparison holds).
"""

from __future__ import annotations

import numpy as np


def meets_target(value, target):
    """Whether a response value meets its limit: value <= target.

    Parameters
    ----------
    value : float or array
        The response, e.g. a peak acceleration [m/s^2]. NaN never meets.
    target : float or array
        The limit, in the same unit as ``value``.

    Returns
    -------
    bool or array of bool
        A Python bool for scalar inputs.

    Notes
    -----
    A serviceability limit is met when the value does not exceed it
    (common practice); no tolerance is added here, so a value one ulp above
    the target fails everywhere alike.
    """
    result = np.asarray(value, dtype=float) <= np.asarray(target, dtype=float)
    return bool(result) if result.ndim == 0 else result
