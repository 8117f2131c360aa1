"""The records of the reading stage: what to read from tables, and what was read."""

from __future__ import annotations

from collections.abc import Callable, Iterable, Iterator
from dataclasses import dataclass, field
from typing import TypeVar

from ._document import Document, TextSpool

T = TypeVar("T")

#: Lines of a streamed file between two progress reports (a few milliseconds of parsing).
LINES_PER_REPORT = 10_000


@dataclass(frozen=True, slots=True)
class TableColumns:
    """Which columns of ``.csv``/``.tsv``/``.jsonl`` files to use; ``None`` means guess.

    Attributes
    ----------
    text:
        One or more column names; their non-empty cells are joined with ``"\\n"``
        (e.g. ``("subject", "body")``).
    id:
        Column whose values become document ids (``export.csv#<value>``).
    label:
        Column holding a category for some rows (seed labels).

    Names match the header case-insensitively after stripping spaces.
    """

    text: tuple[str, ...] | None = None
    id: str | None = None
    label: str | None = None


@dataclass(frozen=True, slots=True)
class SkippedFile:
    """A file, or part of one, that produced no document.

    Attributes
    ----------
    path:
        Path relative to the folder read, forward slashes.
    reason:
        Short human reason: ``"binary file"``, ``"unsupported file type .pdf"``,
        ``"broken message 3 of 12: ..."``, ``"line 7: not valid JSON"``, ...
    """

    path: str
    reason: str


@dataclass(frozen=True, slots=True)
class Collection:
    """Everything read from a folder (or a single file).

    Attributes
    ----------
    root:
        The folder read, or the single file's parent folder.
    documents:
        Sorted by source path, then by row or message order within a file.
    skipped:
        Files and parts of files that gave no document, with the reason.
    notes:
        Things the user should know: guessed table columns, legacy 8-bit decoding, ...
    spooled_bytes:
        Bytes of text kept in the reading's temporary file rather than in memory
        (:class:`~seedsort.sources._document.TextSpool`; 0 when every text fits its budget).
    """

    root: str
    documents: tuple[Document, ...]
    skipped: tuple[SkippedFile, ...]
    notes: tuple[str, ...]
    spooled_bytes: int = 0

    @property
    def empty(self) -> tuple[str, ...]:
        """Ids of the documents whose text is empty or only whitespace."""
        return tuple(doc.id for doc in self.documents if not doc.text.strip())


@dataclass(slots=True)
class FileReading:
    """What one reader got out of one file, in order; the folder walk concatenates these.

    ``spool`` keeps the documents' texts (:class:`TextSpool`); None keeps them in memory.
    """

    documents: list[Document] = field(default_factory=list)
    skipped: list[SkippedFile] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)
    spool: TextSpool | None = None
    #: Called with the bytes of the file read so far, now and then, by streaming readers.
    on_position: Callable[[int], None] | None = None

    def metered(self, lines: Iterable[T], position: Callable[[], int]) -> Iterator[T]:
        """``lines`` as they are, reporting ``position()`` (bytes read) every
        :data:`LINES_PER_REPORT` lines: progress through one long table or mailbox."""
        if self.on_position is None:
            yield from lines
            return
        for number, line in enumerate(lines, start=1):
            if number % LINES_PER_REPORT == 0:
                self.on_position(position())
            yield line

    def add(self, id: str, source: str, text: str, label: str | None = None) -> None:
        """Append a document made from ``text`` (hashed, then kept by the spool)."""
        self.documents.append(Document.make(id, source, text, label, spool=self.spool))
