"""Names the case file accepts, with no dependence on the code that acts on them.

The case file validates option names and objectives against these tuples;
:mod:`tmd.compare` and :mod:`tmd.design` check at import that they implement
exactly these names. This module imports nothing, so validation stays light.
"""

OPTION_NAMES = ("tmd", "pendulum", "tmd-bank", "liquid-column", "sloshing-tank", "viscous")
"""Passive options of ``tmd compare``, in their default order (names of our own)."""

OBJECTIVES = ("acceleration", "displacement")
"""Structure responses a TMD tuning can minimise."""

STATISTICS = ("peak", "rms")
"""Statistics of the response a tuning can minimise."""
