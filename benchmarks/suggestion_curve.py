"""What to label next, measured on BANKING77: suggested labels against random ones.

Run from the repository root (one command; 24 minutes on two busy shared cores, 33 with
--with-margin, measured):

    python benchmarks/suggestion_curve.py
    python benchmarks/suggestion_curve.py --samples 2 --folds 0        # a quicker look
    python benchmarks/suggestion_curve.py --with-margin                # adds plain margin sampling

Data: BANKING77 (Casanueva et al. 2020, CC BY 4.0), tests/data/banking77/ (or
/work/shared/datasets/banking77/ when the copy is missing). The pool is train+test texts;
labels are only ever added from train.csv, with the dataset's own categories; accuracy is
measured on test.csv (the category of highest probability, as in banking77_accuracy.py).

Per sampling seed s (0..N-1): start from --start seeds per category drawn from train.csv with
numpy default_rng(s), then --rounds rounds of --per-round new labels (default: one per
category, 77), each round followed by a full seedsort run. The methods share the starting
seeds and differ only in which documents they add:

  suggested   seedsort.suggest.suggest_labels on the latest run (test rows excluded)
  random      uniformly among the unlabelled train rows (numpy default_rng(1000 + s))
  margin      (--with-margin) the least-margin train rows, no density, spread or duplicate
              rules: plain margin sampling, to show what the rest of the method adds

The vectors and the graph do not depend on the seeds: prepare() runs once and every run
reuses it. Printed: accuracy per round (mean/min/max over samples) of each method, the paired
difference suggested - random (mean/min/max), and the seconds per suggestion batch against
the seconds per seedsort run measured in the same process.
"""

from __future__ import annotations

import argparse
import time
from dataclasses import replace
from pathlib import Path

import numpy as np

from seedsort import SortSettings, resolve_seeds, sort_documents
from seedsort.results import SortResult
from seedsort.sorting import Prepared, prepare
from seedsort.suggest import margin_of, suggest_labels

from _banking77 import load_pool

HERE = Path(__file__).resolve().parent.parent
DATA_PLACES = (HERE / "tests" / "data" / "banking77", Path("/work/shared/datasets/banking77"))


def data_folder() -> Path:
    for place in DATA_PLACES:
        if (place / "train.csv").is_file() and (place / "test.csv").is_file():
            return place
    raise SystemExit("BANKING77 not found in " + " or ".join(str(p) for p in DATA_PLACES))


def least_margin(result: SortResult, count: int, allowed: np.ndarray) -> np.ndarray:
    """Plain margin sampling: the ``count`` allowed rows of smallest margin (ties by row)."""
    margin = margin_of(result.probabilities)
    rows = np.flatnonzero(allowed & (np.asarray(result.status) != "seed"))
    return rows[np.lexsort((rows, margin[rows]))[:count]]


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--samples", type=int, default=5, help="sampling seeds 0..N-1 (default 5)")
    parser.add_argument("--start", type=int, default=3, help="seeds per category to start from (default 3)")
    parser.add_argument("--rounds", type=int, default=5)
    parser.add_argument("--per-round", type=int, default=None,
                        help="labels added per round (default: one per category)")
    parser.add_argument("--folds", type=int, default=SortSettings().cross_check_folds,
                        help="SortSettings.cross_check_folds of every run (default: the library default)")
    parser.add_argument("--with-margin", action="store_true", help="also run plain margin sampling")
    args = parser.parse_args()

    folder = data_folder()
    pool = load_pool(folder)
    documents, categories = pool.documents, pool.categories
    y_train, y_test = pool.y_train, pool.y_test
    n_train, n_classes = pool.n_train, len(categories)
    per_round = args.per_round or n_classes
    settings = replace(SortSettings(), cross_check_folds=args.folds)
    is_train = np.arange(len(documents)) < n_train
    test_rows = np.flatnonzero(~is_train)

    started = time.perf_counter()
    prepared: Prepared = prepare(documents, settings)
    print(f"BANKING77 ({folder}): {len(documents)} texts in the pool, {n_classes} categories, "
          f"scored on {len(y_test)} test texts")
    print(f"start {args.start} seeds/category, {args.rounds} rounds x {per_round} labels, {args.samples} samples, "
          f"cross_check_folds={args.folds}; vectors + graph built once in {time.perf_counter() - started:.1f}s\n",
          flush=True)

    sort_seconds: list[float] = []

    def run(rows: np.ndarray) -> tuple[SortResult, float]:
        seeds = resolve_seeds(documents, [(documents[r].id, categories[y_train[r]]) for r in rows])
        began = time.perf_counter()
        result = sort_documents(documents, seeds, settings, prepared=prepared)
        sort_seconds.append(time.perf_counter() - began)
        accuracy = float(np.mean(result.probabilities[n_train:].argmax(axis=1) == y_test))
        return result, accuracy

    methods = ["suggested", "random"] + (["margin"] if args.with_margin else [])
    curves = {m: np.zeros((args.samples, args.rounds + 1)) for m in methods}
    pick_seconds: dict[str, list[float]] = {m: [] for m in methods}
    for sample in range(args.samples):
        rng = np.random.default_rng(sample)
        start_rows = np.sort(np.concatenate([
            rng.choice(np.flatnonzero(y_train == c), args.start, replace=False) for c in range(n_classes)
        ]))
        first, first_accuracy = run(start_rows)
        for method in methods:
            rows, result = start_rows, first
            curves[method][sample, 0] = first_accuracy
            draw = np.random.default_rng(1000 + sample)
            for round_ in range(1, args.rounds + 1):
                began = time.perf_counter()
                if method == "suggested":
                    new = np.array([s.row for s in suggest_labels(result, prepared, per_round, exclude=test_rows)])
                elif method == "random":
                    new = draw.choice(np.setdiff1d(np.flatnonzero(is_train), rows), per_round, replace=False)
                else:
                    new = least_margin(result, per_round, is_train)
                pick_seconds[method].append(time.perf_counter() - began)
                assert new.size == per_round and not np.isin(new, rows).any() and np.all(new < n_train)
                rows = np.sort(np.concatenate([rows, new]))
                result, curves[method][sample, round_] = run(rows)
            print(f"  sample {sample} {method:<10}" + " ".join(f"{a:.3f}" for a in curves[method][sample]), flush=True)

    labels = [n_classes * args.start + per_round * r for r in range(args.rounds + 1)]
    print(f"\ntest accuracy by number of labels (mean / min / max over {args.samples} samples)")
    header = f"{'labels':>7}" + "".join(f"{m + ' mean':>16}{'min':>7}{'max':>7}" for m in methods)
    print(header + f"{'suggested-random':>18}{'min':>7}{'max':>7}")
    difference = curves["suggested"] - curves["random"]
    for r, count in enumerate(labels):
        line = f"{count:>7}"
        for m in methods:
            col = curves[m][:, r]
            line += f"{np.mean(col):16.3f}{np.min(col):7.3f}{np.max(col):7.3f}"
        col = difference[:, r]
        print(line + f"{np.mean(col):+18.3f}{np.min(col):+7.3f}{np.max(col):+7.3f}")
    if args.with_margin:
        vs_margin = curves["suggested"][:, -1] - curves["margin"][:, -1]
        print(f"suggested - margin after {labels[-1] - labels[0]} added labels: {np.mean(vs_margin):+.3f} "
              f"(min {np.min(vs_margin):+.3f}, max {np.max(vs_margin):+.3f})")
    mean_sort = float(np.mean(sort_seconds))
    for m in methods:
        mean_pick = float(np.mean(pick_seconds[m]))
        print(f"{m}: {mean_pick:.3f}s per batch of {per_round} "
              f"({mean_pick / mean_sort:.3f} x one seedsort run of {mean_sort:.1f}s)")
    gain = float(np.mean(difference[:, -1]))
    print(f"\nafter {labels[-1] - labels[0]} added labels: suggested beats random by {gain * 100:+.1f} points "
          f"(target >= +3.0): {'met' if gain >= 0.03 else 'NOT met'}")


if __name__ == "__main__":
    main()
