"""JSON Schema of ``plan.json``, the compiled plan: a public contract.

Other tools and the tests read these keys. Units are in the key names
(``_mhz``, ``_khz``, ``_km``, ``_db``, ``_dbi``, ``_m``, ``_w``, ``_deg``, ``_s``);
``good_days`` is a fraction 0-1 of the days in the month; hours are UTC hours
0-23 with the local time beside them as ``HH:MM`` in the plan's zone.
"""

from __future__ import annotations

import json

from planpack.requests import contract as request_contract

NUM = {"type": "number"}
NUM_OR_NULL = {"type": ["number", "null"]}
STR = {"type": "string"}
STR_OR_NULL = {"type": ["string", "null"]}
HHMM = {"type": "string", "pattern": "^[0-2][0-9]:[0-5][0-9]$"}
FRACTION = {"type": "number", "minimum": 0, "maximum": 1}
UTC_HOUR = {"type": "integer", "minimum": 0, "maximum": 23}
PCT = {"type": "integer", "minimum": 0, "maximum": 100}
PCT_OR_NULL = {"anyOf": [PCT, {"type": "null"}]}
DATE = {"type": "string", "pattern": "^[0-9]{4}-[0-9]{2}-[0-9]{2}$"}
DATE_OR_NULL = {"anyOf": [DATE, {"type": "null"}]}
OFFSET = {"type": "string", "pattern": "^[+-][0-9]{2}:[0-9]{2}$"}
BOOL = {"type": "boolean"}


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
    "good_days_pct": PCT,
    "in_window": BOOL,
}, required=["channel", "freq_khz", "snr_db", "margin_db", "good_days", "via", "good_days_pct", "in_window"])
WINDOW = {"anyOf": [{"type": "null"}, _arr(NUM, 2)]}

LINK_HOUR = _obj({
    "utc_hour": UTC_HOUR,
    "local_time": HHMM,
    "muf_mhz": NUM,
    "owf_mhz": NUM,
    "luf_mhz": NUM_OR_NULL,
    "first": STR_OR_NULL,
    "second": STR_OR_NULL,
    "channels": {"type": "array", "items": CHANNEL_CELL},
    "local_times": _arr(HHMM),
    "first_good_days_pct": PCT_OR_NULL,
    "second_good_days_pct": PCT_OR_NULL,
    "weak": BOOL,
    "gap": BOOL,
    "window_mhz": WINDOW,
})

LINK = _obj({
    "id": STR,
    "from": STR,
    "to": STR,
    "distance_km": NUM,
    "hours": _arr(LINK_HOUR, 24),
    "gap_utc_hours": _arr(UTC_HOUR),
    "gap_utc_text": STR,
    "gap_local_by_period": _arr(STR),
    "weak_utc_hours": _arr(UTC_HOUR),
})

FALLBACK = {"anyOf": [{"type": "null"}, _obj({"channel": STR_OR_NULL, "good_days_pct": PCT_OR_NULL, "text": STR})]}

WEAK_RUN = _obj({
    "utc_hours": _arr(UTC_HOUR),
    "utc": STR,
    "local": STR,
    "local_by_period": _arr(STR),
    "good_days_pct_min": PCT,
    "good_days_pct_max": PCT,
    "text": STR,
})

NET_HOUR = _obj({
    "utc_hour": UTC_HOUR,
    "local_time": HHMM,
    "first": STR_OR_NULL,
    "second": STR_OR_NULL,
    "weakest_good_days": FRACTION,
    "local_times": _arr(HHMM),
    "good_days_pct": PCT_OR_NULL,
    "second_good_days_pct": PCT_OR_NULL,
    "weak": BOOL,
    "fallback": FALLBACK,
    "window_mhz": WINDOW,
    "channels": _arr(_obj({"channel": STR, "good_days_pct": PCT_OR_NULL, "allowed": BOOL, "in_window": BOOL})),
})

STATION_HOUR = _obj({
    "utc_hour": UTC_HOUR,
    "first": STR_OR_NULL,
    "second": STR_OR_NULL,
    "local_times": _arr(HHMM),
    "good_days_pct": PCT_OR_NULL,
    "second_good_days_pct": PCT_OR_NULL,
    "weak": BOOL,
    "fallback": FALLBACK,
})

PLACE = _obj({"station": STR, "bearing_deg": NUM, "distance_km": NUM, "compass": STR})
WHO = _obj({"station": STR, "name": STR, "address": STR})
BRIEF = _obj({
    "to_control": {"anyOf": [{"type": "null"}, PLACE]},
    "far_stations": _arr(PLACE),
    "hours": _arr(STATION_HOUR, 24),
    "weak_runs": _arr(WEAK_RUN),
    "antenna_by_channel": _arr(_obj({"channel": STR, "antenna": STR, "gain_dbi": NUM,
                                     "gains_dbi": {"type": "object", "additionalProperties": NUM}, "why": STR})),
    "wire_runs": _arr(_obj({"antenna": STR, "run_deg": NUM_OR_NULL, "run_compass": STR_OR_NULL, "rule": STR,
                            "text": STR})),
    "ground": _obj({"system": STR, "soil": STR, "instruction": STR, "text": STR,
                    "counterpoise_m": NUM_OR_NULL, "counterpoise_ft_in": STR_OR_NULL,
                    "radial_m": NUM_OR_NULL, "radial_ft_in": STR_OR_NULL,
                    "radial_count": {"type": ["integer", "null"]}, "lowest_freq_khz": NUM, "basis": STR}),
    "control": {"anyOf": [{"type": "null"}, WHO]},
    "net_address": STR_OR_NULL,
    "other_members": _arr(WHO),
    "exposure": {"anyOf": [{"type": "null"}, _obj({
        "general_public_m": NUM, "occupational_m": NUM, "antenna": STR, "clearance_m": NUM_OR_NULL,
        "exceeds_clearance": BOOL, "text": STR})]},
})

GAP = _obj({
    "links": _arr(STR),
    "utc_hours": _arr(UTC_HOUR),
    "local_hours": _arr(HHMM),
    "window_mhz": {"anyOf": [{"type": "null"}, _arr(NUM, 2)]},
    "links_by_hour": _arr(_arr(STR)),
    "local_by_period": _arr(STR),
    "utc_text": STR,
    "short": STR,
})

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
    }, required=["channel", "freq_khz", "impedance_ohm", "swr", "swr_class", "mismatch_loss_db", "feedline_loss_db",
                 "swr_text"])),
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
    "brief": BRIEF,
    "sun": _obj({"date": STR, "sunrise_utc": {"anyOf": [HHMM, {"type": "null"}]}, "sunset_utc": {"anyOf": [HHMM, {"type": "null"}]},
                 "sunrise_local": {"anyOf": [HHMM, {"type": "null"}]}, "sunset_local": {"anyOf": [HHMM, {"type": "null"}]}},
                required=["date", "sunrise_utc", "sunset_utc", "sunrise_local", "sunset_local"]),
}, required=["id", "name", "address", "role", "lat_deg", "lon_deg", "grid", "power_w", "noise", "antennas", "ground", "sun",
             "brief"])

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
    "added_for_schedule": _arr(STR),
    "note": STR,
}, required=["station", "groups", "wasted", "added_for_schedule"])

PLAN_JSON = {
    "$schema": "https://json-schema.org/draft/2020-12/schema",
    "$id": "https://planpack.invalid/schema/compiled-1.json",
    "title": "planpack compiled plan (plan.json)",
    **_obj({
        "planpack": {"const": 1},
        "net": _obj({
            "id": STR, "title": STR, "handling": STR_OR_NULL, "timezone": STR,
            "valid": _obj({"from": STR, "to": STR}),
            "utc_offset": OFFSET,
            "utc_offset_label": {"type": "string", "pattern": "^UTC([+-][0-9]{1,2}(:[0-5][0-9])?)?$"},
            "periods": {"type": "array", "minItems": 1, "items": _obj({"from": DATE, "to": DATE, "utc_offset": OFFSET,
                                                                         "label": STR})},
            "clock_changes": _arr(_obj({"date": DATE, "from": OFFSET, "to": OFFSET})),
            "fallback": STR_OR_NULL,
            "target_good_days": FRACTION,
        }, required=["id", "title", "handling", "timezone", "valid", "utc_offset", "utc_offset_label", "periods",
                     "clock_changes", "target_good_days"]),
        "revision": _obj({"id": STR, "kind": {"enum": ["git", "content"]}, "date": DATE_OR_NULL,
                          "number": {"type": ["integer", "null"], "minimum": 1}, "issue_date": DATE_OR_NULL,
                          "label": STR}),
        "assumptions": _obj({"months": _arr(STR), "solar": {"type": "object"}}, required=["months", "solar"]),
        "stations": _arr(STATION),
        "channels": _arr(CHANNEL),
        "links": _arr(LINK),
        "net_schedule": _obj({"changes_per_day": {"type": "integer", "minimum": 0}, "hours": _arr(NET_HOUR, 24),
                              "weak_runs": _arr(WEAK_RUN)}),
        "gaps": _arr(GAP),
        "scan_lists": _arr(SCAN_LIST),
        "antennas": _arr(ANTENNA),
        # what to ask the spectrum manager for (the contract of `planpack request --format json`); null without gaps
        "requests": {"anyOf": [{"type": "null"}, request_contract.SCHEMA]},
        "safety": _obj({"cautions": _arr(_obj({"topic": STR, "title": STR, "text": STR}, required=["topic", "text"])), "deferral": STR,
                        "short": {"type": "array", "items": STR, "minItems": 3, "maxItems": 5}, "short_pointer": STR}),
    }, required=["planpack", "net", "revision", "assumptions", "stations", "channels", "links", "net_schedule",
                 "gaps", "scan_lists", "antennas"]),
}


def output_schema() -> dict:
    return PLAN_JSON


def output_schema_text() -> str:
    return json.dumps(PLAN_JSON, indent=2, sort_keys=True) + "\n"
