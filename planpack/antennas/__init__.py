"""Antenna checks with NEC-2: cut lengths, SWR per channel, elevation
patterns, NVIS fitness, ground and RF exposure distances.

Public API:

- :class:`AntennaDesign`, :class:`GroundSpec` (inputs, frozen and hashable)
- :func:`analyse_antenna` -> :class:`AntennaAnalysis` (cached)
- :func:`analyse_antennas` (many jobs, solved in parallel processes)
- :func:`exposure_distance_m`, :func:`mpe_limits_mw_cm2`, :func:`station_exposure`
- :func:`isotropic_default_gain_dbi`
- :class:`AntennaInputError`, :class:`AntennaSolveError`
"""

from .analysis import (AntennaAnalysis, analyse_antenna, analyse_antennas, cache_info,
                       clear_cache, isotropic_default_gain_dbi, station_exposure)
from .design import AntennaDesign, AntennaInputError, GroundSpec
from .exposure import exposure_distance_m, mpe_limits_mw_cm2
from .solver import AntennaSolveError

__all__ = [
    "AntennaAnalysis", "AntennaDesign", "AntennaInputError", "AntennaSolveError",
    "GroundSpec", "analyse_antenna", "analyse_antennas", "cache_info", "clear_cache",
    "exposure_distance_m", "isotropic_default_gain_dbi", "mpe_limits_mw_cm2",
    "station_exposure",
]
