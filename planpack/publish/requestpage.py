"""The site's "Requests" page: what to ask the spectrum manager for, from plan.json's ``requests`` alone.

Pure like the rest of the site: it reads the request data that compile put
in plan.json (the contract of ``planpack request --format json``, see
:mod:`planpack.requests.contract`), formats it for reading and recomputes
nothing: every percent is a ``..._pct`` field of the data, every sentence a
message of the data; only frequencies and hour lists are spelt out here.

The page reads as the request itself: the frequencies to ask for with the
window each may sit in and what each serves, what they change, what no
frequency fixes, and how the choice was made.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable

from planpack.scheduling.hours import format_hours

#: The request sheet's file name beside a net's pages (``<net>/request.pdf``).
SHEET_NAME = "request.pdf"
PAGE_NAME = "requests.html"


@dataclass(frozen=True)
class Ref:
    href: str | None
    label: str


@dataclass(frozen=True)
class Fact:
    key: str
    value: str


@dataclass(frozen=True)
class Served:
    """Links served at the same hours: one line of a proposal's "serves"."""
    links: tuple[Ref, ...]
    utc: str
    local: str


@dataclass(frozen=True)
class ProposalRow:
    id: str
    khz: str                  # the preferred centre, e.g. "3675"
    window: str               # "3600–3700 kHz", or "3675 kHz only"
    worst: str                # whole percent, from worst_good_days_pct
    serves: tuple[Served, ...]
    net_hours: Served | None  # hours at which it is one channel for the whole net


@dataclass(frozen=True)
class ChangeRow:
    what: str
    before: str
    after: str


@dataclass(frozen=True)
class UnservableRow:
    link: Ref
    utc: str
    local: str
    best: str
    message: str


@dataclass(frozen=True)
class RequestsPage:
    frame: object             # site.Frame
    summary: str
    mode: str
    offset: str
    clock: str                # a clock change in the plan's validity, in words; "" without one
    target: str
    proposals: tuple[ProposalRow, ...]
    changes: tuple[ChangeRow, ...]
    left_out_note: str
    merges: tuple[str, ...]
    left_out: tuple[Served, ...]
    unservable: tuple[UnservableRow, ...]
    solver: str
    optimal: bool
    objective: str
    basis: tuple[Fact, ...]
    assumptions: tuple[str, ...]
    exclusions: tuple[Fact, ...]
    sheet: str | None


def khz(x: float) -> str:
    """A frequency as planpack requests it (on a 25 kHz grid, or a plan's own step) [kHz]."""
    return f"{float(x):g}"


def window_text(w: list[float]) -> str:
    lo, hi = w
    return f"{khz(lo)} kHz only" if lo == hi else f"{khz(lo)}–{khz(hi)} kHz"


def pct_text(p: int | None) -> str:
    return "–" if p is None else f"{p} %"


def _pretty(link: str) -> str:
    return link.replace("--", "–")


def _clock(hours: list[int], labels: list[str] | None = None) -> str:
    """Clock ranges of UTC hour slots; "none" for no hours (all gaps closed)."""
    return format_hours(hours, labels) if hours else "none"


def _hours(hours: list[int], labels: list[str]) -> tuple[str, str]:
    """(UTC, local) clock ranges of UTC hour slots."""
    return format_hours(hours), format_hours(hours, labels)


def _grouped(serves: list[dict], labels: list[str], link_href: Callable[[str], str | None]) -> tuple[Served, ...]:
    """Links with the same hours on one line, in the order of their first hour (as the Markdown request)."""
    by: dict[tuple[int, ...], list[str]] = {}
    for s in serves:
        by.setdefault(tuple(s["utc_hours"]), []).append(s["link"])
    out = []
    for hours, links in sorted(by.items()):
        utc, local = _hours(list(hours), labels)
        out.append(Served(tuple(Ref(link_href(ln), _pretty(ln)) for ln in links), utc, local))
    return tuple(out)


def _scenarios(r: dict) -> str:
    months = sorted({s["month"] for s in r.get("scenarios") or []})
    ssn = sorted({s["ssn"] for s in r.get("scenarios") or []})
    if not months:
        return "the plan's months and solar levels"
    return f"{', '.join(months)} at sunspot number {' and '.join(f'{v:g}' for v in ssn)}"


def _changes(r: dict, labels: list[str], target: str) -> tuple[tuple[ChangeRow, ...], str]:
    b, a = r["before"], r["after"]
    rows = [ChangeRow("(link, hour) pairs in the plan's gaps", str(b["gap_hours"]), str(a["gap_hours"])),
            ChangeRow(f"pairs with no channel working on {target} of days", str(b["unserved_pairs"]),
                      str(a["unserved_pairs"]))]
    if "utc_hours" in b and "utc_hours" in a:
        rows.append(ChangeRow("hours with a gap, UTC", _clock(b["utc_hours"]), _clock(a["utc_hours"])))
        rows.append(ChangeRow("hours with a gap, local", _clock(b["utc_hours"], labels), _clock(a["utc_hours"], labels)))
    left = a.get("left_out_pairs") or 0
    note = (f"{left} of the pairs left after the requests could be served but were left out to keep to the "
            f"number of frequencies asked for (--max {r['solver'].get('max_new')})." if left else "")
    return tuple(rows), note


def _basis(r: dict) -> tuple[Fact, ...]:
    c, m = r["candidates"], r["mode"]
    plan_excl = len(c.get("exclude_khz") or [])
    never = (f"{len(c.get('builtin_exclusions') or [])} distress, safety and time-signal segments (ITU RR Appendix 15 "
             f"and Article 5, with a {khz(c.get('distress_guard_khz', 0))} kHz guard)")
    if plan_excl:
        never += f"; {plan_excl} segment{'s' * (plan_excl != 1)} the plan excludes"
    if c.get("assigned_spacing_khz"):
        never += f"; anything within {khz(c['assigned_spacing_khz'])} kHz of an assigned channel"
    bands = ", ".join(f"{khz(lo)}–{khz(hi)}" for lo, hi in c["bands_khz"])
    return (
        Fact("a frequency serves a link at an hour when it works there on",
             f"at least {pct_text(r['target_good_days_pct'])} of days, worst case over {_scenarios(r)} and both "
             f"directions of the link"),
        Fact("new channels", f"{str(m['id']).upper()}, {m['snr_db']:g} dB SNR in {m['bandwidth_hz']:g} Hz"),
        Fact("candidates tried", f"every {khz(c['step_khz'])} kHz in {bands} kHz: {c['count']} frequencies"),
        Fact("never proposed", never),
    )


def _solver(r: dict) -> tuple[str, bool, str]:
    """The solver's status in one line (the data's own status words), whether it is proven, and its objective."""
    s = r["solver"]
    if not s.get("stages"):
        return f"Nothing for the solver to do: {s['status']}.", bool(s.get("optimal")), ""
    how = f"{s.get('name', 'the solver')} through {s.get('interface', 'an integer programme')}"
    status = str(s["status"])
    if not s.get("optimal") and s.get("time_limit_s"):
        status += f" within its time limit of {s['time_limit_s']:g} s"
    return f"Chosen by integer programming ({how}): {status}.", bool(s.get("optimal")), str(s.get("objective") or "")


def requests_page(data: dict, frame, *, link_href: Callable[[str], str | None], sheet: str | None) -> RequestsPage:
    """The page's context from one net's plan.json data (whose ``requests`` is not null).

    link_href : the page of a link id, or None when the net has no such link.
    sheet : the request sheet's path beside the page, when the build wrote one.
    """
    r = data["requests"]
    labels = list(r["local_time_labels"])
    target = pct_text(r["target_good_days_pct"])
    proposals = []
    for p in r["proposals"]:
        net_hours = None
        if p.get("net_channel_utc_hours"):
            utc, local = _hours(p["net_channel_utc_hours"], labels)
            net_hours = Served((), utc, local)
        proposals.append(ProposalRow(str(p.get("id", "")), khz(p["khz"]), window_text(p["window_khz"]),
                                     pct_text(p["worst_good_days_pct"]), _grouped(p["serves"], labels, link_href),
                                     net_hours))
    unservable = []
    for u in r["unservable"]:
        utc, local = _hours(u["utc_hours"], labels)
        unservable.append(UnservableRow(Ref(link_href(u["link"]), _pretty(u["link"])), utc, local,
                                        pct_text(u.get("best_good_days_pct")), str(u["message"])))
    changes, left_note = _changes(r, labels, target)
    offset = f"UTC{r['net'].get('utc_offset', '')} ({r['net'].get('timezone', '')})"
    dates = [str(c["date"]) for c in data["net"].get("clock_changes") or []]
    clock = (f"Local times on this page are at {offset}. The clocks change on {', '.join(dates)}: on the other side "
             f"of the change, go by the UTC times." if dates else "")
    solver, optimal, objective = _solver(r)
    excl = tuple(Fact(f"{khz(e['khz'][0])}–{khz(e['khz'][1])} kHz", f"{e['why']} ({e['source']})")
                 for e in r["candidates"].get("builtin_exclusions") or [])
    return RequestsPage(
        frame=frame, summary=str(r["summary"]), mode=str(r["mode"]["id"]).upper(), offset=offset, clock=clock,
        target=target, proposals=tuple(proposals), changes=changes,
        left_out_note=left_note, merges=tuple(str(m["message"]) for m in r.get("merges") or []),
        left_out=_grouped(r.get("left_out") or [], labels, link_href), unservable=tuple(unservable),
        solver=solver, optimal=optimal, objective=objective, basis=_basis(r),
        assumptions=tuple(str(a) for a in r.get("assumptions") or []), exclusions=excl, sheet=sheet)
