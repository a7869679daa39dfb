"""plan_requests: from a plan and its predictions to the frequency request, as JSON-ready data.

Steps, each in its own module:

1. the gaps of the plan as (link, hour) pairs, exactly as compile finds them
   (:mod:`.coverage`), and the pairs no authorised assigned channel serves;
2. the candidate grid (:mod:`.candidates`), every candidate predicted for
   every link with a gap (:mod:`.physics`, the one swap point);
3. the integer programme (:mod:`.optimise`): the fewest frequencies serving
   every pair any candidate can serve, or with ``max_new`` the N serving the
   most;
4. a window and a preferred centre for each proposal, and merges
   (:mod:`.windows`); reasons for the pairs nothing serves (:mod:`.reasons`);
5. what the plan's gaps become with the proposals added, predicted again on
   every link (the same physics), so ``after`` counts what compile will.

A pure function of its inputs: no files, no clock.
"""

from __future__ import annotations

import dataclasses
import time

import numpy as np
from scipy import sparse

from planpack import localtime, schedule
from planpack.briefing import pct as whole_pct
from planpack.plan.models import Plan, Request
from planpack.predictions import predict_links
from planpack.requests import candidates, coverage, optimise, physics, reasons, report, windows
from planpack.revision import plan_revision

FORMAT = 1


def effective_request(plan: Plan, *, bands_khz=None, exclude_khz=None, mode: str | None = None,
                      step_khz: float | None = None) -> Request:
    """The plan's request section with command-line overrides applied.

    Raises
    ------
    candidates.GridError
        For a mode the plan does not know (bands, exclusions and step are checked when the grid is built).
    """
    r = plan.request
    new = Request(
        bands_khz=r.bands_khz if bands_khz is None else tuple((float(a), float(b)) for a, b in bands_khz),
        exclude_khz=r.exclude_khz if exclude_khz is None else tuple(candidates.as_segment(e) for e in exclude_khz),
        mode=r.mode if mode is None else mode,
        step_khz=r.step_khz if step_khz is None else float(step_khz))
    m = new.mode_for(plan)
    if m not in plan.modes:
        raise candidates.GridError("request.mode", f"mode '{m}' is neither built in nor declared under modes "
                                                   f"(known: {', '.join(sorted(plan.modes))})")
    return new


def _link_id(a: str, b: str) -> str:
    return f"{a}--{b}"  # as plan.json names links


def _r(x, nd=3):
    return None if x is None or not np.isfinite(x) else round(float(x), nd) + 0.0


def _fraction(key: str, x) -> dict:
    """``{key: fraction [0-1], key_pct: whole percent}``: the percent from the stored fraction, rounded down
    as every page and card rounds it, so renderers print it and compute nothing."""
    f = _r(x)
    return {key: f, f"{key}_pct": whole_pct(f)}


class _Clock:
    def __init__(self, timings: dict | None):
        self.timings = timings
        self.t = time.perf_counter()

    def lap(self, name: str) -> None:
        now = time.perf_counter()
        if self.timings is not None:
            self.timings[name] = self.timings.get(name, 0.0) + now - self.t
        self.t = now


def plan_requests(plan: Plan, setup, pred=None, *, max_new: int | None = None, bands_khz=None, exclude_khz=None,
                  mode: str | None = None, step_khz: float | None = None, workers: int | None = None,
                  time_limit: float = optimise.TIME_LIMIT_S, progress=None, timings: dict | None = None) -> dict:
    """The frequency request of a plan: proposals, windows, before and after, what no frequency serves.

    Parameters
    ----------
    plan : Plan
    setup : StationAntennas
        The plan's solved antennas (:func:`planpack.stationsetup.solve_station_antennas`).
    pred : LinkPredictions, optional
        The plan's predictions (computed when not given).
    max_new : int, optional
        At most this many proposals: the N that serve the most pairs.
    bands_khz, exclude_khz, mode, step_khz : optional
        Override the plan's ``request:`` section (bands and exclusions [kHz], step [kHz]).
    workers : int, optional
        Processes for the candidate predictions (default: by the size of the job).
    time_limit : float
        Seconds for all the solver's work; what it could not prove by then is reported as not optimal.
    progress : callable(str), optional
        Told what is being done.
    timings : dict, optional
        Filled with the seconds each stage took (for benchmarks; never in the result).

    Returns
    -------
    dict
        JSON-ready; see :mod:`planpack.requests.contract` for every key.

    Raises
    ------
    candidates.GridError
        When the request's bands, exclusions, step or mode leave nothing to ask for.
    """
    say = progress or (lambda text: None)
    clock = _Clock(timings)
    req = effective_request(plan, bands_khz=bands_khz, exclude_khz=exclude_khz, mode=mode, step_khz=step_khz)
    plan = dataclasses.replace(plan, request=req)
    grid = candidates.candidate_grid(req.bands_khz, req.exclude_khz, req.step_khz, [c.khz for c in plan.channels])
    if pred is None:
        say("predicting the assigned channels")
        pred = predict_links(plan, setup)
    clock.lap("predict assigned channels")
    target = float(plan.net.target_good_days)
    allowed = coverage.allowed_hours(plan)
    gp = coverage.gap_pairs(pred.good_days, allowed, pred.luf_mhz, pred.owf_mhz, target, pred.margin_db)
    net = plan.net
    offset = localtime.utc_offset_min(net.timezone, localtime.reference_day(net.valid_from, net.valid_to))
    labels = localtime.local_labels(offset)
    mode_id = req.mode_for(plan)
    out = _skeleton(plan, pred, grid, mode_id, labels, offset)
    out["before"] = {"gap_hours": gp.gap_hours, "unserved_pairs": int(len(gp.need)), "utc_hours": list(gp.hours)}
    clock.lap("gaps")
    if gp.gap_hours == 0:
        out["after"] = {"gap_hours": 0, "unserved_pairs": 0, "left_out_pairs": 0, "utc_hours": []}
        out["summary"] = "The plan has no gaps: every hour has a channel that serves the whole net; nothing to ask for."
        return out

    say(f"predicting {grid.size} candidate frequencies on the links with gaps")
    cov = coverage.coverage(plan, setup, gp, grid.freqs_khz, workers=workers,
                            progress=lambda i, n: say(f"candidates: block {i} of {n}"))
    clock.lap("predict candidates")

    serves = cov.serves()
    servable = np.diff(serves.indptr) > 0
    problem, col_map = _problem(serves, servable, cov.closes, gp.in_gap)
    clock.lap("build problem")
    say("solving the integer programme")
    sol = optimise.fewest(problem, time_limit)
    mode_used = "fewest"
    if max_new is not None and len(sol.chosen) > max_new:
        sol = optimise.most(problem, max_new, time_limit)
        mode_used = "most"
    chosen = sorted(int(col_map[c]) for c in sol.chosen)
    clock.lap("solve")

    wins = windows.windows(serves, grid, chosen, cov.closes)
    merges = windows.merges(cov.value, grid, wins, target)
    clock.lap("windows")

    # after: the proposals at their centres, predicted on every link like assigned channels
    centres = np.array([grid.freqs_khz[w.index] for w in wins])
    say("checking the proposals on every link")
    g_new = physics.candidate_good_days(plan, setup, range(len(plan.links)), centres) if centres.size else \
        np.zeros((len(plan.links), 24, 0), np.float32)
    good_aug = np.concatenate([pred.good_days, g_new], axis=2)
    allowed_aug = np.concatenate([allowed, np.ones((24, centres.size), bool)], axis=1)
    margin_aug = np.concatenate([pred.margin_db, np.zeros_like(g_new)], axis=2)
    after = coverage.gap_pairs(good_aug, allowed_aug, pred.luf_mhz, pred.owf_mhz, target, margin_aug)
    need_served = (g_new[gp.need[:, 0], gp.need[:, 1], :] >= target).any(axis=1) if centres.size else \
        np.zeros(len(gp.need), bool)
    clock.lap("after")

    links = plan.links
    ids = [f"R{i + 1}" for i in range(len(wins))]
    out["proposals"] = []
    for pid, w in zip(ids, wins):
        rows = w.rows
        vals = serves[rows, :][:, [w.index]].toarray().ravel() if rows.size else np.zeros(0)
        out["proposals"].append({
            "id": pid, "khz": _r(grid.freqs_khz[w.index]),
            "window_khz": [_r(grid.freqs_khz[w.low]), _r(grid.freqs_khz[w.high])],
            "serves": _serves(gp.need[rows], links, labels),
            "pairs": int(rows.size),
            **_fraction("worst_good_days", vals.min() if vals.size else None),
            "net_channel_utc_hours": list(w.net_hours),
        })
    name = dict(enumerate(ids))
    out["merges"] = [{
        "proposals": [name[m.pair[0]], name[m.pair[1]]], "khz": _r(grid.freqs_khz[m.index]),
        "window_khz": [_r(grid.freqs_khz[m.low]), _r(grid.freqs_khz[m.high])], **_fraction("worst_good_days", m.worst),
        "message": _merge_message(name[m.pair[0]], name[m.pair[1]], m, grid, target),
    } for m in merges]

    unserv = np.flatnonzero(~servable)
    out["unservable"] = _unservable(gp.need[unserv], cov, unserv, pred, allowed, grid, target, labels, plan)
    left = np.flatnonzero(servable & ~need_served)
    out["left_out"] = _serves(gp.need[left], links, labels) if mode_used == "most" else []
    out["after"] = {"gap_hours": after.gap_hours, "unserved_pairs": int((~need_served).sum()),
                    "left_out_pairs": int(left.size) if mode_used == "most" else 0, "utc_hours": list(after.hours)}
    worst_after = [p["worst_good_days"] for p in out["proposals"] if p["worst_good_days"] is not None]
    out["solver"] = {
        **optimise.solver_info(time_limit), "mode": mode_used, "max_new": max_new,
        "status": ("nothing to solve: no candidate serves any pair" if problem.shape[0] == 0
                   else "optimal" if sol.optimal else "not proven optimal"), "optimal": bool(sol.optimal),
        "frequencies": len(chosen), "pairs_served": int(need_served[servable].sum()),
        "pairs_servable": int(servable.sum()),
        "net_channel_hours": len({h for w in wins for h in w.net_hours}), "net_channel_gap_pairs": int(sol.bonus_weight),
        "worst_good_days": sol.worst,
        "problem": {"pairs": int(len(gp.need)), "rows": int(problem.shape[0]), "columns": int(problem.shape[1]),
                    "candidates": grid.size, "net_hour_groups": len(problem.bonus)},
        "stages": [s.to_dict() for s in sol.stages],
        "objective": ("fewest frequencies serving every servable pair; then the most gap pairs in hours where one new "
                      "channel serves the whole net; then the best worst fraction of good days") if mode_used == "fewest"
                     else (f"the most pairs served by at most {max_new} frequencies; then the best worst fraction "
                           "of good days"),
        "worst_good_days_at_centres": min(worst_after) if worst_after else None,
    }
    out["summary"] = _summary(out, target)
    clock.lap("report")
    return out


def _problem(serves: sparse.csr_matrix, servable: np.ndarray, closes: dict, in_gap: np.ndarray):
    """The optimiser's problem: servable rows merged when identical, columns merged when identical.

    Returns the problem and, for each of its columns, the candidate it stands for.
    """
    q = optimise.quantised(serves[np.flatnonzero(servable)])
    q.sort_indices()
    keys: dict[tuple[bytes, bytes], int] = {}
    row_of = np.empty(q.shape[0], int)
    weight: list[int] = []
    for r in range(q.shape[0]):
        a, b = q.indptr[r], q.indptr[r + 1]
        key = (q.indices[a:b].tobytes(), q.data[a:b].tobytes())
        if key not in keys:
            keys[key] = len(weight)
            weight.append(0)
        row_of[r] = keys[key]
        weight[keys[key]] += 1
    first = np.zeros(len(weight), int)
    first[row_of[::-1]] = np.arange(q.shape[0])[::-1]
    qu = q[first].tocsc()
    qu.sort_indices()
    # columns: drop those serving nothing, merge identical ones (same rows, values and net hours)
    hour_w = {h: int(in_gap[:, h].sum()) for h in closes}
    member = {}
    for h, cols in closes.items():
        for c in cols.tolist():
            member.setdefault(c, []).append(h)
    col_keys: dict[tuple, int] = {}
    col_map: list[int] = []
    for c in range(qu.shape[1]):
        a, b = qu.indptr[c], qu.indptr[c + 1]
        if a == b:
            continue
        key = (qu.indices[a:b].tobytes(), qu.data[a:b].tobytes(), tuple(member.get(c, ())))
        if key not in col_keys:
            col_keys[key] = len(col_map)
            col_map.append(c)
    cols = np.asarray(col_map, int)
    value = (qu[:, cols].astype(np.float64) / optimise.RESOLUTION).tocsr()
    where = {c: i for i, c in enumerate(col_map)}
    bonus = tuple((hour_w[h], np.array(sorted(where[c] for c in closes[h].tolist() if c in where), int))
                  for h in sorted(closes))
    bonus = tuple((w, c) for w, c in bonus if c.size)
    return optimise.Problem(value, np.asarray(weight, int), bonus), cols


def _merge_message(a: str, b: str, m, grid, target: float) -> str:
    f, lo, hi = grid.freqs_khz[m.index], grid.freqs_khz[m.low], grid.freqs_khz[m.high]
    if lo == hi:
        return (f"{a} and {b} could be one frequency at {f:g} kHz, serving all their pairs on {report.pct(m.worst)} "
                f"of days instead of the {report.pct(target)} target.")
    return (f"{a} and {b} could be one frequency: anywhere in {lo:g}–{hi:g} kHz serves all their pairs on at least "
            f"{report.pct(target - windows.MERGE_SLACK)} of days (best {report.pct(m.worst)} at {f:g} kHz) instead of "
            f"the {report.pct(target)} target.")


def _serves(pairs: np.ndarray, links, labels) -> list[dict]:
    """[(link, hour)] -> [{link, utc_hours, local_hours}] in plan link order."""
    by: dict[int, list[int]] = {}
    for l, h in pairs:
        by.setdefault(int(l), []).append(int(h))
    return [{"link": _link_id(*links[l]), "utc_hours": sorted(hs), "local_hours": [labels[h] for h in sorted(hs)]}
            for l, hs in sorted(by.items())]


def _unservable(pairs, cov, rows, pred, allowed, grid, target, labels, plan) -> list[dict]:
    if not len(pairs):
        return []
    best = cov.best[rows]
    codes = reasons.classify(pairs, pred.good_days, allowed, pred.muf_mhz, pred.luf_mhz, grid.freqs_khz, best, target)
    groups: dict[tuple[int, str], list[int]] = {}
    for i, ((l, h), code) in enumerate(zip(pairs, codes)):
        groups.setdefault((int(l), code), []).append(i)
    out = []
    for (l, code), members in sorted(groups.items(), key=lambda kv: (kv[0][0], reasons.ORDER.index(kv[0][1]))):
        hs = [int(pairs[i][1]) for i in members]
        muf = pred.muf_mhz[l, hs]
        luf = pred.luf_mhz[l, hs]
        chans = sorted({plan.channels[c].id for h in hs for c in np.flatnonzero((pred.good_days[l, h] >= target) & ~allowed[h])})
        b = int(np.argmax(best[members]))
        msg = reasons.explain(code, muf=(float(np.min(muf)), float(np.max(muf))),
                              luf=None if np.isnan(luf).any() else (float(np.min(luf)), float(np.max(luf))),
                              best=float(best[members][b]), best_khz=float(grid.freqs_khz[cov.best_index[rows][members][b]]),
                              target=target, lowest_khz=float(grid.freqs_khz[0]), channels=chans)
        order = np.argsort(hs)
        out.append({"link": _link_id(*plan.links[l]), "utc_hours": [hs[i] for i in order],
                    "local_hours": [labels[hs[i]] for i in order], "reason": code, "message": msg,
                    **_fraction("best_good_days", best[members][b])})
    return out


def _skeleton(plan: Plan, pred, grid, mode_id: str, labels, offset: int) -> dict:
    net = plan.net
    m = plan.modes[mode_id]
    sign = "+" if offset >= 0 else "-"
    return {
        "planpack_request": FORMAT,
        "net": {"id": net.id, "title": net.title, "handling": net.handling, "timezone": net.timezone,
                "utc_offset": f"{sign}{abs(offset) // 60:02d}:{abs(offset) % 60:02d}"},
        "revision": plan_revision(plan.source, plan.sha256).to_dict(),
        "target_good_days": float(net.target_good_days),
        "target_good_days_pct": whole_pct(float(net.target_good_days)),
        "mode": {"id": mode_id, "snr_db": m.snr_db, "bandwidth_hz": m.bandwidth_hz},
        "scenarios": pred.assumptions.get("scenarios", []),
        "candidates": grid.describe(),
        "channels": [{"id": c.id, "khz": c.khz} for c in plan.channels],
        "proposals": [], "merges": [], "unservable": [], "left_out": [],
        "solver": {**optimise.solver_info(), "mode": None, "status": "not run: no gaps", "optimal": True,
                   "frequencies": 0, "stages": []},
        "assumptions": [
            "a candidate serves a (link, hour) pair when its fraction of good days reaches the plan's target there, "
            "worst case over the months and solar levels listed and over both directions of the link, as for "
            "assigned channels",
            "a pair needs a new frequency when it lies in one of the plan's gaps and no authorised assigned channel "
            "reaches the target on that link then; gap_hours counts the (link, hour) pairs the plan's gaps name, as "
            "plan.json's gaps do",
            "new channels are authorised at every hour",
            "each station's antennas at each candidate: from its antennas solved across the band (feed-point "
            "impedance and pattern interpolated between the solved frequencies, matching and feedline losses at "
            "the candidate itself)",
            "fractions of good days are compared in thousandths for the tie-break",
        ],
        "local_time_labels": list(labels),
    }


def _summary(out: dict, target: float) -> str:
    n = len(out["proposals"])
    b, a = out["before"], out["after"]
    never = sum(len(u["utc_hours"]) for u in out["unservable"])
    head = f"Ask for {n} new frequenc{'y' if n == 1 else 'ies'}" if n else "No new frequency would serve any pair"
    text = (f"{head}: the plan's gaps go from {b['gap_hours']} to {a['gap_hours']} (link, hour) pairs, and the pairs "
            f"without any channel reaching {report.pct(target)} of days from {b['unserved_pairs']} to "
            f"{a['unserved_pairs']}.")
    if never:
        text += f" {never} pair{'s' if never != 1 else ''} cannot be served by any frequency (the reasons are listed)."
    if not out["solver"]["optimal"]:
        text += " The solver did not prove this optimal within its time limit."
    return text
