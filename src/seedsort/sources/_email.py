"""Email: ``.eml`` files and ``.mbox`` mailboxes, one document per message.

Messages are parsed with the standard library's ``email`` package under
``policy.default`` (RFC 5322 headers, MIME structure). A document's text is the subject,
a blank line, and the readable body: the ``text/plain`` part, or the ``text/html`` part
turned into text when there is no plain one; attachments are ignored. The quoted reply
chain and the signature are trimmed off (see ``trim_quoted_and_signature``), because in
a support ticket they drown the actual request.

Mailboxes are split the way ``mailbox.mbox`` splits them (a message starts at every line
beginning with ``From ``), but by our own loop over the bytes: ``mailbox.mbox`` opens the
file for writing (``"rb+"``) and the reading stage only ever opens files ``"rb"``.

A message is *broken*, skipped and listed, when it has no headers and no body (e.g. two
``From `` lines in a row), or when parsing or extracting it raises, e.g. the parser's
``RecursionError`` on MIME parts nested about a thousand deep. The rest of the mailbox is
still read. Cost: linear in the size of the mailbox, one message in memory at a time
(plus the file's bytes).
"""

from __future__ import annotations

import io
import re
from collections.abc import Iterable, Iterator
from email import policy
from email.message import EmailMessage, Message
from email.parser import BytesParser
from pathlib import Path
from typing import cast

from ._collection import FileReading, SkippedFile, TableColumns
from ._decode import UndecodableError, clean_text, decode_bytes, normalise_newlines
from ._html import html_to_text

_REASON_CHARS = 100

# --- where the quoted reply chain starts -------------------------------------------------
# "On Tue, 3 Mar 2026 at 09:12, Robin Vale <robin@example.org> wrote:" (one line, or wrapped
# over two). A date or a comma is required so that an ordinary sentence starting with "On"
# is not mistaken for an attribution.
_ATTRIBUTION = re.compile(r"^\s*On\s.*[\d,].*\bwrote:\s*$")
_ATTRIBUTION_START = re.compile(r"^\s*On\s\S.*$")
_ATTRIBUTION_END = re.compile(r"^.*\bwrote:\s*$")
_ATTRIBUTION_MAX_CHARS = 300
_ORIGINAL_MESSAGE = re.compile(r"^\s*-{2,}\s*Original Message\s*-{2,}\s*$", re.IGNORECASE)
_HEADER_FROM = re.compile(r"^\s*\*?From:\*?\s", re.IGNORECASE)
_HEADER_WHEN = re.compile(r"^\s*\*?(Sent|Date):", re.IGNORECASE)
_HEADER_SUBJECT = re.compile(r"^\s*\*?Subject:", re.IGNORECASE)
_HEADER_WINDOW = 5
_RULE = re.compile(r"^\s*_{10,}\s*$")  # Outlook's line above its header block
_QUOTED = re.compile(r"^\s*>")

# --- where the signature starts -----------------------------------------------------------
_SIGNATURE_DASHES = frozenset({"--", "-- "})  # the usenet/email delimiter, RFC 3676 4.3
_SIGN_OFF = re.compile(
    r"^\s*(thanks|thank you|thanks again|thanks in advance|many thanks|thx|cheers|best|"
    r"all the best|best wishes|best regards|kind regards|warm regards|warmest regards|"
    r"regards|sincerely|yours sincerely|sincerely yours|yours truly|respectfully|"
    r"with thanks|take care)\s*[,.!]?\s*$",
    re.IGNORECASE,
)
_SIGNATURE_MAX_LINES = 5  # name, title, team, phone, address
_SIGNATURE_MAX_LINE_CHARS = 60


class BrokenMessageError(ValueError):
    """A message could not be read; ``str(error)`` is a short reason."""


def _next_nonblank(lines: list[str], start: int) -> str | None:
    for index in range(start, len(lines)):  # by index: slicing would copy the tail each time
        if lines[index].strip():
            return lines[index]
    return None


def _attribution_length(lines: list[str], i: int) -> int:
    """How many lines (0, 1 or 2) of an "On ... wrote:" attribution start at line ``i``."""
    # The length cap keeps the backtracking regexes linear on huge one-line bodies.
    if len(lines[i]) > _ATTRIBUTION_MAX_CHARS:
        return 0
    if _ATTRIBUTION.match(lines[i]):
        return 1
    if (
        i + 1 < len(lines)
        and len(lines[i + 1]) <= _ATTRIBUTION_MAX_CHARS
        and _ATTRIBUTION_START.match(lines[i])
        and _ATTRIBUTION_END.match(lines[i + 1])
        and _ATTRIBUTION.match(lines[i] + " " + lines[i + 1])
    ):
        return 2
    return 0


def _is_header_block(lines: list[str], i: int) -> bool:
    """Whether line ``i`` starts an Outlook-style "From: / Sent: / Subject:" block."""
    if not _HEADER_FROM.match(lines[i]):
        return False
    window = lines[i + 1 : i + 1 + _HEADER_WINDOW]
    return any(_HEADER_WHEN.match(line) for line in window) and any(
        _HEADER_SUBJECT.match(line) for line in window
    )


def _quote_start(lines: list[str]) -> int | None:
    """Index of the first line of the quoted reply chain, or ``None``."""
    for i, line in enumerate(lines):
        if _ORIGINAL_MESSAGE.match(line) or _attribution_length(lines, i):
            return i
        if _is_header_block(lines, i):
            above = i - 1
            while above >= 0 and not lines[above].strip():
                above -= 1
            return above if above >= 0 and _RULE.match(lines[above]) else i
        if _QUOTED.match(line):
            # One quoted line amid the writer's own text is an inline quote; a run of
            # them (or a quote at the very end) is the reply chain.
            following = _next_nonblank(lines, i + 1)
            if following is None or _QUOTED.match(following):
                return i
    return None


def _signature_start(lines: list[str]) -> int | None:
    """Index of the signature's first line (delimiter or sign-off), or ``None``."""
    # Walk backwards so "is everything after this line a short signature?" costs O(1).
    cut = None
    lines_after = 0
    longest_after = 0
    for i in range(len(lines) - 1, -1, -1):
        line = lines[i]
        if line in _SIGNATURE_DASHES:
            cut = i
        elif (
            _SIGN_OFF.match(line)
            and lines_after <= _SIGNATURE_MAX_LINES
            and longest_after <= _SIGNATURE_MAX_LINE_CHARS
        ):
            cut = i
        if line.strip():
            lines_after += 1
            longest_after = max(longest_after, len(line.strip()))
    return cut


def _without_signature(lines: list[str]) -> list[str]:
    cut = _signature_start(lines)
    return lines if cut is None else lines[:cut]


def _without_quoted_lines(lines: list[str]) -> list[str]:
    """The lines that are neither quoted (``>``) nor an attribution: for bottom-posted replies."""
    kept: list[str] = []
    i = 0
    while i < len(lines):
        skip = _attribution_length(lines, i)
        if skip:
            i += skip
            continue
        if not _QUOTED.match(lines[i]):
            kept.append(lines[i])
        i += 1
    return kept


def trim_quoted_and_signature(text: str) -> str:
    """The writer's own words: ``text`` without the quoted reply chain and the signature.

    The chain starts at the first "On <date>, <someone> wrote:" line (also wrapped over
    two lines), a "-----Original Message-----" line, an Outlook-style block ("From:"
    followed within five lines by "Sent:"/"Date:" and "Subject:"), or a run of lines
    starting with ">". The signature starts at a "-- " (or "--") line, or at a sign-off
    alone on its line ("Thanks,", "Best regards,", ... any case) followed by at most five
    short lines.

    If that leaves nothing (a bottom-posted reply, or a message that is only a quote),
    the quoted lines alone are dropped instead; if that too leaves nothing, the text is
    returned untrimmed (stripped of outer whitespace): trimming never empties a body.
    """
    lines = normalise_newlines(text).split("\n")
    quote = _quote_start(lines)
    trimmed = _without_signature(lines if quote is None else lines[:quote])
    result = "\n".join(trimmed).strip()
    if not result:
        result = "\n".join(_without_signature(_without_quoted_lines(lines))).strip()
    return result or text.strip()


def _header_text(msg: Message, name: str) -> str:
    value = msg.get(name)
    return " ".join(str(value).split()) if value is not None else ""


def _part_text(part: Message) -> str:
    """Decoded text of a leaf part: its declared charset, else UTF-8, else cp1252."""
    payload = part.get_payload(decode=True)
    if not isinstance(payload, bytes):
        return ""
    charset = part.get_content_charset()
    if charset:
        try:
            return normalise_newlines(payload.decode(charset))
        except (LookupError, UnicodeDecodeError):
            # Unknown or wrong charset labels are common in exported mail; sniff instead.
            pass
    try:
        return decode_bytes(payload)[0]
    except UndecodableError:
        return normalise_newlines(payload.decode("utf-8", "replace"))


def _body_text(msg: EmailMessage) -> str:
    part = msg.get_body(preferencelist=("plain", "html"))
    if part is None:
        return ""
    text = _part_text(part)
    return html_to_text(text) if part.get_content_type() == "text/html" else text


def message_text(msg: EmailMessage) -> str:
    """Subject, a blank line, and the trimmed readable body of a message.

    Parameters
    ----------
    msg:
        A message parsed with ``policy=email.policy.default`` (so it has ``get_body``).

    Returns
    -------
    str
        ``"<subject>\\n\\n<body>"``; just one of them when the other is empty.
    """
    subject = _header_text(msg, "subject")
    body = _body_text(msg)
    body = trim_quoted_and_signature(body) if body.strip() else ""
    return clean_text("\n\n".join(part for part in (subject, body) if part))


def text_of_message_bytes(data: bytes) -> str:
    """Parse one message (RFC 5322 bytes) and return ``message_text`` of it.

    Raises
    ------
    BrokenMessageError
        If the message has no headers and no body, or parsing/extracting raises.
    """
    if not data.strip():
        raise BrokenMessageError("no headers and no body")
    try:
        # policy.default makes the parser build EmailMessage objects.
        msg = cast(EmailMessage, BytesParser(policy=policy.default).parsebytes(data))
        return message_text(msg)
    except RecursionError:
        raise BrokenMessageError("MIME parts nested too deeply to parse") from None
    except Exception as exc:  # the email package has many ways to fail on garbage
        reason = f"{type(exc).__name__}: {exc}"
        if len(reason) > _REASON_CHARS:
            reason = reason[: _REASON_CHARS - 3] + "..."
        raise BrokenMessageError(reason) from exc


def split_mbox(data: bytes | Iterable[bytes]) -> Iterator[bytes]:
    """The messages of an mbox (its bytes, or its lines as a binary file yields them), each
    without its ``From `` envelope line.

    Splits as ``mailbox.mbox`` does: every line starting with ``From `` begins a message;
    anything before the first such line is ignored. ``>From `` escapes are left as they are.
    Given a file, only one message is held at a time.
    """
    lines = io.BytesIO(data) if isinstance(data, bytes) else data
    current: list[bytes] | None = None
    for line in lines:  # splits on b"\n" only, as mailbox's readline does
        if line.startswith(b"From "):
            if current is not None:
                yield b"".join(current)
            current = []
        elif current is not None:
            current.append(line)
    if current is not None:
        yield b"".join(current)


def read_eml(path: Path, rel: str, columns: TableColumns, reading: FileReading) -> None:
    """Read one ``.eml`` file: one document, or one skipped entry if it is broken."""
    try:
        reading.add(rel, rel, text_of_message_bytes(path.read_bytes()))
    except BrokenMessageError as exc:
        reading.skipped.append(SkippedFile(rel, f"broken message: {exc}"))


def read_mbox(path: Path, rel: str, columns: TableColumns, reading: FileReading) -> None:
    """Read an mbox: a document ``<rel>#message-N`` per message (N from 1), streamed from
    the file a message at a time."""
    broken: list[tuple[int, str]] = []
    total = 0
    with open(path, "rb") as handle:
        for total, raw in enumerate(split_mbox(reading.metered(handle, handle.tell)), start=1):
            try:
                text = text_of_message_bytes(raw)
            except BrokenMessageError as exc:
                broken.append((total, str(exc)))
                continue
            reading.add(f"{rel}#message-{total}", rel, text)
    if total == 0:
        reading.skipped.append(
            SkippedFile(rel, "no messages (an mbox starts each message with a 'From ' line)")
        )
    for number, reason in broken:
        reading.skipped.append(SkippedFile(rel, f"broken message {number} of {total}: {reason}"))
