"""Does a combined mode (sentence embeddings + n-grams) beat embeddings alone? BANKING77 check.

Run from the repository root with the extra installed (pip install -e ".[embed]"):

    python benchmarks/embedding_combined.py            # 10 seeds per category, samples 0-2

Data and protocol as benchmarks/embedding_accuracy.py (BANKING77, CC BY 4.0; pool =
train+test, seeds from train.csv with numpy default_rng(sample), scored on test.csv).
Embeddings are cached in --cache (the same file embedding_accuracy.py uses). Printed per
sample, all with seedsort's log-linear blend at graph weight 0.5 unless named:

  embeddings           graph + classifier on the embeddings (seedsort's embed mode)
  n-grams              graph + classifier on the n-gram vectors (seedsort's default)
  all four views       geometric mean of both graphs' and both classifiers' probabilities
  emb + n-gram clf     the embedding pipeline plus the n-gram classifier, geometric mean
  joint features       classifier on [embedding, n-grams / 2], embedding graph
  embeddings w=0.6/0.7 the embedding pipeline with more weight on its graph
"""

from __future__ import annotations

import argparse
import warnings
from pathlib import Path

import numpy as np
import pandas as pd
import scipy.sparse as sp

from seedsort.combine import ModelSettings, compute_views
from seedsort.embeddings import embed_with_cache
from seedsort.graph import knn_cosine, symmetric_affinity
from seedsort.spreading import normalised_affinity
from seedsort.vectors import vectorise

DATA = Path(__file__).resolve().parent.parent / "tests" / "data" / "banking77"


def geometric(*probabilities: np.ndarray) -> np.ndarray:
    z = sum(np.log(np.clip(p, 1e-12, 1.0)) for p in probabilities)
    z -= z.max(axis=1, keepdims=True)
    p = np.exp(z)
    return p / p.sum(axis=1, keepdims=True)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--samples", type=int, default=3)
    parser.add_argument("--cache", default="/tmp/seedsort-banking77-emb.npz")
    args = parser.parse_args()
    train, test = pd.read_csv(DATA / "train.csv"), pd.read_csv(DATA / "test.csv")
    texts = list(train.text) + list(test.text)
    n_train = len(train)
    categories = sorted(train.category.unique())
    index = {c: i for i, c in enumerate(categories)}
    y, y_test = train.category.map(index).to_numpy(), test.category.map(index).to_numpy()
    emb, _ = embed_with_cache(texts, None, args.cache)
    ngrams = vectorise(texts)
    graph_emb = normalised_affinity(symmetric_affinity(knn_cosine(emb, 10)))
    graph_ng = normalised_affinity(symmetric_affinity(knn_cosine(ngrams, 10)))
    joint = sp.hstack([sp.csr_matrix(emb), ngrams * 0.5]).tocsr()
    settings = ModelSettings()
    scores: dict[str, list[float]] = {}
    for sample in range(args.samples):
        rng = np.random.default_rng(sample)
        rows = np.sort(np.concatenate([rng.choice(np.flatnonzero(y == c), 10, replace=False) for c in range(len(categories))]))
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            ve = compute_views(emb, graph_emb, rows, y[rows], len(categories), settings)
            vn = compute_views(ngrams, graph_ng, rows, y[rows], len(categories), settings)
            vj = compute_views(joint, graph_emb, rows, y[rows], len(categories), settings)
        results = {
            "embeddings": ve.blend(0.5),
            "n-grams": vn.blend(0.5),
            "all four views": geometric(ve.graph, ve.classifier, vn.graph, vn.classifier),
            "emb + n-gram clf": geometric(ve.graph, ve.classifier, vn.classifier),
            "joint features": vj.blend(0.5),
            "embeddings w=0.6": ve.blend(0.6),
            "embeddings w=0.7": ve.blend(0.7),
        }
        for name, probs in results.items():
            scores.setdefault(name, []).append(float(np.mean(probs[n_train:].argmax(axis=1) == y_test)))
        print(f"sample {sample}: " + ", ".join(f"{k} {v[-1]:.4f}" for k, v in scores.items()), flush=True)
    base = np.mean(scores["embeddings"])
    print(f"\n{'method':<20}{'mean':>8}{'vs embeddings':>15}")
    for name, vals in scores.items():
        print(f"{name:<20}{np.mean(vals):8.4f}{np.mean(vals) - base:+15.4f}")


if __name__ == "__main__":
    main()
