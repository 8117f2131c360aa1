"""Accuracy on an open dataset: BANKING77 (Casanueva et al. 2020, CC BY 4.0; see data/banking77/SOURCE.md).

Setting: the pool is every text of train.csv and test.csv (13,083 documents); the seeds are
10 per intent drawn from train.csv with ``numpy.random.default_rng(0)``; accuracy is measured
on test.csv. Baseline: ``sklearn.linear_model.LogisticRegression(C=10, max_iter=2000)`` fitted on
the same seeds, on the same vectors (``seedsort.vectors.vectorise`` over the same pool), i.e.
the few-shot classifier the paper's 10-examples-per-intent setting asks for. seedsort's graph
+ classifier blend must do at least as well (measured: ~0.765 vs ~0.745).
"""

from __future__ import annotations

import warnings
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from sklearn.exceptions import ConvergenceWarning
from sklearn.linear_model import LogisticRegression

from seedsort import Document, SortResult, SortSettings, resolve_seeds, sort_documents
from seedsort.vectors import vectorise

DATA = Path(__file__).parent / "data" / "banking77"
SEEDS_PER_INTENT = 10

pytestmark = pytest.mark.slow


@pytest.fixture(scope="module")
def banking77() -> dict[str, object]:
    train = pd.read_csv(DATA / "train.csv", keep_default_na=False)
    test = pd.read_csv(DATA / "test.csv", keep_default_na=False)
    docs = [Document.make(f"train.csv#row-{i}", "train.csv", t) for i, t in enumerate(train["text"])]
    docs += [Document.make(f"test.csv#row-{i}", "test.csv", t) for i, t in enumerate(test["text"])]
    rng = np.random.default_rng(0)
    seed_rows = np.concatenate([
        rng.choice(np.flatnonzero(train["category"].to_numpy() == c), SEEDS_PER_INTENT, replace=False)
        for c in sorted(train["category"].unique())
    ])  # fmt: skip
    pairs = [(docs[int(r)].id, train["category"][int(r)]) for r in seed_rows]
    return {
        "docs": docs,
        "pairs": pairs,
        "seed_rows": seed_rows,
        "seed_labels": train["category"].to_numpy()[seed_rows],
        "test_rows": np.arange(len(train), len(docs)),
        "test_labels": test["category"].to_numpy(),
    }


@pytest.fixture(scope="module")
def seedsort_result(banking77) -> SortResult:
    docs = banking77["docs"]
    seeds = resolve_seeds(docs, banking77["pairs"])
    return sort_documents(docs, seeds, SortSettings())  # the default run: tuned, calibrated, out-of-scope on


def test_seed_sample_is_ten_per_intent(banking77) -> None:
    """Reference: the dataset card (SOURCE.md): 77 intents, train 10,003 rows, test 3,080 rows."""
    assert len(banking77["docs"]) == 10_003 + 3_080
    labels, counts = np.unique(banking77["seed_labels"], return_counts=True)
    assert labels.size == 77 and np.all(counts == SEEDS_PER_INTENT)


def test_seedsort_at_least_matches_logistic_regression_on_the_seeds(banking77, seedsort_result) -> None:
    """Reference: sklearn LogisticRegression(C=10, max_iter=2000) on the same seeds and vectors,
    scored on BANKING77 test.csv (Casanueva et al. 2020, 10 examples per intent)."""
    docs, test_rows, truth = banking77["docs"], banking77["test_rows"], banking77["test_labels"]
    assigned = seedsort_result.assigned[test_rows]
    predicted = np.array([seedsort_result.category_name(int(a)) or "" for a in assigned])
    ours = float(np.mean(predicted == truth))  # an unassigned document (unreached, out of scope) counts as wrong

    vectors = vectorise([doc.text for doc in docs])
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ConvergenceWarning)  # the baseline as configured, warts and all
        baseline = LogisticRegression(C=10, max_iter=2000).fit(vectors[banking77["seed_rows"]], banking77["seed_labels"])
    theirs = float(np.mean(baseline.predict(vectors[test_rows]) == truth))

    message = f"BANKING77 test accuracy, 10 seeds/intent: seedsort {ours:.4f}, logistic regression {theirs:.4f}"
    assert ours >= theirs, message
    assert ours >= 0.70, message  # guards against both collapsing together (measured ~0.765)
    print(message)


def test_confidence_is_calibrated(banking77, seedsort_result) -> None:
    """Expected calibration error (15 equal-width bins, Naeini et al. 2015; the accuracy
    issue's target is <= 0.05 at 10 seeds per intent) on BANKING77 test.csv, computed with
    seedsort.evaluation (checked against sklearn.calibration.calibration_curve in
    test_evaluation.py). The confidences were fitted on held-out seeds only, never on test labels."""
    from seedsort.evaluation import expected_calibration_error

    rows, truth = banking77["test_rows"], banking77["test_labels"]
    probs = seedsort_result.probabilities[rows]
    predicted = np.array(seedsort_result.categories)[probs.argmax(axis=1)]
    ece = expected_calibration_error(probs.max(axis=1), predicted == truth)
    print(f"ECE {ece:.4f}")
    assert ece <= 0.05, ece
