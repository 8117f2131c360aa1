"""A file of embeddings keyed by document content hash, so a re-run embeds only what changed.

The file is one ``.npz`` (numpy's zip of arrays, read without pickle): the sorted content
hashes, their vectors, and what made them (the model file's sha256 and the token limit). A
file made by another model or token limit is ignored as a whole. Writes go to a temporary
file in the same folder, then ``os.replace``, so a crash never leaves half a cache.
Loading and saving cost O(entries); a look-up is a binary search per hash.
"""

from __future__ import annotations

import os
import tempfile
import warnings
import zipfile
from collections.abc import Sequence
from pathlib import Path

import numpy as np

from .._progress import ProgressCallback
from ..errors import SeedsortWarning
from ..sources import content_hash
from ._encoder import DIMENSION, MAX_TOKENS, MODEL_SHA256, embed_texts

#: 2: vectors pool the text's own tokens (_encoder.POOLING); a format-1 file is rebuilt.
_FORMAT = 2
_HASH_DTYPE = "S64"  # sha256 hex, ASCII


class EmbeddingCache:
    """Embeddings of documents, keyed by :func:`seedsort.sources.content_hash`.

    Parameters
    ----------
    path:
        The cache file (``.npz``). Need not exist yet.
    model_sha256, max_tokens:
        What the vectors were made with; a file made with anything else is ignored on load
        and overwritten on save.

    The file is read once, at construction; :meth:`save` writes all entries, old and new.
    """

    def __init__(
        self,
        path: str | os.PathLike[str],
        *,
        model_sha256: str = MODEL_SHA256,
        max_tokens: int = MAX_TOKENS,
    ) -> None:
        self.path = Path(path)
        self.model_sha256 = model_sha256
        self.max_tokens = max_tokens
        self._hashes = np.empty(0, dtype=_HASH_DTYPE)
        self._vectors = np.empty((0, DIMENSION), dtype=np.float32)
        self._load()

    def __len__(self) -> int:
        return len(self._hashes)

    def _load(self) -> None:
        if not self.path.exists():
            return
        try:
            with np.load(self.path, allow_pickle=False) as data:
                fmt = int(data["format"])
                model = str(data["model_sha256"])
                max_tokens = int(data["max_tokens"])
                hashes = data["hashes"].astype(_HASH_DTYPE)
                vectors = data["vectors"].astype(np.float32)
        except (OSError, KeyError, ValueError, zipfile.BadZipFile) as exc:
            warnings.warn(
                f"The embedding cache {self.path} cannot be read ({exc}); it will be rebuilt.",
                SeedsortWarning,
                stacklevel=3,
            )
            return
        if (fmt, model, max_tokens) != (_FORMAT, self.model_sha256, self.max_tokens):
            return
        if vectors.shape != (len(hashes), DIMENSION):
            return
        self._hashes, self._vectors = hashes, vectors

    def lookup(self, hashes: Sequence[str]) -> tuple[np.ndarray, np.ndarray]:
        """Vectors of the given hashes.

        Returns
        -------
        vectors:
            ``(len(hashes), 384)`` float32; rows of hashes not in the cache are zero.
        found:
            ``(len(hashes),)`` bool, True where the cache had the hash.
        """
        keys = np.asarray(hashes, dtype=_HASH_DTYPE)
        vectors = np.zeros((len(keys), DIMENSION), dtype=np.float32)
        if len(self._hashes) == 0 or len(keys) == 0:
            return vectors, np.zeros(len(keys), dtype=bool)
        pos = np.searchsorted(self._hashes, keys)
        pos = np.minimum(pos, len(self._hashes) - 1)
        found = self._hashes[pos] == keys
        vectors[found] = self._vectors[pos[found]]
        return vectors, found

    def add(self, hashes: Sequence[str], vectors: np.ndarray) -> None:
        """Add or replace entries (kept sorted by hash)."""
        keys = np.asarray(hashes, dtype=_HASH_DTYPE)
        vectors = np.asarray(vectors, dtype=np.float32).reshape(len(keys), DIMENSION)
        all_keys = np.concatenate([keys, self._hashes])
        all_vectors = np.concatenate([vectors, self._vectors])
        # np.unique keeps the first occurrence: the new entries win.
        unique_keys, first = np.unique(all_keys, return_index=True)
        self._hashes, self._vectors = unique_keys, all_vectors[first]

    def save(self) -> None:
        """Write the cache atomically (temporary file in the same folder, then rename)."""
        self.path.parent.mkdir(parents=True, exist_ok=True)
        fd, tmp = tempfile.mkstemp(prefix=self.path.name + ".", suffix=".tmp", dir=self.path.parent)
        try:
            with os.fdopen(fd, "wb") as handle:
                np.savez(
                    handle,
                    format=np.int64(_FORMAT),
                    model_sha256=np.str_(self.model_sha256),
                    max_tokens=np.int64(self.max_tokens),
                    hashes=self._hashes,
                    vectors=self._vectors,
                )
            os.replace(tmp, self.path)
        except BaseException:
            Path(tmp).unlink(missing_ok=True)
            raise


def embed_with_cache(
    texts: Sequence[str],
    hashes: Sequence[str] | None,
    cache_path: str | os.PathLike[str],
    *,
    batch_size: int = 32,
    max_tokens: int = MAX_TOKENS,
    on_progress: ProgressCallback | None = None,
    model_file: str | os.PathLike[str] | None = None,
    threads: int | None = None,
) -> tuple[np.ndarray, int]:
    """Embed texts, reusing and updating the cache file at ``cache_path``.

    Parameters
    ----------
    texts:
        The documents.
    hashes:
        Their content hashes (``Document.content_hash``), or ``None`` to compute them.
    cache_path:
        The ``.npz`` cache file; created if missing, rewritten when anything was embedded.
    batch_size, max_tokens, on_progress, model_file, threads:
        As for :func:`embed_texts`.

    Returns
    -------
    vectors:
        ``(len(texts), 384)`` float32, as :func:`embed_texts` would give.
    n_embedded:
        How many distinct texts were run through the model now (the rest came from the cache).
    """
    if hashes is None:
        hashes = [content_hash(t) for t in texts]
    if len(hashes) != len(texts):
        raise ValueError(f"got {len(texts)} texts but {len(hashes)} hashes")
    cache = EmbeddingCache(cache_path, max_tokens=max_tokens)
    vectors, found = cache.lookup(hashes)
    missing: dict[str, int] = {}  # hash -> first row with it
    for row in np.flatnonzero(~found):
        missing.setdefault(hashes[row], int(row))
    if missing:
        new = embed_texts(
            [texts[row] for row in missing.values()],
            batch_size=batch_size,
            max_tokens=max_tokens,
            on_progress=on_progress,
            model_file=model_file,
            threads=threads,
        )
        cache.add(list(missing), new)
        cache.save()
        vectors, found = cache.lookup(hashes)
    return vectors, len(missing)
