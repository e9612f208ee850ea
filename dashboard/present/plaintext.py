"""User text shown as plain text: never rendered as markdown or HTML (no Streamlit here).

Streamlit renders markdown (with images, links, colour directives and math) in ``st.markdown``,
``st.caption``, the message boxes, widget labels, expander labels and ``help`` tooltips. Text a
person typed or a file carried (plan name, site, author, note, review comment, segment and product
names, file names, unknown keys, messages quoting them) must not be able to make the page fetch an
image or show a link, so every such text goes through :func:`escaped` before it reaches
markdown (text made safe for markdown; ``planner.plain.plain`` is the other rule: data made JSON-ready).
Plotly draws a small subset of HTML in titles, names and annotations: :func:`plotly_text` escapes it.
"""

from __future__ import annotations

import html
import math
import re

# CommonMark: any ASCII punctuation character may be backslash-escaped and then stands for itself
# (spec 0.31, section 2.4).  Escaped everywhere: every character that can open markdown, HTML, an
# entity, a GFM autolink or table, ``$`` math or a Streamlit ``:name[...]`` directive.  Left as they are
# (so numbers and units read as usual in the source, "6,874.43 m³/h"): , . / - + = % ' " ; ? which only
# mean something at the start of a line, handled below.
_ALWAYS = re.compile(r"([\\`*_\[\]()<>!#|~$:{}&@^])")
_LINE_START = re.compile(r"^([-+=])(?=\s|[-=]|$)")          # list item, thematic break, setext underline
_ORDERED = re.compile(r"^(\d{1,9})([.)])(?=\s|$)")          # ordered list item
# GFM autolink literals (``http://…``, ``www.…``, ``name@host.org``) are found in the text after escapes
# are resolved, so escaping cannot stop them; they only start after whitespace, punctuation or the
# start of the text.  An invisible WORD JOINER (U+2060, neither) before them, and before "@", keeps
# them text.
JOINER = "\u2060"
_AUTOLINK = re.compile(r"(?=https?\\?:|www\.)", re.IGNORECASE)


def _line(text: str) -> str:
    text = _ALWAYS.sub(r"\\\1", text.strip())
    text = _LINE_START.sub(r"\\\1", text)
    text = _ORDERED.sub(r"\1\\\2", text)
    text = _AUTOLINK.sub(JOINER, text)
    return text.replace("\\@", JOINER + "\\@")


def escaped(text) -> str:
    """``text`` (any object, ``str()``-ed) escaped so that markdown shows it literally; line breaks
    become markdown line breaks and leading spaces are dropped (no code blocks)."""
    lines = str("" if text is None else text).replace("\r\n", "\n").replace("\r", "\n").split("\n")
    return "  \n".join(_line(line) for line in lines)


def plotly_text(text) -> str:
    """``text`` for a plotly title, trace name or annotation: its HTML subset escaped."""
    return html.escape(str("" if text is None else text), quote=False)


def _cell(value, one_line: bool = False) -> str:
    """A table cell as escaped text (on one line for a markdown table's row); a missing value as "—"."""
    if value is None or (isinstance(value, float) and math.isnan(value)):
        return "—"
    return escaped(" ".join(str(value).split()) if one_line else value)


def escaped_table(frame):
    """A copy of a pandas frame for ``st.table`` (whose cells and headings are markdown): every cell as
    escaped text, a missing value as "—".  ``st.dataframe`` draws plain text itself: give it the frame."""
    out = frame.map(_cell)
    out.columns = [_cell(c) for c in frame.columns]
    return out


def markdown_table(columns, rows) -> str:
    """A table as markdown for ``st.markdown`` (no pandas needed): the same escaped cells as
    :func:`escaped_table`; "|" is escaped with the rest, so a cell never splits."""
    lines = ["| " + " | ".join(_cell(c, True) for c in columns) + " |", "|" + " --- |" * len(columns)]
    lines += ["| " + " | ".join(_cell(v, True) for v in row) + " |" for row in rows]
    return "\n".join(lines)
