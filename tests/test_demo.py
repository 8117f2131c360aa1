"""The invented demo corpus (corpora_demo/): seedsort against its hand-written answer key.

Reference: corpora_demo/answer_key.csv, written with the corpus by corpora_demo/make_corpus.py
and checked independently of seedsort by corpora_demo/check_baseline.py. This is the only
accuracy claim on invented data in the test suite (measured: 0.946).
"""

from __future__ import annotations

import csv
from pathlib import Path

import pytest

from seedsort import SortResult, sort_folder

DEMO = Path(__file__).resolve().parents[1] / "corpora_demo"


@pytest.fixture(scope="module")
def demo() -> SortResult:
    return sort_folder(DEMO / "documents", seeds_file=DEMO / "seeds.csv")


@pytest.fixture(scope="module")
def answer_key() -> dict[str, str]:
    with (DEMO / "answer_key.csv").open(encoding="utf-8", newline="") as handle:
        return {row["document"]: row["category"] for row in csv.DictReader(handle)}


def test_demo_accuracy_on_the_answer_key(demo: SortResult, answer_key: dict[str, str]) -> None:
    """Reference: corpora_demo/answer_key.csv; accuracy over its documents must be >= 0.85."""
    row = {doc_id: i for i, doc_id in enumerate(demo.ids)}
    missing = sorted(set(answer_key) - set(row))
    assert not missing, f"answer-key ids absent from the results: {missing[:5]}"
    right = sum(demo.category_name(int(demo.assigned[row[d]])) == c for d, c in answer_key.items())
    accuracy = right / len(answer_key)
    assert accuracy >= 0.85, f"demo accuracy {accuracy:.3f} on {len(answer_key)} documents"


def test_demo_empty_notes_are_reported_empty(demo: SortResult) -> None:
    """Reference: the corpus README / make_corpus.py plant two blank notes; they are status 'empty'."""
    empty = sorted(doc_id for doc_id, status in zip(demo.ids, demo.status) if status == "empty")
    assert empty == ["notes/desk-2026-02-14-blank.txt", "notes/survey-4999.md"]


def test_demo_seeds_are_all_used(demo: SortResult) -> None:
    """Reference: corpora_demo/seeds.csv, 5 seeds for each of the 7 categories (corpus README)."""
    with (DEMO / "seeds.csv").open(encoding="utf-8", newline="") as handle:
        seeds = {row["document"]: row["category"] for row in csv.DictReader(handle)}
    got = {d: demo.category_name(int(a)) for d, a, s in zip(demo.ids, demo.assigned, demo.status) if s == "seed"}
    assert got == seeds and len(set(seeds.values())) == 7
