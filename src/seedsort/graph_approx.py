"""Vectors -> approximate cosine k-nearest-neighbour lists, for collections too big for exact search.

Three steps, each linear or near-linear in the number of documents ``n``:

1. **Sketch.** Sparse n-gram rows are projected to ``dims`` dense dimensions by a sparse
   random projection (Achlioptas 2003; Li, Hastie & Church 2006, as implemented by
   scikit-learn's ``SparseRandomProjection``), then L2-normalised. Inner products of the
   sketches approximate the cosine similarities (Johnson-Lindenstrauss). The projection
   needs no fitting pass over the data (only the number of columns and a seed), so chunks
   can be sketched independently. Cost O(nnz) time, O(n * dims) float32 memory. Dense
   input (sentence embeddings) is used as it is.
2. **Candidates.** A hierarchical navigable small-world graph over the sketches (Malkov &
   Yashunin 2018; faiss ``IndexHNSWFlat``, inner product) gives each document its
   ``candidates`` most similar sketches. Cost about O(n log n * links * effort * dims)
   to build and search; memory O(n * (dims + 2 * links)) on top of the sketches.
3. **Exact re-ranking.** Every candidate's true cosine similarity is computed on the
   original sparse rows, and the ``k`` best are kept, ties broken by ``tie_order`` exactly
   as :func:`seedsort.graph.knn_cosine` does. Cost O(n * candidates * nnz-per-row).

So the listed similarities are exact; only a true neighbour missing from the candidates
can be lost. Recall@10 against the exact graph, on a 20,000-document generated ticket
corpus, is printed by ``benchmarks/scale.py --recall-sample 20000`` (see the README for
the measured figure). The projection is seeded and the HNSW graph is built
with one thread (parallel insertion depends on thread timing), so the same input gives the
same graph. Memory: the sketches (4 * dims bytes a document), the index (the same
again) and O(block * candidates * nnz-per-row) for one re-ranking block.
"""

from __future__ import annotations

import numpy as np
import scipy.sparse as sp

from ._progress import ProgressCallback, no_progress
from .errors import InputError
from .graph import Neighbours, knn_cosine

#: Sketch dimensions: the sketch error shrinks as 1/sqrt(dims), and 512 is the smallest
#: power of two whose recall@10 clears 0.90 with margin on generated tickets (compare
#: ``benchmarks/scale.py --recall-sample 20000 --sketch-dims 256 512``).
SKETCH_DIMS = 512
#: Candidates re-ranked exactly per document.
CANDIDATES = 48
#: HNSW links per node and search breadth (faiss ``M`` and ``efConstruction``/``efSearch``).
LINKS = 32
EFFORT = 64
#: Documents re-ranked per block (bounds the gathered candidate rows).
RERANK_BLOCK = 2048
SEED = 0


def sketch(vectors: sp.csr_matrix | np.ndarray, dims: int = SKETCH_DIMS, *, seed: int = SEED) -> np.ndarray:
    """L2-normalised float32 sketches of the rows (see module docstring, step 1).

    Returns
    -------
    numpy.ndarray (n, min(dims, d)) float32, C-contiguous; all-zero rows stay zero.
    """
    if not sp.issparse(vectors) or vectors.shape[1] <= dims:
        dense = vectors.toarray() if sp.issparse(vectors) else vectors
        z = np.array(dense, dtype=np.float32, order="C")
    else:
        from sklearn.random_projection import SparseRandomProjection

        projection = SparseRandomProjection(n_components=dims, random_state=seed, dense_output=True)
        # fit() only draws the random matrix from the number of columns; it reads no data.
        projection.fit(sp.csr_matrix((1, vectors.shape[1]), dtype=np.float32))
        z = np.empty((vectors.shape[0], dims), dtype=np.float32)
        step = 65536
        for start in range(0, vectors.shape[0], step):
            z[start : start + step] = projection.transform(vectors[start : start + step])
    norms = np.linalg.norm(z, axis=1, keepdims=True)
    np.divide(z, norms, out=z, where=norms > 0)
    return z


def candidate_lists(
    z: np.ndarray, m: int, *, links: int = LINKS, effort: int = EFFORT, threads: int | None = None
) -> np.ndarray:
    """The ``m`` rows with the largest sketch inner product, per row (HNSW graph search).

    The index is built with one thread, because inserting in parallel makes the graph depend
    on thread timing; the search, which only reads the graph, uses every core.

    Returns
    -------
    numpy.ndarray (n, m) int64; -1 where fewer than ``m`` rows were found.
    """
    import faiss

    n, dims = z.shape
    index = faiss.IndexHNSWFlat(dims, links, faiss.METRIC_INNER_PRODUCT)
    index.hnsw.efConstruction = effort
    index.hnsw.efSearch = max(effort, m)
    before = faiss.omp_get_max_threads()
    try:
        faiss.omp_set_num_threads(1)
        index.add(z)
        faiss.omp_set_num_threads(threads or before)
        _, found = index.search(z, m)
    finally:
        faiss.omp_set_num_threads(before)
    return found.astype(np.int64, copy=False)


def rerank(
    vectors: sp.csr_matrix | np.ndarray,
    candidates: np.ndarray,
    k: int,
    *,
    tie_order: np.ndarray | None = None,
    on_progress: ProgressCallback | None = None,
) -> Neighbours:
    """Exact cosine similarity of every candidate; the ``k`` best per row, self excluded.

    Similarities <= 0 are dropped (as in the exact graph). Ties are broken by position in
    ``tie_order`` (default: row order). Cost O(n * m * nnz-per-row) for m candidates a row.
    """
    progress = on_progress or no_progress
    n, m = candidates.shape
    rank = np.arange(n) if tie_order is None else np.empty(n, dtype=np.int64)
    if tie_order is not None:
        rank[np.asarray(tie_order, dtype=np.int64)] = np.arange(n)
    indices = np.full((n, k), -1, dtype=np.int32)
    sims = np.zeros((n, k), dtype=np.float32)
    sparse_in = sp.issparse(vectors)
    if sparse_in:
        vectors = sp.csr_matrix(vectors, dtype=np.float32)
        vectors.sort_indices()
    else:
        vectors = np.asarray(vectors, dtype=np.float32)
    block = max(1, RERANK_BLOCK * 40 // max(1, m))
    for start in range(0, n, block):
        stop = min(n, start + block)
        cand = candidates[start:stop]
        own = np.arange(start, stop)[:, None]
        valid = (cand >= 0) & (cand != own)
        safe = np.where(valid, cand, own)
        if sparse_in:
            left = vectors[np.repeat(np.arange(start, stop), m)]
            right = vectors[safe.ravel()]
            value = np.asarray(left.multiply(right).sum(axis=1), dtype=np.float32).reshape(stop - start, m)
        else:
            value = np.einsum("id,ijd->ij", vectors[start:stop], vectors[safe])
        value[~valid] = -np.inf
        # Any candidate search may list a row twice; a neighbour is listed once.
        dup = np.zeros_like(valid)
        sorted_pos = np.argsort(safe, axis=1, kind="stable")
        sorted_c = np.take_along_axis(safe, sorted_pos, axis=1)
        repeat = np.zeros_like(valid)
        repeat[:, 1:] = sorted_c[:, 1:] == sorted_c[:, :-1]
        np.put_along_axis(dup, sorted_pos, repeat, axis=1)
        value[dup] = -np.inf
        order = np.lexsort((rank[safe], -value), axis=-1)[:, :k]
        best = np.take_along_axis(safe, order, axis=1)
        best_value = np.take_along_axis(value, order, axis=1)
        keep = best_value > 0
        width = best.shape[1]
        indices[start:stop, :width] = np.where(keep, best, -1)
        sims[start:stop, :width] = np.where(keep, best_value, 0.0)
        progress("graph", stop, n)
    return Neighbours(indices, sims)


def knn_cosine_approximate(
    vectors: sp.csr_matrix | np.ndarray,
    k: int,
    *,
    on_progress: ProgressCallback | None = None,
    tie_order: np.ndarray | None = None,
    dims: int = SKETCH_DIMS,
    candidates: int = CANDIDATES,
    links: int = LINKS,
    effort: int = EFFORT,
    seed: int = SEED,
) -> Neighbours:
    """Approximate cosine k-nearest neighbours (self excluded) with exact similarities.

    Same contract as :func:`seedsort.graph.knn_cosine`; see the module docstring for the
    algorithm, its cost and its recall.

    Parameters
    ----------
    vectors:
        (n, d) CSR matrix or dense array with L2-normalised rows (zero rows allowed).
    k:
        Neighbours per document (capped at n - 1).
    tie_order:
        Among equally similar candidates, the row listed first here wins.
    dims, candidates, links, effort, seed:
        Sketch dimensions, candidates re-ranked per document, HNSW links per node and
        search breadth, projection seed.

    Returns
    -------
    Neighbours
    """
    progress = on_progress or no_progress
    n = vectors.shape[0]
    k_eff = max(0, min(k, n - 1))
    if k_eff == 0:
        return Neighbours(np.full((n, 0), -1, dtype=np.int32), np.zeros((n, 0), dtype=np.float32))
    progress("graph", 0, n)
    z = sketch(vectors, dims, seed=seed)
    m = min(n, max(candidates, k_eff + 1))
    found = candidate_lists(z, m, links=links, effort=effort)
    del z
    return rerank(vectors, found, k_eff, tie_order=tie_order, on_progress=progress)


#: Above this many documents ``graph="auto"`` builds the approximate graph. At 20,000
#: generated tickets the exact graph costs several times the approximate one's CPU time and
#: grows with n^2; below it the exact graph keeps every small collection's results unchanged
#: (measured with benchmarks/scale.py; see the README).
AUTO_APPROXIMATE_ABOVE = 20_000

#: Graph name -> builder; both share :func:`seedsort.graph.knn_cosine`'s signature.
GRAPH_BUILDERS = {"exact": knn_cosine, "approximate": knn_cosine_approximate}
GRAPH_CHOICES = ("auto", *GRAPH_BUILDERS)


def resolve_graph(name: str, n: int) -> str:
    """The builder ``name`` stands for at ``n`` documents (``"auto"``: by size)."""
    if name == "auto":
        return "approximate" if n > AUTO_APPROXIMATE_ABOVE else "exact"
    if name not in GRAPH_BUILDERS:
        raise InputError(f"Unknown graph {name!r}; choose one of: {', '.join(GRAPH_CHOICES)}.")
    return name
