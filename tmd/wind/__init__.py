"""Wind loading library: mean wind and turbulence, spectra, spatial correlation.

The modal force spectrum built from these lives in :mod:`tmd.loads`, the
EN 1991-1-4 Annex B check in :mod:`tmd.codecheck`.
"""

from tmd.wind.coherence import (
    DECAY_EUROCODE,
    DECAY_LATERAL,
    DECAY_VERTICAL,
    area_admittance_sq,
    averaged_exponential,
    cross_spectrum,
    root_coherence,
)
from tmd.wind.profile import (
    AIR_DENSITY_KG_M3,
    MAXIMUM_HEIGHT_M,
    TERRAIN_CATEGORIES,
    Site,
    probability_factor,
    roughness_factor,
    terrain_factor,
    turbulence_length_scale,
)
from tmd.wind.turbulence import (
    SPECTRUM_MODELS,
    davenport_psd,
    davenport_reduced,
    eurocode_psd,
    eurocode_reduced,
    harris_psd,
    harris_reduced,
    kaimal_psd,
    kaimal_reduced,
    velocity_spectrum,
    von_karman_psd,
    von_karman_reduced,
)

__all__ = [
    "AIR_DENSITY_KG_M3",
    "DECAY_EUROCODE",
    "DECAY_LATERAL",
    "DECAY_VERTICAL",
    "MAXIMUM_HEIGHT_M",
    "SPECTRUM_MODELS",
    "TERRAIN_CATEGORIES",
    "Site",
    "area_admittance_sq",
    "averaged_exponential",
    "cross_spectrum",
    "davenport_psd",
    "davenport_reduced",
    "eurocode_psd",
    "eurocode_reduced",
    "harris_psd",
    "harris_reduced",
    "kaimal_psd",
    "kaimal_reduced",
    "probability_factor",
    "root_coherence",
    "roughness_factor",
    "terrain_factor",
    "turbulence_length_scale",
    "velocity_spectrum",
    "von_karman_psd",
    "von_karman_reduced",
]
