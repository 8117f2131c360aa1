"""Property tests: any bytes in any supported file never crash ingestion."""

from __future__ import annotations

import tempfile
from pathlib import Path

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from seedsort.sources import read_collection

EXTENSIONS = [".txt", ".md", ".eml", ".mbox", ".csv", ".tsv", ".jsonl", ".html"]

# Raw bytes, plus bytes built from fragments that steer into the parsers' deeper paths.
FRAGMENTS = [
    b"From x@example.org Mon Mar  2 10:00:00 2026\n", b"Subject: ", b"Content-Type: ",
    b"multipart/mixed; boundary=b\n\n--b\n", b"text/html; charset=x-bad\n", b"\n\n", b"\r\n",
    b'"', b",", b";", b"\t", b"{", b"}", b'"text": ', b"<p>", b"<![x[", b"<script>", b"&#x",
    b"> quoted\n", b"-- \n", b"Thanks,\n", b"\xff\xfe", b"\xef\xbb\xbf", b"\x81", b"\xe9", b"\x00",
]  # fmt: skip
CONTENTS = st.one_of(
    st.binary(max_size=600),
    st.lists(st.sampled_from(FRAGMENTS) | st.binary(max_size=8), max_size=40).map(b"".join),
)


@settings(max_examples=300, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(data=CONTENTS, extension=st.sampled_from(EXTENSIONS))
def test_any_bytes_become_documents_or_skips_never_an_exception(data: bytes, extension: str) -> None:
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / f"input{extension}"
        path.write_bytes(data)
        collection = read_collection(folder)
        assert collection.documents or collection.skipped
        for document in collection.documents:
            document.text.encode("utf-8")  # storable: no lone surrogates
            assert document.source == f"input{extension}"
            assert "\r" not in document.text
        assert path.read_bytes() == data


@settings(max_examples=50, deadline=None)
@given(names=st.lists(st.from_regex(r"[a-z]{1,6}", fullmatch=True), min_size=1, max_size=6, unique=True))
def test_document_order_and_ids_follow_sorted_paths(names: list[str]) -> None:
    with tempfile.TemporaryDirectory() as folder:
        for name in reversed(names):  # creation order must not matter
            (Path(folder) / f"{name}.txt").write_text(name, encoding="utf-8")
        ids = [d.id for d in read_collection(folder).documents]
        assert ids == sorted(f"{name}.txt" for name in names)
        assert ids == [d.id for d in read_collection(folder).documents]
