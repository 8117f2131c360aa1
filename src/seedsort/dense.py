"""What the model does differently on dense vectors (sentence embeddings).

Sentence embeddings of one collection sit close together: on BANKING77 (13,083 texts,
int8 all-MiniLM-L6-v2) the median cosine similarity of a text to its nearest neighbour is
0.92 and to its tenth 0.83 (5-95% ranges 0.76-0.99 and 0.66-0.93, measured), so the kNN
affinity W (:func:`seedsort.graph.symmetric_affinity`) weighs a near-paraphrase and a loose
neighbour almost alike. For spreading, seedsort raises the dense graph's weights to a
power (0.92 and 0.83 become 0.52 and 0.22 at p = 8),

    W_p[i, j] = W[i, j] ** p,    p = :data:`DENSE_AFFINITY_POWER`,

before the normalisation S = D^-1/2 W_p D^-1/2 (:func:`seedsort.spreading.normalised_affinity`):
the kernel [s_ij]_+^gamma of diffusion over kNN graphs of image descriptors and of label
propagation for semi-supervised learning (Iscen, Tolias, Avrithis, Furon & Chum 2017,
"Efficient Diffusion on Region Manifolds"; Iscen, Tolias, Avrithis & Chum 2019, "Label
Propagation for Deep Semi-supervised Learning", both with gamma = 3; values from memory).
The neighbour lists stay the same; only their weights sharpen, so each document listens
mostly to its closest neighbours. The same S smooths the classifier's features
(:func:`seedsort.combine.smooth_features`). Measured on BANKING77 at 10 seeds per category,
sampling seeds 100-104 (apart from the benchmark's 0-9), blend at weight 0.5, classifier on
features smoothed over 3 steps at C 30: p = 1 88.49%, 4 88.62%, 8 88.69%, 16 88.79%; the
spread alone does not gain (86.2-86.4% at every p): its probabilities become more decided,
which is what the log-linear blend uses. p = 8 rather than the top of that grid, whose
steps are within the noise of five samples. The whole pipeline (2 smoothing steps, graph
weight chosen by the cross-check: 0.5 on every sample) on those samples: p = 1 at C 10
88.19%, p = 8 at C 10 88.49%, p = 1 at C 30 88.47%, p = 8 at C 30 88.77% (kept), p = 16 at
C 30 88.79%; benchmarks/embedding_accuracy.py gives the figures on samples 0-9.

Sparse n-gram vectors keep W as it is: the n-gram pipeline's settings were measured on
that graph, and the power was measured on embeddings only.

Costs: one elementwise power over the nnz(W) <= 2 n k stored weights, O(n k). The spread's
CG solver needed 64 sparse products at p = 8 against 56 at p = 1 (BANKING77, tol 1e-6).

The seeds' metric. Given the seeds, a run re-weights the graph's neighbour lists by the
cosine in a metric learnt from them (:func:`seed_spreading_graph`): rows mapped by M = (S_w
+ lambda I)^(-1/2), the inverse square root of the seeds' pooled within-class covariance
(Fisher 1936's within-class scatter, as in linear discriminant analysis) shrunk toward the
identity (Ledoit & Wolf 2004) by lambda = :data:`SEED_METRIC_SHRINKAGE` times its mean
eigenvalue; then the same power p and normalisation. Directions in which seeds of one
category differ among themselves count less, so two texts that differ only the way
same-category texts do come closer. The neighbour lists stay those of the plain cosine; each
cross-check fold re-weights them from its own training seeds, so no held-out seed's label
shapes its own prediction. Measured on BANKING77 at 10 seeds per category, the whole
pipeline on sampling seeds 100-104 (``benchmarks/embedding_accuracy.py --first-sample 100
--samples 5 --skip-ngrams``, which runs both in one process): 88.99% against 88.77% without;
on the benchmark's own samples 0-4 88.81% against 88.55%, 5-9 89.12% against 88.71% (per
sample 0 to +0.95 points, none lower). Those figures, and the others in this docstring, were
measured on the earlier all-token mean pooling; on today's vectors
(:data:`seedsort.embeddings.POOLING`) the metric gives 89.16% against 88.81% on 0-4 and
89.47% against 89.14% on 5-9 (the README's figures). The shrinkage was chosen on those samples with the
blend at weight 0.5: 0.3 88.95%, 3 88.99%, 10 88.84% (whole pipeline: 1 and 3 both 88.99%;
1, the middle of the plateau, kept); Ledoit & Wolf's own estimate would give about 0.16
here, tuned for the covariance, not for the graph. Also measured and not kept: the whitened
vectors for the classifier alone (88.66-88.81%: the penalised classifier already weighs
directions itself); a kNN graph rebuilt in the metric (89.14%, but a kNN search per fold) or
re-ranked among neighbours of neighbours (89.15% on 100-104, yet 88.84% against 88.82% for
re-weighting on samples 0-4, at three times the cost).

Costs of the metric, per fit (the run and each of its cross-check folds): one d x d
eigensolve, one (n, d) x (d, d) product, O(nnz * d) for the pairs' cosines and the
smoothing of the classifier's features over the new graph (which otherwise serves every
fold): sort_documents on the first 10,000 BANKING77 pool texts took 5.5 s of CPU against
4.4 s without (one thread, median of 4 alternating runs, vectors and graph prepared once:
+25%); the benchmark above prints the wall seconds of both on all 13,083 texts (samples 0-4:
9.2 s against 7.3 s on a shared machine).
"""

from __future__ import annotations

import numpy as np
import scipy.sparse as sp

from .spreading import normalised_affinity

#: Power of the kNN affinity weights of dense vectors before spreading (see the module docstring).
DENSE_AFFINITY_POWER = 8.0
#: Shrinkage of the seeds' within-class covariance toward the identity, in units of its mean
#: eigenvalue (:func:`within_class_whitening`; the seed metric of the module docstring).
SEED_METRIC_SHRINKAGE = 1.0
#: Pairs of rows whose cosine :func:`seed_metric_affinity` computes at a time: two float32
#: (pairs, d) gathers of 3 MB each at d = 384, which stay in cache; 65,536 at a time took
#: 0.23 s against 0.13 s for BANKING77's 13,083 rows (measured, one thread).
_ENTRIES_AT_A_TIME = 2_048


def is_dense(vectors: sp.spmatrix | np.ndarray) -> bool:
    """Whether ``vectors`` are dense rows (sentence embeddings) rather than sparse n-grams."""
    return not sp.issparse(vectors)


def sharpen_affinity(affinity: sp.spmatrix, power: float) -> sp.csr_matrix:
    """W ** power elementwise on the stored weights (zeros stay zero, the pattern is kept).

    Parameters
    ----------
    affinity:
        (n, n) symmetric non-negative W.
    power:
        > 0; 1 returns a CSR copy of W.

    Returns
    -------
    scipy.sparse.csr_matrix (n, n), same dtype as ``affinity``, symmetric when W is.
    Cost O(nnz(W)).
    """
    if not power > 0:
        raise ValueError(f"affinity power must be > 0, got {power}")
    out = sp.csr_matrix(affinity, copy=True)
    if np.any(out.data < 0):
        raise ValueError("affinity weights must be non-negative")
    out.data = out.data ** out.dtype.type(power)
    return out


def spreading_affinity(
    vectors: sp.spmatrix | np.ndarray, affinity: sp.spmatrix, power: float = DENSE_AFFINITY_POWER
) -> sp.spmatrix:
    """The affinity the spread (and the classifier's smoothing) runs on, by the kind of vectors.

    Dense vectors: :func:`sharpen_affinity` with ``power``. Sparse vectors: ``affinity``
    itself, unchanged (not a copy).
    """
    return sharpen_affinity(affinity, power) if is_dense(vectors) else affinity


def within_class_whitening(
    seed_vectors: np.ndarray, seed_classes: np.ndarray, shrinkage: float = SEED_METRIC_SHRINKAGE
) -> np.ndarray:
    """The seeds' shrunk within-class whitening, M = (S_w + lambda I)^(-1/2).

    S_w is the pooled within-class covariance of the seeds (Fisher 1936), sum over seeds of
    (x - m_c)(x - m_c)^T / (s - g) for s seeds in g categories with class means m_c; a
    category with one seed adds nothing. It is shrunk toward the identity (Ledoit & Wolf
    2004) by lambda = ``shrinkage`` * trace(S_w) / d, the mean eigenvalue times the given
    factor: with 10 seeds per category in 384 dimensions S_w has rank <= 693 - and is
    noisy in every direction - so unshrunk it would blow up its smallest directions.

    Parameters
    ----------
    seed_vectors:
        (s, d) dense rows of the seeds.
    seed_classes:
        (s,) category numbers.
    shrinkage:
        > 0.

    Returns
    -------
    (d, d) float64 symmetric positive definite M; the identity when the seeds have no
    within-class spread (every category one seed). Cost O(s d^2 + d^3): one eigensolve of a
    d x d matrix (0.1 s at d = 384).
    """
    if not shrinkage > 0:
        raise ValueError(f"shrinkage must be > 0, got {shrinkage}")
    z = np.asarray(seed_vectors, dtype=np.float64)
    classes = np.asarray(seed_classes)
    d = z.shape[1]
    groups, group_of = np.unique(classes, return_inverse=True)
    sums = np.zeros((groups.size, d))
    np.add.at(sums, group_of, z)
    residual = z - (sums / np.bincount(group_of)[:, None])[group_of]
    dof = z.shape[0] - groups.size
    within = residual.T @ residual / max(dof, 1)
    level = float(np.trace(within)) / d
    if not level > 0:
        return np.eye(d)
    eigenvalues, eigenvectors = np.linalg.eigh(within + shrinkage * level * np.eye(d))
    return (eigenvectors / np.sqrt(eigenvalues)) @ eigenvectors.T


def seed_metric_affinity(
    vectors: np.ndarray, pattern: sp.spmatrix, metric: np.ndarray, power: float = DENSE_AFFINITY_POWER
) -> sp.csr_matrix:
    """Re-weight a graph's stored entries by the cosine in a learnt metric, sharpened.

    W'[i, j] = max(0, cos(x_i M, x_j M)) ** power for every (i, j) stored in ``pattern``,
    where cos is the cosine similarity of the rows mapped by ``metric`` M; entries that
    ``pattern`` does not store stay zero (the neighbour lists are kept, their weights change).

    Parameters
    ----------
    vectors:
        (n, d) dense rows.
    pattern:
        (n, n) sparse; only its stored positions are used (its values are not).
    metric:
        (d, d), e.g. :func:`within_class_whitening`.
    power:
        > 0, as :func:`sharpen_affinity`.

    Returns
    -------
    (n, n) CSR of the dtype of ``pattern``, symmetric when the pattern is. Cost: one
    (n, d) x (d, d) product and O(nnz * d) for the entries (n d^2 + 2 n k d flops), with one
    extra (n, d) float32 array of the mapped rows.
    """
    if not power > 0:
        raise ValueError(f"affinity power must be > 0, got {power}")
    mapped = np.asarray(vectors, dtype=np.float32) @ np.asarray(metric, dtype=np.float32)
    norms = np.linalg.norm(mapped, axis=1)
    mapped /= np.where(norms > 0, norms, 1.0)[:, None]
    out = sp.csr_matrix(pattern, copy=True)
    n = out.shape[0]
    rows = np.repeat(np.arange(n, dtype=np.int64), np.diff(out.indptr))
    cols = out.indices.astype(np.int64)
    # The cosine is symmetric: each unordered pair once (half the gathers on a symmetric graph).
    pairs, where = np.unique(np.minimum(rows, cols) * n + np.maximum(rows, cols), return_inverse=True)
    first, second = pairs // n, pairs % n
    cosines = np.empty(pairs.size, dtype=np.float32)
    for start in range(0, pairs.size, _ENTRIES_AT_A_TIME):
        stop = start + _ENTRIES_AT_A_TIME
        cosines[start:stop] = np.einsum("ij,ij->i", mapped[first[start:stop]], mapped[second[start:stop]])
    out.data = (np.maximum(cosines[where].astype(np.float64), 0.0) ** power).astype(out.dtype)
    return out


def uses_seed_metric(vectors: sp.spmatrix | np.ndarray, shrinkage: float | None) -> bool:
    """Whether :func:`seed_spreading_graph` re-weights the graph for these vectors (so the
    graph, and the features smoothed over it, depend on the seeds)."""
    return is_dense(vectors) and shrinkage is not None


def seed_spreading_graph(
    vectors: sp.spmatrix | np.ndarray,
    normalised_graph: sp.csr_matrix,
    seed_rows: np.ndarray,
    seed_classes: np.ndarray,
    shrinkage: float | None = SEED_METRIC_SHRINKAGE,
    power: float = DENSE_AFFINITY_POWER,
) -> sp.csr_matrix:
    """The graph a run spreads and smooths over, given its seeds.

    Dense vectors: S' = D^-1/2 W' D^-1/2 (:func:`seedsort.spreading.normalised_affinity`)
    with W' the graph's neighbour lists re-weighted in the seeds' whitened metric
    (:func:`seed_metric_affinity` with :func:`within_class_whitening` of the seed rows and
    ``shrinkage``). Sparse vectors, ``shrinkage`` None, or fewer than two categories among
    the seeds: ``normalised_graph`` itself (not a copy).
    """
    if not uses_seed_metric(vectors, shrinkage) or np.unique(seed_classes).size < 2:
        return normalised_graph
    metric = within_class_whitening(np.asarray(vectors)[seed_rows], seed_classes, shrinkage)
    return normalised_affinity(seed_metric_affinity(vectors, normalised_graph, metric, power))
