"""Laying out one frame of the review screen: which rows show what, for any terminal size.

A frame is a list of rich ``Text`` lines, each cut to the terminal width. At 80x24 it shows
a header, the document's id and source, 8 lines of its text, up to five categories with
their probabilities, up to three nearest labelled documents, a message, the keys and the
prompt. In a smaller terminal the rows are given out by priority (top categories, a few
lines of text, the nearest labelled document, then the rest) and the message row asks for
a larger terminal. Cost: O(rows) per frame; the wrapped text is cached per (text, width).

Document text is untrusted: control characters (escape sequences above all) are replaced
before anything reaches the terminal.
"""

from __future__ import annotations

import io
import re
from dataclasses import dataclass
from functools import lru_cache
from typing import TYPE_CHECKING

from rich.console import Console
from rich.text import Text

from ..review import ReviewItem

if TYPE_CHECKING:
    from ._review import _Review

#: Below this many rows or columns only a request to enlarge and the prompt are drawn.
MIN_ROWS, MIN_COLUMNS = 6, 30
SUGGESTED_SIZE = "80x24"
_CONTROL = re.compile(r"[\x00-\x08\x0b-\x1f\x7f-\x9f]")
_BAR_CELLS = 10


def clean_text(text: str, *, unicode: bool = True) -> str:
    """Text safe to print on a terminal: newlines kept, tabs as spaces, other controls replaced."""
    text = text.replace("\r\n", "\n").replace("\r", "\n").replace("\t", "    ")
    return _CONTROL.sub("\ufffd" if unicode else "?", text)


@lru_cache(maxsize=1)
def _measuring_console() -> Console:
    return Console(file=io.StringIO(), width=200, emoji=False, highlight=False, color_system=None)


@lru_cache(maxsize=32)
def _wrap(text: str, width: int) -> tuple[str, ...]:
    lines: list[str] = []
    for paragraph in text.split("\n"):
        if not paragraph.strip():
            lines.append("")
            continue
        wrapped = Text(paragraph).wrap(_measuring_console(), max(1, width), overflow="fold")
        lines.extend(line.plain.rstrip() for line in wrapped)
    while lines and not lines[-1]:
        lines.pop()
    return tuple(lines)


def wrap_text(item: ReviewItem, width: int) -> tuple[str, ...]:
    """The item's text as display lines of at most ``width`` cells (cached)."""
    return _wrap(clean_text(item.text), width)


@dataclass
class Frame:
    """What to draw, and (after :func:`render_frame`) how many text rows were shown.

    ``height`` 0 means no limit (the plain line front end); ``text_rows`` is then the
    number of text lines to print, and after a full-screen render it is set to the rows
    the text got, so paging moves by one screenful.
    """

    review: _Review
    width: int
    height: int
    prompt: str
    show_help: bool
    text_rows: int
    unicode: bool


@dataclass
class _Rows:
    doc: int = 0
    text: int = 0
    cands: int = 0
    near: int = 0
    titles: bool = False
    cramped: bool = False


def plan_rows(height: int, n_text: int, n_cands: int, n_near: int) -> _Rows:
    """Share ``height`` rows out: 4 fixed (header, message, keys, prompt), then by priority.

    Priority: up to 3 categories, 3 text lines, 1 nearest labelled document, the document
    line, section titles, the remaining categories and neighbours, and all other rows to
    the text. ``cramped`` says something was left out for lack of rows.
    """
    rows = _Rows()
    free = height - 4

    def give(wanted: int) -> int:
        nonlocal free
        got = max(0, min(wanted, free))
        free -= got
        if got < wanted:
            rows.cramped = True
        return got

    n_cands = max(n_cands, 1)  # with no candidates, one row says so
    rows.cands = give(min(n_cands, 3))
    rows.text = give(min(max(n_text, 1), 3))
    rows.near = give(min(n_near, 1))
    rows.doc = give(1)
    titles = 2 + (1 if n_near else 0)
    rows.titles = free >= titles
    if rows.titles:
        free -= titles
    else:
        rows.cramped = True
    rows.cands += give(n_cands - rows.cands)
    rows.near += give(n_near - rows.near)
    rows.text += max(0, free)
    return rows


def _fit(line: Text, width: int) -> Text:
    line.truncate(max(1, width), overflow="ellipsis")
    return line


def _rule(title: str, width: int, unicode: bool) -> Text:
    dash = "\u2500" if unicode else "-"
    head = f"{dash * 2} {title} "
    return Text(head + dash * max(0, width - Text(head).cell_len), style="dim")


def _header(review: _Review, item: ReviewItem, page: str) -> Text:
    line = Text("seedsort review", style="bold")
    line.append(f"  {len(review.queue)} to go, {review.decisions - review.undone} decided")
    why = item.reason + (f", margin {item.margin:.2f}" if item.margin is not None else "")
    line.append(f"  | {why}", style="yellow")
    if page:
        line.append(f"  | {page}", style="dim")
    return line


def _document_line(item: ReviewItem) -> Text:
    line = Text(item.id, style="bold cyan")
    if item.source and item.source != item.id:
        line.append(f"  {clean_text(item.source)}", style="dim")
    now = item.category if item.category is not None else "none"
    line.append(f"  now: {now} ({item.status})")
    return line


def _candidate_lines(review: _Review, item: ReviewItem, count: int, unicode: bool) -> list[Text]:
    proposed = review.proposed()
    number_of = {name: i for i, name in enumerate(review.categories, 1)}
    width = max((len(c.category) for c in item.candidates[:count]), default=0)
    full, empty = ("\u2588", "\u2591") if unicode else ("#", ".")
    lines = []
    for candidate in item.candidates[:count]:
        number = number_of.get(candidate.category)
        filled = round(max(0.0, min(1.0, candidate.probability)) * _BAR_CELLS)
        line = Text(f" {number if number is not None else '-':>3} ", style="bold")
        line.append(f"{candidate.category:<{width}} ", style="bold" if candidate.category == proposed else "")
        line.append(f"{candidate.probability:5.2f} ")
        line.append(full * filled, style="green")
        line.append(empty * (_BAR_CELLS - filled), style="dim")
        if candidate.category == proposed:
            line.append("  <- a keeps this", style="bold")
        lines.append(line)
    return lines


def _near_lines(item: ReviewItem, count: int) -> list[Text]:
    lines = []
    for seed in item.nearby[:count]:
        line = Text(f"  {seed.category} ", style="cyan")
        line.append(f"{seed.similarity:.2f}  ", style="dim")
        line.append(" ".join(clean_text(seed.snippet).split()))
        lines.append(line)
    return lines


def keys_line(width: int, categories: int, *, typed: bool = False) -> Text:
    """The longest help line of the keys (or, ``typed``, of the line commands) that fits."""
    span = f"1-{categories}" if categories > 1 else "1"
    if typed:
        return Text(f"a accept | {span}/letters pick | n none | s skip | u undo | m/b page | ? | q quit", style="dim")
    for variant in (
        f"a accept  {span} pick  c name  n none  s skip  u undo  space/b page  ? help  q quit",
        f"a accept {span}/c pick n none s skip u undo space/b page ? help q quit",
        f"keys: a {span} c n s u space b q (? explains)",
        "? explains the keys",
    ):
        if len(variant) <= width:
            return Text(variant, style="dim")
    return Text("?", style="dim")


def _help_lines(review: _Review, width: int) -> list[Text]:
    lines = [Text("Keys", style="bold")]
    for text in (
        "a or Enter  accept the category marked '<- a'",
        f"1-{len(review.categories)}        choose that category (Enter after a partial number)",
        "c           type a category's first letters, Tab completes, Enter chooses, Esc cancels",
        "n           the document fits no category",
        "s           skip it for now (stays undecided)",
        "u           undo the last decision (the document comes back)",
        "space / b   next / previous page of the text (arrows: one line)",
        "q           quit (labels are re-spread first); Ctrl-C quits at once",
    ):
        lines.append(Text("  " + text))
    lines.append(Text("Each decision is saved at once to:", style="dim"))
    lines.append(Text(f"  {review.session.location}", style="dim"))
    lines.append(Text("Categories", style="bold"))
    names = [f"{i:>3} {name}" for i, name in enumerate(review.categories, 1)]
    column = max(len(n) for n in names) + 2 if names else width
    per_row = max(1, width // column)
    for start in range(0, len(names), per_row):
        lines.append(Text("".join(n.ljust(column) for n in names[start:start + per_row])))
    return lines


def render_frame(frame: Frame) -> list[Text]:
    """Lines of one frame: exactly ``frame.height`` of them on a full screen.

    The last line is the prompt; each line is at most ``frame.width`` cells.
    """
    review, width, height = frame.review, frame.width, frame.height
    item = review.current
    if item is None:
        return [Text("Nothing left to review.")]
    full_screen = height > 0
    if full_screen and (height < MIN_ROWS or width < MIN_COLUMNS):
        if height == 1:
            return [_fit(Text(frame.prompt), width)]
        lines = [Text(f"Enlarge the terminal to review (now {width}x{height}).", style="bold")]
        lines += [Text("")] * (height - 2) + [Text(frame.prompt)]
        return [_fit(line, width) for line in lines]
    if frame.show_help and full_screen:
        body = _help_lines(review, width)[: height - 3]
        lines = [_header(review, item, "")] + body
        lines += [Text("")] * (height - 3 - len(body)) + [Text("Any key returns.", style="dim"), Text(frame.prompt)]
        return [_fit(line, width) for line in lines]

    text = wrap_text(item, width - 2) or ("(empty document)",)
    if full_screen:
        rows = plan_rows(height, len(text), len(item.candidates), len(item.nearby))
        frame.text_rows = rows.text
    else:
        rows = _Rows(doc=1, text=frame.text_rows, cands=max(1, len(item.candidates)), near=len(item.nearby),
                     titles=True)
    review.offset = max(0, min(review.offset, max(0, len(text) - rows.text)))
    shown = text[review.offset: review.offset + rows.text]
    more = len(text) > rows.text
    page = f"lines {review.offset + 1}-{review.offset + len(shown)} of {len(text)}" if more else ""
    paging = " (space/b: page)" if full_screen else " (m: more, b: back)"

    lines = [_header(review, item, "" if rows.titles else page)]
    if rows.doc:
        lines.append(_document_line(item))
    if rows.titles:
        lines.append(_rule("text" + (f", {page}{paging}" if more else ""), width, frame.unicode))
    lines += [Text("  " + line) for line in shown]
    if full_screen:
        lines += [Text("")] * (rows.text - len(shown))
    if rows.titles:
        lines.append(_rule("categories, most probable first", width, frame.unicode))
    lines += _candidate_lines(review, item, rows.cands, frame.unicode)
    if not item.candidates and rows.cands:
        lines.append(Text("  (no category reaches this document)", style="dim"))
    if rows.titles and item.nearby:
        lines.append(_rule("nearest labelled documents", width, frame.unicode))
    lines += _near_lines(item, rows.near)
    if full_screen:
        message = review.message
        if not message and rows.cramped:
            message = f"Small terminal ({width}x{height}): enlarge to {SUGGESTED_SIZE} to see everything."
        body_rows = height - 3
        lines = lines[:body_rows] + [Text("")] * max(0, body_rows - len(lines))
        lines += [Text(message, style="yellow"), keys_line(width, len(review.categories)), Text(frame.prompt)]
    else:
        lines.append(keys_line(width, len(review.categories), typed=True))
    return [_fit(line, width) for line in lines]
