"""Sky-wave losses: behaviour the published formulas must show."""

import numpy as np
import pytest

from planpack.ionosphere import absorption as ab


def test_absorption_higher_at_noon_than_midnight():
    # common practice, no source: the D layer absorbs by day and fades away at night
    noon = ab.d_layer_absorption_db(5.0, 1.2, 30.0, 50.0, 20.0)
    night = ab.d_layer_absorption_db(5.0, 1.2, 150.0, 50.0, 20.0)
    assert noon > 5 * night


def test_absorption_lower_at_higher_frequency():
    # source: George & Bradley (1974) - absorption falls as (f + fH)^-1.98
    f = np.geomspace(1.5, 30, 40)
    loss = ab.d_layer_absorption_db(f, 1.2, 40.0, 80.0, 30.0)
    assert np.all(np.diff(loss) < 0)


def test_absorption_grows_with_obliquity_hops_and_sunspots():
    # source: George & Bradley (1974) - proportional to sec i, to hops and to (1 + 0.0037 R12)
    base = ab.d_layer_absorption_db(4.0, 1.2, 40.0, 0.0, 0.0)
    assert ab.d_layer_absorption_db(4.0, 1.2, 40.0, 0.0, 60.0) == pytest.approx(2 * base)
    assert ab.d_layer_absorption_db(4.0, 1.2, 40.0, 0.0, 0.0, 2) == pytest.approx(2 * base)
    assert ab.d_layer_absorption_db(4.0, 1.2, 40.0, 100.0, 0.0) == pytest.approx(1.37 * base)


def test_above_muf_loss():
    # source: ITU-R P.533 eqs. 24-25 (from memory): zero at and below the MUF, rising above it
    assert ab.above_muf_loss_db(5.0, 6.0, "F2") == 0.0
    assert ab.above_muf_loss_db(6.6, 6.0, "F2") == pytest.approx(36 * np.sqrt(0.1))
    assert ab.above_muf_loss_db(3.3, 3.0, "E") == pytest.approx(130 * 0.01)
    with pytest.raises(ValueError, match="layer"):
        ab.above_muf_loss_db(3.3, 3.0, "F1")


def test_ground_reflection_and_free_space():
    # source: P.533 §5.2.1 - 2 dB per intermediate ground reflection
    assert ab.ground_reflection_loss_db(3) == 4.0
    # source: ITU-R P.525 - 1 km at 1 MHz: 32.45 dB
    assert ab.free_space_loss_db(1.0, 1.0) == pytest.approx(32.45)
