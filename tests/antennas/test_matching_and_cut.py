"""SWR, mismatch and feedline loss, cut-sheet arithmetic."""

import numpy as np
import pytest

from planpack.antennas import cut, matching


def test_reflection_swr_and_mismatch_loss():
    # Transmission-line textbook relations: 100 ohm on 50 ohm gives
    # |Gamma| = 1/3, SWR 2:1, mismatch loss -10 log10(1 - 1/9) = 0.512 dB.
    g = matching.reflection(np.array([100.0 + 0j]), 50.0)
    assert abs(g[0]) == pytest.approx(1 / 3)
    assert matching.swr(g)[0] == pytest.approx(2.0)
    assert matching.mismatch_loss_db(g)[0] == pytest.approx(0.5115, abs=1e-4)


def test_transformer_ratio_refers_impedance_to_the_line():
    # An ideal 16:1 transformer presents 800 ohm as 50 ohm.
    g = matching.reflection(np.array([800.0 + 0j]), 50.0, ratio=16.0)
    assert matching.swr(g)[0] == pytest.approx(1.0)


def test_seven_to_one_loses_more_than_three_db():
    # SWR 7:1: |Gamma| = 6/8, mismatch loss -10 log10(1 - 0.5625) = 3.59 dB.
    g = matching.reflection(np.array([350.0 + 0j]), 50.0)
    assert matching.swr(g)[0] == pytest.approx(7.0)
    assert matching.mismatch_loss_db(g)[0] == pytest.approx(3.590, abs=1e-3)


@pytest.mark.parametrize("swr, cls", [(1.0, "fine"), (2.0, "fine"), (2.01, "tuner"),
                                      (3.0, "tuner"), (3.01, "poor"), (7.0, "poor")])
def test_swr_classes(swr, cls):
    # Classes of the issue: up to 2:1 fine, 2:1-3:1 tuner, above 3:1 poor
    # (common practice, no source).
    assert matching.swr_class(swr) == cls


def test_line_loss_with_swr():
    # ARRL Antenna Book, transmission-line chapter (from memory): a line
    # with 1 dB matched loss at SWR 3:1 (|Gamma| = 0.5) loses about 1.5 dB.
    total = matching.line_loss_with_swr_db(np.array([1.0]), np.array([0.5]))
    assert total[0] == pytest.approx(1.50, abs=0.01)
    # Matched: no extra loss.
    assert matching.line_loss_with_swr_db(np.array([1.0]), np.array([0.0]))[0] == pytest.approx(1.0)


def test_matched_loss_scales_with_root_frequency():
    # Skin-effect conductor loss grows as sqrt(f) (textbook).
    loss = matching.matched_line_loss_db(np.array([2500.0, 10000.0, 40000.0]), 50.0, 4.0)
    np.testing.assert_allclose(loss, [1.0, 2.0, 4.0])


def test_rule_of_thumb_and_feet_inches():
    # 468 / 5 = 93.6 ft at 5 MHz, "about 94 ft" (the example; common
    # practice, no source).
    m = cut.half_wave_rule_m(5000.0)
    assert m == pytest.approx(93.6 * 0.3048)
    assert cut.feet_inches(m) == "93 ft 7 1/4 in"
    assert cut.feet_inches(0.3048) == "1 ft 0 in"
    assert cut.quarter_wave_rule_m(5000.0) == pytest.approx(m / 2)
    assert cut.with_allowance_m(10.0) == pytest.approx(10.0 + 2 * cut.END_ALLOWANCE_M)
