"""Strict YAML reading that keeps the line and column of every node.

PyYAML's safe parser produces events; this module builds its own small tree
from them, iteratively, so that it can bound depth, aliases and size, refuse
duplicate keys (plain PyYAML keeps the last one silently) and keep every
scalar's raw text and quoting. YAML merge keys (``<<``) are refused with a
hint, since readers disagree on them. Scalars are *not* typed here: the schema knows
what each key expects and types the raw text by YAML 1.2 rules, flagging the
places where YAML 1.1 tools would read the same text differently.
"""

from __future__ import annotations

import os
import stat
from dataclasses import dataclass, field

import yaml

from planpack.plan.diagnostics import Collector

#: Bounds that keep a hostile file from hanging or exhausting the reader.
MAX_BYTES = 4 * 1024 * 1024
MAX_DEPTH = 32
MAX_ALIASES = 64
MAX_NODES = 100_000  # a 500-station, 200-channel plan has about 12 000

# libyaml's parser when PyYAML was built with it (same events and marks, much faster).
_LOADER = getattr(yaml, "CSafeLoader", yaml.SafeLoader)


@dataclass
class Node:
    line: int  # 1-based
    col: int  # 1-based


@dataclass
class Scalar(Node):
    raw: str
    plain: bool  # written without quotes (so open to implicit typing)
    tag: str | None = None


@dataclass
class Sequence(Node):
    items: list[Node] = field(default_factory=list)


@dataclass
class Mapping(Node):
    # key text -> (key node, value node), in file order
    entries: dict[str, tuple[Scalar, Node]] = field(default_factory=dict)


class ReadAbort(Exception):
    """Reading stopped; the reason is already in the collector."""


def _pos(mark) -> tuple[int, int]:
    return mark.line + 1, mark.column + 1


def decode(data: bytes, out: Collector) -> str | None:
    """Decode the file's bytes as UTF-8, or diagnose why not."""
    if data.startswith((b"\xff\xfe", b"\xfe\xff")) or data[:4] in (b"\x00\x00\xfe\xff", b"\xff\xfe\x00\x00"):
        out.error("file-encoding", "", "the file is UTF-16 or UTF-32 (it starts with a byte-order mark); save it as UTF-8", None)
        return None
    if data.startswith(b"\xef\xbb\xbf"):
        data = data[3:]
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as exc:
        before = data[: exc.start]
        line = before.count(b"\n") + 1
        col = exc.start - (before.rfind(b"\n") + 1) + 1
        out.add("error", "file-encoding", "", f"the file is not valid UTF-8: byte 0x{data[exc.start]:02x} cannot start or continue a character; save the file as UTF-8", line, col)
        return None
    nul = text.find("\x00")
    if nul >= 0:
        line = text.count("\n", 0, nul) + 1
        col = nul - (text.rfind("\n", 0, nul) + 1) + 1
        out.add("error", "nul-byte", "", "the file contains a NUL byte; is it a binary file?", line, col)
        return None
    return text


def _check_tabs(text: str, out: Collector) -> bool:
    ok = True
    for n, line in enumerate(text.splitlines(), 1):
        col = line.find("\t")
        if col >= 0:
            out.add("error", "tab-character", "", "a tab character; YAML indentation must use spaces (replace the tab with spaces)", n, col + 1)
            ok = False
            if len(out.items) > 20:
                break
    return ok


def compose(text: str, out: Collector) -> Node | None:
    """Build the node tree of one YAML document, or diagnose and return None."""
    if not _check_tabs(text, out):
        return None
    try:
        return _build(yaml.parse(text, Loader=_LOADER), out)
    except ReadAbort:
        return None
    except yaml.MarkedYAMLError as exc:
        mark = exc.problem_mark or exc.context_mark
        line, col = _pos(mark) if mark is not None else (0, 0)
        problem = exc.problem or exc.context or "malformed YAML"
        if "nesting depth" in problem:  # libyaml's own bound, reached while scanning ahead
            out.add("error", "yaml-too-deep", "", f"nesting deeper than {MAX_DEPTH} levels; a plan is far shallower", line, col)
            return None
        out.add("error", "yaml-syntax", "", f"YAML syntax: {problem}", line, col)
        return None
    except yaml.reader.ReaderError as exc:  # a character YAML does not allow anywhere
        code = exc.character if isinstance(exc.character, int) else ord(str(exc.character)[:1] or "\0")
        at = text.find(chr(code))  # libyaml reports a byte offset; the character itself is unambiguous
        line, col = (text.count("\n", 0, at) + 1, at - (text.rfind("\n", 0, at) + 1) + 1) if at >= 0 else (0, 0)
        out.add("error", "yaml-syntax", "", f"YAML syntax: the character U+{code:04X} is not allowed in YAML "
                "(a control character or non-character); remove it or write it as an escape in a double-quoted string",
                line, col)
        return None
    except yaml.YAMLError as exc:  # any other reader problem
        text_ = str(exc).splitlines()[0] if str(exc) else "malformed YAML"
        out.add("error", "yaml-syntax", "", f"YAML syntax: {text_}", 0, 0)
        return None


def _build(events, out: Collector) -> Node | None:
    stack: list[tuple[Node, Scalar | None]] = []  # container, pending key for mappings
    paths: list[str] = []  # key path of each open container, for messages
    anchors: dict[str, Node] = {}
    aliases = 0
    nodes = 0
    root: Node | None = None
    documents = 0

    def attach(node: Node) -> None:
        nonlocal root
        if not stack:
            root = node
            return
        parent, pending = stack[-1]
        if isinstance(parent, Sequence):
            parent.items.append(node)
            return
        assert isinstance(parent, Mapping)
        if pending is None:  # this node is a key
            if not isinstance(node, Scalar):
                out.add("error", "yaml-complex-key", "", "a mapping key must be a plain string, not a list or mapping", node.line, node.col)
                raise ReadAbort
            stack[-1] = (parent, node)
            return
        key = pending.raw
        if key in parent.entries:
            first = parent.entries[key][0]
            where = f"{paths[-1]}.{key}" if paths[-1] else key
            out.add("error", "duplicate-key", where,
                    f"{where}: duplicate key '{key}' (first at line {first.line}); YAML readers keep only one of them silently — remove or rename one",
                    pending.line, pending.col)
        elif key == "<<" and pending.plain:
            # YAML 1.1 merge keys: PyYAML, editors and other readers disagree on lists of merges, mappings
            # merged in place and keys overridden after a merge, so a plan does not use them
            out.add("error", "yaml-merge-key", paths[-1],
                    f"{paths[-1] + ': ' if paths[-1] else ''}a YAML merge key '<<': YAML readers disagree on what "
                    "it merges (a list of aliases, a mapping in place, a key written again after it), so plans do "
                    "not use it; write the keys out in full (an alias of a whole value, such as feedline: *coax, "
                    "still works)", pending.line, pending.col)
        else:
            parent.entries[key] = (pending, node)
        stack[-1] = (parent, None)

    for ev in events:
        if isinstance(ev, (yaml.StreamStartEvent, yaml.StreamEndEvent)):
            continue
        if isinstance(ev, yaml.DocumentStartEvent):
            documents += 1
            if documents > 1:
                line, col = _pos(ev.start_mark)
                out.add("error", "yaml-multiple-documents", "", "more than one YAML document ('---'); a plan is one document", line, col)
                raise ReadAbort
            continue
        if isinstance(ev, yaml.DocumentEndEvent):
            continue
        line, col = _pos(ev.start_mark)
        if isinstance(ev, yaml.AliasEvent):
            aliases += 1
            if aliases > MAX_ALIASES:
                out.add("error", "yaml-aliases", "", f"more than {MAX_ALIASES} aliases; plans do not need that many (is this an alias bomb?)", line, col)
                raise ReadAbort
            if ev.anchor not in anchors:
                out.add("error", "yaml-syntax", "", f"alias *{ev.anchor} names no anchor defined before it", line, col)
                raise ReadAbort
            target = anchors[ev.anchor]
            nodes += _size(target)
            if nodes > MAX_NODES:
                out.add("error", "yaml-too-many-nodes", "", f"the aliases expand to more than {MAX_NODES} nodes (is this an alias bomb?)", line, col)
                raise ReadAbort
            attach(target)
            continue
        nodes += 1
        if nodes > MAX_NODES:
            out.add("error", "yaml-too-many-nodes", "", f"more than {MAX_NODES} YAML nodes; a plan is far smaller", line, col)
            raise ReadAbort
        tag = getattr(ev, "tag", None)
        if tag is not None and tag not in ("!", "tag:yaml.org,2002:str"):
            out.add("error", "yaml-tag", "", f"explicit YAML tag '{tag}'; plans do not use tags (remove it)", line, col)
            raise ReadAbort
        if isinstance(ev, yaml.ScalarEvent):
            node: Node = Scalar(line, col, ev.value, plain=not ev.style and tag is None, tag=tag)
            if ev.anchor:
                anchors[ev.anchor] = node
            attach(node)
        elif isinstance(ev, (yaml.MappingStartEvent, yaml.SequenceStartEvent)):
            if len(stack) >= MAX_DEPTH:
                out.add("error", "yaml-too-deep", "", f"nesting deeper than {MAX_DEPTH} levels; a plan is far shallower", line, col)
                raise ReadAbort
            node = Mapping(line, col) if isinstance(ev, yaml.MappingStartEvent) else Sequence(line, col)
            if ev.anchor:
                anchors[ev.anchor] = node
            child = _child_path(stack, paths)  # before attach() clears the pending key
            attach(node)  # messages in attach() name the parent's path
            paths.append(child)
            stack.append((node, None))
        elif isinstance(ev, (yaml.MappingEndEvent, yaml.SequenceEndEvent)):
            stack.pop()
            paths.pop()
    return root


def _child_path(stack, paths) -> str:
    """The key path of a container about to be attached to the top of the stack."""
    if not stack:
        return ""
    parent, pending = stack[-1]
    base = paths[-1]
    if isinstance(parent, Sequence):
        return f"{base}[{len(parent.items)}]"
    if pending is None:
        return base
    return f"{base}.{pending.raw}" if base else pending.raw


def _size(node: Node) -> int:
    """Count nodes below ``node`` (bounded by MAX_NODES: stops early)."""
    total, todo = 0, [node]
    while todo and total <= MAX_NODES:
        n = todo.pop()
        total += 1
        if isinstance(n, Mapping):
            todo.extend(v for _, v in n.entries.values())
        elif isinstance(n, Sequence):
            todo.extend(n.items)
    return total


def read_bytes(path: str, out: Collector) -> bytes | None:
    """The file's bytes (at most MAX_BYTES), or diagnose why they cannot be read.

    Opened non-blocking, so a named pipe nobody writes to reads as empty instead
    of hanging; devices (/dev/tty, /dev/zero) and sockets are refused. A pipe
    that does carry a plan (``check <(git show HEAD:plan.yaml)``) still works.
    """
    try:
        fd = os.open(path, os.O_RDONLY | os.O_NONBLOCK)
    except OSError as exc:
        out.error("file-unreadable", "", f"cannot read the file: {exc.strerror or exc}")
        return None
    try:
        mode = os.fstat(fd).st_mode
        if stat.S_ISDIR(mode):
            out.error("file-unreadable", "", "cannot read the file: it is a folder")
            return None
        if not (stat.S_ISREG(mode) or stat.S_ISFIFO(mode)):
            out.error("file-unreadable", "", "cannot read the file: it is not a regular file (a device or socket); give a plan file")
            return None
        os.set_blocking(fd, True)  # a pipe with a writer: wait for its data
        with os.fdopen(fd, "rb", closefd=False) as fh:
            data = fh.read(MAX_BYTES + 1)
    except OSError as exc:
        out.error("file-unreadable", "", f"cannot read the file: {exc.strerror or exc}")
        return None
    finally:
        os.close(fd)
    if len(data) > MAX_BYTES:
        out.error("file-too-large", "", f"the file is larger than {MAX_BYTES // (1024 * 1024)} MiB; a plan is far smaller")
        return None
    return data


def read_file(path: str, out: Collector) -> Node | None:
    """Read, decode and compose a plan file; diagnose every way it can fail."""
    data = read_bytes(path, out)
    if data is None:
        return None
    return parse_bytes(data, out)


def parse_bytes(data: bytes, out: Collector) -> Node | None:
    """Decode and compose a plan file's bytes."""
    text = decode(data, out)
    if text is None:
        return None
    return compose(text, out)
