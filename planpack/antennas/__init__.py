"""Antenna checks with NEC-2: cut lengths, losses from the set to the antenna
per channel and across the band, elevation patterns, NVIS fitness, ground
and RF exposure distances.

Public API:

- :class:`AntennaDesign`, :class:`GroundSpec` (inputs, frozen and hashable)
- :func:`analyse_antenna` -> :class:`AntennaAnalysis` (cached), with
  :meth:`AntennaAnalysis.figures_at` -> :class:`BandFigures` for any
  frequency in the band
- :func:`analyse_antennas` (many jobs, solved in parallel processes)
- :func:`loss_chain`, :func:`swr_text` and the matching devices
  (:mod:`planpack.antennas.matching`)
- :func:`exposure_distance_m`, :func:`mpe_limits_mw_cm2`, :func:`station_exposure`
- :func:`isotropic_default_gain_dbi`
- :class:`AntennaInputError` (and :class:`AntennaGeometryError`),
  :class:`AntennaSolveError`
"""

from .analysis import (AntennaAnalysis, BandFigures, analyse_antenna, analyse_antennas, cache_info,
                       clear_cache, isotropic_default_gain_dbi, station_exposure)
from .design import AntennaDesign, AntennaGeometryError, AntennaInputError, GroundSpec
from .exposure import exposure_distance_m, mpe_limits_mw_cm2
from .losstext import LOSS_WARN_DB
from .matching import DEVICES, LossChain, loss_chain, swr_text
from .solver import AntennaSolveError

__all__ = [
    "AntennaAnalysis", "AntennaDesign", "AntennaGeometryError", "AntennaInputError", "AntennaSolveError",
    "BandFigures", "DEVICES", "GroundSpec", "LOSS_WARN_DB", "LossChain", "analyse_antenna", "analyse_antennas",
    "cache_info", "clear_cache", "exposure_distance_m", "isotropic_default_gain_dbi", "loss_chain",
    "mpe_limits_mw_cm2", "station_exposure", "swr_text",
]
