"""Seed labels: which documents the user has categorised by hand.

Three ways in, all ending as a mapping document id -> category:

* a labels file: CSV with a header ``document,category`` (``id``/``path`` and ``label`` are
  accepted as header names too), where document is a document id or a path to the file;
* a folder of examples with one subfolder per category (its documents join the collection);
* a label column of a CSV/TSV/JSONL input (read with the documents).

:func:`resolve_seeds` checks them against the collection and turns them into row numbers,
raising :class:`~seedsort.errors.SeedError` with one readable sentence when they are unusable.
"""

from __future__ import annotations

import csv
import io
import os
from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from .errors import InputError, SeedError
from .sources import Collection, Document, read_collection

_DOC_HEADERS = ("document", "id", "path", "doc", "document_id")
_CAT_HEADERS = ("category", "label", "class", "tag")
#: Prefix of the ids of documents that come from an examples folder.
EXAMPLES_PREFIX = "seed-examples/"


@dataclass(frozen=True, slots=True)
class SeedSet:
    """Seeds resolved against a collection.

    Attributes
    ----------
    rows:
        int64 array of document positions in the collection, ascending.
    classes:
        int64 array, the category index of each seed row.
    categories:
        Category names, sorted; ``classes`` index into it.
    """

    rows: np.ndarray
    classes: np.ndarray
    categories: tuple[str, ...]

    def __len__(self) -> int:
        return int(self.rows.size)

    def labels(self) -> dict[int, str]:
        return {int(r): self.categories[int(c)] for r, c in zip(self.rows, self.classes)}

    def counts(self) -> dict[str, int]:
        counts = np.bincount(self.classes, minlength=len(self.categories))
        return {name: int(n) for name, n in zip(self.categories, counts)}


def read_labels_file(path: str | os.PathLike[str]) -> list[tuple[str, str]]:
    """Read a ``document,category`` CSV into (reference, category) pairs, in file order.

    Blank lines and rows with an empty category are ignored.
    """
    path = Path(path)
    try:
        raw = path.read_bytes()
    except FileNotFoundError:
        raise InputError(f"Labels file {path} does not exist; check the --seeds path.") from None
    except OSError as exc:
        raise InputError(f"Cannot read labels file {path}: {exc.strerror}.") from None
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError:
        raise InputError(f"Labels file {path} is not UTF-8 text; save it as UTF-8 CSV.") from None
    reader = csv.reader(io.StringIO(text))
    header = next(reader, None)
    if header is None:
        raise InputError(f"Labels file {path} is empty; it needs a header 'document,category' and rows.")
    names = [h.strip().lower() for h in header]
    doc_col = next((names.index(h) for h in _DOC_HEADERS if h in names), None)
    cat_col = next((names.index(h) for h in _CAT_HEADERS if h in names), None)
    if doc_col is None or cat_col is None:
        raise InputError(
            f"Labels file {path} needs a header row 'document,category'; found: {', '.join(header)}."
        )
    pairs = []
    for row in reader:
        if len(row) <= max(doc_col, cat_col):
            continue
        ref, category = row[doc_col].strip(), row[cat_col].strip()
        if ref and category:
            pairs.append((ref, category))
    return pairs


def read_examples_folder(path: str | os.PathLike[str], **read_options: object) -> tuple[Collection, list[tuple[str, str]]]:
    """Read a folder of examples laid out as ``<folder>/<category>/<documents...>``.

    Returns the examples as a collection whose ids start with ``seed-examples/`` (so they
    never collide with the main collection's ids) and the (id, category) pairs.
    """
    root = Path(path)
    if not root.is_dir():
        raise InputError(f"Examples folder {root} does not exist or is not a folder.")
    collection = read_collection(root, **read_options)  # type: ignore[arg-type]
    renamed = []
    pairs = []
    for doc in collection.documents:
        category, sep, _ = doc.source.partition("/")
        if not sep:
            continue  # a file directly in the examples folder has no category
        new_id = EXAMPLES_PREFIX + doc.id
        renamed.append(Document(new_id, EXAMPLES_PREFIX + doc.source, doc.text, doc.content_hash))
        pairs.append((new_id, category))
    if not pairs:
        raise SeedError(
            f"Examples folder {root} has no subfolders with documents; put each category's "
            "examples in a subfolder named after the category."
        )
    return Collection(
        root=collection.root, documents=tuple(renamed), skipped=collection.skipped, notes=collection.notes
    ), pairs


def column_labels(documents: Iterable[Document]) -> list[tuple[str, str]]:
    """(id, category) pairs from documents that carry a label column value."""
    return [(doc.id, doc.label) for doc in documents if doc.label]


def _index(documents: Sequence[Document], root: Path | None) -> dict[str, int]:
    """Every name a seed reference may use for a document -> its row."""
    names: dict[str, int] = {}
    suffix_count: dict[str, int] = {}
    for row, doc in enumerate(documents):
        names[doc.id] = row
        _, sep, suffix = doc.id.rpartition("#")
        if sep:
            suffix_count[suffix] = suffix_count.get(suffix, 0) + 1
    for row, doc in enumerate(documents):
        _, sep, suffix = doc.id.rpartition("#")
        # A bare table id ("T-1001") is accepted when no other row uses it.
        if sep and suffix_count[suffix] == 1 and suffix not in names:
            names[suffix] = row
    return names


def _normalise_reference(ref: str, root: Path | None, base: Path | None) -> list[str]:
    """Candidate ids for a reference written as a path (relative to cwd, the labels file or absolute)."""
    candidates = [ref, ref.replace("\\", "/")]
    if root is None:
        return candidates
    path_part, sep, frag = ref.partition("#")
    for start in (Path.cwd(), base):
        if start is None:
            continue
        full = (start / path_part).resolve()
        try:
            rel = full.relative_to(root.resolve()).as_posix()
        except ValueError:
            continue
        candidates.append(rel + (sep + frag if sep else ""))
    return candidates


def resolve_seeds(
    documents: Sequence[Document],
    pairs: Sequence[tuple[str, str]],
    *,
    root: str | os.PathLike[str] | None = None,
    labels_file: str | os.PathLike[str] | None = None,
) -> SeedSet:
    """Match (reference, category) pairs to documents.

    Raises
    ------
    SeedError
        when references match no document (the first few are named), when one document
        is given two different categories, when fewer than two categories remain, or when
        a seed document is empty.
    """
    return seed_set(documents, match_references(documents, pairs, root=root, labels_file=labels_file))


def match_references(
    documents: Sequence[Document],
    pairs: Sequence[tuple[str, str]],
    *,
    root: str | os.PathLike[str] | None = None,
    labels_file: str | os.PathLike[str] | None = None,
) -> dict[int, str]:
    """Row -> category for (reference, category) pairs; references are ids or paths.

    Raises
    ------
    SeedError
        when references match no document (the first few are named), or when one document
        is given two different categories.
    """
    names = _index(documents, Path(root) if root else None)
    base = Path(labels_file).resolve().parent if labels_file else None
    root_path = Path(root) if root else None
    chosen: dict[int, str] = {}
    missing: list[str] = []
    for ref, category in pairs:
        row = next((names[c] for c in _normalise_reference(ref, root_path, base) if c in names), None)
        if row is None:
            missing.append(ref)
            continue
        previous = chosen.get(row)
        if previous is not None and previous != category:
            raise SeedError(
                f"Document {documents[row].id} is given two categories, {previous!r} and "
                f"{category!r}; keep one of them in the seed labels."
            )
        chosen[row] = category
    if missing:
        shown = ", ".join(missing[:5]) + (f" and {len(missing) - 5} more" if len(missing) > 5 else "")
        raise SeedError(
            f"{len(missing)} seed label(s) match no document: {shown}; use the document ids "
            "shown in the results file (relative paths, path#row-N, path#message-N)."
        )
    return chosen


def seed_set(documents: Sequence[Document], chosen: dict[int, str]) -> SeedSet:
    """A :class:`SeedSet` from row -> category.

    Raises
    ------
    SeedError
        when fewer than two categories are given, or when a seed document is empty.
    """
    empty = [documents[r].id for r in chosen if not documents[r].text.strip()]
    if empty:
        raise SeedError(
            f"Seed document {empty[0]} is empty; an empty document cannot teach a category, remove it from the seeds."
        )
    categories = tuple(sorted(set(chosen.values())))
    if len(categories) < 2:
        found = categories[0] if categories else "none"
        raise SeedError(
            f"Seed labels need at least two categories; found {len(categories)} ({found}). "
            "Label a few documents of another category."
        )
    rows = np.array(sorted(chosen), dtype=np.int64)
    lookup = {name: i for i, name in enumerate(categories)}
    classes = np.array([lookup[chosen[int(r)]] for r in rows], dtype=np.int64)
    return SeedSet(rows=rows, classes=classes, categories=categories)
