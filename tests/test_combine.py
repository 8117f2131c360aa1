"""The graph + seed-classifier blend.

References: ``sklearn.linear_model.LogisticRegression`` fitted on *all* feature columns (the
module fits on the seeds' columns only and claims the same model), the blend formula
P ∝ P_graph^w P_classifier^(1 - w) from the module docstring checked by arithmetic, and
stratified k-fold assignment as in ``sklearn.model_selection.StratifiedKFold`` (every fold
gets each category's members in turn, so fold sizes within a category differ by at most 1).
"""

from __future__ import annotations

import numpy as np
import pytest
import scipy.sparse as sp
from sklearn.linear_model import LogisticRegression

from seedsort.combine import (
    ModelSettings,
    classifier_probabilities,
    cross_check,
    fold_of_each_seed,
    predict,
)
from seedsort.graph import knn_cosine, symmetric_affinity
from seedsort.spreading import normalised_affinity, seed_matrix, spread_labels, to_probabilities
from seedsort.vectors import vectorise

from conftest import TOPICS

SEED_ROWS = np.array([0, 1, 2, 10, 11, 12, 20, 21, 22, 30, 31, 32])
SEED_CLASSES = np.repeat(np.arange(4), 3)


@pytest.fixture(scope="module")
def model_inputs() -> tuple[sp.csr_matrix, sp.csr_matrix]:
    texts = [s for group in TOPICS.values() for s in group] + [""]
    vectors = vectorise(texts)
    graph = normalised_affinity(symmetric_affinity(knn_cosine(vectors, 6), len(texts)))
    return vectors, graph


def test_classifier_on_seed_columns_equals_sklearn_on_all_columns(model_inputs) -> None:
    """Reference: sklearn LogisticRegression(C=10, max_iter=2000) fitted on the full feature matrix."""
    vectors, _ = model_inputs
    ours = classifier_probabilities(vectors, SEED_ROWS, SEED_CLASSES, 4, 10.0)
    ref = LogisticRegression(C=10.0, max_iter=2000, tol=1e-10).fit(vectors[SEED_ROWS], SEED_CLASSES)
    np.testing.assert_allclose(ours, ref.predict_proba(vectors), atol=2e-3)
    np.testing.assert_array_equal(ours.argmax(axis=1), ref.predict(vectors))


def test_unequal_seed_counts_are_weighted_as_sklearn_balanced(model_inputs) -> None:
    """Reference: sklearn LogisticRegression(class_weight="balanced"), whose weights are
    n_seeds / (n_classes * seeds_of_the_class), on seeds of unequal counts (6, 3, 3, 1)."""
    vectors, _ = model_inputs
    rows = np.array([0, 1, 2, 3, 4, 5, 10, 11, 12, 20, 21, 22, 30])
    classes = np.array([0] * 6 + [1] * 3 + [2] * 3 + [3])
    ours = classifier_probabilities(vectors, rows, classes, 4, 10.0)
    ref = LogisticRegression(C=10.0, max_iter=2000, tol=1e-10, class_weight="balanced").fit(vectors[rows], classes)
    np.testing.assert_allclose(ours, ref.predict_proba(vectors), atol=2e-3)


def test_balanced_seed_matrix_changes_nothing_when_counts_are_equal(model_inputs) -> None:
    """Spreading is linear in Y (Zhou et al. 2004, F* = (1-alpha)(I - alpha S)^-1 Y): scaling
    every column by the same 1/3 scales the scores, not the probabilities."""
    _, graph = model_inputs
    n = graph.shape[0]
    plain = spread_labels(graph, seed_matrix(SEED_ROWS, SEED_CLASSES, n, 4), alpha=0.99).scores
    balanced = spread_labels(graph, seed_matrix(SEED_ROWS, SEED_CLASSES, n, 4, balanced=True), alpha=0.99).scores
    np.testing.assert_allclose(balanced, plain / 3, rtol=1e-5, atol=1e-9)
    # up to the solver tolerance (tol=1e-6 relative residual)
    np.testing.assert_allclose(to_probabilities(balanced)[0], to_probabilities(plain)[0], atol=1e-5)


def test_categories_without_seeds_get_zero_probability(model_inputs) -> None:
    """Common practice: a classifier cannot predict a class it never saw; one seen class takes all."""
    vectors, _ = model_inputs
    two = classifier_probabilities(vectors, SEED_ROWS[:6], SEED_CLASSES[:6], 4, 10.0)
    assert np.all(two[:, 2:] == 0) and np.allclose(two.sum(axis=1), 1)
    one = classifier_probabilities(vectors, SEED_ROWS[:3], SEED_CLASSES[:3], 4, 10.0)
    assert np.all(one[:, 0] == 1) and np.all(one[:, 1:] == 0)


@pytest.mark.parametrize("weight", [0.0, 0.3, 1.0])
def test_blend_is_the_weighted_geometric_mean_of_the_two_views(model_inputs, weight: float) -> None:
    """Reference: the log-linear blend P ∝ P_graph^w * P_classifier^(1 - w) (module docstring),
    computed here by plain numpy arithmetic; where the graph has no mass (the empty document)
    the classifier alone is used."""
    vectors, graph = model_inputs
    settings = ModelSettings(graph_weight=weight)
    pred = predict(vectors, graph, SEED_ROWS, SEED_CLASSES, 4, settings)
    y = seed_matrix(SEED_ROWS, SEED_CLASSES, vectors.shape[0], 4, balanced=True)
    graph_probs, mass = to_probabilities(spread_labels(graph, y, alpha=settings.alpha).scores)
    clf = classifier_probabilities(vectors, SEED_ROWS, SEED_CLASSES, 4, settings.classifier_strength)
    reached = mass > 0
    assert not reached[-1] and reached[:-1].all()
    geometric = np.clip(graph_probs, 1e-12, 1) ** weight * np.clip(clf, 1e-12, 1) ** (1 - weight)
    geometric /= geometric.sum(axis=1, keepdims=True)
    expected = np.where(reached[:, None], geometric, clf)
    # The classifier's probabilities are float32 (float32 vectors); the blend renormalises rows.
    np.testing.assert_allclose(pred.probabilities, expected, atol=1e-6)
    np.testing.assert_allclose(pred.graph_mass, mass, atol=1e-9)
    np.testing.assert_allclose(pred.probabilities.sum(axis=1), 1.0)


def test_blend_recovers_the_topics(model_inputs) -> None:
    """Sanity on the invented corpus (not an accuracy claim): seeds keep their own category."""
    vectors, graph = model_inputs
    pred = predict(vectors, graph, SEED_ROWS, SEED_CLASSES, 4, ModelSettings())
    np.testing.assert_array_equal(pred.probabilities[SEED_ROWS].argmax(axis=1), SEED_CLASSES)


def test_folds_are_stratified_and_follow_the_order_key() -> None:
    """Reference: sklearn StratifiedKFold's guarantee: per category, fold sizes differ by at most 1."""
    classes = np.array([0] * 7 + [1] * 3 + [2])
    key = np.array([f"h{i:02d}" for i in range(11)], dtype=object)[::-1]
    folds = fold_of_each_seed(classes, key, 3)
    for c in range(3):
        sizes = np.bincount(folds[classes == c], minlength=3)
        assert sizes.max() - sizes.min() <= 1
    # Sorting by the key, not by position: reversing the seeds' order leaves each seed's fold alone.
    perm = np.arange(11)[::-1]
    np.testing.assert_array_equal(fold_of_each_seed(classes[perm], key[perm], 3), folds[perm])


def test_cross_check_predicts_each_seed_without_it(model_inputs) -> None:
    """Reference: k-fold cross-validation (common practice): a held-out seed's row equals the
    prediction of a model fitted on the other folds only; a lone seed of its category is NaN."""
    vectors, graph = model_inputs
    rows = np.append(SEED_ROWS, 39)
    classes = np.append(SEED_CLASSES, 4)  # category 4 has one seed: nothing to learn it from
    key = np.array([f"{r:03d}" for r in rows], dtype=object)
    settings = ModelSettings(graph_weight=0.5)
    held = cross_check(vectors, graph, rows, classes, 5, settings, key, folds=3)
    folds = fold_of_each_seed(classes, key, 3)
    for f in range(3):
        train = folds != f
        pred = predict(vectors, graph, rows[train], classes[train], 5, settings)
        for i in np.flatnonzero(~train):
            if classes[i] == 4:
                assert np.isnan(held.graph[i]).all() and np.isnan(held.classifier[i]).all()
            else:
                blended = held.blend(0.5)[i]
                np.testing.assert_allclose(blended, pred.probabilities[rows[i]], atol=1e-9)
