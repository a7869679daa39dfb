"""Hand-built SVG charts for the site: map, SWR, elevation pattern, hanging sketch.

Every chart is a pure function of figures already in the compiled plan and
returns the SVG document as text. The charts must read in black and white:
curves differ by dash pattern and carry their names beside them, markers
differ by shape, and shaded areas use hatching. Numbers are written with a
fixed precision so the same plan always gives the same bytes. Styling uses
SVG presentation attributes only (no ``style`` attributes), which the site's
Content-Security-Policy allows.
"""

from __future__ import annotations

import math
from xml.sax.saxutils import escape as _xml_escape

INK = "#1b1f24"
MUTED = "#5b636b"
FAINT = "#c9ced3"
ACCENT = "#1f4e79"
PAPER = "#ffffff"
FONT = "system-ui, -apple-system, 'Segoe UI', Roboto, 'DejaVu Sans', sans-serif"

#: A kilometre per degree of latitude, mean value used only to draw the scale bar [km/deg].
KM_PER_DEG = 111.2


def esc(text: object) -> str:
    """Text escaped for SVG character data and attribute values."""
    return _xml_escape(str(text), {'"': "&quot;", "'": "&#39;"})


def f1(x: float) -> str:
    """A coordinate with one decimal, never '-0.0'."""
    s = f"{x:.1f}"
    return "0.0" if s == "-0.0" else s


def nice_step(span: float, target: int) -> float:
    """A 1-2-5 step that cuts span into about target parts."""
    if span <= 0:
        return 1.0
    raw = span / max(target, 1)
    mag = 10 ** math.floor(math.log10(raw))
    for m in (1, 2, 2.5, 5, 10):
        if raw <= m * mag:
            return m * mag
    return 10 * mag


def _head(width: int, height: int, title: str, desc: str, uid: str) -> list[str]:
    return [
        f'<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 {width} {height}" width="{width}" height="{height}" '
        f'role="img" aria-labelledby="{uid}-t {uid}-d" font-family="{esc(FONT)}" font-size="12" fill="{INK}">',
        f'<title id="{uid}-t">{esc(title)}</title>',
        f'<desc id="{uid}-d">{esc(desc)}</desc>',
        f'<rect x="0" y="0" width="{width}" height="{height}" fill="{PAPER}"/>',
    ]


def _hatch(pid: str, spacing: int = 6) -> str:
    return (f'<defs><pattern id="{pid}" patternUnits="userSpaceOnUse" width="{spacing}" height="{spacing}" '
            f'patternTransform="rotate(45)"><line x1="0" y1="0" x2="0" y2="{spacing}" stroke="{MUTED}" '
            f'stroke-width="1"/></pattern></defs>')


def _text(x: float, y: float, s: object, *, anchor: str = "start", size: int | None = None,
          weight: str | None = None, fill: str | None = None, halo: bool = False) -> str:
    attrs = f'x="{f1(x)}" y="{f1(y)}"'
    if anchor != "start":
        attrs += f' text-anchor="{anchor}"'
    if size:
        attrs += f' font-size="{size}"'
    if weight:
        attrs += f' font-weight="{weight}"'
    if fill:
        attrs += f' fill="{fill}"'
    if halo:
        attrs += f' stroke="{PAPER}" stroke-width="3" stroke-linejoin="round" paint-order="stroke"'
    return f"<text {attrs}>{esc(s)}</text>"


# --------------------------------------------------------------------------- map

def station_map(stations: list[dict], links: list[dict], *, title: str, uid: str = "map",
                width: int = 720, height: int = 440) -> str:
    """Stations and link lines on an equirectangular plot centred on the net.

    stations: dicts with id, name, lat_deg [deg], lon_deg [deg], role.
    links: dicts with from, to (station ids) and distance_km [km].
    """
    pad_l, pad_r, pad_t, pad_b = 54, 24, 24, 46
    lats = [s["lat_deg"] for s in stations] or [0.0]
    lons = [s["lon_deg"] for s in stations] or [0.0]
    lat0 = (max(lats) + min(lats)) / 2
    k = max(math.cos(math.radians(lat0)), 0.05)  # equirectangular: x shrinks by cos(lat0)
    span_x = max((max(lons) - min(lons)) * k, 0.5)
    span_y = max(max(lats) - min(lats), 0.5)
    span_x, span_y = span_x * 1.3, span_y * 1.3
    plot_w, plot_h = width - pad_l - pad_r, height - pad_t - pad_b
    scale = min(plot_w / span_x, plot_h / span_y)  # px per degree of latitude
    cx_deg = (max(lons) + min(lons)) / 2

    def xy(lat: float, lon: float) -> tuple[float, float]:
        return (pad_l + plot_w / 2 + (lon - cx_deg) * k * scale, pad_t + plot_h / 2 - (lat - lat0) * scale)

    lon_lo = cx_deg - plot_w / 2 / (k * scale)
    lon_hi = cx_deg + plot_w / 2 / (k * scale)
    lat_lo = lat0 - plot_h / 2 / scale
    lat_hi = lat0 + plot_h / 2 / scale
    by_id = {s["id"]: s for s in stations}
    desc = ("Map of the stations: " + "; ".join(
        f"{s['name']} ({s['id']}) at {s['lat_deg']:.4f}, {s['lon_deg']:.4f}" for s in stations)
        + ". Lines join the stations of each link" + (", labelled with the distance in km." if links else "."))
    out = _head(width, height, title, desc, uid)
    out.append(f'<rect x="{pad_l}" y="{pad_t}" width="{plot_w}" height="{plot_h}" fill="none" stroke="{FAINT}"/>')
    # graticule
    step = nice_step(max(lat_hi - lat_lo, lon_hi - lon_lo), 5)
    g = math.ceil(lat_lo / step) * step
    while g <= lat_hi:
        _, y = xy(g, cx_deg)
        out.append(f'<line x1="{pad_l}" y1="{f1(y)}" x2="{pad_l + plot_w}" y2="{f1(y)}" stroke="{FAINT}" stroke-dasharray="2 4"/>')
        out.append(_text(pad_l - 4, y + 4, f"{abs(g):g}°{'N' if g >= 0 else 'S'}", anchor="end", size=10, fill=MUTED))
        g += step
    g = math.ceil(lon_lo / step) * step
    while g <= lon_hi:
        x, _ = xy(lat0, g)
        out.append(f'<line x1="{f1(x)}" y1="{pad_t}" x2="{f1(x)}" y2="{pad_t + plot_h}" stroke="{FAINT}" stroke-dasharray="2 4"/>')
        out.append(_text(x, pad_t + plot_h + 13, f"{abs(g):g}°{'E' if g >= 0 else 'W'}", anchor="middle", size=10, fill=MUTED))
        g += step
    # links
    label_links = len(links) <= 12
    for ln in links:
        a, b = by_id.get(ln["from"]), by_id.get(ln["to"])
        if a is None or b is None:
            continue
        x1, y1 = xy(a["lat_deg"], a["lon_deg"])
        x2, y2 = xy(b["lat_deg"], b["lon_deg"])
        out.append(f'<line x1="{f1(x1)}" y1="{f1(y1)}" x2="{f1(x2)}" y2="{f1(y2)}" stroke="{MUTED}" stroke-width="1.5"/>')
        if label_links:
            out.append(_text((x1 + x2) / 2, (y1 + y2) / 2 - 3, f"{ln['distance_km']:.0f} km", anchor="middle",
                             size=10, fill=MUTED, halo=True))
    # stations: control a square, members a circle
    for s in stations:
        x, y = xy(s["lat_deg"], s["lon_deg"])
        if s.get("role") == "control":
            out.append(f'<rect x="{f1(x - 6)}" y="{f1(y - 6)}" width="12" height="12" fill="{INK}"/>')
        else:
            out.append(f'<circle cx="{f1(x)}" cy="{f1(y)}" r="5" fill="{PAPER}" stroke="{INK}" stroke-width="2"/>')
        right = x < pad_l + plot_w - 120
        label = s["id"] + (" (control)" if s.get("role") == "control" else "")
        out.append(_text(x + 9 if right else x - 9, y + 4, label, anchor="start" if right else "end",
                         weight="600", halo=True))
    # scale bar: a 1-2-5 length near a quarter of the plot width
    km_per_px = KM_PER_DEG / scale
    bar_km = nice_step(plot_w * km_per_px / 4, 1)
    bar_px = bar_km / km_per_px
    bx, by = pad_l, height - 14
    out.append(f'<line x1="{bx}" y1="{by}" x2="{f1(bx + bar_px)}" y2="{by}" stroke="{INK}" stroke-width="3"/>')
    out.append(f'<line x1="{bx}" y1="{by - 5}" x2="{bx}" y2="{by + 3}" stroke="{INK}" stroke-width="1.5"/>')
    out.append(f'<line x1="{f1(bx + bar_px)}" y1="{by - 5}" x2="{f1(bx + bar_px)}" y2="{by + 3}" stroke="{INK}" stroke-width="1.5"/>')
    out.append(_text(bx + bar_px + 6, by + 4, f"{bar_km:g} km", size=11))
    out.append(_text(width - pad_r, height - 10, "north up; ■ control, ○ member; equirectangular",
                     anchor="end", size=10, fill=MUTED))
    out.append("</svg>")
    return "\n".join(out) + "\n"


# --------------------------------------------------------------- frequency window

# ------------------------------------------------------------------------- SWR

def swr_chart(rows: list[dict], *, title: str, uid: str = "swr", width: int = 640, height: int = 300) -> str:
    """SWR of one antenna on each channel, channels in plan order along the bottom.

    rows: dicts with channel, freq_khz [kHz], swr [ratio], swr_text (as printed, "> 50:1" above 50:1),
    swr_class (fine|tuner|poor).
    The marker's shape carries the class: filled circle fine, open triangle tuner, cross poor.
    """
    pad_l, pad_r, pad_t, pad_b = 44, 16, 16, 56
    plot_w, plot_h = width - pad_l - pad_r, height - pad_t - pad_b
    worst = max([r["swr"] for r in rows] + [3.5])
    ymax = 5.0 if worst <= 5 else 10.0
    n = max(len(rows), 1)
    col = plot_w / n

    def y_of(s: float) -> float:
        return pad_t + plot_h - (min(s, ymax) - 1) / (ymax - 1) * plot_h

    out = [f'<rect x="{pad_l}" y="{pad_t}" width="{plot_w}" height="{plot_h}" fill="none" stroke="{FAINT}"/>']
    for s in range(1, int(ymax) + 1):
        y = y_of(s)
        dash = ' stroke-dasharray="6 3"' if s in (2, 3) else ""
        colour, w = (INK, 1.0) if s in (2, 3) else (FAINT, 0.6)
        out.append(f'<line x1="{pad_l}" y1="{f1(y)}" x2="{pad_l + plot_w}" y2="{f1(y)}" stroke="{colour}" stroke-width="{w}"{dash}/>')
        out.append(_text(pad_l - 5, y + 4, f"{s}:1", anchor="end", size=10, fill=MUTED))
    pts = []
    for i, r in enumerate(rows):
        x = pad_l + (i + 0.5) * col
        y = y_of(r["swr"])
        pts.append((x, y))
        out.append(_text(x, pad_t + plot_h + 14, r["channel"], anchor="middle", size=10, weight="600"))
        out.append(_text(x, pad_t + plot_h + 27, f"{r['freq_khz'] / 1000:.3f}", anchor="middle", size=9, fill=MUTED))
    if len(pts) > 1:
        d = " ".join(("M" if j == 0 else "L") + f"{f1(x)} {f1(y)}" for j, (x, y) in enumerate(pts))
        out.append(f'<path d="{d}" fill="none" stroke="{MUTED}" stroke-width="1"/>')
    for (x, y), r in zip(pts, rows):
        cls = r["swr_class"]
        if cls == "fine":
            out.append(f'<circle cx="{f1(x)}" cy="{f1(y)}" r="5" fill="{INK}"/>')
        elif cls == "tuner":
            out.append(f'<path d="M{f1(x)} {f1(y - 6)} L{f1(x + 6)} {f1(y + 5)} L{f1(x - 6)} {f1(y + 5)} Z" fill="{PAPER}" stroke="{INK}" stroke-width="1.6"/>')
        else:
            out.append(f'<path d="M{f1(x - 5)} {f1(y - 5)} L{f1(x + 5)} {f1(y + 5)} M{f1(x + 5)} {f1(y - 5)} L{f1(x - 5)} {f1(y + 5)}" stroke="{INK}" stroke-width="2.4"/>')
        shown = str(r.get("swr_text") or "").removesuffix(":1")
        above = "▲" if r["swr"] > ymax else ""
        out.append(_text(x, y - 9, above + shown, anchor="middle", size=10, halo=True))
    ky = height - 10
    out.append(f'<circle cx="{pad_l + 5}" cy="{ky - 4}" r="5" fill="{INK}"/>')
    out.append(_text(pad_l + 14, ky, "fine", size=10))
    out.append(f'<path d="M{pad_l + 65} {ky - 10} L{pad_l + 71} {ky + 1} L{pad_l + 59} {ky + 1} Z" fill="{PAPER}" stroke="{INK}" stroke-width="1.6"/>')
    out.append(_text(pad_l + 76, ky, "needs a tuner", size=10))
    out.append(f'<path d="M{pad_l + 160} {ky - 9} L{pad_l + 170} {ky + 1} M{pad_l + 170} {ky - 9} L{pad_l + 160} {ky + 1}" stroke="{INK}" stroke-width="2.4"/>')
    out.append(_text(pad_l + 176, ky, "poor", size=10))
    out.append(_text(pad_l + plot_w, ky, "dashed lines: 2:1 and 3:1", anchor="end", size=10, fill=MUTED))
    desc = "SWR on each channel: " + "; ".join(f"{r['channel']} {r.get('swr_text')} ({r['swr_class']})" for r in rows) + "."
    return "\n".join(_head(width, height, title, desc, uid) + out + ["</svg>"]) + "\n"


# ------------------------------------------------------------ elevation pattern

def elevation_patterns(patterns: list[dict], freqs_khz: dict[str, float], *, title: str, uid: str = "pat",
                       cell_w: int = 200, cell_h: int = 150, columns: int = 4) -> str:
    """Elevation patterns as small quarter-circle plots, one per channel.

    patterns: dicts with channel and gain_dbi (gain at 0, 1, ... 90 degrees elevation [dBi]).
    The radius is gain on a 30 dB scale below the largest gain of all panels; the
    sector above 60 degrees (where near-vertical signals arrive) is hatched.
    """
    n = max(len(patterns), 1)
    cols = min(columns, n)
    rows_n = math.ceil(n / cols)
    width, height = cols * cell_w, rows_n * cell_h + 22
    all_gains = [g for p in patterns for g in p["gain_dbi"]] or [0.0]
    gmax = math.ceil(max(all_gains) / 5) * 5
    gmin = gmax - 30
    out = [_hatch(f"{uid}-hatch", 5)]
    descs = []
    for k, p in enumerate(patterns):
        ox = (k % cols) * cell_w
        oy = (k // cols) * cell_h
        r0 = min(cell_w - 40, cell_h - 44)
        cx, cy = ox + 20, oy + cell_h - 16

        def pt(el_deg: float, g: float) -> tuple[float, float]:
            r = max(g - gmin, 0) / (gmax - gmin) * r0
            a = math.radians(el_deg)
            return cx + r * math.cos(a), cy - r * math.sin(a)

        # 60-90 degree sector, hatched
        x60, y60 = cx + r0 * math.cos(math.radians(60)), cy - r0 * math.sin(math.radians(60))
        out.append(f'<path d="M{f1(cx)} {f1(cy)} L{f1(x60)} {f1(y60)} A{r0} {r0} 0 0 0 {f1(cx)} {f1(cy - r0)} Z" fill="url(#{uid}-hatch)" opacity="0.5"/>')
        for ring in (0, 10, 20):
            rr = (gmax - ring - gmin) / (gmax - gmin) * r0
            out.append(f'<path d="M{f1(cx + rr)} {f1(cy)} A{f1(rr)} {f1(rr)} 0 0 0 {f1(cx)} {f1(cy - rr)}" fill="none" stroke="{FAINT}" stroke-width="0.8"/>')
            out.append(_text(cx + rr, cy + 11, f"{gmax - ring:g}", anchor="middle", size=9, fill=MUTED))
        for el in (30, 60):
            x, y = pt(el, gmax)
            out.append(f'<line x1="{f1(cx)}" y1="{f1(cy)}" x2="{f1(x)}" y2="{f1(y)}" stroke="{FAINT}" stroke-width="0.8"/>')
            out.append(_text(x + 2, y - 2, f"{el}°", size=9, fill=MUTED))
        out.append(f'<line x1="{cx}" y1="{cy}" x2="{f1(cx + r0)}" y2="{cy}" stroke="{MUTED}"/>')
        out.append(f'<line x1="{cx}" y1="{cy}" x2="{cx}" y2="{f1(cy - r0)}" stroke="{MUTED}"/>')
        gains = p["gain_dbi"]
        step = 90 / max(len(gains) - 1, 1)
        d = " ".join(("M" if j == 0 else "L") + "{} {}".format(*map(f1, pt(j * step, g))) for j, g in enumerate(gains))
        out.append(f'<path d="{d}" fill="none" stroke="{INK}" stroke-width="2"/>')
        peak = max(gains) if gains else 0.0
        zen = gains[-1] if gains else 0.0
        khz = freqs_khz.get(p["channel"])
        label = p["channel"] + (f" {khz:g} kHz" if khz is not None else "")
        out.append(_text(ox + cell_w - 8, oy + 16, label, anchor="end", size=11, weight="600"))
        out.append(_text(ox + cell_w - 8, oy + 30, f"peak {peak:.1f} dBi", anchor="end", size=9, fill=MUTED))
        out.append(_text(ox + cell_w - 8, oy + 42, f"overhead {zen:.1f} dBi", anchor="end", size=9, fill=MUTED))
        descs.append(f"{label}: peak {peak:.1f} dBi, straight up {zen:.1f} dBi")
    out.append(_text(8, height - 6, f"radius: gain in dBi (rings {gmax:g}, {gmax - 10:g}, {gmax - 20:g}); "
                     "hatched: 60-90° elevation, the near-vertical sector", size=10, fill=MUTED))
    desc = "Elevation patterns, one quarter-circle per channel. " + "; ".join(descs) + "."
    return "\n".join(_head(width, height, title, desc, uid) + out + ["</svg>"]) + "\n"


# --------------------------------------------------------------- hanging sketch

def _fmt_m(x: float | None) -> str:
    return "?" if x is None else f"{x:.2f} m"


def antenna_sketch(kind: str, *, title: str, height_m: float | None, cut: dict | None, uid: str = "sk",
                   width: int = 560, height: int = 240) -> str:
    """A side-view sketch of how the antenna hangs, not to scale, labelled with the cut figures [m]."""
    cut = cut or {}
    gy = height - 40
    out = [_hatch(f"{uid}-ground", 7),
           f'<rect x="10" y="{gy}" width="{width - 20}" height="14" fill="url(#{uid}-ground)"/>',
           f'<line x1="10" y1="{gy}" x2="{width - 10}" y2="{gy}" stroke="{INK}" stroke-width="1.5"/>']
    top = 50
    mid = width / 2

    def mast(x: float, y_top: float) -> None:
        out.append(f'<line x1="{f1(x)}" y1="{f1(y_top)}" x2="{f1(x)}" y2="{gy}" stroke="{MUTED}" stroke-width="4"/>')

    def feed(x: float, y: float) -> None:
        out.append(f'<rect x="{f1(x - 7)}" y="{f1(y - 5)}" width="14" height="10" fill="{PAPER}" stroke="{INK}" stroke-width="1.5"/>')
        out.append(f'<path d="M{f1(x)} {f1(y + 5)} C{f1(x)} {f1(y + 60)} {f1(x + 40)} {gy - 20} {f1(x + 60)} {gy}" fill="none" stroke="{INK}" stroke-width="1.5" stroke-dasharray="5 2"/>')
        out.append(_text(x + 64, gy - 6, "coax to the set", size=10, fill=MUTED))

    def height_dim(x: float, y: float, label: str) -> None:
        out.append(f'<line x1="{f1(x)}" y1="{f1(y)}" x2="{f1(x)}" y2="{gy}" stroke="{INK}" stroke-width="0.8" stroke-dasharray="3 2"/>')
        out.append(f'<path d="M{f1(x - 4)} {f1(y + 6)} L{f1(x)} {f1(y)} L{f1(x + 4)} {f1(y + 6)} M{f1(x - 4)} {gy - 6} L{f1(x)} {gy} L{f1(x + 4)} {gy - 6}" fill="none" stroke="{INK}" stroke-width="0.8"/>')
        out.append(_text(x + 6, (y + gy) / 2, label, size=11, halo=True))

    def insulator(x: float, y: float) -> None:
        out.append(f'<circle cx="{f1(x)}" cy="{f1(y)}" r="3.5" fill="{PAPER}" stroke="{INK}" stroke-width="1.5"/>')

    if kind == "inverted-v":
        end_y = gy - 50
        mast(mid, top - 8)
        out.append(f'<path d="M{f1(mid)} {top} L90 {end_y} M{f1(mid)} {top} L{width - 90} {end_y}" stroke="{INK}" stroke-width="2.2" fill="none"/>')
        for x in (90, width - 90):
            insulator(x, end_y)
            out.append(f'<line x1="{x}" y1="{end_y}" x2="{x + (-30 if x < mid else 30)}" y2="{gy}" stroke="{MUTED}" stroke-dasharray="2 3"/>')
        feed(mid, top)
        out.append(_text((mid + 90) / 2 - 10, (top + end_y) / 2 - 8, f"leg {_fmt_m(cut.get('leg_m'))}", anchor="end", size=11, halo=True))
        height_dim(mid - 40, top, f"apex {_fmt_m(height_m)}")
        if cut.get("end_height_m") is not None:
            height_dim(width - 60, end_y, f"ends {_fmt_m(cut.get('end_height_m'))}")
        note = "one mast; legs slope down to insulators and non-conducting ropes"
    elif kind == "whip":
        base_y = gy - 10
        out.append(f'<line x1="{f1(mid)}" y1="{top}" x2="{f1(mid)}" y2="{base_y}" stroke="{INK}" stroke-width="3"/>')
        out.append(f'<rect x="{f1(mid - 12)}" y="{base_y}" width="24" height="10" fill="{PAPER}" stroke="{INK}"/>')
        out.append(_text(mid + 18, base_y + 8, "tuner / mount", size=10, fill=MUTED))
        out.append(f'<path d="M{f1(mid)} {gy} L{f1(mid - 160)} {gy + 10} M{f1(mid)} {gy} L{f1(mid + 160)} {gy + 10}" stroke="{MUTED}" stroke-dasharray="4 2"/>')
        height_dim(mid - 50, top, f"whip {_fmt_m(cut.get('total_m'))}")
        note = "vertical whip on its mount; bond the mount to the ground system"
    elif kind == "folded-terminated":
        y1, y2 = top + 10, top + 34
        mast(70, y1 - 8)
        mast(width - 70, y1 - 8)
        out.append(f'<path d="M70 {y1} L{width - 70} {y1} L{width - 70} {y2} L70 {y2} Z" fill="none" stroke="{INK}" stroke-width="2"/>')
        out.append(f'<rect x="{f1(mid - 14)}" y="{y2 - 5}" width="28" height="10" fill="{PAPER}" stroke="{INK}" stroke-width="1.5"/>')
        out.append(_text(mid, y2 + 20, "terminating resistor", anchor="middle", size=10, fill=MUTED))
        feed(90, y1)
        out.append(_text(mid, y1 - 8, f"length {_fmt_m(cut.get('total_m'))}", anchor="middle", size=11, halo=True))
        height_dim(width - 110, y1, f"height {_fmt_m(height_m)}")
        note = "two parallel wires joined at the ends; feed at one side, resistor opposite"
    else:  # dipole, dipole-reflector
        y = top + 10
        mast(60, y - 8)
        mast(width - 60, y - 8)
        out.append(f'<line x1="66" y1="{y}" x2="{width - 66}" y2="{y}" stroke="{INK}" stroke-width="2.2"/>')
        insulator(66, y)
        insulator(width - 66, y)
        feed(mid, y)
        out.append(_text((66 + mid) / 2, y - 8, f"leg {_fmt_m(cut.get('leg_m'))}", anchor="middle", size=11, halo=True))
        out.append(_text((mid + width - 66) / 2, y - 8, f"leg {_fmt_m(cut.get('leg_m'))}", anchor="middle", size=11, halo=True))
        height_dim(110, y, f"height {_fmt_m(height_m)}")
        note = "flat-top between two masts; centre feed, insulators at both ends"
        if kind == "dipole-reflector":
            below = cut.get("reflector_below_m")
            ry = y + (gy - y) * 0.55
            out.append(f'<line x1="100" y1="{f1(ry)}" x2="{width - 100}" y2="{f1(ry)}" stroke="{INK}" stroke-width="1.8" stroke-dasharray="10 4"/>')
            out.append(_text(width - 104, ry + 16, f"reflector {_fmt_m(cut.get('reflector_m'))}, {_fmt_m(below)} below", anchor="end", size=11, halo=True))
            note = "flat-top between two masts with a reflector wire stretched below it"
    out.append(_text(12, height - 8, "Not to scale. " + note + ".", size=10, fill=MUTED))
    desc = f"Side view of a {kind} antenna: {note}."
    return "\n".join(_head(width, height, title, desc, uid) + out + ["</svg>"]) + "\n"
