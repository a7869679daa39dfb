"""Diagnostics: one problem in a plan, with where it is and why.

Every diagnostic prints as ``path:line:col: severity code: message``. Codes are
stable (plan repositories grep for them); each is listed in :data:`CODES` with
a one-line description, which ``planpack check --codes`` prints and the docs
table is made from.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field

ERROR = "error"
WARNING = "warning"

#: Every diagnostic code planpack emits, with what it means.
CODES: dict[str, str] = {
    # reading the file
    "file-unreadable": "the file cannot be opened or read",
    "file-too-large": "the file is larger than the size bound",
    "file-encoding": "the file is not valid UTF-8 (or is UTF-16/32)",
    "nul-byte": "the file contains a NUL byte",
    "tab-character": "a tab character; YAML indentation must use spaces",
    "yaml-syntax": "the file is not well-formed YAML",
    "yaml-too-deep": "nesting deeper than the bound",
    "yaml-aliases": "more anchors/aliases than the bound",
    "yaml-too-many-nodes": "more YAML nodes than the bound",
    "yaml-complex-key": "a mapping key that is not a plain string",
    "yaml-tag": "an explicit YAML tag, which plans do not use",
    "yaml-multiple-documents": "more than one YAML document in the file",
    "duplicate-key": "the same key twice in one mapping",
    "yaml-merge-key": "a YAML merge key ('<<'), which readers disagree on and plans do not use",
    "yaml11-bool": "an unquoted yes/no/on/off where text is expected",
    "yaml11-sexagesimal": "an unquoted 08:00-style value that YAML 1.1 reads as a number",
    "yaml11-number-form": "a number in a form that YAML versions read differently",
    "number-comma": "a number written with a comma",
    # structure
    "not-a-mapping": "the plan (or a section of it) is not a mapping",
    "format-version": "the planpack format version is missing or unsupported",
    "missing-key": "a required key is missing",
    "unknown-key": "a key the format does not have",
    "wrong-type": "a value of the wrong type",
    "empty-value": "a value that is empty where one is required",
    "out-of-range": "a number outside its allowed range",
    "bad-choice": "a value that is not one of the allowed choices",
    "bad-slug": "an id that is not a slug (lowercase letters, digits, '-')",
    "bad-date": "a value that is not a calendar date",
    "bad-url": "a URL that is not http(s)",
    "not-for-kind": "a key that does not apply to this kind of antenna",
    # values and cross-references
    "date-order": "valid.from is after valid.to",
    "unknown-timezone": "a time zone that is not in the IANA database",
    "solar-range": "a solar index outside its range, or a range given backwards",
    "bad-locator": "a Maidenhead locator that is not well formed",
    "freq-out-of-band": "a channel outside the HF band (1.5 to 30 MHz)",
    "freq-duplicate": "the same frequency assigned twice",
    "freq-too-close": "two channels closer than 3 kHz",
    "bad-hours": "authorised hours not in HH:MM-HH:MM form",
    "bad-address": "an ALE address that MIL-STD-188-141 does not allow",
    "address-duplicate": "the same self address on two stations",
    "address-clash": "the net address equals a self address",
    "unknown-reference": "an id that names nothing in the plan",
    "duplicate-id": "the same id twice in a list",
    "control-station": "not exactly one control station for a hub net",
    "bad-link": "a link that joins a station to itself, or twice",
    "unused-antenna": "an antenna that no station uses",
    "unknown-mode": "a channel mode that is neither built in nor declared",
    "clock-change": "the UTC offset of the net's time zone changes inside the validity period",
    "plan-too-large": "more links, predictions or antenna solutions than planpack's size bounds",
    "bad-request": "a request section whose bands, exclusions or step leave nothing to ask for",
    # analysis results reported by check (filled in by later passes)
    "channel-gap": "hours where no assigned channel serves a link",
    "antenna-loss": "much of the set's power lost before the antenna a station rigs on a channel (matching, feedline or ground)",
    "antenna-geometry": "an antenna that cannot be hung as written (wire ends below the safe minimum or the ground)",
    "antenna-ends-low": "antenna wire ends below the 2 m safe minimum height",
    "antenna-solve-failed": "the NEC solver failed, or its process stopped, on an antenna",
    "antenna-unreliable": "NEC gives a non-physical result for an antenna on an assigned channel",
    "nvis-height": "a dipole hung outside the NVIS height window",
    "nvis-whip": "a whip used alone on an NVIS net",
    "wasted-channel": "a channel that serves no link at any hour",
    "atmospheric-noise": "lightning noise probably rules a receiving site at some hours",
    "high-latitude": "stations in the auroral zone or the polar cap, whose absorption the predictions leave out",
    "exposure-clearance": "an RF exposure distance larger than the clearance the plan gives for a station",
    # publishing
    "cards-layout": "content the field cards cannot lay out at the card size (reported by build and cards)",
}


@dataclass(frozen=True, order=True)
class Diagnostic:
    """One problem found in a plan.

    ``line`` and ``column`` are 1-based; 0 means "the whole file".
    ``key`` is the dotted key path (``stations.ops.power_w``) or ``""``.
    """

    file: str
    line: int
    column: int
    severity: str
    code: str
    key: str
    message: str = field(compare=False)

    def __post_init__(self) -> None:
        if self.code not in CODES:  # a programming error, caught by the tests
            raise ValueError(f"undeclared diagnostic code {self.code!r}")
        if self.severity not in (ERROR, WARNING):
            raise ValueError(f"bad severity {self.severity!r}")

    def format(self) -> str:
        """One line for a terminal; control and bidi characters from the plan are shown escaped."""
        return printable(f"{self.file}:{self.line}:{self.column}: {self.severity} {self.code}: {self.message}")

    def to_dict(self) -> dict:
        return {
            "file": self.file,
            "line": self.line,
            "column": self.column,
            "severity": self.severity,
            "code": self.code,
            "key": self.key,
            "message": self.message,
        }


# C0/C1 controls (an ESC could retitle or rewrite the user's terminal) and the bidi
# overrides that make text read differently from what it is.
_UNPRINTABLE = re.compile("[\x00-\x1f\x7f-\x9f\u202a-\u202e\u2066-\u2069]")


def printable(text: str) -> str:
    """``text`` with control and bidi characters shown as escapes (\\x1b, \\u202e), safe for a terminal or CI log."""
    return _UNPRINTABLE.sub(lambda m: f"\\x{ord(m[0]):02x}" if ord(m[0]) < 0x100 else f"\\u{ord(m[0]):04x}", text)



class Collector:
    """Accumulates diagnostics for one file."""

    def __init__(self, file: str) -> None:
        self.file = file
        self.items: list[Diagnostic] = []

    def add(self, severity: str, code: str, key: str, message: str, line: int = 0, column: int = 0) -> None:
        self.items.append(Diagnostic(self.file, line, column, severity, code, key, message))

    def error(self, code: str, key: str, message: str, at=None) -> None:
        line, col = (at.line, at.col) if at is not None else (0, 0)
        self.add(ERROR, code, key, message, line, col)

    def warning(self, code: str, key: str, message: str, at=None) -> None:
        line, col = (at.line, at.col) if at is not None else (0, 0)
        self.add(WARNING, code, key, message, line, col)

    @property
    def has_errors(self) -> bool:
        return any(d.severity == ERROR for d in self.items)

    def sorted(self) -> list[Diagnostic]:
        return sorted(self.items)
