"""BANKING77 as the accuracy benchmarks use it: train + test texts as one pool of documents.

BANKING77 (Casanueva et al. 2020, CC BY 4.0), tests/data/banking77/. Documents are the
train rows then the test rows, ids ``train.csv#row-N`` / ``test.csv#row-N`` as seedsort
gives table rows; categories are sorted by name and numbered in that order.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd

from seedsort import Document

DATA = Path(__file__).resolve().parent.parent / "tests" / "data" / "banking77"


@dataclass(frozen=True)
class Pool:
    """The pool; ``y_train`` / ``y_test`` are category numbers of the train and test rows."""

    documents: list[Document]
    categories: list[str]
    y_train: np.ndarray
    y_test: np.ndarray
    index: dict[str, int] = field(init=False)

    def __post_init__(self) -> None:
        object.__setattr__(self, "index", {c: i for i, c in enumerate(self.categories)})

    @property
    def n_train(self) -> int:
        return len(self.y_train)

    @property
    def texts(self) -> list[str]:
        return [doc.text for doc in self.documents]

    @property
    def test_rows(self) -> np.ndarray:
        """Rows of the test texts in the pool."""
        return np.arange(self.n_train, len(self.documents))


def load_pool(folder: Path = DATA) -> Pool:
    """Read train.csv and test.csv (columns text, category) from ``folder``; text kept as
    written (no value is read as missing)."""
    train = pd.read_csv(folder / "train.csv", keep_default_na=False)
    test = pd.read_csv(folder / "test.csv", keep_default_na=False)
    documents = [Document.make(f"train.csv#row-{i + 1}", "train.csv", t) for i, t in enumerate(train.text)]
    documents += [Document.make(f"test.csv#row-{i + 1}", "test.csv", t) for i, t in enumerate(test.text)]
    categories = sorted(train.category.unique())
    index = {c: i for i, c in enumerate(categories)}
    return Pool(
        documents, categories, train.category.map(index).to_numpy(), test.category.map(index).to_numpy()
    )
