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
"""

from __future__ import annotations

import numpy as np
import scipy.sparse as sp

#: Power of the kNN affinity weights of dense vectors before spreading (see the module docstring).
DENSE_AFFINITY_POWER = 8.0


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
