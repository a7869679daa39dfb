"""Bounded fuzzing of the plan reader: mutated demo plans and random YAML, never a traceback.

The only outcomes allowed are a clean plan or error diagnostics that carry a position
(line and column ≥ 1, or 0:0 only for the problems that concern the whole file). A hang would
trip hypothesis' deadline (generous: it catches a hang, it does not time the reader), and a memory
blow-up the traced peak. Examples are bounded so the whole module stays well under a minute;
``bench/robustness.py`` runs the same properties with many more examples and counts them.
"""

from __future__ import annotations

import os
import tempfile
import tracemalloc
from pathlib import Path

import yaml
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from planpack.plan import read_plan
from planpack.plan.diagnostics import CODES
from planpack.plan.schema import ANTENNA, CHANNEL, NET, PLAN, STATION

REPO = Path(__file__).resolve().parents[2]
DEMOS = [p.read_text(encoding="utf-8") for p in sorted((REPO / "plans").glob("*.yaml"))]

#: Problems about the file as a whole, which have no line to point at.
WHOLE_FILE = {"file-unreadable", "file-too-large", "file-encoding", "not-a-mapping"}
HANG_S = 10_000  # ms per example: a hang detector, ten thousand times a normal read
PEAK_BYTES = 256 * 1024 * 1024  # traced Python memory per example; a plan read needs a few MB

# Scalars that have tripped YAML readers: YAML 1.1 types, specials, markup, odd unicode.
NASTY = ["", " ", "~", "null", "NULL", "yes", "No", "ON", "off", "y", "N", "true", "08:00", "1:30:00", "190:20:30",
         "0o17", "0x1F", "012", "1_000", "1e3", "-.5", ".inf", "-.Inf", ".NaN", "4,520", "2027-03-01",
         "2027-03-01T10:00:00Z", "=", "<<", "-", "?", ":", "- x", "&a", "*a", "!!str", "!tag", "%YAML", "---", "...",
         "#", "|", ">", "'", '"', "[", "]", "{", "}", ",", "\\", "\t", "\r", "\u0085", "\u2028", "\ufeff",
         "\u202e", "é", "ｅ", "𝕏", "<script>", "../../", "%2e%2e", "javascript:alert(1)", "x" * 300]
SCHEMA_KEYS = sorted(set(PLAN.fields) | set(NET.fields) | set(STATION.fields) | set(CHANNEL.fields)
                     | set(ANTENNA.fields) | {"from", "to", "ssn", "f107", "lat", "lon", "grid", "soil", "system",
                                              "z0_ohm", "length_m", "snr_db", "bandwidth_hz"})
INDICATORS = ["- ", ": ", "? ", "[", "]", "{", "}", ", ", "&x ", "*x", "!!str ", "! ", "|\n", ">-\n", "|+2\n",
              "'", '"', "# c\n", "\n", "\n  ", "\n    ", "---\n", "...\n", "%YAML 1.1\n", "%TAG ! tag:x,2000:\n",
              "<<: ", "\\", "\t"]

checked = {"inputs": 0}  # counted for the figures (bench/robustness.py)


def check_text(text: str | bytes) -> None:
    """Read one input as a plan file and hold the reader to its promise."""
    checked["inputs"] += 1
    fd, path = tempfile.mkstemp(suffix=".yaml")
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(text if isinstance(text, bytes) else text.encode("utf-8", "surrogatepass"))
        tracemalloc.reset_peak()
        result = read_plan(path)  # must not raise
        peak = tracemalloc.get_traced_memory()[1]
        assert peak < PEAK_BYTES, f"reading took {peak / 1e6:.0f} MB"
        if result.plan is None:
            assert any(d.severity == "error" for d in result.diagnostics), "a rejected plan must say why"
        for d in result.diagnostics:
            assert d.code in CODES and d.message
            assert d.format().startswith(path + ":")
            assert "Traceback" not in d.message
            if d.severity == "error" and d.code not in WHOLE_FILE:
                assert d.line >= 1 and d.column >= 1, f"no position: {d.format()}"
    finally:
        os.unlink(path)


# ----------------------------------------------------------------- strategies

scalar_text = st.sampled_from(NASTY) | st.text(max_size=12) | st.integers(-10**6, 10**6).map(str) \
    | st.floats(allow_nan=False, allow_infinity=False).map(repr)
keys = st.sampled_from(SCHEMA_KEYS) | scalar_text


def _tree(children):
    return (st.lists(children, max_size=5)
            | st.dictionaries(keys, children, max_size=5))


yaml_values = st.recursive(scalar_text | st.integers() | st.booleans() | st.none(), _tree, max_leaves=30)


@st.composite
def random_plan_shaped(draw) -> str:
    """A random structure under the plan's own keys, dumped in a random YAML style."""
    doc = {"planpack": draw(st.sampled_from([1, 1, 1, 1, 1, "1", 2, None]))}
    for key in draw(st.lists(st.sampled_from(sorted(set(PLAN.fields) - {"planpack"}) + ["extra"]), max_size=6)):
        doc[key] = draw(yaml_values)
    shared = draw(yaml_values)  # the same object twice: the dumper writes an anchor and an alias
    if draw(st.booleans()):
        doc[draw(st.sampled_from(["net", "stations", "modes"]))] = {"a": shared, "b": shared}
    return yaml.safe_dump(doc, default_flow_style=draw(st.sampled_from([None, True, False])),
                          allow_unicode=draw(st.booleans()), sort_keys=draw(st.booleans()),
                          width=draw(st.sampled_from([20, 80, 10**6])), indent=draw(st.sampled_from([2, 4, 7])))


@st.composite
def yaml_soup(draw) -> str:
    """Raw YAML-ish text: indicators, keys and nasty scalars run together."""
    parts = draw(st.lists(st.sampled_from(INDICATORS) | keys | scalar_text, min_size=1, max_size=40))
    return "planpack: 1\n" * draw(st.booleans()) + "".join(parts)


@st.composite
def mutated_demo(draw) -> str:
    """A demo plan with a few line- and character-level edits."""
    lines = draw(st.sampled_from(DEMOS)).splitlines(keepends=True)
    for _ in range(draw(st.integers(1, 5))):
        if not lines:
            break
        i = draw(st.integers(0, len(lines) - 1))
        op = draw(st.sampled_from(["delete", "duplicate", "insert", "splice", "swap", "indent", "value", "cut"]))
        line = lines[i]
        if op == "delete":
            del lines[i]
        elif op == "duplicate":
            lines[i:i] = lines[i:i + draw(st.integers(1, 8))]
        elif op == "insert":
            lines.insert(i, draw(st.sampled_from(INDICATORS) | scalar_text) + "\n")
        elif op == "splice":
            at = draw(st.integers(0, len(line)))
            lines[i] = line[:at] + draw(st.sampled_from(NASTY) | st.text(max_size=4)) + line[at:]
        elif op == "swap":
            j = draw(st.integers(0, len(lines) - 1))
            lines[i], lines[j] = lines[j], lines[i]
        elif op == "indent":
            lines[i] = " " * draw(st.integers(0, 3)) + line.lstrip(" ") if draw(st.booleans()) else line[1:]
        elif op == "value" and ": " in line:  # a value replaced by a random YAML fragment
            head = line.split(": ", 1)[0]
            frag = yaml.safe_dump(draw(yaml_values), default_flow_style=True, width=10**6).strip()
            frag = frag.removesuffix("...").strip()
            lines[i] = f"{head}: {frag}\n"
        elif op == "cut":  # a truncated file
            lines = lines[:i] + [line[: draw(st.integers(0, len(line)))]]
    return "".join(lines)


FUZZ = settings(max_examples=250, deadline=HANG_S, derandomize=True, database=None,
                suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large, HealthCheck.filter_too_much])


def setup_module(module):
    tracemalloc.start()


def teardown_module(module):
    tracemalloc.stop()


@FUZZ
@given(mutated_demo())
def test_mutated_demo_plans(text):
    check_text(text)


@FUZZ
@given(random_plan_shaped())
def test_random_structures_under_the_plan_keys(text):
    check_text(text)


@FUZZ
@given(yaml_soup())
def test_random_yaml_text(text):
    check_text(text)


@settings(FUZZ, max_examples=150)
@given(st.sampled_from(DEMOS), st.integers(0, 10**6), st.binary(min_size=1, max_size=8))
def test_demo_plans_with_random_bytes(text, where, junk):
    data = text.encode("utf-8")
    at = where % (len(data) + 1)
    check_text(data[:at] + junk + data[at:])


def test_the_demo_plans_themselves_read_clean():
    """The fuzzing starts from plans that read clean, so mutations reach deep into the checks."""
    for path in sorted((REPO / "plans").glob("*.yaml")):
        assert read_plan(str(path)).ok
