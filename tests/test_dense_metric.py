"""Dense vectors: the graph re-weighted in the seeds' whitened metric (seedsort.dense).

References: the pooled within-class covariance of scikit-learn's
``LinearDiscriminantAnalysis(solver="lsqr", store_covariance=True).covariance_`` (the
class-prior weighted sum of each class's biased covariance, i.e. the residuals' outer products
over s; seedsort divides by s - g instead, so the reference is rescaled by s / (s - g)), the
inverse matrix square root by ``scipy.linalg.sqrtm`` and ``numpy.linalg.inv``, cosine
similarity by ``sklearn.metrics.pairwise.cosine_similarity``, S = D^-1/2 W D^-1/2 (Zhou et
al. 2004) built densely by numpy, and k-fold cross-validation (common practice): a held-out
seed's row is the prediction of a model fitted without its fold.
"""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest
import scipy.linalg
import scipy.sparse as sp
from sklearn.discriminant_analysis import LinearDiscriminantAnalysis
from sklearn.metrics.pairwise import cosine_similarity

from seedsort.combine import CROSS_CHECK_TOLERANCE, ModelSettings, compute_views, cross_check, fold_of_each_seed
from seedsort.dense import (
    DENSE_AFFINITY_POWER,
    SEED_METRIC_SHRINKAGE,
    seed_metric_affinity,
    seed_spreading_graph,
    within_class_whitening,
)
from seedsort.graph import knn_cosine, symmetric_affinity
from seedsort.spreading import normalised_affinity


def _clusters(n_per: tuple[int, ...] = (5, 7, 4), d: int = 6, seed: int = 0) -> tuple[np.ndarray, np.ndarray]:
    """Unit rows around one centre per class, with unequal class sizes."""
    rng = np.random.default_rng(seed)
    centres = rng.normal(size=(len(n_per), d))
    classes = np.repeat(np.arange(len(n_per)), n_per)
    x = centres[classes] + 0.6 * rng.normal(size=(classes.size, d))
    return x / np.linalg.norm(x, axis=1, keepdims=True), classes


def _inverse_sqrt(m: np.ndarray) -> np.ndarray:
    return np.linalg.inv(np.real(scipy.linalg.sqrtm(m)))


@pytest.mark.parametrize("shrinkage", [0.1, 1.0, 10.0])
def test_whitening_is_the_inverse_root_of_the_shrunk_pooled_within_class_covariance(shrinkage: float) -> None:
    """Reference: sklearn LDA's covariance_ (rescaled by s / (s - g)), shrunk by shrinkage *
    trace / d, inverse square root by scipy.linalg.sqrtm and numpy.linalg.inv."""
    x, classes = _clusters()
    s, g, d = x.shape[0], 3, x.shape[1]
    lda = LinearDiscriminantAnalysis(solver="lsqr", store_covariance=True).fit(x, classes)
    within = lda.covariance_ * s / (s - g)
    expected = _inverse_sqrt(within + shrinkage * np.trace(within) / d * np.eye(d))
    ours = within_class_whitening(x, classes, shrinkage)
    np.testing.assert_allclose(ours, expected, atol=1e-8)
    np.testing.assert_allclose(ours, ours.T, atol=1e-12)


def test_whitening_is_the_identity_without_within_class_spread() -> None:
    """Reference: with one seed per category the pooled within-class covariance is zero (Fisher
    1936): nothing to learn a metric from, so the metric is the identity (plain cosine)."""
    x, _ = _clusters((1, 1, 1))
    np.testing.assert_array_equal(within_class_whitening(x, np.arange(3)), np.eye(x.shape[1]))
    with pytest.raises(ValueError):
        within_class_whitening(x, np.arange(3), 0.0)


@pytest.mark.parametrize("power", [1.0, DENSE_AFFINITY_POWER])
def test_affinity_is_the_sharpened_cosine_of_the_mapped_rows_on_the_stored_pattern(power: float) -> None:
    """Reference: sklearn cosine_similarity of the rows mapped by M, clipped at 0, ** power,
    kept where the kNN graph stores an entry (sklearn computes every pair)."""
    x, classes = _clusters((8, 8, 8), d=5)
    metric = within_class_whitening(x[::2], classes[::2], 1.0)
    pattern = symmetric_affinity(knn_cosine(x.astype(np.float32), 4), x.shape[0])
    ours = seed_metric_affinity(x, pattern, metric, power)
    reference = np.clip(cosine_similarity(x @ metric), 0.0, None) ** power
    stored = pattern.toarray() > 0
    assert ours.dtype == pattern.dtype
    np.testing.assert_array_equal(ours.toarray() != 0, stored & (reference > 0))
    np.testing.assert_allclose(ours.toarray(), np.where(stored, reference, 0.0), atol=1e-5)


def test_entries_are_computed_the_same_in_chunks(monkeypatch: pytest.MonkeyPatch) -> None:
    """Reference: the one-chunk result (sklearn-checked above); chunks only bound memory."""
    import seedsort.dense as dense

    x, classes = _clusters((8, 8, 8), d=5)
    metric = within_class_whitening(x, classes, 1.0)
    pattern = symmetric_affinity(knn_cosine(x.astype(np.float32), 4), x.shape[0])
    whole = seed_metric_affinity(x, pattern, metric)
    monkeypatch.setattr(dense, "_ENTRIES_AT_A_TIME", 7)
    np.testing.assert_array_equal(seed_metric_affinity(x, pattern, metric).toarray(), whole.toarray())


def test_spreading_graph_by_kind_of_vectors() -> None:
    """Reference: S = D^-1/2 W' D^-1/2 (Zhou et al. 2004) by numpy over W' from sklearn's
    cosine_similarity in the seeds' metric (shrunk pooled covariance from sklearn LDA as
    above); sparse vectors, no shrinkage or one category keep the given graph object."""
    x, classes = _clusters((8, 8, 8), d=5)
    seeds = np.array([0, 1, 2, 8, 9, 10, 16, 17, 18])
    plain = symmetric_affinity(knn_cosine(x.astype(np.float32), 4), x.shape[0])
    graph = normalised_affinity(plain)
    lda = LinearDiscriminantAnalysis(solver="lsqr", store_covariance=True).fit(x[seeds], classes[seeds])
    within = lda.covariance_ * 9 / 6
    metric = _inverse_sqrt(within + SEED_METRIC_SHRINKAGE * np.trace(within) / 5 * np.eye(5))
    cosines = np.clip(cosine_similarity(x @ metric), 0.0, None)
    w = np.where(plain.toarray() > 0, cosines**DENSE_AFFINITY_POWER, 0.0)
    degree = w.sum(axis=1)
    expected = w / np.sqrt(np.outer(degree, degree))
    ours = seed_spreading_graph(x, graph, seeds, classes[seeds])
    np.testing.assert_allclose(ours.toarray(), expected, atol=1e-5)
    assert seed_spreading_graph(sp.csr_matrix(x), graph, seeds, classes[seeds]) is graph
    assert seed_spreading_graph(x, graph, seeds, classes[seeds], shrinkage=None) is graph
    assert seed_spreading_graph(x, graph, seeds[:3], classes[seeds[:3]]) is graph


def test_dense_views_use_the_seed_metric_graph_and_the_cross_check_each_fold_its_own() -> None:
    """Reference: k-fold cross-validation (common practice): each held-out seed's row equals
    the views fitted on the other folds' seeds alone, the fold's graph from their metric (so a
    held-out label never shapes its own prediction); with shrinkage None the prepared graph."""
    x, classes = _clusters((10, 10, 10, 10), d=8, seed=1)
    graph = normalised_affinity(symmetric_affinity(knn_cosine(x.astype(np.float32), 5), x.shape[0]))
    seeds = np.concatenate([np.flatnonzero(classes == c)[:6] for c in range(4)])
    key = np.array([f"{r:03d}" for r in seeds], dtype=object)
    settings = ModelSettings(graph_weight=0.5)
    full = compute_views(x, graph, seeds, classes[seeds], 4, settings)
    metric_graph = seed_spreading_graph(x, graph, seeds, classes[seeds])
    off = dataclasses.replace(settings, seed_metric_shrinkage=None)
    on_metric = compute_views(x, metric_graph, seeds, classes[seeds], 4, off)
    np.testing.assert_allclose(full.blend(0.5), on_metric.blend(0.5), atol=1e-12)
    plain = compute_views(x, graph, seeds, classes[seeds], 4, off)
    assert np.abs(plain.blend(0.5) - full.blend(0.5)).max() > 1e-6  # the metric changes something here

    held = cross_check(x, graph, seeds, classes[seeds], 4, settings, key, folds=3)
    folds = fold_of_each_seed(classes[seeds], key, 3)
    fold_settings = dataclasses.replace(settings, tol=CROSS_CHECK_TOLERANCE)
    leaked = []
    for f in range(3):
        train = folds != f
        alone = compute_views(x, graph, seeds[train], classes[seeds][train], 4, fold_settings)
        np.testing.assert_allclose(held.blend(0.5)[~train], alone.blend(0.5)[seeds[~train]], atol=1e-6)
        # What a fold would give on the graph weighted by every seed's metric (held-out ones too).
        on_all = compute_views(
            x, metric_graph, seeds[train], classes[seeds][train], 4, dataclasses.replace(fold_settings, seed_metric_shrinkage=None)
        )
        leaked.append(np.abs(on_all.blend(0.5)[seeds[~train]] - held.blend(0.5)[~train]).max())
    assert max(leaked) > 1e-4
