"""The cache's JSON Schema checker agrees with the reference library ``jsonschema`` (draft 2020-12).

Checked on the schema of plan.json with a real compiled plan, and on that plan
damaged in many ways (every value replaced by a value of each other JSON type).
"""

from __future__ import annotations

import copy
import json
import random

import jsonschema
import pytest
from tests.workflow.conftest import write
from tests.workflow.plans import TINY

from planpack.output_schema import output_schema
from planpack.plan import read_plan
from planpack.workflow.schemacheck import SchemaError, first_error

OTHERS = ["text", 7, 7.5, -1, True, None, [], {}, [1, "x"], {"k": 1}]


@pytest.fixture(scope="module")
def data(tmp_path_factory, shared_cache):
    from planpack.workflow.cache import cached_compile

    folder = tmp_path_factory.mktemp("schemacheck")
    plan = read_plan(str(write(folder, "net.yaml", TINY))).plan
    return json.loads(json.dumps(cached_compile(plan).data))


def _paths(value, prefix=()):
    yield prefix
    if isinstance(value, dict):
        for k, v in value.items():
            yield from _paths(v, prefix + (k,))
    elif isinstance(value, list):
        for i, v in enumerate(value):
            yield from _paths(v, prefix + (i,))


def _set(doc, path, value):
    node = doc
    for p in path[:-1]:
        node = node[p]
    node[path[-1]] = value


def test_compiled_plan_passes(data):
    jsonschema.Draft202012Validator(output_schema()).validate(data)
    assert first_error(data, output_schema()) is None


def test_agrees_with_jsonschema_on_damaged_plans(data):
    validator = jsonschema.Draft202012Validator(output_schema())
    rng = random.Random(13)
    paths = [p for p in _paths(data) if p]
    checked = disagreements = 0
    for path in rng.sample(paths, min(len(paths), 1500)):
        doc = copy.deepcopy(data)
        _set(doc, path, rng.choice(OTHERS))
        ours = first_error(doc, output_schema()) is None
        theirs = validator.is_valid(doc)
        checked += 1
        disagreements += ours != theirs
        assert ours == theirs, (path, ours, theirs)
    assert checked > 500 and disagreements == 0


@pytest.mark.parametrize("value,schema,ok", [
    (True, {"type": "integer"}, False),  # JSON: true is not a number
    (3.0, {"type": "integer"}, True),
    (1, {"const": True}, False),
    (float("nan"), {"type": "number"}, False),
    ("ab", {"pattern": "^a"}, True),
    ([1, 2], {"type": "array", "maxItems": 1}, False),
    ({"a": 1}, {"type": "object", "additionalProperties": False}, False),
    (None, {"anyOf": [{"type": "null"}, {"type": "string"}]}, True),
    (0, {"type": "number", "exclusiveMinimum": 0}, False),
    (0.5, {"type": "number", "exclusiveMinimum": 0}, True),
    (1, {"type": "number", "exclusiveMaximum": 1}, False),
    ([1, 2, 1], {"type": "array", "uniqueItems": True}, False),
    ([1, 2, 3], {"type": "array", "uniqueItems": True}, True),
])
def test_keyword_cases(value, schema, ok):
    assert (first_error(value, schema) is None) == ok


def test_an_unimplemented_keyword_is_refused_not_ignored():
    with pytest.raises(SchemaError):
        first_error({}, {"type": "object", "allOf": [{"required": ["x"]}]})
