"""Tables: CSV/TSV by the csv module (RFC 4180 quoting, Sniffer for the delimiter), JSON Lines.

External truths: RFC 4180 (a quoted field may hold commas, doubled quotes and line
breaks), the JSON Lines convention (one JSON value per line, RFC 8259 JSON).
"""

from __future__ import annotations

from pathlib import Path

import pytest

from seedsort.errors import InputError
from seedsort.sources import TableColumns, read_collection


def write(path: Path, text: str, encoding: str = "utf-8") -> Path:
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_bytes(text.encode(encoding))
    return path


def test_named_column_missing_raises_one_sentence_naming_the_columns(tmp_path: Path) -> None:
    write(tmp_path / "exports" / "t.csv", "a,b,c\n1,2,3\n")
    with pytest.raises(InputError) as raised:
        read_collection(tmp_path, columns=TableColumns(text=("body",)))
    assert str(raised.value) == (
        "Column 'body' not found in exports/t.csv; its columns are: a, b, c. "
        "Name the text column with --text-column."
    )


def test_missing_id_and_label_columns_name_their_flags(tmp_path: Path) -> None:
    write(tmp_path / "t.csv", "text\nhello\n")
    with pytest.raises(InputError, match="--id-column"):
        read_collection(tmp_path, columns=TableColumns(id="ref"))
    with pytest.raises(InputError, match="--label-column"):
        read_collection(tmp_path, columns=TableColumns(label="topic"))


def test_quoted_newlines_commas_and_quotes_stay_inside_one_cell(tmp_path: Path) -> None:
    # RFC 4180 section 2: fields with line breaks, commas or double quotes are quoted.
    write(tmp_path / "t.csv", 'id,body\r\n7,"first line\r\nsecond, with comma\r\nsaid ""hi"""\r\n8,plain\r\n')
    docs = read_collection(tmp_path).documents
    assert [(d.id, d.text) for d in docs] == [
        ("t.csv#7", 'first line\nsecond, with comma\nsaid "hi"'),
        ("t.csv#8", "plain"),
    ]


def test_named_columns_match_case_insensitively_and_join_with_newline(tmp_path: Path) -> None:
    write(tmp_path / "t.csv", " Subject ,Details,Ref,Topic\nPrinter,Out of toner,R-1,supplies\nVPN,, R-2 ,\n")
    columns = TableColumns(text=("subject", "DETAILS"), id="ref", label="topic")
    collection = read_collection(tmp_path, columns=columns)
    assert [(d.id, d.text, d.label) for d in collection.documents] == [
        ("t.csv#R-1", "Printer\nOut of toner", "supplies"),
        ("t.csv#R-2", "VPN", None),
    ]
    assert collection.notes == ()  # nothing was guessed


def test_tsv_is_tab_delimited(tmp_path: Path) -> None:
    write(tmp_path / "t.tsv", "ticket_id\tdescription\n101\tscreen, keyboard; mouse\n102\tmonitor\n")
    docs = read_collection(tmp_path).documents
    assert [(d.id, d.text) for d in docs] == [
        ("t.tsv#101", "screen, keyboard; mouse"),
        ("t.tsv#102", "monitor"),
    ]


def test_semicolon_csv_is_sniffed(tmp_path: Path) -> None:
    write(tmp_path / "t.csv", "id;message\n1;Bonjour, la facture est fausse\n2;Merci, c'est réglé\n")
    docs = read_collection(tmp_path).documents
    assert [d.text for d in docs] == ["Bonjour, la facture est fausse", "Merci, c'est réglé"]


def test_guessed_columns_subject_plus_body_id_and_label_are_noted(tmp_path: Path) -> None:
    write(
        tmp_path / "exports" / "t.csv",
        "Ticket_ID,Created,Subject,Description,Category\n"
        "T-1,2026-03-01,Refund,Charged twice for order 88,billing\n"
        "T-2,2026-03-02,Login,Cannot sign in since Monday, \n",
    )
    collection = read_collection(tmp_path)
    assert [(d.id, d.text, d.label) for d in collection.documents] == [
        ("exports/t.csv#T-1", "Refund\nCharged twice for order 88", "billing"),
        ("exports/t.csv#T-2", "Login\nCannot sign in since Monday", None),
    ]
    assert collection.notes == (
        "exports/t.csv: text from columns Subject + Description, ids from Ticket_ID, labels from Category",
    )


def test_without_telling_names_the_longest_column_is_the_text(tmp_path: Path) -> None:
    write(
        tmp_path / "t.csv",
        "when,who,what\n"
        "2026-03-01,kim,the heater in room four rattles all night\n"
        "2026-03-02,lee,door sticks\n",
    )
    collection = read_collection(tmp_path)
    assert [(d.id, d.text) for d in collection.documents] == [
        ("t.csv#row-1", "the heater in room four rattles all night"),
        ("t.csv#row-2", "door sticks"),
    ]
    assert collection.notes == ("t.csv: text from column what, ids from row numbers",)


def test_blank_or_repeated_id_falls_back_to_row_number_with_a_note(tmp_path: Path) -> None:
    write(tmp_path / "t.csv", "id,text\nA,first\nB,second\nA,third\n,fourth\n")
    collection = read_collection(tmp_path)
    assert [d.id for d in collection.documents] == ["t.csv#A", "t.csv#B", "t.csv#row-3", "t.csv#row-4"]
    assert collection.notes[-1] == (
        "t.csv: 2 row(s) had a blank or repeated id (rows 3, 4); they use #row-N ids instead"
    )


def test_id_value_that_looks_like_a_row_id_never_collides(tmp_path: Path) -> None:
    write(tmp_path / "t.csv", "id,text\nrow-2,first\n,second\n")
    ids = [d.id for d in read_collection(tmp_path).documents]
    assert ids == ["t.csv#row-2", "t.csv#row-2-2"]
    assert len(set(ids)) == len(ids)


def test_blank_lines_are_not_rows_and_short_rows_are_padded(tmp_path: Path) -> None:
    write(tmp_path / "t.csv", "text,label\n\nfirst\n\nsecond,x\n")
    docs = read_collection(tmp_path).documents
    assert [(d.id, d.text, d.label) for d in docs] == [
        ("t.csv#row-1", "first", None),
        ("t.csv#row-2", "second", "x"),
    ]


def test_header_only_and_empty_tables_are_listed(tmp_path: Path) -> None:
    write(tmp_path / "a.csv", "")
    write(tmp_path / "b.csv", "id,text\n")
    write(tmp_path / "c.jsonl", "\n\n")
    collection = read_collection(tmp_path)
    assert collection.documents == ()
    assert [(s.path, s.reason) for s in collection.skipped] == [
        ("a.csv", "empty table (no header row)"),
        ("b.csv", "empty table (a header row, no data rows)"),
        ("c.jsonl", "empty table (no JSON objects)"),
    ]


def test_jsonl_with_one_bad_line_reads_the_rest(tmp_path: Path) -> None:
    write(
        tmp_path / "t.jsonl",
        '{"id": 5, "text": "Blender is loud", "label": "noise"}\n'
        "\n"
        '{"id": 6, "text": "Kettle leaks" \n'
        '["not", "an", "object"]\n'
        '{"ID": 7, "Text": "Toaster burns bread", "label": null}\n',
    )
    collection = read_collection(tmp_path)
    assert [(d.id, d.text, d.label) for d in collection.documents] == [
        ("t.jsonl#5", "Blender is loud", "noise"),
        ("t.jsonl#7", "Toaster burns bread", None),
    ]
    assert [(s.path, s.reason) for s in collection.skipped] == [
        ("t.jsonl", "line 3: not valid JSON"),
        ("t.jsonl", "line 4: not a JSON object"),
    ]


def test_jsonl_row_ids_count_non_blank_lines(tmp_path: Path) -> None:
    write(tmp_path / "t.jsonl", '{"body": "one"}\n\n\n{"body": "two", "extra": [1, 2]}\n')
    collection = read_collection(tmp_path)
    assert [(d.id, d.text) for d in collection.documents] == [
        ("t.jsonl#row-1", "one"),
        ("t.jsonl#row-2", "two"),
    ]


def test_non_string_json_values_become_text(tmp_path: Path) -> None:
    write(tmp_path / "t.jsonl", '{"text": {"k": "ü"}, "id": 1.5}\n{"text": true, "id": null}\n')
    docs = read_collection(tmp_path).documents
    assert [(d.id, d.text) for d in docs] == [("t.jsonl#1.5", '{"k": "ü"}'), ("t.jsonl#row-2", "true")]


def test_legacy_encoded_csv_is_read_with_a_note(tmp_path: Path) -> None:
    write(tmp_path / "old.csv", "text\ncafé crème\n", encoding="cp1252")
    collection = read_collection(tmp_path)
    assert collection.documents[0].text == "café crème"
    assert collection.notes[0] == (
        "old.csv: not valid UTF-8, decoded as legacy 8-bit cp1252; check accented letters"
    )


def test_csv_error_midway_keeps_earlier_rows_and_lists_the_rest(tmp_path: Path) -> None:
    # The csv module refuses a field over its size limit (131072 characters by default).
    write(tmp_path / "t.csv", "text\nfine\n" + "x" * 140_000 + "\nlater\n")
    collection = read_collection(tmp_path)
    assert [d.text for d in collection.documents] == ["fine"]
    assert collection.skipped[0].reason.startswith("line 3: field larger than field limit")


def test_one_column_csv_is_not_split_on_a_sniffed_semicolon(tmp_path: Path) -> None:
    write(tmp_path / "t.csv", "text\nhello; world\nfoo; bar\nbaz; qux\n")
    assert [d.text for d in read_collection(tmp_path).documents] == ["hello; world", "foo; bar", "baz; qux"]


def test_no_note_when_every_column_is_named_and_no_label_column_exists(tmp_path: Path) -> None:
    write(tmp_path / "t.csv", "ref,body\n1,a\n")
    assert read_collection(tmp_path, columns=TableColumns(text=("body",), id="ref")).notes == ()
    assert read_collection(tmp_path, columns=TableColumns(text=("body",))).notes == (
        "t.csv: text from column body, ids from row numbers",
    )
