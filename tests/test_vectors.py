"""Documents -> vectors, against scikit-learn's own TF-IDF and nltk's Snowball stemmer.

References: ``sklearn.feature_extraction.text.TfidfVectorizer`` (sublinear tf, smoothed idf,
L2 rows) built here independently with the block settings the module docstring states, and
``nltk.stem.snowball.SnowballStemmer``.
"""

from __future__ import annotations

import numpy as np
import pytest
import scipy.sparse as sp
from sklearn.feature_extraction.text import TfidfVectorizer

from seedsort.errors import InputError
from seedsort.vectors import VectorSettings, snowball_languages, vectorise

TEXTS = [
    "The ferry left late because of fog.",
    "Fog delayed the ferry again this morning!",
    "Refund my ticket, the card was charged twice.",
    "Café crème and croissants at the quay",  # non-ASCII
    "",  # empty -> all-zero row
    "The ferry left late because of fog.",  # duplicate text
]


def _reference_block(texts: list[str], **kwargs: object) -> np.ndarray:
    """Reference: sklearn TfidfVectorizer(sublinear_tf=True), default smooth idf and L2 norm."""
    return TfidfVectorizer(sublinear_tf=True, **kwargs).fit_transform(texts).toarray()


def test_word_block_equals_sklearn_tfidf() -> None:
    """Reference: sklearn TfidfVectorizer, word 1-2-grams, token pattern \\b\\w+\\b."""
    ours = vectorise(TEXTS, VectorSettings(char_ngrams=None))
    ref = _reference_block(TEXTS, ngram_range=(1, 2), token_pattern=r"(?u)\b\w+\b")
    assert ours.dtype == np.float32 and sp.isspmatrix_csr(ours)
    np.testing.assert_allclose(ours.toarray(), ref, atol=1e-6)


def test_default_vectors_join_word_and_char_blocks_with_equal_weight() -> None:
    """Reference: sklearn TfidfVectorizer word (1,2) and char_wb (2,5) blocks, each L2, joined / sqrt(2)."""
    ours = vectorise(TEXTS).toarray()
    word = _reference_block(TEXTS, ngram_range=(1, 2), token_pattern=r"(?u)\b\w+\b")
    char = _reference_block(TEXTS, analyzer="char_wb", ngram_range=(2, 5))
    np.testing.assert_allclose(ours, np.hstack([word, char]) / np.sqrt(2), atol=1e-6)


def test_rows_have_unit_norm_or_are_zero() -> None:
    """Common practice: L2-normalised rows make a dot product a cosine; the empty text gives a zero row."""
    norms = np.linalg.norm(vectorise(TEXTS).toarray(), axis=1)
    np.testing.assert_allclose(norms, [1, 1, 1, 1, 0, 1], atol=1e-6)


def test_hashed_mode_gives_the_same_cosines_as_tfidf() -> None:
    """Reference: the TF-IDF cosines above; hashing only renames columns (no collisions at 2**20)."""
    tfidf = vectorise(TEXTS)
    hashed = vectorise(TEXTS, VectorSettings(mode="hashed"))
    assert hashed.shape == (len(TEXTS), 2 * 2**20)
    np.testing.assert_allclose((hashed @ hashed.T).toarray(), (tfidf @ tfidf.T).toarray(), atol=1e-5)


def test_stemming_uses_snowball_stems() -> None:
    """Reference: nltk SnowballStemmer("english") maps 'delays'/'delayed' and 'charged'/'charging' together."""
    from nltk.stem.snowball import SnowballStemmer

    stem = SnowballStemmer("english").stem
    assert stem("delays") == stem("delayed") and stem("charged") == stem("charging")
    texts = ["delays charged", "delayed charging"]
    plain = vectorise(texts, VectorSettings(char_ngrams=None, word_ngrams=(1, 1)))
    stemmed = vectorise(texts, VectorSettings(char_ngrams=None, word_ngrams=(1, 1), stem_language="english"))
    assert (plain @ plain.T).toarray()[0, 1] == pytest.approx(0.0)
    assert (stemmed @ stemmed.T).toarray()[0, 1] == pytest.approx(1.0, abs=1e-6)
    assert "english" in snowball_languages() and "porter" not in snowball_languages()


def test_stemmed_bigrams_follow_the_word_range() -> None:
    """Reference: the n-gram definition (consecutive tokens); 2 tokens give 2 unigrams + 1 bigram."""
    one = vectorise(["runs quickly"], VectorSettings(char_ngrams=None, stem_language="english"))
    assert one.nnz == 3


def test_all_empty_texts_do_not_crash() -> None:
    """Common practice: a collection of empty notes has no vocabulary; every row is zero."""
    out = vectorise(["", "   ", ""])
    assert out.shape[0] == 3 and out.nnz == 0


@pytest.mark.parametrize(
    ("settings", "message"),
    [
        (VectorSettings(mode="embeddings"), "Unknown vector mode"),
        (VectorSettings(stem_language="klingon"), "Unknown stemming language"),
        (VectorSettings(word_ngrams=None, char_ngrams=None), "keep at least one"),
    ],
)
def test_bad_settings_raise_input_error(settings: VectorSettings, message: str) -> None:
    """Common practice: bad options fail with the library's own error and a readable message."""
    with pytest.raises(InputError, match=message):
        vectorise(TEXTS, settings)


def test_describe_names_the_blocks() -> None:
    """Common practice: the run record says how vectors were made."""
    text = VectorSettings(stem_language="german").describe()
    assert text == "tfidf, word 1-2-grams, char 2-5-grams, german stemming"


# Character n-grams are counted per distinct word (vectors._char_block_counts); the whole
# block must still equal scikit-learn's vectorisers run on the texts themselves, exactly.
EDGE_TEXTS = [
    *TEXTS,
    "   ",  # whitespace only
    "ΟΔΟΣ Σ aaa a İstanbul",  # context-dependent lower-casing (final sigma), dotted capital I
    "x\u00a0y\tz\n\nw",  # non-breaking space, tab, newlines
    "aa aa aa aaaaaa",  # repeated words; a word repeating its own n-grams
]


def _banking77_texts(count: int) -> list[str]:
    """BANKING77 training texts (Casanueva et al. 2020, CC BY 4.0; tests/data/banking77)."""
    import pandas as pd
    from pathlib import Path

    frame = pd.read_csv(Path(__file__).parent / "data" / "banking77" / "train.csv")
    return frame["text"].head(count).tolist()


def _assert_same_matrix(ours: sp.csr_matrix, ref: sp.spmatrix) -> None:
    """``ours`` equals the reference once the reference's rows are L2-normalised (float32):
    same shape, columns and stored entries; values equal to float32 rounding."""
    from sklearn.preprocessing import normalize

    ref = normalize(sp.csr_matrix(ref).astype(np.float32), norm="l2")
    ref.sort_indices()
    assert ours.shape == ref.shape
    np.testing.assert_array_equal(ours.indptr, ref.indptr)
    np.testing.assert_array_equal(ours.indices, ref.indices)
    np.testing.assert_allclose(ours.data, ref.data, rtol=1e-6, atol=0)


@pytest.fixture(params=[50_000, 333], ids=["one-chunk", "many-chunks"])
def row_chunk(request: pytest.FixtureRequest, monkeypatch: pytest.MonkeyPatch) -> int:
    """Rows weighted and joined at a time (vectors._ROW_CHUNK): one chunk, or many with a
    ragged last one; the matrix must not depend on it."""
    import seedsort.vectors

    monkeypatch.setattr(seedsort.vectors, "_ROW_CHUNK", request.param)
    return request.param


@pytest.mark.parametrize("mode", ["tfidf", "hashed"])
def test_char_block_equals_sklearn_exactly(mode: str, row_chunk: int) -> None:
    """Reference: sklearn TfidfVectorizer(analyzer="char_wb", ngram_range=(2, 5), sublinear_tf)
    in tfidf mode; HashingVectorizer(analyzer="char_wb", 2**20 columns, no sign, no norm) +
    TfidfTransformer(sublinear_tf) in hashed mode; both L2-normalised, on BANKING77 texts plus
    edge cases. Same columns and stored entries; values equal to float32 rounding (vectorise
    normalises the joined row once more, which can move a value by one unit in the last place)."""
    from sklearn.feature_extraction.text import HashingVectorizer, TfidfTransformer

    texts = _banking77_texts(2000) + EDGE_TEXTS
    ours = vectorise(texts, VectorSettings(mode=mode, word_ngrams=None))
    if mode == "tfidf":
        ref = TfidfVectorizer(
            analyzer="char_wb", ngram_range=(2, 5), lowercase=True, sublinear_tf=True, dtype=np.float32
        ).fit_transform(texts)
    else:
        hashed = HashingVectorizer(
            analyzer="char_wb", ngram_range=(2, 5), n_features=2**20, alternate_sign=False, norm=None,
            dtype=np.float32,
        ).transform(texts)
        ref = TfidfTransformer(sublinear_tf=True).fit_transform(hashed)
    _assert_same_matrix(ours, ref)


@pytest.mark.parametrize("ngram_range", [(1, 2), (1, 1), (2, 2)])
def test_word_block_equals_sklearn_exactly(ngram_range: tuple[int, int], row_chunk: int) -> None:
    """Reference: sklearn TfidfVectorizer(analyzer="word", token_pattern=r"(?u)\\b\\w+\\b",
    sublinear_tf=True), L2-normalised, on BANKING77 texts plus edge cases (words that are
    prefixes of others and underscores, which the sorted vocabulary must order as sklearn
    does). Same columns and stored entries; values equal to float32 rounding."""
    texts = _banking77_texts(2000) + EDGE_TEXTS + ["ab abc a a_b a b", "éa e a_ _ 1 10 1a"]
    ours = vectorise(texts, VectorSettings(word_ngrams=ngram_range, char_ngrams=None))
    ref = TfidfVectorizer(
        analyzer="word", ngram_range=ngram_range, token_pattern=r"(?u)\b\w+\b", lowercase=True,
        sublinear_tf=True, dtype=np.float32,
    ).fit_transform(texts)
    _assert_same_matrix(ours, ref)


def test_progress_reaches_every_document_once_per_bar() -> None:
    """The vectors bar (common practice for progress reporting: monotone, ends at the total)
    counts documents across both n-gram blocks and ends at the collection's size."""
    texts = _banking77_texts(45_000 // 10) * 10  # more than one tokenising chunk
    seen: list[tuple[str, int, int | None]] = []
    vectorise(texts, on_progress=lambda stage, done, total: seen.append((stage, done, total)))
    assert {stage for stage, _, _ in seen} == {"vectors"}
    assert all(total == len(texts) for _, _, total in seen)
    done = [d for _, d, _ in seen]
    assert done == sorted(done) and done[-1] == len(texts) and len(done) >= 4


def test_joined_blocks_equal_sklearn_stacked(row_chunk: int) -> None:
    """Reference: the two sklearn TfidfVectorizer blocks (word 1-2, char_wb 2-5, sublinear tf),
    each L2-normalised, joined with scipy.sparse.hstack and normalised again: the module
    docstring's definition, computed on BANKING77 texts whole; ours is built a row chunk at
    a time."""
    from sklearn.preprocessing import normalize

    texts = _banking77_texts(1500) + EDGE_TEXTS
    word = TfidfVectorizer(
        ngram_range=(1, 2), token_pattern=r"(?u)\b\w+\b", sublinear_tf=True, dtype=np.float32
    ).fit_transform(texts)
    char = TfidfVectorizer(analyzer="char_wb", ngram_range=(2, 5), sublinear_tf=True, dtype=np.float32).fit_transform(texts)
    ref = sp.hstack([normalize(word), normalize(char)], format="csr")
    ours = vectorise(texts)
    assert ours.dtype == np.float32
    _assert_same_matrix(ours, ref)
