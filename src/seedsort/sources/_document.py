"""The plain record every reader produces, and where its text is kept.

A collection's texts are most of what reading holds: a support export of a million tickets
of a few kilobytes each is gigabytes of text, needed again only by a few stages (vectors,
snippets, the workspace, the review screen, export). So a :class:`TextSpool` keeps texts in
memory only up to a budget (:data:`HELD_TEXT_BYTES`); the rest are written to an unnamed
temporary file as they are read, and a :class:`Document` whose text was written there reads
it back when ``.text`` is asked for. The file has no name on POSIX systems (removed at
creation: nothing is left behind, whatever ends the process); elsewhere it is removed when
closed. Nothing leaves the machine.
"""

from __future__ import annotations

import hashlib
import os
import tempfile
import threading
import weakref
from collections.abc import Iterator, Sequence
from typing import Any, BinaryIO, overload

#: Texts a spool keeps in memory, in characters (about bytes for Latin text), before it
#: writes further texts to its temporary file. 64 MiB keeps a demo or a 100,000-ticket
#: export whole in memory (no file at all) and bounds a larger one's texts to this size.
HELD_TEXT_BYTES = 64 * 2**20

#: Packs a spooled text's (offset, length) into one int: length in the low 40 bits.
_LENGTH_BITS = 40


def content_hash(text: str) -> str:
    """SHA-256 (hex) of the UTF-8 text: a document's identity for caching and change detection."""
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


class TextSpool:
    """Texts kept in memory up to ``held_bytes`` characters (None: :data:`HELD_TEXT_BYTES`),
    then in a temporary file.

    :meth:`keep` returns what a document stores: the text itself while the budget lasts,
    else the position of its UTF-8 bytes in the file (one int). Reads use ``os.pread``
    where the system has it (no shared file position, so threads may read at once), else a
    lock around seek + read. Cost: one write per spooled text, one read per access.
    """

    def __init__(self, held_bytes: int | None = None) -> None:
        self.held_bytes = HELD_TEXT_BYTES if held_bytes is None else held_bytes
        self._held = 0
        self._file: BinaryIO | None = None
        self._size = 0
        self._unflushed = False
        self._moved = False
        self._lock = threading.Lock()

    @property
    def spooled_bytes(self) -> int:
        """Bytes written to the temporary file so far (0: every text is in memory)."""
        return self._size

    def keep(self, text: str) -> str | int:
        """Hold ``text`` or write it out; returns what :meth:`text` turns back into it."""
        if self._held + len(text) <= self.held_bytes:
            self._held += len(text)
            return text
        # surrogatepass: a lone surrogate (readers replace them, callers might not) survives.
        data = text.encode("utf-8", "surrogatepass")
        with self._lock:
            if self._file is None:
                self._file = tempfile.TemporaryFile(prefix="seedsort-texts-")
                # Closed (and so removed) when the spool goes: by its last document.
                weakref.finalize(self, self._file.close)
            if self._moved:  # a seek + read moved the position (systems without pread)
                self._file.seek(self._size)
                self._moved = False
            # No seek otherwise: a seek flushes the write buffer, one system call per text.
            self._file.write(data)
            offset, self._size = self._size, self._size + len(data)
            self._unflushed = True
        return (offset << _LENGTH_BITS) | len(data)

    def text(self, where: str | int) -> str:
        """The text behind a value :meth:`keep` returned."""
        if isinstance(where, str):
            return where
        offset, length = where >> _LENGTH_BITS, where & ((1 << _LENGTH_BITS) - 1)
        assert self._file is not None, "a position comes from a written file"
        if self._unflushed:  # buffered writes must reach the file before a read sees them
            with self._lock:
                self._file.flush()
                self._unflushed = False
        if hasattr(os, "pread"):
            data = os.pread(self._file.fileno(), length, offset)
        else:  # pragma: no cover - Windows
            with self._lock:
                self._file.seek(offset)
                data = self._file.read(length)
                self._moved = True
        return data.decode("utf-8", "surrogatepass")


class Document:
    """One document of the collection.

    Attributes
    ----------
    id:
        Stable identifier: the path relative to the folder read (``notes/a.txt``), a table
        row (``export.csv#row-12``, or ``export.csv#<id value>`` when an id column is used),
        or a message of a mailbox (``inbox.mbox#message-3``). Forward slashes on every OS.
    source:
        Path of the source file relative to the folder read.
    text:
        The readable text (may be empty; empty documents are kept and reported). Read back
        from the collection's :class:`TextSpool` when it was spooled.
    content_hash:
        ``content_hash(text)``.
    label:
        Category from a label column of a table, else ``None``.

    Immutable; equal when id, source, hash, label and text are.
    """

    __slots__ = ("id", "source", "content_hash", "label", "_text", "_spool")

    id: str
    source: str
    content_hash: str
    label: str | None

    def __init__(
        self,
        id: str,
        source: str,
        text: str,
        content_hash: str,
        label: str | None = None,
        *,
        spool: TextSpool | None = None,
    ) -> None:
        setter = object.__setattr__
        setter(self, "id", id)
        setter(self, "source", source)
        setter(self, "content_hash", content_hash)
        setter(self, "label", label)
        setter(self, "_spool", spool)
        setter(self, "_text", text if spool is None else spool.keep(text))

    @classmethod
    def make(
        cls, id: str, source: str, text: str, label: str | None = None, *, spool: TextSpool | None = None
    ) -> Document:
        """A document with its content hash computed; its text kept by ``spool`` if given."""
        return cls(id=id, source=source, text=text, content_hash=content_hash(text), label=label, spool=spool)

    @property
    def text(self) -> str:
        stored = self._text
        return stored if isinstance(stored, str) else self._spool.text(stored)  # type: ignore[union-attr]

    def __setattr__(self, name: str, value: Any) -> None:
        raise AttributeError(f"Document is immutable; cannot set {name!r}")

    def __delattr__(self, name: str) -> None:
        raise AttributeError(f"Document is immutable; cannot delete {name!r}")

    def _key(self) -> tuple[str, str, str, str | None]:
        return (self.id, self.source, self.content_hash, self.label)

    def __eq__(self, other: object) -> bool:
        if not isinstance(other, Document):
            return NotImplemented
        return self._key() == other._key() and self.text == other.text

    def __hash__(self) -> int:
        return hash(self._key())

    def __repr__(self) -> str:
        return (
            f"Document(id={self.id!r}, source={self.source!r}, text={self.text!r}, "
            f"content_hash={self.content_hash!r}, label={self.label!r})"
        )

    def __reduce__(self) -> tuple[object, tuple[object, ...]]:
        # A pickled document carries its text (a spool's file does not travel).
        return (Document, (self.id, self.source, self.text, self.content_hash, self.label))


class DocumentTexts(Sequence[str]):
    """The texts of a sequence of documents, read one at a time when asked (a slice gives a
    list): what the vectors stage takes, without a list of every text."""

    def __init__(self, documents: Sequence[Document]) -> None:
        self._documents = documents

    def __len__(self) -> int:
        return len(self._documents)

    @overload
    def __getitem__(self, index: int) -> str: ...
    @overload
    def __getitem__(self, index: slice) -> list[str]: ...
    def __getitem__(self, index: int | slice) -> str | list[str]:
        if isinstance(index, slice):
            return [doc.text for doc in self._documents[index]]
        return self._documents[index].text

    def __iter__(self) -> Iterator[str]:
        return (doc.text for doc in self._documents)
