"""Cut-sheet arithmetic: rules of thumb, feet and inches, allowances."""

from __future__ import annotations

FT_M = 0.3048
# Extra wire at each end of a piece for the loop through an insulator or the
# balun (common practice, no source).
END_ALLOWANCE_M = 0.15


def half_wave_rule_m(freq_khz: float) -> float:
    """Half-wave dipole length by the rule of thumb 468 / f[MHz] feet [m]
    (common practice, no source)."""
    return 468.0 / (freq_khz / 1000.0) * FT_M


def quarter_wave_rule_m(freq_khz: float) -> float:
    """Quarter-wave vertical by the rule of thumb 234 / f[MHz] feet [m]
    (common practice, no source)."""
    return 234.0 / (freq_khz / 1000.0) * FT_M


def feet_inches(length_m: float | None) -> str | None:
    """A length as feet and inches to the nearest quarter inch, e.g. "93 ft 7 1/4 in"."""
    if length_m is None:
        return None
    quarters = round(length_m / FT_M * 48.0)  # quarter inches
    feet, rest = divmod(quarters, 48)
    inches, q = divmod(rest, 4)
    frac = {0: "", 1: " 1/4", 2: " 1/2", 3: " 3/4"}[q]
    return f"{feet} ft {inches}{frac} in"


def with_allowance_m(length_m: float | None, ends: int = 2) -> float | None:
    """A piece's length plus END_ALLOWANCE_M at each of its ends [m]."""
    if length_m is None:
        return None
    return length_m + ends * END_ALLOWANCE_M
