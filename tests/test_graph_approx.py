"""The approximate cosine kNN graph against exact references.

References: scikit-learn's brute-force ``NearestNeighbors(metric="cosine", algorithm="brute")``
(recall of the neighbour lists, and the similarities themselves as 1 - cosine distance),
seedsort's exact graph (itself checked against the same reference in test_graph.py), and
the open dataset BANKING77 (Casanueva et al. 2020, CC BY 4.0; tests/data/banking77).
"""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
import scipy.sparse as sp
from sklearn.metrics.pairwise import cosine_similarity
from sklearn.neighbors import NearestNeighbors

from seedsort import SortSettings, graph_approx, resolve_seeds, sort_documents
from seedsort.errors import InputError
from seedsort.graph import knn_cosine
from seedsort.graph_approx import (
    AUTO_APPROXIMATE_ABOVE,
    knn_cosine_approximate,
    rerank,
    resolve_graph,
    sketch,
)
from seedsort.sorting import prepare
from seedsort.vectors import vectorise

from conftest import topic_documents

DATA = Path(__file__).parent / "data" / "banking77"
K = 10


@pytest.fixture(scope="module")
def banking77_sample() -> sp.csr_matrix:
    """3,000 BANKING77 training texts drawn with numpy default_rng(0), as seedsort vectors."""
    texts = pd.read_csv(DATA / "train.csv", keep_default_na=False)["text"].to_numpy()
    rows = np.sort(np.random.default_rng(0).choice(texts.size, 3000, replace=False))
    return vectorise(list(texts[rows]))


def _tie_aware_recall(indices: np.ndarray, sims: np.ndarray, ref_sims: np.ndarray) -> float:
    """Share of the reference k neighbours found; a neighbour as similar as the k-th counts.

    Counting by similarity rather than by index is common practice for neighbour recall
    when duplicates tie (BANKING77 has repeated texts).
    """
    kth = ref_sims.min(axis=1)
    found = ((indices >= 0) & (sims >= kth[:, None] - 1e-5)).sum(axis=1)
    return float(np.minimum(found, ref_sims.shape[1]).sum() / ref_sims.size)


def test_recall_against_sklearn_brute_on_banking77(banking77_sample: sp.csr_matrix) -> None:
    """Reference: sklearn NearestNeighbors(metric="cosine", algorithm="brute") on BANKING77 texts."""
    ours = knn_cosine_approximate(banking77_sample, K)
    _, ref_distance = NearestNeighbors(n_neighbors=K, metric="cosine", algorithm="brute").fit(banking77_sample).kneighbors()
    recall = _tie_aware_recall(ours.indices, ours.similarities, 1.0 - ref_distance)
    assert recall >= 0.90  # the target of issue 6; measured 1.000 on this sample (3,000 texts)
    assert np.all(ours.indices != np.arange(banking77_sample.shape[0])[:, None])  # self excluded, as kneighbors()


def test_sketch_estimates_cosines_within_the_hashing_variance(banking77_sample: sp.csr_matrix) -> None:
    """Reference: sklearn.metrics.pairwise.cosine_similarity, and the variance of a signed
    feature-hashing inner product of unit vectors, at most (1 + cos^2) / dims <= 2 / dims
    (Weinberger et al. 2009, "Feature hashing for large scale multitask learning"; the
    bound is quoted from memory). Measured on these 500 texts: RMS error 0.044 against
    sqrt(2 / 512) = 0.0625, mean error 0.003."""
    x = banking77_sample[:500]
    z = sketch(x, 512)
    upper = np.triu_indices(500, 1)
    error = (z @ z.T)[upper] - cosine_similarity(x)[upper]
    assert np.sqrt(np.mean(error**2)) <= np.sqrt(2 / 512)
    assert abs(error.mean()) <= 0.01  # no bias beyond the normalisation's
    np.testing.assert_allclose(np.linalg.norm(z, axis=1), 1.0, rtol=1e-5)


def test_sketch_does_not_depend_on_the_chunking(
    banking77_sample: sp.csr_matrix, monkeypatch: pytest.MonkeyPatch
) -> None:
    """Invariant: rows are sketched independently, so chunks of any size give the same bits."""
    whole = sketch(banking77_sample, 256)
    monkeypatch.setattr(graph_approx, "SKETCH_CHUNK", 7)
    np.testing.assert_array_equal(sketch(banking77_sample, 256), whole)


def test_listed_similarities_are_exact_cosines(banking77_sample: sp.csr_matrix) -> None:
    """Reference: sklearn.metrics.pairwise.cosine_similarity of each listed pair."""
    ours = knn_cosine_approximate(banking77_sample[:500], K)
    full = cosine_similarity(banking77_sample[:500])
    rows, cols = np.nonzero(ours.indices >= 0)
    np.testing.assert_allclose(ours.similarities[rows, cols], full[rows, ours.indices[rows, cols]], atol=1e-5)
    assert np.all(np.diff(ours.similarities, axis=1) <= 0)  # descending, as the exact graph


def test_same_input_gives_the_same_graph(banking77_sample: sp.csr_matrix) -> None:
    """Determinism (seeded sketch, single-threaded index build, re-ranking blocks that each
    depend on their own rows only): a rebuild is identical."""
    first = knn_cosine_approximate(banking77_sample, K)
    second = knn_cosine_approximate(banking77_sample.copy(), K)
    np.testing.assert_array_equal(first.indices, second.indices)
    np.testing.assert_array_equal(first.similarities, second.similarities)


def test_index_built_and_searched_a_chunk_at_a_time_keeps_recall(
    banking77_sample: sp.csr_matrix, monkeypatch: pytest.MonkeyPatch
) -> None:
    """Large collections are sketched, added and searched in chunks (the quantiser's range
    from the first chunk). Reference: sklearn NearestNeighbors(metric="cosine",
    algorithm="brute"); the recall target of issue 6 holds with 6 chunks of 500 rows, and a
    rebuild is identical."""
    monkeypatch.setattr(graph_approx, "SKETCH_CHUNK", 500)
    ours = knn_cosine_approximate(banking77_sample, K)
    again = knn_cosine_approximate(banking77_sample, K)
    _, ref_distance = NearestNeighbors(n_neighbors=K, metric="cosine", algorithm="brute").fit(banking77_sample).kneighbors()
    assert _tie_aware_recall(ours.indices, ours.similarities, 1.0 - ref_distance) >= 0.90
    np.testing.assert_array_equal(ours.indices, again.indices)


def test_small_collection_graph_equals_the_exact_one(sentences: list[str]) -> None:
    """Reference: the exact graph (checked against sklearn in test_graph.py); with fewer
    documents than candidates every document is re-ranked exactly, so the graphs coincide."""
    vectors = vectorise(sentences)  # includes an empty document: an all-zero row
    exact = knn_cosine(vectors, 5)
    approx = knn_cosine_approximate(vectors, 5)
    np.testing.assert_array_equal(approx.indices, exact.indices)
    np.testing.assert_allclose(approx.similarities, exact.similarities, atol=1e-6)
    assert np.all(approx.indices[-1] == -1)  # the empty document has no neighbours


def test_dense_vectors_match_sklearn_brute() -> None:
    """Dense rows (as in embed mode) are searched as they are. Reference: sklearn brute cosine."""
    x = np.random.default_rng(0).normal(size=(400, 24)).astype(np.float32)
    x /= np.linalg.norm(x, axis=1, keepdims=True)
    ours = knn_cosine_approximate(x, K)
    _, ref_distance = NearestNeighbors(n_neighbors=K, metric="cosine", algorithm="brute").fit(x).kneighbors()
    assert _tie_aware_recall(ours.indices, ours.similarities, 1.0 - ref_distance) >= 0.99


def test_rerank_skips_self_repeats_missing_and_unrelated_candidates() -> None:
    """Candidate lists may hold the row itself, repeats, -1 and rows sharing no feature.
    Reference: cosine similarities computed by sklearn.metrics.pairwise.cosine_similarity."""
    x = sp.csr_matrix(np.array([[1, 0, 0], [0.8, 0.6, 0], [0.6, 0.8, 0], [0, 0, 1]], dtype=np.float32))
    candidates = np.array([[0, 1, 1, -1, 3], [2, 0, 2, 1, 3], [1, 1, 1, 0, -1], [0, 1, 2, 3, 3]])
    got = rerank(x, candidates, 2)
    full = cosine_similarity(x)
    assert got.indices.tolist() == [[1, -1], [2, 0], [1, 0], [-1, -1]]
    assert got.similarities[1].tolist() == pytest.approx([full[1, 2], full[1, 0]])
    assert got.similarities[0, 0] == pytest.approx(full[0, 1])


def test_ties_are_broken_by_tie_order() -> None:
    """Equal similarities: the candidate listed first in tie_order wins, as in the exact graph."""
    x = sp.csr_matrix(np.array([[1, 0], [1, 0], [1, 0], [1, 0]], dtype=np.float32))
    candidates = np.array([[1, 2, 3], [0, 2, 3], [0, 1, 3], [0, 1, 2]])
    order = np.array([3, 2, 1, 0])
    got = rerank(x, candidates, 1, tie_order=order)
    exact = knn_cosine(x, 1, tie_order=order)
    np.testing.assert_array_equal(got.indices, exact.indices)


def test_auto_switches_above_the_threshold_and_unknown_names_fail() -> None:
    assert resolve_graph("auto", AUTO_APPROXIMATE_ABOVE) == "exact"
    assert resolve_graph("auto", AUTO_APPROXIMATE_ABOVE + 1) == "approximate"
    assert resolve_graph("exact", 10**7) == "exact"
    with pytest.raises(InputError, match="choose one of"):
        resolve_graph("fastest", 10)


def test_forced_approximate_graph_gives_the_exact_categories() -> None:
    """Both graphs on a small corpus: every document gets the same category and status."""
    documents, truth = topic_documents()
    pairs = [(doc.id, topic) for doc, topic in zip(documents, truth) if doc.id.endswith(("-0.txt", "-1.txt"))]
    seeds = resolve_seeds(documents, pairs)
    settings = SortSettings(cross_check_folds=2)
    exact = sort_documents(documents, seeds, replace(settings, graph="exact"))
    approx = sort_documents(documents, seeds, replace(settings, graph="approximate"))
    np.testing.assert_array_equal(approx.assigned, exact.assigned)
    np.testing.assert_array_equal(approx.status, exact.status)
    assert (exact.settings["graph"], approx.settings["graph"]) == ("exact", "approximate")


def test_default_is_exact_on_small_collections() -> None:
    documents, _ = topic_documents()
    assert prepare(documents).graph_method == "exact"


@pytest.mark.slow
def test_forced_approximate_graph_keeps_banking77_accuracy() -> None:
    """BANKING77 (3,000 training texts, 5 seeds per intent, both from default_rng(0)):
    accuracy against the dataset's own labels on the non-seed texts stays within 1 point
    (issue 6's target) when the approximate graph is forced on (measured: 0.6229 exact,
    0.6184 approximate; with default settings the assigned categories differed on 4.3%
    of the documents, so this checks accuracy rather than identical assignments)."""
    from seedsort import Document

    frame = pd.read_csv(DATA / "train.csv", keep_default_na=False)
    rows = np.sort(np.random.default_rng(0).choice(len(frame), 3000, replace=False))
    frame = frame.iloc[rows].reset_index(drop=True)
    documents = [Document.make(f"row-{i}", "train.csv", t) for i, t in enumerate(frame["text"])]
    rng = np.random.default_rng(0)
    pairs = []
    for category, group in frame.groupby("category"):
        for i in rng.choice(group.index.to_numpy(), min(5, len(group)), replace=False):
            pairs.append((documents[int(i)].id, category))
    seeds = resolve_seeds(documents, pairs)
    truth = np.array([seeds.categories.index(c) for c in frame["category"]])
    scored = np.ones(len(documents), dtype=bool)
    scored[seeds.rows] = False
    accuracy = {}
    for graph in ("exact", "approximate"):
        result = sort_documents(documents, seeds, SortSettings(graph=graph, out_of_scope_quantile=None))
        accuracy[graph] = float(np.mean(result.probabilities.argmax(axis=1)[scored] == truth[scored]))
    assert abs(accuracy["approximate"] - accuracy["exact"]) <= 0.01, accuracy
