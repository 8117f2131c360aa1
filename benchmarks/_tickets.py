"""A generated, ticket-like corpus resampled from BANKING77 (for the scale benchmark).

Each ticket is one to four BANKING77 utterances (Casanueva et al. 2020, CC BY 4.0, in
tests/data/banking77/): the first sets the ticket's category, the others come from the same
category with probability 0.7 (follow-up questions) or from any category. Around that, the
things that make a real export's vocabulary keep growing with its size (Heaps' law):
customer names and order / card references drawn from an open-ended Zipf-like pool, typos
(a swapped, dropped or doubled letter in about 3% of words), and an occasional greeting and
sign-off. Lengths: the number of utterances is 1 + a geometric variable (mean ~1.8), so a
few tickets are long and most are short, as in a support queue (common practice; the
exact shape of a real export varies).

Deterministic: the same size and seed give the same corpus, byte for byte.
"""

from __future__ import annotations

import csv
from collections.abc import Iterator
from pathlib import Path

import numpy as np

from _banking77 import load_pool

_GREETINGS = ("Hi,", "Hello,", "Hi team,", "Good morning,", "Dear support,", "Hey,")
_SIGN_OFFS = ("Thanks", "Thank you", "Regards", "Cheers", "Kind regards", "Best")
_SYLLABLES = ("an", "bel", "cor", "da", "el", "fin", "gar", "ha", "is", "jo", "ka", "li",
              "mar", "no", "ol", "pe", "quin", "ro", "sa", "ti", "ul", "ve", "wen", "xa",
              "yo", "zel")  # fmt: skip


def banking77_pool() -> tuple[list[str], np.ndarray, list[str]]:
    """BANKING77 train + test texts, their category index, and the sorted category names."""
    pool = load_pool()
    return pool.texts, np.concatenate([pool.y_train, pool.y_test]), pool.categories


def _name(rng: np.random.Generator) -> str:
    # An open-ended pool: Zipf ranks map to syllable strings, so new names keep appearing.
    rank = int(rng.zipf(1.3))
    parts = []
    while True:
        parts.append(_SYLLABLES[rank % len(_SYLLABLES)])
        rank //= len(_SYLLABLES)
        if rank == 0:
            break
    return "".join(parts).capitalize()


def _typo(word: str, rng: np.random.Generator) -> str:
    if len(word) < 4:
        return word
    i = int(rng.integers(1, len(word) - 1))
    kind = int(rng.integers(3))
    if kind == 0:
        return word[: i - 1] + word[i] + word[i - 1] + word[i + 1 :]
    if kind == 1:
        return word[:i] + word[i + 1 :]
    return word[:i] + word[i] + word[i:]


def tickets(n: int, seed: int = 0) -> Iterator[tuple[str, str, str]]:
    """Yield ``n`` (id, text, category name) tickets, deterministically from ``seed``."""
    texts, classes, names = banking77_pool()
    by_class = [np.flatnonzero(classes == c) for c in range(len(names))]
    rng = np.random.default_rng(seed)
    for number in range(n):
        first = int(rng.integers(len(texts)))
        category = int(classes[first])
        parts = [texts[first]]
        for _ in range(int(rng.geometric(0.55)) - 1):
            if rng.random() < 0.7:
                parts.append(texts[int(rng.choice(by_class[category]))])
            else:
                parts.append(texts[int(rng.integers(len(texts)))])
        words = " ".join(parts).split()
        words = [_typo(w, rng) if rng.random() < 0.03 else w for w in words]
        if rng.random() < 0.3:
            words.insert(int(rng.integers(len(words) + 1)), f"order {int(rng.integers(10**7)):07d}")
        if rng.random() < 0.4:
            words = [rng.choice(_GREETINGS), *words]
        if rng.random() < 0.4:
            words += [f"{rng.choice(_SIGN_OFFS)},", _name(rng)]
        yield f"T{number:07d}", " ".join(words), names[category]


def write_csv(path: Path, n: int, seed: int = 0, seeds_per_category: int = 10) -> None:
    """Write ``n`` tickets to a CSV file with columns id, text, label.

    Like an export where a few tickets were already categorised by hand, ``label`` is filled
    for the first ``seeds_per_category`` tickets of each category and empty elsewhere.
    """
    given: dict[str, int] = {}
    with path.open("w", encoding="utf-8", newline="") as handle:
        writer = csv.writer(handle)
        writer.writerow(["id", "text", "label"])
        for ticket_id, text, category in tickets(n, seed):
            label = category if given.get(category, 0) < seeds_per_category else ""
            given[category] = given.get(category, 0) + (label != "")
            writer.writerow([ticket_id, text, label])
