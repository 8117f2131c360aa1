"""The workspace: one SQLite file per collection that remembers documents, decisions and runs.

Tables (schema version :data:`SCHEMA_VERSION`):

``documents``  id, source, content hash, text, position in the last read, present flag.
``decisions``  append-only label history: every label given by a seed file, an examples
               folder, a label column or a review, and every undo, with its time and the
               content hash of the text it was made on. The current label of a document is
               its latest event; nothing is ever deleted or rewritten.
``runs``       one row per run: settings (JSON), estimated accuracy, counts.
``assignments`` the category, confidence, margin and status each run gave each document.
``cache``      seed-independent work (vectors and neighbour graph) keyed by the documents
               and settings it was built from, so a re-run after a few corrections only
               re-spreads.

Every write is one transaction (SQLite WAL journal, ``synchronous=FULL``): a process killed at
any moment leaves the file readable with every decision committed before the kill. A file
written by a newer schema, or a file that is not a seedsort workspace, is refused unchanged.
Costs: syncing n documents is one pass with an in-memory id -> hash map, O(n) rows written
only for new or changed documents; reading the current labels is one indexed query.
"""

from __future__ import annotations

import io
import json
import os
import sqlite3
from collections.abc import Iterable, Iterator, Sequence
from contextlib import contextmanager
from dataclasses import dataclass
from datetime import datetime, timezone
from pathlib import Path

import numpy as np
import scipy.sparse as sp

from .errors import InputError
from .sources import Document, TextSpool

SCHEMA_VERSION = 2
APPLICATION_ID = 0x53454544  # "SEED": marks the file as a seedsort workspace
WORKSPACE_SUFFIX = ".seedsort.sqlite"
#: Where a label can come from.
ORIGINS = ("seed_file", "examples_folder", "label_column", "review", "import")

_SCHEMA = """
CREATE TABLE meta (key TEXT PRIMARY KEY, value TEXT NOT NULL);
CREATE TABLE documents (
    id TEXT PRIMARY KEY,
    source TEXT NOT NULL,
    content_hash TEXT NOT NULL,
    text TEXT NOT NULL,
    position INTEGER NOT NULL,
    present INTEGER NOT NULL DEFAULT 1,
    first_seen TEXT NOT NULL,
    changed_at TEXT
);
CREATE TABLE decisions (
    seq INTEGER PRIMARY KEY AUTOINCREMENT,
    document_id TEXT NOT NULL,
    action TEXT NOT NULL CHECK (action IN ('label', 'withdraw')),
    category TEXT,
    origin TEXT NOT NULL,
    content_hash TEXT,
    decided_at TEXT NOT NULL,
    undoes INTEGER REFERENCES decisions(seq)
);
CREATE INDEX decisions_by_document ON decisions(document_id, seq);
CREATE TABLE runs (
    run_id INTEGER PRIMARY KEY AUTOINCREMENT,
    finished_at TEXT NOT NULL,
    settings TEXT NOT NULL,
    estimated_accuracy REAL,
    counts TEXT NOT NULL,
    documents INTEGER NOT NULL
);
CREATE TABLE assignments (
    run_id INTEGER NOT NULL REFERENCES runs(run_id),
    document_id TEXT NOT NULL,
    category TEXT,
    confidence REAL,
    margin REAL,
    status TEXT NOT NULL,
    seed_check TEXT,
    possible_mislabel INTEGER NOT NULL DEFAULT 0,
    PRIMARY KEY (run_id, document_id)
);
CREATE TABLE cache (key TEXT PRIMARY KEY, kind TEXT NOT NULL, created_at TEXT NOT NULL, payload BLOB NOT NULL);
"""


def _now() -> str:
    return datetime.now(timezone.utc).isoformat(timespec="milliseconds")


def default_workspace_path(collection: str | os.PathLike[str]) -> Path:
    """``<folder or file>.seedsort.sqlite`` beside the collection (never inside it)."""
    path = Path(os.path.abspath(collection))
    return path.with_name(path.name + WORKSPACE_SUFFIX)


@dataclass(frozen=True, slots=True)
class LabelDecision:
    """One event of the label history.

    ``category`` None with action ``label`` means "fits no category"; action ``withdraw``
    takes a document back to unlabelled. ``undoes`` is the event an undo took back.
    ``superseded`` is True when a later event for the same document exists.
    """

    seq: int
    document_id: str
    action: str
    category: str | None
    origin: str
    content_hash: str | None
    decided_at: str
    undoes: int | None
    superseded: bool = False


@dataclass(frozen=True, slots=True)
class SyncCounts:
    """What a read of the collection changed in the workspace."""

    new: int
    changed: int
    unchanged: int
    gone: int


@dataclass(frozen=True, slots=True)
class RunRecord:
    run_id: int
    finished_at: str
    settings: dict[str, object]
    estimated_accuracy: float | None
    counts: dict[str, int]
    documents: int


class Workspace:
    """An open workspace file. Use as a context manager, or call :meth:`close`.

    Parameters
    ----------
    path:
        The SQLite file; created (with its folder) when ``create`` is true and it does not exist.

    Raises
    ------
    InputError
        when the file is not a seedsort workspace, was written by a newer seedsort, or
        cannot be created.
    """

    def __init__(self, path: str | os.PathLike[str], *, create: bool = True) -> None:
        self.path = Path(path)
        if not self.path.exists():
            if not create:
                raise InputError(f"No workspace at {self.path}; run 'seedsort sort' on the collection first.")
            try:
                self.path.parent.mkdir(parents=True, exist_ok=True)
            except OSError as exc:
                raise InputError(f"Cannot create the workspace folder {self.path.parent} ({exc.strerror}); choose another place with --workspace.") from exc
            self._db = self._connect()
            self._create()
        else:
            self._check_header()
            version = self._read_version()
            self._db = self._connect()
            if version is None:
                self._create()
            elif version < SCHEMA_VERSION:
                self._migrate(version)

    # -- opening -------------------------------------------------------------------------

    def _connect(self) -> sqlite3.Connection:
        try:
            db = sqlite3.connect(self.path, isolation_level=None, timeout=10.0)
            db.execute("PRAGMA journal_mode=WAL")
        except sqlite3.Error as exc:
            raise InputError(f"Cannot open the workspace {self.path} ({exc}); choose another place with --workspace.") from exc
        db.execute("PRAGMA synchronous=FULL")
        db.execute("PRAGMA foreign_keys=ON")
        return db

    def _check_header(self) -> None:
        with open(self.path, "rb") as handle:
            header = handle.read(100)
        if len(header) == 0:
            return  # an empty file (e.g. created by touch): becomes a workspace
        if not header.startswith(b"SQLite format 3\x00") or int.from_bytes(header[68:72], "big") not in (0, APPLICATION_ID):
            raise InputError(f"{self.path} is not a seedsort workspace; choose another file with --workspace.")

    def _create(self) -> None:
        with self._transaction():
            self._db.execute(f"PRAGMA application_id={APPLICATION_ID}")
            for statement in filter(str.strip, _SCHEMA.split(";")):
                self._db.execute(statement)
            self._db.executemany(
                "INSERT INTO meta(key, value) VALUES (?, ?)",
                [("schema_version", str(SCHEMA_VERSION)), ("created_at", _now())],
            )

    def _read_version(self) -> int | None:
        """The schema version, read without changing the file; None for an empty database.

        Refuses (InputError) files that are not workspaces and workspaces of a newer schema
        before anything is written, so such files are left exactly as they were.
        """
        try:
            probe = sqlite3.connect(f"{self.path.resolve().as_uri()}?mode=ro", uri=True)
            try:
                tables = {row[0] for row in probe.execute("SELECT name FROM sqlite_master WHERE type='table'")}
                row = probe.execute("SELECT value FROM meta WHERE key='schema_version'").fetchone() if "meta" in tables else None
            finally:
                probe.close()
        except sqlite3.Error as exc:
            raise InputError(f"Cannot read the workspace {self.path} ({exc}); choose another file with --workspace.") from exc
        if not tables:
            return None
        if "meta" not in tables or row is None:
            raise InputError(f"{self.path} is an SQLite file but not a seedsort workspace; choose another file with --workspace.")
        version = int(row[0])
        if version > SCHEMA_VERSION:
            raise InputError(
                f"The workspace {self.path} was written by a newer seedsort (schema {version}, this "
                f"one reads up to {SCHEMA_VERSION}); upgrade seedsort. The file was left unchanged."
            )
        if version < SCHEMA_VERSION and version not in _MIGRATIONS:
            raise InputError(
                f"The workspace {self.path} has schema {version}, which this seedsort cannot migrate; "
                "the file was left unchanged. Start a new workspace with --workspace."
            )
        return version

    def _migrate(self, version: int) -> None:
        steps = _MIGRATIONS[version]
        with self._transaction():
            for statement in steps:
                self._db.execute(statement)
            self._db.execute("UPDATE meta SET value=? WHERE key='schema_version'", (str(SCHEMA_VERSION),))

    @contextmanager
    def _transaction(self) -> Iterator[sqlite3.Connection]:
        self._db.execute("BEGIN IMMEDIATE")
        try:
            yield self._db
        except BaseException:
            self._db.execute("ROLLBACK")
            raise
        self._db.execute("COMMIT")

    def close(self) -> None:
        db = getattr(self, "_db", None)
        if db is not None:
            db.close()
            self._db = None  # type: ignore[assignment]

    def __enter__(self) -> Workspace:
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()

    def get_meta(self, key: str) -> str | None:
        row = self._db.execute("SELECT value FROM meta WHERE key=?", (key,)).fetchone()
        return None if row is None else str(row[0])

    def set_meta(self, key: str, value: str) -> None:
        with self._transaction() as db:
            db.execute("INSERT INTO meta(key, value) VALUES (?, ?) ON CONFLICT(key) DO UPDATE SET value=excluded.value", (key, value))

    # -- documents -----------------------------------------------------------------------

    def sync_documents(self, documents: Sequence[Document]) -> SyncCounts:
        """Bring the stored documents in line with a fresh read of the collection.

        New documents are added, edited ones (same id, new content hash) updated, documents
        no longer found marked absent; labels are never touched (a label whose text changed
        since is reported by :meth:`stale_labels`).
        """
        known = dict(self._db.execute("SELECT id, content_hash FROM documents"))
        now = _now()
        # Documents first, rows when written: the texts are read (from the documents' spool)
        # as executemany takes each row, never all held.
        new: list[tuple[int, Document]] = []
        changed: list[tuple[int, Document]] = []
        moved: list[tuple[object, ...]] = []
        for position, doc in enumerate(documents):
            stored = known.pop(doc.id, None)
            if stored is None:
                new.append((position, doc))
            elif stored != doc.content_hash:
                changed.append((position, doc))
            else:
                moved.append((position, doc.source, doc.id))
        with self._transaction() as db:
            db.executemany(
                "INSERT INTO documents(id, source, content_hash, text, position, present, first_seen) "
                "VALUES (?, ?, ?, ?, ?, 1, ?)",
                ((d.id, d.source, d.content_hash, d.text, p, now) for p, d in new),
            )
            db.executemany(
                "UPDATE documents SET source=?, content_hash=?, text=?, position=?, present=1, changed_at=? WHERE id=?",
                ((d.source, d.content_hash, d.text, p, now, d.id) for p, d in changed),
            )
            db.executemany("UPDATE documents SET position=?, source=?, present=1 WHERE id=?", moved)
            db.executemany("UPDATE documents SET present=0 WHERE id=?", [(gone,) for gone in known])
        return SyncCounts(new=len(new), changed=len(changed), unchanged=len(moved), gone=len(known))

    def documents(self) -> list[Document]:
        """The documents of the last read, in the order they were read.

        Their texts are kept as a fresh read's are (a :class:`~seedsort.sources.TextSpool`:
        in memory up to its budget, beyond it in a temporary file), rows fetched one at a time.
        """
        rows = self._db.execute(
            "SELECT id, source, text, content_hash FROM documents WHERE present=1 ORDER BY position"
        )
        spool = TextSpool()
        return [Document(id=i, source=s, text=t, content_hash=h, spool=spool) for i, s, t, h in rows]

    # -- decisions -----------------------------------------------------------------------

    def _current_rows(self) -> dict[str, tuple[object, ...]]:
        rows = self._db.execute(
            "SELECT d.seq, d.document_id, d.action, d.category, d.origin, d.content_hash, d.decided_at, d.undoes "
            "FROM decisions d JOIN (SELECT document_id, MAX(seq) AS seq FROM decisions GROUP BY document_id) latest "
            "ON d.seq = latest.seq"
        )
        return {row[1]: row for row in rows}

    def current_labels(self) -> dict[str, LabelDecision]:
        """Each labelled document's standing decision (withdrawn ones left out).

        A decision with ``category`` None means the user said it fits no category.
        """
        return {
            doc: LabelDecision(*row)  # type: ignore[arg-type]
            for doc, row in self._current_rows().items()
            if row[2] == "label"
        }

    def record_labels(self, pairs: Iterable[tuple[str, str | None]], origin: str) -> int:
        """Add labels from a seed file, examples folder, label column or import.

        A (document, category, origin) already in the history is not added again, so running
        again with the same seed file never overrides a correction made in a review since;
        a seed file that now says something new is recorded, and being newest, it stands.
        Returns the number of events added.
        """
        if origin not in ORIGINS:
            raise ValueError(f"unknown origin {origin!r}")
        seen = set(
            self._db.execute(
                "SELECT document_id, IFNULL(category, '') FROM decisions WHERE origin=? AND action='label'", (origin,)
            )
        )
        hashes = dict(self._db.execute("SELECT id, content_hash FROM documents"))
        now = _now()
        rows = []
        for doc, category in pairs:
            key = (doc, category or "")
            if key in seen:
                continue
            seen.add(key)
            rows.append((doc, category, origin, hashes.get(doc), now))
        with self._transaction() as db:
            db.executemany(
                "INSERT INTO decisions(document_id, action, category, origin, content_hash, decided_at) "
                "VALUES (?, 'label', ?, ?, ?, ?)",
                rows,
            )
        return len(rows)

    def decide(self, document_id: str, category: str | None, origin: str = "review") -> int:
        """Record one decision now (committed before returning); returns its sequence number."""
        with self._transaction() as db:
            found = db.execute("SELECT content_hash FROM documents WHERE id=?", (document_id,)).fetchone()
            if found is None:
                raise InputError(f"No document {document_id} in the workspace.")
            cursor = db.execute(
                "INSERT INTO decisions(document_id, action, category, origin, content_hash, decided_at) "
                "VALUES (?, 'label', ?, ?, ?, ?)",
                (document_id, category, origin, found[0], _now()),
            )
        return int(cursor.lastrowid or 0)

    def undo_last(self, since: int = 0, origin: str = "review") -> str | None:
        """Take back the latest decision of ``origin`` after sequence ``since`` not yet undone.

        The undo is itself an event: it restores whatever stood before (an earlier label, or
        no label). Returns the document id, or None when there is nothing to undo.
        """
        with self._transaction() as db:
            target = db.execute(
                "SELECT seq, document_id FROM decisions WHERE origin=? AND seq>? AND undoes IS NULL "
                "AND seq NOT IN (SELECT undoes FROM decisions WHERE undoes IS NOT NULL) "
                "ORDER BY seq DESC LIMIT 1",
                (origin, since),
            ).fetchone()
            if target is None:
                return None
            seq, doc = target
            before = db.execute(
                "SELECT action, category, content_hash FROM decisions WHERE document_id=? AND seq<? "
                "ORDER BY seq DESC LIMIT 1",
                (doc, seq),
            ).fetchone()
            action, category, hashed = before if before else ("withdraw", None, None)
            db.execute(
                "INSERT INTO decisions(document_id, action, category, origin, content_hash, decided_at, undoes) "
                "VALUES (?, ?, ?, ?, ?, ?, ?)",
                (doc, action, category, origin, hashed, _now(), seq),
            )
        return str(doc)

    def last_seq(self) -> int:
        row = self._db.execute("SELECT IFNULL(MAX(seq), 0) FROM decisions").fetchone()
        return int(row[0])

    def history(self) -> list[LabelDecision]:
        """Every label event, oldest first, each marked superseded or standing."""
        latest = {row[0] for row in self._db.execute("SELECT MAX(seq) FROM decisions GROUP BY document_id")}
        rows = self._db.execute(
            "SELECT seq, document_id, action, category, origin, content_hash, decided_at, undoes FROM decisions ORDER BY seq"
        )
        return [LabelDecision(*row, superseded=row[0] not in latest) for row in rows]  # type: ignore[misc]

    def stale_labels(self) -> list[str]:
        """Labelled documents whose text changed after the label was given."""
        labels = self.current_labels()
        hashes = dict(self._db.execute("SELECT id, content_hash FROM documents WHERE present=1"))
        return sorted(
            doc for doc, decision in labels.items()
            if doc in hashes and decision.content_hash is not None and decision.content_hash != hashes[doc]
        )

    # -- runs ----------------------------------------------------------------------------

    def record_run(
        self,
        settings: dict[str, object],
        estimated_accuracy: float | None,
        assignments: Iterable[tuple[str, str | None, float | None, float | None, str, str | None, bool]],
    ) -> int:
        """Store a run and its per-document assignments.

        Each assignment is (id, category, confidence, margin, status, seed check, possible
        mislabel): the last two say, for a seed, which category a model that did not see it
        predicted, and whether it clearly disputes the label.
        """
        rows = [
            (doc, category, _finite(confidence), _finite(margin), status, check, int(bool(mislabel)))
            for doc, category, confidence, margin, status, check, mislabel in assignments
        ]
        counts: dict[str, int] = {}
        for row in rows:
            counts[row[4]] = counts.get(row[4], 0) + 1
        with self._transaction() as db:
            cursor = db.execute(
                "INSERT INTO runs(finished_at, settings, estimated_accuracy, counts, documents) VALUES (?, ?, ?, ?, ?)",
                (_now(), json.dumps(settings, default=str), estimated_accuracy, json.dumps(counts), len(rows)),
            )
            run_id = int(cursor.lastrowid or 0)
            db.executemany(
                "INSERT INTO assignments(run_id, document_id, category, confidence, margin, status, seed_check, "
                "possible_mislabel) VALUES (?, ?, ?, ?, ?, ?, ?, ?)",
                [(run_id, *row) for row in rows],
            )
        return run_id

    def runs(self) -> list[RunRecord]:
        rows = self._db.execute(
            "SELECT run_id, finished_at, settings, estimated_accuracy, counts, documents FROM runs ORDER BY run_id"
        )
        return [RunRecord(r, f, json.loads(s), a, json.loads(c), n) for r, f, s, a, c, n in rows]

    def assignments(self, run_id: int) -> list[tuple[str, str | None, float | None, float | None, str, str | None, bool]]:
        """A run's rows as given to :meth:`record_run`."""
        rows = self._db.execute(
            "SELECT document_id, category, confidence, margin, status, seed_check, possible_mislabel "
            "FROM assignments WHERE run_id=?",
            (run_id,),
        )
        return [(d, c, f, m, s, k, bool(x)) for d, c, f, m, s, k, x in rows]

    def last_run(self) -> RunRecord | None:
        runs = self._db.execute("SELECT MAX(run_id) FROM runs").fetchone()[0]
        return next((run for run in self.runs() if run.run_id == runs), None) if runs else None

    # -- cache ---------------------------------------------------------------------------

    def cache_get(self, key: str) -> dict[str, np.ndarray | sp.csr_matrix] | None:
        row = self._db.execute("SELECT payload FROM cache WHERE key=?", (key,)).fetchone()
        return _unpack(row[0]) if row else None

    def cache_put(self, key: str, kind: str, arrays: dict[str, np.ndarray | sp.csr_matrix]) -> None:
        """Store arrays under ``key``, replacing every older entry of the same kind."""
        payload = _pack(arrays)
        with self._transaction() as db:
            db.execute("DELETE FROM cache WHERE kind=?", (kind,))
            db.execute("INSERT INTO cache(key, kind, created_at, payload) VALUES (?, ?, ?, ?)", (key, kind, _now(), payload))


def _finite(value: float | None) -> float | None:
    if value is None:
        return None
    value = float(value)
    return value if np.isfinite(value) else None


def _pack(arrays: dict[str, np.ndarray | sp.csr_matrix]) -> bytes:
    flat: dict[str, np.ndarray] = {}
    for name, value in arrays.items():
        if sp.issparse(value):
            csr = sp.csr_matrix(value)
            flat[f"{name}.data"], flat[f"{name}.indices"] = csr.data, csr.indices
            flat[f"{name}.indptr"], flat[f"{name}.shape"] = csr.indptr, np.array(csr.shape)
        else:
            flat[name] = np.asarray(value)
    buffer = io.BytesIO()
    np.savez(buffer, **flat)
    return buffer.getvalue()


def _unpack(payload: bytes) -> dict[str, np.ndarray | sp.csr_matrix]:
    with np.load(io.BytesIO(payload), allow_pickle=False) as stored:
        flat = {name: stored[name] for name in stored.files}
    out: dict[str, np.ndarray | sp.csr_matrix] = {}
    for name in {key.split(".")[0] for key in flat}:
        if f"{name}.indptr" in flat:
            out[name] = sp.csr_matrix(
                (flat[f"{name}.data"], flat[f"{name}.indices"], flat[f"{name}.indptr"]),
                shape=tuple(int(x) for x in flat[f"{name}.shape"]),
            )
        else:
            out[name] = flat[name]
    return out


#: Statements that bring a workspace of schema N up to SCHEMA_VERSION, in one transaction.
#: Schema 1 had no per-seed check in ``assignments`` and spelled origins with spaces.
_MIGRATIONS: dict[int, tuple[str, ...]] = {
    1: (
        "UPDATE decisions SET origin = replace(origin, ' ', '_')",
        "ALTER TABLE assignments ADD COLUMN seed_check TEXT",
        "ALTER TABLE assignments ADD COLUMN possible_mislabel INTEGER NOT NULL DEFAULT 0",
    ),
}
