"""User text shown as plain text: never rendered as markdown or HTML (no Streamlit here).

Streamlit renders markdown (with images, links, colour directives and math) in ``st.markdown``,
``st.caption``, the message boxes, widget labels, expander labels and ``help`` tooltips. Text a
person typed or a file carried (plan name, site, author, note, review comment, segment and product
names, file names, unknown keys, messages quoting them) must not be able to make the page fetch an
image or show a link, so every such text goes through :func:`plain` before it reaches markdown.
Plotly draws a small subset of HTML in titles, names and annotations: :func:`plotly_text` escapes it.
"""

from __future__ import annotations

import html
import re

# CommonMark: any ASCII punctuation character may be backslash-escaped and then stands for itself
# (spec 0.31, section 2.4). Escaping all of them also stops GFM autolinks, ``$`` math and ``:name[...]``
# directives, which all start with punctuation.
_PUNCTUATION = re.compile(r"([!-/:-@\[-`{-~])")


def plain(text) -> str:
    """``text`` (any object, ``str()``-ed) escaped so that markdown shows it literally; line breaks
    become markdown line breaks and leading spaces are dropped (no code blocks)."""
    lines = str("" if text is None else text).replace("\r\n", "\n").replace("\r", "\n").split("\n")
    return "  \n".join(_PUNCTUATION.sub(r"\\\1", line.strip()) for line in lines)


def plotly_text(text) -> str:
    """``text`` for a plotly title, trace name or annotation: its HTML subset escaped."""
    return html.escape(str("" if text is None else text), quote=False)
