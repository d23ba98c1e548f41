"""tmd: preliminary sizing of passive dampers for wind-excited slender buildings.

Results are for preliminary sizing only: wind-tunnel data and the measured
properties of the built structure govern final design, a damper must be
re-tuned to the as-built building, and local codes and licensed professional
practice take precedence.
"""

from tmd._version import __version__

__all__ = ["__version__"]
