"""What to label next (seedsort.suggest).

Outside references, named beside each check: the definition of margin sampling (Scheffer,
Decomain & Wrobel 2001: the difference between the two most probable classes) computed
independently with heapq; scipy.stats.rankdata for the density percentile; sklearn's
cosine_similarity for near-duplicates; the BANKING77 open dataset (Casanueva et al. 2020,
CC BY 4.0) for "suggested labels help more than random ones". The batch properties (no
repeats, no seeds, count respected, spread over categories, independent of document order)
are the function's contract; the order invariance is common practice for a method whose
input is a set (scikit-learn's check_methods_sample_order_invariance).
"""

from __future__ import annotations

import heapq
import math
from dataclasses import replace
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from hypothesis.extra.numpy import arrays
from scipy.stats import rankdata
from sklearn.metrics.pairwise import cosine_similarity

from seedsort.errors import InputError
from seedsort.seeds import resolve_seeds
from seedsort.sorting import SortSettings, prepare, sort_documents
from seedsort.sources import Document
from seedsort.suggest import DUPLICATE_SIMILARITY, margin_of, suggest_labels, suggestion_values

from conftest import TOPICS, topic_documents

DATA = Path(__file__).parent / "data" / "banking77"

#: Edge cases: a copy of a seed (weather-0), a near-copy of a seed (football-0), two copies
#: of one unlabelled text (computers-5), an empty document, and three texts in a language
#: the rest of the corpus does not share (no seed reaches them).
EXTRA = (
    TOPICS["weather"][0],
    TOPICS["football"][0] + "!",
    TOPICS["computers"][5],
    TOPICS["computers"][5],
    "",
    "Квартира сдаётся недорого рядом с метро",
    "Квартира продаётся рядом с парком и метро",
    "Сдаётся комната недорого рядом с парком",
)
SETTINGS = SortSettings(cross_check_folds=2)


def _seed_pairs() -> list[tuple[str, str]]:
    return [(f"{topic}-{i}.txt", topic) for topic in TOPICS for i in (0, 1)]


def _run(docs: list[Document]):
    prepared = prepare(docs, SETTINGS)
    result = sort_documents(docs, resolve_seeds(docs, _seed_pairs()), SETTINGS, prepared=prepared)
    return result, prepared


@pytest.fixture(scope="module")
def corpus():
    docs, _ = topic_documents(EXTRA)
    result, prepared = _run(docs)
    return docs, result, prepared


# --- the parts of the value, against outside references ------------------------------------


@settings(max_examples=50, deadline=None)
@given(arrays(np.float64, st.tuples(st.integers(1, 6), st.integers(2, 6)), elements=st.floats(0.01, 1.0)))
def test_margin_is_best_minus_runner_up(raw: np.ndarray) -> None:
    """Margin sampling (Scheffer, Decomain & Wrobel 2001): P(best) - P(second best), here
    recomputed row by row with heapq.nlargest."""
    probs = raw / raw.sum(axis=1, keepdims=True)
    expected = [a - b for a, b in (heapq.nlargest(2, row.tolist()) for row in probs)]
    np.testing.assert_allclose(margin_of(probs), expected, atol=1e-12)


def test_value_parts_match_their_definitions(corpus) -> None:
    """Density is the percentile rank of the weighted degree (scipy.stats.rankdata, average
    ties: (rank - 0.5) / n); neighbours' doubt is the affinity-weighted mean doubt of the
    neighbours (numpy.average over the dense affinity row); doubt is 1 - margin, and 1 where
    no seed reaches the document."""
    _, result, prepared = corpus
    values = suggestion_values(result, prepared)
    affinity = prepared.affinity.toarray().astype(np.float64)
    degree = affinity.sum(axis=1)
    expected_density = (rankdata(degree, method="average") - 0.5) / degree.size
    connected = degree > 0
    np.testing.assert_allclose(values.density[connected], expected_density[connected], atol=1e-12)
    assert np.all(values.density[~connected] == 0)

    expected_doubt = 1.0 - margin_of(result.probabilities)
    expected_doubt[result.status == "unreached"] = 1.0
    np.testing.assert_allclose(values.doubt, expected_doubt, atol=1e-12)
    for row in np.flatnonzero(connected):
        mean = np.average(expected_doubt, weights=affinity[row])
        assert values.neighbour_doubt[row] == pytest.approx(mean, abs=1e-9)
    eligible = ~np.isin(result.status, ("seed", "empty"))
    product = values.doubt * values.density * values.neighbour_doubt
    np.testing.assert_allclose(values.value[eligible], product[eligible], atol=1e-4)  # rounded to 4 decimals
    assert np.all(values.value[~eligible] == 0)


# --- the batch ---------------------------------------------------------------------------


def test_batch_never_repeats_and_skips_seeds_empty_and_excluded(corpus) -> None:
    docs, result, prepared = corpus
    excluded = [docs.index(next(d for d in docs if d.id == "cooking-5.txt"))]
    batch = suggest_labels(result, prepared, 10, exclude=excluded)
    rows = [s.row for s in batch]
    assert len(batch) == 10
    assert len(set(rows)) == len(rows)
    assert not set(rows) & set(np.flatnonzero(np.isin(result.status, ("seed", "empty"))))
    assert excluded[0] not in rows
    for s in batch:
        assert s.id == result.ids[s.row]
        assert s.predicted == result.categories[int(np.argmax(result.probabilities[s.row]))]
        assert 0.0 <= s.score <= 1.0 and s.reason.endswith(".")


def test_no_near_duplicates_of_each_other_or_of_seeds(corpus) -> None:
    """Cosine similarity by sklearn.metrics.pairwise.cosine_similarity on the run's vectors:
    every pair among the proposals, and every proposal against every seed, stays below the
    near-duplicate threshold, even when everything that can be proposed is asked for."""
    docs, result, prepared = corpus
    batch = suggest_labels(result, prepared, len(docs))
    rows = np.array([s.row for s in batch])
    seeds = np.flatnonzero(result.status == "seed")
    sims = cosine_similarity(prepared.vectors[rows])
    np.fill_diagonal(sims, 0.0)
    assert sims.max() < DUPLICATE_SIMILARITY
    assert cosine_similarity(prepared.vectors[rows], prepared.vectors[seeds]).max() < DUPLICATE_SIMILARITY
    # The copies of a seed, and the two copies of computers-5 beyond the first, are left out.
    proposed = {s.id for s in batch}
    assert "extra-0.txt" not in proposed and "extra-1.txt" not in proposed
    assert len({"computers-5.txt", "extra-2.txt", "extra-3.txt"} & proposed) <= 1
    # Everything else that is not a seed, empty or a duplicate is proposed.
    never = np.isin(result.status, ("seed", "empty")).sum()
    assert len(batch) == len(docs) - never - 4


@pytest.mark.parametrize("count", [1, 3, 4, 8])
def test_count_is_respected_and_spread_over_categories(corpus, count: int) -> None:
    """At most ceil(count / c) proposals per predicted category while others can take them."""
    _, result, prepared = corpus
    batch = suggest_labels(result, prepared, count)
    assert len(batch) == count
    per_category = pd.Series([s.predicted for s in batch]).value_counts()
    assert per_category.max() <= math.ceil(count / len(result.categories))


def test_unreached_documents_come_early(corpus) -> None:
    """A part of the collection no seed reaches (the three texts in another language) gets a
    label among the first proposals, and only one of the three: they share the credit."""
    _, result, prepared = corpus
    unreached = set(np.flatnonzero(result.status == "unreached"))
    assert len(unreached) == 3
    rows = [s.row for s in suggest_labels(result, prepared, 4)]
    assert len(unreached & set(rows)) == 1
    assert "No seed reaches it" in suggest_labels(result, prepared, 1)[0].reason


def test_graph_shortcut_for_duplicates_equals_the_full_comparison(corpus) -> None:
    """Near-duplicates are found through the exact kNN graph; comparing each chosen vector
    with the whole collection instead (forced by hiding k), with sparse or dense vectors,
    must give the same proposals."""
    docs, result, prepared = corpus
    expected = suggest_labels(result, prepared, len(docs))
    unknown_k = replace(prepared, settings_key=(prepared.settings_key[0], None))
    assert suggest_labels(result, unknown_k, len(docs)) == expected
    dense = replace(unknown_k, vectors=prepared.vectors.toarray())
    assert suggest_labels(result, dense, len(docs)) == expected


def test_deterministic(corpus) -> None:
    _, result, prepared = corpus
    assert suggest_labels(result, prepared, 12) == suggest_labels(result, prepared, 12)


@settings(max_examples=8, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(data=st.data())
def test_order_of_documents_does_not_change_the_proposals(corpus, data: st.DataObject) -> None:
    """Common practice (sklearn check_methods_sample_order_invariance): the same documents in
    another order give the same proposals (compared by id, in the same order)."""
    docs, result, prepared = corpus
    shuffled = data.draw(st.permutations(docs))
    other_result, other_prepared = _run(list(shuffled))
    for count in (4, 12):
        assert [s.id for s in suggest_labels(other_result, other_prepared, count)] == [
            s.id for s in suggest_labels(result, prepared, count)
        ]


def test_bad_requests(corpus) -> None:
    docs, result, prepared = corpus
    assert suggest_labels(result, prepared, 0) == []
    with pytest.raises(InputError, match="zero or more"):
        suggest_labels(result, prepared, -1)
    with pytest.raises(InputError, match="between 0 and"):
        suggest_labels(result, prepared, 3, exclude=[len(docs)])
    other_docs, _ = topic_documents()
    with pytest.raises(ValueError, match="another collection"):
        suggest_labels(result, prepare(other_docs, SETTINGS), 3)


# --- an open dataset ---------------------------------------------------------------------


@pytest.mark.slow
def test_suggested_labels_beat_random_ones_on_banking77() -> None:
    """BANKING77 (Casanueva et al. 2020, CC BY 4.0), its first 20 intents in sorted order:
    from 3 seeds per intent, one round of 60 more labels (the dataset's own) chosen by
    suggest_labels scores higher on the test texts than 60 chosen at random, averaged over
    five random draws (measured: 0.884 against 0.855, every draw 0.862 or less). A round of
    only 20 labels was measured too: +0.005, too close to the draws' spread to test. The full
    curve (77 intents, 5 rounds of 77) is benchmarks/suggestion_curve.py."""
    train = pd.read_csv(DATA / "train.csv", keep_default_na=False)
    test = pd.read_csv(DATA / "test.csv", keep_default_na=False)
    intents = sorted(train["category"].unique())[:20]
    train = train[train["category"].isin(intents)].reset_index(drop=True)
    test = test[test["category"].isin(intents)].reset_index(drop=True)
    docs = [Document.make(f"train#{i}", "train.csv", t) for i, t in enumerate(train["text"])]
    docs += [Document.make(f"test#{i}", "test.csv", t) for i, t in enumerate(test["text"])]
    labels = train["category"].to_numpy()
    n_train = len(train)
    run_settings = SortSettings(cross_check_folds=0)
    prepared = prepare(docs, run_settings)

    def accuracy(rows: np.ndarray):
        seeds = resolve_seeds(docs, [(docs[r].id, labels[r]) for r in rows])
        result = sort_documents(docs, seeds, run_settings, prepared=prepared)
        predicted = np.array(result.categories)[result.probabilities[n_train:].argmax(axis=1)]
        return result, float(np.mean(predicted == test["category"].to_numpy()))

    rng = np.random.default_rng(0)
    start = np.concatenate([rng.choice(np.flatnonzero(labels == c), 3, replace=False) for c in intents])
    first, _ = accuracy(start)
    added = 3 * len(intents)
    batch = suggest_labels(first, prepared, added, exclude=range(n_train, len(docs)))
    assert len(batch) == added and all(s.row < n_train for s in batch)
    _, suggested = accuracy(np.concatenate([start, [s.row for s in batch]]))
    pool = np.setdiff1d(np.arange(n_train), start)
    random = [accuracy(np.concatenate([start, rng.choice(pool, added, replace=False)]))[1] for _ in range(5)]
    message = f"suggested {suggested:.3f}, random {np.mean(random):.3f} (draws {np.round(random, 3)})"
    assert suggested >= np.mean(random) + 0.01, message
