"""What is lost between the set and the antenna, and why, in a planner's words."""

from __future__ import annotations

import math

from .matching import DEVICES, LossChain, swr_text

#: A loss from the set to the antenna worth a warning [dB]: a quarter of the
#: power, about one S-unit (common practice, no source).
LOSS_WARN_DB = 6.0


def device_name(matching: str, kind: str) -> str:
    """The matching device as a planner names it."""
    if matching == "feedpoint-coupler":
        return "the coupler at the whip's base" if kind == "whip" else "the coupler at the feed point"
    return {"none": "no tuner", "set-tuner": "the set's built-in tuner",
            "wide-tuner": "the wide-range tuner"}[matching]


def loss_parts(chain: LossChain, i: int, matching: str, kind: str) -> list[tuple[str, float]]:
    """The loss at index ``i`` split by where it goes: (where, dB), largest first."""
    short = {"none": "the matching network", "set-tuner": "the tuner's coil and capacitor",
             "wide-tuner": "the tuner's coil and capacitor",
             "feedpoint-coupler": "the coupler's coil and capacitor"}[matching]
    parts = [
        ("the set's power reduction and mismatch", float(chain.foldback_db[i] + chain.set_mismatch_db[i])),
        (short, float(chain.network_loss_db[i])),
        ("the feedline", float(chain.feedline_loss_db[i])),
        ("the ground system", float(chain.ground_loss_db[i])),
    ]
    parts = [(w, db) for w, db in parts if math.isfinite(db)]
    return sorted(parts, key=lambda p: -p[1])


def explain_loss(chain: LossChain, i: int, *, freq_khz: float, kind: str, matching: str,
                 z_ant_ohm: complex, ground_ohm: float, coil_q: float, ratio: float = 1.0) -> str:
    """One whole sentence: how much is lost at ``freq_khz``, where, and the cause of the largest part.

    Parameters
    ----------
    chain : LossChain
        The loss chain of the antenna (index ``i`` is this frequency).
    freq_khz : float
        Frequency [kHz].
    kind, matching : str
        Antenna kind and matching key.
    z_ant_ohm : complex
        NEC feed impedance [ohm].
    ground_ohm : float
        A whip's ground-system loss resistance [ohm] (0 for wires).
    coil_q : float
        Unloaded Q of the matching coil [1].
    ratio : float
        Balun ratio, antenna side : line side [1].
    """
    total = float(chain.total_db[i])
    if not bool(chain.usable[i]):
        return (f"At {freq_khz:g} kHz NEC gives no physical feed impedance for this antenna, so the link "
                "budget counts it as unusable there.")
    parts = [(w, db) for w, db in loss_parts(chain, i, matching, kind) if db >= 0.05]
    listed = ", ".join(f"{db:.1f} dB in {w}" for w, db in parts)
    head = f"At {freq_khz:g} kHz {total:.1f} dB of the set's power is lost before the antenna ({listed})"
    if not parts:
        return head.replace(" ()", "") + "."
    return f"{head}: {_cause(parts[0][0], chain, i, kind=kind, matching=matching, z_ant_ohm=z_ant_ohm, ground_ohm=ground_ohm, coil_q=coil_q, ratio=ratio)}."


def _cause(where: str, chain: LossChain, i: int, *, kind: str, matching: str, z_ant_ohm: complex,
           ground_ohm: float, coil_q: float, ratio: float) -> str:
    dev = device_name(matching, kind)
    device = DEVICES[matching]
    r, x = z_ant_ohm.real, z_ant_ohm.imag
    if where == "the ground system":
        return (f"the whip's feed resistance, mostly its radiation resistance, is only {r:.1f} ohm against "
                f"{ground_ohm:g} ohm lost in the ground system; more or longer radials, or a longer whip, help")
    if where == "the feedline":
        return (f"the feedline carries an SWR of {swr_text(chain.swr_feed[i])} from the antenna"
                if device.place != "feed" else "the feedline's own loss is high at this frequency")
    if where == "the set's power reduction and mismatch":
        if device.place is None:
            return (f"with no tuner the set sees an SWR of {swr_text(chain.swr_set[i])} and reduces its power")
        return (f"the antenna is beyond what {dev} can match, so the set still sees an SWR of "
                f"{swr_text(chain.swr_set[i])} and reduces its power")
    # the tuner's or coupler's coil and capacitor
    if device.place == "set":
        zi = complex(chain.line_input_ohm[i])
        rr, xx, at = zi.real, zi.imag, "at the set's end of the feedline"
    else:
        rr, xx, at = (r + ground_ohm) / ratio, x / ratio, "at the feed point"
    react = "inductive" if xx > 0 else "capacitive"
    return (f"{dev} must bring {rr:.1f} ohm of resistance with {abs(xx):.0f} ohm of {react} reactance {at} "
            f"to 50 ohm, and its coil (Q {coil_q:g}) loses more the further the load is from 50 ohm")
