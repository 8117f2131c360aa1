"""Export: Parquet results, the label history, and copies into category folders.

References: ``pandas.read_csv``, ``pandas.read_json(lines=True)`` and ``pandas.read_parquet``
read back what was written (JSON Lines: https://jsonlines.org; Parquet through pyarrow, the
Apache Arrow reference implementation); ISO 8601 times are checked against the standard
library's ``datetime``; ``shutil.copy2``'s documented behaviour (bytes and timestamps kept)
is the reference for a copied file; the stdlib ``csv`` module reads the table rows back.
"""

from __future__ import annotations

import csv
import dataclasses
import hashlib
import json
import os
import re
import shutil
import sys
import tempfile
from datetime import datetime, timedelta, timezone
from pathlib import Path

import numpy as np
import pandas as pd
import pyarrow.parquet as pq  # the test extra installs the parquet extra
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from seedsort import InputError, SortResult, read_collection, sort_documents, sort_folder, write_results
from seedsort.export import (
    HISTORY_COLUMNS,
    PROBABILITY_PREFIX,
    LabelEvent,
    copy_into_category_folders,
    safe_name,
    write_label_history,
)
from seedsort.results import CSV_COLUMNS
from seedsort.seeds import resolve_seeds
from seedsort.sorting import SortSettings

from conftest import TOPICS, topic_documents


EXTRA = ("", "Καλημέρα σας ευχαριστώ πολύ")  # an empty note and one no seed reaches
NA = {"keep_default_na": False, "na_values": [""]}


@pytest.fixture(scope="module")
def result() -> SortResult:
    docs, truth = topic_documents(extra=EXTRA)
    pairs = [(docs[i].id, truth[i]) for i in (0, 1, 10, 11, 20, 21, 30, 31)]
    return sort_documents(docs, resolve_seeds(docs, pairs), SortSettings(cross_check_folds=2))


# --- results as Parquet --------------------------------------------------------------------


def test_parquet_round_trips_with_types(result: SortResult, tmp_path: Path) -> None:
    """Reference: pandas.read_parquet (pyarrow) gives back every value and its type, unrounded."""
    path = write_results(result, tmp_path / "out.parquet")
    table = pd.read_parquet(path)
    probability_columns = [PROBABILITY_PREFIX + c for c in result.categories]
    assert list(table.columns) == CSV_COLUMNS + probability_columns
    assert table["document"].tolist() == list(result.ids)
    assert table["is_seed"].dtype == bool and table["possible_mislabel"].dtype == bool
    assert int(table["is_seed"].sum()) == 8
    for name in ("confidence", "margin", "out_of_scope", "nearest_seed_1_similarity"):
        assert table[name].dtype == np.float64
    np.testing.assert_array_equal(table["confidence"].to_numpy(), result.confidence)  # NaN == NaN here
    np.testing.assert_array_equal(table["out_of_scope"].to_numpy(), result.out_of_scope)
    probabilities = table[probability_columns].to_numpy()
    assert probabilities.dtype == np.float32
    np.testing.assert_array_equal(probabilities, result.probabilities)
    rows = table.set_index("document")
    for doc_id in ("extra-0.txt", "extra-1.txt"):
        assert rows.loc[doc_id, "category"] is None or pd.isna(rows.loc[doc_id, "category"])
        assert np.isnan(rows.loc[doc_id, "confidence"])
    schema = pq.read_schema(path)
    assert json.loads(schema.metadata[b"seedsort.categories"]) == list(result.categories)
    assert json.loads(schema.metadata[b"seedsort.settings"])["neighbours"] == result.settings["neighbours"]


def test_parquet_agrees_with_csv(result: SortResult, tmp_path: Path) -> None:
    """Reference: pandas.read_csv of the CSV writer; the same table up to the CSV's 4-decimal rounding."""
    csv_table = pd.read_csv(write_results(result, tmp_path / "out.csv"), **NA)
    parquet_table = pd.read_parquet(write_results(result, tmp_path / "out.parquet"))[CSV_COLUMNS]
    for column in CSV_COLUMNS:
        left, right = csv_table[column], parquet_table[column]
        if right.dtype == np.float64:
            np.testing.assert_allclose(left.to_numpy(float), right.to_numpy(), atol=5e-5)
        else:
            assert [None if pd.isna(v) else v for v in left] == [None if pd.isna(v) else v for v in right], column


def test_parquet_write_is_atomic(result: SortResult, tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    """Reference: os.replace (POSIX rename) is atomic; a failed write leaves the old file and no temporary."""
    path = write_results(result, tmp_path / "out.parquet")
    before = path.read_bytes()

    def broken(table: object, target: object) -> None:
        Path(str(target)).write_bytes(b"half a file")
        raise RuntimeError("disk full")

    monkeypatch.setattr("seedsort.export.write_parquet", broken)
    with pytest.raises(RuntimeError, match="disk full"):
        write_results(result, path)
    with pytest.raises(RuntimeError, match="disk full"):
        write_label_history(EVENTS, tmp_path / "history.parquet")
    assert sorted(p.name for p in tmp_path.iterdir()) == ["out.parquet"]
    assert path.read_bytes() == before


def _hide_pyarrow(monkeypatch: pytest.MonkeyPatch) -> None:
    # A None entry in sys.modules makes `import` raise ImportError, as when not installed.
    for name in [m for m in sys.modules if m == "pyarrow" or m.startswith("pyarrow.")]:
        monkeypatch.setitem(sys.modules, name, None)
    monkeypatch.setitem(sys.modules, "pyarrow", None)


def test_parquet_without_pyarrow_says_what_to_install(
    result: SortResult, tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    """Common practice: an optional dependency missing -> one sentence naming the extra to install."""
    _hide_pyarrow(monkeypatch)
    event = LabelEvent("a.txt", "weather", "review", datetime(2026, 1, 2, tzinfo=timezone.utc))
    for write in (lambda p: write_results(result, p), lambda p: write_label_history([event], p)):
        with pytest.raises(InputError) as error:
            write(tmp_path / "out.parquet")
        message = str(error.value)
        assert "pip install 'seedsort[parquet]'" in message and message.count(". ") == 0
    assert list(tmp_path.iterdir()) == []  # no file and no temporary file left behind
    write_results(result, tmp_path / "out.csv")  # the text formats never need pyarrow


# --- label history -------------------------------------------------------------------------

UTC = timezone.utc
PLUS_TWO = timezone(timedelta(hours=2))
EVENTS = [
    LabelEvent("notes/a.txt", "weather", "seed_file", datetime(2026, 3, 1, 9, 0, 0, tzinfo=UTC), superseded=True),
    LabelEvent("notes/a.txt", "cooking", "review", datetime(2026, 3, 1, 11, 30, 5, 250000, tzinfo=PLUS_TWO)),
    LabelEvent("export.csv#row-3", None, "review", datetime(2026, 3, 2, 0, 0, 0, 1, tzinfo=UTC)),
    LabelEvent('odd, "quoted"\nid', "Ελλάδα", "import", datetime(2025, 12, 31, 23, 59, 59, tzinfo=UTC)),
]


def test_history_csv_round_trips(tmp_path: Path) -> None:
    """Reference: pandas.read_csv, and ISO 8601 parsed by datetime.fromisoformat (UTC, 'Z')."""
    table = pd.read_csv(write_label_history(EVENTS, tmp_path / "history.csv"), **NA)
    assert list(table.columns) == HISTORY_COLUMNS
    assert table["document"].tolist() == [e.document for e in EVENTS]
    assert [None if pd.isna(c) else c for c in table["category"]] == [e.category for e in EVENTS]
    assert table["origin"].tolist() == ["seed_file", "review", "review", "import"]
    assert table["superseded"].tolist() == [True, False, False, False]
    assert all(re.fullmatch(r"\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d\.\d{6}Z", t) for t in table["time"])
    parsed = [datetime.fromisoformat(t) for t in table["time"]]
    assert parsed == [e.time for e in EVENTS]  # aware datetimes compare as instants
    assert table["time"][1] == "2026-03-01T09:30:05.250000Z"  # 11:30:05.25 at +02:00 is 09:30:05.25 UTC


def test_history_jsonl_round_trips(tmp_path: Path) -> None:
    """Reference: pandas.read_json(lines=True), and json.loads for nulls and booleans."""
    path = write_label_history(EVENTS, tmp_path / "history.jsonl")
    table = pd.read_json(path, lines=True, dtype=False)
    assert list(table.columns) == HISTORY_COLUMNS
    assert table["document"].tolist() == [e.document for e in EVENTS]
    assert pd.to_datetime(table["time"], utc=True).tolist() == [pd.Timestamp(e.time) for e in EVENTS]
    records = [json.loads(line) for line in path.read_text(encoding="utf-8").splitlines()]
    assert records[2]["category"] is None and records[0]["superseded"] is True
    assert records[3]["category"] == "Ελλάδα"


def test_history_parquet_keeps_types(tmp_path: Path) -> None:
    """Reference: pandas.read_parquet; time is a UTC timestamp column, superseded a boolean."""
    table = pd.read_parquet(write_label_history(EVENTS, tmp_path / "history.parquet"))
    assert list(table.columns) == HISTORY_COLUMNS
    assert str(table["time"].dtype) == "datetime64[us, UTC]"
    assert table["time"].tolist() == [pd.Timestamp(e.time) for e in EVENTS]
    assert table["superseded"].dtype == bool
    assert table["category"].isna().tolist() == [False, False, True, False]


def test_empty_history_still_has_its_columns(tmp_path: Path) -> None:
    """Reference: pandas readers; an empty history is a header (or schema) and no rows."""
    assert list(pd.read_csv(write_label_history([], tmp_path / "h.csv")).columns) == HISTORY_COLUMNS
    assert write_label_history([], tmp_path / "h.jsonl").read_text(encoding="utf-8") == ""
    empty = pd.read_parquet(write_label_history([], tmp_path / "h.parquet"))
    assert list(empty.columns) == HISTORY_COLUMNS and len(empty) == 0


def test_label_event_rejects_naive_times_and_unknown_origins() -> None:
    """Common practice: a time without a zone cannot be written as UTC honestly."""
    with pytest.raises(ValueError, match="timezone-aware"):
        LabelEvent("a", "b", "review", datetime(2026, 1, 1))
    with pytest.raises(ValueError, match="origin"):
        LabelEvent("a", "b", "guess", datetime(2026, 1, 1, tzinfo=UTC))


TEXT = st.text(st.characters(blacklist_categories=("Cs",), blacklist_characters="\x00"), min_size=1, max_size=20)


@settings(max_examples=60, deadline=None)
@given(st.lists(st.tuples(TEXT, st.one_of(st.none(), TEXT), st.booleans()), max_size=8))
def test_history_csv_round_trips_any_text(rows: list[tuple[str, str | None, bool]]) -> None:
    """Reference: pandas.read_csv reads back any ids and categories the CSV writer quoted (RFC 4180)."""
    events = [LabelEvent(d, c, "review", datetime(2026, 1, 1, tzinfo=UTC), s) for d, c, s in rows]
    with tempfile.TemporaryDirectory() as folder:
        table = pd.read_csv(write_label_history(events, Path(folder) / "h.csv"), dtype=str, **NA)
    assert table["document"].tolist() == [d for d, _, _ in rows]
    assert [None if pd.isna(c) else c for c in table["category"]] == [c for _, c, _ in rows]


# --- copying into category folders --------------------------------------------------------


def _make_pile(base: Path) -> tuple[Path, Path]:
    """Notes (two files named day.txt), recipes, a mailbox, a ticket table, an empty and a Greek note."""
    docs = base / "docs"
    weather = TOPICS["weather"]
    for year, i in (("2023", 0), ("2024", 1)):
        (docs / "notes" / year).mkdir(parents=True)
        (docs / "notes" / year / "day.txt").write_text(weather[i], encoding="utf-8")
    for i in range(2, 10):
        (docs / "notes" / f"w{i}.txt").write_text(weather[i], encoding="utf-8")
    (docs / "recipes").mkdir()
    for i, text in enumerate(TOPICS["cooking"]):
        (docs / "recipes" / f"c{i}.md").write_text(text + "\n", encoding="utf-8")
    messages = [
        f"From fan{i}@example.org Mon Jan  1 00:00:00 2024\nFrom: fan{i}@example.org\nSubject: match {i}\n\n{text}\n\n"
        for i, text in enumerate(TOPICS["football"])
    ]
    (docs / "club.mbox").write_text("".join(messages), encoding="utf-8")
    with open(docs / "tickets.csv", "w", newline="", encoding="utf-8") as handle:
        writer = csv.writer(handle)
        writer.writerow(["id", "text"])
        for i, text in enumerate(TOPICS["computers"]):
            writer.writerow(["../../escape" if i == 9 else f"T-{i}", text])
    (docs / "empty.txt").write_text("", encoding="utf-8")
    (docs / "greek.txt").write_text(EXTRA[1], encoding="utf-8")
    seeds = base / "seeds.csv"
    seeds.write_text(
        "document,category\nnotes/2023/day.txt,weather\nnotes/w5.txt,weather\nrecipes/c0.md,cooking\n"
        "recipes/c1.md,cooking\nclub.mbox#message-1,football\nclub.mbox#message-2,football\n"
        "tickets.csv#T-0,computers\ntickets.csv#T-1,computers\n",
        encoding="utf-8",
    )
    return docs, seeds


@pytest.fixture(scope="module")
def pile(tmp_path_factory: pytest.TempPathFactory) -> tuple[Path, SortResult]:
    docs, seeds = _make_pile(tmp_path_factory.mktemp("pile"))
    return docs, sort_folder(docs, seeds_file=seeds, settings=SortSettings(cross_check_folds=2))


def _snapshot(folder: Path) -> dict[str, tuple[str, int, int]]:
    """Every entry under a folder: kind, and for files a hash of the bytes and the mtime in ns."""
    if not folder.exists():
        return {}
    out = {}
    for path in sorted(folder.rglob("*")):
        rel = path.relative_to(folder).as_posix()
        if path.is_file() and not path.is_symlink():
            stat = path.stat()
            out[rel] = (hashlib.sha256(path.read_bytes()).hexdigest(), stat.st_mtime_ns, stat.st_size)
        else:
            out[rel] = ("dir" if path.is_dir() else "other", 0, 0)
    return out


def test_copy_writes_files_and_row_texts(pile: tuple[Path, SortResult], tmp_path: Path) -> None:
    """Reference: shutil.copy2's contract (same bytes, same modification time); the stdlib csv
    reader for a table row's text; RFC 5322 subject and body for a mailbox message."""
    docs, result = pile
    before = _snapshot(docs)
    dest = tmp_path / "sorted"
    plan = copy_into_category_folders(result, docs, dest, dry_run=False)
    assert _snapshot(docs) == before  # sources never change, nothing is added beside them

    categorised = {result.ids[i] for i in range(len(result)) if result.assigned[i] >= 0}
    assert {c.document for c in plan.copies} == categorised
    assert {o.document for o in plan.left_out} == {"empty.txt", "greek.txt"}
    assert all(o.reason.startswith("no category") for o in plan.left_out)
    written = {p.relative_to(dest).as_posix() for p in dest.rglob("*") if p.is_file()}
    assert written == {c.target for c in plan.copies}
    by_id = {c.document: c for c in plan.copies}
    for item in plan.copies:
        category = result.categories[result.assigned[result.ids.index(item.document)]]
        assert item.target.split("/")[0] == category == item.category
        if item.source is not None:
            src, out = Path(item.source), dest / item.target
            assert out.read_bytes() == src.read_bytes()
            assert out.stat().st_mtime_ns == src.stat().st_mtime_ns

    # Two files named day.txt keep their folders, so both survive.
    assert by_id["notes/2023/day.txt"].target == "weather/notes/2023/day.txt"
    assert by_id["notes/2024/day.txt"].target.endswith("notes/2024/day.txt")
    with open(docs / "tickets.csv", newline="", encoding="utf-8") as handle:
        rows = {row["id"]: row["text"] for row in csv.DictReader(handle)}
    ticket = by_id["tickets.csv#T-3"]
    assert ticket.source is None and ticket.target.endswith("/tickets.csv#T-3.txt")
    assert (dest / ticket.target).read_text(encoding="utf-8") == rows["T-3"]
    escape = by_id["tickets.csv#../../escape"]
    assert "/" not in escape.target.split("/", 1)[1] and escape.target.endswith("tickets.csv#.._.._escape.txt")
    assert (dest / escape.target).read_text(encoding="utf-8") == rows["../../escape"]
    message = (dest / by_id["club.mbox#message-4"].target).read_text(encoding="utf-8")
    assert message.startswith("match 3") and TOPICS["football"][3] in message
    read_back = {d.id: d.text for d in read_collection(docs).documents}
    assert message == read_back["club.mbox#message-4"]


def test_dry_run_writes_nothing_and_plans_the_same(pile: tuple[Path, SortResult], tmp_path: Path) -> None:
    """Common practice: a dry run reports exactly what the real run then does, and touches nothing."""
    docs, result = pile
    dest = tmp_path / "sorted"
    dry = copy_into_category_folders(result, docs, dest, dry_run=True)
    assert not dest.exists() and dry.dry_run
    real = copy_into_category_folders(result, docs, dest, dry_run=False)
    assert (dry.copies, dry.left_out, dry.folders, dry.conflicts) == (real.copies, real.left_out, real.folders, ())


def test_refuses_to_overwrite(pile: tuple[Path, SortResult], tmp_path: Path) -> None:
    """Common practice: an export never overwrites; any conflict stops it before the first write."""
    docs, result = pile
    dest = tmp_path / "sorted"
    target = copy_into_category_folders(result, docs, dest, dry_run=True).copies[5].target
    (dest / target).parent.mkdir(parents=True)
    (dest / target).write_text("mine", encoding="utf-8")
    before = _snapshot(dest)
    plan = copy_into_category_folders(result, docs, dest, dry_run=True)
    assert [c.target for c in plan.conflicts] == [target]
    with pytest.raises(InputError, match="1 of the .* exist already"):
        copy_into_category_folders(result, docs, dest, dry_run=False)
    assert _snapshot(dest) == before


def test_destination_checks(pile: tuple[Path, SortResult], tmp_path: Path) -> None:
    """Common practice: copies inside the folder read would be read again as new documents."""
    docs, result = pile
    with pytest.raises(InputError, match="inside the documents folder"):
        copy_into_category_folders(result, docs, docs / "sorted", dry_run=True)
    (tmp_path / "file").write_text("x", encoding="utf-8")
    with pytest.raises(InputError, match="not a folder"):
        copy_into_category_folders(result, docs, tmp_path / "file", dry_run=True)
    with pytest.raises(InputError, match="not a folder"):
        copy_into_category_folders(result, tmp_path / "missing", tmp_path / "out", dry_run=True)
    with pytest.raises(InputError, match="pass the documents folder"):
        copy_into_category_folders(dataclasses.replace(result, root=""), None, tmp_path / "out", dry_run=True)
    assert not (tmp_path / "out").exists()


def test_sources_outside_the_root_and_changed_rows_are_left_out(
    pile: tuple[Path, SortResult], tmp_path: Path
) -> None:
    """Common practice: '..' in a stored path is never followed; a row edited since the run is not
    exported under the run's category (the run's snippet no longer matches)."""
    docs, result = pile
    moved = tmp_path / "docs"
    shutil.copytree(docs, moved)
    table = (moved / "tickets.csv").read_text(encoding="utf-8").replace("wrong letters", "right letters")
    (moved / "tickets.csv").write_text(table, encoding="utf-8")
    row = next(i for i, d in enumerate(result.ids) if d == result.sources[i] and result.status[i] == "assigned")
    sources = list(result.sources)
    sources[row] = "../../outside.txt"
    ids = list(result.ids)
    ids[row] = "../../outside.txt"
    tampered = dataclasses.replace(result, sources=tuple(sources), ids=tuple(ids))
    plan = copy_into_category_folders(tampered, moved, tmp_path / "out", dry_run=True)
    reasons = {o.document: o.reason for o in plan.left_out}
    assert "outside the documents folder" in reasons["../../outside.txt"]
    assert "changed since the run" in reasons["tickets.csv#T-2"]
    categorised = {tampered.ids[i] for i in range(len(result)) if result.assigned[i] >= 0}
    assert {c.document for c in plan.copies} == categorised - {"../../outside.txt", "tickets.csv#T-2"}


def test_texts_given_are_used_and_progress_is_reported(pile: tuple[Path, SortResult], tmp_path: Path) -> None:
    """Common practice: texts from the caller (the workspace) spare a second read of table files."""
    docs, result = pile
    texts = {d.id: d.text for d in read_collection(docs).documents if "#" in d.id}
    calls: list[tuple[str, int, int | None]] = []
    import seedsort.export as export

    def no_reading(*args: object, **kwargs: object) -> None:
        raise AssertionError("read the table again although its texts were given")

    original = export.read_collection
    export.read_collection = no_reading  # type: ignore[assignment]
    try:
        plan = copy_into_category_folders(
            result, docs, tmp_path / "out", dry_run=False, texts=texts, on_progress=lambda *a: calls.append(a)
        )
    finally:
        export.read_collection = original
    assert calls[0] == ("copy", 0, len(plan.copies)) and calls[-1] == ("copy", len(plan.copies), len(plan.copies))


def test_safe_name_examples() -> None:
    """Windows naming rules (Microsoft, "Naming Files, Paths, and Namespaces", from memory) and POSIX
    '/' and '..': the result is one component, not hidden, not a device name, at most 200 bytes."""
    assert safe_name("../x") == "__" + "_x"
    assert safe_name("..") == "__" and safe_name("") == "_" and safe_name(" ") == "_"
    assert safe_name("a/b\\c:d") == "a_b_c_d"
    assert safe_name("CON") == "_CON" and safe_name("lpt1.txt") == "_lpt1.txt"
    long = safe_name("é" * 300 + ".txt")
    assert long.endswith(".txt") and len(long.encode("utf-8")) <= 200
    assert safe_name("Ελλάδα") == "Ελλάδα"


CATEGORY = st.text(st.characters(blacklist_categories=("Cs",)), max_size=40)
"""Category names come from UTF-8 text, which cannot hold a lone surrogate."""


@settings(max_examples=30, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(names=st.lists(CATEGORY, min_size=4, max_size=4, unique=True))
def test_any_category_names_stay_inside_destination(pile: tuple[Path, SortResult], names: list[str]) -> None:
    """Property (common practice): whatever the category names, every file lands inside the
    destination, each category gets its own folder (distinct ignoring case), and the copy works."""
    docs, result = pile
    renamed = dataclasses.replace(result, categories=tuple(names))
    with tempfile.TemporaryDirectory() as folder:
        dest = Path(folder) / "out"
        plan = copy_into_category_folders(renamed, docs, dest, dry_run=False)
        folders = [f for _, f in plan.folders]
        assert len({f.casefold() for f in folders}) == 4
        root = dest.resolve()
        for item in plan.copies:
            path = (dest / item.target).resolve()
            assert path.is_relative_to(root) and path.is_file()
            assert item.target.split("/")[0] == folders[names.index(item.category)]
        assert sorted(p.name for p in Path(folder).iterdir()) == ["out"]
        assert sum(1 for p in dest.rglob("*") if p.is_file()) == len(plan.copies)


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(data=st.data())
def test_no_overwrite_and_dry_run_write_nothing(pile: tuple[Path, SortResult], data: st.DataObject) -> None:
    """Property (common practice): with any existing files, files-in-place-of-folders or folders-
    in-place-of-files among the targets, a dry run writes nothing, lists exactly those, and the
    copy raises before writing anything."""
    docs, result = pile
    with tempfile.TemporaryDirectory() as folder:
        dest = Path(folder) / "out"
        targets = [c.target for c in copy_into_category_folders(result, docs, dest, dry_run=True).copies]
        chosen = data.draw(st.lists(st.sampled_from(targets), min_size=1, max_size=5, unique=True))
        kinds = st.sampled_from(["file", "folder", "parent"])
        how = data.draw(st.lists(kinds, min_size=len(chosen), max_size=len(chosen)))
        for target, kind in zip(chosen, how):
            path = dest / target
            if any(p.is_file() for p in path.parents) or path.exists():
                continue  # an earlier choice blocks this one already
            if kind == "parent" and not path.parent.exists():
                path.parent.parent.mkdir(parents=True, exist_ok=True)
                path.parent.write_text("a file where a folder goes", encoding="utf-8")
            else:
                path.parent.mkdir(parents=True, exist_ok=True)
                (path.mkdir() if kind == "folder" else path.write_text("existing", encoding="utf-8"))
        before = _snapshot(dest)
        plan = copy_into_category_folders(result, docs, dest, dry_run=True)
        assert _snapshot(dest) == before
        blocked = {c.target for c in plan.conflicts}
        assert set(chosen) <= blocked
        for target in blocked:
            parents = [dest.joinpath(*target.split("/")[:i]) for i in range(1, target.count("/") + 1)]
            assert os.path.lexists(dest / target) or any(p.is_file() for p in parents)
        with pytest.raises(InputError, match="exist already"):
            copy_into_category_folders(result, docs, dest, dry_run=False)
        assert _snapshot(dest) == before
