"""Input records for the antenna analysis: one antenna design and one ground.

Both are frozen and hashable so that the solver cache can key on them.
Units are in the field names: kHz, m, mm, ohm, dB.  Construction checks
every field and raises :class:`AntennaInputError` naming the field, what was
expected and what arrived, so that the plan compiler can turn it into a
diagnostic at the plan's line and column.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

KINDS = ("dipole", "inverted-v", "dipole-reflector", "folded-terminated", "whip")
DIPOLE_KINDS = ("dipole", "inverted-v", "dipole-reflector")
SOILS = ("sea", "fresh-water", "wet", "medium-dry", "very-dry", "ice")
# Idealised grounds for reference checks only; the plan reader never maps a
# plan's soil onto these.
IDEAL_SOILS = ("perfect", "free-space")
GROUND_SYSTEMS = ("rods", "radials", "counterpoise", "none")

# The HF range this package models [kHz].  NEC-2 itself has no such limit; the
# segmentation rule and the exposure table rows used here are chosen for it.
MIN_FREQ_KHZ = 1000.0
MAX_FREQ_KHZ = 30000.0


class AntennaInputError(ValueError):
    """A design, ground or frequency value the analysis cannot use.

    Attributes
    ----------
    field : str
        Dotted name of the offending field, e.g. ``AntennaDesign.height_m``.
    expected : str
        What a valid value looks like.
    got : object
        The value that arrived.
    """

    def __init__(self, field: str, expected: str, got: object):
        self.field = field
        self.expected = expected
        self.got = got
        super().__init__(f"{field}: expected {expected}, got {got!r}")


def _number(owner: str, name: str, value: object, *, low: float | None = None,
            high: float | None = None, low_open: bool = False,
            what: str = "a number", optional: bool = False) -> None:
    field = f"{owner}.{name}"
    if value is None:
        if optional:
            return
        raise AntennaInputError(field, what, value)
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value):
        raise AntennaInputError(field, what, value)
    if low is not None and (value < low or (low_open and value == low)):
        raise AntennaInputError(field, what, value)
    if high is not None and value > high:
        raise AntennaInputError(field, what, value)


@dataclass(frozen=True)
class AntennaDesign:
    """One antenna as the plan describes it (before any solving).

    Fields
    ------
    kind : 'dipole' | 'inverted-v' | 'dipole-reflector' | 'folded-terminated' | 'whip'
    design_khz : frequency to cut for [kHz]; required for the dipole kinds;
        None for folded-terminated; for a whip, used to cut a resonant
        quarter-wave when ``length_m`` is not given.
    height_m : feed point (dipole, folded-terminated), apex (inverted-v) or
        whip base height above ground [m].
    apex_deg : inverted-v angle between the legs [deg]; None means 120.
    wire_mm : conductor diameter [mm].
    length_m : folded-terminated total length (None means 27 m) or whip
        length [m].
    spacing_m : folded-terminated wire spacing [m]; None means 0.9 m.
    resistor_ohm : folded-terminated terminating resistor [ohm]; None means 800.
    transformer_ratio : impedance ratio of balun/transformer (antenna side :
        feedline side); None means 1 (1:1 balun) for all kinds but
        folded-terminated, where it means 16.
    reflector_longer : dipole-reflector reflector length excess [fraction].
    reflector_below_wl : dipole-reflector spacing below the dipole
        [wavelengths at design_khz].
    feed_z0_ohm : feedline characteristic impedance [ohm].
    feed_length_m : feedline length [m].
    feed_loss_db_per_100m_at_10mhz : matched feedline loss [dB per 100 m at 10 MHz].
    """

    kind: str
    design_khz: float | None
    height_m: float
    apex_deg: float | None = None
    wire_mm: float = 2.0
    length_m: float | None = None
    spacing_m: float | None = None
    resistor_ohm: float | None = None
    transformer_ratio: float | None = None
    reflector_longer: float = 0.05
    reflector_below_wl: float = 0.15
    feed_z0_ohm: float = 50.0
    feed_length_m: float = 0.0
    feed_loss_db_per_100m_at_10mhz: float = 0.0

    def __post_init__(self) -> None:
        o = "AntennaDesign"
        self._validate(o)
        # Store numbers as floats so that 5000 and 5000.0 give the same output.
        for name in ("design_khz", "height_m", "apex_deg", "wire_mm", "length_m", "spacing_m",
                     "resistor_ohm", "transformer_ratio", "reflector_longer",
                     "reflector_below_wl", "feed_z0_ohm", "feed_length_m",
                     "feed_loss_db_per_100m_at_10mhz"):
            value = getattr(self, name)
            if value is not None:
                object.__setattr__(self, name, float(value))

    def _validate(self, o: str) -> None:
        if self.kind not in KINDS:
            raise AntennaInputError(f"{o}.kind", "one of " + ", ".join(KINDS), self.kind)
        freq_what = f"a frequency in kHz between {MIN_FREQ_KHZ:g} and {MAX_FREQ_KHZ:g}"
        if self.kind in DIPOLE_KINDS:
            _number(o, "design_khz", self.design_khz, low=MIN_FREQ_KHZ, high=MAX_FREQ_KHZ,
                    what=freq_what + f" (a {self.kind} is cut for one frequency)")
        elif self.kind == "folded-terminated":
            if self.design_khz is not None:
                _number(o, "design_khz", self.design_khz, low=MIN_FREQ_KHZ,
                        high=MAX_FREQ_KHZ, what=freq_what)
        else:  # whip
            _number(o, "design_khz", self.design_khz, low=MIN_FREQ_KHZ, high=MAX_FREQ_KHZ,
                    what=freq_what, optional=True)
            if self.length_m is None and self.design_khz is None:
                raise AntennaInputError(f"{o}.length_m",
                                        "a whip length in metres (or a design_khz to cut "
                                        "a quarter-wave for)", None)
        if self.kind == "whip":
            _number(o, "height_m", self.height_m, low=0.0, high=30.0,
                    what="a whip base height between 0 and 30 m")
        else:
            _number(o, "height_m", self.height_m, low=1.0, high=200.0,
                    what="a height above ground between 1 and 200 m")
        _number(o, "apex_deg", self.apex_deg, low=60.0, high=180.0, optional=True,
                what="an angle between the legs from 60 to 180 degrees")
        _number(o, "wire_mm", self.wire_mm, low=0.2, high=60.0,
                what="a conductor diameter between 0.2 and 60 mm")
        _number(o, "length_m", self.length_m, low=0.5, high=200.0, optional=True,
                what="a length between 0.5 and 200 m")
        _number(o, "spacing_m", self.spacing_m, low=0.05, high=5.0, optional=True,
                what="a wire spacing between 0.05 and 5 m")
        _number(o, "resistor_ohm", self.resistor_ohm, low=0.0, high=10000.0, low_open=True,
                optional=True, what="a resistance above 0 and up to 10000 ohm")
        _number(o, "transformer_ratio", self.transformer_ratio, low=0.0, high=100.0,
                low_open=True, optional=True,
                what="an impedance ratio above 0 (e.g. 1 for a 1:1 balun, 16 for 16:1)")
        _number(o, "reflector_longer", self.reflector_longer, low=0.0, high=0.3,
                what="a fraction between 0 and 0.3 (0.05 = 5 % longer)")
        _number(o, "reflector_below_wl", self.reflector_below_wl, low=0.02, high=0.5,
                what="a spacing between 0.02 and 0.5 wavelengths")
        _number(o, "feed_z0_ohm", self.feed_z0_ohm, low=1.0, high=1000.0,
                what="a feedline impedance between 1 and 1000 ohm")
        _number(o, "feed_length_m", self.feed_length_m, low=0.0, high=1000.0,
                what="a feedline length between 0 and 1000 m")
        _number(o, "feed_loss_db_per_100m_at_10mhz", self.feed_loss_db_per_100m_at_10mhz,
                low=0.0, high=50.0, what="a matched loss between 0 and 50 dB per 100 m")


@dataclass(frozen=True)
class GroundSpec:
    """The ground under an antenna.

    soil : 'sea' | 'fresh-water' | 'wet' | 'medium-dry' | 'very-dry' | 'ice'
        (ITU-R P.527 constants); 'perfect' and 'free-space' exist for
        reference checks.
    system : 'rods' | 'radials' | 'counterpoise' | 'none'; only the whip's
        loss depends on it (the dipole kinds are balanced and fed through a
        balun).
    """

    soil: str
    system: str = "none"

    def __post_init__(self) -> None:
        if self.soil not in SOILS + IDEAL_SOILS:
            raise AntennaInputError("GroundSpec.soil", "one of " + ", ".join(SOILS), self.soil)
        if self.system not in GROUND_SYSTEMS:
            raise AntennaInputError("GroundSpec.system", "one of " + ", ".join(GROUND_SYSTEMS),
                                    self.system)


def check_freqs_khz(freqs_khz: object) -> tuple[float, ...]:
    """Validate a channel frequency set [kHz]; return it as a tuple of floats."""
    if isinstance(freqs_khz, (str, bytes)) or not hasattr(freqs_khz, "__iter__"):
        raise AntennaInputError("freqs_khz", "a sequence of frequencies in kHz", freqs_khz)
    out = tuple(freqs_khz)
    if not out:
        raise AntennaInputError("freqs_khz", "at least one frequency", out)
    for i, f in enumerate(out):
        _number("freqs_khz", f"[{i}]", f, low=MIN_FREQ_KHZ, high=MAX_FREQ_KHZ,
                what=f"a frequency in kHz between {MIN_FREQ_KHZ:g} and {MAX_FREQ_KHZ:g}")
    return tuple(float(f) for f in out)
