"""Out-of-scope scores and threshold.

References: ``scipy.stats.rankdata`` (average ranks) for the percentile arithmetic,
``sklearn.metrics.roc_auc_score`` for how well the score separates unseeded intents of the
BANKING77 open dataset (Casanueva et al. 2020, CC BY 4.0) from seeded ones.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from scipy.stats import rankdata
from sklearn.metrics import roc_auc_score

from seedsort import Document, SortSettings, resolve_seeds, sort_documents
from seedsort.scope import out_of_scope_scores, scope_components, scope_threshold
from seedsort.sorting import prepare

DATA = Path(__file__).parent / "data" / "banking77"


def test_scores_are_mean_percentile_ranks() -> None:
    rng = np.random.default_rng(1)
    components = rng.normal(size=(200, 2)).round(1)  # rounding makes ties
    ours = out_of_scope_scores(components, components)
    # Reference: scipy's average ranks, as a share of the rows, midpoint convention.
    expected = np.mean([(rankdata(components[:, j]) - 0.5) / 200 for j in range(2)], axis=0)
    np.testing.assert_allclose(ours, expected, atol=1e-12)
    assert ours.min() > 0 and ours.max() < 1


def test_isolated_document_is_most_out_of_scope() -> None:
    probs = np.array([[0.9, 0.1], [0.6, 0.4], [0.5, 0.5]])
    mass = np.array([1.0, 0.5, 0.0])
    degree = np.array([4.0, 1.0, 0.0])
    components = scope_components(probs, mass, degree)
    scores = out_of_scope_scores(components, components)
    assert scores.argmax() == 2 and scores.argmin() == 0


def test_threshold_needs_enough_held_out_seeds() -> None:
    assert scope_threshold(np.array([0.1, 0.2, np.nan]), 0.95) is None
    values = np.linspace(0, 1, 101)
    assert scope_threshold(values, 0.95) == pytest.approx(0.95)  # numpy's linear quantile


@pytest.fixture(scope="module")
def hidden_intents() -> dict[str, object]:
    """30 intents of BANKING77: 25 seeded with 10 train.csv texts each, 5 with no seed at all.

    Pool: every train and test text of the 30 intents; scored on their test texts.
    """
    train = pd.read_csv(DATA / "train.csv", keep_default_na=False)
    test = pd.read_csv(DATA / "test.csv", keep_default_na=False)
    intents = sorted(train["category"].unique())[:30]
    hidden = set(intents[-5:])
    train = train[train["category"].isin(intents)].reset_index(drop=True)
    test = test[test["category"].isin(intents)].reset_index(drop=True)
    docs = [Document.make(f"train#{i}", "train.csv", t) for i, t in enumerate(train["text"])]
    docs += [Document.make(f"test#{i}", "test.csv", t) for i, t in enumerate(test["text"])]
    rng = np.random.default_rng(0)
    labels = train["category"].to_numpy()
    rows = np.concatenate([rng.choice(np.flatnonzero(labels == c), 10, replace=False) for c in intents if c not in hidden])
    seeds = resolve_seeds(docs, [(docs[r].id, labels[r]) for r in rows])
    prepared = prepare(docs)
    with_threshold = sort_documents(docs, seeds, prepared=prepared)
    without = sort_documents(docs, seeds, SortSettings(out_of_scope_quantile=None), prepared=prepared)
    test_rows = np.arange(len(train), len(docs))
    return {
        "with": with_threshold, "without": without, "test_rows": test_rows,
        "truth": test["category"].to_numpy(), "out": test["category"].isin(hidden).to_numpy(),
    }  # fmt: skip


def test_out_of_scope_score_separates_unseeded_intents(hidden_intents) -> None:
    result, rows, out = hidden_intents["with"], hidden_intents["test_rows"], hidden_intents["out"]
    auroc = roc_auc_score(out, result.out_of_scope[rows])
    # Measured 0.945 on this subset; the accuracy issue's target on all 77 intents is 0.85.
    assert auroc >= 0.85, auroc


def test_threshold_costs_little_in_scope_accuracy(hidden_intents) -> None:
    rows, truth, out = hidden_intents["test_rows"], hidden_intents["truth"], hidden_intents["out"]

    def in_scope_accuracy(result) -> float:
        predicted = np.array([result.category_name(int(a)) or "" for a in result.assigned[rows]])
        return float(np.mean(predicted[~out] == truth[~out]))  # unassigned counts as wrong

    with_t, without = in_scope_accuracy(hidden_intents["with"]), in_scope_accuracy(hidden_intents["without"])
    assert with_t >= without - 0.02, (with_t, without)
    flagged = hidden_intents["with"].status[rows] == "out_of_scope"
    assert flagged[out].mean() > flagged[~out].mean()  # it flags unseeded intents more often
    assert (hidden_intents["without"].status == "out_of_scope").sum() == 0
