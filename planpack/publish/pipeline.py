"""Compile plans for the publishing commands, and render them: only what changed since the last publish.

``build``, ``cards`` and ``serve`` compile through :func:`compile_results` (the
compile cache answers plans whose bytes did not change). Rendering goes unit
by unit, the cards of each net, its frequency request sheet (when the plan
has gaps) and then the site: a unit whose inputs, renderer
and options are unchanged is taken from the previous publish into the same
folder, checked file by file against the hashes recorded when it was written
(:mod:`planpack.workflow.reuse`); anything else is rendered afresh. Nothing is
written here; :func:`planpack.publish.output.publish` writes the result.
"""

from __future__ import annotations

import importlib
import re
from dataclasses import dataclass, field
from typing import Callable

from planpack.errors import UsageError

CARD_NAME = re.compile(r"[A-Za-z0-9][A-Za-z0-9_.-]{0,99}\.pdf")

Step = Callable[[int, int, str], None]


class CardsRefused(Exception):
    """The card renderer cannot lay out a net's cards; ``result`` is the plan's ReadResult."""

    def __init__(self, result, message: str) -> None:
        super().__init__(message)
        self.result = result
        self.message = message

    def diagnostic(self):
        """The refusal as a diagnostic at the plan's card size (or its net section)."""
        from planpack.plan.diagnostics import Diagnostic

        plan = self.result.plan
        key = "net.card_size" if "net.card_size" in plan.positions else "net"
        line, col = plan.where(key)
        return Diagnostic(plan.source, line, col, "error", "cards-layout", key, f"{key}: {self.message}")


@dataclass
class Rendered:
    """What a publishing run will write: ``files`` {relative path: bytes} and how each unit was obtained."""

    files: dict[str, bytes] = field(default_factory=dict)
    card_names: dict[str, list[str]] = field(default_factory=dict)  # net id -> card file names
    sheet_names: dict[str, str] = field(default_factory=dict)  # net id -> request sheet beside its pages
    notes: dict[str, list[str]] = field(default_factory=dict)  # net id -> card warnings (glyphs the font lacks)
    rendered: list[str] = field(default_factory=list)  # units rendered in this run
    reused: list[str] = field(default_factory=list)  # units taken from the previous publish
    reuse: object = None  # the Reuse record; save() it after the publish succeeded


def compile_results(results, *, use_cache: bool, step: Step | None = None) -> list[tuple]:
    """Compile every plan read without errors; ``[(ReadResult, compiled plan)]`` in the order given.

    Two plans with one net id are a UsageError (each net has its own folder), found before anything is compiled.
    """
    from planpack.workflow.cache import cached_compile

    seen: dict[str, str] = {}
    for r in results:
        nid = r.plan.net.id
        if nid in seen:
            raise UsageError(f"{r.plan.source} and {seen[nid]} both define net '{nid}'; each net needs its own id")
        seen[nid] = r.plan.source
    pairs = []
    for i, r in enumerate(results, 1):
        if step:
            step(i, len(results), f"compiling {r.plan.net.id}")
        pairs.append((r, cached_compile(r.plan, enabled=use_cache)))
    return pairs


def _cards_module():
    return importlib.import_module("planpack.publish.cards")  # through sys.modules, so tests can stand in for it


def _render_cards(r, data: dict, **options) -> dict[str, bytes]:
    cards = _cards_module()
    refusals = tuple(getattr(cards, n) for n in ("CardLayoutError", "CardSizeError") if hasattr(cards, n))
    try:
        pdfs = cards.render_cards(data, **options)
    except refusals as exc:
        raise CardsRefused(r, str(exc)) from None
    for name in pdfs:
        if not CARD_NAME.fullmatch(name) or ".." in name:
            raise ValueError(f"card renderer returned an unsafe file name {name!r}")
    return pdfs


MAX_LAID_OUT = 100  # nets of up to this many stations have every card laid out by ``check``
SAMPLE = 40  # stations of the sub-net laid out for a larger net


def _sample_stations(data: dict, limit: int = SAMPLE) -> set[str]:
    """The stations whose cards are likely widest or tallest: the control station, those with the most
    links, the longest name, id and address, the most antennas, and one for each set of antennas in use."""
    stations = data["stations"]
    links: dict[str, int] = {}
    for ln in data["links"]:
        for end in (ln["from"], ln["to"]):
            links[end] = links.get(end, 0) + 1
    pick = {s["id"] for s in stations if s["role"] == "control"}
    for measure in (lambda s: links.get(s["id"], 0), lambda s: len(s["name"]), lambda s: len(s["id"]),
                    lambda s: len(s["address"]), lambda s: len(s["antennas"]), lambda s: sum(map(len, s["antennas"]))):
        pick.add(max(stations, key=measure)["id"])
    seen: set[tuple] = set()
    for s in stations:
        if len(pick) >= limit:
            break
        if tuple(s["antennas"]) not in seen:
            seen.add(tuple(s["antennas"]))
            pick.add(s["id"])
    return pick


def _sub_net(data: dict, keep: set[str]) -> dict:
    """``data`` cut down to the stations in ``keep`` and what refers to them (a consistent plan.json)."""
    links = [ln for ln in data["links"] if ln["from"] in keep and ln["to"] in keep]
    ids = {ln["id"] for ln in links}
    gaps = [{**g, "links": [x for x in g["links"] if x in ids]} for g in data["gaps"]]
    hours = [{**h, "weakest_link": h.get("weakest_link") if h.get("weakest_link") in ids else None}
             for h in data["net_schedule"]["hours"]]
    antennas = [{**a, "stations": [x for x in a["stations"] if x in keep],
                 "exposure": [e for e in a.get("exposure", []) if e["station"] in keep]} for a in data["antennas"]]
    return {**data, "stations": [s for s in data["stations"] if s["id"] in keep], "links": links,
            "gaps": [g for g in gaps if g["links"]], "net_schedule": {**data["net_schedule"], "hours": hours},
            "scan_lists": [x for x in data["scan_lists"] if x["station"] in keep], "antennas": antennas}


def card_problems(result, data: dict, size: str | None = None) -> list:
    """What ``build`` would refuse about the field cards of a compiled plan, as positioned diagnostics.

    Lays the cards out without drawing them: every card of a net of up to
    MAX_LAID_OUT stations; of a larger net (whose full layout takes minutes),
    the cards of a sub-net of the stations most likely not to fit (:func:`_sample_stations`).
    """
    cards = _cards_module()
    refusals = tuple(getattr(cards, n) for n in ("CardLayoutError", "CardSizeError") if hasattr(cards, n))
    layout = getattr(cards, "card_deck", None)
    sample = data if len(data["stations"]) <= MAX_LAID_OUT else _sub_net(data, _sample_stations(data))
    try:
        if layout is not None:
            layout(sample, size)
        else:
            cards.render_cards(sample, size=size)
    except refusals as exc:
        return [CardsRefused(result, str(exc)).diagnostic()]
    return []


def _start(out, use_cache: bool):
    from planpack.publish import output
    from planpack.workflow.reuse import Reuse, renderer_key

    reuse = Reuse(out, enabled=use_cache)
    return reuse, (renderer_key() if use_cache else ""), (lambda paths: output.read_previous(out, paths))


def _render_sheet(data: dict) -> bytes:
    from planpack.publish.requestsheet import render_request_sheet

    return render_request_sheet(data["requests"])


def render_build(pairs, *, out, with_cards: bool = True, use_cache: bool = True,
                 step: Step | None = None) -> Rendered:
    """The site, the request sheet of every net with gaps and (``with_cards``) the field cards, as files under ``out``.

    The request sheet (``<net>/request.pdf``, one page) is its own unit, keyed on plan.json's ``requests``
    alone; it is no field card, so ``with_cards=False`` keeps it (the Requests page links it).
    Raises CardsRefused when a net's cards cannot be laid out.
    """
    reuse, renderer, read = _start(out, use_cache)
    from planpack.workflow.reuse import unit_key

    result = Rendered(reuse=reuse)
    n = len(pairs)
    site = None
    for i, (r, c) in enumerate(pairs, 1):
        nid = c.data["net"]["id"]
        if c.data.get("requests"):
            _take_sheet(result, c.data, reuse, renderer, read, use_cache)
        if not with_cards:
            continue
        unit = f"cards:{nid}"
        key = unit_key("build-cards", {"data": c.data}, renderer) if use_cache else ""
        got = reuse.take(unit, key, read)
        if got is None:
            if step:
                step(i, n, f"cards for {nid}")
            if site is None:
                from planpack.publish import site
            pdfs = _render_cards(r, c.data)
            got = {f"{site.safe_name(nid)}/cards/{name}": data for name, data in pdfs.items()}
            result.rendered.append(unit)
        else:
            result.reused.append(unit)
        reuse.note(unit, key, got)
        result.files.update(got)
        result.card_names[nid] = sorted(p.rsplit("/", 1)[1] for p in got)
    # reading warnings are not in plan.json; the analysis ones usually are (shown once)
    warnings = {c.data["net"]["id"]: [d.to_dict() for d in list(r.diagnostics) + list(c.diagnostics)] for r, c in pairs}
    nets = [c.data for _, c in pairs]
    key = unit_key("site", {"nets": nets, "warnings": warnings, "cards": result.card_names,
                            "sheets": result.sheet_names}, renderer) if use_cache else ""
    got = reuse.take("site", key, read)
    if got is None:
        if step:
            step(n, n, "rendering the site")
        from planpack.publish import site

        got = site.render_site(nets, warnings=warnings, cards=result.card_names, sheets=result.sheet_names)
        result.rendered.append("site")
    else:
        result.reused.append("site")
    clash = set(got) & set(result.files)
    if clash:
        raise ValueError(f"the site and the cards both write {sorted(clash)[0]}")
    reuse.note("site", key, got)
    result.files.update(got)
    result.files = dict(sorted(result.files.items()))
    return result


def _take_sheet(result: Rendered, data: dict, reuse, renderer: str, read, use_cache: bool) -> None:
    """The net's one-page request sheet: reused when plan.json's request and the renderer are unchanged."""
    from planpack.publish import requestpage, site
    from planpack.workflow.reuse import unit_key

    nid = data["net"]["id"]
    unit = f"request:{nid}"
    key = unit_key("build-request", {"requests": data["requests"]}, renderer) if use_cache else ""
    got = reuse.take(unit, key, read)
    if got is None:
        got = {f"{site.safe_name(nid)}/{requestpage.SHEET_NAME}": _render_sheet(data)}
        result.rendered.append(unit)
    else:
        result.reused.append(unit)
    reuse.note(unit, key, got)
    result.files.update(got)
    result.sheet_names[nid] = requestpage.SHEET_NAME


def render_card_files(pairs, *, out, size: str | None = None, impose: str | None = None,
                      use_cache: bool = True) -> Rendered:
    """Only the field cards: ``<file>.pdf`` in ``out``, or ``<net-id>/<file>.pdf`` with several nets.

    ``notes`` holds, per net, the plan text the card font cannot print. Raises CardsRefused.
    """
    reuse, renderer, read = _start(out, use_cache)
    from planpack.workflow.reuse import unit_key

    result = Rendered(reuse=reuse)
    for r, c in pairs:
        nid = c.data["net"]["id"]
        prefix = f"{nid}/" if len(pairs) > 1 else ""
        unit = f"cards:{nid}"
        key = unit_key("cards", {"data": c.data, "size": size, "impose": impose, "prefix": prefix},
                       renderer) if use_cache else ""
        got = reuse.take(unit, key, read)
        if got is None:
            pdfs = _render_cards(r, c.data, size=size, impose=impose)
            got = {prefix + name: data for name, data in pdfs.items()}
            notes = list(_cards_module().text_warnings(c.data))
            result.rendered.append(unit)
        else:
            notes = reuse.notes_of(unit)
            result.reused.append(unit)
        reuse.note(unit, key, got, notes)
        result.notes[nid] = notes
        result.files.update(got)
        result.card_names[nid] = sorted(p.rsplit("/", 1)[-1] for p in got)
    result.files = dict(sorted(result.files.items()))
    return result
