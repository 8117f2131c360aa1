"""Tables: ``.csv``, ``.tsv`` and ``.jsonl`` exports, one document per row.

CSV and TSV are parsed with the standard library's ``csv`` module (RFC 4180 quoting, so
a quoted cell may span lines); a ``.csv`` file's delimiter is sniffed among comma,
semicolon and tab by ``csv.Sniffer`` on the first 4 KiB, falling back to comma. JSON
Lines holds one JSON object per non-blank line; a line that is not valid JSON is skipped
and listed, the rest is read.

Which columns hold the text, the ids and the labels comes from ``TableColumns``; a name
left as ``None`` is guessed from the header (and, for the text, from the first 200 rows)
and the guess is written into the notes. The file is streamed: its encoding is checked a
chunk at a time (:func:`seedsort.sources._decode.file_encoding`), then rows are parsed from
the decoded lines as they come and each row's text goes to the reading's spool; only those
first 200 rows are held back while guessing. Cost: linear in the size of the file (two
passes: the encoding check, the parse); memory: one row and the documents' records.
"""

from __future__ import annotations

import csv
import itertools
import json
from collections.abc import Iterable, Iterator
from dataclasses import dataclass
from pathlib import Path

from ..errors import InputError
from ._collection import FileReading, SkippedFile, TableColumns
from ._decode import clean_text, file_encoding, note_encoding, open_decoded

GUESS_ROWS = 200
"""How many rows are looked at to guess the text column."""

TEXT_NAMES = (
    "text", "body", "message", "description", "content", "comment", "comments", "details",
    "note", "notes", "question", "query", "request", "summary", "feedback", "answer",
    "response",
)  # fmt: skip
"""Column names that hold the text, most telling first."""
SUBJECT_NAMES = ("subject", "title")
ID_NAMES = frozenset({"id", "key", "number", "ticket", "reference"})
LABEL_NAMES = ("label", "category")

_SNIFF_CHARS = 4096  # csv.Sniffer is quadratic on quote-heavy samples
_MAX_LISTED_BAD_LINES = 20
_MAX_LISTED_ID_ROWS = 10

Row = dict[str, str]
"""A row as normalised column name -> cell text."""


def normalise_name(name: str) -> str:
    """Column names match case-insensitively after stripping spaces."""
    return name.strip().casefold()


@dataclass(frozen=True, slots=True)
class ColumnPlan:
    """The resolved columns of one table (normalised names) and the note on any guess."""

    text: tuple[str, ...]
    id: str | None
    label: str | None
    note: str | None


def _missing_column(name: str, rel: str, display: dict[str, str], flag: str) -> InputError:
    columns = ", ".join(display.values()) or "(none)"
    return InputError(
        f"Column '{name}' not found in {rel}; its columns are: {columns}. "
        f"Name the {flag} column with --{flag}-column."
    )


def _named(name: str, rel: str, display: dict[str, str], flag: str) -> str:
    key = normalise_name(name)
    if key not in display:
        raise _missing_column(name, rel, display, flag)
    return key


def _guess_id(names: list[str]) -> str | None:
    for name in names:
        if name in ID_NAMES or name.endswith(("_id", " id")):
            return name
    return None


def _guess_text(names: list[str], sample: list[Row], taken: set[str]) -> tuple[str, ...]:
    if not names:
        return ()
    for candidate in TEXT_NAMES:
        if candidate in names and candidate not in taken:
            subject = next((s for s in SUBJECT_NAMES if s in names and s not in taken), None)
            return (subject, candidate) if subject else (candidate,)
    # No telling name: the column with the longest cells on average is the prose.
    candidates = [name for name in names if name not in taken] or names
    rows = max(len(sample), 1)
    return (max(candidates, key=lambda n: sum(len(row.get(n, "")) for row in sample) / rows),)


def plan_columns(
    rel: str, display: dict[str, str], sample: list[Row], columns: TableColumns
) -> ColumnPlan:
    """Resolve the text, id and label columns of a table.

    Parameters
    ----------
    rel:
        The table's path, for messages.
    display:
        Normalised column name -> name as written in the header, in header order.
    sample:
        The first rows (at most ``GUESS_ROWS``), for guessing the text column.
    columns:
        The user's choices; ``None`` fields are guessed.

    Raises
    ------
    InputError
        If a named column is not in the table.
    """
    names = list(display)
    guessed = False
    if columns.id is not None:
        id_column = _named(columns.id, rel, display, "id")
    else:
        id_column, guessed = _guess_id(names), True
    if columns.label is not None:
        label_column = _named(columns.label, rel, display, "label")
    else:
        # Finding no label column is the usual case, not a guess worth a note.
        label_column = next((n for n in LABEL_NAMES if n in display), None)
        guessed = guessed or label_column is not None
    if columns.text is not None:
        text = tuple(_named(name, rel, display, "text") for name in columns.text)
    else:
        taken = {name for name in (id_column, label_column) if name is not None}
        text, guessed = _guess_text(names, sample, taken), True
    note = None
    if guessed:
        ids = f"ids from {display[id_column]}" if id_column else "ids from row numbers"
        labels = f", labels from {display[label_column]}" if label_column else ""
        plural = "s" if len(text) > 1 else ""
        texts = " + ".join(display[name] for name in text) or "(none)"
        note = f"{rel}: text from column{plural} {texts}, {ids}{labels}"
    return ColumnPlan(text, id_column, label_column, note)


def _rows_to_documents(
    rel: str,
    rows: Iterable[tuple[int, Row]],
    display: dict[str, str],
    columns: TableColumns,
    reading: FileReading,
) -> None:
    """Plan the columns from the first rows, then turn every row into a document."""
    rows = iter(rows)
    sample = list(itertools.islice(rows, GUESS_ROWS))
    plan = plan_columns(rel, display, [row for _, row in sample], columns)
    if plan.note:
        reading.notes.append(plan.note)
    used_ids: set[str] = set()
    fallback_rows: list[int] = []
    for number, row in itertools.chain(sample, rows):
        text = "\n".join(
            cell.strip() for cell in (row.get(name, "") for name in plan.text) if cell.strip()
        )
        label = (row.get(plan.label, "").strip() or None) if plan.label else None
        key = row.get(plan.id, "").strip() if plan.id else ""
        if plan.id and (not key or key in used_ids):
            fallback_rows.append(number)
            key = ""
        if not key:
            key = f"row-{number}"
            # An id value may itself read "row-7"; never hand out one id twice.
            suffix = 2
            while key in used_ids:
                key, suffix = f"row-{number}-{suffix}", suffix + 1
        used_ids.add(key)
        reading.add(f"{rel}#{key}", rel, clean_text(text), label)
    if fallback_rows:
        listed = ", ".join(str(n) for n in fallback_rows[:_MAX_LISTED_ID_ROWS])
        more = ", ..." if len(fallback_rows) > _MAX_LISTED_ID_ROWS else ""
        reading.notes.append(
            f"{rel}: {len(fallback_rows)} row(s) had a blank or repeated "
            f"{display[plan.id or '']} (rows {listed}{more}); they use #row-N ids instead"
        )


def _sniff_delimiter(text: str) -> str:
    sample = text[:_SNIFF_CHARS]
    if len(text) > _SNIFF_CHARS and "\n" in sample:
        sample = sample[: sample.rindex("\n")]  # whole lines only
    try:
        delimiter = csv.Sniffer().sniff(sample, delimiters=",;\t").delimiter
    except csv.Error:
        return ","
    # A delimiter the header row lacks would split unquoted prose in a one-column file.
    return delimiter if delimiter in sample.split("\n", 1)[0] else ","


def _read_delimited(
    path: Path, rel: str, delimiter: str | None, columns: TableColumns, reading: FileReading
) -> None:
    encoding = file_encoding(path)
    note_encoding(encoding.codec, rel, reading)
    if delimiter is None:
        with open_decoded(path, encoding) as handle:
            delimiter = _sniff_delimiter(handle.read(_SNIFF_CHARS + 1))
    with open_decoded(path, encoding) as handle:
        _parse_delimited(reading.metered(handle, handle.buffer.tell), rel, delimiter, columns, reading)


def _parse_delimited(
    lines: Iterable[str], rel: str, delimiter: str, columns: TableColumns, reading: FileReading
) -> None:
    # Only the delimiter is taken from the sniffer: its quote guesses are unreliable,
    # and RFC 4180 double quotes are what spreadsheet exports write.
    reader = csv.reader(lines, delimiter=delimiter)
    failure: list[str] = []

    def records() -> Iterator[list[str]]:
        try:
            for record in reader:
                if record:  # a blank line is not a row
                    yield record
        except csv.Error as exc:
            failure.append(f"line {reader.line_num}: {exc}; the rest of the file was not read")

    stream = records()
    header = next(stream, None)
    if header is None:
        reason = failure[0] if failure else "empty table (no header row)"
        reading.skipped.append(SkippedFile(rel, reason))
        return
    display: dict[str, str] = {}
    positions: dict[str, int] = {}
    for position, raw_name in enumerate(header):
        shown = raw_name.strip() or f"column {position + 1}"
        key = normalise_name(shown)
        if key not in display:  # a repeated header name: the first column wins
            display[key], positions[key] = shown, position

    def rows() -> Iterator[tuple[int, Row]]:
        for number, record in enumerate(stream, start=1):
            yield number, {
                key: record[pos] if pos < len(record) else "" for key, pos in positions.items()
            }

    _rows_to_documents(rel, rows(), display, columns, reading)
    if failure:
        reading.skipped.append(SkippedFile(rel, failure[0]))
    elif not reading.documents:
        reading.skipped.append(SkippedFile(rel, "empty table (a header row, no data rows)"))


def read_csv(path: Path, rel: str, columns: TableColumns, reading: FileReading) -> None:
    """Read a ``.csv`` file (delimiter sniffed among ``,`` ``;`` and tab)."""
    _read_delimited(path, rel, None, columns, reading)


def read_tsv(path: Path, rel: str, columns: TableColumns, reading: FileReading) -> None:
    """Read a ``.tsv`` file (tab-delimited, RFC 4180 quoting)."""
    _read_delimited(path, rel, "\t", columns, reading)


def _cell(value: object) -> str:
    if value is None:
        return ""
    if isinstance(value, str):
        return value
    return json.dumps(value, ensure_ascii=False)


def read_jsonl(path: Path, rel: str, columns: TableColumns, reading: FileReading) -> None:
    """Read a ``.jsonl`` file: one JSON object per non-blank line.

    Row N (for ``#row-N`` ids) counts non-blank lines, bad ones included; the skipped
    entries name the line number as an editor shows it. The columns are the keys seen in
    the first ``GUESS_ROWS`` objects, so a named column must appear in one of those.
    """
    encoding = file_encoding(path)
    note_encoding(encoding.codec, rel, reading)
    with open_decoded(path, encoding) as handle:
        _parse_jsonl(reading.metered(handle, handle.buffer.tell), rel, columns, reading)


def _parse_jsonl(lines: Iterable[str], rel: str, columns: TableColumns, reading: FileReading) -> None:
    bad_lines: list[tuple[int, str]] = []
    display: dict[str, str] = {}

    def objects() -> Iterator[tuple[int, Row]]:
        number = 0
        for line_number, line in enumerate(lines, start=1):
            if not line.strip():
                continue
            number += 1
            try:
                value = json.loads(line)
            except (ValueError, RecursionError):  # RecursionError: absurdly deep nesting
                bad_lines.append((line_number, "not valid JSON"))
                continue
            if not isinstance(value, dict):
                bad_lines.append((line_number, "not a JSON object"))
                continue
            row: Row = {}
            for raw_key, cell in value.items():
                key = normalise_name(raw_key)
                if key not in row:
                    row[key] = _cell(cell)
                    display.setdefault(key, raw_key.strip())
            yield number, row

    stream = objects()
    sample = list(itertools.islice(stream, GUESS_ROWS))
    if sample:
        _rows_to_documents(rel, itertools.chain(sample, stream), dict(display), columns, reading)
    for line_number, reason in bad_lines[:_MAX_LISTED_BAD_LINES]:
        reading.skipped.append(SkippedFile(rel, f"line {line_number}: {reason}"))
    if len(bad_lines) > _MAX_LISTED_BAD_LINES:
        extra = len(bad_lines) - _MAX_LISTED_BAD_LINES
        reading.skipped.append(SkippedFile(rel, f"{extra} more bad lines not listed"))
    if not sample and not bad_lines:
        reading.skipped.append(SkippedFile(rel, "empty table (no JSON objects)"))
