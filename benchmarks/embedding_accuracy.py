"""Accuracy on BANKING77 with sentence embeddings, beside the n-gram vectors on the same seeds.

Run from the repository root, with the extra installed (pip install -e ".[embed]"):

    python benchmarks/embedding_accuracy.py                        # 10 seeds/category, samples 0-2
    python benchmarks/embedding_accuracy.py --per-category 5 10 30 --samples 5

Data: BANKING77 (Casanueva et al. 2020, CC BY 4.0), tests/data/banking77/. The pool is
train+test texts; seeds are sampled from train.csv per category with numpy
default_rng(sample); accuracy is on test.csv. Embedding the 13,083 texts takes a few
minutes on 2 cores; the vectors are cached by content hash (--cache), so later runs reuse
them. Every method sees the same seeds and runs in this process.

Methods, for each kind of vectors (embeddings; n-gram TF-IDF, seedsort's default):
  logistic regression   scikit-learn LogisticRegression(C=10) on the seeds' vectors
  graph + classifier    seedsort.combine.predict: label spreading over the 10-NN cosine graph
                        (knn_cosine -> symmetric_affinity -> normalised_affinity) blended
                        with the seed classifier, graph_weight 0.5
"""

from __future__ import annotations

import argparse
import time
import warnings
from pathlib import Path

import numpy as np
import pandas as pd
from sklearn.exceptions import ConvergenceWarning
from sklearn.linear_model import LogisticRegression

from seedsort import embeddings
from seedsort.combine import ModelSettings, predict
from seedsort.graph import knn_cosine, symmetric_affinity
from seedsort.spreading import normalised_affinity
from seedsort.vectors import vectorise

DATA = Path(__file__).resolve().parent.parent / "tests" / "data" / "banking77"


def sample_seeds(y_train: np.ndarray, n_classes: int, per_category: int, sample: int) -> np.ndarray:
    rng = np.random.default_rng(sample)
    return np.sort(
        np.concatenate(
            [
                rng.choice(np.flatnonzero(y_train == c), per_category, replace=False)
                for c in range(n_classes)
            ]
        )
    )


def logistic_regression(vectors, seeds, y_seeds, rows) -> np.ndarray:
    model = LogisticRegression(C=10, max_iter=2000)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ConvergenceWarning)
        model.fit(vectors[seeds], y_seeds)
    return model.predict(vectors[rows])


def main() -> None:
    parser = argparse.ArgumentParser(
        description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter
    )
    parser.add_argument("--per-category", type=int, nargs="+", default=[10])
    parser.add_argument("--samples", type=int, default=3, help="sampling seeds 0..N-1")
    parser.add_argument("--cache", type=Path, default=Path("/tmp/seedsort-banking77-emb.npz"))
    parser.add_argument("--skip-ngrams", action="store_true", help="leave out the n-gram rows")
    args = parser.parse_args()

    train = pd.read_csv(DATA / "train.csv")
    test = pd.read_csv(DATA / "test.csv")
    texts = [str(t) for t in list(train.text) + list(test.text)]
    categories = sorted(train.category.unique())
    index = {c: i for i, c in enumerate(categories)}
    y_train = train.category.map(index).to_numpy()
    y_test = test.category.map(index).to_numpy()
    n_train, n_classes = len(train), len(categories)
    test_rows = np.arange(n_train, len(texts))
    print(
        f"BANKING77: {len(texts)} texts in the pool, {n_classes} categories, "
        f"scored on {len(test)} test texts"
    )

    started = time.perf_counter()
    emb, n_new = embeddings.embed_with_cache(texts, None, args.cache)
    print(
        f"embeddings: {time.perf_counter() - started:.1f} s ({n_new} embedded now, "
        f"{len(texts) - n_new} from {args.cache})"
    )
    kinds = {"embeddings": emb}
    if not args.skip_ngrams:
        kinds["n-grams"] = vectorise(texts)

    graphs = {}
    for name, vectors in kinds.items():
        started = time.perf_counter()
        graphs[name] = normalised_affinity(symmetric_affinity(knn_cosine(vectors, 10), len(texts)))
        print(f"{name}: 10-NN graph {time.perf_counter() - started:.1f} s")

    settings = ModelSettings(graph_weight=0.5)
    for per_category in args.per_category:
        scores: dict[str, list[float]] = {}
        for sample in range(args.samples):
            seeds = sample_seeds(y_train, n_classes, per_category, sample)
            for name, vectors in kinds.items():
                guess = logistic_regression(vectors, seeds, y_train[seeds], test_rows)
                scores.setdefault(f"{name}: logistic regression", []).append(
                    float(np.mean(guess == y_test))
                )
                prediction = predict(
                    vectors, graphs[name], seeds, y_train[seeds], n_classes, settings
                )
                guess = prediction.probabilities[test_rows].argmax(axis=1)
                scores.setdefault(f"{name}: graph + classifier (w=0.5)", []).append(
                    float(np.mean(guess == y_test))
                )
        print(f"\n{per_category} seeds per category, samples 0..{args.samples - 1}")
        print(f"{'method':<42} {'mean':>7} {'min':>7} {'max':>7}")
        for method, values in scores.items():
            v = 100 * np.asarray(values)
            print(f"{method:<42} {v.mean():>6.2f}% {v.min():>6.2f}% {v.max():>6.2f}%")


if __name__ == "__main__":
    main()
