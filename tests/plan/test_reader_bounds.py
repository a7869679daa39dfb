"""Files that are not plans at all: every one ends in a diagnostic with a position, never a traceback."""

from __future__ import annotations

import os

from planpack.plan import read_plan
from planpack.plan.yamlread import MAX_BYTES

from .conftest import BASE


def codes(path):
    return [d.code for d in read_plan(path).diagnostics]


def test_missing_file_is_unreadable(tmp_path):
    assert codes(str(tmp_path / "nope.yaml")) == ["file-unreadable"]


def test_directory_is_unreadable(tmp_path):
    assert codes(str(tmp_path)) == ["file-unreadable"]


def test_too_large_is_refused_without_reading_it_all(tmp_path):
    path = tmp_path / "big.yaml"
    with open(path, "wb") as fh:
        fh.truncate(MAX_BYTES * 12)  # sparse: a 48 MiB file costs nothing
    assert codes(str(path)) == ["file-too-large"]


def test_invalid_utf8_points_at_the_byte(write_plan):
    data = BASE.replace("Operations", "Op\xe9rations").encode("latin-1")
    d = read_plan(write_plan(data)).diagnostics
    assert [x.code for x in d] == ["file-encoding"]
    line = BASE.splitlines().index("    name: Operations") + 1
    assert (d[0].line, d[0].column) == (line, len("    name: Op") + 1)


def test_utf16_with_bom_is_refused_clearly(write_plan):
    d = read_plan(write_plan(BASE.encode("utf-16"))).diagnostics
    assert [x.code for x in d] == ["file-encoding"] and "UTF-16" in d[0].message


def test_utf8_bom_is_accepted(write_plan):
    assert read_plan(write_plan(b"\xef\xbb\xbf" + BASE.encode())).ok


def test_nul_byte(write_plan):
    d = read_plan(write_plan(BASE.replace("Ridge team", "Ridge\x00team").encode())).diagnostics
    assert [x.code for x in d] == ["nul-byte"] and d[0].line > 1


def test_deep_nesting_is_bounded(write_plan):
    text = "planpack: 1\nnet: " + "[" * 5000 + "]" * 5000 + "\n"
    assert codes(write_plan(text)) == ["yaml-too-deep"]


def test_alias_bomb_is_bounded(write_plan):
    lines = ["planpack: 1", 'a0: &a0 ["x", "x", "x", "x", "x", "x", "x", "x", "x"]']
    for i in range(1, 10):
        lines.append(f"a{i}: &a{i} [" + ", ".join([f"*a{i - 1}"] * 9) + "]")
    d = read_plan(write_plan("\n".join(lines) + "\n")).diagnostics
    assert [x.code for x in d] in (["yaml-aliases"], ["yaml-too-many-nodes"])


def test_expanding_aliases_are_bounded(write_plan):
    lines = ["planpack: 1", "a0: &a0 [" + ", ".join(["x"] * 1000) + "]"]
    for i in range(1, 4):
        lines.append(f"a{i}: &a{i} [" + ", ".join([f"*a{i - 1}"] * 12) + "]")
    assert codes(write_plan("\n".join(lines) + "\n")) == ["yaml-too-many-nodes"]


def test_many_nodes_are_bounded(write_plan):
    text = "planpack: 1\nx: [" + ", ".join(["1"] * 200_000) + "]\n"
    assert codes(write_plan(text)) == ["yaml-too-many-nodes"]


def test_plain_scalar_and_empty_files(write_plan):
    assert codes(write_plan("just text\n")) == ["not-a-mapping"]
    assert codes(write_plan("")) == ["not-a-mapping"]


def test_anchors_and_merge_keys_work_within_bounds(write_plan):
    text = BASE.replace("    ground: {soil: medium-dry, system: rods}", "    ground: &g {soil: medium-dry, system: rods}")
    text = text.replace("    ground: {soil: wet, system: counterpoise}", "    ground: *g")
    result = read_plan(write_plan(text))
    assert result.ok, [d.format() for d in result.diagnostics]
    assert result.plan.station("ridge").ground.soil == "medium-dry"
