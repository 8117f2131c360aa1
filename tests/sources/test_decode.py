"""Decoding bytes to text: byte-order marks, strict UTF-8, cp1252 fallback, binary sniffing.

External truth: the byte-order marks of the Unicode standard (``codecs.BOM_*``) and the
Windows-1252 code page as Python's ``cp1252`` codec defines it (five undefined bytes).
"""

from __future__ import annotations

import codecs

import pytest

from seedsort.sources._decode import (
    UndecodableError,
    clean_text,
    decode_bytes,
    looks_binary,
    normalise_newlines,
)


def test_plain_utf8_with_non_ascii_is_decoded_strictly() -> None:
    text, encoding = decode_bytes("Grüße, naïve café — 東京 ✓".encode())
    assert (text, encoding) == ("Grüße, naïve café — 東京 ✓", "utf-8")


def test_utf8_bom_is_removed() -> None:
    text, encoding = decode_bytes(codecs.BOM_UTF8 + "héllo".encode())
    assert (text, encoding) == ("héllo", "utf-8-sig")


@pytest.mark.parametrize("codec", ["utf-16-le", "utf-16-be"])
def test_utf16_with_bom_in_either_byte_order(codec: str) -> None:
    bom = codecs.BOM_UTF16_LE if codec.endswith("le") else codecs.BOM_UTF16_BE
    data = bom + "line one\r\nzweite Zeile ü\r\n".encode(codec)
    text, encoding = decode_bytes(data)
    assert text == "line one\nzweite Zeile ü\n"
    assert encoding == "utf-16"


def test_invalid_utf8_falls_back_to_cp1252() -> None:
    # 0x93/0x94 are curly quotes and 0xE9 is "é" in Windows-1252; none is valid UTF-8 here.
    text, encoding = decode_bytes(b"\x93caf\xe9\x94 costs \x80 5")
    assert (text, encoding) == ("\u201ccafé\u201d costs € 5", "cp1252")


def test_utf8_bom_followed_by_legacy_bytes_uses_cp1252_without_the_bom() -> None:
    text, encoding = decode_bytes(codecs.BOM_UTF8 + b"na\xefve")
    assert (text, encoding) == ("naïve", "cp1252")


def test_bytes_undefined_in_cp1252_are_undecodable() -> None:
    # 0x81 is one of the five bytes Windows-1252 leaves undefined; 0xC3 0x28 is bad UTF-8.
    with pytest.raises(UndecodableError, match="could not decode"):
        decode_bytes(b"\xc3\x28 and \x81")


def test_utf16_bom_with_odd_length_body_is_undecodable() -> None:
    with pytest.raises(UndecodableError):
        decode_bytes(codecs.BOM_UTF16_LE + b"a\x00b")


def test_newlines_are_normalised() -> None:
    assert normalise_newlines("a\r\nb\rc\nd") == "a\nb\nc\nd"
    assert decode_bytes(b"x\r\ny\r")[0] == "x\ny\n"


def test_nul_bytes_near_the_start_mean_binary() -> None:
    assert looks_binary(b"\x89PNG\r\n\x1a\n\x00\x00\x00\rIHDR")
    assert not looks_binary(b"plain text")
    assert not looks_binary(b"")


def test_utf16_bom_exempts_from_binary_detection() -> None:
    assert not looks_binary(codecs.BOM_UTF16_LE + "text".encode("utf-16-le"))


def test_nul_after_the_first_8_kib_is_not_binary() -> None:
    assert not looks_binary(b"a" * 8192 + b"\x00")


def test_clean_text_replaces_lone_surrogates_and_keeps_the_rest() -> None:
    cleaned = clean_text("ok \ud800 and \udcff\r\nend")
    assert cleaned == "ok \ufffd and \ufffd\nend"
    cleaned.encode("utf-8")  # would raise if a surrogate were left
