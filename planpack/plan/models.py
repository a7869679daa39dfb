"""Typed, unit-normalised plan models: what the reader hands to compile.

Glossary of units (one convention per quantity, carried in the field name):
frequencies of channels and antenna designs in kHz (``_khz``); propagation
figures in MHz (``_mhz``); lengths and heights in metres (``_m``); power in
watts (``_w``); angles in degrees (``_deg``); SNR and margins in dB;
latitude and longitude in decimal degrees (WGS84), east and north positive.
Hours of the day are UTC hours 0-23 unless named ``local``.
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass, field

from planpack.plan.modes import Mode
from planpack.requests import candidates  # the request's defaults (pure constants, no planpack imports)


@dataclass(frozen=True)
class Position:
    lat_deg: float
    lon_deg: float
    grid: str  # Maidenhead locator (given, or derived to 6 characters)


@dataclass(frozen=True)
class Ground:
    soil: str  # ITU-R P.527 category
    system: str  # rods | radials | counterpoise | none


@dataclass(frozen=True)
class Station:
    id: str
    name: str
    address: str
    role: str  # control | member
    at: Position
    power_w: float
    noise: str  # ITU-R P.372 man-made noise category
    noise_margin_db: float
    antennas: tuple[str, ...]
    ground: Ground
    scan_rate: float  # [channels/s]
    clearance_m: float | None = None  # how far people can be kept from the antennas [m], if the plan says


@dataclass(frozen=True)
class Channel:
    id: str
    khz: float
    mode: str
    note: str | None
    # authorised hours, local time, as (start, end) minutes after midnight; end may be < start (wraps)
    hours: tuple[tuple[int, int], ...] | None

    @property
    def mhz(self) -> float:
        return self.khz / 1000.0


@dataclass(frozen=True)
class Feedline:
    z0_ohm: float
    length_m: float
    loss_db_per_100m_at_10mhz: float
    velocity_factor: float = 0.66  # solid polyethylene coax (common practice, no source)


@dataclass(frozen=True)
class Antenna:
    id: str
    kind: str
    design_khz: float | None
    height_m: float
    apex_deg: float | None
    wire_mm: float
    length_m: float | None
    spacing_m: float | None
    resistor_ohm: float | None
    transformer_ratio: float | None
    feedline: Feedline | None
    matching: str = "set-tuner"  # none | set-tuner | wide-tuner | feedpoint-coupler (a whip's default: feedpoint-coupler)
    matching_coil_q: float = 100.0  # unloaded Q of the matching network's coil


@dataclass(frozen=True)
class Solar:
    index: str  # 'ssn' or 'f107'
    values: tuple[float, ...]  # one value, or (low, high)


@dataclass(frozen=True)
class Net:
    id: str
    title: str
    handling: str | None
    timezone: str
    valid_from: dt.date
    valid_to: dt.date
    solar: Solar
    net_address: str | None
    links: str | tuple[tuple[str, str], ...]  # 'hub', 'all', or explicit pairs
    base_url: str | None
    instructions: str | None
    target_good_days: float
    card_size: str
    fallback: str | None = None  # what teams do when the hour's channel is weak and no second helps


@dataclass(frozen=True)
class Request:
    """What ``planpack request`` may propose (the plan's ``request:`` section, defaults filled in)."""

    bands_khz: tuple[tuple[float, float], ...] = candidates.DEFAULT_BANDS_KHZ
    exclude_khz: tuple[tuple[float, float], ...] = ()  # a single frequency is (f, f)
    mode: str | None = None  # None: the commonest mode of the plan's channels
    step_khz: float = candidates.DEFAULT_STEP_KHZ

    def mode_for(self, plan: "Plan") -> str:
        """The mode of new channels: as written, else the plan's commonest (ties: the first written)."""
        if self.mode is not None:
            return self.mode
        modes = [c.mode for c in plan.channels]
        return max(modes, key=lambda m: (modes.count(m), -modes.index(m)))


@dataclass(frozen=True)
class Plan:
    source: str  # the path the plan was read from, as given
    sha256: str  # of the file's bytes
    net: Net
    stations: tuple[Station, ...]  # in file order
    channels: tuple[Channel, ...]  # in file order (card order)
    antennas: tuple[Antenna, ...]  # in file order
    modes: dict[str, Mode] = field(default_factory=dict)  # built-in merged with the plan's
    links: tuple[tuple[str, str], ...] = ()  # resolved station-id pairs, in a stable order
    request: Request = field(default_factory=Request)  # the request: section, defaults filled in
    # where each key path was written, (line, column), so later passes can point at it
    positions: dict[str, tuple[int, int]] = field(default_factory=dict, compare=False, repr=False)

    def where(self, path: str) -> tuple[int, int]:
        """(line, column) of a key path, or of its nearest written parent."""
        while path:
            if path in self.positions:
                return self.positions[path]
            path = path.rsplit(".", 1)[0] if "." in path else ""
        return (1, 1)

    def station(self, sid: str) -> Station:
        return next(s for s in self.stations if s.id == sid)

    def antenna(self, aid: str) -> Antenna:
        return next(a for a in self.antennas if a.id == aid)

    @property
    def control(self) -> Station | None:
        return next((s for s in self.stations if s.role == "control"), None)
