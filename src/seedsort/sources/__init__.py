"""The reading stage: a folder of notes, emails and table exports -> ``Document`` records.

``read_collection(path)`` walks a folder (or reads one file) and returns a ``Collection``:
the documents in a deterministic order, the files or parts it skipped and why, and notes
on anything it had to guess. Supported: ``.txt``/``.md``, ``.html``/``.htm``, ``.eml``,
``.mbox``, ``.csv``/``.tsv`` and ``.jsonl``. Source files are only ever read.
"""

from __future__ import annotations

from ._collection import Collection, SkippedFile, TableColumns
from ._document import HELD_TEXT_BYTES, Document, DocumentTexts, TextSpool, content_hash
from ._folder import read_collection

__all__ = [
    "Collection",
    "Document",
    "DocumentTexts",
    "HELD_TEXT_BYTES",
    "TextSpool",
    "SkippedFile",
    "TableColumns",
    "content_hash",
    "read_collection",
]
