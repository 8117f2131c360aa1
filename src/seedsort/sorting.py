"""The whole run: documents + seeds -> vectors -> graph -> spread + classifier -> results.

Each stage is a separate function over plain data (texts, a CSR matrix, neighbour arrays,
probability arrays), so a later stage can be cached, chunked or swapped without touching
the others. Costs for n documents, k neighbours, c categories, s seeds: vectors O(text),
exact graph O(n^2) sparse dot products in blocks, spreading O(n*k*c) per sparse product,
classifier O(s) to fit + O(nnz) to apply, cross-check five more spreads and fits.
"""

from __future__ import annotations

import os
import time
from collections.abc import Callable, Sequence
from dataclasses import asdict, dataclass, field
from pathlib import Path

import numpy as np
import scipy.sparse as sp

from ._progress import ProgressCallback, no_progress
from .combine import (
    DEFAULT_GRAPH_WEIGHT,
    ModelSettings,
    Views,
    apply_temperature,
    choose_graph_weight,
    cross_check,
    fit_temperature,
    seed_inputs,
    seed_spread,
    views_from_spread,
)
from .dense import spreading_affinity
from .errors import InputError
from .evaluation import per_category_accuracy
from .graph import nearest_rows, seed_reach, symmetric_affinity
from .graph_approx import GRAPH_BUILDERS, resolve_graph
from .results import NEAREST_SEEDS, SortResult
from .scope import components_from_doubt, degree_of, out_of_scope_scores, scope_components, scope_threshold
from .seeds import (
    SeedSet,
    column_labels,
    read_examples_folder,
    read_labels_file,
    resolve_seeds,
)
from .sources import Collection, Document, DocumentTexts, TableColumns, read_collection
from .spreading import ROWS_AT_A_TIME, normalised_affinity
from .vectors import VectorSettings, vectorise

SNIPPET_CHARS = 200
MISLABEL_RATIO = 2.0


@dataclass(frozen=True, slots=True)
class SortSettings:
    """All settings of a run, with measured defaults (see README "Accuracy").

    Parameters
    ----------
    vectors:
        How documents become vectors.
    neighbours:
        k of the k-nearest-neighbour graph.
    model:
        Spreading and classifier settings.
    cross_check_folds:
        Folds of the held-out check of the seeds (0 turns it off).
    out_of_scope_quantile:
        Documents whose out-of-scope score exceeds this quantile of the held-out seeds'
        scores are left unassigned (see :mod:`seedsort.scope`); None assigns every document.
    min_relative_mass:
        A document whose spread mass is below this fraction of the median mass of the
        reached documents counts as not reached.
    graph:
        ``"exact"``, ``"approximate"`` or ``"auto"`` (exact up to
        :data:`seedsort.graph_approx.AUTO_APPROXIMATE_ABOVE` documents); see
        :mod:`seedsort.graph_approx`.
    """

    vectors: VectorSettings = field(default_factory=VectorSettings)
    neighbours: int = 10
    model: ModelSettings = field(default_factory=ModelSettings)
    cross_check_folds: int = 5
    min_relative_mass: float = 1e-4
    out_of_scope_quantile: float | None = 0.95
    graph: str = "auto"


def _snippet(text: str) -> str:
    flat = " ".join(text.split())
    return flat if len(flat) <= SNIPPET_CHARS else flat[: SNIPPET_CHARS - 1] + "…"


@dataclass(frozen=True)
class Prepared:
    """The seed-independent stages of a run, reusable across runs with other seeds.

    Attributes
    ----------
    vectors:
        (n, d) L2-normalised rows: CSR for n-grams, a dense array for embeddings.
    affinity:
        (n, n) CSR, the symmetric kNN affinity W.
    graph:
        (n, n) CSR, S = D^-1/2 W D^-1/2 (for dense vectors W sharpened: :mod:`seedsort.dense`).
    settings_key:
        The vector and graph settings these were built with.
    timings:
        Seconds per stage.
    graph_method:
        The neighbour search used: ``"exact"`` or ``"approximate"``.
    """

    vectors: sp.csr_matrix | np.ndarray
    affinity: sp.csr_matrix
    graph: sp.csr_matrix
    settings_key: tuple[object, ...]
    timings: dict[str, float]
    graph_method: str = "exact"


#: Version of how vectors and graph are computed from the same settings; a workspace's
#: cached graph built by an older recipe is rebuilt. 2: dense vectors spread over the
#: sharpened affinity (seedsort.dense); the approximate graph's sketch is feature hashing.
PREPARED_RECIPE = 2


def _prepared_key(settings: SortSettings) -> tuple[object, ...]:
    return (PREPARED_RECIPE, settings.vectors, settings.neighbours, settings.graph)


def prepare(
    documents: Sequence[Document],
    settings: SortSettings | None = None,
    *,
    on_progress: ProgressCallback | None = None,
) -> Prepared:
    """Vectors and neighbour graph of a collection (everything that does not depend on the seeds)."""
    settings = settings or SortSettings()
    progress = on_progress or no_progress
    n = len(documents)
    timings: dict[str, float] = {}

    graph_method = resolve_graph(settings.graph, n)  # an unknown name fails before any work
    started = time.perf_counter()
    progress("vectors", 0, n)
    vectors = vectorise(DocumentTexts(documents), settings.vectors, on_progress=progress)
    progress("vectors", n, n)
    timings["vectors"] = time.perf_counter() - started

    started = time.perf_counter()
    # Ties between equally similar documents are broken by id, not by collection order.
    by_id = np.argsort(np.array([doc.id for doc in documents], dtype=object), kind="stable")
    neighbours = GRAPH_BUILDERS[graph_method](vectors, settings.neighbours, on_progress=progress, tie_order=by_id)
    affinity = symmetric_affinity(neighbours, n)
    # Dense vectors spread over sharpened weights (seedsort.dense); the affinity itself is kept.
    graph = normalised_affinity(spreading_affinity(vectors, affinity))
    timings["graph"] = time.perf_counter() - started
    return Prepared(vectors, affinity, graph, _prepared_key(settings), timings, graph_method)


def _possible_mislabels(held_out: np.ndarray, given: np.ndarray) -> np.ndarray:
    """Seeds that a model which never saw them puts clearly in another category.

    Clearly: the held-out model prefers another category at least MISLABEL_RATIO times over
    the given one; plain disagreement would flag every borderline seed on fine-grained
    category sets. Rows of NaN (seeds that could not be checked) are never flagged.
    """
    checked = ~np.isnan(held_out).any(axis=1)
    probs = np.nan_to_num(held_out, nan=0.0)
    given_p = probs[np.arange(given.size), given]
    return checked & (probs.argmax(axis=1) != given) & (probs.max(axis=1) >= MISLABEL_RATIO * given_p)


@dataclass(frozen=True)
class SeedChecks:
    """What a quick re-spread reuses from an earlier run (a :class:`SortResult` has all of it).

    Attributes
    ----------
    ids, categories:
        The earlier run's documents and categories.
    seed_label, cross_checked, possible_mislabel:
        Per document, as in :class:`SortResult`.
    settings:
        Needs ``graph_weight``, ``temperature`` and ``out_of_scope_threshold``.
    estimated_accuracy, estimated_category_accuracy:
        As in :class:`SortResult`.
    """

    ids: tuple[str, ...]
    categories: tuple[str, ...]
    seed_label: np.ndarray
    cross_checked: np.ndarray
    possible_mislabel: np.ndarray
    settings: dict[str, object]
    estimated_accuracy: float | None
    estimated_category_accuracy: np.ndarray


def _quick_result(
    documents: Sequence[Document],
    seeds: SeedSet,
    settings: SortSettings,
    views: Views,
    prepared: Prepared,
    checked: SortResult | SeedChecks,
    timings: dict[str, float],
    collection: Collection | None,
    progress: ProgressCallback = no_progress,
) -> SortResult:
    """The end of :func:`sort_documents` with the seed checks of an earlier result."""
    record = checked.settings
    same_categories = checked.categories == seeds.categories
    earlier = {doc: i for i, doc in enumerate(checked.ids)} if same_categories else {}
    seed_check = np.full(len(seeds), -1, dtype=np.int64)
    mislabel = np.zeros(len(seeds), dtype=bool)
    for k, (row, label) in enumerate(zip(seeds.rows, seeds.classes)):
        i = earlier.get(documents[int(row)].id)
        if i is not None and checked.seed_label[i] == label:
            seed_check[k], mislabel[k] = checked.cross_checked[i], checked.possible_mislabel[i]
    stored = record.get("out_of_scope_threshold")
    threshold = None if stored is None else float(stored)  # type: ignore[arg-type]
    return _finish(
        documents, seeds, settings, views, prepared, timings, collection,
        weight=float(record.get("graph_weight", DEFAULT_GRAPH_WEIGHT)),
        temperature=float(record.get("temperature", 1.0)),
        threshold_of=lambda components, degree: threshold,
        seed_check=seed_check,
        mislabel=mislabel,
        estimate=checked.estimated_accuracy if same_categories else None,
        per_category=checked.estimated_category_accuracy if same_categories else np.full(len(seeds.categories), np.nan),
        progress=progress,
    )


def sort_documents(
    documents: Sequence[Document],
    seeds: SeedSet,
    settings: SortSettings | None = None,
    *,
    on_progress: ProgressCallback | None = None,
    collection: Collection | None = None,
    prepared: Prepared | None = None,
    checked: SortResult | SeedChecks | None = None,
) -> SortResult:
    """Categorise every document from the seeds.

    Parameters
    ----------
    documents:
        The collection, in order; ``seeds.rows`` index into it.
    seeds:
        From :func:`seedsort.seeds.resolve_seeds`.
    settings:
        Defaults when ``None``.
    collection:
        When given, its skipped files, notes and root are carried into the result.
    prepared:
        The output of :func:`prepare` for these documents and settings, to skip rebuilding
        the vectors and graph (e.g. after adding seeds).
    checked:
        A quick re-spread (what a review does every few decisions): an earlier result on the
        same documents whose seed checks are reused: its graph weight, temperature,
        out-of-scope threshold and accuracy estimate are kept, seeds it checked keep their
        check, and no cross-check runs (it costs five more spreads and fits). The next full
        run checks every seed again.
    """
    settings = settings or SortSettings()
    progress = on_progress or no_progress
    n, c = len(documents), len(seeds.categories)
    if prepared is None:
        prepared = prepare(documents, settings, on_progress=progress)
    elif prepared.settings_key != _prepared_key(settings) or prepared.vectors.shape[0] != n:
        raise ValueError("prepared vectors and graph were built for other documents or settings")
    vectors, graph = prepared.vectors, prepared.graph
    timings: dict[str, float] = dict(prepared.timings)

    # Seeds in id order from here on: the classifier fits (and so every probability) must not
    # depend on the order of the collection, only on the documents.
    seed_order = np.argsort(np.array([documents[int(r)].id for r in seeds.rows], dtype=object), kind="stable")
    seed_rows, seed_classes = seeds.rows[seed_order], seeds.classes[seed_order]

    started = time.perf_counter()
    features, seed_graph = seed_inputs(vectors, graph, seed_rows, seed_classes, settings.model)
    spread = seed_spread(seed_graph, seed_rows, seed_classes, c, settings.model, on_progress=progress)
    timings["spread"] = time.perf_counter() - started

    def all_views() -> Views:
        """The run's views; the spread scores become its graph probabilities in place, so
        this comes after the cross-check, which starts its folds from those scores."""
        started = time.perf_counter()
        views = views_from_spread(spread, features, seed_rows, seed_classes, c, settings.model)
        timings["spread"] += time.perf_counter() - started
        return views

    if checked is not None:
        return _quick_result(documents, seeds, settings, all_views(), prepared, checked, timings, collection, progress)
    started = time.perf_counter()
    order_key = np.array([documents[int(r)].content_hash for r in seed_rows], dtype=object)
    if settings.cross_check_folds >= 2:
        held_views = cross_check(
            vectors, graph, seed_rows, seed_classes, c, settings.model, order_key, settings.cross_check_folds,
            full_scores=spread.scores, on_progress=progress,
        )
    else:
        nothing = np.full((len(seeds), c), np.nan)
        held_views = Views(nothing, np.full(len(seeds), np.nan), nothing, 0)
    weight = settings.model.graph_weight
    if weight is None:
        weight = choose_graph_weight(held_views, seed_classes)
    held_out_by_id = held_views.blend(weight)
    held_out = np.empty_like(held_out_by_id)
    held_out[seed_order] = held_out_by_id
    timings["cross-check"] = time.perf_counter() - started
    views = all_views()

    # Confidences are rescaled so that, on the held-out seeds, they match how often the
    # model was right (one temperature; the ranking of categories never changes).
    temperature = fit_temperature(held_out_by_id, seed_classes)
    checked_rows = ~np.isnan(held_out).any(axis=1)
    seed_check = np.where(checked_rows, np.nan_to_num(held_out, nan=-1.0).argmax(axis=1), -1)

    def threshold_of(components: np.ndarray, degree: np.ndarray) -> float | None:
        """Out-of-scope threshold: score every held-out seed on the documents' scale and take
        the chosen quantile of those scores."""
        if settings.out_of_scope_quantile is None:
            return None
        held_components = scope_components(
            np.nan_to_num(held_out_by_id, nan=1.0), held_views.mass, degree[seed_rows]
        )
        held_components[np.isnan(held_out_by_id).any(axis=1)] = np.nan
        return scope_threshold(out_of_scope_scores(held_components, components), settings.out_of_scope_quantile)

    return _finish(
        documents, seeds, settings, views, prepared, timings, collection,
        weight=weight,
        temperature=temperature,
        threshold_of=threshold_of,
        seed_check=seed_check,
        mislabel=_possible_mislabels(held_out, seeds.classes),
        estimate=float(np.mean(seed_check[checked_rows] == seeds.classes[checked_rows])) if checked_rows.any() else None,
        per_category=per_category_accuracy(seeds.classes[checked_rows], seed_check[checked_rows], c),
        progress=progress,
    )


def _top_two(probs: np.ndarray, rows_at_a_time: int = ROWS_AT_A_TIME) -> tuple[np.ndarray, np.ndarray]:
    """Each row's most and second most probable column; ties go to the smaller column.

    The same as the first two columns of a stable argsort of -probs, without sorting every
    row or holding an (n, c) index array: at 1,000,000 documents x 77 categories that sort
    took 0.6 GB. 0 and 0 when there is a single column.
    """
    n, c = probs.shape
    best = np.argmax(probs, axis=1) if c else np.zeros(n, dtype=np.int64)
    second = np.zeros(n, dtype=np.int64)
    if c < 2:
        return best, second
    for start in range(0, n, rows_at_a_time):
        block = probs[start : start + rows_at_a_time].copy()
        block[np.arange(block.shape[0]), best[start : start + rows_at_a_time]] = -np.inf
        second[start : start + rows_at_a_time] = np.argmax(block, axis=1)
    return best, second


def _calibrated(
    views: Views, weight: float, temperature: float, seeds: SeedSet, rows_at_a_time: int = ROWS_AT_A_TIME
) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """Blend and calibrate every document's probabilities, a block of rows at a time.

    Returns (probabilities (n, c) float32, best, second, confidence, margin, doubt), all but
    the probabilities computed in float64 from the float64 blend: the same values as the
    whole-array route (every step is row by row), without its (n, c) float64 temporaries:
    at 1,000,000 documents x 77 categories each took 0.6 GB and the route held five or six
    at once. ``doubt`` is 1 - the largest blended probability (before the temperature), for
    the out-of-scope score; a seed's confidence is the probability of the label it was given.
    """
    n, c = views.graph.shape
    probabilities = np.empty((n, c), dtype=np.float32)
    best, second = np.empty(n, dtype=np.int64), np.empty(n, dtype=np.int64)
    confidence, margin, doubt = np.empty(n), np.empty(n), np.empty(n)
    seed_rows, seed_classes = np.asarray(seeds.rows, dtype=np.int64), np.asarray(seeds.classes, dtype=np.int64)
    for start in range(0, n, rows_at_a_time):
        stop = min(n, start + rows_at_a_time)
        part = Views(views.graph[start:stop], views.mass[start:stop], views.classifier[start:stop], 0)
        blended = part.blend(weight)
        doubt[start:stop] = 1.0 - np.max(blended, axis=1)
        probs = apply_temperature(blended, temperature)
        top, runner_up = _top_two(probs)
        rows = np.arange(stop - start)
        best[start:stop], second[start:stop] = top, runner_up
        confidence[start:stop] = probs[rows, top]
        margin[start:stop] = probs[rows, top] - probs[rows, runner_up]
        here = (seed_rows >= start) & (seed_rows < stop)
        # A seed's confidence is the model's probability for the label the user gave it.
        confidence[seed_rows[here]] = probs[seed_rows[here] - start, seed_classes[here]]
        probabilities[start:stop] = probs
    return probabilities, best, second, confidence, margin, doubt


def _finish(
    documents: Sequence[Document],
    seeds: SeedSet,
    settings: SortSettings,
    views: Views,
    prepared: Prepared,
    timings: dict[str, float],
    collection: Collection | None,
    *,
    weight: float,
    temperature: float,
    threshold_of: Callable[[np.ndarray, np.ndarray], float | None],
    seed_check: np.ndarray,
    mislabel: np.ndarray,
    estimate: float | None,
    per_category: np.ndarray,
    progress: ProgressCallback = no_progress,
) -> SortResult:
    """Blend, calibrate, decide each document's status and assemble the result.

    ``threshold_of(components, degree)`` gives the out-of-scope threshold from the
    documents' scope components and graph degrees (computed here once).
    ``seed_check`` and ``mislabel`` are per seed, in ``seeds.rows`` order: the category a
    model without the seed predicts (-1 when unchecked), and whether it clearly disputes it.
    """
    n, c = len(documents), len(seeds.categories)
    vectors, affinity = prepared.vectors, prepared.affinity
    seed_rows = seeds.rows[np.argsort(np.array([documents[int(r)].id for r in seeds.rows], dtype=object), kind="stable")]
    started = time.perf_counter()
    # Ties go to the smaller id.
    nearest, nearest_sim = nearest_rows(vectors, seed_rows, NEAREST_SEEDS, on_progress=progress)
    timings["nearest seeds"] = time.perf_counter() - started

    probs, best, second, confidence, margin, doubt = _calibrated(views, weight, temperature, seeds)

    seed_label = np.full(n, -1, dtype=np.int64)
    seed_label[seeds.rows] = seeds.classes
    cross_checked = np.full(n, -1, dtype=np.int64)
    cross_checked[seeds.rows] = seed_check
    possible_mislabel = np.zeros(n, dtype=bool)
    possible_mislabel[seeds.rows] = mislabel

    # Out-of-scope: every document scored on one scale; the threshold comes from the seeds.
    degree = degree_of(affinity)
    components = components_from_doubt(doubt, views.mass, degree)
    scope = out_of_scope_scores(components, components)
    threshold = threshold_of(components, degree)

    reached = seed_reach(affinity, seeds.rows)
    mass = views.mass
    nonseed_mass = mass[reached & (seed_label < 0) & (mass > 0)]
    floor = settings.min_relative_mass * float(np.median(nonseed_mass)) if nonseed_mass.size else 0.0
    reached &= mass > floor
    empty = np.array([not doc.text.strip() for doc in documents], dtype=bool)

    status = np.full(n, "assigned", dtype=object)
    if threshold is not None:
        status[scope > threshold] = "out_of_scope"
    status[~reached] = "unreached"
    status[empty] = "empty"
    status[seeds.rows] = "seed"
    assigned = np.where(status == "assigned", best, -1)
    assigned[seeds.rows] = seeds.classes
    unassigned = assigned < 0
    confidence[unassigned] = np.nan
    margin = np.where(unassigned, np.nan, margin)

    record = {
        "vectors": settings.vectors.describe(),
        "neighbours": settings.neighbours,
        "graph": prepared.graph_method,
        **{key: value for key, value in asdict(settings.model).items()},
        "graph_weight": weight,
        "graph_weight_tuned": settings.model.graph_weight is None,
        "feature_smoothing": settings.model.smoothing_steps(vectors),
        # Unrounded: a quick re-spread reuses them and must reproduce this run exactly.
        "out_of_scope_threshold": None if threshold is None else float(threshold),
        "out_of_scope_quantile": settings.out_of_scope_quantile,
        "spread_iterations": views.spread_iterations,
        "temperature": float(temperature),
        "seconds": {key: round(value, 2) for key, value in timings.items()},
    }
    return SortResult(
        ids=tuple(doc.id for doc in documents),
        sources=tuple(doc.source for doc in documents),
        snippets=tuple(_snippet(doc.text) for doc in documents),
        categories=seeds.categories,
        probabilities=probs,
        assigned=assigned,
        confidence=confidence,
        margin=margin,
        runner_up=np.where(c >= 2, second, -1),
        status=status.astype(str),
        seed_label=seed_label,
        cross_checked=cross_checked,
        possible_mislabel=possible_mislabel,
        nearest_seed_rows=nearest,
        nearest_seed_similarity=nearest_sim,
        estimated_accuracy=estimate,
        out_of_scope=scope,
        estimated_category_accuracy=per_category,
        settings=record,
        skipped=collection.skipped if collection else (),
        notes=collection.notes if collection else (),
        root=collection.root if collection else "",
    )


@dataclass(frozen=True)
class Gathered:
    """A collection read for a run, with its seed labels by origin (references not yet resolved)."""

    collection: Collection
    label_column: list[tuple[str, str]]
    examples: list[tuple[str, str]]
    seed_file: list[tuple[str, str]]

    @property
    def documents(self) -> tuple[Document, ...]:
        return self.collection.documents

    def all_pairs(self) -> list[tuple[str, str]]:
        return self.label_column + self.examples + self.seed_file


def gather(
    path: str | os.PathLike[str],
    *,
    seeds_file: str | os.PathLike[str] | None = None,
    examples_folder: str | os.PathLike[str] | None = None,
    columns: TableColumns | None = None,
    on_progress: ProgressCallback | None = None,
) -> Gathered:
    """Read a folder (or one file) and the seed labels given with it.

    Raises
    ------
    InputError
        when nothing readable is found.
    """
    columns = columns or TableColumns()
    collection = read_collection(path, columns=columns, on_progress=on_progress)
    documents = list(collection.documents)
    label_column = column_labels(documents)
    examples: list[tuple[str, str]] = []
    notes = list(collection.notes)
    skipped = list(collection.skipped)
    if examples_folder is not None:
        example_docs, examples = read_examples_folder(examples_folder, columns=columns)
        documents.extend(example_docs.documents)
        skipped.extend(example_docs.skipped)
        notes.extend(example_docs.notes)
    seed_file = read_labels_file(seeds_file) if seeds_file is not None else []
    if not documents:
        # Say why the files found gave nothing (an undecodable export, a binary file), not
        # only which kinds of file are read.
        why = ""
        if skipped:
            more = f", and {len(skipped) - 1} more skipped" if len(skipped) > 1 else ""
            why = f" (skipped {skipped[0].path}: {skipped[0].reason}{more})"
        raise InputError(
            f"No readable documents in {path}{why}; seedsort reads .txt .md .html .eml .mbox .csv .tsv .jsonl files."
        )
    merged = Collection(root=collection.root, documents=tuple(documents), skipped=tuple(skipped), notes=tuple(notes),
                        spooled_bytes=collection.spooled_bytes)
    return Gathered(merged, label_column, examples, seed_file)


def sort_folder(
    path: str | os.PathLike[str],
    *,
    seeds_file: str | os.PathLike[str] | None = None,
    examples_folder: str | os.PathLike[str] | None = None,
    columns: TableColumns | None = None,
    settings: SortSettings | None = None,
    on_progress: ProgressCallback | None = None,
) -> SortResult:
    """Read a folder (or one file), gather the seeds, and categorise every document.

    Seeds come from any mix of a labels file, an examples folder (one subfolder per
    category; its documents join the collection) and a label column of table inputs.
    Nothing is remembered between runs; :func:`seedsort.workflow.sort_into_workspace`
    keeps documents, decisions and runs in a workspace.

    Raises
    ------
    InputError, SeedError
        With one readable sentence, for unreadable input or unusable seeds.
    """
    gathered = gather(
        path, seeds_file=seeds_file, examples_folder=examples_folder, columns=columns, on_progress=on_progress
    )
    pairs = gathered.all_pairs()
    if not pairs:
        raise InputError(
            "No seed labels given; pass a labels file with --seeds, an examples folder with "
            "--examples, or a table with a label column (--label-column)."
        )
    documents = list(gathered.documents)
    seeds = resolve_seeds(documents, pairs, root=Path(gathered.collection.root), labels_file=seeds_file)
    return sort_documents(documents, seeds, settings, on_progress=on_progress, collection=gathered.collection)
