"""Seed labels: labels files, path and table-id references, examples folders.

References: the labels-file format and error cases stated in seedsort.seeds' module and
``resolve_seeds`` docstrings, and Python's ``csv`` module (RFC 4180 quoting) for writing
the files; the folder layout ``<folder>/<category>/<documents>`` as in scikit-learn's
``sklearn.datasets.load_files`` (one subfolder per category).
"""

from __future__ import annotations

import csv
from pathlib import Path

import numpy as np
import pytest

from seedsort import InputError, SeedError, sort_folder
from seedsort.seeds import read_labels_file, resolve_seeds
from seedsort.sources import Document, read_collection

from conftest import TOPICS, topic_documents


def _labels(path: Path, rows: list[tuple[str, str]], header: tuple[str, str] = ("document", "category")) -> Path:
    with path.open("w", newline="", encoding="utf-8") as handle:
        writer = csv.writer(handle)
        writer.writerow(header)
        writer.writerows(rows)
    return path


def test_labels_file_round_trips_through_csv(tmp_path: Path) -> None:
    """Reference: Python csv module writing the file (quoted commas, BOM-less UTF-8, blank rows)."""
    path = _labels(tmp_path / "seeds.csv", [("a.txt", "x"), ("b, c.txt", "y"), ("", "z"), ("d.txt", "")])
    assert read_labels_file(path) == [("a.txt", "x"), ("b, c.txt", "y")]
    alt = _labels(tmp_path / "alt.csv", [("e.txt", "w")], header=("ID", "Label"))
    assert read_labels_file(alt) == [("e.txt", "w")]


def test_missing_header_is_an_input_error(tmp_path: Path) -> None:
    """Module docstring: the labels file needs a 'document,category' header row."""
    path = tmp_path / "seeds.csv"
    path.write_text("a.txt,x\nb.txt,y\n", encoding="utf-8")
    with pytest.raises(InputError, match="needs a header row 'document,category'"):
        read_labels_file(path)
    with pytest.raises(InputError, match="does not exist"):
        read_labels_file(tmp_path / "nope.csv")


def test_unknown_ids_are_named(tmp_path: Path) -> None:
    """resolve_seeds docstring: references that match no document are named (the first few)."""
    docs, truth = topic_documents()
    pairs = [(docs[0].id, "weather"), (docs[10].id, "cooking")] + [(f"ghost-{i}.txt", "weather") for i in range(7)]
    with pytest.raises(SeedError) as caught:
        resolve_seeds(docs, pairs)
    message = str(caught.value)
    assert message.startswith("7 seed label(s) match no document: ghost-0.txt, ghost-1.txt")
    assert "ghost-4.txt and 2 more" in message and "ghost-5.txt" not in message


def test_one_document_two_categories_is_refused() -> None:
    """resolve_seeds docstring: one document given two different categories is a SeedError."""
    docs, _ = topic_documents()
    pairs = [(docs[0].id, "weather"), (docs[0].id, "cooking"), (docs[10].id, "cooking")]
    with pytest.raises(SeedError, match="weather-0.txt is given two categories, 'weather' and 'cooking'"):
        resolve_seeds(docs, pairs)
    # The same label twice is not a conflict.
    same = resolve_seeds(docs, [(docs[0].id, "weather"), (docs[0].id, "weather"), (docs[10].id, "cooking")])
    assert len(same) == 2


def test_one_category_and_empty_seeds_are_refused() -> None:
    """resolve_seeds docstring: fewer than two categories, or an empty seed document, is a SeedError."""
    docs, _ = topic_documents(extra=("",))
    with pytest.raises(SeedError, match="at least two categories; found 1 \\(weather\\)"):
        resolve_seeds(docs, [(docs[0].id, "weather"), (docs[1].id, "weather")])
    with pytest.raises(SeedError, match="extra-0.txt is empty"):
        resolve_seeds(docs, [(docs[0].id, "weather"), ("extra-0.txt", "cooking")])


def test_seed_set_rows_classes_and_counts() -> None:
    """SeedSet docstring: rows ascending, classes index the sorted category names."""
    docs, truth = topic_documents()
    pairs = [(docs[i].id, truth[i]) for i in (35, 0, 12, 1)]
    seeds = resolve_seeds(docs, pairs)
    assert seeds.rows.tolist() == [0, 1, 12, 35]
    assert seeds.categories == ("computers", "cooking", "weather")
    assert seeds.classes.tolist() == [2, 2, 1, 0]
    assert seeds.counts() == {"computers": 1, "cooking": 1, "weather": 2}
    assert seeds.labels()[35] == "computers"


def test_path_references_relative_to_cwd_and_labels_file(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    """Module docstring: a reference may be a path to the file, relative to the current folder
    or to the labels file; both resolve to the document id (the path inside the folder read)."""
    root = tmp_path / "pile"
    (root / "notes").mkdir(parents=True)
    for topic, sentences in TOPICS.items():
        for i, text in enumerate(sentences[:3]):
            (root / "notes" / f"{topic}{i}.txt").write_text(text, encoding="utf-8")
    collection = read_collection(root)
    docs = list(collection.documents)
    monkeypatch.chdir(tmp_path)
    (tmp_path / "meta").mkdir()
    labels = _labels(tmp_path / "meta" / "seeds.csv", [
        ("pile/notes/weather0.txt", "weather"),  # relative to the current folder
        ("../pile/notes/cooking0.txt", "cooking"),  # relative to the labels file
        (str(root / "notes" / "football0.txt"), "football"),  # absolute
        ("notes/computers0.txt", "computers"),  # already a document id
    ])  # fmt: skip
    seeds = resolve_seeds(docs, read_labels_file(labels), root=root, labels_file=labels)
    ids = {docs[int(r)].id: seeds.categories[int(c)] for r, c in zip(seeds.rows, seeds.classes)}
    assert ids == {
        "notes/weather0.txt": "weather",
        "notes/cooking0.txt": "cooking",
        "notes/football0.txt": "football",
        "notes/computers0.txt": "computers",
    }


def test_bare_table_id_resolves_when_unique() -> None:
    """Module docstring / Document.id: a table row id 'export.csv#T-1' may be given as 'T-1'."""
    docs = [
        Document.make("export.csv#T-1", "export.csv", "refund please"),
        Document.make("export.csv#T-2", "export.csv", "my parcel is late"),
        Document.make("other.csv#T-2", "other.csv", "parcel lost"),
    ]
    seeds = resolve_seeds(docs, [("T-1", "billing"), ("export.csv#T-2", "shipping")])
    assert seeds.rows.tolist() == [0, 1]
    with pytest.raises(SeedError, match="match no document: T-2"):  # ambiguous: two files have T-2
        resolve_seeds(docs, [("T-1", "billing"), ("T-2", "shipping")])


def test_examples_folder_seeds_a_run(tmp_path: Path) -> None:
    """Layout as sklearn.datasets.load_files: <examples>/<category>/<files>; examples join the pile."""
    pile, examples = tmp_path / "pile", tmp_path / "examples"
    pile.mkdir()
    for topic, sentences in TOPICS.items():
        (examples / topic).mkdir(parents=True)
        for i, text in enumerate(sentences[:2]):
            (examples / topic / f"{i}.txt").write_text(text, encoding="utf-8")
        for i, text in enumerate(sentences[2:]):
            (pile / f"{topic}-{i}.txt").write_text(text, encoding="utf-8")
    result = sort_folder(pile, examples_folder=examples)
    assert len(result) == 40
    is_seed = np.array([s == "seed" for s in result.status])
    assert is_seed.sum() == 8
    assert all(doc_id.startswith("seed-examples/") for doc_id in np.array(result.ids)[is_seed])
    assert result.categories == tuple(sorted(TOPICS))
    with pytest.raises(SeedError, match="no subfolders with documents"):
        sort_folder(pile, examples_folder=pile)
