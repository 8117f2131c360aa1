"""What to label next: the documents whose labels would most improve the run.

Every document that is neither a seed nor empty gets a value, the product of three parts,
each in [0, 1]:

``doubt``
    1 - (p1 - p2), one minus the lead of the model's best category over the runner-up
    (margin sampling; the smaller the lead, the more a label can change). A document no
    seed reaches through the graph counts as fully doubtful: the model has only the seed
    classifier's guess there.
``density``
    the percentile rank of the document's weighted degree in the neighbour graph (the
    sum of its affinities): a label on a document with many close neighbours spreads
    further than one on an outlier. An isolated document has density 0.
``doubtful neighbours``
    the affinity-weighted mean doubt of its graph neighbours: a label helps most where
    the whole neighbourhood is undecided, i.e. in parts of the collection the seeds do not
    yet settle, not on one odd document among confident ones.

The documents are then chosen greedily, best value first, under three rules that keep a
batch from spending several labels on one question:

* no near-duplicates: a document whose cosine similarity to a seed or to a document
  already chosen is :data:`DUPLICATE_SIMILARITY` or more is passed over;
* neighbours share the credit: choosing a document multiplies the value of each graph
  neighbour ``j`` by ``1 - W[i, j]`` (its label will partly decide them anyway), so the
  next choice tends to come from another region;
* spread over categories: at most ``ceil(count / c)`` documents per predicted category,
  raised by that step again only when the batch cannot otherwise be filled.

Ties are broken by document id, never by position, so the chosen set does not depend on
the order of the collection.

Cost, for n documents, c categories, k neighbours per document and a batch of ``count``:
the values are O(n*c + n*k), vectorised; the greedy pass is O(n log n) for the priority
queue plus O(k) per document chosen (neighbour update and near-duplicate marks). The exact
kNN graph already lists every near-duplicate of a document unless it has k or more of
them; only such documents (or every chosen one, on an approximate graph) are compared with
later candidates directly, O(nnz per vector) each. On BANKING77 (13,083 short texts, 10-NN
graph) a batch of 77 took 0.07 s of CPU time and one of 385 took 0.13 s (measured; wall
time up to 0.2-0.4 s on two busy shared cores, against ~20 s for one seedsort run).

Measured with ``benchmarks/suggestion_curve.py`` (BANKING77, 3 seeds per category, five
rounds of 77 labels, five samples, default settings): test accuracy after the 385 added
labels 0.800 with suggested labels against 0.733 with random ones, +6.8 points (paired
difference +5.8 to +8.2 over the samples; +3.4 after the first round), and against 0.769
with plain margin sampling (``--with-margin``: the least-margin documents, none of the
rules above), +3.1 points (+2.1 to +4.2). In an exploratory run (cross-check off, one or
two samples, script not kept), after 385 added labels: margin with the three batch rules
but without the density and neighbours' doubt factors scored 0.9 and 3.2 points lower (two
samples); without neighbours sharing the credit, 1.8 lower (one sample). Leaving out the
density factor or the per-category limit, using entropy instead of the margin, or adding
distance to the nearest seed as a fourth factor all stayed within a point of this method
either way; density and the limit are kept because they cost nothing measurable and keep a
batch from piling into one region or category when the doubt is concentrated there.
"""

from __future__ import annotations

import heapq
import math
from collections.abc import Iterable
from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp

from .errors import InputError
from .results import SortResult
from .sorting import Prepared

#: Cosine similarity from which two documents count as near-duplicates: a label on one says
#: (almost) nothing new about the other. A choice, not a measured optimum.
DUPLICATE_SIMILARITY = 0.9
#: Statuses whose documents are never suggested (already labelled, or nothing to label).
NEVER_SUGGESTED = ("seed", "empty")
#: Values are rounded to this many decimals before ranking, and equal values are ordered by
#: document id. A run over the same documents in another order gives probabilities that differ
#: by up to ~4e-6 (summation order; see tests/test_sorting.py), which must not decide between
#: two documents of practically equal value, e.g. two copies of one text.
_VALUE_DECIMALS = 4


@dataclass(frozen=True, slots=True)
class Suggestion:
    """A document proposed for labelling.

    Attributes
    ----------
    row:
        Position of the document in the collection (and in the result's arrays).
    id:
        Document id.
    score:
        Its value when it was chosen (after sharing credit with earlier choices), in [0, 1];
        the list is in the order of choice.
    reason:
        One plain sentence on why it was proposed.
    predicted:
        The model's current best category for it.
    """

    row: int
    id: str
    score: float
    reason: str
    predicted: str


@dataclass(frozen=True, slots=True)
class SuggestionValues:
    """The parts of every document's value (arrays of shape (n,), in [0, 1]).

    ``value`` is their product, and 0 for documents that are never suggested.
    """

    doubt: np.ndarray
    density: np.ndarray
    neighbour_doubt: np.ndarray
    value: np.ndarray


def margin_of(probabilities: np.ndarray) -> np.ndarray:
    """Best minus second-best probability per row (the best itself when there is one category)."""
    probs = np.asarray(probabilities, dtype=np.float64)
    if probs.shape[1] < 2:
        return probs[:, 0].copy() if probs.shape[1] else np.zeros(probs.shape[0])
    top2 = -np.partition(-probs, 1, axis=1)[:, :2]
    return top2[:, 0] - top2[:, 1]


def _percentile_rank(values: np.ndarray) -> np.ndarray:
    """Share of values at or below each (midpoint for ties), in (0, 1]; order-independent."""
    ranked = np.sort(values)
    low = np.searchsorted(ranked, values, side="left")
    high = np.searchsorted(ranked, values, side="right")
    return (low + high) / (2.0 * max(1, values.size))


def _has_features(vectors: sp.csr_matrix | np.ndarray) -> np.ndarray:
    if sp.issparse(vectors):
        return np.diff(sp.csr_matrix(vectors).indptr) > 0
    return np.any(np.asarray(vectors) != 0, axis=1)


def suggestion_values(result: SortResult, prepared: Prepared) -> SuggestionValues:
    """Doubt, density and neighbours' doubt of every document, and their product.

    Cost O(n*c + nnz(W)).
    """
    affinity = sp.csr_matrix(prepared.affinity, dtype=np.float64)
    doubt = 1.0 - margin_of(result.probabilities)
    doubt[np.asarray(result.status) == "unreached"] = 1.0
    doubt = np.clip(doubt, 0.0, 1.0)
    degree = np.asarray(affinity.sum(axis=1)).ravel()
    density = np.where(degree > 0, _percentile_rank(degree), 0.0)
    with np.errstate(invalid="ignore", divide="ignore"):
        neighbour_doubt = np.where(degree > 0, (affinity @ doubt) / degree, 0.0)
    neighbour_doubt = np.clip(neighbour_doubt, 0.0, 1.0)
    value = np.round(doubt * density * neighbour_doubt, _VALUE_DECIMALS)
    value[~_eligible(result, prepared)] = 0.0
    return SuggestionValues(doubt, density, neighbour_doubt, value)


def _eligible(result: SortResult, prepared: Prepared) -> np.ndarray:
    status = np.asarray(result.status)
    return ~np.isin(status, NEVER_SUGGESTED) & _has_features(prepared.vectors)


def _exclusion_mask(exclude: Iterable[int], n: int) -> np.ndarray:
    mask = np.zeros(n, dtype=bool)
    rows = np.fromiter((int(r) for r in exclude), dtype=np.int64)
    if rows.size and (rows.min() < 0 or rows.max() >= n):
        raise InputError(
            f"Rows to exclude from suggestions must lie between 0 and {n - 1}; check the document rows passed."
        )
    mask[rows] = True
    return mask


class _Duplicates:
    """Whether a document is a near-duplicate of one of the documents chosen so far.

    On an exact kNN graph, when fewer than k of a chosen document's graph neighbours reach
    the similarity threshold, every near-duplicate of it is among those neighbours, so its
    affinity row marks them all in O(k). A chosen document with k or more near-duplicates,
    or any chosen document when the graph is approximate, is instead compared with each
    later candidate directly: one product with the few vectors of that kind.
    """

    def __init__(self, prepared: Prepared, affinity: sp.csr_matrix, threshold: float) -> None:
        self._vectors = prepared.vectors
        self._affinity = affinity
        self._threshold = threshold
        exact = getattr(prepared, "graph_method", "exact") == "exact"
        self._k = _neighbours_per_document(prepared) if exact else None
        self._blocked = np.zeros(affinity.shape[0], dtype=bool)
        self._compare_rows: list[int] = []
        self._compare: sp.csr_matrix | np.ndarray | None = None

    def add(self, row: int) -> None:
        start, stop = self._affinity.indptr[row], self._affinity.indptr[row + 1]
        close = self._affinity.indices[start:stop][self._affinity.data[start:stop] >= self._threshold]
        self._blocked[close] = True
        if self._k is None or close.size >= self._k:
            self._compare_rows.append(row)
            self._compare = self._vectors[self._compare_rows]

    def __contains__(self, row: int) -> bool:
        if self._blocked[row]:
            return True
        if self._compare is None:
            return False
        sims = self._compare @ self._vectors[row].T
        sims = sims.toarray() if sp.issparse(sims) else np.asarray(sims)
        return bool(np.max(sims) >= self._threshold)


def _neighbours_per_document(prepared: Prepared) -> int | None:
    """k of the kNN graph the prepared stages were built with (None when unknown)."""
    key = prepared.settings_key
    return key[1] if len(key) > 1 and isinstance(key[1], int) and key[1] > 0 else None


def _reason(result: SortResult, values: SuggestionValues, row: int) -> str:
    probs = np.asarray(result.probabilities[row], dtype=np.float64)
    order = np.argsort(-probs, kind="stable")
    names = result.categories
    busy = f"its neighbourhood is denser than that of {values.density[row]:.0%} of the documents"
    if str(result.status[row]) == "unreached":
        return f"No seed reaches it through the neighbour graph; {busy}."
    if len(names) >= 2:
        first, second = int(order[0]), int(order[1])
        doubt = (
            f"Torn between {names[first]} ({probs[first]:.0%}) and {names[second]} ({probs[second]:.0%})"
        )
    else:
        doubt = f"Only {names[int(order[0])]} is seeded ({probs[int(order[0])]:.0%})"
    if str(result.status[row]) == "out_of_scope":
        doubt += ", and it fits no seeded category well"
    return f"{doubt}; its neighbours are {values.neighbour_doubt[row]:.0%} doubtful on average; {busy}."


def suggest_labels(
    result: SortResult,
    prepared: Prepared,
    count: int,
    *,
    exclude: Iterable[int] = (),
    duplicate_similarity: float = DUPLICATE_SIMILARITY,
) -> list[Suggestion]:
    """Propose up to ``count`` documents to label next (algorithm in the module docstring).

    Parameters
    ----------
    result:
        The latest run over the collection.
    prepared:
        The vectors and graph that run used (:func:`seedsort.sorting.prepare`).
    count:
        How many documents to propose; fewer come back only when fewer can be labelled.
    exclude:
        Rows never to propose (e.g. documents skipped in a review).
    duplicate_similarity:
        Cosine similarity from which a document counts as a near-duplicate of a seed or of
        a document already proposed.

    Returns
    -------
    list of Suggestion, in the order chosen (the most useful first). Deterministic.

    Raises
    ------
    InputError
        When ``count`` is negative or an excluded row is outside the collection.

    Notes
    -----
    Cost O(n*c + nnz(W) + n log n + count * k) for n documents, c categories and a graph W
    with nnz stored affinities and k neighbours per document, plus O(nnz per vector) per
    candidate checked against a chosen document whose near-duplicates the graph cannot list
    (see :class:`_Duplicates`).
    """
    n = len(result)
    if count < 0:
        raise InputError(f"Ask for zero or more suggestions, not {count}.")
    if prepared.vectors.shape[0] != n or prepared.affinity.shape[0] != n:
        raise ValueError("prepared vectors and graph were built for another collection than the result")
    if count == 0 or n == 0 or not result.categories:
        return []
    values = suggestion_values(result, prepared)
    open_rows = _eligible(result, prepared) & ~_exclusion_mask(exclude, n)
    # The nearest seed's similarity is already in the result: no need to compare against every seed.
    nearest_seed = np.asarray(result.nearest_seed_similarity, dtype=np.float64)
    if nearest_seed.size:
        open_rows &= nearest_seed[:, 0] < duplicate_similarity
    candidates = np.flatnonzero(open_rows)
    if candidates.size == 0:
        return []

    affinity = sp.csr_matrix(prepared.affinity, dtype=np.float64)
    predicted = np.asarray(result.probabilities).argmax(axis=1)
    id_rank = np.empty(n, dtype=np.int64)
    id_rank[np.argsort(np.array(result.ids, dtype=object), kind="stable")] = np.arange(n)

    current = values.value.copy()
    # Sorted by (-value, id), the list is already a heap: no Python-level heapify of n items.
    candidates = candidates[np.lexsort((id_rank[candidates], -current[candidates]))]
    heap = list(zip((-current[candidates]).tolist(), id_rank[candidates].tolist(), candidates.tolist()))
    step = math.ceil(count / len(result.categories))
    cap = step
    per_category = np.zeros(len(result.categories), dtype=np.int64)
    deferred: list[tuple[float, int, int]] = []
    taken = np.zeros(n, dtype=bool)
    duplicates = _Duplicates(prepared, affinity, duplicate_similarity)
    chosen: list[Suggestion] = []
    while len(chosen) < count:
        if not heap:
            if not deferred:
                break
            cap += step  # every category that still has candidates is full: allow more
            heap, deferred = [(-current[r], k, r) for _, k, r in deferred], []
            heapq.heapify(heap)
            continue
        negative, key, row = heapq.heappop(heap)
        if -negative != current[row]:  # its value fell since it was queued: queue it again
            heapq.heappush(heap, (-current[row], key, row))
            continue
        if per_category[predicted[row]] >= cap:
            deferred.append((negative, key, row))
            continue
        if row in duplicates:
            continue
        chosen.append(
            Suggestion(
                row=row,
                id=result.ids[row],
                score=float(current[row]),
                reason=_reason(result, values, row),
                predicted=result.categories[int(predicted[row])],
            )
        )
        taken[row] = True
        per_category[predicted[row]] += 1
        duplicates.add(row)
        start, stop = affinity.indptr[row], affinity.indptr[row + 1]
        neighbours, weights = affinity.indices[start:stop], affinity.data[start:stop]
        keep = open_rows[neighbours] & ~taken[neighbours]
        neighbours, weights = neighbours[keep], weights[keep]
        current[neighbours] = np.round(current[neighbours] * (1.0 - np.clip(weights, 0.0, 1.0)), _VALUE_DECIMALS)
    return chosen
