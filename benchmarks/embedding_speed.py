"""Throughput of seedsort's sentence embeddings on BANKING77 texts, beside the n-gram vectors.

Run from the repository root, with the extra installed (pip install -e ".[embed]"):

    python benchmarks/embedding_speed.py                      # 2000 texts, batches 32/64/128
    python benchmarks/embedding_speed.py --texts 500 --batch-sizes 64 --repeats 3

Texts: the first N of tests/data/banking77/test.csv (short customer-support queries, about
11 words each; BANKING77, CC BY 4.0). Per setting it prints the best of --repeats timed runs
as sentences per second (wall clock) and per CPU-second of this process (which drifts less
when other work shares the cores), and the wall-clock ratio to the first batch size. The
model is loaded (and its sha256 checked) before timing; that time is printed separately.
Baselines run in the same process, since a shared machine's speed drifts between processes:
one text per model call (no batching), one onnxruntime thread instead of one per core,
batches in the texts' own order (no sorting by length), and seedsort's default n-gram
TF-IDF vectors.
"""

from __future__ import annotations

import argparse
import os
import time
from collections.abc import Callable
from pathlib import Path

import numpy as np
import pandas as pd

from seedsort import embeddings
from seedsort.embeddings import _encoder
from seedsort.vectors import vectorise

DATA = Path(__file__).resolve().parent.parent / "tests" / "data" / "banking77"


def best_seconds(run: Callable[[], object], repeats: int) -> tuple[float, float]:
    """Best wall-clock seconds and the process CPU seconds of that run."""
    best = (float("inf"), float("inf"))
    for _ in range(repeats):
        wall, cpu = time.perf_counter(), time.process_time()
        run()
        best = min(best, (time.perf_counter() - wall, time.process_time() - cpu))
    return best


def embed_unsorted(texts: list[str], batch_size: int) -> np.ndarray:
    """Batches in the given order: what batching costs without sorting by length."""
    return np.vstack(
        [
            embeddings.embed_texts(texts[start : start + batch_size], batch_size=batch_size)
            for start in range(0, len(texts), batch_size)
        ]
    )


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--texts", type=int, default=2000, help="first N texts of test.csv")
    parser.add_argument("--batch-sizes", type=int, nargs="+", default=[32, 64, 128])
    parser.add_argument("--repeats", type=int, default=2, help="timed runs per setting (best)")
    parser.add_argument("--skip-baselines", action="store_true")
    args = parser.parse_args()

    embeddings.require_embeddings()
    texts = pd.read_csv(DATA / "test.csv")["text"].astype(str).tolist()[: args.texts]
    n = len(texts)
    words = np.mean([len(t.split()) for t in texts])
    print(
        f"{n} texts, {words:.1f} words on average; {_encoder._thread_count()} threads "
        f"(os.cpu_count() = {os.cpu_count()})"
    )

    started = time.perf_counter()
    embeddings.embed_texts(["warm-up"])
    print(f"model load + sha256 check + first call: {time.perf_counter() - started:.2f} s")

    rates: dict[str, tuple[float, float]] = {}
    for batch_size in args.batch_sizes:
        wall, cpu = best_seconds(
            lambda b=batch_size: embeddings.embed_texts(texts, batch_size=b), args.repeats
        )
        rates[f"sorted batches of {batch_size}"] = (n / wall, n / cpu)

    if not args.skip_baselines:
        one_by_one = texts[: min(n, 300)]
        wall, cpu = best_seconds(
            lambda: [embeddings.embed_texts([t]) for t in one_by_one], args.repeats
        )
        rates["one text per call (first 300)"] = (len(one_by_one) / wall, len(one_by_one) / cpu)
        batch_size = args.batch_sizes[0]
        wall, cpu = best_seconds(
            lambda: embeddings.embed_texts(texts, batch_size=batch_size, threads=1), args.repeats
        )
        rates[f"sorted batches of {batch_size}, 1 thread"] = (n / wall, n / cpu)
        wall, cpu = best_seconds(lambda: embed_unsorted(texts, batch_size), args.repeats)
        rates[f"unsorted batches of {batch_size}"] = (n / wall, n / cpu)
        wall, cpu = best_seconds(lambda: vectorise(texts), args.repeats)
        rates["n-gram TF-IDF (seedsort default)"] = (n / wall, n / cpu)

    reference = rates[f"sorted batches of {args.batch_sizes[0]}"][0]
    print(f"{'setting':<34} {'sentences/s':>12} {'per CPU-s':>10} {'ratio':>6}")
    for name, (per_second, per_cpu_second) in rates.items():
        print(
            f"{name:<34} {per_second:>12.1f} {per_cpu_second:>10.1f} {per_second / reference:>6.2f}"
        )


if __name__ == "__main__":
    main()
