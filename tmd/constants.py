"""Physical constants used across the package (SI)."""

# Standard acceleration of gravity g_n [m/s^2] (3rd CGPM, 1901; ISO 80000-3).
# It converts accelerations to milli-g and sets pendulum, column and tank frequencies.
STANDARD_GRAVITY = 9.80665
