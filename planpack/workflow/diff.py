"""A semantic diff of two compiled plans: what a change does to the net, not to the YAML text.

Everything is compared by id (stations, channels, antennas; links by their
pair of stations, either way round), so a reorder of keys in the file is no
change. The result separates what an operator must do differently
(*operational*: the channel of an hour, a link's first choice, hours without
a channel, the channel list and frequencies, the addresses) from what is worth
a reviewer's eye but changes no one's procedure (names, cut lengths, the
fraction of good days moving within the same choices).
"""

from __future__ import annotations

from dataclasses import dataclass, field

from planpack.labels import cut_label, percent
from planpack.schedule import format_hours

DEFAULT_GOOD_DAYS_THRESHOLD = 0.1
CUT_TOLERANCE_M = 0.005  # cut lengths are given to the centimetre
POSITION_TOLERANCE_DEG = 1e-6

STATION_FIELDS = (  # (key, label, operational)
    ("address", "self address", True),
    ("role", "role", True),
    ("name", "name", False),
    ("power_w", "power [W]", False),
    ("noise", "noise category", False),
    ("noise_margin_db", "noise margin [dB]", False),
    ("antennas", "antennas", False),
    ("scan_rate", "scan rate [channels/s]", False),
)
CHANNEL_FIELDS = (
    ("freq_khz", "frequency [kHz]", True),
    ("mode", "mode", True),
    ("hours_local", "authorised hours (local)", True),
    ("note", "note", False),
)
NET_FIELDS = (
    ("net_address", "net address", True),
    ("id", "net id", False),
    ("title", "title", False),
    ("handling", "handling marking", False),
    ("timezone", "time zone", False),
    ("valid", "valid", False),
    ("target_good_days", "a channel counts as working on at least", False),
    ("links_rule", "links", False),
    ("control", "control station", True),
    ("card_size", "card size", False),
    ("base_url", "base URL", False),
)


@dataclass(frozen=True)
class Change:
    """One line of the diff: ``section`` groups it, ``operational`` says whether procedure changes."""

    section: str
    subject: str  # what changed: a station id, "07:00–09:00 UTC", a link id
    text: str  # how it changed, plain text
    operational: bool


@dataclass
class PlanDiff:
    old_label: str
    new_label: str
    net_id: str
    changes: list[Change] = field(default_factory=list)

    @property
    def operational(self) -> list[Change]:
        return [c for c in self.changes if c.operational]

    def section(self, name: str) -> list[Change]:
        return [c for c in self.changes if c.section == name]

    def add(self, section: str, subject: str, text: str, operational: bool) -> None:
        self.changes.append(Change(section, subject, text, operational))


SECTIONS = (  # (name, heading), in the order a reviewer reads them
    ("net-hours", "Net channel by hour"),
    ("link-first", "First choice per link"),
    ("gaps", "Hours without a channel"),
    ("good-days", "How often the first channel works"),
    ("net", "Net"),
    ("stations", "Stations and addresses"),
    ("channels", "Channels"),
    ("antennas", "Antennas"),
)


# ------------------------------------------------------------------ helpers

def _show(v) -> str:
    if v is None:
        return "none"
    if isinstance(v, bool):
        return "yes" if v else "no"
    if isinstance(v, float):
        return f"{v:g}"
    if isinstance(v, list):
        return ", ".join(_show(x) for x in v) if v else "none"
    if isinstance(v, dict):
        return ", ".join(f"{k} {_show(x)}" for k, x in v.items())
    return str(v)


def _by_id(items: list[dict], key: str = "id") -> dict[str, dict]:
    return {x[key]: x for x in items}


def _pair(link: dict) -> frozenset:
    return frozenset((link["from"], link["to"]))


def _hour_groups(changes: dict[int, tuple]) -> list[tuple[list[int], tuple]]:
    """Hours that share the same change, each group's hours in runs of the day (a run may wrap midnight)."""
    groups: dict[tuple, list[int]] = {}
    for h in sorted(changes):
        groups.setdefault(changes[h], []).append(h)
    return sorted(((hours, what) for what, hours in groups.items()), key=lambda g: g[0][0])


def _hours_label(hours: list[int], local: list[str]) -> str:
    return f"{format_hours(hours)} UTC ({format_hours(hours, local)} local)"


def _local_labels(data: dict) -> list[str]:
    return [h["local_time"] for h in data["net_schedule"]["hours"]]


def _served(link: dict) -> list[float]:
    """Fraction of good days on the link's first choice, per UTC hour (0 without one)."""
    out = []
    for h in link["hours"]:
        cell = next((c for c in h["channels"] if c["channel"] == h["first"]), None)
        out.append(0.0 if cell is None else float(cell["good_days"] or 0.0))
    return out


def _gap_hours(data: dict) -> dict[frozenset, set[int]]:
    """UTC hours without a serving channel, per link (by station pair): the hours each gap names the link
    at (``links_by_hour``), as the site's gap hours are, else every hour of a gap that lists it."""
    pairs = {ln["id"]: _pair(ln) for ln in data["links"]}
    out: dict[frozenset, set[int]] = {}
    for g in data["gaps"]:
        by_hour = g.get("links_by_hour") or [g["links"]] * len(g["utc_hours"])
        for h, lids in zip(g["utc_hours"], by_hour):
            for lid in lids:
                if lid in pairs:
                    out.setdefault(pairs[lid], set()).add(h)
    return out


def _link_name(pair: frozenset, new: dict, old: dict) -> str:
    for data in (new, old):
        for ln in data["links"]:
            if _pair(ln) == pair:
                return ln["id"]
    return "--".join(sorted(pair))


# ---------------------------------------------------------------- comparing

def diff_compiled(old: dict, new: dict, *, old_label: str = "old", new_label: str = "new",
                  good_days_threshold: float = DEFAULT_GOOD_DAYS_THRESHOLD) -> PlanDiff:
    """Compare two compiled plans (``CompiledPlan.data``) and list what changed.

    good_days_threshold : smallest move of a link's fraction of good days on its
        first choice, in any hour, that is reported [0..1].
    """
    d = PlanDiff(old_label, new_label, new["net"]["id"])
    local = _local_labels(new)
    _net(d, old, new)
    _net_hours(d, old, new, local)
    _links(d, old, new, local, good_days_threshold)
    _gaps(d, old, new, local)
    _stations(d, old, new)
    _channels(d, old, new)
    _antennas(d, old, new)
    return d


#: Keys whose values are fractions of days: shown as the site shows them, in percent.
PERCENT_KEYS = ("target_good_days",)


def _fields(d: PlanDiff, section: str, subject: str, a: dict, b: dict, fields) -> None:
    for key, label, operational in fields:
        if a.get(key) != b.get(key):
            show = (lambda v: f"{percent(v)} of days" if v is not None else "none") if key in PERCENT_KEYS else _show
            d.add(section, subject, f"{label}: {show(a.get(key))} → {show(b.get(key))}", operational)


def _net(d: PlanDiff, old: dict, new: dict) -> None:
    _fields(d, "net", "net", old["net"], new["net"], NET_FIELDS)
    sa, sb = old["assumptions"].get("solar"), new["assumptions"].get("solar")
    if sa is not None and sb is not None and (sa.get("index"), sa.get("values")) != (sb.get("index"), sb.get("values")):
        d.add("net", "net", f"solar activity: {sa.get('index')} {_show(sa.get('values'))} → "
                            f"{sb.get('index')} {_show(sb.get('values'))}", False)


def _net_hours(d: PlanDiff, old: dict, new: dict, local: list[str]) -> None:
    changed = {}
    for a, b in zip(old["net_schedule"]["hours"], new["net_schedule"]["hours"]):
        if (a["first"], a["second"]) != (b["first"], b["second"]):
            changed[b["utc_hour"]] = (a["first"], b["first"], a["second"], b["second"])
    for hours, (f0, f1, s0, s1) in _hour_groups(changed):
        parts = []
        if f0 != f1:
            parts.append(f"first {_show(f0)} → {_show(f1)}")
        if s0 != s1:
            parts.append(f"second {_show(s0)} → {_show(s1)}")
        d.add("net-hours", _hours_label(hours, local), "; ".join(parts), True)


def _links(d: PlanDiff, old: dict, new: dict, local: list[str], threshold: float) -> None:
    a_links = {_pair(ln): ln for ln in old["links"]}
    b_links = {_pair(ln): ln for ln in new["links"]}
    for pair in sorted(a_links.keys() - b_links.keys(), key=sorted):
        d.add("link-first", a_links[pair]["id"], "link removed", True)
    for pair in sorted(b_links.keys() - a_links.keys(), key=sorted):
        d.add("link-first", b_links[pair]["id"], f"link added ({b_links[pair]['distance_km']:g} km)", True)
    for pair in sorted(a_links.keys() & b_links.keys(), key=sorted):
        a, b = a_links[pair], b_links[pair]
        name = b["id"]
        changed = {h: (x["first"], y["first"]) for h, (x, y) in enumerate(zip(a["hours"], b["hours"]))
                   if x["first"] != y["first"]}
        for hours, (f0, f1) in _hour_groups(changed):
            d.add("link-first", name, f"{_hours_label(hours, local)}: first {_show(f0)} → {_show(f1)}", True)
        sa, sb = _served(a), _served(b)
        moved = {h: sb[h] - sa[h] for h in range(24) if abs(sb[h] - sa[h]) > threshold + 1e-9}
        if moved:
            worst = max(moved, key=lambda h: (abs(moved[h]), -h))
            ups = sorted(h for h, m in moved.items() if m > 0)
            downs = sorted(h for h, m in moved.items() if m < 0)
            parts = []
            if downs:
                parts.append(f"worse {_hours_label(downs, local)}")
            if ups:
                parts.append(f"better {_hours_label(ups, local)}")
            d.add("good-days", name,
                  f"the first channel's share of working days moved by more than {round(threshold * 100):d} "
                  f"percentage points: " + "; ".join(parts)
                  + f"; most at {worst:02d}:00 UTC, {percent(sa[worst])} → {percent(sb[worst])} of days", False)


def _gaps(d: PlanDiff, old: dict, new: dict, local: list[str]) -> None:
    a, b = _gap_hours(old), _gap_hours(new)
    for pair in sorted(a.keys() | b.keys(), key=sorted):
        name = _link_name(pair, new, old)
        opened = sorted(b.get(pair, set()) - a.get(pair, set()))
        closed = sorted(a.get(pair, set()) - b.get(pair, set()))
        if opened:
            d.add("gaps", name, f"gap opened {_hours_label(opened, local)}", True)
        if closed:
            d.add("gaps", name, f"gap closed {_hours_label(closed, local)}", True)


def _stations(d: PlanDiff, old: dict, new: dict) -> None:
    a, b = _by_id(old["stations"]), _by_id(new["stations"])
    for sid in sorted(a.keys() - b.keys()):
        d.add("stations", sid, f"station removed (address {a[sid]['address']})", True)
    for sid in sorted(b.keys() - a.keys()):
        d.add("stations", sid, f"station added (address {b[sid]['address']})", True)
    for sid in sorted(a.keys() & b.keys()):
        x, y = a[sid], b[sid]
        _fields(d, "stations", sid, x, y, STATION_FIELDS)
        if abs(x["lat_deg"] - y["lat_deg"]) > POSITION_TOLERANCE_DEG or abs(x["lon_deg"] - y["lon_deg"]) > POSITION_TOLERANCE_DEG:
            d.add("stations", sid, f"moved: {x['lat_deg']:.4f}, {x['lon_deg']:.4f} → {y['lat_deg']:.4f}, {y['lon_deg']:.4f}", False)
        if x["ground"].get("soil") != y["ground"].get("soil") or x["ground"].get("system") != y["ground"].get("system"):
            d.add("stations", sid, f"ground: {x['ground'].get('soil')}, {x['ground'].get('system')} → "
                                   f"{y['ground'].get('soil')}, {y['ground'].get('system')}", False)


def _channels(d: PlanDiff, old: dict, new: dict) -> None:
    a, b = _by_id(old["channels"]), _by_id(new["channels"])
    for cid in [c["id"] for c in old["channels"] if c["id"] not in b]:
        d.add("channels", cid, f"channel removed ({a[cid]['freq_khz']:g} kHz {a[cid]['mode']})", True)
    for cid in [c["id"] for c in new["channels"] if c["id"] not in a]:
        d.add("channels", cid, f"channel added ({b[cid]['freq_khz']:g} kHz {b[cid]['mode']})", True)
    for cid in [c["id"] for c in new["channels"] if c["id"] in a]:
        _fields(d, "channels", cid, a[cid], b[cid], CHANNEL_FIELDS)
    kept_a = [c["id"] for c in old["channels"] if c["id"] in b]
    kept_b = [c["id"] for c in new["channels"] if c["id"] in a]
    if kept_a != kept_b:
        d.add("channels", "order", f"card order: {', '.join(kept_a)} → {', '.join(kept_b)}", False)


def _antennas(d: PlanDiff, old: dict, new: dict) -> None:
    a, b = _by_id(old["antennas"]), _by_id(new["antennas"])
    for aid in sorted(a.keys() - b.keys()):
        d.add("antennas", aid, f"antenna removed ({a[aid]['kind']})", False)
    for aid in sorted(b.keys() - a.keys()):
        d.add("antennas", aid, f"antenna added ({b[aid]['kind']})", False)
    for aid in sorted(a.keys() & b.keys()):
        x, y = a[aid], b[aid]
        if x["kind"] != y["kind"]:
            d.add("antennas", aid, f"kind: {x['kind']} → {y['kind']}", False)
        cx, cy = x.get("cut") or {}, y.get("cut") or {}
        moved = []
        for key in sorted(set(cx) | set(cy)):
            if not key.endswith("_m"):
                continue
            u, v = cx.get(key), cy.get(key)
            if isinstance(u, (int, float)) and isinstance(v, (int, float)):
                if abs(u - v) > CUT_TOLERANCE_M:
                    moved.append(f"{cut_label(key).lower()} {u:.2f} → {v:.2f} m")
            elif (u is None) != (v is None):
                moved.append(f"{cut_label(key).lower()} {_show(u)} → {_show(v)}")
        if moved:
            d.add("antennas", aid, "cut lengths changed: " + "; ".join(moved), False)


# ---------------------------------------------------------------- rendering

def _plain(text: str) -> str:
    """No control characters from a plan reach the terminal."""
    return "".join(c if c >= " " and c != "\x7f" else "?" for c in text)


def render_text(d: PlanDiff) -> str:
    lines = [f"planpack diff {_plain(d.old_label)} → {_plain(d.new_label)} (net {_plain(d.net_id)})"]
    if not d.changes:
        lines.append("no change in the compiled plan")
        return "\n".join(lines) + "\n"
    for name, heading in SECTIONS:
        items = d.section(name)
        if not items:
            continue
        lines.append("")
        lines.append(heading + ":")
        for c in items:
            mark = "!" if c.operational else " "
            lines.append(f" {mark} {_plain(c.subject)}: {_plain(c.text)}")
    lines.append("")
    lines.append(_summary(d) + " ('!' marks what changes an operator's procedure)")
    return "\n".join(lines) + "\n"


_MD_SPECIAL = set("\\`*_[]<>|~&")


def _md(text: str) -> str:
    """Escape plan text for a Markdown table cell: no markup, no HTML, no broken rows."""
    text = _plain(text)
    return "".join("\\" + c if c in _MD_SPECIAL else c for c in text)


def render_markdown(d: PlanDiff) -> str:
    out = [f"### Plan change: `{_md(d.net_id)}`", "",
           f"Compared the compiled plans {_md(d.old_label)} → {_md(d.new_label)}.", ""]
    if not d.changes:
        out.append("No change in the compiled plan.")
        return "\n".join(out) + "\n"
    n = len(d.operational)
    if n:
        out.append(f"**{n} operational change{'s' * (n != 1)}**: the schedule or the addresses change; "
                   "operators need the new cards.")
    else:
        out.append("**No operational change**: the schedule and the addresses are as before.")
    for name, heading in SECTIONS:
        items = d.section(name)
        if not items:
            continue
        out += ["", f"#### {heading}", "", "| | what | change |", "| --- | --- | --- |"]
        for c in items:
            out.append(f"| {'⚠' if c.operational else ''} | {_md(c.subject)} | {_md(c.text)} |")
    out += ["", "⚠ marks a change to an operator's procedure."]
    return "\n".join(out) + "\n"


def _summary(d: PlanDiff) -> str:
    n, m = len(d.operational), len(d.changes) - len(d.operational)
    return (f"{n} operational change{'s' * (n != 1)}, {m} other{'s' * (m != 1)}")
