"""The words pages, cards and ``diff`` use for the compiled plan's keys, so that all three say the same thing."""

from __future__ import annotations

#: Cut-sheet keys of ``antennas[].cut`` (metres) in words.
CUT_LABEL = {
    "total_m": "Radiator, tip to tip",
    "leg_m": "Each leg, feed point to tip",
    "leg_cut_with_extra_m": "Each leg as cut, with extra for the loops",
    "total_cut_with_extra_m": "Radiator as cut, with extra for the loops",
    "reflector_m": "Reflector wire",
    "reflector_cut_with_extra_m": "Reflector as cut, with extra for the loops",
    "reflector_below_m": "Reflector below the radiator",
    "reflector_height_m": "Reflector above ground",
    "end_height_m": "Leg ends above ground",
    "min_end_height_m": "Lowest allowed end height",
    "spacing_m": "Spacing of the two wires",
    "end_allowance_m": "Extra at each end for loops and insulators",
    "rule_of_thumb_total_m": "Rule-of-thumb total, for comparison",
    "rule_of_thumb_leg_m": "Rule-of-thumb leg, for comparison",
}


def cut_label(key: str) -> str:
    """A cut-sheet key in words: 'end_height_m' -> 'Leg ends above ground'."""
    return CUT_LABEL.get(key, key.removesuffix("_m").replace("_", " ").capitalize())


def percent(fraction: float | None) -> str:
    """A fraction of days as the site prints it: whole percent, rounded down ('15 %')."""
    from planpack.briefing import pct

    p = pct(fraction)
    return "–" if p is None else f"{p} %"
