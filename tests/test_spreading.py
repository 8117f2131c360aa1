"""Label spreading against scikit-learn's LabelSpreading and the closed form of Zhou et al.

References:

* ``sklearn.semi_supervised.LabelSpreading`` (sklearn/semi_supervised/_label_propagation.py):
  its graph is ``-laplacian(W, normed=True)`` with the diagonal zeroed, i.e.
  S = D^-1/2 W D^-1/2 for a W with zero diagonal; it starts from Y, iterates
  F <- alpha S F + (1 - alpha) Y and row-normalises F at the end (rows with no mass are
  left at zero there, uniform in seedsort's ``to_probabilities``). Deliberate differences:
  seedsort stops when the *largest* entry change is below tol, scikit-learn when the *sum*
  of changes is; and seedsort's "cg" solver reaches the same fixed point by conjugate
  gradient. So the test uses a connected graph and tight tolerances on both sides.
* Zhou, Bousquet, Lal, Weston & Schölkopf (2004), "Learning with Local and Global
  Consistency", NIPS 16: the iteration converges to F* = (1 - alpha)(I - alpha S)^-1 Y.
* Zhu, Ghahramani & Lafferty (2003), class mass normalisation: column j scaled to the
  category's prior share.
"""

from __future__ import annotations

import numpy as np
import pytest
import scipy.sparse as sp
from scipy.sparse.csgraph import connected_components
from sklearn.semi_supervised import LabelSpreading

from seedsort import spreading
from seedsort.errors import SpreadingNotConvergedWarning
from seedsort.graph import knn_cosine, symmetric_affinity
from seedsort.spreading import (
    class_mass_normalise,
    normalised_affinity,
    seed_matrix,
    spread_labels,
    to_probabilities,
)
from seedsort.vectors import vectorise

from conftest import TOPICS

SOLVERS = ["iterate", "cg"]


@pytest.fixture(scope="module")
def corpus_affinity() -> tuple[sp.csr_matrix, np.ndarray]:
    """kNN affinity of the forty topic sentences (k=6, connected) and their labels (-1 = unlabelled)."""
    texts = [s for group in TOPICS.values() for s in group]
    w = symmetric_affinity(knn_cosine(vectorise(texts), 6), len(texts))
    assert connected_components(w, directed=False)[0] == 1  # every row gets mass
    labels = np.full(len(texts), -1)
    for topic in range(len(TOPICS)):
        labels[[10 * topic, 10 * topic + 1]] = topic  # two seeds per topic
    return w, labels


def _random_symmetric(n: int, seed: int, density: float = 0.3) -> sp.csr_matrix:
    """A random sparse symmetric non-negative W with zero diagonal, made connected by a path."""
    rng = np.random.default_rng(seed)
    upper = sp.random(n, n, density=density, random_state=rng, format="csr")
    w = sp.triu(upper, k=1)
    w = w + w.T + sp.diags(np.full(n - 1, 0.5), 1) + sp.diags(np.full(n - 1, 0.5), -1)
    return sp.csr_matrix(w)


def _sklearn_label_spreading(w: sp.csr_matrix, labels: np.ndarray, alpha: float) -> np.ndarray:
    """Reference: sklearn LabelSpreading with a callable kernel returning the fixed W."""
    dense = w.toarray().astype(np.float64)
    model = LabelSpreading(kernel=lambda a, b: dense, alpha=alpha, max_iter=100_000, tol=1e-11)
    model.fit(np.arange(len(labels), dtype=float).reshape(-1, 1), labels)
    return model.label_distributions_


@pytest.mark.parametrize("solver", SOLVERS)
@pytest.mark.parametrize("alpha", [0.2, 0.9, 0.99])
def test_matches_sklearn_label_spreading_on_knn_graph(corpus_affinity, solver: str, alpha: float) -> None:
    """Reference: sklearn.semi_supervised.LabelSpreading(kernel=<W>, alpha) label_distributions_."""
    w, labels = corpus_affinity
    expected = _sklearn_label_spreading(w, labels, alpha)
    seeds = np.flatnonzero(labels >= 0)
    y = seed_matrix(seeds, labels[seeds], len(labels), len(TOPICS))
    # The same W on both sides, normalised in float64 as scikit-learn does: S rounded to
    # float32 errs by ~6e-8 relative, which alpha 0.99 amplifies past this check's 1e-7.
    s = normalised_affinity(sp.csr_matrix(w, dtype=np.float64))
    result = spread_labels(s, y, alpha=alpha, tol=1e-13, max_iter=100_000, solver=solver)
    assert result.converged
    probs, mass = to_probabilities(result.scores)
    assert np.all(mass > 0)
    np.testing.assert_allclose(probs, expected, atol=1e-7)


@pytest.mark.parametrize("solver", SOLVERS)
def test_matches_sklearn_label_spreading_on_random_graph(solver: str) -> None:
    """Reference: sklearn LabelSpreading on a random weighted symmetric W (three classes)."""
    w = _random_symmetric(30, seed=3)
    labels = np.full(30, -1)
    labels[[0, 7]], labels[[12, 20]], labels[[25]] = 0, 1, 2  # a category with one seed
    expected = _sklearn_label_spreading(w, labels, 0.8)
    seeds = np.flatnonzero(labels >= 0)
    y = seed_matrix(seeds, labels[seeds], 30, 3)
    result = spread_labels(normalised_affinity(w), y, alpha=0.8, tol=1e-13, max_iter=100_000, solver=solver)
    np.testing.assert_allclose(to_probabilities(result.scores)[0], expected, atol=1e-7)


def test_normalised_affinity_is_d_half_w_d_half() -> None:
    """Reference: Zhou et al. (2004) S = D^-1/2 W D^-1/2, computed densely with numpy; isolated rows stay 0."""
    w = _random_symmetric(12, seed=1).toarray()
    w[11, :] = w[:, 11] = 0.0  # an isolated node
    degree = w.sum(axis=1)
    inv = np.where(degree > 0, 1 / np.sqrt(np.where(degree > 0, degree, 1)), 0.0)
    expected = inv[:, None] * w * inv[None, :]
    s = normalised_affinity(sp.csr_matrix(w))
    np.testing.assert_allclose(s.toarray(), expected, atol=1e-12)
    assert s.dtype == np.float64
    assert normalised_affinity(sp.csr_matrix(w, dtype=np.float32)).dtype == np.float32


@pytest.mark.parametrize("solver", SOLVERS)
@pytest.mark.parametrize("alpha", [0.0, 0.5, 0.95])
def test_converges_to_zhou_closed_form(solver: str, alpha: float) -> None:
    """Reference: Zhou et al. (2004), F* = (1 - alpha)(I - alpha S)^-1 Y, via numpy.linalg.solve."""
    n = 15
    s = normalised_affinity(_random_symmetric(n, seed=7))
    y = seed_matrix(np.array([0, 4, 9]), np.array([0, 1, 1]), n, 2)
    expected = (1 - alpha) * np.linalg.solve(np.eye(n) - alpha * s.toarray(), y)
    result = spread_labels(s, y, alpha=alpha, tol=1e-12, max_iter=10_000, solver=solver)
    assert result.converged
    np.testing.assert_allclose(result.scores, expected, atol=1e-9)


@pytest.mark.parametrize("solver", SOLVERS)
def test_hitting_the_cap_warns_and_reports_not_converged(solver: str) -> None:
    """Reference: scikit-learn's convention (warn ConvergenceWarning at max_iter, do not raise)."""
    s = normalised_affinity(_random_symmetric(40, seed=2, density=0.05))
    y = seed_matrix(np.array([0, 39]), np.array([0, 1]), 40, 2)
    with pytest.warns(SpreadingNotConvergedWarning, match="cap of 2 iterations"):
        result = spread_labels(s, y, alpha=0.99, tol=1e-14, max_iter=2, solver=solver)
    assert not result.converged
    assert np.all(np.isfinite(result.scores))


def test_bad_alpha_and_solver_are_rejected() -> None:
    """Reference: Zhou et al. (2004) require 0 <= alpha < 1 for (I - alpha S) to be invertible."""
    s = normalised_affinity(_random_symmetric(5, seed=0))
    y = seed_matrix(np.array([0, 1]), np.array([0, 1]), 5, 2)
    with pytest.raises(ValueError, match="alpha"):
        spread_labels(s, y, alpha=1.0)
    with pytest.raises(ValueError, match="solver"):
        spread_labels(s, y, solver="magic")


def test_class_mass_normalise_matches_the_given_shares() -> None:
    """Reference: Zhu, Ghahramani & Lafferty (2003) class mass normalisation, checked by arithmetic."""
    scores = np.array([[0.6, 0.1, 0.0], [0.3, 0.2, 0.0], [0.1, 0.7, 0.0]])
    share = np.array([0.5, 0.3, 0.2])
    out = class_mass_normalise(scores, share)
    # Column totals: 1.0 and 1.0 before; scaled to 0.5 and 0.3; the empty column stays 0.
    np.testing.assert_allclose(out.sum(axis=0), [0.5, 0.3, 0.0])
    np.testing.assert_allclose(out[:, 0], scores[:, 0] * 0.5)
    np.testing.assert_allclose(out[:, 1], scores[:, 1] * 0.3)
    totals = out.sum(axis=0)[:2]
    np.testing.assert_allclose(totals / totals.sum(), share[:2] / share[:2].sum())


def test_to_probabilities_rows_sum_to_one_or_are_uniform() -> None:
    """Common practice: row normalisation; a row with no mass carries no evidence, so uniform."""
    probs, mass = to_probabilities(np.array([[2.0, 2.0, 4.0], [0.0, 0.0, 0.0], [-1e-12, 1.0, 0.0]]))
    np.testing.assert_allclose(probs, [[0.25, 0.25, 0.5], [1 / 3, 1 / 3, 1 / 3], [0.0, 1.0, 0.0]])
    np.testing.assert_allclose(mass, [8.0, 0.0, 1.0])


@pytest.mark.parametrize("rows_at_a_time", [1, 2, 50])
def test_to_probabilities_in_place_and_in_blocks_gives_the_same_values(rows_at_a_time: int) -> None:
    """Invariant: normalising over the scores' own memory, a block of rows at a time, gives
    exactly the values of the copying route (each row is normalised on its own)."""
    scores = np.random.default_rng(5).normal(size=(9, 4))
    scores[3] = 0.0  # no mass: uniform
    expected_probs, expected_mass = to_probabilities(scores)
    work = scores.copy()
    probs, mass = to_probabilities(work, in_place=True, rows_at_a_time=rows_at_a_time)
    assert probs is work
    np.testing.assert_array_equal(probs, expected_probs)
    np.testing.assert_array_equal(mass, expected_mass)
    np.testing.assert_allclose(probs.sum(axis=1), 1.0)


@pytest.mark.parametrize("float32_from", [0, 10**9])
def test_sparse_seed_matrix_gives_the_dense_one_and_the_same_scores(corpus_affinity, monkeypatch, float32_from: int) -> None:
    """Invariant: Y as a CSR matrix holds the dense Y's values (balanced weights included) and
    spreads to exactly the same scores, on the float32 route (size limit lowered) and the
    float64 one; only its memory differs."""
    monkeypatch.setattr(spreading, "FLOAT32_MIN_DOCUMENTS", float32_from)
    monkeypatch.setattr(spreading, "ROWS_AT_A_TIME", 7)
    w, labels = corpus_affinity
    s32 = normalised_affinity(sp.csr_matrix(w, dtype=np.float32))
    seeds = np.flatnonzero(labels >= 0)[:-1]  # unequal seed counts: balanced weights differ
    dense = seed_matrix(seeds, labels[seeds], w.shape[0], len(TOPICS), balanced=True)
    sparse = seed_matrix(seeds, labels[seeds], w.shape[0], len(TOPICS), balanced=True, sparse=True)
    assert sp.issparse(sparse) and sparse.nnz == seeds.size
    np.testing.assert_array_equal(sparse.toarray(), dense)
    np.testing.assert_array_equal(spread_labels(s32, sparse).scores, spread_labels(s32, dense).scores)


def test_float32_run_from_a_guess_meets_the_closed_form(corpus_affinity, monkeypatch) -> None:
    """Reference: Zhou et al. (2004) closed form, solved in float64 by numpy.linalg.solve.
    The float32 route renumbers Y and the guess into float32 a few rows at a time and checks
    the result in float64 in the collection's order; the scores stay within a few tol."""
    monkeypatch.setattr(spreading, "FLOAT32_MIN_DOCUMENTS", 0)
    w, labels = corpus_affinity
    s32 = normalised_affinity(sp.csr_matrix(w, dtype=np.float32))
    seeds = np.flatnonzero(labels >= 0)
    y = seed_matrix(seeds, labels[seeds], w.shape[0], len(TOPICS))
    alpha, tol = 0.99, 1e-6
    expected = (1 - alpha) * np.linalg.solve(np.eye(w.shape[0]) - alpha * s32.toarray().astype(np.float64), y)
    cold = spread_labels(s32, y, alpha=alpha, tol=tol)
    monkeypatch.setattr(spreading, "ROWS_AT_A_TIME", 7)
    guess = expected + 0.01 * ((1 - alpha) * y - expected)
    warm = spread_labels(s32, y, alpha=alpha, tol=tol, initial=guess)
    assert warm.converged and warm.scores.dtype == np.float64 and warm.iterations < cold.iterations
    np.testing.assert_allclose(warm.scores, expected, atol=10 * tol)


@pytest.mark.parametrize("solver", SOLVERS)
def test_float32_graph_meets_the_tolerance_of_the_float64_closed_form(corpus_affinity, solver: str, monkeypatch) -> None:
    """Reference: Zhou et al. (2004) closed form, solved in float64 by numpy.linalg.solve.

    A float32 S at the default tolerance runs CG's products in float32 (here on a small
    graph, the size limit lowered) and checks the result in float64: the scores must still
    be within a few tol of the float64 fixed point."""
    monkeypatch.setattr(spreading, "FLOAT32_MIN_DOCUMENTS", 0)
    w, labels = corpus_affinity
    s32 = normalised_affinity(sp.csr_matrix(w, dtype=np.float32))
    assert s32.dtype == np.float32
    seeds = np.flatnonzero(labels >= 0)
    y = seed_matrix(seeds, labels[seeds], w.shape[0], len(TOPICS))
    alpha, tol = 0.99, 1e-6
    expected = (1 - alpha) * np.linalg.solve(np.eye(w.shape[0]) - alpha * s32.toarray().astype(np.float64), y)
    result = spread_labels(s32, y, alpha=alpha, tol=tol, max_iter=100_000, solver=solver)
    assert result.converged and result.scores.dtype == np.float64
    # The iteration's stopping rule bounds the step, not the error: (alpha / (1 - alpha)) * tol.
    bound = tol if solver == "cg" else tol * alpha / (1 - alpha)
    np.testing.assert_allclose(result.scores, expected, atol=10 * bound)


@pytest.mark.parametrize("solver", SOLVERS)
def test_a_close_initial_guess_reaches_the_same_fixed_point_in_fewer_products(solver: str) -> None:
    """Reference: Zhou et al. (2004) closed form. Both solvers' errors shrink linearly from
    their start (iterate: by (alpha S)^k; CG: its residual), so a guess a hundred times closer
    than the default start (Y, or (1 - alpha) Y for CG) needs fewer products."""
    n, alpha = 60, 0.95
    s = normalised_affinity(_random_symmetric(n, seed=3, density=0.08))
    y = seed_matrix(np.array([0, 7, 19, 33, 48]), np.array([0, 1, 1, 0, 1]), n, 2)
    expected = (1 - alpha) * np.linalg.solve(np.eye(n) - alpha * s.toarray(), y)
    default_start = y if solver == "iterate" else (1 - alpha) * y
    guess = expected + 0.01 * (default_start - expected)
    cold = spread_labels(s, y, alpha=alpha, tol=1e-12, max_iter=100_000, solver=solver)
    warm = spread_labels(s, y, alpha=alpha, tol=1e-12, max_iter=100_000, solver=solver, initial=guess)
    assert warm.converged and warm.iterations < cold.iterations
    np.testing.assert_allclose(warm.scores, expected, atol=1e-9)
    exact = spread_labels(s, y, alpha=alpha, tol=1e-12, solver=solver, initial=expected)
    assert exact.iterations == 1  # already at the fixed point: one check, no step


@pytest.mark.parametrize("rows_at_a_time", [1, 7, 1000])
def test_blockwise_float64_check_is_the_residual_of_the_linear_system(rows_at_a_time: int) -> None:
    """Reference: the residual of Zhou et al.'s (2004) linear system (I - alpha S) F = (1 - alpha) Y,
    computed densely in float64 by numpy; the block-wise check on a float32 S must agree on
    which side of the tolerance each candidate F lies (the exact solution, and one nudged)."""
    from seedsort.spreading import _residual_below

    w = _random_symmetric(40, seed=3)
    s32 = normalised_affinity(sp.csr_matrix(w, dtype=np.float32))
    y = seed_matrix(np.array([0, 1, 2, 3]), np.array([0, 1, 2, 0]), 40, 3)
    alpha = 0.9
    dense = s32.toarray().astype(np.float64)
    exact = (1 - alpha) * np.linalg.solve(np.eye(40) - alpha * dense, y)
    for candidate in (exact, exact + 1e-3):
        residual = (1 - alpha) * y - (candidate - alpha * dense @ candidate)
        norm = float(np.sqrt((residual**2).sum(axis=0)).max())
        for tol in (norm * 0.5, norm * 2.0):
            assert _residual_below(s32, y, candidate, alpha, tol, rows_at_a_time) == (norm < tol)


@pytest.mark.parametrize("solver", SOLVERS)
def test_progress_counts_every_product_and_ends_at_the_total(solver: str) -> None:
    """Progress (common practice for progress bars): one report per sparse product, counts
    rising, each estimated total at least the count so far, the last report (done, done)
    with done the products the result states."""
    w = _random_symmetric(60, seed=5)
    y = seed_matrix(np.array([0, 1, 2]), np.array([0, 1, 2]), 60, 3)
    seen: list[tuple[str, int, int | None]] = []
    result = spread_labels(normalised_affinity(w), y, alpha=0.9, tol=1e-9, max_iter=5000, solver=solver,
                           on_progress=lambda stage, done, total: seen.append((stage, done, total)))
    assert {stage for stage, _, _ in seen} == {"spread"}
    done = [d for _, d, _ in seen]
    assert done == sorted(done) and all(total is not None and total >= d for _, d, total in seen)
    assert seen[-1] == ("spread", result.iterations, result.iterations)
