"""Accuracy benchmark on BANKING77: seedsort against what a user could script by hand.

Run from the repository root (takes a while; see --help for smaller runs):

    python benchmarks/banking77_accuracy.py
    python benchmarks/banking77_accuracy.py --per-category 10 --samples 5 --skip-sklearn-spreading

Data: BANKING77 (Casanueva et al. 2020, CC BY 4.0), copied in tests/data/banking77/. The
pool is train+test texts; seeds are sampled from train.csv (numpy default_rng(sample));
scores are on test.csv. Every method sees the same seeds and the same vectors and runs in
this process, so the differences are what counts on a shared, noisy machine.

Methods
  seedsort             the default pipeline (sort_documents, self-tuned, calibrated)
  logistic regression  scikit-learn LogisticRegression(C=10) on the seeds' vectors
  sklearn spreading    scikit-learn LabelSpreading(kernel="knn", n_neighbors=10) on the vectors
  1-nearest seed       the category of the most cosine-similar seed

Printed per seed count: mean/min/max accuracy, macro-F1, seconds per run and peak traced
memory (tracemalloc, numpy and scipy allocations, from one extra untimed run), each method's accuracy minus seedsort's,
and for seedsort the expected calibration error (15 bins) and its own estimated accuracy.
The vectors and the neighbour graph do not depend on the seeds: they are built once
(time printed separately) and reused by the seedsort runs.

--out-of-scope adds the out-of-scope experiment: all seeds of the last 10 categories (in
sorted order) are hidden and their test texts count as out of scope; it prints the AUROC of
seedsort's out-of-scope score and the in-scope accuracy with and without the threshold.
"""

from __future__ import annotations

import argparse
import time
import tracemalloc
import warnings
from collections.abc import Callable
from dataclasses import replace

import numpy as np
from sklearn.exceptions import ConvergenceWarning
from sklearn.linear_model import LogisticRegression
from sklearn.metrics import f1_score, roc_auc_score
from sklearn.semi_supervised import LabelSpreading

from seedsort import SortSettings, resolve_seeds, sort_documents
from seedsort.evaluation import expected_calibration_error
from seedsort.sorting import prepare

from _banking77 import DATA, load_pool



def measured(run: Callable[[], np.ndarray], trace: bool) -> tuple[np.ndarray, float, float]:
    """Result, seconds and (when ``trace``) peak traced MiB of one call.

    tracemalloc slows numpy-heavy code several-fold, so timed runs are not traced: memory
    is taken from one extra traced run per method (the first sample).
    """
    if trace:
        tracemalloc.start()
        run()
        _, peak = tracemalloc.get_traced_memory()
        tracemalloc.stop()
    started = time.perf_counter()
    out = run()
    return out, time.perf_counter() - started, (peak / 2**20 if trace else float("nan"))


def sample_seeds(y_train: np.ndarray, n_classes: int, per_category: int, sample: int, skip: set[int] = frozenset()) -> np.ndarray:
    rng = np.random.default_rng(sample)
    return np.sort(np.concatenate([
        rng.choice(np.flatnonzero(y_train == c), per_category, replace=False)
        for c in range(n_classes) if c not in skip
    ]))


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--per-category", type=int, nargs="+", default=[5, 10, 30])
    parser.add_argument("--samples", type=int, default=5, help="sampling seeds 0..N-1 (default 5)")
    parser.add_argument("--skip-sklearn-spreading", action="store_true", help="leave out the slowest baseline")
    parser.add_argument("--out-of-scope", action="store_true", help="also run the out-of-scope experiment (10 seeds/category)")
    args = parser.parse_args()

    pool = load_pool(DATA)
    documents, categories, index, texts = pool.documents, pool.categories, pool.index, pool.texts
    y_train, y_test = pool.y_train, pool.y_test
    n_train, n_classes = pool.n_train, len(categories)
    settings = SortSettings()

    prepared, prep_seconds, _ = measured(lambda: prepare(documents, settings), trace=False)
    vectors = prepared.vectors
    print(f"BANKING77: {len(texts)} texts in the pool, {n_classes} categories, scored on {len(y_test)} test texts")
    print(f"vectors + 10-NN graph built once: {prep_seconds:.1f}s "
          "(shared by the seedsort runs; not in their per-run times)\n")

    def run_seedsort(rows: np.ndarray, **changes: object):
        pairs = [(documents[r].id, categories[y_train[r]]) for r in rows]
        seeds = resolve_seeds(documents, pairs)
        return sort_documents(documents, seeds, replace(settings, **changes) if changes else settings, prepared=prepared)

    def to_full(result) -> np.ndarray:
        """seedsort's probabilities in the benchmark's category order (seeds may name fewer)."""
        probs = np.zeros((len(documents), n_classes))
        probs[:, [index[c] for c in result.categories]] = result.probabilities
        return probs

    for per_category in args.per_category:
        rows_acc: dict[str, list[float]] = {}
        rows_f1: dict[str, list[float]] = {}
        rows_sec: dict[str, list[float]] = {}
        rows_mem: dict[str, list[float]] = {}
        eces, estimates, weights = [], [], []

        def record(name: str, predicted: np.ndarray, seconds: float, peak: float) -> None:
            rows_acc.setdefault(name, []).append(float(np.mean(predicted == y_test)))
            rows_f1.setdefault(name, []).append(float(f1_score(y_test, predicted, average="macro")))
            rows_sec.setdefault(name, []).append(seconds)
            rows_mem.setdefault(name, []).append(peak)

        for sample in range(args.samples):
            rows = sample_seeds(y_train, n_classes, per_category, sample)
            classes = y_train[rows]

            result, sec, mem = measured(lambda: run_seedsort(rows), trace=sample == 0)
            probs = to_full(result)[n_train:]
            predicted = probs.argmax(axis=1)
            record("seedsort", predicted, sec, mem)
            eces.append(expected_calibration_error(probs.max(axis=1), predicted == y_test))
            estimates.append(result.estimated_accuracy or float("nan"))
            weights.append(float(result.settings["graph_weight"]))

            def logistic() -> np.ndarray:
                with warnings.catch_warnings():
                    warnings.simplefilter("ignore", ConvergenceWarning)
                    model = LogisticRegression(C=10, max_iter=2000).fit(vectors[rows], classes)
                return model.predict(vectors[n_train:])

            record("logistic regression", *measured(logistic, trace=sample == 0))

            if not args.skip_sklearn_spreading:
                def sklearn_spreading() -> np.ndarray:
                    labels = np.full(len(texts), -1)
                    labels[rows] = classes
                    with warnings.catch_warnings():
                        warnings.simplefilter("ignore")
                        model = LabelSpreading(kernel="knn", n_neighbors=10, max_iter=100).fit(vectors, labels)
                    return model.transduction_[n_train:]

                record("sklearn spreading", *measured(sklearn_spreading, trace=sample == 0))

            def nearest_seed() -> np.ndarray:
                sims = (vectors[n_train:] @ vectors[rows].T).toarray()
                return classes[sims.argmax(axis=1)]

            record("1-nearest seed", *measured(nearest_seed, trace=sample == 0))
            print(f"  {per_category}/category, sample {sample}: "
                  + ", ".join(f"{k} {v[-1]:.3f}" for k, v in rows_acc.items()), flush=True)

        base = np.mean(rows_acc["seedsort"])
        print(f"\n{per_category} seeds per category, {args.samples} samples")
        print(f"{'method':<21}{'mean':>7}{'min':>7}{'max':>7}{'macroF1':>9}{'s/run':>8}{'MiB':>7}{'vs seedsort':>13}")
        for name in rows_acc:
            acc = rows_acc[name]
            print(f"{name:<21}{np.mean(acc):7.3f}{np.min(acc):7.3f}{np.max(acc):7.3f}"
                  f"{np.mean(rows_f1[name]):9.3f}{np.mean(rows_sec[name]):8.1f}{np.nanmax(rows_mem[name]):7.0f}"
                  f"{np.mean(acc) - base:+13.3f}")
        print(f"seedsort: ECE {np.mean(eces):.3f} (max {np.max(eces):.3f}); its own estimated accuracy "
              f"{np.nanmean(estimates):.3f} vs measured {base:.3f}; graph weight chosen {sorted(set(weights))}\n", flush=True)

    if args.out_of_scope:
        hidden = set(range(n_classes - 10, n_classes))
        in_scope = ~np.isin(y_test, list(hidden))
        aurocs, with_t, without_t, caught = [], [], [], []
        for sample in range(args.samples):
            rows = sample_seeds(y_train, n_classes, 10, sample, skip=hidden)
            result = run_seedsort(rows)
            score = np.asarray(result.out_of_scope)[n_train:]
            aurocs.append(roc_auc_score(~in_scope, score))
            predicted = to_full(result)[n_train:].argmax(axis=1)
            flagged = np.asarray(result.status)[n_train:] == "out_of_scope"
            without_t.append(float(np.mean(predicted[in_scope] == y_test[in_scope])))
            with_t.append(float(np.mean((predicted == y_test)[in_scope] & ~flagged[in_scope])))
            caught.append(float(np.mean(flagged[~in_scope])))
            print(f"  out of scope, sample {sample}: AUROC {aurocs[-1]:.3f}, in-scope accuracy "
                  f"{without_t[-1]:.3f} -> {with_t[-1]:.3f} with the threshold, {caught[-1]:.0%} of out-of-scope caught",
                  flush=True)
        print(f"\nout of scope (10 of 77 categories unseeded, 10 seeds per remaining category, {args.samples} samples)")
        print(f"AUROC {np.mean(aurocs):.3f} (min {np.min(aurocs):.3f}); in-scope accuracy without threshold "
              f"{np.mean(without_t):.3f}, with {np.mean(with_t):.3f} ({np.mean(with_t) - np.mean(without_t):+.3f}); "
              f"out-of-scope caught {np.mean(caught):.0%}")


if __name__ == "__main__":
    main()
