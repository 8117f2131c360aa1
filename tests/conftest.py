"""Shared tiny corpora for the engine tests.

The sentences are invented for these tests; four topics of ten sentences each, all
distinct, plus deliberate edge cases where a test asks for them (an empty document -> an
all-zero vector row, non-ASCII text, a category with one seed).
"""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

_SRC = Path(__file__).resolve().parents[1] / "src"
if str(_SRC) not in sys.path:
    sys.path.insert(0, str(_SRC))

from seedsort.sources import Document  # noqa: E402

REPO_ROOT = Path(__file__).resolve().parents[1]

TOPICS: dict[str, list[str]] = {
    "weather": [
        "Heavy rain is expected over the hills tonight.",
        "The forecast says sunny spells and a light breeze tomorrow.",
        "Snow closed the mountain pass for the whole weekend.",
        "A thunderstorm knocked out power in the valley.",
        "Fog over the bay delayed the morning fishing boats.",
        "Strong winds and hail battered the coast on Monday.",
        "The drought ended after three days of steady rain.",
        "Frost covered the fields before sunrise.",
        "Humid heat made the afternoon storm feel inevitable.",
        "The weather office issued a warning for icy roads.",
    ],
    "cooking": [
        "Simmer the onions slowly in butter until golden.",
        "Knead the bread dough for ten minutes, then let it rise.",
        "Season the soup with salt, pepper and fresh thyme.",
        "Roast the potatoes in a hot oven with rosemary.",
        "Whisk the eggs and sugar until pale and fluffy.",
        "Grill the fish skin side down over high heat.",
        "A pinch of saffron colours the rice a deep yellow.",
        "Chop the garlic finely and fry it in olive oil.",
        "Bake the cake for forty minutes and cool on a rack.",
        "Marinate the chicken overnight in yoghurt and spices.",
    ],
    "football": [
        "The striker scored twice in the second half.",
        "Our goalkeeper saved a penalty in the final minute.",
        "The referee showed a red card after the tackle.",
        "The league leaders drew one all away from home.",
        "A corner kick found the defender for a header goal.",
        "The coach changed formation at half time.",
        "Fans sang all match as the club won the cup.",
        "The midfielder signed a three year contract with the club.",
        "An offside flag cancelled the late equaliser.",
        "The team trained on the pitch before the derby.",
    ],
    "computers": [
        "The laptop will not boot after the latest update.",
        "Install the printer driver before connecting the cable.",
        "My keyboard types the wrong letters since yesterday.",
        "Back up the hard disk before reinstalling the system.",
        "The server ran out of memory during the nightly job.",
        "Reset the router to fix the wireless connection.",
        "The spreadsheet crashes when I open large files.",
        "A virus scan found nothing on the office computer.",
        "The monitor flickers when the graphics card heats up.",
        "Update the browser to get the latest security patches.",
    ],
}


def topic_documents(extra: tuple[str, ...] = ()) -> tuple[list[Document], list[str]]:
    """Documents ``<topic>-<i>.txt`` of the four topics (+ ``extra-<i>.txt``) and their true topics."""
    docs, truth = [], []
    for topic, sentences in TOPICS.items():
        for i, text in enumerate(sentences):
            docs.append(Document.make(f"{topic}-{i}.txt", f"{topic}-{i}.txt", text))
            truth.append(topic)
    for i, text in enumerate(extra):
        docs.append(Document.make(f"extra-{i}.txt", f"extra-{i}.txt", text))
        truth.append("")
    return docs, truth


@pytest.fixture
def sentences() -> list[str]:
    """The forty topic sentences followed by one empty document."""
    return [s for group in TOPICS.values() for s in group] + [""]
