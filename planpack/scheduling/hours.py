"""Whole UTC hours of a repeating day: runs across midnight and their labels.

An hour slot ``h`` covers h:00 to (h+1):00 UTC, and the day repeats (the
predictions are monthly medians, so 23:00 is followed by 00:00 of the same
prediction). A run of slots is therefore cyclic: ``[22, 23, 0, 1]`` is one run,
shown as 22:00–02:00.
"""

from __future__ import annotations

from collections.abc import Hashable, Sequence

from ._inputs import HOURS, ScheduleInputError

EN_DASH = "\u2013"


def cyclic_runs(labels: Sequence[Hashable | None]) -> list[tuple[object, list[int]]]:
    """Group the 24 hour slots into maximal runs of equal, non-None label.

    Parameters
    ----------
    labels : sequence of 24 hashables or None, one per UTC hour 0..23.
        ``None`` marks an hour that belongs to no run.

    Returns
    -------
    list of (label, hours)
        ``hours`` are consecutive UTC hours [h], wrapping over midnight; runs
        are sorted by their first hour. If all 24 hours share one label the
        single run starts at hour 0.
    """
    if len(labels) != HOURS:
        raise ScheduleInputError(
            f"labels: expected 24 entries, one per UTC hour; got {len(labels)}")
    labels = list(labels)
    # Start scanning at an hour where a run begins, so a run across midnight
    # is not cut in two.
    start = next((h for h in range(HOURS) if labels[h] != labels[h - 1]), None)
    if start is None:
        return [] if labels[0] is None else [(labels[0], list(range(HOURS)))]
    runs: list[tuple[object, list[int]]] = []
    for step in range(HOURS):
        h = (start + step) % HOURS
        if labels[h] is None:
            continue
        if runs and labels[h] == runs[-1][0] and runs[-1][1][-1] == (h - 1) % HOURS:
            runs[-1][1].append(h)
        else:
            runs.append((labels[h], [h]))
    runs.sort(key=lambda run: run[1][0])
    return runs


def hour_runs(hours: Sequence[int]) -> list[list[int]]:
    """Split a set of UTC hours [h] into runs of consecutive hours (cyclic).

    >>> hour_runs([23, 0, 1, 5, 6])
    [[5, 6], [23, 0, 1]]
    """
    members = set(_check_hours(hours))
    return [run for _, run in cyclic_runs([True if h in members else None for h in range(HOURS)])]


def format_hours(hours: Sequence[int], local_labels: Sequence[str] | None = None) -> str:
    """Format UTC hour slots as clock ranges for a message, e.g. "01:00–06:00".

    Parameters
    ----------
    hours : sequence of int
        UTC hour slots [h], 0..23, in any order; each covers h:00 to h+1:00.
    local_labels : sequence of 24 str, optional
        The local clock time at the start of each UTC hour slot, indexed by
        UTC hour (e.g. ``["02:00", "03:00", ...]`` for UTC+2, or "05:30" for a
        half-hour zone). Default: the UTC clock, "HH:00".

    Returns
    -------
    str
        The runs of consecutive hours as "start–end" with an en dash, where
        the end is the label of the hour after the run's last slot; several
        runs are joined with ", "; all 24 hours give "all day".

    >>> format_hours([1, 2, 3, 4, 5])
    '01:00–06:00'
    >>> format_hours([22, 23, 0])
    '22:00–01:00'
    """
    if local_labels is None:
        local_labels = [f"{h:02d}:00" for h in range(HOURS)]
    elif isinstance(local_labels, str) or len(local_labels) != HOURS:
        raise ScheduleInputError("local_labels: expected 24 clock labels, one per UTC hour; "
                                 f"got {local_labels!r}")
    runs = hour_runs(hours)
    if not runs:
        raise ScheduleInputError("hours: expected at least one UTC hour to format; got none")
    if len(runs[0]) == HOURS:
        return "all day"
    return ", ".join(f"{local_labels[run[0]]}{EN_DASH}{local_labels[(run[-1] + 1) % HOURS]}"
                     for run in runs)


def _check_hours(hours: Sequence[int]) -> list[int]:
    if isinstance(hours, (str, bytes)):
        raise ScheduleInputError(f"hours: expected UTC hours 0..23; got {hours!r}")
    out = []
    for h in hours:
        if isinstance(h, bool) or not hasattr(h, "__index__") or not 0 <= int(h) < HOURS:
            raise ScheduleInputError(f"hours: expected UTC hours 0..23; got {h!r}")
        out.append(int(h))
    return out
