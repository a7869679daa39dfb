"""Random mutations of a valid plan never raise: the reader returns a plan or positioned diagnostics."""

from __future__ import annotations

import os
import tempfile

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from planpack.plan import read_plan

from .conftest import BASE

LINES = BASE.splitlines(keepends=True)
NASTY = ["", " ", "\t", ":", "- ", "[", "]", "{", "}", "&a ", "*a", "!!str ", "? ", "|", ">", "#", "'", '"', "NO", "yes",
         "08:00", "1:30", "4,520", "0o17", "1_000", ".inf", "~", "null", "\x00", "\ufeff", "é", "<script>", "../../", "\u202e"]


@st.composite
def mutated(draw) -> str:
    lines = list(LINES)
    for _ in range(draw(st.integers(1, 4))):
        i = draw(st.integers(0, len(lines) - 1))
        op = draw(st.sampled_from(["delete", "duplicate", "insert", "splice", "swap"]))
        if op == "delete":
            del lines[i]
        elif op == "duplicate":
            lines.insert(i, lines[i])
        elif op == "insert":
            lines.insert(i, draw(st.sampled_from(NASTY)) + "\n")
        elif op == "splice":
            line = lines[i]
            at = draw(st.integers(0, len(line)))
            lines[i] = line[:at] + draw(st.sampled_from(NASTY) | st.text(max_size=6)) + line[at:]
        else:
            j = draw(st.integers(0, len(lines) - 1))
            lines[i], lines[j] = lines[j], lines[i]
        if not lines:
            break
    return "".join(lines)


@settings(max_examples=300, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(mutated())
def test_mutations_give_a_plan_or_positioned_diagnostics(text):
    fd, path = tempfile.mkstemp(suffix=".yaml")
    try:
        with os.fdopen(fd, "w", encoding="utf-8", errors="surrogatepass") as fh:
            fh.write(text)
        result = read_plan(path)  # must not raise
        if result.plan is None:
            assert result.diagnostics, "a rejected plan must say why"
            assert any(d.severity == "error" for d in result.diagnostics)
        for d in result.diagnostics:
            assert d.line >= 0 and d.column >= 0 and d.message
            assert d.format().startswith(path + ":")
    finally:
        os.unlink(path)


@settings(max_examples=150, deadline=None)
@given(st.binary(max_size=400))
def test_random_bytes_never_raise(data):
    fd, path = tempfile.mkstemp(suffix=".yaml")
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
        result = read_plan(path)
        assert result.plan is None and result.diagnostics
    finally:
        os.unlink(path)
