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

    def broken(self):
        yield from ()
        raise RuntimeError("disk full")

    monkeypatch.setattr(SortResult, "records", broken)
    with pytest.raises(RuntimeError, match="disk full"):
        write_results(result, path)
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
