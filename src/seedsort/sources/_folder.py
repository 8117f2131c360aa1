"""The folder walk: find the files, hand each to the reader for its type, gather the results.

Files are listed first (hidden files and folders, whose names start with ".", are left
out silently; symlinked folders are not followed, so a link loop cannot trap the walk),
sorted by their relative path, then read one at a time: a note, web page or message
whole, a table or mailbox as a stream (rows and messages as they come). A file that is
binary, undecodable, of an unsupported type or unreadable becomes a ``SkippedFile``; only
a table whose named column is missing stops the read (``InputError``), because every table
of the folder would fail the same way. The documents' texts go to one
:class:`~seedsort.sources._document.TextSpool`, which keeps them in memory up to its budget
and in a temporary file beyond it.

Cost: one read of every file (two of a table: the encoding check, the parse); memory holds
one note or message (or one table row), the documents' records and the spool's budget.
"""

from __future__ import annotations

import os
from collections.abc import Callable
from pathlib import Path

from .._progress import ProgressCallback, no_progress
from ..errors import InputError
from ._collection import Collection, FileReading, SkippedFile, TableColumns
from ._decode import BINARY_SNIFF_BYTES, UndecodableError, clean_text, decode_file_text, looks_binary
from ._document import Document, TextSpool
from ._email import read_eml, read_mbox
from ._html import html_to_text
from ._tables import read_csv, read_jsonl, read_tsv

Reader = Callable[[Path, str, TableColumns, FileReading], None]
"""Reads a file (its relative path for ids) into documents, added to the reading."""

PROGRESS_STAGE = "read"


def read_plain(path: Path, rel: str, columns: TableColumns, reading: FileReading) -> None:
    """Read a ``.txt`` or ``.md`` file as one document, text as it is."""
    text = decode_file_text(path.read_bytes(), rel, reading)
    reading.add(rel, rel, clean_text(text))


def read_html(path: Path, rel: str, columns: TableColumns, reading: FileReading) -> None:
    """Read an ``.html``/``.htm`` file as one document of its visible text."""
    text = decode_file_text(path.read_bytes(), rel, reading)
    reading.add(rel, rel, clean_text(html_to_text(text)))


READERS: dict[str, Reader] = {
    ".txt": read_plain,
    ".md": read_plain,
    ".html": read_html,
    ".htm": read_html,
    ".eml": read_eml,
    ".mbox": read_mbox,
    ".csv": read_csv,
    ".tsv": read_tsv,
    ".jsonl": read_jsonl,
}
"""File extension (lower case) -> reader."""


def _is_hidden(name: str) -> bool:
    return name.startswith(".")


def list_files(root: Path) -> tuple[list[tuple[str, Path]], list[SkippedFile]]:
    """The visible files under ``root`` as (relative posix path, path), sorted by the former.

    Folders that cannot be listed come back as skipped entries.
    """
    found: list[tuple[str, Path]] = []
    unlisted: list[SkippedFile] = []

    def on_error(error: OSError) -> None:
        try:
            rel = Path(error.filename).relative_to(root).as_posix()
        except (TypeError, ValueError):
            rel = "."
        unlisted.append(SkippedFile(rel, f"could not list folder: {error.strerror or error}"))

    for folder, subfolders, names in os.walk(root, onerror=on_error):
        subfolders[:] = [name for name in subfolders if not _is_hidden(name)]
        for name in names:
            if not _is_hidden(name):
                path = Path(folder, name)
                found.append((path.relative_to(root).as_posix(), path))
    found.sort(key=lambda item: item[0])
    unlisted.sort(key=lambda item: item.path)
    return found, unlisted


def _size(path: Path) -> int:
    try:
        return path.stat().st_size if path.is_file() else 0
    except OSError:
        return 0


def read_file(
    path: Path,
    rel: str,
    columns: TableColumns,
    spool: TextSpool | None = None,
    on_position: Callable[[int], None] | None = None,
) -> FileReading:
    """Read one file with the reader for its extension; problems become skipped entries.

    ``spool`` keeps the documents' texts (None: in memory). A file that fails part way
    (unreadable, undecodable) gives no documents, only its skipped entry. ``on_position``
    hears the bytes read so far from a streamed table or mailbox, now and then.

    Raises
    ------
    InputError
        If a named table column is missing (from the table readers).
    """
    extension = path.suffix.lower()
    reader = READERS.get(extension)
    if reader is None:
        what = extension or "(no extension)"
        return FileReading(skipped=[SkippedFile(rel, f"unsupported file type {what}")])
    if not path.is_file():  # a FIFO would block forever, a device would never end
        return FileReading(skipped=[SkippedFile(rel, "not a regular file")])
    reading = FileReading(spool=spool, on_position=on_position)
    try:
        with open(path, "rb") as handle:
            head = handle.read(BINARY_SNIFF_BYTES)
        if looks_binary(head):
            return FileReading(skipped=[SkippedFile(rel, "binary file")])
        reader(path, rel, columns, reading)
    except OSError as exc:
        return FileReading(skipped=[SkippedFile(rel, f"could not read: {exc.strerror or exc}")])
    except UndecodableError as exc:
        return FileReading(skipped=[SkippedFile(rel, str(exc))])
    return reading


def read_collection(
    path: str | os.PathLike[str],
    *,
    columns: TableColumns = TableColumns(),
    on_progress: ProgressCallback | None = None,
    held_text_bytes: int | None = None,
) -> Collection:
    """Read every supported file under a folder (or one file) into documents.

    Parameters
    ----------
    path:
        A folder, read recursively, or a single file.
    columns:
        Which table columns hold the text, ids and labels; ``None`` fields are guessed.
    on_progress:
        Called as ``on_progress("read", bytes_done, bytes_total)`` over the sizes of the
        files listed: first with 0 done, after each file, and every
        :data:`~seedsort.sources._collection.LINES_PER_REPORT` lines within a streamed
        table or mailbox.
    held_text_bytes:
        Texts kept in memory (characters) before the rest go to a temporary file
        (:class:`~seedsort.sources._document.TextSpool`; None: its default budget); reading
        them back is transparent.

    Returns
    -------
    Collection
        Documents sorted by source path, then row/message order; skipped files with a
        reason; notes on guesses and legacy decoding.

    Raises
    ------
    InputError
        If ``path`` does not exist, or a named table column is missing from a table.
    """
    report = on_progress or no_progress
    target = Path(path)
    if target.is_dir():
        root = target
        files, skipped = list_files(root)
    elif target.exists():
        root = target.parent
        files, skipped = [(target.name, target)], []
    else:
        raise InputError(f"No such file or folder: {target}. Check the path.")

    documents: list[Document] = []
    notes: list[str] = []
    spool = TextSpool(held_text_bytes)
    sizes = [_size(file_path) for _, file_path in files]
    total, done = sum(sizes), 0
    report(PROGRESS_STAGE, 0, total)
    for (rel, file_path), size in zip(files, sizes):
        def within(position: int, before: int = done, size: int = size) -> None:
            report(PROGRESS_STAGE, before + min(position, size), total)

        reading = read_file(file_path, rel, columns, spool, on_position=within)
        documents.extend(reading.documents)
        skipped.extend(reading.skipped)
        notes.extend(reading.notes)
        done += size
        report(PROGRESS_STAGE, done, total)
    return Collection(
        root=str(root), documents=tuple(documents), skipped=tuple(skipped), notes=tuple(notes),
        spooled_bytes=spool.spooled_bytes,
    )
