"""The static site: compiled plans in, ``{relative path: bytes}`` out.

Pure: reads only the compiled plans' ``data`` dicts (what ``plan.json``
holds), formats figures for reading, and fills the jinja2 templates in
``site_templates/``. It never recomputes physics and never touches the disk
except to read its templates; :mod:`planpack.publish.output` writes the result.

Each page's template gets one typed context (a dataclass below) built from the
data dict; every string from the plan goes through jinja2's autoescaping.
The same input always gives the same bytes: files are produced in sorted
order, numbers with fixed precision, and no clock is read (a date is shown
only from the plan's revision or ``SOURCE_DATE_EPOCH``).
"""

from __future__ import annotations

import datetime as dt
import hashlib
import json
import os
import re
import sys
from dataclasses import dataclass, field
from pathlib import Path

from planpack.labels import CUT_LABEL
from planpack.publish import charts, requestpage

def _templates_dir() -> Path:
    """site_templates/ beside the package (a source checkout or editable install), else where a wheel puts it."""
    here = Path(__file__).resolve().parents[2] / "site_templates"
    if here.is_dir():
        return here
    return Path(sys.prefix) / "share" / "planpack" / "site_templates"


TEMPLATES = _templates_dir()
ASSETS = ("site.css",)
CSP = "default-src 'none'; style-src 'self'; img-src 'self' data:; base-uri 'none'; form-action 'none'"

KIND_LABEL = {
    "dipole": "Half-wave dipole",
    "inverted-v": "Inverted V dipole",
    "dipole-reflector": "Dipole over a reflector wire",
    "folded-terminated": "Folded terminated dipole (broadband)",
    "whip": "Vertical whip",
}


# ----------------------------------------------------------------- formatting

def json_bytes(data: dict) -> bytes:
    """plan.json exactly as the contract writes it."""
    return (json.dumps(data, indent=2, sort_keys=True, ensure_ascii=False) + "\n").encode("utf-8")


def safe_name(text: str) -> str:
    """A file-name part from a plan id: the id when it is plain, else a stable hash of it."""
    if re.fullmatch(r"[A-Za-z0-9][A-Za-z0-9_-]{0,79}", text):
        return text
    return "x" + hashlib.sha256(text.encode("utf-8")).hexdigest()[:16]


def num(x: float | None, digits: int = 1) -> str:
    if x is None:
        return "–"
    s = f"{x:.{digits}f}"
    return s[1:] if s.startswith("-") and float(s) == 0 else s


def khz_text(x: float) -> str:
    return f"{x:.0f}" if float(x).is_integer() else f"{x:.1f}"


def pct(x: float | None) -> str:
    return "–" if x is None else f"{round(x * 100):d} %"


def hour_ranges(hours: list[int]) -> str:
    """[1, 2, 3, 7] -> '01–03, 07' (hours, each one hour long)."""
    out, run = [], []
    for h in sorted(set(hours)):
        if run and h == run[-1] + 1:
            run.append(h)
        else:
            if run:
                out.append(run)
            run = [h]
    if run:
        out.append(run)
    return ", ".join(f"{r[0]:02d}" if len(r) == 1 else f"{r[0]:02d}–{r[-1]:02d}" for r in out)


def local_ranges(times: list[str]) -> str:
    hours = [int(t[:2]) for t in times if re.fullmatch(r"\d\d:\d\d", t)]
    return hour_ranges(hours) if len(hours) == len(times) else ", ".join(times)


def feet_inches(length_m: float) -> str:
    """Fallback only, when the plan carries no feet-and-inches text: nearest quarter inch."""
    quarters = round(length_m / 0.3048 * 48)
    feet, rest = divmod(quarters, 48)
    inches, q = divmod(rest, 4)
    return f"{feet} ft {inches}{['', ' 1/4', ' 1/2', ' 3/4'][q]} in"


def css_string(text: str) -> str:
    """A CSS string literal that cannot end early or break out of the rule."""
    out = []
    for ch in text:
        if ch in '"\\<>{};/*' or ord(ch) < 0x20 or ord(ch) == 0x7F:
            out.append(f"\\{ord(ch):x} ")
        else:
            out.append(ch)
    return '"' + "".join(out) + '"'


def http_url(url: object) -> str | None:
    """The URL if it is plain http(s), else None: nothing else may reach an href."""
    if isinstance(url, str) and re.match(r"https?://[^\s\"'<>\\]+$", url):
        return url
    return None


def markdown_html(text: str | None):
    """Standing instructions from Markdown; raw HTML off, images off (they would fetch)."""
    if not text:
        return None
    from markdown_it import MarkdownIt
    from markupsafe import Markup

    md = MarkdownIt("commonmark", {"html": False}).disable("image")
    return Markup(md.render(text))


def shown_date(revision: dict) -> str | None:
    if revision.get("date"):
        return str(revision["date"])
    epoch = os.environ.get("SOURCE_DATE_EPOCH")
    if epoch and epoch.strip().isdigit():
        return dt.datetime.fromtimestamp(int(epoch), dt.timezone.utc).date().isoformat()
    return None


# ------------------------------------------------------------------ contexts

@dataclass(frozen=True)
class NavItem:
    href: str
    label: str
    current: bool = False


@dataclass(frozen=True)
class Frame:
    """What every page shows around its content."""
    page_title: str
    heading: str
    root: str                      # relative path back to the site root: '' or '../'
    css: tuple[str, ...]
    marking: str | None
    nav: tuple[NavItem, ...]
    canonical: str | None
    revision: str
    generator: str
    date: str | None
    safety_href: str | None
    csp: str = CSP


@dataclass(frozen=True)
class NetSummary:
    href: str
    title: str
    net_id: str
    valid: str
    handling: str | None
    stations: int
    channels: int
    links: int
    warnings: int


@dataclass(frozen=True)
class IndexPage:
    frame: Frame
    nets: tuple[NetSummary, ...]


@dataclass(frozen=True)
class ChannelRef:
    id: str
    khz: str
    mode: str

    @property
    def text(self) -> str:
        return f"{self.id} {self.khz} kHz"


@dataclass(frozen=True)
class StationRow:
    id: str
    anchor: str
    href: str
    name: str
    address: str
    role: str
    lat: str
    lon: str
    grid: str
    power: str
    antennas: tuple[NavItem, ...]
    ground: str
    noise: str
    sun: str


@dataclass(frozen=True)
class ChannelRow:
    id: str
    khz: str
    mode: str
    hours: str
    note: str
    snr: str
    bandwidth: str


@dataclass(frozen=True)
class LinkRow:
    id: str
    href: str
    a: str
    b: str
    distance: str
    azimuth: str
    hops: str
    gap_hours: str       # UTC, from links[].gap_utc_text
    gap_local: str       # local, per period
    has_gaps: bool


@dataclass(frozen=True)
class WarningRow:
    severity: str
    code: str
    where: str
    message: str


#: One key/value row, the same type as the Requests page's facts.
KeyValue = requestpage.Fact


@dataclass(frozen=True)
class RequestLink:
    """Where a net's frequency request is, and its one-paragraph summary (plan.json's words)."""
    href: str
    summary: str


@dataclass(frozen=True)
class OverviewPage:
    frame: Frame
    title: str
    net_id: str
    handling: str | None
    valid: str
    timezone: str
    net_address: str
    control: str
    target: str
    facts: tuple[KeyValue, ...]
    assumptions: tuple[KeyValue, ...]
    methods: tuple[KeyValue, ...]
    not_modelled: tuple[str, ...]
    notes: tuple[str, ...]
    stations: tuple[StationRow, ...]
    channels: tuple[ChannelRow, ...]
    links: tuple[LinkRow, ...]
    map_src: str
    map_alt: str
    warnings: tuple[WarningRow, ...]
    cards: tuple[NavItem, ...]
    weak: tuple[str, ...]
    clock: tuple[str, ...]
    gaps: tuple[str, ...] = ()
    request: RequestLink | None = None


@dataclass(frozen=True)
class HourRow:
    """One hour of a schedule as a team reads it: the channel, how often it works, what to do if it fails."""
    local: tuple[str, ...]   # one per clock period
    utc: str
    first: ChannelRef | None
    first_good: str
    second: ChannelRef | None
    second_good: str
    weak: bool               # below the plan's target (or no channel)
    fallback: str
    gap: bool                # no channel at all


@dataclass(frozen=True)
class GridCell:
    text: str                # whole percent, or "–" when not authorised
    mark: str                # "◆" the chosen channel, "◇" the second, "" else
    classes: str
    title: str


@dataclass(frozen=True)
class GridRow:
    local: tuple[str, ...]
    utc: str
    weak: bool
    cells: tuple[GridCell, ...]
    window: str


@dataclass(frozen=True)
class Grid:
    """A timetable: hours down, channels across (low to high), each cell how often that channel works."""
    id: str
    caption: str
    channels: tuple[ChannelRef, ...]
    periods: tuple[str, ...]
    rows: tuple[GridRow, ...]


@dataclass(frozen=True)
class GapRow:
    links: tuple[NavItem, ...]
    local: str
    utc: str
    window: str
    message: str


@dataclass(frozen=True)
class SchedulePage:
    frame: Frame
    timezone: str
    offset: str
    clock: tuple[str, ...]
    changes: str
    target: str
    weak: tuple[str, ...]
    grid: Grid
    periods: tuple[str, ...]
    rows: tuple[HourRow, ...]
    gaps: tuple[GapRow, ...]
    links: tuple[LinkRow, ...]
    request: RequestLink | None = None


@dataclass(frozen=True)
class LinkPage:
    frame: Frame
    link: LinkRow
    timezone: str
    offset: str
    target: str
    grid: Grid
    gaps: tuple[GapRow, ...]


@dataclass(frozen=True)
class AntennaChoice:
    channel: ChannelRef
    antenna: NavItem
    why: str
    used: bool


@dataclass(frozen=True)
class StationPage:
    frame: Frame
    id: str
    name: str
    address: str
    role: str
    facts: tuple[KeyValue, ...]
    addresses: tuple[KeyValue, ...]
    single_antenna: NavItem | None
    antennas: tuple[AntennaChoice, ...]
    rigging: tuple[KeyValue, ...]
    ground: tuple[KeyValue, ...]
    exposure: str
    weak: tuple[str, ...]
    periods: tuple[str, ...]
    target: str
    rows: tuple[HourRow, ...]
    scan: "ScanRow | None"
    links: tuple[LinkRow, ...]
    cards: tuple[NavItem, ...]


@dataclass(frozen=True)
class ScanGroup:
    name: str
    hours: str
    channels: str
    period: str
    call: str


@dataclass(frozen=True)
class ScanRow:
    station: str
    anchor: str
    groups: tuple[ScanGroup, ...]
    wasted: str
    split: bool
    note: str
    station_id: str = ""


@dataclass(frozen=True)
class ScanPage:
    frame: Frame
    lists: tuple[ScanRow, ...]
    instructions: object  # markupsafe.Markup from markdown-it-py, or None


@dataclass(frozen=True)
class CutRow:
    label: str
    metres: str
    feet: str


@dataclass(frozen=True)
class SwrRow:
    channel: str
    khz: str
    impedance: str
    swr: str
    swr_class: str
    mismatch: str
    feedline: str


@dataclass(frozen=True)
class ExposureRow:
    station: str
    antenna: str
    general: str
    occupational: str


@dataclass(frozen=True)
class AntennaSummary:
    href: str
    id: str
    kind: str
    stations: str
    worst: str


@dataclass(frozen=True)
class AntennaIndexPage:
    frame: Frame
    antennas: tuple[AntennaSummary, ...]


@dataclass(frozen=True)
class AntennaPage:
    frame: Frame
    id: str
    kind: str
    stations: tuple[NavItem, ...]
    facts: tuple[KeyValue, ...]
    cut: tuple[CutRow, ...]
    sketch_src: str
    sketch_alt: str
    swr_src: str | None
    swr_alt: str
    swr: tuple[SwrRow, ...]
    pattern_src: str | None
    pattern_alt: str
    pattern: tuple[KeyValue, ...]
    exposure: tuple[ExposureRow, ...]
    notes: tuple[str, ...]
    method: tuple[KeyValue, ...]


@dataclass(frozen=True)
class GroundRow:
    station: str
    soil: str
    system: str
    instruction: str


@dataclass(frozen=True)
class SafetyPage:
    frame: Frame
    cautions: tuple[KeyValue, ...]
    deferral: str
    exposure: tuple[ExposureRow, ...]
    ground: tuple[GroundRow, ...]


# ------------------------------------------------------------- building pages

FALLBACK_CAUTIONS = (
    KeyValue("power lines", "Never put up a mast or throw a wire where it could fall onto or touch a power line."),
    KeyValue("RF exposure", "Keep people away from antennas while transmitting; keep the distances this plan gives."),
    KeyValue("lightning", "Disconnect and ground feedlines when a storm approaches; do not operate during lightning."),
)
FALLBACK_DEFERRAL = ("These notes are reminders, not a substitute for local electrical and building codes, "
                     "the equipment manufacturers' manuals and licensed practice; where they differ, follow those.")


@dataclass
class _Net:
    """One net's data with the lookups the pages share."""
    data: dict
    extra_warnings: list[dict] = field(default_factory=list)
    cards: tuple[str, ...] = ()
    sheet: str | None = None  # the request sheet beside the pages, when the build wrote one

    @property
    def requests(self) -> dict | None:
        """plan.json's frequency request; None when the plan has no gaps."""
        return self.data.get("requests")

    @property
    def id(self) -> str:
        return self.data["net"]["id"]

    @property
    def dir(self) -> str:
        return safe_name(self.id)

    def channel(self, cid: str | None) -> ChannelRef | None:
        if cid is None:
            return None
        c = next((c for c in self.data["channels"] if c["id"] == cid), None)
        if c is None:
            return ChannelRef(cid, "?", "?")
        return ChannelRef(cid, khz_text(c["freq_khz"]), str(c["mode"]).upper())

    def warnings(self) -> list[dict]:
        seen, out = set(), []
        for d in list(self.data.get("diagnostics") or []) + self.extra_warnings:
            key = (d.get("file"), d.get("line"), d.get("column"), d.get("code"), d.get("message"))
            if key not in seen:
                seen.add(key)
                out.append(d)
        return sorted(out, key=lambda d: (str(d.get("file")), d.get("line") or 0, d.get("column") or 0,
                                          str(d.get("code")), str(d.get("message"))))

    @property
    def target(self) -> float:
        return float(self.data["net"].get("target_good_days", 0.9))

    def valid(self) -> str:
        v = self.data["net"]["valid"]
        return f"{v['from']} to {v['to']}"


def _frame(net: _Net | None, *, page: str, title: str, heading: str, root: str, marking: str | None,
           revision: dict | None, generator: dict | None, base_url: str | None) -> Frame:
    nav: list[NavItem] = []
    if net is not None:
        items = [("index.html", "Overview"), ("schedule.html", "Schedule")]
        if net.requests:
            items.append((requestpage.PAGE_NAME, "Requests"))
        items += [("index.html#h-stations", "Stations"), ("scan.html", "Scan lists & instructions"),
                  ("antennas.html", "Antennas"), ("safety.html", "Safety")]
        nav = [NavItem(href, label, href == page or (href == "antennas.html" and page.startswith("antenna-"))
                       or (href == "schedule.html" and page.startswith("link-"))
                       or (label == "Stations" and page.startswith("station-"))) for href, label in items]
    css = [root + "assets/site.css"]
    if marking:
        css.append("marking.css")
    canonical = None
    base = http_url(base_url)
    if base is not None:
        canonical = base.rstrip("/") + "/" + ((net.dir + "/") if net else "") + ("" if page == "index.html" else page)
    rev = revision or {}
    rev_text, date = "", None
    if rev.get("label"):  # the compiled plan's readable revision: printed as it is, on every page
        rev_text = str(rev["label"])
    elif rev.get("id"):
        rev_text = f"{rev['id']} ({'git commit' if rev.get('kind') == 'git' else 'content hash'})"
        date = shown_date(rev)
    gen = generator or {}
    return Frame(page_title=title, heading=heading, root=root, css=tuple(css),
                 marking=marking, nav=tuple(nav), canonical=canonical, revision=rev_text,
                 generator=f"{gen.get('name', 'planpack')} {gen.get('version', '')}".strip(),
                 date=date, safety_href="safety.html" if net is not None else None)


def _net_frame(net: _Net, page: str, title: str) -> Frame:
    d = net.data
    return _frame(net, page=page, title=f"{title} · {d['net']['title']}", heading=d["net"]["title"], root="../",
                  marking=d["net"].get("handling"), revision=d.get("revision"), generator=d.get("generator"),
                  base_url=d["net"].get("base_url"))


def _station_label(net: _Net, sid: str) -> str:
    s = next((s for s in net.data["stations"] if s["id"] == sid), None)
    return sid if s is None else f"{s['name']} ({sid})"


def _link_rows(net: _Net) -> tuple[LinkRow, ...]:
    rows = []
    periods = net.data["net"].get("periods") or []
    for ln in net.data["links"]:
        local = list(ln.get("gap_local_by_period") or [])
        if len(local) > 1:
            local = [f"{t} ({p['label']})" for t, p in zip(local, periods)]
        rows.append(LinkRow(id=ln["id"], href=f"link-{safe_name(ln['id'])}.html", a=_station_label(net, ln["from"]),
                            b=_station_label(net, ln["to"]), distance=num(ln["distance_km"], 0),
                            azimuth=num(ln.get("azimuth_deg"), 0), hops=str(ln.get("hops", "–")),
                            gap_hours=str(ln.get("gap_utc_text", "none")), gap_local="; ".join(local),
                            has_gaps=bool(ln.get("gap_utc_hours"))))
    return tuple(rows)


def _gap_rows(net: _Net, only_link: str | None = None) -> tuple[GapRow, ...]:
    rows = []
    for g in net.data.get("gaps", []):
        if only_link is not None and only_link not in g["links"]:
            continue
        w = g.get("window_mhz")
        window = g.get("window_text") or ("no single frequency closes it" if not w else f"{w[0]:.1f}–{w[1]:.1f} MHz")
        every = {ln["id"] for ln in net.data["links"]}
        if len(every) > 2 and set(g["links"]) == every:
            links = (NavItem("schedule.html#h-links", f"all {len(every)} links"),)
        else:
            links = tuple(NavItem(f"link-{safe_name(lid)}.html", lid) for lid in g["links"])
        local = list(g.get("local_by_period") or [])
        periods = net.data["net"].get("periods") or []
        if len(local) > 1:
            local = [f"{t} ({p['label']})" for t, p in zip(local, periods)]
        rows.append(GapRow(links=links,
                           local="; ".join(local) or local_ranges(g.get("local_hours", [])),
                           utc=str(g.get("utc_text") or hour_ranges(g["utc_hours"])),
                           window=window, message=str(g.get("message") or "")))
    return tuple(rows)


def _antenna_height(a: dict) -> float | None:
    for src in (a, a.get("cut") or {}, a.get("nvis") or {}):
        for key in ("height_m", "apex_height_m", "feed_height_m"):
            if isinstance(src.get(key), (int, float)):
                return float(src[key])
    return None


def _cut_rows(cut: dict | None) -> tuple[CutRow, ...]:
    if not cut:
        return ()
    rows = []
    used: set[str] = set()
    metre_keys = [k for k in CUT_LABEL if k in cut] + sorted(k for k in cut if k.endswith("_m") and k not in CUT_LABEL)
    for k in metre_keys:
        v = cut[k]
        if not isinstance(v, (int, float)):
            continue
        base = k[:-2]
        ft = next((cut[c] for c in (base + "_ft_in", base + "_ftin", base + "_feet_inches", base + "_ft")
                   if isinstance(cut.get(c), str)), None)
        for c in (base + "_ft_in", base + "_ftin", base + "_feet_inches", base + "_ft"):
            used.add(c)
        rows.append(CutRow(CUT_LABEL.get(k, base.replace("_", " ").capitalize()), f"{v:.2f} m",
                           ft if ft is not None else feet_inches(float(v))))
        used.add(k)
    return tuple(rows)


_EXTRA_LABELS = {
    "apex_deg": ("angle between the legs", "{:g}°"),
    "rule_vs_nec_percent": ("468/f rule against the NEC trim", "{:+.1f} %"),
    "resistor_ohm": ("terminating resistor", "{:g} Ω"),
    "trimmed": ("trimmed to resonance by NEC", ""),
}


def _cut_extras(cut: dict | None) -> tuple[list[KeyValue], list[str]]:
    """What the cut sheet holds besides lengths: figures (as facts) and explanations (as notes)."""
    facts, notes = [], []
    for k in sorted(cut or {}):
        v = cut[k]
        if v is None or v is False or isinstance(v, (dict, list)) or k.endswith(("_m", "_ft_in", "_ftin", "_ft")):
            continue
        if isinstance(v, str):
            notes.append(v[0].upper() + v[1:] if v else v)
        elif v is True:
            facts.append(KeyValue(_EXTRA_LABELS.get(k, (k.replace("_", " "),))[0], "yes"))
        elif k == "transformer_ratio":
            facts.append(KeyValue("balun / transformer ratio", f"{v:g}:1"))
        elif k in _EXTRA_LABELS:
            label, fmt = _EXTRA_LABELS[k]
            facts.append(KeyValue(label, fmt.format(v)))
        else:
            facts.append(KeyValue(k.replace("_", " "), f"{v:g}" if isinstance(v, float) else str(v)))
    return facts, notes


def _exposure_rows(net: _Net) -> tuple[ExposureRow, ...]:
    rows = []
    for a in net.data.get("antennas", []):
        for e in a.get("exposure", []):
            rows.append(ExposureRow(_station_label(net, e["station"]), a["id"], f"{e['general_public_m']:.1f} m",
                                    f"{e['occupational_m']:.1f} m"))
    return tuple(sorted(rows, key=lambda r: (r.station, r.antenna)))


def _kv(obj: object, prefix: str = "") -> list[KeyValue]:
    """Flatten a small dict of figures into readable key/value rows."""
    out = []
    if isinstance(obj, dict):
        for k in sorted(obj):
            out += _kv(obj[k], f"{prefix}{k}".replace("_", " ") + " · ")
    elif isinstance(obj, list):
        out.append(KeyValue(prefix.rstrip(" ·"), ", ".join(str(x) for x in obj) or "none"))
    else:
        shown = "yes" if obj is True else "no" if obj is False else "–" if obj is None else str(obj)
        out.append(KeyValue(prefix.rstrip(" ·"), shown))
    return out


def _overview(net: _Net) -> OverviewPage:
    d = net.data
    n = d["net"]
    ants = {a["id"] for a in d.get("antennas", [])}
    stations = []
    for s in d["stations"]:
        sun = s.get("sun") or {}
        sun_text = "–"
        if sun.get("sunrise_local") or sun.get("sunset_local"):
            sun_text = f"{sun.get('sunrise_local') or 'none'} / {sun.get('sunset_local') or 'none'}"
        stations.append(StationRow(
            id=s["id"], anchor=f"st-{safe_name(s['id'])}", href=f"station-{safe_name(s['id'])}.html", name=s["name"],
            address=s["address"], role=s["role"],
            lat=f"{s['lat_deg']:.4f}", lon=f"{s['lon_deg']:.4f}", grid=s["grid"], power=f"{s['power_w']:g} W",
            antennas=tuple(NavItem(f"antenna-{safe_name(a)}.html" if a in ants else "antennas.html", a)
                           for a in s["antennas"]),
            ground=f"{s['ground']['soil']}, {s['ground']['system']}", noise=str(s.get("noise", "–")), sun=sun_text))
    channels = tuple(ChannelRow(
        id=c["id"], khz=khz_text(c["freq_khz"]), mode=str(c["mode"]).upper(),
        hours=", ".join(c["hours_local"]) if c.get("hours_local") else "any hour", note=c.get("note") or "",
        snr=f"{c['required_snr_db']:g} dB", bandwidth=f"{c['bandwidth_hz']:g} Hz") for c in d["channels"])
    a = d.get("assumptions", {})
    solar = a.get("solar", {})
    assumptions = [KeyValue("months", ", ".join(a.get("months", [])) or "–")]
    if solar:
        label = {"ssn": "sunspot number", "f107": "10.7 cm solar flux"}.get(solar.get("index"), str(solar.get("index")))
        assumptions.append(KeyValue("solar activity", f"{label} {', '.join(f'{v:g}' for v in solar.get('values', []))}"))
        if solar.get("ssn_used"):
            assumptions.append(KeyValue("sunspot number used", ", ".join(f"{v:g}" for v in solar["ssn_used"])))
    if a.get("worst_case"):
        assumptions.append(KeyValue("schedule holds for", str(a["worst_case"])))
    methods = tuple(_kv(a.get("models") or {}))
    facts = [KeyValue("valid", net.valid()), KeyValue("time zone", _zone_text(n)),
             KeyValue("net address", n.get("net_address") or "none"),
             KeyValue("control station", _station_label(net, n["control"]) if n.get("control") else "none"),
             KeyValue("links", {"hub": "every station to control", "all": "every pair of stations",
                                "list": "as listed in the plan"}.get(n.get("links_rule"), str(n.get("links_rule", "–")))),
             KeyValue("a channel counts as working on", f"at least {pct(net.target)} of days"),
             KeyValue("card size", str(n.get("card_size", "–")))]
    warnings = tuple(WarningRow(w.get("severity", "warning"), w.get("code", ""),
                                f"{w.get('file', '')}:{w.get('line', 0)}:{w.get('column', 0)}" + (f" ({w['key']})" if w.get("key") else ""),
                                w.get("message", "")) for w in net.warnings())
    return OverviewPage(
        frame=_net_frame(net, "index.html", "Overview"), title=n["title"], net_id=n["id"], handling=n.get("handling"),
        valid=net.valid(), timezone=n["timezone"], net_address=n.get("net_address") or "none",
        control=_station_label(net, n["control"]) if n.get("control") else "none", target=pct(net.target),
        facts=tuple(facts), assumptions=tuple(assumptions), methods=methods, not_modelled=tuple(str(x) for x in a.get("not_modelled", [])),
        notes=tuple(str(x) for x in a.get("notes", [])), stations=tuple(stations), channels=channels,
        links=_link_rows(net), map_src="charts/map.svg",
        map_alt=f"Map of the {len(d['stations'])} stations and {len(d['links'])} links; the station table below gives every position.",
        warnings=warnings, cards=tuple(NavItem(f"cards/{c}", c) for c in net.cards),
        weak=tuple(r["text"] for r in d["net_schedule"].get("weak_runs", [])), clock=_clock_lines(n),
        gaps=tuple(str(g.get("short") or g.get("message") or "") for g in d.get("gaps", [])),
        request=_request_link(net))


def _request_link(net: _Net) -> RequestLink | None:
    r = net.requests
    return None if not r else RequestLink(requestpage.PAGE_NAME, str(r["summary"]))


def _requests(net: _Net) -> requestpage.RequestsPage:
    links = {ln["id"] for ln in net.data["links"]}
    return requestpage.requests_page(
        net.data, _net_frame(net, requestpage.PAGE_NAME, "Frequency request"),
        link_href=lambda lid: f"link-{safe_name(lid)}.html" if lid in links else None, sheet=net.sheet)


MONTHS = ("Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec")


def _day(iso: str) -> str:
    """'2027-03-28' -> '28 Mar' (fixed English month names: the same bytes whatever the locale)."""
    d = dt.date.fromisoformat(iso)
    return f"{d.day} {MONTHS[d.month - 1]}"


def _zone_text(n: dict) -> str:
    label = n.get("utc_offset_label")
    periods = n.get("periods") or []
    if len(periods) > 1:
        return f"{n['timezone']} ({' / '.join(p['label'] for p in periods)}: the clocks change in the period)"
    return f"{n['timezone']} ({label})" if label else n["timezone"]


def _clock_lines(n: dict) -> tuple[str, ...]:
    """The clock changes in words, from net.periods and net.clock_changes."""
    periods = n.get("periods") or []
    if len(periods) < 2:
        return ()
    parts = [f"{p['label']} from {_day(p['from'])} to {_day(p['to'])}" for p in periods]
    dates = ", ".join(c["date"] for c in n.get("clock_changes") or [])
    return (f"The clocks change on {dates}: local time is {'; '.join(parts)}. Schedules give local times for each "
            f"side of the change; the UTC column is the same throughout.",)


def _period_headers(n: dict) -> tuple[str, ...]:
    """Column heads for the local times of an hour, one per clock period."""
    periods = n.get("periods") or []
    if len(periods) < 2:
        return (f"Local ({periods[0]['label']})" if periods else "Local",)
    heads = []
    for i, p in enumerate(periods):
        when = f"to {_day(p['to'])}" if i == 0 else f"from {_day(p['from'])}"
        heads.append(f"Local {p['label']} {when}")
    return tuple(heads)


def _offset_text(n: dict) -> str:
    """'UTC+1', or 'UTC / UTC+1' when the clocks change in the period."""
    periods = n.get("periods") or []
    if len(periods) > 1:
        return " / ".join(p["label"] for p in periods)
    return str(n.get("utc_offset_label") or "")


def _pct_text(p: int | None) -> str:
    return "–" if p is None else f"{p} %"


def _hour_rows(net: _Net, hours: list[dict]) -> tuple[HourRow, ...]:
    """Rows from net_schedule.hours or stations[].brief.hours; a second that works on no day is not offered."""
    rows = []
    for h in hours:
        first = net.channel(h.get("first"))
        useful = (h.get("second_good_days_pct") or 0) > 0
        second = net.channel(h.get("second")) if useful else None
        fb = h.get("fallback") or {}
        rows.append(HourRow(
            local=tuple(h.get("local_times") or [h.get("local_time", "")]), utc=f"{h['utc_hour']:02d}:00",
            first=first, first_good=_pct_text(h.get("good_days_pct")) if first else "–",
            second=second, second_good=_pct_text(h.get("second_good_days_pct")) if second else "–",
            weak=bool(h.get("weak")), fallback=str(fb.get("text") or ""), gap=first is None))
    return tuple(rows)


def _grid(net: _Net, gid: str, caption: str, hours: list[dict]) -> Grid:
    """The timetable of a schedule or a link: hours x channels, from the hours' per-channel cells."""
    order = sorted(net.data["channels"], key=lambda c: (c["freq_khz"], c["id"]))
    target = round(net.target * 100)
    rows = []
    for h in hours:
        cells = {c["channel"]: c for c in h.get("channels") or []}
        utc = f"{h['utc_hour']:02d}:00"
        second_ok = (h.get("second_good_days_pct") or 0) > 0
        out = []
        for c in order:
            cell = cells.get(c["id"])
            if cell is None or not cell.get("allowed", True):
                out.append(GridCell("–", "", "na", f"{c['id']} at {utc} UTC: not authorised"))
                continue
            p = cell.get("good_days_pct")
            classes = ["ok" if (p or 0) >= target else "low"]
            mark, role = "", ""
            if cell.get("in_window"):
                classes.append("win")
            if h.get("first") == c["id"]:
                classes.append("first")
                mark, role = "◆", "; the channel for this hour"
            elif h.get("second") == c["id"] and second_ok:
                classes.append("second")
                mark, role = "◇", "; the second channel"
            where = "; inside the usable window" if cell.get("in_window") else ""
            out.append(GridCell(_pct_text(p).replace(" %", ""), mark, " ".join(classes),
                                f"{c['id']} at {utc} UTC: works on {_pct_text(p)} of days{role}{where}"))
        w = h.get("window_mhz")
        rows.append(GridRow(local=tuple(h.get("local_times") or [h.get("local_time", "")]), utc=utc,
                            weak=bool(h.get("weak")), cells=tuple(out),
                            window="none" if not w else f"{w[0]:.1f}–{w[1]:.1f}"))
    return Grid(gid, caption, tuple(net.channel(c["id"]) for c in order), _period_headers(net.data["net"]), tuple(rows))


def _schedule(net: _Net) -> SchedulePage:
    d = net.data
    hours = d["net_schedule"]["hours"]
    return SchedulePage(
        frame=_net_frame(net, "schedule.html", "Schedule"), timezone=d["net"]["timezone"],
        offset=_offset_text(d["net"]), clock=_clock_lines(d["net"]),
        changes=str(d["net_schedule"].get("changes_per_day", "–")), target=pct(net.target),
        weak=tuple(r["text"] for r in d["net_schedule"].get("weak_runs", [])),
        grid=_grid(net, "net-grid", "How often each channel works on the weakest link, hour by hour (% of days)", hours),
        periods=_period_headers(d["net"]), rows=_hour_rows(net, hours), gaps=_gap_rows(net), links=_link_rows(net),
        request=_request_link(net))


def _link_page(net: _Net, ln: dict, row: LinkRow) -> LinkPage:
    return LinkPage(frame=_net_frame(net, row.href, f"Link {ln['id']}"), link=row, timezone=net.data["net"]["timezone"],
                    offset=_offset_text(net.data["net"]), target=pct(net.target),
                    grid=_grid(net, "link-grid", f"How often each channel works on link {ln['id']}, hour by hour (% of days)",
                               ln["hours"]),
                    gaps=_gap_rows(net, ln["id"]))


def _station_page(net: _Net, s: dict, scans: dict[str, "ScanRow"]) -> StationPage:
    d = net.data
    b = s.get("brief") or {}
    ants = {a["id"] for a in d.get("antennas", [])}

    def ant(aid: str) -> NavItem:
        return NavItem(f"antenna-{safe_name(aid)}.html" if aid in ants else "antennas.html", aid)

    facts = [KeyValue("role", s["role"]), KeyValue("self address", s["address"]),
             KeyValue("position", f"{s['lat_deg']:.4f}, {s['lon_deg']:.4f} ({s['grid']})"),
             KeyValue("power", f"{s['power_w']:g} W"), KeyValue("noise at the receiver", str(s.get("noise", "–")))]
    sun = s.get("sun") or {}
    if sun.get("sunrise_local") or sun.get("sunset_local"):
        facts.append(KeyValue(f"sun up / down on {sun.get('date')}",
                              f"{sun.get('sunrise_local') or 'none'} / {sun.get('sunset_local') or 'none'} local "
                              f"({sun.get('sunrise_utc') or 'none'} / {sun.get('sunset_utc') or 'none'} UTC)"))
    tc = b.get("to_control")
    if tc:
        facts.append(KeyValue("to control", f"{tc['bearing_deg']:.0f}° ({tc['compass']}), {tc['distance_km']:.1f} km to "
                                            f"{_station_label(net, tc['station'])}"))
    elif b.get("far_stations"):
        facts.append(KeyValue("to the members", "; ".join(
            f"{_station_label(net, f['station'])} {f['bearing_deg']:.0f}° ({f['compass']}), {f['distance_km']:.1f} km"
            for f in b["far_stations"])))
    addresses = [KeyValue("this station", s["address"])]
    if b.get("control") and b["control"]["station"] != s["id"]:
        addresses.append(KeyValue(f"control: {b['control']['name']}", b["control"]["address"]))
    if b.get("net_address"):
        addresses.append(KeyValue("net", b["net_address"]))
    addresses += [KeyValue(m["name"], m["address"]) for m in b.get("other_members", [])]
    used = {h[k] for h in b.get("hours", []) for k in ("first", "second") if h.get(k)}
    choices = tuple(AntennaChoice(net.channel(r["channel"]), ant(r["antenna"]), str(r.get("why", "")), r["channel"] in used)
                    for r in b.get("antenna_by_channel", []))
    single = ant(s["antennas"][0]) if len(s["antennas"]) == 1 else None
    rigging = [KeyValue(w["antenna"], str(w["text"])) for w in b.get("wire_runs", [])]
    g = b.get("ground") or {}
    ground = [KeyValue("system", f"{g.get('system', s['ground']['system'])} on {g.get('soil', s['ground']['soil'])} soil")]
    if g.get("text"):
        ground.append(KeyValue("lay out", str(g["text"])))
    ground.append(KeyValue("how", str(g.get("instruction") or s["ground"].get("instruction") or "")))
    e = b.get("exposure") or {}
    exposure = str(e.get("text") or "")
    if e.get("exceeds_clearance"):
        exposure += f" — more than the {e['clearance_m']:g} m the plan allows for: see the warnings"
    links = tuple(r for r in _link_rows(net) if s["id"] in (next(x for x in d["links"] if x["id"] == r.id)["from"],
                                                            next(x for x in d["links"] if x["id"] == r.id)["to"]))
    return StationPage(
        frame=_net_frame(net, f"station-{safe_name(s['id'])}.html", s["name"]), id=s["id"], name=s["name"],
        address=s["address"], role=s["role"], facts=tuple(facts), addresses=tuple(addresses), single_antenna=single,
        antennas=choices if single is None else (), rigging=tuple(rigging), ground=tuple(ground), exposure=exposure,
        weak=tuple(r["text"] for r in b.get("weak_runs", [])), periods=_period_headers(d["net"]), target=pct(net.target),
        rows=_hour_rows(net, b.get("hours", [])), scan=scans.get(s["id"]), links=links,
        cards=tuple(NavItem(f"cards/{c}", c) for c in net.cards if safe_name(s["id"]) in c))


def _scan(net: _Net) -> ScanPage:
    lists = []
    for s in net.data.get("scan_lists", []):
        groups = tuple(ScanGroup(g["name"], hour_ranges(g["utc_hours"]) if g.get("utc_hours") else "any hour", ", ".join(net.channel(c).text for c in g["channels"]) or "none",
                                 f"{g['scan_period_s']:.1f} s", f"{g['call_time_s']:.1f} s") for g in s["groups"])
        lists.append(ScanRow(_station_label(net, s["station"]), f"scan-{safe_name(s['station'])}", groups,
                             ", ".join(s.get("wasted", [])) or "none", bool(s.get("split_suggested")),
                             str(s.get("note") or ""), s["station"]))
    return ScanPage(frame=_net_frame(net, "scan.html", "Scan lists & instructions"), lists=tuple(lists),
                    instructions=markdown_html(net.data["net"].get("instructions_md")))


def _antenna_summaries(net: _Net) -> AntennaIndexPage:
    out = []
    for a in net.data.get("antennas", []):
        order = {"fine": 0, "tuner": 1, "poor": 2}
        worst = max((c["swr_class"] for c in a.get("channels", [])), key=lambda c: order.get(c, 3), default="–")
        out.append(AntennaSummary(f"antenna-{safe_name(a['id'])}.html", a["id"], KIND_LABEL.get(a["kind"], a["kind"]),
                                  ", ".join(_station_label(net, s) for s in a.get("stations", [])) or "none", worst))
    return AntennaIndexPage(frame=_net_frame(net, "antennas.html", "Antennas"), antennas=tuple(out))


def _antenna_page(net: _Net, a: dict) -> AntennaPage:
    aid = safe_name(a["id"])
    height = _antenna_height(a)
    facts = [KeyValue("kind", KIND_LABEL.get(a["kind"], a["kind"])),
             KeyValue("height", "–" if height is None else f"{height:.1f} m"
                      + ("" if a.get("height_wavelengths") is None else f" ({a['height_wavelengths']:.2f} wavelengths)"))]
    cut = a.get("cut") or {}
    balun = a.get("balun") or cut.get("balun")
    if balun:
        facts.append(KeyValue("balun", str(balun)))
    if a.get("design_khz"):
        facts.append(KeyValue("designed for", f"{khz_text(a['design_khz'])} kHz"))
    win = a.get("nvis_window") or {}
    if win.get("applies") and win.get("low_height_m") is not None:
        facts.append(KeyValue("NVIS height window", f"{win['low_height_m']:.1f}–{win['high_height_m']:.1f} m at "
                              f"{khz_text(win.get('freq_khz', 0))} kHz: " + ("inside" if win.get("inside") else "outside")))
    extra_facts, cut_notes = _cut_extras(cut)
    facts += extra_facts
    swr = tuple(SwrRow(c["channel"], khz_text(c["freq_khz"]),
                       f"{c['impedance_ohm'][0]:.0f} {'+' if c['impedance_ohm'][1] >= 0 else '−'} j{abs(c['impedance_ohm'][1]):.0f} Ω",
                       str(c.get("swr_text") or "–"), c["swr_class"], f"{c['mismatch_loss_db']:.1f} dB",
                       f"{c['feedline_loss_db']:.1f} dB")
                for c in a.get("channels", []))
    p = a.get("pattern") or {}
    pattern = []
    if p:
        pattern = [KeyValue("peak gain", f"{p['peak_gain_dbi']:.1f} dBi"),
                   KeyValue("gain straight up", f"{p['zenith_gain_dbi']:.1f} dBi"),
                   KeyValue("power radiated above 60° elevation", pct(p["fraction_above_60deg"]))]
    pattern += [KeyValue("near-vertical use · " + kv.key, kv.value) for kv in _kv(a.get("nvis") or {})]
    exposure = tuple(r for r in _exposure_rows(net) if r.antenna == a["id"])
    return AntennaPage(
        frame=_net_frame(net, f"antenna-{aid}.html", f"Antenna {a['id']}"), id=a["id"],
        kind=KIND_LABEL.get(a["kind"], a["kind"]),
        stations=tuple(NavItem(f"index.html#st-{safe_name(s)}", _station_label(net, s)) for s in a.get("stations", [])),
        facts=tuple(facts), cut=_cut_rows(a.get("cut")), sketch_src=f"charts/antenna-{aid}-sketch.svg",
        sketch_alt=f"Sketch of how the {KIND_LABEL.get(a['kind'], a['kind']).lower()} hangs, labelled with the cut lengths.",
        swr_src=f"charts/antenna-{aid}-swr.svg" if a.get("channels") else None,
        swr_alt="SWR on each channel; the table beside it gives the same figures.", swr=swr,
        pattern_src=f"charts/antenna-{aid}-pattern.svg" if _patterns(a) else None,
        pattern_alt="Elevation pattern on each channel, gain against elevation angle.", pattern=tuple(pattern),
        exposure=exposure,
        notes=tuple([str(x) for x in a.get("notes") or []] + [str(w.get("message", w)) if isinstance(w, dict) else str(w)
                                                              for w in a.get("warnings") or []]
                    + [str(x) for x in a.get("assumptions") or []] + cut_notes),
        method=tuple(kv for key in ("solver", "ground", "matching", "reflector", "nvis_window", "solved_over")
                     for kv in _kv(a.get(key) or {}, key.replace("_", " ") + " · ")))


def _safety(net: _Net) -> SafetyPage:
    s = net.data.get("safety") or {}
    cautions = tuple(KeyValue(str(c.get("title") or c.get("topic", "")), str(c.get("text", "")))
                     for c in s.get("cautions", [])) or FALLBACK_CAUTIONS
    ground = tuple(GroundRow(_station_label(net, st["id"]), st["ground"]["soil"], st["ground"]["system"],
                             str(st["ground"].get("instruction") or "")) for st in net.data["stations"])
    return SafetyPage(frame=_net_frame(net, "safety.html", "Safety & grounding"), cautions=cautions,
                      deferral=str(s.get("deferral") or FALLBACK_DEFERRAL), exposure=_exposure_rows(net), ground=ground)


def _patterns(a: dict) -> list[dict]:
    """Elevation patterns per channel: the antenna's list, or the per-channel figures."""
    if a.get("elevation_pattern"):
        return a["elevation_pattern"]
    return [{"channel": c["channel"], "gain_dbi": c["elevation_gain_dbi"]}
            for c in a.get("channels", []) if c.get("elevation_gain_dbi")]


def _charts(net: _Net) -> dict[str, str]:
    d = net.data
    out = {"charts/map.svg": charts.station_map(d["stations"], d["links"], title=f"Map of {d['net']['title']}")}
    freqs = {c["id"]: c["freq_khz"] for c in d["channels"]}
    for a in d.get("antennas", []):
        name = safe_name(a["id"])
        out[f"charts/antenna-{name}-sketch.svg"] = charts.antenna_sketch(
            a["kind"], title=f"How antenna {a['id']} hangs", height_m=_antenna_height(a), cut=a.get("cut"))
        if a.get("channels"):
            out[f"charts/antenna-{name}-swr.svg"] = charts.swr_chart(a["channels"], title=f"SWR of antenna {a['id']}")
        if _patterns(a):
            out[f"charts/antenna-{name}-pattern.svg"] = charts.elevation_patterns(
                _patterns(a), freqs, title=f"Elevation pattern of antenna {a['id']}")
    return out


# ------------------------------------------------------------------- rendering

def _environment():
    import jinja2

    env = jinja2.Environment(
        loader=jinja2.FileSystemLoader(str(TEMPLATES)),
        autoescape=True,  # everything, whatever the template's name
        undefined=jinja2.StrictUndefined,
        trim_blocks=True,
        lstrip_blocks=True,
        keep_trailing_newline=True,
    )
    return env


def marking_css(marking: str) -> str:
    """Print rules that put the handling marking in the top and bottom margin of every printed page."""
    s = css_string(marking)
    return ("@media print {\n  @page {\n"
            f"    @top-center {{ content: {s}; font: 700 9pt sans-serif; color: #000; }}\n"
            f"    @bottom-center {{ content: {s}; font: 700 9pt sans-serif; color: #000; }}\n"
            "  }\n}\n")


def render_site(nets: list[dict], *, warnings: dict[str, list[dict]] | None = None,
                cards: dict[str, list[str]] | None = None, sheets: dict[str, str] | None = None) -> dict[str, bytes]:
    """Render every net's pages; returns {relative path: bytes}, keys sorted.

    nets: compiled plans' data dicts (plan.json contents).
    warnings: extra diagnostics per net id (from reading the plan) to show beside the analysis warnings.
    cards: card file names per net id, already written under ``<net>/cards/``; the site links them.
    sheets: the request sheet's file name per net id, written beside the net's pages; its Requests page links it.
    """
    env = _environment()
    ids = [d["net"]["id"] for d in nets]
    dirs = [safe_name(i) for i in ids]
    if len(set(dirs)) != len(dirs):
        dup = sorted({i for i in ids if dirs.count(safe_name(i)) > 1})
        raise ValueError(f"two plans share the net id {', '.join(dup)}; each net needs its own id")
    models = [_Net(d, list((warnings or {}).get(d["net"]["id"], [])), tuple(sorted((cards or {}).get(d["net"]["id"], []))),
                   (sheets or {}).get(d["net"]["id"]) if d.get("requests") else None)
              for d in sorted(nets, key=lambda d: d["net"]["id"])]
    files: dict[str, bytes] = {}

    def page(path: str, template: str, ctx) -> None:
        files[path] = env.get_template(template).render(page=ctx).encode("utf-8")

    for name in ASSETS:
        files[f"assets/{name}"] = (TEMPLATES / "static" / name).read_bytes()
    for net in models:
        d, base = net.data, net.dir + "/"
        if d["net"].get("handling"):
            files[base + "marking.css"] = marking_css(d["net"]["handling"]).encode("utf-8")
        page(base + "index.html", "overview.html", _overview(net))
        page(base + "schedule.html", "schedule.html", _schedule(net))
        if net.requests:
            page(base + requestpage.PAGE_NAME, "requests.html", _requests(net))
        for ln, row in zip(d["links"], _link_rows(net)):
            page(base + row.href, "link.html", _link_page(net, ln, row))
        scan = _scan(net)
        page(base + "scan.html", "scan.html", scan)
        by_station = {r.station_id: r for r in scan.lists}
        for s in d["stations"]:
            page(base + f"station-{safe_name(s['id'])}.html", "station.html", _station_page(net, s, by_station))
        page(base + "antennas.html", "antennas.html", _antenna_summaries(net))
        for a in d.get("antennas", []):
            page(base + f"antenna-{safe_name(a['id'])}.html", "antenna.html", _antenna_page(net, a))
        page(base + "safety.html", "safety.html", _safety(net))
        for path, svg in _charts(net).items():
            files[base + path] = svg.encode("utf-8")
        files[base + "plan.json"] = json_bytes(d)
    # the site index: newest valid period first, then by id
    ordered = sorted(models, key=lambda m: m.data["net"]["valid"]["from"], reverse=True)
    summaries = tuple(NetSummary(
        href=f"{m.dir}/index.html", title=m.data["net"]["title"], net_id=m.id, valid=m.valid(),
        handling=m.data["net"].get("handling"), stations=len(m.data["stations"]), channels=len(m.data["channels"]),
        links=len(m.data["links"]), warnings=len(m.warnings())) for m in ordered)
    markings = sorted({m.data["net"]["handling"] for m in models if m.data["net"].get("handling")})
    marking = " / ".join(markings) or None
    if marking:
        files["marking.css"] = marking_css(marking).encode("utf-8")
    index_frame = _frame(None, page="index.html", title="HF net plans", heading="HF net plans", root="",
                         marking=marking, revision=None, generator=models[0].data.get("generator") if models else None,
                         base_url=None)
    page("index.html", "index.html", IndexPage(index_frame, summaries))
    return dict(sorted(files.items()))
