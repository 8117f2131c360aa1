"""Texts kept out of memory (TextSpool) and tables and mailboxes read as streams.

External truths: pandas.read_csv (its own C parser, given the encoding) and the json module
for what a table's cells are; the standard library's mailbox.mbox for how an mbox splits;
UTF-8 and cp1252 as Python's codecs define them. The spool must change nothing a reader
gives: every check compares what was read with a budget of 0 (every text in the temporary
file) against those references.
"""

from __future__ import annotations

import json
import mailbox
import pickle
from pathlib import Path

import pandas as pd
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from seedsort.sources import Document, DocumentTexts, TextSpool, read_collection
from seedsort.sources._decode import _CHECK_CHUNK, CP1252, UTF8, UTF8_SIG, UTF16, file_encoding


@settings(max_examples=60, deadline=None)
@given(st.lists(st.text(), max_size=20), st.integers(0, 40))
def test_spooled_texts_read_back_exactly(texts: list[str], budget: int) -> None:
    """Any text, lone surrogates included, comes back as it went in, held or spooled."""
    spool = TextSpool(held_bytes=budget)
    kept = [spool.keep(text) for text in texts]
    assert [spool.text(where) for where in kept] == texts
    held = sum(len(t) for t, where in zip(texts, kept) if isinstance(where, str))
    assert held <= budget
    assert spool.spooled_bytes == sum(
        len(t.encode("utf-8", "surrogatepass")) for t, where in zip(texts, kept) if not isinstance(where, str)
    )


def test_a_spooled_document_behaves_as_a_held_one() -> None:
    held = Document.make("a.csv#row-1", "a.csv", "Refund for order 7 ✓", "refunds")
    spooled = Document.make("a.csv#row-1", "a.csv", "Refund for order 7 ✓", "refunds", spool=TextSpool(0))
    assert spooled.text == held.text and spooled == held and hash(spooled) == hash(held)
    assert pickle.loads(pickle.dumps(spooled)) == held  # the text travels, not the file
    assert "Refund for order 7" in repr(spooled)
    with pytest.raises(AttributeError):
        spooled.label = "other"  # type: ignore[misc]
    assert list(DocumentTexts([held, spooled])) == [held.text] * 2
    assert DocumentTexts([held, spooled])[0:1] == [held.text] and len(DocumentTexts([held])) == 1


def _write_csv(path: Path, rows: list[tuple[str, str]], encoding: str) -> None:
    lines = ["id,text"] + [f'{i},"{t.replace(chr(34), chr(34) * 2)}"' for i, t in rows]
    path.write_bytes(("\r\n".join(lines) + "\r\n").encode(encoding))


@pytest.mark.parametrize("encoding", [UTF8, UTF8_SIG, UTF16, CP1252])
def test_a_table_larger_than_a_check_chunk_reads_as_pandas_reads_it(tmp_path: Path, encoding: str) -> None:
    """Reference: pandas.read_csv with the file's encoding. The table is over a 1 MiB check
    chunk, its multi-byte letters straddle chunk borders, and (cp1252) the only byte that is
    not UTF-8 sits near the end, where a check of the first chunk alone would miss it."""
    word = "café naïve résumé" if encoding != UTF16 else "smörgåsbord ✓"
    rows = [(f"t{i}", f"Ticket {i}: {word}, line one\nline \"two\"") for i in range(30_000)]
    if encoding == CP1252:
        rows[-1] = ("last", "Invoice total 20€ — paid")  # € and — are cp1252 bytes 0x80 and 0x97
    path = tmp_path / "export.csv"
    _write_csv(path, rows, encoding)
    assert path.stat().st_size > _CHECK_CHUNK
    assert file_encoding(path).codec == encoding

    read = read_collection(tmp_path, held_text_bytes=0)
    reference = pd.read_csv(path, encoding=encoding, dtype=str, keep_default_na=False)
    assert [doc.id for doc in read.documents] == [f"export.csv#{i}" for i in reference["id"]]
    assert [doc.text for doc in read.documents] == list(reference["text"])
    legacy = [note for note in read.notes if "legacy 8-bit" in note]
    assert bool(legacy) == (encoding == CP1252)
    assert read.spooled_bytes > 0
    in_memory = read_collection(tmp_path)
    assert in_memory.spooled_bytes == 0 and read.documents == in_memory.documents


def test_jsonl_and_tsv_stream_to_the_same_texts_as_their_standard_readers(tmp_path: Path) -> None:
    """Reference: json.loads line by line; pandas.read_csv(sep="\\t")."""
    objects = [{"id": f"q{i}", "body": f"Where is parcel {i}?\tIt is late.", "n": i} for i in range(2_000)]
    (tmp_path / "a.jsonl").write_text("\r\n".join(json.dumps(o) for o in objects) + "\n", encoding="utf-8")
    (tmp_path / "b.tsv").write_text(
        "id\ttext\n" + "".join(f"r{i}\tCard {i} declined at the till\n" for i in range(2_000)), encoding="utf-8"
    )
    read = read_collection(tmp_path, held_text_bytes=0)
    jsonl = [doc for doc in read.documents if doc.source == "a.jsonl"]
    tsv = [doc for doc in read.documents if doc.source == "b.tsv"]
    assert [doc.text for doc in jsonl] == [o["body"] for o in objects]
    assert [doc.text for doc in tsv] == list(pd.read_csv(tmp_path / "b.tsv", sep="\t", dtype=str)["text"])


def test_an_mbox_streams_into_the_messages_mailbox_finds(tmp_path: Path) -> None:
    """Reference: the standard library's mailbox.mbox (the same split, message by message)."""
    path = tmp_path / "inbox.mbox"
    box = mailbox.mbox(path)
    for i in range(300):
        box.add(
            f"From: customer{i}@example.invalid\nSubject: Order {i}\n\n"
            f"My order {i} has not arrived yet.\nFrom what I can see it left the depot.\n"
        )
    box.flush()
    box.close()
    read = read_collection(tmp_path, held_text_bytes=0)
    reference = mailbox.mbox(path)
    try:
        expected = [message.get_payload() for message in reference]
    finally:
        reference.close()
    assert len(read.documents) == len(expected) == 300
    for doc, payload in zip(read.documents, expected):
        assert payload.strip().split("\n")[0] in doc.text and "Order" in doc.text


def test_a_table_that_is_not_text_part_way_gives_no_documents(tmp_path: Path) -> None:
    """A file that fails its encoding check (bytes cp1252 leaves undefined: 0x81, by the
    codec's table) is skipped whole, past the first chunk too: no half table."""
    path = tmp_path / "broken.csv"
    body = "id,text\n" + "".join(f"{i},plain ticket text number {i}\n" for i in range(40_000))
    path.write_bytes(body.encode() + b"9,\xff\x81\n")
    assert path.stat().st_size > _CHECK_CHUNK
    read = read_collection(tmp_path, held_text_bytes=0)
    assert read.documents == ()
    assert [(s.path, s.reason) for s in read.skipped] == [("broken.csv", "could not decode as UTF-8, UTF-16 or cp1252")]
