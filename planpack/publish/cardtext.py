"""Standing instructions: the plan's Markdown as plain formatted card text.

markdown-it-py parses with raw HTML disabled (CommonMark); the tokens become
reportlab Paragraph markup using only <b>, <i> and <font> for code. Every
piece of source text is XML-escaped, so a ``<script>`` in the plan prints as
the characters ``<script>``.
"""

from __future__ import annotations

from dataclasses import dataclass
from xml.sax.saxutils import escape

from markdown_it import MarkdownIt

_MD = MarkdownIt("commonmark", {"html": False})


@dataclass(frozen=True)
class Block:
    kind: str  # "para" | "heading" | "item"
    markup: str  # reportlab Paragraph markup
    depth: int = 0  # list nesting depth (items)
    bullet: str = ""  # "•" or "3." for items


def _inline(tokens) -> str:
    out = []
    for t in tokens:
        if t.type == "text":
            out.append(escape(t.content))
        elif t.type in ("strong_open", "strong_close"):
            out.append("<b>" if t.type.endswith("open") else "</b>")
        elif t.type in ("em_open", "em_close"):
            out.append("<i>" if t.type.endswith("open") else "</i>")
        elif t.type == "code_inline":
            out.append("<b>" + escape(t.content) + "</b>")
        elif t.type == "softbreak":
            out.append(" ")
        elif t.type == "hardbreak":
            out.append("<br/>")
        elif t.type == "image":
            out.append(escape(t.content or t.attrs.get("alt", "") or ""))
        elif t.type in ("link_open", "link_close"):
            pass  # a card cannot be clicked: the link's text stays, the target goes
        else:  # html_inline (not produced with html off) and anything new: as literal text
            out.append(escape(getattr(t, "content", "") or ""))
    return "".join(out)


def markdown_blocks(source: str) -> list[Block]:
    """Blocks of card text from Markdown source (paragraphs, headings, list items, code)."""
    tokens = _MD.parse(source)
    blocks: list[Block] = []
    lists: list[list] = []  # stack of [ordered, next number]
    pending_item: str | None = None
    for i, t in enumerate(tokens):
        if t.type == "bullet_list_open":
            lists.append([False, 0])
        elif t.type == "ordered_list_open":
            lists.append([True, int(t.attrs.get("start", 1) or 1)])
        elif t.type in ("bullet_list_close", "ordered_list_close"):
            lists.pop()
        elif t.type == "list_item_open":
            top = lists[-1]
            if top[0]:
                pending_item = f"{top[1]}."
                top[1] += 1
            else:
                pending_item = "•" if len(lists) == 1 else "–"
        elif t.type == "inline":
            text = _inline(t.children or [])
            prev = tokens[i - 1].type if i else ""
            if prev == "heading_open":
                blocks.append(Block("heading", text))
            elif lists:
                if pending_item is not None:
                    blocks.append(Block("item", text, len(lists) - 1, pending_item))
                    pending_item = None
                else:  # a second paragraph in the same item
                    blocks.append(Block("item", text, len(lists) - 1, ""))
            else:
                blocks.append(Block("para", text))
        elif t.type in ("code_block", "fence"):
            text = escape(t.content.rstrip("\n")).replace("\n", "<br/>")
            blocks.append(Block("para", "<b>" + text + "</b>", len(lists)))
        elif t.type == "hr":
            blocks.append(Block("para", "— — —"))
        elif t.type == "html_block":  # not produced with html off
            blocks.append(Block("para", escape(t.content)))
    return blocks
