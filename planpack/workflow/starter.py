"""The starter plan that ``planpack new`` writes: a small net that checks clean, every key explained.

The scenario is invented (an invented volunteer group, invented stations and
ALE addresses); the places are real. The text is fixed, apart from the net id,
so the same command always writes the same bytes.
"""

from __future__ import annotations

import re

from planpack.plan.types import SLUG_PATTERN

_SLUG = re.compile(SLUG_PATTERN)
MAX_ID = 40  # the reader's bound on slugs

STARTER = """\
# planpack net plan: {net_id}
# A starter in an invented scenario: a volunteer mountain-rescue radio group in
# the Scottish Highlands. The group, its stations and their ALE addresses are
# invented; the places are real. Replace them with your own net.
#
# Check it:    planpack check {file_hint}
# Publish it:  planpack build {file_hint} --out site/
# Every key is listed by 'planpack schema'; every message code by 'planpack codes'.

# The plan format version. Always the first key.
planpack: 1

net:
  # A slug (lowercase letters, digits, '-'): used in file names and web addresses.
  id: {net_id}
  # The title printed on every page and card.
  title: Cairngorm Volunteer Rescue Radio Group — spring exercise net
  # Optional handling marking, printed at the top and bottom of every page and card.
  handling: "EXERCISE ONLY"
  # The IANA time zone for the local-time columns (the UTC column is always shown too).
  timezone: Europe/London
  # The period the plan is for (YYYY-MM-DD). Predictions cover the months it touches.
  # Keep it to one season: propagation changes month by month.
  valid: {{from: 2027-05-03, to: 2027-05-30}}
  # Solar activity the predictions assume: a smoothed sunspot number {{ssn: 80}},
  # a 10.7 cm flux {{f107: 120}}, or a range [low, high]: the worst case of the range is used.
  solar: {{ssn: [40, 90]}}
  # The fraction of days an hour's channel must work on the weakest link for the
  # hour to count as served (0.5 to 0.99; default 0.9).
  target_good_days: 0.8
  # Optional ALE net address: one call reaches every station (A-Z, 0-9, at most 15 characters).
  net_address: CVRNET
  # Which links to predict: hub (control to every member), all (every pair),
  # or a list of pairs such as [[glenmore, braemar], [braemar, tomintoul]].
  links: hub
  # Field card size: 3.5x5in, a6 or 3x5in.
  card_size: a6
  # Optional: where the site will be published; the cards carry a QR code to it.
  # base_url: https://intranet.example/nets/
  # Optional standing instructions in Markdown, shown on the site and the cards.
  instructions: |
    Control keeps a listening watch on the first channel of the hour.
    Teams check in at **08:00 and 18:00** local, and whenever they move camp.

# Stations, by id (a slug). Exactly one has role: control on a hub net.
stations:
  glenmore:
    # The name printed on the cards.
    name: Glenmore control
    # The station's ALE self address (A-Z and 0-9, at most 15 characters, MIL-STD-188-141).
    address: GLNCTL
    # control or member (default member).
    role: control
    # Where it is: {{lat, lon}} in decimal degrees (north and east positive), or {{grid: IO87ad}}.
    at: {{lat: 57.1670, lon: -3.6950}}
    # Transmitter power at the set [W].
    power_w: 100
    # Man-made noise where the station listens (ITU-R P.372): city, residential, rural or quiet-rural.
    noise: rural
    # Optional extra noise to allow for local interference [dB] (default 0).
    noise_margin_db: 0
    # The antenna id the station uses, or a list of ids it may choose from.
    antenna: base-broadband
    # Soil under the station and how the set is grounded.
    # soil: sea, fresh-water, wet, medium-dry, very-dry or ice;
    # system: rods, radials, counterpoise or none.
    ground: {{soil: wet, system: rods}}
    # Optional ALE scan rate of the set [channels/s] (default 2).
    scan_rate: 2
  braemar:
    name: Braemar hill team
    address: BRMTEAM
    at: {{lat: 57.0060, lon: -3.3970}}
    power_w: 50
    noise: quiet-rural
    antenna: [field-night, field-day]
    ground: {{soil: medium-dry, system: counterpoise}}
  tomintoul:
    name: Tomintoul support
    address: TMNSUP
    # A Maidenhead locator works instead of lat/lon.
    at: {{grid: IO87gg}}
    power_w: 50
    noise: quiet-rural
    antenna: [field-night, field-day]
    ground: {{soil: medium-dry, system: rods}}

# The channels you are assigned, in the order the cards list them.
# id: a short label (letters, digits, '-'); khz: the dial frequency [kHz];
# mode: usb, lsb, ale, data, cw, or one declared under modes;
# note: optional text for the cards; hours: optional authorised hours in local time
# ("HH:MM-HH:MM", or a list of them); outside them the channel is never scheduled.
channels:
  - {{id: C1, khz: 3260, mode: usb, note: night}}
  - {{id: C2, khz: 4545, mode: usb}}
  - {{id: C3, khz: 5410, mode: ale}}
  - {{id: C4, khz: 6215, mode: usb, hours: "07:00-20:00"}}

# Antennas, by id. kind: dipole, inverted-v, dipole-reflector, folded-terminated or whip.
# Before you put one up: keep well clear of power lines (further than the mast could fall),
# earth and disconnect it before storms, and keep people out of the RF exposure distance the
# site shows. Local codes, the equipment manuals and licensed practice come first.
antennas:
  base-broadband:
    # A folded dipole with a terminating resistor: a fair match on every channel,
    # at the cost of some power in the resistor. No design frequency to cut for.
    kind: folded-terminated
    # Feed-point height above ground [m].
    height_m: 12
    # Optional for this kind: total length [m], wire spacing [m], resistor [ohm] and the
    # balun's impedance ratio; defaults are a common 27 m design.
    # Optional coax: impedance [ohm], length [m] and loss [dB per 100 m at 10 MHz].
    feedline: {{z0_ohm: 50, length_m: 20, loss_db_per_100m_at_10mhz: 3.5}}
  field-night:
    kind: inverted-v
    # The frequency to cut the wire for [kHz]; the cut sheet gives lengths in metres and feet.
    design_khz: 3400
    # Apex height [m]. The leg ends must stay at least 2 m above ground
    # (out of reach: the ends carry high RF voltage); check refuses it otherwise.
    height_m: 13
    # The angle between the two legs [deg].
    apex_deg: 120
    # Conductor diameter [mm] (default 2).
    wire_mm: 1.5
    # How the set is matched to the wire: none, set-tuner (the set's own, up to about 3:1),
    # wide-tuner (up to about 10:1) or feedpoint-coupler (an automatic coupler at the feed
    # point, or a whip's base). Beyond its range the set turns its power down.
    matching: feedpoint-coupler
    # For short (NVIS) links hang it low, about 0.1 to 0.25 wavelength.
    feedline: {{z0_ohm: 50, length_m: 10, loss_db_per_100m_at_10mhz: 6.0}}
  field-day:
    # A plain dipole for the day channels; a station given two antennas uses the better
    # one for each channel, and the cards say which.
    kind: dipole
    design_khz: 5800
    height_m: 7
    wire_mm: 1.5
    matching: feedpoint-coupler
    feedline: {{z0_ohm: 50, length_m: 10, loss_db_per_100m_at_10mhz: 6.0}}

# Optional: required SNR per mode [dB in bandwidth_hz], overriding or adding to the built-in modes.
# modes:
#   msg-data: {{snr_db: 10, bandwidth_hz: 3000, duty_factor: 0.5}}

# Optional: what 'planpack request' may propose to the spectrum manager when check reports gaps.
# request:
#   bands_khz: [[2000, 8000]]     # segments you may be assigned from [kHz] (default 1600-30000)
#   exclude_khz: [[3500, 3800]]   # frequencies or segments never to propose (distress frequencies never are)
#   mode: usb                     # of the new channels (default: the commonest above)
#   step_khz: 25                  # candidate spacing [kHz]
"""


def is_slug(text: str) -> bool:
    return len(text) <= MAX_ID and _SLUG.fullmatch(text) is not None


def starter_plan(net_id: str, file_hint: str | None = None) -> str:
    """The starter plan text for ``net_id`` (a slug; ValueError otherwise)."""
    if not is_slug(net_id):
        raise ValueError(f"'{net_id}' is not a net id: use a slug of lowercase letters, digits and single '-' "
                         f"between them, at most {MAX_ID} characters (e.g. 'north-ridge')")
    return STARTER.format(net_id=net_id, file_hint=file_hint or f"{net_id}.yaml")
