"""Vectors -> symmetric cosine k-nearest-neighbour graph (exact).

Rows of the input are L2-normalised, so cosine similarity is a dot product. The graph is
built block-wise: for a block of ``b`` rows we score them against all ``n`` rows, keep the
``k`` best (self excluded) and drop the block. Working memory is O(b*n) a block (``b`` is
chosen so a block stays under a fixed budget; two blocks are in flight on two threads) plus
O(n*k) for the result; no n x n matrix is ever held.

Scoring a block of sparse rows splits the features in two (an exact identity,
``X Y^T = X_H Y_H^T + X_L Y_L^T``): the features present in a large share of both sides
(character n-grams such as " th") make scipy's sparse product slow, since its cost is the
sum over features of (rows having it on the left) x (rows having it on the right), so they
are multiplied as dense float32 columns by BLAS; the rest stay sparse. A feature goes dense
when its sparse cost exceeds its dense cost, ``SPARSE_COST_RATIO`` times share-left x
share-right > 1. Time is O(n^2 * h) for ``h`` dense features plus the sparse product of the
rest; dense input (sentence embeddings) is one BLAS product a block.

Choosing is exact and independent of the block layout: the fast scores (float32, summed in
an order that depends on BLAS and on the block) only pick candidates, every column within
``SCORE_SLACK`` of a row's k-th best score; each candidate's similarity is then recomputed
from the two rows alone (their products summed in float64 in column order, rounded to
float32), and the ``k`` best are taken by (similarity descending, ``tie_order`` ascending).
So duplicates tie exactly and the graph does not depend on the order of the collection.

The directed kNN lists are then symmetrised by union (an edge is kept when either end
lists the other) with weight = cosine similarity; edges with similarity <= 0 are dropped,
so a document with no features is isolated.
"""

from __future__ import annotations

from collections.abc import Callable, Iterator
from concurrent.futures import ThreadPoolExecutor
from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp

from ._progress import ProgressCallback, no_progress

#: Bytes one block of dense scores may take (float32); each of the ``THREADS`` blocks in
#: flight takes about twice this (the scores and the sparse part's dense copy).
#: 64 MiB keeps a 13k-document collection to ~1,200 rows a block.
BLOCK_BYTES = 64 * 2**20
#: Blocks scored at once, one a thread. scipy's sparse product runs on one core, and most
#: of a block's time is spent in C loops outside the GIL (BANKING77 pool, 2 idle cores:
#: 6.7 s on one thread, 3.9 s on two).
THREADS = 2
#: Cost of one multiply-add in scipy's sparse product over one in BLAS's float32 product.
#: The raw rates are ~0.15 G against ~13 G a second (2 cores), and the sparse product also
#: pays for writing its output; of 64, 128, 256, 512 and 1024, 256 was fastest on the
#: BANKING77 pool and 10,000 generated tickets.
SPARSE_COST_RATIO = 256.0
#: At most this many features are multiplied densely (4 bytes a row each, both sides).
MAX_DENSE_FEATURES = 2048
#: Fast scores are float32 sums whose rounding depends on the summation order; every
#: column scoring within this of a row's k-th best is recomputed exactly before choosing.
#: It must exceed twice the rounding error, which is about sqrt(terms) * 6e-8 for sums of
#: products of L2-normalised rows (``benchmarks/scale.py --graph-speed`` prints the largest
#: difference from scikit-learn's similarities: ~1e-6 on BANKING77).
SCORE_SLACK = 1e-4
#: Columns a group when bounding a row's k-th best score (see _candidates).
GROUP = 32
#: Candidate pairs recomputed at once (bounds the gathered rows).
PAIR_CHUNK = 262_144


@dataclass(frozen=True, slots=True)
class Neighbours:
    """Directed k-nearest-neighbour lists.

    Attributes
    ----------
    indices:
        int32 array (n, k); ``-1`` where a document has fewer than k neighbours with
        positive similarity.
    similarities:
        float32 array (n, k), cosine similarity, descending along each row; 0 where
        ``indices`` is -1.
    """

    indices: np.ndarray
    similarities: np.ndarray


def knn_cosine(
    vectors: sp.csr_matrix | np.ndarray,
    k: int,
    *,
    block_bytes: int = BLOCK_BYTES,
    on_progress: ProgressCallback | None = None,
    tie_order: np.ndarray | None = None,
) -> Neighbours:
    """Exact cosine k-nearest neighbours of every row among all rows (self excluded).

    See the module docstring for the algorithm and its cost.

    Parameters
    ----------
    vectors:
        (n, d) CSR matrix or dense array with L2-normalised rows (zero rows allowed).
    k:
        Neighbours per document (capped at n - 1).
    block_bytes:
        Bytes of float32 scores a block of rows may take.
    tie_order:
        A permutation of the rows; among equally similar neighbours the one listed first
        here wins. Default: row order. Pass an order derived from the documents (e.g. their
        sorted ids) so that the graph does not depend on the order of the collection.

    Returns
    -------
    Neighbours
    """
    progress = on_progress or no_progress
    n = vectors.shape[0]
    k_eff = max(0, min(k, n - 1))
    indices = np.full((n, k_eff), -1, dtype=np.int32)
    sims = np.zeros((n, k_eff), dtype=np.float32)
    if k_eff == 0:
        return Neighbours(indices, sims)
    vectors = _as_float32(vectors)
    # Columns come in tie order, so a column's position is its rank among ties.
    order = np.arange(n) if tie_order is None else np.asarray(tie_order, dtype=np.int64)
    column_of = np.empty(n, dtype=np.int64)
    column_of[order] = np.arange(n)
    scorer = _Scorer(vectors, vectors[order], block_bytes)
    def best(start: int, stop: int) -> tuple[np.ndarray, np.ndarray]:
        return scorer.best(start, stop, k_eff, column_of[start:stop], order)

    for start, stop, (idx, val) in _blocks(n, scorer.rows_per_block, best):
        indices[start:stop] = idx
        sims[start:stop] = val
        progress("graph", stop, n)
    return Neighbours(indices, sims)


def _as_float32(vectors: sp.csr_matrix | np.ndarray) -> sp.csr_matrix | np.ndarray:
    """CSR float32 with sorted indices and no stored zeros, or a C-ordered float32 array.

    Vectors already so (seedsort's own) are returned as they are: a copy would hold the
    whole matrix twice (2.5 GB at 1,000,000 tickets) for as long as the search runs.
    """
    if not sp.issparse(vectors):
        return np.ascontiguousarray(vectors, dtype=np.float32)
    if (
        vectors.format == "csr" and vectors.dtype == np.float32 and vectors.has_canonical_format
        and not np.any(vectors.data == 0)
    ):
        return vectors
    csr = sp.csr_matrix(vectors, dtype=np.float32, copy=True)
    csr.sum_duplicates()  # also sorts the indices, which the pairwise recomputation relies on
    csr.eliminate_zeros()
    return csr


def _blocks(
    n: int, step: int, work: Callable[[int, int], tuple[np.ndarray, np.ndarray]]
) -> Iterator[tuple[int, int, tuple[np.ndarray, np.ndarray]]]:
    """``work(start, stop)`` over consecutive row blocks, ``THREADS`` at a time, in order."""
    bounds = [(start, min(n, start + step)) for start in range(0, n, step)]
    if THREADS < 2 or len(bounds) < 2:
        for start, stop in bounds:
            yield start, stop, work(start, stop)
        return
    from threadpoolctl import threadpool_limits  # a dependency of scikit-learn

    # One BLAS thread per block: the blocks already fill the cores.
    with threadpool_limits(limits=1, user_api="blas"), ThreadPoolExecutor(THREADS) as pool:
        for (start, stop), result in zip(bounds, pool.map(lambda b: work(*b), bounds)):
            yield start, stop, result


def _dense_features(left: sp.csr_matrix, right: sp.csr_matrix, budget: int) -> np.ndarray:
    """Sorted ids of the features worth multiplying densely (see the module docstring)."""
    d = left.shape[1]
    share = np.bincount(left.indices, minlength=d) / max(1, left.shape[0])
    share = share * (np.bincount(right.indices, minlength=d) / max(1, right.shape[0]))
    cap = min(MAX_DENSE_FEATURES, budget // (4 * max(1, right.shape[0])))
    worth = np.flatnonzero(share * SPARSE_COST_RATIO > 1.0)
    if worth.size > cap:
        worth = worth[np.argsort(-share[worth], kind="stable")[:cap]]
    return np.sort(worth)


class _Scorer:
    """Fast float32 scores of blocks of ``left`` rows against every ``right`` row, and the
    exact choice of the best columns from them (see the module docstring)."""

    def __init__(
        self, left: sp.csr_matrix | np.ndarray, right: sp.csr_matrix | np.ndarray, block_bytes: int
    ) -> None:
        self.left, self.right = left, right
        m = right.shape[0]
        # At least a few blocks a thread, so that the threads share the work.
        few = -(-left.shape[0] // (4 * THREADS))
        self.rows_per_block = max(1, min(few, block_bytes // (4 * max(1, m))))
        self.sparse = sp.issparse(left)
        if self.sparse:
            self.nonnegative = left.data.size == 0 or (left.data.min() >= 0 and right.data.min() >= 0)
            self.live = np.diff(left.indptr) > 0
            dense = _dense_features(left, right, 4 * block_bytes)
            self.dense_slot = np.full(left.shape[1], -1, dtype=np.int64)
            self.dense_slot[dense] = np.arange(dense.size)
            self.right_dense_t = np.ascontiguousarray(right[:, dense].toarray().T)
            self.right_sparse_t = _without_features(right, self.dense_slot >= 0).T.tocsr()
        else:
            self.nonnegative = bool(left.size == 0 or (left.min() >= 0 and right.min() >= 0))
            self.live = np.any(left != 0, axis=1)

    def scores(self, start: int, stop: int) -> np.ndarray:
        """(stop - start, m) float32 scores; equal to the similarities up to rounding."""
        if not self.sparse:
            return self.left[start:stop] @ self.right.T
        block = self.left[start:stop]
        slot = self.dense_slot[block.indices]
        dense_part = slot >= 0
        scores = np.zeros((stop - start, self.right.shape[0]), dtype=np.float32)
        if self.right_dense_t.shape[0]:
            left_dense = np.zeros((stop - start, self.right_dense_t.shape[0]), dtype=np.float32)
            rows = np.repeat(np.arange(stop - start), np.diff(block.indptr))
            left_dense[rows[dense_part], slot[dense_part]] = block.data[dense_part]
            np.matmul(left_dense, self.right_dense_t, out=scores)
        scores += (_without_features(block, self.dense_slot >= 0) @ self.right_sparse_t).toarray()
        return scores

    def best(
        self, start: int, stop: int, k: int, own_column: np.ndarray, column_rows: np.ndarray
    ) -> tuple[np.ndarray, np.ndarray]:
        """The ``k`` best columns of rows ``start:stop`` by exact similarity, then column.

        ``own_column[i]`` (or -1) is excluded for row ``start + i``; ``column_rows`` maps
        columns to rows of the input. Returns rows of ``column_rows`` (-1 where fewer than k
        columns have positive similarity) and the similarities, as (stop - start, k) arrays.
        """
        scores = self.scores(start, stop)
        b, m = scores.shape
        listed = own_column >= 0
        scores[np.flatnonzero(listed), own_column[listed]] = -np.inf
        # A sum of non-negative products is positive exactly when the similarity is.
        floor = 0.0 if self.nonnegative else -SCORE_SLACK
        local, column = _candidates(scores, k, floor, self.live[start:stop])
        del scores
        exact = _pair_similarities(self.left, self.right, start + local, column)
        return _choose(local, column, exact, b, k, column_rows)


def _candidates(scores: np.ndarray, k: int, floor: float, live: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """(row, column) of every score above ``floor`` within ``SCORE_SLACK`` of a bound on its
    row's k-th best, for the live rows.

    The bound: split each row into groups of ``GROUP`` columns and take the k-th best group
    maximum. k groups reaching it hold k columns that do, so it is at most the row's k-th
    best score, and usually equal (the best columns tend to sit in different groups). It
    costs one pass over the scores instead of a partition of every row, and only the groups
    reaching it are searched.
    """
    b, m = scores.shape
    groups = m // GROUP
    whole = groups * GROUP
    if groups < 4 * k:
        cutoff = np.where(live, np.partition(scores, m - k, axis=1)[:, m - k] - SCORE_SLACK, np.inf)
        return np.nonzero((scores >= cutoff[:, None]) & (scores > floor))
    grouped = scores[:, :whole].reshape(b, groups, GROUP)
    tops = grouped.max(axis=2)
    rest = scores[:, whole:]
    if rest.shape[1]:
        tops = np.concatenate([tops, rest.max(axis=1, keepdims=True)], axis=1)
    cutoff = np.where(live, np.partition(tops, tops.shape[1] - k, axis=1)[:, tops.shape[1] - k] - SCORE_SLACK, np.inf)
    group_row, group = np.nonzero((tops[:, :groups] >= cutoff[:, None]) & (tops[:, :groups] > floor))
    values = grouped[group_row, group]
    hit, offset = np.nonzero((values >= cutoff[group_row, None]) & (values > floor))
    rest_row, rest_column = np.nonzero((rest >= cutoff[:, None]) & (rest > floor))
    rows = np.concatenate([group_row[hit], rest_row])
    return rows, np.concatenate([group[hit] * GROUP + offset, whole + rest_column])


def _without_features(matrix: sp.csr_matrix, drop: np.ndarray) -> sp.csr_matrix:
    """``matrix`` with the entries of the features where ``drop`` is true removed."""
    kept = ~drop[matrix.indices]
    indptr = np.concatenate([[0], np.cumsum(kept)])[matrix.indptr]
    return sp.csr_matrix((matrix.data[kept], matrix.indices[kept], indptr), shape=matrix.shape)


def _pair_similarities(
    left: sp.csr_matrix | np.ndarray, right: sp.csr_matrix | np.ndarray, rows: np.ndarray, columns: np.ndarray
) -> np.ndarray:
    """Dot products of ``left[rows[i]]`` and ``right[columns[i]]``, float32, from the two rows alone.

    The products (float32, commutative) are summed in float64 in column order, so the value
    depends on the two rows only: the same pair always gets the same value, whichever block
    or side it is computed from, and so do duplicate rows. Cost O(pairs * nnz-per-row).
    """
    out = np.empty(rows.size, dtype=np.float32)
    for start in range(0, rows.size, PAIR_CHUNK):
        stop = min(rows.size, start + PAIR_CHUNK)
        a, b = left[rows[start:stop]], right[columns[start:stop]]
        if sp.issparse(a):
            product = a.multiply(b).tocsr()  # entries in column order, as both rows are sorted
            pair = np.repeat(np.arange(stop - start), np.diff(product.indptr))
            out[start:stop] = np.bincount(pair, weights=product.data, minlength=stop - start)
        else:
            out[start:stop] = np.einsum("ij,ij->i", a.astype(np.float64), b.astype(np.float64))
    return out


def _choose(
    local: np.ndarray, column: np.ndarray, value: np.ndarray, b: int, k: int, column_rows: np.ndarray
) -> tuple[np.ndarray, np.ndarray]:
    """Per row, the ``k`` positive (row, column, value) triples by value descending, column ascending."""
    positive = value > 0
    local, column, value = local[positive], column[positive], value[positive]
    order = np.lexsort((column, -value, local))
    local, column, value = local[order], column[order], value[order]
    rank = np.arange(local.size) - np.searchsorted(local, local, side="left")
    top = rank < k
    indices = np.full((b, k), -1, dtype=np.int64)
    sims = np.zeros((b, k), dtype=np.float32)
    indices[local[top], rank[top]] = column_rows[column[top]]
    sims[local[top], rank[top]] = value[top]
    return indices, sims


def symmetric_affinity(neighbours: Neighbours, n: int | None = None) -> sp.csr_matrix:
    """Union-symmetrised affinity matrix W of a kNN graph.

    ``W[i, j] = max(sim(i->j), sim(j->i))`` over the directed lists; zero diagonal.

    Returns
    -------
    scipy.sparse.csr_matrix (n, n), float32, symmetric, at most 2*n*k stored entries.
    """
    n = neighbours.indices.shape[0] if n is None else n
    rows = np.repeat(np.arange(n, dtype=np.int32), neighbours.indices.shape[1])
    cols = neighbours.indices.ravel()
    vals = neighbours.similarities.ravel()
    keep = cols >= 0
    directed = sp.csr_matrix((vals[keep], (rows[keep], cols[keep])), shape=(n, n), dtype=np.float32)
    return directed.maximum(directed.T).tocsr()


def seed_reach(affinity: sp.csr_matrix, seed_rows: np.ndarray) -> np.ndarray:
    """Boolean mask of documents connected to at least one seed through the graph."""
    from scipy.sparse.csgraph import connected_components

    _, component = connected_components(affinity, directed=False)
    seeded = np.unique(component[seed_rows])
    return np.isin(component, seeded)


def nearest_rows(
    vectors: sp.csr_matrix | np.ndarray,
    targets: np.ndarray,
    m: int,
    *,
    block_bytes: int = BLOCK_BYTES,
    on_progress: ProgressCallback | None = None,
) -> tuple[np.ndarray, np.ndarray]:
    """For every row, the ``m`` most cosine-similar rows among ``targets`` (itself excluded).

    Used to show the seed documents that justify a category. Scored and chosen as in
    :func:`knn_cosine`, with the targets as the columns; ties go to the target listed
    first. Cost O(n * len(targets) * h) for ``h`` dense features plus the sparse product
    of the rest. Progress: ``on_progress("nearest seeds", rows_done, n)``.

    Returns
    -------
    (rows, similarities): int64 (n, m) document rows (-1 where fewer exist) and float32
    (n, m) similarities, descending; only targets with positive similarity are listed.
    """
    n = vectors.shape[0]
    targets = np.asarray(targets, dtype=np.int64)
    m_eff = min(m, targets.size)
    rows = np.full((n, m), -1, dtype=np.int64)
    sims = np.zeros((n, m), dtype=np.float32)
    if m_eff == 0:
        return rows, sims
    vectors = _as_float32(vectors)
    column_of = np.full(n, -1, dtype=np.int64)
    column_of[targets] = np.arange(targets.size)
    scorer = _Scorer(vectors, vectors[targets], block_bytes)
    def best(start: int, stop: int) -> tuple[np.ndarray, np.ndarray]:
        return scorer.best(start, stop, m_eff, column_of[start:stop], targets)

    progress = on_progress or no_progress
    for start, stop, (idx, val) in _blocks(n, scorer.rows_per_block, best):
        rows[start:stop, :m_eff] = idx
        sims[start:stop, :m_eff] = val
        progress("nearest seeds", stop, n)
    return rows, sims
