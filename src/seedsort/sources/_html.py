"""HTML to readable plain text with the standard library's ``html.parser``.

Script, style and template contents are dropped; block elements (paragraphs, headings,
list items, table rows, ...) and ``<br>`` become line breaks; runs of whitespace outside
``<pre>`` collapse to one space, as a browser shows them; character references are
unescaped by the parser (``convert_charrefs=True``). One pass over the markup.
"""

from __future__ import annotations

import html
import re
from html.parser import HTMLParser

_DROPPED = frozenset({"script", "style", "template"})
_BLOCKS = frozenset(
    {
        "address", "article", "aside", "blockquote", "caption", "center", "dd", "details",
        "dialog", "div", "dl", "dt", "fieldset", "figcaption", "figure", "footer", "form",
        "h1", "h2", "h3", "h4", "h5", "h6", "header", "hr", "li", "main", "nav", "ol", "p",
        "pre", "section", "summary", "table", "tbody", "tfoot", "thead", "title", "tr", "ul",
    }
)  # fmt: skip
_CELLS = frozenset({"td", "th"})
_WHITESPACE = re.compile(r"\s+")
_MANY_BLANK_LINES = re.compile(r"\n{3,}")
_TAG = re.compile(r"<[^>]*>")


class _TextExtractor(HTMLParser):
    """Collects the visible text of a document as pieces of a string."""

    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.pieces: list[str] = []
        self._dropped_depth = 0
        self._pre_depth = 0

    def _at_line_start(self) -> bool:
        return not self.pieces or self.pieces[-1].endswith("\n")

    def _break_line(self) -> None:
        if not self._at_line_start():
            self.pieces.append("\n")

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        if tag in _DROPPED:
            self._dropped_depth += 1
        elif tag == "br":
            self.pieces.append("\n")
        elif tag in _BLOCKS:
            self._break_line()
            if tag == "pre":
                self._pre_depth += 1
        elif tag in _CELLS and not self._at_line_start():
            self.pieces.append(" ")

    def handle_startendtag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        # <br/>, <hr/>, and self-closed blocks: a break, never a change of depth.
        if tag == "br":
            self.pieces.append("\n")
        elif tag in _BLOCKS:
            self._break_line()

    def handle_endtag(self, tag: str) -> None:
        if tag in _DROPPED:
            self._dropped_depth = max(0, self._dropped_depth - 1)
        elif tag in _BLOCKS:
            self._break_line()
            if tag == "pre":
                self._pre_depth = max(0, self._pre_depth - 1)

    def handle_data(self, data: str) -> None:
        if self._dropped_depth:
            return
        if self._pre_depth:
            self.pieces.append(data)
            return
        data = _WHITESPACE.sub(" ", data)
        if self._at_line_start():
            data = data.lstrip(" ")
        if data:
            self.pieces.append(data)


def _tidy(text: str) -> str:
    lines = [line.rstrip() for line in text.split("\n")]
    return _MANY_BLANK_LINES.sub("\n\n", "\n".join(lines)).strip("\n")


def html_to_text(markup: str) -> str:
    """Readable plain text of an HTML document or fragment.

    Parameters
    ----------
    markup:
        HTML source; need not be well formed.

    Returns
    -------
    str
        The visible text, one line per block element, at most one blank line in a row,
        no leading or trailing blank lines.
    """
    parser = _TextExtractor()
    try:
        parser.feed(markup)
        parser.close()
    except AssertionError:
        # html.parser still raises on a few malformed declarations (e.g. "<![foo[");
        # crude tag stripping is better than losing the document.
        return _tidy(html.unescape(_WHITESPACE.sub(" ", _TAG.sub(" ", markup))).strip())
    return _tidy("".join(parser.pieces))
