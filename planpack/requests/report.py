"""The request as text (a terminal) or Markdown (a memo, a merge request), from its JSON-ready data alone."""

from __future__ import annotations

import math

from planpack.briefing import pct as whole_pct
from planpack.scheduling.hours import format_hours


def pct(x: float | None, near: float | None = None) -> str:
    """A fraction of days as a percentage, rounded down as every page and card rounds it (``briefing.pct``).

    One decimal (also rounded down) where a fraction below ``near`` would read as the same whole percent,
    so that a figure short of the target never prints as if it met it.
    """
    if x is None:
        return "-"
    whole = whole_pct(x)
    if near is not None and whole == whole_pct(near) and x < near - 0.0005:
        return f"{math.floor(round(x, 4) * 1000 + 1e-6) / 10:.1f} %"
    return f"{whole} %"


def khz(x: float) -> str:
    return f"{x:g} kHz"


def window(w: list[float]) -> str:
    """'4025-4050 kHz', or '3400 kHz only' for a window of one candidate."""
    return f"{khz(w[0])} only" if w[0] == w[1] else f"{w[0]:g}–{w[1]:g} kHz"


def _pretty(link: str) -> str:
    return link.replace("--", "–")


def grouped(serves: list[dict], labels: list[str]) -> list[str]:
    """'a–b, a–c 22:00–01:00 UTC (23:00–02:00 local)' lines: links with the same hours together."""
    by: dict[tuple[int, ...], list[str]] = {}
    for s in serves:
        by.setdefault(tuple(s["utc_hours"]), []).append(_pretty(s["link"]))
    out = []
    for hours, links in sorted(by.items(), key=lambda kv: (kv[0][0], kv[0])):
        out.append(f"{', '.join(links)} {format_hours(hours)} UTC ({format_hours(hours, labels)} local)")
    return out


def _scenario(d: dict) -> str:
    months = sorted({s["month"] for s in d["scenarios"]})
    ssn = sorted({s["ssn"] for s in d["scenarios"]})
    return f"{', '.join(months)} at R12 {' and '.join(f'{v:g}' for v in ssn)}" if months else "no months"


def header_lines(d: dict) -> list[str]:
    net, c, m = d["net"], d["candidates"], d["mode"]
    t = d["target_good_days"]
    lines = [f"Frequency request for {net['id']}: {net['title']}",
             f"Plan revision {d['revision']['id']}" + (f"; handling: {net['handling']}" if net.get("handling") else ""),
             f"Target: each link works on at least {pct(t)} of days, worst case over {_scenario(d)} and both directions.",
             f"New channels: {m['id']} ({m['snr_db']:g} dB SNR in {m['bandwidth_hz']:g} Hz); candidates every "
             f"{c['step_khz']:g} kHz in {', '.join(f'{lo:g}-{hi:g}' for lo, hi in c['bands_khz'])} kHz: {c['count']} "
             f"frequencies, leaving out {len(c['builtin_exclusions'])} distress, safety and time-signal segments "
             f"(ITU RR Appendix 15 and Article 5, {c['distress_guard_khz']:g} kHz guard)"
             + (f" and {len(c['exclude_khz'])} excluded by the plan" if c["exclude_khz"] else "") + "."]
    return lines


def before_after(d: dict, which: str) -> str:
    x = d[which]
    t = d["target_good_days"]
    s = (f"{x['gap_hours']} (link, hour) pair{'s' * (x['gap_hours'] != 1)} in the plan's gaps; "
         f"{x['unserved_pairs']} with no channel reaching {pct(t)} of days")
    if which == "after" and x.get("left_out_pairs"):
        s += f" ({x['left_out_pairs']} of them servable but left out by --max)"
    return s + "."


def text(d: dict) -> str:
    """The request for a terminal."""
    labels = d["local_time_labels"]
    t = d["target_good_days"]
    out = header_lines(d) + [""]
    if not d["before"]["gap_hours"]:
        return "\n".join(out + [d["summary"]]) + "\n"
    out.append("Before: " + before_after(d, "before"))
    n = len(d["proposals"])
    if n:
        out += ["", f"Ask for {n} new {d['mode']['id']} channel{'s' * (n != 1)}:"]
        for p in d["proposals"]:
            out.append(f"  {p['id']}  {khz(p['khz'])}  (window {window(p['window_khz'])}): serves "
                       f"{p['pairs']} pair{'s' * (p['pairs'] != 1)}, worst {pct(p['worst_good_days'], t)} of days")
            out += [f"      {line}" for line in grouped(p["serves"], labels)]
            if p["net_channel_utc_hours"]:
                h = p["net_channel_utc_hours"]
                out.append(f"      and the whole net's channel at {format_hours(h)} UTC ({format_hours(h, labels)} local)")
    else:
        out += ["", "No new frequency would serve any of these pairs."]
    out += ["", "After: " + before_after(d, "after")]
    if d["merges"]:
        out += ["", "Merging:"] + [f"  {m['message']}" for m in d["merges"]]
    if d["left_out"]:
        out += ["", "Left out by --max (servable, not served):"] + [f"  {line}" for line in grouped(d["left_out"], labels)]
    if d["unservable"]:
        out += ["", "No frequency can serve:"]
        for u in d["unservable"]:
            out.append(f"  {_pretty(u['link'])} {format_hours(u['utc_hours'])} UTC "
                       f"({format_hours(u['utc_hours'], labels)} local): {u['message']}")
    out += ["", solver_line(d), "", "Assumptions:"] + [f"  - {a}" for a in d.get("assumptions", [])]
    return "\n".join(out) + "\n"


def solver_line(d: dict) -> str:
    s = d["solver"]
    p = s.get("problem", {})
    if not s["stages"]:
        return f"Solver: {s['name']} through {s['interface']} (scipy {s['scipy']}): {s['status']}."
    return (f"Solver: {s['name']} through {s['interface']} (scipy {s['scipy']}), {s['status']}: "
            f"{s['frequencies']} frequenc{'y' if s['frequencies'] == 1 else 'ies'}; {s.get('objective', '')}; "
            f"{len(s['stages'])} solve{'s' * (len(s['stages']) != 1)} over {p.get('rows', 0)} distinct pair groups "
            f"x {p.get('columns', 0)} distinct candidates.")


def _md(text: str) -> str:
    """Escape what Markdown would read as markup in plan-written text."""
    for ch in "\\`*_[]<>|#":
        text = text.replace(ch, "\\" + ch)
    return text


def markdown(d: dict) -> str:
    """The request as Markdown, for a memo or a merge request."""
    labels = d["local_time_labels"]
    t = d["target_good_days"]
    net = d["net"]
    head = header_lines(d)
    out = [f"## Frequency request: {_md(net['title'])}", "",
           f"Net `{net['id']}`, plan revision `{d['revision']['id']}`"
           + (f", handling **{_md(net['handling'])}**" if net.get("handling") else "") + ".", "",
           _md(head[2]), "", _md(head[3]), ""]
    if not d["before"]["gap_hours"]:
        return "\n".join(out + [d["summary"]]) + "\n"
    out += [f"**Before:** {before_after(d, 'before')}", ""]
    if d["proposals"]:
        out += [f"### Ask for {len(d['proposals'])} new {d['mode']['id']} channel{'s' * (len(d['proposals']) != 1)}", "",
                "| | frequency | window | worst hour | serves (UTC, local) |",
                "|---|---:|---|---:|---|"]
        for p in d["proposals"]:
            serves = grouped(p["serves"], labels)
            if p["net_channel_utc_hours"]:
                h = p["net_channel_utc_hours"]
                serves.append(f"whole net {format_hours(h)} UTC ({format_hours(h, labels)} local)")
            out.append(f"| {p['id']} | {khz(p['khz'])} | {window(p['window_khz'])} | {pct(p['worst_good_days'], t)} | "
                       f"{'<br>'.join(_md(s) for s in serves)} |")
        out.append("")
    else:
        out += ["No new frequency would serve any of these pairs.", ""]
    out += [f"**After:** {before_after(d, 'after')}", ""]
    if d["merges"]:
        out += ["### Merging", ""] + [f"- {m['message']}" for m in d["merges"]] + [""]
    if d["left_out"]:
        out += ["### Left out by --max", ""] + [f"- {_md(line)}" for line in grouped(d["left_out"], labels)] + [""]
    if d["unservable"]:
        out += ["### No frequency can serve", ""]
        for u in d["unservable"]:
            out.append(f"- {_md(_pretty(u['link']))} {format_hours(u['utc_hours'])} UTC "
                       f"({format_hours(u['utc_hours'], labels)} local): {_md(u['message'])}")
        out.append("")
    out += [f"<sub>{_md(solver_line(d))}</sub>", "", "<details><summary>Assumptions</summary>", ""]
    out += [f"- {_md(a)}" for a in d.get("assumptions", [])] + ["", "</details>", ""]
    return "\n".join(out)
