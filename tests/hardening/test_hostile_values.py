"""Hostile values inside an otherwise good plan: every YAML 1.1 surprise in every string field,
every value of the wrong type, huge and control-character scalars. Each gives diagnostics at the
value's position, never a traceback or a silent guess.

(Whole-file classics such as alias bombs, deep nesting, invalid UTF-8, BOMs, NUL bytes and list or
scalar plans are in tests/plan/test_reader_bounds.py; the CLI tries them in test_cli_hostile.py.)
"""

from __future__ import annotations

import pytest

from planpack.plan import read_plan
from planpack.plan.yamlread import MAX_BYTES

TARGET = "@@TARGET@@"

# The small plan of tests/plan/conftest.py as a tree whose leaves are YAML text written as is,
# with every optional text field present, so that each can be replaced one at a time.
PLAN = {
    "planpack": "1",
    "net": {
        "id": "test-net", "title": "Test net", "handling": '"EXERCISE ONLY"', "timezone": "Europe/Berlin",
        "valid": {"from": "2027-03-01", "to": "2027-03-20"}, "solar": {"ssn": "60"},
        "net_address": "TSTNET", "links": [["ops", "ridge"]], "base_url": "https://intranet.example/nets/",
        "instructions": "Check in hourly.", "target_good_days": "0.9", "card_size": "a6",
    },
    "stations": {
        "ops": {"name": "Operations", "address": "OPS", "role": "control", "at": {"lat": "52.52", "lon": "13.40"},
                "power_w": "100", "noise": "residential", "noise_margin_db": "3", "antenna": "nvis",
                "ground": {"soil": "medium-dry", "system": "rods"}, "scan_rate": "2"},
        "ridge": {"name": "Ridge team", "address": "RIDGE", "at": {"grid": "JO62qm"}, "power_w": "20", "noise": "rural",
                  "antenna": ["nvis"], "ground": {"soil": "wet", "system": "counterpoise"}},
    },
    "channels": [
        {"id": "C1", "khz": "3310", "mode": "usb", "note": "night low"},
        {"id": "C2", "khz": "4520", "mode": "usb", "hours": '"06:00-20:00"'},
        {"id": "C3", "khz": "6950", "mode": "data", "hours": ['"07:00-12:00"', '"13:00-19:00"']},
    ],
    "antennas": {
        "nvis": {"kind": "dipole", "design_khz": "4520", "height_m": "7", "wire_mm": "2", "matching": "set-tuner",
                 "feedline": {"z0_ohm": "50", "length_m": "15", "loss_db_per_100m_at_10mhz": "3.5"}},
    },
    "modes": {"data": {"snr_db": "10", "bandwidth_hz": "3000", "duty_factor": "0.5"}},
}

# Fields whose value is text (or a choice or an id, which are text too), by their diagnostic key.
TEXT_FIELDS = [
    "net.id", "net.title", "net.handling", "net.timezone", "net.net_address", "net.base_url", "net.instructions",
    "net.card_size", "net.links[0][0]", "net.links[0][1]",
    "stations.ops.name", "stations.ops.address", "stations.ops.role", "stations.ops.noise", "stations.ops.antenna",
    "stations.ops.ground.soil", "stations.ops.ground.system", "stations.ridge.at.grid", "stations.ridge.antenna[0]",
    "channels[0].id", "channels[0].mode", "channels[0].note", "channels[1].hours", "channels[2].hours[1]",
    "antennas.nvis.kind", "antennas.nvis.matching",
]

# Unquoted text that some YAML reader takes for something else (YAML 1.1 and 1.2 types and specials).
SURPRISES = ["yes", "No", "ON", "off", "y", "N", "true", "FALSE", "8:00", "1:30:00", "190:20:30", "0o17", "0x1F", "012", "1_000",
             "1e3", "-.5", "+12", ".inf", "-.Inf", ".NaN", "2027-03-01", "2027-03-01 10:00:00", "2027-03-01T10:00:00Z",
             "=", "<<", "~", "null", "Null", ""]
SURPRISE_CODES = {"yaml11-bool", "yaml11-sexagesimal", "yaml11-number-form", "wrong-type", "empty-value"}


def emit(node, indent: int = 0) -> list[str]:
    pad = " " * indent
    lines: list[str] = []
    if isinstance(node, dict):
        for k, v in node.items():
            if isinstance(v, (dict, list)) and v:
                lines.append(f"{pad}{k}:")
                lines += emit(v, indent + 2)
            else:
                lines.append(f"{pad}{k}: {v}")
    else:
        for v in node:
            if isinstance(v, list):
                lines.append(f"{pad}- [{', '.join(v)}]")
            elif isinstance(v, dict):
                sub = emit(v, indent + 2)
                lines.append(f"{pad}- {sub[0].lstrip()}")
                lines += sub[1:]
            else:
                lines.append(f"{pad}- {v}")
    return lines


def _steps(key: str) -> list:
    """'stations.ops.antenna[0]' -> ['stations', 'ops', 'antenna', 0]"""
    out: list = []
    for part in key.split("."):
        name, *idx = part.replace("]", "").split("[")
        out.append(name)
        out += [int(i) for i in idx]
    return out


def plan_with(values: dict[str, str]):
    """The plan's YAML text with the leaves at these keys replaced, and each replaced leaf's (line, col)."""
    import copy

    tree = copy.deepcopy(PLAN)
    for n, key in enumerate(values):
        *parents, last = _steps(key)
        node = tree
        for s in parents:
            node = node[s]
        node[last] = f"{TARGET}{n}@"
    text = "\n".join(emit(tree)) + "\n"
    where = {}
    for n, (key, value) in enumerate(values.items()):
        marker = f"{TARGET}{n}@"
        at = text.index(marker)
        where[key] = (text.count("\n", 0, at) + 1, at - (text.rfind("\n", 0, at) + 1) + 1)
        text = text.replace(marker, value)
    return text, where


def leaves(node=PLAN, path: str = "") -> list[str]:
    out = []
    items = node.items() if isinstance(node, dict) else enumerate(node)
    for k, v in items:
        sub = (f"{path}[{k}]" if isinstance(k, int) else (f"{path}.{k}" if path else k))
        out += leaves(v, sub) if isinstance(v, (dict, list)) else [sub]
    return out


def test_the_template_reads_clean(write_plan):
    text, _ = plan_with({})
    result = read_plan(write_plan(text))
    assert result.ok, [d.format() for d in result.diagnostics]
    assert set(TEXT_FIELDS) <= set(leaves())


@pytest.mark.parametrize("field", TEXT_FIELDS)
def test_every_yaml_surprise_in_every_text_field(write_plan, field):
    for surprise in SURPRISES:
        if surprise == "" and field.endswith("]"):
            continue  # an empty item in a flow list is a YAML syntax error, tested by the fuzzing
        text, where = plan_with({field: surprise})
        result = read_plan(write_plan(text))
        errors = [d for d in result.diagnostics if d.severity == "error"]
        assert not result.ok and errors, f"{field}: {surprise!r} was read as text without a word"
        assert {d.key for d in errors} == {field}, (surprise, [d.format() for d in errors])
        d = errors[0]
        assert d.code in SURPRISE_CODES, d.format()
        assert d.line == where[field][0], (surprise, d.format())
        if surprise not in ("", "~", "null", "Null"):
            assert d.column == where[field][1] and f'"{surprise}"' in d.message and "quote" in d.message, d.format()
        # quoted, the same text is no longer a surprise (it may still break the field's pattern)
        if surprise and field in ("net.title", "stations.ops.name", "channels[0].note", "net.instructions"):
            quoted, _ = plan_with({field: f'"{surprise}"'})
            assert read_plan(write_plan(quoted)).ok, surprise


@pytest.mark.parametrize("surprise", ["yes", "n", "8:00", "1e3", "2027-03-01", "123"])
def test_a_surprise_as_a_station_or_antenna_id(write_plan, surprise):
    text, _ = plan_with({})
    text = text.replace("  ridge:\n", f"  {surprise}:\n", 1)
    d = [x for x in read_plan(write_plan(text)).diagnostics if x.severity == "error"]
    assert d and d[0].key == f"stations.{surprise}" and d[0].line >= 1, [x.format() for x in d]
    assert "quote it" in d[0].message


WRONG = {
    "a mapping": "{wrong: 1}",
    "a list": "[1, 2]",
    "nothing": "",
    "a nested list": "[[x]]",
}


@pytest.mark.parametrize("kind", sorted(WRONG))
def test_a_plan_whose_every_value_is_the_wrong_type(write_plan, kind):
    """Every leaf but the format version replaced at once: every one is reported, each at its place."""
    targets = [k for k in leaves() if k != "planpack"]
    if kind == "nothing":
        targets = [k for k in targets if not k.endswith("]")]  # '[, ]' is a syntax error, not a value
    if kind == "a list":
        targets = [k for k in targets if k != "net.solar.ssn"]  # [low, high] is a valid sunspot range
    text, where = plan_with({k: WRONG[kind] for k in targets})
    result = read_plan(write_plan(text))
    assert not result.ok
    reported = {d.key: d for d in result.diagnostics if d.severity == "error"}
    # 'stations.ridge.antenna' is a list of one id, so a list there is the right shape: its item is checked
    for key in targets:
        d = reported.get(key) or next((v for k, v in reported.items() if k.startswith(key + "[")), None)
        if kind == "a list" and key in ("net.links[0][0]", "net.links[0][1]", "channels[2].hours[0]", "channels[2].hours[1]",
                                        "stations.ridge.antenna[0]"):
            continue  # inside lists the list item itself is the leaf; covered by the scalar kinds
        assert d is not None, f"{key} was not reported ({kind})"
        assert d.code in ("wrong-type", "empty-value", "not-a-mapping", "missing-key"), d.format()
        assert d.line == where[key][0], d.format()


def test_every_number_written_as_text_and_every_text_as_a_number(write_plan):
    numbers = [k for k in leaves() if PLAN_VALUE(k).replace(".", "", 1).isdigit() and k != "planpack"]
    texts = [k for k in TEXT_FIELDS]
    text, where = plan_with({**{k: "lots" for k in numbers}, **{k: "42.5" for k in texts}})
    reported = {d.key for d in read_plan(write_plan(text)).diagnostics if d.severity == "error"}
    missing = [k for k in numbers + texts if k not in reported]
    assert not missing


def PLAN_VALUE(key: str) -> str:  # noqa: N802 - reads like the tree it looks into
    node = PLAN
    for s in _steps(key):
        node = node[s]
    return node


@pytest.mark.parametrize("field, bound", [("net.title", 120), ("stations.ops.name", 80), ("channels[0].note", 200),
                                          ("net.instructions", 20_000)])
def test_a_huge_scalar_within_the_file_bound(write_plan, field, bound):
    """Nearly MAX_BYTES in one value: refused with the bound in a short message, at the value."""
    huge = "x" * (MAX_BYTES - 4096)
    text, where = plan_with({field: huge})
    assert len(text.encode()) <= MAX_BYTES
    d = [x for x in read_plan(write_plan(text)).diagnostics if x.severity == "error"]
    assert [x.code for x in d] == ["out-of-range"] and d[0].key == field
    assert (d[0].line, d[0].column) == where[field]
    assert f"at most {bound} characters" in d[0].message and len(d[0].format()) < 500
    at_bound, _ = plan_with({field: '"' + "y" * bound + '"'})
    assert read_plan(write_plan(at_bound)).ok


@pytest.mark.parametrize("key_len", [1100, MAX_BYTES - 4096])
def test_a_huge_key_gives_a_short_positioned_message(write_plan, key_len):
    text, _ = plan_with({})
    text = text.replace("  title: Test net\n", f"  {'k' * key_len}: 1\n  title: Test net\n")
    d = [x for x in read_plan(write_plan(text)).diagnostics if x.severity == "error"]
    assert d and d[0].line == 4 and all(len(x.format()) < 1000 for x in d), [x.format()[:200] for x in d]


@pytest.mark.parametrize("escape", ["\\0", "\\x1b[31m", "\\a", "\\x7f", "\\x85", "\\e]0;owned\\a"])
def test_control_characters_written_as_escapes_are_refused(write_plan, escape):
    """A quoted "\\0" or "\\e" puts a control character in the value itself; no page or card can show it."""
    for field in ("net.title", "stations.ops.name", "channels[0].note", "net.handling", "net.instructions"):
        text, where = plan_with({field: f'"a{escape}b"'})
        d = [x for x in read_plan(write_plan(text)).diagnostics if x.severity == "error"]
        assert [x.key for x in d] == [field] and "control character" in d[0].message, [x.format() for x in d]
        assert (d[0].line, d[0].column) == where[field]
        assert "\x1b" not in d[0].format() and "\x00" not in d[0].format()


def test_tabs_and_line_breaks_in_quoted_text_are_fine(write_plan):
    text, _ = plan_with({"net.instructions": '"Line one\\n\\n- item\\twith a tab"', "net.title": '"Two\\nlines"'})
    assert read_plan(write_plan(text)).ok


def test_messages_never_carry_the_plans_control_characters(write_plan):
    """A key or id with an ESC in it is quoted back to the user escaped, so it cannot rewrite the terminal."""
    text, _ = plan_with({})
    text = text.replace("  ridge:\n", '  "ri\\e]0;owned\\adge":\n', 1).replace("  title: Test net\n",
                                                                                 '  "t\\x1bitle": x\n  title: Test net\n')
    d = read_plan(write_plan(text)).diagnostics
    assert d and all("\x1b" not in x.format() and "\x07" not in x.format() for x in d)
    assert any("\\x1b" in x.format() for x in d)
