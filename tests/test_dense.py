"""Dense vectors (sentence embeddings): the sharpened spreading graph.

References: the kernel [s_ij]_+^gamma of kNN-graph diffusion (Iscen et al. 2017, 2019),
computed elementwise by numpy on a small dense matrix, with S = D^-1/2 W D^-1/2 built
densely by numpy (Zhou et al. 2004's normalisation); the label spreading closed form
F* = (1 - alpha) (I - alpha S)^-1 Y (Zhou et al. 2004) solved by numpy.linalg.solve.
"""

from __future__ import annotations

import numpy as np
import pytest
import scipy.sparse as sp

from seedsort import Document
from seedsort.dense import DENSE_AFFINITY_POWER, sharpen_affinity, spreading_affinity
from seedsort.graph import knn_cosine, symmetric_affinity
from seedsort.sorting import SortSettings, prepare
from seedsort.spreading import normalised_affinity, seed_matrix, spread_labels
from seedsort.vectors import vectorise

from conftest import TOPICS


def _weights() -> np.ndarray:
    """A small symmetric cosine-like affinity with an isolated row (row 4)."""
    w = np.array(
        [
            [0.0, 0.9, 0.6, 0.0, 0.0],
            [0.9, 0.0, 0.7, 0.5, 0.0],
            [0.6, 0.7, 0.0, 0.8, 0.0],
            [0.0, 0.5, 0.8, 0.0, 0.0],
            [0.0, 0.0, 0.0, 0.0, 0.0],
        ]
    )
    return w


def _normalised_dense(w: np.ndarray) -> np.ndarray:
    degree = w.sum(axis=1)
    inv_sqrt = np.divide(1.0, np.sqrt(degree), out=np.zeros_like(degree), where=degree > 0)
    return inv_sqrt[:, None] * w * inv_sqrt[None, :]


@pytest.mark.parametrize("power", [1.0, 3.0, 8.0])
def test_sharpening_is_the_elementwise_power_kernel(power: float) -> None:
    """Reference: a_ij = s_ij ** gamma on the stored weights (Iscen et al. 2017), numpy elementwise."""
    w = _weights()
    ours = sharpen_affinity(sp.csr_matrix(w), power)
    np.testing.assert_allclose(ours.toarray(), w**power, rtol=1e-12)
    assert (ours != ours.T).nnz == 0
    # The input is left alone (the run keeps the plain affinity for scope and reach).
    np.testing.assert_array_equal(sp.csr_matrix(w).toarray(), w)


def test_sharpening_rejects_bad_input() -> None:
    """Reference: the kernel is defined for non-negative weights and a positive power (Iscen et al. 2017)."""
    with pytest.raises(ValueError):
        sharpen_affinity(sp.csr_matrix(_weights()), 0.0)
    with pytest.raises(ValueError):
        sharpen_affinity(sp.csr_matrix(-_weights()), 2.0)


def test_dense_vectors_spread_on_the_sharpened_graph_sparse_ones_on_the_plain_one() -> None:
    """Reference: label spreading's closed form F* = (1 - alpha)(I - alpha S)^-1 Y (Zhou et
    al. 2004) with S from W ** DENSE_AFFINITY_POWER for dense vectors and from W for sparse
    ones, S built densely by numpy."""
    w = _weights()
    affinity = sp.csr_matrix(w)
    dense_vectors = np.eye(5)
    sparse_vectors = sp.csr_matrix(np.eye(5))
    assert spreading_affinity(sparse_vectors, affinity) is affinity
    y = seed_matrix(np.array([0, 3]), np.array([0, 1]), 5, 2)
    alpha = 0.9
    for vectors, kernel in [(dense_vectors, w**DENSE_AFFINITY_POWER), (sparse_vectors, w)]:
        s = normalised_affinity(spreading_affinity(vectors, affinity))
        np.testing.assert_allclose(s.toarray(), _normalised_dense(kernel), rtol=1e-10)
        closed = (1 - alpha) * np.linalg.solve(np.eye(5) - alpha * _normalised_dense(kernel), y)
        ours = spread_labels(s, y, alpha=alpha, tol=1e-13, max_iter=100_000, solver="iterate").scores
        np.testing.assert_allclose(ours, closed, atol=1e-9)


def test_prepare_sharpens_only_the_spreading_graph_of_dense_vectors(monkeypatch: pytest.MonkeyPatch) -> None:
    """Reference: the closed form S = D^-1/2 (W ** p) D^-1/2 computed by numpy from the run's
    own affinity W (the plain union kNN graph, scikit-learn-checked in tests/test_graph.py)."""
    texts = [s for group in TOPICS.values() for s in group]
    documents = [Document.make(f"doc-{i:02d}", f"doc-{i:02d}.txt", t) for i, t in enumerate(texts)]
    # Dense rows standing in for embeddings: the n-gram vectors as an array (no model needed).
    dense = vectorise(texts).toarray().astype(np.float32)
    assert np.all(np.abs(np.linalg.norm(dense, axis=1) - 1) < 1e-5)
    w_plain = symmetric_affinity(knn_cosine(dense, 6), len(texts))

    with monkeypatch.context() as patch:
        patch.setattr("seedsort.sorting.vectorise", lambda texts, settings, on_progress=None: dense)
        prepared = prepare(documents, SortSettings(neighbours=6))
    np.testing.assert_allclose(prepared.affinity.toarray(), w_plain.toarray(), atol=1e-6)
    expected = _normalised_dense(w_plain.toarray().astype(np.float64) ** DENSE_AFFINITY_POWER)
    np.testing.assert_allclose(prepared.graph.toarray(), expected, atol=1e-5)

    sparse_prepared = prepare(documents, SortSettings(neighbours=6))
    plain = _normalised_dense(sparse_prepared.affinity.toarray().astype(np.float64))
    np.testing.assert_allclose(sparse_prepared.graph.toarray(), plain, atol=1e-6)
