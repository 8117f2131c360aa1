"""Accuracy on BANKING77: seedsort's default pipeline against the obvious alternatives.

Run from the repository root:

    python benchmarks/banking77_accuracy.py            # 10 seeds per category, sampling seeds 0-2
    python benchmarks/banking77_accuracy.py --per-category 5 --samples 5

Data: BANKING77 (Casanueva et al. 2020, CC BY 4.0), copied in tests/data/banking77/. The
unlabelled pool is train+test texts; seeds are sampled from train.csv; accuracy is measured
on test.csv. All methods see the same seeds and (except where noted) the same vectors, and
run in the same process, so the differences are what matters on a shared, noisy machine.

Methods:
  seedsort            the default pipeline (spreading over a 10-NN graph + seed classifier)
  spreading only      seedsort's graph and spreading alone (graph weight 1)
  logistic regression scikit-learn LogisticRegression(C=10) on the seeds' vectors
  sklearn spreading   scikit-learn LabelSpreading(kernel="knn", n_neighbors=10) on the same vectors
"""

from __future__ import annotations

import argparse
import time
import warnings
from dataclasses import replace
from pathlib import Path

import numpy as np
import pandas as pd
from sklearn.exceptions import ConvergenceWarning
from sklearn.linear_model import LogisticRegression
from sklearn.semi_supervised import LabelSpreading

from seedsort.combine import ModelSettings, predict
from seedsort.graph import knn_cosine, symmetric_affinity
from seedsort.spreading import normalised_affinity
from seedsort.vectors import vectorise

DATA = Path(__file__).resolve().parent.parent / "tests" / "data" / "banking77"


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--per-category", type=int, default=10)
    parser.add_argument("--samples", type=int, default=3, help="sampling seeds 0..N-1")
    parser.add_argument("--skip-sklearn-spreading", action="store_true")
    args = parser.parse_args()

    train = pd.read_csv(DATA / "train.csv")
    test = pd.read_csv(DATA / "test.csv")
    texts = list(train.text) + list(test.text)
    categories = sorted(train.category.unique())
    index = {c: i for i, c in enumerate(categories)}
    y_train = train.category.map(index).to_numpy()
    y_test = test.category.map(index).to_numpy()
    n_train = len(train)

    started = time.perf_counter()
    vectors = vectorise(texts)
    graph = normalised_affinity(symmetric_affinity(knn_cosine(vectors, 10)))
    shared = time.perf_counter() - started
    print(f"{len(texts)} texts, {len(categories)} categories, {args.per_category} seeds each; "
          f"vectors + graph {shared:.1f}s (shared by the seedsort rows)")

    scores: dict[str, list[float]] = {}
    for sample in range(args.samples):
        rng = np.random.default_rng(sample)
        rows = np.sort(np.concatenate([
            rng.choice(np.flatnonzero(y_train == c), args.per_category, replace=False)
            for c in range(len(categories))
        ]))
        classes = y_train[rows]

        def accuracy(probs: np.ndarray) -> float:
            return float(np.mean(probs[n_train:].argmax(axis=1) == y_test))

        default = ModelSettings()
        scores.setdefault("seedsort", []).append(
            accuracy(predict(vectors, graph, rows, classes, len(categories), default).probabilities))
        scores.setdefault("spreading only", []).append(
            accuracy(predict(vectors, graph, rows, classes, len(categories), replace(default, graph_weight=1.0)).probabilities))
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", ConvergenceWarning)
            lr = LogisticRegression(C=10, max_iter=2000).fit(vectors[rows], classes)
        scores.setdefault("logistic regression", []).append(accuracy(lr.predict_proba(vectors)))
        if not args.skip_sklearn_spreading:
            labels = np.full(len(texts), -1)
            labels[rows] = classes
            with warnings.catch_warnings():
                warnings.simplefilter("ignore")
                ls = LabelSpreading(kernel="knn", n_neighbors=10, max_iter=100).fit(vectors, labels)
            scores.setdefault("sklearn spreading", []).append(accuracy(ls.label_distributions_))
        print(f"sample {sample}: " + ", ".join(f"{k} {v[-1]:.3f}" for k, v in scores.items()), flush=True)

    base = np.mean(scores["seedsort"])
    print(f"\n{'method':<22}{'mean':>8}{'min':>8}{'max':>8}{'vs seedsort':>13}")
    for name, vals in scores.items():
        print(f"{name:<22}{np.mean(vals):8.3f}{np.min(vals):8.3f}{np.max(vals):8.3f}{np.mean(vals) - base:+13.3f}")


if __name__ == "__main__":
    main()
