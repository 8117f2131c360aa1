"""Results files: CSV and JSON Lines written by ``write_results``, read back by pandas and json.

References: ``pandas.read_csv`` and the ``json`` module (JSON Lines: one JSON object per line,
https://jsonlines.org), and POSIX ``rename`` atomicity (``os.replace``) for the write.
"""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from seedsort import InputError, SortResult, sort_documents, write_results
from seedsort.results import CSV_COLUMNS
from seedsort.seeds import resolve_seeds
from seedsort.sorting import SortSettings

from conftest import topic_documents

EXTRA = ("", "Καλημέρα σας ευχαριστώ πολύ")  # an empty note and one no seed reaches


@pytest.fixture(scope="module")
def result() -> SortResult:
    docs, truth = topic_documents(extra=EXTRA)
    pairs = [(docs[i].id, truth[i]) for i in (0, 1, 10, 11, 20, 21, 30, 31)]
    return sort_documents(docs, resolve_seeds(docs, pairs), SortSettings(cross_check_folds=2))


def test_csv_round_trips_with_pandas(result: SortResult, tmp_path: Path) -> None:
    """Reference: pandas.read_csv reads back every column, one row per document."""
    path = write_results(result, tmp_path / "out.csv")
    table = pd.read_csv(path, keep_default_na=False, na_values=[""])
    assert list(table.columns) == CSV_COLUMNS
    assert table["document"].tolist() == list(result.ids)
    assert table["is_seed"].tolist() == [s == "seed" for s in result.status]
    assert table["is_seed"].sum() == 8
    rows = table.set_index("document")
    assert rows.loc["extra-0.txt", "status"] == "empty"
    assert rows.loc["extra-1.txt", "status"] == "unreached"
    for doc_id in ("extra-0.txt", "extra-1.txt"):
        assert pd.isna(rows.loc[doc_id, "category"]) and pd.isna(rows.loc[doc_id, "confidence"])
    assigned = table[table["status"] == "assigned"]
    assert assigned["category"].notna().all()
    assert ((assigned["confidence"] > 0) & (assigned["confidence"] <= 1)).all()
    np.testing.assert_allclose(assigned["confidence"], result.confidence[result.status == "assigned"], atol=1e-4)
    assert table.equals(pd.read_csv(path, keep_default_na=False, na_values=[""]))  # deterministic text


def test_jsonl_round_trips_with_json(result: SortResult, tmp_path: Path) -> None:
    """Reference: JSON Lines (jsonlines.org): each line is one JSON object; read with json.loads."""
    path = write_results(result, tmp_path / "out.jsonl")
    lines = path.read_text(encoding="utf-8").splitlines()
    records = [json.loads(line) for line in lines]
    assert len(records) == len(result)
    assert [r["document"] for r in records] == list(result.ids)
    by_id = {r["document"]: r for r in records}
    assert by_id["extra-0.txt"]["category"] is None and by_id["extra-0.txt"]["status"] == "empty"
    assert by_id["extra-1.txt"]["category"] is None and by_id["extra-1.txt"]["status"] == "unreached"
    seeds = [r for r in records if r["is_seed"]]
    assert len(seeds) == 8 and all(r["status"] == "seed" and r["category"] for r in seeds)
    for record in records:
        assert set(record["probabilities"]) == set(result.categories)
        assert sum(record["probabilities"].values()) == pytest.approx(1.0, abs=5e-4)  # rounded to 4 places
        assert len(record["nearest_seeds"]) <= 3


def test_format_from_option_or_extension(result: SortResult, tmp_path: Path) -> None:
    """Common practice: the extension picks the format; an explicit format overrides it."""
    ndjson = write_results(result, tmp_path / "out.ndjson")
    assert json.loads(ndjson.read_text(encoding="utf-8").splitlines()[0])["document"] == result.ids[0]
    forced = write_results(result, tmp_path / "out.txt", fmt="csv")
    assert pd.read_csv(forced).shape == (len(result), len(CSV_COLUMNS))
    with pytest.raises(InputError, match="end the name in .csv or .jsonl"):
        write_results(result, tmp_path / "out.xlsx")
    with pytest.raises(InputError, match="Unknown results format"):
        write_results(result, tmp_path / "out.csv", fmt="xlsx")
    with pytest.raises(InputError, match="does not exist"):
        write_results(result, tmp_path / "missing" / "out.csv")
    assert not (tmp_path / "out.xlsx").exists()


def test_atomic_write_leaves_no_temporary_file(result: SortResult, tmp_path: Path, monkeypatch) -> None:
    """Reference: os.replace (POSIX rename) is atomic; success leaves only the file, a failure
    leaves the previous file untouched and no temporary file behind."""
    path = write_results(result, tmp_path / "out.csv")
    assert sorted(p.name for p in tmp_path.iterdir()) == ["out.csv"]
    before = path.read_bytes()

    def broken_rows(self):
        yield from ()
        raise RuntimeError("disk full")

    def broken_table(self):
        raise RuntimeError("disk full")

    # The CSV is built from to_frame(), the JSON Lines from records(): fail each mid-write.
    monkeypatch.setattr(SortResult, "to_frame", broken_table)
    monkeypatch.setattr(SortResult, "records", broken_rows)
    for fmt in ("csv", "jsonl"):
        with pytest.raises(RuntimeError, match="disk full"):
            write_results(result, path, fmt=fmt)
        assert sorted(p.name for p in tmp_path.iterdir()) == ["out.csv"]
        assert path.read_bytes() == before


def test_summary_and_doubtful_order(result: SortResult) -> None:
    """Definitions in SortResult docstrings, checked by arithmetic on the result's own arrays."""
    summary = {s.category: s for s in result.summary()}
    assert sum(s.documents for s in summary.values()) == int((result.assigned >= 0).sum())
    assert all(s.seeds == 2 for s in summary.values())
    doubtful = result.doubtful()
    assert all(result.status[r] == "assigned" for r in doubtful)
    assert np.all(np.diff(result.confidence[doubtful]) >= 0)


def test_csv_and_jsonl_hold_the_same_values(result: SortResult, tmp_path: Path) -> None:
    """Reference: each file read back by its standard reader (pandas.read_csv, json.loads);
    both are built column-wise, so every CSV cell must equal the JSON Lines field it
    flattens, and numbers must be Python's round(value, 4) of the result's own arrays."""
    table = pd.read_csv(write_results(result, tmp_path / "out.csv"), keep_default_na=False, na_values=[""])
    lines = write_results(result, tmp_path / "out.jsonl").read_text(encoding="utf-8").splitlines()
    records = [json.loads(line) for line in lines]
    for i, (record, (_, row)) in enumerate(zip(records, table.iterrows())):
        for key in CSV_COLUMNS:
            if key.startswith("nearest_seed_"):
                continue
            cell = row[key]
            assert (record[key] is None and pd.isna(cell)) or record[key] == cell, (i, key)
        for j, seed in enumerate(record["nearest_seeds"], start=1):
            assert row[f"nearest_seed_{j}"] == seed["document"]
            assert row[f"nearest_seed_{j}_category"] == seed["category"]
            assert row[f"nearest_seed_{j}_similarity"] == seed["similarity"]
        for j in range(len(record["nearest_seeds"]) + 1, 4):
            assert pd.isna(row[f"nearest_seed_{j}"]) and pd.isna(row[f"nearest_seed_{j}_similarity"])
        if not np.isnan(result.confidence[i]):
            assert record["confidence"] == round(float(result.confidence[i]), 4)
        expected = {name: round(float(p), 4) for name, p in zip(result.categories, result.probabilities[i])}
        assert record["probabilities"] == expected


def test_rounding_matches_python_round_at_half_way_values() -> None:
    """Reference: Python's built-in round(x, 4), which rounds the exact binary value;
    scaling by 10^4 first (numpy.round) sends some half-way values the other way."""
    from seedsort.results import _round4

    values = np.array([0.01625, 0.00005, 0.12345, 0.5, 1.0, 0.99995, 0.2500500001, np.nan, 0.0], dtype=np.float64)
    values = np.concatenate([values, np.random.default_rng(0).integers(0, 10**6, 5000) / 10**5 + 5e-5])
    expected = [round(v, 4) for v in values.tolist()]
    got = _round4(values).tolist()
    assert all((np.isnan(a) and np.isnan(b)) or a == b for a, b in zip(got, expected))
    assert any(round(v, 4) != n for v, n in zip(values.tolist(), np.round(values, 4).tolist()) if not np.isnan(v))
