"""The cautions every site and card carries, and the grounding instruction per ground system.

These are the usual cautions of the trade (common practice, no source). They
never replace local codes, the equipment's manuals or licensed practice, and
they say so.
"""

from __future__ import annotations

DEFERRAL = ("These cautions and figures are planning aids, not a safety evaluation. Follow local codes and "
            "regulations, the manuals of the radio, tuner and mast, and the direction of a licensed or qualified "
            "person on site. Where they differ from this plan, they win.")

CAUTIONS = (
    ("power-lines", "Power lines",
     "Look up before you raise a mast or throw a line. Keep every part of the antenna, mast and guy lines at least "
     "the height of the mast plus 3 m away from any overhead line, further where local rules say so. If a wire "
     "touches a line, keep clear, keep others clear and call the line operator."),
    ("masts", "Masts and supports",
     "Raise masts with enough people, guy them before letting go, and keep the fall zone clear. Mark guy lines "
     "and low wire ends at head and shin height, especially at night."),
    ("rf-exposure", "RF exposure",
     "Do not transmit while anyone is closer to the antenna than the distance shown for this station. Never touch "
     "an antenna or a whip while transmitting: RF burns are deep and painful. Keep the feedline and the set away from "
     "the body at high power."),
    ("lightning", "Lightning and static",
     "When thunder is heard or static builds on the antenna, stop transmitting, disconnect the feedline from the set "
     "and ground it outside. Do not stay beside a mast in a storm. A ground rod does not make an antenna safe in a "
     "lightning strike."),
    ("grounding", "Grounding the set",
     "Bond the set's ground terminal to the station's ground (stake, radials or counterpoise) with a short, heavy "
     "conductor. A good RF ground keeps RF off the operator and the power supply, lowers noise and, for a whip, is "
     "half of the antenna."),
    ("power", "Generators and batteries",
     "Run generators downwind of the shelter and never inside. Fuse battery leads at the battery. Keep fuel away "
     "from the set."),
)

#: The short form a card carries (3-5 lines), with a pointer to the full cautions.
SHORT = (
    "Power lines: keep antenna, mast and guys at least the mast height plus 3 m from any overhead line.",
    "RF: no one closer to the antenna than the distance on this card while transmitting; never touch it then.",
    "Lightning: on thunder or static build-up stop, disconnect the feedline and ground it outside.",
    "Ground the set to the station's ground with a short heavy lead; guy masts before letting go.",
)
SHORT_POINTER = ("Full cautions: the Safety page of the net's site. Local codes, the equipment manuals and licensed "
                 "practice come first.")

GROUNDING = {
    "rods": "Drive the ground stake at least 1 m into moist soil beside the set; bond the set's ground terminal to it "
            "with the shortest heavy lead (braid or 4 mm² or larger). Water the soil in dry weather.",
    "radials": "Lay the radials out evenly from the whip's base (more and longer is better; at least four of a quarter "
               "wave where room allows); bond them together at the base and to the set's ground terminal.",
    "counterpoise": "Lay the counterpoise wire straight out on or just above the ground, away from the antenna's "
                    "direction of feed, and bond it to the set's ground terminal; insulate its far end: it carries RF.",
    "none": "This station has no RF ground declared: add a stake or a counterpoise and bond it to the set's ground "
            "terminal, or expect RF on the set, more noise and (with a whip) a poor antenna.",
}


def cautions() -> dict:
    """The caution texts for a compiled plan."""
    return {
        "cautions": [{"topic": t, "title": title, "text": text} for t, title, text in CAUTIONS],
        "deferral": DEFERRAL,
        "short": list(SHORT),
        "short_pointer": SHORT_POINTER,
    }
