"""Check, correct, re-run: runs that remember, over a workspace.

:func:`sort_into_workspace` reads the collection, records it and any seed labels in the
workspace (:mod:`seedsort.workspace`), and runs with every label the workspace holds: seed
files, examples, label columns and review decisions, the newest decision per document
standing. The vectors and neighbour graph are cached in the workspace by the documents'
ids and content hashes and the settings, so a re-run after corrections re-spreads only.

:class:`WorkspaceReview` is the review session the terminal screen drives
(:class:`seedsort.review.ReviewSession`): each decision is committed at once, and
``refresh`` re-spreads over the cached graph and records the run.
"""

from __future__ import annotations

import hashlib
import math
import os
import time
from collections.abc import Iterator, Mapping, Sequence
from datetime import datetime
from dataclasses import asdict, dataclass, fields, replace
from pathlib import Path
from typing import Any

import numpy as np
import pandas as pd

from ._progress import ProgressCallback, no_progress
from .combine import ModelSettings
from .errors import InputError
from .export import LabelEvent, write_atomically
from .results import SortResult
from .review import Candidate, NearbySeed, ReviewItem
from .seeds import match_references, seed_set
from .graph_approx import resolve_graph
from .sorting import Prepared, SeedChecks, SortSettings, _prepared_key, gather, prepare, sort_documents
from .sources import Collection, Document, TableColumns
from .vectors import VectorSettings
from .workspace import RunRecord, SyncCounts, Workspace, default_workspace_path

#: Status of a document a reviewer marked as fitting no category.
NO_CATEGORY = "no_category"
#: Most categories shown for one document under review.
SHOWN_CANDIDATES = 5


def settings_to_dict(settings: SortSettings) -> dict[str, Any]:
    return asdict(settings)


def settings_from_dict(record: dict[str, Any]) -> SortSettings:
    """Inverse of :func:`settings_to_dict` (JSON turns tuples into lists; they are turned back)."""

    def build(cls: type, values: dict[str, Any]) -> Any:
        names = {f.name for f in fields(cls)}
        return cls(**{k: tuple(v) if isinstance(v, list) else v for k, v in values.items() if k in names})

    top = dict(record)
    vectors = build(VectorSettings, top.pop("vectors", {}))
    model = build(ModelSettings, top.pop("model", {}))
    return build(SortSettings, {**top, "vectors": vectors, "model": model})


def _fingerprint(documents: Sequence[Document], settings: SortSettings) -> str:
    digest = hashlib.sha256(repr(_prepared_key(settings)).encode())
    for doc in documents:
        digest.update(doc.id.encode("utf-8", "surrogatepass"))
        digest.update(b"\0")
        digest.update(doc.content_hash.encode())
    return digest.hexdigest()


def cached_prepare(
    workspace: Workspace,
    documents: Sequence[Document],
    settings: SortSettings,
    on_progress: ProgressCallback | None = None,
) -> tuple[Prepared, bool]:
    """Vectors and graph from the workspace cache when the documents and settings match, else built and cached.

    Returns the prepared stages and whether they came from the cache.
    """
    key = _fingerprint(documents, settings)
    stored = workspace.cache_get(key)
    if stored is not None:
        prepared = Prepared(
            vectors=stored["vectors"], affinity=stored["affinity"], graph=stored["graph"],
            settings_key=_prepared_key(settings), timings={"vectors": 0.0, "graph": 0.0},
            graph_method=resolve_graph(settings.graph, len(documents)),
        )
        return prepared, True
    prepared = prepare(documents, settings, on_progress=on_progress)
    workspace.cache_put(
        key, "prepared", {"vectors": prepared.vectors, "affinity": prepared.affinity, "graph": prepared.graph}
    )
    return prepared, False


@dataclass(frozen=True)
class WorkspaceRun:
    """A run made over a workspace, and what it found there.

    Attributes
    ----------
    result:
        The run's assignments.
    workspace:
        Path of the workspace file.
    run_id:
        The run's number in the workspace.
    sync:
        New / changed / unchanged / gone documents since the last read (None when not re-read).
    labels_added:
        Label events added from seed files, examples and label columns in this run.
    stale:
        Labelled documents whose text changed after they were labelled (kept, and flagged).
    graph_cached:
        Whether the vectors and graph came from the workspace cache.
    """

    result: SortResult
    workspace: Path
    run_id: int
    sync: SyncCounts | None
    labels_added: int
    stale: tuple[str, ...]
    graph_cached: bool


def _run(
    workspace: Workspace,
    documents: Sequence[Document],
    settings: SortSettings,
    prepared: Prepared,
    collection: Collection | None,
    on_progress: ProgressCallback | None,
    *,
    checked: SortResult | SeedChecks | None = None,
    record: bool = True,
) -> tuple[SortResult, int | None]:
    """One run with the workspace's standing labels; stores it (unless ``record`` is false).

    With ``checked``, a quick re-spread that reuses those seed checks (see
    :func:`seedsort.sorting.sort_documents`). Returns (result, run id or None).
    """
    row_of = {doc.id: row for row, doc in enumerate(documents)}
    labels = {doc: d.category for doc, d in workspace.current_labels().items() if doc in row_of}
    chosen = {row_of[doc]: cat for doc, cat in labels.items() if cat is not None}
    rejected = np.array(sorted(row_of[doc] for doc, cat in labels.items() if cat is None), dtype=np.int64)
    seeds = seed_set(documents, chosen)
    result = sort_documents(
        documents, seeds, settings, on_progress=on_progress, collection=collection, prepared=prepared, checked=checked
    )
    if rejected.size:
        result = _mark_no_category(result, rejected)
    if not record:
        return result, None
    names = result.categories

    def name(index: int) -> str | None:
        return names[index] if index >= 0 else None

    per_category = [None if math.isnan(x) else float(x) for x in result.estimated_category_accuracy]
    run_id = workspace.record_run(
        {**result.settings, "categories": list(names), "estimated_category_accuracy": per_category,
         "quick": checked is not None, "sort_settings": settings_to_dict(settings)},
        result.estimated_accuracy,
        (
            (result.ids[i], name(int(result.assigned[i])), float(result.confidence[i]), float(result.margin[i]),
             str(result.status[i]), name(int(result.cross_checked[i])), bool(result.possible_mislabel[i]))
            for i in range(len(result))
        ),
    )
    return result, run_id


def _stored_checks(workspace: Workspace, run: RunRecord) -> SeedChecks:
    """The seed checks of a recorded run, for a quick re-spread without cross-checking again."""
    names = tuple(run.settings.get("categories", ()))  # type: ignore[arg-type]
    index = {name: i for i, name in enumerate(names)}
    rows = workspace.assignments(run.run_id)
    ids = tuple(row[0] for row in rows)
    seed_label = np.array([index.get(row[1], -1) if row[4] == "seed" else -1 for row in rows], dtype=np.int64)
    cross_checked = np.array([index.get(row[5], -1) if row[5] else -1 for row in rows], dtype=np.int64)
    per_category = [np.nan if x is None else x for x in run.settings.get("estimated_category_accuracy", [])]  # type: ignore[union-attr]
    return SeedChecks(
        ids=ids, categories=names, seed_label=seed_label, cross_checked=cross_checked,
        possible_mislabel=np.array([row[6] for row in rows], dtype=bool), settings=run.settings,
        estimated_accuracy=run.estimated_accuracy, estimated_category_accuracy=np.array(per_category, dtype=float),
    )


def _mark_no_category(result: SortResult, rows: np.ndarray) -> SortResult:
    status = result.status.astype(object)
    status[rows] = NO_CATEGORY
    assigned = result.assigned.copy()
    assigned[rows] = -1
    confidence, margin = result.confidence.copy(), result.margin.copy()
    confidence[rows] = np.nan
    margin[rows] = np.nan
    return replace(result, status=status.astype(str), assigned=assigned, confidence=confidence, margin=margin)


def sort_into_workspace(
    path: str | os.PathLike[str],
    *,
    workspace: str | os.PathLike[str] | None = None,
    seeds_file: str | os.PathLike[str] | None = None,
    examples_folder: str | os.PathLike[str] | None = None,
    columns: TableColumns | None = None,
    settings: SortSettings | None = None,
    on_progress: ProgressCallback | None = None,
) -> WorkspaceRun:
    """Read the collection, record it and the given labels in the workspace, and run.

    The workspace (default: :func:`seedsort.workspace.default_workspace_path`) is created on
    the first run. Labels already recorded are used even when no seed labels are given now.

    Raises
    ------
    InputError, SeedError
        With one readable sentence, for unreadable input, an unusable workspace or seeds.
    """
    settings = settings or SortSettings()
    progress = on_progress or no_progress
    gathered = gather(path, seeds_file=seeds_file, examples_folder=examples_folder, columns=columns, on_progress=progress)
    documents = list(gathered.documents)
    root = Path(gathered.collection.root)
    location = Path(workspace) if workspace is not None else default_workspace_path(path)
    with Workspace(location) as store:
        sync = store.sync_documents(documents)
        store.set_meta("collection_root", str(gathered.collection.root))
        added = 0
        for pairs, origin, labels_file in (
            (gathered.label_column, "label_column", None),
            (gathered.examples, "examples_folder", None),
            (gathered.seed_file, "seed_file", seeds_file),
        ):
            if pairs:
                rows = match_references(documents, pairs, root=root, labels_file=labels_file)
                added += store.record_labels(((documents[r].id, cat) for r, cat in rows.items()), origin)
        if not store.current_labels():
            raise InputError(
                "No seed labels given and none recorded in the workspace; pass a labels file with --seeds, "
                "an examples folder with --examples, or a table with a label column (--label-column)."
            )
        prepared, cached = cached_prepare(store, documents, settings, progress)
        result, run_id = _run(store, documents, settings, prepared, gathered.collection, progress)
        stale = tuple(store.stale_labels())
    return WorkspaceRun(result, location, run_id, sync, added, stale, cached)


def _gap(probabilities: np.ndarray) -> np.ndarray:
    if probabilities.shape[1] < 2:
        return np.ones(probabilities.shape[0])
    top2 = -np.sort(-probabilities, axis=1)[:, :2]
    return top2[:, 0] - top2[:, 1]


class WorkspaceReview:
    """A review of one workspace's latest state (implements :class:`seedsort.review.ReviewSession`).

    Parameters
    ----------
    workspace:
        An open workspace with at least one run.
    order:
        ``margin`` (closest calls first), ``suggested`` (labels that would help the run most),
        ``category`` (one category's members, least confident first) or ``seeds`` (seeds whose
        label a held-out model disputes).
    category:
        The category for order ``category``.
    limit:
        Most documents in the queue at a time.
    """

    def __init__(
        self,
        workspace: Workspace,
        *,
        order: str = "margin",
        category: str | None = None,
        limit: int = 200,
        on_progress: ProgressCallback | None = None,
    ) -> None:
        last = workspace.last_run()
        if last is None or "sort_settings" not in last.settings:
            raise InputError(f"The workspace {workspace.path} has no run yet; run 'seedsort sort' on the collection first.")
        self._store = workspace
        self._settings = settings_from_dict(last.settings["sort_settings"])  # type: ignore[arg-type]
        self._documents = workspace.documents()
        self._progress = on_progress or no_progress
        self._prepared, _ = cached_prepare(workspace, self._documents, self._settings, self._progress)
        self._order, self._category, self._limit = order, category, limit
        self._start = workspace.last_seq()
        self._refreshed_at = self._start
        self._decided: set[str] = set()
        self.runs = 0
        # Opening re-spreads with the last run's seed checks: a full cross-check is for 'sort'.
        self._result = self._rerun(record=False, checked=_stored_checks(workspace, last))
        if order == "category" and category not in self._result.categories:
            known = ", ".join(self._result.categories)
            raise InputError(f"No category {category!r} in this workspace; the categories are: {known}.")
        self._queue = self._build_queue()

    # -- ReviewSession -------------------------------------------------------------------

    @property
    def categories(self) -> tuple[str, ...]:
        return self._result.categories

    @property
    def location(self) -> str:
        return str(self._store.path)

    @property
    def result(self) -> SortResult:
        """The latest run's result."""
        return self._result

    @property
    def workspace(self) -> Workspace:
        return self._store

    @property
    def documents(self) -> list[Document]:
        """The documents under review, as the workspace holds them."""
        return self._documents

    @property
    def prepared(self) -> Prepared:
        """The cached vectors and graph the session re-spreads over."""
        return self._prepared

    def queue(self) -> list[ReviewItem]:
        return [item for item in self._queue if item.id not in self._decided]

    def decide(self, document_id: str, category: str | None) -> None:
        if category is not None and category not in self.categories:
            raise InputError(f"No category {category!r}; choose one of: {', '.join(self.categories)}.")
        self._store.decide(document_id, category)
        self._decided.add(document_id)

    def undo(self) -> str | None:
        document = self._store.undo_last(since=self._start)
        if document is not None:
            self._decided.discard(document)
        return document

    def refresh(self) -> None:
        if self._store.last_seq() != self._refreshed_at:
            self._result = self._rerun(record=True, checked=self._result)
            self._refreshed_at = self._store.last_seq()
        self._queue = self._build_queue()

    # -- internals -----------------------------------------------------------------------

    def _rerun(self, *, record: bool, checked: SortResult | SeedChecks) -> SortResult:
        started = time.perf_counter()
        result, _ = _run(
            self._store, self._documents, self._settings, self._prepared, None, self._progress,
            checked=checked, record=record,
        )
        self.runs += int(record)
        self.last_refresh_seconds = time.perf_counter() - started
        self._row_of = {d: i for i, d in enumerate(result.ids)}
        return result

    def _rows_in_order(self) -> list[tuple[int, str]]:
        result = self._result
        status = result.status
        if self._order == "seeds":
            seeds = np.flatnonzero(status == "seed")
            disputed = [
                int(r) for r in seeds
                if result.cross_checked[r] >= 0 and result.cross_checked[r] != result.seed_label[r]
            ]
            disputed.sort(key=lambda r: (not result.possible_mislabel[r], result.ids[r]))
            return [
                (r, f"disputed: held-out model says {result.categories[result.cross_checked[r]]}")
                for r in disputed
            ]
        stale = set(self._store.stale_labels())
        front = [(i, "text changed since it was labelled") for i, d in enumerate(result.ids) if d in stale]
        open_rows = np.flatnonzero(np.isin(status, ("assigned", "out_of_scope", "unreached")))
        if self._order == "category":
            j = result.categories.index(self._category)  # type: ignore[arg-type]
            members = open_rows[result.assigned[open_rows] == j]
            ranked = members[np.lexsort((np.array(result.ids, dtype=object)[members], result.confidence[members]))]
            return front + [(int(r), f"in {self._category}, least confident first") for r in ranked]
        if self._order == "suggested":
            from .suggest import suggest_labels

            picks = suggest_labels(result, self._prepared, self._limit)
            return front + [(int(p.row), p.reason) for p in picks]
        gap = _gap(result.probabilities)[open_rows]
        ranked = open_rows[np.lexsort((np.array(result.ids, dtype=object)[open_rows], gap))]
        reasons = {"assigned": "close call", "out_of_scope": "fits no category well", "unreached": "no seed reaches it"}
        return front + [(int(r), reasons[str(status[r])]) for r in ranked]

    def _build_queue(self) -> list[ReviewItem]:
        items: list[ReviewItem] = []
        if self._limit <= 0:
            return items
        for row, reason in self._rows_in_order():
            if self._documents[row].id in self._decided:
                continue
            items.append(self._item(row, reason))
            if len(items) >= self._limit:
                break
        return items

    def close(self) -> None:
        """Close the workspace (every decision is already committed)."""
        self._store.close()

    def __enter__(self) -> WorkspaceReview:
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()

    def _item(self, row: int, reason: str) -> ReviewItem:
        result, doc = self._result, self._documents[row]
        probs = result.probabilities[row]
        top = np.argsort(-probs, kind="stable")[:SHOWN_CANDIDATES]
        row_of_id = self._row_of
        nearby = tuple(
            NearbySeed(seed_id, category, similarity, result.snippets[row_of_id[seed_id]])
            for seed_id, category, similarity in result.nearest_seeds(row)
            if seed_id != doc.id
        )
        assigned = int(result.assigned[row])
        margin = float(result.margin[row])
        return ReviewItem(
            id=doc.id,
            source=doc.source,
            text=doc.text,
            status=str(result.status[row]),
            category=result.categories[assigned] if assigned >= 0 else None,
            candidates=tuple(Candidate(result.categories[int(j)], float(probs[j])) for j in top),
            nearby=nearby,
            margin=None if math.isnan(margin) else margin,
            reason=reason,
        )


class TextsById(Mapping[str, str]):
    """Document id -> text over a list of documents, each text read (from the documents'
    spool) only when asked: an export's look-ups without a dict of every text."""

    def __init__(self, documents: Sequence[Document]) -> None:
        self._documents = documents
        self._row = {doc.id: row for row, doc in enumerate(documents)}

    def __getitem__(self, doc_id: str) -> str:
        return self._documents[self._row[doc_id]].text

    def __iter__(self) -> Iterator[str]:
        return iter(self._row)

    def __len__(self) -> int:
        return len(self._row)


@dataclass(frozen=True)
class WorkspaceState:
    """A workspace's current state for export: the latest assignments with every decision so far.

    Attributes
    ----------
    result:
        Re-spread with the standing labels and the last run's seed checks (no cross-check).
    root:
        The folder the last run read.
    texts:
        Document id -> text, as the workspace holds them (:class:`TextsById`: each text read
        when asked).
    history:
        Every label event, oldest first.
    """

    result: SortResult
    root: str
    texts: Mapping[str, str]
    history: list[LabelEvent]


def current_state(
    collection: str | os.PathLike[str] | None = None,
    *,
    workspace: str | os.PathLike[str] | None = None,
    on_progress: ProgressCallback | None = None,
) -> WorkspaceState:
    """The latest state of a collection's workspace (or the one given), for export.

    Raises
    ------
    InputError
        when there is no workspace or no run in it yet.
    """
    with open_review(collection, workspace=workspace, limit=0, on_progress=on_progress) as session:
        store = session.workspace
        root = store.get_meta("collection_root") or ""
        history = [
            LabelEvent(
                document=event.document_id, category=event.category, origin=event.origin,
                time=datetime.fromisoformat(event.decided_at), superseded=event.superseded, action=event.action,
            )
            for event in store.history()
        ]
        return WorkspaceState(replace(session.result, root=root), root, TextsById(session.documents), history)


def write_suggestions(items: Sequence[ReviewItem], path: str | os.PathLike[str]) -> Path:
    """Write suggested documents as a labels CSV whose ``category`` column is left to fill in.

    Columns: document, category (empty), guess (the run's category), reason, text (first 200
    characters). The file is accepted by ``--seeds`` as it is: rows with an empty category
    are ignored.
    """
    path = Path(path)
    if path.suffix.lower() != ".csv":
        raise InputError(f"Write suggestions to a .csv file, not {path.name}.")
    frame = pd.DataFrame(
        [
            {"document": item.id, "category": "", "guess": item.category or "", "reason": item.reason,
             "text": " ".join(item.text.split())[:200]}
            for item in items
        ],
        columns=["document", "category", "guess", "reason", "text"],
    )
    return write_atomically(path, lambda tmp: frame.to_csv(tmp, index=False), "suggestions")


def open_review(
    collection: str | os.PathLike[str] | None = None,
    *,
    workspace: str | os.PathLike[str] | None = None,
    order: str = "margin",
    category: str | None = None,
    limit: int = 200,
    on_progress: ProgressCallback | None = None,
) -> WorkspaceReview:
    """Open the workspace of a collection (or the one given) for review.

    Raises
    ------
    InputError
        when there is no workspace or no run in it yet.
    """
    if workspace is None and collection is None:
        raise InputError("Give the collection (as given to 'seedsort sort') or --workspace FILE.")
    location = Path(workspace) if workspace is not None else default_workspace_path(collection)  # type: ignore[arg-type]
    store = Workspace(location, create=False)
    try:
        return WorkspaceReview(store, order=order, category=category, limit=limit, on_progress=on_progress)
    except BaseException:
        store.close()
        raise


__all__ = [
    "NO_CATEGORY",
    "WorkspaceReview",
    "WorkspaceState",
    "current_state",
    "WorkspaceRun",
    "cached_prepare",
    "open_review",
    "settings_from_dict",
    "settings_to_dict",
    "sort_into_workspace",
    "write_suggestions",
]
