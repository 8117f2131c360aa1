"""Export: results as Parquet, the label history as a table, and copies sorted into folders.

Three ways out of seedsort, all writing only where they are told to and never changing a
source file:

* :func:`results_table` turns a :class:`~seedsort.results.SortResult` into an Arrow table
  for Parquet (``write_results(result, "out.parquet")`` uses it). Types are kept: floats
  unrounded (``confidence``, ``margin``, ``out_of_scope``, similarities as float64, the
  probabilities as float32 as the run computed them), booleans as booleans, and a missing
  value as a null. The per-category probabilities are one float32 column each, named
  ``probability_<category>`` in the run's category order (the order is also kept in the
  file's key-value metadata under ``seedsort.categories``, with the run's settings under
  ``seedsort.settings``): any Parquet reader can filter on such columns, no list handling.
* :func:`write_label_history` writes :class:`LabelEvent` rows (document, category, origin,
  time, superseded) as CSV, JSON Lines or Parquet. Time is ISO 8601 UTC text in CSV and
  JSON Lines (``2026-12-02T00:31:09.000000Z``) and a UTC timestamp column in Parquet.
* :func:`copy_into_category_folders` copies each categorised document into
  ``destination/<category>/``, keeping its path relative to the documents folder. A
  document that is one row of a table or one message of a mailbox has no file of its own,
  so its text is written as ``<file name>#<row or message>.txt`` beside where the file
  would go. Documents left without a category (out of scope, unreached, empty) are left
  out and listed in the plan (the results file says what became of them). Nothing that
  exists is ever overwritten.

Parquet needs pyarrow (the ``parquet`` extra), imported only when a Parquet file is asked
for. Cost: each writer is linear in the rows written; the copy reads every planned source
file once (a table or mailbox file is read once for all its documents).
"""

from __future__ import annotations

import json
import os
import re
import shutil
import tempfile
import unicodedata
from collections.abc import Callable, Iterable, Mapping
from dataclasses import dataclass
from datetime import datetime, timezone
from functools import partial
from pathlib import Path, PurePosixPath
from types import ModuleType
from typing import Any

import numpy as np
import pandas as pd

from ._progress import ProgressCallback, no_progress
from .errors import InputError
from .results import NEAREST_SEEDS, SortResult, result_format
from .seeds import EXAMPLES_PREFIX
from .sources import Document, TableColumns, read_collection
from .workspace import ORIGINS

LABEL_ORIGINS = ORIGINS
"""Where a label decision came from: a seed labels file, an examples folder, a label column, the review loop, an import."""
LABEL_ACTIONS = ("label", "withdraw")
"""``label`` gives a category (or, with category None, "fits no category"); ``withdraw``
takes a label back (an undo of a first decision)."""

HISTORY_COLUMNS = ["document", "category", "action", "origin", "time", "superseded"]
PROBABILITY_PREFIX = "probability_"
PROGRESS_STAGE = "copy"

_NAME_BYTES = 200  # under the 255-byte name limit of common file systems, with room for "-NN"
_FORBIDDEN = re.compile(r'[\x00-\x1f\x7f<>:"/\\|?*]')  # not allowed in Windows names, or "/" on any
_WINDOWS_DEVICES = frozenset(["CON", "PRN", "AUX", "NUL"] + [f"{p}{i}" for p in ("COM", "LPT") for i in range(1, 10)])


def _pyarrow() -> tuple[ModuleType, ModuleType]:
    """pyarrow and pyarrow.parquet, or an InputError saying how to get them."""
    try:
        import pyarrow
        import pyarrow.parquet
    except ImportError:
        raise InputError(
            "Writing Parquet needs pyarrow; install it with pip install 'seedsort[parquet]' "
            "or write .csv or .jsonl instead."
        ) from None
    return pyarrow, pyarrow.parquet


def require_parquet() -> None:
    """Raise :class:`InputError` now (before any work) if Parquet cannot be written."""
    _pyarrow()


# --- results and history tables ------------------------------------------------------------


def _names(result: SortResult, indices: np.ndarray) -> list[str | None]:
    return [result.categories[i] if i >= 0 else None for i in indices.tolist()]


def results_table(result: SortResult) -> Any:
    """The results as a ``pyarrow.Table``: the CSV columns, typed, then one probability column per category.

    Values are the run's own arrays, not the rounded text of the CSV; NaN becomes null.
    Cost: O(n * c) for n documents and c categories.
    """
    pa, _ = _pyarrow()

    def floats(values: np.ndarray) -> Any:
        values = np.asarray(values, dtype=np.float64)
        return pa.array(values, type=pa.float64(), mask=np.isnan(values))

    n = len(result)
    unassigned = np.isnan(np.asarray(result.margin, dtype=np.float64))
    runner_up = np.where(unassigned, -1, result.runner_up)
    scope = result.out_of_scope if len(result.out_of_scope) else np.full(n, np.nan)
    columns: dict[str, Any] = {
        "document": pa.array(result.ids, type=pa.string()),
        "source": pa.array(result.sources, type=pa.string()),
        "category": pa.array(_names(result, result.assigned), type=pa.string()),
        "confidence": floats(result.confidence),
        "margin": floats(result.margin),
        "runner_up": pa.array(_names(result, runner_up), type=pa.string()),
        "status": pa.array([str(s) for s in result.status], type=pa.string()),
        "out_of_scope": floats(scope),
        "is_seed": pa.array(result.status == "seed", type=pa.bool_()),
        "possible_mislabel": pa.array(np.asarray(result.possible_mislabel, dtype=bool), type=pa.bool_()),
        "seed_check": pa.array(_names(result, result.cross_checked), type=pa.string()),
    }
    for j in range(NEAREST_SEEDS):
        rows = result.nearest_seed_rows[:, j]
        present = rows >= 0
        ids = [result.ids[r] if r >= 0 else None for r in rows.tolist()]
        labels = np.where(present, result.seed_label[np.maximum(rows, 0)], -1)
        similarity = np.where(present, result.nearest_seed_similarity[:, j], np.nan)
        columns[f"nearest_seed_{j + 1}"] = pa.array(ids, type=pa.string())
        columns[f"nearest_seed_{j + 1}_category"] = pa.array(_names(result, labels), type=pa.string())
        columns[f"nearest_seed_{j + 1}_similarity"] = floats(similarity)
    probabilities = np.asarray(result.probabilities, dtype=np.float32)
    for j, name in enumerate(result.categories):
        columns[PROBABILITY_PREFIX + name] = pa.array(probabilities[:, j], type=pa.float32())
    metadata = {
        "seedsort.categories": json.dumps(list(result.categories), ensure_ascii=False),
        "seedsort.settings": json.dumps(result.settings, ensure_ascii=False, default=str),
        "seedsort.estimated_accuracy": json.dumps(result.estimated_accuracy),
    }
    return pa.table(columns, metadata=metadata)


def write_parquet(table: Any, path: str | os.PathLike[str]) -> None:
    """Write an Arrow table to ``path`` as Parquet (snappy-compressed, pyarrow's default)."""
    _, parquet = _pyarrow()
    parquet.write_table(table, str(path))


@dataclass(frozen=True, slots=True)
class LabelEvent:
    """One label decision of a document's history (append-only: a correction supersedes).

    Attributes
    ----------
    document:
        Document id.
    category:
        The category given, or ``None`` when the document was marked as fitting none.
    origin:
        One of :data:`LABEL_ORIGINS`.
    time:
        When it was decided; timezone-aware (written in UTC).
    superseded:
        True once a later decision on the same document replaced this one.
    action:
        One of :data:`LABEL_ACTIONS`.
    """

    document: str
    category: str | None
    origin: str
    time: datetime
    superseded: bool = False
    action: str = "label"

    def __post_init__(self) -> None:
        if self.origin not in LABEL_ORIGINS:
            raise ValueError(f"origin must be one of {LABEL_ORIGINS}, not {self.origin!r}")
        if self.action not in LABEL_ACTIONS:
            raise ValueError(f"action must be one of {LABEL_ACTIONS}, not {self.action!r}")
        if self.time.tzinfo is None or self.time.utcoffset() is None:
            raise ValueError("LabelEvent.time must be timezone-aware")

    @property
    def utc_time(self) -> datetime:
        return self.time.astimezone(timezone.utc)

    def iso_time(self) -> str:
        """ISO 8601 in UTC with microseconds and a ``Z``: fixed width, so text order is time order."""
        return self.utc_time.strftime("%Y-%m-%dT%H:%M:%S.%fZ")

    def record(self) -> dict[str, Any]:
        """The CSV / JSON Lines row."""
        return {
            "document": self.document, "category": self.category, "action": self.action,
            "origin": self.origin, "time": self.iso_time(), "superseded": self.superseded,
        }  # fmt: skip


def history_table(events: Iterable[LabelEvent]) -> Any:
    """Label events as a ``pyarrow.Table`` (time as ``timestamp[us, UTC]``), in the order given."""
    pa, _ = _pyarrow()
    events = list(events)
    return pa.table(
        {
            "document": pa.array([e.document for e in events], type=pa.string()),
            "category": pa.array([e.category for e in events], type=pa.string()),
            "action": pa.array([e.action for e in events], type=pa.string()),
            "origin": pa.array([e.origin for e in events], type=pa.string()),
            "time": pa.array([e.utc_time for e in events], type=pa.timestamp("us", tz="UTC")),
            "superseded": pa.array([e.superseded for e in events], type=pa.bool_()),
        }
    )


def write_atomically(path: Path, write: Callable[[Path], None], what: str) -> Path:
    """Run ``write`` on a temporary file beside ``path``, then rename it into place (os.replace)."""
    if path.is_dir():
        raise InputError(f"The {what} path {path} is a folder; give a file name ending in .csv, .jsonl or .parquet.")
    directory = path.parent if str(path.parent) else Path(".")
    if not directory.is_dir():
        raise InputError(f"Folder {directory} for the {what} does not exist; create it first.")
    fd, tmp = tempfile.mkstemp(prefix=".seedsort-", suffix=".part", dir=directory)
    os.close(fd)
    try:
        write(Path(tmp))
        os.replace(tmp, path)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise
    return path


def write_label_history(
    events: Iterable[LabelEvent], path: str | os.PathLike[str], fmt: str | None = None
) -> Path:
    """Write the label history as CSV, JSON Lines or Parquet (from ``fmt`` or the extension).

    Rows keep the order given (the workspace gives them oldest first). The write is atomic:
    a temporary file renamed into place, so a reader never sees half a file.

    Returns
    -------
    Path
        The path written.

    Raises
    ------
    InputError
        For an unknown format, a missing folder, or Parquet without pyarrow.
    """
    path = Path(path)
    fmt = result_format(path, fmt)
    events = list(events)
    if fmt == "parquet":
        require_parquet()
        return write_atomically(path, lambda tmp: write_parquet(history_table(events), tmp), "label history")

    def write_text(tmp: Path) -> None:
        with open(tmp, "w", encoding="utf-8", newline="") as handle:
            if fmt == "csv":
                frame = pd.DataFrame([e.record() for e in events], columns=HISTORY_COLUMNS)
                # CRLF rows (RFC 4180) make the writer quote a lone "\r" inside an id too;
                # with "\n" rows a reader would take that "\r" for the end of the row.
                frame.to_csv(handle, index=False, lineterminator="\r\n")
            else:
                for event in events:
                    handle.write(json.dumps(event.record(), ensure_ascii=False) + "\n")

    return write_atomically(path, write_text, "label history")


# --- copying into category folders ---------------------------------------------------------


def safe_name(name: str, *, limit: int = _NAME_BYTES) -> str:
    """One path component that every common file system accepts and that cannot leave its folder.

    Characters Windows forbids in names (``<>:"/\\|?*`` and control characters) and both
    slashes become ``_``; leading dots (hidden on POSIX, ``..`` = parent) and trailing dots
    and spaces (dropped by Windows) become ``_``; a Windows device name (``CON``, ``LPT1``,
    ...) gets a ``_`` prefix; the name is cut to ``limit`` UTF-8 bytes, keeping a short
    extension. (Windows naming rules: Microsoft's "Naming Files, Paths, and Namespaces",
    from memory.) The empty name becomes ``_``.
    """
    name = _FORBIDDEN.sub("_", unicodedata.normalize("NFC", name))
    name = re.sub(r"^\.+", lambda m: "_" * len(m.group()), name)
    name = re.sub(r"[. ]+$", lambda m: "_" * len(m.group()), name)
    if not name:
        return "_"
    if name.split(".")[0].strip().upper() in _WINDOWS_DEVICES:
        name = "_" + name
    if len(name.encode("utf-8")) > limit:
        stem, dot, suffix = name.rpartition(".")
        keep = "." + suffix if dot and stem and len(suffix) <= 16 else ""
        body = name[: len(name) - len(keep)] if keep else name
        budget = limit - len(keep.encode("utf-8"))
        body = body.encode("utf-8")[:budget].decode("utf-8", errors="ignore").rstrip(". ")
        name = (body or "_") + keep
    return name


def _with_number(name: str, number: int) -> str:
    stem, dot, suffix = name.rpartition(".")
    if dot and stem:
        return f"{stem}-{number}.{suffix}"
    return f"{name}-{number}"


def _key(parts: Iterable[str]) -> str:
    # Names that differ only in case or Unicode form are one name on macOS and Windows.
    return "/".join(unicodedata.normalize("NFC", p).casefold() for p in parts)


class _Names:
    """Hands out distinct relative paths, numbering the last component on a clash.

    Files and folders share one name space per folder (a file ``A.txt`` and a folder
    ``a.txt`` cannot both exist on a case-insensitive file system).
    """

    def __init__(self) -> None:
        self.files: set[str] = set()
        self.folders: set[str] = set()

    def claim(self, parents: tuple[str, ...], name: str) -> tuple[str, ...] | None:
        """A free path for a file named ``name`` under ``parents``; None if a parent is a file."""
        if any(_key(parents[: i + 1]) in self.files for i in range(len(parents))):
            return None
        candidate, number = name, 1
        while (key := _key(parents + (candidate,))) in self.files or key in self.folders:
            number += 1
            candidate = _with_number(name, number)
        parts = parents + (candidate,)
        self.files.add(_key(parts))
        self.folders.update(_key(parts[: i + 1]) for i in range(len(parents)))
        return parts

    def claim_folder(self, name: str) -> str:
        """A free top-level folder name (one per category)."""
        candidate, number = name, 1
        while _key((candidate,)) in self.folders:
            number += 1
            candidate = f"{name}-{number}"
        self.folders.add(_key((candidate,)))
        return candidate


@dataclass(frozen=True, slots=True)
class PlannedCopy:
    """One file the copy writes.

    Attributes
    ----------
    document, category:
        The document id and the category it was sorted into.
    target:
        Path relative to the destination, forward slashes (``<category folder>/...``).
    source:
        The file copied (its path as found under the documents folder), or ``None`` when the
        document's text is written as a new ``.txt`` (a table row or a mailbox message).
    """

    document: str
    category: str
    target: str
    source: str | None


@dataclass(frozen=True, slots=True)
class LeftOut:
    """A document the copy does not write, and why."""

    document: str
    reason: str


@dataclass(frozen=True, slots=True)
class CopyPlan:
    """What :func:`copy_into_category_folders` did, or would do in a dry run.

    Attributes
    ----------
    destination:
        The destination folder.
    folders:
        (category, folder name) for every category, in the run's order; names are
        sanitised with :func:`safe_name` and distinct ignoring case.
    copies:
        Every file written (or to be written), in collection order.
    conflicts:
        The planned copies whose target exists already (or has a file or a link where a
        folder on its way should be); any conflict stops the copy before it writes.
    left_out:
        Documents not copied: no category, seeds read from an examples folder, sources
        no longer found or changed since the run.
    dry_run:
        True when nothing was written.
    """

    destination: str
    folders: tuple[tuple[str, str], ...]
    copies: tuple[PlannedCopy, ...]
    conflicts: tuple[PlannedCopy, ...]
    left_out: tuple[LeftOut, ...]
    dry_run: bool


def _matches_snippet(text: str, snippet: str) -> bool:
    """Whether text starts as the run saw it (the result keeps a whitespace-flattened snippet)."""
    flat = " ".join(text.split())
    if snippet.endswith("…"):
        return flat.startswith(snippet[:-1])
    return flat == snippet


def _container_documents(root: Path, source: str, columns: TableColumns) -> dict[str, Document]:
    """Fragment (after ``#``) -> every document read from one table or mailbox file (their
    texts kept by the reading's spool, not held here)."""
    collection = read_collection(root / source, columns=columns)
    found = {}
    for doc in collection.documents:
        _, sep, fragment = doc.id.partition(f"{doc.source}#")
        if sep:
            found[fragment] = doc
    return found


def _blocked(destination: Path, parts: tuple[str, ...]) -> bool:
    """True if the target exists, or a file or symlink sits where one of its folders should be."""
    here = destination
    for part in parts[:-1]:
        here = here / part
        if os.path.lexists(here) and (here.is_symlink() or not here.is_dir()):
            return True
    return os.path.lexists(here / parts[-1])


def _row_text(
    result: SortResult, row: int, root: Path, texts: Mapping[str, str] | None, columns: TableColumns,
    containers: dict[str, dict[str, Document]],
) -> Callable[[], str] | None:
    """How to get the text of a table row or mailbox message, if it still reads as the run
    saw it. A getter, not the text: a plan of a million rows holds no texts, each is read
    again when its file is written."""
    doc_id, source = result.ids[row], result.sources[row]
    text = texts.get(doc_id) if texts is not None else None
    fetch: Callable[[], str] | None = None
    if text is not None:
        fetch = partial(texts.__getitem__, doc_id)  # type: ignore[union-attr]
    else:
        if source not in containers:  # read each table or mailbox once, for all its documents
            found = (root / source).is_file()
            containers[source] = _container_documents(root, source, columns) if found else {}
        doc = containers[source].get(doc_id[len(source) + 1 :]) if doc_id.startswith(source + "#") else None
        if doc is not None:
            text, fetch = doc.text, partial(getattr, doc, "text")
    return fetch if text is not None and _matches_snippet(text, result.snippets[row]) else None


def _plan(
    result: SortResult, root: Path, texts: Mapping[str, str] | None, columns: TableColumns
) -> tuple[list[str], list[PlannedCopy], list[Callable[[], str] | None], list[LeftOut]]:
    """Category folder names, the copies (with a getter of the text to write, None for a file
    copy), and the left out."""
    names = _Names()
    folders = [names.claim_folder(safe_name(c)) for c in result.categories]
    plan: list[PlannedCopy] = []
    payload: list[Callable[[], str] | None] = []
    left_out: list[LeftOut] = []
    containers: dict[str, dict[str, Document]] = {}
    for i, doc_id in enumerate(result.ids):
        category = int(result.assigned[i])
        source = result.sources[i]
        if category < 0:
            left_out.append(LeftOut(doc_id, f"no category (status {result.status[i]})"))
            continue
        if doc_id.startswith(EXAMPLES_PREFIX):
            left_out.append(LeftOut(doc_id, "read from the examples folder, not the documents folder"))
            continue
        rel = PurePosixPath(source)
        if rel.is_absolute() or ".." in rel.parts or not rel.parts:
            left_out.append(LeftOut(doc_id, f"source {source!r} is outside the documents folder"))
            continue
        parents = (folders[category],) + tuple(safe_name(p) for p in rel.parts[:-1])
        if doc_id == source:
            if not (root / rel).is_file():
                left_out.append(LeftOut(doc_id, f"source file {source} no longer exists"))
                continue
            name, text = safe_name(rel.name), None
        else:
            text = _row_text(result, i, root, texts, columns, containers)
            if text is None:
                why = "changed since the run, or read with other table columns"
                left_out.append(LeftOut(doc_id, f"its text is not in {source} as the run read it ({why})"))
                continue
            name = safe_name(rel.name + doc_id[len(source) :] + ".txt")
        parts = names.claim(parents, name)
        if parts is None:
            left_out.append(LeftOut(doc_id, "a folder on its way has the name of a file copied before it"))
            continue
        copied = None if text is not None else str(root / rel)
        plan.append(PlannedCopy(doc_id, result.categories[category], "/".join(parts), copied))
        payload.append(text)
    return folders, plan, payload, left_out


def copy_into_category_folders(
    result: SortResult,
    documents_root: str | os.PathLike[str] | None,
    destination: str | os.PathLike[str],
    *,
    dry_run: bool,
    texts: Mapping[str, str] | None = None,
    columns: TableColumns | None = None,
    on_progress: ProgressCallback | None = None,
) -> CopyPlan:
    """Copy (never move) every categorised document into ``destination/<category>/``.

    Parameters
    ----------
    result:
        A run's result; seeds go to the category they were given, assigned documents to
        theirs, the rest is left out.
    documents_root:
        The folder the run read (``None``: ``result.root``); sources are relative to it.
    destination:
        Where the category folders go; created if missing. It must not be inside
        ``documents_root``, or the next run would read the copies as new documents.
    dry_run:
        Plan only: return what would happen and write nothing (not even folders).
    texts:
        Document id -> text, for documents that are a table row or mailbox message (e.g.
        from the workspace). Without it, their file is read again with ``columns`` (which
        must match the run's for the ids to match).
    on_progress:
        Called as ``on_progress("copy", files_done, files_total)``.

    Returns
    -------
    CopyPlan
        What was written (or would be), conflicts, and what was left out and why.

    Raises
    ------
    InputError
        If any target exists already (nothing is written then; a dry run lists them all),
        the destination is a file or lies inside the documents folder, or a target appears
        while copying.

    Notes
    -----
    A file keeps its path relative to the documents folder under its category folder,
    every component passed through :func:`safe_name`; names that clash after that (or
    differ only in case) are numbered ``name-2.ext``. Files are copied byte for byte with
    their timestamps and permission bits (``shutil.copystat``, as ``shutil.copy2`` does)
    through an exclusive create, so a file that appears meanwhile is never overwritten.
    Cost: one read of each planned source file, plus one read per table or mailbox file.
    """
    report = on_progress or no_progress
    if documents_root is None and not result.root:
        raise InputError("The result does not say which folder the run read; pass the documents folder.")
    root = Path(documents_root if documents_root is not None else result.root)
    if not root.is_dir():
        raise InputError(f"Documents folder {root} is not a folder; pass the folder the run read.")
    dest = Path(destination)
    if os.path.lexists(dest) and (dest.is_symlink() or not dest.is_dir()):
        raise InputError(f"Destination {dest} exists and is not a folder (a file or a link); choose a folder.")
    if dest.resolve().is_relative_to(root.resolve()):
        raise InputError(
            f"Destination {dest} is inside the documents folder {root}; choose a folder outside it, "
            "so the next run does not read the copies as new documents."
        )
    folders, plan, payload, left_out = _plan(result, root, texts, columns or TableColumns())

    conflicts = tuple(p for p in plan if _blocked(dest, tuple(p.target.split("/"))))
    outcome = CopyPlan(
        destination=str(dest),
        folders=tuple(zip(result.categories, folders)),
        copies=tuple(plan),
        conflicts=conflicts,
        left_out=tuple(left_out),
        dry_run=dry_run,
    )
    if dry_run:
        return outcome
    if conflicts:
        raise InputError(
            f"{len(conflicts)} of the {len(plan)} files to copy exist already in {dest} (first: "
            f"{conflicts[0].target}); nothing was copied: remove them or choose an empty destination."
        )
    report(PROGRESS_STAGE, 0, len(plan))
    for done, (item, text) in enumerate(zip(plan, payload), start=1):
        _write_one(dest, item, text)
        report(PROGRESS_STAGE, done, len(plan))
    return outcome


def _write_one(dest: Path, item: PlannedCopy, text: Callable[[], str] | None) -> None:
    target = dest.joinpath(*item.target.split("/"))
    target.parent.mkdir(parents=True, exist_ok=True)
    try:
        if text is not None:
            with open(target, "x", encoding="utf-8", newline="") as out:
                out.write(text())
            return
        assert item.source is not None
        with open(item.source, "rb") as src, open(target, "xb") as out:
            shutil.copyfileobj(src, out, 1 << 20)
        shutil.copystat(item.source, target)
    except FileExistsError:
        raise InputError(
            f"{target} appeared while copying; it was left as it is, and the copy stopped there."
        ) from None
