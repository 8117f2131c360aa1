"""A small in-memory review session for the review screen's tests, and its BANKING77 items.

:class:`MemoryReviewSession` keeps decisions in a list and appends every call that changes
something (decide, undo, refresh) to a JSON Lines log, flushed at once, so a test driving
the screen through a pseudo-terminal can read which calls a key produced.

:func:`banking77_items` builds review items from the open BANKING77 dataset
(tests/data/banking77, CC BY 4.0): seeds are the first rows of train.csv for a few intents,
documents to review the first rows of test.csv for the same intents. The probabilities are
word-set Jaccard similarities to each intent's seeds, normalised to sum to 1; they only
have to be plausible numbers for the screen to show, not a model's output.
"""

from __future__ import annotations

import csv
import json
import re
from pathlib import Path

from seedsort.review import Candidate, NearbySeed, ReviewItem

BANKING77 = Path(__file__).resolve().parents[1] / "data" / "banking77"
#: Six BANKING77 intents; two share the first letters "card_", so prefixes must be unique.
CATEGORIES = ("card_arrival", "card_linking", "change_pin", "exchange_rate", "lost_or_stolen_card", "request_refund")
SEEDS_PER_CATEGORY = 3
DOCUMENTS_PER_CATEGORY = 2


class MemoryReviewSession:
    """A :class:`seedsort.review.ReviewSession` held in memory, logging its calls to a file.

    Parameters
    ----------
    items:
        The queue in order.
    categories:
        All category names.
    log_path:
        JSON Lines file of calls: ``{"call": "decide", "id": ..., "category": ...}``,
        ``{"call": "undo", "id": ...}``, ``{"call": "refresh"}``.
    reverse_on_refresh:
        Reverse the queue at each refresh, so a test can see that the screen takes the
        new queue (a real session reorders by the re-spread margins).
    """

    def __init__(
        self, items: list[ReviewItem], categories: tuple[str, ...], log_path: Path, *, reverse_on_refresh: bool = False
    ) -> None:
        self._items = list(items)
        self._categories = categories
        self._log_path = log_path
        self._reverse = reverse_on_refresh
        self.decisions: list[tuple[str, str | None]] = []

    @property
    def categories(self) -> tuple[str, ...]:
        return self._categories

    @property
    def location(self) -> str:
        return str(self._log_path)

    def _log(self, **call: object) -> None:
        with self._log_path.open("a", encoding="utf-8") as handle:
            handle.write(json.dumps(call) + "\n")

    def queue(self) -> list[ReviewItem]:
        decided = {document for document, _ in self.decisions}
        return [item for item in self._items if item.id not in decided]

    def decide(self, document_id: str, category: str | None) -> None:
        if category is not None and category not in self._categories:
            raise ValueError(f"unknown category {category!r}")
        self.decisions.append((document_id, category))
        self._log(call="decide", id=document_id, category=category)

    def undo(self) -> str | None:
        if not self.decisions:
            return None
        document_id, _ = self.decisions.pop()
        self._log(call="undo", id=document_id)
        return document_id

    def refresh(self) -> None:
        if self._reverse:
            self._items.reverse()
        self._log(call="refresh")


def read_log(path: Path) -> list[dict[str, object]]:
    """The calls logged so far (an absent file: none)."""
    if not path.exists():
        return []
    return [json.loads(line) for line in path.read_text(encoding="utf-8").splitlines() if line.strip()]


def _rows(name: str) -> list[tuple[str, str]]:
    with (BANKING77 / name).open(encoding="utf-8", newline="") as handle:
        return [(row["text"], row["category"]) for row in csv.DictReader(handle)]


def _words(text: str) -> set[str]:
    return set(re.findall(r"[a-z0-9']+", text.lower()))


def _jaccard(a: set[str], b: set[str]) -> float:
    return len(a & b) / len(a | b) if a | b else 0.0


def banking77_items(*, long_document: bool = False) -> list[ReviewItem]:
    """Review items for :data:`CATEGORIES`, least margin first.

    With ``long_document``, the first item is one document made of the first 40 test.csv
    queries of the six intents, one per line, to exercise paging.
    """
    train, test = _rows("train.csv"), _rows("test.csv")
    seeds: list[tuple[str, str]] = []
    for category in CATEGORIES:
        seeds += [(text, c) for text, c in train if c == category][:SEEDS_PER_CATEGORY]
    seed_words = [(_words(text), text, category) for text, category in seeds]

    def item(document_id: str, text: str) -> ReviewItem:
        words = _words(text)
        similar = sorted(((_jaccard(words, w), t, c) for w, t, c in seed_words), reverse=True)
        best = {c: max(s for s, _, cc in similar if cc == c) for c in CATEGORIES}
        total = sum(best.values()) or 1.0
        ranked = sorted(((s / total, c) for c, s in best.items()), reverse=True)[:5]
        candidates = tuple(Candidate(c, p) for p, c in ranked)
        nearby = tuple(
            NearbySeed(f"train-{seeds.index((t, c))}", c, s, t) for s, t, c in similar[:3]
        )
        return ReviewItem(
            id=document_id, source="banking77/test.csv", text=text, status="assigned",
            category=candidates[0].category, candidates=candidates, nearby=nearby,
            margin=candidates[0].probability - candidates[1].probability, reason="close call",
        )

    items = []
    for category in CATEGORIES:
        rows = [(i, text) for i, (text, c) in enumerate(test) if c == category][:DOCUMENTS_PER_CATEGORY]
        items += [item(f"test-{i}", text) for i, text in rows]
    items.sort(key=lambda it: (it.margin if it.margin is not None else 0.0, it.id))
    if long_document:
        queries = [text for text, c in test if c in CATEGORIES][:40]
        items.insert(0, item("long-0", "\n".join(queries)))
    return items
