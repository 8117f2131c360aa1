"""Reviewing doubtful documents: the queue, the items shown, and the decisions taken.

The terminal screen (``seedsort.cli._review``) works against the :class:`ReviewSession`
protocol only, so it can be driven by the workspace-backed session in a real run and by a
small in-memory session in tests.

A decision is saved the moment it is made (``decide``); ``refresh`` re-spreads the labels
over the cached graph with every decision so far and reorders the queue.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Protocol

#: Queue orders a review can take.
REVIEW_ORDERS = ("margin", "suggested", "category", "seeds")


@dataclass(frozen=True, slots=True)
class Candidate:
    """One category offered for a document, with the model's probability for it."""

    category: str
    probability: float


@dataclass(frozen=True, slots=True)
class NearbySeed:
    """A labelled document near the one under review: the evidence for a category."""

    id: str
    category: str
    similarity: float
    snippet: str


@dataclass(frozen=True, slots=True)
class ReviewItem:
    """One document in the review queue.

    Attributes
    ----------
    id, source, text:
        The document (full text; the screen pages long ones).
    status:
        Its status in the last run (see :data:`seedsort.results.STATUSES`).
    category:
        The category the run gave it (for a seed: the label it was given), or None.
    candidates:
        The most probable categories, most probable first (at most five).
    nearby:
        The nearest labelled documents (at most three).
    margin:
        Lead of the top category over the runner-up, or None when unassigned.
    reason:
        Why it is in the queue, in a few words (e.g. "close call", "seed label disputed").
    """

    id: str
    source: str
    text: str
    status: str
    category: str | None
    candidates: tuple[Candidate, ...]
    nearby: tuple[NearbySeed, ...]
    margin: float | None
    reason: str


class ReviewSession(Protocol):
    """What the review screen needs from whoever holds the documents and decisions."""

    @property
    def categories(self) -> tuple[str, ...]:
        """All category names, in a fixed order (numbered 1.. on screen)."""
        ...

    @property
    def location(self) -> str:
        """Where decisions are saved (shown on screen)."""
        ...

    def queue(self) -> list[ReviewItem]:
        """Documents still to review, in order; decided ones are not in it."""
        ...

    def decide(self, document_id: str, category: str | None) -> None:
        """Record a decision at once: a category name, or None for "fits no category"."""
        ...

    def undo(self) -> str | None:
        """Take back the latest decision of this session; returns its document id (None if none)."""
        ...

    def refresh(self) -> None:
        """Re-spread with every decision so far and rebuild the queue."""
        ...
