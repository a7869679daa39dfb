"""JSON Schema of ``plan.json``, the compiled plan: a public contract.

Other tools and the tests read these keys. Units are in the key names
(``_mhz``, ``_khz``, ``_km``, ``_db``, ``_dbi``, ``_m``, ``_w``, ``_deg``, ``_s``);
``good_days`` is a fraction 0-1 of the days in the month; hours are UTC hours
0-23 with the local time beside them as ``HH:MM`` in the plan's zone.
"""

from __future__ import annotations

import json

NUM = {"type": "number"}
NUM_OR_NULL = {"type": ["number", "null"]}
STR = {"type": "string"}
STR_OR_NULL = {"type": ["string", "null"]}
HHMM = {"type": "string", "pattern": "^[0-2][0-9]:[0-5][0-9]$"}
FRACTION = {"type": "number", "minimum": 0, "maximum": 1}
UTC_HOUR = {"type": "integer", "minimum": 0, "maximum": 23}


def _obj(props: dict, required: list[str] | None = None, extra: bool = True) -> dict:
    return {"type": "object", "properties": props, "required": list(props) if required is None else required,
            "additionalProperties": extra}


def _arr(items: dict, n: int | None = None) -> dict:
    out = {"type": "array", "items": items}
    if n is not None:
        out["minItems"] = out["maxItems"] = n
    return out


CHANNEL_CELL = _obj({
    "channel": STR,
    "freq_khz": NUM,
    "snr_db": NUM,
    "margin_db": NUM,
    "good_days": FRACTION,
    "via": {"enum": ["ground", "E", "F2", None]},
    "skip": {"type": "boolean"},
    "allowed": {"type": "boolean"},
}, required=["channel", "freq_khz", "snr_db", "margin_db", "good_days", "via"])

LINK_HOUR = _obj({
    "utc_hour": UTC_HOUR,
    "local_time": HHMM,
    "muf_mhz": NUM,
    "owf_mhz": NUM,
    "luf_mhz": NUM_OR_NULL,
    "first": STR_OR_NULL,
    "second": STR_OR_NULL,
    "channels": {"type": "array", "items": CHANNEL_CELL},
}, required=["utc_hour", "local_time", "muf_mhz", "owf_mhz", "luf_mhz", "first", "second", "channels"])

LINK = _obj({
    "id": STR,
    "from": STR,
    "to": STR,
    "distance_km": NUM,
    "hours": _arr(LINK_HOUR, 24),
}, required=["id", "from", "to", "distance_km", "hours"])

NET_HOUR = _obj({
    "utc_hour": UTC_HOUR,
    "local_time": HHMM,
    "first": STR_OR_NULL,
    "second": STR_OR_NULL,
    "weakest_good_days": FRACTION,
}, required=["utc_hour", "local_time", "first", "second", "weakest_good_days"])

GAP = _obj({
    "links": _arr(STR),
    "utc_hours": _arr(UTC_HOUR),
    "local_hours": _arr(HHMM),
    "window_mhz": {"anyOf": [{"type": "null"}, _arr(NUM, 2)]},
}, required=["links", "utc_hours", "local_hours", "window_mhz"])

ANTENNA = _obj({
    "id": STR,
    "kind": {"enum": ["dipole", "inverted-v", "dipole-reflector", "folded-terminated", "whip"]},
    "stations": _arr(STR),
    "cut": {"anyOf": [{"type": "null"}, _obj({
        "total_m": NUM_OR_NULL, "leg_m": NUM_OR_NULL, "rule_of_thumb_total_m": NUM_OR_NULL,
        "reflector_m": NUM_OR_NULL, "reflector_below_m": NUM_OR_NULL,
    }, required=["total_m", "leg_m", "rule_of_thumb_total_m", "reflector_m", "reflector_below_m"])]},
    "matching": _obj({
        "kind": {"enum": ["none", "set-tuner", "wide-tuner", "feedpoint-coupler"]},
        "place": {"enum": ["set", "feed", None]}, "max_swr": NUM_OR_NULL, "max_impedance_ohm": NUM_OR_NULL,
        "coil_q": NUM, "capacitor_q": NUM, "foldback_knee_swr": NUM, "feedline_velocity_factor": NUM,
        "description": STR, "basis": STR,
    }),
    "channels": _arr(_obj({
        "channel": STR, "freq_khz": NUM, "impedance_ohm": _arr(NUM, 2),
        # SWR of the antenna on the feedline: a number capped at 50 (the cap where NEC's solution is not
        # physical, usable false) and the text to print ("1.4:1", "12:1", "> 50:1", "not solved")
        "swr": {"type": "number", "minimum": 1, "maximum": 50}, "swr_text": STR,
        "swr_class": {"enum": ["fine", "tuner", "poor"]},
        "swr_at_set": {"type": ["number", "null"], "minimum": 1, "maximum": 50}, "swr_at_set_text": STR,
        "matched": {"type": "boolean"}, "usable": {"type": "boolean"},
        "mismatch_loss_db": NUM, "feedline_loss_db": NUM,
        # the loss from the set's output to the antenna, and its parts (they add up to it)
        "foldback_db": NUM_OR_NULL, "set_mismatch_db": NUM_OR_NULL, "network_loss_db": NUM_OR_NULL,
        "feedline_loss_with_swr_db": NUM_OR_NULL, "ground_loss_db": NUM_OR_NULL, "system_loss_db": NUM,
        "loss_note": STR,
        "rig_at": _arr(STR),
    # compile always writes every key above; the older ones are required so that hand-made plan.json
    # files (the renderers' test fixtures) that predate the loss breakdown still validate
    }, required=["channel", "freq_khz", "impedance_ohm", "swr", "swr_class", "mismatch_loss_db", "feedline_loss_db"])),
    "band": _obj({
        "freq_khz": _arr(NUM), "impedance_ohm": _arr({"anyOf": [_arr(NUM_OR_NULL, 2)]}),
        "swr": _arr({"type": ["number", "null"], "minimum": 1, "maximum": 50}), "system_loss_db": _arr(NUM),
        "peak_gain_dbi": _arr(NUM), "zenith_gain_dbi": _arr(NUM), "usable": _arr({"type": "boolean"}),
    }),
    "pattern": _obj({"peak_gain_dbi": NUM, "zenith_gain_dbi": NUM, "fraction_above_60deg": FRACTION},
                    required=["peak_gain_dbi", "zenith_gain_dbi", "fraction_above_60deg"]),
    "height_wavelengths": NUM_OR_NULL,
    "exposure": _arr(_obj({"station": STR, "general_public_m": NUM, "occupational_m": NUM},
                          required=["station", "general_public_m", "occupational_m"])),
}, required=["id", "kind", "stations", "cut", "channels", "pattern", "height_wavelengths", "exposure"])

STATION = _obj({
    "id": STR, "name": STR, "address": STR, "role": {"enum": ["control", "member"]},
    "lat_deg": NUM, "lon_deg": NUM, "grid": STR, "power_w": NUM, "noise": STR,
    "antennas": _arr(STR), "ground": _obj({"soil": STR, "system": STR}),
    "scan_rate": NUM,
    "sun": _obj({"date": STR, "sunrise_utc": {"anyOf": [HHMM, {"type": "null"}]}, "sunset_utc": {"anyOf": [HHMM, {"type": "null"}]},
                 "sunrise_local": {"anyOf": [HHMM, {"type": "null"}]}, "sunset_local": {"anyOf": [HHMM, {"type": "null"}]}},
                required=["date", "sunrise_utc", "sunset_utc", "sunrise_local", "sunset_local"]),
}, required=["id", "name", "address", "role", "lat_deg", "lon_deg", "grid", "power_w", "noise", "antennas", "ground", "sun"])

CHANNEL = _obj({
    "id": STR, "freq_khz": NUM, "mode": STR, "note": STR_OR_NULL,
    "hours_local": {"anyOf": [{"type": "null"}, _arr(STR)]},
    "allowed_utc_hours": _arr(UTC_HOUR),
    "required_snr_db": NUM, "bandwidth_hz": NUM,
}, required=["id", "freq_khz", "mode", "note", "hours_local", "allowed_utc_hours", "required_snr_db", "bandwidth_hz"])

SCAN_LIST = _obj({
    "station": STR,
    "groups": _arr(_obj({"name": STR, "channels": _arr(STR), "scan_period_s": NUM, "call_time_s": NUM},
                        required=["name", "channels", "scan_period_s", "call_time_s"])),
    "wasted": _arr(STR),
}, required=["station", "groups", "wasted"])

PLAN_JSON = {
    "$schema": "https://json-schema.org/draft/2020-12/schema",
    "$id": "https://planpack.invalid/schema/compiled-1.json",
    "title": "planpack compiled plan (plan.json)",
    **_obj({
        "planpack": {"const": 1},
        "net": _obj({
            "id": STR, "title": STR, "handling": STR_OR_NULL, "timezone": STR,
            "valid": _obj({"from": STR, "to": STR}),
        }, required=["id", "title", "handling", "timezone", "valid"]),
        "revision": _obj({"id": STR, "kind": {"enum": ["git", "content"]}}, required=["id", "kind"]),
        "assumptions": _obj({"months": _arr(STR), "solar": {"type": "object"}}, required=["months", "solar"]),
        "stations": _arr(STATION),
        "channels": _arr(CHANNEL),
        "links": _arr(LINK),
        "net_schedule": _obj({"changes_per_day": {"type": "integer", "minimum": 0}, "hours": _arr(NET_HOUR, 24)},
                             required=["changes_per_day", "hours"]),
        "gaps": _arr(GAP),
        "scan_lists": _arr(SCAN_LIST),
        "antennas": _arr(ANTENNA),
    }),
}


def output_schema() -> dict:
    return PLAN_JSON


def output_schema_text() -> str:
    return json.dumps(PLAN_JSON, indent=2, sort_keys=True) + "\n"
