"""Published HF propagation methods for planpack.

The entry point is :func:`planpack.ionosphere.budget.predict_month`; the
other modules each hold one published model (geodesy, sun, iri, muf,
absorption, noise, groundwave).
"""

from .budget import (VIA_E, VIA_F2, VIA_GROUND, VIA_NAMES, VIA_NONE, ChannelSet, LinkSet,
                     MonthPrediction, methods, predict_month, station_sun_times)

__all__ = ["ChannelSet", "LinkSet", "MonthPrediction", "predict_month", "methods",
           "station_sun_times", "VIA_NAMES", "VIA_NONE", "VIA_GROUND", "VIA_E", "VIA_F2"]
