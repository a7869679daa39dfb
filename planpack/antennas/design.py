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

from . import cut, geometry
from .matching import DEFAULT_COIL_Q, DEFAULT_VELOCITY_FACTOR, MATCHING_KEYS

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

    def __reduce__(self):
        # Solver worker processes send these back to the parent: rebuild from the fields.
        return (type(self), (self.field, self.expected, self.got))


class AntennaGeometryError(AntennaInputError):
    """The antenna cannot be hung as written (for example an inverted-V whose
    legs would end below the safe minimum height or below the ground).

    Decided from the design alone, before any NEC solve, so the answer never
    depends on the soil.  ``str()`` is a whole sentence (without the field).
    """

    def __init__(self, field: str, message: str, got: object):
        self.field = field
        self.expected = message
        self.got = got
        ValueError.__init__(self, message)


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
    feed_velocity_factor : feedline velocity factor [1]; 0.66 (solid
        polyethylene coax) when not given.
    matching : how the set is matched to the antenna, a key of
        :data:`planpack.antennas.matching.DEVICES` ('none', 'set-tuner',
        'wide-tuner', 'feedpoint-coupler'); None means 'feedpoint-coupler'
        for a whip (a whip is used with a coupler at its base, or a manpack
        set's coupler, which sits at the base too) and 'set-tuner' for the
        other kinds.
    matching_coil_q : unloaded Q of the matching network's coil [1].
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
    feed_velocity_factor: float = DEFAULT_VELOCITY_FACTOR
    matching: str | None = None
    matching_coil_q: float = DEFAULT_COIL_Q

    def __post_init__(self) -> None:
        o = "AntennaDesign"
        self._validate(o)
        # Store numbers as floats so that 5000 and 5000.0 give the same output.
        for name in ("design_khz", "height_m", "apex_deg", "wire_mm", "length_m", "spacing_m",
                     "resistor_ohm", "transformer_ratio", "reflector_longer",
                     "reflector_below_wl", "feed_z0_ohm", "feed_length_m",
                     "feed_loss_db_per_100m_at_10mhz", "feed_velocity_factor",
                     "matching_coil_q"):
            value = getattr(self, name)
            if value is not None:
                object.__setattr__(self, name, float(value))
        if self.matching is None:
            object.__setattr__(self, "matching", default_matching(self.kind))
        check_geometry(self)

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
        _number(o, "feed_velocity_factor", self.feed_velocity_factor, low=0.3, high=1.0,
                what="a velocity factor between 0.3 and 1 (0.66 for solid polyethylene coax)")
        if self.matching is not None and self.matching not in MATCHING_KEYS:
            raise AntennaInputError(f"{o}.matching", "one of " + ", ".join(MATCHING_KEYS),
                                    self.matching)
        _number(o, "matching_coil_q", self.matching_coil_q, low=10.0, high=1000.0,
                what="a coil Q between 10 and 1000 (HF tuner coils are about 100-200)")


def default_matching(kind: str) -> str:
    """The matching a plan means when it names none: a coupler at a whip's base
    (a whip is always used with one, or with a manpack set's own coupler at
    its base), the set's built-in tuner for the wire antennas."""
    return "feedpoint-coupler" if kind == "whip" else "set-tuner"


def inverted_v_leg_end_m(design: "AntennaDesign", total_m: float) -> float:
    """Height above ground [m] of the ends of an inverted-V's legs for a wire of ``total_m``."""
    apex = design.apex_deg if design.apex_deg is not None else DEFAULT_APEX_DEG
    return geometry.inverted_v_end_height_m(total_m, design.height_m, apex, 0.0)


#: Angle between an inverted-V's legs when the plan gives none [deg] (common
#: practice, no source).
DEFAULT_APEX_DEG = 120.0


def check_geometry(design: "AntennaDesign") -> None:
    """Refuse a design that cannot be hung as written, before any NEC solve.

    An inverted-V is cut to about the half-wave rule of thumb, and NEC trims
    it only within lengths whose ends stay at the minimum height; if at the
    rule-of-thumb length its legs would end below
    :data:`planpack.antennas.geometry.MIN_END_HEIGHT_M` (or below the
    ground) it is refused: the ends carry high RF voltage and must stay out
    of reach (common practice, no source).

    Raises
    ------
    AntennaGeometryError
    """
    if design.kind == "dipole-reflector":
        _check_reflector_fits(design)
    if design.kind == "folded-terminated":
        _check_folded_fits(design)
    if design.kind != "inverted-v":
        return
    apex = design.apex_deg if design.apex_deg is not None else DEFAULT_APEX_DEG
    rule = cut.half_wave_rule_m(design.design_khz)
    end = inverted_v_leg_end_m(design, rule)
    if end >= geometry.MIN_END_HEIGHT_M:
        return
    feed = min(geometry.INVERTED_V_FEED_M, 0.1 * rule)
    leg = (rule - feed) / 2.0
    need_apex = geometry.MIN_END_HEIGHT_M + leg * math.cos(math.radians(apex / 2.0))
    # the narrowest drop that keeps the ends up at this apex height: cos(a / 2) = (h - min) / leg
    spare = (design.height_m - geometry.MIN_END_HEIGHT_M) / leg
    widest = 2.0 * math.degrees(math.acos(spare)) if 0.0 < spare < 1.0 else None
    if widest is not None and widest <= MAX_APEX_DEG:
        fix = (f"raise the apex to at least {math.ceil(need_apex * 10) / 10:g} m, or widen apex_deg "
               f"to at least {math.ceil(widest):g} degrees")
    else:
        fix = (f"raise the apex to at least {math.ceil(need_apex * 10) / 10:g} m (widening the angle "
               "between the legs is not enough at this height)")
    where = (f"{-end:.1f} m below the ground" if end < 0.0 else f"{end:.1f} m above the ground, under "
             f"the {geometry.MIN_END_HEIGHT_M:g} m minimum")
    raise AntennaGeometryError(
        "AntennaDesign.height_m",
        f"cut for {design.design_khz:g} kHz, each leg of this inverted-V is about {leg:.1f} m, and with "
        f"the apex at {design.height_m:g} m and {apex:g} degrees between the legs they would end "
        f"{where}; the ends carry high RF voltage and must stay out of reach: {fix}.",
        design.height_m)


#: Widest angle between an inverted-V's legs a plan may give [deg].
MAX_APEX_DEG = 170.0
#: Folded-terminated wire spacing when the plan gives none [m] (common practice, no source).
DEFAULT_FOLDED_SPACING_M = 0.9


def _check_reflector_fits(design: "AntennaDesign") -> None:
    low = geometry.MIN_REFLECTOR_HEIGHT_M
    if design.height_m - 0.5 <= low:
        raise AntennaGeometryError(
            "AntennaDesign.height_m",
            f"a dipole-reflector hung at {design.height_m:g} m has no room for its reflector, which "
            f"must stay at least {low:g} m above the ground and at least 0.5 m below the dipole: hang "
            f"the dipole at least {low + 0.5:g} m up.", design.height_m)


def _check_folded_fits(design: "AntennaDesign") -> None:
    spacing = design.spacing_m if design.spacing_m is not None else DEFAULT_FOLDED_SPACING_M
    low = geometry.MIN_REFLECTOR_HEIGHT_M
    if design.height_m - spacing < low:
        raise AntennaGeometryError(
            "AntennaDesign.height_m",
            f"hung at {design.height_m:g} m with its wires {spacing:g} m apart, the lower wire of this "
            f"folded-terminated dipole would be {design.height_m - spacing:.2f} m above the ground, under "
            f"the {low:g} m minimum: hang it at least {spacing + low:g} m up.", design.height_m)


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
