"""Turning the bytes of a file into text.

Order of trust: a byte-order mark (UTF-8, UTF-16 LE/BE) names the encoding outright;
without one, strict UTF-8 is tried, because valid UTF-8 is almost never an accident;
then legacy 8-bit cp1252 (Windows-1252), the usual encoding of old exports and notes,
which decodes every byte except the five it leaves undefined (0x81, 0x8D, 0x8F, 0x90,
0x9D). A file with a NUL byte in its first 8 KiB and no UTF-16 mark is binary.

Cost: one pass over the bytes per encoding tried (at most three). Tables and mailboxes,
which can be gigabytes, are not decoded whole: :func:`file_encoding` checks the encodings
in the same order on the file a chunk at a time, and :func:`open_decoded` then reads the
file as a stream of text lines in the encoding found.
"""

from __future__ import annotations

import codecs
import io
import re
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING, TextIO

if TYPE_CHECKING:
    from ._collection import FileReading

BINARY_SNIFF_BYTES = 8192
"""How much of the start of a file is searched for NUL bytes."""

UTF8 = "utf-8"
UTF8_SIG = "utf-8-sig"
UTF16 = "utf-16"
CP1252 = "cp1252"
LEGACY_ENCODINGS = frozenset({CP1252})
"""Encodings that were a guess rather than a certainty; readers note them for the user."""

_UTF16_BOMS = (codecs.BOM_UTF16_LE, codecs.BOM_UTF16_BE)
#: Bytes decoded at a time when a file's encoding is checked.
_CHECK_CHUNK = 1 << 20
_SURROGATE = re.compile("[\ud800-\udfff]")


class UndecodableError(ValueError):
    """The bytes are not text in any encoding we accept; ``str(error)`` is a short reason."""


def has_utf16_bom(data: bytes) -> bool:
    """Whether ``data`` starts with a UTF-16 byte-order mark (either byte order)."""
    return data.startswith(_UTF16_BOMS)


def looks_binary(data: bytes) -> bool:
    """Whether ``data`` is binary: a NUL byte in its first 8 KiB and no UTF-16 mark.

    UTF-16 text is full of NUL bytes, so its mark exempts it; UTF-16 without a mark is
    treated as binary, as most tools do.
    """
    return b"\x00" in data[:BINARY_SNIFF_BYTES] and not has_utf16_bom(data)


def normalise_newlines(text: str) -> str:
    """Turn Windows (``\\r\\n``) and old Mac (``\\r``) line ends into ``\\n``."""
    if "\r" not in text:
        return text
    return text.replace("\r\n", "\n").replace("\r", "\n")


@dataclass(frozen=True, slots=True)
class FileEncoding:
    """How to decode a file: the codec, after skipping ``skip`` bytes (a stray UTF-8 mark)."""

    codec: str
    skip: int = 0


_UNDECODABLE = "could not decode as UTF-8, UTF-16 or cp1252"


def _candidates(head: bytes) -> tuple[FileEncoding, ...]:
    """The encodings to try, in the order of trust, for bytes that start with ``head``."""
    if head.startswith(codecs.BOM_UTF8):
        # A UTF-8 mark on a file edited later in a legacy editor: cp1252 after the mark.
        return (FileEncoding(UTF8_SIG), FileEncoding(CP1252, len(codecs.BOM_UTF8)))
    if has_utf16_bom(head):
        return (FileEncoding(UTF16),)
    return (FileEncoding(UTF8), FileEncoding(CP1252))


def decode_bytes(data: bytes) -> tuple[str, str]:
    """Decode ``data`` as text, newlines normalised to ``\\n``.

    Parameters
    ----------
    data:
        The whole content of a file (or of a message part without a usable charset).

    Returns
    -------
    text, encoding:
        The text (without any byte-order mark) and the codec used: ``"utf-8-sig"``,
        ``"utf-16"``, ``"utf-8"`` or ``"cp1252"`` (the last is in ``LEGACY_ENCODINGS``).

    Raises
    ------
    UndecodableError
        If no accepted encoding decodes the bytes. Binary detection is separate
        (``looks_binary``) because message parts may legitimately hold NUL bytes.
    """
    for candidate in _candidates(data):
        try:
            return normalise_newlines(data[candidate.skip :].decode(candidate.codec)), candidate.codec
        except UnicodeDecodeError:
            continue
    raise UndecodableError(_UNDECODABLE)


def clean_text(text: str) -> str:
    """Make ``text`` safe to store and hash: newlines normalised, no lone surrogates.

    Lone surrogates arrive from JSON escapes such as ``"\\ud800"`` and from the email
    package's ``surrogateescape`` handling of raw 8-bit headers; they cannot be encoded
    as UTF-8, so each becomes U+FFFD.
    """
    try:
        text.encode(UTF8)
    except UnicodeEncodeError:
        text = _SURROGATE.sub("\ufffd", text)
    return normalise_newlines(text)


def legacy_note(rel: str, encoding: str) -> str:
    """The note telling the user a file was not UTF-8 and was decoded as ``encoding``."""
    return f"{rel}: not valid UTF-8, decoded as legacy 8-bit {encoding}; check accented letters"


def decode_file_text(data: bytes, rel: str, reading: FileReading) -> str:
    """``decode_bytes(data)`` for a whole file, adding a note to ``reading`` if legacy 8-bit.

    Raises
    ------
    UndecodableError
        As ``decode_bytes``.
    """
    text, encoding = decode_bytes(data)
    note_encoding(encoding, rel, reading)
    return text


def _decodes(path: Path, encoding: FileEncoding) -> bool:
    decoder = codecs.getincrementaldecoder(encoding.codec)()
    with open(path, "rb") as handle:
        handle.seek(encoding.skip)
        try:
            while chunk := handle.read(_CHECK_CHUNK):
                decoder.decode(chunk)
            decoder.decode(b"", final=True)
        except UnicodeDecodeError:
            return False
    return True


def file_encoding(path: Path) -> FileEncoding:
    """The encoding :func:`decode_bytes` would choose for the file's bytes, found by streaming.

    Same order of trust; each candidate is checked by an incremental decoder over 1 MiB
    chunks, so memory stays at one chunk whatever the file's size. Cost: one pass over the
    file per encoding tried (at most two).

    Raises
    ------
    UndecodableError
        If no accepted encoding decodes the file.
    """
    with open(path, "rb") as handle:
        head = handle.read(4)
    for candidate in _candidates(head):
        if _decodes(path, candidate):
            return candidate
    raise UndecodableError(_UNDECODABLE)


def open_decoded(path: Path, encoding: FileEncoding) -> TextIO:
    """The file as text lines in ``encoding``, newlines normalised to ``\\n`` (universal
    newlines: the same text :func:`decode_bytes` gives), byte-order mark dropped."""
    handle = open(path, "rb")
    handle.seek(encoding.skip)
    return io.TextIOWrapper(handle, encoding=encoding.codec, newline=None)


def note_encoding(codec: str, rel: str, reading: FileReading) -> None:
    """Add the legacy 8-bit note to ``reading`` when ``codec`` was a guess."""
    if codec in LEGACY_ENCODINGS:
        reading.notes.append(legacy_note(rel, codec))
