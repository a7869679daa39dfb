"""Tests for planpack.schedule: choices, the net schedule, gaps, scan lists.

The arrays are small and hand-built so that the right answer is obvious; the
net schedule is also checked against an independent brute-force dynamic
programme written plainly below.
"""

from __future__ import annotations

import itertools
import json
import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from hypothesis.extra import numpy as hnp

from planpack.schedule import (DEFAULT_CHANGE_PENALTY, NOT_AUTHORISED, REDUNDANT_WORD_S, SPLIT,
                               UNSERVED, ScheduleInputError, address_words, cyclic_runs,
                               find_gaps, format_hours, frequency_window, hour_runs,
                               link_choices, net_channel_order, net_schedule, rank_channels,
                               scan_lists, scanning_call_time)

H = 24
DAY = (np.arange(H) >= 6) & (np.arange(H) < 18)   # UTC hours 06–17


def cube(n, c, value=0.0):
    return np.full((n, H, c), float(value))


def everywhere(c):
    return np.ones((H, c), dtype=bool)


# --------------------------------------------------------------------------
# Per-link first and second choice
# --------------------------------------------------------------------------

def test_first_is_most_good_days_second_is_next():
    good = cube(1, 3)
    good[0, :, :] = [0.5, 0.9, 0.7]
    ch = link_choices(good, cube(1, 3), everywhere(3))
    assert ch.first[0] == (1,) * H
    assert ch.second[0] == (2,) * H


def test_equal_good_days_go_to_larger_margin_then_plan_order():
    good = cube(1, 3, 0.8)
    margin = cube(1, 3)
    margin[0, :, :] = [3.0, 5.0, 5.0]
    ch = link_choices(good, margin, everywhere(3))
    assert ch.first[0][0] == 1 and ch.second[0][0] == 2      # margin, then plan order
    margin[0, :, :] = [5.0, 5.0, 5.0]
    ch = link_choices(good, margin, everywhere(3))
    assert (ch.first[0][0], ch.second[0][0]) == (0, 1)       # all equal: plan order


def test_margin_rounding_noise_does_not_beat_plan_order():
    good = cube(1, 2, 0.8)
    margin = cube(1, 2, 4.0)
    margin[0, :, 1] += 1e-12
    assert link_choices(good, margin, everywhere(2)).first[0][0] == 0


def test_disallowed_or_dead_channel_is_never_a_choice():
    good = cube(1, 3)
    good[0, :, :] = [0.99, 0.0, 0.6]
    allowed = everywhere(3)
    allowed[DAY, 0] = False                                  # ch 0 authorised at night only
    ch = link_choices(good, cube(1, 3), allowed)
    for h in range(H):
        if DAY[h]:
            assert ch.first[0][h] == 2 and ch.second[0][h] is None
        else:
            assert ch.first[0][h] == 0 and ch.second[0][h] == 2
    order = rank_channels(good, cube(1, 3), allowed)
    assert order[0, 12].tolist() == [2, -1, -1]


def test_link_choices_to_dict_is_json():
    ch = link_choices(cube(2, 1, 0.5), cube(2, 1), everywhere(1))
    d = json.loads(json.dumps(ch.to_dict()))
    assert d["first"] == [[0] * H, [0] * H] and d["second"] == [[None] * H, [None] * H]


@pytest.mark.parametrize("bad, words", [
    (np.zeros((1, 23, 2)), "good_days: expected an array of shape (links, 24, channels)"),
    (np.full((1, 24, 2), 1.5), "good_days: expected fractions in [0, 1]; got 1.5"),
    (np.full((1, 24, 2), np.nan), "good_days: expected numbers, no NaN; got NaN at index"),
])
def test_bad_good_days_says_which_and_why(bad, words):
    with pytest.raises(ScheduleInputError) as err:
        link_choices(bad, np.zeros_like(bad), everywhere(bad.shape[2]))
    assert words in str(err.value)


def test_bad_allowed_shape_says_which_and_why():
    with pytest.raises(ScheduleInputError, match=r"allowed: expected a bool array of shape "
                                                 r"\(24, 2\); got shape \(24, 3\)"):
        link_choices(cube(1, 2), cube(1, 2), everywhere(3))


# --------------------------------------------------------------------------
# Net schedule
# --------------------------------------------------------------------------

def test_net_channel_is_the_one_whose_weakest_link_is_strongest():
    good = cube(2, 2)
    good[0, :, :] = [1.0, 0.8]    # ch 0: strong on link 0 ...
    good[1, :, :] = [0.5, 0.8]    # ... but weak on link 1; ch 1 is 0.8 on both
    s = net_schedule(good, cube(2, 2), everywhere(2))
    assert s.first == (1,) * H and s.second == (0,) * H
    assert s.weakest_good_days == (0.8,) * H
    assert s.changes_per_day == 0


def _day_night(gain=0.3):
    """Ch 0 is the night channel, ch 1 the day channel, by a clear margin."""
    good = cube(2, 2, 0.6)
    good[:, ~DAY, 0] = 0.6 + gain
    good[:, DAY, 1] = 0.6 + gain
    return good


def test_day_night_schedule_changes_twice_counting_the_wrap():
    s = net_schedule(_day_night(), cube(2, 2), everywhere(2))
    assert s.first == tuple(1 if d else 0 for d in DAY)
    assert s.changes_per_day == 2        # 06:00 to day channel, 18:00 back


def test_changes_per_day_counts_midnight_only_when_cyclic():
    good = cube(1, 2, 0.5)
    good[0, :12, 0] = 0.95
    good[0, 12:, 1] = 0.95
    assert net_schedule(good, cube(1, 2), everywhere(2)).changes_per_day == 2
    open_day = net_schedule(good, cube(1, 2), everywhere(2), cyclic=False)
    assert open_day.first == (0,) * 12 + (1,) * 12
    assert open_day.changes_per_day == 1


def test_cyclic_day_charges_the_change_back_at_midnight():
    # Ch 1 beats ch 0 by 0.006 for 12 hours (0.072 in all): enough for the one
    # change an open day needs (0.05), not for the two a repeating day needs.
    good = cube(1, 2, 0.9)
    good[0, :12, 1] = 0.893
    good[0, 12:, 1] = 0.906
    assert net_schedule(good, cube(1, 2), everywhere(2), cyclic=False).first == (
        (0,) * 12 + (1,) * 12)
    s = net_schedule(good, cube(1, 2), everywhere(2))
    assert s.first == (0,) * H and s.changes_per_day == 0


def _flapping():
    """Two channels within a few per cent of each other, best one alternating."""
    good = cube(1, 2)
    odd = np.arange(H) % 2 == 1
    good[0, :, 0] = np.where(odd, 0.90, 0.93)
    good[0, :, 1] = np.where(odd, 0.94, 0.90)
    return good


def _weakest_total(good, first):
    return sum(good[:, h, k].min() for h, k in enumerate(first) if k is not None)


def test_dp_changes_less_than_greedy_without_losing_more_than_the_penalty():
    good = _flapping()
    greedy = net_schedule(good, cube(1, 2), everywhere(2), change_penalty=0.0)
    assert greedy.first == greedy.best                       # no penalty: the hourly best
    assert greedy.changes_per_day == 24
    steady = net_schedule(good, cube(1, 2), everywhere(2))
    assert steady.changes_per_day < greedy.changes_per_day
    assert steady.changes_per_day == 0 and steady.first == (1,) * H   # ch 1 sums higher
    p = DEFAULT_CHANGE_PENALTY
    lost = _weakest_total(good, greedy.first) - _weakest_total(good, steady.first)
    # Objective: the DP schedule is never worse than the greedy one ...
    assert (_weakest_total(good, steady.first) - p * steady.changes_per_day
            >= _weakest_total(good, greedy.first) - p * greedy.changes_per_day - 1e-9)
    # ... so what it gives up is at most the penalty for each change it saves.
    assert 0 < lost <= p * (greedy.changes_per_day - steady.changes_per_day)
    assert all(b - w <= 0.04 + 1e-12 for b, w in
               zip(steady.best_good_days, steady.weakest_good_days))


def test_short_excursion_happens_only_when_it_pays_twice_the_penalty():
    good = cube(1, 2, 0.85)
    good[0, :, 1] = 0.5
    good[0, 10, 1] = 0.85 + 0.09         # one hour, gain 0.09 < 2 × 0.05
    assert net_schedule(good, cube(1, 2), everywhere(2)).first == (0,) * H
    good[0, 10, 1] = 0.85 + 0.11         # gain 0.11 > 0.10
    s = net_schedule(good, cube(1, 2), everywhere(2))
    assert s.first[10] == 1 and s.changes_per_day == 2
    good[0, 10, 1] = 0.85 + 0.10         # exactly the price of two changes: stay
    assert net_schedule(good, cube(1, 2), everywhere(2)).changes_per_day == 0


def test_dead_link_hours_still_pick_the_channel_best_for_the_others():
    good = cube(3, 3)
    good[:, DAY, 2] = 0.9                # the day channel, serving everyone by day
    good[1:, ~DAY, 2] = 0.1              # ... and barely anyone at night
    good[1:, ~DAY, 0] = 0.9              # night channel for links 1 and 2
    good[0, ~DAY, :] = 0.0               # link 0 dead at night on every channel
    s = net_schedule(good, cube(3, 3), everywhere(3))
    assert s.first == tuple(2 if d else 0 for d in DAY)
    assert all(s.weakest_good_days[h] == 0.0 for h in range(H) if not DAY[h])


def test_cyclic_day_keeps_one_channel_across_midnight():
    # Ch 1 is better 20:00–03:00 by 0.04 a hour: 8 hours × 0.04 = 0.32 pays
    # for the two changes; split at midnight in an open day it still would,
    # but the cyclic count must see one excursion, not two fragments.
    good = cube(1, 2, 0.9)
    good[0, :, 1] = 0.86
    night = [20, 21, 22, 23, 0, 1, 2, 3]
    good[0, night, 1] = 0.94
    s = net_schedule(good, cube(1, 2), everywhere(2))
    assert [h for h in range(H) if s.first[h] == 1] == sorted(night)
    assert s.changes_per_day == 2


def test_net_never_uses_a_channel_outside_its_hours():
    good = cube(2, 3)
    good[:, :, 0] = 0.99                 # the best channel, but night only
    good[:, :, 1] = 0.7
    good[:, :, 2] = 0.6
    allowed = everywhere(3)
    allowed[DAY, 0] = False
    s = net_schedule(good, cube(2, 3), allowed)
    for h in range(H):
        assert s.first[h] is not None and allowed[h, s.first[h]]
        assert s.second[h] is None or allowed[h, s.second[h]]
        assert s.first[h] != s.second[h]
    assert s.first == tuple(1 if d else 0 for d in DAY)


def test_hours_without_any_channel_are_none_and_do_not_count_as_changes():
    good = cube(1, 2, 0.8)
    allowed = everywhere(2)
    allowed[2:5, :] = False              # nothing authorised 02–04 UTC
    s = net_schedule(good, cube(1, 2), allowed)
    assert all(s.first[h] is None and s.weakest_good_days[h] is None for h in (2, 3, 4))
    assert s.changes_per_day == 0
    d = json.loads(json.dumps(s.to_dict()))
    assert d["hours"][3] == {"utc_hour": 3, "first": None, "second": None,
                             "weakest_good_days": None, "best": None, "best_good_days": None}


def test_net_channel_order_breaks_weakest_ties_by_the_other_links():
    good = cube(2, 2)
    good[0, :, :] = [0.0, 0.0]           # link 0 dead on both channels
    good[1, :, :] = [0.4, 0.9]
    assert net_channel_order(good, cube(2, 2), everywhere(2))[0].tolist() == [1, 0]
    assert net_schedule(good, cube(2, 2), everywhere(2)).first == (1,) * H


def _deciding_weakest(good, ok):
    """Weakest link per hour and channel over the links whose good_days differ
    between the candidate channels (all links if none differ), in plain loops."""
    n, _, c = good.shape
    weak = np.zeros((H, c))
    for h in range(H):
        cands = [k for k in range(c) if ok[h, k]]
        links = [i for i in range(n) if len({good[i, h, k] for k in cands}) > 1] or range(n)
        for k in range(c):
            weak[h, k] = min(good[i, h, k] for i in links)
    return weak


def _oracle_objective(good, allowed, penalty, cyclic):
    """Independent check: the best sum of weakest good_days minus penalty ×
    changes, by a plain dynamic programme over (first channel, channel)."""
    ok = allowed & (good.max(axis=0) > 0)
    weak = _deciding_weakest(good, ok)
    hours = [h for h in range(H) if ok[h].any()]
    if not hours:
        return 0.0
    c = good.shape[2]
    best = -math.inf
    for start in range(c) if cyclic else [None]:
        value = {k: weak[hours[0], k] for k in range(c)
                 if ok[hours[0], k] and (start is None or k == start)}
        for h in hours[1:]:
            value = {k: weak[h, k] + max(v - (penalty if j != k else 0.0)
                                         for j, v in value.items())
                     for k in range(c) if ok[h, k]} if value else {}
        for k, v in value.items():
            best = max(best, v - (penalty if cyclic and k != start else 0.0))
    return best


@settings(max_examples=60, deadline=None, derandomize=True)
@given(data=st.data(), c=st.integers(1, 4), n=st.integers(1, 3),
       penalty=st.sampled_from([0.0, 0.02, 0.05, 0.2]), cyclic=st.booleans())
def test_net_schedule_is_optimal_against_an_independent_dp(data, c, n, penalty, cyclic):
    levels = st.sampled_from([0.0, 0.3, 0.6, 0.85, 0.9, 0.95, 1.0])
    good = data.draw(hnp.arrays(float, (n, H, c), elements=levels))
    allowed = data.draw(hnp.arrays(bool, (H, c)))
    s = net_schedule(good, cube(n, c), allowed, change_penalty=penalty, cyclic=cyclic)
    weak = _deciding_weakest(good, allowed & (good.max(axis=0) > 0))
    got = sum(weak[h, k] for h, k in enumerate(s.first) if k is not None)
    got -= penalty * s.changes_per_day
    assert got == pytest.approx(_oracle_objective(good, allowed, penalty, cyclic), abs=1e-6)


def test_bad_penalty_is_a_clear_error():
    with pytest.raises(ScheduleInputError, match=r"change_penalty: expected a finite number "
                                                 r">= 0; got -1"):
        net_schedule(cube(1, 1, 0.5), cube(1, 1), everywhere(1), change_penalty=-1)
    with pytest.raises(ScheduleInputError, match="at least one link"):
        net_schedule(cube(0, 1), cube(0, 1), everywhere(1))


# --------------------------------------------------------------------------
# Gaps
# --------------------------------------------------------------------------

def _two_links_night_hole():
    """Link 0 fine all day; link 1 below target 22:00–01:59 UTC on every channel."""
    good = cube(2, 2, 0.95)
    hole = [22, 23, 0, 1]
    good[1, hole, :] = 0.4
    luf = np.full((2, H), 2.0)
    owf = np.full((2, H), 7.0)
    luf[1, hole] = [2.1, 2.4, 2.2, 2.0]
    owf[1, hole] = [3.6, 3.3, 3.1, 3.4]
    luf[0, hole] = 9.0                    # link 0 is not affected, so it must not count
    return good, luf, owf


def test_gap_is_grouped_across_midnight_with_its_window():
    good, luf, owf = _two_links_night_hole()
    gaps = find_gaps(good, everywhere(2), luf, owf)
    assert len(gaps) == 1
    g = gaps[0]
    assert g.utc_hours == (22, 23, 0, 1) and g.links == (1,) and g.reason == UNSERVED
    assert g.window_mhz == (2.4, 3.1) and g.single_frequency
    assert g.net_window_mhz is None       # link 0's LUF of 9 MHz closes it for the whole net
    assert format_hours(g.utc_hours) == "22:00\u201302:00"
    d = json.loads(json.dumps(g.to_dict()))
    assert d["window_mhz"] == [2.4, 3.1] and d["utc_hours"] == [22, 23, 0, 1]


def test_empty_window_is_flagged():
    good, luf, owf = _two_links_night_hole()
    luf[1, 23] = 3.5                      # above the lowest OWF of the run (3.1)
    (g,) = find_gaps(good, everywhere(2), luf, owf)
    assert g.window_mhz is None and g.single_frequency is False
    assert g.to_dict()["window_mhz"] is None
    # Hour by hour there is still a window, except where LUF passes the OWF.
    owf[1, 23] = 3.4
    (g,) = find_gaps(good, everywhere(2), luf, owf)
    assert g.window_by_hour_mhz == ((2.1, 3.6), None, (2.2, 3.1), (2.0, 3.4))
    assert g.links_by_hour == ((1,),) * 4


def test_unknown_luf_gives_no_window():
    good, luf, owf = _two_links_night_hole()
    luf[1, 0] = np.nan
    (g,) = find_gaps(good, everywhere(2), luf, owf)
    assert g.window_mhz is None


def test_split_when_each_link_has_its_own_channel():
    good = cube(2, 2, 0.2)
    good[0, :, 0] = 0.95
    good[1, :, 1] = 0.95
    (g,) = find_gaps(good, everywhere(2), np.full((2, H), 2.0), np.full((2, H), 5.0))
    assert g.reason == SPLIT and g.utc_hours == tuple(range(H))
    assert g.links == (1,)                # below target on the best net channel (ch 0)


def test_channel_outside_its_hours_is_named_and_runs_split_by_reason():
    good = cube(1, 2, 0.5)
    good[0, :, 1] = 0.95
    allowed = everywhere(2)
    allowed[[3, 4], 1] = False            # would serve 03–04 but is not authorised then
    allowed[[5, 6], :] = False
    good[0, [5, 6], 1] = 0.5
    gaps = find_gaps(good, allowed, np.full((1, H), 2.0), np.full((1, H), 5.0))
    assert [(g.utc_hours, g.reason) for g in gaps] == [((3, 4), NOT_AUTHORISED),
                                                       ((5, 6), UNSERVED)]
    assert gaps[0].channels_outside_hours == (1,) and gaps[1].channels_outside_hours == ()


def test_no_gaps_when_the_target_is_met_and_target_matters():
    good = cube(2, 2, 0.9)
    args = (everywhere(2), np.full((2, H), 2.0), np.full((2, H), 5.0))
    assert find_gaps(good, *args) == ()
    assert len(find_gaps(good, *args, target=0.95)) == 1
    with pytest.raises(ScheduleInputError, match=r"target: expected a number in \(0, 1\]"):
        find_gaps(good, *args, target=0)


def test_frequency_window():
    assert frequency_window([2.0, 2.5], [4.0, 3.5]) == (2.5, 3.5)
    assert frequency_window([3.0], [3.0]) is None
    assert frequency_window([], []) is None


# --------------------------------------------------------------------------
# Scan lists and ALE call time
# --------------------------------------------------------------------------

FREQ = np.array([2.3, 3.1, 4.0, 5.4, 6.9, 7.8, 9.2])


def _scan_case():
    """Links: 0 = A–B, 1 = A–C, 2 = B–C. Ch 6 never serves anything; ch 5 only
    serves link 2, and only at 25 % of days on link 0."""
    good = cube(3, 7, 0.0)
    good[:, ~DAY, 0:3] = 0.9              # night channels
    good[:, DAY, 3:5] = 0.9               # day channels
    good[2, DAY, 5] = 0.8
    good[0, DAY, 5] = 0.25                # below the usefulness threshold
    stations = [[0, 1], [0, 2], [1, 2]]
    return good, stations


def test_scan_lists_are_plan_order_and_flag_wasted_channels():
    good, stations = _scan_case()
    plan = scan_lists(good, everywhere(7), FREQ, stations, 2.0)
    a, b, c = plan.stations
    assert a.channels == (0, 1, 2, 3, 4) and a.wasted == (5, 6)
    assert b.channels == (0, 1, 2, 3, 4, 5) and b.wasted == (6,)
    assert plan.unused_channels == (6,)
    assert a.hours_served[0] == tuple(h for h in range(H) if not DAY[h])
    assert plan.to_dict() == scan_lists(good, everywhere(7), FREQ, stations, 2.0).to_dict()
    json.dumps(plan.to_dict())


def test_channel_serves_only_in_its_authorised_hours():
    good, stations = _scan_case()
    allowed = everywhere(7)
    allowed[~DAY, 2] = False               # ch 2 works only at night but is day-only
    plan = scan_lists(good, allowed, FREQ, stations, 2.0)
    assert 2 not in plan.stations[0].channels and 2 in plan.unused_channels


def test_usefulness_threshold_decides_membership():
    good, stations = _scan_case()
    plan = scan_lists(good, everywhere(7), FREQ, stations, 2.0, useful_good_days=0.2)
    assert 5 in plan.stations[0].channels         # 25 % of days now counts


def test_redundant_word_is_392_ms():
    # From memory (MIL-STD-188-141 app. A): 49 coded bits sent 3 times at
    # 3 bits per 8 ms symbol = 49 symbols × 8 ms.
    assert REDUNDANT_WORD_S == pytest.approx(0.392, abs=1e-12)


def test_scanning_call_time_by_the_stated_formula():
    t = scanning_call_time(10, 2.0)
    # T_scan = 10 / 2 = 5 s; ceil(5 / 0.392) = 13 words = 5.096 s;
    # leading call 2·1 + 1 = 3 words = 1.176 s.
    assert t.scan_period_s == 5.0
    assert t.scanning_call_s == pytest.approx(13 * 0.392)
    assert t.leading_call_s == pytest.approx(3 * 0.392)
    assert t.total_s == pytest.approx(6.272)
    # Two-word address: repetitions of 0.784 s, ceil(5 / 0.784) = 7.
    t2 = scanning_call_time(10, 2.0, address_word_count=2)
    assert t2.scanning_call_s == pytest.approx(7 * 0.784)
    assert t2.leading_call_s == pytest.approx(5 * 0.392)
    # A scan period that is a whole number of words needs no extra word.
    exact = scanning_call_time(5, 1 / 0.392)
    assert exact.scanning_call_s == pytest.approx(5 * 0.392)
    assert scanning_call_time(10, 5.0, leading_call_words=4).total_s == pytest.approx(
        6 * 0.392 + 4 * 0.392)


def test_address_words():
    assert [address_words(a) for a in ("K", "ABC", "ABCD", "A" * 15)] == [1, 1, 2, 5]
    with pytest.raises(ScheduleInputError, match="address: expected 1–15 characters"):
        address_words("A" * 16)


def test_station_call_time_uses_its_list_and_rate():
    good, stations = _scan_case()
    plan = scan_lists(good, everywhere(7), FREQ, stations, [2.0, 5.0, 2.0],
                      address_word_count=[1, 2, 1])
    a, b, _ = plan.stations
    assert a.call == scanning_call_time(5, 2.0)
    assert b.call == scanning_call_time(6, 5.0, address_word_count=2)


def test_day_night_split_suggested_when_it_halves_the_scan():
    good = cube(1, 6, 0.0)
    good[0, ~DAY, 0:3] = 0.9
    good[0, DAY, 3:6] = 0.9
    (st_,) = scan_lists(good, everywhere(6), FREQ[:6], [[0]], 2.0).stations
    sp = st_.split
    assert sp.suggested
    assert sp.day.channels == (3, 4, 5) and sp.night.channels == (0, 1, 2)
    assert sp.day.utc_hours == tuple(range(6, 18))
    assert sp.day.call == scanning_call_time(3, 2.0)
    assert sp.day.call.total_s < st_.call.total_s


def test_day_night_split_not_suggested_when_it_saves_less_than_half():
    good = cube(1, 6, 0.0)
    good[0, ~DAY, 0:3] = 0.9
    good[0, DAY, 4:6] = 0.9
    good[0, :, 3] = 0.9                   # one channel serves all day: groups of 4 and 3
    (st_,) = scan_lists(good, everywhere(6), FREQ[:6], [[0]], 2.0).stations
    assert not st_.split.suggested
    assert len(st_.split.day.channels) == 3 and len(st_.split.night.channels) == 4


def test_daylight_hours_given_decide_the_groups():
    good = cube(1, 6, 0.0)
    good[0, ~DAY, 0:3] = 0.9
    good[0, DAY, 3:6] = 0.9
    daylight = (np.arange(H) >= 7) & (np.arange(H) < 17)   # shorter day: dawn channels overlap
    (st_,) = scan_lists(good, everywhere(6), FREQ[:6], [[0]], 2.0, daylight=daylight).stations
    assert st_.split.day.utc_hours == tuple(range(7, 17))
    assert st_.split.day.channels == (3, 4, 5)
    assert st_.split.night.channels == (0, 1, 2, 3, 4, 5)
    assert not st_.split.suggested


def test_station_without_links_has_an_empty_list():
    good, _ = _scan_case()
    (s,) = scan_lists(good, everywhere(7), FREQ, [[]], 2.0).stations
    assert s.channels == () and s.call is None and s.split is None and s.wasted == tuple(range(7))


def test_bad_station_input_is_a_clear_error():
    good, stations = _scan_case()
    with pytest.raises(ScheduleInputError, match=r"station_links\[1\]\[0\]: expected a link "
                                                 r"index in 0..2; got 7"):
        scan_lists(good, everywhere(7), FREQ, [[0], [7]], 2.0)
    with pytest.raises(ScheduleInputError, match=r"scan_rate_chps\[0\]: expected a finite "
                                                 r"number > 0; got 0"):
        scan_lists(good, everywhere(7), FREQ, stations, [0, 2, 2])
    with pytest.raises(ScheduleInputError, match=r"scan_rate_chps: expected one value per "
                                                 r"station \(3\); got 2 values"):
        scan_lists(good, everywhere(7), FREQ, stations, [2, 2])


# --------------------------------------------------------------------------
# Hours and labels
# --------------------------------------------------------------------------

def test_format_hours_plain_wrapped_and_local():
    assert format_hours([1, 2, 3, 4, 5]) == "01:00\u201306:00"
    assert format_hours([23]) == "23:00\u201300:00"
    assert format_hours([0, 23, 5, 6, 1]) == "05:00\u201307:00, 23:00\u201302:00"
    assert format_hours(range(H)) == "all day"
    local = [f"{(h + 2) % 24:02d}:00" for h in range(H)]       # UTC+2
    assert format_hours([22, 23, 0], local) == "00:00\u201303:00"
    half = [f"{(h + 5) % 24:02d}:30" for h in range(H)]         # UTC+5:30
    assert format_hours([0, 1], half) == "05:30\u201307:30"
    with pytest.raises(ScheduleInputError, match="at least one UTC hour"):
        format_hours([])
    with pytest.raises(ScheduleInputError, match="expected UTC hours 0..23; got 24"):
        format_hours([24])


def test_cyclic_runs():
    labels = [None] * H
    for h in (22, 23, 0):
        labels[h] = "a"
    labels[1] = "b"
    labels[5] = "a"
    assert cyclic_runs(labels) == [("b", [1]), ("a", [5]), ("a", [22, 23, 0])]
    assert cyclic_runs(["x"] * H) == [("x", list(range(H)))]
    assert cyclic_runs([None] * H) == []
    assert hour_runs([3, 4, 6]) == [[3, 4], [6]]


# --------------------------------------------------------------------------
# Properties on random arrays
# --------------------------------------------------------------------------

@settings(max_examples=80, deadline=None, derandomize=True)
@given(data=st.data(), n=st.integers(1, 4), c=st.integers(1, 5),
       penalty=st.floats(0, 1), target=st.floats(0.05, 1))
def test_results_are_valid_allowed_and_deterministic(data, n, c, penalty, target):
    good = data.draw(hnp.arrays(float, (n, H, c), elements=st.floats(0, 1)))
    margin = data.draw(hnp.arrays(float, (n, H, c), elements=st.floats(-40, 40)))
    allowed = data.draw(hnp.arrays(bool, (H, c)))
    luf = data.draw(hnp.arrays(float, (n, H), elements=st.floats(1, 10)))
    owf = data.draw(hnp.arrays(float, (n, H), elements=st.floats(1, 20)))

    ch = link_choices(good, margin, allowed)
    for link, h in itertools.product(range(n), range(H)):
        for k in (ch.first[link][h], ch.second[link][h]):
            assert k is None or (0 <= k < c and allowed[h, k] and good[link, h, k] > 0)
        if ch.first[link][h] is not None and ch.second[link][h] is not None:
            assert good[link, h, ch.first[link][h]] >= good[link, h, ch.second[link][h]] - 1e-9  # ranking tolerance

    s = net_schedule(good, margin, allowed, change_penalty=penalty)
    for h in range(H):
        for k in (s.first[h], s.second[h], s.best[h]):
            assert k is None or (0 <= k < c and allowed[h, k])
        assert (s.first[h] is None) == (not (allowed[h] & (good[:, h].max(axis=0) > 0)).any())
    assert 0 <= s.changes_per_day <= H
    for h in range(H):     # the hour's best is the plain maximin channel
        cands = [k for k in range(c) if allowed[h, k] and good[:, h, k].max() > 0]
        if cands:
            assert s.best_good_days[h] == pytest.approx(max(good[:, h, k].min() for k in cands), abs=1e-9)

    gaps = find_gaps(good, allowed, luf, owf, target=target)
    covered = [h for g in gaps for h in g.utc_hours]
    assert len(covered) == len(set(covered))
    for g in gaps:
        assert all(0 <= i < n for i in g.links)
        if g.window_mhz is not None:
            assert g.window_mhz[0] < g.window_mhz[1]

    stations = [list(range(n)), [0]]
    plan = scan_lists(good, allowed, np.linspace(2, 9, c), stations, 2.0)
    for st_ in plan.stations:
        assert list(st_.channels) == sorted(st_.channels)
        assert sorted(st_.channels + st_.wasted) == list(range(c))

    again = (link_choices(good, margin, allowed).to_dict(),
             net_schedule(good, margin, allowed, change_penalty=penalty).to_dict(),
             [g.to_dict() for g in find_gaps(good, allowed, luf, owf, target=target)],
             scan_lists(good, allowed, np.linspace(2, 9, c), stations, 2.0).to_dict())
    assert again == (ch.to_dict(), s.to_dict(), [g.to_dict() for g in gaps], plan.to_dict())


# --- windows on the band grid -------------------------------------------------------------

from planpack.scheduling.windows import (MIN_WINDOW_MHZ, NO_WINDOW_HARDLY, NO_WINDOW_NONE_REACHES,  # noqa: E402
                                         NO_WINDOW_SLIVER, NO_WINDOW_TOO_NARROW, serving_window)

GRID = np.geomspace(1.5, 30.0, 41)


def _bump(lo, hi, peak=0.95):
    """good days 'peak' between lo and hi MHz, falling off linearly in log f over one grid step."""
    step = np.log(GRID[1] / GRID[0])
    d = np.maximum(np.log(lo) - np.log(GRID), np.log(GRID) - np.log(hi))
    return np.clip(peak * (1 - np.maximum(d, 0) / step), 0, 1)


def test_window_is_where_every_row_reaches_target_with_refined_edges():
    rows = np.stack([_bump(2.5, 5.0), _bump(3.0, 6.0)])
    w, why = serving_window(rows, GRID, 0.8)
    assert why is None
    assert 2.9 < w.low_mhz < 3.1 and 4.9 < w.high_mhz < 5.4
    assert w.low_mhz <= w.best_mhz <= w.high_mhz and w.weakest_good_days >= 0.8


def test_no_window_says_why():
    rows = np.stack([_bump(2.0, 3.0), _bump(6.0, 9.0)])
    assert serving_window(rows, GRID, 0.8, best_effort=False) == (None, NO_WINDOW_NONE_REACHES)
    assert serving_window(rows, GRID, 0.8) == (None, NO_WINDOW_HARDLY)
    narrow = np.zeros_like(GRID)
    k = 10
    narrow[k] = 0.81  # only one grid point just reaches the target: its run is far under 100 kHz
    narrow[k - 1] = narrow[k + 1] = 0.0
    w, why = serving_window(narrow[None], GRID, 0.8)
    assert w is None and why == NO_WINDOW_TOO_NARROW and MIN_WINDOW_MHZ == 0.1


def test_a_target_met_only_in_a_sliver_offers_the_frequencies_that_come_closest():
    # One grid point just reaches 80 %, its neighbours reach 75 %: a channel on the knife's edge
    # is no window, but the band near it is the best there is (what 'planpack request' finds too).
    k = int(np.argmin(np.abs(GRID - 3.2)))
    good = np.zeros(GRID.size)
    good[k], good[k - 1], good[k + 1] = 0.81, 0.75, 0.75
    w, why = serving_window(good[None], GRID, 0.8)
    assert why == NO_WINDOW_SLIVER and not w.reaches_target
    assert w.low_mhz <= GRID[k - 1] and w.high_mhz >= GRID[k + 1] and w.weakest_good_days == 0.81
    w, why = serving_window(good[None], GRID, 0.8, best_effort=False)
    assert w is None and why == NO_WINDOW_TOO_NARROW


def test_gaps_take_their_windows_from_the_grid():
    good = np.zeros((2, H, 1))
    good[:, 12:, 0] = 0.95  # the only channel works by day; night hours are a gap
    grid = np.zeros((2, H, GRID.size))
    grid[:, :, :] = _bump(2.4, 4.2)[None, None, :]
    gaps = find_gaps(good, everywhere(1), np.full((2, H), 2.0), np.full((2, H), 5.0), target=0.8,
                     grid_good_days=grid, grid_mhz=GRID)
    (g,) = gaps
    lo, hi = g.window_mhz
    assert 2.3 < lo < 2.5 and 4.1 < hi < 4.4 and g.no_window_reason is None
    assert g.net_window_mhz is not None


def test_where_nothing_reaches_the_target_the_best_the_band_offers_is_named():
    rows = np.stack([_bump(2.5, 4.0, peak=0.6), _bump(3.0, 5.0, peak=0.65)])
    w, why = serving_window(rows, GRID, 0.8)
    assert why == NO_WINDOW_NONE_REACHES and not w.reaches_target
    assert 2.9 < w.low_mhz and w.high_mhz < 4.3 and abs(w.weakest_good_days - 0.6) < 1e-9


def test_a_night_that_needs_two_channels_becomes_two_requests():
    good = np.zeros((1, H, 1))
    good[:, 8:18, 0] = 0.95                   # the only channel works by day
    grid = np.zeros((1, H, GRID.size))
    for h in range(H):                        # evening wants 3.5-5 MHz, the small hours 2-2.8 MHz
        grid[0, h] = _bump(3.5, 5.0) if h in (18, 19, 20, 21, 22) else _bump(2.0, 2.8)
    gaps = find_gaps(good, everywhere(1), np.full((1, H), 2.0), np.full((1, H), 5.0), target=0.8,
                     grid_good_days=grid, grid_mhz=GRID)
    assert [g.utc_hours for g in gaps] == [(18, 19, 20, 21, 22), (23, 0, 1, 2, 3, 4, 5, 6, 7)]
    assert all(g.window_reaches_target for g in gaps)
    assert gaps[0].window_mhz[0] > 3.3 and gaps[1].window_mhz[1] < 3.0


def test_above_the_target_the_net_hardly_moves_for_more_of_what_it_has():
    # one link, two channels: A works 0.80 all day; B 0.92 from 08 to 15 UTC. Without a target the
    # 8 hours x 0.12 pay for two changes; with a target of 0.75 they count a quarter and do not
    good = np.zeros((1, H, 2))
    good[0, :, 0] = 0.80
    good[0, 8:16, 1] = 0.92
    margin = np.zeros_like(good)
    plain = net_schedule(good, margin, everywhere(2), change_penalty=0.3)
    held = net_schedule(good, margin, everywhere(2), change_penalty=0.3, target=0.75)
    assert plain.changes_per_day == 2 and held.changes_per_day == 0
    # below the target the net still moves: A at 0.60 is short of 0.75, B reaches it
    good[0, :, 0] = 0.60
    moved = net_schedule(good, margin, everywhere(2), change_penalty=0.3, target=0.75)
    assert moved.changes_per_day == 2 and moved.first[10] == 1
