"""Scale benchmark: wall time and peak memory per stage on generated ticket corpora.

Run from the repository root (outside CI; each part can be left out):

    python benchmarks/scale.py --sizes 10000 100000 1000000 --recall-sample 20000 --banking77

Parts
  --sizes N ...       a generated ticket corpus of N documents (benchmarks/_tickets.py:
                      BANKING77 utterances resampled and perturbed, 10 seeds per category in
                      a label column) is written to a CSV file, then the whole pipeline runs:
                      read (seedsort.sources) -> vectors -> graph (auto: exact up to 15,000
                      documents, approximate above) -> spreading + classifier + cross-check
                      + nearest seeds -> export (CSV). Printed per stage: wall seconds and
                      peak resident memory (RSS) during the stage. At sizes up to
                      --sklearn-max, scikit-learn LabelSpreading(kernel="knn", same k) runs
                      on the same vectors, printed as a ratio to seedsort's graph + spreading.
  --vector-memory N   n-gram vectors of N generated tickets: seedsort's vectorise against the
                      scikit-learn route to the same matrix (two TfidfVectorizers, stacked):
                      seconds, the result's size and the peak memory added while building.
  --reading N         reading N generated tickets of email length (--ticket-parts generated
                      tickets joined into each text) from one CSV file, each way in its own
                      process: the texts held in memory, and spooled (seedsort's default budget,
                      HELD_TEXT_BYTES, beyond which texts go to a temporary file): seconds, peak
                      RSS, RSS held after reading, bytes spooled; then one pass over every
                      text (what the vectors stage does) in each.
  --cross-check-tolerance N
                      the cross-check's folds solved to the run's tolerance (1e-6) and to their
                      own (ModelSettings.cross_check_tol) on N generated tickets: sparse
                      products, chosen weight, temperature, held-out probability differences.
  --recall-sample N   recall@k of the approximate graph against the exact one on N generated
                      tickets (ties at the k-th similarity count as found), and both build times.
  --graph-speed       the exact graph (knn_cosine) and the nearest-seed search (nearest_rows,
                      10 seeds per category) on the BANKING77 pool, each against scikit-learn's
                      NearestNeighbors(metric="cosine", algorithm="brute") on the same vectors.
  --banking77         the BANKING77 pool (13,083 texts): graph + spreading time of seedsort
                      (exact and approximate graph) against scikit-learn LabelSpreading
                      (kernel="knn", n_neighbors=k) on the same vectors, in the same process;
                      and test accuracy with 10 seeds per category, exact against approximate
                      graph (--samples seed draws).

Peak RSS is sampled every 20 ms from /proc/self/statm (Linux) by a background thread, so a
stage shorter than that may show the previous level. Timings on a shared machine are noisy:
compare the ratios printed in the same run.
"""

from __future__ import annotations

import argparse
import os
import sys
import tempfile
import threading
import time
import warnings
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from dataclasses import replace
from pathlib import Path
from typing import Any

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent))
from _tickets import banking77_pool, tickets, write_csv  # noqa: E402

from seedsort import Document, SortSettings, resolve_seeds, sort_documents  # noqa: E402
from seedsort.graph import knn_cosine, symmetric_affinity  # noqa: E402
from seedsort.graph_approx import knn_cosine_approximate  # noqa: E402
from seedsort.results import write_results  # noqa: E402
from seedsort.seeds import column_labels  # noqa: E402
from seedsort.sorting import prepare  # noqa: E402
from seedsort.sources import TableColumns, read_collection  # noqa: E402
from seedsort.spreading import normalised_affinity, seed_matrix, spread_labels  # noqa: E402
from seedsort.vectors import VectorSettings, vectorise  # noqa: E402

_PAGE = os.sysconf("SC_PAGE_SIZE")


def rss_bytes() -> int:
    with open("/proc/self/statm") as handle:
        return int(handle.read().split()[1]) * _PAGE


class PeakSampler:
    """Background thread keeping the peak RSS since the last reset."""

    def __init__(self) -> None:
        self.peak = rss_bytes()
        self._stop = threading.Event()
        self._thread = threading.Thread(target=self._run, daemon=True)
        self._thread.start()

    def _run(self) -> None:
        while not self._stop.wait(0.02):
            self.peak = max(self.peak, rss_bytes())

    def reset(self) -> None:
        self.peak = rss_bytes()

    def close(self) -> None:
        self._stop.set()
        self._thread.join()


SAMPLER: PeakSampler | None = None


@contextmanager
def stage(name: str, table: list[tuple[str, float, float]]) -> Iterator[None]:
    assert SAMPLER is not None
    SAMPLER.reset()
    started = time.perf_counter()
    yield
    seconds = time.perf_counter() - started
    peak = max(SAMPLER.peak, rss_bytes())
    table.append((name, seconds, peak / 2**30))
    print(f"    {name:<28}{seconds:9.1f} s{peak / 2**30:9.2f} GiB", flush=True)


def sklearn_spreading(vectors: Any, labels: np.ndarray, k: int) -> float:
    """Seconds of scikit-learn LabelSpreading(kernel="knn", n_neighbors=k).fit on the vectors."""
    from sklearn.semi_supervised import LabelSpreading

    started = time.perf_counter()
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # its ConvergenceWarning at max_iter is expected
        LabelSpreading(kernel="knn", n_neighbors=k).fit(vectors, labels)
    return time.perf_counter() - started


def ours_graph_and_spread(vectors: Any, seed_rows: np.ndarray, seed_classes: np.ndarray, c: int, k: int, builder: Callable[..., Any]) -> float:
    """Seconds of seedsort's graph (given builder) + label spreading (CG, alpha 0.99)."""
    started = time.perf_counter()
    n = vectors.shape[0]
    s = normalised_affinity(symmetric_affinity(builder(vectors, k), n))
    spread_labels(s, seed_matrix(seed_rows, seed_classes, n, c))
    return time.perf_counter() - started


def run_size(n: int, args: argparse.Namespace, workdir: Path) -> None:
    print(f"\n{n:,} generated tickets ({args.vectors} vectors, k={args.k}, graph={args.graph})", flush=True)
    path = workdir / f"tickets-{n}.csv"
    started = time.perf_counter()
    write_csv(path, n, seed=args.seed)
    print(f"    (corpus written in {time.perf_counter() - started:.1f} s, {path.stat().st_size / 2**20:.0f} MiB; not timed below)")
    settings = SortSettings(vectors=VectorSettings(mode=args.vectors), neighbours=args.k, graph=args.graph)
    table: list[tuple[str, float, float]] = []
    with stage("read (CSV)", table):
        collection = read_collection(path, columns=TableColumns(text=("text",), id="id", label="label"))
        documents = list(collection.documents)
        seeds = resolve_seeds(documents, column_labels(documents), root=path.parent)
    with stage("vectors + graph (prepare)", table):
        prepared = prepare(documents, settings)
    for name in ("vectors", "graph"):
        print(f"      of which {name:<16}{prepared.timings[name]:9.1f} s   ({prepared.graph_method} graph)" if name == "graph"
              else f"      of which {name:<16}{prepared.timings[name]:9.1f} s")
    with stage("spread + classifier + checks", table):
        result = sort_documents(documents, seeds, settings, prepared=prepared, collection=collection)
    for name, seconds in result.settings["seconds"].items():
        if name not in ("vectors", "graph"):
            print(f"      of which {name:<16}{seconds:9.1f} s")
    with stage("export (CSV)", table):
        write_results(result, workdir / f"results-{n}.csv")
    total = sum(seconds for _, seconds, _ in table)
    print(f"    {'total':<28}{total:9.1f} s{max(peak for *_, peak in table):9.2f} GiB peak")
    if n <= args.sklearn_max:
        labels = np.full(n, -1)
        labels[seeds.rows] = seeds.classes
        theirs = sklearn_spreading(prepared.vectors, labels, args.k)
        ours = prepared.timings["graph"] + result.settings["seconds"]["spread"]
        print(f"    sklearn LabelSpreading(knn, k={args.k}) {theirs:.1f} s; seedsort graph + spread {ours:.1f} s: "
              f"{theirs / ours:.1f}x faster")
    else:
        print(f"    sklearn LabelSpreading skipped above --sklearn-max {args.sklearn_max:,} (its kNN search is exact, O(n^2))")


def tie_aware_recall(approx: Any, exact: Any) -> float:
    """Share of the exact k neighbours found; a listed neighbour as similar as the exact k-th counts."""
    valid = exact.indices >= 0
    kth = np.where(valid.any(axis=1), np.where(valid, exact.similarities, np.inf).min(axis=1), np.inf)
    hits = ((approx.indices >= 0) & (approx.similarities >= kth[:, None] - 1e-5)).sum(axis=1)
    return float(np.minimum(hits, valid.sum(axis=1)).sum() / max(1, valid.sum()))


def run_cross_check_tolerance(n: int, args: argparse.Namespace) -> None:
    """The cross-check's folds at the run's tolerance (1e-6) against their own (1e-4): sparse
    products, the chosen graph weight, the temperature and the held-out probabilities."""
    from dataclasses import replace as settings_with

    from seedsort.combine import ModelSettings, choose_graph_weight, compute_views, cross_check, fit_temperature

    rows = list(tickets(n, seed=args.seed))
    documents = [Document.make(ticket_id, "tickets", text) for ticket_id, text, _ in rows]
    names = sorted({category for *_, category in rows})
    y = np.array([names.index(category) for *_, category in rows])
    seed_rows = np.sort(np.concatenate([np.flatnonzero(y == c)[:10] for c in range(len(names))]))
    prepared = prepare(documents, SortSettings(vectors=VectorSettings(mode=args.vectors), neighbours=args.k))
    order_key = np.array([documents[r].content_hash for r in seed_rows], dtype=object)
    print(f"\ncross-check folds' tolerance on {n:,} generated tickets, 10 seeds per category")
    held_at = {}
    for tol in (1e-6, ModelSettings().cross_check_tol):
        model = settings_with(ModelSettings(), cross_check_tol=tol)
        views = compute_views(prepared.vectors, prepared.graph, seed_rows, y[seed_rows], len(names), model)
        started = time.perf_counter()
        held = cross_check(prepared.vectors, prepared.graph, seed_rows, y[seed_rows], len(names), model, order_key,
                           full_scores=views.spread_scores())
        seconds = time.perf_counter() - started
        weight = choose_graph_weight(held, y[seed_rows])
        held_at[tol] = held.blend(weight)
        print(f"    folds to {tol:g}: {held.spread_iterations} sparse products, {seconds:.1f} s; weight {weight}, "
              f"temperature {fit_temperature(held_at[tol], y[seed_rows]):.4f}, "
              f"held-out accuracy {np.mean(held_at[tol].argmax(axis=1) == y[seed_rows]):.4f}")
    tight, loose = held_at.values()
    print(f"    largest held-out probability difference {np.nanmax(np.abs(tight - loose)):.4f}; "
          f"seeds whose check changed: {int(np.sum(tight.argmax(axis=1) != loose.argmax(axis=1)))}")


def run_recall(n: int, args: argparse.Namespace, workdir: Path) -> None:
    texts = [text for _, text, _ in tickets(n, seed=args.seed + 1)]
    vectors = vectorise(texts, VectorSettings(mode=args.vectors))
    print(f"\nrecall@{args.k} on {n:,} generated tickets ({args.vectors} vectors, {vectors.nnz / n:.0f} features a row)")
    started, cpu = time.perf_counter(), time.process_time()
    exact = knn_cosine(vectors, args.k)
    exact_s, exact_cpu = time.perf_counter() - started, time.process_time() - cpu
    print(f"    exact graph        {exact_s:7.1f} s wall {exact_cpu:7.1f} s CPU")
    for dims in args.sketch_dims:
        started, cpu = time.perf_counter(), time.process_time()
        approx = knn_cosine_approximate(vectors, args.k, dims=dims)
        approx_s, approx_cpu = time.perf_counter() - started, time.process_time() - cpu
        again = knn_cosine_approximate(vectors, args.k, dims=dims)
        plain = float(np.mean([np.intersect1d(a[a >= 0], e[e >= 0]).size / max(1, (e >= 0).sum())
                               for a, e in zip(approx.indices, exact.indices)]))
        print(f"    approximate graph, {dims} sketch dims: {approx_s:7.1f} s wall {approx_cpu:7.1f} s CPU "
              f"({exact_cpu / approx_cpu:.1f}x less CPU than exact)")
        print(f"      recall@{args.k} {tie_aware_recall(approx, exact):.4f} (ties count as found; by index only: {plain:.4f}); "
              f"rebuilt graph identical: {np.array_equal(approx.indices, again.indices)}", flush=True)


def run_graph_speed(args: argparse.Namespace) -> None:
    """The exact graph and the nearest-seed search alone, against scikit-learn's brute-force
    cosine NearestNeighbors on the same BANKING77 pool vectors, in the same process."""
    from sklearn.neighbors import NearestNeighbors

    from seedsort.graph import nearest_rows

    texts, y, categories = banking77_pool()
    vectors = vectorise(texts, VectorSettings(mode=args.vectors))
    n = vectors.shape[0]
    print(f"\nexact graph on the BANKING77 pool: {n:,} texts, k={args.k}, {args.vectors} vectors, "
          f"{vectors.nnz / n:.0f} features a row")
    started = time.perf_counter()
    ours = knn_cosine(vectors, args.k)
    ours_s = time.perf_counter() - started
    started = time.perf_counter()
    distance, index = NearestNeighbors(n_neighbors=args.k, metric="cosine", algorithm="brute").fit(vectors).kneighbors()
    theirs_s = time.perf_counter() - started
    same = np.mean([set(a[a >= 0].tolist()) == set(b.tolist()) for a, b in zip(ours.indices, index)])
    gap = np.abs(np.sort(ours.similarities, axis=1) - np.sort(1 - distance, axis=1)).max()
    print(f"    knn_cosine {ours_s:7.1f} s; sklearn NearestNeighbors(cosine, brute) {theirs_s:.1f} s: {theirs_s / ours_s:.1f}x faster")
    print(f"      same neighbour set on {same:.4f} of rows (the rest: ties at the k-th or similarity 0); "
          f"largest similarity difference {gap:.1e}")
    rng = np.random.default_rng(0)
    targets = np.sort(np.concatenate([rng.choice(np.flatnonzero(y == j), 10, replace=False) for j in range(len(categories))]))
    started = time.perf_counter()
    rows, sims = nearest_rows(vectors, targets, 3)
    ours_s = time.perf_counter() - started
    started = time.perf_counter()
    distance, _ = NearestNeighbors(n_neighbors=4, metric="cosine", algorithm="brute").fit(vectors[targets]).kneighbors(vectors)
    theirs_s = time.perf_counter() - started
    print(f"    nearest_rows ({targets.size} seeds, 3 each) {ours_s:.1f} s; sklearn NearestNeighbors on the seeds "
          f"(4 each, self included) {theirs_s:.1f} s: {theirs_s / ours_s:.1f}x faster", flush=True)


def run_banking77(args: argparse.Namespace) -> None:
    import pandas as pd

    data = Path(__file__).resolve().parent.parent / "tests" / "data" / "banking77"
    train, test = pd.read_csv(data / "train.csv"), pd.read_csv(data / "test.csv")
    documents = [Document.make(f"train.csv#row-{i + 1}", "train.csv", t) for i, t in enumerate(train.text)]
    documents += [Document.make(f"test.csv#row-{i + 1}", "test.csv", t) for i, t in enumerate(test.text)]
    _, _, categories = banking77_pool()
    index = {c: i for i, c in enumerate(categories)}
    y_train, y_test = train.category.map(index).to_numpy(), test.category.map(index).to_numpy()
    n, c, n_train = len(documents), len(categories), len(train)
    print(f"\nBANKING77 pool: {n:,} texts, {c} categories, k={args.k}, {args.vectors} vectors")
    base = SortSettings(vectors=VectorSettings(mode=args.vectors), neighbours=args.k)
    prepared = {g: prepare(documents, replace(base, graph=g)) for g in ("exact", "approximate")}
    vectors = prepared["exact"].vectors
    rng = np.random.default_rng(0)
    rows = np.sort(np.concatenate([rng.choice(np.flatnonzero(y_train == j), 10, replace=False) for j in range(c)]))
    labels = np.full(n, -1)
    labels[rows] = y_train[rows]
    theirs = sklearn_spreading(vectors, labels, args.k)
    for name, builder in (("exact", knn_cosine), ("approximate", knn_cosine_approximate)):
        ours = ours_graph_and_spread(vectors, rows, y_train[rows], c, args.k, builder)
        print(f"    graph + spreading, {name:<12}{ours:7.1f} s; sklearn LabelSpreading {theirs:.1f} s: {theirs / ours:5.1f}x faster")
    exact_nb = knn_cosine(vectors, args.k)
    approx_nb = knn_cosine_approximate(vectors, args.k)
    print(f"    recall@{args.k} of the approximate graph on the pool: {tie_aware_recall(approx_nb, exact_nb):.4f}")
    accuracy: dict[str, list[float]] = {"exact": [], "approximate": []}
    for sample in range(args.samples):
        rng = np.random.default_rng(sample)
        rows = np.sort(np.concatenate([rng.choice(np.flatnonzero(y_train == j), 10, replace=False) for j in range(c)]))
        seeds = resolve_seeds(documents, [(documents[r].id, categories[y_train[r]]) for r in rows])
        for g in accuracy:
            result = sort_documents(documents, seeds, replace(base, graph=g), prepared=prepared[g])
            probs = np.zeros((n, c))
            probs[:, [index[x] for x in result.categories]] = result.probabilities
            accuracy[g].append(float(np.mean(probs[n_train:].argmax(axis=1) == y_test)))
        print(f"    sample {sample}: accuracy exact {accuracy['exact'][-1]:.4f}, approximate {accuracy['approximate'][-1]:.4f}", flush=True)
    diff = 100 * (np.mean(accuracy["approximate"]) - np.mean(accuracy["exact"]))
    print(f"    10 seeds/category, {args.samples} samples: exact {np.mean(accuracy['exact']):.4f}, "
          f"approximate {np.mean(accuracy['approximate']):.4f} ({diff:+.2f} points)")


def sklearn_vectors(texts: list[str]) -> Any:
    """The same matrix the scikit-learn way: two TfidfVectorizers (word 1-2, char_wb 2-5,
    sublinear tf), each L2-normalised, stacked side by side and normalised again."""
    import scipy.sparse as sp
    from sklearn.feature_extraction.text import TfidfVectorizer
    from sklearn.preprocessing import normalize

    word = TfidfVectorizer(ngram_range=(1, 2), token_pattern=r"(?u)\b\w+\b", sublinear_tf=True, dtype=np.float32)
    char = TfidfVectorizer(analyzer="char_wb", ngram_range=(2, 5), sublinear_tf=True, dtype=np.float32)
    blocks = [normalize(block.fit_transform(texts)) for block in (word, char)]
    return normalize(sp.hstack(blocks, format="csr"))


def run_vector_memory(n: int, args: argparse.Namespace) -> None:
    """seedsort's n-gram vectors against the scikit-learn route to the same matrix: seconds,
    the result's size and the peak memory added while building it."""
    import gc

    assert SAMPLER is not None
    texts = [text for _, text, _ in tickets(n, seed=args.seed)]
    print(f"\nvectors of {n:,} generated tickets (tfidf, word 1-2 + char 2-5)")
    for name, build in (("seedsort vectorise", vectorise), ("scikit-learn TfidfVectorizer x2", sklearn_vectors)):
        gc.collect()
        before = rss_bytes()
        SAMPLER.reset()
        started = time.perf_counter()
        matrix = build(texts)
        seconds = time.perf_counter() - started
        added = max(SAMPLER.peak, rss_bytes()) - before
        size = matrix.data.nbytes + matrix.indices.nbytes + matrix.indptr.nbytes
        print(f"    {name:<32}{seconds:8.1f} s   result {size / 2**30:5.2f} GiB   peak added "
              f"{added / 2**30:5.2f} GiB ({added / size:.1f}x the result)", flush=True)
        del matrix


def _status_bytes(field: str) -> int:
    """A memory figure of this process from /proc/self/status (Linux), in bytes."""
    with open("/proc/self/status", encoding="ascii") as handle:
        for line in handle:
            if line.startswith(field + ":"):
                return int(line.split()[1]) * 1024
    raise RuntimeError(f"{field} not in /proc/self/status")


def _read_in_child(path: Path, held: int | None, results: Any) -> None:
    started = time.perf_counter()
    collection = read_collection(path, columns=TableColumns(text=("text",), id="id", label="label"),
                                 held_text_bytes=held)
    seconds = time.perf_counter() - started
    peak, after = _status_bytes("VmHWM"), _status_bytes("VmRSS")
    started = time.perf_counter()
    characters = sum(len(doc.text) for doc in collection.documents)
    results.put((seconds, peak, after, collection.spooled_bytes, time.perf_counter() - started, characters))


def run_reading(n: int, args: argparse.Namespace, workdir: Path) -> None:
    """Reading with the texts held against spooled, each in a fresh process (forked, so the
    peak of one does not hide the other's)."""
    import csv
    import multiprocessing

    from seedsort.sources import HELD_TEXT_BYTES

    path = workdir / f"long-tickets-{n}.csv"
    parts = args.ticket_parts
    stream = tickets(n * parts, seed=args.seed)
    with path.open("w", encoding="utf-8", newline="") as handle:
        writer = csv.writer(handle)
        writer.writerow(["id", "text", "label"])
        for number in range(n):
            texts = [next(stream)[1] for _ in range(parts)]
            writer.writerow([f"L{number:07d}", "\n\n".join(texts), ""])
    size = path.stat().st_size
    print(f"\nreading {n:,} generated tickets of {parts} parts each ({size / 2**20:.0f} MiB CSV, "
          f"{size / n:.0f} bytes a ticket)")
    context = multiprocessing.get_context("fork")
    for name, held in (("texts held in memory", 2**62), (f"spooled beyond {HELD_TEXT_BYTES / 2**20:.0f} MiB", None)):
        results = context.Queue()
        child = context.Process(target=_read_in_child, args=(path, held, results))
        child.start()
        seconds, peak, after, spooled, text_pass, characters = results.get()
        child.join()
        print(f"    {name:<28}{seconds:7.1f} s   peak {peak / 2**30:5.2f} GiB   held after {after / 2**30:5.2f} GiB   "
              f"spooled {spooled / 2**20:7.0f} MiB   one pass over the texts {text_pass:5.1f} s "
              f"({characters / 2**20:.0f} Mi characters)", flush=True)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--sizes", type=int, nargs="*", default=[], help="generated corpus sizes to run end to end")
    parser.add_argument("--recall-sample", type=int, default=0, help="documents for the recall check (0: skip)")
    parser.add_argument("--banking77", action="store_true", help="speed against sklearn and accuracy on BANKING77")
    parser.add_argument("--graph-speed", action="store_true", help="exact graph and nearest seeds against sklearn on BANKING77")
    parser.add_argument("--samples", type=int, default=3, help="seed draws for the BANKING77 accuracy (default 3)")
    parser.add_argument("--vectors", choices=("tfidf", "hashed"), default="tfidf")
    parser.add_argument("--graph", choices=("auto", "exact", "approximate"), default="auto")
    parser.add_argument("-k", type=int, default=10, help="neighbours (default 10, seedsort's default)")
    parser.add_argument("--sklearn-max", type=int, default=20_000, help="largest size to run sklearn LabelSpreading at")
    parser.add_argument("--sketch-dims", type=int, nargs="+", default=[512], help="sketch sizes for the recall check")
    parser.add_argument("--seed", type=int, default=0, help="corpus generator seed")
    parser.add_argument("--cross-check-tolerance", type=int, default=0,
                        help="tickets to compare the cross-check folds' tolerance on (0: skip)")
    parser.add_argument("--reading", type=int, default=0,
                        help="tickets of email length to read, texts held against spooled (0: skip)")
    parser.add_argument("--ticket-parts", type=int, default=10,
                        help="generated tickets joined into each text for --reading (default 10)")
    parser.add_argument("--vector-memory", type=int, default=0,
                        help="tickets to vectorise, seedsort against the scikit-learn route (0: skip)")
    args = parser.parse_args()
    global SAMPLER
    SAMPLER = PeakSampler()
    print(f"{os.cpu_count()} cores; numbers are wall seconds unless marked CPU")
    with tempfile.TemporaryDirectory(prefix="seedsort-scale-") as tmp:
        if args.reading:
            run_reading(args.reading, args, Path(tmp))
        if args.vector_memory:
            run_vector_memory(args.vector_memory, args)
        if args.cross_check_tolerance:
            run_cross_check_tolerance(args.cross_check_tolerance, args)
        if args.graph_speed:
            run_graph_speed(args)
        if args.banking77:
            run_banking77(args)
        if args.recall_sample:
            run_recall(args.recall_sample, args, Path(tmp))
        for n in args.sizes:
            run_size(n, args, Path(tmp))
    SAMPLER.close()


if __name__ == "__main__":
    main()
