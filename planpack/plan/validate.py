"""Semantic passes over a structurally valid plan, then the typed models.

Pass 1 (``types``/``schema``) has already checked every key and type. The
passes here check what needs more than one value at a time: frequencies
against the band and each other, ALE addresses against MIL-STD-188-141,
references between sections, and per-kind antenna keys.
"""

from __future__ import annotations

import difflib
import re
import zoneinfo
from itertools import combinations

from planpack import localtime
from planpack.plan import bounds, locator
from planpack.plan.diagnostics import Collector
from planpack.plan.models import Antenna, Channel, Feedline, Ground, Net, Plan, Position, Request, Solar, Station
from planpack.plan.modes import BUILTIN_MODES, Mode
from planpack.plan.schema import COMMON_ANTENNA_KEYS, KIND_KEYS
from planpack.plan.types import Ctx
from planpack.plan.yamlread import Node
from planpack.requests import candidates  # pure grid arithmetic, no planpack imports

HF_LOW_KHZ = 1500.0
HF_HIGH_KHZ = 30000.0
MIN_SPACING_KHZ = 3.0
ALE_MAX_CHARS = 15  # MIL-STD-188-141 appendix A: up to five 3-character words
MAX_COMPARISONS = 40_000  # names compared for "did you mean" hints in one plan (difflib is slow on thousands)
MAX_LISTED = 20  # the known ids are listed only when there are few
_ALE_CHARS = re.compile(r"[A-Z0-9]+\Z")
# The whole URL, not only its start: the site and the QR codes use it as written, and append
# '<net id>/' to it, so it is a folder: no user@ before the host, no ?query or #fragment.
_HTTP_URL = re.compile(r"https?://([A-Za-z0-9.-]+|\[[0-9A-Fa-f:.]+\])(:[0-9]{1,5})?(/[^\s\"'<>\\`?#\x00-\x1f\x7f]*)?")
_HOURS = re.compile(r"([0-2][0-9]):([0-5][0-9])\s*-\s*([0-2][0-9]):([0-5][0-9])\Z")


class Semantics:
    def __init__(self, data: dict, ctx: Ctx, root: Node) -> None:
        self.d = data
        self.ctx = ctx
        self.root = root
        self._near: dict[int, dict[str, str]] = {}
        self._compared = 0

    # -- helpers ---------------------------------------------------------
    def at(self, path: str) -> Node:
        return self.ctx.positions.get(path, self.root)

    def error(self, code: str, path: str, message: str, node_path: str | None = None) -> None:
        self.ctx.out.error(code, path, f"{path}: {message}", self.at(node_path or path))

    def warning(self, code: str, path: str, message: str, node_path: str | None = None) -> None:
        self.ctx.out.warning(code, path, f"{path}: {message}", self.at(node_path or path))

    def near(self, value: str, options) -> str:
        """A "did you mean" hint: computed once per distinct unknown name, within MAX_COMPARISONS a plan."""
        memo = self._near.setdefault(id(options), {})
        if value not in memo:
            if self._compared + len(options) > MAX_COMPARISONS:
                return ""  # enough hints given; the error itself still names the id
            self._compared += len(options)
            m = difflib.get_close_matches(value, list(options), n=1, cutoff=0.5)
            if m:
                memo[value] = f"; did you mean '{m[0]}'?"
            elif 0 < len(options) <= MAX_LISTED:
                memo[value] = f"; known: {', '.join(sorted(options))}"
            else:
                memo[value] = ""
        return memo[value]

    # -- checks ----------------------------------------------------------
    def address(self, path: str, value: str) -> bool:
        """MIL-STD-188-141 appendix A address rules for a stored address."""
        std = "MIL-STD-188-141 appendix A"
        if "@" in value:
            self.error("bad-address", path, f"'{value}' contains '@', the utility/stuffing character that {std} adds on the air; a stored address is A-Z and 0-9 only")
        elif "?" in value:
            self.error("bad-address", path, f"'{value}' contains '?', the wildcard of {std}; a stored address is A-Z and 0-9 only")
        elif value.upper() != value and _ALE_CHARS.match(value.upper()):
            self.error("bad-address", path, f"'{value}' has lower-case letters; ALE addresses are capitals A-Z and digits ({std}): write '{value.upper()}'")
        elif not _ALE_CHARS.match(value):
            bad = sorted({c for c in value if not ("A" <= c <= "Z" or "0" <= c <= "9")})
            self.error("bad-address", path, f"'{value}' contains {', '.join(repr(c) for c in bad)}; ALE addresses use A-Z and 0-9 only ({std})")
        elif len(value) > ALE_MAX_CHARS:
            self.error("bad-address", path, f"'{value}' is {len(value)} characters; {std} allows at most {ALE_MAX_CHARS} (five 3-character words)")
        else:
            return True
        return False

    def net(self) -> None:
        net = self.d["net"]
        try:
            zoneinfo.ZoneInfo(net["timezone"])
        except (zoneinfo.ZoneInfoNotFoundError, ValueError, IsADirectoryError, OSError):
            self.error("unknown-timezone", "net.timezone", f"'{net['timezone']}' is not an IANA time zone (e.g. Europe/Berlin, Pacific/Auckland, UTC)")
        if net["valid"]["from"] > net["valid"]["to"]:
            self.error("date-order", "net.valid", f"from {net['valid']['from']} is after to {net['valid']['to']}", "net.valid.from")
        elif (net["valid"]["to"] - net["valid"]["from"]).days > 366:
            self.error("date-order", "net.valid", "the period is longer than a year; make one plan per season", "net.valid.to")
        else:
            self.clock_changes(net)
        for index, value in net["solar"].items():
            if isinstance(value, list) and value[0] > value[1]:
                self.error("solar-range", f"net.solar.{index}", f"the range [{value[0]:g}, {value[1]:g}] is backwards; write [low, high]")
        if "net_address" in net:
            self.address("net.net_address", net["net_address"])
        url = net.get("base_url")
        if url is not None and not _HTTP_URL.fullmatch(url):
            self.error("bad-url", "net.base_url", f"expected the http:// or https:// address of the folder the site is published in "
                       f"(no spaces, quotes, angle brackets, backslashes, user@, ?query or #fragment), got '{url}'")

    def clock_changes(self, net: dict) -> None:
        """Warn when the UTC offset changes inside the validity period: local times differ either side."""
        try:
            parts = localtime.offset_periods(net["timezone"], net["valid"]["from"], net["valid"]["to"])
        except (zoneinfo.ZoneInfoNotFoundError, ValueError, IsADirectoryError, OSError):
            return  # reported as unknown-timezone
        for (_, last, old), (first, _, new) in zip(parts, parts[1:]):
            self.warning("clock-change", "net.valid",
                         f"the UTC offset of {net['timezone']} changes on {first.isoformat()}, inside the validity "
                         f"period: {localtime.offset_label(old)} until {last.isoformat()}, {localtime.offset_label(new)} "
                         f"from {first.isoformat()}; the cards and pages give local times for each side of the change, "
                         f"and UTC times stay the same (to avoid it, end the plan on {last.isoformat()} and start a "
                         f"new one on {first.isoformat()})")

    def stations(self) -> None:
        stations = self.d["stations"]
        antennas = self.d["antennas"]
        seen: dict[str, str] = {}
        for sid, st in stations.items():
            p = f"stations.{sid}"
            if self.address(f"{p}.address", st["address"]):
                if st["address"] in seen:
                    self.error("address-duplicate", f"{p}.address", f"self address '{st['address']}' is also station '{seen[st['address']]}''s; self addresses must be unique")
                seen.setdefault(st["address"], sid)
            net_addr = self.d["net"].get("net_address")
            if net_addr and net_addr == st["address"]:
                self.error("address-clash", f"{p}.address", f"self address '{net_addr}' equals the net address; they must differ")
            grid = st["at"].get("grid")
            if grid is not None and not locator.is_locator(grid):
                self.error("bad-locator", f"{p}.at.grid",
                           f"'{grid}' is not a Maidenhead locator: 4, 6 or 8 characters, field letters A-R, square digits, subsquare letters A-X (e.g. JO62qm)")
            refs = st["antenna"] if isinstance(st["antenna"], list) else [st["antenna"]]
            for i, ref in enumerate(refs):
                path = f"{p}.antenna" + (f"[{i}]" if isinstance(st["antenna"], list) else "")
                if ref not in antennas:
                    self.error("unknown-reference", path, f"antenna '{ref}' is not defined under antennas{self.near(ref, antennas)}")
        controls = [sid for sid, st in stations.items() if st["role"] == "control"]
        links = self.d["net"]["links"]
        if links == "hub" and len(controls) != 1:
            where = f"stations.{controls[1]}.role" if len(controls) > 1 else "net.links"
            self.error("control-station", where,
                       f"a hub net needs exactly one station with role: control; found {len(controls)}" + (f" ({', '.join(controls)})" if controls else ""))
        elif len(controls) > 1:
            self.error("control-station", f"stations.{controls[1]}.role", f"at most one control station; found {', '.join(controls)}")
        if links == "hub" and len(stations) < 2 or links == "all" and len(stations) < 2:
            self.error("bad-link", "net.links", "a net needs at least two stations to have a link")

    def links(self) -> None:
        links = self.d["net"]["links"]
        if not isinstance(links, list):
            return
        stations = self.d["stations"]
        seen = {}
        for i, (a, b) in enumerate(links):
            p = f"net.links[{i}]"
            for j, end in enumerate((a, b)):
                if end not in stations:
                    self.error("unknown-reference", f"{p}[{j}]", f"station '{end}' is not defined under stations{self.near(end, stations)}")
            if a == b:
                self.error("bad-link", p, f"a link joins '{a}' to itself")
            key = frozenset((a, b))
            if key in seen:
                self.error("bad-link", p, f"the link {a}–{b} is listed twice (first as net.links[{seen[key]}])")
            seen.setdefault(key, i)

    def channels(self) -> None:
        chans = self.d["channels"]
        modes = set(BUILTIN_MODES) | set(self.d.get("modes", {}))
        ids: dict[str, int] = {}
        for i, ch in enumerate(chans):
            p = f"channels[{i}]"
            if ch["id"] in ids:
                self.error("duplicate-id", f"{p}.id", f"channel id '{ch['id']}' is used twice (first at channels[{ids[ch['id']]}])")
            ids.setdefault(ch["id"], i)
            khz = ch["khz"]
            if not HF_LOW_KHZ <= khz <= HF_HIGH_KHZ:
                hint = " (is it in MHz? write kHz)" if khz < HF_LOW_KHZ / 1000 * 30 else ""
                self.error("freq-out-of-band", f"{p}.khz", f"{khz:g} kHz is outside the HF band {HF_LOW_KHZ:g}-{HF_HIGH_KHZ:g} kHz{hint}")
            if ch["mode"] not in modes:
                self.error("unknown-mode", f"{p}.mode", f"mode '{ch['mode']}' is neither built in ({', '.join(sorted(BUILTIN_MODES))}) nor declared under modes{self.near(ch['mode'], modes)}")
            hours = ch.get("hours")
            if hours is not None:
                for j, h in enumerate(hours if isinstance(hours, list) else [hours]):
                    hp = f"{p}.hours" + (f"[{j}]" if isinstance(hours, list) else "")
                    if parse_hours(h) is None:
                        self.error("bad-hours", hp, f"expected HH:MM-HH:MM in local time (e.g. \"06:00-20:00\"; may wrap midnight), got '{h}'")
        by_freq = sorted(((ch["khz"], i) for i, ch in enumerate(chans)))
        for (f1, i1), (f2, i2) in zip(by_freq, by_freq[1:]):
            a, b = sorted((i1, i2))
            if f1 == f2:
                self.error("freq-duplicate", f"channels[{b}].khz", f"{f2:g} kHz is assigned twice (also channels[{a}], '{chans[a]['id']}')")
            elif f2 - f1 < MIN_SPACING_KHZ:
                self.error("freq-too-close", f"channels[{b}].khz",
                           f"{chans[b]['khz']:g} kHz is {abs(f2 - f1):g} kHz from channels[{a}] ('{chans[a]['id']}', {chans[a]['khz']:g} kHz); channels need at least {MIN_SPACING_KHZ:g} kHz between them")

    def antennas(self) -> None:
        used = set()
        for st in self.d["stations"].values():
            used.update(st["antenna"] if isinstance(st["antenna"], list) else [st["antenna"]])
        for aid, ant in self.d["antennas"].items():
            p = f"antennas.{aid}"
            rule = KIND_KEYS[ant["kind"]]
            given = set(self.ctx.keys_under(p))
            for key in rule["needs"]:
                if key not in ant:
                    self.error("missing-key", f"{p}.{key}", f"a {ant['kind']} antenna needs '{key}'", p)
            allowed = set(COMMON_ANTENNA_KEYS) | set(rule["needs"]) | set(rule["allows"])
            for key in sorted(given - allowed):
                self.error("not-for-kind", f"{p}.{key}", f"'{key}' does not apply to a {ant['kind']} antenna (it applies to: {', '.join(k for k, r in KIND_KEYS.items() if key in r['needs'] + r['allows'])})")
            if aid not in used:
                self.warning("unused-antenna", p, "no station uses this antenna", f"{p}#key")

    def size(self) -> None:
        """What the plan asks the analysis to do, within planpack's bounds (planpack/plan/bounds.py)."""
        if self.ctx.out.has_errors:
            return  # counts of a broken plan mean little
        for path, message in bounds.problems(self.d):
            self.error("plan-too-large", path, message)

    def request(self) -> None:
        req = self.d.get("request")
        if req is None:
            return
        modes = set(BUILTIN_MODES) | set(self.d.get("modes", {}))
        if "mode" in req and req["mode"] not in modes:
            self.error("unknown-mode", "request.mode", f"mode '{req['mode']}' is neither built in ({', '.join(sorted(BUILTIN_MODES))}) "
                                                       f"nor declared under modes{self.near(req['mode'], modes)}")
        problems = candidates.check_values(req["bands_khz"], req["exclude_khz"], req["step_khz"])
        if not problems:  # the built-in exclusions and the assigned channels may still leave nothing
            try:
                candidates.candidate_grid(req["bands_khz"], req["exclude_khz"], req["step_khz"],
                                          [ch["khz"] for ch in self.d["channels"]])
            except candidates.GridError as exc:
                problems = [(exc.key, exc.message)]
        for key, message in problems:
            where = next(k for k in (key, key.split("[")[0], "request") if k in self.ctx.positions)
            self.ctx.out.error("bad-request", key, f"{key}: {message}", self.at(where))

    def run(self) -> None:
        self.net()
        self.stations()
        self.links()
        self.channels()
        self.antennas()
        self.size()
        self.request()


def parse_hours(text: str) -> tuple[int, int] | None:
    """'06:00-20:00' -> (360, 1200) minutes; None when malformed or zero-length."""
    m = _HOURS.match(text.strip())
    if not m:
        return None
    h1, m1, h2, m2 = (int(x) for x in m.groups())
    if h1 > 24 or h2 > 24 or (h1 == 24 and m1) or (h2 == 24 and m2):
        return None
    start, end = h1 * 60 + m1, h2 * 60 + m2
    if start % 1440 == end % 1440:
        return None
    return start, end


def resolve_links(links, station_ids: list[str], control: str | None) -> tuple[tuple[str, str], ...]:
    """The station pairs a plan's ``links`` names, in a stable order."""
    if links == "hub":
        return tuple((control, s) for s in station_ids if s != control)
    if links == "all":
        return tuple(combinations(station_ids, 2))
    return tuple((a, b) for a, b in links)


def build(data: dict, source: str, sha256: str, positions: dict | None = None) -> Plan:
    """Models from validated data (call only when no errors were found)."""
    n = data["net"]
    solar_index, solar_value = next(iter(n["solar"].items()))
    net = Net(
        id=n["id"], title=n["title"], handling=n.get("handling"), timezone=n["timezone"],
        valid_from=n["valid"]["from"], valid_to=n["valid"]["to"],
        solar=Solar(solar_index, tuple(float(v) for v in (solar_value if isinstance(solar_value, list) else [solar_value]))),
        net_address=n.get("net_address"),
        links=n["links"] if isinstance(n["links"], str) else tuple((a, b) for a, b in n["links"]),
        base_url=n.get("base_url"), instructions=n.get("instructions"),
        target_good_days=float(n["target_good_days"]), card_size=n["card_size"], fallback=n.get("fallback"),
    )
    stations = []
    for sid, st in data["stations"].items():
        at = st["at"]
        if "grid" in at:
            lat, lon = locator.to_latlon(at["grid"])
            pos = Position(round(lat, 6), round(lon, 6), at["grid"][:2].upper() + at["grid"][2:4] + at["grid"][4:6].lower() + at["grid"][6:])
        else:
            pos = Position(float(at["lat"]), float(at["lon"]), locator.from_latlon(at["lat"], at["lon"], 6))
        stations.append(Station(
            id=sid, name=st["name"], address=st["address"], role=st["role"], at=pos, power_w=float(st["power_w"]),
            noise=st["noise"], noise_margin_db=float(st["noise_margin_db"]),
            antennas=tuple(st["antenna"] if isinstance(st["antenna"], list) else [st["antenna"]]),
            ground=Ground(st["ground"]["soil"], st["ground"]["system"]), scan_rate=float(st["scan_rate"]),
            clearance_m=_f(st.get("clearance_m")),
        ))
    channels = []
    for ch in data["channels"]:
        hours = ch.get("hours")
        parsed = None if hours is None else tuple(parse_hours(h) for h in (hours if isinstance(hours, list) else [hours]))
        channels.append(Channel(id=ch["id"], khz=float(ch["khz"]), mode=ch["mode"], note=ch.get("note"), hours=parsed))
    antennas = []
    for aid, a in data["antennas"].items():
        fl = a.get("feedline")
        antennas.append(Antenna(
            id=aid, kind=a["kind"], design_khz=_f(a.get("design_khz")), height_m=float(a["height_m"]),
            apex_deg=_f(a.get("apex_deg")), wire_mm=float(a["wire_mm"]), length_m=_f(a.get("length_m")),
            spacing_m=_f(a.get("spacing_m")), resistor_ohm=_f(a.get("resistor_ohm")),
            transformer_ratio=_f(a.get("transformer_ratio")),
            feedline=None if fl is None else Feedline(float(fl["z0_ohm"]), float(fl["length_m"]), float(fl["loss_db_per_100m_at_10mhz"]),
                                                      float(fl["velocity_factor"])),
            # a whip is used with a coupler at its base (or a manpack set's own, also at the base)
            matching=a.get("matching") or ("feedpoint-coupler" if a["kind"] == "whip" else "set-tuner"),
            matching_coil_q=float(a["matching_coil_q"]),
        ))
    modes = dict(BUILTIN_MODES)
    for mid, m in data.get("modes", {}).items():
        base = BUILTIN_MODES.get(mid)
        modes[mid] = Mode(mid, float(m["snr_db"]), float(m["bandwidth_hz"]),
                          float(m.get("duty_factor", base.duty_factor if base else 1.0)), "set in the plan")
    control = next((s.id for s in stations if s.role == "control"), None)
    links = resolve_links(net.links, [s.id for s in stations], control)
    req = data.get("request")
    request = Request() if req is None else Request(
        bands_khz=tuple((float(lo), float(hi)) for lo, hi in req["bands_khz"]),
        exclude_khz=tuple(candidates.as_segment(e) for e in req["exclude_khz"]),
        mode=req.get("mode"), step_khz=float(req["step_khz"]))
    return Plan(source=source, sha256=sha256, net=net, stations=tuple(stations), channels=tuple(channels),
                antennas=tuple(antennas), modes=modes, links=links, request=request,
                positions={k: (v.line, v.col) for k, v in (positions or {}).items()})


def _f(v) -> float | None:
    return None if v is None else float(v)


def check_semantics(data: dict, ctx: Ctx, root: Node) -> None:
    Semantics(data, ctx, root).run()


__all__ = ["build", "check_semantics", "parse_hours", "resolve_links", "Collector"]
