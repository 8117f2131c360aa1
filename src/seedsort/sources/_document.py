"""The plain record every reader produces."""

from __future__ import annotations

import hashlib
from dataclasses import dataclass


def content_hash(text: str) -> str:
    """SHA-256 (hex) of the UTF-8 text: a document's identity for caching and change detection."""
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


@dataclass(frozen=True, slots=True)
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
        The readable text (may be empty; empty documents are kept and reported).
    content_hash:
        ``content_hash(text)``.
    label:
        Category from a label column of a table, else ``None``.
    """

    id: str
    source: str
    text: str
    content_hash: str
    label: str | None = None

    @classmethod
    def make(cls, id: str, source: str, text: str, label: str | None = None) -> Document:
        return cls(id=id, source=source, text=text, content_hash=content_hash(text), label=label)
