"""The plan format, version 1, declared once.

The reader validates against this declaration and ``planpack schema`` prints it
as JSON Schema, so the two can never disagree. Units are in the key names
(``_khz``, ``_m``, ``_w``, ``_db``, ``_deg``); see the glossary in the README.
"""

from __future__ import annotations

import datetime
import json

from planpack.plan.bounds import MAX_LINKS
from planpack.plan.types import (
    ByShape, Choice, Date, Field, Flag, ListOf, MapOf, Number, Record, Slug, Text,
)
from planpack.requests import candidates  # the request's defaults (pure constants, no planpack imports)

FORMAT_VERSION = 1

SOILS = ("sea", "fresh-water", "wet", "medium-dry", "very-dry", "ice")
GROUND_SYSTEMS = ("rods", "radials", "counterpoise", "none")
NOISE_CATEGORIES = ("city", "residential", "rural", "quiet-rural")
ANTENNA_KINDS = ("dipole", "inverted-v", "dipole-reflector", "folded-terminated", "whip")
ROLES = ("control", "member")
CARD_SIZES = ("3.5x5in", "a6", "3x5in")
MATCHINGS = ("none", "set-tuner", "wide-tuner", "feedpoint-coupler")

# A mode id is printed in the channel list of every card beside the channel id (at most 12 characters)
MODE_ID_MAX = 12

# ALE addresses are checked in the semantic pass, where the message can cite the standard.
ADDRESS = Text(max_len=40, description="ALE address (MIL-STD-188-141 appendix A): A-Z and 0-9, at most 15 characters")
HOURS = Text(max_len=40, description="authorised hours in local time, HH:MM-HH:MM (may wrap midnight)")

# Plans are for nets that run, have run or will soon: a date beyond these is a typo (9999-12-31), and the
# geomagnetic field model the predictions use (IGRF-13 in PyIRI, 1900-2030) is extrapolated after 2030.
VALID_DATE = Date(description="the validity period lies within 1900-2100",
                  minimum=datetime.date(1900, 1, 1), maximum=datetime.date(2100, 12, 31))

SOLAR_VALUE = {
    "ssn": ByShape(scalar=Number(0, 300, description="smoothed sunspot number R12"),
                   sequence=ListOf(Number(0, 300), min_items=2, max_items=2, description="a range [low, high] of R12"),
                   expected="a sunspot number or a range [low, high]"),
    "f107": ByShape(scalar=Number(60, 400, unit="sfu", description="smoothed 10.7 cm solar flux"),
                    sequence=ListOf(Number(60, 400, unit="sfu"), min_items=2, max_items=2, description="a range [low, high] of F10.7"),
                    expected="a solar flux or a range [low, high]"),
}

NET = Record(fields={
    "id": Field(Slug("net id, used in file names and URLs")),
    "title": Field(Text(max_len=120), doc="human title of the net"),
    "handling": Field(Text(max_len=60), required=False, doc="handling marking printed at top and bottom of every page and card"),
    "timezone": Field(Text(max_len=60), doc="IANA time zone for local-time columns, e.g. Europe/Berlin"),
    "valid": Field(Record(fields={"from": Field(VALID_DATE), "to": Field(VALID_DATE)}), doc="the period the plan is for"),
    "solar": Field(Record(fields={"ssn": Field(SOLAR_VALUE["ssn"], required=False), "f107": Field(SOLAR_VALUE["f107"], required=False)},
                          alternatives=(("ssn",), ("f107",))), doc="solar activity: {ssn: N}, {f107: N} or a range"),
    "net_address": Field(ADDRESS, required=False, doc="ALE net address"),
    "links": Field(ByShape(scalar=Choice(("hub", "all")),
                           sequence=ListOf(ListOf(Slug(), min_items=2, max_items=2), min_items=1, max_items=MAX_LINKS),
                           expected="hub, all, or a list of [station, station] pairs"),
                   doc="which links to predict: hub, all, or a list of pairs"),
    "base_url": Field(Text(max_len=300), required=False, doc="where the site will be published (used for QR codes)"),
    "instructions": Field(Text(max_len=20_000), required=False, doc="standing instructions, Markdown"),
    "target_good_days": Field(Number(0.5, 0.99), required=False, default=0.9,
                              doc="fraction of days the weakest link must work for an hour to count as served"),
    "card_size": Field(Choice(CARD_SIZES), required=False, default="3.5x5in", doc="field card size"),
    "fallback": Field(Text(max_len=200), required=False,
                      doc="what a team does in a weak hour when the second channel does not help either "
                          "(printed beside those hours), e.g. 'call control on the satellite phone'"),
}, description="the net as a whole")

STATION = Record(fields={
    "name": Field(Text(max_len=80)),
    "address": Field(ADDRESS, doc="ALE self address"),
    "role": Field(Choice(ROLES), required=False, default="member"),
    "at": Field(Record(fields={"lat": Field(Number(-90, 90, unit="deg"), required=False),
                               "lon": Field(Number(-180, 180, unit="deg"), required=False),
                               "grid": Field(Text(max_len=10), required=False, doc="Maidenhead locator, 4, 6 or 8 characters")},
                       alternatives=(("lat", "lon"), ("grid",))), doc="{lat, lon} or {grid}"),
    "power_w": Field(Number(0, 10_000, exclusive_minimum=True, unit="W")),
    "noise": Field(Choice(NOISE_CATEGORIES), doc="ITU-R P.372 man-made noise category at the station"),
    "noise_margin_db": Field(Number(0, 40, unit="dB"), required=False, default=0.0,
                             doc="extra noise to allow at this receiver (atmospheric noise, local interference)"),
    "antenna": Field(ByShape(scalar=Slug(), sequence=ListOf(Slug(), min_items=1, max_items=4), expected="an antenna id or a list of ids"),
                     doc="antenna id, or a list of ids the station may use"),
    "ground": Field(Record(fields={"soil": Field(Choice(SOILS)), "system": Field(Choice(GROUND_SYSTEMS))})),
    "scan_rate": Field(Number(0.5, 10, unit="channels/s"), required=False, default=2.0, doc="ALE scan rate of the set"),
    "clearance_m": Field(Number(0, 1000, unit="m"), required=False,
                         doc="how far people can be kept from this station's antennas while it transmits; check warns "
                             "when the RF exposure distance for the general public is larger"),
})

CHANNEL = Record(fields={
    "id": Field(Text(pattern=r"[A-Za-z0-9]+(?:-[A-Za-z0-9]+)*", pattern_hint="a channel id: letters, digits and '-'", max_len=12)),
    "khz": Field(Number(0, 1_000_000, exclusive_minimum=True, unit="kHz"), doc="carrier / dial frequency"),
    "mode": Field(Slug(max_len=MODE_ID_MAX), doc="usb, lsb, ale, data, cw, or a mode declared under modes"),
    "note": Field(Text(max_len=200), required=False),
    "hours": Field(ByShape(scalar=HOURS, sequence=ListOf(HOURS, min_items=1, max_items=6), expected="HH:MM-HH:MM or a list of them"),
                   required=False, doc="authorised hours, local time; outside them the channel is never scheduled"),
})

FEEDLINE = Record(fields={
    "z0_ohm": Field(Number(10, 1000, unit="ohm"), required=False, default=50.0),
    "length_m": Field(Number(0, 1000, unit="m")),
    "loss_db_per_100m_at_10mhz": Field(Number(0, 50, unit="dB/100 m"), required=False, default=0.0),
    "velocity_factor": Field(Number(0.3, 1.0), required=False, default=0.66,
                             doc="velocity factor of the line (0.66 for solid polyethylene coax, 0.8 for foam)"),
})

ANTENNA = Record(fields={
    "kind": Field(Choice(ANTENNA_KINDS)),
    "design_khz": Field(Number(1500, 30000, unit="kHz"), required=False, doc="the frequency to cut for (not for folded-terminated)"),
    "height_m": Field(Number(0, 100, unit="m"), doc="feed point / apex height above ground (whip: base height)"),
    "apex_deg": Field(Number(60, 170, unit="deg"), required=False, doc="inverted-v only: angle between the legs"),
    "wire_mm": Field(Number(0.2, 50, unit="mm"), required=False, default=2.0, doc="conductor diameter"),
    "length_m": Field(Number(0.5, 200, unit="m"), required=False, doc="folded-terminated: total length; whip: element length"),
    "spacing_m": Field(Number(0.05, 5, unit="m"), required=False, doc="folded-terminated: spacing of the two wires"),
    "resistor_ohm": Field(Number(1, 10_000, unit="ohm"), required=False, doc="folded-terminated: terminating resistor"),
    "transformer_ratio": Field(Number(1, 64), required=False, doc="impedance ratio of the balun or transformer (1 for a 1:1 balun)"),
    "matching": Field(Choice(MATCHINGS), required=False,
                      doc="how the set is matched to the antenna: none, the set's built-in tuner (set-tuner, up to about 3:1), "
                          "a wide-range tuner at the set (wide-tuner, up to about 10:1) or an automatic coupler at the feed point "
                          "or a whip's base (feedpoint-coupler); beyond its range the set reduces its power. Default: "
                          "feedpoint-coupler for a whip, set-tuner for the other kinds"),
    "matching_coil_q": Field(Number(10, 1000), required=False, default=100.0,
                             doc="unloaded Q of the matching network's coil (HF tuner and coupler coils are about 100-200)"),
    "feedline": Field(FEEDLINE, required=False),
})

#: Keys each kind needs and keys that apply to it (beyond the common ones).
KIND_KEYS = {
    "dipole": {"needs": ("design_khz",), "allows": ("transformer_ratio",)},
    "inverted-v": {"needs": ("design_khz", "apex_deg"), "allows": ("transformer_ratio",)},
    "dipole-reflector": {"needs": ("design_khz",), "allows": ("transformer_ratio",)},
    "folded-terminated": {"needs": (), "allows": ("length_m", "spacing_m", "resistor_ohm", "transformer_ratio")},
    "whip": {"needs": ("length_m",), "allows": ("design_khz",)},
}
COMMON_ANTENNA_KEYS = ("kind", "height_m", "wire_mm", "feedline", "matching", "matching_coil_q")

MODE = Record(fields={
    "snr_db": Field(Number(-30, 60, unit="dB"), doc="required SNR in the bandwidth"),
    "bandwidth_hz": Field(Number(100, 20_000, unit="Hz"), doc="the bandwidth the SNR is stated in"),
    "duty_factor": Field(Number(0.01, 1), required=False, doc="average transmit duty for RF exposure"),
})

KHZ = Number(1500, 30000, unit="kHz")
REQUEST = Record(fields={
    "bands_khz": Field(ListOf(ListOf(KHZ, min_items=2, max_items=2, description="a segment [low, high]"), min_items=1, max_items=100),
                       required=False, default=[list(b) for b in candidates.DEFAULT_BANDS_KHZ],
                       doc="segments the spectrum manager assigns from, [low, high] in kHz (default the whole band 1600-30000)"),
    "exclude_khz": Field(ListOf(ByShape(scalar=KHZ, sequence=ListOf(KHZ, min_items=2, max_items=2),
                                        expected="a frequency or a segment [low, high] in kHz"), max_items=500),
                         required=False, default=[],
                         doc="frequencies or segments never to propose (the international distress and safety "
                             "frequencies are always left out)"),
    "mode": Field(Slug(), required=False, doc="mode of the new channels (default: the commonest mode of the plan's channels)"),
    "step_khz": Field(Number(0, 1000, exclusive_minimum=True, unit="kHz"), required=False,
                      default=candidates.DEFAULT_STEP_KHZ,
                      doc="spacing of the candidate frequencies"),
}, description="what planpack request may propose to the spectrum manager")

PLAN = Record(fields={
    "planpack": Field(Number(1, 1, integer=True), doc="format version (1)"),
    "net": Field(NET),
    "stations": Field(MapOf(STATION, min_items=1, max_items=2000), doc="station id -> station"),
    "channels": Field(ListOf(CHANNEL, min_items=1, max_items=500), doc="assigned channels, in card order"),
    "antennas": Field(MapOf(ANTENNA, min_items=1, max_items=2000), doc="antenna id -> antenna"),
    "modes": Field(MapOf(MODE, key_max_len=MODE_ID_MAX), required=False,
                   doc="required SNR per mode, overriding or adding to the built-in ones"),
    "request": Field(REQUEST, required=False, doc="what 'planpack request' may propose: bands, exclusions, mode, step"),
}, description="planpack net plan, format version 1")


def json_schema() -> dict:
    """The plan format as a JSON Schema (draft 2020-12)."""
    schema = PLAN.json_schema()
    # Per-kind requirements of antennas, as if/then clauses.
    antenna = schema["properties"]["antennas"]["additionalProperties"]
    antenna["allOf"] = [
        {"if": {"properties": {"kind": {"const": kind}}, "required": ["kind"]},
         "then": {"required": list(rule["needs"]),
                  "propertyNames": {"enum": list(COMMON_ANTENNA_KEYS) + list(rule["needs"]) + list(rule["allows"])}}}
        for kind, rule in KIND_KEYS.items()
    ]
    return {
        "$schema": "https://json-schema.org/draft/2020-12/schema",
        "$id": "https://planpack.invalid/schema/plan-1.json",
        "title": "planpack net plan",
        **schema,
    }


def json_schema_text() -> str:
    return json.dumps(json_schema(), indent=2, sort_keys=True) + "\n"
