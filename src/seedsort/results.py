"""Assignments: the result of a run, and its CSV / JSON Lines / Parquet writers.

One row per document. ``status`` says how the row should be read:

``seed``        labelled by the user; ``category`` is the given label.
``assigned``    categorised by seedsort.
``out_of_scope`` fits none of the seeded categories well (its out-of-scope score is above
                the threshold learnt from held-out seeds): left without a category.
``unreached``   no seed reaches it through the neighbour graph (or only with near-zero
                mass): left without a category rather than forced into one.
``empty``       the document has no text.
``no_category`` a reviewer marked it as fitting no category (see :mod:`seedsort.workflow`).
"""

from __future__ import annotations

import json
import math
import os
import tempfile
from collections.abc import Iterator
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np
import pandas as pd

from .errors import InputError
from .sources import SkippedFile

NEAREST_SEEDS = 3
STATUSES = ("seed", "assigned", "out_of_scope", "unreached", "empty", "no_category")
RESULT_FORMATS = ("csv", "jsonl", "parquet")


@dataclass(frozen=True, slots=True)
class CategorySummary:
    category: str
    documents: int
    share: float
    mean_confidence: float
    seeds: int
    estimated_accuracy: float


@dataclass(frozen=True)
class SortResult:
    """Everything a run decided, column-wise (arrays have one entry per document).

    Attributes
    ----------
    ids, sources, snippets:
        Document id, source file, and the first ~200 characters of text.
    categories:
        Category names; integer arrays below index into it (-1 = none).
    probabilities:
        float32 (n, c), each row sums to 1.
    assigned:
        Category per document (-1 when unassigned); for seeds, the given label.
    confidence, margin:
        Probability of the assigned category, and its lead over the runner-up (NaN when unassigned).
    runner_up:
        Second most probable category.
    status:
        One of :data:`STATUSES` per document.
    seed_label, cross_checked:
        For seeds: the given category, and the category a model that did not see this
        seed predicts for it (-1 when it could not be checked).
    nearest_seed_rows, nearest_seed_similarity:
        (n, 3) the most similar seed documents (rows; -1 when fewer) and cosine similarity.
    estimated_accuracy:
        Share of seeds whose held-out prediction matches their label (None when no seed
        could be checked); an estimate, not a measurement on the unlabelled documents.
    out_of_scope:
        (n,) out-of-scope score in [0, 1], higher = fits the seeded categories less
        (see :mod:`seedsort.scope`).
    estimated_category_accuracy:
        (c,) the same per category (share of its held-out seeds predicted right; NaN when
        none could be checked).
    """

    ids: tuple[str, ...]
    sources: tuple[str, ...]
    snippets: tuple[str, ...]
    categories: tuple[str, ...]
    probabilities: np.ndarray
    assigned: np.ndarray
    confidence: np.ndarray
    margin: np.ndarray
    runner_up: np.ndarray
    status: np.ndarray
    seed_label: np.ndarray
    cross_checked: np.ndarray
    possible_mislabel: np.ndarray
    nearest_seed_rows: np.ndarray
    nearest_seed_similarity: np.ndarray
    estimated_accuracy: float | None
    estimated_category_accuracy: np.ndarray = field(default_factory=lambda: np.zeros(0))
    out_of_scope: np.ndarray = field(default_factory=lambda: np.zeros(0))
    settings: dict[str, Any] = field(default_factory=dict)
    skipped: tuple[SkippedFile, ...] = ()
    notes: tuple[str, ...] = ()
    root: str = ""

    def __len__(self) -> int:
        return len(self.ids)

    def category_name(self, index: int) -> str | None:
        return self.categories[index] if index >= 0 else None

    def summary(self) -> list[CategorySummary]:
        """Per category: documents (seeds included), share of the collection, mean confidence of the non-seed ones."""
        n = max(1, len(self))
        rows = []
        is_seed = self.status == "seed"
        for j, name in enumerate(self.categories):
            members = self.assigned == j
            auto = members & ~is_seed
            mean_conf = float(np.mean(self.confidence[auto])) if auto.any() else math.nan
            rows.append(
                CategorySummary(
                    name, int(members.sum()), members.sum() / n, mean_conf, int((members & is_seed).sum()),
                    float(self.estimated_category_accuracy[j]) if j < len(self.estimated_category_accuracy) else math.nan,
                )
            )
        return rows

    def doubtful(self) -> np.ndarray:
        """Rows of the categorised (non-seed) documents, least confident first (ties by margin, then id)."""
        rows = np.flatnonzero(self.status == "assigned")
        ids = np.array(self.ids, dtype=object)[rows]
        order = np.lexsort((ids, self.margin[rows], self.confidence[rows]))
        return rows[order]

    def nearest_seeds(self, row: int) -> list[tuple[str, str, float]]:
        """(seed id, its category, similarity) of the nearest seeds of one document."""
        out = []
        for seed_row, sim in zip(self.nearest_seed_rows[row], self.nearest_seed_similarity[row]):
            if seed_row >= 0:
                out.append((self.ids[seed_row], self.categories[self.seed_label[seed_row]], float(sim)))
        return out

    def records(self) -> Iterator[dict[str, Any]]:
        """One plain dict per document, in collection order (the JSON Lines rows)."""
        mislabel = self.possible_mislabel
        for i in range(len(self)):
            seeds = self.nearest_seeds(i)
            conf = float(self.confidence[i])
            marg = float(self.margin[i])
            yield {
                "document": self.ids[i],
                "source": self.sources[i],
                "category": self.category_name(int(self.assigned[i])),
                "confidence": None if math.isnan(conf) else round(conf, 4),
                "margin": None if math.isnan(marg) else round(marg, 4),
                "runner_up": self.category_name(int(self.runner_up[i])) if not math.isnan(marg) else None,
                "status": str(self.status[i]),
                "out_of_scope": round(float(self.out_of_scope[i]), 4) if len(self.out_of_scope) else None,
                "is_seed": bool(self.status[i] == "seed"),
                "possible_mislabel": bool(mislabel[i]),
                "seed_check": self.category_name(int(self.cross_checked[i])),
                "nearest_seeds": [
                    {"document": d, "category": c, "similarity": round(s, 4)} for d, c, s in seeds
                ],
                "probabilities": {
                    name: round(float(p), 4) for name, p in zip(self.categories, self.probabilities[i])
                },
            }

    def to_frame(self) -> pd.DataFrame:
        """The results table (the CSV columns) as a pandas DataFrame."""
        flat = []
        for rec in self.records():
            row = {k: v for k, v in rec.items() if k not in ("nearest_seeds", "probabilities")}
            for j in range(NEAREST_SEEDS):
                seed = rec["nearest_seeds"][j] if j < len(rec["nearest_seeds"]) else None
                row[f"nearest_seed_{j + 1}"] = seed["document"] if seed else None
                row[f"nearest_seed_{j + 1}_category"] = seed["category"] if seed else None
                row[f"nearest_seed_{j + 1}_similarity"] = seed["similarity"] if seed else None
            flat.append(row)
        return pd.DataFrame(flat, columns=CSV_COLUMNS)


CSV_COLUMNS = [
    "document", "source", "category", "confidence", "margin", "runner_up", "status", "out_of_scope", "is_seed",
    "possible_mislabel", "seed_check",
] + [f"nearest_seed_{j}{suffix}" for j in range(1, NEAREST_SEEDS + 1) for suffix in ("", "_category", "_similarity")]


def result_format(path: str | os.PathLike[str], fmt: str | None = None) -> str:
    """The output format: given, or from the file extension (.csv, .jsonl/.ndjson, .parquet)."""
    if fmt:
        if fmt not in RESULT_FORMATS:
            raise InputError(f"Unknown results format {fmt!r}; choose csv, jsonl or parquet.")
        return fmt
    suffix = Path(path).suffix.lower()
    if suffix == ".csv":
        return "csv"
    if suffix in (".jsonl", ".ndjson"):
        return "jsonl"
    if suffix == ".parquet":
        return "parquet"
    raise InputError(f"Cannot tell the results format of {path}; end the name in .csv or .jsonl, or .parquet.")


def write_results(result: SortResult, path: str | os.PathLike[str], fmt: str | None = None) -> Path:
    """Write the results atomically (a temporary file renamed into place).

    Parquet (typed columns, see :func:`seedsort.export.results_table`) needs pyarrow.
    Returns the path written.
    """
    # Imported here: export builds on this module, and pyarrow is loaded only for Parquet.
    from .export import require_parquet, results_table, write_parquet

    path = Path(path)
    fmt = result_format(path, fmt)
    if fmt == "parquet":
        require_parquet()
    if path.is_dir():
        raise InputError(f"Results path {path} is a folder; give a file name ending in .csv, .jsonl or .parquet.")
    directory = path.parent if str(path.parent) else Path(".")
    if not directory.is_dir():
        raise InputError(f"Folder {directory} for the results does not exist; create it first.")
    fd, tmp = tempfile.mkstemp(prefix=".seedsort-", suffix=".part", dir=directory)
    try:
        if fmt == "parquet":
            os.close(fd)
            write_parquet(results_table(result), tmp)
        else:
            with os.fdopen(fd, "w", encoding="utf-8", newline="") as handle:
                if fmt == "csv":
                    result.to_frame().to_csv(handle, index=False)
                else:
                    for rec in result.records():
                        handle.write(json.dumps(rec, ensure_ascii=False) + "\n")
        os.replace(tmp, path)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise
    return path
