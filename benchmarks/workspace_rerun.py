"""Re-run cost after a few corrections, with the workspace's cached vectors and graph.

    python benchmarks/workspace_rerun.py                 # 10,000 BANKING77 queries, 10 seeds per intent
    python benchmarks/workspace_rerun.py --documents 3000 --corrections 5

Steps, timed in one process: (1) a first run into a fresh workspace (reads the folder,
builds vectors and graph, spreads, cross-checks, records everything); (2) a review session
opened on it; (3) N decisions taken from the dataset's own intents and one refresh (the
re-spread a review does every few decisions); (4) a second ``seedsort sort``-style run that
re-reads the folder and finds the cached graph. Prints seconds per stage and the ratio of
each re-run to the first run. The collection is BANKING77 (CC BY 4.0, Casanueva et al. 2020),
train + test pooled, written as one CSV with a label column for the seeds.
"""

from __future__ import annotations

import argparse
import csv
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT / "src"))

from seedsort.sources import TableColumns  # noqa: E402
from seedsort.spreading import seed_matrix, spread_labels  # noqa: E402
from seedsort.workflow import open_review, sort_into_workspace  # noqa: E402

DATA = ROOT / "tests" / "data" / "banking77"


def pool(limit: int, per_intent: int, seed: int) -> tuple[list[dict[str, str]], dict[str, str]]:
    rows = []
    for name in ("train.csv", "test.csv"):
        with open(DATA / name, newline="", encoding="utf-8") as handle:
            rows.extend(csv.DictReader(handle))
    rng = np.random.default_rng(seed)
    rows = [rows[i] for i in rng.permutation(len(rows))[:limit]]
    taken: dict[str, int] = {}
    out, truth = [], {}
    for i, row in enumerate(rows):
        label = ""
        if taken.get(row["category"], 0) < per_intent:
            taken[row["category"]] = taken.get(row["category"], 0) + 1
            label = row["category"]
        out.append({"id": f"q{i:05d}", "text": row["text"], "seed": label})
        truth[f"queries.csv#q{i:05d}"] = row["category"]
    return out, truth


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--documents", type=int, default=10_000)
    parser.add_argument("--seeds-per-category", type=int, default=10)
    parser.add_argument("--corrections", type=int, default=5)
    parser.add_argument("--seed", type=int, default=0)
    args = parser.parse_args()

    rows, truth = pool(args.documents, args.seeds_per_category, args.seed)
    with tempfile.TemporaryDirectory() as tmp:
        table = Path(tmp) / "queries.csv"
        with open(table, "w", newline="", encoding="utf-8") as handle:
            writer = csv.DictWriter(handle, fieldnames=["id", "text", "seed"])
            writer.writeheader()
            writer.writerows(rows)
        workspace = Path(tmp) / "w.sqlite"
        columns = TableColumns(text=("text",), id="id", label="seed")

        started = time.perf_counter()
        first = sort_into_workspace(table, workspace=workspace, columns=columns)
        first_total = time.perf_counter() - started
        stages = first.result.settings["seconds"]

        started = time.perf_counter()
        session = open_review(workspace=workspace, limit=args.corrections)
        opened = time.perf_counter() - started
        for item in session.queue():
            session.decide(item.id, truth[item.id])
        started = time.perf_counter()
        session.refresh()
        refresh_total = time.perf_counter() - started
        refresh_stages = session.result.settings["seconds"]
        # The spreading alone (the CG solve on the cached graph), apart from the classifier fit.
        result = session.result
        seeds = np.flatnonzero(result.status == "seed")
        y = seed_matrix(seeds, result.seed_label[seeds], len(result), len(result.categories), balanced=True)
        started = time.perf_counter()
        spread = spread_labels(session.prepared.graph, y)
        spread_only = time.perf_counter() - started
        session.close()

        started = time.perf_counter()
        again = sort_into_workspace(table, workspace=workspace, columns=columns)
        again_total = time.perf_counter() - started
        again_stages = again.result.settings["seconds"]

    n = len(rows)
    print(f"{n} documents, {len(first.result.categories)} categories, "
          f"{int((first.result.status == 'seed').sum())} seeds, {args.corrections} corrections")
    print(f"{'':<34}{'seconds':>9}{'spread':>9}{'cross-check':>13}{'vs first':>10}")
    print(f"{'first run (builds graph)':<34}{first_total:9.2f}{stages['spread']:9.2f}{stages['cross-check']:13.2f}{1.0:10.2f}")
    print(f"{'open review (cached graph)':<34}{opened:9.2f}{'':>9}{'':>13}{opened / first_total:10.2f}")
    print(f"{'refresh after corrections':<34}{refresh_total:9.2f}{refresh_stages['spread']:9.2f}"
          f"{refresh_stages.get('cross-check', 0.0):13.2f}{refresh_total / first_total:10.2f}")
    print(f"{'re-run, folder re-read':<34}{again_total:9.2f}{again_stages['spread']:9.2f}"
          f"{again_stages['cross-check']:13.2f}{again_total / first_total:10.2f}")
    print(f"label spreading alone in the refresh (CG on the cached graph): {spread_only:.2f} s, "
          f"{spread.iterations} iterations")
    print(f"graph reused on re-run: {again.graph_cached}; first-run stages: "
          + ", ".join(f"{k} {v:.2f}s" for k, v in stages.items()))


if __name__ == "__main__":
    main()
