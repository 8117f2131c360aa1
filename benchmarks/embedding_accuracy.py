"""Accuracy on BANKING77 with sentence embeddings, beside the n-gram vectors on the same seeds.

Run from the repository root, with the extra installed (pip install -e ".[embed]"):

    python benchmarks/embedding_accuracy.py                        # 10 seeds/category, samples 0-2
    python benchmarks/embedding_accuracy.py --per-category 5 10 30 --samples 5
    python benchmarks/embedding_accuracy.py --first-sample 5 --samples 5   # samples 5-9

Data: BANKING77 (Casanueva et al. 2020, CC BY 4.0), tests/data/banking77/. The pool is
train+test texts; seeds are sampled from train.csv per category with numpy
default_rng(sample); accuracy is on test.csv. Embedding the 13,083 texts takes a few
minutes on 2 cores; the vectors are cached by content hash (--cache), so later runs reuse
them. Every method sees the same seeds, vectors and 10-NN graph and runs in this process.

Methods, for each kind of vectors (embeddings; n-gram TF-IDF, seedsort's default):
  logistic regression   scikit-learn LogisticRegression(C=10) on the seeds' vectors
  blend w=0.5, plain    seedsort.combine.predict with graph_weight 0.5 and the classifier on
                        the plain vectors (feature_smoothing=0): label spreading over the
                        run's 10-NN cosine graph blended with the seed classifier
  seedsort (default)    the whole default pipeline, sort_documents: graph weight chosen per
                        run from the held-out seeds; on embeddings the classifier fitted on
                        graph-smoothed features (seedsort.combine.smooth_features) at C 30
                        (ModelSettings.dense_classifier_strength) and the spread run over the
                        graph's weights raised to the power 8 (seedsort.dense); on embeddings
                        the weights are the cosines in the seeds' whitened metric
                        (seedsort.dense.seed_spreading_graph)
  seedsort, no seed metric
                        (embeddings only) the default pipeline with
                        ModelSettings.seed_metric_shrinkage None: the prepared graph's
                        plain cosine weights, as before the seed metric
Printed after the table: the graph weights the default pipeline chose and the seconds each
seedsort row's sort_documents took (vectors and graph prepared once, not counted).
"""

from __future__ import annotations

import argparse
import time
import warnings
from dataclasses import replace
from pathlib import Path

import numpy as np
from sklearn.exceptions import ConvergenceWarning
from sklearn.linear_model import LogisticRegression

from seedsort import SortSettings, resolve_seeds, sort_documents
from seedsort.combine import ModelSettings, predict
from seedsort.sorting import prepare
from seedsort.vectors import VectorSettings

from _banking77 import DATA, load_pool



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
    parser.add_argument("--samples", type=int, default=3, help="how many sampling seeds")
    parser.add_argument("--first-sample", type=int, default=0, help="first sampling seed (default 0)")
    parser.add_argument("--cache", type=Path, default=Path("/tmp/seedsort-banking77-emb.npz"))
    parser.add_argument("--skip-ngrams", action="store_true", help="leave out the n-gram rows")
    args = parser.parse_args()

    pool = load_pool(DATA)
    documents, categories, index, texts = pool.documents, pool.categories, pool.index, pool.texts
    y_train, y_test, test_rows = pool.y_train, pool.y_test, pool.test_rows
    n_classes = len(categories)
    print(
        f"BANKING77: {len(texts)} texts in the pool, {n_classes} categories, "
        f"scored on {len(y_test)} test texts"
    )

    kinds = {"embeddings": SortSettings(vectors=VectorSettings(mode="embed", embedding_cache=str(args.cache)))}
    if not args.skip_ngrams:
        kinds["n-grams"] = SortSettings()
    prepared = {}
    for name, settings in kinds.items():
        started = time.perf_counter()
        prepared[name] = prepare(documents, settings)
        print(f"{name}: vectors + 10-NN graph {time.perf_counter() - started:.1f} s (built once)")

    plain = ModelSettings(graph_weight=0.5, feature_smoothing=0, seed_metric_shrinkage=None)
    runs = {f"{name}: seedsort (default)": (name, settings) for name, settings in kinds.items()}
    if "embeddings" in kinds:
        embed = kinds["embeddings"]
        runs["embeddings: seedsort, no seed metric"] = (
            "embeddings", replace(embed, model=replace(embed.model, seed_metric_shrinkage=None))
        )
    samples = range(args.first_sample, args.first_sample + args.samples)
    for per_category in args.per_category:
        scores: dict[str, list[float]] = {}
        weights: dict[str, list[float]] = {}
        seconds: dict[str, list[float]] = {}
        for sample in samples:
            seeds = sample_seeds(y_train, n_classes, per_category, sample)
            pairs = [(documents[r].id, categories[y_train[r]]) for r in seeds]
            for name, settings in kinds.items():
                vectors, graph = prepared[name].vectors, prepared[name].graph
                guess = logistic_regression(vectors, seeds, y_train[seeds], test_rows)
                scores.setdefault(f"{name}: logistic regression", []).append(
                    float(np.mean(guess == y_test))
                )
                prediction = predict(vectors, graph, seeds, y_train[seeds], n_classes, plain)
                guess = prediction.probabilities[test_rows].argmax(axis=1)
                scores.setdefault(f"{name}: blend w=0.5, plain", []).append(
                    float(np.mean(guess == y_test))
                )
            for method, (name, settings) in runs.items():
                started = time.perf_counter()
                result = sort_documents(
                    documents, resolve_seeds(documents, pairs), settings, prepared=prepared[name]
                )
                seconds.setdefault(method, []).append(time.perf_counter() - started)
                full = np.zeros((len(documents), n_classes))
                full[:, [index[c] for c in result.categories]] = result.probabilities
                guess = full[test_rows].argmax(axis=1)
                scores.setdefault(method, []).append(float(np.mean(guess == y_test)))
                weights.setdefault(method, []).append(float(result.settings["graph_weight"]))
            print(
                f"  {per_category}/category, sample {sample}: "
                + ", ".join(f"{k} {100 * v[-1]:.2f}" for k, v in scores.items()),
                flush=True,
            )
        print(f"\n{per_category} seeds per category, samples {samples.start}..{samples.stop - 1}")
        print(f"{'method':<42} {'mean':>7} {'min':>7} {'max':>7}")
        for method, values in scores.items():
            v = 100 * np.asarray(values)
            print(f"{method:<42} {v.mean():>6.2f}% {v.min():>6.2f}% {v.max():>6.2f}%")
        for method, chosen in weights.items():
            print(f"graph weight chosen, {method}: {chosen}")
        for method, taken in seconds.items():
            print(f"seconds per sort_documents, {method}: mean {np.mean(taken):.1f} ({', '.join(f'{t:.1f}' for t in taken)})")
        print(flush=True)


if __name__ == "__main__":
    main()
