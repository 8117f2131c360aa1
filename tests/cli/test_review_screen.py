"""The review screen as a user meets it: keys in a real pseudo-terminal, lines on a pipe.

External truth used here:
- the screen is what pyte, a VT100/xterm terminal emulator, shows after feeding it every
  byte the program wrote to a real pseudo-terminal (pexpect); sizes 80x24 and 60x15;
- the documents, seeds and categories come from the open BANKING77 dataset
  (tests/data/banking77, CC BY 4.0; see tests/cli/_memory_session.py);
- which session call each key must make is the behaviour asked for in issue 5, part 2
  (accept, pick by number or first letters, no category, skip, undo, quit, re-spread every
  few decisions and on quit);
- arrow keys are sent as xterm's escape sequences (ESC [ A / ESC [ B: common practice).

Timeouts: the first screen waits up to STARTUP seconds (the driver imports seedsort and
its numeric stack); every later wait is for screen content, never a fixed sleep.
"""

from __future__ import annotations

import io
import json
import os
import re
import subprocess
import sys
import time
import warnings
from collections.abc import Callable, Iterator
from pathlib import Path

import pexpect
import pyte
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from rich.console import Console

from seedsort.cli._review import _Review, match_category, run_review
from seedsort.cli._review_frame import Frame, plan_rows, render_frame
from seedsort.review import Candidate, NearbySeed, ReviewItem

from ._memory_session import CATEGORIES, MemoryReviewSession, banking77_items, read_log

DRIVER = Path(__file__).with_name("review_driver.py")
STARTUP, STEP = 60.0, 10.0
ANSI = re.compile(r"\x1b[\[\]()]")
BANKING77_SHORT = banking77_items()[:2]
BANKING77_LONG = banking77_items(long_document=True)[:2]


class Terminal:
    """The driver running in a pseudo-terminal of a given size, seen through pyte."""

    def __init__(self, log: Path, columns: int, rows: int, *args: str) -> None:
        env = {k: v for k, v in os.environ.items() if k not in ("COLUMNS", "LINES", "NO_COLOR")}
        env["TERM"] = "xterm-256color"
        with warnings.catch_warnings():
            # Python 3.12+ warns on fork() in a process with threads; the child execs at once.
            warnings.filterwarnings("ignore", category=DeprecationWarning, message=".*fork")
            self.child = pexpect.spawn(
                sys.executable, [str(DRIVER), "--log", str(log), *args],
                dimensions=(rows, columns), env=env, encoding="utf-8", timeout=STEP,
            )
        self.screen = pyte.Screen(columns, rows)
        self.stream = pyte.Stream(self.screen)
        self.output = ""

    def _pump(self, wait: float) -> bool:
        try:
            data = self.child.read_nonblocking(65536, timeout=wait)
        except pexpect.TIMEOUT:
            return True
        except pexpect.EOF:
            return False
        self.output += data
        self.stream.feed(data)
        return True

    @property
    def text(self) -> str:
        return "\n".join(self.screen.display)

    def wait_for(self, *needles: str, timeout: float = STEP) -> str:
        """Read output until every needle is on the screen; fail with the screen shown."""
        deadline = time.monotonic() + timeout
        while not all(n in self.text for n in needles):
            if time.monotonic() > deadline or not self._pump(0.1):
                missing = [n for n in needles if n not in self.text]
                pytest.fail(f"not on the screen after {timeout:.0f}s: {missing}\n{self.text}")
        return self.text

    def press(self, *keys: str) -> None:
        for key in keys:
            self.child.send(key)

    def finish(self) -> tuple[int, dict[str, object]]:
        """Wait for the driver to exit; its exit status and the outcome it printed."""
        deadline = time.monotonic() + STEP
        while self._pump(0.1):
            if time.monotonic() > deadline:
                pytest.fail(f"still running {STEP:.0f}s after the last key:\n{self.text}")
        self.child.close()
        match = re.search(r"OUTCOME (\{.*?\})", self.output.replace("\r\n", ""))
        assert match, f"no outcome printed:\n{self.output[-2000:]}"
        return self.child.exitstatus, json.loads(match.group(1))

    def resize(self, columns: int, rows: int) -> None:
        self.screen.resize(rows, columns)
        self.child.setwinsize(rows, columns)


Start = Callable[..., Terminal]


@pytest.fixture()
def terminal(log: Path) -> Iterator[Start]:
    """Start drivers in pseudo-terminals; any still running after the test is ended."""
    started: list[Terminal] = []

    def start(columns: int, rows: int, *args: str) -> Terminal:
        started.append(Terminal(log, columns, rows, *args))
        return started[-1]

    yield start
    for term in started:
        if term.child.isalive():
            term.child.close(force=True)


@pytest.fixture()
def items() -> list[ReviewItem]:
    return banking77_items()


@pytest.fixture()
def log(tmp_path: Path) -> Path:
    return tmp_path / "calls.jsonl"


def test_screen_shows_text_categories_and_nearest_seeds(terminal: Start, log: Path, items: list[ReviewItem]) -> None:
    term = terminal(80, 24)
    first = items[0]
    term.wait_for(first.id, timeout=STARTUP)
    screen = term.wait_for(first.text[:60], first.candidates[0].category)
    rows = term.screen.display
    assert rows[0].startswith("seedsort review") and f"{len(items)} to go" in rows[0]
    for candidate in first.candidates:  # all five fit at 80x24, with their numbers
        number = CATEGORIES.index(candidate.category) + 1
        assert re.search(rf"^\s+{number} {candidate.category}\s+{candidate.probability:.2f} ", screen, re.M)
    for seed in first.nearby:
        assert f"{seed.category} {seed.similarity:.2f}  {seed.snippet[:30]}" in screen
    assert "<- a keeps this" in screen
    assert rows[-2].startswith("a accept  1-6 pick  c name") and "q quit" in rows[-2]
    assert rows[-1].startswith("review>")
    assert rows[-3].startswith("Decisions are saved to ")
    term.press("?")  # the keys explained, where decisions go, and every category numbered
    help_screen = term.wait_for("Each decision is saved at once to:", "Any key returns.")
    assert f"\n  {str(log)[:70]}" in help_screen
    numbered = [row for row in term.screen.display if re.match(r"^\s+\d+ \w+\s+\d+ \w+", row)]
    assert " ".join(" ".join(numbered).split()) == " ".join(f"{i} {c}" for i, c in enumerate(CATEGORIES, 1))
    term.press("x")  # any key returns
    term.wait_for(first.text[:60])
    term.press("q")
    status, outcome = term.finish()
    assert status == 0 and outcome["quit_reason"] == "quit" and outcome["decided"] == 0
    assert read_log(log) == []  # nothing decided: nothing to re-spread


def test_keys_decide_undo_skip_and_refresh(terminal: Start, log: Path, items: list[ReviewItem]) -> None:
    term = terminal(80, 24, "--refresh-every", "3", "--reverse-on-refresh")
    term.wait_for(items[0].id, timeout=STARTUP)

    term.press("a")  # accept the proposed category
    term.wait_for(f"Saved: {items[0].id} -> {items[0].category}", items[1].id)
    term.press("3")  # the third category, by number
    term.wait_for(f"Saved: {items[1].id} -> {CATEGORIES[2]}", items[2].id)
    term.press("c", "req")  # by first letters, Enter to confirm
    term.wait_for("category name> req", "Fits: request_refund")
    term.press("\r")
    # The third decision re-spreads; the memory session then reverses its queue.
    after_refresh = [it for it in reversed(items) if it.id not in {i.id for i in items[:3]}]
    term.wait_for(f"Saved: {items[2].id} -> request_refund", "Labels re-spread", after_refresh[0].id)

    term.press("c", "card_")  # two categories start so: nothing is chosen yet
    term.press("\r")
    term.wait_for("'card_' fits 2 categories")
    term.press("\x7f", "\x7f", "\x7f", "\x7f", "\x7f", "n")  # erase, leave typing, "no category"
    term.wait_for(f"Saved: {after_refresh[0].id} -> no category", after_refresh[1].id)
    term.press("s")
    term.wait_for(f"Skipped {after_refresh[1].id}", after_refresh[2].id)
    term.press("u")
    term.wait_for(f"Took back the decision on {after_refresh[0].id}", f"{after_refresh[0].id}  banking77")
    term.press("q")
    status, outcome = term.finish()

    assert status == 0
    assert read_log(log) == [
        {"call": "decide", "id": items[0].id, "category": items[0].category},
        {"call": "decide", "id": items[1].id, "category": CATEGORIES[2]},
        {"call": "decide", "id": items[2].id, "category": "request_refund"},
        {"call": "refresh"},
        {"call": "decide", "id": after_refresh[0].id, "category": None},
        {"call": "undo", "id": after_refresh[0].id},
        {"call": "refresh"},  # on quit, with the undo not yet re-spread
    ]
    assert outcome == {
        "decided": 4, "undone": 1, "skipped": 1, "quit_reason": "quit", "refreshes": 2,
        "remaining": len(items) - 3, "pending_refresh": False,
    }


def test_long_text_pages_and_scrolls(terminal: Start, log: Path) -> None:
    long_item = banking77_items(long_document=True)[0]
    lines = long_item.text.split("\n")
    term = terminal(80, 24, "--long")
    term.wait_for(lines[0], timeout=STARTUP)
    total = re.search(r"lines 1-8 of (\d+)", term.text)
    assert total, term.text  # 8 text rows at 80x24
    term.press(" ")
    term.wait_for(f"lines 9-16 of {total.group(1)}")
    assert lines[0] not in term.text
    term.press("b")
    term.wait_for(f"lines 1-8 of {total.group(1)}", lines[0])
    term.press("\x1b[B")  # down arrow: one line
    term.wait_for(f"lines 2-9 of {total.group(1)}")
    term.press("\x1b[A", "q")
    status, outcome = term.finish()
    assert status == 0 and outcome["decided"] == 0


def test_ctrl_c_quits_and_says_decisions_are_saved(terminal: Start, log: Path, items: list[ReviewItem]) -> None:
    term = terminal(80, 24)
    term.wait_for(items[0].id, timeout=STARTUP)
    term.press("a")
    term.wait_for(f"Saved: {items[0].id}")
    term.child.sendintr()
    status, outcome = term.finish()
    assert status == 0
    assert f"Interrupted: 1 decision is already saved in {log}." in term.output.replace("\r\n", "")
    assert outcome["quit_reason"] == "interrupted" and outcome["pending_refresh"] is True
    assert read_log(log) == [{"call": "decide", "id": items[0].id, "category": items[0].category}]


def test_key_wait_stops_on_a_ctrl_c_that_was_swallowed() -> None:
    """A Ctrl-C whose KeyboardInterrupt a callback swallowed is still recorded
    (seedsort.cli._interrupt); the key wait checks the record at every poll instead of waiting
    for keys that never come (common practice: a polling loop checks its stop flag)."""
    import os
    import threading

    from seedsort.cli import _interrupt
    from seedsort.cli._review import _Keys

    read_end, write_end = os.pipe()
    unblock = threading.Timer(5.0, os.write, (write_end, b"q"))  # a key, should the wait hang
    try:
        with _interrupt.recorded():
            _interrupt._pressed.set()  # what the handler records before its raise is lost
            unblock.start()
            with pytest.raises(KeyboardInterrupt):
                _Keys(read_end, lambda: (80, 24)).read((80, 24))
    finally:
        unblock.cancel()
        unblock.join()
        os.close(read_end)
        os.close(write_end)


def test_small_terminal_60x15(terminal: Start, log: Path) -> None:
    long_item = banking77_items(long_document=True)[0]
    term = terminal(60, 15, "--long")
    term.wait_for(long_item.text.split("\n")[0], timeout=STARTUP)
    term.press(" ")  # the first message (where decisions go) gives way to the size hint
    screen = term.wait_for("enlarge to 80x24", "lines 4-6 of")
    rows = term.screen.display
    assert rows[0].startswith("seedsort review") and rows[1].startswith(long_item.id)
    top = long_item.candidates[0]
    assert f"{top.category}" in screen and "<- a keeps this" in screen
    assert long_item.nearby[0].category in screen
    assert rows[-2].startswith("keys: a 1-6 c n s u") and rows[-1].startswith("review>")
    term.press("a")
    term.wait_for(f"Saved: {long_item.id}")
    term.press("q")
    status, _ = term.finish()
    assert status == 0
    assert read_log(log)[0] == {"call": "decide", "id": long_item.id, "category": long_item.category}


def test_resize_redraws_for_the_new_size(terminal: Start, log: Path) -> None:
    long_item = banking77_items(long_document=True)[0]
    term = terminal(80, 24, "--long")
    term.wait_for("lines 1-8 of", timeout=STARTUP)
    term.resize(60, 15)
    term.wait_for("lines 1-3 of", long_item.text.split("\n")[0])
    assert term.screen.display[-1].startswith("review>")
    assert term.screen.display[-2].startswith("keys: a 1-6")  # the help line for 60 columns
    term.press("q")
    assert term.finish()[0] == 0


def _run_piped(log: Path, commands: str, *args: str) -> subprocess.CompletedProcess[str]:
    env = {k: v for k, v in os.environ.items() if k not in ("COLUMNS", "LINES")}
    return subprocess.run(
        [sys.executable, str(DRIVER), "--log", str(log), *args],
        input=commands, capture_output=True, text=True, timeout=STARTUP, env=env,
    )


def test_scripted_commands_on_a_pipe(log: Path, items: list[ReviewItem]) -> None:
    done = _run_piped(log, "a\n3\nreq\ncard_\ncard_l\nn\ns\nu\nzz\n99\nq\n", "--refresh-every", "3")
    assert done.returncode == 0, done.stderr
    assert not ANSI.search(done.stdout), "plain lines when not a terminal"
    assert "'card_' fits 2 categories (card_arrival, card_linking): type more letters." in done.stdout
    assert "No category starts with 'zz'" in done.stdout and "No category number 99: choose 1-6." in done.stdout
    assert f"review> u\nTook back the decision on {items[4].id}; it is shown again." in done.stdout
    assert read_log(log) == [
        {"call": "decide", "id": items[0].id, "category": items[0].category},
        {"call": "decide", "id": items[1].id, "category": CATEGORIES[2]},
        {"call": "decide", "id": items[2].id, "category": "request_refund"},
        {"call": "refresh"},
        {"call": "decide", "id": items[3].id, "category": "card_linking"},
        {"call": "decide", "id": items[4].id, "category": None},
        {"call": "undo", "id": items[4].id},
        {"call": "refresh"},
    ]
    outcome = json.loads(done.stdout.split("OUTCOME ", 1)[1])
    assert outcome["quit_reason"] == "quit" and outcome["skipped"] == 1


def test_end_of_input_quits_and_re_spreads(log: Path, items: list[ReviewItem]) -> None:
    done = _run_piped(log, "a\n")
    assert done.returncode == 0, done.stderr
    assert read_log(log) == [
        {"call": "decide", "id": items[0].id, "category": items[0].category},
        {"call": "refresh"},
    ]
    assert json.loads(done.stdout.split("OUTCOME ", 1)[1])["quit_reason"] == "end of input"


# In-process checks of the pieces (no terminal).


def test_category_by_number_or_unique_first_letters() -> None:
    # Expected answers follow the rules stated in issue 5: a number, or first letters that
    # name one category (case does not matter; an exact name beats longer names).
    names = ("card", "card_arrival", "Change_pin", "exchange_rate")
    assert match_category("2", names) == ("card_arrival", "")
    assert match_category("card", names) == ("card", "")
    assert match_category("CH", names) == ("Change_pin", "")
    assert match_category("card_", names) == ("card_arrival", "")
    assert match_category("5", names)[0] is None and "choose 1-4" in match_category("5", names)[1]
    assert match_category("c", names)[0] is None and "fits 3 categories" in match_category("c", names)[1]
    assert match_category("z", names)[0] is None


def test_rows_at_80x24_and_60x15() -> None:
    full = plan_rows(24, n_text=40, n_cands=5, n_near=3)
    assert (full.text, full.cands, full.near, full.doc, full.titles, full.cramped) == (8, 5, 3, 1, True, False)
    small = plan_rows(15, n_text=40, n_cands=5, n_near=3)
    assert (small.text, small.cands, small.near, small.cramped) == (3, 3, 1, True)


def _session_of(text: str, log: Path) -> MemoryReviewSession:
    item = ReviewItem(
        id="doc-1", source="inbox/doc-1.txt", text=text, status="assigned", category="card_arrival",
        candidates=(Candidate("card_arrival", 0.6), Candidate("change_pin", 0.4)),
        nearby=(NearbySeed("train-0", "card_arrival", 0.5, "I am still waiting on my card?\x1b[31m"),),
        margin=0.2, reason="close call",
    )
    return MemoryReviewSession([item], CATEGORIES, log)


def test_control_characters_in_a_document_never_reach_the_terminal(log: Path) -> None:
    # An ESC in a document could clear or recolour the user's terminal (ECMA-48 control
    # functions start with ESC); it must be shown as a replacement character instead.
    session = _session_of("Where is my card?\x1b[2J\x07 still nothing\tafter a week", log)
    out = io.StringIO()
    run_review(session, console=Console(file=out, width=80), stdin=io.StringIO("q\n"))
    printed = out.getvalue()
    assert "\x1b" not in printed and "\x07" not in printed
    assert "Where is my card?\ufffd[2J\ufffd still nothing    after a week" in printed
    assert "I am still waiting on my card?\ufffd[31m" in printed


def test_interrupt_on_a_pipe_says_decisions_are_saved(log: Path, items: list[ReviewItem]) -> None:
    class Interrupting(io.StringIO):
        """Typed lines, then Ctrl-C (KeyboardInterrupt) instead of end of input."""

        def readline(self, *args: object) -> str:  # type: ignore[override]
            line = super().readline()
            if not line:
                raise KeyboardInterrupt
            return line

    out = io.StringIO()
    session = MemoryReviewSession(items, CATEGORIES, log)
    outcome = run_review(session, console=Console(file=out, width=80), stdin=Interrupting("a\n"))
    assert outcome.quit_reason == "interrupted" and outcome.decided == 1 and outcome.pending_refresh
    assert f"Interrupted: 1 decision is already saved in {log}." in out.getvalue()
    assert read_log(log) == [{"call": "decide", "id": items[0].id, "category": items[0].category}]


def test_a_document_no_category_reaches_has_nothing_to_accept(log: Path) -> None:
    # A run leaves some documents unreached (no seed's label arrives over the graph); then
    # there is no category to accept, only a pick or "no category" (issue 5, part 2).
    item = ReviewItem(id="blank.txt", source="blank.txt", text="", status="unreached", category=None,
                      candidates=(), nearby=(), margin=None, reason="no seed reaches it")
    out = io.StringIO()
    outcome = run_review(MemoryReviewSession([item], CATEGORIES, log), console=Console(file=out, width=80),
                         stdin=io.StringIO("a\nn\n"))
    printed = out.getvalue()
    assert "(empty document)" in printed and "(no category reaches this document)" in printed
    assert "review> a\nNothing to accept here: pick a category or n for no category." in printed
    assert read_log(log) == [{"call": "decide", "id": "blank.txt", "category": None}, {"call": "refresh"}]
    assert outcome.quit_reason == "done" and printed.rstrip().endswith("Nothing left to review.")


@settings(max_examples=60, deadline=None)
@given(width=st.integers(1, 140), height=st.integers(1, 60), long=st.booleans())
def test_every_frame_fits_the_terminal(width: int, height: int, long: bool) -> None:
    # Property: whatever the size, a frame is exactly one line per terminal row, none wider
    # than the terminal, the prompt last (so nothing scrolls or wraps on a real terminal).
    items = BANKING77_LONG if long else BANKING77_SHORT
    review = _Review(MemoryReviewSession(items, CATEGORIES, Path("never-written.jsonl")), refresh_every=5)
    for show_help in (False, True):
        frame = Frame(review=review, width=width, height=height, prompt="review> ", show_help=show_help,
                      text_rows=0, unicode=True)
        lines = render_frame(frame)
        assert len(lines) == height
        assert all(line.cell_len <= width for line in lines)
        assert lines[-1].plain.startswith("review> "[: max(1, width) - 1])
