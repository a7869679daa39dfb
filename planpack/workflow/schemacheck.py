"""A small JSON Schema validator for the keywords planpack's own schemas use.

The compile cache checks every entry against the schema of ``plan.json``
(:mod:`planpack.output_schema`) before it trusts it. ``jsonschema`` would do,
but it is a test dependency only; this checker covers the subset of draft
2020-12 those schemas are written in (``type``, ``properties``, ``required``,
``additionalProperties``, ``items``, ``minItems``, ``maxItems``, ``enum``,
``const``, ``anyOf``, ``oneOf``, ``minimum``, ``maximum``, ``exclusiveMinimum``,
``exclusiveMaximum``, ``uniqueItems``, ``pattern``) and
refuses a schema that uses any other keyword, so it can never pass something
it did not check. tests/workflow/test_schemacheck.py compares it with
``jsonschema`` on valid and damaged documents.
"""

from __future__ import annotations

import re
from functools import lru_cache

ANNOTATIONS = {"$schema", "$id", "title", "description", "default", "$comment", "examples"}
CHECKED = {"type", "properties", "required", "additionalProperties", "items", "minItems", "maxItems", "enum",
           "const", "anyOf", "oneOf", "minimum", "maximum", "exclusiveMinimum", "exclusiveMaximum", "uniqueItems",
           "pattern"}


class SchemaError(ValueError):
    """The schema uses a keyword this checker does not implement."""


def _is_type(value, name: str) -> bool:
    if name == "object":
        return isinstance(value, dict)
    if name == "array":
        return isinstance(value, list)
    if name == "string":
        return isinstance(value, str)
    if name == "boolean":
        return isinstance(value, bool)
    if name == "null":
        return value is None
    if isinstance(value, bool):
        return False
    if name == "integer":
        return isinstance(value, int) or (isinstance(value, float) and value.is_integer())
    if name == "number":
        return isinstance(value, (int, float))
    raise SchemaError(f"unknown type {name!r}")


def _equal(a, b) -> bool:
    """JSON equality: 1 == 1.0, but true is not 1."""
    if isinstance(a, bool) or isinstance(b, bool):
        return type(a) is type(b) and a == b
    if isinstance(a, (int, float)) and isinstance(b, (int, float)):
        return a == b
    if isinstance(a, list) and isinstance(b, list):
        return len(a) == len(b) and all(_equal(x, y) for x, y in zip(a, b))
    if isinstance(a, dict) and isinstance(b, dict):
        return a.keys() == b.keys() and all(_equal(a[k], b[k]) for k in a)
    return type(a) is type(b) and a == b


@lru_cache(maxsize=256)
def _pattern(text: str) -> re.Pattern:
    return re.compile(text)


def first_error(value, schema: dict, path: str = "$") -> str | None:
    """Where and why ``value`` does not match ``schema``; None when it does."""
    unknown = set(schema) - CHECKED - ANNOTATIONS
    if unknown:
        raise SchemaError(f"{path}: the schema uses {', '.join(sorted(unknown))}, which this checker does not implement")
    if "type" in schema:
        types = schema["type"] if isinstance(schema["type"], list) else [schema["type"]]
        if not any(_is_type(value, t) for t in types):
            return f"{path}: expected {' or '.join(types)}, got {type(value).__name__}"
    if "const" in schema and not _equal(value, schema["const"]):
        return f"{path}: expected {schema['const']!r}"
    if "enum" in schema and not any(_equal(value, v) for v in schema["enum"]):
        return f"{path}: expected one of {schema['enum']!r}"
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        if value != value or value in (float("inf"), float("-inf")):
            return f"{path}: not a finite number"
        if "minimum" in schema and value < schema["minimum"]:
            return f"{path}: below {schema['minimum']}"
        if "maximum" in schema and value > schema["maximum"]:
            return f"{path}: above {schema['maximum']}"
        if "exclusiveMinimum" in schema and value <= schema["exclusiveMinimum"]:
            return f"{path}: not above {schema['exclusiveMinimum']}"
        if "exclusiveMaximum" in schema and value >= schema["exclusiveMaximum"]:
            return f"{path}: not below {schema['exclusiveMaximum']}"
    if isinstance(value, str) and "pattern" in schema and not _pattern(schema["pattern"]).search(value):
        return f"{path}: does not match {schema['pattern']}"
    if isinstance(value, list):
        if len(value) < schema.get("minItems", 0):
            return f"{path}: fewer than {schema['minItems']} items"
        if "maxItems" in schema and len(value) > schema["maxItems"]:
            return f"{path}: more than {schema['maxItems']} items"
        if schema.get("uniqueItems") and any(_equal(value[i], value[j]) for i in range(len(value))
                                             for j in range(i + 1, len(value))):
            return f"{path}: items are not unique"
        if "items" in schema:
            for i, item in enumerate(value):
                err = first_error(item, schema["items"], f"{path}[{i}]")
                if err:
                    return err
    if isinstance(value, dict):
        for key in schema.get("required", ()):
            if key not in value:
                return f"{path}: missing {key!r}"
        props = schema.get("properties", {})
        extra = schema.get("additionalProperties", True)
        for key, item in value.items():
            if key in props:
                err = first_error(item, props[key], f"{path}.{key}")
            elif extra is False:
                err = f"{path}: unexpected key {key!r}"
            elif isinstance(extra, dict):
                err = first_error(item, extra, f"{path}.{key}")
            else:
                err = None
            if err:
                return err
    if "anyOf" in schema and all(first_error(value, s, path) for s in schema["anyOf"]):
        return f"{path}: matches none of the allowed forms"
    if "oneOf" in schema and sum(first_error(value, s, path) is None for s in schema["oneOf"]) != 1:
        return f"{path}: does not match exactly one of the allowed forms"
    return None
