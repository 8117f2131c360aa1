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

    def _columns(self) -> dict[str, list[Any]]:
        """The flat result columns (the CSV's, in :data:`CSV_COLUMNS` order) as Python lists.

        Built column by column with numpy (one vectorised pass per column, then one
        ``tolist``) instead of per-row Python: at 100,000 documents the per-row version spent
        most of the export's time in ``round`` and attribute look-ups. Values match
        :meth:`records`: floats rounded to 4 places, None where a value does not apply.
        """
        names = np.array(list(self.categories) + [None], dtype=object)  # index -1 -> None
        margin = np.asarray(self.margin, dtype=np.float64)
        missing_margin = np.isnan(margin)
        n = len(self)
        columns: dict[str, list[Any]] = {
            "document": list(self.ids),
            "source": list(self.sources),
            "category": names[np.asarray(self.assigned, dtype=np.int64)].tolist(),
            "confidence": _rounded(self.confidence),
            "margin": _rounded(margin),
            "runner_up": np.where(missing_margin, None, names[np.asarray(self.runner_up, dtype=np.int64)]).tolist(),
            "status": np.asarray(self.status).astype(str).tolist(),
            "out_of_scope": _rounded(self.out_of_scope) if len(self.out_of_scope) else [None] * n,
            "is_seed": (np.asarray(self.status) == "seed").tolist(),
            "possible_mislabel": np.asarray(self.possible_mislabel, dtype=bool).tolist(),
            "seed_check": names[np.asarray(self.cross_checked, dtype=np.int64)].tolist(),
        }
        rows, similarity = _valid_first(self.nearest_seed_rows, self.nearest_seed_similarity, NEAREST_SEEDS)
        ids = np.array(list(self.ids) + [None], dtype=object)  # index -1 -> None
        seed_category = names[np.append(np.asarray(self.seed_label, dtype=np.int64), -1)[rows]]
        for j in range(NEAREST_SEEDS):
            present = (rows[:, j] >= 0).tolist()
            columns[f"nearest_seed_{j + 1}"] = ids[rows[:, j]].tolist()
            columns[f"nearest_seed_{j + 1}_category"] = seed_category[:, j].tolist()
            sims = _rounded(similarity[:, j])
            columns[f"nearest_seed_{j + 1}_similarity"] = [v if ok else None for v, ok in zip(sims, present)]
        return columns

    def records(self) -> Iterator[dict[str, Any]]:
        """One plain dict per document, in collection order (the JSON Lines rows)."""
        columns = self._columns()
        flat = [key for key in CSV_COLUMNS if not key.startswith("nearest_seed_")]
        probabilities = _round4(self.probabilities).tolist()
        categories = list(self.categories)
        for i in range(len(self)):
            record = {key: columns[key][i] for key in flat}
            record["nearest_seeds"] = [
                {
                    "document": columns[f"nearest_seed_{j}"][i],
                    "category": columns[f"nearest_seed_{j}_category"][i],
                    "similarity": columns[f"nearest_seed_{j}_similarity"][i],
                }
                for j in range(1, NEAREST_SEEDS + 1)
                if columns[f"nearest_seed_{j}"][i] is not None
            ]
            record["probabilities"] = dict(zip(categories, probabilities[i]))
            yield record

    def to_frame(self) -> pd.DataFrame:
        """The results table (the CSV columns) as a pandas DataFrame."""
        return pd.DataFrame(self._columns(), columns=CSV_COLUMNS)


def _round4(values: np.ndarray) -> np.ndarray:
    """Values rounded to 4 decimal places exactly as Python's ``round(value, 4)`` does.

    ``np.round`` multiplies by 10^4 first, so a value within rounding error of a half-way
    point can go the other way than ``round``, which rounds the exact binary value; those
    few values are passed to ``round`` itself (the files stay byte-identical to a per-value
    ``round``).
    """
    array = np.asarray(values, dtype=np.float64)
    out = np.round(array, 4)
    scaled = array * 1e4
    near_half = np.abs(scaled - np.floor(scaled) - 0.5) < 1e-6
    if near_half.any():
        out[near_half] = [round(value, 4) for value in array[near_half].tolist()]
    return out


def _rounded(values: np.ndarray) -> list[float | None]:
    """Values rounded to 4 places (:func:`_round4`) as Python floats, None for NaN."""
    array = _round4(values)
    return np.where(np.isnan(array), None, array).tolist()


def _valid_first(rows: np.ndarray, similarity: np.ndarray, width: int) -> tuple[np.ndarray, np.ndarray]:
    """Nearest-seed arrays (n, width): missing entries (-1) moved to the end of each row, order kept."""
    rows = np.asarray(rows, dtype=np.int64)
    similarity = np.asarray(similarity, dtype=np.float64)
    have = min(width, rows.shape[1]) if rows.ndim == 2 else 0
    padded = np.full((len(rows), width), -1, dtype=np.int64)
    padded_sim = np.zeros((len(rows), width))
    padded[:, :have], padded_sim[:, :have] = rows[:, :have], similarity[:, :have]
    order = np.argsort(padded < 0, axis=1, kind="stable")
    return np.take_along_axis(padded, order, axis=1), np.take_along_axis(padded_sim, order, axis=1)


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
    from .export import require_parquet, results_table, write_atomically, write_parquet

    path = Path(path)
    fmt = result_format(path, fmt)
    if fmt == "parquet":
        require_parquet()

    def write(tmp: Path) -> None:
        if fmt == "parquet":
            write_parquet(results_table(result), tmp)
            return
        with open(tmp, "w", encoding="utf-8", newline="") as handle:
            if fmt == "csv":
                result.to_frame().to_csv(handle, index=False)
            else:
                for rec in result.records():
                    handle.write(json.dumps(rec, ensure_ascii=False) + "\n")

    return write_atomically(path, write, "results")
