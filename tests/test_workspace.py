"""The workspace store: documents, the append-only label history, runs, cache, durability.

Outside references: SQLite's own ``PRAGMA integrity_check`` (the database engine's check of
its file) after processes are killed with SIGKILL mid-write; a plain replay model of the
label history (latest event wins, undo restores what stood before) for the property test.
"""

from __future__ import annotations

import hashlib
import os
import signal
import sqlite3
import subprocess
import sys
import textwrap
import time
from pathlib import Path

import numpy as np
import pytest
import scipy.sparse as sp
from hypothesis import given, settings
from hypothesis import strategies as st

from seedsort.errors import InputError
from seedsort.sources import Document
from seedsort.workspace import SCHEMA_VERSION, Workspace, default_workspace_path


def docs(*pairs: tuple[str, str]) -> list[Document]:
    return [Document.make(i, i, text) for i, text in pairs]


def sha(path: Path) -> str:
    return hashlib.sha256(path.read_bytes()).hexdigest()


def test_default_location_is_beside_the_collection(tmp_path: Path) -> None:
    assert default_workspace_path(tmp_path / "inbox") == tmp_path / "inbox.seedsort.sqlite"
    assert default_workspace_path(tmp_path / "tickets.csv") == tmp_path / "tickets.csv.seedsort.sqlite"


def test_sync_counts_and_order(tmp_path: Path) -> None:
    with Workspace(tmp_path / "w.sqlite") as ws:
        assert ws.sync_documents(docs(("a", "one"), ("b", "two"), ("c", "three"))).new == 3
        counts = ws.sync_documents(docs(("c", "three"), ("a", "one, edited"), ("d", "four")))
        assert (counts.new, counts.changed, counts.unchanged, counts.gone) == (1, 1, 1, 1)
        assert [d.id for d in ws.documents()] == ["c", "a", "d"]
        assert ws.documents()[1].text == "one, edited"


def test_reimporting_a_seed_file_never_overrides_a_review(tmp_path: Path) -> None:
    with Workspace(tmp_path / "w.sqlite") as ws:
        ws.sync_documents(docs(("a", "x"), ("b", "y")))
        assert ws.record_labels([("a", "red"), ("b", "blue")], "seed_file") == 2
        ws.decide("a", "blue")
        assert ws.record_labels([("a", "red"), ("b", "blue")], "seed_file") == 0
        assert ws.current_labels()["a"].category == "blue"
        # The seed file now says something new: recorded, and being newest it stands.
        assert ws.record_labels([("a", "green")], "seed_file") == 1
        assert ws.current_labels()["a"].category == "green"
        history = ws.history()
        assert [h.category for h in history if h.document_id == "a"] == ["red", "blue", "green"]
        assert [h.superseded for h in history if h.document_id == "a"] == [True, True, False]


def test_undo_restores_what_stood_before_and_keeps_the_history(tmp_path: Path) -> None:
    with Workspace(tmp_path / "w.sqlite") as ws:
        ws.sync_documents(docs(("a", "x"), ("b", "y")))
        ws.record_labels([("a", "red")], "seed_file")
        start = ws.last_seq()
        ws.decide("a", "blue")
        ws.decide("b", None)  # fits no category
        assert ws.current_labels()["b"].category is None
        assert ws.undo_last(since=start) == "b"
        assert "b" not in ws.current_labels()
        assert ws.undo_last(since=start) == "a"
        assert ws.current_labels()["a"].category == "red"
        assert ws.undo_last(since=start) is None  # the seed file's label is not this session's
        assert len(ws.history()) == 5  # three decisions and two undos, nothing deleted


def test_changed_text_flags_the_label_and_keeps_it(tmp_path: Path) -> None:
    with Workspace(tmp_path / "w.sqlite") as ws:
        ws.sync_documents(docs(("a", "refund please"), ("b", "late boat")))
        ws.record_labels([("a", "refunds"), ("b", "delays")], "seed_file")
        ws.sync_documents(docs(("a", "actually I lost my bag"), ("b", "late boat")))
        assert ws.stale_labels() == ["a"]
        assert ws.current_labels()["a"].category == "refunds"


def test_cache_round_trip_and_replacement(tmp_path: Path) -> None:
    sparse = sp.random(20, 30, density=0.2, format="csr", random_state=0, dtype=np.float32)
    dense = np.arange(12, dtype=np.float32).reshape(3, 4)
    with Workspace(tmp_path / "w.sqlite") as ws:
        ws.cache_put("k1", "prepared", {"vectors": sparse, "graph": dense})
        back = ws.cache_get("k1")
        assert back is not None
        assert (back["vectors"] != sparse).nnz == 0 and back["vectors"].dtype == np.float32
        np.testing.assert_array_equal(back["graph"], dense)
        ws.cache_put("k2", "prepared", {"graph": dense})
        assert ws.cache_get("k1") is None  # one entry per kind: the workspace does not grow run after run


def test_runs_are_recorded_with_their_assignments(tmp_path: Path) -> None:
    path = tmp_path / "w.sqlite"
    with Workspace(path) as ws:
        ws.sync_documents(docs(("a", "x"), ("b", "y")))
        rows = [("a", "red", 0.9, 0.5, "seed", "blue", True), ("b", None, float("nan"), None, "out_of_scope", None, False)]
        run = ws.record_run({"alpha": 0.99}, 0.8, rows)
        last = ws.last_run()
        assert sorted(ws.assignments(run)) == [rows[0], ("b", None, None, None, "out_of_scope", None, False)]
    assert last is not None and last.run_id == run
    assert last.counts == {"seed": 1, "out_of_scope": 1} and last.settings == {"alpha": 0.99}
    rows = sqlite3.connect(path).execute("SELECT document_id, category, confidence FROM assignments ORDER BY document_id").fetchall()
    assert rows == [("a", "red", 0.9), ("b", None, None)]


def test_a_newer_schema_is_refused_and_left_unchanged(tmp_path: Path) -> None:
    path = tmp_path / "w.sqlite"
    Workspace(path).close()
    db = sqlite3.connect(path)
    db.execute("UPDATE meta SET value=? WHERE key='schema_version'", (str(SCHEMA_VERSION + 1),))
    db.commit()
    db.close()
    before = sha(path)
    with pytest.raises(InputError, match="newer seedsort"):
        Workspace(path)
    assert sha(path) == before


SCHEMA_1 = """
CREATE TABLE meta (key TEXT PRIMARY KEY, value TEXT NOT NULL);
CREATE TABLE documents (id TEXT PRIMARY KEY, source TEXT NOT NULL, content_hash TEXT NOT NULL, text TEXT NOT NULL,
    position INTEGER NOT NULL, present INTEGER NOT NULL DEFAULT 1, first_seen TEXT NOT NULL, changed_at TEXT);
CREATE TABLE decisions (seq INTEGER PRIMARY KEY AUTOINCREMENT, document_id TEXT NOT NULL,
    action TEXT NOT NULL CHECK (action IN ('label', 'withdraw')), category TEXT, origin TEXT NOT NULL,
    content_hash TEXT, decided_at TEXT NOT NULL, undoes INTEGER REFERENCES decisions(seq));
CREATE INDEX decisions_by_document ON decisions(document_id, seq);
CREATE TABLE runs (run_id INTEGER PRIMARY KEY AUTOINCREMENT, finished_at TEXT NOT NULL, settings TEXT NOT NULL,
    estimated_accuracy REAL, counts TEXT NOT NULL, documents INTEGER NOT NULL);
CREATE TABLE assignments (run_id INTEGER NOT NULL REFERENCES runs(run_id), document_id TEXT NOT NULL, category TEXT,
    confidence REAL, margin REAL, status TEXT NOT NULL, PRIMARY KEY (run_id, document_id));
CREATE TABLE cache (key TEXT PRIMARY KEY, kind TEXT NOT NULL, created_at TEXT NOT NULL, payload BLOB NOT NULL);
PRAGMA application_id=1397048644;
INSERT INTO meta VALUES ('schema_version', '1');
INSERT INTO documents VALUES ('a', 'a', 'h', 'text', 0, 1, '2026-12-01T00:00:00+00:00', NULL);
INSERT INTO decisions(document_id, action, category, origin, content_hash, decided_at) VALUES ('a', 'label', 'red', 'seed file', 'h', '2026-12-01T00:00:00+00:00');
INSERT INTO runs VALUES (1, '2026-12-01T00:00:00+00:00', '{}', 0.5, '{}', 1);
INSERT INTO assignments VALUES (1, 'a', 'red', 0.9, 0.1, 'seed');
"""


def test_a_schema_1_workspace_is_migrated_and_keeps_everything(tmp_path: Path) -> None:
    """The schema of the first seedsort workspace (as released in commit 0ff2384) is upgraded
    in place: decisions, documents and runs kept, the new per-seed columns added."""
    path = tmp_path / "w.sqlite"
    db = sqlite3.connect(path)
    db.executescript(SCHEMA_1)
    db.close()
    with Workspace(path) as ws:
        assert ws.get_meta("schema_version") == str(SCHEMA_VERSION)
        assert ws.current_labels()["a"].category == "red"
        assert ws.current_labels()["a"].origin == "seed_file"
        assert ws.assignments(1) == [("a", "red", 0.9, 0.1, "seed", None, False)]
        assert [d.id for d in ws.documents()] == ["a"]
    db = sqlite3.connect(path)
    assert db.execute("PRAGMA integrity_check").fetchone() == ("ok",)


def test_an_older_unknown_schema_is_refused_and_left_unchanged(tmp_path: Path) -> None:
    path = tmp_path / "w.sqlite"
    Workspace(path).close()
    db = sqlite3.connect(path)
    db.execute("UPDATE meta SET value='0' WHERE key='schema_version'")
    db.commit()
    db.close()
    before = sha(path)
    with pytest.raises(InputError, match="cannot migrate"):
        Workspace(path)
    assert sha(path) == before


@pytest.mark.parametrize("content", [b"not a database at all\n" * 10, None])
def test_other_files_are_refused_and_left_unchanged(tmp_path: Path, content: bytes | None) -> None:
    path = tmp_path / "other.sqlite"
    if content is None:  # an SQLite database of some other program
        db = sqlite3.connect(path)
        db.execute("CREATE TABLE notes (body TEXT)")
        db.commit()
        db.close()
    else:
        path.write_bytes(content)
    before = sha(path)
    with pytest.raises(InputError, match="not a seedsort workspace"):
        Workspace(path)
    assert sha(path) == before


def test_missing_workspace_is_not_created_when_reading(tmp_path: Path) -> None:
    with pytest.raises(InputError, match="run 'seedsort sort'"):
        Workspace(tmp_path / "none.sqlite", create=False)
    assert not (tmp_path / "none.sqlite").exists()


# -- the label history against a plain replay model ------------------------------------

operations = st.lists(
    st.one_of(
        st.tuples(st.just("decide"), st.sampled_from("abc"), st.sampled_from(["red", "blue", None])),
        st.tuples(st.just("undo"), st.just(""), st.just(None)),
    ),
    max_size=25,
)


@settings(max_examples=60, deadline=None)
@given(ops=operations)
def test_history_matches_a_replay_model(tmp_path_factory: pytest.TempPathFactory, ops: list[tuple[str, str, str | None]]) -> None:
    """Any mix of decisions and undos: the standing labels are what a replay gives, where
    each undo restores what stood before the latest live decision; events are only added."""
    path = tmp_path_factory.mktemp("ws") / "w.sqlite"
    missing = object()
    model: dict[str, object] = {}
    live: list[tuple[str, object]] = []  # (document, what stood before) per decision not undone
    events = 0
    with Workspace(path) as ws:
        ws.sync_documents(docs(("a", "1"), ("b", "2"), ("c", "3")))
        for op, doc, category in ops:
            if op == "decide":
                live.append((doc, model.get(doc, missing)))
                model[doc] = category
                ws.decide(doc, category)
                events += 1
                continue
            undone = ws.undo_last()
            if not live:
                assert undone is None
                continue
            doc, previous = live.pop()
            assert undone == doc
            events += 1
            if previous is missing:
                model.pop(doc, None)
            else:
                model[doc] = previous
    with Workspace(path) as ws:  # reopened: what was committed is what is read
        assert {d: x.category for d, x in ws.current_labels().items()} == model
        assert len(ws.history()) == events


# -- durability under SIGKILL ----------------------------------------------------------

WRITER = textwrap.dedent(
    """
    import sys
    from seedsort.sources import Document
    from seedsort.workspace import Workspace

    ws = Workspace(sys.argv[1])
    ws.sync_documents([Document.make(f"d{i}", f"d{i}", f"text {i}") for i in range(50)])
    i = 0
    while True:
        seq = ws.decide(f"d{i % 50}", ["red", "blue", None][i % 3])
        if i % 7 == 6:
            ws.undo_last()
        print(seq, flush=True)
        i += 1
    """
)


def test_sigkill_at_any_moment_keeps_every_committed_decision(tmp_path: Path) -> None:
    """Kill a writer mid-stream, again and again; SQLite's integrity check must pass and
    every decision the writer reported as committed must be there."""
    path = tmp_path / "w.sqlite"
    script = tmp_path / "writer.py"
    script.write_text(WRITER)
    rng = np.random.default_rng(7)
    committed: set[int] = set()
    for _ in range(10):
        proc = subprocess.Popen([sys.executable, str(script), str(path)], stdout=subprocess.PIPE, text=True)
        assert proc.stdout is not None
        deadline = time.monotonic() + 30
        target = int(rng.integers(5, 60))
        seen = 0
        while seen < target and time.monotonic() < deadline:
            line = proc.stdout.readline()
            if not line:
                break
            committed.add(int(line))
            seen += 1
        time.sleep(float(rng.uniform(0, 0.02)))  # land the kill at a random point of a write
        os.kill(proc.pid, signal.SIGKILL)
        proc.wait()
        # Any line printed after our last read was printed after its commit, so it counts too.
        committed.update(int(line) for line in proc.stdout.read().split())
        proc.stdout.close()
        assert seen > 0, "the writer never committed a decision"
        db = sqlite3.connect(path)
        assert db.execute("PRAGMA integrity_check").fetchone() == ("ok",)
        stored = {row[0] for row in db.execute("SELECT seq FROM decisions")}
        db.close()
        assert committed <= stored
    with Workspace(path) as ws:  # and it opens as a workspace, with the labels readable
        assert len(ws.history()) >= len(committed)
        assert ws.current_labels()
