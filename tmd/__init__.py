"""tmd: preliminary sizing of passive dampers for wind-excited slender buildings.

Results are for preliminary sizing only: wind-tunnel data and the measured
properties of the built structure govern final design, a damper must be
re-tuned to the as-built building, and local codes and licensed professional
practice take precedence.

The public surface is :data:`__all__` (see :mod:`tmd.api` and the README's
"Python" section): read or build a case, run a job, get a :class:`Result`.
The names are imported on first use, so that ``import tmd`` and the ``tmd``
command stay quick.
"""

from tmd._version import __version__

# The jobs are run_*: tmd.design, tmd.compare, ... are modules of the package.
_API = ("Case", "Mode", "Result", "TunedMassDamper", "case_from_dict", "case_of", "read_case",
        "run_compare", "run_design", "run_evaluate", "run_sweep", "with_mode")
_SPECTRA = ("FirstOrderSpectrum", "TabulatedSpectrum", "WhiteSpectrum")

__all__ = ["__version__", *_API, *_SPECTRA]


def __getattr__(name):
    if name in _API:
        import tmd.api

        return getattr(tmd.api, name)
    if name in _SPECTRA:
        import tmd.spectra

        return getattr(tmd.spectra, name)
    raise AttributeError(f"module 'tmd' has no attribute {name!r}")


def __dir__():
    return sorted(set(globals()) | set(__all__))
