"""The whole run: properties that hold for any collection, and the statuses of edge cases.

Properties (hypothesis), as STYLE.md "Tests" asks: probabilities sum to 1, and permuting the
documents permutes the results (common practice for a transductive method whose inputs are a
set: scikit-learn's estimator checks test the same for estimators,
``check_methods_sample_order_invariance``).
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from seedsort.seeds import resolve_seeds
from seedsort.sorting import SortSettings, sort_documents
from seedsort.sources import Document

from conftest import topic_documents

VOCABULARY = {
    "billing": ["invoice", "refund", "charge", "payment", "card", "receipt", "price", "fee"],
    "shipping": ["parcel", "courier", "delivery", "tracking", "address", "van", "depot", "label"],
    "account": ["password", "login", "email", "profile", "username", "reset", "locked", "settings"],
}
COMMON = ["please", "help", "my", "the", "today", "again", "thanks", "urgent"]
SEEDS = {
    "billing": ["refund the invoice charge", "card payment receipt fee"],
    "shipping": ["parcel courier delivery tracking", "van depot address label"],
    "account": ["password login reset locked", "email profile username settings"],
}


@st.composite
def collections(draw: st.DrawFn) -> tuple[list[Document], list[tuple[str, str]]]:
    """Seed texts plus 6-30 distinct generated texts (each mostly from one topic), and the seed pairs."""
    seen = {t for texts in SEEDS.values() for t in texts}
    texts: list[str] = []
    for _ in range(draw(st.integers(6, 30))):
        topic = draw(st.sampled_from(sorted(VOCABULARY)))
        words = draw(st.lists(st.sampled_from(VOCABULARY[topic]), min_size=1, max_size=5))
        words += draw(st.lists(st.sampled_from(COMMON + VOCABULARY["billing"]), max_size=2))
        text = " ".join(draw(st.permutations(words)))
        if text not in seen:
            seen.add(text)
            texts.append(text)
    if draw(st.booleans()):
        texts.append("")  # an empty document
    docs = [Document.make(f"doc-{i:03d}.txt", f"doc-{i:03d}.txt", t) for i, t in enumerate(texts)]
    pairs = []
    for topic, seed_texts in SEEDS.items():
        for j, text in enumerate(seed_texts):
            doc_id = f"seed-{topic}-{j}.txt"
            docs.append(Document.make(doc_id, doc_id, text))
            pairs.append((doc_id, topic))
    return docs, pairs


def _run(docs: list[Document], pairs: list[tuple[str, str]]):
    return sort_documents(docs, resolve_seeds(docs, pairs), SortSettings(cross_check_folds=2))


@settings(max_examples=15, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(collections())
def test_probability_rows_sum_to_one(collection) -> None:
    """Common practice: every row of a categorical distribution lies in [0, 1] and sums to 1."""
    result = _run(*collection)
    probs = result.probabilities.astype(np.float64)
    assert probs.shape == (len(collection[0]), 3)
    assert np.all(probs >= 0) and np.all(probs <= 1)
    np.testing.assert_allclose(probs.sum(axis=1), 1.0, atol=1e-6)


@settings(max_examples=15, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(collection=collections(), data=st.data())
def test_shuffling_documents_does_not_change_any_result(collection, data: st.DataObject) -> None:
    """Common practice (sklearn check_methods_sample_order_invariance): the order of the
    documents is not information, so each document's result must not depend on it."""
    docs, pairs = collection
    # Tolerance 1e-5, not 1e-6: summation order inside the sparse products changes with the
    # order (rounding ~1e-16), and the solver tolerances (CG atol 1e-6 at alpha 0.99, lbfgs in
    # the cross-check, the temperature fit on a handful of seeds) amplify that to ~4e-6 at most
    # (measured over 200 random collections). Exact ties are broken by id, so no larger change.
    shuffled = data.draw(st.permutations(docs))
    first, second = _run(docs, pairs), _run(shuffled, pairs)
    where = {doc_id: i for i, doc_id in enumerate(second.ids)}
    for i, doc_id in enumerate(first.ids):
        j = where[doc_id]
        assert first.status[i] == second.status[j], doc_id
        assert first.category_name(int(first.assigned[i])) == second.category_name(int(second.assigned[j])), doc_id
        np.testing.assert_allclose(first.confidence[i], second.confidence[j], atol=1e-5, equal_nan=True)
        np.testing.assert_allclose(first.probabilities[i], second.probabilities[j], atol=1e-5)
        near_first, near_second = first.nearest_seeds(i), second.nearest_seeds(j)
        assert [(d, c) for d, c, _ in near_first] == [(d, c) for d, c, _ in near_second], doc_id
        np.testing.assert_allclose([s for *_, s in near_first], [s for *_, s in near_second], atol=1e-6)
        assert first.possible_mislabel[i] == second.possible_mislabel[j]
        assert first.category_name(int(first.cross_checked[i])) == second.category_name(int(second.cross_checked[j]))
    assert first.estimated_accuracy == second.estimated_accuracy


def test_statuses_of_seeds_empty_and_unreached_documents() -> None:
    """Definitions in seedsort.results (module docstring): seed / assigned / unreached / empty.
    An all-Greek note shares no word or character n-gram with the English corpus, so no seed
    reaches it through the graph (scipy connected components)."""
    docs, truth = topic_documents(extra=("", "Καλημέρα σας ευχαριστώ πολύ", "Ελπίζω να είστε καλά"))
    pairs = [(docs[i].id, truth[i]) for i in (0, 1, 10, 11, 20, 30, 31)]  # football has one seed
    result = sort_documents(docs, resolve_seeds(docs, pairs), SortSettings(cross_check_folds=2))
    status = dict(zip(result.ids, result.status))
    assert status["extra-0.txt"] == "empty"
    assert status["extra-1.txt"] == status["extra-2.txt"] == "unreached"
    assert [status[docs[i].id] for i, _ in enumerate(pairs)].count("seed") >= 1
    assert sum(s == "seed" for s in result.status) == len(pairs)
    for row in range(len(result)):
        if result.status[row] in ("empty", "unreached"):
            assert result.assigned[row] == -1 and np.isnan(result.confidence[row])
        else:
            assert result.assigned[row] >= 0 and 0 < result.confidence[row] <= 1
    # The seed of the one-seed category cannot be cross-checked (nothing else teaches it).
    football_seed = result.ids.index(docs[20].id)
    assert result.cross_checked[football_seed] == -1
    # The run records what it used (for the report), and every stage's time.
    assert result.settings["neighbours"] == 10
    assert set(result.settings["seconds"]) == {"vectors", "graph", "spread", "cross-check", "nearest seeds"}


def test_seed_confidence_is_the_probability_of_the_given_label() -> None:
    """Definition in SortResult's docstring: a seed's confidence is P(its given label)."""
    docs, truth = topic_documents()
    pairs = [(docs[i].id, truth[i]) for i in (0, 1, 10, 11, 20, 21, 30, 31)]
    result = sort_documents(docs, resolve_seeds(docs, pairs), SortSettings(cross_check_folds=0))
    for row in np.flatnonzero(result.status == "seed"):
        assert result.confidence[row] == pytest.approx(result.probabilities[row, result.assigned[row]], abs=1e-6)
    assert result.estimated_accuracy is None  # cross-check turned off: nothing held out


def test_progress_of_every_stage_is_monotone_and_ends_at_its_total() -> None:
    """Progress (common practice for progress bars): each stage's count never goes back and
    ends at its total; the cross-check counts its folds."""
    docs, truth = topic_documents()
    pairs = [(docs[i].id, truth[i]) for i in (0, 1, 2, 10, 11, 12, 20, 21, 22, 30, 31, 32)]
    seen: dict[str, list[tuple[int, int | None]]] = {}
    sort_documents(
        docs, resolve_seeds(docs, pairs), SortSettings(cross_check_folds=3),
        on_progress=lambda stage, done, total: seen.setdefault(stage, []).append((done, total)),
    )
    assert {"vectors", "graph", "spread", "cross-check", "nearest seeds"} <= set(seen)
    assert seen["cross-check"] == [(0, 3), (1, 3), (2, 3), (3, 3)]
    for stage, calls in seen.items():
        done = [d for d, _ in calls]
        assert done == sorted(done), stage
        assert calls[-1][0] == calls[-1][1], stage


@settings(max_examples=60, deadline=None)
@given(
    st.integers(1, 6).flatmap(
        lambda c: st.lists(
            st.lists(st.sampled_from([0.0, 0.1, 0.25, 0.5, 1.0]), min_size=c, max_size=c), min_size=1, max_size=30
        )
    ),
    st.integers(1, 7),
)
def test_top_two_equals_a_stable_sort(rows: list[list[float]], rows_at_a_time: int) -> None:
    """Reference: numpy's stable argsort of -p (ties to the smaller column), first two columns;
    values drawn from a small set so that ties are common."""
    from seedsort.sorting import _top_two

    probs = np.array(rows, dtype=np.float64)
    best, second = _top_two(probs, rows_at_a_time)
    order = np.argsort(-probs, axis=1, kind="stable")
    np.testing.assert_array_equal(best, order[:, 0])
    if probs.shape[1] >= 2:
        np.testing.assert_array_equal(second, order[:, 1])
    else:
        assert not second.any()


@settings(max_examples=30, deadline=None)
@given(st.integers(1, 40), st.integers(2, 6), st.integers(1, 9), st.floats(0.0, 1.0), st.floats(0.2, 3.0), st.integers(0, 10**6))
def test_calibrated_blocks_equal_the_whole_array_route(n: int, c: int, rows_at_a_time: int, weight: float, temperature: float, seed: int) -> None:
    """Invariant: blending, calibrating and ranking a block of rows at a time gives the values
    of the whole-array route (Views.blend, apply_temperature, a stable argsort of -p for the
    top two; numpy), and each seed's confidence is the probability of its given label."""
    from seedsort.combine import Views, apply_temperature
    from seedsort.seeds import SeedSet
    from seedsort.sorting import _calibrated

    rng = np.random.default_rng(seed)
    graph, clf = rng.dirichlet(np.ones(c), size=n), rng.dirichlet(np.ones(c), size=n)
    mass = np.where(rng.random(n) < 0.2, 0.0, rng.random(n))
    views = Views(graph, mass, clf, 0)
    rows = np.sort(rng.choice(n, size=min(n, 3), replace=False))
    seeds = SeedSet(rows=rows, classes=rng.integers(0, c, size=rows.size), categories=tuple(f"c{j}" for j in range(c)))
    probs, best, second, confidence, margin, doubt = _calibrated(views, weight, temperature, seeds, rows_at_a_time)
    blended = views.blend(weight)
    expected = apply_temperature(blended, temperature)
    order = np.argsort(-expected, axis=1, kind="stable")
    np.testing.assert_array_equal(probs, expected.astype(np.float32))
    np.testing.assert_array_equal(best, order[:, 0])
    np.testing.assert_array_equal(second, order[:, 1])
    whole = expected[np.arange(n), order[:, 0]]
    np.testing.assert_array_equal(margin, whole - expected[np.arange(n), order[:, 1]])
    whole[seeds.rows] = expected[seeds.rows, seeds.classes]
    np.testing.assert_array_equal(confidence, whole)
    np.testing.assert_array_equal(doubt, 1.0 - blended.max(axis=1))
