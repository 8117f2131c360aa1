"""read_collection over a folder: walking, ids, skipping, notes, determinism, read-only."""

from __future__ import annotations

import codecs
import os
from pathlib import Path

import pytest

from seedsort.errors import InputError
from seedsort.sources import Collection, Document, SkippedFile, content_hash, read_collection


def make_corpus(root: Path) -> None:
    (root / "notes" / "deep").mkdir(parents=True)
    (root / "notes" / "a.txt").write_text("Printer on floor 2 is out of toner.\n", encoding="utf-8")
    (root / "notes" / "deep" / "b.md").write_text("# Heating\r\nRoom 4 is cold.\r\n", encoding="utf-8")
    (root / "notes" / "empty.txt").write_bytes(b"")
    (root / "notes" / "blank.txt").write_bytes(b"  \n\t\n")
    (root / "page.html").write_text("<p>Water&nbsp;leak</p><p>in the lobby</p>", encoding="utf-8")
    (root / "tickets.csv").write_text(
        "id,text\nK1,Badge does not open door\nK2,Lift stuck\n", encoding="utf-8"
    )
    (root / "photo.png").write_bytes(b"\x89PNG\r\n\x1a\n\x00\x00\x00\rIHDR\x00\x00")
    (root / "report.pdf").write_bytes(b"%PDF-1.4\n")
    (root / "legacy.txt").write_bytes(b"Caf\xe9 machine \x96 broken")
    (root / "garbled.txt").write_bytes(b"\xc3\x28 \x81\x8d")
    (root / ".hidden.txt").write_text("secret", encoding="utf-8")
    (root / ".git").mkdir()
    (root / ".git" / "config.txt").write_text("ignored", encoding="utf-8")


def test_folder_is_read_recursively_in_path_order(tmp_path: Path) -> None:
    make_corpus(tmp_path)
    collection = read_collection(tmp_path)
    assert [d.id for d in collection.documents] == [
        "legacy.txt",
        "notes/a.txt",
        "notes/blank.txt",
        "notes/deep/b.md",
        "notes/empty.txt",
        "page.html",
        "tickets.csv#K1",
        "tickets.csv#K2",
    ]
    by_id = {d.id: d for d in collection.documents}
    assert by_id["notes/deep/b.md"].text == "# Heating\nRoom 4 is cold.\n"
    assert by_id["page.html"].text == "Water leak\nin the lobby"
    assert by_id["tickets.csv#K2"].source == "tickets.csv"
    assert all(d.content_hash == content_hash(d.text) for d in collection.documents)
    assert collection.root == str(tmp_path)


def test_skipped_files_are_listed_with_reasons_and_hidden_ones_are_not(tmp_path: Path) -> None:
    make_corpus(tmp_path)
    collection = read_collection(tmp_path)
    assert collection.skipped == (
        SkippedFile("garbled.txt", "could not decode as UTF-8, UTF-16 or cp1252"),
        SkippedFile("photo.png", "unsupported file type .png"),
        SkippedFile("report.pdf", "unsupported file type .pdf"),
    )
    everything = [d.id for d in collection.documents] + [s.path for s in collection.skipped]
    assert not any(".hidden" in p or ".git" in p for p in everything)


def test_binary_file_with_supported_extension_is_skipped(tmp_path: Path) -> None:
    (tmp_path / "dump.txt").write_bytes(b"MZ\x90\x00\x03\x00\x00\x00 text after")
    collection = read_collection(tmp_path)
    assert collection.documents == ()
    assert collection.skipped == (SkippedFile("dump.txt", "binary file"),)


def test_empty_documents_are_kept_and_listed(tmp_path: Path) -> None:
    make_corpus(tmp_path)
    collection = read_collection(tmp_path)
    assert collection.empty == ("notes/blank.txt", "notes/empty.txt")
    assert Document.make("notes/empty.txt", "notes/empty.txt", "") in collection.documents


def test_legacy_8bit_file_is_decoded_with_a_note(tmp_path: Path) -> None:
    make_corpus(tmp_path)
    collection = read_collection(tmp_path)
    legacy = next(d for d in collection.documents if d.id == "legacy.txt")
    assert legacy.text == "Café machine – broken"  # 0x96 is an en dash in cp1252
    assert collection.notes == (
        "legacy.txt: not valid UTF-8, decoded as legacy 8-bit cp1252; check accented letters",
        "tickets.csv: text from column text, ids from id",
    )


@pytest.mark.parametrize(
    ("name", "data"),
    [
        ("bom8.txt", codecs.BOM_UTF8 + "Zürich office ✓\r\n".encode()),
        ("bom16le.txt", codecs.BOM_UTF16_LE + "Zürich office ✓\r\n".encode("utf-16-le")),
        ("bom16be.md", codecs.BOM_UTF16_BE + "Zürich office ✓\r\n".encode("utf-16-be")),
    ],
)
def test_byte_order_marks_are_honoured_and_removed(tmp_path: Path, name: str, data: bytes) -> None:
    (tmp_path / name).write_bytes(data)
    collection = read_collection(tmp_path)
    assert [d.text for d in collection.documents] == ["Zürich office ✓\n"]
    assert collection.notes == ()


def test_utf16_csv_with_bom(tmp_path: Path) -> None:
    (tmp_path / "t.csv").write_bytes(codecs.BOM_UTF16_LE + "id,text\r\n1,Größe\r\n".encode("utf-16-le"))
    assert [(d.id, d.text) for d in read_collection(tmp_path).documents] == [("t.csv#1", "Größe")]


def test_non_ascii_text_and_file_names(tmp_path: Path) -> None:
    (tmp_path / "données").mkdir()
    note = tmp_path / "données" / "résumé.txt"
    note.write_text("Привет, 世界 — ½ ✓ 🙂", encoding="utf-8")
    (doc,) = read_collection(tmp_path).documents
    assert (doc.id, doc.text) == ("données/résumé.txt", "Привет, 世界 — ½ ✓ 🙂")


def test_source_files_are_left_untouched(tmp_path: Path) -> None:
    make_corpus(tmp_path)
    (tmp_path / "box.mbox").write_bytes(b"From a@example.org Mon Mar  2 10:00:00 2026\nSubject: s\n\nbody\n")
    files = sorted(p for p in tmp_path.rglob("*") if p.is_file())
    old = 1_000_000_000  # set a known past mtime so any write would show
    for path in files:
        os.utime(path, (old, old))
    before = {p: (p.read_bytes(), p.stat().st_mtime_ns) for p in files}
    read_collection(tmp_path)
    assert {p: (p.read_bytes(), p.stat().st_mtime_ns) for p in files} == before
    assert sorted(p for p in tmp_path.rglob("*") if p.is_file()) == files  # nothing created


def test_reading_twice_gives_identical_results(tmp_path: Path) -> None:
    make_corpus(tmp_path)
    first, second = read_collection(tmp_path), read_collection(tmp_path)
    assert first == second
    assert len({d.id for d in first.documents}) == len(first.documents)


def test_single_file_is_read_with_its_parent_as_root(tmp_path: Path) -> None:
    make_corpus(tmp_path)
    collection = read_collection(tmp_path / "tickets.csv")
    assert collection.root == str(tmp_path)
    assert [d.id for d in collection.documents] == ["tickets.csv#K1", "tickets.csv#K2"]


def test_missing_path_raises_input_error(tmp_path: Path) -> None:
    missing = tmp_path / "nope"
    with pytest.raises(InputError) as raised:
        read_collection(missing)
    assert str(raised.value) == f"No such file or folder: {missing}. Check the path."


def test_progress_is_reported_in_bytes_after_each_file(tmp_path: Path) -> None:
    """Reference: the files' sizes as the operating system gives them (os.stat)."""
    make_corpus(tmp_path)
    calls: list[tuple[str, int, int | None]] = []
    read_collection(tmp_path, on_progress=lambda stage, done, total: calls.append((stage, done, total)))
    sizes = sorted(
        (p.relative_to(tmp_path).as_posix(), p.stat().st_size)
        for p in tmp_path.rglob("*") if p.is_file() and not any(part.startswith(".") for part in p.relative_to(tmp_path).parts)
    )
    total = sum(size for _, size in sizes)
    after_each = [sum(size for _, size in sizes[: i + 1]) for i in range(len(sizes))]
    assert calls == [("read", 0, total)] + [("read", done, total) for done in after_each]


def test_progress_moves_within_one_long_table(tmp_path: Path) -> None:
    """A single large table reports its position as it is parsed, not only when done."""
    path = tmp_path / "big.csv"
    path.write_text("id,text\n" + "".join(f"{i},ticket number {i} about a late parcel\n" for i in range(50_000)),
                    encoding="utf-8")
    calls: list[int] = []
    read_collection(tmp_path, on_progress=lambda stage, done, total: calls.append(done))
    size = path.stat().st_size
    assert calls[0] == 0 and calls[-1] == size
    assert len(calls) >= 4 and calls == sorted(calls) and all(0 < c < size for c in calls[1:-2])


def test_an_empty_folder_gives_an_empty_collection(tmp_path: Path) -> None:
    assert read_collection(tmp_path) == Collection(str(tmp_path), (), (), ())


def test_uppercase_extensions_are_recognised(tmp_path: Path) -> None:
    (tmp_path / "NOTE.TXT").write_text("shouting", encoding="utf-8")
    (tmp_path / "README").write_text("no extension", encoding="utf-8")
    collection = read_collection(tmp_path)
    assert [d.id for d in collection.documents] == ["NOTE.TXT"]
    assert collection.skipped == (SkippedFile("README", "unsupported file type (no extension)"),)
