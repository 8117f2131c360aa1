"""The progress callback type shared by every long-running stage.

The library never prints: a stage reports ``(stage, done, total)`` to an optional
callback and the CLI turns that into progress bars. ``total`` is ``None`` when unknown.
"""

from __future__ import annotations

from collections.abc import Callable

ProgressCallback = Callable[[str, int, "int | None"], None]


def no_progress(stage: str, done: int, total: int | None) -> None:
    """Default callback: ignore progress."""
