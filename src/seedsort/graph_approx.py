"""Vectors -> approximate cosine k-nearest-neighbour lists, for collections too big for exact search.

Three steps, each linear or near-linear in the number of documents ``n``:

1. **Sketch.** Sparse n-gram rows are reduced to ``dims`` dense dimensions by signed feature
   hashing, a count sketch (Charikar, Chen & Farach-Colton 2002; Weinberger et al. 2009):
   feature ``j`` is added, times a random sign ``s(j)``, to dimension ``h(j)``, both drawn
   once from a seeded generator. The sketch's inner product is an unbiased estimate of the
   cosine similarity, with error shrinking as 1/sqrt(dims); then the sketches are
   L2-normalised. It needs no fitting pass (only the number of columns and a seed), so
   chunks are sketched independently, when needed (twice: to build, to search), never all
   held. Cost O(nnz) time, O(chunk * dims) float32 memory. In one
   A/B run on 100,000 generated tickets (same process) it took 1.7 s CPU against 5.0 s for
   the sparse random projection (scikit-learn ``SparseRandomProjection``) it replaced, and
   on 20,000 its candidates gave a higher recall@10 (0.955 against 0.930, HNSW 32 links /
   64). Dense input (sentence embeddings), and sparse input with at most ``dims`` columns,
   is used as it is.
2. **Candidates.** A hierarchical navigable small-world graph over the sketches (Malkov &
   Yashunin 2018; faiss ``IndexHNSWSQ``, inner product, sketches stored as 8-bit codes)
   gives each document its ``candidates`` most similar sketches. Cost about
   O(n log n * links * effort * dims) to build and search; memory O(n * (dims + 8 * links))
   bytes, plus the (n, candidates) lists.
3. **Exact re-ranking.** Every candidate's true cosine similarity is computed on the
   original sparse rows, and the ``k`` best are kept, ties broken by ``tie_order`` exactly
   as :func:`seedsort.graph.knn_cosine` does. Cost O(n * candidates * nnz-per-row), in
   blocks of rows on two threads (each block's result depends on its rows alone).

So the listed similarities are exact; only a true neighbour missing from the candidates
can be lost. Recall@10 against the exact graph, on a 20,000-document generated ticket
corpus, is printed by ``benchmarks/scale.py --recall-sample 20000`` (see the README for
the measured figure). The sketch is seeded and the HNSW graph is built
with one thread (parallel insertion depends on thread timing), so the same input gives the
same graph. Memory: the index (dims bytes of codes plus the links a document), one chunk
of float32 sketches, the candidate lists (8 * candidates bytes a document) and
O(block * candidates * nnz-per-row) for each of the two re-ranking blocks in flight.
"""

from __future__ import annotations

from collections.abc import Iterator

import numpy as np
import scipy.sparse as sp

from ._progress import ProgressCallback, no_progress
from .errors import InputError
from .graph import Neighbours, _blocks, knn_cosine

#: Sketch dimensions: the sketch error shrinks as 1/sqrt(dims). On 20,000 generated tickets
#: (HNSW 16 links, candidates 48) recall@10 was 0.9235 at 384 dims and 0.9403 at 512
#: (compare ``benchmarks/scale.py --recall-sample 20000 --sketch-dims 384 512``).
SKETCH_DIMS = 512
#: Candidates re-ranked exactly per document.
CANDIDATES = 48
#: HNSW links per node and build breadth (faiss ``M`` and ``efConstruction``), and search
#: breadth (``efSearch``). In one A/B run on 20,000 generated tickets (float32 storage,
#: same process) 16 links / 48 took 5.2 s CPU to build and 5.7 s to search against 8.2 and
#: 8.5 s for 32 / 64, for recall@10 0.940 against 0.955.
LINKS = 16
EFFORT = 48
SEARCH_EFFORT = 64
#: Documents re-ranked per block (bounds the gathered candidate rows).
RERANK_BLOCK = 2048
SEED = 0
#: Rows sketched at once (bounds the sparse chunk and its dense sketch).
SKETCH_CHUNK = 32_768


class _Sketches:
    """Sketches of any block of rows, computed when asked (see module docstring, step 1).

    The (n, dims) float32 sketch of a whole collection is 2 GB at 1,000,000 documents; the
    index keeps its own 8-bit copy, so the sketches are computed a chunk at a time, once to
    build the index and once to search it, and never all held (a second sketch pass costs
    about 2 s CPU per 100,000 tickets, the figure above).
    """

    def __init__(self, vectors: sp.csr_matrix | np.ndarray, dims: int, seed: int) -> None:
        self.n = vectors.shape[0]
        self.hashed = sp.issparse(vectors) and vectors.shape[1] > dims
        if self.hashed:
            self.vectors = sp.csr_matrix(vectors)
            rng = np.random.default_rng(seed)
            self.bucket = rng.integers(0, dims, size=vectors.shape[1]).astype(np.int32)
            self.sign = (rng.integers(0, 2, size=vectors.shape[1]) * 2 - 1).astype(np.float32)
            self.dims = dims
        else:
            self.vectors = vectors
            self.dims = vectors.shape[1]

    def rows(self, start: int, stop: int) -> np.ndarray:
        """L2-normalised float32 sketches of rows ``start:stop``, C-contiguous; zero rows stay zero."""
        chunk = self.vectors[start:stop]
        if self.hashed:
            # Several features of a row may share a bucket: toarray() adds them up, in the
            # row's entry order, so the sum does not depend on the chunking.
            hashed = sp.csr_matrix(
                (chunk.data.astype(np.float32) * self.sign[chunk.indices], self.bucket[chunk.indices], chunk.indptr),
                shape=(chunk.shape[0], self.dims),
            )
            z = hashed.toarray()
        else:
            z = np.array(chunk.toarray() if sp.issparse(chunk) else chunk, dtype=np.float32, order="C")
        norms = np.linalg.norm(z, axis=1, keepdims=True)
        np.divide(z, norms, out=z, where=norms > 0)
        return z

    def chunks(self) -> Iterator[tuple[int, np.ndarray]]:
        """(first row, sketches) for every SKETCH_CHUNK rows, in order."""
        for start in range(0, self.n, SKETCH_CHUNK):
            yield start, self.rows(start, min(self.n, start + SKETCH_CHUNK))


def sketch(vectors: sp.csr_matrix | np.ndarray, dims: int = SKETCH_DIMS, *, seed: int = SEED) -> np.ndarray:
    """L2-normalised float32 sketches of the rows (see module docstring, step 1), all at once.

    Returns
    -------
    numpy.ndarray (n, min(dims, d)) float32, C-contiguous; all-zero rows stay zero.
    """
    sketches = _Sketches(vectors, dims, seed)
    z = np.empty((sketches.n, sketches.dims), dtype=np.float32)
    for start, rows in sketches.chunks():
        z[start : start + rows.shape[0]] = rows
    return z


def candidate_lists(
    sketches: _Sketches,
    m: int,
    *,
    links: int = LINKS,
    effort: int = EFFORT,
    search_effort: int = SEARCH_EFFORT,
    threads: int | None = None,
) -> np.ndarray:
    """The ``m`` rows with the largest sketch inner product, per row (HNSW graph search).

    The index is built with one thread, because inserting in parallel makes the graph depend
    on thread timing; the search, which only reads the graph, uses every core. Rows are
    added and searched a sketch chunk at a time (a chunk's queries do not depend on the
    others'; the index inserts each chunk's rows in a seeded order, so the graph is the same
    for the same input).

    Returns
    -------
    numpy.ndarray (n, m) int64; -1 where fewer than ``m`` rows were found.
    """
    import faiss

    n, dims = sketches.n, sketches.dims
    # Sketches stored as 8-bit codes on one range for all dimensions: a quarter of the memory
    # traffic of float32. In one A/B run on 20,000 generated tickets: build 4.4 s, search
    # 4.2 s CPU against 5.0 and 6.2 s for float32 storage, recall@10 0.940 for both. The
    # range is the minimum and maximum of the first chunk's sketches (deterministic; values
    # outside it are clamped to its ends), the whole collection's up to SKETCH_CHUNK rows.
    index = faiss.IndexHNSWSQ(dims, faiss.ScalarQuantizer.QT_8bit_uniform, links, faiss.METRIC_INNER_PRODUCT)
    index.hnsw.efConstruction = effort
    index.hnsw.efSearch = max(search_effort, m)
    found = np.empty((n, m), dtype=np.int64)
    before = faiss.omp_get_max_threads()
    try:
        faiss.omp_set_num_threads(1)
        for start, rows in sketches.chunks():
            if start == 0:
                index.train(rows)
            index.add(rows)
        faiss.omp_set_num_threads(threads or before)
        for start, rows in sketches.chunks():
            found[start : start + rows.shape[0]] = index.search(rows, m)[1]
    finally:
        faiss.omp_set_num_threads(before)
    return found


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

    def best(start: int, stop: int) -> tuple[np.ndarray, np.ndarray]:
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
        # Any candidate search may list a row twice; a neighbour is listed once (the first
        # of equal ids in id order is kept, the others dropped).
        by_id = np.argsort(safe, axis=1, kind="stable")
        safe = np.take_along_axis(safe, by_id, axis=1)
        value = np.take_along_axis(value, by_id, axis=1)
        value[:, 1:][safe[:, 1:] == safe[:, :-1]] = -np.inf
        # One int64 key a candidate orders by (similarity descending, tie rank ascending):
        # the float32 bits of -similarity made order-preserving as signed integers, above
        # the rank. Partitioning on it then sorting only the k kept is cheaper than a
        # lexsort of every candidate, and as exact: keys tie only between dropped candidates.
        bits = (-value).view(np.int32)
        key = ((bits ^ ((bits >> 31) & 0x7FFFFFFF)).astype(np.int64) << 32) | rank[safe]
        width = min(k, m)
        if width < m:
            kept = np.argpartition(key, width - 1, axis=1)[:, :width]
            key_kept = np.take_along_axis(key, kept, axis=1)
            order = np.take_along_axis(kept, np.argsort(key_kept, axis=1), axis=1)
        else:
            order = np.argsort(key, axis=1)
        top = np.take_along_axis(safe, order, axis=1)
        top_value = np.take_along_axis(value, order, axis=1)
        keep = top_value > 0
        return np.where(keep, top, -1), np.where(keep, top_value, 0.0)

    # Each block's result depends on its own rows only, so the threads cannot change it.
    for start, stop, (top, top_value) in _blocks(n, block, best):
        width = top.shape[1]
        indices[start:stop, :width] = top
        sims[start:stop, :width] = top_value
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
    search_effort: int = SEARCH_EFFORT,
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
    dims, candidates, links, effort, search_effort, seed:
        Sketch dimensions, candidates re-ranked per document, HNSW links per node, build
        and search breadth, sketch seed.

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
    m = min(n, max(candidates, k_eff + 1))
    found = candidate_lists(_Sketches(vectors, dims, seed), m, links=links, effort=effort, search_effort=search_effort)
    return rerank(vectors, found, k_eff, tie_order=tie_order, on_progress=progress)


#: Above this many documents ``graph="auto"`` builds the approximate graph. Exact against
#: approximate build, CPU seconds (``benchmarks/scale.py --recall-sample N``, k=10, shared
#: 2-core machine): 7.8 vs 7.7 at N = 10,000, 16.0 vs 11.4 at 15,000, 31.9 vs 18.3 at
#: 20,000; graph + spreading on the 13,083-text BANKING77 pool (``--banking77``) 12.5 vs
#: 12.3 s wall. Up to
#: about 13,000 the two tie within the noise of a shared machine, so the exact graph is kept
#: up to 15,000 (every small collection keeps its exact results, BANKING77's pool included)
#: and the approximate one takes over where it is clearly cheaper and the exact cost grows
#: as n^2.
AUTO_APPROXIMATE_ABOVE = 15_000

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
