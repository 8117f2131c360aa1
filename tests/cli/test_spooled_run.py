"""A whole run with every text kept out of memory (the spool's budget at 0) is the same run.

The texts of a large collection go to a temporary file (seedsort.sources.TextSpool) and are
read back by each stage that needs them: vectors, snippets, workspace, suggestions, export.
External truths: the documents and their intents come from the open BANKING77 dataset
(tests/data/banking77, CC BY 4.0; Casanueva et al. 2020); every file is read back with
pandas (CSV) or as plain UTF-8.
"""

from __future__ import annotations

import csv
from pathlib import Path

import pandas as pd
import pytest

from seedsort.cli import main

BANKING77 = Path(__file__).parents[1] / "data" / "banking77" / "train.csv"
INTENTS = ("card_arrival", "exchange_rate", "lost_or_stolen_card", "pin_blocked")


def _table(folder: Path) -> Path:
    """queries/tickets.csv: 4 intents x 25 BANKING77 queries, 3 of each labelled."""
    frame = pd.read_csv(BANKING77, keep_default_na=False)
    frame = frame[frame["category"].isin(INTENTS)].groupby("category").head(25)
    rank = frame.groupby("category").cumcount()
    path = folder / "queries" / "tickets.csv"
    path.parent.mkdir(parents=True)
    with path.open("w", newline="", encoding="utf-8") as handle:
        writer = csv.writer(handle)
        writer.writerow(["id", "text", "label"])
        for number, (text, category, r) in enumerate(zip(frame["text"], frame["category"], rank)):
            writer.writerow([f"q{number}", text, category if r < 3 else ""])
    return path


def _run_all(root: Path) -> None:
    queries = root / "queries"
    assert main(["sort", str(queries), "--label-column", "label", "--out", str(root / "r.csv"), "--quiet"]) == 0
    assert main(["suggest", str(queries), "--count", "5", "--out", str(root / "s.csv")]) == 0
    assert main(["export", str(queries), "--copy-to", str(root / "sorted")]) == 0


def test_every_text_spooled_gives_the_same_files(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch, capsys: pytest.CaptureFixture[str]
) -> None:
    held, spooled = tmp_path / "held", tmp_path / "spooled"
    table = _table(held)
    _table(spooled)
    _run_all(held)
    monkeypatch.setattr("seedsort.sources._document.HELD_TEXT_BYTES", 0)
    _run_all(spooled)
    capsys.readouterr()

    for name in ("r.csv", "s.csv"):
        assert (spooled / name).read_bytes() == (held / name).read_bytes(), name
    copies = sorted(p.relative_to(spooled / "sorted") for p in (spooled / "sorted").rglob("*.txt"))
    assert copies == sorted(p.relative_to(held / "sorted") for p in (held / "sorted").rglob("*.txt"))
    # Each copied row holds its query as the source table has it (reference: pandas).
    source = pd.read_csv(table, keep_default_na=False).set_index("id")["text"]
    assert len(copies) > len(source) // 2  # the rest left out (no category), alike in both runs
    for copy in copies:
        row_id = copy.name.removeprefix("tickets.csv#").removesuffix(".txt")
        assert (spooled / "sorted" / copy).read_text(encoding="utf-8") == source[row_id]
