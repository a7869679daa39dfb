"""Embedded TrueType fonts for the field cards.

Every glyph on a card comes from a TrueType file that reportlab embeds (as a
subset, ``FontFile2``), never from the unembedded base-14 PostScript fonts.

The family is DejaVu Sans, chosen for its wide Unicode coverage (station names
with Czech, Polish, Greek or Cyrillic letters print as letters, not boxes) and
its open, high-contrast shapes that stay legible at small sizes:

- regular and bold from Debian's ``fonts-dejavu-core``,
- oblique and bold oblique from Debian's ``fonts-dejavu-extra``
  (both packages are on the project's machines; ``.ci/run`` installs them).

``PLANPACK_FONT_DIR`` names another folder holding the same four DejaVu file
names. When no DejaVu is found the cards fall back to Bitstream Vera, the
ancestor of DejaVu that reportlab itself ships (Latin-1 coverage only), and
:func:`font_source` says so, so that the command can warn: nothing changes
silently.
"""

from __future__ import annotations

import os
from dataclasses import dataclass

from reportlab.lib.fonts import addMapping
from reportlab.pdfbase import pdfmetrics
from reportlab.pdfbase.ttfonts import TTFont

#: The names the card code uses; the files behind them are chosen below.
REGULAR, BOLD, OBLIQUE, BOLD_OBLIQUE = "Card-Regular", "Card-Bold", "Card-Oblique", "Card-BoldOblique"
FAMILY = "Card"

_DEJAVU = {REGULAR: "DejaVuSans.ttf", BOLD: "DejaVuSans-Bold.ttf",
           OBLIQUE: "DejaVuSans-Oblique.ttf", BOLD_OBLIQUE: "DejaVuSans-BoldOblique.ttf"}
_VERA = {REGULAR: "Vera.ttf", BOLD: "VeraBd.ttf", OBLIQUE: "VeraIt.ttf", BOLD_OBLIQUE: "VeraBI.ttf"}
_DEBIAN_DIRS = ("/usr/share/fonts/truetype/dejavu",)


@dataclass(frozen=True)
class FontSource:
    name: str  # "DejaVu Sans" or "Bitstream Vera (reportlab)"
    folder: str
    full_unicode: bool  # False: Latin-1 only


_registered: FontSource | None = None


def _reportlab_font_dir() -> str:
    import reportlab

    return os.path.join(os.path.dirname(reportlab.__file__), "fonts")


def _find() -> tuple[FontSource, dict[str, str]]:
    dirs = [os.environ["PLANPACK_FONT_DIR"]] if os.environ.get("PLANPACK_FONT_DIR") else []
    for folder in dirs + list(_DEBIAN_DIRS):
        paths = {k: os.path.join(folder, f) for k, f in _DEJAVU.items()}
        if all(os.path.isfile(p) for p in paths.values()):
            return FontSource("DejaVu Sans", folder, True), paths
    folder = _reportlab_font_dir()
    return FontSource("Bitstream Vera (reportlab)", folder, False), {k: os.path.join(folder, f) for k, f in _VERA.items()}


def register() -> FontSource:
    """Register the card fonts with reportlab once per process; return where they came from."""
    global _registered
    if _registered is None:
        source, paths = _find()
        for name, path in paths.items():
            pdfmetrics.registerFont(TTFont(name, path))
        # So that <b> and <i> in Paragraph markup pick the embedded faces.
        addMapping(FAMILY, 0, 0, REGULAR)
        addMapping(FAMILY, 1, 0, BOLD)
        addMapping(FAMILY, 0, 1, OBLIQUE)
        addMapping(FAMILY, 1, 1, BOLD_OBLIQUE)
        _registered = source
    return _registered


def font_source() -> FontSource:
    return register()


def missing_glyphs(text: str, font: str = REGULAR) -> list[str]:
    """Characters of text the card font has no glyph for (they would print as boxes)."""
    register()
    face = pdfmetrics.getFont(font).face
    cmap = face.charToGlyph
    return sorted({ch for ch in text if ord(ch) not in cmap and ch not in "\n\t"})
