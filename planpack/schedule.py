"""Choosing channels hour by hour, finding gaps, building ALE scan lists.

The compiler calls these with plain numpy arrays from the propagation
package (n links × 24 UTC hours × c channels in plan order) and puts the
plain-data results (``.to_dict()``) into the compiled plan. Nothing here
knows about YAML, pages or physics.

- :func:`link_choices` — first and second channel per link and hour
- :func:`net_schedule` — one shared net channel per hour, few changes
- :func:`find_gaps` — hours the assigned channels leave uncovered, and the
  frequency window that would close each
- :func:`scan_lists` — ALE scan list per station, call time, day/night split
- :func:`format_hours` — "01:00–06:00" labels for messages
"""

from planpack.scheduling._inputs import ScheduleInputError
from planpack.scheduling.choices import LinkChoices, link_choices, rank_channels
from planpack.scheduling.gaps import (DEFAULT_TARGET, NOT_AUTHORISED, SPLIT, UNSERVED, Gap,
                                      find_gaps, frequency_window)
from planpack.scheduling.hours import cyclic_runs, format_hours, hour_runs
from planpack.scheduling.net import (DEFAULT_CHANGE_PENALTY, NetSchedule, net_channel_order,
                                     net_schedule)
from planpack.scheduling.scan import (DEFAULT_USEFUL_GOOD_DAYS, FORMULA, REDUNDANT_WORD_S,
                                      CallTime, ScanGroup, ScanPlan, ScanSplit,
                                      StationScanList, address_words, scan_lists,
                                      scanning_call_time)

__all__ = [
    "DEFAULT_CHANGE_PENALTY", "DEFAULT_TARGET", "DEFAULT_USEFUL_GOOD_DAYS", "FORMULA",
    "NOT_AUTHORISED", "REDUNDANT_WORD_S", "SPLIT", "UNSERVED",
    "CallTime", "Gap", "LinkChoices", "NetSchedule", "ScanGroup", "ScanPlan", "ScanSplit",
    "ScheduleInputError", "StationScanList",
    "address_words", "cyclic_runs", "find_gaps", "format_hours", "frequency_window",
    "hour_runs", "link_choices", "net_channel_order", "net_schedule", "rank_channels",
    "scan_lists", "scanning_call_time",
]
