"""Email reading: RFC 5322 messages via Python's email package, mbox splitting, trimming.

External truths: the ``email`` package with ``policy.default`` parses the headers and MIME
structure; ``mailbox.mbox`` (on a copy of the file) is the reference for where an mbox
splits into messages; RFC 3676 section 4.3 fixes "-- " as the signature delimiter.
"""

from __future__ import annotations

import mailbox
import shutil
import sys
from email import policy
from email.message import EmailMessage
from email.parser import BytesParser
from pathlib import Path
from typing import cast

import pytest

from seedsort.sources import read_collection
from seedsort.sources._email import (
    BrokenMessageError,
    message_text,
    split_mbox,
    text_of_message_bytes,
    trim_quoted_and_signature,
)

REQUEST = "The invoice for March lists the standing desk twice.\nPlease remove one of them."


def parse(data: bytes) -> EmailMessage:
    return cast(EmailMessage, BytesParser(policy=policy.default).parsebytes(data))


# --- trimming ---------------------------------------------------------------------------


def test_attribution_line_cuts_the_quoted_chain() -> None:
    body = (
        f"{REQUEST}\n\nOn Tue, 3 Mar 2026 at 09:12, Robin Vale <robin@example.org> wrote:\n"
        "> Hello,\n> your invoice is attached.\n"
    )
    assert trim_quoted_and_signature(body) == REQUEST


def test_attribution_wrapped_over_two_lines_cuts_too() -> None:
    body = (
        f"{REQUEST}\n\nOn Tue, 3 Mar 2026 at 09:12, Robin Vale\n<robin@example.org> wrote:\n\n"
        "Hello, your invoice is attached.\n"
    )
    assert trim_quoted_and_signature(body) == REQUEST


def test_original_message_separator_cuts() -> None:
    body = f"{REQUEST}\n\n-----Original Message-----\nFrom: Billing\nAnything below is old.\n"
    assert trim_quoted_and_signature(body) == REQUEST


def test_outlook_header_block_cuts_including_the_rule_above_it() -> None:
    body = (
        f"{REQUEST}\n\n________________________________\n"
        "From: Billing Team <billing@example.com>\nSent: Monday, 2 March 2026 17:40\n"
        "To: Sam Ashdown\nSubject: Your invoice\n\nPlease find your invoice attached.\n"
    )
    assert trim_quoted_and_signature(body) == REQUEST


def test_a_from_line_without_sent_and_subject_is_not_a_header_block() -> None:
    body = "From: the warehouse in the north, the box came open.\nIt was empty."
    assert trim_quoted_and_signature(body) == body


def test_run_of_quoted_lines_cuts() -> None:
    body = f"{REQUEST}\n\n> earlier message\n> more of it\n"
    assert trim_quoted_and_signature(body) == REQUEST


def test_single_inline_quote_amid_own_text_is_kept() -> None:
    body = "You said:\n> the desk ships Monday\nbut it did not arrive."
    assert trim_quoted_and_signature(body) == body


def test_signature_delimiter_cuts() -> None:
    body = f"{REQUEST}\n-- \nSam Ashdown\nLarkspur Tiles, purchasing"
    assert trim_quoted_and_signature(body) == REQUEST
    assert trim_quoted_and_signature(f"{REQUEST}\n--\nSam") == REQUEST


@pytest.mark.parametrize(
    "sign_off",
    ["Thanks,", "thank you,", "Best regards,", "KIND REGARDS", "Cheers!", "Best,", "Sincerely,"],
)
def test_sign_off_followed_by_a_few_short_lines_cuts(sign_off: str) -> None:
    body = f"{REQUEST}\n\n{sign_off}\nSam Ashdown\nPurchasing lead\n+1 555 0100"
    assert trim_quoted_and_signature(body) == REQUEST


def test_sign_off_followed_by_long_text_is_not_a_signature() -> None:
    body = (
        "Thanks,\nthe replacement arrived but the drawer runners are bent on both sides "
        "and the left panel has a crack running along its full length."
    )
    assert trim_quoted_and_signature(body) == body


def test_signature_and_quote_together() -> None:
    body = f"{REQUEST}\n\nRegards,\nSam\n\nOn Mon, 2 Mar 2026, Robin Vale wrote:\n> Invoice attached.\n"
    assert trim_quoted_and_signature(body) == REQUEST


def test_bottom_posted_reply_keeps_the_reply_and_drops_the_quote() -> None:
    body = f"On Mon, 2 Mar 2026, Robin Vale wrote:\n> Invoice attached.\n> Regards\n\n{REQUEST}\n"
    assert trim_quoted_and_signature(body) == REQUEST


def test_trimming_never_empties_a_body() -> None:
    only_quote = "> just a forwarded line\n> and another\n"
    assert trim_quoted_and_signature(only_quote) == only_quote.strip()
    only_sign_off = "Thanks,\nSam"
    assert trim_quoted_and_signature(only_sign_off) == only_sign_off


def test_ordinary_sentence_starting_with_on_is_not_an_attribution() -> None:
    body = "On the bright side\nthe manual says what the support agent wrote:\nreboot it."
    assert trim_quoted_and_signature(body) == body


# --- message text -----------------------------------------------------------------------


def test_message_text_is_subject_blank_line_body() -> None:
    msg = parse(b"From: sam@example.org\nSubject: Duplicate desk\n on invoice\n\nPlease fix.\n")
    assert message_text(msg) == "Duplicate desk on invoice\n\nPlease fix."


def test_html_only_message_is_converted_to_text() -> None:
    msg = parse(
        b"Subject: Broken lamp\nMIME-Version: 1.0\nContent-Type: text/html; charset=utf-8\n\n"
        b"<html><body><p>The lamp&nbsp;flickers &amp; buzzes.</p><p>Caf\xc3\xa9 order #12</p>"
        b"<script>track()</script></body></html>\n"
    )
    assert message_text(msg) == "Broken lamp\n\nThe lamp flickers & buzzes.\nCafé order #12"


def test_plain_part_is_preferred_and_attachments_ignored() -> None:
    msg = EmailMessage()
    msg["Subject"] = "Refund"
    msg.set_content("Plain words here.")
    msg.add_alternative("<p>HTML words here.</p>", subtype="html")
    msg.add_attachment(b"%PDF-1.4 secret words", maintype="application", subtype="pdf", filename="a.pdf")
    text = message_text(parse(msg.as_bytes()))
    assert text == "Refund\n\nPlain words here."


def test_unknown_charset_is_decoded_by_sniffing_instead_of_raising() -> None:
    # Python's own get_content() raises LookupError here.
    data = b"Subject: x\nContent-Type: text/plain; charset=x-made-up\n\nna\xc3\xafve\n"
    assert text_of_message_bytes(data) == "x\n\nnaïve"


def test_message_without_headers_and_body_is_broken() -> None:
    with pytest.raises(BrokenMessageError, match="no headers and no body"):
        text_of_message_bytes(b"\n\n")


def nested_multipart(depth: int) -> bytes:
    """A message whose MIME parts nest ``depth`` deep: Python's parser recurses per level."""
    opening = b"".join(
        b"Content-Type: multipart/mixed; boundary=b%d\n\n--b%d\n" % (i, i) for i in range(depth)
    )
    closing = b"".join(b"\n--b%d--\n" % i for i in reversed(range(depth)))
    return b"Subject: deep\n" + opening + b"Content-Type: text/plain\n\nhi\n" + closing


def test_parser_recursion_error_makes_a_broken_message() -> None:
    with pytest.raises(BrokenMessageError, match="nested too deeply"):
        text_of_message_bytes(nested_multipart(sys.getrecursionlimit() + 50))


# --- files ------------------------------------------------------------------------------


def test_eml_file_request_stays_quote_and_signature_go(tmp_path: Path) -> None:
    (tmp_path / "ticket.eml").write_bytes(
        b"From: Sam Ashdown <sam@example.org>\r\nTo: help@example.com\r\n"
        b"Subject: Re: Invoice 2231\r\nContent-Type: text/plain; charset=utf-8\r\n\r\n"
        b"The invoice for March lists the standing desk twice.\r\nPlease remove one of them.\r\n\r\n"
        b"Thanks,\r\nSam Ashdown\r\nPurchasing, Larkspur Tiles\r\n\r\n"
        b"On Mon, 2 Mar 2026 at 17:40, Billing <billing@example.com> wrote:\r\n"
        b"> Dear customer, your invoice is attached.\r\n> Kind regards, Billing\r\n"
    )
    collection = read_collection(tmp_path)
    (doc,) = collection.documents
    assert doc.id == "ticket.eml"
    assert doc.text == f"Re: Invoice 2231\n\n{REQUEST}"
    assert "attached" not in doc.text and "Purchasing" not in doc.text


def write_mbox(path: Path, messages: list[bytes]) -> None:
    envelope = b"From sender@example.org Mon Mar  2 10:00:00 2026\n"
    path.write_bytes(b"".join(envelope + message + b"\n" for message in messages))


def test_mbox_with_broken_messages_still_yields_the_others(tmp_path: Path) -> None:
    write_mbox(
        tmp_path / "inbox.mbox",
        [
            b"Subject: First\n\nThe scanner jams on page two.\n",
            nested_multipart(sys.getrecursionlimit() + 50),
            b"",  # two "From " lines in a row: no headers, no body
            b"Subject: Fourth\n\nLogin fails after the update.\n",
        ],
    )
    collection = read_collection(tmp_path)
    assert [(d.id, d.text) for d in collection.documents] == [
        ("inbox.mbox#message-1", "First\n\nThe scanner jams on page two."),
        ("inbox.mbox#message-4", "Fourth\n\nLogin fails after the update."),
    ]
    assert [s.reason for s in collection.skipped] == [
        "broken message 2 of 4: MIME parts nested too deeply to parse",
        "broken message 3 of 4: no headers and no body",
    ]
    assert {s.path for s in collection.skipped} == {"inbox.mbox"}


def test_mbox_split_matches_the_mailbox_module(tmp_path: Path) -> None:
    data = (
        b"preamble that is not a message\n"
        b"From a@example.org Mon Mar  2 10:00:00 2026\nSubject: one\n\nbody one\n>From the top\n\n"
        b"From b@example.org Mon Mar  2 11:00:00 2026\nSubject: two\n\nbody two\n"
        b"From c@example.org Mon Mar  2 12:00:00 2026\nSubject: three\n\n"
    )
    source = tmp_path / "box.mbox"
    source.write_bytes(data)
    copy = tmp_path / "reference.mbox"
    shutil.copyfile(source, copy)  # mailbox.mbox opens its file for writing; never the source
    reference = mailbox.mbox(copy, create=False)
    try:
        expected = [(m["subject"], m.get_payload().strip()) for m in reference]
    finally:
        reference.close()
    ours = [parse(raw) for raw in split_mbox(data)]
    assert [(m["subject"], m.get_content().strip()) for m in ours] == expected
    assert len(expected) == 3


def test_mbox_without_from_lines_is_skipped(tmp_path: Path) -> None:
    (tmp_path / "odd.mbox").write_bytes(b"Subject: no envelope\n\nhello\n")
    collection = read_collection(tmp_path)
    assert collection.documents == ()
    assert collection.skipped[0].reason.startswith("no messages")


def test_empty_eml_is_listed_as_broken(tmp_path: Path) -> None:
    (tmp_path / "blank.eml").write_bytes(b"")
    collection = read_collection(tmp_path)
    assert collection.documents == ()
    assert [(s.path, s.reason) for s in collection.skipped] == [
        ("blank.eml", "broken message: no headers and no body")
    ]
