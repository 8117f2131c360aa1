"""Vectors -> symmetric cosine k-nearest-neighbour graph (exact).

Rows of the input are L2-normalised, so cosine similarity is a dot product. The graph is
built block-wise: for a block of ``b`` rows we compute their similarities to all ``n``
rows, keep the ``k`` largest (self excluded) and drop the block. Working memory is
O(b*n) for one block (``b`` is chosen so the block stays under a fixed budget) plus
O(n*k) for the result; no n x n matrix is ever held. Time is O(n^2 * nnz-per-row) for
sparse input, which is what an exact search costs.

The directed kNN lists are then symmetrised by union (an edge is kept when either end
lists the other) with weight = cosine similarity; edges with similarity <= 0 are dropped,
so a document with no features is isolated.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp

from ._progress import ProgressCallback, no_progress

#: Bytes one block of dense similarities may take (float32). 64 MiB keeps a 13k-document
#: collection to ~1,200 rows a block and a 1M-document one to 16 rows a block.
BLOCK_BYTES = 64 * 2**20


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

    Parameters
    ----------
    vectors:
        (n, d) CSR matrix or dense array with L2-normalised rows (zero rows allowed).
    k:
        Neighbours per document (capped at n - 1).
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
    sparse_in = sp.issparse(vectors)
    if sparse_in:
        vectors = sp.csr_matrix(vectors, dtype=np.float32)
    else:
        vectors = np.asarray(vectors, dtype=np.float32)
    # Columns of every block come in tie order, so ties (and argpartition's choice among
    # them) depend on the documents, never on where they sit in the collection.
    order = np.arange(n) if tie_order is None else np.asarray(tie_order, dtype=np.int64)
    column_of = np.empty(n, dtype=np.int64)
    column_of[order] = np.arange(n)
    transposed = vectors[order].T.tocsc() if sparse_in else vectors[order].T
    rows_per_block = max(1, min(n, block_bytes // (4 * n)))
    for start in range(0, n, rows_per_block):
        stop = min(n, start + rows_per_block)
        block = vectors[start:stop] @ transposed
        block = block.toarray() if sp.issparse(block) else np.asarray(block)
        block = block.astype(np.float32, copy=False)
        block[np.arange(stop - start), column_of[start:stop]] = -np.inf
        # Ties among equal similarities: prefer the document first in tie order, deterministically.
        idx, val = _top_k_stable(block, k_eff)
        idx = order[idx].astype(np.int32)
        keep = val > 0
        indices[start:stop] = np.where(keep, idx, -1)
        sims[start:stop] = np.where(keep, val, 0.0)
        progress("graph", stop, n)
    return Neighbours(indices, sims)


def _top_k_stable(block: np.ndarray, k: int) -> tuple[np.ndarray, np.ndarray]:
    """Top-k per row by (similarity descending, column ascending)."""
    if k >= block.shape[1]:
        cand = np.broadcast_to(np.arange(block.shape[1]), block.shape).copy()
    else:
        # Take a few extra candidates so values tied with the k-th are all seen.
        extra = min(block.shape[1], k + 8)
        cand = np.argpartition(-block, extra - 1, axis=1)[:, :extra]
    vals = np.take_along_axis(block, cand, axis=1)
    order = np.lexsort((cand, -vals), axis=-1)
    cand = np.take_along_axis(cand, order, axis=1)[:, :k]
    vals = np.take_along_axis(vals, order, axis=1)[:, :k]
    return cand.astype(np.int32), vals


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
) -> tuple[np.ndarray, np.ndarray]:
    """For every row, the ``m`` most cosine-similar rows among ``targets`` (itself excluded).

    Used to show the seed documents that justify a category. Cost O(n * len(targets)).

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
    target_t = vectors[targets].T
    if sp.issparse(target_t):
        target_t = target_t.tocsc()
    position = {int(t): j for j, t in enumerate(targets)}
    step = max(1, min(n, block_bytes // (4 * max(1, targets.size))))
    for start in range(0, n, step):
        stop = min(n, start + step)
        block = vectors[start:stop] @ target_t
        block = block.toarray() if sp.issparse(block) else np.asarray(block)
        block = block.astype(np.float32, copy=True)
        for local in range(stop - start):
            j = position.get(start + local)
            if j is not None:
                block[local, j] = -np.inf
        idx, val = _top_k_stable(block, m_eff)
        valid = np.isfinite(val) & (val > 0)  # a seed sharing nothing is no evidence
        rows[start:stop, :m_eff] = np.where(valid, targets[idx], -1)
        sims[start:stop, :m_eff] = np.where(valid, val, 0.0)
    return rows, sims
