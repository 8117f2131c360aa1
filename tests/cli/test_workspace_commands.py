"""The check-correct-re-run path as a user walks it: sort, review in a terminal, re-run, export.

External truth used here: the documents and their true intents come from the open BANKING77
dataset (tests/data/banking77, CC BY 4.0; Casanueva et al. 2020); the review screen is read
through pyte, a VT100/xterm terminal emulator, fed every byte the real ``seedsort review``
process wrote to a pseudo-terminal (pexpect); Parquet and CSV files are read back with pandas.
Exit codes follow the convention of tests/cli/test_sort_command.py (common practice).
"""

from __future__ import annotations

import csv
import os
import subprocess
import sys
import time
import warnings
from pathlib import Path

import pandas as pd
import pexpect
import pyte
import pytest

from seedsort.cli import VECTOR_MODES, main
from seedsort.vectors import VECTOR_MODES as LIBRARY_VECTOR_MODES
from seedsort.workspace import Workspace

BANKING77 = Path(__file__).parents[1] / "data" / "banking77" / "train.csv"
INTENTS = ("card_arrival", "exchange_rate", "lost_or_stolen_card", "pin_blocked")
STARTUP, STEP = 90.0, 30.0


@pytest.fixture(scope="module")
def pile(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """queries/ (one .txt per BANKING77 query, 4 intents x 20) and seeds.csv (3 per intent)."""
    root = tmp_path_factory.mktemp("pile")
    folder = root / "queries"
    folder.mkdir()
    taken: dict[str, int] = {}
    seeds = []
    with open(BANKING77, newline="", encoding="utf-8") as handle:
        for row in csv.DictReader(handle):
            intent = row["category"]
            if intent in INTENTS and taken.get(intent, 0) < 20:
                i = taken[intent] = taken.get(intent, 0) + 1
                name = f"{intent}-{i:02d}.txt"
                (folder / name).write_text(row["text"], encoding="utf-8")
                if i <= 3:
                    seeds.append(f"{name},{intent}")
    (root / "seeds.csv").write_text("document,category\n" + "\n".join(seeds) + "\n", encoding="utf-8")
    return root


@pytest.fixture()
def sorted_pile(pile: Path, tmp_path: Path) -> Path:
    """A copy of the pile with a first 'seedsort sort' done (its own workspace)."""
    root = tmp_path / "pile"
    (root / "queries").mkdir(parents=True)
    for path in (pile / "queries").iterdir():
        (root / "queries" / path.name).write_bytes(path.read_bytes())
    (root / "seeds.csv").write_bytes((pile / "seeds.csv").read_bytes())
    code = main(["sort", str(root / "queries"), "--seeds", str(root / "seeds.csv"), "--out", str(root / "r.csv"), "--quiet"])
    assert code == 0
    return root


def test_cli_vector_modes_match_the_library() -> None:
    assert VECTOR_MODES == LIBRARY_VECTOR_MODES


def test_cli_help_names_the_library_switch_to_the_approximate_graph() -> None:
    from seedsort.cli import APPROXIMATE_ABOVE
    from seedsort.graph_approx import AUTO_APPROXIMATE_ABOVE

    assert APPROXIMATE_ABOVE == AUTO_APPROXIMATE_ABOVE


def test_report_statuses_match_the_library() -> None:
    """The report keeps its own copy so that printing it never loads pandas."""
    from seedsort.cli._report import STATUSES as REPORT_STATUSES
    from seedsort.results import STATUSES

    assert REPORT_STATUSES == STATUSES


def test_first_sort_creates_the_workspace_and_says_where(pile: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    workspace = tmp_path / "w.sqlite"
    code = main(["sort", str(pile / "queries"), "--seeds", str(pile / "seeds.csv"), "--out", str(tmp_path / "r.csv"),
                 "--workspace", str(workspace)])
    out = capsys.readouterr().out
    assert code == 0 and workspace.exists()
    assert f"Workspace: {workspace}" in " ".join(out.split())
    assert "80 new" in out and "12 label(s) added" in out


def test_review_in_a_terminal_then_rerun_and_export(sorted_pile: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    queries = sorted_pile / "queries"
    env = {k: v for k, v in os.environ.items() if k not in ("COLUMNS", "LINES", "NO_COLOR")}
    env["TERM"] = "xterm-256color"
    screen = pyte.Screen(80, 24)
    stream = pyte.Stream(screen)
    with warnings.catch_warnings():
        warnings.filterwarnings("ignore", category=DeprecationWarning, message=".*fork")
        child = pexpect.spawn(sys.executable, ["-m", "seedsort", "review", str(queries)],
                              dimensions=(24, 80), env=env, encoding="utf-8", timeout=STEP)
    seen = ""

    def wait_for(needle: str, timeout: float = STEP) -> str:
        nonlocal seen
        deadline = time.monotonic() + timeout
        while needle not in "\n".join(screen.display):
            if time.monotonic() > deadline:
                pytest.fail(f"{needle!r} not on the screen:\n" + "\n".join(screen.display))
            try:
                data = child.read_nonblocking(65536, timeout=0.2)
            except pexpect.TIMEOUT:
                continue
            except pexpect.EOF:
                break
            seen += data
            stream.feed(data)
        return "\n".join(screen.display)

    try:
        first = wait_for("quit", STARTUP)
        assert "card_arrival" in first or "exchange_rate" in first  # categories with probabilities
        first_id = next(line.split()[0] for line in screen.display if ".txt" in line)
        child.send("a")  # accept the proposed category
        wait_for("Saved")
        child.send("2")  # the second category, by number
        child.send("n")  # fits no category
        child.send("u")  # ...taken back
        wait_for("Took back")
        child.send("q")
        wait_for("Next: seedsort sort")
        child.expect(pexpect.EOF)
    finally:
        child.close(force=True)
    assert child.exitstatus == 0, seen[-2000:]

    with Workspace(sorted_pile / "queries.seedsort.sqlite") as ws:
        reviews = [d for d in ws.current_labels().values() if d.origin == "review"]
        events = [e for e in ws.history() if e.origin == "review"]
    assert len(reviews) == 2 and all(d.category in INTENTS for d in reviews)
    assert first_id in {d.document_id for d in reviews}
    assert len(events) == 4  # accept, pick, no category, and the undo: nothing deleted

    # Re-run without --seeds: the two decisions are seeds now.
    out = sorted_pile / "again.csv"
    assert main(["sort", str(queries), "--out", str(out), "--quiet"]) == 0
    capsys.readouterr()
    table = pd.read_csv(out)
    seeds = set(table.loc[table["status"] == "seed", "document"])
    assert {d.document_id for d in reviews} <= seeds and len(seeds) == 12 + 2

    # Export: Parquet results, the history, and a dry run of the copy.
    code = main(["export", str(queries), "--out", str(tmp_path / "r.parquet"), "--history", str(tmp_path / "h.csv"),
                 "--copy-to", str(tmp_path / "sorted"), "--dry-run"])
    report = capsys.readouterr().out
    assert code == 0 and "Would copy" in report
    assert not (tmp_path / "sorted").exists()
    parquet = pd.read_parquet(tmp_path / "r.parquet")
    assert list(parquet["document"]) == list(table["document"])
    assert (parquet["category"].fillna("") == table["category"].fillna("")).all()
    history = pd.read_csv(tmp_path / "h.csv")
    assert len(history) == 12 + 4 and set(history["origin"]) == {"seed_file", "review"}
    assert main(["export", str(queries), "--copy-to", str(tmp_path / "sorted")]) == 0
    copied = {p.name for p in (tmp_path / "sorted").rglob("*.txt")}
    assert copied and copied <= {p.name for p in queries.iterdir()}


def test_scripted_review_on_a_pipe(sorted_pile: Path) -> None:
    done = subprocess.run(
        [sys.executable, "-m", "seedsort", "review", str(sorted_pile / "queries"), "--limit", "5"],
        input="a\nexch\ns\nq\n", capture_output=True, text=True, timeout=300,
    )
    assert done.returncode == 0, done.stderr
    assert "Reviewed: 2 decision(s) kept" in " ".join(done.stdout.split())
    with Workspace(sorted_pile / "queries.seedsort.sqlite") as ws:
        picked = [d.category for d in ws.current_labels().values() if d.origin == "review"]
    assert "exchange_rate" in picked


def test_review_errors_are_one_line(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["review"]) == 2
    assert "give the collection" in capsys.readouterr().err
    assert main(["review", str(tmp_path / "nothing-here")]) == 1
    err = capsys.readouterr().err
    assert err.startswith("seedsort: error: No workspace at") and err.count("\n") == 1
    assert main(["export", str(tmp_path / "nothing-here")]) == 2
    assert "say what to export" in capsys.readouterr().err


def test_suggest_lists_and_writes_a_labels_file_to_fill_in(sorted_pile: Path, capsys: pytest.CaptureFixture[str]) -> None:
    queries = sorted_pile / "queries"
    out = sorted_pile / "to-label.csv"
    assert main(["suggest", str(queries), "--count", "6", "--out", str(out)]) == 0
    report = capsys.readouterr().out
    assert "Label these next (6)" in report
    table = pd.read_csv(out, keep_default_na=False)
    assert list(table.columns) == ["document", "category", "guess", "reason", "text"]
    assert len(table) == 6 and (table["category"] == "").all() and table["document"].is_unique
    # Filled in from the dataset's own intents, the file is accepted back as seeds.
    truth = {path.name: path.name.rsplit("-", 1)[0] for path in queries.iterdir()}
    table["category"] = [truth[doc] for doc in table["document"]]
    table[["document", "category"]].to_csv(out, index=False)
    assert main(["sort", str(queries), "--seeds", str(out), "--out", str(sorted_pile / "r2.csv"), "--quiet"]) == 0
    assert "6 label(s) added" in " ".join(capsys.readouterr().out.split())
