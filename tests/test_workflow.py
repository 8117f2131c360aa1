"""Runs over a workspace: re-runs, corrections, changed folders, the review session.

Outside references: the BANKING77 open dataset (tests/data/banking77, CC BY 4.0; Casanueva
et al. 2020) supplies the texts and the true intents that corrections are taken from and
that accuracy is measured against; the workspace-free run (``sort_folder``) is the reference
that a cached re-run must reproduce exactly.
"""

from __future__ import annotations

import csv
from pathlib import Path

import numpy as np
import pytest

from seedsort.sorting import sort_folder
from seedsort.workflow import NO_CATEGORY, open_review, sort_into_workspace
from seedsort.workspace import Workspace

BANKING77 = Path(__file__).parent / "data" / "banking77" / "train.csv"
INTENTS = ("card_arrival", "exchange_rate", "lost_or_stolen_card", "top_up_failed", "pin_blocked", "cash_withdrawal_charge")
PER_INTENT, SEEDS_PER_INTENT = 30, 4


@pytest.fixture(scope="module")
def pile(tmp_path_factory: pytest.TempPathFactory) -> tuple[Path, Path, dict[str, str]]:
    """A folder of one .txt per BANKING77 query (six intents), a labels file, and the truth."""
    root = tmp_path_factory.mktemp("pile")
    folder = root / "queries"
    folder.mkdir()
    by_intent: dict[str, list[str]] = {intent: [] for intent in INTENTS}
    with open(BANKING77, newline="", encoding="utf-8") as handle:
        for row in csv.DictReader(handle):
            texts = by_intent.get(row["category"])
            if texts is not None and len(texts) < PER_INTENT:
                texts.append(row["text"])
    truth: dict[str, str] = {}
    seeds = []
    for intent, texts in by_intent.items():
        for i, text in enumerate(texts):
            name = f"{intent}-{i:02d}.txt"
            (folder / name).write_text(text, encoding="utf-8")
            truth[name] = intent
            if i < SEEDS_PER_INTENT:
                seeds.append((name, intent))
    labels = root / "seeds.csv"
    with open(labels, "w", newline="", encoding="utf-8") as handle:
        writer = csv.writer(handle)
        writer.writerow(["document", "category"])
        writer.writerows(seeds)
    return folder, labels, truth


def accuracy(result, truth: dict[str, str]) -> float:  # type: ignore[no-untyped-def]
    rows = [i for i, status in enumerate(result.status) if status == "assigned"]
    right = sum(result.categories[result.assigned[i]] == truth[result.ids[i]] for i in rows)
    return right / len(rows)


def test_a_cached_rerun_reproduces_the_plain_run(pile: tuple[Path, Path, dict[str, str]], tmp_path: Path) -> None:
    folder, labels, _ = pile
    plain = sort_folder(folder, seeds_file=labels)
    first = sort_into_workspace(folder, seeds_file=labels, workspace=tmp_path / "w.sqlite")
    again = sort_into_workspace(folder, workspace=tmp_path / "w.sqlite")  # no seeds given: the recorded ones
    assert not first.graph_cached and again.graph_cached
    assert (first.sync.new, again.sync.unchanged) == (len(plain), len(plain))  # type: ignore[union-attr]
    assert again.labels_added == 0 and again.run_id == first.run_id + 1
    for run in (first, again):
        assert run.result.ids == plain.ids
        np.testing.assert_array_equal(run.result.assigned, plain.assigned)
        np.testing.assert_allclose(run.result.probabilities, plain.probabilities, atol=1e-6)


def test_a_graph_cached_by_an_older_recipe_is_rebuilt(
    pile: tuple[Path, Path, dict[str, str]], tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    """A cache is only as good as the code that filled it (common practice: version the key):
    after the way vectors or graph are computed changes, the cached graph is not reused."""
    import seedsort.sorting

    folder, labels, _ = pile
    monkeypatch.setattr(seedsort.sorting, "PREPARED_RECIPE", seedsort.sorting.PREPARED_RECIPE - 1)
    older = sort_into_workspace(folder, seeds_file=labels, workspace=tmp_path / "w.sqlite")
    monkeypatch.undo()
    current = sort_into_workspace(folder, workspace=tmp_path / "w.sqlite")
    again = sort_into_workspace(folder, workspace=tmp_path / "w.sqlite")
    assert (older.graph_cached, current.graph_cached, again.graph_cached) == (False, False, True)


def test_corrections_become_seeds_and_help(pile: tuple[Path, Path, dict[str, str]], tmp_path: Path) -> None:
    """A user reviews the twelve closest calls (answering from the dataset's own intents) and
    re-runs with the same seed file: the decisions are seeds now, and accuracy on the rest
    does not fall."""
    folder, labels, truth = pile
    workspace = tmp_path / "w.sqlite"
    before = sort_into_workspace(folder, seeds_file=labels, workspace=workspace)
    with open_review(workspace=workspace, limit=12) as session:
        reviewed = [item.id for item in session.queue()]
        corrected = [doc for doc, item in zip(reviewed, session.queue()) if item.category != truth[doc]]
        for doc in reviewed:
            session.decide(doc, truth[doc])
    assert corrected, "the closest calls should include some wrong ones"
    after = sort_into_workspace(folder, seeds_file=labels, workspace=workspace)  # same seed file again
    row = {doc: i for i, doc in enumerate(after.result.ids)}
    for doc in reviewed:
        assert after.result.status[row[doc]] == "seed"
        assert after.result.categories[after.result.seed_label[row[doc]]] == truth[doc]
    assert accuracy(after.result, truth) >= accuracy(before.result, truth)


def test_a_changed_folder_keeps_every_decision(pile: tuple[Path, Path, dict[str, str]], tmp_path: Path) -> None:
    source, labels, _ = pile
    folder = tmp_path / "queries"
    folder.mkdir()
    for path in source.iterdir():
        (folder / path.name).write_bytes(path.read_bytes())
    workspace = tmp_path / "w.sqlite"
    sort_into_workspace(folder, seeds_file=labels, workspace=workspace)
    with Workspace(workspace) as ws:
        ws.decide("exchange_rate-10.txt", "exchange_rate")
    (folder / "card_arrival-00.txt").write_text("Where is my new card? It still has not arrived.", encoding="utf-8")
    (folder / "pin_blocked-29.txt").unlink()
    (folder / "new-query.txt").write_text("What rate do you use to convert euros?", encoding="utf-8")
    run = sort_into_workspace(folder, workspace=workspace)
    assert (run.sync.new, run.sync.changed, run.sync.gone) == (1, 1, 1)  # type: ignore[union-attr]
    assert run.stale == ("card_arrival-00.txt",)
    row = {doc: i for i, doc in enumerate(run.result.ids)}
    assert "pin_blocked-29.txt" not in row and "new-query.txt" in row
    # The edited seed keeps its label (flagged, not silently relabelled); the review decision stands.
    assert run.result.status[row["card_arrival-00.txt"]] == "seed"
    assert run.result.status[row["exchange_rate-10.txt"]] == "seed"
    with Workspace(workspace) as ws:
        assert len(ws.current_labels()) == len(INTENTS) * SEEDS_PER_INTENT + 1


def test_review_session(pile: tuple[Path, Path, dict[str, str]], tmp_path: Path) -> None:
    folder, labels, truth = pile
    workspace = tmp_path / "w.sqlite"
    sort_into_workspace(folder, seeds_file=labels, workspace=workspace)
    with open_review(workspace=workspace, limit=20) as session:
        queue = session.queue()
        assert len(queue) == 20 and session.categories == tuple(sorted(INTENTS))
        gaps = [item.candidates[0].probability - item.candidates[1].probability for item in queue]
        assert gaps == sorted(gaps)  # closest calls first
        first, second = queue[0], queue[1]
        assert all(seed.id.endswith(".txt") and seed.category in INTENTS for seed in first.nearby)
        session.decide(first.id, truth[first.id])
        session.decide(second.id, None)
        assert [item.id for item in session.queue()][:1] == [queue[2].id]
        assert session.undo() == second.id
        assert second.id in [item.id for item in session.queue()]
        session.decide(second.id, None)
        session.refresh()
        assert first.id not in [item.id for item in session.queue()]
        status = dict(zip(session.result.ids, session.result.status))
        assert status[first.id] == "seed" and status[second.id] == NO_CATEGORY
    with Workspace(workspace) as ws:
        assert len(ws.runs()) == 2  # the first run and the refresh
        assert ws.current_labels()[second.id].category is None


def test_review_orders(pile: tuple[Path, Path, dict[str, str]], tmp_path: Path) -> None:
    folder, labels, _ = pile
    workspace = tmp_path / "w.sqlite"
    # One mistagged seed: a card-arrival query labelled as exchange rate.
    text = labels.read_text(encoding="utf-8").replace("card_arrival-00.txt,card_arrival", "card_arrival-00.txt,exchange_rate")
    mistagged = tmp_path / "seeds.csv"
    mistagged.write_text(text, encoding="utf-8")
    sort_into_workspace(folder, seeds_file=mistagged, workspace=workspace)
    with open_review(workspace=workspace, order="seeds") as session:
        disputed = session.queue()
        assert "card_arrival-00.txt" in [item.id for item in disputed]
        assert all(item.status == "seed" and "disputed" in item.reason for item in disputed)
    with open_review(workspace=workspace, order="category", category="pin_blocked") as session:
        members = session.queue()
        assert members and all(item.category == "pin_blocked" for item in members)
        confidences = [item.candidates[0].probability for item in members]
        assert confidences == sorted(confidences)


def test_a_quick_respread_with_unchanged_seeds_equals_the_full_run(pile: tuple[Path, Path, dict[str, str]]) -> None:
    """The review's quick re-spread reuses the last run's weight, temperature, threshold and
    seed checks instead of cross-checking again: with the same seeds it must reproduce the
    full run exactly."""
    from seedsort.seeds import read_labels_file, resolve_seeds
    from seedsort.sorting import prepare, sort_documents
    from seedsort.sources import read_collection

    folder, labels, _ = pile
    documents = list(read_collection(folder).documents)
    seeds = resolve_seeds(documents, read_labels_file(labels), root=folder, labels_file=labels)
    prepared = prepare(documents)
    full = sort_documents(documents, seeds, prepared=prepared)
    quick = sort_documents(documents, seeds, prepared=prepared, checked=full)
    assert "cross-check" not in quick.settings["seconds"]
    np.testing.assert_array_equal(quick.probabilities, full.probabilities)
    for name in ("assigned", "status", "cross_checked", "possible_mislabel"):
        np.testing.assert_array_equal(getattr(quick, name), getattr(full, name))
    assert quick.estimated_accuracy == full.estimated_accuracy
