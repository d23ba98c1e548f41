"""Defaults shared by the case file, the library functions and the report (the only copy).

A case key that is left out, a library argument that is not given and the
report's fallback all take their value from here, so that each default has one
source. The README's case-key tables state the same values.
"""

DURATION_S = 600.0
"""Averaging duration T of peak factors [s]: the 10-minute mean-wind period of
EN 1991-1-4 and of the comfort criteria (common practice)."""

MAX_MASS_RATIO = 0.05
"""Largest damper mass ratio m_d / M* a least-mass search considers [-]
(a few percent is the practical range for buildings, common practice)."""

FREQUENCY_BAND = 0.15
"""Half-width b of the structure-frequency band s in [1 - b, 1 + b] used for
the band maximum, the robust design, the options comparison and the report's
re-tuning range [-] (common practice for the scatter of predicted against
measured building frequencies)."""

SWEEP_RANGE = 0.20
"""Half-range of the structure-frequency detuning sweep [-]."""

SPRING_RANGE = 0.10
"""Half-range of the as-built damper spring sweep [-]."""

DASHPOT_RANGE = 0.30
"""Half-range of the as-built damper dashpot sweep [-]."""
