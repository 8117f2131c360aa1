"""Graph + seed classifier: the two views of the seeds, combined.

Label spreading is strong where documents form dense neighbourhoods (long texts, many
near-paraphrases); a classifier trained on the seeds is strong where documents share few
words with each other but the seed vocabulary separates the categories (short queries).
seedsort blends their probability rows log-linearly:

    P ∝ P_graph^w * P_classifier^(1 - w)

with w chosen per run from the seeds (one-standard-error rule around 0.5). On BANKING77 at
10 seeds per category this blend beats either view alone (measured; see README "Accuracy").
The classifier is multinomial logistic regression (scikit-learn, newton-cg) on the same
vectors; it costs one fit on the seeds and one product over the collection.

:func:`cross_check` re-runs both views with each fold of the seeds held out, giving every
seed a prediction made without it: the basis for flagging possible mislabelled seeds and
for an estimate of the run's accuracy. A fold costs one spread (started from the full
run's solution) and one classifier fit; only the fold's own seeds are predicted.

On dense vectors (sentence embeddings) the classifier is fitted on graph-smoothed features
(:func:`smooth_features`): each document's vector averaged with its neighbourhood's, the
feature propagation of simplified graph convolution (Wu et al. 2019). A seed then carries
what its neighbours look like, not only itself; on BANKING77 at 10 seeds per category the
classifier alone rose from 85.3% to 87.9% (measured on sampling seeds 100-102, kept apart
from the 0-4 of benchmarks/embedding_accuracy.py, which gives the whole pipeline's figures).
It costs two products of the sparse graph with the (n, d) matrix per fit, O(n * k * d).
Sparse n-gram vectors stay as they are: smoothing makes their rows several times denser
and every fit slower.
"""

from __future__ import annotations

import warnings
from dataclasses import dataclass, replace

import numpy as np
import scipy.sparse as sp
from sklearn.exceptions import ConvergenceWarning
from sklearn.linear_model import LogisticRegression
from sklearn.preprocessing import normalize

from ._progress import ProgressCallback, no_progress
from .dense import SEED_METRIC_SHRINKAGE, is_dense, seed_spreading_graph, uses_seed_metric
from .spreading import (
    ROWS_AT_A_TIME,
    SpreadResult,
    class_mass_normalise,
    seed_matrix,
    solves_in_float32,
    spread_labels,
    to_probabilities,
)


DEFAULT_GRAPH_WEIGHT = 0.5
#: Graph weights tried when the weight is tuned from the seeds.
GRAPH_WEIGHT_GRID = tuple(round(w, 2) for w in np.linspace(0.0, 1.0, 11))
#: Smoothing steps of the classifier's features on dense vectors when none are set.
DENSE_FEATURE_SMOOTHING = 2
#: Default spreading tolerance of the cross-check's folds (ModelSettings.cross_check_tol;
#: the full run keeps ModelSettings.tol). The folds feed statistics over the seeds (the
#: graph weight, the temperature, the accuracy estimate, seed checks), not any document's
#: reported confidence. On 30,000 generated tickets (77 categories, 10 seeds each;
#: ``benchmarks/scale.py --cross-check-tolerance 30000``) 1e-4 against 1e-6 took 108 sparse
#: products in place of 195, chose the same weight, moved the temperature by 0.0001, held-out
#: probabilities by at most 0.0016 and one seed's check.
CROSS_CHECK_TOLERANCE = 1e-4


@dataclass(frozen=True, slots=True)
class ModelSettings:
    """Settings of the spreading + classifier model (the vectors and graph are given).

    ``graph_weight`` None means: choose it per run from the seeds (:func:`choose_graph_weight`);
    where no choice is possible, :data:`DEFAULT_GRAPH_WEIGHT` is used.

    ``feature_smoothing`` is the number of graph steps the classifier's features are
    smoothed over (:func:`smooth_features`); None means by the kind of vectors:
    :data:`DENSE_FEATURE_SMOOTHING` for dense vectors (embeddings), 0 for sparse n-grams.

    ``classifier_strength`` is the inverse L2 penalty C of the seed classifier on sparse
    vectors, ``dense_classifier_strength`` on dense ones (:meth:`strength`). Dense features
    are unit rows in a few hundred dimensions that all weigh in: a weaker penalty fits the
    seeds' differences better. On BANKING77 at 10 seeds per category (sampling seeds
    100-104, the plain 10-NN graph, blend weight 0.5, features smoothed 2 steps) C 3, 10,
    30, 100 gave the classifier 87.05%, 87.83%, 87.99%, 87.87% and the blend 87.62%,
    88.19%, 88.48%, 88.38% (measured).

    ``tol`` is the spreading tolerance of the run; ``cross_check_tol`` that of the
    cross-check's folds (:func:`cross_check`), looser by default because the folds only feed
    statistics over the seeds.

    ``seed_metric_shrinkage``: on dense vectors the graph's weights are re-computed in the
    seeds' shrunk within-class whitened metric (:func:`seedsort.dense.seed_spreading_graph`,
    each cross-check fold from its own training seeds); None keeps the prepared graph.
    """

    alpha: float = 0.99
    graph_weight: float | None = None
    classifier_strength: float = 10.0
    dense_classifier_strength: float = 30.0
    class_mass_normalisation: bool = False
    solver: str = "cg"
    tol: float = 1e-6
    max_iter: int = 1000
    feature_smoothing: int | None = None
    cross_check_tol: float = CROSS_CHECK_TOLERANCE
    seed_metric_shrinkage: float | None = SEED_METRIC_SHRINKAGE

    def smoothing_steps(self, vectors: sp.spmatrix | np.ndarray) -> int:
        """Feature smoothing steps for these vectors (resolves None by their kind)."""
        if self.feature_smoothing is not None:
            return self.feature_smoothing
        return DENSE_FEATURE_SMOOTHING if is_dense(vectors) else 0

    def strength(self, vectors: sp.spmatrix | np.ndarray) -> float:
        """The classifier's C: ``classifier_strength`` for sparse vectors, else ``dense_classifier_strength``."""
        return self.dense_classifier_strength if is_dense(vectors) else self.classifier_strength


@dataclass(frozen=True, slots=True)
class Prediction:
    """Probabilities of every category for every document.

    Attributes
    ----------
    probabilities:
        (n, c) float64, rows sum to 1 (the blend).
    graph_mass:
        (n,) spread label mass before normalising; ~0 means no seed reaches the document.
    spread_iterations:
        Sparse products the spreading solver used.
    """

    probabilities: np.ndarray
    graph_mass: np.ndarray
    spread_iterations: int


def classifier_probabilities(
    vectors: sp.csr_matrix | np.ndarray,
    seed_rows: np.ndarray,
    seed_classes: np.ndarray,
    n_classes: int,
    strength: float,
    rows: np.ndarray | None = None,
) -> np.ndarray:
    """Logistic regression fitted on the seed rows, probabilities for all rows (or ``rows``).

    Categories absent from ``seed_classes`` (possible in cross-validation folds) get
    probability 0. Returns (n, n_classes) float64, or (len(rows), n_classes) when ``rows``
    is given: a held-out fold needs its own few rows only, and applying the model to them
    alone saves the O(nnz) product over the collection.
    """
    present = np.unique(seed_classes)
    target = vectors if rows is None else vectors[np.asarray(rows, dtype=np.int64)]
    out = np.zeros((target.shape[0], n_classes), dtype=np.float64)
    if present.size == 1:
        out[:, present[0]] = 1.0
        return out
    train = vectors[seed_rows]
    # Only features some seed has can get a non-zero weight under the L2 penalty, so fitting
    # on those columns gives the same model, about 3x faster on BANKING77 (measured).
    used = None
    if sp.issparse(train):
        used = np.unique(sp.csr_matrix(train).indices)
        train = train[:, used]
    # newton-cg reaches the same optimum as lbfgs in a few Newton steps: ~7x faster on
    # BANKING77's 770 seeds x 77 categories (1.7 s against 12.8 s, measured).
    # Balanced class weights, as for the spread: with equal seed counts this is the plain fit.
    model = LogisticRegression(C=strength, max_iter=2000, solver="newton-cg", class_weight="balanced")
    with warnings.catch_warnings():
        # A handful of seeds can leave the solver a little short of its tolerance; the probabilities are fine.
        warnings.simplefilter("ignore", ConvergenceWarning)
        model.fit(train, seed_classes)
    # A block of rows at a time: the seed columns of the rows (a copy of the vectors' entries
    # there), predict_proba's (rows, c) decision values and its softmax are temporaries the
    # size of their input (2.5 GB and 0.6 GB each at 1,000,000 documents x 77 categories).
    for start in range(0, target.shape[0], ROWS_AT_A_TIME):
        part = target[start : start + ROWS_AT_A_TIME]
        if used is not None:
            part = sp.csr_matrix(part)[:, used]
        out[start : start + ROWS_AT_A_TIME, model.classes_] = model.predict_proba(part)
    return out


def smooth_features(
    vectors: sp.csr_matrix | np.ndarray,
    normalised_graph: sp.csr_matrix,
    steps: int,
    own_weight: float = 1.0,
) -> sp.csr_matrix | np.ndarray:
    """Features averaged over the neighbour graph: normalise(own_weight * X + normalise(S^K X)).

    S^K X is the feature propagation of simplified graph convolution (Wu, Souza, Zhang,
    Fifty, Yu & Weinberger 2019, "Simplifying Graph Convolutional Networks", whose
    classifier is softmax(S^K X Theta)), here with the graph's own S = D^-1/2 W D^-1/2 in
    place of their self-looped version; normalise() scales rows to unit L2 norm (zero rows
    stay zero). Adding the document's own vector back keeps what sets it apart from its
    neighbours: with ``own_weight`` 1 the classifier alone scored 87.9% on BANKING77 at 10
    seeds per category against 87.7% for the self-looped S^2 X of the paper (measured,
    sampling seeds 100-102). ``own_weight`` 0 gives normalise(S^K X).

    Parameters
    ----------
    vectors:
        (n, d) rows, dense or CSR.
    normalised_graph:
        (n, n) CSR, S from :func:`seedsort.spreading.normalised_affinity`.
    steps:
        K >= 0; 0 returns ``vectors`` unchanged.

    Returns
    -------
    (n, d), of the same kind as ``vectors``. Cost: K sparse products, O(K * nnz(S) * d)
    for dense vectors; a document without neighbours keeps its own vector.
    """
    if steps < 0:
        raise ValueError(f"smoothing steps must be >= 0, got {steps}")
    if steps == 0:
        return vectors
    spread = vectors
    for _ in range(steps):
        spread = normalised_graph @ spread
    mixed = own_weight * vectors + normalize(spread)
    out = normalize(mixed)
    return out if sp.issparse(out) else np.asarray(out, dtype=np.asarray(vectors).dtype)


@dataclass(frozen=True, slots=True)
class Views:
    """The two opinions on every document, before they are blended.

    Attributes
    ----------
    graph:
        (m, c) spread probabilities (uniform where the graph has no mass).
    mass:
        (m,) spread label mass before normalising.
    classifier:
        (m, c) seed-classifier probabilities.
    spread_iterations:
        Sparse products the spreading solver used.
    """

    graph: np.ndarray
    mass: np.ndarray
    classifier: np.ndarray
    spread_iterations: int

    def spread_scores(self) -> np.ndarray:
        """(m, c) the spread scores behind ``graph``: graph * mass (clipped at 0, zero where unreached)."""
        return self.graph * self.mass[:, None]

    def blend(self, graph_weight: float) -> np.ndarray:
        """Log-linear blend P ∝ P_graph^w * P_classifier^(1-w), rows summing to 1.

        The classifier alone where the graph has no mass. A geometric rather than arithmetic
        mean: on BANKING77 it scored 0.3-0.6 points higher at 5, 10 and 30 seeds per
        category at no extra cost (measured, mean of 5 samples).
        """
        w_rows = np.where(self.mass > 0, graph_weight, 0.0)[:, None]
        return _probabilities_from_logs(w_rows * _log(self.graph) + (1.0 - w_rows) * _log(self.classifier))


#: Probabilities are clipped here before a logarithm, so an exact 0 stays finite.
_FLOOR = 1e-12


def _log(probabilities: np.ndarray) -> np.ndarray:
    return np.log(np.clip(probabilities, _FLOOR, 1.0))


def _probabilities_from_logs(z: np.ndarray) -> np.ndarray:
    """Rows of exp(z), normalised to sum to 1 (shifted by the row maximum first, for stability)."""
    p = np.exp(z - np.max(z, axis=1, keepdims=True))
    return p / p.sum(axis=1, keepdims=True)


def compute_views(
    vectors: sp.csr_matrix | np.ndarray,
    normalised_graph: sp.csr_matrix,
    seed_rows: np.ndarray,
    seed_classes: np.ndarray,
    n_classes: int,
    settings: ModelSettings,
    on_progress: ProgressCallback | None = None,
) -> Views:
    """Spread the seeds over the graph and fit the seed classifier.

    The classifier sees the vectors smoothed over the graph for
    ``settings.smoothing_steps(vectors)`` steps (:func:`smooth_features`). Progress: the
    spread's ``("spread", products, estimated_total)`` (:func:`seedsort.spreading.spread_labels`).
    """
    features, normalised_graph = seed_inputs(vectors, normalised_graph, seed_rows, seed_classes, settings)
    return _views(features, normalised_graph, seed_rows, seed_classes, n_classes, settings, on_progress=on_progress)


def seed_inputs(
    vectors: sp.csr_matrix | np.ndarray,
    normalised_graph: sp.csr_matrix,
    seed_rows: np.ndarray,
    seed_classes: np.ndarray,
    settings: ModelSettings,
) -> tuple[sp.csr_matrix | np.ndarray, sp.csr_matrix]:
    """(classifier features, spreading graph) of a run with these seeds: the graph, on dense
    vectors re-weighted in the seeds' metric (:func:`seedsort.dense.seed_spreading_graph`;
    otherwise the given graph itself), and the vectors smoothed over it for
    ``settings.smoothing_steps(vectors)`` steps. The one place both come from
    (:func:`compute_views`, :func:`seedsort.sorting.sort_documents`)."""
    normalised_graph = seed_spreading_graph(
        vectors, normalised_graph, seed_rows, seed_classes, settings.seed_metric_shrinkage
    )
    return smooth_features(vectors, normalised_graph, settings.smoothing_steps(vectors)), normalised_graph


def _views(
    features: sp.csr_matrix | np.ndarray,
    normalised_graph: sp.csr_matrix,
    seed_rows: np.ndarray,
    seed_classes: np.ndarray,
    n_classes: int,
    settings: ModelSettings,
    rows: np.ndarray | None = None,
    initial: np.ndarray | None = None,
    on_progress: ProgressCallback | None = None,
) -> Views:
    """:func:`compute_views` on features already smoothed, for every row or only ``rows``.

    ``initial`` (n, c) is a guess of the spread scores to start the solver from.
    """
    spread = seed_spread(normalised_graph, seed_rows, seed_classes, n_classes, settings, initial, on_progress)
    return views_from_spread(spread, features, seed_rows, seed_classes, n_classes, settings, rows)


def seed_spread(
    normalised_graph: sp.csr_matrix,
    seed_rows: np.ndarray,
    seed_classes: np.ndarray,
    n_classes: int,
    settings: ModelSettings,
    initial: np.ndarray | None = None,
    on_progress: ProgressCallback | None = None,
) -> SpreadResult:
    """The graph half of :func:`compute_views`: spread scores (n, c) float64, clipped at 0
    (and class-mass normalised when the settings ask), the input of :func:`views_from_spread`."""
    n = normalised_graph.shape[0]
    # Balanced: reviews add seeds unevenly (corrections cluster in the confused categories).
    y = seed_matrix(seed_rows, seed_classes, n, n_classes, balanced=True, sparse=True)
    spread = spread_labels(
        normalised_graph, y, alpha=settings.alpha, tol=settings.tol,
        max_iter=settings.max_iter, solver=settings.solver, initial=initial, on_progress=on_progress,
    )
    del y
    scores = np.clip(spread.scores, 0.0, None, out=spread.scores)  # in place: (n, c) float64
    if settings.class_mass_normalisation:
        share = np.bincount(seed_classes, minlength=n_classes) / max(1, len(seed_classes))
        scores = class_mass_normalise(scores, share)
    return SpreadResult(scores, spread.iterations, spread.converged)


def views_from_spread(
    spread: SpreadResult,
    features: sp.csr_matrix | np.ndarray,
    seed_rows: np.ndarray,
    seed_classes: np.ndarray,
    n_classes: int,
    settings: ModelSettings,
    rows: np.ndarray | None = None,
) -> Views:
    """The views from :func:`seed_spread`'s scores (for every row, or only ``rows``) and the
    seed classifier. With every row, the scores become the graph probabilities in place
    (``spread.scores`` is used up: no second (n, c) array)."""
    if rows is None:
        graph_probs, mass = to_probabilities(spread.scores, in_place=True)
    else:
        graph_probs, mass = to_probabilities(spread.scores[rows])
    clf_probs = classifier_probabilities(
        features, seed_rows, seed_classes, n_classes, settings.strength(features), rows=rows
    )
    return Views(graph=graph_probs, mass=mass, classifier=clf_probs, spread_iterations=spread.iterations)


def predict(
    vectors: sp.csr_matrix | np.ndarray,
    normalised_graph: sp.csr_matrix,
    seed_rows: np.ndarray,
    seed_classes: np.ndarray,
    n_classes: int,
    settings: ModelSettings,
) -> Prediction:
    """Spread the seeds over the graph, fit the seed classifier, blend the two.

    Uses ``settings.graph_weight``, or :data:`DEFAULT_GRAPH_WEIGHT` when it is None.
    """
    views = compute_views(vectors, normalised_graph, seed_rows, seed_classes, n_classes, settings)
    weight = DEFAULT_GRAPH_WEIGHT if settings.graph_weight is None else settings.graph_weight
    return Prediction(
        probabilities=views.blend(weight), graph_mass=views.mass, spread_iterations=views.spread_iterations
    )


def fold_of_each_seed(seed_classes: np.ndarray, order_key: np.ndarray, folds: int) -> np.ndarray:
    """Stratified fold numbers: within each category, seeds sorted by ``order_key`` deal round-robin.

    Sorting by a content-derived key (not by position) keeps the folds, and so every
    cross-checked result, independent of the order of the documents.
    """
    fold = np.zeros(seed_classes.size, dtype=np.int64)
    for c in np.unique(seed_classes):
        members = np.flatnonzero(seed_classes == c)
        members = members[np.argsort(order_key[members], kind="stable")]
        fold[members] = np.arange(members.size) % folds
    return fold


def cross_check(
    vectors: sp.csr_matrix | np.ndarray,
    normalised_graph: sp.csr_matrix,
    seed_rows: np.ndarray,
    seed_classes: np.ndarray,
    n_classes: int,
    settings: ModelSettings,
    order_key: np.ndarray,
    folds: int = 5,
    full_scores: np.ndarray | None = None,
    on_progress: ProgressCallback | None = None,
) -> Views:
    """Held-out views for each seed: each fold predicted by models fitted without it.

    Each fold spreads over the whole graph and fits the classifier again, but only the
    fold's own seeds are predicted (classifier and probability rows). ``full_scores`` (n, c),
    the spread scores of the run with every seed (:meth:`Views.spread_scores`), start each
    fold's CG solver near its solution: the fixed point is the same, with ~15% fewer sparse
    products (35 against 42 a fold, measured on 30,000 generated tickets). The folds solve
    to ``settings.cross_check_tol`` (default :data:`CROSS_CHECK_TOLERANCE`). Progress:
    ``on_progress("cross-check", folds_done, folds)``.

    Returns
    -------
    Views whose rows are the seeds (in ``seed_rows`` order); rows are NaN where the seed's
    category had no other seed (nothing to learn it from). ``spread_iterations`` is the total.
    """
    fold = fold_of_each_seed(seed_classes, order_key, folds)
    settings = replace(settings, tol=settings.cross_check_tol)
    s, c = seed_rows.size, n_classes
    graph, clf = np.full((s, c), np.nan), np.full((s, c), np.nan)
    mass = np.full(s, np.nan)
    products = 0
    # Without a seed metric the graph and the smoothed features do not depend on the seeds:
    # one smoothing serves every fold.
    shared = None if uses_seed_metric(vectors, settings.seed_metric_shrinkage) else seed_inputs(
        vectors, normalised_graph, seed_rows, seed_classes, settings
    )
    progress = on_progress or no_progress
    used_folds = min(folds, int(fold.max()) + 1 if fold.size else 0)
    for f in range(used_folds):
        progress("cross-check", f, used_folds)
        held = fold == f
        train = ~held
        if np.unique(seed_classes[train]).size < 2:
            continue
        learnable = np.isin(seed_classes[held], seed_classes[train])
        rows = np.flatnonzero(held)[learnable]
        # With the seed metric, the fold's graph (and so its smoothed features) from its own
        # training seeds (seedsort.dense), so no held-out label shapes its own prediction.
        fold_features, fold_graph = shared if shared is not None else seed_inputs(
            vectors, normalised_graph, seed_rows[train], seed_classes[train], settings
        )
        views = _views(
            fold_features, fold_graph, seed_rows[train], seed_classes[train], n_classes, settings,
            rows=seed_rows[rows],
            initial=_fold_guess(full_scores, seed_classes, train, solves_in_float32(normalised_graph, settings.tol, settings.solver), settings.solver),
        )
        products += views.spread_iterations
        graph[rows], clf[rows], mass[rows] = views.graph, views.classifier, views.mass
    progress("cross-check", used_folds, used_folds)
    return Views(graph=graph, mass=mass, classifier=clf, spread_iterations=products)


def _fold_guess(
    full_scores: np.ndarray | None, seed_classes: np.ndarray, train: np.ndarray, in_float32: bool, solver: str
) -> np.ndarray | None:
    """The full run's spread scores rescaled to a fold's balanced seed weights (a solver start).

    The spread is linear in Y and the balanced Y scales each category's column by a weight
    (:func:`seedsort.spreading.seed_matrix`), so the full solution with each column rescaled
    to the fold's weight differs from the fold's solution only by the held-out seeds' share.
    Only for CG: plain iteration from Y already has no error along S's leading eigenvector
    (the slowest to decay at alpha near 1), which this guess would bring in. ``in_float32``:
    the solver starts in float32 (:func:`seedsort.spreading.solves_in_float32`) and would
    cast the guess anyway, so it is made in float32 a block of rows at a time (the same
    values, half the memory: 300 MB at 1,000,000 documents x 77 categories).
    """
    if full_scores is None or solver != "cg":
        return None

    def weights(classes: np.ndarray) -> np.ndarray:
        counts = np.bincount(classes, minlength=full_scores.shape[1]).astype(np.float64)
        present = counts > 0
        out = np.zeros(counts.size)
        out[present] = (classes.size / present.sum()) / counts[present]
        return out

    full_w, fold_w = weights(seed_classes), weights(seed_classes[train])
    with np.errstate(divide="ignore", invalid="ignore"):
        scale = np.where(full_w > 0, fold_w / full_w, 0.0)
    if not in_float32:
        return full_scores * scale
    guess = np.empty(full_scores.shape, dtype=np.float32)
    for start in range(0, full_scores.shape[0], ROWS_AT_A_TIME):
        guess[start : start + ROWS_AT_A_TIME] = full_scores[start : start + ROWS_AT_A_TIME] * scale
    return guess


def choose_graph_weight(held_out: Views, labels: np.ndarray, grid: tuple[float, ...] = GRAPH_WEIGHT_GRID) -> float:
    """The graph weight chosen from the held-out seeds, by the one-standard-error rule.

    Every weight in ``grid`` is scored by the held-out accuracy of its blend. Among the
    weights within one standard error (sqrt(acc * (1 - acc) / m) for m held-out seeds) of
    the best, the one closest to :data:`DEFAULT_GRAPH_WEIGHT` wins: the one-standard-error
    rule of cross-validated model selection (Breiman et al. 1984; Hastie, Tibshirani &
    Friedman, "The Elements of Statistical Learning", 7.10). Without it the choice chases
    noise on a flat curve (measured on BANKING77: -0.2 points at 10 seeds per category
    against the fixed default); with it the weight moves only when the seeds clearly
    favour one view (tests/test_tuning.py: toward the classifier on long documents full of
    off-topic text). Returns the default when fewer than two seeds could be held out.
    """
    rows = ~np.isnan(held_out.graph).any(axis=1)
    m = int(rows.sum())
    if m < 2:
        return DEFAULT_GRAPH_WEIGHT
    sub = Views(held_out.graph[rows], held_out.mass[rows], held_out.classifier[rows], 0)
    target = labels[rows]
    accuracy = np.array([np.mean(sub.blend(w).argmax(axis=1) == target) for w in grid])
    best = float(accuracy.max())
    standard_error = float(np.sqrt(best * (1.0 - best) / m))
    near_best = [w for w, acc in zip(grid, accuracy) if acc >= best - standard_error - 1e-12]
    return float(min(near_best, key=lambda w: (abs(w - DEFAULT_GRAPH_WEIGHT), w)))


def fit_temperature(held_out: np.ndarray, labels: np.ndarray) -> float:
    """Temperature T that makes held-out probabilities best predict the true labels.

    Temperature scaling (Guo, Pleiss, Sun & Weinberger 2017, "On Calibration of Modern
    Neural Networks"): p_j ∝ p_j^(1/T), one parameter fitted by minimising the negative
    log-likelihood of the seeds' held-out predictions. It changes confidences, never the
    ranking of categories within a row. Returns 1.0 when there is nothing to fit.
    """
    from scipy.optimize import minimize_scalar

    rows = ~np.isnan(held_out).any(axis=1)
    if rows.sum() < 2:
        return 1.0
    logp = _log(held_out[rows])
    target = labels[rows]

    def nll(log_t: float) -> float:
        z = logp / np.exp(log_t)
        z -= z.max(axis=1, keepdims=True)
        log_norm = np.log(np.exp(z).sum(axis=1))
        return float(np.mean(log_norm - z[np.arange(z.shape[0]), target]))

    # A tight xatol: at the default (1e-5) the optimiser's stopping point, and so every
    # confidence, moved by ~1e-5 with rounding noise such as the order of the documents.
    best = minimize_scalar(nll, bounds=(np.log(0.02), np.log(5.0)), method="bounded", options={"xatol": 1e-10})
    return float(np.exp(best.x))


def apply_temperature(probabilities: np.ndarray, temperature: float) -> np.ndarray:
    """Rescale probability rows by a temperature (see :func:`fit_temperature`); rows still sum to 1."""
    if temperature == 1.0:
        return probabilities
    return _probabilities_from_logs(_log(probabilities) / temperature)
