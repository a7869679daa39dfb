"""JSON Schema of the request (``planpack request --format json``, and what compile may put in plan.json).

A public contract: tools and tests read these keys. Frequencies in kHz,
hours are UTC hours 0-23 with the plan's local clock beside them,
``good_days`` a fraction 0-1 of the days in the month, ``gap_hours`` a count
of (link, hour) pairs as plan.json's ``gaps`` name them. Beside each fraction
a page prints, ``..._pct`` holds it as a whole percent rounded down (as every
page and card rounds it), so renderers compute nothing.
"""

from __future__ import annotations

import json

NUM = {"type": "number"}
KHZ = {"type": "number", "minimum": 1500, "maximum": 30000}
FRACTION = {"type": "number", "minimum": 0, "maximum": 1}
FRACTION_OR_NULL = {"type": ["number", "null"], "minimum": 0, "maximum": 1}
UTC_HOURS = {"type": "array", "items": {"type": "integer", "minimum": 0, "maximum": 23}, "uniqueItems": True}
LOCAL_HOURS = {"type": "array", "items": {"type": "string", "pattern": "^[0-2][0-9]:[0-5][0-9]$"}}
COUNT = {"type": "integer", "minimum": 0}
PCT = {"type": "integer", "minimum": 0, "maximum": 100}
PCT_OR_NULL = {"type": ["integer", "null"], "minimum": 0, "maximum": 100}
STR = {"type": "string"}


def _obj(props: dict, required: list[str] | None = None) -> dict:
    return {"type": "object", "properties": props, "required": list(props) if required is None else required,
            "additionalProperties": True}


LINK_HOURS = _obj({"link": STR, "utc_hours": UTC_HOURS, "local_hours": LOCAL_HOURS})
WINDOW = {"type": "array", "items": KHZ, "minItems": 2, "maxItems": 2}
BEFORE_AFTER = _obj({"gap_hours": COUNT, "unserved_pairs": COUNT, "utc_hours": UTC_HOURS},
                    ["gap_hours", "unserved_pairs"])
STAGE = _obj({"name": STR, "status": STR, "optimal": {"type": "boolean"}})

SCHEMA = {
    "$schema": "https://json-schema.org/draft/2020-12/schema",
    "$id": "https://planpack.invalid/schema/request-1.json",
    "title": "planpack frequency request",
    **_obj({
        "planpack_request": {"const": 1},
        "net": _obj({"id": STR, "title": STR}, ["id", "title"]),
        "revision": _obj({"id": STR}, ["id"]),
        "target_good_days": FRACTION,
        "target_good_days_pct": PCT,
        "mode": _obj({"id": STR, "snr_db": NUM, "bandwidth_hz": NUM}),
        "candidates": _obj({"bands_khz": {"type": "array", "items": WINDOW, "minItems": 1},
                            "exclude_khz": {"type": "array", "items": WINDOW},
                            "step_khz": {"type": "number", "exclusiveMinimum": 0}, "count": COUNT,
                            "builtin_exclusions": {"type": "array", "items": _obj({"khz": {"type": "array"}, "why": STR,
                                                                                   "source": STR})}}),
        "proposals": {"type": "array", "items": _obj({
            "id": STR, "khz": KHZ, "window_khz": WINDOW,
            "serves": {"type": "array", "items": LINK_HOURS},
            "pairs": COUNT, "worst_good_days": FRACTION_OR_NULL, "worst_good_days_pct": PCT_OR_NULL,
            "net_channel_utc_hours": UTC_HOURS,
        }, ["khz", "window_khz", "serves", "worst_good_days", "worst_good_days_pct"])},
        "merges": {"type": "array", "items": _obj({"proposals": {"type": "array", "items": STR, "minItems": 2, "maxItems": 2},
                                                   "khz": KHZ, "window_khz": WINDOW, "worst_good_days": FRACTION,
                                                   "worst_good_days_pct": PCT, "message": STR})},
        "before": BEFORE_AFTER,
        "after": BEFORE_AFTER,
        "unservable": {"type": "array", "items": _obj({
            "link": STR, "utc_hours": UTC_HOURS, "local_hours": LOCAL_HOURS,
            "reason": {"enum": ["not_authorised", "luf_above_muf", "above_muf", "outside_bands", "short_of_target"]},
            "message": STR, "best_good_days": FRACTION_OR_NULL, "best_good_days_pct": PCT_OR_NULL})},
        "left_out": {"type": "array", "items": LINK_HOURS},
        "solver": _obj({"name": STR, "interface": STR, "status": STR, "optimal": {"type": "boolean"},
                        "frequencies": COUNT, "stages": {"type": "array", "items": STAGE}},
                       ["name", "status", "optimal", "frequencies", "stages"]),
        "summary": STR,
        "assumptions": {"type": "array", "items": STR},
        "local_time_labels": {"type": "array", "items": {"type": "string"}, "minItems": 24, "maxItems": 24},
    }, ["planpack_request", "net", "revision", "target_good_days", "target_good_days_pct", "proposals", "before",
        "after", "unservable", "solver", "summary"]),
}


def schema_text() -> str:
    return json.dumps(SCHEMA, indent=2, sort_keys=True) + "\n"
