"""The cosine kNN graph against scikit-learn's brute-force NearestNeighbors.

Reference: ``sklearn.neighbors.NearestNeighbors(metric="cosine", algorithm="brute")``, whose
``kneighbors()`` without a query excludes each point from its own neighbours and reports
cosine *distance* = 1 - similarity. One deliberate difference: seedsort drops neighbours with
similarity <= 0 (they carry no affinity, so an all-zero row is isolated), where scikit-learn
still lists them at distance >= 1.
"""

from __future__ import annotations

import numpy as np
import pytest
import scipy.sparse as sp
from sklearn.neighbors import NearestNeighbors

from seedsort.graph import knn_cosine, nearest_rows, seed_reach, symmetric_affinity
from seedsort.vectors import vectorise

K = 5


@pytest.fixture
def vectors(sentences: list[str]) -> sp.csr_matrix:
    return vectorise(sentences)


def _sklearn_neighbours(x: sp.csr_matrix | np.ndarray, k: int) -> tuple[np.ndarray, np.ndarray]:
    """Reference: scikit-learn brute-force cosine kNN, self excluded; returns (indices, similarities)."""
    nn = NearestNeighbors(n_neighbors=k, metric="cosine", algorithm="brute").fit(x)
    distance, index = nn.kneighbors()
    return index, 1.0 - distance


@pytest.mark.parametrize("dense", [False, True], ids=["csr", "dense"])
def test_knn_matches_sklearn_brute_cosine(vectors: sp.csr_matrix, dense: bool) -> None:
    """Reference: sklearn NearestNeighbors(metric="cosine", algorithm="brute"), same k, self excluded."""
    x = vectors.toarray() if dense else vectors
    ours = knn_cosine(x, K)
    ref_index, ref_sim = _sklearn_neighbours(x, K)
    assert ours.indices.shape == ours.similarities.shape == (vectors.shape[0], K)
    compared = 0
    for row in range(vectors.shape[0]):
        positive = ref_sim[row] > 1e-6  # seedsort's deliberate difference: it keeps only sim > 0
        expected_idx, expected_sim = ref_index[row][positive], ref_sim[row][positive]
        kept = ours.indices[row] >= 0
        got_idx, got_sim = ours.indices[row][kept], ours.similarities[row][kept]
        np.testing.assert_allclose(np.sort(got_sim)[::-1], np.sort(expected_sim)[::-1], atol=1e-5)
        # Neighbour sets agree wherever the k-th and (k+1)-th similarities are not tied.
        full = (x @ x.T)[row].toarray().ravel() if sp.issparse(x) else x @ x[row]
        full[row] = -np.inf
        kth, next_one = np.sort(full)[::-1][K - 1 : K + 1]
        if kth - next_one > 1e-5:
            assert set(got_idx.tolist()) == set(expected_idx.tolist()), row
            compared += 1
        assert row not in got_idx  # self excluded, as sklearn's kneighbors() without a query
        assert np.all(np.diff(got_sim) <= 0)  # descending, as documented
    assert compared >= 35  # the invented sentences are distinct enough that ties are rare


def test_zero_row_has_no_neighbours_and_no_one_lists_it(vectors: sp.csr_matrix) -> None:
    """The empty document is an all-zero row: similarity 0 to everyone, which seedsort drops.

    Reference: sklearn puts it at cosine distance exactly 1 from every document.
    """
    empty = vectors.shape[0] - 1
    assert vectors[empty].nnz == 0
    ours = knn_cosine(vectors, K)
    assert np.all(ours.indices[empty] == -1) and np.all(ours.similarities[empty] == 0)
    assert empty not in ours.indices
    ref_index, ref_sim = _sklearn_neighbours(vectors, K)
    np.testing.assert_allclose(ref_sim[empty], 0.0, atol=1e-6)


def test_dense_and_sparse_inputs_give_the_same_graph(vectors: sp.csr_matrix) -> None:
    """Same arithmetic on the same numbers (common practice: a format must not change results)."""
    sparse = knn_cosine(vectors, K)
    dense = knn_cosine(vectors.toarray(), K)
    np.testing.assert_array_equal(sparse.indices, dense.indices)
    np.testing.assert_allclose(sparse.similarities, dense.similarities, atol=1e-6)


@pytest.mark.parametrize("rows_per_block", [1, 3, 7])
def test_blockwise_equals_one_block(vectors: sp.csr_matrix, rows_per_block: int) -> None:
    """Splitting the rows into blocks is an implementation detail (common practice): same result."""
    n = vectors.shape[0]
    whole = knn_cosine(vectors, K)
    blocked = knn_cosine(vectors, K, block_bytes=4 * n * rows_per_block)
    np.testing.assert_array_equal(whole.indices, blocked.indices)
    np.testing.assert_array_equal(whole.similarities, blocked.similarities)


def test_k_is_capped_at_n_minus_one() -> None:
    """Reference: sklearn refuses k > n - 1 without a query; seedsort caps it instead (deliberate)."""
    x = vectorise(["red apples", "green apples", "ripe apples"])
    ours = knn_cosine(x, 10)
    ref_index, _ = _sklearn_neighbours(x, 2)
    assert ours.indices.shape == (3, 2)
    for row in range(3):
        assert set(ours.indices[row].tolist()) == set(ref_index[row].tolist())


def test_symmetric_affinity_is_the_max_of_directed_similarities(vectors: sp.csr_matrix) -> None:
    """Reference: a dense numpy construction of the definition W = max(A, A^T) of the directed lists."""
    neighbours = knn_cosine(vectors, K)
    n = vectors.shape[0]
    directed = np.zeros((n, n))
    for i in range(n):
        for j, s in zip(neighbours.indices[i], neighbours.similarities[i]):
            if j >= 0:
                directed[i, j] = s
    expected = np.maximum(directed, directed.T)
    w = symmetric_affinity(neighbours, n)
    assert sp.isspmatrix_csr(w) and w.shape == (n, n)
    dense = w.toarray()
    np.testing.assert_allclose(dense, expected, atol=1e-7)
    np.testing.assert_array_equal(dense, dense.T)
    assert np.all(np.diag(dense) == 0)
    assert w.nnz <= 2 * n * K
    # An edge listed in one direction only is kept (union), as in the module docstring.
    one_way = (directed > 0) & (directed.T == 0)
    assert one_way.any() and np.all(dense[one_way] > 0)


def test_seed_reach_follows_connected_components() -> None:
    """Reference: scipy.sparse.csgraph.connected_components semantics, checked by hand on a 5-node graph."""
    w = sp.csr_matrix(np.array([
        [0, 1, 0, 0, 0],
        [1, 0, 1, 0, 0],
        [0, 1, 0, 0, 0],
        [0, 0, 0, 0, 1],
        [0, 0, 0, 1, 0],
    ], dtype=np.float32))  # fmt: skip
    assert seed_reach(w, np.array([0])).tolist() == [True, True, True, False, False]
    assert seed_reach(w, np.array([2, 4])).all()


def test_nearest_rows_matches_brute_force(vectors: sp.csr_matrix) -> None:
    """Reference: sklearn NearestNeighbors(metric="cosine", algorithm="brute") fitted on the targets only."""
    targets = np.array([0, 10, 20, 30, 5, 15])
    rows, sims = nearest_rows(vectors, targets, 3)
    nn = NearestNeighbors(n_neighbors=4, metric="cosine", algorithm="brute").fit(vectors[targets])
    distance, index = nn.kneighbors(vectors)
    for row in range(vectors.shape[0] - 1):  # the zero row ties everywhere; checked below
        ref_rows = [int(targets[j]) for j in index[row] if targets[j] != row][:3]
        ref_sims = [1 - d for j, d in zip(index[row], distance[row]) if targets[j] != row][:3]
        np.testing.assert_allclose(sims[row], ref_sims, atol=1e-5)
        if ref_sims[2] - (1 - distance[row][-1]) > 1e-5 or row in targets:
            assert set(rows[row].tolist()) == set(ref_rows), row
        assert row not in rows[row]  # a seed is not its own nearest seed
    np.testing.assert_allclose(sims[-1], 0.0, atol=1e-7)


def test_ties_follow_tie_order_not_row_position() -> None:
    """Common practice (sklearn check_methods_sample_order_invariance): the row order is not
    information. Rows 1-3 are exactly as similar to row 0 (cosine 1/sqrt 2); the tie goes to
    the row first in ``tie_order``, so permuting the rows permutes the graph."""
    x = np.array([[1, 0, 0, 0], [1, 1, 0, 0], [1, 0, 1, 0], [1, 0, 0, 1]], dtype=np.float32)
    x /= np.linalg.norm(x, axis=1, keepdims=True)
    assert knn_cosine(x, 1).indices[0, 0] == 1  # default: earlier row
    assert knn_cosine(x, 1, tie_order=np.array([3, 2, 1, 0])).indices[0, 0] == 3
    names = np.array(["d", "c", "b", "a"])  # a stable key per document, e.g. its id
    perm = np.array([2, 0, 3, 1])
    base = knn_cosine(x, 2, tie_order=np.argsort(names))
    moved = knn_cosine(x[perm], 2, tie_order=np.argsort(names[perm]))
    for new_row, old_row in enumerate(perm):
        assert names[perm][moved.indices[new_row]].tolist() == names[base.indices[old_row]].tolist()
        np.testing.assert_array_equal(moved.similarities[new_row], base.similarities[old_row])


def _reference_top_k(x: np.ndarray, k: int, rank: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """The documented contract written out densely: per row, the k positive similarities
    (float64 dot products, self excluded), by similarity descending, then ``rank`` ascending."""
    full = x.astype(np.float64) @ x.astype(np.float64).T
    n = x.shape[0]
    indices = np.full((n, k), -1)
    sims = np.zeros((n, k))
    for row in range(n):
        others = np.array([j for j in range(n) if j != row and full[row, j] > 0], dtype=np.int64)
        best = others[np.lexsort((rank[others], -full[row, others]))][:k]
        indices[row, : best.size] = best
        sims[row, : best.size] = full[row, best]
    return indices, sims


def test_many_duplicates_tie_by_tie_order(sentences: list[str]) -> None:
    """30 copies of one text tie at similarity 1 with each other, far more than k. Each copy
    must list the other copies first in tie order, whatever the row order. Reference: the
    contract computed densely (_reference_top_k); sklearn brute cosine gives the copies
    distance 0 to each other, checked below."""
    texts = sentences[:20] + [sentences[3]] * 30 + sentences[20:]
    x = vectorise(texts)
    rng = np.random.default_rng(0)
    tie_order = rng.permutation(len(texts))
    rank = np.empty(len(texts), dtype=np.int64)
    rank[tie_order] = np.arange(len(texts))
    ours = knn_cosine(x, K, tie_order=tie_order)
    ref_idx, ref_sim = _reference_top_k(x.toarray(), K, rank)
    np.testing.assert_array_equal(ours.indices, ref_idx)
    np.testing.assert_allclose(ours.similarities, ref_sim, atol=1e-6)
    copies = [3] + list(range(20, 50))
    distance, _ = NearestNeighbors(n_neighbors=K, metric="cosine", algorithm="brute").fit(x).kneighbors(x[copies])
    np.testing.assert_allclose(distance, 0.0, atol=1e-6)
    perm = rng.permutation(len(texts))
    moved = knn_cosine(x[perm], K, tie_order=np.argsort(rank[perm]))
    for new_row, old_row in enumerate(perm):
        assert perm[moved.indices[new_row][moved.indices[new_row] >= 0]].tolist() == [
            j for j in ours.indices[old_row].tolist() if j >= 0
        ]


@pytest.mark.parametrize("ratio", [0.0, 256.0, 1e9], ids=["all-sparse", "default", "all-dense"])
@pytest.mark.parametrize("threads", [1, 2])
def test_feature_split_and_threads_do_not_change_the_graph(
    vectors: sp.csr_matrix, monkeypatch: pytest.MonkeyPatch, ratio: float, threads: int
) -> None:
    """Scoring some features densely is the exact identity X Y^T = X_H Y_H^T + X_L Y_L^T, and
    threads only change which block runs when (common practice): the graph is the same,
    equal to the contract computed densely (_reference_top_k)."""
    import seedsort.graph as graph

    monkeypatch.setattr(graph, "SPARSE_COST_RATIO", ratio)
    monkeypatch.setattr(graph, "THREADS", threads)
    got = knn_cosine(vectors, K, block_bytes=4 * vectors.shape[0] * 4)
    ref_idx, ref_sim = _reference_top_k(vectors.toarray(), K, np.arange(vectors.shape[0]))
    np.testing.assert_array_equal(got.indices, ref_idx)
    np.testing.assert_allclose(got.similarities, ref_sim, atol=1e-6)
    rows, sims = nearest_rows(vectors, np.array([30, 0, 10, 20]), 2, block_bytes=4 * 4 * 3)
    assert rows.shape == (vectors.shape[0], 2) and not np.any(rows == np.arange(vectors.shape[0])[:, None])
    reference = nearest_rows(vectors, np.array([30, 0, 10, 20]), 2)
    np.testing.assert_array_equal(rows, reference[0])
    np.testing.assert_array_equal(sims, reference[1])


def test_nearest_rows_ties_go_to_the_target_listed_first() -> None:
    """Three identical targets tie for every row; the one listed first in ``targets`` wins
    (the caller lists seeds by id). Reference: the contract, checked by hand on 5 rows."""
    x = np.array([[1, 0], [1, 0], [1, 0], [1, 0], [0, 1]], dtype=np.float32)
    rows, sims = nearest_rows(sp.csr_matrix(x), np.array([3, 1, 2]), 2)
    assert rows.tolist() == [[3, 1], [3, 2], [3, 1], [1, 2], [-1, -1]]
    np.testing.assert_allclose(sims[:4], 1.0)
    assert np.all(sims[4] == 0)


def test_nearest_rows_reports_progress_up_to_every_row(vectors: sp.csr_matrix) -> None:
    """Progress (common practice for progress bars): monotone, ends at the number of rows."""
    n = vectors.shape[0]
    seen: list[tuple[str, int, int | None]] = []
    nearest_rows(vectors, np.arange(0, n, 3), 3, block_bytes=2_000,
                 on_progress=lambda stage, done, total: seen.append((stage, done, total)))
    assert {stage for stage, _, _ in seen} == {"nearest seeds"} and len(seen) > 1
    done = [d for _, d, _ in seen]
    assert done == sorted(done) and done[-1] == n and all(t == n for *_, t in seen)
