"""The review screen: work through doubtful documents with single keys, or with typed lines.

Two front ends share one state machine (:class:`_Review`):

* a full-screen view when stdin and the console are terminals: the terminal is put in
  cbreak mode (stdlib ``termios``/``tty``; Ctrl-C still raises ``KeyboardInterrupt``), the
  alternate screen is used, and every frame is drawn row by row with cursor positioning, so
  nothing scrolls and a resize only needs a redraw;
* plain line prompts otherwise, one command per line, so a review can be scripted
  (``printf 'a\\n3\\nreq\\nq\\n' | seedsort review ...``); end of input quits cleanly.

Every decision goes to ``session.decide`` the moment it is made. Every ``refresh_every``
decisions, and on quit, ``session.refresh()`` re-spreads the labels and the queue is taken
anew. Cost per key press: one frame of ``height`` rows; a document's text is wrapped once
per (document, width) and cached, so paging through a long text is O(rows shown).
"""

from __future__ import annotations

import os
import re
import select
import sys
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from typing import IO

from rich.console import Console
from rich.text import Text

from ..review import ReviewItem, ReviewSession
from . import _interrupt
from ._review_frame import Frame, clean_text, render_frame, wrap_text

#: Why a review ended: the quit key, end of scripted input, Ctrl-C, or nothing left to review.
QUIT_REASONS = ("quit", "end of input", "interrupted", "done")

PROMPT = "review> "
_ENTER, _BACKSPACE, _ESCAPE, _TAB = ("\r", "\n"), ("\x7f", "\x08"), "\x1b", "\t"
#: Escape sequences of the keys we use (xterm and VT220 forms, common practice).
_SEQUENCES = {
    "\x1b[A": "up", "\x1bOA": "up", "\x1b[B": "down", "\x1bOB": "down",
    "\x1b[5~": "page-up", "\x1b[6~": "page-down",
}


@dataclass(frozen=True, slots=True)
class ReviewOutcome:
    """What a review did, for the command's closing summary.

    Attributes
    ----------
    decided:
        Decisions made (``session.decide`` calls), including any later undone.
    undone:
        Decisions taken back (``session.undo`` calls that found one).
    skipped:
        Documents passed over without a decision.
    quit_reason:
        One of :data:`QUIT_REASONS`.
    refreshes:
        How many times the labels were re-spread (``session.refresh`` calls).
    remaining:
        Documents still in the queue at the end, skipped ones included.
    pending_refresh:
        True when decisions were saved but not yet re-spread (only after Ctrl-C, which
        quits at once); the caller may call ``session.refresh()`` itself.
    """

    decided: int
    undone: int
    skipped: int
    quit_reason: str
    refreshes: int
    remaining: int
    pending_refresh: bool


def match_category(typed: str, categories: Sequence[str]) -> tuple[str | None, str]:
    """Resolve a typed number (1-based) or first letters to one category.

    Case-insensitive; an exact name wins over longer names it is a prefix of.

    Returns
    -------
    (category, "") when the input names exactly one category, else (None, a sentence
    saying what to type instead).
    """
    text = typed.strip()
    if text.isdigit():
        number = int(text)
        if 1 <= number <= len(categories):
            return categories[number - 1], ""
        return None, f"No category number {text}: choose 1-{len(categories)}."
    wanted = text.casefold()
    exact = [c for c in categories if c.casefold() == wanted]
    if exact:
        return exact[0], ""
    fitting = [c for c in categories if c.casefold().startswith(wanted)]
    if len(fitting) == 1:
        return fitting[0], ""
    if not fitting:
        return None, f"No category starts with '{text}'; ? lists them."
    shown = ", ".join(fitting[:4]) + (", ..." if len(fitting) > 4 else "")
    return None, f"'{text}' fits {len(fitting)} categories ({shown}): type more letters."


def _common_prefix(names: Sequence[str]) -> str:
    return os.path.commonprefix([n.casefold() for n in names]) if names else ""


class _Review:
    """Queue, counters and the last message; applies commands to the session."""

    def __init__(self, session: ReviewSession, refresh_every: int) -> None:
        self.session = session
        self.refresh_every = max(1, refresh_every)
        self.categories = tuple(session.categories)
        self.skipped_ids: set[str] = set()
        self.decided: dict[str, ReviewItem] = {}
        self.decisions = self.undone = self.skipped = self.refreshes = 0
        self.since_refresh = 0
        self.unspread = False  # a decision or undo not yet re-spread
        self.queue = self._fresh_queue()
        self.offset = 0
        self.message = f"Decisions are saved to {session.location} as you make them."

    def _fresh_queue(self) -> list[ReviewItem]:
        return [item for item in self.session.queue() if item.id not in self.skipped_ids]

    @property
    def current(self) -> ReviewItem | None:
        return self.queue[0] if self.queue else None

    def proposed(self) -> str | None:
        """The category that accepting keeps: the one the run gave, else the top candidate."""
        item = self.current
        if item is None:
            return None
        if item.category is not None:
            return item.category
        return item.candidates[0].category if item.candidates else None

    def _next(self) -> None:
        self.queue.pop(0)
        self.offset = 0

    def decide(self, category: str | None, busy: Callable[[str], None]) -> None:
        item = self.current
        assert item is not None
        self.session.decide(item.id, category)
        self.decided[item.id] = item
        self.decisions += 1
        self.since_refresh += 1
        self.unspread = True
        self._next()
        self.message = f"Saved: {item.id} -> {category if category is not None else 'no category'}."
        if self.since_refresh >= self.refresh_every or not self.queue:
            self.refresh(busy)

    def accept(self, busy: Callable[[str], None]) -> None:
        category = self.proposed()
        if category is None:
            self.message = "Nothing to accept here: pick a category or n for no category."
        else:
            self.decide(category, busy)

    def skip(self) -> None:
        item = self.current
        assert item is not None
        self.skipped_ids.add(item.id)
        self.skipped += 1
        self._next()
        self.message = f"Skipped {item.id}; it stays undecided."

    def undo(self) -> None:
        document_id = self.session.undo()
        if document_id is None:
            self.message = "Nothing to undo in this review."
            return
        self.undone += 1
        self.unspread = True
        self.since_refresh = max(0, self.since_refresh - 1)
        item = self.decided.pop(document_id, None)
        if item is None:
            self.message = f"Took back the decision on {document_id}."
            return
        self.queue = [item] + [other for other in self.queue if other.id != document_id]
        self.offset = 0
        self.message = f"Took back the decision on {document_id}; it is shown again."

    def refresh(self, busy: Callable[[str], None]) -> None:
        saved = self.message + " " if self.message.startswith("Saved") else ""
        busy("Re-spreading the labels with your decisions ...")
        self.session.refresh()
        self.refreshes += 1
        self.since_refresh = 0
        self.unspread = False
        self.queue = self._fresh_queue()
        self.offset = 0
        self.message = f"{saved}Labels re-spread; queue reordered ({len(self.queue)} to go)."

    def finish(self, reason: str, busy: Callable[[str], None]) -> ReviewOutcome:
        if reason != "interrupted" and self.unspread:
            self.refresh(busy)
        return ReviewOutcome(
            decided=self.decisions, undone=self.undone, skipped=self.skipped, quit_reason=reason,
            refreshes=self.refreshes, remaining=len(self.queue) + len(self.skipped_ids),
            pending_refresh=self.unspread,
        )


def run_review(
    session: ReviewSession,
    *,
    console: Console | None = None,
    refresh_every: int = 5,
    stdin: IO[str] | None = None,
) -> ReviewOutcome:
    """Review the session's queue in the terminal until quit, end of input, Ctrl-C or done.

    Parameters
    ----------
    session:
        Holds the documents and saves decisions (see :class:`seedsort.review.ReviewSession`).
    console:
        Where to draw; default: a console on stdout.
    refresh_every:
        Re-spread the labels (``session.refresh()``) after this many decisions; also on quit.
    stdin:
        Where keys or command lines come from; default ``sys.stdin``. Single keys on a
        full screen when it and the console are terminals, one command per line otherwise.

    Returns
    -------
    ReviewOutcome
        Counts and the reason the review ended. After Ctrl-C a line on the console says
        that the decisions made so far are saved.
    """
    console = console or Console(highlight=False, emoji=False)
    stdin = stdin if stdin is not None else sys.stdin
    review = _Review(session, refresh_every)
    full_screen = console.is_terminal and _isatty(stdin) and _has_termios()
    try:
        if review.current is None:
            reason = "done"
        elif full_screen:
            reason = _run_screen(review, console, stdin)
        else:
            reason = _run_lines(review, console, stdin)
    except KeyboardInterrupt:
        reason = "interrupted"
    try:
        outcome = review.finish(reason, lambda text: console.print(text, markup=False))
    except KeyboardInterrupt:
        reason = "interrupted"
        outcome = review.finish(reason, lambda text: None)
    if reason == "done":
        console.print("Nothing left to review.", markup=False, highlight=False)
    if reason == "interrupted":
        kept = review.decisions - review.undone
        console.print(
            f"Interrupted: {kept} decision{'s are' if kept != 1 else ' is'} already saved in "
            f"{session.location}.",
            markup=False, highlight=False, soft_wrap=True,
        )
    return outcome


def _has_termios() -> bool:
    try:
        import termios  # noqa: F401  (POSIX only; elsewhere the plain line prompts serve)
    except ImportError:
        return False
    return True


def _isatty(stream: IO[str]) -> bool:
    try:
        return stream.isatty()
    except (AttributeError, ValueError):
        return False


# ---------------------------------------------------------------------------------------
# Plain line prompts (not a terminal): one command per line, scriptable.

LINE_HELP = (
    "Commands: a accept | 1-{n} or first letters: that category (c LETTERS when the letters "
    "are a command) | n no category | s skip | u undo | m more text, b back | ? help | q quit"
)
LINE_TEXT_ROWS = 20


def _run_lines(review: _Review, console: Console, stdin: IO[str]) -> str:
    echo = not _isatty(stdin)
    shown: tuple[str, int] | None = None
    width = max(40, console.width)
    while review.current is not None:
        item = review.current
        if shown != (item.id, review.offset):
            _print_item(review, console, width)
            shown = (item.id, review.offset)
        console.print(PROMPT, end="", markup=False)
        console.file.flush()
        line = stdin.readline()
        if not line:
            console.print()
            return "end of input"
        command = line.strip()
        if echo:
            console.print(clean_text(command), markup=False, highlight=False)
        reason = _line_command(review, command, console, width)
        if reason:
            return reason
        if review.message:
            console.print(review.message, markup=False, highlight=False)
            review.message = ""
    return "done"


def _line_command(review: _Review, command: str, console: Console, width: int) -> str | None:
    def busy(text: str) -> None:
        console.print(text, markup=False, highlight=False)

    key = command.casefold()
    if key == "q":
        return "quit"
    if key == "":
        review.message = "Type a command; ? lists them."
    elif key == "c":
        review.message = "Type c and the first letters of a category (c req), or the letters alone."
    elif key == "a":
        review.accept(busy)
    elif key == "n":
        review.decide(None, busy)
    elif key == "s":
        review.skip()
    elif key == "u":
        review.undo()
    elif key in ("m", "b") and review.current is not None:
        total = len(wrap_text(review.current, width - 2))
        if key == "m" and review.offset + LINE_TEXT_ROWS >= total:
            review.message = "That is the end of the text."
        elif key == "b" and review.offset == 0:
            review.message = "That is the start of the text."
        else:
            step = LINE_TEXT_ROWS if key == "m" else -LINE_TEXT_ROWS
            review.offset = max(0, review.offset + step)
    elif key == "?":
        console.print(LINE_HELP.format(n=len(review.categories)), markup=False)
        for number, name in enumerate(review.categories, 1):
            console.print(f"  {number:>3} {name}", markup=False, highlight=False)
    else:
        typed = command[2:] if key.startswith("c ") else command
        category, problem = match_category(typed, review.categories)
        if category is None:
            review.message = problem
        else:
            review.decide(category, busy)
    return None


def _print_item(review: _Review, console: Console, width: int) -> None:
    frame = Frame(
        review=review, width=width, height=0, prompt="", show_help=False, text_rows=LINE_TEXT_ROWS,
        unicode=console.encoding.lower().startswith("utf"),
    )
    console.print()
    for line in render_frame(frame):
        console.print(line, no_wrap=True, overflow="ellipsis", crop=True)


# ---------------------------------------------------------------------------------------
# Full screen with single keys.


class _Keys:
    """Reads keys from a terminal in cbreak mode; returns None when the size changed."""

    def __init__(self, fd: int, size: Callable[[], tuple[int, int]]) -> None:
        self.fd = fd
        self.size = size
        self.pending = b""

    def read(self, drawn: tuple[int, int]) -> str | None:
        while True:
            # A Ctrl-C whose KeyboardInterrupt some callback swallowed (see _interrupt) would
            # otherwise leave the screen waiting for keys: checked at every poll.
            _interrupt.check()
            # Keys typed quickly or pasted arrive in one read; hand them out one at a time.
            key = self._take() if self.pending else None
            if key is not None:
                return key
            ready, _, _ = select.select([self.fd], [], [], 0.2)
            if not ready:
                # Polling the size keeps SIGWINCH handling out of a library-called function.
                if self.size() != drawn:
                    return None
                continue
            data = os.read(self.fd, 64)
            if not data:
                return "\x04"
            self.pending += data

    def _take(self) -> str | None:
        if self.pending.startswith(b"\x1b"):
            if len(self.pending) == 1:
                ready, _, _ = select.select([self.fd], [], [], 0.05)
                if ready:
                    self.pending += os.read(self.fd, 64)
            for sequence, name in _SEQUENCES.items():
                if self.pending.startswith(sequence.encode()):
                    self.pending = self.pending[len(sequence):]
                    return name
            if len(self.pending) > 1 and self.pending[1:2] in (b"[", b"O"):
                # An unknown sequence: drop it whole (up to its final byte) rather than
                # reading its tail as keys.
                match = re.match(rb"\x1b[\[O][0-9;]*[@-~]", self.pending)
                self.pending = self.pending[match.end():] if match else b""
                return "unknown"
            self.pending = self.pending[1:]
            return _ESCAPE
        for length in range(1, min(4, len(self.pending)) + 1):
            try:
                key = self.pending[:length].decode("utf-8")
            except UnicodeDecodeError:
                continue
            self.pending = self.pending[length:]
            return key
        if len(self.pending) >= 4:
            self.pending = self.pending[1:]
            return "unknown"
        return None


def _run_screen(review: _Review, console: Console, stdin: IO[str]) -> str:
    import termios
    import tty

    fd = stdin.fileno()
    saved = termios.tcgetattr(fd)

    def size() -> tuple[int, int]:
        try:
            columns, lines = os.get_terminal_size(console.file.fileno())
        except (OSError, ValueError, AttributeError):
            columns, lines = console.size
        return columns, lines

    screen = _Screen(review, console, size)
    keys = _Keys(fd, size)
    tty.setcbreak(fd)
    console.set_alt_screen(True)
    try:
        while review.current is not None:
            drawn = screen.draw()
            key = keys.read(drawn)
            if key is None:
                screen.clear = True
                continue
            reason = screen.handle(key)
            if reason:
                return reason
        return "done"
    finally:
        termios.tcsetattr(fd, termios.TCSADRAIN, saved)
        console.set_alt_screen(False)
        console.file.flush()


class _Screen:
    """Key handling and drawing for the full-screen view."""

    def __init__(self, review: _Review, console: Console, size: Callable[[], tuple[int, int]]) -> None:
        self.review = review
        self.console = console
        self.size = size
        self.mode: str | None = None  # None, "number" or "name"
        self.typed = ""
        self.show_help = False
        self.clear = True
        self.text_rows = 1
        self.unicode = console.encoding.lower().startswith("utf")

    def prompt(self) -> str:
        if self.mode == "number":
            return f"category number> {self.typed}"
        if self.mode == "name":
            return f"category name> {self.typed}"
        return PROMPT

    def busy(self, text: str) -> None:
        self.review.message = text
        self.draw()

    def draw(self) -> tuple[int, int]:
        width, height = self.size()
        frame = Frame(
            review=self.review, width=width, height=height, prompt=self.prompt(),
            show_help=self.show_help, text_rows=0, unicode=self.unicode,
        )
        lines = render_frame(frame)
        self.text_rows = frame.text_rows
        out = ["\x1b[2J"] if self.clear else []
        self.clear = False
        for row, line in enumerate(lines, 1):
            with self.console.capture() as captured:
                self.console.print(line, end="", no_wrap=True, overflow="ellipsis", crop=True)
            out.append(f"\x1b[{row};1H{captured.get()}\x1b[K")
        prompt_width = Text(self.prompt()).cell_len
        out.append(f"\x1b[{len(lines)};{min(width, prompt_width + 1)}H")
        self.console.file.write("".join(out))
        self.console.file.flush()
        return width, height

    def handle(self, key: str) -> str | None:
        review = self.review
        if self.show_help:
            self.show_help = False
            return None
        if self.mode is not None:
            return self._typing(key)
        review.message = ""  # a message answers one key; the next key clears it
        if key in ("a", *_ENTER):
            review.accept(self.busy)
        elif key.isdigit() and key != "0":
            self.mode, self.typed = "number", ""
            return self._typing(key)
        elif key in ("c", "/"):
            self.mode, self.typed = "name", ""
            review.message = "Type the first letters of a category, Enter to choose, Esc to cancel."
        elif key == "n":
            review.decide(None, self.busy)
        elif key == "s":
            review.skip()
        elif key == "u":
            review.undo()
        elif key in (" ", "m", "page-down", "b", "page-up", "down", "up"):
            step = {"down": 1, "up": -1}.get(key, self.text_rows)
            if key in ("b", "page-up", "up"):
                step = -abs(step)
            review.offset = max(0, review.offset + step)
        elif key == "?":
            self.show_help = True
        elif key == "q":
            return "quit"
        elif key == "\x04":
            return "end of input"
        elif key != _ESCAPE:
            review.message = "That key does nothing here; ? shows the keys."
        return None

    def _typing(self, key: str) -> None:
        review = self.review
        if key == _ESCAPE:
            self.mode, self.typed, review.message = None, "", ""
            return None
        if key in _BACKSPACE:
            self.typed = self.typed[:-1]
            if not self.typed:
                self.mode = None
            return None
        if key in _ENTER:
            if self.typed:
                self._choose(self.typed)
            else:
                self.mode, review.message = None, ""
            return None
        if key == _TAB and self.mode == "name":
            fitting = [c for c in review.categories if c.casefold().startswith(self.typed.casefold())]
            self.typed = _common_prefix(fitting) or self.typed
        elif self.mode == "number" and key.isdigit():
            self.typed += key
            number, count = int(self.typed), len(review.categories)
            # Choose at once when no further digit could make a valid number.
            if number > count or number * 10 > count:
                self._choose(self.typed)
                return None
        elif self.mode == "name" and len(key) == 1 and key.isprintable():
            self.typed += key
        else:
            return None
        if self.mode == "name":
            fitting = [c for c in review.categories if c.casefold().startswith(self.typed.casefold())]
            shown = ", ".join(fitting[:6]) + (", ..." if len(fitting) > 6 else "")
            review.message = f"Fits: {shown}" if fitting else f"No category starts with '{self.typed}'."
        return None

    def _choose(self, typed: str) -> None:
        category, problem = match_category(typed, self.review.categories)
        if category is None:
            self.review.message = problem
            if self.mode == "number":
                self.mode, self.typed = None, ""
            return
        self.mode, self.typed = None, ""
        self.review.decide(category, self.busy)
