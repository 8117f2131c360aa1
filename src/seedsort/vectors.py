"""Documents -> sparse vectors.

Two modes, both giving L2-normalised float32 CSR rows (an all-zero row for a document with
no usable features, e.g. an empty one):

``tfidf``
    Word n-gram TF-IDF and character n-gram TF-IDF (sublinear tf, smoothed idf), each block
    L2-normalised, then joined side by side and scaled by 1/sqrt(2) so the whole row has unit
    norm and word and character evidence weigh the same in a cosine. Keeps a vocabulary:
    memory grows with the number of distinct n-grams.
``hashed``
    The same n-grams hashed into a fixed number of columns (the "hashing trick"), so no
    vocabulary is kept; idf still needs one pass of document frequencies.
``embed``
    Dense 384-dimensional sentence embeddings (all-MiniLM-L6-v2, int8, onnxruntime; the
    optional extra ``seedsort[embed]``, see :mod:`seedsort.embeddings`). Paraphrase-aware,
    some 40x slower than n-grams; cached per content hash when a cache file is given.

Optional stemming uses nltk's Snowball stemmers (no data download needed). Cost is linear
in the total text length.
"""

from __future__ import annotations

import re
from itertools import chain
from collections.abc import Callable, Iterable, Iterator, Sequence
from dataclasses import dataclass
from functools import lru_cache

import numpy as np
import scipy.sparse as sp
from sklearn.feature_extraction.text import (
    CountVectorizer,
    HashingVectorizer,
    TfidfVectorizer,
)
from sklearn.preprocessing import normalize

from ._progress import ProgressCallback
from .errors import InputError

_WORD = re.compile(r"(?u)\b\w+\b")
#: Rows per chunk when weighting and joining the blocks: bounds the transient copies.
_ROW_CHUNK = 20_000
VECTOR_MODES = ("tfidf", "hashed", "embed")


@dataclass(frozen=True, slots=True)
class VectorSettings:
    """How documents become vectors.

    Parameters
    ----------
    mode:
        ``"tfidf"`` (default) or ``"hashed"``.
    word_ngrams, char_ngrams:
        Inclusive n-gram ranges; ``None`` leaves that block out.
    stem_language:
        A Snowball language (``"english"``, ``"german"``, ...) or ``None`` for no stemming.
    hash_features:
        Columns per block in hashed mode.
    embedding_cache:
        In embed mode, a ``.npz`` file keeping vectors per content hash (None: no cache).
    """

    mode: str = "tfidf"
    word_ngrams: tuple[int, int] | None = (1, 2)
    char_ngrams: tuple[int, int] | None = (2, 5)
    stem_language: str | None = None
    hash_features: int = 2**20
    embedding_cache: str | None = None

    def describe(self) -> str:
        if self.mode == "embed":
            return "sentence embeddings (all-MiniLM-L6-v2, int8)"
        parts = [self.mode]
        if self.word_ngrams:
            parts.append(f"word {self.word_ngrams[0]}-{self.word_ngrams[1]}-grams")
        if self.char_ngrams:
            parts.append(f"char {self.char_ngrams[0]}-{self.char_ngrams[1]}-grams")
        if self.stem_language:
            parts.append(f"{self.stem_language} stemming")
        return ", ".join(parts)


def snowball_languages() -> tuple[str, ...]:
    """Languages nltk's Snowball stemmer supports."""
    from nltk.stem.snowball import SnowballStemmer

    return tuple(lang for lang in SnowballStemmer.languages if lang != "porter")


def _word_analyzer(stem_language: str | None) -> Callable[[str], list[str]] | None:
    if stem_language is None:
        return None
    if stem_language not in snowball_languages():
        raise InputError(
            f"Unknown stemming language {stem_language!r}; choose one of: "
            + ", ".join(snowball_languages())
            + "."
        )
    from nltk.stem.snowball import SnowballStemmer

    stem = lru_cache(maxsize=200_000)(SnowballStemmer(stem_language).stem)

    def tokens(text: str) -> list[str]:
        return [stem(tok) for tok in _WORD.findall(text.lower())]

    return tokens


def _word_ngram_analyzer(settings: VectorSettings) -> str | Callable[[str], list[str]]:
    tokenize = _word_analyzer(settings.stem_language)
    if tokenize is None:
        return "word"
    low, high = settings.word_ngrams or (1, 1)

    def analyse(text: str) -> list[str]:
        toks = tokenize(text)
        grams = []
        for n in range(low, high + 1):
            grams.extend(" ".join(toks[i : i + n]) for i in range(len(toks) - n + 1))
        return grams

    return analyse


def _transformer(kwargs: dict[str, object], settings: VectorSettings) -> object:
    """An unfitted hashing or TF-IDF vectoriser for one n-gram block."""
    if settings.mode == "hashed":
        return HashingVectorizer(
            n_features=settings.hash_features, alternate_sign=False, norm=None, dtype=np.float32, **kwargs
        )
    return TfidfVectorizer(sublinear_tf=True, dtype=np.float32, **kwargs)


def _blocks(settings: VectorSettings) -> list[object]:
    """One scikit-learn transformer per n-gram block (unfitted)."""
    blocks: list[object] = []
    if settings.mode not in VECTOR_MODES:
        raise InputError(
            f"Unknown vector mode {settings.mode!r}; choose one of: {', '.join(VECTOR_MODES)}."
        )
    if settings.word_ngrams:
        analyzer = _word_ngram_analyzer(settings)
        kwargs: dict[str, object] = {"lowercase": True}
        if analyzer == "word":
            kwargs.update(analyzer="word", ngram_range=settings.word_ngrams, token_pattern=_WORD.pattern)
        else:
            kwargs.update(analyzer=analyzer)
        blocks.append(_transformer(kwargs, settings))
    if settings.char_ngrams:
        kwargs = {"analyzer": "char_wb", "ngram_range": settings.char_ngrams, "lowercase": True}
        blocks.append(_transformer(kwargs, settings))
    if not blocks:
        raise InputError("Vector settings leave out both word and character n-grams; keep at least one.")
    return blocks


#: Documents tokenised at a time when counting words: bounds the token strings held at once.
_TOKEN_CHUNK = 20_000


def _token_ids(
    texts: Sequence[str],
    tokenize: Callable[[str], list[str]],
    report: Callable[[int], None] = lambda done: None,
) -> tuple[np.ndarray, np.ndarray, list[str]]:
    """Every text's tokens as integer ids: (ids, indptr, distinct tokens in order of first use).

    Document i's tokens are ``ids[indptr[i]:indptr[i + 1]]``. The texts are tokenised a
    chunk at a time and looked up through C-level ``map``/``dict`` calls, with a Python-level
    step only per distinct new token (in a profile on 30,000 generated tickets the look-ups
    took a fifth of the time of one ``setdefault`` per token). ``report(done)`` is called
    after each chunk.
    """
    index: dict[str, int] = {}
    chunks: list[np.ndarray] = []
    lengths = np.zeros(len(texts), dtype=np.int64)
    for start in range(0, len(texts), _TOKEN_CHUNK):
        per_text = [tokenize(text) for text in texts[start : start + _TOKEN_CHUNK]]
        lengths[start : start + len(per_text)] = [len(tokens) for tokens in per_text]
        flat = list(chain.from_iterable(per_text))
        for token in dict.fromkeys(flat):
            if token not in index:
                index[token] = len(index)
        chunks.append(np.fromiter(map(index.__getitem__, flat), dtype=np.int64, count=len(flat)))
        report(start + len(per_text))
    indptr = np.zeros(len(texts) + 1, dtype=np.int64)
    np.cumsum(lengths, out=indptr[1:])
    ids = np.concatenate(chunks) if chunks else np.zeros(0, dtype=np.int64)
    return ids, indptr, list(index)


def _lower_split(text: str) -> list[str]:
    return text.lower().split()


def _lower_words(text: str) -> list[str]:
    return _WORD.findall(text.lower())


def _word_counts(texts: Sequence[str], report: Callable[[int], None]) -> tuple[sp.csr_matrix, list[str]]:
    """Documents x distinct whitespace-separated lower-cased words, as float32 counts.

    The words are those scikit-learn's ``char_wb`` analyser pads and cuts into n-grams
    (``text.lower().split()``), in order of first appearance. Cost: linear in the text.
    """
    word_ids, indptr, words = _token_ids(texts, _lower_split, report)
    counts = sp.csr_matrix(
        (np.ones(word_ids.size, dtype=np.float32), word_ids, indptr), shape=(len(texts), len(words))
    )
    counts.sum_duplicates()
    return counts, words


def _row_chunks(n: int) -> list[tuple[int, int]]:
    return [(start, min(n, start + _ROW_CHUNK)) for start in range(0, n, _ROW_CHUNK)] or [(0, 0)]


class _HeldChunks:
    """Row chunks of counts held in memory; :meth:`take` hands one over and drops it."""

    def __init__(self, chunks: list[sp.csr_matrix | None]) -> None:
        self.chunks = chunks

    @classmethod
    def split(cls, matrix: sp.csr_matrix) -> _HeldChunks:
        return cls([sp.csr_matrix(matrix[start:stop]) for start, stop in _row_chunks(matrix.shape[0])])

    def __iter__(self) -> Iterator[sp.csr_matrix]:
        return (chunk for chunk in self.chunks if chunk is not None)

    def take(self, number: int) -> sp.csr_matrix:
        chunk, self.chunks[number] = self.chunks[number], None
        assert chunk is not None, "each chunk is taken once"
        return chunk


def _char_block_counts(block: object, texts: Sequence[str], report: Callable[[int], None]) -> _ProductChunks:
    """Character n-gram counts (``char_wb``) of every text, each distinct word cut only once.

    ``char_wb`` n-grams never cross a word boundary, so a text's counts are the sum of its
    words' counts: (documents x words) @ (words x n-grams). Ticket-like collections repeat
    the same few thousand words, so cutting each distinct word once (by the block's own
    scikit-learn analyser, fitted on the distinct words) instead of every occurrence makes
    this block ~4x faster at 30,000 generated tickets (14.3 s -> 3.7 s; hashed mode 10.1 s ->
    1.7 s; measured, loaded machine). The result equals the block
    applied to the texts themselves: same vocabulary, same column order (tested against
    scikit-learn's TfidfVectorizer and HashingVectorizer). Returned as row chunks.
    """
    per_document, words = _word_counts(texts, report)
    if isinstance(block, HashingVectorizer):
        per_word = block.transform(words)
    else:
        per_word = block.fit_transform(words)  # type: ignore[attr-defined]
    return _ProductChunks(per_document, sp.csr_matrix(per_word, dtype=np.float32))


class _ProductChunks:
    """Row chunks of (documents x words) @ (words x n-grams), each computed when asked.

    The character block is most of the vectors' size (~85% of the entries on tickets), so
    its counts are never all held: the idf pass and the joining pass each compute a chunk,
    use it and drop it (the product costs about a second per 300,000 tickets, measured).
    """

    def __init__(self, per_document: sp.csr_matrix, per_word: sp.csr_matrix) -> None:
        self.per_document, self.per_word = per_document, per_word
        self.spans = _row_chunks(per_document.shape[0])

    def __iter__(self) -> Iterator[sp.csr_matrix]:
        return (self.take(number) for number in range(len(self.spans)))

    def take(self, number: int) -> sp.csr_matrix:
        """Chunk ``number``, computed now (nothing is held, so there is nothing to drop)."""
        start, stop = self.spans[number]
        counts = (self.per_document[start:stop] @ self.per_word).tocsr()  # float32 counts: exact below 2^24
        counts.sort_indices()
        return counts


def _word_ngram_counts(
    texts: Sequence[str], ngram_range: tuple[int, int], report: Callable[[int], None]
) -> _HeldChunks:
    """Word 1-2-gram counts equal to scikit-learn's CountVectorizer(analyzer="word",
    token_pattern=r"(?u)\\b\\w+\\b", lowercase=True), vocabulary in its sorted order, as
    row chunks.

    Tokens become integer ids once; a bigram is a pair of consecutive ids, counted with
    numpy instead of one dictionary look-up per joined string (the word block took 3.4 s
    against scikit-learn's 8.3 s on 30,000 generated tickets, measured on a busy machine). The sorted order of the feature strings needs no string
    sort beyond the distinct words: tokens hold only word characters, all above the space
    (U+0020) that joins a bigram, so "a b" sorts exactly as the pair (a, b) and the unigram
    "a" as (a, nothing) (common practice for composite keys; tested against scikit-learn).
    Keys are made a row chunk at a time (twice: once for the vocabulary, once for the
    counts), so the transient arrays are a chunk's, not the collection's.
    """
    low, high = ngram_range
    token_ids, indptr, words = _token_ids(texts, _lower_words, report)
    n_words = len(words)
    rank = np.empty(n_words, dtype=np.int64)
    rank[sorted(range(n_words), key=words.__getitem__)] = np.arange(n_words)
    ranked = rank[token_ids]
    del token_ids, rank

    def keys_of(start: int, stop: int) -> tuple[np.ndarray, np.ndarray]:
        """(n-gram keys, their row within the chunk): key = rank(first) * (words + 1) +
        rank(second) + 1, or + 0 for a unigram."""
        tokens = ranked[indptr[start] : indptr[stop]]
        row = np.repeat(np.arange(stop - start, dtype=np.int64), np.diff(indptr[start : stop + 1]))
        keys, rows = [], []
        if low <= 1:
            keys.append(tokens * (n_words + 1))
            rows.append(row)
        if high >= 2:
            same_doc = row[1:] == row[:-1]
            keys.append(tokens[:-1][same_doc] * (n_words + 1) + tokens[1:][same_doc] + 1)
            rows.append(row[1:][same_doc])
        return np.concatenate(keys), np.concatenate(rows)

    spans = _row_chunks(len(texts))
    vocabulary = np.unique(np.concatenate([np.unique(keys_of(a, b)[0]) for a, b in spans]))
    chunks = []
    for start, stop in spans:
        keys, rows = keys_of(start, stop)
        counts = sp.csr_matrix(
            (np.ones(keys.size, dtype=np.float32), (rows, np.searchsorted(vocabulary, keys))),
            shape=(stop - start, vocabulary.size),
        )
        counts.sum_duplicates()
        chunks.append(counts)
    return _HeldChunks(chunks)


def _block_counts(
    block: object, texts: Sequence[str], report: Callable[[int], None]
) -> _HeldChunks | _ProductChunks:
    """One n-gram block's float32 counts, as row chunks, columns in scikit-learn's order.

    A block with no n-gram at all (every text empty) gives chunks with no columns.
    """
    if getattr(block, "analyzer", None) == "char_wb":
        if isinstance(block, HashingVectorizer):
            return _char_block_counts(block, texts, report)
        counting = CountVectorizer(analyzer="char_wb", ngram_range=block.ngram_range, dtype=np.float32)  # type: ignore[attr-defined]
        try:
            return _char_block_counts(counting, texts, report)
        except ValueError:  # empty vocabulary
            return _HeldChunks.split(sp.csr_matrix((len(texts), 0), dtype=np.float32))
    if isinstance(block, HashingVectorizer):  # stateless: chunk by chunk
        chunks = []
        for start, stop in _row_chunks(len(texts)):
            chunks.append(sp.csr_matrix(block.transform(texts[start:stop]), dtype=np.float32))
            report(stop)
        return _HeldChunks(chunks)
    if block.analyzer == "word" and block.token_pattern == _WORD.pattern and tuple(block.ngram_range) in {  # type: ignore[attr-defined]
        (1, 1), (1, 2), (2, 2)
    }:
        return _word_ngram_counts(texts, tuple(block.ngram_range), report)  # type: ignore[attr-defined]
    # The same n-grams counted (TfidfVectorizer is CountVectorizer + TfidfTransformer).
    shared = CountVectorizer().get_params()
    counting = CountVectorizer(
        **{k: v for k, v in block.get_params().items() if k in shared and k != "dtype"}, dtype=np.float32  # type: ignore[attr-defined]
    )
    try:
        whole = counting.fit_transform(texts)
    except ValueError:  # empty vocabulary
        whole = sp.csr_matrix((len(texts), 0), dtype=np.float32)
    report(len(texts))
    return _HeldChunks.split(sp.csr_matrix(whole, dtype=np.float32))


def _idf(chunks: Iterable[sp.csr_matrix], n_docs: int) -> tuple[np.ndarray | None, int, int]:
    """(idf, columns, stored entries) of one block's count chunks, in one pass over them.

    Smoothed idf, log((1 + n) / (1 + df)) + 1, in float32 with scikit-learn's own steps
    (TfidfTransformer.fit on float32 counts), so the weights are identical to its; None when
    the block has no columns.
    """
    df: np.ndarray | None = None
    nnz = 0
    for chunk in chunks:
        if df is None:
            df = np.zeros(chunk.shape[1], dtype=np.int64)
        df += np.bincount(chunk.indices, minlength=df.size)
        nnz += chunk.nnz
    if df is None or not df.size:
        return None, 0, nnz
    df_float = df.astype(np.float32)
    df_float += 1.0
    idf = np.full_like(df_float, fill_value=n_docs + 1, dtype=np.float32)
    idf /= df_float
    np.log(idf, out=idf)
    idf += 1.0
    return idf, df.size, nnz


def _weigh_in_place(chunk: sp.csr_matrix, idf: np.ndarray) -> sp.csr_matrix:
    """Sublinear tf times idf, rows L2-normalised: TfidfTransformer(sublinear_tf=True).transform
    step for step (then normalised once more, as the block always was)."""
    np.log(chunk.data, out=chunk.data)
    chunk.data += 1.0
    chunk.data *= idf[chunk.indices]
    normalize(chunk, norm="l2", copy=False)
    return normalize(chunk, norm="l2", copy=False)


def _ngram_vectors(texts: Sequence[str], settings: VectorSettings, progress: ProgressCallback) -> sp.csr_matrix:
    """Counts of every block, then weighting and joining a row chunk at a time into one CSR.

    The joined matrix is written into arrays allocated once at its final size, and each
    chunk's counts are dropped as soon as they are copied (the character block's are not
    even held: :class:`_ProductChunks`), so the peak is about one copy of the result plus the
    word block's counts (not the 3 copies of weighting and stacking whole blocks).
    """
    fitters = _blocks(settings)
    n = len(texts)
    per_block = []
    columns = nnz = 0
    for number, block in enumerate(fitters):
        # One bar over all blocks: each block's documents count for 1/len(blocks) of the total.
        def report(done: int, number: int = number) -> None:
            progress("vectors", (number * n + done) // len(fitters), n)

        chunks = _block_counts(block, texts, report)
        idf, width, stored = _idf(chunks, n)
        per_block.append((chunks, idf))
        columns, nnz = columns + width, nnz + stored
    index_type = np.int32 if max(columns, nnz) < np.iinfo(np.int32).max else np.int64
    data = np.empty(nnz, dtype=np.float32)
    indices = np.empty(nnz, dtype=index_type)
    indptr = np.zeros(n + 1, dtype=index_type)
    filled = 0
    for number, (start, stop) in enumerate(_row_chunks(n)):
        parts = []
        for chunks, idf in per_block:
            part = chunks.take(number)  # a held chunk is dropped once copied
            parts.append(part if idf is None else _weigh_in_place(part, idf))
        joined = sp.hstack(parts, format="csr", dtype=np.float32) if len(parts) > 1 else parts[0]
        if columns:  # sklearn's normalize rejects a matrix with no columns (all texts empty)
            joined = normalize(joined, norm="l2", copy=False)
        joined.sort_indices()
        data[filled : filled + joined.nnz] = joined.data
        indices[filled : filled + joined.nnz] = joined.indices
        indptr[start + 1 : stop + 1] = joined.indptr[1:] + filled
        filled += joined.nnz
    return sp.csr_matrix((data, indices, indptr), shape=(n, columns), copy=False)


def vectorise(
    texts: Sequence[str],
    settings: VectorSettings | None = None,
    *,
    on_progress: ProgressCallback | None = None,
) -> sp.csr_matrix | np.ndarray:
    """Turn texts into L2-normalised n-gram vectors.

    Parameters
    ----------
    texts:
        The documents' texts, in collection order.
    settings:
        See :class:`VectorSettings`; defaults when ``None``.

    Returns
    -------
    scipy.sparse.csr_matrix of shape (n_documents, n_features), float32 (a dense float32
    array in embed mode); every row has unit L2 norm, or is all zero when the document has
    no features.
    """
    settings = settings or VectorSettings()
    if settings.mode == "embed":
        from .embeddings import embed_texts, embed_with_cache, require_embeddings

        require_embeddings()
        if settings.embedding_cache:
            vectors, _ = embed_with_cache(texts, None, settings.embedding_cache, on_progress=on_progress)
            return np.asarray(vectors, dtype=np.float32)
        return np.asarray(embed_texts(texts, on_progress=on_progress), dtype=np.float32)
    return _ngram_vectors(texts, settings, on_progress or (lambda stage, done, total: None))
