"""QR codes on the cards: what they carry, and drawing them as plain squares.

The code is drawn as a 1-bit image, one pixel a module (no text, no font of
any kind), with the four-module quiet zone the QR standard (ISO/IEC 18004)
asks for.
"""

from __future__ import annotations

import functools

import qrcode
import qrcode.constants

QUIET_MODULES = 4  # ISO/IEC 18004 quiet zone


def net_page_url(base_url: str, net_id: str) -> str:
    """The net's page on the site: base_url, then the net id and a slash."""
    return base_url.rstrip("/") + "/" + net_id + "/"


def _runs(hours: list[dict]) -> list[tuple[int, int, str | None]]:
    """Runs of equal first channel over the UTC day: (first hour, last hour, channel)."""
    out: list[tuple[int, int, str | None]] = []
    for h in hours:
        if out and out[-1][2] == h["first"]:
            out[-1] = (out[-1][0], h["utc_hour"], h["first"])
        else:
            out.append((h["utc_hour"], h["utc_hour"], h["first"]))
    return out


def hour_spans(hours: list[int]) -> str:
    """UTC hours as spans, wrapping midnight: [0, 1, 2, 22, 23] -> "22-02"."""
    hs = sorted(set(hours))
    if not hs:
        return ""
    runs: list[list[int]] = []
    for h in hs:
        if runs and h == runs[-1][1] + 1:
            runs[-1][1] = h
        else:
            runs.append([h, h])
    if len(runs) > 1 and runs[0][0] == 0 and runs[-1][1] == 23:
        runs[0][0] = runs[-1][0]
        runs.pop()
    return ", ".join(f"{a:02d}" if a == b else f"{a:02d}-{b:02d}" for a, b in runs)


def offline_text(data: dict, station: dict | None) -> str:
    """What the code carries when the plan has no base_url: the revision and the key figures.

    One line per item, plain ASCII-safe text a phone shows as is.
    """
    net = data["net"]
    lines = [f"planpack net {net['id']} rev {data['revision']['id']}",
             f"valid {net['valid']['from']} to {net['valid']['to']}"]
    if station is not None:
        lines.append(f"station {station['id']} self {station['address']}")
    if net.get("net_address"):
        lines.append(f"net address {net['net_address']}")
    kinds = {c["id"]: c for c in data["channels"]}
    parts = []
    for a, b, ch in _runs(data["net_schedule"]["hours"]):
        span = f"{a:02d}" if a == b else f"{a:02d}-{b:02d}"
        parts.append(f"{span} {ch} {kinds[ch]['freq_khz']:g}" if ch else f"{span} none")
    lines.append("UTC first: " + ", ".join(parts))
    return "\n".join(lines)


def payload(data: dict, station: dict | None) -> str:
    base = data["net"].get("base_url")
    if base:
        return net_page_url(base, data["net"]["id"])
    return offline_text(data, station)


@functools.lru_cache(maxsize=64)
def matrix(text: str) -> tuple[tuple[bool, ...], ...]:
    """The QR modules (True = dark), quiet zone included; made once per text (choosing the mask is slow)."""
    code = qrcode.QRCode(error_correction=qrcode.constants.ERROR_CORRECT_M, border=QUIET_MODULES, box_size=1)
    code.add_data(text.encode("utf-8"))
    code.make(fit=True)
    return tuple(tuple(row) for row in code.get_matrix())


@functools.lru_cache(maxsize=64)
def image(text: str):
    """The code as a 1-bit image, one pixel a module (quiet zone included); made once per text."""
    from PIL import Image

    m = matrix(text)
    n = len(m)
    img = Image.new("1", (n, n), 1)
    img.putdata([0 if dark else 1 for row in m for dark in row])
    from reportlab.lib.utils import ImageReader

    return ImageReader(img)


def draw(canvas, text: str, x: float, y: float, size: float) -> None:
    """Draw the QR code for text with its lower-left corner at (x, y), size x size points.

    One image with a pixel a module, scaled up: a viewer or printer that does
    not smooth images (reportlab writes no /Interpolate, so none should) shows
    square modules with sharp edges, and the page holds one small image
    instead of hundreds of rectangles.
    """
    canvas.drawImage(image(text), x, y, size, size)
