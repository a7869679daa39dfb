"""A small declared-schema type system over the positioned YAML tree.

Each type reads one node into a plain Python value or reports why it cannot,
naming the key path, what was expected and what arrived; and each type can
describe itself as JSON Schema, so that editors validate a plan while it is
typed from the same declaration the reader uses.

Scalars are typed here by YAML 1.2 core rules from their raw text. Where a
YAML 1.1 reader (PyYAML, many editors and older tools) would read the same
unquoted text as something else, the reader refuses it with a hint to quote:
a plan must mean the same thing to every tool that opens it.
"""

from __future__ import annotations

import datetime as _dt
import difflib
import re
from dataclasses import dataclass, field
from typing import Any, Callable

import yaml

from planpack.plan.diagnostics import Collector
from planpack.plan.yamlread import Mapping, Node, Scalar, Sequence

INVALID = object()  # returned by a reader after it has reported the problem

_INT_12 = re.compile(r"[-+]?[0-9]+\Z")
_FLOAT_12 = re.compile(r"[-+]?(\.[0-9]+|[0-9]+(\.[0-9]*)?)([eE][-+]?[0-9]+)?\Z")
_SEXAGESIMAL = re.compile(r"[-+]?[0-9][0-9_]*(:[0-5]?[0-9])+(\.[0-9_]*)?\Z")
_BOOL_12 = {"true": True, "True": True, "TRUE": True, "false": False, "False": False, "FALSE": False}
_NULL_12 = {"", "~", "null", "Null", "NULL"}
_DATE = re.compile(r"([0-9]{4})-([0-9]{2})-([0-9]{2})\Z")
_RESOLVER = yaml.resolver.Resolver()
# Number spellings that YAML 1.1 and 1.2 readers disagree on: 0o17, 0x1F, 0b101, 017, 1_000, .inf
_NUMBER_FORMS = re.compile(r"[-+]?(0[oxb][0-9a-fA-F_]+|0[0-9_]+|[0-9][0-9_]*_[0-9_]*(\.[0-9_]*)?|\.(inf|Inf|INF|nan|NaN|NAN))\Z")


def yaml11_tag(raw: str) -> str:
    """The tag a YAML 1.1 reader (PyYAML) gives this unquoted text."""
    return _RESOLVER.resolve(yaml.ScalarNode, raw, (True, False))


def describe(node: Node) -> str:
    """How the arriving value reads in a message."""
    if isinstance(node, Mapping):
        return "a mapping"
    if isinstance(node, Sequence):
        return "a list"
    assert isinstance(node, Scalar)
    if node.plain and node.raw in _NULL_12:
        return "nothing (an empty value)"
    shown = node.raw if len(node.raw) <= 40 else node.raw[:37] + "..."
    return f"'{shown}'"


@dataclass
class Ctx:
    """What a reader needs: where to report, and where to remember positions."""

    out: Collector
    positions: dict[str, Node] = field(default_factory=dict)

    def error(self, code: str, path: str, message: str, node: Node) -> Any:
        self.out.error(code, path, f"{path or 'the plan'}: {message}", node)
        return INVALID

    def keys_under(self, prefix: str) -> list[str]:
        """Keys written directly under the mapping at ``prefix``."""
        head = prefix + "."
        return [p[len(head):] for p in self.positions
                if p.startswith(head) and "." not in p[len(head):] and "[" not in p[len(head):] and "#" not in p]


class Type:
    description = ""

    def read(self, node: Node, path: str, ctx: Ctx) -> Any:
        raise NotImplementedError

    def json_schema(self) -> dict:
        raise NotImplementedError

    def _scalar(self, node: Node, path: str, ctx: Ctx, expected: str) -> Scalar | None:
        if not isinstance(node, Scalar):
            ctx.error("wrong-type", path, f"expected {expected}, got {describe(node)}", node)
            return None
        if node.plain and node.raw in _NULL_12:
            ctx.error("empty-value", path, f"expected {expected}, got nothing (an empty value)", node)
            return None
        return node


# Control characters other than tab and line breaks (C0, DEL, C1): YAML escapes can write them.
_CONTROL = re.compile("[\x00-\x08\x0b\x0c\x0e-\x1f\x7f-\x9f]")
# YAML 1.1 booleans that PyYAML leaves as text but other YAML 1.1 readers do not
_BOOL_11_SHORT = {"y", "Y", "n", "N"}


def text_surprise(raw: str) -> tuple[str, str] | None:
    """(code, how other tools read it) when unquoted ``raw`` is not plain text to every YAML reader."""
    tag = yaml11_tag(raw)
    if tag.endswith(":bool") or raw in _BOOL_11_SHORT:
        word = "true" if raw.lower() in ("yes", "on", "y", "true") else "false"
        return "yaml11-bool", f"YAML 1.1 tools read as {word}"
    if _SEXAGESIMAL.match(raw) and tag.endswith((":int", ":float")):
        return "yaml11-sexagesimal", "YAML 1.1 tools read as a base-60 number"
    if tag.endswith((":int", ":float")) or _FLOAT_12.match(raw) or _NUMBER_FORMS.match(raw):
        return "wrong-type", "YAML reads as a number"
    if tag.endswith(":timestamp"):
        return "wrong-type", "YAML 1.1 tools read as a date or time"
    if tag.endswith((":value", ":merge")):
        return "wrong-type", "YAML 1.1 tools read as a special value, not text"
    return None


@dataclass
class Text(Type):
    """A string. Unquoted text that YAML 1.1 would read as another type is refused."""

    pattern: str | None = None
    pattern_hint: str = ""
    max_len: int = 200
    description: str = ""

    def read(self, node, path, ctx):
        s = self._scalar(node, path, ctx, "text")
        if s is None:
            return INVALID
        if s.plain:
            surprise = text_surprise(s.raw)
            if surprise is not None:
                code, reading = surprise
                return ctx.error(code, path, f"expected text, got unquoted {s.raw}, which {reading}; quote it: \"{s.raw}\"", s)
        value = s.raw
        if len(value) > self.max_len:
            return ctx.error("out-of-range", path, f"expected text of at most {self.max_len} characters, got {len(value)}", s)
        control = _CONTROL.search(value)
        if control:  # a "\0" or "\e" escape in a quoted string: nothing a page or a card can show
            return ctx.error("wrong-type", path, f"expected text, got the control character U+{ord(control[0]):04X} at "
                             f"character {control.start() + 1}; remove it", s)
        if self.pattern and not re.fullmatch(self.pattern, value):
            code = "bad-slug" if self.pattern == SLUG_PATTERN else "wrong-type"
            return ctx.error(code, path, f"expected {self.pattern_hint or 'text matching ' + self.pattern}, got {describe(s)}", s)
        return value

    def json_schema(self):
        out: dict = {"type": "string", "maxLength": self.max_len}
        if self.pattern:
            out["pattern"] = "^(?:" + self.pattern + ")$"
        if self.description:
            out["description"] = self.description
        return out


SLUG_PATTERN = r"[a-z0-9]+(?:-[a-z0-9]+)*"


def Slug(description: str = "", max_len: int = 40) -> Text:
    return Text(pattern=SLUG_PATTERN, pattern_hint="a slug: lowercase letters, digits and single '-' between them (e.g. 'north-ridge')",
                max_len=max_len, description=description)


@dataclass
class Number(Type):
    minimum: float | None = None
    maximum: float | None = None
    integer: bool = False
    unit: str = ""
    exclusive_minimum: bool = False
    description: str = ""

    def _expect(self) -> str:
        kind = "a whole number" if self.integer else "a number"
        if self.minimum is not None and self.maximum is not None:
            kind += (f" above {self.minimum:g} and at most {self.maximum:g}" if self.exclusive_minimum
                     else f" from {self.minimum:g} to {self.maximum:g}")
        elif self.minimum is not None:
            kind += f" {'above' if self.exclusive_minimum else 'at least'} {self.minimum:g}"
        return kind + (f" [{self.unit}]" if self.unit else "")

    def read(self, node, path, ctx):
        s = self._scalar(node, path, ctx, self._expect())
        if s is None:
            return INVALID
        raw = s.raw.strip()
        if not s.plain:
            if _FLOAT_12.match(raw):
                return ctx.error("wrong-type", path, f"expected {self._expect()}, got the quoted text \"{raw}\"; remove the quotes", s)
            return ctx.error("wrong-type", path, f"expected {self._expect()}, got {describe(s)}", s)
        if self.integer and _INT_12.match(raw):
            value: float = int(raw)
        elif _FLOAT_12.match(raw):
            value = float(raw)
            if self.integer:
                if value != int(value):
                    return ctx.error("wrong-type", path, f"expected {self._expect()}, got {raw}", s)
                value = int(value)
        elif "," in raw and re.fullmatch(r"[-+]?[0-9][0-9,]*(\.[0-9]+)?", raw):
            return ctx.error("number-comma", path,
                             f"expected {self._expect()}, got {raw}: write numbers without a comma ({raw.replace(',', '')}); YAML reads it as text", s)
        elif "," in raw and re.fullmatch(r"[-+]?[0-9]+,[0-9]+", raw):
            return ctx.error("number-comma", path, f"expected {self._expect()}, got {raw}: use a decimal point, not a comma", s)
        elif _SEXAGESIMAL.match(raw) and ":" in raw:
            return ctx.error("yaml11-sexagesimal", path,
                             f"expected {self._expect()}, got {raw}, which YAML 1.1 tools read as a base-60 number; write a plain number", s)
        elif yaml11_tag(raw).endswith((":int", ":float")) or _NUMBER_FORMS.match(raw):
            return ctx.error("yaml11-number-form", path,
                             f"expected {self._expect()}, got {raw}, which YAML versions read differently (underscores, leading zeros, 0x/0o, .inf); write a plain decimal number", s)
        else:
            return ctx.error("wrong-type", path, f"expected {self._expect()}, got {describe(s)}", s)
        if value != value or value in (float("inf"), float("-inf")):
            return ctx.error("out-of-range", path, f"expected {self._expect()}, got {raw}", s)
        if self.minimum is not None and (value < self.minimum or (self.exclusive_minimum and value == self.minimum)):
            return ctx.error("out-of-range", path, f"expected {self._expect()}, got {raw}", s)
        if self.maximum is not None and value > self.maximum:
            return ctx.error("out-of-range", path, f"expected {self._expect()}, got {raw}", s)
        return value

    def json_schema(self):
        out: dict = {"type": "integer" if self.integer else "number"}
        if self.minimum is not None:
            out["exclusiveMinimum" if self.exclusive_minimum else "minimum"] = self.minimum
        if self.maximum is not None:
            out["maximum"] = self.maximum
        desc = self.description + (f" [{self.unit}]" if self.unit else "")
        if desc:
            out["description"] = desc.strip()
        return out


@dataclass
class Flag(Type):
    description: str = ""

    def read(self, node, path, ctx):
        s = self._scalar(node, path, ctx, "true or false")
        if s is None:
            return INVALID
        if s.plain and s.raw in _BOOL_12:
            return _BOOL_12[s.raw]
        if s.plain and yaml11_tag(s.raw).endswith(":bool"):
            return ctx.error("yaml11-bool", path, f"expected true or false, got {s.raw}, which YAML versions read differently; write true or false", s)
        return ctx.error("wrong-type", path, f"expected true or false, got {describe(s)}", s)

    def json_schema(self):
        return {"type": "boolean", **({"description": self.description} if self.description else {})}


@dataclass
class Choice(Type):
    values: tuple[str, ...] = ()
    description: str = ""

    def read(self, node, path, ctx):
        value = Text(max_len=60).read(node, path, ctx)
        if value is INVALID:
            return INVALID
        if value not in self.values:
            near = difflib.get_close_matches(value, self.values, n=1)
            hint = f" (did you mean '{near[0]}'?)" if near else ""
            return ctx.error("bad-choice", path, f"expected one of {', '.join(self.values)}; got '{value}'{hint}", node)
        return value

    def json_schema(self):
        return {"enum": list(self.values), **({"description": self.description} if self.description else {})}


@dataclass
class Date(Type):
    description: str = ""
    minimum: _dt.date | None = None
    maximum: _dt.date | None = None

    def read(self, node, path, ctx):
        s = self._scalar(node, path, ctx, "a date YYYY-MM-DD")
        if s is None:
            return INVALID
        m = _DATE.match(s.raw.strip())
        if not m:
            return ctx.error("bad-date", path, f"expected a date YYYY-MM-DD, got {describe(s)}", s)
        try:
            value = _dt.date(int(m[1]), int(m[2]), int(m[3]))
        except ValueError as exc:
            return ctx.error("bad-date", path, f"expected a date YYYY-MM-DD, got {s.raw}: {exc}", s)
        if (self.minimum and value < self.minimum) or (self.maximum and value > self.maximum):
            return ctx.error("out-of-range", path, f"expected a date from {self.minimum} to {self.maximum}, got {value}"
                             + (f" ({self.description})" if self.description else ""), s)
        return value

    def json_schema(self):
        out = {"type": "string", "pattern": r"^[0-9]{4}-[0-9]{2}-[0-9]{2}$", "description": self.description or "a date YYYY-MM-DD"}
        if self.minimum or self.maximum:
            out["description"] += f" (from {self.minimum} to {self.maximum})"
        return out


@dataclass
class ListOf(Type):
    item: Type = None  # type: ignore[assignment]
    min_items: int = 0
    max_items: int = 10_000
    description: str = ""

    def read(self, node, path, ctx):
        if not isinstance(node, Sequence):
            return ctx.error("wrong-type", path, f"expected a list, got {describe(node)}", node)
        if not (self.min_items <= len(node.items) <= self.max_items):
            want = f"exactly {self.min_items}" if self.min_items == self.max_items else f"{self.min_items} to {self.max_items}"
            return ctx.error("wrong-type", path, f"expected a list of {want} items, got {len(node.items)}", node)
        values = []
        for i, item in enumerate(node.items):
            sub = f"{path}[{i}]"
            ctx.positions[sub] = item
            values.append(self.item.read(item, sub, ctx))
        return INVALID if any(v is INVALID for v in values) else values

    def json_schema(self):
        out = {"type": "array", "items": self.item.json_schema()}
        if self.min_items:
            out["minItems"] = self.min_items
        if self.max_items < 10_000:
            out["maxItems"] = self.max_items
        if self.description:
            out["description"] = self.description
        return out


@dataclass
class Field:
    type: Type
    required: bool = True
    default: Any = None
    doc: str = ""


def _unknown_key(ctx: Ctx, path: str, key: str, known, node: Node) -> None:
    near = difflib.get_close_matches(key, list(known), n=1, cutoff=0.6)
    hint = f"; did you mean '{near[0]}'?" if near else f"; expected one of {', '.join(sorted(known))}"
    where = f"{path}.{key}" if path else key
    ctx.out.error("unknown-key", where, f"{where}: unknown key '{key}'{hint}", node)


@dataclass
class Record(Type):
    """A mapping with declared keys. ``alternatives``: exactly one of these key sets."""

    fields: dict[str, Field] = field(default_factory=dict)
    alternatives: tuple[tuple[str, ...], ...] = ()
    description: str = ""

    def read(self, node, path, ctx):
        if not isinstance(node, Mapping):
            return ctx.error("wrong-type" if path else "not-a-mapping", path, f"expected a mapping of keys, got {describe(node)}", node)
        result: dict[str, Any] = {}
        bad = False
        for key, (knode, vnode) in node.entries.items():
            if key not in self.fields:
                _unknown_key(ctx, path, key, self.fields, knode)
                bad = True
                continue
            sub = f"{path}.{key}" if path else key
            if isinstance(vnode, Scalar) and vnode.plain and vnode.raw == "":
                vnode = Scalar(knode.line, knode.col, "", plain=True)  # point at the key of an empty value
            ctx.positions[sub] = vnode
            value = self.fields[key].type.read(vnode, sub, ctx)
            if value is INVALID:
                bad = True
            else:
                result[key] = value
        present = set(node.entries)
        if self.alternatives:
            chosen = [alt for alt in self.alternatives if present & set(alt)]
            names = " or ".join("{" + ", ".join(a) + "}" for a in self.alternatives)
            if len(chosen) != 1:
                ctx.error("wrong-type", path, f"expected exactly one of {names}, got " + (
                    "none of them" if not chosen else "keys of several: " + ", ".join(sorted(present & {k for a in chosen for k in a}))), node)
                bad = True
            else:
                for k in chosen[0]:
                    if k not in present:
                        ctx.error("missing-key", f"{path}.{k}", f"{path}.{k}: missing key '{k}' (needed with {', '.join(a for a in chosen[0] if a != k)})", node)
                        bad = True
        for key, f in self.fields.items():
            if key in present:
                continue
            if f.required:
                sub = f"{path}.{key}" if path else key
                ctx.out.error("missing-key", sub, f"{sub}: missing required key '{key}'" + (f" ({f.doc})" if f.doc else ""), node)
                bad = True
            elif f.default is not None:
                result[key] = f.default
        return INVALID if bad else result

    def json_schema(self):
        props = {}
        for k, f in self.fields.items():
            s = f.type.json_schema()
            if f.doc and "description" not in s:
                s = {**s, "description": f.doc}
            if f.default is not None and not isinstance(f.default, (list, dict)):
                s = {**s, "default": f.default}
            props[k] = s
        out: dict = {"type": "object", "properties": props, "additionalProperties": False}
        req = [k for k, f in self.fields.items() if f.required]
        if req:
            out["required"] = req
        if self.alternatives:
            out["oneOf"] = [{"required": list(a)} for a in self.alternatives]
        if self.description:
            out["description"] = self.description
        return out


@dataclass
class MapOf(Type):
    """A mapping from slug ids to values of one type (stations, antennas)."""

    value: Type = None  # type: ignore[assignment]
    min_items: int = 0
    max_items: int = 5_000
    description: str = ""
    key_max_len: int = 40  # ids longer than this cannot be printed where they are shown (cards)

    def read(self, node, path, ctx):
        if not isinstance(node, Mapping):
            return ctx.error("wrong-type", path, f"expected a mapping of id: entry, got {describe(node)}", node)
        if len(node.entries) < self.min_items:
            return ctx.error("empty-value", path, f"expected at least {self.min_items} entr{'y' if self.min_items == 1 else 'ies'}, got {len(node.entries)}", node)
        if len(node.entries) > self.max_items:
            return ctx.error("out-of-range", path, f"expected at most {self.max_items} entries, got {len(node.entries)}", node)
        result = {}
        bad = False
        slug = Slug(max_len=self.key_max_len)
        for key, (knode, vnode) in node.entries.items():
            sub = f"{path}.{key}"
            surprise = text_surprise(knode.raw) if knode.plain else None
            if surprise is not None:
                code, reading = surprise
                ctx.error(code, sub, f"the id {knode.raw} is not plain text to every tool: {reading}; quote it or choose another id", knode)
                bad = True
                continue
            if slug.read(Scalar(knode.line, knode.col, knode.raw, plain=False), sub, ctx) is INVALID:
                bad = True
                continue
            ctx.positions[sub] = vnode
            ctx.positions[sub + "#key"] = knode
            value = self.value.read(vnode, sub, ctx)
            if value is INVALID:
                bad = True
            else:
                result[key] = value
        return INVALID if bad else result

    def json_schema(self):
        out = {"type": "object", "propertyNames": {"pattern": "^(?:" + SLUG_PATTERN + ")$", "maxLength": self.key_max_len},
               "additionalProperties": self.value.json_schema()}
        if self.min_items:
            out["minProperties"] = self.min_items
        if self.description:
            out["description"] = self.description
        return out


@dataclass
class ByShape(Type):
    """A value that may be written as a scalar, a list or a mapping, each read by its own type."""

    scalar: Type | None = None
    sequence: Type | None = None
    mapping: Type | None = None
    expected: str = ""
    description: str = ""

    def read(self, node, path, ctx):
        t = self.mapping if isinstance(node, Mapping) else self.sequence if isinstance(node, Sequence) else self.scalar
        if t is None:
            return ctx.error("wrong-type", path, f"expected {self.expected}, got {describe(node)}", node)
        return t.read(node, path, ctx)

    def json_schema(self):
        alts = [t.json_schema() for t in (self.scalar, self.sequence, self.mapping) if t is not None]
        out: dict = {"anyOf": alts}
        if self.description:
            out["description"] = self.description
        return out


@dataclass
class Checked(Type):
    """A type with an extra check on the value it reads (returns an error message or None)."""

    inner: Type = None  # type: ignore[assignment]
    check: Callable[[Any], tuple[str, str] | None] = None  # type: ignore[assignment]

    def read(self, node, path, ctx):
        value = self.inner.read(node, path, ctx)
        if value is INVALID:
            return INVALID
        problem = self.check(value)
        if problem:
            code, message = problem
            return ctx.error(code, path, message, node)
        return value

    def json_schema(self):
        return self.inner.json_schema()
