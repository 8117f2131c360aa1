"""Ctrl-C in the middle of a real run: exit 130, nothing half-written, the workspace still whole.

The collection is BANKING77's training set (Casanueva et al. 2020, CC BY 4.0;
tests/data/banking77) as one CSV table, ten labelled rows per category in a label column, so
a run takes long enough (tens of seconds on 2 cores) to be interrupted in different stages.
``seedsort sort`` runs as a separate process and gets SIGINT, what a terminal sends on
Ctrl-C, after a delay. Exit 130 for an interrupted program is common practice (128 +
SIGINT's number 2, the shell convention). References for "whole": SQLite's own
``PRAGMA integrity_check``, and a later run that finishes from the same workspace.
"""

from __future__ import annotations

import csv
import signal
import sqlite3
import subprocess
import sys
import time
from pathlib import Path

import pandas as pd
import pytest

from seedsort.workspace import Workspace

DATA = Path(__file__).resolve().parents[1] / "data" / "banking77"


@pytest.fixture(scope="module")
def table(tmp_path_factory: pytest.TempPathFactory) -> Path:
    frame = pd.read_csv(DATA / "train.csv")
    first = frame.groupby("category").cumcount() < 10
    folder = tmp_path_factory.mktemp("interrupt")
    path = folder / "tickets.csv"
    with path.open("w", newline="", encoding="utf-8") as handle:
        writer = csv.writer(handle)
        writer.writerow(["id", "text", "label"])
        for number, (text, category, labelled) in enumerate(zip(frame["text"], frame["category"], first)):
            writer.writerow([f"q{number}", text, category if labelled else ""])
    return path


def _sort(table: Path, out: Path) -> subprocess.Popen[str]:
    command = [sys.executable, "-m", "seedsort", "sort", str(table), "--label-column", "label",
               "--text-column", "text", "--id-column", "id", "--out", str(out), "--quiet"]
    return subprocess.Popen(command, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)


def _check_whole(workspace: Path, expected_documents: int) -> None:
    with sqlite3.connect(workspace) as db:
        assert db.execute("PRAGMA integrity_check").fetchone() == ("ok",)
    with Workspace(workspace, create=False) as ws:
        # Documents are synced in one transaction: all of them, or none yet.
        assert len(ws.documents()) in (0, expected_documents)


@pytest.mark.slow
def test_ctrl_c_at_any_stage_leaves_a_whole_workspace_and_no_results(table: Path) -> None:
    rows = len(pd.read_csv(table))
    workspace = table.parent / "tickets.csv.seedsort.sqlite"
    out = table.parent / "results.csv"
    with _sort(table, out) as process:  # creates the workspace (and caches the graph)
        _, stderr = process.communicate(timeout=600)
    assert process.returncode == 0, stderr
    started = time.monotonic()
    with _sort(table, out) as process:  # a re-run: what the interrupted runs below are
        _, stderr = process.communicate(timeout=600)
    rerun = time.monotonic() - started
    assert process.returncode == 0, stderr
    out.unlink()
    # Interrupt re-runs at points spread over their length, after the interpreter's start-up
    # (about a second: an interrupt before seedsort's first line is Python's own affair).
    interrupted = 0
    for share in (0.15, 0.4, 0.65, 0.9):
        with _sort(table, out) as process:
            time.sleep(max(1.0, share * rerun))
            if process.poll() is None:
                process.send_signal(signal.SIGINT)
            _, stderr = process.communicate(timeout=120)
        if process.returncode == 0:
            out.unlink()  # this run was quicker than the first: it finished before the signal
            continue
        interrupted += 1
        # 130, or ended by SIGINT itself, which a shell reports as 130 as well (128 + 2).
        assert process.returncode in (130, -signal.SIGINT), stderr
        assert "interrupted" in stderr
        assert "Traceback" not in stderr
        if "already written in full" in stderr:
            # Ctrl-C while the report was drawn: the results file was complete before it.
            assert str(out) in stderr and len(pd.read_csv(out)) == rows
            out.unlink()
        else:
            assert "no results file was written" in stderr
            assert not out.exists(), "an interrupted run must not leave a results file"
        assert not list(table.parent.glob(".seedsort-*")), "no temporary file left behind"
        _check_whole(workspace, rows)
    assert interrupted >= 2
    # And the workspace still serves a complete run.
    with _sort(table, out) as process:
        _, stderr = process.communicate(timeout=600)
    assert process.returncode == 0, stderr
    assert len(pd.read_csv(out)) == rows
    _check_whole(workspace, rows)
