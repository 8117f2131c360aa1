"""Label spreading over a neighbour graph (pure functions).

Label spreading (Zhou, Bousquet, Lal, Weston & Schölkopf 2004, "Learning with Local and
Global Consistency") with the symmetric normalisation S = D^-1/2 W D^-1/2 iterates

    F <- alpha * S @ F + (1 - alpha) * Y

from F = Y, where Y is the one-hot seed matrix (zero rows for unlabelled documents). It
converges to the closed form F* = (1 - alpha) (I - alpha S)^-1 Y. Each iteration costs one
sparse product, O(nnz(W) * c) for c categories, i.e. O(n * k * c) on a kNN graph.

Two solvers reach that fixed point:

``iterate``
    the iteration above, stopped when the largest change of any entry falls below ``tol``.
``cg``
    conjugate gradient on (I - alpha S) F = (1 - alpha) Y, all categories' columns at once;
    the matrix is symmetric positive definite for 0 <= alpha < 1, and CG needs far fewer
    sparse products than plain iteration when alpha is close to 1 (on BANKING77, ~40 instead
    of ~3,400 at alpha 0.99, measured).

Class mass normalisation (Zhu, Ghahramani & Lafferty 2003) rescales each category's column
so its total mass matches the category's share among the seeds, countering categories with
more seeds or denser neighbourhoods soaking up documents.
"""

from __future__ import annotations

import warnings
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp

from .errors import SpreadingNotConvergedWarning


@dataclass(frozen=True, slots=True)
class SpreadResult:
    """Unnormalised spread scores.

    Attributes
    ----------
    scores:
        float array (n, c): F, the spread label mass of each category per document.
    iterations:
        Sparse products used.
    converged:
        Whether the tolerance was reached before the cap.
    """

    scores: np.ndarray
    iterations: int
    converged: bool


def normalised_affinity(affinity: sp.spmatrix) -> sp.csr_matrix:
    """S = D^-1/2 W D^-1/2 for a symmetric non-negative W (isolated rows stay zero).

    Returns
    -------
    scipy.sparse.csr_matrix (n, n), same dtype as ``affinity`` (float32 or float64).
    """
    w = sp.csr_matrix(affinity)
    degree = np.asarray(w.sum(axis=1)).ravel()
    with np.errstate(divide="ignore"):
        inv_sqrt = np.where(degree > 0, 1.0 / np.sqrt(degree), 0.0).astype(w.dtype)
    d = sp.diags(inv_sqrt)
    return (d @ w @ d).tocsr()


def seed_matrix(
    seed_rows: np.ndarray, seed_classes: np.ndarray, n: int, n_classes: int, *, balanced: bool = False
) -> np.ndarray:
    """Y (n, c): row ``seed_rows[i]`` has a 1 in column ``seed_classes[i]`` (one-hot).

    With ``balanced``, the seeds of category j weigh (s / m) / s_j each (s seeds in all, m
    categories with seeds, s_j of category j), so every category injects the same total
    mass and the whole of Y still sums to s. With equal seed counts this is the one-hot Y
    exactly; with unequal counts it stops the category with most seeds from flooding the
    graph (at alpha near 1 the solution tends to the graph's stationary component scaled by
    each column's total). Measured on a BANKING77 pile after ten corrections: graph-only
    accuracy 23-30% one-hot, 82-84% balanced. Keeping the total at s keeps spread mass on
    one scale between a run and its cross-check folds (the out-of-scope score compares them).
    """
    y = np.zeros((n, n_classes), dtype=np.float64)
    classes = np.asarray(seed_classes, dtype=np.int64)
    y[np.asarray(seed_rows, dtype=np.int64), classes] = 1.0
    if balanced and classes.size:
        counts = np.bincount(classes, minlength=n_classes).astype(np.float64)
        present = counts > 0
        weight = np.zeros(n_classes)
        weight[present] = (classes.size / present.sum()) / counts[present]
        y *= weight
    return y


def _iterate(s: sp.csr_matrix, y: np.ndarray, alpha: float, tol: float, max_iter: int) -> SpreadResult:
    base = (1.0 - alpha) * y
    f = y.copy()
    for iteration in range(1, max_iter + 1):
        nxt = alpha * (s @ f) + base
        change = float(np.max(np.abs(nxt - f))) if f.size else 0.0
        f = nxt
        if change < tol:
            return SpreadResult(f, iteration, True)
    return SpreadResult(f, max_iter, False)


def _conjugate_gradient(s: sp.csr_matrix, y: np.ndarray, alpha: float, tol: float, max_iter: int) -> SpreadResult:
    """Conjugate gradient on every category's column at once (independent CG runs, vectorised).

    Each step is one sparse product with the whole (n, c) block, so the cost per step is
    the same as one step of plain iteration, and far fewer steps are needed. Stops when
    every column's residual norm is below ``tol``.
    """
    rhs = (1.0 - alpha) * y
    # Start from the rhs itself: the first term of the Neumann series of the inverse.
    x = rhs.copy()
    r = rhs - (x - alpha * (s @ x))
    p = r.copy()
    rs = np.einsum("ij,ij->j", r, r)
    if not rs.size or np.sqrt(rs.max()) < tol:
        return SpreadResult(x, 1, True)
    for step in range(1, max_iter + 1):
        ap = p - alpha * (s @ p)
        curvature = np.einsum("ij,ij->j", p, ap)
        with np.errstate(divide="ignore", invalid="ignore"):
            length = np.where(curvature > 0, rs / curvature, 0.0)
        x += p * length
        r -= ap * length
        rs_next = np.einsum("ij,ij->j", r, r)
        if np.sqrt(rs_next.max()) < tol:
            return SpreadResult(x, step + 1, True)
        with np.errstate(divide="ignore", invalid="ignore"):
            p = r + p * np.where(rs > 0, rs_next / rs, 0.0)
        rs = rs_next
    return SpreadResult(x, max_iter + 1, False)


#: Solver name -> function; all reach the same fixed point.
SOLVERS: dict[str, Callable[[sp.csr_matrix, np.ndarray, float, float, int], SpreadResult]] = {
    "iterate": _iterate,
    "cg": _conjugate_gradient,
}


def spread_labels(
    s: sp.csr_matrix,
    y: np.ndarray,
    *,
    alpha: float = 0.99,
    tol: float = 1e-6,
    max_iter: int = 1000,
    solver: str = "cg",
) -> SpreadResult:
    """Spread seed labels Y over the normalised graph S.

    Parameters
    ----------
    s:
        (n, n) CSR, the output of :func:`normalised_affinity`.
    y:
        (n, c) one-hot seed matrix (see :func:`seed_matrix`).
    alpha:
        Weight of the neighbours against the document's own seed label, in [0, 1).
    tol:
        Absolute tolerance on the scores.
    max_iter:
        Iteration cap; reaching it warns :class:`SpreadingNotConvergedWarning`.
    solver:
        ``"cg"`` or ``"iterate"`` (see module docstring).
    """
    if not 0.0 <= alpha < 1.0:
        raise ValueError(f"alpha must be in [0, 1), got {alpha}")
    try:
        run = SOLVERS[solver]
    except KeyError:
        raise ValueError(f"unknown solver {solver!r}; choose one of {sorted(SOLVERS)}") from None
    result = run(s.astype(np.float64) if s.dtype != np.float64 else s, np.asarray(y, dtype=np.float64), alpha, tol, max_iter)
    if not result.converged:
        warnings.warn(
            f"Label spreading stopped at its cap of {max_iter} iterations before reaching "
            f"tolerance {tol:g}; results are usable but not fully converged.",
            SpreadingNotConvergedWarning,
            stacklevel=2,
        )
    return result


def class_mass_normalise(scores: np.ndarray, seed_share: np.ndarray) -> np.ndarray:
    """Class mass normalisation (Zhu, Ghahramani & Lafferty 2003).

    Scales column j of the non-negative ``scores`` by ``seed_share[j] / mass[j]`` where
    ``mass[j]`` is the column's total, so that each category's total mass is proportional
    to its prior (its share among the seeds). Columns with no mass stay zero.
    """
    mass = scores.sum(axis=0)
    with np.errstate(divide="ignore", invalid="ignore"):
        scale = np.where(mass > 0, np.asarray(seed_share, dtype=float) / mass, 0.0)
    return scores * scale


def to_probabilities(scores: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Row-normalise non-negative scores into probabilities.

    Returns
    -------
    (probabilities, mass): probabilities (n, c) rows sum to 1 where ``mass > 0``; rows with
    no mass are uniform. ``mass`` (n,) is the row total before normalising.
    """
    scores = np.clip(scores, 0.0, None)
    mass = scores.sum(axis=1)
    c = scores.shape[1]
    probs = np.full_like(scores, 1.0 / c if c else 0.0)
    has = mass > 0
    probs[has] = scores[has] / mass[has, None]
    return probs, mass
