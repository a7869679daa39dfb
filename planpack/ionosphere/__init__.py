"""Published HF propagation methods for planpack.

The entry points are :func:`planpack.ionosphere.budget.predict_month` (every
link, hour slot, channel and band-grid frequency of a month) and
:func:`planpack.ionosphere.budget.predict_link_hours` (chosen link-hour pairs
on any frequencies); the other modules each hold one published model
(geodesy, sun, iri, muf, absorption, noise, groundwave).
"""

from .budget import (SAMPLE_UTC_H, VIA_E, VIA_F2, VIA_GROUND, VIA_NAMES, VIA_NONE, ChannelSet,
                     LinkHourPrediction, LinkSet, MonthPrediction, grid_requirement, methods,
                     predict_link_hours, predict_month, station_sun_times)

__all__ = ["ChannelSet", "LinkSet", "MonthPrediction", "LinkHourPrediction", "predict_month",
           "predict_link_hours", "grid_requirement", "methods", "station_sun_times", "SAMPLE_UTC_H",
           "VIA_NAMES", "VIA_NONE", "VIA_GROUND", "VIA_E", "VIA_F2"]
